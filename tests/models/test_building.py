"""The building beside the wire: facade images, screened field, construction range.

Outside checks: the analytic image solution of a thin wire in the corner
between two grounded perpendicular planes (ground plus wall), and the
quasi-static field of a grounded wall on a grounded plane in its limits;
facade shielding against the common-practice statement. Checks of aerial's
own figures against each other are named consistency checks.
"""

import math

import numpy as np
import pytest
from scipy.constants import epsilon_0

from aerial.core.errors import ModelInputError
from aerial.models.building import (
    SHIELDING_BY_CONSTRUCTION, BuildingBody, facade_field_height, facade_static_figures, nearest_facade,
    plan_distance,
)
from aerial.models.capacitance import electrostatic_solution
from aerial.models.closed_form import closed_form_response
from aerial.models.segments import Segments, polyline_segments

BLOCK = [[-10.0, -12.0], [20.0, -12.0], [20.0, 0.0], [-10.0, 0.0]]


def _balcony(rail_y=1.5, rail_z=12.6):
    """A 6 m rail wire in front of the facade y = 0, lead-in through the wall, riser inside to the ground."""
    a = polyline_segments([[0.3, -1, rail_z - 0.1], [0.3, rail_y, rail_z], [6.3, rail_y, rail_z]], 0.5e-3)
    e = polyline_segments([[0.3, -1, rail_z - 0.1], [0.3, -1, 0.0]], 11e-3)
    n_a, n_e = len(a), len(e)
    return Segments(np.vstack([a.start, e.start]), np.vstack([a.end, e.end]), np.r_[a.radius, e.radius],
                    np.r_[np.zeros(n_a, bool), np.ones(n_e, bool)], [0.3, -1, rail_z - 0.1],
                    np.r_[np.zeros(n_a, int), np.ones(n_e, int)])


def test_wire_in_the_corner_of_ground_and_wall_matches_the_analytic_image_solution():
    # Analytic image solution (method of images, J. D. Jackson, Classical Electrodynamics, 3rd ed., 1999,
    # sec. 2.1-2.2, from memory): a long thin wire at height h and distance d from two perpendicular grounded
    # planes has three images (-, -, +), so per unit length
    #   C' = 2 pi eps0 / ln[(2h)(2d) / (a * 2 sqrt(h^2 + d^2))].
    h, d, a, length = 10.0, 1.0, 1e-3, 400.0
    wire = polyline_segments([[-length / 2, d, h], [length / 2, d, h]], a)
    sol = electrostatic_solution(wire, target_unknowns=400, wall=([0.0, 0.0, 0.0], [0.0, 1.0, 0.0]))
    mid = 0.5 * (sol.start + sol.end)
    centre = np.abs(mid[:, 0]) < 10.0
    c_per_m = float(np.sum(sol.charge_c[centre]) / np.sum(np.linalg.norm(sol.end - sol.start, axis=1)[centre]))
    analytic = 2 * math.pi * epsilon_0 / math.log((2 * h) * (2 * d) / (a * 2 * math.hypot(h, d)))
    assert c_per_m == pytest.approx(analytic, rel=0.01)


def test_screened_field_tends_to_open_ground_far_from_the_wall():
    # Conformal map of a grounded wall on a grounded plane (W. R. Smythe, Static and Dynamic Electricity,
    # 3rd ed., 1968, ch. 4, from memory): phi = E0 Im sqrt(w^2 + H^2) -> E0 z far away.
    assert float(facade_field_height(5e4, 12.6, 18.0)) == pytest.approx(12.6, rel=1e-5)


def test_screened_field_beside_a_tall_wall_is_the_ground_plus_wall_image_solution():
    # Two perpendicular grounded planes: the potential of the field between them goes as x z (images);
    # the conformal map tends to x z / H when H >> x, z (same source as above).
    d, z, big = 1.0, 10.0, 1e4
    assert float(facade_field_height(d, z, big)) == pytest.approx(d * z / big, rel=1e-4)
    # on the wall below its top, and exactly above its top: 0 and sqrt(z^2 - H^2)
    assert float(facade_field_height(0.0, 5.0, 18.0)) == pytest.approx(0.0, abs=1e-12)
    assert float(facade_field_height(0.0, 20.0, 12.0)) == pytest.approx(16.0, rel=1e-12)


def test_balcony_shielding_agrees_with_common_practice():
    # Common practice (from memory): MF reception beside or inside reinforced-concrete and steel-framed
    # buildings is typically 10-30 dB weaker than in the open.
    s = _balcony()
    es = electrostatic_solution(s)
    for construction in ("reinforced concrete", "steel frame"):
        body = BuildingBody(BLOCK, 18.0, construction)
        fig = facade_static_figures(s, body, es.capacitance_f, es.effective_height_m)
        loss_db = 20 * math.log10(es.effective_height_m / fig["effective_height_m"][1])
        assert 10.0 <= loss_db <= 30.0, (construction, loss_db)


def test_riser_inside_the_building_is_not_aerial():
    # Consistency check: the facade limit drops the wire inside a conducting building.
    s = _balcony()
    es = electrostatic_solution(s)
    fig = facade_static_figures(s, BuildingBody(BLOCK, 18.0, "steel frame"), es.capacitance_f, es.effective_height_m)
    assert fig["shielded_lead_m"] == pytest.approx(12.5 + 1.0, abs=0.1)


def test_ranges_are_ordered_and_timber_stays_near_open_ground():
    # Consistency checks: more shielding, less effective height; timber within its stated range of open ground.
    s = _balcony()
    es = electrostatic_solution(s)
    for construction, (lo, nom, hi) in SHIELDING_BY_CONSTRUCTION.items():
        assert 0.0 <= lo <= nom <= hi <= 1.0
        he = facade_static_figures(s, BuildingBody(BLOCK, 18.0, construction), es.capacitance_f,
                                   es.effective_height_m)["effective_height_m"]
        assert he[0] >= he[1] >= he[2] > 0
    timber = facade_static_figures(s, BuildingBody(BLOCK, 18.0, "timber frame"), es.capacitance_f,
                                   es.effective_height_m)["effective_height_m"]
    assert timber[0] == pytest.approx(es.effective_height_m, rel=1e-9)


def test_closed_form_with_the_building_far_away_is_the_open_ground_figure():
    # Consistency check (open-ground limit): a building 10 km away changes nothing that matters.
    s = _balcony()
    far = [[x + 1e4, y] for x, y in BLOCK]
    f = [0.6e6, 1.2e6]
    open_ = closed_form_response(s, f)
    # the riser and lead-in are not inside this far building, so the wire set is the same
    beside = closed_form_response(s, f, building=BuildingBody(far, 18.0, "steel frame"))
    # 0.5 %: the facade solution uses half the open-ground solution's unknowns (FACADE_TARGET_UNKNOWNS)
    assert np.allclose(beside["effective_height_m"], open_["effective_height_m"], rtol=5e-3)
    assert "building" in beside and "building" not in open_


def test_plan_helpers():
    assert [float(v) for v in plan_distance([[0, 0.5], [0, -1]], BLOCK)] == [0.5, 0.0]
    p0, n = nearest_facade(BLOCK, [[1, 2]])
    assert list(n) == [0.0, 1.0, 0.0]


def test_bad_inputs_raise_one_clear_error():
    with pytest.raises(ModelInputError, match="construction"):
        BuildingBody(BLOCK, 10.0, "cardboard")
    with pytest.raises(ModelInputError, match="height"):
        BuildingBody(BLOCK, 0.0, "masonry")
    inside = polyline_segments([[0, -5, 1], [0, -5, 5]], 1e-3)
    with pytest.raises(ModelInputError, match="inside"):
        facade_static_figures(inside, BuildingBody(BLOCK, 18.0, "masonry"), 1e-11, 2.0)
