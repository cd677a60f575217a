"""Wire topology for the full-wave solver: sub-segments, nodes and triangle basis functions.

Frame: metres, x east, y north, z up; the ground is the plane z = 0.

Every :class:`~aerial.models.segments.Segments` segment is cut into straight
sub-segments ("pieces"). Pieces whose end points coincide meet at a node. A
triangle (rooftop) basis function lives at a node and spans two pieces: it
rises linearly from zero at the far end of the first piece to one at the node
and falls to zero across the second, so the current is continuous through the
node. A node where k >= 3 pieces meet carries k - 1 such functions, all sharing
one reference piece, so Kirchhoff's current law holds at the junction. A node
on the ground plane carries one half-triangle per piece: its other half is the
image in the ground, supplied by the image terms of the kernel. Free wire ends
carry no basis function (zero current there).

The receiver's feed is a delta-gap source:

* no earth lead: a short vertical connector from the ground plane up to the
  feed (the aerial's lowest point, ``FEED_GAP_M`` above ground) is added, and
  the gap is at its ground end (the basis function that straddles the wire and
  its image);
* with an earth lead: the gap sits at ``feed`` between the earth-lead side and
  the aerial side; the earth lead's lower end meets the ground plane through
  the lumped electrode resistance.

References
----------
.. [1] S. M. Rao, D. R. Wilton and A. W. Glisson, "Electromagnetic scattering
   by surfaces of arbitrary shape", IEEE Trans. Antennas Propag. 30(3),
   409-418, 1982 (triangle basis functions; here their one-dimensional wire
   form).
.. [2] R. F. Harrington, *Field Computation by Moment Methods*, Macmillan,
   1968, ch. 4 (wire antennas, junctions, delta-gap source).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import scipy.sparse as sp

from aerial.core.errors import ModelInputError
from aerial.core.lengthtext import metres
from aerial.models.segments import Segments

#: Highest feed point accepted without an earth lead: the connector from the
#: ground to the feed is modelled as part of the aerial. [m]
MAX_BASE_GAP_M = 0.1

#: Fewest pieces each user wire is cut into, whatever the frequency. [1]
DEFAULT_MIN_PIECES_PER_WIRE = 12

#: Shortest piece in wire radii: below this the reduced thin-wire kernel is
#: inaccurate, so pieces are not cut shorter and a warning is given. [1]
MIN_LENGTH_TO_RADIUS = 8.0

#: Pieces shorter than this many radii make the thin-wire model meaningless:
#: refused. [1]
HARD_MIN_LENGTH_TO_RADIUS = 1.0

# Relative tolerance (of the structure's size) for deciding that two end
# points are the same node, and absolute floor. [1], [m]
_NODE_RTOL = 1e-7
_NODE_ATOL = 1e-9


@dataclass(frozen=True)
class Topology:
    """Pieces, basis functions and their incidence (internal to the solver).

    Attributes
    ----------
    start, end : ndarray, shape (P, 3)
        Piece end points. [m]
    length : ndarray, shape (P,)
        Piece lengths. [m]
    tangent : ndarray, shape (P, 3)
        Unit vectors from start to end.
    radius, resistivity, relative_permeability : ndarray, shape (P,)
        Wire radius [m], resistivity [ohm m], relative permeability [1].
    grounded : ndarray of bool, shape (P,)
        Earth-lead pieces.
    parent : ndarray of int, shape (P,)
        Index of the input segment each piece was cut from (-1 for the added
        feed connector).
    t_end : tuple of two scipy.sparse.csr_matrix, shape (P, N)
        ``t_end[e][p, n]`` is the value (+1 or -1, the sign of the current
        along ``tangent[p]``) of basis function n at end e (0 = start,
        1 = end) of piece p; the current on piece p is
        ``t_end[0] @ I * (1 - u) + t_end[1] @ I * u`` along the tangent.
    charge : scipy.sparse.csr_matrix, shape (P, N)
        d(current)/ds of basis n on piece p. [1/m]
    centre : ndarray, shape (N, 3)
        The node each basis function peaks at. [m]
    feed_weight : ndarray, shape (N,)
        Gap voltage seen by each basis function for a 1 V feed (+1 on the
        function that crosses the gap, from the earth side into the aerial).
    electrode : ndarray, shape (N,)
        Lumped series resistance on each basis function (the earth electrode). [ohm]
    n_connector : int
        Number of added feed-connector pieces (0 or 1).
    warnings : tuple of str
        Geometry warnings (thin-wire limits, extra ground contacts).
    """

    start: np.ndarray
    end: np.ndarray
    length: np.ndarray
    tangent: np.ndarray
    radius: np.ndarray
    resistivity: np.ndarray
    relative_permeability: np.ndarray
    grounded: np.ndarray
    parent: np.ndarray
    t_end: tuple
    charge: sp.csr_matrix
    centre: np.ndarray
    feed_weight: np.ndarray
    electrode: np.ndarray
    n_connector: int
    warnings: tuple

    @property
    def n_pieces(self) -> int:
        return len(self.length)

    @property
    def n_unknowns(self) -> int:
        return len(self.feed_weight)

    @property
    def midpoint(self) -> np.ndarray:
        return 0.5 * (self.start + self.end)


def check_segments(segments: Segments) -> None:
    """Reject a wire set the solver cannot use (raises ModelInputError)."""
    if not isinstance(segments, Segments):
        raise ModelInputError(f"segments must be an aerial.models.segments.Segments, got {type(segments).__name__}")
    if len(segments) == 0:
        raise ModelInputError("segments is empty: give at least one wire segment")
    for name in ("start", "end", "radius", "resistivity", "relative_permeability", "feed"):
        if not np.all(np.isfinite(getattr(segments, name))):
            raise ModelInputError(f"segments.{name} has a non-finite value")
    if np.any(segments.radius <= 0):
        raise ModelInputError("segments.radius must be positive")
    if np.any(segments.resistivity < 0) or np.any(segments.relative_permeability <= 0):
        raise ModelInputError(
            "segments.resistivity must be >= 0 (0 = perfect conductor) and segments.relative_permeability positive"
        )
    if not np.isfinite(segments.electrode_ohm) or segments.electrode_ohm < 0:
        raise ModelInputError(f"segments.electrode_ohm must be >= 0, got {segments.electrode_ohm!r}")
    length = segments.length
    if np.any(length <= 0):
        raise ModelInputError("segments has a zero-length segment")
    if np.any(length < HARD_MIN_LENGTH_TO_RADIUS * segments.radius):
        raise ModelInputError(
            f"a segment is shorter than {HARD_MIN_LENGTH_TO_RADIUS:g} wire radius: the thin-wire model does not apply"
        )
    zmin = min(segments.start[:, 2].min(), segments.end[:, 2].min())
    if zmin < -_NODE_ATOL:
        raise ModelInputError(f"a segment goes below the ground plane (z = {zmin:g} m); every z must be >= 0")
    if segments.feed[2] < -_NODE_ATOL:
        raise ModelInputError("segments.feed is below the ground plane")


def piece_counts(
    segments: Segments,
    max_piece_length: float,
    min_pieces_per_wire: int = DEFAULT_MIN_PIECES_PER_WIRE,
    refine: int = 1,
) -> np.ndarray:
    """Number of pieces each segment is cut into.

    Parameters
    ----------
    segments : Segments
        The wires.
    max_piece_length : float
        Longest piece allowed (a fraction of the shortest wavelength). [m]
    min_pieces_per_wire : int
        Fewest pieces for each user wire (``wire_index``), shared between its
        segments in proportion to length. [1]
    refine : int
        Multiply every count by this (2 for the convergence check). [1]

    Returns
    -------
    ndarray of int, shape (N,)
        Pieces per segment, at least 1, never making pieces shorter than
        ``MIN_LENGTH_TO_RADIUS`` radii unless the segment itself is.
    """
    length = segments.length
    wire_len = np.zeros(segments.wire_index.max() + 1)
    np.add.at(wire_len, segments.wire_index, length)
    per_wire = wire_len[segments.wire_index] / max(int(min_pieces_per_wire), 1)
    target = np.minimum(per_wire, max_piece_length)
    n = np.ceil(length / target * (1.0 - 1e-12)).astype(int) * int(refine)
    shortest = MIN_LENGTH_TO_RADIUS * segments.radius
    n_cap = np.maximum(np.floor(length / shortest).astype(int), 1)
    return np.maximum(np.minimum(n, n_cap), 1)


def build_topology(segments: Segments, counts: np.ndarray) -> Topology:
    """Cut the segments into pieces and lay the triangle basis functions.

    Parameters
    ----------
    segments : Segments
        Checked wire set (see :func:`check_segments`).
    counts : ndarray of int, shape (N,)
        Pieces per segment (:func:`piece_counts`).

    Returns
    -------
    Topology
    """
    warnings: list[str] = []
    seg = segments
    extent = max(np.ptp(np.vstack([seg.start, seg.end]), axis=0).max(), seg.length.max())
    tol = max(_NODE_ATOL, _NODE_RTOL * extent)
    has_lead = bool(np.any(seg.grounded))
    wires, feed, n_connector = _wires_with_feed_connector(seg, counts, tol, has_lead, warnings)
    pieces = _cut_into_pieces(wires)
    length, p_rad = pieces["length"], pieces["radius"]
    short = length < MIN_LENGTH_TO_RADIUS * p_rad
    if np.any(short):
        warnings.append(
            f"{int(short.sum())} sub-segment(s) shorter than {MIN_LENGTH_TO_RADIUS:g} wire radii "
            f"(shortest {float((length / p_rad).min()):.3g} radii): the reduced thin-wire kernel is approximate there"
        )
    node_of, node_pos = _merge_nodes(pieces["start"], pieces["end"], tol)
    feed_node = int(node_of[np.argmin(np.linalg.norm(np.vstack([pieces["start"], pieces["end"]]) - feed, axis=1))])
    basis = _BasisLayout(node_pos, pieces["grounded"], float(seg.electrode_ohm), has_lead, feed_node, warnings)
    basis.lay(node_of, node_pos[:, 2] <= tol, len(length))
    if has_lead and basis.ground_contacts == 0:
        # an earth side that never touches the ground is a counterpoise: the feed is the gap between
        # the aerial and the counterpoise, and nothing connects to the ground plane
        warnings.append("the earth side does not reach the ground: modelled as a counterpoise insulated above "
                        "the ground (no electrode resistance; the ground's own loss under it is not included)")
    if basis.ground_contacts > 1:
        warnings.append(
            f"the earth lead meets the ground at {basis.ground_contacts} points; each is given the electrode resistance"
        )
    if basis.n_basis == 0 or not any(basis.feed_w):
        raise ModelInputError("the wire set has no feed connection: check segments.feed")
    P, n_basis = len(length), basis.n_basis
    t_end = tuple(
        sp.csr_matrix((basis.vals[e], (basis.rows[e], basis.cols[e])), shape=(P, n_basis)) for e in (0, 1)
    )
    # d/ds of sign * shape: shape_0 = 1 - s/L (slope -1/L), shape_1 = s/L (slope +1/L)
    inv_len = sp.diags(1.0 / length)
    charge = (inv_len @ (t_end[1] - t_end[0])).tocsr()
    return Topology(
        start=pieces["start"],
        end=pieces["end"],
        length=length,
        tangent=pieces["tangent"],
        radius=p_rad,
        resistivity=pieces["resistivity"],
        relative_permeability=pieces["relative_permeability"],
        grounded=pieces["grounded"],
        parent=pieces["parent"],
        t_end=t_end,
        charge=charge,
        centre=np.array(basis.centre).reshape(-1, 3),
        feed_weight=np.array(basis.feed_w),
        electrode=np.array(basis.elec),
        n_connector=n_connector,
        warnings=tuple(dict.fromkeys(warnings)),
    )


def _wires_with_feed_connector(seg, counts, tol, has_lead, warnings):
    """The segments' per-wire arrays, with the feed connector prepended when there is no earth lead.

    Returns
    -------
    wires : dict of ndarray
        ``start``, ``end`` [m], ``radius`` [m], ``resistivity`` [ohm m],
        ``relative_permeability``, ``grounded``, ``parent``, ``counts``.
    feed : ndarray, shape (3,)
        The gap's position (on the ground plane when there is no earth lead). [m]
    n_connector : int
        Added connector pieces (0 or 1).
    """
    feed = seg.feed.copy()
    s0, s1 = seg.start.copy(), seg.end.copy()
    rad, rho, mur = seg.radius.copy(), seg.resistivity.copy(), seg.relative_permeability.copy()
    gnd = seg.grounded.copy()
    par = np.arange(len(seg))
    counts = np.asarray(counts, dtype=int).copy()

    d_feed = np.minimum(np.linalg.norm(s0 - feed, axis=1), np.linalg.norm(s1 - feed, axis=1))
    at_feed = d_feed <= tol
    if not np.any(at_feed):
        raise ModelInputError(
            f"segments.feed {tuple(float(v) for v in feed)} is not the end point of any segment: "
            "put the feed where the aerial meets the earth side"
        )
    n_connector = 0
    if not has_lead:
        if feed[2] > MAX_BASE_GAP_M:
            raise ModelInputError(
                f"with no earth lead the feed must be the aerial's lowest point, within {MAX_BASE_GAP_M:g} m "
                f"of the ground; it is at z = {feed[2]:g} m: add earth-lead segments (grounded = True) "
                "from the feed to the ground"
            )
        if feed[2] > tol:
            # the feed connector: from the ground plane up to the aerial's lowest point
            k = int(np.flatnonzero(at_feed)[0])
            s0 = np.vstack([[feed[0], feed[1], 0.0], s0])
            s1 = np.vstack([feed, s1])
            rad = np.concatenate([[rad[k]], rad])
            rho = np.concatenate([[rho[k]], rho])
            mur = np.concatenate([[mur[k]], mur])
            gnd = np.concatenate([[False], gnd])
            par = np.concatenate([[-1], par])
            counts = np.concatenate([[1], counts])
            n_connector = 1
            if feed[2] < MIN_LENGTH_TO_RADIUS * rad[0]:
                warnings.append(
                    "the feed gap (" + metres(feed[2])
                    + f") is shorter than {MIN_LENGTH_TO_RADIUS:g} wire radii: the thin-wire kernel is rough there"
                )
        feed = np.array([feed[0], feed[1], 0.0])
    else:
        if not np.any(at_feed & gnd) or not np.any(at_feed & ~gnd):
            raise ModelInputError(
                "the feed must join the aerial (grounded = False) and the earth lead (grounded = True): "
                "both must have a segment ending at segments.feed"
            )
    wires = {"start": s0, "end": s1, "radius": rad, "resistivity": rho, "relative_permeability": mur,
             "grounded": gnd, "parent": par, "counts": counts}
    return wires, feed, n_connector


def _cut_into_pieces(wires):
    """Cut every wire into ``counts`` equal pieces; per-piece arrays (same keys, plus ``length``, ``tangent``)."""
    s0, s1, counts = wires["start"], wires["end"], wires["counts"]
    idx = np.repeat(np.arange(len(s0)), counts)
    first = np.concatenate([[0], np.cumsum(counts)[:-1]])
    kk = np.arange(idx.size) - np.repeat(first, counts)
    c = counts[idx].astype(float)
    d = s1[idx] - s0[idx]
    p_start = s0[idx] + (kk / c)[:, None] * d
    p_end = s0[idx] + ((kk + 1) / c)[:, None] * d
    # exact shared end points between consecutive pieces of one segment
    last = kk == counts[idx] - 1
    p_end[last] = s1[idx[last]]
    length = np.linalg.norm(p_end - p_start, axis=1)
    out = {key: wires[key][idx] for key in ("radius", "resistivity", "relative_permeability", "grounded", "parent")}
    out.update(start=p_start, end=p_end, length=length, tangent=(p_end - p_start) / length[:, None])
    return out


def _merge_nodes(p_start, p_end, tol):
    """Node index of every piece end (rows: starts then ends) and the node positions [m]."""
    ends = np.vstack([p_start, p_end])  # row i: piece i % P, end i // P
    key = np.round(ends / tol).astype(np.int64)
    _, node_of, = np.unique(key, axis=0, return_inverse=True)[:2]
    node_of = node_of.ravel()
    # a second pass catches points that straddle a rounding boundary
    pairs = close_pairs(ends, tol)
    a, b = node_of[pairs[:, 0]], node_of[pairs[:, 1]]
    straddle = a != b
    if np.any(straddle):
        node_of = _smallest_linked(node_of.max() + 1, a[straddle], b[straddle])[node_of]
    _, node_of = np.unique(node_of, return_inverse=True)
    n_nodes = node_of.max() + 1
    node_pos = np.zeros((n_nodes, 3))
    node_pos[node_of] = ends
    return node_of, node_pos


def _smallest_linked(n, a, b):
    """For each of n items, the smallest item linked to it through the pairs (a[i], b[i]) (its group's label)."""
    label = np.arange(n)
    while True:
        low = np.minimum(label[a], label[b])
        new = label.copy()
        np.minimum.at(new, a, low)
        np.minimum.at(new, b, low)
        new = new[new]  # follow the labels' own labels: groups merge in few rounds
        if np.array_equal(new, label):
            return label
        label = new


def close_pairs(points, tol):
    """Every pair of points no farther apart than ``tol``, by a grid of cells of side ``tol``.

    Parameters
    ----------
    points : ndarray, shape (M, 3)
        Positions. [m]
    tol : float
        Largest distance of a pair, positive. [m]

    Returns
    -------
    ndarray of int, shape (K, 2)
        Index pairs (i, j), i < j, with |p_i - p_j| <= tol, sorted.

    Notes
    -----
    Two points within ``tol`` of each other lie in the same cell
    floor(p / tol) or in neighbouring ones (each index differs by at most
    one), so only the 27 cells around each point are searched. Each axis's
    cell indices are replaced by their ranks first, so the cell code fits an
    integer whatever the coordinates.

    Examples
    --------
    >>> close_pairs(np.array([[0.0, 0, 0], [0.5e-9, 0, 0], [1.0, 0, 0]]), 1e-9).tolist()
    [[0, 1]]
    """
    points = np.asarray(points, dtype=float)
    m = len(points)
    cell = np.floor(points / tol).astype(np.int64)
    axes = [np.unique(np.concatenate([c - 1, c, c + 1])) for c in cell.T]
    span = np.int64(max(len(a) for a in axes))

    def code(shift):
        rank = [np.searchsorted(a, c + s) for a, c, s in zip(axes, cell.T, shift)]
        return (rank[0] * span + rank[1]) * span + rank[2]

    own = code((0, 0, 0))
    order = np.argsort(own, kind="stable")
    sorted_code = own[order]
    found_i, found_j = [], []
    for shift in np.ndindex(3, 3, 3):
        target = code(np.asarray(shift) - 1)
        lo = np.searchsorted(sorted_code, target, side="left")
        n_hit = np.searchsorted(sorted_code, target, side="right") - lo
        if not n_hit.any():
            continue
        i = np.repeat(np.arange(m), n_hit)
        first = np.repeat(lo - np.concatenate([[0], np.cumsum(n_hit)[:-1]]), n_hit)
        j = order[first + np.arange(i.size)]
        keep = i < j
        found_i.append(i[keep])
        found_j.append(j[keep])
    if not found_i:
        return np.zeros((0, 2), dtype=np.int64)
    i, j = np.concatenate(found_i), np.concatenate(found_j)
    close = np.sqrt(np.sum((points[i] - points[j]) ** 2, axis=1)) <= tol
    pairs = np.unique(np.stack([i[close], j[close]], axis=1), axis=0)
    return pairs.reshape(-1, 2)


class _BasisLayout:
    """Lays the triangle and half-triangle basis functions node by node (incidence triplets per piece end)."""

    def __init__(self, node_pos, grounded, electrode_ohm, has_lead, feed_node, warnings):
        self.node_pos, self.grounded, self.electrode_ohm = node_pos, grounded, electrode_ohm
        self.has_lead, self.feed_node, self.warnings = has_lead, feed_node, warnings
        self.rows: list[list[int]] = [[], []]
        self.cols: list[list[int]] = [[], []]
        self.vals: list[list[float]] = [[], []]
        self.centre: list[np.ndarray] = []
        self.feed_w: list[float] = []
        self.elec: list[float] = []
        self.n_basis = 0
        self.ground_contacts = 0

    def add_half(self, n, piece, end, incoming):
        """Half of basis n on one piece end; ``incoming``: the current flows toward the node along it."""
        toward_plus = end == 1  # node at the piece's end point: toward node = +tangent
        sign = 1.0 if (toward_plus == incoming) else -1.0
        self.rows[end].append(piece)
        self.cols[end].append(n)
        self.vals[end].append(sign)

    def add_triangle(self, node, into, out_of, feed=False):
        """One triangle across a node: current along ``into`` toward the node and on along ``out_of``."""
        n = self.n_basis
        self.add_half(n, *into, incoming=True)
        self.add_half(n, *out_of, incoming=False)
        self.centre.append(self.node_pos[node])
        self.feed_w.append(1.0 if feed else 0.0)
        self.elec.append(0.0)
        self.n_basis = n + 1

    def lay(self, node_of, on_ground, P):
        """Basis functions at every node (``node_of`` as from :func:`_merge_nodes`)."""
        order = np.argsort(node_of, kind="stable")
        n_nodes = len(self.node_pos)
        bounds = np.searchsorted(node_of[order], np.arange(n_nodes + 1))
        for node in range(n_nodes):
            members = order[bounds[node] : bounds[node + 1]]
            pieces = members % P
            pend = members // P
            if on_ground[node]:
                self._ground_node(node, pieces, pend)
                continue
            if len(pieces) < 2:
                continue  # free end
            if self.has_lead and node == self.feed_node:
                lead = [(p, e) for p, e in zip(pieces, pend) if self.grounded[p]]
                aer = [(p, e) for p, e in zip(pieces, pend) if not self.grounded[p]]
                # the gap: current from the earth side into the aerial
                self.add_triangle(node, lead[0], aer[0], feed=True)
                for ref, others in ((lead[0], lead[1:]), (aer[0], aer[1:])):
                    for other in others:
                        self.add_triangle(node, ref, other)
                continue
            for other in zip(pieces[1:], pend[1:]):
                self.add_triangle(node, (pieces[0], pend[0]), other)

    def _ground_node(self, node, pieces, pend):
        """A node on the ground plane: one half-triangle per piece (the image supplies the other half)."""
        pos = self.node_pos[node]
        for piece, end in zip(pieces, pend):
            self.add_half(self.n_basis, piece, end, incoming=False)
            self.centre.append(pos)
            is_feed = (not self.has_lead) and node == self.feed_node
            self.feed_w.append(1.0 if is_feed else 0.0)
            if self.grounded[piece]:
                self.elec.append(self.electrode_ohm)
                self.ground_contacts += 1
            else:
                self.elec.append(0.0)
                if not is_feed:
                    self.warnings.append(
                        "an aerial wire touches the ground at "
                        f"({pos[0]:.3g}, {pos[1]:.3g}) m: modelled as a direct connection"
                    )
            self.n_basis += 1
