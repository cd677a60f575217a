"""The receiving network solved as a small linear circuit at each frequency.

Everything from the aerial to the detector is one linear network, solved by modified nodal
analysis (node voltages plus the current in every winding) with numpy at each frequency, many
frequencies (and part values) at once as a batch of small complex systems. Each system is first
reduced exactly: the voltage of every node a winding reaches is the sum of its sections' voltages,
so those voltages leave the system with pivots of ±1 (the inductance matrix is never inverted),
which leaves one to three unknowns, eliminated entry by entry over the whole batch (:func:`_assemble`,
:func:`_eliminate`):

* the aerial: its EMF V (open-circuit voltage E·h_e) behind its impedance Za(f) = Ra + jXa,
  radiation and every loss included, entered as a Norton source V/Za in parallel with 1/Za at
  the node the aerial joins;
* the coupling: ``"direct"`` (the aerial joins the tank top), ``"series capacitor"`` (the aerial
  node joins the top through Cc), ``"coil tap"`` (the aerial joins a tap on the tank coil) or
  ``"separate primary"`` (the aerial feeds a primary winding Lp, loss Rp, to earth, coupled to
  the tank coil by k; a capacitor across the primary tunes it: a double-tuned pair);
* the tank coil: one winding cut at its taps into sections. The section inductances and the
  mutual inductances between sections come from the inductance F(x) of a contiguous block of a
  fraction x of the turns: for blocks [p, q] and [r, s] (q ≤ r)
  M = [F(s − p) − F(r − p) − F(s − q) + F(r − q)]/2, and a section's own inductance is
  F(q − p). For a single-layer winding F comes from the solenoid formula (Nagaoka), which
  gives the sections' real, less than tight, coupling; without a winding F(x) = x²L (tight
  coupling, an ideal autotransformer). The loss resistance is shared by turns; the coil's
  self-capacitance sits across the whole winding;
* the tuning capacitor across the whole coil;
* the detector as its small-signal RF input conductance G_d at its tap (the caller picks the
  value for the signal level: nVT/Is for a weak signal, R_L/2 for a strong one, or the
  self-consistent value for a given station).

The reduced systems are solved with numpy's elementwise arithmetic, not LAPACK: one call of the
solver per small system cost far more than the few operations over the whole stack.

Results per volt of aerial EMF: the voltage at the tank top and at the detector, and the
driving-point impedances at the top and at the detector with the aerial's EMF shorted. The
tuning capacitance for resonance at f makes the admittance seen at the top, capacitor excluded,
purely real: C = −Im(1/Z_top)/ω, which maximises the top voltage for a given EMF.

References
----------
.. [1] F. E. Terman, Radio Engineers' Handbook, McGraw-Hill, 1943, section 3: resonant circuits,
   coupled circuits (critical coupling k_c = 1/√(Q1Q2), flat-topped response), tapped
   circuits (from memory).
.. [2] C.-W. Ho, A. E. Ruehli, P. A. Brennan, "The modified nodal approach to network
   analysis", IEEE Trans. Circuits and Systems 22(6), 1975 (from memory).
"""

from __future__ import annotations

import functools
import math
from typing import Callable

import numpy as np

from aerial.core.arrays import bisection_midpoints, pin_crossing
from aerial.core.errors import ModelInputError
from aerial.core.records import NamedTuple

ARRANGEMENTS = ("direct", "series capacitor", "coil tap", "separate primary")

#: Relative tolerance and iteration limit of the −3 dB edge search (bisection in frequency).
EDGE_RTOL = 1e-9
EDGE_MAX_ITER = 60
#: Halvings of the edge search looked ahead per call of the response (2**EDGE_LOOKAHEAD − 1 midpoints per edge),
#: fewer when the trial points of all edges together would pass EDGE_LOOKAHEAD_POINTS.
EDGE_LOOKAHEAD = 4
EDGE_LOOKAHEAD_POINTS = 256
#: For many edges at once (one trial point per edge and call): halvings taken by evaluating the response
#: before each crossing is pinned down (by then every bracket is 3**(1/32), about 3.5 %, wide).
EDGE_OPENING_HALVINGS = 5


def block_inductance_tight(inductance: float) -> Callable:
    """F(x) = x²L: a block of a fraction x of the turns of a tightly coupled winding. [H]

    Examples
    --------
    >>> round(float(block_inductance_tight(200e-6)(0.5)) * 1e6, 1)
    50.0
    """
    L = float(inductance)
    return lambda x: L * np.asarray(x, dtype=float) ** 2


def section_inductances(taps, block) -> np.ndarray:
    """Self and mutual inductances of the sections of a tapped winding.

    Parameters
    ----------
    taps : sequence of float
        Tap positions as fractions of the turns from the earthy end, increasing, the last 1. [1]
    block : callable
        F(x): inductance of a contiguous block of a fraction x of the turns; F(0) = 0. [H]

    Returns
    -------
    ndarray, shape (K, K)
        Section k runs from taps[k−1] (0 for the first) to taps[k]. [H]

    Notes
    -----
    For blocks A = [p, q] and B = [r, s] with a gap G = [q, r] between them,
    F(s − p) = L_A + L_G + L_B + 2M_AG + 2M_AB + 2M_GB, from which
    M_AB = [F(s − p) − F(r − p) − F(s − q) + F(r − q)]/2. The sum of every entry is F(1).

    Examples
    --------
    >>> m = section_inductances([0.25, 1.0], block_inductance_tight(160e-6))
    >>> [round(float(v) * 1e6, 1) for v in m.ravel()]  # tight: M = √(L1 L2)
    [10.0, 30.0, 30.0, 90.0]
    """
    t = np.asarray(taps, dtype=float)
    if t.ndim != 1 or t.size < 1 or abs(t[-1] - 1.0) > 1e-12 or np.any(np.diff(np.concatenate([[0.0], t])) <= 0):
        raise ModelInputError("taps must increase from above 0 to exactly 1")
    edges = [0.0] + t.tolist()
    k = t.size
    out = np.empty((k, k))
    seen: dict = {}

    def block_of(x):  # each block's inductance worked out once (blocks of one length recur between the pairs)
        if x not in seen:
            seen[x] = float(block(x))
        return seen[x]

    for a in range(k):
        out[a, a] = block_of(edges[a + 1] - edges[a])
        for b in range(a + 1, k):  # M_ab = M_ba
            p, q, r, s = edges[a], edges[a + 1], edges[b], edges[b + 1]
            gap = block_of(r - q) if r > q else 0.0
            out[a, b] = out[b, a] = 0.5 * (block_of(s - p) - block_of(r - p) - block_of(s - q) + gap)
    return out


class NetworkParts(NamedTuple):
    """The network's parts (everything but the frequency, the aerial and the tuning capacitor).

    ``coil_resistance`` may be a callable of frequency; every capacitance in farads, inductance
    in henries, resistance in ohms, fraction of turns from the earthy end.
    """

    arrangement: str
    coil_inductance: float  #: [H]
    coil_resistance: object  #: series loss of the whole coil, callable f -> [ohm] or a number
    detector_tap: float = 1.0  #: [1]
    aerial_tap: float | None = None  #: "coil tap" [1]
    series_capacitance: float | None = None  #: "series capacitor" [F]
    primary_inductance: float | None = None  #: "separate primary" [H]
    coupling_coefficient: float | None = None  #: "separate primary" [1]
    primary_resistance: object = 0.0  #: callable f -> [ohm] or a number
    primary_capacitance: float | None = None  #: tunes the primary (double-tuned) [F]
    self_capacitance: float = 0.0  #: across the whole coil [F]
    block: Callable | None = None  #: F(x) [H]; default tight coupling


class NetworkSolution(NamedTuple):
    top_voltage: np.ndarray  #: tank-top voltage per volt of aerial EMF [1]
    detector_voltage: np.ndarray  #: detector-tap voltage per volt of aerial EMF [1]
    top_impedance: np.ndarray  #: driving-point impedance at the top, EMF shorted [ohm]
    detector_impedance: np.ndarray  #: driving-point impedance at the detector tap, EMF shorted [ohm]
    primary_voltage: np.ndarray  #: voltage at the aerial's node per volt of EMF [1]
    detector_per_top_current: np.ndarray | None = None  #: detector-tap voltage per ampere into the top, EMF shorted [ohm]
    top_per_detector_current: np.ndarray | None = None  #: top voltage per ampere into the detector tap, EMF shorted [ohm]


def _value(v, f):
    return v(f) if callable(v) else np.asarray(v, dtype=float)


def _positive(value) -> bool:
    """Whether every value is positive and finite (a plain number, or an array of them)."""
    if isinstance(value, float) or np.ndim(value) == 0:
        v = float(value)
        return v > 0 and math.isfinite(v)
    a = np.asarray(value, dtype=float)
    return bool(((a > 0) & (a < math.inf)).all())  # NaN fails both comparisons


def check_parts(parts: NetworkParts) -> NetworkParts:
    """Raise when the parts do not make a network; return them otherwise.

    Examples
    --------
    >>> check_parts(NetworkParts("coil tap", 200e-6, 5.0, aerial_tap=0.3)).aerial_tap
    0.3
    """
    if parts.arrangement not in ARRANGEMENTS:
        valid = ", ".join(f"'{a}'" for a in ARRANGEMENTS)
        raise ModelInputError(f"'{parts.arrangement}' is not a valid coupling arrangement, must be one of {valid}")
    if not _positive(parts.coil_inductance):
        raise ModelInputError("coil_inductance must be positive")
    if not (0 < parts.detector_tap <= 1):
        raise ModelInputError(f"detector_tap must lie in (0, 1], got {parts.detector_tap!r}")
    need = _NEEDS.get(parts.arrangement, ())
    for name in need:
        v = getattr(parts, name)
        if v is None or not _positive(v):
            raise ModelInputError(f"the '{parts.arrangement}' arrangement needs a positive {name}")
    if parts.arrangement == "coil tap" and (parts.aerial_tap > 1 if np.ndim(parts.aerial_tap) == 0 else
                                            bool((np.asarray(parts.aerial_tap) > 1).any())):
        raise ModelInputError(f"aerial_tap must not exceed 1, got {parts.aerial_tap!r}")
    if parts.arrangement == "separate primary" and np.any(np.asarray(parts.coupling_coefficient) >= 1):
        raise ModelInputError(f"coupling_coefficient must be below 1, got {parts.coupling_coefficient!r}")
    return parts


#: The part each arrangement cannot do without.
_NEEDS = {"series capacitor": ("series_capacitance",), "coil tap": ("aerial_tap",),
          "separate primary": ("primary_inductance", "coupling_coefficient")}


def _taps(parts: NetworkParts):
    taps = {1.0, float(parts.detector_tap)}
    if parts.arrangement == "coil tap":
        taps.add(float(parts.aerial_tap))
    taps = sorted(taps)
    return taps, {t: i for i, t in enumerate(taps)}


_SECTION_CACHE: dict = {}


def _sections(taps, block, inductance):
    """Section inductances, remembered per (taps, winding) so that sweeps do not redo them."""
    key = (taps, id(block) if block is not None else None, inductance)
    hit = _SECTION_CACHE.get(key)
    if hit is not None and hit[0] is block:
        return hit[1]
    if len(_SECTION_CACHE) > 512:
        _SECTION_CACHE.clear()
    m = section_inductances(list(taps), block or block_inductance_tight(inductance))
    _SECTION_CACHE[key] = (block, m)
    return m


def solve_network(frequency, aerial_impedance, parts: NetworkParts, tuning_capacitance=0.0,
                  detector_conductance=0.0, emf=1.0) -> NetworkSolution:
    """Node voltages and driving-point impedances of the receiving network.

    Parameters
    ----------
    frequency : array_like
        [Hz]
    aerial_impedance : array_like of complex
        Za = Ra + jXa at each frequency (broadcast with ``frequency``). [ohm]
    parts : NetworkParts
        Coupling, coil, taps, detector tap.
    tuning_capacitance : array_like
        The tuning capacitor across the whole coil (broadcast with ``frequency``). [F]
    detector_conductance : array_like
        The detector's RF input conductance at its tap. [S]
    emf : array_like of complex
        Aerial EMF. [V]

    Returns
    -------
    NetworkSolution
        Voltages per ``emf`` (so in volts for a real EMF), impedances in ohms; arrays of the
        broadcast shape of the inputs.

    Notes
    -----
    Modified nodal analysis [2]_: one equation per node (Kirchhoff's current law) and one per
    winding section, V_hi − V_lo = Σ_j (R_k δ_kj + jωM_kj) I_j. Tight coupling (a singular
    inductance matrix) is allowed: the windings' currents are unknowns.

    References
    ----------
    Ho, Ruehli and Brennan, the modified nodal approach, 1975 (module reference [2]; from memory).

    Examples
    --------
    200 µH of Q 100 at 1 MHz with 126.65 pF, fed from a 1 MΩ source: the impedance at the top
    is about the tank's resonant resistance Q·ωL ≈ 125.7 kΩ in parallel with 1 MΩ.

    >>> w = 2e6 * np.pi
    >>> p = NetworkParts("direct", 200e-6, w * 200e-6 / 100)
    >>> s = solve_network(1e6, 1e6 + 0j, p, 1 / (w * w * 200e-6))
    >>> round(float(abs(s.top_impedance)) / 1e3, 1)
    111.6
    """
    system, shape, (top, det, aer) = _nodal_system(frequency, aerial_impedance, parts, tuning_capacitance,
                                                   detector_conductance, emf, ("emf", "top", "detector"))
    x = _eliminate(system.matrix, system.rhs)
    return NetworkSolution(*_voltages(system, x, ((top, 0), (det, 0), (top, 1), (det, 2), (aer, 0), (det, 1),
                                                 (top, 2)), shape))


def detector_response(frequency, aerial_impedance, parts: NetworkParts, tuning_capacitance=0.0,
                      detector_conductance=0.0, emf=1.0) -> np.ndarray:
    """The detector-tap voltage alone: what ``solve_network(...).detector_voltage`` gives, with one right-hand side.

    Parameters and units as :func:`solve_network`. [1] per volt of ``emf``

    Notes
    -----
    The same nodal system, solved for the aerial's EMF only (no driving-point impedances): the
    searches that only follow the detector voltage (a bandwidth, a rejection) do a third of the
    substitutions.

    Examples
    --------
    >>> p = NetworkParts("coil tap", 240e-6, 8.0, detector_tap=0.5, aerial_tap=0.2)
    >>> f, za = np.array([8e5, 1e6]), np.array([30 - 900j, 30 - 700j])
    >>> bool(np.allclose(detector_response(f, za, p, 90e-12, 2e-4), solve_network(f, za, p, 90e-12, 2e-4).detector_voltage,
    ...                  rtol=1e-12))
    True
    """
    system, shape, (_, det, _) = _nodal_system(frequency, aerial_impedance, parts, tuning_capacitance,
                                               detector_conductance, emf, ("emf",))
    return _voltages(system, _eliminate(system.matrix, system.rhs), ((det, 0),), shape)[0]


def _nodal_system(frequency, aerial_impedance, parts: NetworkParts, tuning_capacitance, detector_conductance, emf,
                  columns):
    """The nodal system of :func:`solve_network` (:func:`_assemble`), the systems' shape, and the top, detector
    and aerial nodes.

    ``columns`` names the right-hand sides, in order: "emf" (the aerial's EMF), "top" and "detector"
    (a unit current into the top, into the detector tap, the EMF shorted)."""
    check_parts(parts)
    f_own = np.asarray(frequency, dtype=float)
    if not ((f_own > 0) & (f_own < math.inf)).all():
        raise ModelInputError("frequency must be positive and finite")
    za = np.asarray(aerial_impedance, dtype=complex)
    # the coil's inductance, a series capacitance or a coupling coefficient may be arrays too (a search
    # over part values in one solve)
    shape = _broadcast_shapes(f_own.shape, za.shape, *(_shape(v) for v in (
        tuning_capacitance, detector_conductance, emf, parts.coil_inductance, parts.series_capacitance,
        parts.coupling_coefficient) if v is not None))
    # the loss callables see every system's frequency (as they always have); the arithmetic of the
    # assembly broadcasts the frequencies as it goes (the same figures, fewer operations)
    f = f_own if f_own.shape == shape else np.broadcast_to(f_own, shape)
    per_coil = parts.arrangement == "coil tap" and np.ndim(parts.aerial_tap) > 0
    first = float(np.ravel(parts.aerial_tap)[0]) if per_coil else parts.aerial_tap
    taps, node = _taps(parts._replace(aerial_tap=first) if per_coil else parts)
    if per_coil:  # each coil its own aerial tap: each its own sections and shares of the turns
        fractions, unit = _per_coil_taps(parts, node[first], node[float(parts.detector_tap)], len(taps))
        msec = unit * np.asarray(parts.coil_inductance, dtype=float)[..., np.newaxis, np.newaxis]
    else:
        fractions = np.array([b - a for a, b in zip([0.0] + taps[:-1], taps)])
        if np.ndim(parts.coil_inductance) == 0:
            msec = _sections(tuple(taps), parts.block, float(parts.coil_inductance))
        else:  # coils of several inductances wound alike: the winding's sections scaled to each
            msec = _unit_sections(taps, parts.block) * np.asarray(parts.coil_inductance, dtype=float)[
                ..., np.newaxis, np.newaxis]
    k = len(taps)
    primary = None
    if parts.arrangement == "separate primary":
        lp = float(parts.primary_inductance)
        share = msec.sum(axis=1) / msec.sum() if msec.ndim == 2 else msec.sum(axis=-1) / msec.sum(axis=(-2, -1))[..., None]
        primary = _Primary(lp, parts.coupling_coefficient * np.sqrt(lp * parts.coil_inductance), share,
                           np.broadcast_to(_value(parts.primary_resistance, f), shape), parts.primary_capacitance)
    aer = {"direct": k - 1, "coil tap": node.get(float(first or 1.0)),
           "series capacitor": k, "separate primary": k}[parts.arrangement]
    r_coil = _value(parts.coil_resistance, f)
    lay = _Layout(parts.arrangement, node[float(parts.detector_tap)], aer, fractions, msec, parts.self_capacitance,
                  parts.series_capacitance, r_coil if np.shape(r_coil) == shape else np.broadcast_to(r_coil, shape),
                  primary)
    system = _assemble(shape, f_own, aerial_impedance, emf, tuning_capacitance, detector_conductance, columns, lay)
    return system, shape, (k - 1, lay.detector_node, aer)


def _unit_sections(taps, block) -> np.ndarray:
    """The sections' inductances of a winding with ``taps`` (a tuple) of 1 H in all. [H]"""
    unit = _sections(tuple(taps), block, 1.0)
    return unit / float(block(1.0)) if block is not None else unit


def _per_coil_taps(parts: NetworkParts, aerial_node: int, detector_node: int, k: int) -> tuple:
    """Shares of the turns (..., k) [1] and sections of 1 H (..., k, k) [H] of coils each with its own aerial tap
    (``parts.aerial_tap``, an array of the coils' shape), each what a solve of that coil alone takes; every tap
    must give the layout of the first (k taps, the aerial at node ``aerial_node``, the detector at
    ``detector_node``), else ModelInputError."""
    # the distinct taps in order and each coil's among them (numpy.unique's answer, without its sorting machinery
    # for the few values of a search)
    listed = np.asarray(parts.aerial_tap, dtype=float).ravel().tolist()
    values = sorted(set(listed))
    position = {t: i for i, t in enumerate(values)}
    which = np.array([position[t] for t in listed], dtype=np.intp)
    key = (tuple(values), float(parts.detector_tap), id(parts.block), aerial_node, detector_node, k)
    hit = _TAP_LAYOUT_CACHE.get(key)
    if hit is None or hit[0] is not parts.block:
        if len(_TAP_LAYOUT_CACHE) > 512:
            _TAP_LAYOUT_CACHE.clear()
        hit = _TAP_LAYOUT_CACHE[key] = (parts.block, *_tap_layouts(parts, values, aerial_node, detector_node, k))
    shape = np.shape(parts.aerial_tap)
    return hit[1][which].reshape(shape + (k,)), hit[2][which].reshape(shape + (k, k))


_TAP_LAYOUT_CACHE: dict = {}


def _tap_layouts(parts: NetworkParts, values, aerial_node: int, detector_node: int, k: int) -> tuple:
    """Shares of the turns (U, k) [1] and sections of 1 H (U, k, k) [H] of the winding with its aerial tap at
    each of ``values`` (U distinct taps), remembered by :func:`_per_coil_taps` per taps and winding as
    :func:`_sections` remembers its own (a search asks for the same few taps at every step)."""
    fractions, units = [], []
    for t in values:
        own, at = _taps(parts._replace(aerial_tap=float(t)))
        if len(own) != k or at[float(t)] != aerial_node or at[float(parts.detector_tap)] != detector_node:
            raise ModelInputError("aerial taps solved together must give the winding one layout")
        fractions.append([b - a for a, b in zip([0.0] + own[:-1], own)])
        units.append(_unit_sections(own, parts.block))
    return np.array(fractions), np.array(units)


def _broadcast_shapes(*shapes) -> tuple:
    """``numpy.broadcast_shapes``, with the usual case (every shape () or one and the same) answered without it."""
    out = ()
    for s in shapes:
        if s and s != out:
            if out:
                return np.broadcast_shapes(*shapes)
            out = s
    return out


def _shape(v) -> tuple:
    """``numpy.shape`` of a value, a plain number's without a trip through numpy."""
    return () if isinstance(v, (float, int)) else np.shape(v)


class _Primary(NamedTuple):
    """A separate primary's values in a nodal system (arrays broadcast against the systems' shape)."""

    inductance: object  #: [H]
    mutual_inductance: object  #: to the whole tank coil [H]
    share: object  #: (..., k): each tank section's share of the mutual inductance [1]
    resistance: np.ndarray  #: [ohm], the systems' shape
    capacitance: object  #: across the primary [F], or None


class _Layout(NamedTuple):
    """What a nodal system is built from, for one network or a group of networks of one shape: plain
    numbers, or arrays broadcast against the systems' shape (a node index per system included)."""

    arrangement: str
    detector_node: object
    aerial_node: object
    fractions: np.ndarray  #: (..., k): each winding section's share of the turns [1]
    sections: np.ndarray  #: (..., k, k): the sections' self and mutual inductances [H]
    self_capacitance: object  #: [F]
    series_capacitance: object  #: [F] or None
    coil_resistance: np.ndarray  #: [ohm], the systems' shape
    primary: _Primary | None


class _Reduced(NamedTuple):
    """A network's nodal system with the voltages of the inductive branches' nodes eliminated (see
    :func:`_assemble`): n × n entries and n × m right-hand sides (arrays or numbers broadcast against the
    systems' shape), and per node its voltage's terms: (unknown, coefficient, None for 1)."""

    matrix: list
    rhs: list
    volts: list


def _assemble(shape, f, aerial_impedance, emf, tuning_capacitance, detector_conductance, columns,
              lay: _Layout) -> _Reduced:
    """The nodal systems (``shape`` of them) of networks laid out as ``lay``, reduced to one to three unknowns
    (``f``, the frequencies [Hz], and every other input broadcast against ``shape`` as the arithmetic goes).

    Nodes: the winding's taps from the earthy end (the last one the top), then the aerial's own node for a
    series capacitor or a separate primary. The modified nodal system [2]_ has, besides the node voltages,
    one unknown per inductive branch (each winding section, and the primary from the aerial's node to
    earth): its current, with the branch equation V_hi − V_lo = Σ_j Z_ij I_j, Z = R + jωM. Every node an
    inductive branch reaches has its voltage given by the currents: a tap's is the sum of the section
    voltages below it, the primary's node's the primary's voltage (V = W I, W = T Z, T the cumulative sum
    over the sections). So those voltages are eliminated exactly — the pivots are the incidence's ±1, the
    inductance matrix is never inverted, so a tight (singular) coupling between sections is as welcome as
    in the full system — and Kirchhoff's current law at the nodes, summed from the top down to each
    section (Tᵀ), leaves (1 + Tᵀ Y W) I + Tᵀ Y_F V_F = Tᵀ b, Y the nodes' own admittances (diagonal but
    for a series capacitor, whose aerial node V_F stays an unknown). Unknowns: each branch's current,
    then V_F; at most three."""
    w = 2.0 * np.pi * f
    jw = 1j * w
    za = np.asarray(aerial_impedance, dtype=complex)
    y_aer = 1.0 / za
    k = lay.fractions.shape[-1]
    top, det, aer = k - 1, lay.detector_node, lay.aerial_node
    series = lay.arrangement == "series capacitor"
    pr = lay.primary
    nb = k + int(pr is not None)  # inductive branches
    n = nb + int(series)
    # the branches' impedance matrix Z
    z = [[jw * lay.sections[..., s, t] for t in range(k)] for s in range(k)]
    for s in range(k):
        z[s][s] = z[s][s] + lay.coil_resistance * lay.fractions[..., s]
    if pr is not None:
        zps = [jw * pr.mutual_inductance * pr.share[..., s] for s in range(k)]
        for s in range(k):
            z[s].append(zps[s])
        z.append(zps + [pr.resistance + jw * pr.inductance])
    # W: each inductive node's voltage per branch current (taps: the cumulative sum of the sections' rows)
    wv = [z[0]]
    for s in range(1, k):
        wv.append([a + b for a, b in zip(wv[-1], z[s])])
    if pr is not None:
        wv.append(z[k])
    # the nodes' own admittances, and the right-hand sides' injections
    c_top = np.asarray(tuning_capacitance, dtype=float) + lay.self_capacitance
    if series:
        y_cc = jw * lay.series_capacitance
    y = [0.0] * nb
    y[top] = jw * (c_top + lay.series_capacitance) if series else jw * c_top
    g = np.asarray(detector_conductance, dtype=float)
    for node in range(k):
        if not (g.ndim == 0 and g == 0.0):
            y[node] = y[node] + _at(det, node, g)
    if pr is not None:
        y[k] = y_aer if pr.capacitance is None else y_aer + jw * pr.capacitance
    elif not series:
        for node in range(k):
            y[node] = y[node] + _at(aer, node, y_aer)
    inject = {"top": (top, 1.0), "detector": (det, 1.0)}
    if "emf" in columns:
        inject["emf"] = (aer, np.asarray(emf, dtype=complex) * y_aer)
    rhs_nodes = [[_at(inject[c][0], node, inject[c][1]) for c in columns] for node in range(nb + int(series))]
    # rows: Kirchhoff's current law summed over the nodes from the top down to each section (Tᵀ)
    matrix, rhs = [None] * n, [None] * n
    acc, acc_b = None, None
    for r in range(k - 1, -1, -1):
        if not _is_zero(y[r]):  # a node with nothing of its own (a tap with no detector on it) adds nothing
            terms = [y[r] * wc for wc in wv[r]]
            acc = terms if acc is None else [a + t for a, t in zip(acc, terms)]
        elif acc is None:
            acc = [0.0] * nb
        acc_b = rhs_nodes[r] if acc_b is None else [a + t for a, t in zip(acc_b, rhs_nodes[r])]
        matrix[r], rhs[r] = list(acc), list(acc_b)
    if pr is not None:
        matrix[k], rhs[k] = [y[k] * wc for wc in wv[k]], list(rhs_nodes[k])
    for r in range(nb):
        matrix[r][r] = matrix[r][r] + 1.0
    volts = [list(enumerate(row)) for row in wv]
    if series:
        for r in range(k):
            matrix[r].append(-y_cc)
        matrix[k] = [-y_cc * wc for wc in wv[top]] + [y_aer + y_cc]
        rhs[k] = list(rhs_nodes[k])
        volts.append([(k, None)])
    return _Reduced(matrix, rhs, volts)


def _is_zero(v) -> bool:
    return isinstance(v, float) and v == 0.0


def _at(node, i, value):
    """``value`` where ``node`` (a node number, or an array of them) is node ``i``; 0 elsewhere."""
    if not isinstance(node, np.ndarray):
        return value if node == i else 0.0
    return np.where(node == i, value, 0.0)


def _eliminate(a, b) -> list:
    """Solve the systems a x = b entry by entry over a stack: Gaussian elimination with partial pivoting
    (the larger |Re| + |Im| of each column's candidates, as LAPACK's pivot search [4]_), written out for
    the few unknowns of :func:`_assemble`. ``a``: n × n entries, ``b``: n × m; each an array or a number,
    broadcast together. Returns x, n × m.

    Row exchanges are made only where a system needs one (none, or every system alike, costs nothing);
    each pivot is inverted once.

    References
    ----------
    .. [4] G. H. Golub, C. F. Van Loan, Matrix Computations, 3rd ed., Johns Hopkins, 1996, section 3.4
       (Gaussian elimination with partial pivoting).
    """
    n = len(a)
    if n == 2:
        return _cramer(a, b)
    a, b = [list(row) for row in a], [list(row) for row in b]
    inverse = [None] * n
    for j in range(n):
        for i in range(j + 1, n):
            if _is_zero(a[i][j]):
                continue
            swap = _size(a[i][j]) > _size(a[j][j])
            if swap.all():
                a[i], a[j], b[i], b[j] = a[j], a[i], b[j], b[i]
            elif swap.any():
                for rows in (a, b):
                    hi, lo = rows[j], rows[i]
                    rows[j] = [np.where(swap, v, u) for u, v in zip(hi, lo)]
                    rows[i] = [np.where(swap, u, v) for u, v in zip(hi, lo)]
        inverse[j] = _pivot_inverse(a[j][j])
        for i in range(j + 1, n):
            if _is_zero(a[i][j]):
                continue
            lead = a[i][j] * inverse[j]
            a[i][j + 1:] = [u - lead * v for u, v in zip(a[i][j + 1:], a[j][j + 1:])]
            b[i] = [u - lead * v for u, v in zip(b[i], b[j])]
    x = [None] * n
    for i in range(n - 1, -1, -1):
        row = b[i]
        for c in range(i + 1, n):
            row = [u - a[i][c] * v for u, v in zip(row, x[c])]
        x[i] = [u * inverse[i] for u in row]
    return x


def _cramer(a, b) -> list:
    """Two unknowns by Cramer's rule, forward stable for a 2 × 2 system [5]_ (as accurate as elimination
    with pivoting, in a third of the operations); arguments and result as :func:`_eliminate`.

    References
    ----------
    .. [5] N. J. Higham, Accuracy and Stability of Numerical Algorithms, 2nd ed., SIAM, 2002,
       section 1.10.1 (from memory).
    """
    (a00, a01), (a10, a11) = a
    inverse = _pivot_inverse(a00 * a11 - a01 * a10)

    def combine(p, u, q, v):  # (p·u − q·v)/det, a right-hand side's zeros skipped
        if _is_zero(v):
            return (p * u) * inverse if not _is_zero(u) else 0.0 * inverse
        if _is_zero(u):
            return (-(q * v)) * inverse
        return (p * u - q * v) * inverse

    return [[combine(a11, u, a01, v) for u, v in zip(*b)], [combine(a00, v, a10, u) for u, v in zip(*b)]]


def _pivot_inverse(v):
    """1 / ``v`` for a pivot (or a 2 × 2 determinant); ``numpy.linalg.LinAlgError`` where one is exactly zero, as
    LAPACK's solve raises for an exactly singular system (rather than an infinity and a warning)."""
    if not (v.all() if isinstance(v, np.ndarray) else np.all(v)):
        raise np.linalg.LinAlgError("singular receiving-network system")
    return 1.0 / v


def _size(v):
    """|Re| + |Im| (LAPACK's measure of a complex pivot)."""
    v = np.asarray(v)
    return np.abs(v.real) + np.abs(v.imag)


def _voltages(system: _Reduced, x, wanted, shape) -> list:
    """Voltages from the solution ``x`` of :func:`_eliminate`: for each (node, right-hand side) of ``wanted``
    (the node a number, or an array of them over the stack), an array of ``shape``; each node's voltage
    worked out once per right-hand side."""
    seen: dict = {}

    def at(i, column):
        if (i, column) not in seen:
            v = None
            for c, coef in system.volts[i]:
                term = x[c][column] if coef is None else coef * x[c][column]
                v = term if v is None else v + term
            seen[i, column] = v
        return seen[i, column]

    out = []
    for node, column in wanted:
        if isinstance(node, int) or np.ndim(node) == 0:
            v = at(int(node), column)
        else:
            v = np.choose(node, [at(i, column) for i in range(len(system.volts))])
        if not (isinstance(v, np.ndarray) and v.shape == shape and v.dtype == complex and v.base is None
                and not any(v is o for o in out)):
            v = np.array(np.broadcast_to(v, shape), dtype=complex)
        out.append(v)
    return out


class StackGroup(NamedTuple):
    """Networks of one system shape within a stack, with the values their assembly needs."""

    index: np.ndarray  #: their rows in the stack
    parts: tuple  #: their NetworkParts
    detector_node: np.ndarray  #: (G, 1)
    aerial_node: np.ndarray  #: (G, 1): the coil tap's node (unused by the other arrangements)
    fractions: np.ndarray  #: (G, k): each winding section's share of the turns [1]
    sections: np.ndarray  #: (G, k, k): the sections' self and mutual inductances [H]


class NetworkStack(NamedTuple):
    """P networks prepared for :func:`solve_network_stack`, grouped by the shape of their systems."""

    size: int
    groups: tuple

    def repeated(self, times: int) -> "NetworkStack":
        """The same networks ``times`` over, one run after the other (P·times rows)."""
        return NetworkStack(self.size * times, tuple(
            StackGroup(np.concatenate([g.index + t * self.size for t in range(times)]), g.parts * times,
                       *(np.concatenate([v] * times) for v in (g.detector_node, g.aerial_node, g.fractions,
                                                              g.sections)))
            for g in self.groups))


def plan_network_stack(parts_stack) -> NetworkStack:
    """Check P networks and group them by the shape of their systems for :func:`solve_network_stack`
    (worth keeping when the same networks are solved several times).

    Examples
    --------
    >>> ps = [NetworkParts("coil tap", 240e-6, 8.0, detector_tap=m, aerial_tap=0.2) for m in (0.2, 0.5, 1.0)]
    >>> [len(g.parts) for g in plan_network_stack(ps).groups]  # two sections, then three
    [2, 1]
    """
    keyed: dict = {}
    for i, p in enumerate(parts_stack):
        check_parts(p)
        taps, node = _taps(p)
        keyed.setdefault((p.arrangement, len(taps), p.primary_capacitance is not None), []).append(
            (i, p, node[float(p.detector_tap)], node.get(float(p.aerial_tap or 1.0)),
             [b - a for a, b in zip([0.0] + taps[:-1], taps)],
             _sections(tuple(taps), p.block, float(p.coil_inductance))))
    groups = []
    for rows in keyed.values():
        idx, parts, det, aer, frac, msec = zip(*rows)
        groups.append(StackGroup(np.array(idx), tuple(parts), np.array(det)[:, None],
                                 np.array([-1 if a is None else a for a in aer])[:, None], np.array(frac),
                                 np.array(msec)))
    return NetworkStack(len(parts_stack), tuple(groups))


#: Each field of :class:`NetworkSolution`: the node it is read at and the right-hand side it answers (the
#: aerial's EMF, or a unit current into the top or into the detector tap, the EMF shorted).
_FIELD_SOURCES = {"top_voltage": ("top", "emf"), "detector_voltage": ("detector", "emf"),
                  "top_impedance": ("top", "top"), "detector_impedance": ("detector", "detector"),
                  "primary_voltage": ("aerial", "emf"), "detector_per_top_current": ("detector", "top"),
                  "top_per_detector_current": ("top", "detector")}


def solve_network_stack(frequency, aerial_impedance, parts_stack, tuning_capacitance=0.0, detector_conductance=0.0,
                        emf=1.0, outputs=None) -> NetworkSolution:
    """:func:`solve_network` for many networks at once: row p of every input and output belongs to ``parts_stack[p]``.

    Parameters
    ----------
    frequency : array_like, shape (m,) or (P, m)
        [Hz]
    aerial_impedance : array_like of complex
        Broadcast to (P, m). [ohm]
    parts_stack : sequence of NetworkParts, or NetworkStack
        P networks, each with a single coil inductance, series capacitance and coupling coefficient;
        arrangements and taps may differ (:func:`plan_network_stack` prepares them once for many solves).
    tuning_capacitance, detector_conductance, emf : array_like
        Broadcast to (P, m). [F], [S], [V]
    outputs : sequence of str, optional
        The fields of :class:`NetworkSolution` wanted (default: every one); the others come back None,
        and the right-hand sides only they need are not solved for.

    Returns
    -------
    NetworkSolution
        Arrays of shape (P, m): row p is what :func:`solve_network` gives for ``parts_stack[p]``
        at row p of the inputs.

    Notes
    -----
    Networks whose systems have the same shape (arrangement, number of winding sections) are
    assembled together, entry by entry in the order :func:`solve_network` uses, and solved in one
    call of the LAPACK solver over the stack: a search over couplings and taps costs a few solver
    calls instead of one per candidate.

    Examples
    --------
    >>> ps = [NetworkParts("coil tap", 240e-6, 8.0, detector_tap=0.5, aerial_tap=t) for t in (0.1, 0.2, 0.7)]
    >>> f, za = np.array([8e5, 1e6]), np.array([30 - 900j, 30 - 700j])
    >>> s = solve_network_stack(f, za, ps, 90e-12, 2e-4)
    >>> one = solve_network(f, za, ps[2], 90e-12, 2e-4)
    >>> bool(np.allclose(s.detector_voltage[2], one.detector_voltage, rtol=1e-12))
    True
    """
    plan = parts_stack if isinstance(parts_stack, NetworkStack) else plan_network_stack(parts_stack)
    f = np.asarray(frequency, dtype=float)
    if not (np.isfinite(f).all() and (f > 0).all()):
        raise ModelInputError("frequency must be positive and finite")
    shape = np.broadcast_shapes((plan.size, 1), f.shape, np.shape(aerial_impedance), np.shape(tuning_capacitance),
                                np.shape(detector_conductance), np.shape(emf))
    if len(shape) != 2:
        raise ModelInputError("a stack of networks takes frequencies of shape (m,) or (P, m)")
    inputs = [np.broadcast_to(f, shape), np.broadcast_to(np.asarray(aerial_impedance, dtype=complex), shape),
              np.broadcast_to(np.asarray(tuning_capacitance, dtype=float), shape),
              np.broadcast_to(np.asarray(detector_conductance, dtype=float), shape),
              np.broadcast_to(np.asarray(emf, dtype=complex), shape)]
    shared = f if f.ndim == 1 else None  # one row of frequencies for every network: each loss callable met once
    wanted = NetworkSolution._fields if outputs is None else tuple(outputs)
    if len(plan.groups) == 1:  # one group of every network in order: its solution as it comes
        return _solution(wanted, _solve_group(plan.groups[0], shared, *inputs, wanted))
    out = [np.empty(shape, dtype=complex) for _ in wanted]
    for group in plan.groups:
        for o, v in zip(out, _solve_group(group, shared, *(x[group.index] for x in inputs), wanted)):
            o[group.index] = v
    return _solution(wanted, out)


def _solution(wanted, values) -> NetworkSolution:
    """A NetworkSolution of the fields ``wanted`` (their ``values`` in the same order), None for the others."""
    got = dict(zip(wanted, values))
    return NetworkSolution(*(got.get(name) for name in NetworkSolution._fields))


def _per_network(values, f, shared) -> np.ndarray:
    """A frequency-dependent part value (a number, or a callable of f) of every network of a group, (G, m).

    With ``shared`` frequencies (every row of ``f`` the same), a callable met again is not called again (and
    when every network has the very same one, its values serve every row)."""
    if shared is not None and callable(values[0]) and all(v is values[0] for v in values):
        return np.broadcast_to(values[0](shared), f.shape)
    seen: dict = {}
    rows = []
    for i, v in enumerate(values):
        if shared is not None and callable(v):
            if id(v) not in seen:
                seen[id(v)] = np.broadcast_to(v(shared), f.shape[1:])
            rows.append(seen[id(v)])
        else:
            rows.append(np.broadcast_to(_value(v, f[i]), f.shape[1:]))
    return np.array(rows)


def _solve_group(group: StackGroup, shared, f, za, tuning_capacitance, detector_conductance, emf,
                 wanted=NetworkSolution._fields):
    """Assemble (:func:`_assemble`, as for :func:`solve_network`) and solve networks of one shape, (G, m) inputs;
    the fields of :class:`NetworkSolution` ``wanted``, in order, each right-hand side solved for only when one
    of them needs it (each column is eliminated on its own: the same figures as with every column)."""
    parts = group.parts
    p0 = parts[0]

    def column(values):
        return np.array(values, dtype=float)[:, None]

    k = group.fractions.shape[1]
    primary = None
    if p0.arrangement == "separate primary":
        lp = column([float(p.primary_inductance) for p in parts])
        primary = _Primary(lp, column([p.coupling_coefficient * np.sqrt(float(p.primary_inductance) * p.coil_inductance)
                                       for p in parts]),
                           np.array([ms.sum(axis=1) / ms.sum() for ms in group.sections])[:, None, :],
                           _per_network([p.primary_resistance for p in parts], f, shared),
                           None if p0.primary_capacitance is None else column([p.primary_capacitance for p in parts]))
    aer = {"direct": k - 1, "coil tap": _one_node(group.aerial_node), "series capacitor": k,
           "separate primary": k}[p0.arrangement]
    det = _one_node(group.detector_node)
    lay = _Layout(p0.arrangement, det, aer, group.fractions[:, None, :], group.sections[:, None],
                  column([p.self_capacitance for p in parts]),
                  column([p.series_capacitance for p in parts]) if p0.arrangement == "series capacitor" else None,
                  _per_network([p.coil_resistance for p in parts], f, shared), primary)
    pairs = [_FIELD_SOURCES[name] for name in wanted]
    columns = tuple(c for c in ("emf", "top", "detector") if any(c == rhs for _, rhs in pairs))
    system = _assemble(f.shape, f, za, emf, tuning_capacitance, detector_conductance, columns, lay)
    x = _eliminate(system.matrix, system.rhs)
    node = {"top": k - 1, "detector": det, "aerial": aer}
    return tuple(_voltages(system, x, [(node[at], columns.index(rhs)) for at, rhs in pairs], f.shape))


def _one_node(nodes):
    """A group's node numbers (G, 1), or the one number they all are: the same figures, without a choice per
    network in the assembly and the voltages."""
    first = int(nodes.flat[0])
    return first if (nodes == first).all() else nodes


#: The fields of a bare solve that :func:`retuned_detector_voltage` reads, and the top's impedance (for the
#: detector's loading of the top): what to ask :func:`solve_network_stack` for (``outputs=``).
RETUNED_FIELDS = ("top_voltage", "detector_voltage", "top_impedance", "detector_impedance", "detector_per_top_current",
                  "top_per_detector_current")


def retuned_detector_voltage(bare: NetworkSolution, frequency, tuning_capacitance, detector_conductance):
    """Detector voltage with a tuning capacitor and a detector conductance added to a solved network.

    Parameters
    ----------
    bare : NetworkSolution
        :func:`solve_network` with no tuning capacitor and no detector conductance (the coil's
        self-capacitance included) at ``frequency``.
    frequency : array_like
        [Hz]
    tuning_capacitance : array_like
        Across the whole coil (broadcast with ``frequency``). [F]
    detector_conductance : array_like
        At the detector's tap. [S]

    Returns
    -------
    ndarray
        Detector voltage per volt of aerial EMF, of the broadcast shape: what :func:`solve_network`
        gives with the capacitor and the conductance in place. [1]

    Notes
    -----
    The capacitor and the conductance add Y = U·D·Uᵀ to the nodal matrix A0, U the top's and the
    detector's unit columns, D = diag(jωC, G): a change of rank two. By the Sherman–Morrison–
    Woodbury identity [3]_, x = y − Z (I + D W)⁻¹ D Uᵀy with y = A0⁻¹b (the bare voltages),
    Z = A0⁻¹U (the bare driving-point and transfer impedances) and W = UᵀZ, a 2 × 2 system per
    point solved by Cramer's rule. So one solve per frequency serves every tuning: the cross table
    of n stations tuned to each of n others costs n solves, not n².

    References
    ----------
    .. [3] G. H. Golub, C. F. Van Loan, Matrix Computations, 3rd ed., Johns Hopkins, 1996,
       section 2.1.3 (the Sherman–Morrison–Woodbury formula).

    Examples
    --------
    >>> p = NetworkParts("coil tap", 240e-6, 8.0, detector_tap=0.5, aerial_tap=0.2)
    >>> f, za = np.array([8e5, 1e6]), np.array([30 - 900j, 30 - 700j])
    >>> direct = solve_network(f, za, p, 90e-12, 2e-4).detector_voltage
    >>> quick = retuned_detector_voltage(solve_network(f, za, p), f, 90e-12, 2e-4)
    >>> bool(np.allclose(direct, quick, rtol=1e-9))
    True
    """
    d1 = 2j * np.pi * np.asarray(frequency, dtype=float) * np.asarray(tuning_capacitance, dtype=float)
    d2 = np.asarray(detector_conductance, dtype=float)
    z_tt, z_dd = bare.top_impedance, bare.detector_impedance
    z_dt, z_td = bare.detector_per_top_current, bare.top_per_detector_current
    y_t, y_d = bare.top_voltage, bare.detector_voltage
    m11, m12 = 1.0 + d1 * z_tt, d1 * z_td
    m21, m22 = d2 * z_dt, 1.0 + d2 * z_dd
    r1, r2 = d1 * y_t, d2 * y_d
    det = m11 * m22 - m12 * m21
    v1 = (r1 * m22 - m12 * r2) / det
    v2 = (m11 * r2 - m21 * r1) / det
    return y_d - z_dt * v1 - z_dd * v2


def tuning_capacitance_for(frequency, aerial_impedance, parts: NetworkParts, detector_conductance=0.0):
    """The tuning capacitor setting that brings the network to resonance at ``frequency``. [F]

    Parameters
    ----------
    frequency : array_like
        [Hz]
    aerial_impedance : array_like of complex
        [ohm]
    parts : NetworkParts
    detector_conductance : array_like
        [S]

    Returns
    -------
    ndarray
        C = −Im(1/Z_top)/ω with the capacitor left out (negative when the rest of the network
        already tunes above ``frequency``). [F]

    References
    ----------
    Terman, Radio Engineers' Handbook, 1943, section 3 (resonance of a tuned circuit) (module reference [1]; from memory).

    Examples
    --------
    >>> w = 2e6 * np.pi
    >>> p = NetworkParts("direct", 240e-6, 0.0 + 1e-9)
    >>> round(float(tuning_capacitance_for(1e6, 1e12 + 0j, p)) * 1e12, 2)  # 1/(ω²L)
    105.54
    """
    # the driving-point impedance at the top alone: one right-hand side, the same figures as solve_network's
    system, shape, (top, _, _) = _nodal_system(frequency, aerial_impedance, parts, 0.0, detector_conductance, 1.0,
                                               ("top",))
    z_top = _voltages(system, _eliminate(system.matrix, system.rhs), ((top, 0),), shape)[0]
    w = 2.0 * np.pi * np.asarray(frequency, dtype=float)
    return -np.imag(1.0 / z_top) / w


class TunedResponse(NamedTuple):
    bandwidth: np.ndarray  #: −3 dB bandwidth of the detector voltage [Hz]
    low_edge: np.ndarray  #: lower −3 dB frequency [Hz]
    high_edge: np.ndarray  #: upper −3 dB frequency [Hz]
    loaded_q: np.ndarray  #: f0 / bandwidth [1]
    wider_than_searched: np.ndarray  #: an edge lay beyond the search range (bandwidth is a floor) [bool]


def detector_bandwidth(centre, response, rtol=EDGE_RTOL, max_iter=EDGE_MAX_ITER, tuned=None) -> TunedResponse:
    """−3 dB edges of a tuned response around its tuned frequency, by bisection in frequency.

    Parameters
    ----------
    centre : array_like
        Tuned frequencies f0. [Hz]
    response : callable
        response(f) -> |V_det(f)| with the tuning fixed for each f0; ``f`` has the shape of
        ``centre`` or, for both edges and several trial points at once, that shape after leading
        axes (K, 2) (broadcast). [V]
    rtol : float
        Relative tolerance on each edge. [1]
    max_iter : int
        Bisection limit.
    tuned : array_like, optional
        |V_det| at ``centre``, when the caller has it already (``response(centre)`` otherwise). [V]

    Returns
    -------
    TunedResponse

    Notes
    -----
    Each edge is where |V(f)| = |V(f0)|/√2, searched from f0 out to f0/3 and 3·f0; the loaded Q
    is f0/(f_high − f_low), the usual definition for a single resonance [1]_. For many edges at
    once (one trial point each per call) the first :data:`EDGE_OPENING_HALVINGS` halvings are
    solved, each crossing is then pinned by regula falsi with the Illinois modification [4]_ and
    the remaining halvings are replayed against it (a midpoint outside the pinned bracket judged
    by its side, one inside it solved): the plain bisection's edges whenever the response crosses
    the level once in the bracket the opening halvings leave, in about a third of the calls. Where
    it crosses more than once there, each edge still lies within ``rtol`` of a crossing (the final
    bracket overlaps the pinned one, whose ends were solved on either side of the level), though
    not always the one the plain bisection reaches: which of several a bisection finds is arbitrary
    either way.

    References
    ----------
    Terman, Radio Engineers' Handbook, 1943, section 3 (resonant circuits) (module reference [1]; from memory).

    .. [4] M. Dowell, P. Jarratt, "A modified regula falsi method for computing the root of an
       equation", BIT 11, 1971, pp. 168-174 (from memory).

    Examples
    --------
    >>> r = detector_bandwidth(np.array([1e6]), lambda f: 1 / np.abs(1 + 1j * 50 * (f / 1e6 - 1e6 / f)))
    >>> round(float(r.loaded_q[0]), 3)
    50.0
    """
    if not (0 < rtol < 0.1):
        raise ModelInputError(f"rtol must lie between 0 and 0.1, got {rtol!r}")
    f0 = np.asarray(centre, dtype=float)
    n = f0.size
    ref = np.abs(response(f0) if tuned is None else np.asarray(tuned, dtype=float)) / np.sqrt(2.0)
    # both edges searched together, one response call per halving; each edge stops halving once all
    # its own searches have converged, so every edge is exactly what a search of its own would give
    s = _EdgeSearch(response, f0.shape, np.concatenate([f0.ravel(), f0.ravel()]),
                    np.concatenate([(f0 / 3.0).ravel(), (f0 * 3.0).ravel()]), np.concatenate([ref.ravel(), ref.ravel()]),
                    rtol, int(max_iter))
    s.level_near = s.ref * np.sqrt(2.0)
    s.level_far = np.abs(_respond(response, s.far, f0.shape))
    beyond = s.level_far >= s.ref
    floor = (beyond[:n] | beyond[n:]).reshape(f0.shape)
    # look ahead only while the trial points stay few: for many edges a call costs its points, not its overhead
    ahead = max(1, min(EDGE_LOOKAHEAD, int(math.log2(EDGE_LOOKAHEAD_POINTS / (2 * n) + 1))))
    if ahead > 1:
        s.halve(ahead, s.max_iter)
    else:  # many edges: a few halvings, then each crossing pinned down and the rest of the halvings replayed
        s.halve(1, min(EDGE_OPENING_HALVINGS, s.max_iter))
        s.replay(*s.pin())
    both = np.sqrt(s.near * s.far)
    edges = [both[:n].reshape(f0.shape), both[n:].reshape(f0.shape)]
    bw = np.maximum(edges[1] - edges[0], 1e-9 * f0)
    return TunedResponse(bw, edges[0], edges[1], f0 / bw, floor)


class _EdgeSearch:
    """The −3 dB edge bisection of :func:`detector_bandwidth`: brackets [near, far] of 2n edges (the lower
    edges, then the upper ones), near inside the response (|V| >= ref), far outside, halved in log f."""

    def __init__(self, response, shape, near, far, ref, rtol, max_iter):
        self.response, self.shape, self.near, self.far, self.ref = response, shape, near, far, ref
        self.rtol, self.max_iter, self.taken, self.active = rtol, max_iter, 0, [True, True]
        self.level_near = self.level_far = None  # |V| at the bracket ends [V]

    def call(self, f):
        """|V| at ``f`` (leading axes, then the 2n edges), in one call of the response."""
        return np.abs(_respond(self.response, f, self.shape)).reshape(f.shape)

    def step(self, mid, inside, level):
        """One halving of the edges still searched (both, as a rule: they start alike and converge together)."""
        n = self.near.size // 2
        first, last = (0 if self.active[0] else 1), (2 if self.active[1] else 1)
        part = slice(first * n, last * n)
        ins = inside[part]
        out = ~ins
        np.copyto(self.near[part], mid[part], where=ins)  # a midpoint inside the response is the new near end
        np.copyto(self.far[part], mid[part], where=out)
        if level is not None:
            np.copyto(self.level_near[part], level[part], where=ins)
            np.copyto(self.level_far[part], level[part], where=out)
        close = (np.abs(self.far[part] / self.near[part] - 1.0) <= self.rtol).reshape(last - first, n).all(axis=1)
        for e, done in zip(range(first, last), close):
            self.active[e] = not bool(done)
        self.taken += 1
        return any(self.active)

    def halve(self, ahead, until):
        """Halvings up to ``until`` in all, every midpoint the next ``ahead`` of them can reach in one call."""
        column = np.arange(self.near.size)
        while self.taken < until and any(self.active):
            # every midpoint the next few halvings can reach, in one call of the response; then the
            # halvings one by one on those very midpoints, as a search evaluating each alone would
            depth = min(ahead, until - self.taken)
            mids = bisection_midpoints(self.near, self.far, depth)
            levels = self.call(mids)
            node = np.zeros(self.near.size, dtype=int)
            for _ in range(depth):
                mid, level = mids[node, column], levels[node, column]
                inside = level >= self.ref
                if not self.step(mid, inside, level) or self.taken >= until:
                    break
                node = 2 * node + np.where(inside, 2, 1)  # node 2i + 2: the bracket beyond the midpoint

    def pin(self):
        """Each edge's crossing of ref bracketed far more tightly than ``rtol``: (inside end, outside end) [Hz]
        (:func:`aerial.core.arrays.pin_crossing` on ln|V| − ln ref, all edges together, from the brackets
        as they stand; an edge whose far end is not outside has its crossing there)."""
        ref = np.maximum(self.ref, 1e-300)

        def measure(f):
            level = self.call(f[np.newaxis])[0]
            return level >= self.ref, np.log(np.maximum(level, 1e-300) / ref)

        return pin_crossing(self.near, self.far, np.log(np.maximum(self.level_near, 1e-300) / ref),
                            np.log(np.maximum(self.level_far, 1e-300) / ref), measure)

    def replay(self, a, b):
        """The rest of the halvings, each midpoint judged by where it lies against the pinned bracket [a, b]:
        on a's side it is inside, on b's side outside; only a midpoint within [a, b] is evaluated."""
        lo, hi = np.minimum(a, b), np.maximum(a, b)
        upward = self.far > self.near  # the outside end lies above the inside one (an upper edge)
        while self.taken < self.max_iter and any(self.active):
            mid = np.sqrt(self.near * self.far)
            inside = np.where(upward, mid <= lo, mid >= hi)
            unsure = (lo < mid) & (mid < hi)
            if unsure.any():
                inside = np.where(unsure, self.call(mid[np.newaxis])[0] >= self.ref, inside)
            if not self.step(mid, inside, None):
                break


def _respond(response, f, shape):
    """``response`` at the two halves of the last axis of ``f`` (each half of ``shape``) in one call, flattened."""
    return np.ravel(response(f.reshape(f.shape[:-1] + (2,) + tuple(shape))))


def rejection_db(tuned, offset_response) -> np.ndarray:
    """Rejection [dB] of the weaker side: −20 log10(max(|V(f0 − d)|, |V(f0 + d)|)/|V(f0)|).

    Parameters
    ----------
    tuned : array_like
        |V_det| at the tuned frequency. [V]
    offset_response : tuple of array_like
        (|V_det(f0 − d)|, |V_det(f0 + d)|). [V]

    Returns
    -------
    ndarray
        [dB], at least 0.

    References
    ----------
    Terman, Radio Engineers' Handbook, 1943, section 3 (selectivity of resonant circuits) (module reference [1]; from memory).

    Examples
    --------
    >>> float(rejection_db(1.0, (0.1, 0.01)))
    20.0
    """
    worst = np.maximum(np.abs(offset_response[0]), np.abs(offset_response[1]))
    return np.maximum(-20.0 * np.log10(np.maximum(worst, 1e-300) / np.maximum(np.abs(tuned), 1e-300)), 0.0)


def critical_coupling(q1, q2):
    """Critical coupling of two coupled tuned circuits: k_c = 1/√(Q1 Q2). [1]

    Parameters
    ----------
    q1, q2 : array_like
        Loaded Q of each circuit alone. [1]

    Returns
    -------
    ndarray
        [1]

    References
    ----------
    Terman, Radio Engineers' Handbook, 1943, coupled circuits (from memory).

    Examples
    --------
    >>> float(critical_coupling(50.0, 50.0))
    0.02
    """
    return 1.0 / np.sqrt(np.asarray(q1, dtype=float) * np.asarray(q2, dtype=float))


def trap_source(frequency, aerial_impedance, kind, inductance, capacitance, resistance):
    """The aerial seen through a wave trap tuned to an interfering station.

    Parameters
    ----------
    frequency : array_like
        [Hz]
    aerial_impedance : array_like of complex
        [ohm]
    kind : {"series", "parallel"}
        "series": a series L–C from the aerial terminal to earth (shorts the interferer);
        "parallel": a parallel L–C in the aerial lead (blocks it).
    inductance, capacitance, resistance : float
        The trap's coil, capacitor and coil loss resistance (in series with its coil). [H], [F], [ohm]

    Returns
    -------
    (ndarray, ndarray)
        EMF scale (the Thevenin EMF over the aerial's own) and the new source impedance. [1], [ohm]

    References
    ----------
    Terman, Radio Engineers' Handbook, 1943, section 3 (series and parallel resonance) (module reference [1]; from memory).

    Examples
    --------
    >>> s, z = trap_source(1e6, 20 - 800j, "parallel", 100e-6, 1 / ((2e6 * np.pi) ** 2 * 100e-6), 1.0)
    >>> round(float(abs(z)) / 1e3)  # at its own frequency the trap is ~ (ωL)²/R in the lead
    395
    """
    w = 2.0 * np.pi * np.asarray(frequency, dtype=float)
    za = np.asarray(aerial_impedance, dtype=complex)
    z_l = resistance + 1j * w * inductance
    z_c = 1.0 / (1j * w * capacitance)
    if kind == "series":
        zt = z_l + z_c
        return zt / (za + zt), za * zt / (za + zt)
    if kind == "parallel":
        return np.ones_like(za), za + z_l * z_c / (z_l + z_c)
    raise ModelInputError(f"'{kind}' is not a valid trap, must be one of 'series', 'parallel'")
