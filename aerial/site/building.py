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

from dataclasses import dataclass, field

import numpy as np
import shapely
from shapely.geometry import Point, Polygon

from aerial.site.plan import STRUCTURES
from aerial.site.reader import Site, TableReader

#: Words accepted for ``construction``, each to its canonical structure.
CONSTRUCTION_WORDS = {s: s for s in STRUCTURES} | {"timber": "timber frame", "steel": "steel frame",
                                                    "concrete": "reinforced concrete", "brick": "masonry"}
BUILDING_KEYS = {"footprint", "height", "construction", "balcony_floor", "rail_bonded", "notes"}
#: Support kinds that sit on a building.
ON_BUILDING_KINDS = ("balcony rail", "eave", "chimney", "gable")


@dataclass(frozen=True)
class SiteBuilding:
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
        The table it came from ("building" or "plan").
    assumed : tuple of str
        What was inferred, in words.
    """

    footprint: tuple
    height_m: float
    construction: str
    balcony_floor_m: float | None = None
    rail_bonded: bool | None = None
    source: str = "building"
    assumed: tuple = field(default_factory=tuple)

    @property
    def outline(self) -> Polygon:
        return Polygon(self.footprint)


def parse_building(site: Site) -> SiteBuilding | None:
    """The site's building from ``[building]``, else from ``[plan]``, else None.

    Raises
    ------
    SiteError
        With the file, key, line and what is expected.
    """
    r = TableReader(site.path, site.text)
    raw = site.raw.get("building") if isinstance(site.raw, dict) else None
    if raw is not None:
        return _from_table(r, r.table(site.raw, "", "building"), site)
    return _from_plan(r, site)


def _from_table(r: TableReader, t: dict, site: Site) -> SiteBuilding:
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
            r.fail(f"{key}.construction", word, "expected one of " + ", ".join(f'"{s}"' for s in STRUCTURES))
        construction = CONSTRUCTION_WORDS[norm]
    floor = r.length(t, key, "balcony_floor", minimum=0.0)
    if floor is not None and floor >= height:
        r.fail(f"{key}.balcony_floor", t["balcony_floor"], f"expected a balcony floor below the roof ({height:g} m)")
    bonded = r.boolean(t, key, "rail_bonded")
    if floor is None:
        floor = _plan_floor(site)
    _check_wire_outside(r, site, outline, height)
    return SiteBuilding(tuple(map(tuple, np.asarray(outline.exterior.coords)[:-1])), height, construction, floor,
                        bonded, "building", tuple(assumed))


def _from_plan(r: TableReader, site: Site) -> SiteBuilding | None:
    plan = site.plan if isinstance(site.plan, dict) else {}
    if str(plan.get("building", "")).lower() != "apartment":
        return None
    rc = site.receiver
    entry = plan.get("entry", {}).get("at") if isinstance(plan.get("entry"), dict) else None
    here = Point(entry if isinstance(entry, list) and len(entry) == 2 else (rc.x_m, rc.y_m))
    for i, b in enumerate(plan.get("buildings", []) or []):
        if not isinstance(b, dict) or "outline" not in b or "height" not in b:
            continue
        outline = _outline(r, b["outline"], f"plan.buildings[{i}].outline")
        if outline.buffer(1.0).covers(here):
            height = r.length(b, f"plan.buildings[{i}]", "height", required=True, positive=True)
            balcony = plan.get("balcony") if isinstance(plan.get("balcony"), dict) else {}
            structure = balcony.get("structure", "unknown")
            structure = structure if structure in STRUCTURES else "unknown"
            assumed = [f"the block of flats is plan.buildings[{i}] (it holds the entry); its construction is "
                       f"taken from [plan.balcony]: {structure}"]
            return SiteBuilding(tuple(map(tuple, np.asarray(outline.exterior.coords)[:-1])), height, structure,
                                _plan_floor(site), None, "plan", tuple(assumed))
    return None


def _plan_floor(site: Site):
    plan = site.plan if isinstance(site.plan, dict) else {}
    balcony = plan.get("balcony")
    if not isinstance(balcony, dict) or "floor_height" not in balcony:
        return None
    r = TableReader(site.path, site.text)
    return r.length(balcony, "plan.balcony", "floor_height", minimum=0.0)


def _outline(r: TableReader, value, key) -> Polygon:
    if not isinstance(value, list) or len(value) < 3:
        r.fail(key, value, "expected at least three corners [[x, y], [x, y], [x, y], ...]")
    poly = Polygon([r.plan_point(p, f"{key}[{j}]") for j, p in enumerate(value)])
    if not shapely.is_valid(poly) or poly.area <= 0:
        reason = shapely.is_valid_reason(poly) if not shapely.is_valid(poly) else "the corners enclose no area"
        r.fail(key, value, f"not a valid outline ({reason}); list the corners in order around the edge, without crossing")
    return shapely.orient_polygons(poly) if hasattr(shapely, "orient_polygons") else poly


def _check_wire_outside(r: TableReader, site: Site, outline: Polygon, height: float):
    """The aerial wire must run somewhere outside the building (or above its roof)."""
    for w in site.wires:
        if w.role != "aerial":
            continue
        for p in np.asarray(w.points_m, float):
            if not outline.contains(Point(p[0], p[1])) or p[2] > height:
                return
    r.fail("building.footprint", "", "every aerial wire point is inside the building: give the footprint of the "
           "building, with the wire outside it (on the balcony, along the garden)")


def open_ground_notes(site: Site) -> list[str]:
    """Notes for a site with no building described whose wire is fixed to a building."""
    kinds = {s.kind for s in site.supports.values()}
    plan = site.plan if isinstance(site.plan, dict) else {}
    for t in plan.get("supports", []) or []:
        if isinstance(t, dict):
            kinds.add(str(t.get("kind", "")))
    on = sorted(k for k in kinds if k in ON_BUILDING_KINDS)
    if not on:
        return []
    return [f"The wire is fixed to a building ({', '.join(on)}) but no [building] is described, so it is modelled "
            "as a wire over open ground; a concrete or steel building beside it can take 10-20 dB off the signal. "
            "Add [building] (footprint, height, construction) to include it."]


__all__ = ["SiteBuilding", "parse_building", "open_ground_notes", "CONSTRUCTION_WORDS", "ON_BUILDING_KINDS"]
