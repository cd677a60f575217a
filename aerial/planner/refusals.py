"""Why the planner refused what it refused: counts by cause, the nearest miss, and a fixed part that blocks most.

The search (:mod:`aerial.planner.search`) feeds a :class:`RefusalTally` one
batch of candidates at a time; :meth:`RefusalTally.summary` turns it into the
``refusals`` section of ``aerial layout``'s result. Frame: metres, x east,
y north; distances in plan.
"""

from __future__ import annotations

import numpy as np
import shapely

from aerial.core.units import length_text

#: A fixed part (the entry point, one support) inside a fall zone for at least this share of the
#: layouts refused for safety is named as what blocks them. [1]
BLOCKING_SHARE = 0.5
#: Most blocking parts named.
MAX_BLOCKING = 3


class RefusalTally:
    """Running counts of refused and excluded candidates, by cause.

    Parameters
    ----------
    support_names : list of str
        The candidate supports, in the search's index order.
    support_xy : ndarray (S, 2)
        Their plan positions. [m]
    entry_xy : tuple of float
        The entry point, where every lead-in ends. [m]
    power_lines : list of OverheadLine
        The power lines of the plan.
    exclusion_reasons : tuple of str
        The geometric exclusions, in the search's code order.
    """

    def __init__(self, support_names, support_xy, entry_xy, power_lines, exclusion_reasons):
        self.names = list(support_names)
        self.entry_xy = (float(entry_xy[0]), float(entry_xy[1]))
        self.reasons = tuple(exclusion_reasons)
        self.safety = 0
        self.geometry = {r: 0 for r in self.reasons}
        self.by_line = {ln.name: [0, 0] for ln in power_lines}  # inside the zone, crossing the line
        entry = shapely.Point(*self.entry_xy)
        points = shapely.points(np.asarray(support_xy, float).reshape(-1, 2))
        self.entry_dist = {ln.name: float(entry.distance(ln.path)) for ln in power_lines}
        self.support_dist = {ln.name: np.asarray(shapely.distance(points, ln.path), float) for ln in power_lines}
        self.entry_hits = {ln.name: 0 for ln in power_lines}
        self.support_hits = {ln.name: np.zeros(len(self.names), dtype=np.int64) for ln in power_lines}
        self.nearest = None  # (margin [m], family, i, j, k, line name, needed [m])
        self.penalised = {"over a roof": 0, "partly outside the lot": 0}

    # ------------------------------------------------------------------ feeding

    def add_safety(self, per_line, fam, i, j, k, margin) -> None:
        """Count one batch's power-line refusals (``per_line`` from ``refuse_many(..., details=True)``)."""
        refused = np.zeros(len(fam), dtype=bool)
        worst_line = np.full(len(fam), -1)
        worst = np.full(len(fam), np.inf)
        needed = np.zeros(len(fam))
        for n, (line, mask, dist, need) in enumerate(per_line):
            name = line.name
            need = np.broadcast_to(np.asarray(need, float), mask.shape)
            refused |= mask
            crosses = mask & (dist <= 1e-9)
            self.by_line[name][0] += int(np.count_nonzero(mask & ~crosses))
            self.by_line[name][1] += int(np.count_nonzero(crosses))
            self.entry_hits[name] += int(np.count_nonzero(mask & (self.entry_dist[name] < need)))
            sd = self.support_dist[name]
            for idx, used in ((i, np.ones(len(fam), bool)), (j, j != i), (k, k >= 0)):
                safe_idx = np.where(idx >= 0, idx, 0)
                hit = mask & used & (sd[safe_idx] < need)
                self.support_hits[name] += np.bincount(safe_idx[hit], minlength=len(self.names))
            short = dist - need
            closer = mask & (short < worst)
            worst = np.where(closer, short, worst)
            worst_line = np.where(closer, n, worst_line)
            needed = np.where(closer, need, needed)
        self.safety += int(np.count_nonzero(refused))
        if not np.any(refused):
            return
        rows = np.flatnonzero(refused)
        best = rows[np.argmax(np.asarray(margin)[rows])]
        if self.nearest is None or margin[best] > self.nearest[0]:
            line = per_line[int(worst_line[best])][0].name
            self.nearest = (float(margin[best]), int(fam[best]), int(i[best]), int(j[best]), int(k[best]), line,
                            float(needed[best]))

    def add_geometry(self, reasons) -> None:
        """Count one batch's geometric exclusions (``reasons``: code per candidate, -1 for none)."""
        counts = np.bincount(np.asarray(reasons)[np.asarray(reasons) >= 0], minlength=len(self.reasons))
        for code, name in enumerate(self.reasons):
            self.geometry[name] += int(counts[code])

    def add_penalised(self, over_roof: int, outside_lot: int) -> None:
        self.penalised["over a roof"] += int(over_roof)
        self.penalised["partly outside the lot"] += int(outside_lot)

    # ------------------------------------------------------------------ reading

    @property
    def total(self) -> int:
        return self.safety + sum(self.geometry.values())

    def causes(self) -> list[dict]:
        """Every cause with a count, most frequent first."""
        out = []
        for name, (inside, crosses) in self.by_line.items():
            out.append({"cause": f'inside the fall zone of power line "{name}"', "kind": "safety", "count": inside})
            out.append({"cause": f'crosses power line "{name}" in plan', "kind": "safety", "count": crosses})
        out += [{"cause": r, "kind": "geometry", "count": n} for r, n in self.geometry.items()]
        return sorted((c for c in out if c["count"]), key=lambda c: -c["count"])

    def blocking(self) -> list[dict]:
        """Fixed parts inside a fall zone for most of the layouts refused for safety, with a sentence each."""
        if not self.safety:
            return []
        out = []
        ex, ey = self.entry_xy
        for name, hits in self.entry_hits.items():
            if hits >= BLOCKING_SHARE * self.safety:
                out.append({"part": "the entry point", "line": name, "count": int(hits),
                            "distance_m": float(self.entry_dist[name]), "at_m": [ex, ey]})
        for name, hits in self.support_hits.items():
            for s in np.argsort(-hits, kind="stable"):
                if hits[s] < BLOCKING_SHARE * self.safety:
                    break
                out.append({"part": f'support "{self.names[s]}"', "line": name, "count": int(hits[s]),
                            "distance_m": float(self.support_dist[name][s])})
        for block in out:
            block["sentence"] = blocking_sentence(block, self.safety)
        return sorted(out, key=lambda b: -b["count"])[:MAX_BLOCKING]

    def summary(self, describe) -> dict:
        """The JSON ``refusals`` section; ``describe(fam, i, j, k)`` names a layout in words."""
        nearest = None
        if self.nearest is not None:
            margin, fam, i, j, k, line, needed = self.nearest
            words = describe(fam, i, j, k)
            nearest = {"layout": words, "line": line, "short_by_m": -margin, "needed_m": needed}
            nearest["sentence"] = nearest_miss_sentence(nearest)
        return {
            "total": self.total,
            "safety": self.safety,
            "geometry": sum(self.geometry.values()),
            "causes": self.causes(),
            "nearest_miss": nearest,
            "blocking": self.blocking(),
            "kept_with_penalty": dict(self.penalised),
            "note": "a layout refused for more than one cause counts under each; the safety rule is "
                    "docs/site-planner.md (fall zone: 1.5 × the tallest point, never less than the line's height)",
        }


def nearest_miss_sentence(miss: dict, length=length_text) -> str:
    """The refused layout that came closest to the power-line rule, in words; ``length`` writes a length [m].

    Examples
    --------
    >>> nearest_miss_sentence({"layout": "T: span a – b", "line": "mains", "short_by_m": 5.0, "needed_m": 12.0})
    'T: span a – b: 5 m short of the 12 m needed from power line "mains"'
    """
    return (f'{miss["layout"]}: {length(miss["short_by_m"])} short of the {length(miss["needed_m"])} needed from '
            f'power line "{miss["line"]}"')


def plan_point_text(x: float, y: float) -> str:
    """A plan position in metres as the outputs write coordinates: '(3.0, -1.5) m'."""
    return f"({x:.1f}, {y:.1f}) m"


def blocking_sentence(block: dict, refused_for_safety: int, length=length_text, point=plan_point_text) -> str:
    """A fixed part inside a fall zone for most of the layouts refused for safety, in words.

    ``length`` writes a length given in metres [m]; ``point`` a plan position (x, y) in metres [m].

    Examples
    --------
    >>> blocking_sentence({"part": "the entry point", "line": "mains", "count": 4, "distance_m": 6.0,
    ...                    "at_m": [0.0, 0.0]}, 5)[:64]
    'the entry point (0.0, 0.0) m, where every lead-in ends, is 6 m f'
    """
    if block["part"] == "the entry point":
        return (f"the entry point {point(*block['at_m'])}, where every lead-in ends, is "
                f'{length(block["distance_m"])} from power line "{block["line"]}": inside its fall zone for '
                f"{block['count']} of the {refused_for_safety} layouts refused for safety. An entry further from the "
                "line (or lower supports) would free them.")
    return (f'{block["part"]} is {length(block["distance_m"])} from power line "{block["line"]}": inside its fall '
            f"zone in {block['count']} of the {refused_for_safety} layouts refused for safety. Leave it out, or use "
            "it only with lower supports.")
