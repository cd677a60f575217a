"""Tuning designed for the listed stations: coupling and taps that hear the weakest while keeping the others down.

For every coupling (direct; a tap on the coil; a series capacitor; a separate primary) at a
few settings, and every detector tap, the receiving network is tuned to each wanted station
in turn and solved (:mod:`aerial.estimate.tuned_network`): the wanted station's detector
power and every other listed station's level at the detector. The objective is the largest
detector power for the weakest wanted station, subject to every other listed station staying
at least the interference margin below the wanted one wherever it would be audible. When no
single tank meets the margin, the two usual remedies are worked out with part values and their
computed effect: a second tuned circuit at critical coupling, and a trap tuned to the
interfering station.

Arrays and plain dicts in and out; no wording beyond short labels.
"""

from __future__ import annotations

from typing import Callable

import numpy as np

from aerial.core.records import NamedTuple
from aerial.estimate import tuned_network as tn_mod
from aerial.models import detector as det_mod
from aerial.models import network as net_mod

#: Aerial taps tried (fraction of the turns from the earthy end). [1]
AERIAL_TAPS = (0.05, 0.1, 0.2, 0.3, 0.5)
#: Series (coupling) capacitors tried. [F]
SERIES_CAPACITORS_F = (10e-12, 22e-12, 47e-12, 100e-12, 220e-12)
#: Separate-primary coupling coefficients tried; the primary is taken as a tenth of the tank coil's
#: inductance (about a third of its turns on the same former, an assumption). [1]
PRIMARY_COUPLINGS = (0.05, 0.1, 0.2, 0.4)
PRIMARY_FRACTION = 0.1
#: Detector taps tried. [1]
DETECTOR_TAPS = (0.1, 0.2, 0.3, 0.5, 0.7, 1.0)
#: Inductance of the trap coil proposed for a wave trap. [H]
TRAP_INDUCTANCE_H = 200e-6


class Scene(NamedTuple):
    """What the design works with (all SI)."""

    za: Callable  #: aerial impedance za(f) [ohm]
    q_fun: Callable  #: coil unloaded Q, q(f) [1]
    frequency: np.ndarray  #: wanted stations' frequencies [Hz]
    emf: np.ndarray  #: their aerial EMF, RMS [V]
    names: list
    diode: det_mod.Diode
    load: float  #: earphone [ohm]
    threshold: float  #: just-audible RMS detector voltage [V]
    margin_db: float  #: interference margin [dB]
    spacing_hz: float  #: channel spacing for the adjacent-channel figure [Hz]
    table: tuple  #: detector look-up table (tuned_network.input_resistance_table)


def candidates(arrangement_given) -> list:
    """Every coupling setting tried: dicts of arrangement and its part. The site's own comes first."""
    out = [{"arrangement": "direct"}]
    out += [{"arrangement": "coil tap", "tap_fraction": n} for n in AERIAL_TAPS]
    out += [{"arrangement": "series capacitor", "series_capacitance": c} for c in SERIES_CAPACITORS_F]
    out += [{"arrangement": "separate primary", "coupling_coefficient": k} for k in PRIMARY_COUPLINGS]
    return out


def candidate_parts(scene: Scene, coupling: dict, inductance, block, detector_tap,
                    self_capacitance=0.0) -> net_mod.NetworkParts:
    """The receiving network of one candidate: its coupling, the coil and the detector tap.

    A separate primary without its own inductance is :data:`PRIMARY_FRACTION` of the coil's.
    """
    lp = None
    if coupling["arrangement"] == "separate primary":
        lp = coupling.get("primary_inductance") or PRIMARY_FRACTION * inductance
    return tn_mod.network_parts(coupling["arrangement"], inductance, scene.q_fun, detector_tap,
                                coupling.get("tap_fraction"), coupling.get("series_capacitance"), lp,
                                coupling.get("coupling_coefficient"), block, self_capacitance=self_capacitance)


def evaluate(scene: Scene, coupling: dict, inductance, block, detector_tap, self_capacitance=0.0) -> dict:
    """One candidate: every wanted station's detector power and the worst separation from the others.

    Returns
    -------
    dict
        ``weakest_power_w`` and ``weakest`` (index), ``worst_separation_db`` (the smallest margin
        by which an audible other station stays below a wanted one; +inf when none is audible)
        with ``pair`` (wanted, other), ``power_w`` per station, ``rejection_db`` (adjacent
        channel at the wanted stations' centre), ``loaded_q`` per station.
    """
    parts = candidate_parts(scene, coupling, inductance, block, detector_tap, self_capacitance)
    lv = tn_mod.station_levels(scene.frequency, scene.emf, scene.za, parts, scene.diode, scene.load, passes=1,
                               bandwidth=False, table=scene.table)
    return summarise(scene, lv, parts)


#: Candidates × stations² solved together at most (the cross levels of a long station list are kept to
#: a few megabytes at a time).
STACK_ELEMENTS = 200_000


def evaluate_many(scene: Scene, candidates_parts) -> list:
    """:func:`evaluate` for many candidates at once, given as their networks (:func:`candidate_parts`).

    Every step is taken for all candidates together (:func:`tuned_network.station_levels_stack`,
    :func:`tuned_network.rejection_stack`); the figures are those :func:`evaluate` gives one by one.
    """
    parts = list(candidates_parts)
    if not parts:
        return []
    m = scene.frequency.size
    chunk = max(1, STACK_ELEMENTS // (m * m))  # a long station list: the candidates a few at a time
    if len(parts) > chunk:
        return [r for k in range(0, len(parts), chunk) for r in evaluate_many(scene, parts[k:k + chunk])]
    plan = net_mod.plan_network_stack(parts)
    lv = tn_mod.station_levels_stack(scene.frequency, scene.emf, scene.za, plan, scene.diode, scene.load,
                                     table=scene.table)
    centre = float(np.sqrt(scene.frequency.min() * scene.frequency.max()))
    g = 1.0 / np.exp(np.mean(np.log(lv.input_resistance), axis=1, keepdims=True))
    rej = tn_mod.rejection_stack(np.array([centre]), scene.za, plan, g, [scene.spacing_hz])[scene.spacing_hz]
    return merits(scene, lv.detector_voltage, lv.input_resistance, lv.others, lv.capacitance, rej[:, 0])


def summarise(scene: Scene, lv, parts) -> dict:
    """Figures of merit of a solved candidate (see :func:`evaluate`)."""
    centre = float(np.sqrt(scene.frequency.min() * scene.frequency.max()))
    g = np.array([1.0 / float(np.exp(np.mean(np.log(lv.input_resistance))))])
    fig = tn_mod.tuned_figures(np.array([centre]), scene.za, parts, g, [scene.spacing_hz], bandwidth=False)
    return merit(scene, lv.detector_voltage, lv.input_resistance, lv.others, lv.capacitance,
                 float(fig.rejection[scene.spacing_hz][0]))


def merit(scene: Scene, detector_voltage, input_resistance, others, capacitance, rejection_db) -> dict:
    """The figures of merit from a candidate's solved levels and its adjacent-channel rejection [dB]."""
    return merits(scene, np.asarray(detector_voltage)[None], np.asarray(input_resistance)[None],
                  np.asarray(others)[None], np.asarray(capacitance)[None], [rejection_db])[0]


def merits(scene: Scene, detector_voltage, input_resistance, others, capacitance, rejection_db) -> list:
    """:func:`merit` of P candidates at once: arrays (P, n), ``others`` (P, n, n), ``rejection_db`` (P,).

    Every step is taken for all candidates together; row p gives what :func:`merit` gives for candidate p."""
    power = detector_voltage**2 / input_resistance
    weakest = np.argmin(power, axis=1)
    own = np.diagonal(others, axis1=1, axis2=2).copy()
    # a pair counts unless the other station stays inaudible while the wanted one is heard: a design
    # cannot pass by making everything too faint to hear
    counts = (others >= scene.threshold) | (own < scene.threshold)[:, :, None]
    n = own.shape[1]
    counts[:, np.arange(n), np.arange(n)] = False
    sep = np.where(counts, 20.0 * np.log10(np.maximum(own, 1e-300)[:, :, None] / np.maximum(others, 1e-300)), np.inf)
    worst = np.argmin(sep.reshape(sep.shape[0], -1), axis=1)
    return [{
        "weakest_power_w": float(power[p, weakest[p]]), "weakest": int(weakest[p]), "power_w": power[p],
        "worst_separation_db": float(sep[p, w // n, w % n]), "pair": (int(w // n), int(w % n)),
        "rejection_db": float(rejection_db[p]), "capacitance_f": capacitance[p],
        "own": own[p], "sep": sep[p],
    } for p, w in enumerate(worst.tolist())]


#: Variable capacitors the design picks from: (maximum, minimum) [F]. Common practice: air-spaced
#: broadcast tuning capacitors are sold with about 140, 250, 365 and 500 pF maximum, two 365 or 500 pF
#: sections in parallel give 730 or 1000 pF; with the plates out one keeps about 3-5 % of its maximum
#: (the minimums here are typical figures, an assumption).
STANDARD_CAPACITORS_F = ((140e-12, 6e-12), (250e-12, 10e-12), (365e-12, 12e-12), (500e-12, 17e-12),
                         (730e-12, 25e-12), (1000e-12, 35e-12))
#: Room kept at each end of a suggested capacitor's range for strays and the dial's ends (assumption):
#: the settings needed must lie within [min·(1 + ROOM), max·(1 − ROOM)]. [1]
CAPACITOR_ROOM = 0.05
#: A design this much weaker for the weakest wanted station than the site's own parts counts as no
#: worse (common practice: about 1 dB is the smallest change in loudness a listener notices). [dB]
NO_WORSE_DB = 1.0


def fits(capacitance, cmin, cmax, room=0.0, extremes=None) -> bool:
    """Whether every tuning setting in ``capacitance`` [F] lies in [cmin·(1+room), cmax·(1−room)]
    (``extremes``: its :func:`row_extremes`, when worked out already).

    >>> fits([20e-12, 300e-12], 12e-12, 365e-12, 0.05)
    True
    """
    lo, hi = _extremes(capacitance) if extremes is None else extremes
    return _within(lo, hi, cmin, cmax, room)


def _extremes(capacitance) -> tuple:
    """The smallest and the largest setting [F] (NaN when any is not a number: then nothing fits)."""
    c = np.asarray(capacitance, dtype=float)
    if c.size == 0:
        return np.inf, -np.inf
    return float(c.min()), float(c.max())


def row_extremes(capacitance) -> list:
    """:func:`_extremes` of each row of ``capacitance`` [F] (rows of settings, one per candidate), in one pass.

    >>> row_extremes([[20e-12, 300e-12], [5e-12, 1e-12]]) == [(20e-12, 300e-12), (1e-12, 5e-12)]
    True
    """
    c = np.asarray(capacitance, dtype=float)
    if c.ndim != 2 or c.shape[1] == 0:
        return [_extremes(row) for row in c]
    return list(zip(c.min(axis=1).tolist(), c.max(axis=1).tolist()))


def _within(lo, hi, cmin, cmax, room) -> bool:
    return bool(lo >= cmin * (1.0 + room) and hi <= cmax * (1.0 - room))


def standard_capacitor(capacitance, extremes=None):
    """The smallest standard variable capacitor (:data:`STANDARD_CAPACITORS_F`) whose range, with
    :data:`CAPACITOR_ROOM` at each end, holds every setting in ``capacitance`` [F]; None when none does
    (``extremes``: its :func:`row_extremes`, when worked out already).

    >>> [round(c * 1e12) for c in standard_capacitor([30e-12, 200e-12])]  # [max, min] pF
    [250, 10]
    >>> standard_capacitor([3e-12, 100e-12]) is None
    True
    """
    lo, hi = _extremes(capacitance) if extremes is None else extremes
    for cmax, cmin in STANDARD_CAPACITORS_F:
        if _within(lo, hi, cmin, cmax, CAPACITOR_ROOM):
            return cmax, cmin
    return None


def out_of_reach(row: dict, reachable) -> dict:
    """The figures of a candidate whose capacitor cannot tune the stations where ``reachable`` is False:
    those get no power at the detector and no separation figure of their own (they still interfere)."""
    ok = np.asarray(reachable, dtype=bool)
    if ok.all():
        return {**row, "unreachable": np.zeros_like(ok)}
    power = np.where(ok, row["power_w"], 0.0)
    own = np.where(ok, row["own"], 0.0)
    sep = np.where(ok[:, None], row["sep"], np.inf)
    return {**row, "power_w": power, "own": own, "sep": sep, "unreachable": ~ok}


def hearable(rows, threshold) -> np.ndarray:
    """Stations some candidate makes audible at the detector: the ones worth designing for. [bool]"""
    return np.any(np.array([r["own"] for r in rows]) >= threshold, axis=0)


def rescore(row: dict, wanted, margin_db, threshold) -> dict:
    """The figures of merit over the ``wanted`` stations only (the others still count as interferers).

    ``meets_margin`` needs both: every other listed station at least ``margin_db`` below each wanted
    one wherever it would be audible, and every wanted station itself audible (its detector voltage
    at least ``threshold`` [V]): keeping interferers down while the wanted station is too faint to
    hear is no success. ``inaudible`` lists the wanted stations left below the threshold.
    """
    return rescore_many([row], wanted, margin_db, threshold)[0]


def rescore_many(rows, wanted, margin_db, threshold) -> list:
    """:func:`rescore` of many rows (candidates of one scene: the same stations) at once, in one pass over
    arrays of them all; each row's figures are those :func:`rescore` gives it alone."""
    n = len(rows[0]["power_w"])
    idx = np.flatnonzero(wanted)
    if idx.size == 0:
        idx = np.arange(n)
    power = np.array([r["power_w"] for r in rows])
    sep = np.array([r["sep"] for r in rows])[:, idx].reshape(len(rows), -1)  # wanted rows of each (m x n), flat
    quiet = np.array([r["own"] for r in rows])[:, idx] < threshold
    weakest = idx[np.argmin(power[:, idx], axis=1)]
    k = np.argmin(sep, axis=1)  # the first smallest separation, as each row's own search finds it
    worst = sep[np.arange(len(rows)), k]
    designed = np.zeros(n, dtype=bool)
    designed[idx] = True
    out = []
    for p, row in enumerate(rows):
        w, inaudible, worst_p = int(weakest[p]), idx[quiet[p]].tolist(), float(worst[p])
        out.append({**row, "weakest": w, "weakest_power_w": float(power[p, w]), "designed": designed.copy(),
                    "worst_separation_db": worst_p, "pair": (int(idx[k[p] // n]), int(k[p] % n)),
                    "separated": bool(worst_p >= margin_db), "inaudible": inaudible,
                    "meets_margin": bool(worst_p >= margin_db and not inaudible)})
    return out


#: An interferer less than this far below the wanted station (or above it) swamps it; the station
#: verdicts use the same figure (ASSUMPTION: at 6 dB down a second programme is as loud as speech
#: in a noisy room; below that the listener follows the louder one). [dB]
SWAMP_DB = 6.0


def separation_class(sep_db, margin_db) -> int:
    """2: every other station ``margin_db`` down; 1: heard with another underneath (at least
    :data:`SWAMP_DB` down); 0: swamped.

    >>> [separation_class(x, 20.0) for x in (25.0, 10.0, -3.0)]
    [2, 1, 0]
    """
    return 2 if sep_db >= margin_db else (1 if sep_db >= SWAMP_DB else 0)


def no_worse(row: dict, current: dict) -> bool:
    """Whether a candidate leaves the weakest wanted station no worse off than the site's own parts.

    The station the candidate leaves weakest must get no less than the site's parts give that same
    station (within :data:`NO_WORSE_DB`; a station the parts cannot tune gets nothing from them), and
    no wanted station the site's parts make audible may drop below the audibility threshold. So a
    candidate may reach a station the parts cannot tune at some cost to the others, but never by
    making one that is heard inaudible or by leaving a station weaker than the parts left it.
    """
    if set(row.get("inaudible", ())) - set(current.get("inaudible", ())):
        return False
    tol = 10.0 ** (-NO_WORSE_DB / 10.0)
    return bool(row["weakest_power_w"] >= tol * current["power_w"][row["weakest"]])


def choose(rows, current: dict) -> int:
    """Index of the recommended candidate in ``rows``, or −1 to keep the site's own parts (``current``).

    Among candidates that meet the margin (separated and audible), the most power for the weakest wanted
    station. When none does, never one that is worse for the weakest wanted station than the site's
    own parts (:func:`no_worse`). Of those no worse, the ones that leave the fewest wanted stations
    inaudible, then the best separation class (heard with another underneath beats swamped,
    :func:`separation_class`); of those, the ones within :data:`NO_WORSE_DB` of the most power for the
    weakest wanted station (as loud, to the ear), and of those the best separated; the site's own
    parts when nothing no worse does better. The site's own parts are kept too when they meet the
    margin and give the weakest station more than every candidate that does.
    """
    ok = [k for k, r in enumerate(rows) if r["meets_margin"]]
    if ok:
        best = max(ok, key=lambda k: rows[k]["weakest_power_w"])
        if current["meets_margin"] and current["weakest_power_w"] > rows[best]["weakest_power_w"]:
            return -1
        return best
    if current["meets_margin"]:
        return -1
    pool = [k for k, r in enumerate(rows) if no_worse(r, current)]
    if not pool:
        return -1

    def grade(r):
        return (-len(r.get("inaudible", ())), separation_class(r["worst_separation_db"], np.inf))

    def sep(r):
        return min(r["worst_separation_db"], 1e9)

    top = max(grade(rows[k]) for k in pool)
    pool = [k for k in pool if grade(rows[k]) == top]
    tol = 10.0 ** (-NO_WORSE_DB / 10.0)
    strongest = max(rows[k]["weakest_power_w"] for k in pool)
    near = [k for k in pool if rows[k]["weakest_power_w"] >= tol * strongest]  # as loud, to the ear
    best = max(near, key=lambda k: (sep(rows[k]), rows[k]["weakest_power_w"]))
    if grade(current) > top:
        return -1
    if grade(current) == top and current["weakest_power_w"] >= tol * strongest and sep(current) >= sep(rows[best]):
        return -1
    return best


#: The aerial-side tuned circuit of a proposed double-tuned pair: its tuning capacitor at mid setting. [F]
PRIMARY_TUNING_F = 100e-12


#: Series capacitors tried between the aerial and the aerial-side tuned circuit of a double-tuned pair. [F]
PRIMARY_SERIES_F = (10e-12, 22e-12, 47e-12, 100e-12)


def double_tuned(scene: Scene, inductance, block, detector_tap, wanted, other, self_capacitance=0.0) -> dict:
    """A second tuned circuit ahead of the tank, coupled at critical coupling: computed effect for one pair.

    The aerial reaches its own tuned circuit through a small series capacitor Cs (the best
    separating of :data:`PRIMARY_SERIES_F`); that circuit's coil Lp resonates with the aerial's
    shunt capacitance through Cs plus :data:`PRIMARY_TUNING_F` at the wanted frequency and is
    coupled to the detector's tank (the present coil) at k_c = 1/√(Q1 Q2) [Terman, Radio Engineers'
    Handbook, 1943, from memory], Q1 and Q2 the two circuits' loaded Q each taken alone.
    """
    setups = [_double_tuned_setup(scene, inductance, block, detector_tap, wanted, other, cs, self_capacitance)
              for cs in PRIMARY_SERIES_F]
    return _best_double_tuned(_solve_remedies(scene, setups, wanted, other))


def trap(scene: Scene, parts, wanted, other, kind) -> dict:
    """A wave trap tuned to the interfering station ("parallel": in the aerial lead; "series": lead to earth)."""
    return _solve_remedies(scene, [_trap_setup(scene, parts, wanted, other, kind)], wanted, other)[0]


def remedies(scene: Scene, parts, inductance, block, detector_tap, wanted, other, self_capacitance=0.0) -> list:
    """The usual remedies for one pair one tank cannot separate: [:func:`double_tuned`, the parallel and the
    series :func:`trap`], every variant solved in one stacked pass (the figures each gives alone)."""
    setups = [_double_tuned_setup(scene, inductance, block, detector_tap, wanted, other, cs, self_capacitance)
              for cs in PRIMARY_SERIES_F]
    setups += [_trap_setup(scene, parts, wanted, other, kind) for kind in ("parallel", "series")]
    solved = _solve_remedies(scene, setups, wanted, other)
    n = len(PRIMARY_SERIES_F)
    return [_best_double_tuned(solved[:n])] + solved[n:]


def _best_double_tuned(results) -> dict:
    """The best separating second tuned circuit (then the most power for the wanted station)."""
    best = None
    for r in results:
        if best is None or (r["separation_db"], r["wanted_power_w"]) > (best["separation_db"], best["wanted_power_w"]):
            best = r
    return best


def _solve_remedies(scene: Scene, setups, wanted, other) -> list:
    """Each remedy (its words, network, aerial impedance and EMF at the pair's frequencies) solved, all together."""
    f = scene.frequency[[wanted, other]]
    lv = tn_mod.station_levels_stack(f, np.array([s[3] for s in setups]), np.array([s[2] for s in setups]),
                                     [s[1] for s in setups], scene.diode, scene.load, table=scene.table)
    out = []
    for p, (info, _, _, _) in enumerate(setups):
        own = lv.others[p, 0, 0]
        out.append({**info,
                    "separation_db": float(20.0 * np.log10(own / max(lv.others[p, 0, 1], 1e-300))),
                    "wanted_power_w": float(lv.detector_voltage[p, 0] ** 2 / lv.input_resistance[p, 0]),
                    "wanted_audible": bool(own >= scene.threshold)})
    return out


def _double_tuned_setup(scene, inductance, block, detector_tap, wanted, other, cs, self_capacitance=0.0) -> tuple:
    """The second tuned circuit with series capacitor ``cs`` [F]: (words, network, aerial impedance, EMF)."""
    f = scene.frequency[[wanted, other]]
    fw = f[:1]
    w = 2.0 * np.pi * fw

    def za(x):
        return scene.za(x) + 1.0 / (2j * np.pi * np.asarray(x, dtype=float) * cs)

    y_a = 1.0 / za(fw)
    c_a = np.maximum(np.imag(y_a) / w, 0.0)
    lp = float((1.0 / (w**2 * (c_a + PRIMARY_TUNING_F)))[0])
    q = scene.q_fun(fw)
    g1 = np.real(y_a) + 1.0 / (q * w * lp)
    q1 = float((w * (c_a + PRIMARY_TUNING_F) / g1)[0])
    g_det = 1.0 / (scene.load / 2.0)
    q2 = float((1.0 / (1.0 / q + detector_tap**2 * g_det * w * inductance))[0])
    k = min(float(net_mod.critical_coupling(q1, q2)), 0.9)
    parts = tn_mod.network_parts("separate primary", inductance, scene.q_fun, detector_tap,
                                 primary_inductance=lp, coupling_coefficient=k, block=block,
                                 primary_capacitance=PRIMARY_TUNING_F, self_capacitance=self_capacitance)
    info = {
        "kind": "second tuned circuit",
        "coupling_coefficient": k,
        "series_capacitor_f": float(cs),
        "primary_inductance_h": lp,
        "primary_capacitor_f": PRIMARY_TUNING_F,
        "primary_loaded_q": q1,
        "tank_loaded_q": q2,
    }
    return info, parts, za(f), scene.emf[[wanted, other]]


def _trap_setup(scene: Scene, parts, wanted, other, kind) -> tuple:
    """A wave trap of ``kind`` tuned to the interfering station: (words, network, aerial impedance, EMF)."""
    f_t = float(scene.frequency[other])
    L = TRAP_INDUCTANCE_H
    c = 1.0 / ((2.0 * np.pi * f_t) ** 2 * L)
    r = 2.0 * np.pi * f_t * L / float(np.atleast_1d(scene.q_fun(np.array([f_t])))[0])
    idx = [wanted, other]
    f = scene.frequency[idx]
    scale, z = net_mod.trap_source(f, scene.za(f), kind, L, c, r)
    info = {"kind": f"{kind} trap", "trap_inductance_h": L, "trap_capacitor_f": float(c), "tuned_to_hz": f_t}
    return info, parts, z, scene.emf[idx] * np.abs(scale)
