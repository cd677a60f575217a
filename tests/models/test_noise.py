"""Tests for man-made noise (ITU-R P.372)."""

# "check values §N" refers to the sections of docs/check-values.md.

import numpy as np
import pytest

from aerial.core.errors import ModelInputError
from aerial.models import noise


@pytest.mark.parametrize("category, c, d", [
    ("city", 76.8, 27.7), ("residential", 72.5, 27.7), ("rural", 67.2, 27.7), ("quiet rural", 53.6, 28.6),
])
def test_p372_coefficients(category, c, d):
    # ITU-R P.372 Table 1 (from memory; matches a secondary quotation): Fam = c − d log10 f_MHz
    f = np.array([1e6, 10e6])
    got = noise.man_made_noise_figure(f, category).noise_figure_db
    np.testing.assert_allclose(got, [c, c - d], atol=1e-9)


def test_residential_field_1mhz_10khz():
    # check values §9 [num from ITU-R P.372]: residential, 1 MHz, 10 kHz -> 17.0 dB(µV/m)
    fa = noise.man_made_noise_figure(1e6, "residential").noise_figure_db
    assert float(noise.noise_field_dbuv_per_m(fa, 1e6, 10e3)) == pytest.approx(17.0, abs=0.05)


def test_below_range_flag():
    r = noise.man_made_noise_figure(np.array([0.2e6, 0.5e6]), "rural")
    assert list(r.below_range) == [True, False]
    assert "atmospheric" in noise.BELOW_RANGE_NOTE


def test_unknown_category_lists_choices():
    with pytest.raises(ModelInputError, match="'town' is not a valid noise category, must be one of 'city'"):
        noise.man_made_noise_figure(1e6, "town")


def test_db_round_trip():
    # consistency: dB(µV/m) conversions invert each other
    assert float(noise.v_per_m_from_dbuv_per_m(noise.dbuv_per_m_from_v_per_m(3.3e-4))) == pytest.approx(3.3e-4)
    assert float(noise.db_from_power_ratio(2.0)) == pytest.approx(10 * np.log10(2))
