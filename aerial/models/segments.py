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

import numpy as np

#: Gap between a base-fed aerial's lowest point and the ground plane [m].
FEED_GAP_M = 0.02


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

    __slots__ = ("start", "end", "radius", "grounded", "feed", "wire_index", "resistivity", "relative_permeability",
                 "electrode_ohm", "_length")

    def __init__(self, start, end, radius, grounded, feed, wire_index=None, resistivity=None,
                 relative_permeability=None, electrode_ohm: float = 0.0):
        n = len(start)
        fill = object.__setattr__  # the fields are set once, here: a Segments is read-only afterwards
        fill(self, "start", np.asarray(start, dtype=float).reshape(n, 3))
        fill(self, "end", np.asarray(end, dtype=float).reshape(n, 3))
        fill(self, "radius", np.broadcast_to(np.asarray(radius, float), (n,)).copy())
        fill(self, "grounded", np.broadcast_to(np.asarray(grounded, bool), (n,)).copy())
        fill(self, "feed", np.asarray(feed, dtype=float).reshape(3))
        fill(self, "wire_index", np.broadcast_to(np.asarray(0 if wire_index is None else wire_index, int), (n,)).copy())
        fill(self, "resistivity",
             np.broadcast_to(np.asarray(1.72414e-8 if resistivity is None else resistivity, float), (n,)).copy())
        fill(self, "relative_permeability", np.broadcast_to(
            np.asarray(1.0 if relative_permeability is None else relative_permeability, float), (n,)).copy())
        fill(self, "electrode_ohm", electrode_ohm)
        fill(self, "_length", None)

    def __setattr__(self, name, value):
        raise AttributeError(f"Segments is read-only: cannot set {name!r} (make a new Segments)")

    def __delattr__(self, name):
        raise AttributeError(f"Segments is read-only: cannot delete {name!r}")

    def __repr__(self) -> str:
        return f"Segments({len(self)} segments, feed={self.feed.tolist()})"

    def __len__(self) -> int:
        return len(self.start)

    @property
    def length(self) -> np.ndarray:
        """Segment lengths (a new array each time; worked out once, the segments being read-only). [m]"""
        if self._length is None:
            object.__setattr__(self, "_length", np.linalg.norm(self.end - self.start, axis=1))
        return self._length.copy()

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
