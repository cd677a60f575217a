"""The site planner: enumerate wire layouts among the candidate supports, refuse the unsafe ones, rank the rest.

One site in, one JSON-ready dict out (:func:`plan_layouts`); the command line
``aerial layout`` renders it. The search:

1. Candidate supports are the site's ``[supports.*]`` plus ``[[plan.supports]]``
   (and a fixing on the wall above the entry, when given). The lead-in ends at
   the entry point (``[plan.entry]``, else the receiver).
2. Five families of layout are enumerated as index arrays (no Python loop per
   candidate): a single span with the lead-in from the end nearer the entry
   (an inverted-L), a T (lead-in from mid-span), a dog-leg of two spans
   through a third support with the lead-in from the nearer end, two spans
   meeting at a middle support with the lead-in from there (a T with unequal
   arms), and a sloping wire from a support down to the entry.
3. Every candidate is checked in plan against the power-line rule
   (:mod:`aerial.planner.clearance`): those inside a fall zone are refused before
   ranking and counted. Candidates crossing an obstacle or a telephone/cable
   line, whose lead-in passes over a building, or whose span passes over a
   roof with less than ``ROOF_CLEARANCE_M`` to spare, are excluded; spans
   that clear a roof are kept with a penalty, as are wires leaving the lot.
4. The survivors are scored with the closed-form short-aerial models
   (:mod:`aerial.models.short_aerial`, :mod:`aerial.models.capacitance`,
   :mod:`aerial.models.conductor`), vectorised as candidates x frequencies.

Frame: metres, x east, y north, z up (heights above the ground).
"""

# "check values §N" refers to the sections of docs/check-values.md.

from __future__ import annotations

import math

import numpy as np
import shapely

from aerial.core.errors import AerialError, ResourceLimit, naming_the_file
from aerial.core.lengthtext import join_text, metres, words
from aerial.core.units import length_text, si_text
from aerial.core.materials import CONDUCTORS
from aerial.models import capacitance as cap
from aerial.models import conductor
from aerial.models import short_aerial as sa
from aerial.geometry.resolve import building_of
from aerial.models.building import blended_field_height

#: Largest number of candidate layouts searched without ``allow_large``.
MAX_CANDIDATES = 2_000_000
#: Candidates scored per batch (bounds the memory of the candidates x frequencies arrays).
CHUNK_CANDIDATES = 100_000
#: Measured ranking speed on a 2-core machine (docs/performance-planner.md), for the time estimate. [1/s]
CANDIDATES_PER_SECOND = 60_000
#: Spans shorter than this are not worth hanging. [m]
MIN_SPAN_M = 2.0
#: A dog-leg whose legs meet at less than this angle folds back on itself. [deg]
MIN_DOGLEG_ANGLE_DEG = 60.0
#: A span may pass over a roof if its lower end is at least this much higher than the roof. [m]
ROOF_CLEARANCE_M = 1.0
#: Building outlines are shrunk by this much before the crossing test (wall fixings touch the outline). [m]
WALL_ALLOWANCE_M = 0.5
#: Score penalties [dB].
PENALTY_OVER_ROOF_DB = 3.0
PENALTY_OUTSIDE_LOT_DB = 3.0
#: Lowest height used in the models (the wire keeps clear of the ground or slab). [m]
MIN_MODEL_HEIGHT_M = 0.5
#: Upper limit of ``best``.
MAX_BEST = 100

FAMILIES = ("span", "T", "dog-leg", "two spans from a middle support", "sloping wire")
SPAN, TEE, DOGLEG, VEE, SLOPER = range(5)

EXCLUSION_REASONS = (
    "crosses an obstacle",
    "crosses a telephone/cable line",
    "lead-in or sloping wire passes over a building",
    "span passes over a roof without clearance",
    "span shorter than the minimum",
    "dog-leg folds back on itself",
)


# --------------------------------------------------------------------------- counting and enumeration


def estimate_candidates(n_supports: int) -> int:
    """Number of candidate layouts for ``n`` supports.

    Spans and T's: n(n-1)/2 each; dog-legs and two-spans-from-the-middle:
    n(n-1)(n-2)/2 each; sloping wires: n.

    Examples
    --------
    >>> estimate_candidates(3)
    15
    >>> estimate_candidates(23)
    11155
    """
    n = int(n_supports)
    if n < 1:
        return 0
    return n * (n - 1) + n * (n - 1) * (n - 2) + n


def _chunks(n: int, size: int):
    """Yield (family, i, j, k) index arrays in batches of at most about ``size`` candidates."""
    I, J = np.triu_indices(n, 1)
    for fam in (SPAN, TEE):
        for s in range(0, len(I), size):
            e = min(s + size, len(I))
            yield np.full(e - s, fam), I[s:e], J[s:e], np.full(e - s, -1)
    pairs = len(I)
    if pairs and n >= 3:
        block = max(1, size // max(pairs, 1))
        for k0 in range(0, n, block):
            ks = np.arange(k0, min(k0 + block, n))
            kk = np.repeat(ks, pairs)
            ii = np.tile(I, len(ks))
            jj = np.tile(J, len(ks))
            m = (ii != kk) & (jj != kk)
            kk, ii, jj = kk[m], ii[m], jj[m]
            for fam in (DOGLEG, VEE):
                yield np.full(len(kk), fam), ii, jj, kk
    s = np.arange(n)
    yield np.full(n, SLOPER), s, s, np.full(n, -1)


# --------------------------------------------------------------------------- scoring (pure, vectorised)


def layout_figures(kind, junction_height, arm1, arm2, arm1_height, arm2_height, lead_in_length, entry_height,
                   radius, frequency, resistivity, relative_permeability=1.0):
    """Effective height, resistances and capacitance of many layouts at many frequencies.

    Parameters
    ----------
    kind : ndarray of int, shape (N,)
        0: a vertical with one top arm (span or dog-leg, fed from its end);
        1: a vertical with two top arms (T, or two spans from a middle
        support); 2: a sloping wire from a support down to the entry.
    junction_height : ndarray, shape (N,)
        Height where the lead-in leaves the top (kind 0, 1), or the
        support's height (kind 2). [m]
    arm1, arm2 : ndarray, shape (N,)
        Top-arm lengths (arm2 = 0 for kind 0 and 2); for kind 2, ``arm1`` is
        the sloping wire's length. [m]
    arm1_height, arm2_height : ndarray, shape (N,)
        Mean height of each arm (for kind 2: of the sloping wire). [m]
    lead_in_length : ndarray, shape (N,)
        Lead-in length from the top to the entry (0 for kind 2). [m]
    entry_height : float
        Height of the entry point (the earth lead below it is taken as part
        of the vertical). [m]
    radius : float
        Wire radius. [m]
    frequency : ndarray, shape (F,)
        [Hz]
    resistivity : float
        Conductor resistivity. [ohm m]
    relative_permeability : float
        [1]

    Returns
    -------
    dict
        ``effective_height_m`` (N, F), ``radiation_resistance_ohm`` (N, F),
        ``loss_resistance_ohm`` (N, F) (conductor only), ``capacitance_f``
        (N,), ``out_of_range`` (N,) bool: outside the closed forms' range at
        some frequency.

    Notes
    -----
    Kinds 0 and 1 are the top-loading-angle model (``short_aerial.top_loaded``)
    of a vertical from the ground to the junction, which stands for the
    earth lead plus the lead-in's vertical projection (the lead-in's
    horizontal offset adds loss, not pick-up). Kind 2 is
    ``short_aerial.sloping_wire`` of length (wire + entry height) rising to
    the support's height. Conductor loss referred to the feed: the vertical
    and lead-in carry about the feed current (R' l), the top arms and the
    sloping wire a current falling to zero (R' l / 3). Capacitance: the sum
    of the sections' average-potential capacitances (Howe), a few per cent
    high because the sections shield each other (check values §3).

    References
    ----------
    E. A. Laport, *Radio Antenna Engineering*, 1952, ch. 1 (top loading);
    G. W. O. Howe, The Electrician, 1914 (average potential); C. A. Balanis,
    *Antenna Theory*, 3rd ed., 2005, sec. 2.14 (loss referred to the input).
    (all from memory)
    """
    kind = np.asarray(kind)
    f = np.asarray(frequency, dtype=float)[None, :]
    n = len(kind)
    he = np.zeros((n, f.shape[1]))
    rr = np.zeros_like(he)
    rl = np.zeros_like(he)
    c = np.zeros(n)
    bad = np.zeros(n, dtype=bool)
    rprime = conductor.resistance_per_m(radius, f, resistivity, relative_permeability)  # (1, F)
    hv = np.maximum(np.asarray(junction_height, float), MIN_MODEL_HEIGHT_M)
    a1 = np.asarray(arm1, float)
    a2 = np.asarray(arm2, float)
    t1 = np.maximum(np.asarray(arm1_height, float), MIN_MODEL_HEIGHT_M)
    t2 = np.maximum(np.asarray(arm2_height, float), MIN_MODEL_HEIGHT_M)
    lead = np.asarray(lead_in_length, float)
    for k in (0, 1, 2):
        sel = np.flatnonzero(kind == k)
        if len(sel) == 0:
            continue
        col = (lambda v: v[sel][:, None])
        if k == 0:
            res = sa.top_loaded(col(hv), [col(a1)], radius, f, top_height=col(t1))
            c[sel] = cap.vertical_wire_capacitance(hv[sel], radius) + cap.horizontal_wire_capacitance(a1[sel], t1[sel], radius)
            rl[sel] = rprime * (col(lead) + col(a1) / 3.0)
        elif k == 1:
            res = sa.top_loaded(col(hv), [col(a1), col(a2)], radius, f, top_height=[col(t1), col(t2)])
            c[sel] = (cap.vertical_wire_capacitance(hv[sel], radius) + cap.horizontal_wire_capacitance(a1[sel], t1[sel], radius)
                      + cap.horizontal_wire_capacitance(a2[sel], t2[sel], radius))
            rl[sel] = rprime * (col(lead) + (col(a1) + col(a2)) / 3.0)
        else:
            length = a1[sel] + max(float(entry_height), 0.0)
            rise = np.minimum(hv[sel], length)
            res = sa.sloping_wire(length[:, None], rise[:, None], radius, f)
            c[sel] = cap.horizontal_wire_capacitance(a1[sel], t1[sel], radius)
            rl[sel] = rprime * col(a1) / 3.0
        he[sel] = np.abs(res.effective_height_m)
        rr[sel] = res.radiation_resistance_ohm
        bad[sel] = np.any(res.too_long | res.past_resonance, axis=1)
    return {"effective_height_m": he, "radiation_resistance_ohm": rr, "loss_resistance_ohm": rl,
            "capacitance_f": c, "out_of_range": bad}


def station_score_db(effective_height, radiation_resistance, loss_resistance, field, earth_ohm=0.0):
    """Mean over stations of the available power, in dB above 1 W.

    Parameters
    ----------
    effective_height : ndarray (N, S)
        At each station's frequency. [m]
    radiation_resistance, loss_resistance : ndarray (N, S)
        [ohm]
    field : ndarray (S,)
        RMS field strength of each station at the site. [V/m]
    earth_ohm : float or ndarray (S,)
        Earth-system resistance in series, one value or one at each
        station's frequency. [ohm]

    Returns
    -------
    ndarray (N,)
        mean_s 10 log10[(E_s h_e)^2 / (4 (Rr + R_loss + R_earth))]. [dBW]

    Notes
    -----
    Power available to a matched load (Balanis, *Antenna Theory*, 2005,
    sec. 2.15, from memory); the detector sees at most this.
    """
    tot = np.asarray(radiation_resistance) + np.asarray(loss_resistance) + np.asarray(earth_ohm, float)
    p = (np.asarray(field)[None, :] * np.asarray(effective_height)) ** 2 / (4.0 * tot)
    return np.mean(10.0 * np.log10(np.maximum(p, 1e-300)), axis=1)


def height_capacitance_score_db(effective_height, capacitance):
    """Mean over band centres of 20 log10(h_e C / (1 m pF)).

    Parameters
    ----------
    effective_height : ndarray (N, B)
        At each band centre. [m]
    capacitance : ndarray (N,)
        [F]

    Returns
    -------
    ndarray (N,)
        [dB re 1 m pF]

    Notes
    -----
    A short aerial is a source of voltage E h_e behind its capacitance C;
    loosely coupled into a tuned circuit (load resistance well below 1/wC)
    it drives a current w C E h_e, so the power delivered goes as (h_e C)^2
    [der].
    """
    prod = np.asarray(effective_height) * (np.asarray(capacitance)[:, None] * 1e12)
    return np.mean(20.0 * np.log10(np.maximum(prod, 1e-300)), axis=1)


# --------------------------------------------------------------------------- the search


class _Context:
    """Everything the batch evaluator needs, built once per search."""

    def __init__(self, site, plan, objective):
        from aerial.planner.figures import indoor_run

        self.site = site
        self.plan = plan
        sup = plan.supports
        self.names = [s.name for s in sup]
        self.kinds = [s.kind for s in sup]
        self.x = np.array([s.x_m for s in sup], float)
        self.y = np.array([s.y_m for s in sup], float)
        self.h = np.array([s.height_m for s in sup], float)
        e = plan.entry
        self.ex, self.ey, self.eh = float(e.x_m), float(e.y_m), float(e.height_m)
        indoor = indoor_run(site, (self.ex, self.ey, self.eh))  # on from the entry to the receiver
        self.indoor_m = 0.0 if indoor is None else float(np.sum(np.linalg.norm(np.diff(indoor, axis=0), axis=1)))
        self.floor = 0.0
        self.body, _ = building_of(site)
        if self.body is None and plan.building == "apartment" and plan.balcony is not None and plan.balcony.conductive:
            self.floor = plan.balcony.floor_height_m
        self.hm = np.maximum(self.h - self.floor, MIN_MODEL_HEIGHT_M)  # model heights
        self.ehm = max(self.eh - self.floor, 0.0)
        if self.body is not None:  # the building's screened field: the same model as the report's
            f_c = objective["centre_hz"]
            self.hm = np.maximum(screened_height(self.body, self.x, self.y, self.h, f_c), MIN_MODEL_HEIGHT_M)
            self.ehm = float(screened_height(self.body, [self.ex], [self.ey], [self.eh], f_c)[0])
        self.dentry = np.hypot(self.x - self.ex, self.y - self.ey)
        self.objective = objective
        size = _aerial_size(site)
        self.radius = size.radius_m
        cond = CONDUCTORS[size.material]
        self.resistivity = cond.resistivity_ohm_m
        self.mu = cond.relative_permeability
        self.size = size
        self.obstacles = [o.outline for o in plan.obstacles]
        for o in self.obstacles:
            shapely.prepare(o)
        self.buildings = []
        for b in plan.buildings:
            shrunk = shapely.buffer(b.outline, -WALL_ALLOWANCE_M, quad_segs=8)
            if shrunk.is_empty:
                continue
            entry_inside = shrunk.contains(shapely.Point(self.ex, self.ey))
            shapely.prepare(shrunk)
            self.buildings.append((b, shrunk, entry_inside))
        self.lot = None
        if plan.lot is not None:
            from aerial.planner.clearance import LOT_TOLERANCE_M, QUAD_SEGS

            self.lot = shapely.buffer(plan.lot, LOT_TOLERANCE_M, quad_segs=QUAD_SEGS)
            shapely.prepare(self.lot)


def screened_height(body, x, y, h, frequency=None):
    """Open-ground height equivalent to the screened field at plan points (x, y) and heights h. [m]

    :func:`aerial.models.building.blended_field_height` at ``frequency`` [Hz] (None: static), as the report has it.
    """
    points = np.stack([np.asarray(v, dtype=float) for v in np.broadcast_arrays(x, y, h)], axis=-1)
    return blended_field_height(body, points, frequency)


def present_wire(site, objective, floor_m: float = 0.0) -> dict | None:
    """The site's own wires by the report's model, at the ranking frequencies and the report's centre frequency.

    The listed layouts are computed the same way (:func:`aerial.planner.figures.listed_layout_figures`), so the
    present wire and a layout on the same supports show the same figures, and both the report's. With the
    layouts' heights reckoned from a balcony slab ``floor_m`` up [m] (a conducting slab and no building to
    screen with), the present wire's are too (``heights_from_slab_m``). None when the closed forms cannot take
    the site's wires.
    """
    from aerial.estimate.assemble import headline_figures
    from aerial.geometry.resolve import resolve
    from aerial.planner.figures import planned_site, wavelength_validity, wires_from_slab

    f = np.append(np.asarray(objective["frequency_hz"], float), objective["centre_hz"])
    earth = np.append(np.asarray(objective["earth_ohm"], float), objective["centre_earth_ohm"])
    wires = wires_from_slab(site, floor_m) if floor_m > 0 else None
    reckoned = site if wires is None else planned_site(site, wires, floor_m)
    try:
        geo = resolve(reckoned, electrode_ohm=float(np.mean(earth)), wires=wires)  # as the headline resolves
        fig = headline_figures(reckoned, f, earth, wires=wires, geometry=geo)
    except AerialError:
        return None
    out = {"note": "your present wire, by the report's model (its building screening and RF earth included), "
                   "for comparison"}
    if floor_m > 0:
        out = {"note": "your present wire, by the report's model with its heights from the balcony slab, as the "
                       "layouts have them, for comparison (aerial report reckons them from the street)",
               "heights_from_slab_m": float(floor_m)}
    out.update(_figures_json(fig))
    out["figures_at_hz"] = float(objective["centre_hz"])
    out["score"] = _report_score(objective, fig)
    validity = wavelength_validity(reckoned, wires, geometry=geo)
    out["outside_model_range"] = validity["rough_from_hz"] is not None
    if validity["rough_from_hz"] is not None:
        out["rough_from_hz"] = validity["rough_from_hz"]
    return out


def _figures_json(fig: dict) -> dict:
    """The JSON figures of a wire computed at the ranking frequencies then the report's centre frequency."""
    return {
        "effective_height_m": float(fig["effective_height_m"][-1]),
        "effective_height_by_frequency_m": [float(v) for v in fig["effective_height_m"][:-1]],
        "capacitance_f": float(fig["capacitance_f"][-1]),
        "static_capacitance_f": float(fig["static_capacitance_f"][-1]),
        "radiation_resistance_ohm": float(fig["radiation_resistance_ohm"][-1]),
        "conductor_loss_ohm": float(fig["conductor_loss_ohm"][-1]),
        "earth_resistance_ohm": float(fig["ground_loss_ohm"][-1]),
        "loss_resistance_ohm": float(fig["loss_resistance_ohm"][-1]),
        "available_power_w": float(fig["available_power_w"][-1]),
        "shape": fig["shape"],
    }


def _report_score(objective, fig) -> float:
    """The ranking score of figures computed at the ranking frequencies (the last column, the centre, left out)."""
    he = fig["effective_height_m"][None, :-1]
    if objective["kind"] == "stations":
        return float(station_score_db(he, fig["radiation_resistance_ohm"][None, :-1],
                                      fig["conductor_loss_ohm"][None, :-1], objective["field_v_per_m"],
                                      objective["earth_ohm"])[0])
    return float(height_capacitance_score_db(he, fig["static_capacitance_f"][:1])[0])


def _aerial_size(site):
    for w in site.wires:
        if w.role == "aerial":
            return w.size
    from aerial.site.reader import WireSize
    from aerial.core import units

    return WireSize(units.awg_diameter(14) / 2, "copper", "14 AWG (default)")


def _geometry(ctx: _Context, fam, i, j, k):
    """Plan paths and model parameters of a batch."""
    x, y, h, hm = ctx.x, ctx.y, ctx.h, ctx.hm
    n = len(fam)
    kk = np.where(k >= 0, k, 0)
    near = np.where(ctx.dentry[i] <= ctx.dentry[j], i, j)
    far = np.where(near == i, j, i)
    E = np.array([ctx.ex, ctx.ey])
    P = np.stack([x, y], axis=1)
    mid = 0.5 * (P[i] + P[j])
    Eb = np.broadcast_to(E, (n, 2))
    top = np.empty((n, 3, 2))
    lead = np.empty((n, 2, 2))
    span = (fam == SPAN)
    tee = (fam == TEE)
    dog = (fam == DOGLEG)
    vee = (fam == VEE)
    slo = (fam == SLOPER)
    # top wire in plan
    top[:, 0] = np.where(span[:, None] | dog[:, None], P[far], P[i])
    top[:, 1] = np.select([span[:, None], tee[:, None], dog[:, None] | vee[:, None]], [P[near], mid, P[kk]], P[i])
    top[:, 2] = np.select([span[:, None], tee[:, None], dog[:, None]], [P[near], P[j], P[near]], P[j])
    top[slo] = np.stack([P[i[slo]], Eb[slo], Eb[slo]], axis=1)
    # lead-in in plan: from the junction to the entry
    junction = np.select([span[:, None] | dog[:, None], tee[:, None], vee[:, None]], [P[near], mid, P[kk]], Eb)
    lead[:, 0] = junction
    lead[:, 1] = Eb
    # heights
    hj = np.select([span | dog, tee, vee, slo], [h[near], 0.5 * (h[i] + h[j]), h[kk], h[i]])
    hjm = np.select([span | dog, tee, vee, slo], [hm[near], 0.5 * (hm[i] + hm[j]), hm[kk], hm[i]])
    L = lambda a, b: np.sqrt((x[a] - x[b]) ** 2 + (y[a] - y[b]) ** 2 + (h[a] - h[b]) ** 2)  # noqa: E731
    Lij = L(i, j)
    Lfk, Lkn = L(far, kk), L(kk, near)
    Lik, Ljk = L(i, kk), L(j, kk)
    a1 = np.select([span, tee, dog, vee], [Lij, 0.5 * Lij, Lfk + Lkn, Lik], 0.0)
    a2 = np.select([tee, vee], [0.5 * Lij, Ljk], 0.0)
    mean = lambda a, b: 0.5 * (hm[a] + hm[b])  # noqa: E731
    dog_h = (Lfk * mean(far, kk) + Lkn * mean(kk, near)) / np.maximum(Lfk + Lkn, 1e-9)
    t1 = np.select([span, tee, dog, vee, slo], [mean(i, j), mean(i, j), dog_h, mean(i, kk), 0.5 * (hm[i] + ctx.ehm)])
    t2 = np.select([tee, vee], [mean(i, j), mean(j, kk)], 0.0)
    jx, jy = junction[:, 0], junction[:, 1]
    lead_len = np.sqrt((jx - ctx.ex) ** 2 + (jy - ctx.ey) ** 2 + (hj - ctx.eh) ** 2)
    slope_len = np.sqrt((x[i] - ctx.ex) ** 2 + (y[i] - ctx.ey) ** 2 + (h[i] - ctx.eh) ** 2)
    a1 = np.where(slo, slope_len, a1)
    lead_len = np.where(slo, 0.0, lead_len)
    tallest = np.maximum(np.maximum(h[i], h[j]), np.where(k >= 0, h[kk], 0.0))
    tallest = np.maximum(tallest, ctx.eh)
    top_low = np.select([span | tee, dog | vee, slo],
                        [np.minimum(h[i], h[j]), np.minimum(np.minimum(h[i], h[j]), h[kk]), np.minimum(h[i], ctx.eh)])
    # shortest span and the dog-leg angle
    shortest = np.select([span | tee, dog | vee, slo], [Lij, np.minimum(Lik, Ljk), np.inf])
    v1 = P[i] - P[kk]
    v2 = P[j] - P[kk]
    cosang = np.einsum("ij,ij->i", v1, v2) / np.maximum(np.linalg.norm(v1, axis=1) * np.linalg.norm(v2, axis=1), 1e-12)
    folds = (dog | vee) & (cosang > math.cos(math.radians(MIN_DOGLEG_ANGLE_DEG)))
    kind = np.select([span | dog, tee | vee, slo], [0, 1, 2])
    full = np.concatenate([top, lead], axis=1)
    return {
        "top_xy": top, "lead_xy": lead, "full_xy": full, "junction_height": hj, "junction_height_model": hjm,
        "arm1": a1, "arm2": a2, "t1": t1, "t2": t2, "lead_len": lead_len, "tallest": tallest, "top_low": top_low,
        "shortest": shortest, "folds": folds, "kind": kind, "near": near, "far": far,
    }


def _evaluate(ctx: _Context, fam, i, j, k, *, details=False, tally=None):
    """Check and score one batch; returns the survivors' scores and the counts (also into ``tally``)."""
    from aerial.planner.clearance import crosses_many, refuse_many

    g = _geometry(ctx, fam, i, j, k)
    full = shapely.linestrings(g["full_xy"])
    top = shapely.linestrings(g["top_xy"])
    lead = shapely.linestrings(g["lead_xy"])
    n = len(fam)
    refused, margin, per_line = refuse_many(full, g["tallest"], ctx.plan.lines, details=True)
    reasons = np.full(n, -1)

    def mark(mask, code):
        sel = mask & (reasons < 0) & ~refused
        reasons[sel] = code

    live = ~refused
    obst = np.zeros(n, bool)
    for o in ctx.obstacles:
        obst[live] |= shapely.intersects(o, full[live])
    mark(obst, 0)
    mark(crosses_many(full, ctx.plan.telecom_lines) if ctx.plan.telecom_lines else np.zeros(n, bool), 1)
    over_roof = np.zeros(n, bool)
    low_roof = np.zeros(n, bool)
    lead_over = np.zeros(n, bool)
    slo = fam == SLOPER
    roof_names = [[] for _ in range(n)] if details else None
    for b, shrunk, entry_inside in ctx.buildings:
        t = np.zeros(n, bool)
        t[live] = shapely.intersects(shrunk, top[live])
        if not entry_inside:
            ld = np.zeros(n, bool)
            ld[live] = shapely.intersects(shrunk, lead[live])
            lead_over |= ld | (t & slo)
        high = g["top_low"] >= b.height_m + ROOF_CLEARANCE_M
        low_roof |= t & ~high & ~slo
        over_roof |= t & high & ~slo
        if details:
            for idx in np.flatnonzero(t & high & ~slo):
                roof_names[idx].append(b.name)
    mark(lead_over, 2)
    mark(low_roof, 3)
    # every wire piece the models see must be a real span (a support standing on the entry makes a zero arm)
    arms_short = (g["arm1"] < MIN_SPAN_M) | ((g["kind"] == 1) & (g["arm2"] < MIN_SPAN_M))
    mark((g["shortest"] < MIN_SPAN_M) | arms_short, 4)
    mark(g["folds"], 5)
    keep = ~refused & (reasons < 0)
    outside = np.zeros(n, bool)
    if ctx.lot is not None:
        outside[keep] = ~shapely.covers(ctx.lot, full[keep])
    counts = {"refused_safety": int(refused.sum())}
    for code, name in enumerate(EXCLUSION_REASONS):
        counts[name] = int((reasons == code).sum())
    if tally is not None:
        tally.add_safety(per_line, fam, i, j, k, margin)
        tally.add_geometry(np.where(refused, -1, reasons))
        tally.add_penalised(np.count_nonzero(over_roof & keep), np.count_nonzero(outside))
    sel = np.flatnonzero(keep)
    figs = layout_figures(g["kind"][sel], g["junction_height_model"][sel], g["arm1"][sel], g["arm2"][sel],
                          g["t1"][sel], g["t2"][sel], g["lead_len"][sel], ctx.ehm, ctx.radius,
                          ctx.objective["frequency_hz"], ctx.resistivity, ctx.mu)
    if ctx.objective["kind"] == "stations":
        score = station_score_db(figs["effective_height_m"], figs["radiation_resistance_ohm"],
                                 figs["loss_resistance_ohm"], ctx.objective["field_v_per_m"], ctx.objective["earth_ohm"])
    else:
        score = height_capacitance_score_db(figs["effective_height_m"], figs["capacitance_f"])
    score = score - PENALTY_OVER_ROOF_DB * over_roof[sel] - PENALTY_OUTSIDE_LOT_DB * outside[sel]
    out = {"index": sel, "score": score, "counts": counts}
    if details:
        out.update(geometry=g, figures=figs, margin=margin[sel], over_roof=over_roof[sel], outside=outside[sel],
                   roof_names=[roof_names[s] for s in sel], full=full[sel])
    return out


def _objective(site, warnings: list) -> dict:
    """The quantity ranked, its frequencies, fields and earth resistance, in words and numbers."""
    from aerial.estimate.assemble import report_centre_frequency

    f_c = report_centre_frequency(site)
    if site.stations:
        from aerial.models.groundwave import groundwave_field

        f = np.array([s.frequency_hz for s in site.stations])
        e = np.array([float(groundwave_field(s.power_w, s.distance_m, s.frequency_hz, s.soil.relative_permittivity,
                                             s.soil.conductivity_s_m).field) for s in site.stations])
    else:
        f = np.array([math.sqrt(lo * hi) for _, lo, hi in site.bands])
        e = None
    earth_ohm, earth_note = _earth_resistance(site, np.append(f, f_c))
    out = {"frequency_hz": f, "field_v_per_m": e, "earth_ohm": earth_ohm[:-1], "centre_hz": f_c,
           "centre_earth_ohm": float(earth_ohm[-1])}
    if e is None:
        return out | {
            "kind": "height-capacitance", "unit": "dB(m·pF)", "label": "h_e·C",
            "text": ("no stations listed: effective height times capacitance at the centre of each band, "
                     "20·log10(h_e·C / 1 m·pF) averaged over the bands (a short aerial drives a current ωC·E·h_e "
                     "into a loosely coupled tuned circuit)"),
            "meaning": "h_e·C: effective height times capacitance, in dB above 1 m·pF, averaged over the bands; "
                       "higher is better, +6 dB is twice the signal voltage in a loosely coupled tuned circuit"}
    if earth_note:
        warnings.append(earth_note)
        earth_words = "with conductor loss only (the earth resistance could not be computed)"
    else:
        at = ", ".join(f"{r:.3g} Ω at {fr / 1e3:.0f} kHz" for r, fr in zip(earth_ohm[:-1], f))
        earth_words = (f"R_total = radiation + conductor loss + the earth system's resistance at each station's "
                       f"frequency, the electrodes as lossy lines in the soil as 'aerial report' has them ({at})")
    return out | {
        "kind": "stations", "unit": "dBW", "label": "signal",
        "text": (f"signal for the listed stations: the power available at the receiver, (E·h_e)²/(4·R_total), "
                 f"{earth_words}, averaged over the stations in dB above 1 W; E from the ground-wave model at each "
                 "station's frequency"),
        "meaning": "signal: the mean over the listed stations of the power the aerial can deliver to the "
                   "receiver, in dB above 1 W (dBW); higher is better, +3 dB is twice the power"}


def _earth_resistance(site, frequency):
    """The earth system's resistance at ``frequency`` as the report has it [ohm], and a note when it cannot be had.

    The electrodes as lossy lines in the soil (:func:`aerial.estimate.assemble.earth_at_frequency`);
    zeros and a note when that fails or gives no finite figure.
    """
    from aerial.estimate.assemble import earth_at_frequency

    f = np.asarray(frequency, float)
    try:
        value = np.asarray(earth_at_frequency(site, f)["impedance_ohm"].real, float)
    except (AerialError, AttributeError, KeyError, TypeError, ValueError) as err:
        return np.zeros(len(f)), (f"the earth resistance could not be computed ({type(err).__name__}); ranked with "
                                  "conductor loss only")
    if value.shape != f.shape or not np.all(np.isfinite(value)) or np.any(value < 0):
        return np.zeros(len(f)), "the earth resistance is not a finite number; ranked with conductor loss only"
    return value, None


#: Listed layouts computed with the report's model (about 0.1 s each on a 2-core machine); any further ones
#: keep their screening figures, labelled as such.
REPORT_MODEL_LIMIT = 20
#: Layouts the screening hands to the report's model even when fewer are asked for.
SHORTLIST = 10


def plan_layouts(site, best=5, full_wave=False, draw=None, allow_large=False, progress=None) -> dict:
    """Search the site's candidate supports for the best safe wire layouts.

    Parameters
    ----------
    site : Site
        A validated site (its ``[plan]`` table is read here).
    best : int
        How many layouts to return (1 to ``MAX_BEST``).
    full_wave : bool
        Refine the winner with the full-wave solver when it is available.
    draw : callable, optional
        ``draw(site, plan, layouts, zones) -> str``: draws the plan with the best
        layouts and the fall zones (name, polygon, distance [m]) and returns where
        it went (:func:`aerial.outputs.plan_drawing.plan_picture_writer` makes one).
        The planner itself writes nothing.
    allow_large : bool
        Search beyond ``MAX_CANDIDATES``.
    progress : callable, optional
        ``progress(done, total)`` after each batch of candidates (and
        ``progress.stage(text)``, when it has one, at each stage).

    Returns
    -------
    dict
        JSON-ready: site, objective, score_unit, score_label, score_meaning,
        candidates_considered, candidates_refused (safety and geometry),
        candidates_refused_safety, excluded (by reason), refusals (by cause,
        nearest miss, blocking parts), layouts (best first, with the
        report's figures), figures_model, apartment, code_checklist,
        picture, full_wave, warnings, cautions.

    Raises
    ------
    ResourceLimit
        When the candidate count exceeds ``MAX_CANDIDATES`` without ``allow_large``.
    AerialError
        When there is nothing to search (no candidate support) or ``best`` is out of range.
    """
    with naming_the_file(site):  # a model's complaint about a wire names the file, as a site error does
        return _plan(site, best, full_wave, draw, allow_large, progress)


def _plan(site, best, full_wave, draw, allow_large, progress) -> dict:
    """:func:`plan_layouts`, its messages named by the caller."""
    from aerial.estimate.assemble import stage

    plan, total, warnings, present_refused = _prepare(site, best, allow_large)
    objective = _objective(site, warnings)
    ctx = _Context(site, plan, objective)
    stage(progress, f"screening {total:,} candidate layouts")
    top_rec, tally = _search(ctx, total, max(best, SHORTLIST), progress)
    stage(progress, "the listed layouts with the report's model")
    layouts, screening_error_db = _listed_layouts(ctx, top_rec, best, warnings)
    result = _result(site, plan, ctx, objective, total, tally, layouts, warnings, present_refused)
    if screening_error_db is not None:  # no listed layout re-computed: nothing to compare (no null figure)
        result["screening_difference_db"] = screening_error_db
    if layouts:
        _winner_extras(result, site, plan, ctx, objective, full_wave, warnings, progress, allow_large=allow_large)
    if draw is not None:
        result["picture"] = _draw(draw, site, plan, ctx, layouts)
    return result


def _prepare(site, best, allow_large):
    """Check the request and the site's own wire; returns the plan, the candidate count, the first warnings and
    whether the site's own wire breaks the power-line rule."""
    from aerial.planner.clearance import check_site_clearance
    from aerial.site.plan import site_plan

    if isinstance(best, bool) or not isinstance(best, int) or not 1 <= best <= MAX_BEST:
        raise AerialError(f"best = {best!r}: expected a whole number from 1 to {MAX_BEST}")
    plan = site_plan(site)
    warnings: list[str] = list(plan.notes)
    n = len(plan.supports)
    if n == 0:
        raise AerialError(f"{site.path}: no candidate supports: add [supports.*] or [[plan.supports]] to search")
    total = estimate_candidates(n)
    if total > MAX_CANDIDATES and not allow_large:
        secs = total / CANDIDATES_PER_SECOND
        raise ResourceLimit(
            f"{site.path}: {n} candidate supports give {total:,} candidate layouts, above the budget of "
            f"{MAX_CANDIDATES:,} (about {secs:,.0f} s at {CANDIDATES_PER_SECOND:,} per second); remove supports that "
            "cannot win (low, or far from the entry) or run again with --allow-large (allow_large=True)")
    if not plan.power_lines:
        warnings.append("No overhead power line is listed in [plan]: the planner cannot keep clear of lines it does "
                        "not know about. Look up and add every nearby line as [[plan.overhead_lines]].")
    if not plan.entry.given:
        warnings.append("No [plan.entry]: the lead-in is taken to end at the receiver's position and height.")
    own = check_site_clearance(site, plan)
    if own.refused:
        warnings.append("Your present wire breaks the power-line rule (aerial report and aerial check will refuse it): "
                        + own.summary())
    warnings += own.warnings
    return plan, total, warnings, bool(own.refused)


def _search(ctx: _Context, total: int, keep: int, progress):
    """Screen every candidate in batches; returns the ``keep`` best records (best first) and the refusal tally."""
    from aerial.planner.refusals import RefusalTally

    n = len(ctx.names)
    tally = RefusalTally(ctx.names, np.stack([ctx.x, ctx.y], axis=1), (ctx.ex, ctx.ey), ctx.plan.power_lines,
                         EXCLUSION_REASONS)
    top_score = np.empty(0)
    top_rec = np.empty((0, 4), dtype=np.int64)
    done = 0
    for fam, i, j, k in _chunks(n, CHUNK_CANDIDATES):
        ev = _evaluate(ctx, fam, i, j, k, tally=tally)
        sel = ev["index"]
        top_score = np.concatenate([top_score, ev["score"]])
        top_rec = np.concatenate([top_rec, np.stack([fam[sel], i[sel], j[sel], k[sel]], axis=1)])
        if len(top_score) > keep:
            part = np.argpartition(-top_score, keep - 1)[:keep]
            top_score, top_rec = top_score[part], top_rec[part]
        done += len(fam)
        if progress is not None:
            progress(done, total)
    return top_rec[np.argsort(-top_score, kind="stable")], tally


def _listed_layouts(ctx: _Context, top_rec, best: int, warnings: list):
    """Describe the screened shortlist, compute its first twenty with the report's model, re-order, keep ``best``.

    The shortlist is the ``max(best, SHORTLIST)`` best by the screening model, so that a layout the screening
    placed just below the ``best`` is still re-ranked by the report's model.

    Returns the layouts and the largest difference between a listed
    layout's screening score and its score by the report's model [dB].
    """
    if not len(top_rec):
        warnings.append("No safe layout was found among the candidate supports: every candidate was refused or "
                        "excluded (see the causes). Add supports further from the power lines or lower ones.")
        return [], None
    ev = _evaluate(ctx, top_rec[:, 0], top_rec[:, 1], top_rec[:, 2], top_rec[:, 3], details=True)
    layouts = _describe(ctx, top_rec, ev)[:max(best, SHORTLIST)]
    head, tail = layouts[:max(REPORT_MODEL_LIMIT, SHORTLIST)], layouts[max(REPORT_MODEL_LIMIT, SHORTLIST):best]
    validity, differences = {}, []
    for lay in head:  # each layout's wires built and resolved once for its figures, lengths and wavelength flag
        difference, validity[id(lay)] = _apply_report_model(ctx, lay)
        differences.append(difference)
    known = [d for d in differences if d is not None]
    for lay in tail:
        lay["screening"] = {k: lay[k] for k in ("effective_height_m", "capacitance_f", "score")}
        lay["figures_model"] = ("screening estimate (not computed with the report's model past the first "
                                f"{REPORT_MODEL_LIMIT}; on those the two differ by up to {max(known, default=0):.1f} dB)")
    layouts = (sorted(head, key=lambda lay: -lay["score"]) + tail)[:best]
    for rank, lay in enumerate(layouts, 1):
        lay["rank"] = rank
        _flag_wavelength(ctx, lay, validity.get(id(lay), NOT_COMPUTED))
    _explain(ctx, layouts)
    if any(lay.get("outside_model_range") for lay in layouts):
        warnings.append("Some layouts are long for the wavelength in the site's bands (past 1/8 wave or the first "
                        "resonance), as 'aerial report' warns for the same wire: their closed-form figures are rough "
                        "from the frequency given with each; they are flagged.")
    return layouts, (max(known) if known else None)


#: Said of a layout whose wavelength test is still to be made (a layout past the report model's limit).
NOT_COMPUTED = "not computed"


def _flag_wavelength(ctx: _Context, lay: dict, validity=NOT_COMPUTED) -> None:
    """A listed layout's ``outside_model_range`` and ``rough_from_hz``: the report's own test over its own sweep.

    ``rough_from_hz`` only when flagged; the screening model's flag (no frequency) stays when the closed forms
    cannot take the wires. ``validity``: the test's result when already made with the layout's figures.
    """
    from aerial.planner.figures import layout_wavelength_validity

    if validity is NOT_COMPUTED:
        validity = layout_wavelength_validity(ctx.site, lay, ctx.size, (ctx.ex, ctx.ey, ctx.eh), floor_m=ctx.floor)
    if validity is None:
        return
    lay["outside_model_range"] = validity["rough_from_hz"] is not None
    if validity["rough_from_hz"] is not None:
        lay["rough_from_hz"] = validity["rough_from_hz"]


def _apply_report_model(ctx: _Context, lay: dict):
    """Replace a layout's screening figures and score by the report's model.

    Returns (|difference| [dB] or None, the layout's wavelength test or None), its wires built and resolved once.
    """
    from aerial.planner.figures import REPORT_MODEL, listed_layout_figures

    obj = ctx.objective
    f = np.append(np.asarray(obj["frequency_hz"], float), obj["centre_hz"])
    earth = np.append(np.asarray(obj["earth_ohm"], float), obj["centre_earth_ohm"])
    done = listed_layout_figures(ctx.site, lay, ctx.size, (ctx.ex, ctx.ey, ctx.eh), f, earth, floor_m=ctx.floor)
    figs = done["figures"]
    lay["screening"] = {"effective_height_m": lay["effective_height_m"], "capacitance_f": lay["capacitance_f"],
                        "score": lay["score"]}
    if figs is None:
        lay["figures_model"] = f"screening estimate (the report's model could not take this layout: {done['why']})"
        return None, done["validity"]
    penalty = PENALTY_OVER_ROOF_DB * lay["over_roof"] + PENALTY_OUTSIDE_LOT_DB * lay["outside_lot"]
    score = float(_report_score(obj, figs) - penalty)
    difference = abs(score - lay["score"])
    lay.update(_figures_json(figs))
    lay.update({
        "score": score,
        "figures_model": REPORT_MODEL + (" (heights from the balcony slab)" if ctx.floor > 0 else ""),
        "figures_at_hz": float(obj["centre_hz"]),
        "shape": figs["shape"],
        "top_length_m": done["top_length_m"],
        "wire_length_m": done["wire_length_m"],
    })
    return difference, done["validity"]


def _result(site, plan, ctx, objective, total, tally, layouts, warnings, present_refused=False) -> dict:
    """The JSON-ready result, before the winner's extras.

    A present wire that breaks the power-line rule is not analysed (``present_wire`` None; the warnings say why),
    as ``aerial report`` refuses it.
    """
    from aerial.estimate.cautions import cautions_for
    from aerial.planner.figures import REPORT_MODEL

    refusals = tally.summary(lambda fam, i, j, k: _layout_words(ctx, fam, i, j, k)[1])
    return {
        "site": {"name": site.name, "file": site.path},
        "objective": objective["text"],
        "score_unit": objective["unit"],
        "score_label": objective["label"],
        "score_meaning": objective["meaning"],
        "ranking_frequencies_hz": [float(v) for v in objective["frequency_hz"]],
        "ranking_earth_resistance_ohm": [float(v) for v in objective["earth_ohm"]],
        "candidates_considered": int(total),
        "candidates_refused": int(tally.total),
        "candidates_refused_safety": int(tally.safety),
        "excluded": dict(tally.geometry),
        "refusals": refusals,
        "rules": {
            "fall_zone": "every wire, support and the lead-in at least max(1.5 × tallest point of the aerial or its "
                         "supports, the line's height) from any power line in plan, and no wire crossing one "
                         "(US Consumer Product Safety Commission safety alerts, from memory; aerial's own floor)",
            "buildings": ("lead-in or sloping wire over a building: excluded; span over a roof with its lower end less "
                          "than " + metres(ROOF_CLEARANCE_M)
                          + f" above the roof: excluded; higher: kept, -{PENALTY_OVER_ROOF_DB:g} dB"),
            "obstacles": "any wire crossing an obstacle or a telephone/cable line in plan: excluded",
            "lot": f"any wire outside the lot: kept, flagged, -{PENALTY_OUTSIDE_LOT_DB:g} dB",
        },
        "figures_model": (f"the figures and scores of the listed layouts are the {REPORT_MODEL}; all "
                          f"{total:,} candidates were first screened with a faster model"),
        "layouts": layouts,
        "present_wire": None if present_refused else present_wire(site, objective, ctx.floor),
        "apartment": apartment_notes(site, plan, objective["frequency_hz"]) if plan.building == "apartment" else [],
        "code_checklist": [],
        "picture": None,
        "full_wave": None,
        "warnings": warnings,
        "cautions": cautions_for(site) + [
            "The planner keeps clear only of the overhead lines listed in the site file. Look up before you put up "
            "anything, and ask the electricity supplier when a line's kind or height is in doubt.",
        ],
    }


def _winner_extras(result, site, plan, ctx, objective, full_wave, warnings, progress, allow_large=False) -> None:
    """The code checklist for the top-ranked layout, and its full-wave check when asked."""
    from aerial.estimate.assemble import stage
    from aerial.planner.codes import LayoutFacts, code_checklist

    win = result["layouts"][0]
    lead_geo = [shapely.LineString(np.array(win["lead_in_points_m"])[:, :2])] if win["lead_in_length_m"] > 0 else []
    facts = LayoutFacts(win["open_spans_m"], 2 * ctx.radius, ctx.size.material, ctx.size.described_as,
                        lead_geo, [ctx.kinds[ctx.names.index(s)] for s in win["supports"]],
                        f"the top-ranked layout ({win['description']})")
    result["code_checklist"] = code_checklist(site, plan, facts)
    if full_wave:
        stage(progress, "full-wave check of the winner")
        result["full_wave"] = _refine(site, ctx, win, objective, allow_large=allow_large)
        warnings.append("Full-wave check: " + result["full_wave"]["note"])


def _draw(draw, site, plan, ctx, layouts):
    from aerial.planner.clearance import fall_zone, fall_zone_distance

    zones = []
    tallest = layouts[0]["tallest_m"] if layouts else float(np.max(ctx.h))
    for line in plan.power_lines:
        d = float(fall_zone_distance(tallest, line.height_m))
        zones.append((line.name, fall_zone(line.path, d), d))
    return draw(site, plan, layouts[:3], zones)


def _fmt_names(names):
    return " – ".join(f'"{s}"' for s in names)


def _layout_words(ctx: _Context, fam, i, j, k):
    """The supports of a layout (in wire order) and its description in words."""
    names = ctx.names
    fam, i, j, k = int(fam), int(i), int(j), int(k)
    near, far = (i, j) if ctx.dentry[i] <= ctx.dentry[j] else (j, i)
    if fam == SPAN:
        sup = [names[far], names[near]]
        return sup, f"inverted-L: span {_fmt_names(sup)}, lead-in down from \"{names[near]}\""
    if fam == TEE:
        sup = [names[i], names[j]]
        return sup, f"T: span {_fmt_names(sup)}, lead-in from mid-span"
    if fam == DOGLEG:
        sup = [names[far], names[k], names[near]]
        return sup, f"dog-leg: {_fmt_names(sup)}, lead-in down from \"{names[near]}\""
    if fam == VEE:
        sup = [names[i], names[k], names[j]]
        return sup, f"T with unequal arms: {_fmt_names(sup)}, lead-in from \"{names[k]}\""
    return [names[i]], f"sloping wire from \"{names[i]}\" down to the entry"


def _top_points(ctx: _Context, fam, i, j, k, near, far, hj):
    """Points of the top wire (or the sloping wire) and its open spans. [m]"""
    xyz = lambda a: [ctx.x[a], ctx.y[a], ctx.h[a]]  # noqa: E731
    if fam == SPAN:
        pts = [xyz(far), xyz(near)]
    elif fam == TEE:
        pts = [xyz(i), [0.5 * (ctx.x[i] + ctx.x[j]), 0.5 * (ctx.y[i] + ctx.y[j]), hj], xyz(j)]
        return pts, [float(np.linalg.norm(np.subtract(pts[2], pts[0])))], pts[1]
    elif fam == DOGLEG:
        pts = [xyz(far), xyz(k), xyz(near)]
    elif fam == VEE:
        pts = [xyz(i), xyz(k), xyz(j)]
        spans = [float(np.linalg.norm(np.subtract(pts[1], pts[0]))), float(np.linalg.norm(np.subtract(pts[2], pts[1])))]
        return pts, spans, pts[1]
    else:
        pts = [xyz(i), [ctx.ex, ctx.ey, ctx.eh]]
    spans = [float(np.linalg.norm(np.subtract(b, a))) for a, b in zip(pts[:-1], pts[1:])]
    return pts, spans, pts[-1]


def _describe(ctx: _Context, rec, ev) -> list[dict]:
    g = ev["geometry"]
    figs = ev["figures"]
    out = []
    for row, idx in enumerate(ev["index"]):
        fam, i, j, k = (int(v) for v in rec[idx])
        near, far = int(g["near"][idx]), int(g["far"][idx])
        hj = float(g["junction_height"][idx])
        sup, desc = _layout_words(ctx, fam, i, j, k)
        top_pts, spans, jxyz = _top_points(ctx, fam, i, j, k, near, far, hj)
        margin = float(ev["margin"][row])
        he = figs["effective_height_m"][row]
        out.append({
            "rank": len(out) + 1,
            "family": FAMILIES[fam],
            "description": desc,
            "supports": sup,
            "wire_length_m": float(g["arm1"][idx] + g["arm2"][idx] + g["lead_len"][idx] + ctx.indoor_m),
            "top_length_m": float(g["arm1"][idx] + g["arm2"][idx]),
            "lead_in_length_m": float(g["lead_len"][idx]),
            "open_spans_m": spans,
            "junction_height_m": hj,
            "tallest_m": float(g["tallest"][idx]),
            "effective_height_m": float(he[0]),
            "effective_height_by_frequency_m": [float(v) for v in he],
            "capacitance_f": float(figs["capacitance_f"][row]),
            "radiation_resistance_ohm": float(figs["radiation_resistance_ohm"][row][0]),
            "conductor_loss_ohm": float(figs["loss_resistance_ohm"][row][0]),
            "score": float(ev["score"][row]),
            "clearance_margin_m": margin if math.isfinite(margin) else None,
            "closest_line": _closest_line(ctx, ev["full"][row], float(g["tallest"][idx])) if math.isfinite(margin) else None,
            "over_roof": bool(ev["over_roof"][row]),
            "roofs": list(ev["roof_names"][row]),
            "outside_lot": bool(ev["outside"][row]),
            "outside_model_range": bool(figs["out_of_range"][row]),
            "top_points_m": [[float(v) for v in p] for p in top_pts],
            "lead_in_points_m": [list(map(float, jxyz)), [ctx.ex, ctx.ey, ctx.eh]],
        })
    return out


def _closest_line(ctx: _Context, geometry, tallest: float) -> str:
    """The power line whose fall zone the layout comes closest to."""
    return min(ctx.plan.power_lines,
               key=lambda ln: float(geometry.distance(ln.path)) - float(max(1.5 * tallest, ln.height_m))).name


def _explain(ctx: _Context, layouts: list) -> None:
    """Each listed layout's ``reason``: its figures, clearance, penalties and lead over the next."""
    for n, lay in enumerate(layouts):
        lay["reason"] = layout_reason(lay, layouts[n + 1] if n + 1 < len(layouts) else None)


def layout_reason(lay: dict, runner_up: dict | None = None, length=length_text) -> str:
    """Why a listed layout ranks where it does, in one line: figures, clearance, penalties, lead over the next.

    Parameters
    ----------
    lay : dict
        A listed layout (``aerial layout --json``).
    runner_up : dict, optional
        The layout ranked next, for the lead in dB.
    length : callable
        Writes a length given in metres [m]; the terminal passes its own so
        that a reason and a table of one output write a length alike.

    Examples
    --------
    >>> layout_reason({"family": "span", "effective_height_m": 6.7226, "junction_height_m": 6.1,
    ...                "top_length_m": 30.42, "clearance_margin_m": 12.0, "closest_line": "street",
    ...                "over_roof": False, "outside_lot": False, "outside_model_range": True,
    ...                "rough_from_hz": 1.05e6, "score": -65.4}, {"score": -65.5})
    'h_e 6.72 m (junction 6.1 m high); 30.4 m top; 12 m outside the fall zone of "street"; long for the wavelength from 1.05 MHz up: figures rough there; 0.1 dB ahead of the next'
    """
    sloper = lay["family"] == FAMILIES[SLOPER]
    where = (f"top end {length(lay['top_points_m'][0][2])} high" if sloper
             else f"junction {length(lay['junction_height_m'])} high")
    reason = [f"h_e {length(lay['effective_height_m'])} ({where})",
              f"{length(lay['top_length_m'])} {'sloping wire' if sloper else 'top'}"]
    if lay["clearance_margin_m"] is not None:
        reason.append(f"{length(lay['clearance_margin_m'])} outside the fall zone of \"{lay['closest_line']}\"")
    if lay["over_roof"]:
        reason.append(f"passes over the roof of {', '.join(repr(s) for s in lay['roofs'])} "
                      f"(-{PENALTY_OVER_ROOF_DB:g} dB)")
    if lay["outside_lot"]:
        reason.append(f"part of it is outside the lot (-{PENALTY_OUTSIDE_LOT_DB:g} dB; ask the neighbour)")
    if lay["outside_model_range"]:
        reason.append(wavelength_words(lay.get("rough_from_hz")))
    if runner_up is not None:
        ahead = f"#{runner_up['rank']}" if "rank" in runner_up else "the next"
        reason.append(f"{lay['score'] - runner_up['score']:.1f} dB ahead of {ahead}")
    return "; ".join(reason)


def wavelength_words(rough_from_hz) -> str:
    """The flag of a wire long for the wavelength, with the frequency from which its figures are rough when known."""
    if rough_from_hz is None:
        return "long for the wavelength: figures rough"
    return f"long for the wavelength from {si_text(rough_from_hz, 'Hz')} up: figures rough there"


def _refine(site, ctx: _Context, win: dict, objective: dict, allow_large: bool = False) -> dict:
    """Solve the winner with the full-wave wire solver when it is present; otherwise say so.

    Beside a building the grid is solved as ``aerial report --full-wave``
    does, refused (ResourceLimit) past the time and memory budget unless
    ``allow_large``.
    """
    try:
        from aerial.models.fullwave import solve_full_wave
    except ImportError:
        return {"available": False,
                "note": "full-wave refinement is unavailable in this build (no full-wave solver installed); the "
                        "ranking uses the closed forms only"}
    from aerial.geometry.resolve import resolve
    from aerial.planner.figures import planned_site, planned_wires

    entry = (ctx.ex, ctx.ey, ctx.eh)
    wires = planned_wires(site, win, ctx.size, entry, ctx.floor)  # the wire the listed figures describe
    earth = float(objective["centre_earth_ohm"])
    planned = planned_site(site, wires, ctx.floor)
    geo = resolve(planned, electrode_ohm=earth, wires=wires)
    freqs = np.asarray(objective["frequency_hz"], dtype=float)
    closed = np.asarray(win["effective_height_by_frequency_m"])
    if geo.building is not None:
        return _refine_beside_the_building(planned, geo, freqs, earth, closed, allow_large)
    res = solve_full_wave(geo.segments, freqs)
    he = np.abs(np.asarray(res.effective_height))
    return {
        "available": True,
        "frequencies_hz": [float(v) for v in freqs],
        "effective_height_m": [float(v) for v in he],
        "closed_form_effective_height_m": [float(v) for v in closed],
        "radiation_resistance_ohm": [float(v) for v in np.asarray(res.radiation_resistance)],
        "resistance_ohm": [float(v) for v in np.asarray(res.impedance).real],
        "reactance_ohm": [float(v) for v in np.asarray(res.impedance).imag],
        "converged": bool(res.converged),
        "convergence": float(res.convergence),
        "solver_warnings": [str(w) for w in res.warnings],
        "note": (f"the top-ranked layout solved with the full-wave wire solver ({res.model}); effective height "
                 + join_text(", ", [words("{a} (closed form {b})", a=metres(a), b=metres(b))
                                    for a, b in zip(he, closed)])
                 + ("" if res.converged else "; NOT converged within the solver's tolerance")),
    }


def _refine_beside_the_building(planned, geo, freqs, earth, closed, allow_large: bool) -> dict:
    """The winner solved with the building as a grounded wire grid, as ``aerial report --full-wave`` does."""
    from aerial.estimate.fullwave_sweep import building_full_wave_response

    out = building_full_wave_response(planned, geo, freqs, earth, allow_large=allow_large)
    he = np.asarray(out["effective_height_m"], float)
    rr = np.asarray(out["radiation_resistance_ohm"], float)
    conv = out["convergence"]
    converged = bool(conv["converged"]) and conv.get("relative_change_with_building", 0.0) <= conv["tolerance"]
    return {
        "available": True,
        "frequencies_hz": [float(v) for v in freqs],
        "effective_height_m": [float(v) for v in he],
        "closed_form_effective_height_m": [float(v) for v in closed],
        "radiation_resistance_ohm": [float(v) for v in rr],
        "resistance_ohm": [float(v) for v in rr + np.asarray(out["conductor_loss_ohm"], float)
                           + np.asarray(out["ground_loss_ohm"], float)],
        "reactance_ohm": [float(v) for v in np.asarray(out["reactance_ohm"], float)],
        "converged": converged,
        "convergence": float(max(conv["relative_change"], conv.get("relative_change_with_building", 0.0))),
        "solver_warnings": [str(w) for w in out["warnings"]],
        "note": ("the top-ranked layout solved with the full-wave wire solver and the building as a grounded wire "
                 "grid (" + out["model"] + "); effective height (the middle of the worst and best bearing) "
                 + join_text(", ", [words("{a} (closed form {b})", a=metres(a), b=metres(b))
                                    for a, b in zip(he, closed)])
                 + ("" if converged else "; NOT converged within the solver's tolerance")),
    }


# --------------------------------------------------------------------------- apartment


def apartment_notes(site, plan, frequency) -> list[str]:
    """What the building does to a balcony wire, the earth options and the likely noise, in words."""
    from aerial.models.noise import man_made_noise_figure

    out = []
    b = plan.balcony
    body, described = building_of(site)
    if body is not None:
        lo, nom, hi = body.shielding
        source = "assumed, as the report says" if described.source == "supports" else "from the site's building"
        out.append(f"Structure {body.construction} ({source}): taken as a grounded conductor beside "
                   f"the wire, screening {100 * nom:.0f} % of the way from open ground to a perfect metal wall "
                   f"({100 * lo:.0f}-{100 * hi:.0f} %). Every layout here is reckoned in the field the building leaves "
                   "at its supports, the same model as 'aerial report'; a wire held further out from the facade "
                   "picks up more.")
        out += list(described.assumed if described.source == "supports" else [])
    elif b is None:
        out.append("Structure: not described ([plan.balcony] is missing), so heights are taken above the street. "
                   "In a reinforced-concrete or steel-framed building that is optimistic: the figure may be far lower.")
    elif b.conductive:
        what = "unknown, so it is treated as" if b.structure == "unknown" else f"{b.structure}:"
        out.append(f"Structure {what} a grounded conductor close to the wire. Assumption used: heights are reckoned "
                   "from the balcony's floor slab (" + metres(b.floor_height_m)
                   + " above the street), not from the street, so a rail wire 1 m above the slab is modelled about "
                   "1 m high. This is an assumption; the real figure depends on the reinforcement and the wire's "
                   "distance from the façade and may be far lower than a free wire at the same height.")
    else:
        out.append(f"Structure {b.structure}: not treated as a conductor; heights are taken above the street "
                   "(balcony floor " + metres(b.floor_height_m)
                   + " up). Wiring, pipes and metal lintels in the walls still shield the wire: treat the figures "
                   "as optimistic.")
    out.append("Earth options: a metal cold-water pipe, only if no plastic section (repair, meter, filter, riser) "
               "interrupts it on the way to the ground; the building's protective earth, only at its earthing terminal "
               "and only through a licensed electrician; a counterpoise wire along the balcony if neither is possible. "
               "Never gas piping.")
    f = float(np.min(frequency)) if len(frequency) else 1e6
    cat = site.noise if site.noise in ("city", "residential") else "residential"
    fam = man_made_noise_figure(f, cat)
    city = man_made_noise_figure(f, "city")
    flag = " (below the 0.3 MHz range of the curve: extended)" if bool(fam.below_range) else ""
    out.append(f"Man-made noise: expect the \"city\" or \"residential\" category of ITU-R P.372 (median Fam "
               f"{float(city.noise_figure_db):.1f} dB and {float(man_made_noise_figure(f, 'residential').noise_figure_db):.1f} dB "
               f"above kT0b at {f / 1e3:.0f} kHz{flag}); the site file says \"{site.noise}\". Switch-mode supplies and "
               "lighting in the flats nearby can be much louder.")
    return out
