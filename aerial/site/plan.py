"""Read and validate the ``[plan]`` table of a site file into a :class:`Plan`.

The plan is the site seen from above: the lot boundary, the buildings, the
places a wire could be fixed (candidate supports), obstacles a wire must not
cross, where the lead-in enters the building, and the overhead power and
telephone/cable lines nearby. The layout planner searches it; the clearance
rules (:mod:`aerial.planner.clearance`) read its overhead lines.

Frame: metres, x east, y north, z up; z = 0 is the ground surface. Shapely
geometries here are plan views (x, y) in that frame. Lengths are numbers
(metres) or strings with a unit, as everywhere in the site file.

Every rejection raises :class:`aerial.core.errors.SiteError` naming the file, the
key (with its line) and what is expected; an invalid polygon is rejected with
the text of :func:`shapely.is_valid_reason`.
"""

from __future__ import annotations

from aerial.core import units
from aerial.core.records import NamedTuple
from aerial.site.tables import SUPPORT_KINDS, TableReader

#: Words accepted for an overhead line's ``kind``; anything else (or nothing) is a power line.
POWER_WORDS = ("power", "electric", "electricity", "mains", "service", "distribution")
TELECOM_WORDS = ("telephone/cable", "telephone", "phone", "cable", "telecom", "telecoms", "fibre", "fiber")
LINE_KINDS = ("power", "telephone/cable")

BUILDING_TYPES = ("house", "apartment")

#: How a building's structure is treated near a balcony wire.
STRUCTURES = ("reinforced concrete", "steel frame", "timber frame", "masonry", "unknown")
#: Structures treated as a grounded conductor next to the wire (``unknown`` is taken the pessimistic way).
CONDUCTIVE_STRUCTURES = ("reinforced concrete", "steel frame", "unknown")

#: The key of the candidate support made from ``[plan.entry] fixing_height`` (the wall above the entry).
ENTRY_FIXING_KEY = "plan.entry.fixing_height"

PLAN_KEYS = {"lot", "building", "entry", "buildings", "supports", "obstacles", "overhead_lines", "balcony", "notes"}


class PlanSupport(NamedTuple):
    """A place a wire can be fixed: plan position and usable height. [m]"""

    name: str
    x_m: float
    y_m: float
    height_m: float
    kind: str
    key: str
    from_site: bool = False


class Building(NamedTuple):
    """A building of ``[[plan.buildings]]``: its plan outline and roof height. [m]"""

    name: str
    outline: "Polygon"
    height_m: float
    key: str


class Obstacle(NamedTuple):
    """Something in ``[[plan.obstacles]]`` a wire must not cross: its plan outline. [m]"""

    name: str
    outline: "Polygon"
    key: str


class OverheadLine(NamedTuple):
    """An overhead line in plan with its height; ``kind`` is "power" or "telephone/cable"."""

    name: str
    path: "LineString"
    height_m: float
    kind: str
    key: str
    kind_given: str = ""

    @property
    def is_power(self) -> bool:
        return self.kind == "power"


class Entry(NamedTuple):
    """Where the lead-in enters the building; ``fixing_height_m`` is a fixing on the wall above it, if any."""

    x_m: float
    y_m: float
    height_m: float
    fixing_height_m: float | None
    key: str
    given: bool


class Balcony(NamedTuple):
    """The flat's balcony of ``[plan.balcony]``: its floor height [m], the building's structure and the storey."""

    floor_height_m: float
    structure: str
    floor: int | None
    key: str

    @property
    def conductive(self) -> bool:
        return self.structure in CONDUCTIVE_STRUCTURES


class Plan(NamedTuple):
    """A validated ``[plan]`` table (lengths in metres)."""

    lot: "Polygon | None"
    building: str
    entry: Entry
    buildings: list | tuple = ()
    supports: list | tuple = ()
    obstacles: list | tuple = ()
    lines: list | tuple = ()
    balcony: Balcony | None = None
    notes: list | tuple = ()
    given: bool = True

    @property
    def power_lines(self) -> list:
        return [ln for ln in self.lines if ln.is_power]

    @property
    def telecom_lines(self) -> list:
        return [ln for ln in self.lines if not ln.is_power]


# --------------------------------------------------------------------------- reading


def parse_plan(site) -> Plan:
    """Validate ``site.plan`` (the raw ``[plan]`` table) into a :class:`Plan`.

    A site without ``[plan]`` gives an empty plan (``given`` False) whose
    candidate supports are the site's ``[supports.*]`` and whose entry point
    is the receiver.

    Raises
    ------
    SiteError
        With the file, key, line and what is expected.
    """
    r = TableReader(site.path, site.text)
    raw = site.plan or {}
    r.check_keys(raw, "plan", PLAN_KEYS)
    notes: list[str] = []
    lot = _polygon(r, raw["lot"], "plan.lot") if "lot" in raw else None
    building = r.string(raw, "plan", "building", default="house", choices=BUILDING_TYPES)
    entry = _entry(r, raw, site)
    buildings = []
    for i, t in enumerate(r.array_of_tables(raw, "plan", "buildings")):
        key = f"plan.buildings[{i}]"
        r.check_keys(t, key, {"name", "outline", "height", "notes"})
        if "outline" not in t:
            r.fail(f"{key}.outline", "", "missing: expected the footprint corners [[x, y], ...]")
        outline = _polygon(r, t["outline"], f"{key}.outline")
        h = r.length(t, key, "height", required=True, positive=True)
        buildings.append(Building(r.string(t, key, "name", default=f"building {i + 1}"), outline, h, key))
    supports = _supports(r, raw, site, entry)
    obstacles = []
    for i, t in enumerate(r.array_of_tables(raw, "plan", "obstacles")):
        key = f"plan.obstacles[{i}]"
        r.check_keys(t, key, {"name", "outline", "notes"})
        if "outline" not in t:
            r.fail(f"{key}.outline", "", "missing: expected the corners [[x, y], ...] of what the wire must not cross")
        obstacles.append(Obstacle(r.string(t, key, "name", default=f"obstacle {i + 1}"),
                                  _polygon(r, t["outline"], f"{key}.outline"), key))
    lines = []
    for i, t in enumerate(r.array_of_tables(raw, "plan", "overhead_lines")):
        key = f"plan.overhead_lines[{i}]"
        r.check_keys(t, key, {"name", "path", "height", "kind", "notes"})
        if "path" not in t:
            r.fail(f"{key}.path", "", "missing: expected the line's course in plan [[x, y], [x, y], ...]")
        path = _path(r, t["path"], f"{key}.path")
        h = r.length(t, key, "height", required=True, positive=True)
        given = t.get("kind")
        kind, note = line_kind(given)
        name = r.string(t, key, "name", default=f"overhead line {i + 1}")
        if note:
            notes.append(f'{key} ("{name}"): {note}')
        lines.append(OverheadLine(name, path, h, kind, key, str(given) if given is not None else ""))
    balcony = None
    if "balcony" in raw:
        key = "plan.balcony"
        t = r.table(raw, "plan", "balcony")
        r.check_keys(t, key, {"floor_height", "structure", "floor", "notes"})
        fh = r.length(t, key, "floor_height", required=True, minimum=0.0)
        structure = r.string(t, key, "structure", default="unknown", choices=STRUCTURES)
        floor = r.number(t, key, "floor", low=0, high=200, integer=True, what="a storey number")
        balcony = Balcony(fh, structure, floor, key)
    if building == "apartment" and balcony is None:
        notes.append('building = "apartment" without [plan.balcony]: the balcony floor height and the structure are '
                     "unknown, so heights are taken above the street (optimistic); add floor_height and structure")
    if lot is not None:
        from shapely.geometry import Point

        grown = lot.buffer(0.5, quad_segs=8)  # once, not once a support
        for s in supports:
            if not grown.covers(Point(s.x_m, s.y_m)):
                notes.append(f'support "{s.name}" is outside the lot: a wire fixed there needs the neighbour\'s consent')
    return Plan(lot, building, entry, buildings, supports, obstacles, lines, balcony, notes, given=bool(raw))


def site_plan(site) -> Plan:
    """The site's validated ``[plan]``: the one kept when the site loaded, else (a site built otherwise) read now."""
    plan = getattr(site, "parsed_plan", None)
    return parse_plan(site) if plan is None else plan


def line_kind(given) -> tuple[str, str]:
    """The kind of an overhead line from what the user wrote, and a note when it was not clear.

    Anything that is not clearly a telephone/cable line is a power line: a
    line whose kind cannot be told is treated as the dangerous kind.
    """
    if given is None:
        return "power", "kind not given: treated as a power line"
    if not isinstance(given, str):
        return "power", f"kind {given!r} not understood: treated as a power line"
    norm = given.strip().lower()
    if norm in POWER_WORDS:
        return "power", ""
    if norm in TELECOM_WORDS:
        return "telephone/cable", ""
    return "power", (f'kind "{given}" not understood (expected "power" or "telephone/cable"): treated as a power line')


def _polygon(r: TableReader, value, key) -> "Polygon":
    import shapely
    from shapely.geometry import Polygon

    if not isinstance(value, list) or len(value) < 3:
        r.fail(key, value, "expected at least three corners [[x, y], [x, y], [x, y], ...]")
    pts = [r.plan_point(p, f"{key}[{j}]") for j, p in enumerate(value)]
    poly = Polygon(pts)
    if not shapely.is_valid(poly) or poly.area <= 0:
        reason = shapely.is_valid_reason(poly) if not shapely.is_valid(poly) else "the corners enclose no area"
        r.fail(key, value, f"not a valid outline ({reason}); list the corners in order around the edge, without crossing")
    return shapely.remove_repeated_points(poly)  # a corner written twice is one corner


def _path(r: TableReader, value, key) -> "LineString":
    from shapely.geometry import LineString

    if not isinstance(value, list) or len(value) < 2:
        r.fail(key, value, "expected at least two points [[x, y], [x, y], ...]")
    pts = [r.plan_point(p, f"{key}[{j}]") for j, p in enumerate(value)]
    line = LineString(pts)
    if line.length <= 0:
        r.fail(key, value, "the line has no length: give two different points")
    return line


def _entry(r: TableReader, raw, site) -> Entry:
    if "entry" not in raw:
        rc = site.receiver
        return Entry(rc.x_m, rc.y_m, rc.height_m, None, "receiver", False)
    key = "plan.entry"
    t = r.table(raw, "plan", "entry")
    r.check_keys(t, key, {"at", "height", "fixing_height", "notes"})
    if "at" not in t:
        r.fail(f"{key}.at", "", "missing: expected the plan position [x, y] where the lead-in enters the building")
    x, y = r.plan_point(t["at"], f"{key}.at")
    h = r.length(t, key, "height", default=0.0, minimum=0.0)
    fix = r.length(t, key, "fixing_height", positive=True)
    if fix is not None and fix <= h:  # the entry's height in the unit the fixing was written in
        shown = units.length_text(h, 4, "us" if units.written_in_feet(t["fixing_height"]) else "si")
        r.fail(f"{key}.fixing_height", t["fixing_height"], f"expected a fixing above the entry (higher than {shown})")
    return Entry(x, y, h, fix, key, True)


def _supports(r: TableReader, raw, site, entry: Entry) -> list:
    out = [PlanSupport(s.name, s.x_m, s.y_m, s.height_m, s.kind, f"supports.{s.name}", True) for s in site.supports.values()]
    names = {s.name for s in out}
    for i, t in enumerate(r.array_of_tables(raw, "plan", "supports")):
        key = f"plan.supports[{i}]"
        r.check_keys(t, key, {"name", "at", "height", "kind", "notes"})
        name = r.string(t, key, "name", default=f"support {i + 1}")
        if name in names:
            r.fail(f"{key}.name", name, "a support of that name already exists (in [supports] or earlier); give another name")
        names.add(name)
        if "at" not in t:
            r.fail(f"{key}.at", "", "missing: expected a plan position at = [x, y]")
        x, y = r.plan_point(t["at"], f"{key}.at")
        h = r.length(t, key, "height", required=True, positive=True)
        kind = r.string(t, key, "kind", default="other", choices=SUPPORT_KINDS)
        out.append(PlanSupport(name, x, y, h, kind, key))
    if entry.fixing_height_m is not None:
        name = "wall above the entry"
        while name in names:
            name += "'"
        out.append(PlanSupport(name, entry.x_m, entry.y_m, entry.fixing_height_m, "eave", ENTRY_FIXING_KEY))
    return out


__all__ = [
    "Plan", "PlanSupport", "Building", "Obstacle", "OverheadLine", "Entry", "Balcony", "parse_plan", "site_plan", "line_kind",
    "LINE_KINDS", "STRUCTURES", "BUILDING_TYPES",
]
