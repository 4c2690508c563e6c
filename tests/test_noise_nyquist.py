"""Nyquist's theorem for passive networks: a reciprocal RC network in thermal equilibrium shows
an open-circuit noise density of 4kT·Re{Z(f)} at any port (Nyquist, Phys. Rev. 32, 1928, the
generalised Johnson–Nyquist formula), where Z is the port's impedance.  The noise analysis
(every resistor's 4kT/R transferred by adjoint solves) and the output impedance (a separate
forward solve with the source zeroed) must agree, for random ladders."""

from __future__ import annotations

import math

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st
from response_helpers import curve, results
from scipy import constants


def ladder(source_resistance, sections):
    lines = [f"VS  signal    1 mV 1 kHz source={source_resistance:.6g} : n0 gnd"]
    for k, (r_series, r_shunt, c) in enumerate(sections):
        lines.append(f"RS{k} resistor  {r_series:.6g} : n{k} n{k + 1}")
        lines.append(f"RP{k} resistor  {r_shunt:.6g} : n{k + 1} gnd")
        lines.append(f"C{k}  capacitor {c:.6g} : n{k + 1} gnd")
    return "\n".join(lines)


@settings(max_examples=15, deadline=None)
@given(st.floats(1.0, 10e3),
       st.lists(st.tuples(st.floats(10.0, 100e3), st.floats(10.0, 1e6), st.floats(1e-10, 1e-6)),
                min_size=1, max_size=3))
def test_output_noise_is_4kt_real_part_of_output_impedance(source_resistance, sections):
    out = results(ladder(source_resistance, sections),
                  bench=f"input VS\noutput n{len(sections)}\nfrequencies 10 Hz .. 1 MHz\n"
                        "noise band 10 Hz .. 1 MHz\npoints per decade 10")
    ac, noise = out["ac"], out["noise"]
    assert np.allclose(curve(ac, "freq_hz"), curve(noise, "freq_hz"))
    z = ac["zout_curve_ohm"]
    real_part = np.array(z["magnitude"]) * np.cos(np.radians(z["phase_deg"]))
    kt = constants.k * (25.0 + constants.zero_Celsius)
    expected = np.sqrt(4 * kt * real_part)
    assert np.allclose(curve(noise, "output_density_v_per_rthz"), expected, rtol=1e-6)
    assert math.isfinite(noise["output_rms_v"])
