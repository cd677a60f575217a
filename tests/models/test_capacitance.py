"""Capacitance: average-potential closed forms and the electrostatic moment solution."""

# "check values §N" refers to the sections of docs/check-values.md.

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.constants import epsilon_0

from aerial.core.errors import ModelInputError
from aerial.models import capacitance as cp
from aerial.models.segments import Segments, polyline_segments

A = 1e-3  # wire radius of the reference table [m]
GAP = 0.02  # base gap of the reference table [m]

# check values §3: [num] consistency values from an independent thin-wire electrostatic
# moment solution with images (a = 1 mm, base gap 2 cm, perfect ground). Not published values.
INDEPENDENT_MOMENT_SOLUTION = {
    "vertical 10 m": (polyline_segments([[0, 0, GAP], [0, 0, 10]], A), 68.25e-12, 4.866),
    "inverted-L 10 + 20 m": (polyline_segments([[0, 0, GAP], [0, 0, 10], [20, 0, 10]], A), 181.6e-12, 8.133),
    "inverted-L 10 + 40 m": (polyline_segments([[0, 0, GAP], [0, 0, 10], [40, 0, 10]], A), 294.7e-12, 8.852),
    "T 10 m + 2 x 10 m": (
        Segments([[0, 0, GAP], [0, 0, 10], [0, 0, 10]], [[0, 0, 10], [10, 0, 10], [-10, 0, 10]], A, False, [0, 0, GAP]),
        176.7e-12,
        8.120,
    ),
    "horizontal 30 m at 10 m": (polyline_segments([[0, 0, 10], [30, 0, 10]], A), 179.1e-12, None),
}


def test_horizontal_wire_per_metre():
    # Image method (any electromagnetics text): C' = 2 pi eps0 / arccosh(H/a); check values §3: 5.6175 pF/m.
    assert cp.horizontal_wire_capacitance_per_m(10.0, 1e-3) == pytest.approx(5.6175e-12, rel=1e-4)
    assert cp.horizontal_wire_capacitance_per_m(10.0, 1e-3) == pytest.approx(
        2 * np.pi * epsilon_0 / np.arccosh(1e4), rel=1e-12
    )


def test_isolated_wire_howe_and_jackson():
    # Howe (average potential) and Jackson, Am. J. Phys. 68, 789 (2000) series, both from memory;
    # check values §3 values for L = 20 m, a = 1 mm: Howe 115.94 pF, Jackson 116.14 pF.
    assert cp.isolated_wire_capacitance(20.0, 1e-3) == pytest.approx(115.94e-12, rel=2e-4)
    assert cp.isolated_wire_capacitance_jackson(20.0, 1e-3) == pytest.approx(116.14e-12, rel=2e-4)


def test_isolated_wire_moment_solution():
    # [num] check values §3: numerical 116.27 pF; Thomson's theorem: at least the Howe value;
    # Jackson's series (2000) within 0.2 %.
    sol = cp.electrostatic_solution(polyline_segments([[0, 0, 0], [20, 0, 0]], 1e-3), target_unknowns=480, ground_plane=False)
    assert sol.capacitance_f == pytest.approx(116.27e-12, rel=2e-3)
    assert sol.capacitance_f > cp.isolated_wire_capacitance(20.0, 1e-3)
    assert sol.capacitance_f == pytest.approx(cp.isolated_wire_capacitance_jackson(20.0, 1e-3), rel=2e-3)


def test_vertical_howe_reduces_to_no_gap_form():
    # Howe's vertical wire from the ground: C = 2 pi eps0 h / [ln(h/a) - 1] (check values §3, from memory).
    h, a = 10.0, 1e-3
    assert cp.vertical_wire_capacitance(h, a, 0.0) == pytest.approx(2 * np.pi * epsilon_0 * h / (np.log(h / a) - 1), rel=1e-12)


def test_horizontal_howe_section_value():
    # [num] check values §3: the 20 m top of the 10 + 20 m inverted-L alone, 121.9 pF.
    assert cp.horizontal_wire_capacitance(20.0, 10.0, 1e-3) == pytest.approx(121.9e-12, rel=5e-4)


@pytest.mark.parametrize("name", list(INDEPENDENT_MOMENT_SOLUTION))
def test_reference_table(name):
    seg, c_ref, he_ref = INDEPENDENT_MOMENT_SOLUTION[name]
    sol = cp.electrostatic_solution(seg)
    assert sol.converged
    assert sol.capacitance_f == pytest.approx(c_ref, rel=0.01)  # [num] consistency, check values §3
    if he_ref is not None:
        assert sol.effective_height_m == pytest.approx(he_ref, rel=0.01)


def test_reference_table_converges_with_subdivision():
    seg, c_ref, he_ref = INDEPENDENT_MOMENT_SOLUTION["inverted-L 10 + 20 m"]
    cs = [cp.electrostatic_solution(seg, target_unknowns=n).capacitance_f for n in (60, 120, 240, 480)]
    assert np.all(np.diff(cs) > 0)  # pulse-basis C rises towards its limit
    assert abs(cs[-1] - c_ref) < abs(cs[0] - c_ref)
    assert cs[-1] == pytest.approx(c_ref, rel=1e-3)


def test_howe_lower_bound_thomson():
    # Thomson's theorem: the uniform-charge (average-potential) value never exceeds the true capacitance.
    vert = cp.electrostatic_solution(polyline_segments([[0, 0, GAP], [0, 0, 10]], A))
    assert vert.capacitance_f >= cp.vertical_wire_capacitance(10.0, A, GAP)
    horiz = cp.electrostatic_solution(polyline_segments([[0, 0, 10], [30, 0, 10]], A))
    assert horiz.capacitance_f >= cp.horizontal_wire_capacitance(30.0, 10.0, A)


def test_section_sums_overshoot():
    # check values §3 [num]: sections shield each other, so the sum of section capacitances overshoots.
    sol = cp.electrostatic_solution(INDEPENDENT_MOMENT_SOLUTION["inverted-L 10 + 20 m"][0])
    parts = cp.vertical_wire_capacitance(10.0, A, GAP) + cp.horizontal_wire_capacitance(20.0, 10.0, A)
    assert sol.capacitance_f < parts


def _open_circuit_height(seg: Segments, n=200):
    """Independent check of h_e: solve the receiving problem directly (consistency, Green's reciprocity).

    External potential -E0 z with E0 = 1 V/m; aerial floating with zero net charge at unknown V;
    earth lead at 0 V. Returns -V / E0.
    """
    sol = cp.electrostatic_solution(seg, target_unknowns=n)
    s, e, g = sol.start, sol.end, sol.grounded
    mid = 0.5 * (s + e)
    flip = np.array([1.0, 1.0, -1.0])
    rad = seg.radius[sol.parent]
    pot = cp.segment_potential_integral(mid[:, None], s[None], e[None], rad[None]) - cp.segment_potential_integral(
        mid[:, None], (s * flip)[None], (e * flip)[None], rad[None]
    )
    m = len(mid)
    lengths = np.linalg.norm(e - s, axis=1)
    # unknowns: q_j (charge), V. Row i: sum_j pot_ij q_j / (4 pi eps0 L_j) - V [aerial] = E0 z_i
    mat = np.zeros((m + 1, m + 1))
    mat[:m, :m] = pot / (4 * np.pi * epsilon_0 * lengths[None, :])
    mat[:m, m] = np.where(g, 0.0, -1.0)
    mat[m, :m] = np.where(g, 0.0, 1.0)
    rhs = np.concatenate([mid[:, 2], [0.0]])
    v = np.linalg.solve(mat, rhs)[m]
    return -v, sol.effective_height_m


@pytest.mark.parametrize(
    "seg",
    [
        polyline_segments([[0, 0, GAP], [0, 0, 10], [20, 0, 10]], A),
        # receiver 1.5 m up with a 1.5 m earth lead to the ground
        Segments([[0, 0, 1.5], [0, 0, 1.5], [0, 0, 9]], [[0, 0, 0.0], [0, 0, 9], [25, 0, 9]], A, [True, False, False], [0, 0, 1.5]),
    ],
)
def test_effective_height_is_open_circuit_voltage_per_field(seg):
    # Point matching makes the discrete matrix slightly unsymmetric, so the two agree to the
    # discretisation error (about 2e-5 here), not to rounding.
    direct, reciprocal = _open_circuit_height(seg)
    assert reciprocal == pytest.approx(direct, rel=1e-3)


def test_earth_lead_lowers_effective_height():
    # Induced negative charge on a grounded wire next to the aerial pulls the charge-weighted height down.
    free = polyline_segments([[0, 0, 3], [0, 0, 10], [20, 0, 10]], A, feed=[0, 0, 3])
    lead = Segments([[0, 0, 3], [0, 0, 3], [0, 0, 10]], [[0, 0, 0], [0, 0, 10], [20, 0, 10]], A, [True, False, False], [0, 0, 3])
    s_free = cp.electrostatic_solution(free)
    s_lead = cp.electrostatic_solution(lead)
    assert np.all(s_lead.charge_c[s_lead.grounded] < 0)
    total_z = np.sum(s_free.charge_c * 0.5 * (s_free.start[:, 2] + s_free.end[:, 2])) / s_free.capacitance_f
    assert s_lead.effective_height_m < total_z


def test_rejects_bad_input():
    with pytest.raises(ModelInputError, match="no aerial"):
        cp.electrostatic_solution(polyline_segments([[0, 0, 1], [0, 0, 0]], A, grounded=True))
    with pytest.raises(ModelInputError, match="below|above the ground plane"):
        cp.electrostatic_solution(polyline_segments([[0, 0, -1], [0, 0, 5]], A))
    with pytest.raises(ModelInputError, match="max_unknowns"):
        cp.electrostatic_solution(polyline_segments([[0, 0, GAP], [0, 0, 100]], A), target_unknowns=5000)
    with pytest.raises(ModelInputError, match="tolerance"):
        cp.electrostatic_solution(polyline_segments([[0, 0, GAP], [0, 0, 10]], A), tolerance=0.0)
    with pytest.raises(ModelInputError, match="base_gap"):
        cp.vertical_wire_capacitance(10.0, A, 11.0)


@settings(max_examples=15, deadline=None)
@given(
    height=st.floats(0.5, 100.0),
    top=st.floats(1.0, 300.0),
    radius=st.floats(1e-4, 5e-2),
    grow=st.floats(1.1, 3.0),
)
def test_capacitance_grows_with_length(height, top, radius, grow):
    def c(t):
        seg = polyline_segments([[0, 0, GAP], [0, 0, height], [t, 0, height]], radius)
        return cp.electrostatic_solution(seg, target_unknowns=80).capacitance_f

    c1, c2 = c(top), c(top * grow)
    assert np.isfinite(c1) and c1 > 0
    assert c2 > c1


@settings(max_examples=40, deadline=None)
@given(height=st.floats(1.0, 100.0), radius=st.floats(1e-4, 5e-2), grow=st.floats(1.05, 3.0))
def test_vertical_capacitance_grows_with_height_to_radius_ratio(height, radius, grow):
    # Howe vertical: taller wire of the same radius (larger h/a) has more capacitance, and so has
    # the moment solution; a fatter wire (smaller h/a) of the same height has more too.
    assert cp.vertical_wire_capacitance(height * grow, radius) > cp.vertical_wire_capacitance(height, radius)
    assert cp.vertical_wire_capacitance(height, radius * grow) > cp.vertical_wire_capacitance(height, radius)


#: How close the fill (asinh at the pieces' shared ends) comes to the segment integral of each piece: both
#: stay within ~1e-13 of the exact integral (a difference of two asinh of up to ~12 keeps ~1e-15 absolute)
#: -- consistency check.
FILL_RTOL, FILL_ATOL = 1e-12, 1e-11


def test_consistency_potential_matrix_is_the_segment_integral():
    # consistency check: the (points × pieces) fill, one piece per segment, gives the numbers of the
    # broadcast segment_potential_integral, on-segment midpoints included
    rng = np.random.default_rng(5)
    start = rng.uniform(0, 20, (40, 3))
    end = start + rng.normal(0, 3, (40, 3))
    radius = rng.uniform(1e-4, 3e-3, 40)
    points = np.concatenate([0.5 * (start + end), rng.uniform(-5, 25, (25, 3))])
    ref = cp.segment_potential_integral(points[:, None, :], start[None], end[None], radius[None, :])
    got = cp._potential_fill(points, start, end, np.ones(40, dtype=int), radius)
    np.testing.assert_allclose(got, ref, rtol=FILL_RTOL, atol=FILL_ATOL)


def _images_by_the_integral(points, start, end, radius, image, wall):
    """The fill written out term by term: segment_potential_integral of each reflected segment set."""
    def term(s, e):
        return cp.segment_potential_integral(points[:, None, :], s[None], e[None], radius[None, :])

    flip = np.diag([1.0, 1.0, -1.0])
    total = term(start, end)
    if image:
        total = total - term(start @ flip, end @ flip)
    if wall is not None:
        p0, n = wall
        m = np.eye(3) - 2.0 * np.outer(n, n)
        shift = 2.0 * float(np.dot(p0, n)) * n
        total = total - term(start @ m + shift, end @ m + shift)
        if image:
            total = total + term(start @ (m @ flip) + shift @ flip, end @ (m @ flip) + shift @ flip)
    return total


@pytest.mark.parametrize("image", [False, True])
@pytest.mark.parametrize("with_wall", [False, True])
def test_consistency_potential_fill_with_images_is_the_segment_integral(image, with_wall):
    # consistency check: the blocked fill of segments cut into pieces, with ground and wall images, gives
    # the sum of the segment integrals of the reflected piece sets, over several row blocks
    rng = np.random.default_rng(11)
    n = 60
    start = rng.uniform(0, 20, (n, 3)) + [0.0, 0.0, 0.5]
    end = start + rng.normal(0, 3, (n, 3))
    end[:, 2] = np.abs(end[:, 2]) + 0.3
    end[:8, :2] = start[:8, :2]  # some verticals
    radius = rng.uniform(1e-4, 3e-3, n)
    counts = rng.integers(1, 9, n)
    s, e, parent = cp._subdivide(start, end, counts)
    points = 0.5 * (s + e)
    normal = np.array([np.cos(0.4), np.sin(0.4), 0.0])
    wall = (np.array([-30.0, -30.0, 0.0]), normal) if with_wall else None
    ref = _images_by_the_integral(points, s, e, radius[parent], image, wall)
    got = cp._potential_fill(points, start, end, counts, radius, image, wall)
    assert len(points) * (len(points) + n) > cp.FILL_BLOCK_ELEMENTS  # more than one block of rows
    np.testing.assert_allclose(got, ref, rtol=FILL_RTOL, atol=FILL_ATOL)


def test_potential_fill_of_a_long_wire_keeps_its_self_terms():
    # check against the closed form: the integral of ds / sqrt(s^2 + a^2) over (-l/2, l/2) is 2 asinh(l / 2a)
    # (a standard integral, from memory), for the pieces of a 30 m wire far along its own line from its start,
    # where |w|^2 - z^2 would cancel
    counts = np.array([200])
    start, end = np.array([[0.0, 0.0, 5.0]]), np.array([[30.0, 0.0, 5.0]])
    s, e, _ = cp._subdivide(start, end, counts)
    got = np.diag(cp._potential_fill(0.5 * (s + e), start, end, counts, np.array([1e-3])))
    np.testing.assert_allclose(got, 2 * np.arcsinh(0.075 / 1e-3), rtol=1e-14)


def test_a_wire_set_solved_again_gives_the_same_solution():
    # consistency check: the second solution of the same wire set (from the cache) is the first,
    # and changing what it returned does not change the next one
    def wires():
        return Segments([[0, 0, 0.3], [0, 0, 8.0]], [[0, 0, 8.0], [15, 0, 8.0]], 1e-3, False, [0, 0, 0.3])

    a = cp.electrostatic_solution(wires())
    a.charge_c[:] = 0.0
    b = cp.electrostatic_solution(wires())
    c = cp.electrostatic_solution(wires())
    assert b.capacitance_f == c.capacitance_f and np.all(b.charge_c != 0.0)
    assert np.array_equal(b.charge_c, c.charge_c)


def test_consistency_solutions_in_turn_share_no_numbers():
    # consistency check: the system matrix's memory is reused from one solve to the next; a wire set
    # (grounded, then a floating counterpoise, then grounded again) solved after others gives its own
    # charges bit for bit
    grounded = Segments([[0, 0, 0.3], [0, 0, 8.0]], [[0, 0, 8.0], [15, 0, 8.0]], 1e-3, False, [0, 0, 0.3])
    floating = Segments([[0, 0, 1.0], [0, 0, 1.0]], [[0, 0, 9.0], [6, 0, 1.0]], 1e-3, [False, True], [0, 0, 1.0])
    first = cp.electrostatic_solution(grounded)
    cp._solve_cache.clear()
    other = cp.electrostatic_solution(floating)
    cp._solve_cache.clear()
    again = cp.electrostatic_solution(grounded)
    assert np.array_equal(first.charge_c, again.charge_c)
    assert other.capacitance_f > 0


def test_the_fills_asinh_agrees_with_numpys():
    """The fill's asinh, sgn(x) ln(|x| + sqrt(x^2 + 1)) (Abramowitz & Stegun 4.6.20, from memory), against
    numpy.arcsinh: a few ulp of 1 absolute near zero, a few ulp relative out to the fill's largest arguments."""
    from aerial.models.capacitance import _asinh

    x = np.concatenate([-np.geomspace(1e-12, 1e8, 400), [0.0], np.geomspace(1e-12, 1e8, 400)])
    got = np.empty_like(x)
    _asinh(x, np.empty_like(x), got)
    want = np.arcsinh(x)
    assert np.all(np.abs(got - want) <= 4e-16 * np.maximum(1.0, np.abs(want)))
    assert np.array_equal(np.sign(got), np.sign(x))
