"""Physical constants of the solver, as the SI defines them (BIPM, The International System of
Units, 9th edition, 2019: the Boltzmann constant and the elementary charge are exact).

Written out instead of imported from ``scipy.constants``: that import costs a few hundred
milliseconds at start-up (it loads scipy's array-API layer), which every ``docgen check``
paid.  ``tests/test_physical_constants.py`` checks them against scipy.constants.
"""

#: Boltzmann constant k, J/K (exact).
BOLTZMANN = 1.380649e-23
#: Elementary charge q, C (exact).
ELEMENTARY_CHARGE = 1.602176634e-19
#: 0 °C in kelvin (exact).
ZERO_CELSIUS = 273.15
