"""Power-line fall zones and crossings: the hard safety rule of every layout.

The rule (public safety guidance for antennas near power lines, US Consumer
Product Safety Commission safety alerts, from memory): keep every part of the
aerial -- each wire, each support and the lead-in -- a horizontal distance of
at least 1.5 times the height of the antenna or its support, whichever is
taller, from any power line, so that nothing can reach the line if it falls.
aerial adds two things of its own: the distance is never less than the power
line's own height (a line conductor can fall too), and no wire may cross over
or under a power line in plan, whatever the heights.

A line whose kind cannot be told is a power line. Telephone/cable lines are
not refused on distance, but a wire crossing one in plan is flagged (they
often share poles with power conductors).

Frame: metres, x east, y north (plan view). Every buffer passes ``quad_segs``
explicitly; the fall-zone polygon is drawn *around* the true zone (its radius
is enlarged by 1/cos(pi/(4 quad_segs))), so a point within the required
distance is always inside the polygon: the polygon errs on the safe side by
at most 0.2 % with the default 16 segments per quarter circle.
"""

from __future__ import annotations

import math

import numpy as np

from aerial.core.errors import ModelInputError, SafetyRefusal
from aerial.core.lengthtext import join_text, metres, words
from aerial.core.records import NamedTuple

#: Fall-zone factor on the tallest height of the aerial and its supports
#: (US Consumer Product Safety Commission safety alerts; from memory). [1]
FALL_ZONE_FACTOR = 1.5
#: Segments per quarter circle of every buffer drawn here.
QUAD_SEGS = 16
#: A wire within this distance of the lot boundary counts as inside (drawing tolerance). [m]
LOT_TOLERANCE_M = 0.05
#: Roles of the site's wires that the rule covers (the earth side lies on the ground).
COVERED_ROLES = ("aerial", "lead-in")


def fall_zone_distance(tallest_height, line_height):
    """Horizontal distance every part of an aerial must keep from a power line.

    Parameters
    ----------
    tallest_height : array_like
        Height of the aerial or of its tallest support, whichever is taller. [m]
    line_height : array_like
        Height of the power line's conductors. [m]

    Returns
    -------
    ndarray
        d = max(1.5 h, h_line). [m]

    Notes
    -----
    1.5 h is the public-safety fall zone for antennas near power lines; the
    line's own height is added as a floor because a broken conductor can fall
    the other way.

    References
    ----------
    US Consumer Product Safety Commission, safety alerts on antennas and power
    lines (from memory).

    Examples
    --------
    >>> float(fall_zone_distance(12.0, 7.5))
    18.0
    >>> float(fall_zone_distance(3.0, 7.5))
    7.5
    """
    h = np.asarray(tallest_height, dtype=float)
    hl = np.asarray(line_height, dtype=float)
    if np.any(~np.isfinite(h) | (h < 0)) or np.any(~np.isfinite(hl) | (hl <= 0)):
        raise ModelInputError("heights must be finite; the aerial's zero or more, the line's above zero")
    return np.maximum(FALL_ZONE_FACTOR * h, hl)


def fall_zone(path: "LineString", distance: float, quad_segs: int = QUAD_SEGS):
    """The fall zone around a line in plan: a polygon containing every point within ``distance``.

    Parameters
    ----------
    path : LineString
        The line's course in plan. [m]
    distance : float
        Required horizontal distance. [m]
    quad_segs : int
        Segments per quarter circle of the round ends and corners.

    Returns
    -------
    Polygon
        The buffer, with its radius enlarged by 1/cos(pi/(4 quad_segs)) so
        that the polygonal arcs lie outside the true circle.
    """
    import shapely  # here, not at the top: a site without [plan] never needs it

    if quad_segs < 1:
        raise ModelInputError(f"quad_segs must be 1 or more; got {quad_segs!r}")
    return shapely.buffer(path, distance / math.cos(math.pi / (4 * quad_segs)), quad_segs=quad_segs)


# --------------------------------------------------------------------------- findings


class Finding(NamedTuple):
    """One breach of the rule: which part, which line, distance found and needed. [m]"""

    part: str
    part_kind: str  # "wire", "lead-in", "support"
    line: str
    line_kind: str
    line_height_m: float
    distance_m: float
    required_m: float
    crosses: bool
    tallest_m: float
    tallest_what: str

    def sentence(self) -> str:
        """One short line: which part, how far from which line, what is needed and what to do."""
        what = {"wire": "the wire", "lead-in": "the lead-in", "support": "the support"}[self.part_kind]
        why = ("the line's height" if self.line_height_m >= 1.5 * self.tallest_m
               else "1.5 × " + metres(self.tallest_m))
        if self.crosses:
            return words('{what} "{part}" crosses the {kind} line "{line}" in plan: re-route it so every part stays '
                         "at least {needed} ({why}) away", what=what, part=self.part, kind=self.line_kind,
                         line=self.line, needed=metres(self.required_m), why=why)
        more = max(self.required_m - self.distance_m, 0.0)
        return words('{what} "{part}" is {distance} (in plan) from the {kind} line "{line}"; {needed} needed '
                     "({why}): move it at least {more} further from the line, or use lower supports", what=what,
                     part=self.part, distance=metres(self.distance_m), kind=self.line_kind, line=self.line,
                     needed=metres(self.required_m), why=why, more=metres(more))


class ClearanceReport:
    """The outcome of checking a site's own wires: breaches (refusals) and warnings.

    ``findings`` lists a :class:`Finding` per breach, ``warnings`` the sentences to show, ``tallest_m`` the
    tallest point of the wires and their supports. [m]
    """

    __slots__ = ("findings", "warnings", "tallest_m")

    def __init__(self, findings: list | None = None, warnings: list | None = None, tallest_m: float = 0.0):
        self.findings = [] if findings is None else findings
        self.warnings = [] if warnings is None else warnings
        self.tallest_m = tallest_m

    def __repr__(self) -> str:
        return f"ClearanceReport(findings={self.findings!r}, warnings={self.warnings!r}, tallest_m={self.tallest_m!r})"

    @property
    def refused(self) -> bool:
        return bool(self.findings)

    def message(self) -> str:
        """One short line with the rule, then one line per power line with the parts inside its zone."""
        first = self.findings[0]
        head = ("this layout puts part of the aerial inside a power line's fall zone (1.5 × its tallest point, "
                + metres(first.tallest_m) + f" at {first.tallest_what}, and never less than the line's "
                "height): aerial will not analyse it (docs/site-planner.md, safety rule)")
        return join_text("\n", [head] + self.by_line())

    def by_line(self) -> list:
        """One line per power line: the distance needed, the parts inside, and the move that clears them."""
        out = []
        for name in dict.fromkeys(f.line for f in self.findings):
            found = [f for f in self.findings if f.line == name]
            f0 = found[0]
            why = ("the line's height" if f0.line_height_m >= 1.5 * f0.tallest_m
                   else "1.5 × " + metres(f0.tallest_m))
            what = {"wire": "the wire", "lead-in": "the lead-in", "support": "the support"}
            parts = join_text(", ", [f'{what[f.part_kind]} "{f.part}" '
                                     + ("(crosses it)" if f.crosses else "(" + metres(f.distance_m) + ")")
                                     for f in found])
            more = max(f.required_m - f.distance_m for f in found)
            out.append(words('{kind} line "{name}": {needed} needed ({why}); inside: {parts}; move them at least '
                             "{more} further away (never across the line), or use lower supports", kind=f0.line_kind,
                             name=name, needed=metres(f0.required_m), why=why, parts=parts,
                             more=metres(more)))
        return out

    def summary(self) -> str:
        """The breaches in one line, for a warning."""
        return join_text("; ", self.by_line())


def _plan_geometry(points_m: np.ndarray):
    from shapely.geometry import LineString, Point

    xy = np.asarray(points_m, dtype=float)[:, :2]
    if np.ptp(xy, axis=0).max() <= 1e-9:
        return Point(xy[0])
    return LineString(xy)


def site_parts(site) -> tuple[list, float, str]:
    """The parts of a site's aerial the rule covers, and its tallest point.

    Returns
    -------
    parts : list of (name, kind, geometry)
        Wires (aerial and lead-in) and the supports they hang from, in plan.
    tallest_m : float
        Height of the tallest point of the aerial or its supports. [m]
    tallest_what : str
        What that tallest point is.
    """
    from shapely.geometry import Point

    parts = []
    tallest, what = 0.0, "the aerial"
    used = set()
    for w in site.wires:
        if w.role not in COVERED_ROLES:
            continue
        kind = "lead-in" if w.role == "lead-in" else "wire"
        parts.append((w.name, kind, _plan_geometry(w.points_m)))
        z = float(np.max(w.points_m[:, 2]))
        if z > tallest:
            tallest, what = z, f'wire "{w.name}"'
        used.update(m for m in w.support_at_point if m)
    for name in sorted(used):
        s = site.supports.get(name)
        if s is None:
            continue
        parts.append((name, "support", Point(s.x_m, s.y_m)))
        if s.height_m >= tallest:
            tallest, what = s.height_m, f'support "{name}"'
    return parts, tallest, what


def check_parts(parts, tallest_m: float, tallest_what: str, lines) -> list:
    """Every breach of the rule by the given parts.

    Parameters
    ----------
    parts : list of (name, kind, geometry)
        Plan geometries of wires, lead-in and supports. [m]
    tallest_m : float
        Tallest point of the aerial or its supports. [m]
    tallest_what : str
        Its description, for the message.
    lines : list of OverheadLine
        Only power lines are checked.

    Returns
    -------
    list of Finding
    """
    out = []
    for line in lines:
        if not line.is_power:
            continue
        need = float(fall_zone_distance(tallest_m, line.height_m))
        zone = fall_zone(line.path, need)
        for name, kind, geom in parts:
            if geom.intersects(zone):
                out.append(Finding(name, kind, line.name, line.kind, line.height_m, float(geom.distance(line.path)),
                                   need, bool(geom.intersects(line.path)), tallest_m, tallest_what))
    return out


def check_site_clearance(site, plan=None) -> ClearanceReport:
    """Check the site's own wires, lead-in and supports against its overhead lines and lot.

    Returns a report; nothing is raised here (see :func:`enforce_site_clearance`).
    """
    if plan is None:
        if not site.plan:
            return ClearanceReport()
        from aerial.site.plan import site_plan

        plan = site_plan(site)
    parts, tallest, what = site_parts(site)
    report = ClearanceReport(check_parts(parts, tallest, what, plan.lines), [], tallest)
    for line in plan.telecom_lines:
        for name, kind, geom in parts:
            if kind != "support" and geom.intersects(line.path):
                report.warnings.append(
                    f'{kind} "{name}" crosses the telephone/cable line "{line.name}" in plan: do not run an aerial '
                    "over or under it (such lines often share poles with power conductors); re-route it.")
    if plan.lot is not None:
        import shapely

        lot = shapely.buffer(plan.lot, LOT_TOLERANCE_M, quad_segs=QUAD_SEGS)
        for name, kind, geom in parts:
            if not lot.covers(geom):
                outside = geom.difference(lot)
                size = outside.length if outside.length > 0 else float(geom.distance(plan.lot))
                report.warnings.append(
                    words('{kind} "{name}" runs outside the lot (about {size} of it): you need the neighbour\'s '
                          "consent for that part.", kind=kind, name=name, size=metres(size)))
    return report


def enforce_site_clearance(site) -> ClearanceReport:
    """Refuse a site whose own wires, lead-in or supports break the power-line rule.

    Parameters
    ----------
    site : Site
        A validated site; its ``[plan]`` overhead lines are read (and the
        ``[plan]`` table validated). Sites without power lines pass.

    Returns
    -------
    ClearanceReport
        With the warnings (wires outside the lot, telephone/cable crossings).

    Raises
    ------
    SafetyRefusal
        Naming each wire, lead-in or support inside a fall zone (or crossing a
        power line), the line, the distance found, the distance needed and
        what to do.
    SiteError
        When the ``[plan]`` table itself is invalid.
    """
    report = check_site_clearance(site)
    if report.refused:
        raise SafetyRefusal(report.message())
    return report


# --------------------------------------------------------------------------- many layouts at once


def refuse_many(paths, tallest_m, lines, details: bool = False):
    """Apply the rule to many candidate layouts at once.

    Parameters
    ----------
    paths : ndarray of shapely geometries
        Each candidate's wires, lead-in and support points in plan (one
        geometry per candidate). [m]
    tallest_m : ndarray
        Each candidate's tallest point of aerial or support. [m]
    lines : list of OverheadLine

    Returns
    -------
    refused : ndarray of bool
        True where any part lies in a power line's fall zone.
    margin_m : ndarray
        Smallest (distance - required) over the power lines; +inf without
        power lines. [m]
    per_line : list of (OverheadLine, refused, distance_m, required_m)
        Only with ``details=True``: for each power line, the candidates it
        refuses, their plan distance to it and the distance needed. [m]
    """
    import shapely

    paths = np.asarray(paths, dtype=object)
    tallest = np.asarray(tallest_m, dtype=float)
    refused = np.zeros(len(paths), dtype=bool)
    margin = np.full(len(paths), np.inf)
    power = [ln for ln in lines if ln.is_power]
    per_line = []
    if not power or len(paths) == 0:
        return (refused, margin, per_line) if details else (refused, margin)
    heights, group = np.unique(tallest, return_inverse=True)
    for line in power:
        need = fall_zone_distance(tallest, line.height_m)
        dist = shapely.distance(paths, line.path)
        margin = np.minimum(margin, dist - need)
        by_line = np.zeros(len(paths), dtype=bool)
        for g, h in enumerate(heights):
            sel = np.flatnonzero(group == g)
            zone = fall_zone(line.path, float(fall_zone_distance(h, line.height_m)))
            shapely.prepare(zone)
            by_line[sel] = shapely.intersects(zone, paths[sel])
        refused |= by_line
        per_line.append((line, by_line, dist, np.asarray(need, float)))
    return (refused, margin, per_line) if details else (refused, margin)


def crosses_many(paths, lines) -> np.ndarray:
    """True where a candidate's plan geometry crosses any of ``lines`` (e.g. telephone/cable)."""
    import shapely

    paths = np.asarray(paths, dtype=object)
    out = np.zeros(len(paths), dtype=bool)
    for line in lines:
        out |= shapely.intersects(paths, line.path)
    return out
