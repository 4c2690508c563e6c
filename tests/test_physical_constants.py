"""The solver's physical constants against scipy.constants (CODATA values, a general-purpose
library) and the SI brochure's exact definitions (BIPM, 9th edition, 2019)."""

from scipy import constants

from docgen.solve import physical


def test_constants_match_scipy() -> None:
    assert constants.k == physical.BOLTZMANN
    assert constants.e == physical.ELEMENTARY_CHARGE
    assert constants.zero_Celsius == physical.ZERO_CELSIUS


def test_thermal_voltage_at_300_kelvin() -> None:
    """kT/q at 300 K is 25.85 mV (textbook value, e.g. Sedra & Smith, Microelectronic Circuits)."""
    from docgen.solve.devices import thermal_voltage

    assert abs(float(thermal_voltage(300.0)) - 0.025852) < 1e-6
