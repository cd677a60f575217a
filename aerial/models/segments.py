"""The wire description every electrical model takes: straight segments in 3-D.

The geometry layer (``aerial.geometry.resolve``) cuts a site's wires into this form;
models never read site files.

Conventions
-----------
* Frame: metres, x east, y north, z up; the ground is the plane z = 0.
* The receiver's terminals sit at ``feed``. Segments with ``grounded`` False
  are the aerial (the lead-in and every span): the receiver drives them.
  Segments with ``grounded`` True are the earth lead: a conductor from the
  receiver's earth terminal down to the earth electrode, whose lower end
  touches the ground plane at an electrode of resistance ``electrode_ohm``.
* Where there is no earth lead (a base-fed vertical, a receiver at ground
  level) the aerial's lowest point sits ``FEED_GAP_M`` above the ground plane
  and the feed is the gap between them: a wire that touched the ground plane
  would touch its own image.
* ``wire_index`` says which user wire each segment came from, so results can
  be reported per wire.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

#: Gap between a base-fed aerial's lowest point and the ground plane [m].
FEED_GAP_M = 0.02


@dataclass(frozen=True)
class Segments:
    """Straight thin-wire segments.

    Attributes
    ----------
    start, end : ndarray, shape (N, 3)
        Segment end points. [m]
    radius : ndarray, shape (N,)
        Wire radius. [m]
    grounded : ndarray of bool, shape (N,)
        True for earth-lead segments (at earth potential in the static limit).
    feed : ndarray, shape (3,)
        The receiver's aerial terminal. [m]
    wire_index : ndarray of int, shape (N,)
        Index of the user wire each segment belongs to.
    resistivity : ndarray, shape (N,)
        Conductor resistivity at 20 °C. [ohm m]
    relative_permeability : ndarray, shape (N,)
        Conductor relative permeability (1 for copper, aluminium). [1]
    electrode_ohm : float
        Resistance of the earth electrode where the earth lead meets the ground
        (0 when there is no earth lead; the ground loss is then added in series). [ohm]
    """

    start: np.ndarray
    end: np.ndarray
    radius: np.ndarray
    grounded: np.ndarray
    feed: np.ndarray
    wire_index: np.ndarray = field(default=None)
    resistivity: np.ndarray = field(default=None)
    relative_permeability: np.ndarray = field(default=None)
    electrode_ohm: float = 0.0

    def __post_init__(self):
        n = len(self.start)
        object.__setattr__(self, "start", np.asarray(self.start, dtype=float).reshape(n, 3))
        object.__setattr__(self, "end", np.asarray(self.end, dtype=float).reshape(n, 3))
        object.__setattr__(self, "radius", np.broadcast_to(np.asarray(self.radius, float), (n,)).copy())
        object.__setattr__(self, "grounded", np.broadcast_to(np.asarray(self.grounded, bool), (n,)).copy())
        object.__setattr__(self, "feed", np.asarray(self.feed, dtype=float).reshape(3))
        if self.wire_index is None:
            object.__setattr__(self, "wire_index", np.zeros(n, dtype=int))
        if self.resistivity is None:
            object.__setattr__(self, "resistivity", np.full(n, 1.72414e-8))
        if self.relative_permeability is None:
            object.__setattr__(self, "relative_permeability", np.ones(n))
        object.__setattr__(self, "wire_index", np.broadcast_to(np.asarray(self.wire_index, int), (n,)).copy())
        object.__setattr__(self, "resistivity", np.broadcast_to(np.asarray(self.resistivity, float), (n,)).copy())
        object.__setattr__(
            self, "relative_permeability", np.broadcast_to(np.asarray(self.relative_permeability, float), (n,)).copy()
        )

    def __len__(self) -> int:
        return len(self.start)

    @property
    def length(self) -> np.ndarray:
        """Segment lengths. [m]"""
        return np.linalg.norm(self.end - self.start, axis=1)

    @property
    def midpoint(self) -> np.ndarray:
        """Segment midpoints, shape (N, 3). [m]"""
        return 0.5 * (self.start + self.end)

    @property
    def aerial(self) -> np.ndarray:
        """Boolean mask of the aerial (driven) segments."""
        return ~self.grounded


def polyline_segments(points, radius, grounded=False, feed=None, **kw) -> Segments:
    """Segments joining consecutive points of one polyline (a convenience for tests).

    Parameters
    ----------
    points : array_like, shape (K, 3)
        Polyline vertices. [m]
    radius : float
        Wire radius. [m]
    """
    p = np.asarray(points, dtype=float)
    feed = p[0] if feed is None else feed
    return Segments(p[:-1], p[1:], radius, grounded, feed, **kw)
