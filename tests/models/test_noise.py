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


# ITU-R P.372 man-made noise figure: the published lines (Fam against log frequency, one per environment)
# at 0.3 MHz (their lower end), 1, 3 and 10 MHz. The points are taken on the lines as the recommendation
# defines them, Fam = c − d log10 f_MHz with the Table 1 coefficients (from memory), to 0.1 dB (the printed
# precision); this pins the whole line, including its low-frequency end that MF reception uses most.
P372_LINES = {
    "city": [91.3, 76.8, 63.6, 49.1],
    "residential": [87.0, 72.5, 59.3, 44.8],
    "rural": [81.7, 67.2, 54.0, 39.5],
    "quiet rural": [68.6, 53.6, 40.0, 25.0],
}


@pytest.mark.parametrize("category", list(P372_LINES))
def test_fam_against_p372_lines(category):
    got = noise.man_made_noise_figure(np.array([0.3e6, 1e6, 3e6, 10e6]), category).noise_figure_db
    np.testing.assert_allclose(got, P372_LINES[category], atol=0.1)


def test_noise_field_constant_from_physical_constants():
    # Outside derivation (scipy.constants): a short vertical over perfect ground delivers at most
    # P = E²λ²/(640π²) (Balanis ch. 4, lossless monopole); setting P = fa·k·T0·b (T0 = 290 K, P.372's reference)
    # gives En[dB(µV/m)] = Fa + 20 log f_MHz + 10 log b + K with K = 10 log(k T0 · 640π² / (c/1 MHz)²) + 120
    # = −95.5 dB, the constant of ITU-R P.372 (from memory).
    from scipy.constants import Boltzmann, c
    k_db = 10 * np.log10(Boltzmann * 290.0 * 640 * np.pi**2 / (c / 1e6) ** 2) + 120
    assert k_db == pytest.approx(-95.5, abs=0.05)
    for fa, f, b in [(72.5, 1e6, 10e3), (40.0, 7e6, 3e3), (90.0, 0.3e6, 9e3)]:
        expected = fa + 20 * np.log10(f / 1e6) + 10 * np.log10(b) + k_db
        assert float(noise.noise_field_dbuv_per_m(fa, f, b)) == pytest.approx(expected, abs=0.05)


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
