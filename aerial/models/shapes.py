"""Sort a wire set into the shapes the closed-form models describe.

Starting at the feed, the down-lead is the chain of steep aerial segments
(|dz| / length >= ``STEEP_FRACTION``) up to the first junction or the first
turn to a flatter run. Whatever branches leave that point are top arms. The
kinds:

* ``"vertical"``: a down-lead and nothing else, within ``VERTICAL_TILT_FRACTION``
  of plumb;
* ``"sloping wire"``: one straight wire from the feed that is not plumb
  (steep or not), rising at least ``MIN_SLOPE_FRACTION`` of its length;
* ``"inverted-L"``: a down-lead and one top arm (a horizontal long wire with
  its down-lead, a balcony run with corners in plan);
* ``"T"``: a down-lead and two or more top arms from its top;
* ``"irregular"``: anything else (no steep down-lead and not one straight
  sloper; forked or looped tops; zig-zags with steep runs in the top; parts
  not connected to the feed).

Frame: metres, x east, y north, z up. Earth-lead (``grounded``) segments are
not part of the shape; their length is reported.
"""

from __future__ import annotations

import numpy as np

from aerial.core.errors import ModelInputError
from aerial.core.lengthtext import metres
from aerial.core.records import NamedTuple
from aerial.models.segments import Segments

SHAPE_KINDS = ("vertical", "sloping wire", "inverted-L", "T", "irregular")

#: A segment is steep (part of a down-lead) when |dz|/length is at least this (about 44 degrees). [1]
STEEP_FRACTION = 0.7
#: A down-lead with |rise|/length at least this (within about 8 degrees of plumb) is "vertical". [1]
VERTICAL_TILT_FRACTION = 0.99
#: A straight wire from the feed must rise at least this fraction of its length to be a sloper. [1]
MIN_SLOPE_FRACTION = 0.1
#: End points closer than this are the same junction. [m]
JOIN_TOLERANCE_M = 1e-3
#: Direction change (cosine) above which consecutive segments count as one straight wire. [1]
STRAIGHT_COSINE = 0.9995

#: Section codes in ``AerialShape.segment_section``.
SECTION_EARTH_LEAD = -2
SECTION_UNASSIGNED = -1
SECTION_DOWN_LEAD = 0


class AerialShape(NamedTuple):
    """What kind of aerial a wire set is, with the dimensions the closed forms need.

    Attributes
    ----------
    kind : str
        One of ``SHAPE_KINDS``.
    vertical_height_m : float
        Height of the top of the down-lead above the ground. [m]
    feed_height_m : float
        Height of the feed above the ground. [m]
    downlead_length_m : float
        Wire length of the down-lead (the whole wire for a sloper). [m]
    downlead_rise_m : float
        Height gained along the down-lead. [m]
    downlead_radius_m : float
        Length-weighted mean radius of the down-lead. [m]
    top_lengths_m, top_heights_m, top_radii_m : tuple of float
        Length, length-weighted mean height and radius of each top arm. [m]
    total_length_m : float
        All aerial wire. [m]
    earth_lead_length_m : float
        All earth-lead wire. [m]
    segment_section : tuple of int
        Per segment: -2 earth lead, -1 not assigned (irregular parts),
        0 down-lead, i + 1 for top arm i.
    notes : tuple of str
        Plain-English remarks on the classification.
    """

    kind: str
    vertical_height_m: float
    feed_height_m: float
    downlead_length_m: float
    downlead_rise_m: float
    downlead_radius_m: float
    top_lengths_m: tuple
    top_heights_m: tuple
    top_radii_m: tuple
    total_length_m: float
    earth_lead_length_m: float
    segment_section: tuple
    notes: tuple

    def as_dict(self) -> dict:
        """Plain dict of the shape (JSON-ready; the per-segment map left out)."""
        d = self._asdict()
        d.pop("segment_section")
        for key in ("top_lengths_m", "top_heights_m", "top_radii_m", "notes"):
            d[key] = list(d[key])  # the fields hold numbers and words only: nothing deeper to copy
        return d


def _cluster(points, tol):
    """Label points so that points within ``tol`` of an earlier point share its label."""
    n = len(points)
    d = np.linalg.norm(points[:, None, :] - points[None, :, :], axis=-1)
    first = np.argmax(d < tol, axis=1)  # first index within tol (itself at worst)
    labels = first.copy()
    # follow chains to a fixed point
    for _ in range(n):
        nxt = labels[labels]
        if np.array_equal(nxt, labels):
            break
        labels = nxt
    _, labels = np.unique(labels, return_inverse=True)
    return labels


class _WireGraph:
    """The aerial segments as a graph: end points within ``JOIN_TOLERANCE_M`` are one node."""

    def __init__(self, segments: Segments, aer):
        self.segments = segments
        self.aer = aer
        pts = np.concatenate([segments.start[aer], segments.end[aer]])
        labels = _cluster(pts, JOIN_TOLERANCE_M)
        m = aer.size
        self.m = m
        self.node_a, self.node_b = labels[:m], labels[m:]
        n_nodes = int(labels.max()) + 1
        self.node_xyz = np.zeros((n_nodes, 3))
        self.node_xyz[labels] = pts
        self.adj: list[list[tuple[int, int]]] = [[] for _ in range(n_nodes)]
        for k in range(m):
            self.adj[self.node_a[k]].append((k, self.node_b[k]))
            self.adj[self.node_b[k]].append((k, self.node_a[k]))

    def feed_node(self) -> int:
        """The node at the feed; raises when the feed is not at the end of an aerial segment."""
        dist = np.linalg.norm(self.node_xyz - self.segments.feed, axis=1)
        feed_node = int(np.argmin(dist))
        if dist[feed_node] > 10 * JOIN_TOLERANCE_M:
            raise ModelInputError(
                f"the feed point is {dist[feed_node]:.3f} m from the nearest aerial wire end; "
                "it must sit at the end of an aerial segment"
            )
        return feed_node

    def topology_reasons(self, feed_node) -> list:
        """Reasons for "irregular" found by a walk from the feed: unconnected parts, closed loops."""
        seen = {feed_node}
        stack = [feed_node]
        while stack:
            u = stack.pop()
            for _, v in self.adj[u]:
                if v not in seen:
                    seen.add(v)
                    stack.append(v)
        reach_edges = sum(1 for k in range(self.m) if self.node_a[k] in seen)
        reasons = []
        if reach_edges < self.m:
            reasons.append(f"{self.m - reach_edges} aerial segment(s) not connected to the feed")
        if reach_edges >= len(seen):
            reasons.append("the wires form a closed loop")
        return reasons

    def other_end(self, k, frm):
        """The node at the far end of aerial segment k entered from node ``frm``."""
        return self.node_b[k] if self.node_a[k] == frm else self.node_a[k]

    def seg_dz(self, k, frm):
        """Height gained along aerial segment k when entered from node ``frm``."""
        return self.node_xyz[self.other_end(k, frm), 2] - self.node_xyz[frm, 2]

    def steep(self, k):
        """True when aerial segment k is steep enough to belong to a down-lead."""
        s, i = self.segments, self.aer[k]
        return abs(s.end[i, 2] - s.start[i, 2]) >= STEEP_FRACTION * s.length[i]

    def straight(self, ks):
        """True when the aerial segments ``ks`` run in one direction."""
        s = self.segments
        d = [(s.end[self.aer[k]] - s.start[self.aer[k]]) / s.length[self.aer[k]] for k in ks]
        return all(abs(float(np.dot(d[0], x))) >= STRAIGHT_COSINE for x in d[1:])

    def walk_down_lead(self, feed_node):
        """The unbranched chain of steep segments from the feed: (segments, top node, rise [m])."""
        down = []
        node, prev = feed_node, None
        rise = 0.0
        while True:
            nxt = [(k, v) for k, v in self.adj[node] if k != prev]
            if len(nxt) != 1 or not self.steep(nxt[0][0]):
                break
            k, v = nxt[0]
            rise += self.seg_dz(k, node)
            down.append(k)
            node, prev = v, k
        return down, node, rise

    def chain_from(self, start_node, first_seg):
        """The unbranched chain that leaves ``start_node`` by ``first_seg``: (segments, forked)."""
        ks, prev_ = [first_seg], first_seg
        node_ = self.other_end(first_seg, start_node)
        forked = False
        while True:
            nxt = [(k, v) for k, v in self.adj[node_] if k != prev_]
            if not nxt:
                break
            if len(nxt) > 1:
                forked = True
                break
            k, v = nxt[0]
            ks.append(k)
            node_, prev_ = v, k
        return ks, forked


def _shape(kind, graph, section, notes, vertical_height, feed_z, d_len, rise, d_rad, tops=((), (), ())):
    """An AerialShape with the totals measured from the graph's segments."""
    s, aer = graph.segments, graph.aer
    return AerialShape(
        kind, float(vertical_height), float(feed_z), float(d_len), float(rise), float(d_rad),
        tuple(tops[0]), tuple(tops[1]), tuple(tops[2]),
        float(np.sum(s.length[aer])), float(np.sum(s.length[s.grounded])),
        tuple(int(x) for x in section), tuple(notes),
    )


def _irregular(graph, section, notes, reasons, feed_z) -> AerialShape:
    s, aer = graph.segments, graph.aer
    notes.extend(reasons)
    top = np.max(np.maximum(s.start[aer, 2], s.end[aer, 2]))
    return _shape("irregular", graph, section, notes, top, feed_z, 0.0, 0.0,
                  np.average(s.radius[aer], weights=s.length[aer]))


def _sloper_or_reason(graph, feed_node, section, notes, reasons, feed_z):
    """With no steep start: the one straight sloping wire, or None with the reason appended."""
    s, aer = graph.segments, graph.aer
    adj = graph.adj[feed_node]
    ks, forked = graph.chain_from(feed_node, adj[0][0]) if len(adj) == 1 else ([], True)
    if not forked and len(ks) == graph.m and graph.straight(ks) and not reasons:
        rise_s = float(sum(graph.seg_dz(k, n) for k, n in _walk_nodes(ks, feed_node, graph.node_a, graph.node_b)))
        length_s = float(np.sum(s.length[aer[ks]]))
        if rise_s >= MIN_SLOPE_FRACTION * length_s:
            section[aer[ks]] = SECTION_DOWN_LEAD
            radius = float(np.average(s.radius[aer[ks]], weights=s.length[aer[ks]]))
            return _shape("sloping wire", graph, section, notes, feed_z + rise_s, feed_z, length_s, rise_s, radius)
        reasons.append("a single straight wire that barely rises from the feed")
    else:
        reasons.append("no steep down-lead from the feed and not a single straight sloping wire")
    return None


def _top_arms(graph, junction, down, reasons):
    """The chains leaving the top of the down-lead; a reason is appended when one is not a top arm."""
    arms: list[list[int]] = []
    for b in [k for k, _ in graph.adj[junction] if k != down[-1]]:
        ks, forked = graph.chain_from(junction, b)
        if forked:
            reasons.append("a top arm divides again (branched top)")
            break
        if any(graph.steep(k) for k in ks):
            reasons.append("a top arm has a steep run in it (zig-zag or second vertical)")
            break
        arms.append(ks)
    return arms


def _measure_arms(graph, arms, section, notes):
    """Length, mean height and radius of each top arm; marks their sections."""
    s, aer = graph.segments, graph.aer
    top_l, top_h, top_r = [], [], []
    for i, ks in enumerate(arms):
        idx = aer[ks]
        section[idx] = i + 1
        w = s.length[idx]
        top_l.append(float(np.sum(w)))
        mid_z = 0.5 * (s.start[idx, 2] + s.end[idx, 2])
        top_h.append(float(np.average(mid_z, weights=w)))
        top_r.append(float(np.average(s.radius[idx], weights=w)))
        span = float(np.max(mid_z) - np.min(mid_z))
        if span > 0.25 * top_h[-1]:
            notes.append(f"top arm {i + 1} changes height by " + metres(span) + "; its mean height is used")
    return top_l, top_h, top_r


def _kind_of(graph, arms, down, rise, d_len, notes) -> str:
    if not arms:
        kind = "vertical" if rise >= VERTICAL_TILT_FRACTION * d_len else "sloping wire"
        if kind == "vertical" and not graph.straight(down):
            notes.append("the down-lead bends; treated as a vertical of its total length")
        if kind == "sloping wire" and not graph.straight(down):
            notes.append("the wire bends; treated as one sloping wire")
        return kind
    return "inverted-L" if len(arms) == 1 else "T"


def classify(segments: Segments) -> AerialShape:
    """Classify a wire set as vertical, sloping wire, inverted-L, T or irregular.

    Parameters
    ----------
    segments : Segments
        The aerial and earth lead. Frame: m, x east, y north, z up.

    Returns
    -------
    AerialShape
        Kind, heights, arm lengths, radii and notes.

    Notes
    -----
    A walk over the graph of aerial segments (end points within
    ``JOIN_TOLERANCE_M`` are one node): the down-lead is the unbranched chain
    of steep segments from the feed; each branch leaving its top must be an
    unbranched chain with no steep segment to be a top arm. Thresholds are the
    module constants.

    References
    ----------
    Shape names as used in the trade; e.g. E. A. Laport, *Radio Antenna
    Engineering*, 1952, ch. 1 (inverted-L and T aerials). (from memory)

    Examples
    --------
    >>> from aerial.models.segments import polyline_segments
    >>> s = polyline_segments([[0, 0, 0.02], [0, 0, 10], [20, 0, 10]], 1e-3)
    >>> shape = classify(s)
    >>> shape.kind, shape.top_lengths_m
    ('inverted-L', (20.0,))
    """
    if len(segments) == 0:
        raise ModelInputError("no segments to classify")
    aer = np.flatnonzero(segments.aerial)
    if aer.size == 0:
        raise ModelInputError("the segment set has no aerial (ungrounded) segment")
    lengths = segments.length
    if np.any(lengths <= 0):
        raise ModelInputError("every segment must have a positive length")
    section = np.full(len(segments), SECTION_UNASSIGNED, dtype=int)
    section[segments.grounded] = SECTION_EARTH_LEAD
    earth_len = float(np.sum(lengths[segments.grounded]))
    notes = []
    if earth_len > 0:
        notes.append("earth lead of " + metres(earth_len) + " is part of the electrostatic solution, not of "
                     "the shape")

    graph = _WireGraph(segments, aer)
    feed_node = graph.feed_node()
    feed_z = float(segments.feed[2])
    irregular_reasons = graph.topology_reasons(feed_node)
    down, junction, rise = graph.walk_down_lead(feed_node)
    arms: list[list[int]] = []
    if not down:
        sloper = _sloper_or_reason(graph, feed_node, section, notes, irregular_reasons, feed_z)
        if sloper is not None:
            return sloper
    else:
        arms = _top_arms(graph, junction, down, irregular_reasons)
    if irregular_reasons:
        return _irregular(graph, section, notes, irregular_reasons, feed_z)

    section[aer[down]] = SECTION_DOWN_LEAD
    d_len = float(np.sum(lengths[aer[down]]))
    d_rad = float(np.average(segments.radius[aer[down]], weights=lengths[aer[down]]))
    tops = _measure_arms(graph, arms, section, notes)
    kind = _kind_of(graph, arms, down, rise, d_len, notes)
    return _shape(kind, graph, section, notes, graph.node_xyz[junction, 2], feed_z, d_len, rise, d_rad, tops)


def measure_like(segments: Segments, like: AerialShape) -> AerialShape:
    """Measure a wire set with the sections (down-lead, top arms) of an earlier classification.

    For a wire set that is a slightly moved copy of the one ``like`` was made
    from (the same segments in the same order, e.g. the supports moved by
    their height tolerance), this keeps the kind and the section of every
    segment and measures the lengths, heights and radii anew, so that a
    range of figures comes from the same model as the nominal figure even
    where a threshold of :func:`classify` lies between the two.

    Parameters
    ----------
    segments : Segments
        The moved wire set. Frame: m, x east, y north, z up.
    like : AerialShape
        The classification of the unmoved wire set.

    Returns
    -------
    AerialShape
        ``like``'s kind and sections with the moved dimensions.

    Raises
    ------
    ModelInputError
        When the segment count differs from ``like``'s.

    Examples
    --------
    >>> from aerial.models.segments import polyline_segments
    >>> s = polyline_segments([[0, 0, 0.02], [0, 0, 10], [20, 0, 10]], 1e-3)
    >>> moved = polyline_segments([[0, 0, 0.02], [0, 0, 11], [20, 0, 11]], 1e-3)
    >>> m = measure_like(moved, classify(s))
    >>> m.kind, round(m.vertical_height_m, 2), m.top_heights_m
    ('inverted-L', 11.0, (11.0,))
    """
    section = np.asarray(like.segment_section, dtype=int)
    if section.size != len(segments):
        raise ModelInputError(f"{len(segments)} segments cannot be measured like a shape of {section.size}")
    lengths = segments.length
    aer = np.asarray(segments.aerial, bool)
    grounded = np.asarray(segments.grounded, bool)
    feed_z = float(segments.feed[2])
    total_len = float(np.sum(lengths[aer]))
    earth_len = float(np.sum(lengths[grounded]))
    notes = tuple(like.notes) + ("shape and sections kept from the unmoved wires",)
    z_hi = np.maximum(segments.start[:, 2], segments.end[:, 2])
    if like.kind == "irregular":
        return AerialShape("irregular", float(np.max(z_hi[aer])), feed_z, 0.0, 0.0,
                           float(np.average(segments.radius[aer], weights=lengths[aer])), (), (), (),
                           total_len, earth_len, like.segment_section, notes)
    down = (section == SECTION_DOWN_LEAD) & aer
    d_len = float(np.sum(lengths[down]))
    top_z = float(np.max(z_hi[down])) if np.any(down) else feed_z
    d_rad = float(np.average(segments.radius[down], weights=lengths[down])) if np.any(down) else like.downlead_radius_m
    top_l, top_h, top_r = [], [], []
    for i in range(len(like.top_lengths_m)):
        idx = (section == i + 1) & aer
        w = lengths[idx]
        top_l.append(float(np.sum(w)))
        top_h.append(float(np.average(0.5 * (segments.start[idx, 2] + segments.end[idx, 2]), weights=w)))
        top_r.append(float(np.average(segments.radius[idx], weights=w)))
    return AerialShape(like.kind, top_z, feed_z, d_len, top_z - feed_z, d_rad, tuple(top_l), tuple(top_h),
                       tuple(top_r), total_len, earth_len, like.segment_section, notes)


def _walk_nodes(ks, start, node_a, node_b):
    """Yield (segment, node it is entered from) along a chain starting at ``start``."""
    node = start
    for k in ks:
        yield k, node
        node = node_b[k] if node_a[k] == node else node_a[k]
