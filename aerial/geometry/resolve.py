"""Turn a validated :class:`aerial.site.reader.Site` into straight 3-D segments and a plan footprint.

Frame: metres, x east, y north, z up; z = 0 is the ground surface. Shapely
geometries are plan views (x, y) in the same frame.
"""

from __future__ import annotations

import numpy as np

from aerial.core.materials import CONDUCTORS
from aerial.core.records import NamedTuple
from aerial.models.building import BuildingBody
from aerial.models.segments import FEED_GAP_M, Segments
from aerial.site.building import SiteBuilding

#: Roles on the earth side of the receiver.
EARTH_ROLES = ("earth lead", "counterpoise")


class Geometry(NamedTuple):
    """The resolved wires of a site.

    Attributes
    ----------
    wires : list of WireRun
        As resolved from the site file (points in metres).
    segments : Segments
        Every straight piece, ready for the electrical models.
    feed_m : ndarray (3,)
        The receiver's aerial terminal. [m]
    base_fed : bool
        True when the receiver is at ground level (no earth-lead wire): the
        aerial's lowest point is then raised to the feed gap above ground.
    building : BuildingBody or None
        The building the wire hangs on, when the site describes one.
    building_site : SiteBuilding or None
        The same as the site file gave it (balcony floor, rail bonding, what was assumed).
    """

    wires: list
    segments: Segments
    feed_m: np.ndarray
    base_fed: bool
    building: BuildingBody | None = None
    building_site: SiteBuilding | None = None

    @property
    def aerial_wires(self):
        return [w for w in self.wires if w.role not in EARTH_ROLES]

    @property
    def total_length_m(self) -> float:
        """Length of the aerial including its lead-in. [m]"""
        return float(sum(w.length_m for w in self.aerial_wires))

    @property
    def earth_lead_length_m(self) -> float:
        return float(sum(w.length_m for w in self.wires if w.role in EARTH_ROLES))

    @property
    def max_height_m(self) -> float:
        return float(max(w.points_m[:, 2].max() for w in self.aerial_wires))

    @property
    def mean_height_m(self) -> float:
        """Length-weighted mean height of the aerial and lead-in. [m]"""
        seg = self.segments
        m = seg.aerial
        return float(np.sum(seg.midpoint[m, 2] * seg.length[m]) / np.sum(seg.length[m]))

    def _plan_runs(self) -> list:
        """The plan views (x, y) of the aerial and lead-in wires that are not vertical. [m]"""
        return [xy for xy in (w.points_m[:, :2] for w in self.aerial_wires) if np.ptp(xy, axis=0).max() > 1e-9]

    def footprint(self):
        """Plan view of the aerial and lead-in (x, y in metres), a shapely MultiLineString."""
        from shapely.geometry import LineString, MultiLineString

        lines = [LineString(xy) for xy in self._plan_runs()]
        return MultiLineString(lines) if lines else MultiLineString()

    def plan_extent_m(self) -> float:
        """Longest plan dimension of the aerial's footprint: the diagonal of its bounding box. [m]"""
        runs = self._plan_runs()
        if not runs:
            return 0.0
        xy = np.vstack(runs)
        (x0, y0), (x1, y1) = xy.min(axis=0), xy.max(axis=0)
        return float(np.hypot(x1 - x0, y1 - y0))


def building_of(site) -> tuple:
    """The site's building as (BuildingBody, SiteBuilding), or (None, None) when none is described.

    The building is read once, when the site is loaded (``site.building``).
    """
    described = site.building
    if described is None:
        return None, None
    return BuildingBody(np.array(described.footprint, float), described.height_m, described.construction), described


def resolve(site, electrode_ohm: float = 0.0, wires=None, building: bool = True) -> Geometry:
    """Cut the site's wires into straight segments for the electrical models.

    Parameters
    ----------
    site : Site
        A validated site.
    electrode_ohm : float
        Earth-electrode resistance where the earth lead meets the ground. [ohm]
    wires : list of WireRun, optional
        Wires to use instead of ``site.wires`` (what-if and uncertainty runs).
    building : bool
        Include the site's building (False: the wire in open ground, for comparisons).
    """
    wires = list(site.wires if wires is None else wires)
    feed = site.feed_m.astype(float).copy()
    has_earth_lead = any(w.role == "earth lead" for w in wires)
    base_fed = not has_earth_lead
    if base_fed and feed[2] < FEED_GAP_M:
        feed[2] = FEED_GAP_M
    starts, ends, per_wire = [], [], []
    for i, w in enumerate(wires):
        p = np.array(w.points_m, dtype=float)
        if w.role not in EARTH_ROLES:  # a base-fed aerial's lowest point stays one feed gap above its image
            p[:, 2] = np.where(p[:, 2] < FEED_GAP_M, FEED_GAP_M, p[:, 2])
        if w.role == "counterpoise":
            p[:, 2] = np.maximum(p[:, 2], FEED_GAP_M)
        cond = CONDUCTORS[w.size.material]
        starts.append(p[:-1])
        ends.append(p[1:])
        # the wire's own figures, one per segment (below)
        per_wire.append((len(p) - 1, w.size.radius_m, w.role in EARTH_ROLES, i, cond.resistivity_ohm_m,
                         cond.relative_permeability))
    counts, radius, grounded, index, rho, mur = zip(*per_wire)
    radius, grounded, index, rho, mur = (np.repeat(v, counts) for v in (radius, grounded, index, rho, mur))
    seg = Segments(
        np.vstack(starts), np.vstack(ends), radius, grounded, feed,
        wire_index=index, resistivity=rho, relative_permeability=mur, electrode_ohm=float(electrode_ohm),
    )
    body, described = building_of(site) if building else (None, None)
    return Geometry(wires, seg, feed, base_fed, body, described)


def wires_json(geometry: Geometry) -> list[dict]:
    """The resolved wires as the JSON contract lists them."""
    out = []
    for w in geometry.wires:
        pts = np.array(w.points_m, dtype=float)
        if geometry.base_fed and w.role not in EARTH_ROLES:
            pts[:, 2] = np.maximum(pts[:, 2], FEED_GAP_M)
        out.append({
            "name": w.name,
            "role": w.role,
            "points_m": [[round(float(v), 6) for v in p] for p in pts],
            "radius_m": float(w.size.radius_m),
            "size": w.size.described_as,
            "material": w.size.material,
            "length_m": round(w.length_m, 6),
        })
    return out
