"""The literal physical constants against scipy.constants (a general reference library)."""

from __future__ import annotations

import pytest
import scipy.constants

from aerial.core import constants

# (our name, scipy.constants name, relative tolerance). The exact SI constants must agree exactly; the
# measured ones within 1e-9, which also accepts scipy releases that carry the CODATA 2018 values
# (mu_0 and epsilon_0 changed by 7e-10 relative between the 2018 and 2022 adjustments).
CHECKS = [
    ("SPEED_OF_LIGHT", "c", 0.0),
    ("BOLTZMANN", "Boltzmann", 0.0),
    ("ELEMENTARY_CHARGE", "elementary_charge", 0.0),
    ("MU_0", "mu_0", 1e-9),
    ("EPSILON_0", "epsilon_0", 1e-9),
]


@pytest.mark.parametrize("ours, theirs, rel", CHECKS, ids=[c[0] for c in CHECKS])
def test_constant_matches_scipy_constants(ours, theirs, rel):
    assert getattr(constants, ours) == pytest.approx(getattr(scipy.constants, theirs), rel=rel, abs=0.0)


def test_epsilon_0_is_one_over_mu_0_c_squared():
    # consistency check of the literals: epsilon_0 mu_0 c^2 = 1 within the CODATA rounding (1e-10)
    c = constants.SPEED_OF_LIGHT
    assert constants.EPSILON_0 * constants.MU_0 * c * c == pytest.approx(1.0, rel=1e-10)
