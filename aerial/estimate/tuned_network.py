"""The receiving network tuned to a frequency: table figures, station levels and interference.

Glue between the network solver (:mod:`aerial.models.network`) and the detector model
(:mod:`aerial.models.detector`): tunes the network to each wanted frequency, finds the
detector's operating point for a station (its RF input resistance depends on the signal
level) and evaluates every other station through the same tuned network. Arrays in, arrays
out; no dicts, no wording.

Voltages are RMS unless said otherwise; the detector model takes the RF peak (√2 × RMS).
"""

from __future__ import annotations

import functools
from typing import Callable

import numpy as np

from aerial.core.arrays import replay_bisection
from aerial.core.records import NamedTuple
from aerial.models import detector as det_mod
from aerial.models import network as net_mod

#: Relative tolerance and iteration limit of the detector operating-point solver.
LEVEL_RTOL = 1e-9
LEVEL_MAX_ITER = 200


def network_parts(arrangement, inductance, q_fun, detector_tap=1.0, tap_fraction=None, series_capacitance=None,
                  primary_inductance=None, coupling_coefficient=None, block=None,
                  primary_capacitance=None, self_capacitance=0.0) -> net_mod.NetworkParts:
    """The network's parts for a coil of ``inductance`` [H] whose unloaded Q is ``q_fun(f)``.

    A separate primary is taken as wound like the tank coil (same Q, an assumption).
    ``self_capacitance`` [F] is the coil's own (Medhurst) capacitance across the whole winding.
    ``inductance``, ``series_capacitance`` or ``coupling_coefficient`` may be an array of values
    (coils wound alike, or candidate parts, solved in one go by :func:`network.solve_network`).

    Examples
    --------
    >>> p = network_parts("coil tap", 200e-6, lambda f: 150.0, 0.5, tap_fraction=0.2)
    >>> round(float(p.coil_resistance(1e6)), 2)  # ωL/Q
    8.38
    """
    if np.ndim(inductance) == 0:
        L = float(inductance)
        coil_r = _shared_loss_resistance(L, q_fun)
    else:
        L = np.asarray(inductance, dtype=float)
        coil_r = _loss_resistance(L, q_fun)
    rp = 0.0 if primary_inductance is None else _shared_loss_resistance(float(primary_inductance), q_fun)
    return net_mod.NetworkParts(arrangement, L, coil_r, float(detector_tap), tap_fraction, series_capacitance,
                                primary_inductance, coupling_coefficient, rp, primary_capacitance,
                                float(self_capacitance), block)


def _loss_resistance(inductance, q_fun: Callable) -> Callable:
    """ωL/Q(f) of a winding (or, for an array of inductances, of each), f -> [ohm].

    A Q the same at every frequency (``q_fun.constant``, a number) divides as that number: the same quotients as
    by an array of it, without the array made at every solve."""
    q = getattr(q_fun, "constant", None)

    def resistance(f):
        return 2.0 * np.pi * np.asarray(f, dtype=float) * inductance / (q_fun(f) if q is None else q)

    return resistance


#: One loss function per winding and Q, so that networks sharing a coil share it (a stacked solve then works it
#: out once).
_shared_loss_resistance = functools.lru_cache(maxsize=256)(_loss_resistance)


class TunedFigures(NamedTuple):
    capacitance: np.ndarray  #: tuning capacitor setting [F]
    detector_per_volt: np.ndarray  #: |V_det| per volt of aerial EMF at the tuned frequency [1]
    loaded_q: np.ndarray  #: f0 / −3 dB bandwidth of the detector voltage [1]
    bandwidth: np.ndarray  #: [Hz]
    wider_than_searched: np.ndarray  #: bandwidth is a floor [bool]
    rejection: dict  #: offset [Hz] -> rejection of the weaker side [dB]


def tuned_figures(frequency, za: Callable, parts: net_mod.NetworkParts, detector_conductance,
                  offsets=(), bandwidth=True) -> TunedFigures:
    """Tune the network to each ``frequency`` and measure its response at the detector.

    Parameters
    ----------
    frequency : ndarray
        [Hz]
    za : callable
        Aerial impedance za(f) -> complex array. [ohm]
    parts : NetworkParts
    detector_conductance : array_like
        The detector's RF input conductance at each frequency (its signal level). [S]
    offsets : sequence of float
        Frequency offsets for the rejection figures. [Hz]
    bandwidth : bool
        Find the −3 dB bandwidth (else loaded Q and bandwidth come back as zeros).

    Returns
    -------
    TunedFigures

    Examples
    --------
    >>> p = network_parts("direct", 240e-6, lambda f: 150.0)
    >>> t = tuned_figures(np.array([1e6]), lambda f: 25 - 1j / (2 * np.pi * f * 100e-12), p, 0.0, [9e3])
    >>> round(float(t.capacitance[0]) * 1e12, 1)  # 1/(ω²L) less the aerial's 100 pF, a little more
    5.6
    """
    f0 = np.asarray(frequency, dtype=float)
    g = np.broadcast_to(np.asarray(detector_conductance, dtype=float), f0.shape)
    c = net_mod.tuning_capacitance_for(f0, za(f0), parts, g)
    c_pos = np.maximum(c, 0.0)

    def response(f):
        return np.abs(net_mod.detector_response(f, za(f), parts, c_pos, g))

    n = f0.size
    probes = [f0] + [p for d in offsets for p in (np.maximum(f0 - d, f0 * 1e-3), f0 + d)]
    every = np.concatenate(probes)
    # one solve for the tuned point and every offset
    levels = np.abs(net_mod.detector_response(every, za(every), parts, np.tile(c_pos, len(probes)),
                                              np.tile(g, len(probes))))
    tuned = levels[:n]
    edges = net_mod.detector_bandwidth(f0, response, tuned=tuned) if bandwidth else _no_edges(f0)
    rej = {}
    for k, d in enumerate(offsets):
        below, above = levels[(1 + 2 * k) * n:(2 + 2 * k) * n], levels[(2 + 2 * k) * n:(3 + 2 * k) * n]
        rej[d] = net_mod.rejection_db(tuned, (below, above))
    return TunedFigures(c, tuned, edges.loaded_q, edges.bandwidth, edges.wider_than_searched, rej)


def _no_edges(f0):
    zero = np.zeros_like(f0)
    return net_mod.TunedResponse(zero, zero, zero, zero, np.zeros(f0.shape, dtype=bool))


def input_resistance_table(diode: det_mod.Diode, load, points=361):
    """The detector's RF input resistance on a log grid of RMS voltage, 1 nV to 1 kV, for fast look-up.

    Returns
    -------
    (ndarray, ndarray)
        ln V [ln V] and ln R_in [ln ohm], for ``np.interp``.

    Examples
    --------
    >>> lv, lr = input_resistance_table(det_mod.get_diode("germanium"), 10e3)
    >>> round(float(np.exp(lr[-1])) / 5e3, 2)  # strong signal: R_L/2
    1.0
    """
    v = np.geomspace(1e-9, 1e3, int(points))
    r = det_mod.loaded_detector(np.sqrt(2.0) * v, diode.saturation_current_a, diode.ideality, float(load)).input_resistance
    return np.log(v), np.log(r)


def weak_signal_conductance(diode: det_mod.Diode) -> float:
    """The detector's RF input conductance for a vanishing signal, Is/(nVT). [S]

    Worked out once per diode (the searches ask for it for every candidate).

    Examples
    --------
    >>> d = det_mod.get_diode("germanium")
    >>> weak_signal_conductance(d) > 0
    True
    """
    return _weak_signal_conductance(float(diode.saturation_current_a), float(diode.ideality))


@functools.lru_cache(maxsize=64)
def _weak_signal_conductance(saturation_current, ideality) -> float:
    return float(1.0 / det_mod.loaded_detector(0.0, saturation_current, ideality, 1e4).input_resistance)


def detector_level(open_voltage, source_impedance, diode, load, rtol=LEVEL_RTOL, max_iter=LEVEL_MAX_ITER,
                   table=None):
    """RMS detector voltage V with V·|1 + Z_s/R_in(√2 V)| = V_open (bisection in log V).

    Parameters
    ----------
    open_voltage : ndarray
        RMS voltage at the detector's tap with the detector removed. [V]
    source_impedance : ndarray of complex
        Impedance seen by the detector (Re ≥ 0). [ohm]
    diode : Diode
    load : float
        Earphone resistance. [ohm]
    table : (ndarray, ndarray), optional
        From :func:`input_resistance_table`: look R_in up instead of solving the detector
        (for design searches; interpolation error well under 1 %).

    Returns
    -------
    (ndarray, ndarray, bool)
        V [V], the detector's RF input resistance at that level [ohm], converged.

    Examples
    --------
    >>> d = det_mod.get_diode("germanium")
    >>> v, r, ok = detector_level(np.array([1.0]), np.array([10e3 + 0j]), d, 10e3)
    >>> ok and 0.3 < float(v[0]) < 0.5  # R_in near R_L/2 = 5 kΩ: about a third of the open voltage
    True
    """
    v0 = np.asarray(open_voltage, dtype=float)
    z = np.asarray(source_impedance, dtype=complex)
    hi = np.maximum(v0, 1e-30)
    lo = hi * 1e-12
    def r_of(v):
        if table is not None:
            return np.exp(np.interp(np.log(v), table[0], table[1]))
        return det_mod.loaded_detector(np.sqrt(2.0) * v, diode.saturation_current_a, diode.ideality, load).input_resistance

    def below(v):  # v is not above the level: v·|1 + Z_s/R_in| has not passed the open voltage
        return ~(v * np.abs(1.0 + z / r_of(v)) - v0 > 0)

    # the level pinned down first (a few calls of the detector model, from the input resistance's two limits: a
    # vanishing signal's and a strong one's, R_L/2), then the bisection's halvings replayed against it: the
    # bisection's very brackets
    limits = (np.exp(table[1][0]), np.exp(table[1][-1])) if table is not None else (
        1.0 / weak_signal_conductance(diode), 0.5 * np.asarray(load, dtype=float))
    with np.errstate(all="ignore"):  # a level that cannot be pinned (no signal, say) keeps the plain bisection
        a, b = _pinned_level(v0, z, lo, hi, r_of, limits)
    lo, hi = replay_bisection(lo, hi, a, b, below, int(max_iter),
                              done=lambda g, b: bool((b / g - 1.0 <= rtol).all()))
    v = np.sqrt(lo * hi)
    return v, r_of(v), bool(np.all(hi / lo - 1.0 <= rtol))


#: Secant steps in ln V at most, and the relative half-width of the bracket checked around their result, in
#: :func:`_pinned_level`.
PIN_STEPS = 12
PIN_HALF_WIDTH = 1e-12


def _pinned_level(v0, z, lo, hi, r_of, limits):
    """Each detector level bracketed tightly: (passing end, failing end) of :func:`detector_level`'s test ``below``
    [V], or the bisection's own ends (``lo``, ``hi``) where none was found.

    The level V solves ln(V·|1 + Z_s/R_in(V)|) = ln V_open; R_in lies between its weak- and strong-signal
    ``limits`` [ohm], so V_open/|1 + Z_s/R| at those two starts a secant in ln V, which ends with the test at
    V·(1 ∓ 1e-12). The bracket is then narrowed by the bisection's own halvings
    (:func:`aerial.core.arrays.replay_bisection`), so the level is the plain bisection's.

    References
    ----------
    W. H. Press et al., Numerical Recipes, 3rd ed., 2007, section 9.2 (the secant method); from memory.
    Checked against the plain bisection in tests/test_station_design.py.
    """
    r_ends = np.stack([np.broadcast_to(limits[0], np.shape(v0)), np.broadcast_to(limits[1], np.shape(v0))])
    u = np.log(v0 / np.abs(1.0 + z / r_ends))  # two starting points, (2, ...)
    log_v0 = np.log(v0)

    def gap(v):
        return np.log(v * np.abs(1.0 + z / r_of(v))) - log_v0

    u0, u1 = u[0], u[1]
    g = gap(np.exp(u))
    g0, g1 = g[0], g[1]
    a, b = lo.copy(), hi.copy()
    for _ in range(PIN_STEPS):
        flat = g1 == g0
        u2 = np.where(flat, u1, u1 - g1 * (u1 - u0) / np.where(flat, 1.0, g1 - g0))
        v = np.exp(u2)
        trial = np.stack([v, v * (1.0 - PIN_HALF_WIDTH), v * (1.0 + PIN_HALF_WIDTH)])
        level = trial * np.abs(1.0 + z / r_of(trial))
        ok = ~(level - v0 > 0)
        pinned = ok[1] & ~ok[2] & (lo < trial[1]) & (trial[2] < hi)
        a, b = np.where(pinned, trial[1], a), np.where(pinned, trial[2], b)
        if pinned.all():
            break
        u0, g0, u1, g1 = u1, g1, u2, np.log(level[0]) - log_v0
    return a, b


class StationLevels(NamedTuple):
    capacitance: np.ndarray  #: tuning capacitor setting for each station [F]
    detector_voltage: np.ndarray  #: RMS at the detector [V]
    input_resistance: np.ndarray  #: detector RF input resistance at that level [ohm]
    top_voltage: np.ndarray  #: RMS at the tank top [V]
    converged: bool
    loaded_q: np.ndarray  #: at the station's own level [1]
    bandwidth: np.ndarray  #: [Hz]
    others: np.ndarray  #: (n, n): RMS detector voltage of station j while tuned to station i [V]


def station_levels(frequency, open_circuit_voltage, za: Callable, parts: net_mod.NetworkParts, diode,
                   load, passes=2, bandwidth=True, table=None) -> StationLevels:
    """Tune to each station in turn: its detector level, selectivity, and every other station's level.

    Parameters
    ----------
    frequency : ndarray
        Station frequencies. [Hz]
    open_circuit_voltage : ndarray
        Aerial EMF of each station, RMS. [V]
    za : callable
        Aerial impedance za(f). [ohm]
    parts : NetworkParts
    diode : Diode
    load : float
        Earphone resistance. [ohm]
    passes : int
        Tune-and-solve passes (the second retunes at the solved detector level).
    bandwidth : bool
        Find each station's −3 dB bandwidth (else zeros).
    table : optional
        Detector look-up table (:func:`input_resistance_table`) for fast searches.

    Returns
    -------
    StationLevels

    Notes
    -----
    The tuning is found with the detector at its weak-signal conductance, the operating point
    solved, then the tuning and the operating point found again at that level. The other
    stations pass through the network tuned to the wanted one, with the detector held at the
    wanted station's input resistance (a weaker carrier rides on the stronger one), linearly:
    the detector's mixing of the two is not modelled.

    Examples
    --------
    >>> d = det_mod.get_diode("germanium")
    >>> p = network_parts("direct", 240e-6, lambda f: 150.0, 0.5)
    >>> za = lambda f: 25 - 1j / (2 * np.pi * f * 150e-12)
    >>> s = station_levels(np.array([6e5, 1e6]), np.array([0.05, 0.01]), za, p, d, 10e3)
    >>> bool(s.others[1, 0] < s.detector_voltage[0])
    True
    """
    fs = np.asarray(frequency, dtype=float)
    v_oc = np.asarray(open_circuit_voltage, dtype=float)
    z_s = za(fs)
    g = np.full(fs.shape, weak_signal_conductance(diode))
    converged = True
    w = 2.0 * np.pi * fs
    # one solve of the bare network (no capacitor, no detector) serves every pass and the cross levels: the
    # detector's conductance and the capacitor are added to it as changes of rank one
    open_net = net_mod.solve_network(fs, z_s, parts, 0.0, 0.0)
    for _ in range(max(int(passes), 1)):
        c = np.maximum(_tuning_capacitance(open_net, w, g), 0.0)
        tuned_v, tuned_z = _with_capacitor(open_net, w, c)
        v, r_in, ok = detector_level(v_oc * np.abs(tuned_v), tuned_z, diode, load, table=table)
        g = 1.0 / r_in
        converged = ok
    if bandwidth:
        c_raw = _tuning_capacitance(open_net, w, g)
        tuned = net_mod.solve_network(fs, z_s, parts, c, g)  # its detector voltage is detector_response's, bit for bit
        top = v_oc * np.abs(tuned.top_voltage)
    else:  # a design search: the tuning of the last pass and no top voltage
        c_raw, top = c, np.zeros_like(fs)

    def response(f):
        return np.abs(net_mod.detector_response(f, za(f), parts, c, g))

    edges = net_mod.detector_bandwidth(fs, response, tuned=np.abs(tuned.detector_voltage)) if bandwidth else \
        _no_edges(fs)
    # every station j through the network tuned to station i: one bare solve per station, each tuning
    # added as a change of rank two (network.retuned_detector_voltage)
    cross = net_mod.retuned_detector_voltage(open_net, fs[np.newaxis, :], c[:, np.newaxis], g[:, np.newaxis])
    others = v_oc[np.newaxis, :] * np.abs(cross)
    return StationLevels(c_raw, v, r_in, top, converged, edges.loaded_q, edges.bandwidth, others)


def station_levels_stack(frequency, open_circuit_voltage, za: Callable, parts_stack, diode, load,
                         table=None) -> StationLevels:
    """:func:`station_levels` of a design search (one pass, no bandwidth) for many networks at once.

    Parameters
    ----------
    frequency, diode, load, table
        As :func:`station_levels`; the same stations for every network.
    open_circuit_voltage : ndarray, shape (n,) or (P, n)
        Aerial EMF of each station, RMS, for every network or for each. [V]
    za : callable, or ndarray of complex, shape (P, n)
        Aerial impedance za(f), or each network's source impedance at the stations. [ohm]
    parts_stack : sequence of NetworkParts, or NetworkStack
        P networks (couplings, taps, coils), or them prepared (:func:`aerial.models.network.plan_network_stack`).

    Returns
    -------
    StationLevels
        Row p of every array (``others``: (P, n, n)) is what :func:`station_levels` with
        ``passes=1, bandwidth=False`` gives for ``parts_stack[p]``; ``converged`` covers them all.

    Notes
    -----
    The same steps as :func:`station_levels`, each taken for every network together
    (:func:`aerial.models.network.solve_network_stack`): one stacked solve of the bare networks, the
    weak-signal tuning and the tuned networks from it (the detector's conductance and the capacitor
    added as changes of rank one), the detector's operating point of every network and station in one
    bisection.

    Examples
    --------
    >>> d = det_mod.get_diode("germanium")
    >>> ps = [network_parts("direct", 240e-6, lambda f: 150.0, m) for m in (0.5, 1.0)]
    >>> za = lambda f: 25 - 1j / (2 * np.pi * f * 150e-12)
    >>> s = station_levels_stack(np.array([6e5, 1e6]), np.array([0.05, 0.01]), za, ps, d, 10e3)
    >>> s.others.shape
    (2, 2, 2)
    """
    fs = np.asarray(frequency, dtype=float)
    v_oc = np.asarray(open_circuit_voltage, dtype=float)
    plan = parts_stack if isinstance(parts_stack, net_mod.NetworkStack) else net_mod.plan_network_stack(parts_stack)
    n_p = plan.size
    z_s = za(fs) if callable(za) else np.asarray(za, dtype=complex)
    g = np.full((n_p,) + fs.shape, weak_signal_conductance(diode))
    # one stacked solve of the bare networks (no capacitor, no detector); the detector's weak-signal
    # conductance and the tuning capacitor added to it as changes of rank one
    open_net = net_mod.solve_network_stack(fs, z_s, plan, 0.0, 0.0, outputs=net_mod.RETUNED_FIELDS)
    w = 2.0 * np.pi * fs
    c = np.maximum(_tuning_capacitance(open_net, w, g), 0.0)
    tuned_v, tuned_z = _with_capacitor(open_net, w, c)
    v, r_in, ok = detector_level(v_oc * np.abs(tuned_v), tuned_z, diode, load, table=table)
    g = 1.0 / r_in
    open_net = net_mod.NetworkSolution(*(None if x is None else x[:, np.newaxis, :] for x in open_net))
    cross = net_mod.retuned_detector_voltage(open_net, fs[np.newaxis, np.newaxis, :], c[:, :, np.newaxis],
                                             g[:, :, np.newaxis])
    others = v_oc[..., np.newaxis, :] * np.abs(cross)
    zero = np.zeros_like(c)
    return StationLevels(c, v, r_in, zero, ok, zero, zero, others)


def _tuning_capacitance(bare, w, g):
    """:func:`aerial.models.network.tuning_capacitance_for` with detector conductance ``g`` [S], from a bare
    network's solve (:data:`aerial.models.network.RETUNED_FIELDS`): the top's impedance with the conductance
    added at the detector's tap (a change of rank one, by the Sherman–Morrison formula). [F]

    References
    ----------
    G. H. Golub, C. F. Van Loan, Matrix Computations, 3rd ed., 1996, section 2.1.3 (the Sherman–Morrison
    formula); checked against a direct solve in tests/test_station_design.py.
    """
    z_top = bare.top_impedance - bare.top_per_detector_current * (g / (1.0 + g * bare.detector_impedance)) * \
        bare.detector_per_top_current
    return -np.imag(1.0 / z_top) / w


def _with_capacitor(bare, w, c) -> tuple:
    """The detector voltage and the detector's driving-point impedance of a bare network (no capacitor, no
    detector: a solve with :data:`aerial.models.network.RETUNED_FIELDS`) with a tuning capacitor ``c`` [F]
    added across the coil at angular frequency ``w`` [rad/s]: a change of rank one, by the Sherman–Morrison
    formula (as :func:`aerial.models.network.retuned_detector_voltage`, with no detector conductance), which
    spares a second solve of the network. Detector voltage per volt of aerial EMF [1]; impedance [ohm].

    References
    ----------
    G. H. Golub, C. F. Van Loan, Matrix Computations, 3rd ed., 1996, section 2.1.3 (the Sherman–Morrison
    formula); checked against a direct solve in tests/test_station_design.py.
    """
    d = 1j * w * c
    k = bare.detector_per_top_current * (d / (1.0 + d * bare.top_impedance))
    return bare.detector_voltage - k * bare.top_voltage, bare.detector_impedance - k * bare.top_per_detector_current


def rejection_stack(frequency, za: Callable, parts_stack, detector_conductance, offsets) -> dict:
    """:func:`tuned_figures` without the bandwidth for many networks at once: the rejections only.

    Parameters
    ----------
    frequency : ndarray, shape (m,)
        Tuned frequencies, the same for every network. [Hz]
    za : callable
        Aerial impedance za(f). [ohm]
    parts_stack : sequence of NetworkParts, or NetworkStack
        P networks.
    detector_conductance : ndarray, shape (P, m)
        [S]
    offsets : sequence of float
        [Hz]

    Returns
    -------
    dict
        offset [Hz] -> rejection of the weaker side [dB], shape (P, m): row p as
        :func:`tuned_figures` gives it for ``parts_stack[p]``.

    Examples
    --------
    >>> ps = [network_parts("direct", 240e-6, lambda f: 150.0, m) for m in (0.3, 1.0)]
    >>> za = lambda f: 25 - 1j / (2 * np.pi * f * 150e-12)
    >>> r = rejection_stack(np.array([8e5]), za, ps, np.full((2, 1), 1e-4), [9e3])
    >>> r[9e3].shape
    (2, 1)
    """
    f0 = np.asarray(frequency, dtype=float)
    g = np.asarray(detector_conductance, dtype=float)
    plan = parts_stack if isinstance(parts_stack, net_mod.NetworkStack) else net_mod.plan_network_stack(parts_stack)
    n = f0.size
    probes = [f0] + [p for d in offsets for p in (np.maximum(f0 - d, f0 * 1e-3), f0 + d)]
    every = np.concatenate(probes)
    # one bare solve at every probe (the tuned frequencies first); the detector's conductance and the
    # tuning capacitor added to it as changes of rank one and two (network.retuned_detector_voltage)
    bare = net_mod.solve_network_stack(every, za(every), plan, 0.0, 0.0, outputs=net_mod.RETUNED_FIELDS)
    at_f0 = net_mod.NetworkSolution(*(None if x is None else x[:, :n] for x in bare))
    c_pos = np.maximum(_tuning_capacitance(at_f0, 2.0 * np.pi * f0, g), 0.0)
    reps = len(probes)
    levels = np.abs(net_mod.retuned_detector_voltage(bare, every, np.tile(c_pos, (1, reps)), np.tile(g, (1, reps))))
    tuned = levels[:, :n]
    return {d: net_mod.rejection_db(tuned, (levels[:, (1 + 2 * k) * n:(2 + 2 * k) * n],
                                            levels[:, (2 + 2 * k) * n:(3 + 2 * k) * n]))
            for k, d in enumerate(offsets)}
