"""Physical constants, SI, as literals (CODATA 2022 recommended values).

Written out here so that a report does not import ``scipy.constants`` (more
than 100 ms of start-up for five numbers); ``tests/test_constants.py`` checks
each one against ``scipy.constants``.

References
----------
.. [1] E. Tiesinga, P. J. Mohr, D. B. Newell and B. N. Taylor, "CODATA
   recommended values of the fundamental physical constants", NIST; the
   2022 adjustment (values as distributed with scipy.constants).
"""

from __future__ import annotations

#: Speed of light in vacuum (exact by the SI definition of the metre). [m/s]
SPEED_OF_LIGHT = 299792458.0

#: Magnetic constant mu_0 (CODATA 2022; relative uncertainty 1.6e-10). [N/A^2]
MU_0 = 1.25663706127e-06

#: Electric constant epsilon_0 = 1/(mu_0 c^2) (CODATA 2022). [F/m]
EPSILON_0 = 8.8541878188e-12

#: Boltzmann constant (exact by the SI definition of the kelvin). [J/K]
BOLTZMANN = 1.380649e-23

#: Elementary charge (exact by the SI definition of the ampere). [C]
ELEMENTARY_CHARGE = 1.602176634e-19

__all__ = ["BOLTZMANN", "ELEMENTARY_CHARGE", "EPSILON_0", "MU_0", "SPEED_OF_LIGHT"]
