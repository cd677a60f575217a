"""Read the ``[building]`` table: the house or block of flats the wire hangs on.

One description serves the report and the layout planner. Given as
``[building]`` (footprint, height, construction, balcony floor, whether the
rail is bonded to the structure); failing that, inferred from ``[plan]`` when
it safely can be (``building = "apartment"`` with a ``[[plan.buildings]]``
outline around the entry and the structure from ``[plan.balcony]``). Every
inference is said in ``assumed``; a wire on a balcony rail or an eave with no
building described gets a note that it is modelled in open ground.

Frame: metres, x east, y north, z up; footprint corners in plan.
"""

from __future__ import annotations

import numpy as np

from aerial.core.lengthtext import metres, words
from aerial.core.records import NamedTuple
from aerial.site.plan import ENTRY_FIXING_KEY, STRUCTURES, Plan, site_plan
from aerial.site.tables import TableReader, choice_words

#: Words accepted for ``construction``, each to its canonical structure.
CONSTRUCTION_WORDS = {s: s for s in STRUCTURES} | {"timber": "timber frame", "steel": "steel frame",
                                                    "concrete": "reinforced concrete", "brick": "masonry"}
BUILDING_KEYS = {"footprint", "height", "construction", "balcony_floor", "rail_bonded", "notes"}
#: Support kinds that sit on a building.
ON_BUILDING_KINDS = ("balcony rail", "window", "roof", "eave", "chimney", "gable")
#: Support kinds from which a building is inferred when none is described (a flat's balcony, window or roof;
#: a house's eave, gable or chimney keeps the open-ground figures with a note: most houses hardly screen).
INFER_FROM_KINDS = ("balcony rail", "window", "roof")
#: Assumptions of an inferred building: the balcony's depth in front of the facade, the building's height
#: above a rail or window (one more storey at least), its depth behind the facade and how far it runs past
#: the wire on either side. [m]
INFERRED_BALCONY_DEPTH_M = 1.5
INFERRED_STOREY_ABOVE_M = 3.0
INFERRED_DEPTH_M = 12.0
INFERRED_SIDE_M = 10.0
#: Height of a balcony rail above the balcony's floor, for an inferred balcony floor. [m]
INFERRED_RAIL_HEIGHT_M = 1.0
#: Pieces of aerial wire this close to the inferred facade are taken as lying against it. [m]
INFERRED_WALL_CLEARANCE_M = 0.2


class SiteBuilding(NamedTuple):
    """The building as the site describes it (lengths in metres).

    Attributes
    ----------
    footprint : tuple of (x, y)
        Plan corners in order around the edge. [m]
    height_m : float
        Roof height above the ground. [m]
    construction : str
        One of ``aerial.site.plan.STRUCTURES``.
    balcony_floor_m : float or None
        Height of the flat's balcony slab. [m]
    rail_bonded : bool or None
        Whether the balcony rail is bonded to the structure (None: not said).
    source : str
        Where it came from: "building" (the table), "plan" (``[plan]``) or
        "supports" (inferred from balcony-rail, window or roof supports).
    assumed : tuple of str
        What was inferred, in words.
    """

    footprint: tuple
    height_m: float
    construction: str
    balcony_floor_m: float | None = None
    rail_bonded: bool | None = None
    source: str = "building"
    assumed: tuple = ()

    @property
    def outline(self) -> "Polygon":
        from shapely.geometry import Polygon

        return Polygon(self.footprint)


def parse_building(site, plan: Plan | None = None) -> SiteBuilding | None:
    """The site's building from ``[building]``, else from ``[plan]``, else inferred from its supports, else None.

    The site loader calls this once and keeps the answer as ``Site.building``.

    Parameters
    ----------
    site : aerial.site.reader.Site
        The site as read (its wires, receiver, supports and raw tables).
    plan : Plan, optional
        Its ``[plan]`` as :func:`aerial.site.plan.parse_plan` reads it (the site's own when not given).

    Raises
    ------
    SiteError
        With the file, key, line and what is expected.
    """
    r = TableReader(site.path, site.text)
    plan = site_plan(site) if plan is None else plan
    raw = site.raw.get("building") if isinstance(site.raw, dict) else None
    if raw is not None:
        return _from_table(r, r.table(site.raw, "", "building"), site, plan)
    return _from_plan(r, site, plan) or _from_supports(site, plan)


def _from_table(r: TableReader, t: dict, site, plan: Plan) -> SiteBuilding:
    key = "building"
    r.check_keys(t, key, BUILDING_KEYS)
    if "footprint" not in t:
        r.fail(f"{key}.footprint", "", "missing: expected the building's plan corners [[x, y], [x, y], [x, y], ...]")
    outline = _outline(r, t["footprint"], f"{key}.footprint")
    height = r.length(t, key, "height", required=True, positive=True)
    assumed = []
    word = t.get("construction")
    if word is None:
        construction = "unknown"
        assumed.append("construction not given: taken as unknown (shielding anywhere from none to a perfect plane)")
    else:
        norm = str(word).strip().lower() if isinstance(word, str) else ""
        if norm not in CONSTRUCTION_WORDS:
            r.fail(f"{key}.construction", word, choice_words(norm, STRUCTURES))
        construction = CONSTRUCTION_WORDS[norm]
    floor = r.length(t, key, "balcony_floor", minimum=0.0)
    if floor is not None and floor >= height:
        r.fail(f"{key}.balcony_floor", t["balcony_floor"], f"expected a balcony floor below the roof ({height:g} m)")
    bonded = r.boolean(t, key, "rail_bonded")
    if floor is None:
        floor = _plan_floor(plan)
    _check_wire_outside(r, site, outline, f"{key}.footprint", t["footprint"])
    return SiteBuilding(_corners(outline), height, construction, floor, bonded, "building", tuple(assumed))


def _from_plan(r: TableReader, site, plan: Plan) -> SiteBuilding | None:
    """The block of flats of an ``apartment`` plan: the ``[[plan.buildings]]`` outline that holds the entry."""
    if plan.building != "apartment":
        return None
    from shapely.geometry import Point

    here = Point(plan.entry.x_m, plan.entry.y_m)  # the receiver when no entry is given
    for b in plan.buildings:
        outline = _oriented(b.outline)
        if outline.buffer(1.0).covers(here):
            _check_wire_outside(r, site, outline, f"{b.key}.outline", [list(c) for c in _corners(outline)])
            structure = _plan_structure(plan)
            assumed = [f"the block of flats is {b.key} (it holds the entry); its construction is "
                       f"taken from [plan.balcony]: {structure}"]
            return SiteBuilding(_corners(outline), b.height_m, structure, _plan_floor(plan), None, "plan",
                                tuple(assumed))
    return None


def _building_supports(plan: Plan) -> list:
    """(kind, x, y, height) of the supports on a flat's building: [supports] and [[plan.supports]], as read."""
    return [(s.kind, s.x_m, s.y_m, s.height_m) for s in plan.supports if s.kind in INFER_FROM_KINDS]


def _facade_normal(sup, receiver, aerial):
    """Outward plan normal of the facade, pointing from the receiver (indoors) towards the supports.

    The facade runs along the longest level piece of aerial wire between two
    of the supports (the front rail of a balcony, the rail of an L-shaped
    one); failing that, along the line the supports spread on; a single
    support (or a tight cluster) takes the direction from the receiver to it.
    None when the receiver stands where the supports are.
    """
    towards = np.mean(sup, axis=0) - receiver
    best = 0.0
    normal = None
    for p in aerial:
        for a, b in zip(p[:-1], p[1:]):
            run = b[:2] - a[:2]
            level = abs(b[2] - a[2]) < 0.2 * max(float(np.linalg.norm(run)), 1e-9)
            held = min(np.linalg.norm(sup - a[:2], axis=1)) < 1.0 and min(np.linalg.norm(sup - b[:2], axis=1)) < 1.0
            if level and held and np.linalg.norm(run) > max(best, 0.5):
                best = float(np.linalg.norm(run))
                normal = np.array([-run[1], run[0]]) / best
    if normal is not None:
        return normal if normal @ towards >= 0 else -normal
    if len(sup) >= 2:
        _, sv, vt = np.linalg.svd(sup - np.mean(sup, axis=0))
        if sv[0] > 0.5:
            normal = np.array([-vt[0, 1], vt[0, 0]])
            return normal if normal @ towards >= 0 else -normal
    if np.linalg.norm(towards) < 0.3:
        return None
    return towards / np.linalg.norm(towards)


def _from_supports(site, plan: Plan) -> SiteBuilding | None:
    """A building inferred behind the balcony-rail, window or roof supports, or None when it cannot be placed.

    The facade faces from the receiver (indoors) towards those supports; it
    stands a balcony's depth behind a rail (no further forward than the wire
    allows), in the plane of a window or roof support. The height, depth and
    width are stated assumptions and the construction is unknown, so the
    range runs from no screening (timber) to a perfect screen (steel).
    """
    found = _building_supports(plan)
    aerial = [np.asarray(w.points_m, float) for w in site.wires if w.role == "aerial"]
    if not found or not aerial:
        return None
    from shapely.geometry import Point, Polygon

    pts = np.vstack(aerial)
    sup = np.array([[x, y] for _, x, y, _ in found])
    normal = _facade_normal(sup, np.array([site.receiver.x_m, site.receiver.y_m]), aerial)
    if normal is None:
        return None
    reach = pts[:, :2] @ normal
    rails = np.array([k == "balcony rail" for k, *_ in found])
    on_wall = sup @ normal
    face = float(np.min(reach)) - INFERRED_WALL_CLEARANCE_M
    if np.any(rails):
        face = min(face, float(np.max(on_wall[rails])) - INFERRED_BALCONY_DEPTH_M)  # behind the front rail
    if not np.all(rails):
        face = min(face, float(np.min(on_wall[~rails])))
    roof_only = all(k == "roof" for k, *_ in found)
    height = max(h + (0.0 if k == "roof" else INFERRED_STOREY_ABOVE_M) for k, _, _, h in found)
    along = np.array([-normal[1], normal[0]])
    span = pts[:, :2] @ along
    lo, hi = float(span.min()) - INFERRED_SIDE_M, float(span.max()) + INFERRED_SIDE_M
    corners = [face * normal + lo * along, face * normal + hi * along,
               (face - INFERRED_DEPTH_M) * normal + hi * along, (face - INFERRED_DEPTH_M) * normal + lo * along]
    outline = Polygon([tuple(map(float, np.round(c, 3))) for c in corners])  # to the millimetre
    outline = _oriented(outline)
    if all(outline.contains(Point(p[0], p[1])) and p[2] <= height for p in pts):
        return None
    kinds = sorted({k for k, *_ in found})
    floor = _plan_floor(plan)
    if floor is None and np.any(rails):
        floor = max(0.0, min(h for k, _, _, h in found if k == "balcony rail") - INFERRED_RAIL_HEIGHT_M)
    structure = _plan_structure(plan)
    tall = "its roof at the support" if roof_only else "one storey above the highest support"
    made = ("its construction unknown (anything from timber, which hardly screens, to a steel frame, which screens "
            "almost completely)" if structure == "unknown" else f"its construction {structure} (from [plan.balcony])")
    said = (f"No [building] is described, so one is assumed from the {' and '.join(kinds)} support"
            f"{'s' if len(found) > 1 else ''}: "
            + words("a facade {behind} behind the nearest wire, {height} tall ({tall}), {wide} wide and {deep} deep, "
                    "{made}. ", behind=metres(float(np.min(reach)) - face), height=metres(height),
                    tall=tall, wide=metres(hi - lo), deep=metres(INFERRED_DEPTH_M), made=made)
            + "Describe it in [building] for a firmer figure.")
    return SiteBuilding(_corners(outline), float(height), structure, floor, None, "supports", (said,))


def _plan_floor(plan: Plan):
    """The balcony floor's height from ``[plan.balcony]``, None without one. [m]"""
    return plan.balcony.floor_height_m if plan.balcony is not None else None


def _outline(r: TableReader, value, key) -> "Polygon":
    import shapely
    from shapely.geometry import Polygon

    if not isinstance(value, list) or len(value) < 3:
        r.fail(key, value, "expected at least three corners [[x, y], [x, y], [x, y], ...]")
    poly = Polygon([r.plan_point(p, f"{key}[{j}]") for j, p in enumerate(value)])
    if not shapely.is_valid(poly) or poly.area <= 0:
        reason = shapely.is_valid_reason(poly) if not shapely.is_valid(poly) else "the corners enclose no area"
        r.fail(key, value, f"not a valid outline ({reason}); list the corners in order around the edge, without crossing")
    return _oriented(shapely.remove_repeated_points(poly))  # a corner written twice is one corner


def _oriented(poly: "Polygon") -> "Polygon":
    """The outline with its corners in the standard order (where shapely can orient it)."""
    import shapely

    return shapely.orient_polygons(poly) if hasattr(shapely, "orient_polygons") else poly


def _corners(outline: "Polygon") -> tuple:
    """The outline's plan corners, in order, the closing corner not repeated."""
    return tuple(map(tuple, np.asarray(outline.exterior.coords)[:-1]))


def _plan_structure(plan: Plan) -> str:
    """The balcony's structure from ``[plan.balcony]``, "unknown" when not given."""
    return plan.balcony.structure if plan.balcony is not None else "unknown"


def _check_wire_outside(r: TableReader, site, outline: "Polygon", key: str, value):
    """Some piece of the aerial must run outside the building's outline in plan (beside it), as the building's
    model needs: it finds the facade the wire stands in front of from the pieces' midpoints (the aerial and its
    lead-in, as :func:`aerial.models.building.facade_static_figures` has them). A wire above the roof, inside
    the outline in plan, is refused here, naming the outline, rather than by the model later."""
    from shapely.geometry import Point

    for w in site.wires:
        if w.role in ("earth lead", "counterpoise"):
            continue
        p = np.asarray(w.points_m, float)
        for x, y in 0.5 * (p[1:, :2] + p[:-1, :2]):
            pt = Point(x, y)
            if not outline.covers(pt):
                return
    r.fail(key, value, "every aerial wire is inside the building's outline in plan (above its roof or within it); "
           "aerial models a wire beside a building (on a balcony, along a facade, across a garden), not one over "
           "its roof: give the outline with the wire outside it, or, for a wire on the roof's edge, leave "
           "[building] out and hang the wire on supports of kind \"roof\" (a building is then assumed behind it)")


def open_ground_notes(site) -> list[str]:
    """Notes for a site with no building described (nor inferred) whose wire is fixed to a building.

    The supports counted are those the file lists ([supports] and [[plan.supports]], kinds as read).
    """
    kinds = {s.kind for s in site_plan(site).supports if s.key != ENTRY_FIXING_KEY}
    on = sorted(k for k in kinds if k in ON_BUILDING_KINDS)
    if not on:
        return []
    return [f"The wire is fixed to a building ({', '.join(on)}) but no [building] is described, so it is modelled "
            "as a wire over open ground; a concrete or steel building beside it can take 10–20 dB off the signal. "
            "Add [building] (footprint, height, construction) to include it."]


__all__ = ["SiteBuilding", "parse_building", "open_ground_notes", "CONSTRUCTION_WORDS", "ON_BUILDING_KINDS",
           "INFER_FROM_KINDS"]
