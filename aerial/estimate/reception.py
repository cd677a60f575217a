"""From aerial to earphone: tuning design, calibration and station verdicts for a diode-detector receiver.

Pure combination layer: named tuples in, JSON-ready dicts out (plain floats,
lists and strings, never null: a figure that is not known is left out; every
key carries its unit: ``_hz``, ``_f``, ``_h``, ``_ohm``,
``_v``, ``_w``, ``_db``, ``_v_per_m``, ``_m``; ``_ratio`` for dimensionless
fractions, ``_q`` for quality factors). No I/O, no printing. Values that would
not be finite are clamped and flagged in ``warnings``.

The aerial arrives as arrays on a frequency grid: series resistance (radiation
plus every loss) [ohm], series reactance [ohm], radiation resistance [ohm] and
effective height [m]. Values at other frequencies are interpolated linearly on
the grid (``np.interp``); frequencies outside the grid take the nearest edge
value and are flagged (the report's glue, :mod:`aerial.estimate.receiver`, adds
each out-of-grid station's own frequency to the grid first).

Assumptions (stated, not published figures) are module constants below.
"""

from __future__ import annotations

import functools
import math

import numpy as np

from aerial.core.arrays import bisect_ahead, pin_crossing, replay_bisection, sorted_unique
from aerial.core.errors import ModelInputError
from aerial.core.records import NamedTuple
from aerial.core.units import si_text
from aerial.models import atmospheric_noise as atm_mod
from aerial.models import detector as det_mod
from aerial.models import groundwave as gw_mod
from aerial.models import network as net_mod
from aerial.models import noise as noise_mod
from aerial.models import tank as tank_mod
from aerial.models.winding import CoilWinding
from aerial.estimate import station_design as sd_mod
from aerial.estimate import tuned_network as tn_mod

#: Said of a tuning row whose -3 dB edges were not both found: the search of
#: :func:`aerial.models.network.detector_bandwidth` runs from f/3 to 3f.
BANDWIDTH_LOWER_BOUND_NOTE = ("a -3 dB edge lies beyond the searched range (from a third of the frequency to three "
                              "times it): the bandwidth is a lower bound")

#: Unloaded Q assumed for a coil given only by its inductance (assumption; common practice:
#: a good air-cored MF coil reaches Q of 100-300).
DEFAULT_COIL_Q = 150.0

#: Audio power into the earphone taken as just audible (ASSUMPTION: a sensitive earphone giving
#: about 100 dB SPL for 1 mW makes 1e-10 W about 30 dB SPL: faint, but audible in a quiet room).
#: Chosen within the plausible range so that heard ranges agree with common practice. [W]
AUDIBLE_POWER_W = 1e-10
#: Audio power taken as clearly heard (ASSUMPTION: about 50 dB SPL with the same earphone). [W]
CLEAR_POWER_W = 1e-8
#: Carrier-to-noise ratio in the tank's −3 dB bandwidth for "marginal" (assumption). [dB]
MARGINAL_SNR_DB = 6.0
#: Carrier-to-noise ratio in the tank's −3 dB bandwidth for "clearly heard" (assumption). [dB]
CLEAR_SNR_DB = 20.0

#: Earphones below this impedance are treated as low-impedance headphones. [ohm]
LOW_IMPEDANCE_EARPHONE_OHM = 600.0

#: Relative tolerance and iteration limit of the tank-voltage solver.
VOLTAGE_RTOL = 1e-9
VOLTAGE_MAX_ITER = 200
#: Halvings looked ahead per call of the model in the bisections here (2**LOOKAHEAD − 1 trial values per call).
LOOKAHEAD = 5
#: The same for the part-value ranges of :func:`_ok_range` (by default), whose every trial value is as a rule a
#: network solved over the band's check grid (hundreds of frequencies): looking further ahead costs more in trial
#: values, and in the page faults of their large temporary arrays, than it saves in calls (the answer is the same
#: at any depth).
RANGE_LOOKAHEAD = 2

#: A designed coil that cannot cover the whole band is made this fraction of the largest
#: inductance that reaches the top edge (room for whole turns and strays). [1]
DESIGN_MARGIN = 0.93

#: Largest magnitude written to a result; anything larger is clamped and flagged.
CLAMP = 1e30

#: Verdicts a station can get: heard (clearly, or marginal), heard with another listed station
#: underneath, swamped by one, out of the tuning range, below the noise, or too little audio.
VERDICTS = ("clearly heard", "marginal", "heard with interference", "swamped", "out of the tuning range",
            "below the noise", "not heard")

#: How far below the wanted station every other listed station should stay at the detector for
#: listening to be undisturbed (ASSUMPTION, overridable with [receiver] interference_margin: an
#: interferer 20 dB down is heard only in the pauses; broadcast planning asks about 26-30 dB for
#: co-channel protection, from memory, a crystal-set listener settles for less). [dB]
DEFAULT_INTERFERENCE_MARGIN_DB = 20.0
#: An interferer less than this far below the wanted station (or above it) swamps it. [dB]
SWAMP_DB = sd_mod.SWAMP_DB

LOW_IMPEDANCE_NOTE = (
    "low-impedance headphones (about 32 Ω) hear almost nothing from an unpowered receiver: as the detector's "
    "load they pull its RF input resistance down to about half their impedance (~16 Ω), which short-circuits a "
    "tank whose resonant resistance is tens of kilohms, and the little audio left is delivered at a fraction "
    "of a millivolt; use a high-impedance earphone, or a matching (audio) transformer of about 100:1 in "
    "impedance between detector and headphones"
)


class Calibration(NamedTuple):
    """A measured resonance with the aerial connected.

    Attributes
    ----------
    coil_inductance_h : float
        Inductance of the coil used in the measurement. [H]
    capacitor_setting_f : float
        Tank capacitor setting where the station peaked. [F]
    frequency_hz : float
        Frequency of the station that peaked. [Hz]
    bandwidth_hz : float or None
        Measured −3 dB bandwidth at that setting (gives the aerial's loss). [Hz]
    """

    coil_inductance_h: float
    capacitor_setting_f: float
    frequency_hz: float
    bandwidth_hz: float | None = None


class TuningParts(NamedTuple):
    """The receiver's tuning parts, detector and earphone.

    Attributes
    ----------
    arrangement : str
        Coupling: "direct", "series capacitor", "coil tap" or "separate primary".
    coil_inductance_h : float or None
        Tank coil inductance when known. [H]
    coil : CoilWinding or None
        The coil's winding; with ``turns`` it gives the inductance and the Q,
        without ``turns`` it is the former and wire for a coil to be designed.
    coil_unloaded_q : float or None
        Coil Q when known (used when the winding is not given). [1]
    capacitor_min_f, capacitor_max_f : float or None
        Variable capacitor range. [F]
    series_capacitance_f : float or None
        Coupling capacitor for "series capacitor". [F]
    tap_fraction : float or None
        Aerial tap as a fraction of the turns from the earthy end, for "coil tap". [1]
    primary_inductance_h : float or None
        Primary winding for "separate primary". [H]
    coupling_coefficient : float or None
        Coupling k between primary and tank coil for "separate primary". [1]
    detector : str
        Diode preset: "germanium", "schottky" or "silicon".
    diode_saturation_current_a, diode_ideality : float or None
        Override the preset's Shockley parameters. [A], [1]
    earphone_ohm : float
        Earphone impedance, the detector's load. [ohm]
    detector_tap_fraction : float
        The detector's tap on the coil as a fraction of the turns (1 = top). [1]
    calibration : Calibration or None
        A measured resonance; its aerial capacitance (and loss, with a bandwidth)
        replaces the computed aerial reactance (and resistance).
    interference_margin_db : float or None
        How far below the wanted station every other listed station must stay at the
        detector; None for :data:`DEFAULT_INTERFERENCE_MARGIN_DB`. [dB]
    capacitor_assumed : bool
        True when the site gave neither coil nor capacitor and the capacitor range is a common one
        assumed for it (the coil then designed): the words say "the assumed parts", never "yours".
    detector_tap_designed : bool
        True when ``detector_tap_fraction`` was chosen by :func:`design_coupling` with a coil still to
        be designed (the site gave none): the words say the tap is designed, never the site's.
    """

    arrangement: str = "direct"
    coil_inductance_h: float | None = None
    coil: CoilWinding | None = None
    coil_unloaded_q: float | None = None
    capacitor_min_f: float | None = None
    capacitor_max_f: float | None = None
    series_capacitance_f: float | None = None
    tap_fraction: float | None = None
    primary_inductance_h: float | None = None
    coupling_coefficient: float | None = None
    detector: str = "germanium"
    diode_saturation_current_a: float | None = None
    diode_ideality: float | None = None
    earphone_ohm: float = 10e3
    detector_tap_fraction: float = 1.0
    calibration: Calibration | None = None
    interference_margin_db: float | None = None
    capacitor_assumed: bool = False
    detector_tap_designed: bool = False


class Station(NamedTuple):
    """A transmitter to assess.

    Attributes
    ----------
    name : str
    frequency_hz : float
        Carrier frequency. [Hz]
    power_w : float
        Radiated power (as from a short vertical). [W]
    distance_m : float
        Distance from the receiver. [m]
    soil_relative_permittivity : float
        Path ground permittivity. [1]
    soil_conductivity_s_per_m : float
        Path ground conductivity. [S/m]
    sky_wave_field_v_per_m : float
        Sky-wave field arriving as well as the ground wave (by night); the two
        add in power. 0 by day. [V/m]
    atmospheric_noise_db : float or None
        Atmospheric noise figure Fam at the station's frequency, added in power
        to the man-made noise; None leaves man-made noise alone. [dB]
    effective_height_m : float or None
        The aerial's effective height for a wave from this station's own
        bearing (a full-wave solution with the building beside the wire);
        None takes the aerial's effective height at the station's frequency. [m]
    """

    name: str
    frequency_hz: float
    power_w: float
    distance_m: float
    soil_relative_permittivity: float
    soil_conductivity_s_per_m: float
    sky_wave_field_v_per_m: float = 0.0
    atmospheric_noise_db: float | None = None
    effective_height_m: float | None = None


# ----------------------------------------------------------------------------------------- helpers


def _num(value, name: str, warnings: list) -> float:
    v = float(value)
    if not math.isfinite(v) or abs(v) > CLAMP:
        clamped = 0.0 if math.isnan(v) else float(np.clip(v, -CLAMP, CLAMP))
        warnings.append(f"{name} was not finite or out of range and was clamped to {clamped:g}")
        return clamped
    return v


def _nums(values, name: str, warnings: list) -> list:
    return [_num(v, name, warnings) for v in np.ravel(values)]


class _Aerial:
    """Aerial arrays on the grid, with interpolation and optional calibration overrides."""

    def __init__(self, frequency_hz, r_ohm, x_ohm, rr_ohm=None, he_m=None):
        self.f = np.asarray(frequency_hz, dtype=float).ravel()
        if self.f.size < 1 or not np.all(np.isfinite(self.f)) or np.any(self.f <= 0):
            raise ModelInputError("frequency_hz must be a non-empty array of positive frequencies")
        if self.f.size > 1 and np.any(np.diff(self.f) <= 0):
            raise ModelInputError("frequency_hz must be strictly increasing")
        self.r = self._arr(r_ohm, "aerial_r_ohm", positive=True)
        self.x = self._arr(x_ohm, "aerial_x_ohm")
        self.rr = None if rr_ohm is None else self._arr(rr_ohm, "aerial_rr_ohm", nonneg=True)
        self.he = None if he_m is None else self._arr(he_m, "effective_height_m", nonneg=True)
        self.cal_capacitance = None
        self.cal_resistance = None
        self._complex: dict = {}  # complex_impedance's values per frequency grid

    def _arr(self, v, name, positive=False, nonneg=False):
        a = np.broadcast_to(np.asarray(v, dtype=float), self.f.shape).copy()
        if not np.all(np.isfinite(a)):
            raise ModelInputError(f"{name} must be finite at every frequency")
        if positive and np.any(a <= 0):
            raise ModelInputError(f"{name} must be positive (it includes every loss) at every frequency")
        if nonneg and np.any(a < 0):
            raise ModelInputError(f"{name} must not be negative")
        return a

    def outside(self, f):
        f = np.asarray(f, dtype=float)
        return (f < self.f[0] * (1 - 1e-9)) | (f > self.f[-1] * (1 + 1e-9))

    def impedance(self, f):
        f = np.asarray(f, dtype=float)
        r = np.interp(f, self.f, self.r)
        x = np.interp(f, self.f, self.x * self.f) / f  # X·f interpolated: exact for a capacitive aerial
        if self.cal_capacitance is not None:
            x = -1.0 / (2.0 * np.pi * f * self.cal_capacitance)
        if self.cal_resistance is not None:
            r = np.full_like(f, self.cal_resistance)
        return r, x

    def complex_impedance(self, f):
        """Ra + jXa at ``f`` [ohm] (:meth:`impedance`), read-only, remembered per frequency grid and calibration:
        the searches solve the network on the same few grids again and again."""
        f = np.asarray(f, dtype=float)
        key = (f.shape, f.tobytes(), None if self.cal_capacitance is None else float(self.cal_capacitance),
               None if self.cal_resistance is None else float(self.cal_resistance))
        z = self._complex.get(key)
        if z is None:
            if len(self._complex) > 64:
                self._complex.clear()
            r, x = self.impedance(f)
            z = r + 1j * x
            z.setflags(write=False)
            self._complex[key] = z
        return z

    def radiation_resistance(self, f):
        return np.interp(f, self.f, self.rr)

    def effective_height(self, f):
        return np.interp(f, self.f, self.he)


class _Coil:
    def __init__(self, inductance, q_fun, info, notes, block=None, self_capacitance=0.0):
        self.inductance = float(inductance)
        self.q = q_fun
        self.info = info
        self.notes = notes
        self.block = block  # F(x): inductance of a block of a fraction x of the turns [H]; None: tight
        self.self_capacitance = float(self_capacitance)  # across the winding (Medhurst) [F]; 0 when not known
        self.design_notes: list = []  # how a designed coil was chosen (said before ``notes``)

    def resistance(self, f):
        return 2.0 * np.pi * np.asarray(f, dtype=float) * self.inductance / self.q(f)


class _ConstantQ:
    """A coil's unloaded Q the same at every frequency: q(f) [1] in the shape of ``f``; ``constant``, the number
    (a loss worked out from it divides by the number, :func:`tuned_network.network_parts`: the same figures)."""

    def __init__(self, q):
        self.constant = float(q)

    def __call__(self, f):
        return np.full(np.shape(np.asarray(f, dtype=float)), self.constant)


def _constant_q(q):
    return _ConstantQ(q)


def _coil_from_winding(w: CoilWinding, inductance=None, design_freq=1e6):
    from aerial.models import coil as coil_mod  # loaded for a coil to work out only

    notes = []
    pitch = w.pitch()
    if w.turns is None:
        design = coil_mod.winding_for_inductance(inductance, w.form_diameter_m, w.wire_diameter_m, pitch)
        turns = design.turns_whole
        if not design.converged:
            notes.append("the turns solver did not converge; the winding is approximate")
        L = design.inductance_whole
    else:
        turns = float(w.turns)
        L = float(coil_mod.solenoid_inductance(w.form_diameter_m, w.wire_diameter_m, turns, pitch))
        if inductance is not None:
            L = float(inductance)
    loss_args = dict(form_diameter=w.form_diameter_m, wire_diameter=w.wire_diameter_m, turns=turns, pitch=pitch,
                     strands=w.strands, strand_diameter=w.strand_diameter_m, resistivity=w.resistivity_ohm_m)
    notes.extend(coil_mod.coil_loss(design_freq, L, **loss_args).warnings)

    def q_fun(f):
        return coil_mod.coil_loss(np.asarray(f, dtype=float), L, **loss_args).unloaded_q

    d_sheet = w.form_diameter_m + w.wire_diameter_m
    wheeler = coil_mod.wheeler_inductance(d_sheet, turns * pitch, turns)
    c_self = coil_mod.medhurst_self_capacitance(d_sheet, turns * pitch)
    note = coil_mod.self_capacitance_note(c_self, d_sheet, turns * pitch)
    if note:
        notes.append(note)
    info = {
        "turns": float(turns),
        "winding_length_m": float(turns * pitch),
        "pitch_m": float(pitch),
        "form_diameter_m": float(w.form_diameter_m),
        "wire_diameter_m": float(w.wire_diameter_m),
        "wire_length_m": float(turns * np.pi * d_sheet),
        "strands": int(w.strands),
        "inductance_wheeler_h": float(wheeler.inductance),
        "wheeler_within_stated_accuracy": bool(wheeler.within_stated_accuracy),
        "self_capacitance_f": float(c_self.capacitance),
        "self_capacitance_source": "Medhurst 1947, from the winding",
        "self_resonance_hz": float(tank_mod.resonant_frequency(L, float(c_self.capacitance))),
    }
    if w.strands > 1:
        rng = coil_mod.stranded_advantage_range(w.form_diameter_m, w.wire_diameter_m, turns, w.strands,
                                                w.strand_diameter_m, pitch, w.resistivity_ohm_m)
        if rng.better_up_to is not None:
            info["stranded_better_up_to_hz"] = float(rng.better_up_to)
            notes.append(
                f"stranded wire: loses less than solid wire of the same size only up to about "
                f"{rng.better_up_to / 1e3:.0f} kHz; above that the strands' proximity loss outweighs the gain"
            )
    return L, q_fun, info, notes, _winding_block(w, turns, pitch, L), float(c_self.capacitance)


def _winding_block(w: CoilWinding, turns, pitch, L):
    """F(x) of a single-layer winding (Nagaoka), scaled so that F(1) is the coil's inductance."""
    from aerial.models import coil as coil_mod

    whole = float(coil_mod.solenoid_inductance(w.form_diameter_m, w.wire_diameter_m, turns, pitch))

    @functools.lru_cache(maxsize=256)  # the same few tap positions come back in every search
    def block(x):
        x = float(x)
        if x <= 0:
            return 0.0
        return float(coil_mod.solenoid_inductance(w.form_diameter_m, w.wire_diameter_m, x * turns, pitch)) * L / whole

    return block


def _coil_given(parts: TuningParts) -> bool:
    """Whether the site gives its coil (an inductance, or a winding with its turns) rather than one to design."""
    return parts.coil_inductance_h is not None or (parts.coil is not None and parts.coil.turns is not None)


def _resolve_coil(parts: TuningParts, inductance=None) -> _Coil:
    """The tank coil: given, from its winding, or designed for ``inductance``."""
    notes = []
    w = parts.coil
    L_given = parts.coil_inductance_h
    if L_given is None and inductance is None and (w is None or w.turns is None):
        raise ModelInputError("the coil needs an inductance, a winding with turns, or a capacitor range to design it")
    if w is not None and (L_given is not None or w.turns is not None or inductance is not None):
        target = L_given if L_given is not None else inductance
        L, q_fun, info, more, block, c_self = _coil_from_winding(w, target)
        source = "given" if L_given is not None else ("from winding" if w.turns is not None else "designed")
        notes.extend(more)
    else:
        L = L_given if L_given is not None else inductance
        source = "given" if L_given is not None else "designed"
        info = {}
        block = None
        c_self = 0.0
        if parts.coil_unloaded_q is not None:
            q_fun = _constant_q(parts.coil_unloaded_q)
        else:
            q_fun = _constant_q(DEFAULT_COIL_Q)
            notes.append(f"coil Q not known: assumed {DEFAULT_COIL_Q:.0f} (a good air-cored coil)")
    if parts.coil_unloaded_q is not None and w is not None and w.turns is not None:
        q_fun = _constant_q(parts.coil_unloaded_q)
    if not (np.isfinite(L) and L > 0):
        raise ModelInputError("coil inductance must be positive")
    info = {"inductance_h": float(L), "source": source, **info}
    return _Coil(L, q_fun, info, notes, block, c_self)


def _diode(parts: TuningParts) -> det_mod.Diode:
    d = det_mod.get_diode(parts.detector)
    i_s = d.saturation_current_a if parts.diode_saturation_current_a is None else float(parts.diode_saturation_current_a)
    n = d.ideality if parts.diode_ideality is None else float(parts.diode_ideality)
    if not (i_s > 0 and np.isfinite(i_s)) or not (0.5 <= n <= 5):
        raise ModelInputError("diode saturation current must be positive and ideality between 0.5 and 5")
    return det_mod.Diode(d.name, i_s, n, d.description)


def _check_parts(parts: TuningParts):
    tank_mod.check_arrangement(parts.arrangement)
    det_mod.get_diode(parts.detector)
    if not (parts.earphone_ohm > 0 and np.isfinite(parts.earphone_ohm)):
        raise ModelInputError(f"earphone_ohm must be positive, got {parts.earphone_ohm!r}")
    if not (0 < parts.detector_tap_fraction <= 1):
        raise ModelInputError(f"detector_tap_fraction must lie in (0, 1], got {parts.detector_tap_fraction!r}")
    cmin, cmax = parts.capacitor_min_f, parts.capacitor_max_f
    if (cmin is None) != (cmax is None):
        raise ModelInputError("give both capacitor_min_f and capacitor_max_f, or neither")
    if cmin is not None and not (0 <= cmin < cmax):
        raise ModelInputError("the capacitor range needs 0 <= capacitor_min_f < capacitor_max_f")


def _config(parts: TuningParts, **override) -> dict:
    cfg = dict(arrangement=parts.arrangement, series_capacitance=parts.series_capacitance_f,
               detector_tap=parts.detector_tap_fraction,
               tap_fraction=parts.tap_fraction, primary_inductance=parts.primary_inductance_h,
               coupling_coefficient=parts.coupling_coefficient, self_capacitance=0.0,
               detector_conductance=tn_mod.weak_signal_conductance(_diode(parts)))
    cfg.update(override)
    return cfg


def _coil_config(parts: TuningParts, coil: _Coil, **override) -> dict:
    """:func:`_config` with the coil's own self-capacitance across the tank."""
    return _config(parts, **{"self_capacitance": coil.self_capacitance, **override})


def _coupling(f, aerial: _Aerial, L, q_fun, cfg):
    f = np.asarray(f, dtype=float)
    r, x = aerial.impedance(f)
    q = q_fun(f)
    w = 2.0 * np.pi * f
    rp = 0.0
    if cfg["arrangement"] == "separate primary" and cfg["primary_inductance"] is not None:
        rp = w * cfg["primary_inductance"] / q  # primary wound like the tank coil (assumption)
    return tank_mod.tank_coupling(cfg["arrangement"], f, r, x, L, w * L / q, cfg["series_capacitance"],
                                  cfg["tap_fraction"], cfg["primary_inductance"], cfg["coupling_coefficient"], rp)


def _needed(f, aerial, L, q_fun, cfg, block=None, wound_like=None):
    """The tuning capacitor setting for resonance at ``f`` [F], from the network solve.

    The same model as the station verdicts (:func:`tuned_network.station_levels`): the tapped
    winding with its real coupling between sections (``block``, F(x) of the winding; None: tight;
    or, with ``wound_like`` a coil, that coil's winding scaled to ``L``), the coil's
    self-capacitance and the detector at ``cfg["detector_conductance"]`` (by default its
    weak-signal conductance, the loading a station is first tuned at). Negative when the rest of
    the network already tunes above ``f``.

    ``L`` or one of the coupling's parts in ``cfg`` (series capacitance, tap, coupling coefficient)
    may be a column of values, shape (m, 1): the settings then come back as (m, len(f)). ``L`` and a
    column of series capacitances or coupling coefficients beside it pair row by row; so do ``L`` and
    a column of taps with ``cfg["tap_per_coil"]`` set (else every tap is tried with every coil).
    """
    f = np.atleast_1d(np.asarray(f, dtype=float))
    paired = cfg.get("tap_per_coil", False)  # one aerial tap per coil of ``L``, in a column beside it: one solve
    if cfg.get("tap_fraction") is not None and np.ndim(cfg["tap_fraction"]) > 0 and not paired:  # taps cut the winding
        taps = np.ravel(cfg["tap_fraction"])
        if np.ndim(L) == 0:  # one stacked solve over the taps
            if wound_like is not None:
                block = _scaled_block(wound_like, L)
            nets = [tn_mod.network_parts(cfg["arrangement"], L, q_fun, cfg["detector_tap"], float(t),
                                         cfg["series_capacitance"], cfg["primary_inductance"],
                                         cfg["coupling_coefficient"], block,
                                         self_capacitance=cfg.get("self_capacitance", 0.0)) for t in taps]
            s = net_mod.solve_network_stack(f, _za(aerial)(f), nets, 0.0, cfg["detector_conductance"],
                                            outputs=("top_impedance",))
            return -np.imag(1.0 / s.top_impedance) / (2.0 * np.pi * f)
        return np.array([_needed(f, aerial, L, q_fun, {**cfg, "tap_fraction": float(t)}, block, wound_like)
                         for t in taps])
    if np.ndim(L) > 0:  # coils wound alike, of several inductances: one solve (network.solve_network)
        L = np.asarray(L, dtype=float)
        L = L if L.ndim > 1 else L.reshape(-1, 1)
        block = wound_like.block if wound_like is not None else block
    elif wound_like is not None:
        block = _scaled_block(wound_like, L)
    net = tn_mod.network_parts(cfg["arrangement"], L, q_fun, cfg["detector_tap"], cfg["tap_fraction"],
                               cfg["series_capacitance"], cfg["primary_inductance"], cfg["coupling_coefficient"],
                               block, self_capacitance=cfg.get("self_capacitance", 0.0))
    return net_mod.tuning_capacitance_for(f, _za(aerial)(f), net, cfg["detector_conductance"])


def _scaled_block(coil, inductance):
    """F(x) of a coil wound like ``coil`` but of ``inductance`` [H] (the same coupling between its
    sections); None (tight) when the coil's winding is not known."""
    if coil is None or coil.block is None:
        return None
    ratio = float(inductance) / coil.inductance
    base = coil.block
    return lambda x: base(x) * ratio


#: Frequencies (log-spaced over the aerial's grid and the band together) at which a band's coverage is
#: checked, by the coverage verdict and by every design search alike. A tapped winding or a series
#: capacitor can give the network a second resonance inside the band, where the setting needed jumps
#: through infinity: the edges alone do not tell whether the band is covered.
COVER_CHECK_POINTS = 600


def _check_span(aerial, f_lo, f_hi) -> tuple:
    """The frequencies [Hz] coverage is looked at over: the aerial's grid and the band together."""
    return min(float(aerial.f[0]), float(f_lo)), max(float(aerial.f[-1]), float(f_hi))


@functools.lru_cache(maxsize=64)
def _check_grid(span_lo, span_hi):
    """The coverage check's log grid over a span [Hz]: :data:`COVER_CHECK_POINTS` points, ends included."""
    f = np.geomspace(span_lo, span_hi, COVER_CHECK_POINTS)
    f.setflags(write=False)
    return f


@functools.lru_cache(maxsize=64)
def _band_check_grid(f_lo, f_hi, span_lo, span_hi):
    """The band's edges and the points of the coverage check's grid (:func:`_check_grid`) between them. [Hz]

    A setting found inside the capacitor's range at all of these is what the coverage verdict of
    :func:`_coverage` calls covered, so a designed part is chosen by the check that judges it.
    """
    fine = _check_grid(span_lo, span_hi)
    f = np.concatenate([[f_lo], fine[(fine > f_lo) & (fine < f_hi)], [f_hi]])
    f.setflags(write=False)
    return f


def _cover_grid(aerial, f_lo, f_hi):
    return _band_check_grid(float(f_lo), float(f_hi), *_check_span(aerial, f_lo, f_hi))


def _remembered_q(q_fun):
    """``q_fun`` remembering its values per frequency grid (the searches ask for the same grid again and again)."""
    seen: dict = {}

    def q(f):
        f = np.asarray(f, dtype=float)
        key = (f.shape, f.tobytes())
        if key not in seen:
            if len(seen) > 64:
                seen.clear()
            seen[key] = q_fun(f)
        return seen[key]

    return q


def _covers(f_lo, f_hi, aerial, L, q_fun, cfg, cmin, cmax, block=None, wound_like=None):
    """Whether a setting within [cmin, cmax] tunes every frequency of the band.

    Any one of ``L`` or the coupling's part in ``cfg`` may be a column of values, shape (m, 1):
    then the answer is a boolean array of m. The band's two edges are tried first, and the rest
    of the band only for the values that pass there (each value's settings are its own, so the
    answer is the one trying the whole band for every value gives).
    """
    f = _cover_grid(aerial, f_lo, f_hi)

    def inside(freq, L_, cfg_):
        c = _needed(freq, aerial, L_, q_fun, cfg_, block, wound_like)
        return np.all((c >= cmin) & (c <= cmax), axis=-1)

    ok = inside(f[[0, -1]], L, cfg)
    if np.ndim(ok) == 0:
        return bool(ok) and bool(inside(f[1:-1], L, cfg))
    keep = np.flatnonzero(ok)
    if keep.size:
        ok[keep] = inside(f[1:-1], *_column_subset(L, cfg, keep))
    return ok


def _column_subset(L, cfg, keep) -> tuple:
    """``L`` and ``cfg`` with their column of values (see :func:`_covers`) cut to the rows ``keep``."""
    if np.ndim(L) > 0:
        L = np.asarray(L)[keep]
    cut = {}
    for key in ("series_capacitance", "tap_fraction", "coupling_coefficient"):
        v = cfg.get(key)
        if v is not None and np.ndim(v) > 0:
            cut[key] = np.ravel(v)[keep].reshape((-1,) + np.shape(v)[1:]) if key == "tap_fraction" else \
                np.asarray(v)[keep]
    return L, {**cfg, **cut}


def _reachable_ranges(f_lo, f_hi, setting, cmin, cmax, points=COVER_CHECK_POINTS, refine=30) -> list:
    """The pieces of [f_lo, f_hi] [Hz] where ``setting(f)`` [F] lies within [cmin, cmax].

    Found on a log grid of ``points`` (the coverage check's grid, :func:`_check_grid`, by default); every edge then refined by bisection in frequency, all
    edges at once (``refine`` halvings of the grid step). Returns [(low, high), ...] in order [Hz].

    >>> _reachable_ranges(500e3, 1700e3, lambda f: 1 / ((2 * np.pi * f) ** 2 * 240e-6), 15e-12, 365e-12)[0][0] > 500e3
    True
    """
    fine = _check_grid(float(f_lo), float(f_hi)) if points == COVER_CHECK_POINTS else np.geomspace(f_lo, f_hi,
                                                                                                      int(points))

    def ok(f):
        c = setting(f)
        return (c >= cmin) & (c <= cmax)

    good = ok(fine)
    if not good.any():
        return []
    step = np.diff(good.astype(int))
    starts = np.flatnonzero(step == 1) + 1
    ends = np.flatnonzero(step == -1)
    if good[0]:
        starts = np.concatenate([[0], starts])
    if good[-1]:
        ends = np.concatenate([ends, [fine.size - 1]])
    lo, hi = fine[starts].copy(), fine[ends].copy()
    # edges inside the grid: bisect between the last bad and the first good point
    inner_lo, inner_hi = starts > 0, ends < fine.size - 1
    g = np.concatenate([lo[inner_lo], hi[inner_hi]])
    b = np.concatenate([fine[starts[inner_lo] - 1], fine[ends[inner_hi] + 1]])
    if g.size:  # every edge bisected together, several halvings per call of the setting
        g, b = bisect_ahead(g, b, lambda f: ok(f.ravel()).reshape(f.shape), refine, LOOKAHEAD)
    n_lo = int(inner_lo.sum())
    lo[inner_lo], hi[inner_hi] = g[:n_lo], g[n_lo:]
    return [(float(a), float(z)) for a, z in zip(lo, hi)]


def _ok_range(ok, lo, hi, points=48, refine=20, flags=None, depth=RANGE_LOOKAHEAD):
    """Range [a, b] (log grid, refined at the ends) where ``ok(x)`` holds; None if nowhere on the grid.

    ``ok`` takes a number, or the whole grid as a column (shape (points, 1)) and answers for
    each value at once. ``flags``: ``ok`` on the grid, when the caller has it already. ``depth``:
    halvings looked ahead per call of ``ok`` in refining the ends (the range is the same at any).
    """
    xs = np.geomspace(lo, hi, points)
    flags = np.asarray(ok(xs[:, np.newaxis]) if flags is None else flags, dtype=bool).reshape(xs.shape)
    if not flags.any():
        return None
    idx = np.flatnonzero(flags)
    i0, i1 = idx[0], idx[-1]
    # both ends bisected together, several halvings per call of ``ok``
    inner = [(k, xs[i], xs[j]) for k, i, j in ((0, i0, i0 - 1), (1, i1, i1 + 1)) if 0 <= j < xs.size]
    ends = [xs[i0], xs[i1]]
    if inner:
        good = np.array([g for _, g, _ in inner])
        bad = np.array([b for _, _, b in inner])
        good, bad = bisect_ahead(good, bad, lambda x: np.asarray(ok(x.reshape(-1, 1)), dtype=bool).reshape(x.shape),
                                 refine, depth)
        for (k, _, _), g in zip(inner, good):
            ends[k] = g
    return float(ends[0]), float(ends[1])


def _ok_ranges(ok, n, lo, hi, points=48, refine=20, depth=RANGE_LOOKAHEAD) -> list:
    """:func:`_ok_range` for ``n`` tests at once: one call of ``ok`` per step for all of them.

    ``ok(x, owner)`` answers for trial values ``x`` (a column, shape (r, 1)) of the tests ``owner`` (r indices
    into the n); each test's range is the one :func:`_ok_range` finds for it alone (the same grid, the same
    halvings of the same brackets). Returns one (a, b) or None per test.
    """
    xs = np.geomspace(lo, hi, points)
    flags = np.asarray(ok(np.tile(xs, n)[:, np.newaxis], np.repeat(np.arange(n), points)), dtype=bool)
    flags = flags.reshape(n, points)
    ends: list = [None] * n
    good, bad, owner, which = [], [], [], []
    for t in range(n):
        idx = np.flatnonzero(flags[t])
        if not idx.size:
            continue
        i0, i1 = idx[0], idx[-1]
        ends[t] = [xs[i0], xs[i1]]
        for k, i, j in ((0, i0, i0 - 1), (1, i1, i1 + 1)):
            if 0 <= j < xs.size:
                good.append(xs[i])
                bad.append(xs[j])
                owner.append(t)
                which.append(k)
    if good:  # every test's ends bisected together, several halvings per call of ``ok``
        owner_row = np.array(owner)
        good, _ = bisect_ahead(np.array(good), np.array(bad), lambda x: np.asarray(ok(
            x.reshape(-1, 1), np.broadcast_to(owner_row, x.shape).ravel()), dtype=bool).reshape(x.shape), refine, depth)
        for t, k, g in zip(owner, which, good):
            ends[t][k] = g
    return [None if e is None else (float(e[0]), float(e[1])) for e in ends]


def watts_words(p: float, digits: int = 2) -> str:
    """A power with an SI prefix, ``digits`` figures (two by default), as people read it: 2.3e-08 -> '23 nW'
    (the report's one prefix rule, :func:`aerial.core.units.si_text`, in watts at most).

    >>> watts_words(2.3e-08), watts_words(1e-10), watts_words(1.4e-13), watts_words(2.4e-21)
    ('23 nW', '100 pW', '140 fW', 'less than 0.01 fW')
    >>> watts_words(2.734e-9, 3), watts_words(999.7e-12, 3)
    ('2.73 nW', '1 nW')
    """
    p = float(p)
    if not p >= 1e-17:
        return "less than 0.01 fW"
    return si_text(p, "W", digits, largest=1.0, whole=True)


def _pf(c):
    return f"{c * 1e12:.0f} pF"


def _uh(L):
    """An inductance as the report's tables write it (three significant figures): 19.5 µH, 266 µH, 1.2 mH."""
    return si_text(float(L), "H")


def _khz(f):
    return f"{f / 1e3:.0f} kHz"


def _apply_calibration(aerial: _Aerial, parts: TuningParts, diode, notes: list) -> dict | None:
    cal = parts.calibration
    if cal is None:
        return None
    f = float(cal.frequency_hz)
    q_coil = DEFAULT_COIL_Q if parts.coil_unloaded_q is None else float(parts.coil_unloaded_q)
    c_self = 0.0
    if parts.coil is not None and parts.coil.turns is not None:
        _, q_fun, _, _, _, c_self = _coil_from_winding(parts.coil, cal.coil_inductance_h)
        if cal.bandwidth_hz is not None and parts.coil_unloaded_q is None:
            q_coil = float(q_fun(f))
    g_det = parts.detector_tap_fraction**2 / (parts.earphone_ohm / 2.0)
    # the coil's own self-capacitance sits beside the capacitor setting: not the aerial's
    res = tank_mod.calibrate_from_resonance(f, cal.coil_inductance_h, cal.capacitor_setting_f + c_self,
                                            cal.bandwidth_hz, q_coil if cal.bandwidth_hz is not None else None, g_det)
    notes.extend(res.warnings)
    y = res.aerial_admittance
    out = {
        "frequency_hz": f,
        "aerial_shunt_capacitance_f": float(res.shunt_capacitance),
        "total_capacitance_f": float(res.total_capacitance),
        "note": "these values come from your measured resonance, not from the aerial model",
    }
    if res.shunt_resistance is not None:
        out["aerial_shunt_resistance_ohm"] = float(res.shunt_resistance)
    if res.loaded_q is not None:
        out["loaded_q"] = float(res.loaded_q)
    if y.imag <= 0:
        notes.append("the measured resonance shows no aerial capacitance: the computed aerial reactance is kept")
        return out
    if y.real == 0:
        y = complex(1e-12, y.imag)
    L = float(cal.coil_inductance_h)
    rc = 2.0 * np.pi * f * L / q_coil
    cfg = _config(parts)
    rp = 0.0 if cfg["primary_inductance"] is None else 2.0 * np.pi * f * cfg["primary_inductance"] / q_coil
    za = tank_mod.aerial_impedance_from_admittance(cfg["arrangement"], f, y, L, rc, cfg["series_capacitance"],
                                                   cfg["tap_fraction"], cfg["primary_inductance"],
                                                   cfg["coupling_coefficient"], rp)
    if za.imag >= 0:
        notes.append("the measured resonance implies an inductive aerial: the computed aerial reactance is kept")
        return out
    aerial.cal_capacitance = -1.0 / (2.0 * np.pi * f * za.imag)
    out["aerial_series_capacitance_f"] = float(aerial.cal_capacitance)
    if cal.bandwidth_hz is not None and res.shunt_resistance is not None and za.real > 0:
        aerial.cal_resistance = float(za.real)
        out["aerial_series_resistance_ohm"] = float(za.real)
    notes.append(
        f"aerial capacitance {_pf(aerial.cal_capacitance)} taken from your measured resonance at {_khz(f)}"
        + (" (and its loss resistance from the measured bandwidth)" if aerial.cal_resistance is not None else "")
    )
    return out


def _bench_check(aerial: _Aerial, parts: TuningParts, notes: list) -> dict:
    """The measured bandwidth against the network solve: with the calibrated aerial, and with the model's loss.

    The calibration inverts the closed-form tank; the network solve (tapped winding, detector at
    its tap at strong-signal loading, as when measuring a local station) should give the measured
    bandwidth back. The aerial model's own loss resistance gives the bandwidth it predicted; the
    difference between the two loss resistances is what the model got wrong.
    """
    cal = parts.calibration
    f = np.array([float(cal.frequency_hz)])
    q = DEFAULT_COIL_Q if parts.coil_unloaded_q is None else float(parts.coil_unloaded_q)
    q_fun = _constant_q(q)
    c_self = 0.0
    if parts.coil is not None and parts.coil.turns is not None:
        _, q_fun, _, _, _, c_self = _coil_from_winding(parts.coil, cal.coil_inductance_h)
        if parts.coil_unloaded_q is not None:
            q_fun = _constant_q(q)
    coil = _Coil(cal.coil_inductance_h, q_fun, {}, [], None, c_self)
    net = _net_parts(coil, parts)
    g = _strong_signal_conductance(parts)
    solved = tn_mod.tuned_figures(f, _za(aerial), net, g)
    r_model = float(np.interp(f[0], aerial.f, aerial.r))
    r_meas = float(aerial.cal_resistance)
    x_cal = float(aerial.impedance(f)[1][0])
    model = tn_mod.tuned_figures(f, lambda x: r_model + 1j * x_cal * f[0] / np.asarray(x, dtype=float), net, g)
    diff = (r_model - r_meas) / r_meas
    out = {
        "measured_bandwidth_hz": float(cal.bandwidth_hz),
        "solved_bandwidth_hz": _num(solved.bandwidth[0], "solved_bandwidth_hz", notes),
        "model_bandwidth_hz": _num(model.bandwidth[0], "model_bandwidth_hz", notes),
        "measured_aerial_resistance_ohm": r_meas,
        "model_aerial_resistance_ohm": r_model,
        "model_loss_error_ratio": _num(diff, "model_loss_error_ratio", notes),
    }
    notes.append(
        f"bench check at {_khz(f[0])}: your measured bandwidth of {cal.bandwidth_hz / 1e3:.1f} kHz means an aerial loss "
        f"resistance of {r_meas:.0f} Ω (the network solve with it gives {solved.bandwidth[0] / 1e3:.1f} kHz); the "
        f"aerial model estimated {r_model:.0f} Ω, a bandwidth of {model.bandwidth[0] / 1e3:.1f} kHz — the model "
        f"{'over' if diff > 0 else 'under'}states the loss by {abs(diff) * 100:.0f} %")
    return out


def calibrate_aerial(calibration: Calibration, parts: TuningParts) -> dict:
    """The aerial's capacitance (and loss) from a measured resonance, as a JSON-ready dict.

    Parameters
    ----------
    calibration : Calibration
        The measurement.
    parts : TuningParts
        The arrangement the measurement was made with (its coupling parts, detector
        and earphone; the coil inductance is the calibration's).

    Returns
    -------
    dict
        ``aerial_shunt_capacitance_f``, ``aerial_shunt_resistance_ohm`` (absent
        without a bandwidth), ``aerial_series_capacitance_f`` and
        ``aerial_series_resistance_ohm`` (the aerial's own series values,
        usable in place of the model's), ``warnings``, and a note that they
        come from measurement.

    Examples
    --------
    >>> out = calibrate_aerial(Calibration(240e-6, 5.554e-12, 1e6), TuningParts())
    >>> round(out["aerial_shunt_capacitance_f"] * 1e12)
    100
    """
    parts = parts._replace(calibration=calibration)
    _check_parts(parts)
    aerial = _Aerial([calibration.frequency_hz], 1.0, -1e3)
    notes: list = []
    out = _apply_calibration(aerial, parts, _diode(parts), notes)
    out["warnings"] = notes
    return out


# ----------------------------------------------------------------------------------- tuning design


def _advice(band, aerial, coil: _Coil, parts: TuningParts, c_edges) -> list:
    f_lo, f_hi = band
    cmin, cmax = parts.capacitor_min_f, parts.capacitor_max_f
    L, q = coil.inductance, _remembered_q(coil.q)
    cfg = _coil_config(parts, coil)
    adv = []
    low_ok = c_edges[0] <= cmax
    high_ok = c_edges[1] >= cmin

    if not low_ok:
        adv.append(f"needs a capacitor of at least {_pf(c_edges[0])} maximum to reach {_khz(f_lo)}")
    if not high_ok:
        if c_edges[1] < 0:
            adv.append(f"the aerial's own capacitance tunes this coil below {_khz(f_hi)} even with no capacitor")
        else:
            adv.append(f"the capacitor's minimum of {_pf(cmin)} is too large to reach {_khz(f_hi)} "
                       f"(needs {_pf(c_edges[1])} or less)")
    # a different coil, same everything else
    rng = _ok_range(lambda Lx: _covers(f_lo, f_hi, aerial, Lx, q, cfg, cmin, cmax, wound_like=coil),
                    1e-6, 1e-2)
    if rng:
        adv.append(f"a coil between {_uh(rng[0])} and {_uh(rng[1])} covers the whole band with this capacitor")
    # coupling changes that lighten the aerial's load on the tank
    arr = parts.arrangement
    if arr in ("direct", "series capacitor"):
        r = _ok_range(lambda c: _covers(f_lo, f_hi, aerial, L, q, _coil_config(parts, coil, arrangement="series capacitor",
                                                                          series_capacitance=c), cmin, cmax,
                                          coil.block),
                      1e-12, 1e-8)
        if r:
            adv.append(f"use a series capacitor of {_pf(r[0])} to {_pf(r[1])} between aerial and tank "
                       f"(the largest passes the most signal)")
    if arr in ("direct", "coil tap"):
        r = _ok_range(lambda n: _covers(f_lo, f_hi, aerial, L, q, _coil_config(parts, coil, arrangement="coil tap",
                                                                          tap_fraction=n), cmin, cmax,
                                          coil.block),
                      0.02, 1.0)
        if r:
            adv.append(f"use a tap at {r[0]:.2f} to {r[1]:.2f} of the turns from the earthy end")
    if arr == "separate primary" and parts.primary_inductance_h is not None:
        r = _ok_range(lambda k: _covers(f_lo, f_hi, aerial, L, q, _coil_config(parts, coil, coupling_coefficient=k),
                                        cmin, cmax, coil.block), 0.01, 0.95)
        if r:
            adv.append(f"set the primary's coupling to k = {r[0]:.2f} ... {r[1]:.2f}")
    if len(adv) == (not low_ok) + (not high_ok) and arr in ("direct", "series capacitor"):
        # no single change works: look for a series capacitor together with a new coil (the largest
        # capacitor, of 24 from 1 nF down, for which one of 32 coils covers the band)
        ccs = np.geomspace(1e-9, 5e-12, 24)
        first, covering = _first_series_with_a_coil((f_lo, f_hi), aerial, coil, parts, q, ccs,
                                                    np.geomspace(1e-6, 1e-2, 32))
        if first is not None:
            cc = ccs[first]
            cfg_cc = _coil_config(parts, coil, arrangement="series capacitor", series_capacitance=cc)
            # the coils of that search are the range's grid: its answers for them are the grid's
            rng_l = _ok_range(lambda Lx: _covers(f_lo, f_hi, aerial, Lx, q, cfg_cc, cmin, cmax,
                                                 wound_like=coil), 1e-6, 1e-2,
                              points=32, refine=20, flags=covering)
            adv.append(f"use a series capacitor of about {_pf(cc)} together with a coil of "
                       f"{_uh(np.sqrt(rng_l[0] * rng_l[1]))}")
    ratio = (f_hi / f_lo) ** 2
    if cmin > 0 and cmax / cmin < ratio * 1.05:
        adv.append(f"the band needs a capacitance ratio of at least {ratio:.2f} plus strays; this capacitor "
                   f"gives {cmax / cmin:.2f}: use a capacitor with a wider range or split the band in two")
    return adv


def _first_series_with_a_coil(band, aerial, coil, parts, q_fun, capacitances, inductances):
    """Index of the first series capacitor [F] with which a coil of one of ``inductances`` [H], wound like
    ``coil``, covers the band with the site's capacitor, and which of the coils do with it; (None, None)
    when none does.

    Every pair is tried in one solve at the band's edges, and the pairs that pass there in one more
    over the rest of the band (each pair's settings are its own: what :func:`_covers` says pair by pair).
    """
    cmin, cmax = parts.capacitor_min_f, parts.capacitor_max_f
    f = _cover_grid(aerial, band[0], band[1])
    cfg = _coil_config(parts, coil, arrangement="series capacitor",
                       series_capacitance=np.asarray(capacitances, dtype=float)[:, None, None])
    c = _needed(f[[0, -1]], aerial, np.asarray(inductances, dtype=float)[None, :, None], q_fun, cfg, coil.block)
    ok = np.all((c >= cmin) & (c <= cmax), axis=-1)
    i, j = np.nonzero(ok)
    if i.size:
        cfg_in = {**cfg, "series_capacitance": np.asarray(capacitances, dtype=float)[i][:, None]}
        c = _needed(f[1:-1], aerial, np.asarray(inductances, dtype=float)[j][:, None], q_fun, cfg_in, coil.block)
        ok[i, j] = np.all((c >= cmin) & (c <= cmax), axis=-1)
    rows = np.flatnonzero(ok.any(axis=1))
    return (int(rows[0]), ok[rows[0]]) if rows.size else (None, None)


def _designed_coil(band, aerial, parts, covering=None) -> _Coil:
    """A coil designed to cover ``band``: first without self-capacitance, then again with the one
    its winding (if known) gives, so that the coil's own capacitance is allowed for. What the design
    says of itself is in the coil's ``design_notes``. ``covering``: the range of :func:`_covering_coils`
    without self-capacitance when already worked out."""
    said: list = []
    coil = _resolve_coil(parts, _design_inductance(band, aerial, parts, said, covering=covering))
    if coil.self_capacitance > 0:
        said = []
        coil = _resolve_coil(parts, _design_inductance(band, aerial, parts, said, coil.self_capacitance))
    coil.design_notes = said
    return coil


def _covering_coils(band, aerial, parts, self_capacitance=0.0):
    """The range (L_lo, L_hi) [H] of coils that cover ``band`` with the parts' capacitor and coupling; None if none.

    The search, like the coil it sizes, takes the winding as tight and the detector across its top
    (:func:`_sizing_config`): which detector tap a builder uses, or the design chooses, leaves the coil alone.
    Remembered per band, aerial (its arrays and calibration), capacitor, coil Q and coupling: a report
    designing the coupling with the coil asks again for many of the searches the station design asks for
    (and :func:`_covering_coils_many` works out many couplings' searches together beforehand)."""
    f_lo, f_hi = band
    key, cfg, q_value = _covering_key(band, aerial, parts, self_capacitance)
    if key not in _COVERING_SEEN:
        if len(_COVERING_SEEN) > 256:
            _COVERING_SEEN.clear()
        q, cmin, cmax = _constant_q(q_value), parts.capacitor_min_f, parts.capacitor_max_f
        _COVERING_SEEN[key] = _ok_range(lambda Lx: _covers(f_lo, f_hi, aerial, Lx, q, cfg, cmin, cmax), 1e-6, 1e-2)
    return _COVERING_SEEN[key]


def _covering_key(band, aerial, parts, self_capacitance=0.0) -> tuple:
    """(key, cfg, Q) of :func:`_covering_coils`' search: what it is remembered by, its :func:`_sizing_config` and the
    coil's unloaded Q [1]."""
    q_value = DEFAULT_COIL_Q if parts.coil_unloaded_q is None else parts.coil_unloaded_q
    cfg = _sizing_config(parts, self_capacitance)
    key = (float(band[0]), float(band[1]), aerial.f.tobytes(), aerial.r.tobytes(), aerial.x.tobytes(),
           aerial.cal_capacitance, aerial.cal_resistance, parts.capacitor_min_f, parts.capacitor_max_f, float(q_value),
           tuple(sorted(cfg.items())))
    return key, cfg, q_value


#: The coupling part that may differ from one network to the next in one solve of :func:`_needed` (a column of
#: values beside the column of coil inductances), by arrangement.
_STACKED_PART = {"series capacitor": "series_capacitance", "separate primary": "coupling_coefficient",
                 "coil tap": "tap_fraction"}


def _covering_coils_many(band, aerial, trials) -> None:
    """:func:`_covering_coils` (without self-capacitance) for every parts of ``trials``, remembered for it.

    Couplings that differ only in the value of one part (a series capacitor's capacitance, a separate primary's
    coupling coefficient) are searched together: every trial coil of every one of them in one network solve per
    step (:func:`_ok_ranges`), each value's rows worked out as its own search works them out (the same ranges, in
    a few solves instead of a few per coupling). The others are left to :func:`_covering_coils` as they come."""
    groups: dict = {}
    for p in trials:
        key, cfg, q_value = _covering_key(band, aerial, p)
        part = _STACKED_PART.get(cfg["arrangement"])
        if key in _COVERING_SEEN or part is None or \
                (part == "tap_fraction" and not 0 < cfg[part] < cfg["detector_tap"]):  # a tap of the winding's layout
            continue
        shared = tuple(sorted((k, v) for k, v in cfg.items() if k != part))
        rows = groups.setdefault((shared, part, p.capacitor_min_f, p.capacitor_max_f, float(q_value)), {})
        rows.setdefault(key, (cfg[part], cfg))
    for (_, part, cmin, cmax, q_value), rows in groups.items():
        if len(rows) < 2:
            continue
        if len(_COVERING_SEEN) + len(rows) > 256:
            _COVERING_SEEN.clear()
        values = np.array([v for v, _ in rows.values()], dtype=float)
        cfg, q = next(iter(rows.values()))[1], _constant_q(q_value)

        def ok(Lx, owner):  # each trial coil with its own coupling's value beside it
            return _covers(*band, aerial, Lx, q, {**cfg, part: values[owner][:, np.newaxis], "tap_per_coil": True},
                           cmin, cmax)

        _COVERING_SEEN.update(zip(rows, _ok_ranges(ok, len(values), 1e-6, 1e-2)))
        # the couplings no coil covers the band with: their coil is sized by the top of the band alone
        short = [i for i, key in enumerate(rows) if _COVERING_SEEN[key] is None]
        if len(short) > 1:
            if len(_REACHING_SEEN) + len(short) > 256:
                _REACHING_SEEN.clear()
            _REACHING_SEEN.update(zip([list(rows)[i] for i in short], _ok_ranges(
                lambda Lx, owner: _needed(np.array([band[1]]), aerial, Lx, q, {
                    **cfg, part: values[short][owner][:, np.newaxis], "tap_per_coil": True})[..., 0] >= cmin,
                len(short), 1e-6, 1e-2, depth=LOOKAHEAD)))


_COVERING_SEEN: dict = {}


def _reaching_coils(band, aerial, parts, self_capacitance=0.0):
    """The range (L_lo, L_hi) [H] of coils whose setting at the band's top is not below the capacitor's minimum
    (the parts' capacitor and coupling, sized as :func:`_covering_coils`); None if none. Remembered as
    :func:`_covering_coils` is (and worked out beforehand by :func:`_covering_coils_many` for the couplings it
    finds no covering coil for)."""
    key, cfg, q_value = _covering_key(band, aerial, parts, self_capacitance)
    if key not in _REACHING_SEEN:
        if len(_REACHING_SEEN) > 256:
            _REACHING_SEEN.clear()
        q, cmin, f_hi = _constant_q(q_value), parts.capacitor_min_f, band[1]
        # one frequency per trial value: cheap trials, so the search looks as far ahead as the others here
        _REACHING_SEEN[key] = _ok_range(lambda Lx: _needed(np.array([f_hi]), aerial, Lx, q, cfg)[..., 0] >= cmin,
                                        1e-6, 1e-2, depth=LOOKAHEAD)
    return _REACHING_SEEN[key]


_REACHING_SEEN: dict = {}


def _sizing_config(parts: TuningParts, self_capacitance=0.0) -> dict:
    """:func:`_config` for sizing a coil still to be designed: the detector's weak-signal loading across the
    whole coil, whatever its tap. With the tight winding the sizing takes, a tapped detector only adds its
    conductance, stepped by the square of the tap, across the tank (the capacitor setting moves by a few
    parts in 10^4 through the sections' loss), so a designed coil does not depend on the detector's tap: the
    band design tries the taps on one coil per coupling, and the station design tries them on the same coils."""
    return _config(parts, self_capacitance=float(self_capacitance), detector_tap=1.0)


def _design_inductance(band, aerial, parts, notes, self_capacitance=0.0, covering=None) -> float:
    f_hi = band[1]
    rng = covering if covering is not None and self_capacitance == 0 else \
        _covering_coils(band, aerial, parts, self_capacitance)
    if rng:
        L = float(np.sqrt(rng[0] * rng[1]))
        notes.append(f"any coil from {_uh(rng[0])} to {_uh(rng[1])} covers the band; chose {_uh(L)} "
                     "for equal margin at both ends")
        return L
    top = _reaching_coils(band, aerial, parts, self_capacitance)
    L = top[1] * DESIGN_MARGIN if top else 1e-6
    notes.append(f"no single coil covers the band with this capacitor and coupling; chose {_uh(L)}, "
                 f"{(1 - DESIGN_MARGIN) * 100:.0f} % below the largest that still reaches {_khz(f_hi)}")
    return L


#: Series capacitors tried for a coil still to be designed: the E6 preferred values (IEC 60063) from
#: 470 pF down to 10 pF. [F]
DESIGN_SERIES_CAPACITORS_F = (470e-12, 330e-12, 220e-12, 150e-12, 100e-12, 68e-12, 47e-12, 33e-12, 22e-12,
                              15e-12, 10e-12)
#: Aerial taps tried for a coil still to be designed (fraction of the turns from the earthy end): the
#: steps a builder winds taps at, from half the turns down to a twentieth. [1]
DESIGN_TAPS = (0.5, 0.4, 0.3, 0.25, 0.2, 0.15, 0.1, 0.05)


def _roomy(rng) -> bool:
    """Whether a range of covering coils leaves the design margin (:data:`DESIGN_MARGIN`) each way
    around its geometric mean, room for whole turns and strays."""
    return rng is not None and rng[0] <= rng[1] * DESIGN_MARGIN ** 2


def _coupling_candidates(parts: TuningParts) -> list:
    """Every coupling tried with a coil still to be designed, as (parts, words): the aerial straight to
    the tank, each series capacitor of :data:`DESIGN_SERIES_CAPACITORS_F`, each tap of :data:`DESIGN_TAPS`."""
    out = [(parts, "the aerial straight to the tank")]
    out += [(parts._replace(arrangement="series capacitor", series_capacitance_f=cc),
             f"a {_pf(cc)} series capacitor between aerial and tank") for cc in DESIGN_SERIES_CAPACITORS_F]
    out += [(parts._replace(arrangement="coil tap", tap_fraction=n),
             f"the aerial on a tap at {n:.2f} of the turns from the earthy end") for n in DESIGN_TAPS]
    return out


def _table_frequencies(aerial: _Aerial, f_lo: float, f_hi: float) -> np.ndarray:
    """The tuning table's frequencies: the band's edges and the aerial's grid between them. [Hz]"""
    grid_in = aerial.f[(aerial.f > f_lo) & (aerial.f < f_hi)]
    return sorted_unique(np.concatenate([[f_lo], grid_in, [f_hi]]))


def _weakest_to_detector(band, aerial: _Aerial, parts: TuningParts, taps=(None,), need_room=True):
    """The smallest share of the aerial's available power that reaches the detector across the tuning
    table's frequencies (its "to detector" column, :func:`_table_arrays`) with a coil designed for
    ``parts`` as :func:`_designed_coil` designs it, for each detector tap of ``taps`` (a fraction of the
    turns; None: the parts' own) on that one coil (its sizing leaves the detector's tap aside,
    :func:`_sizing_config`). A list of one share per tap [1]; None when no coil covers the band with room
    (with ``need_room``: else the coil :func:`_designed_coil` falls back to is taken)."""
    coil = _share_coil(band, aerial, parts, need_room)
    return None if coil is None else _weakest_shares(band, aerial, [(parts, coil)], taps)[0]


def _share_coil(band, aerial: _Aerial, parts: TuningParts, need_room=True):
    """The coil :func:`_weakest_to_detector` weighs ``parts`` with (:func:`_designed_coil`); None when no coil
    covers the band with room and ``need_room``."""
    covering = _covering_coils(band, aerial, parts)
    if need_room and not _roomy(covering):
        return None
    return _designed_coil(band, aerial, parts, covering)


def _weakest_shares(band, aerial: _Aerial, designs, taps=(None,)) -> list:
    """:func:`_weakest_to_detector` of each (parts, coil) of ``designs`` (the coil from :func:`_share_coil`), one
    list of shares per tap each, every network of every design in one stacked solve."""
    # the table's column alone: the network tuned at each frequency with the detector at its strong-signal
    # loading, no bandwidth or rejection searched (each frequency's figure is the table's own); every tap
    # from one stacked solve of the bare networks, the capacitor and the detector then added to each
    # (network.retuned_detector_voltage: the same figures as tuned_figures to rounding)
    if not designs:
        return []
    table_f = _table_frequencies(aerial, *band)
    nets = [_net_parts(coil, parts) if m is None else _net_parts(coil, parts, detector_tap=float(m))
            for parts, coil in designs for m in taps]
    g = np.repeat([_strong_signal_conductance(parts) for parts, _ in designs], len(taps))[:, np.newaxis]
    bare = net_mod.solve_network_stack(table_f, _za(aerial)(table_f), nets, outputs=net_mod.RETUNED_FIELDS)
    # the top's admittance with the detector in place (a rank-one change), then the setting that resonates it
    z_top = bare.top_impedance - bare.top_per_detector_current * g * bare.detector_per_top_current / (
        1.0 + g * bare.detector_impedance)
    c = np.maximum(-np.imag(1.0 / z_top) / (2.0 * np.pi * table_f), 0.0)
    v = np.abs(net_mod.retuned_detector_voltage(bare, table_f, c, g))
    ratio = v**2 * g * 4.0 * aerial.impedance(table_f)[0]
    weakest = np.min(np.nan_to_num(ratio, nan=0.0), axis=-1).tolist()
    return [weakest[i:i + len(taps)] for i in range(0, len(weakest), len(taps))]


def _percent(x: float) -> str:
    return f"{100.0 * x:.2g} %"


#: Detector taps tried with a coil still to be designed (fraction of the turns from the earthy end): the
#: station design's own (:data:`station_design.DETECTOR_TAPS`), so the two designs speak the same taps. [1]
DESIGN_DETECTOR_TAPS = sd_mod.DETECTOR_TAPS


def _tap_words(m: float, earthy=False) -> str:
    """Where the detector joins the coil, in words (``earthy``: saying where the turns are counted from)."""
    if m >= 1.0:
        return "the detector across the whole coil"
    return f"the detector on a tap at {m:.2f} of the turns" + (" from the earthy end" if earthy else "")


def _taps_tried(taps) -> str:
    """The detector taps tried, in words."""
    top = "the whole coil" if max(taps) >= 1.0 else f"{max(taps):.2f} of the turns"
    return f"the {len(taps)} detector taps from {min(taps):.2f} of the turns to {top}"


def design_coupling(frequency_hz, aerial_r_ohm, aerial_x_ohm, parts: TuningParts, band,
                    coupling_open: bool = True, detector_tap_open: bool = True) -> tuple:
    """The coupling and the detector's tap chosen together with a coil still to be designed: of those that
    cover the band, the pair that serves the detector best.

    With no coil given and the coupling left open (``coupling_open``, the parts' arrangement then the
    default "direct"), every coupling of :func:`_coupling_candidates` (straight to the tank, each E6
    series capacitor, each tap) whose range of covering coils leaves the design margin each way
    (:func:`_roomy`) gets its coil designed as :func:`design_tuning` would; with the detector's tap left
    open too (``detector_tap_open``, the parts' tap then the default 1, the top), each tap of
    :data:`DESIGN_DETECTOR_TAPS` is tried on that coil. The pair whose weakest share of the aerial's power
    to the detector across the band (the tuning table's "to detector", :func:`_weakest_to_detector`) is
    largest is chosen. A coupling the site names is kept and only the tap chosen (with the coil designed
    for that coupling even when it leaves no room), and a tap the site gives is kept. When no coupling
    covers the band, the coupling is left as it is (the coverage and advice of :func:`design_tuning` say
    what is covered and what would cover the rest) and the tap is chosen for it.

    Tapping the detector down the coil matches its input resistance, stepped up by the square of the
    turns ratio, to the tank's dynamic resistance (the maximum power transfer theorem): across the whole
    coil, a detector of a few kilohms loads a tank of a few hundred kilohms down to no useful resonance.

    Parameters
    ----------
    frequency_hz, aerial_r_ohm, aerial_x_ohm, parts
        As :func:`design_tuning`.
    band : (float, float)
        Band edges (f_lo, f_hi). [Hz]
    coupling_open : bool
        False when the site names its coupling: it is then kept.
    detector_tap_open : bool
        False when the site gives the detector's tap: it is then kept.

    Returns
    -------
    tuple
        (parts, notes): the parts with the coupling and the detector's tap chosen (``detector_tap_designed``
        set when the tap was; unchanged when nothing is to be chosen), and the sentences saying why.

    Examples
    --------
    >>> f = [500e3, 1000e3, 1800e3]
    >>> x = [-1 / (2 * 3.141592653589793 * fi * 500e-12) for fi in f]
    >>> parts = TuningParts(capacitor_min_f=15e-12, capacitor_max_f=365e-12)
    >>> chosen, notes = design_coupling(f, [50, 50, 50], x, parts, (520e3, 1710e3))
    >>> chosen.arrangement != "direct", chosen.detector_tap_fraction < 1.0, chosen.detector_tap_designed
    (True, True, True)
    """
    _check_parts(parts)
    couple = coupling_open and parts.arrangement == "direct"
    tap_open = detector_tap_open and parts.detector_tap_fraction == 1.0
    if not (couple or tap_open) or _coil_given(parts) or parts.capacitor_min_f is None or parts.calibration is not None:
        return parts, []
    band = (float(band[0]), float(band[1]))
    if not (0 < band[0] < band[1]):
        raise ModelInputError("band must be (f_lo, f_hi) with 0 < f_lo < f_hi")
    aerial = _Aerial(frequency_hz, aerial_r_ohm, aerial_x_ohm)
    # the whole coil first: on a tie it stays
    taps = (1.0,) + tuple(m for m in DESIGN_DETECTOR_TAPS if m != 1.0) if tap_open else (parts.detector_tap_fraction,)
    scored = []
    trials = _coupling_candidates(parts) if couple else [(parts, "")]
    _covering_coils_many(band, aerial, [trial for trial, _ in trials])
    # each coupling's coil first, then every coupling with a coil weighed in one solve
    designs = [(trial, words, _share_coil(band, aerial, trial, need_room=couple)) for trial, words in trials]
    designs = [(trial, words, coil) for trial, words, coil in designs if coil is not None]
    for (trial, words, _), shares in zip(designs, _weakest_shares(band, aerial, [(t, c) for t, _, c in designs],
                                                                   taps)):
        scored += [(w, trial, words, m) for w, m in zip(shares, taps)]
    notes = []
    if couple and not scored:
        notes.append(_nothing_covers(band))
        if tap_open:
            scored = [(w, parts, "", m) for w, m in zip(_weakest_to_detector(band, aerial, parts, taps, False), taps)]
    if not scored:
        return parts, notes
    ranked = sorted(scored, key=lambda s: -s[0])  # stable: the first listed wins a tie
    chosen = ranked[0][1]._replace(detector_tap_fraction=ranked[0][3], detector_tap_designed=tap_open)
    notes += _design_words(band, parts, ranked, couple and not notes, tap_open)
    return chosen, notes


def _nothing_covers(band) -> str:
    return (f"{_straight_words(band)}, nor through a series capacitor of {_pf(DESIGN_SERIES_CAPACITORS_F[-1])} to "
            f"{_pf(DESIGN_SERIES_CAPACITORS_F[0])}, nor on a tap of {DESIGN_TAPS[-1]:.2f} to "
            f"{DESIGN_TAPS[0]:.2f} of the turns: the designed coil covers only part of it (see the band coverage)")


def _straight_words(band) -> str:
    return (f"no coil covers {_khz(band[0])} to {_khz(band[1])} with room to spare with this capacitor "
            "and the aerial straight to the tank")


def _design_words(band, parts, ranked, couple, tap_open) -> list:
    """Why :func:`design_coupling` chose its coupling and tap, in words: ``ranked`` is every (share, parts,
    words, tap) tried, best first."""
    best, trial, words, m = ranked[0]
    taps = sorted({r[3] for r in ranked})
    share = (f"at worst {_percent(best)} of the aerial's available power reaches the detector across the band "
             "(the tuning table's \"to detector\")")
    coupling_changed = couple and trial is not parts
    if not coupling_changed and not tap_open:
        return []
    if coupling_changed:
        others = [r for r in ranked[1:] if r[1] is not trial]
        n = len({id(r[1]) for r in ranked})
        lead = _straight_words(band) if not any(r[1] is parts for r in ranked) else \
            "the aerial straight to the tank serves the detector less"
        if tap_open:
            text = (f"{lead}: the coupling is designed with the coil, and the detector's tap with them: {words} and "
                    f"{_tap_words(m)}; {share}, the most of the {n} couplings that cover it, each tried with "
                    f"{_taps_tried(taps)}")
            if others:
                text += (f"; the next best coupling, {others[0][2]} with {_tap_words(others[0][3])}, gives "
                         f"{_percent(others[0][0])}")
        else:
            text = (f"{lead}: the coupling is designed with the coil, {words}: {share}, the most of the {n} "
                    "couplings tried that cover it")
            if len(ranked) > 1:
                text += f"; the next best, {ranked[1][2]}, gives {_percent(ranked[1][0])}"
    else:
        text = (f"the detector's tap is designed with the coil, {_tap_words(m, True)}: {share}, the most of "
                f"{_taps_tried(taps)}")
    out = [text]
    whole = next((r[0] for r in ranked if r[1] is trial and r[3] == 1.0), None)
    if tap_open and m < 1.0 and whole is not None:
        out.append(f"across the whole coil the detector would get at worst {_percent(whole)}: its input resistance, "
                   "about half the earphone's impedance, is far below the tank's own and would load it heavily; on "
                   "a tap it is stepped up by the square of the turns ratio towards the tank's resistance, which "
                   "gives the detector the most power and keeps the tank selective")
    return out


def _strong_signal_conductance(parts):
    """The detector's strong-signal RF input conductance 2/R_L, at its own tap. [S]"""
    return 1.0 / (parts.earphone_ohm / 2.0)


def design_tuning(frequency_hz, aerial_r_ohm, aerial_x_ohm, parts: TuningParts, band=None,
                  range_curve=False, coil=None) -> dict:
    """Tuning design across a band: capacitor settings, coverage, loaded Q, selectivity, advice.

    Parameters
    ----------
    frequency_hz : array_like
        Frequency grid of the aerial arrays, strictly increasing. [Hz]
    aerial_r_ohm : array_like
        Aerial series resistance including every loss. [ohm]
    aerial_x_ohm : array_like
        Aerial series reactance. [ohm]
    parts : TuningParts
        Coil, capacitor, coupling, detector, earphone (and optional calibration).
    band : (float, float), optional
        Band edges (f_lo, f_hi); default the grid's range. [Hz]
    range_curve : bool
        Add ``range_curve``, the dial picture of :func:`tuning_range_curve` for this coil, when the
        capacitor range is given (``range_curve_error``, its reason, when it cannot be drawn).
    coil : optional
        The coil from :func:`tuning_coil` for these arguments (worked out once for a report that
        also judges stations); default: resolved or designed here.

    Returns
    -------
    dict
        ``coil`` (inductance, source, turns and winding length when known),
        ``rows`` (one per tabulated frequency: ``frequency_hz``, ``inductance_h``
        and ``total_capacitance_f`` with f = 1/(2π√(LC)), ``capacitor_setting_f``,
        ``within_capacitor_range``, the aerial's shunt capacitance and resistance
        as seen by the tank, ``aerial_share_ratio`` of the tuning capacitance,
        ``unloaded_q``, ``loaded_q``, ``bandwidth_hz``, rejections one and two
        channels away for 9 and 10 kHz spacings, ``power_transfer_ratio``
        (detector power / available aerial power from the circuit) and the
        matched-ports reference ``power_transfer_if_matched_ratio``),
        ``coverage`` (verdict, capacitor needed at each band edge, reachable
        range; ``covered`` only with a capacitor range), ``advice``, ``notes``,
        ``warnings``, and ``calibration`` when one was given.

    Notes
    -----
    The detector is represented by its strong-signal RF input resistance
    R_L/2 (a local station); weak stations load the tank less (see
    :func:`assess_stations`). The aerial is treated at each frequency as the
    series R + jX given there.

    Examples
    --------
    >>> f = [500e3, 1000e3, 1700e3]
    >>> x = [-1 / (2 * 3.141592653589793 * fi * 200e-12) for fi in f]
    >>> parts = TuningParts("series capacitor", coil_inductance_h=240e-6, capacitor_min_f=15e-12,
    ...                     capacitor_max_f=365e-12, series_capacitance_f=100e-12)
    >>> out = design_tuning(f, [25, 25, 25], x, parts, band=(550e3, 1100e3))
    >>> out["coverage"]["covered"]
    True
    """
    _check_parts(parts)
    aerial = _Aerial(frequency_hz, aerial_r_ohm, aerial_x_ohm)
    warnings: list = []
    notes: list = []
    diode = _diode(parts)
    calibration = _apply_calibration(aerial, parts, diode, notes)
    calibration_notes = list(notes)
    if calibration is not None and aerial.cal_resistance is not None:
        calibration["bench_check"] = _bench_check(aerial, parts, notes)
    f_lo, f_hi = (aerial.f[0], aerial.f[-1]) if band is None else (float(band[0]), float(band[1]))
    if not (0 < f_lo < f_hi):
        raise ModelInputError("band must be (f_lo, f_hi) with 0 < f_lo < f_hi")
    if aerial.outside([f_lo, f_hi]).any():
        warnings.append("the band reaches beyond the aerial's frequency grid: edge values of the aerial were used")
    if coil is None:
        coil = _station_coil(aerial, parts, (f_lo, f_hi))
    notes.extend(coil.design_notes)
    notes.extend(coil.notes)
    table_f = _table_frequencies(aerial, f_lo, f_hi)
    rows = _table_rows(table_f, _table_arrays(table_f, aerial, coil, parts), warnings, parts)
    setting = _setting_of(aerial, coil, parts)
    coverage, advice = _coverage((f_lo, f_hi), aerial, coil, parts, warnings, setting)
    if parts.arrangement in tank_mod.NO_DC_PATH_ARRANGEMENTS:
        notes.append(tank_mod.BLEED_NOTE)
    if parts.earphone_ohm < LOW_IMPEDANCE_EARPHONE_OHM:
        warnings.append(LOW_IMPEDANCE_NOTE)
    notes.append("loaded Q and bandwidth use the detector's strong-signal input resistance (half the earphone "
                 "impedance); weak stations load the tank less")
    result = {
        "arrangement": parts.arrangement,
        "coil": dict(coil.info),
        "detector": parts.detector,
        "earphone_ohm": float(parts.earphone_ohm),
        "detector_tap_ratio": float(parts.detector_tap_fraction),
        "rows": rows,
        "coverage": coverage,
        "advice": advice,
        "notes": notes,
        "warnings": warnings,
    }
    if calibration is not None:
        result["calibration"] = calibration
    if range_curve and parts.capacitor_min_f is not None:
        try:
            result["range_curve"] = _range_curve(aerial, coil, parts, setting, calibration_notes)
        except Exception as err:  # the curve is a picture aid: say why it is missing
            result["range_curve_error"] = str(err)
    return result


def _net_parts(coil: _Coil, parts: TuningParts, **override):
    cfg = _coil_config(parts, coil, **override)
    return tn_mod.network_parts(cfg["arrangement"], coil.inductance, coil.q, cfg["detector_tap"], cfg["tap_fraction"],
                                cfg["series_capacitance"], cfg["primary_inductance"], cfg["coupling_coefficient"],
                                coil.block, self_capacitance=cfg["self_capacitance"])


def _za(aerial: _Aerial):
    return aerial.complex_impedance


def _table_arrays(table_f, aerial, coil, parts) -> dict:
    """The tuning table's figures as arrays over the tabulated frequencies.

    The capacitor setting, loaded Q, bandwidth, rejections and power to the detector come from
    the network solve (:mod:`aerial.models.network`), with the detector at its strong-signal
    input resistance (R_L/2) and again at its weak-signal one. The aerial's share of the tuning
    capacitance is what the network needs less than the coil alone: the total C at resonance less
    the setting and the coil's self-capacitance, so that the three add up whatever the coupling;
    the aerial's shunt resistance, and whether it looks inductive, from the closed-form coupling.
    """
    t = _coupling(table_f, aerial, coil.inductance, coil.q, _coil_config(parts, coil))
    w = 2.0 * np.pi * table_f
    shunt = tank_mod.shunt_from_admittance(table_f, t.aerial_admittance)
    b_coil = -np.imag(t.coil_admittance)
    g_coil = np.real(t.coil_admittance)
    c_total = b_coil / w  # everything but the coil, at resonance
    qu = b_coil / g_coil
    net = _net_parts(coil, parts)
    offsets = [o for spacing in tank_mod.CHANNEL_SPACINGS_HZ for o in (spacing, 2 * spacing)]
    g_strong = _strong_signal_conductance(parts)
    g_weak = tn_mod.weak_signal_conductance(_diode(parts))
    # the strong- and the weak-signal loading in one pass (each row's figures are its own)
    n = table_f.size
    both = tn_mod.tuned_figures(np.concatenate([table_f, table_f]), _za(aerial), net,
                                np.concatenate([np.full(n, g_strong), np.full(n, g_weak)]), offsets)
    strong, weak = _split_figures(both, n)
    r_a, _ = aerial.impedance(table_f)
    # the setting as the coverage and the station verdicts find it: the network tuned with the detector
    # at its weak-signal loading (a strong station's setting differs by a small fraction of a pF)
    c_needed = weak.capacitance
    c_aerial = c_total - c_needed - coil.self_capacitance
    within = np.ones_like(table_f, dtype=bool)
    if parts.capacitor_min_f is not None:
        within = (c_needed >= parts.capacitor_min_f) & (c_needed <= parts.capacitor_max_f)
    return {
        "inductance_h": 1.0 / (w * b_coil),  # the coil's shunt-equivalent inductance L(1 + 1/Qu²)
        "total_capacitance_f": c_total,
        "capacitor_setting_f": c_needed,
        "within": within,
        "aerial_shunt_capacitance_f": c_aerial,
        "aerial_inductive": shunt.capacitance < 0,
        "aerial_shunt_resistance_ohm": shunt.resistance,
        "aerial_share_ratio": c_aerial / np.where(c_total != 0, c_total, 1e-30),
        "unloaded_q": qu,
        "loaded_q": strong.loaded_q,
        "bandwidth_hz": strong.bandwidth,
        "power_transfer_ratio": strong.detector_per_volt**2 * g_strong * 4.0 * r_a,
        "power_transfer_if_matched_ratio": tank_mod.matched_power_ratio(np.minimum(strong.loaded_q, qu), qu),
        "weak_signal_loaded_q": weak.loaded_q,
        "bandwidth_weak_signal_hz": weak.bandwidth,
        "power_transfer_weak_signal_ratio": weak.detector_per_volt**2 * g_weak * 4.0 * r_a,
        "rejection": {f"rejection_{int(d / 1e3)}khz_db": v for d, v in strong.rejection.items()},
        "rejection_weak": {f"rejection_{int(d / 1e3)}khz_weak_signal_db": v for d, v in weak.rejection.items()},
        "wide": strong.wider_than_searched,
    }


def _split_figures(fig: tn_mod.TunedFigures, n: int) -> tuple:
    """The first ``n`` frequencies' tuned figures and the rest's."""
    def part(sl):
        return tn_mod.TunedFigures(*(v[sl] for v in fig[:5]), {d: v[sl] for d, v in fig.rejection.items()})

    return part(slice(None, n)), part(slice(n, None))


#: Keys of the tuning table's rows, in order, after ``frequency_hz``.
_ROW_KEYS = ("inductance_h", "total_capacitance_f", "capacitor_setting_f", "within_capacitor_range",
             "aerial_shunt_capacitance_f", "aerial_shunt_resistance_ohm", "aerial_share_ratio", "unloaded_q",
             "loaded_q", "bandwidth_hz", "power_transfer_ratio", "power_transfer_if_matched_ratio",
             "weak_signal_loaded_q", "bandwidth_weak_signal_hz", "power_transfer_weak_signal_ratio")


#: Said beside a loaded Q below 1: the tank no longer has a peak worth the name.
NO_RESONANCE_NOTE = "below 1: no useful resonance (the tank barely selects at all)"


def _row_tunability(c_need, c_total, c_aerial, parts, inductive=False) -> tuple:
    """Whether a tuning-table row can be tuned, and why not. Returns (tunable, resonates, reason).

    ``resonates`` is false when no positive capacitor setting resonates the coil with the aerial
    (the aerial alone gives more than the total capacitance needed, or it is past its own first
    resonance and looks inductive); ``tunable`` is false also when the setting is beyond the
    capacitor's range.
    """
    if c_need <= 0:
        if inductive:
            reason = ("cannot tune here: the aerial is above its own first resonance and looks like a coil, "
                      "so no capacitor setting resonates it — use a series capacitor, a tap or a shorter aerial")
        elif c_aerial >= c_total:
            reason = (f"cannot tune here: the aerial alone gives {si_text(c_aerial, 'F')}, more than the "
                      f"{si_text(c_total, 'F')} "
                      "needed — use a smaller coil, a series capacitor or a tap")
        else:
            reason = (f"cannot tune here: the aerial and the coupling already give more than the "
                      f"{si_text(c_total, 'F')} "
                      "needed — use a smaller coil, a series capacitor or a tap")
        return False, False, reason
    cmin, cmax = parts.capacitor_min_f, parts.capacitor_max_f
    if cmin is not None and not cmin <= c_need <= cmax:
        return False, True, f"out of the capacitor's range: {_tuning_need(parts, c_need)}"
    return True, True, ""


def _table_rows(table_f, arr, warnings, parts) -> list:
    # every column as a list of plain numbers first: one conversion per column, not one per cell
    col = {key: np.asarray(arr[key]).tolist() for key in _ROW_KEYS + ("within", "aerial_inductive", "wide")
           if key in arr}
    rejections = [(key, np.asarray(values).tolist())
                  for key, values in list(arr["rejection"].items()) + list(arr["rejection_weak"].items())]
    numeric = [np.asarray(table_f)] + [np.asarray(arr[key]) for key in _ROW_KEYS if key != "within_capacitor_range"] + \
        [np.asarray(v) for v in list(arr["rejection"].values()) + list(arr["rejection_weak"].values())]
    # every figure finite and within range (the usual case): the cells as they are, without a check each
    plain = all(bool(np.all(np.abs(v) <= CLAMP)) for v in numeric)
    names = ("frequency_hz",) + _ROW_KEYS + tuple(key for key, _ in rejections)
    within = [bool(v) for v in col["within"]]
    freqs = np.asarray(table_f).tolist()
    if plain:  # the cells as they are, a column at a time
        cells = zip(*([np.asarray(freqs, dtype=float).tolist()] +
                      [within if key == "within_capacitor_range" else np.asarray(col[key], dtype=float).tolist()
                       for key in _ROW_KEYS] + [np.asarray(values, dtype=float).tolist() for _, values in rejections]))
    else:  # each cell checked (and clamped, with a warning), a row at a time
        cells = ([_num(fi, "frequency_hz", warnings)] +
                 [within[i] if key == "within_capacitor_range" else _num(col[key][i], key, warnings)
                  for key in _ROW_KEYS] + [_num(values[i], "rejection", warnings) for _, values in rejections]
                 for i, fi in enumerate(freqs))
    rows = []
    for i, values in enumerate(cells):
        row = dict(zip(names, values))
        tunable, resonates, reason = _row_tunability(col["capacitor_setting_f"][i], col["total_capacitance_f"][i],
                                                     col["aerial_shunt_capacitance_f"][i], parts,
                                                     bool(col["aerial_inductive"][i]))
        row["tunable"] = tunable
        row["resonates_with_positive_capacitor"] = resonates
        if reason:
            row["reason"] = reason
        row["bandwidth_is_lower_bound"] = bool(col["wide"][i])
        if col["wide"][i]:
            row["bandwidth_note"] = BANDWIDTH_LOWER_BOUND_NOTE
        row["useful_resonance"] = bool(resonates and col["loaded_q"][i] >= 1.0)
        if col["loaded_q"][i] < 1.0:
            row["loaded_q_note"] = NO_RESONANCE_NOTE
        if col["aerial_inductive"][i]:
            row["note"] = "the aerial looks inductive here (above its first resonance)"
        rows.append(row)
    return rows


def _coverage(band, aerial, coil, parts, warnings, setting=None) -> tuple:
    """Band coverage by the capacitor range, with advice when it falls short. Returns (coverage, advice).

    The settings come from the network solve (:func:`_needed`; ``setting``, from :func:`_setting_of`,
    when one is shared with the dial picture), the model the station verdicts and the tuning table
    use, so a station is out of the tuning range exactly when it lies outside the reachable ranges
    stated here.
    """
    f_lo, f_hi = band
    cfg = _coil_config(parts, coil)
    c_edges = _needed(np.array([f_lo, f_hi]), aerial, coil.inductance, coil.q, cfg, coil.block)
    coverage = {
        "band_low_hz": f_lo,
        "band_high_hz": f_hi,
        "capacitor_needed_at_low_edge_f": _num(c_edges[0], "capacitor_needed_at_low_edge_f", warnings),
        "capacitor_needed_at_high_edge_f": _num(c_edges[1], "capacitor_needed_at_high_edge_f", warnings),
        "model": "network solve (tapped winding, coil self-capacitance, detector at its weak-signal loading)",
    }
    if parts.capacitor_min_f is None:
        coverage["verdict"] = "no capacitor range given: the settings needed are listed"
        return coverage, []
    # over the aerial's grid (and the band): what the capacitor reaches, inside the band or beyond it
    span = _check_span(aerial, f_lo, f_hi)
    pieces = _reachable_ranges(*span, setting or _setting_of(aerial, coil, parts), parts.capacitor_min_f,
                               parts.capacitor_max_f)
    covered = any(a <= f_lo * (1 + 1e-9) and b >= f_hi * (1 - 1e-9) for a, b in pieces)
    coverage["covered"] = covered
    coverage["reachable_ranges_hz"] = [[a, b] for a, b in pieces]
    if pieces:
        coverage["reachable_low_hz"] = pieces[0][0]
        coverage["reachable_high_hz"] = pieces[-1][1]
    words = " and ".join(f"{_khz(a)} to {_khz(b)}" for a, b in pieces)
    coverage["verdict"] = ("covers the band" if covered else
                           "does not cover the band" + (f": reaches {words}" if pieces
                                                        else ": no setting of the capacitor tunes inside the band"))
    advice = [] if covered else _advice((f_lo, f_hi), aerial, coil, parts, c_edges)
    return coverage, advice


def tuning_range_curve(frequency_hz, aerial_r_ohm, aerial_x_ohm, parts: TuningParts, points=60,
                       coil_inductance_h=None) -> dict:
    """Frequency against capacitor setting, for a picture of the dial.

    Parameters
    ----------
    frequency_hz, aerial_r_ohm, aerial_x_ohm : array_like
        The aerial on its grid. [Hz], [ohm], [ohm]
    parts : TuningParts
        Must give the capacitor range and the coil.
    points : int
        Number of capacitor settings.
    coil_inductance_h : float, optional
        Override the coil inductance (e.g. a designed one). [H]

    Returns
    -------
    dict
        ``capacitor_setting_f`` and ``frequency_hz`` (the settings that tune
        inside the aerial grid), ``reachable_low_hz``/``reachable_high_hz``
        (the part of the aerial grid the capacitor can reach; absent when
        nothing tunes in the grid), ``warnings``.

    Notes
    -----
    The capacitance needed is computed on a fine log grid over the aerial's
    range, and each setting is placed where that curve crosses it.

    Examples
    --------
    >>> f = [500e3, 1700e3]
    >>> x = [-1 / (2 * 3.141592653589793 * fi * 100e-12) for fi in f]
    >>> c = tuning_range_curve(f, [25, 25], x, TuningParts(coil_inductance_h=240e-6,
    ...                        capacitor_min_f=15e-12, capacitor_max_f=365e-12))
    >>> round(c["reachable_high_hz"] / 1e3)  # 1/(2π√(240 µH × 115 pF))
    958
    """
    _check_parts(parts)
    if parts.capacitor_min_f is None:
        raise ModelInputError("a tuning curve needs the capacitor range (capacitor_min_f, capacitor_max_f)")
    aerial = _Aerial(frequency_hz, aerial_r_ohm, aerial_x_ohm)
    notes: list = []
    _apply_calibration(aerial, parts, _diode(parts), notes)
    coil = _resolve_coil(
        parts if coil_inductance_h is None else parts._replace(coil_inductance_h=coil_inductance_h))
    return _range_curve(aerial, coil, parts, _setting_of(aerial, coil, parts), notes, points)


def _setting_of(aerial, coil, parts):
    """The capacitor setting needed, f -> [F] (:func:`_needed` with the coil's own configuration), remembering
    the grids it was asked for: the coverage and the dial picture search the same grid the same way."""
    cfg = _coil_config(parts, coil)
    seen: dict = {}

    def setting(f):
        f = np.asarray(f, dtype=float)
        key = (f.shape, f.tobytes())
        if key not in seen:
            seen[key] = _needed(f, aerial, coil.inductance, coil.q, cfg, coil.block)
        return seen[key]

    return setting


def _range_curve(aerial, coil, parts, setting, notes, points=60) -> dict:
    """:func:`tuning_range_curve` for a resolved aerial and coil; ``notes`` go into its warnings."""
    fine = np.geomspace(aerial.f[0], aerial.f[-1], 600) if aerial.f.size > 1 else aerial.f.copy()
    c_need = setting(fine)
    settings = np.linspace(parts.capacitor_min_f, parts.capacitor_max_f, int(points))
    # each setting's first crossing, every setting at once: only where the setting needed falls through it
    # (the resonance moving up the dial); a jump from below to above it is a second resonance's pole
    diff = c_need[np.newaxis, :] - settings[:, np.newaxis]
    falls = (diff[:, :-1] >= 0) & (diff[:, 1:] < 0)
    first = falls.argmax(axis=1) if falls.shape[1] else np.zeros(settings.size, dtype=int)
    out_c, out_f = [], []
    for cs, found, i, d in zip(settings.tolist(), falls.any(axis=1).tolist(), first.tolist(), diff):
        if found:
            t = d[i] / (d[i] - d[i + 1])
            out_c.append(cs)
            out_f.append(float(fine[i] * (fine[i + 1] / fine[i]) ** t))
    pieces = []
    if aerial.f.size > 1:
        pieces = _reachable_ranges(fine[0], fine[-1], setting, parts.capacitor_min_f, parts.capacitor_max_f,
                                   points=fine.size)
    elif parts.capacitor_min_f <= c_need[0] <= parts.capacitor_max_f:
        pieces = [(float(fine[0]), float(fine[0]))]
    warnings = []
    if pieces and (pieces[0][0] <= fine[0] or pieces[-1][1] >= fine[-1]):
        warnings.append("the tuning range reaches the edge of the aerial's frequency grid and may extend beyond it")
    if len(out_c) < len(settings):
        warnings.append(f"{len(settings) - len(out_c)} capacitor settings tune outside the aerial's frequency grid")
    result = {"capacitor_setting_f": out_c, "frequency_hz": out_f, "warnings": warnings + list(notes)}
    if pieces:
        result["reachable_low_hz"] = pieces[0][0]
        result["reachable_high_hz"] = pieces[-1][1]
        result["reachable_ranges_hz"] = [[a, b] for a, b in pieces]
    else:
        result["warnings"].append("no capacitor setting tunes inside the aerial's frequency grid")
    return result


# ------------------------------------------------------------------------------------ station verdicts


def _solve_tank_voltage(current, g0, tap, diode, load, rtol=VOLTAGE_RTOL, max_iter=VOLTAGE_MAX_ITER):
    """RMS tank-top voltage V with V·(G0 + tap²/R_in(√2·tap·V)) = I (bisection in log V)."""
    current = np.asarray(current, dtype=float)
    g0 = np.asarray(g0, dtype=float)
    hi = np.maximum(current / g0, 1e-30)
    lo = hi * 1e-12
    it = 0
    for it in range(1, max_iter + 1):
        mid = np.sqrt(lo * hi)
        d = det_mod.loaded_detector(np.sqrt(2.0) * tap * mid, diode.saturation_current_a, diode.ideality, load)
        resid = mid * (g0 + tap**2 / d.input_resistance) - current
        up = resid > 0
        hi = np.where(up, mid, hi)
        lo = np.where(up, lo, mid)
        if np.all(hi / lo - 1.0 <= rtol):
            break
    v = np.sqrt(lo * hi)
    return v, bool(np.all(hi / lo - 1.0 <= rtol)), it


def _audio_power(v_rms, tap, diode, load):
    return det_mod.audio_output(np.sqrt(2.0) * tap * np.asarray(v_rms, dtype=float), diode, load).audio_power


def _threshold_voltage(tap, diode, load, power=AUDIBLE_POWER_W, refine=40):
    """RMS tank voltage at which the audio reaches ``power`` (log grid, then bisection in log V).

    Depends only on the detector, its tap and load, so it is worked out once per set of those
    (the day and the night assessments share it).
    """
    return _threshold_voltage_cached(float(tap), diode, float(load), float(power), int(refine))


@functools.lru_cache(maxsize=256)
def _threshold_voltage_cached(tap, diode, load, power, refine):
    return _threshold_voltage_uncached(tap, diode, load, power, refine)


#: Points of the threshold's log grid (1 nV to 1 kV) and the stride of its first, coarse look.
THRESHOLD_GRID_POINTS = 241
THRESHOLD_GRID_STRIDE = 16


def _threshold_voltage_uncached(tap, diode, load, power, refine):
    """The first point of a log grid at which the audio reaches ``power``, then ``refine`` halvings in log V
    of the step below it.

    The audio power rises with the voltage, so the grid's first loud point is found from every
    :data:`THRESHOLD_GRID_STRIDE`-th point and then the points of the one stride that holds it; the crossing is
    then pinned down (:func:`aerial.core.arrays.pin_crossing`, on ln P) and the halvings replayed against it
    (:func:`aerial.core.arrays.replay_bisection`): the threshold the plain bisection gives, in a few calls of the
    detector model instead of one per few halvings.
    """
    grid = np.geomspace(1e-9, 1e3, THRESHOLD_GRID_POINTS)
    found = _first_loud(grid, tap, diode, load, power)
    if found is None:
        return np.inf
    i, p_quiet, p_loud = found
    if i == 0:
        return grid[0]

    def measure(v):
        p = _audio_power(v, tap, diode, load)
        return p >= power, np.log(np.maximum(p, 1e-300) / power)

    good, bad = np.array([grid[i]]), np.array([grid[i - 1]])
    gap_good = np.array([max(math.log(p_loud / power), 0.0)])
    gap_bad = np.array([min(math.log(max(p_quiet, 1e-300) / power), -1e-300)])
    a, b = pin_crossing(good, bad, gap_good, gap_bad, measure)
    loud, _ = replay_bisection(good, bad, a, b, lambda v: measure(v)[0], refine)
    return np.float64(loud[0])


def _first_loud(grid, tap, diode, load, power):
    """(index of the first point of ``grid`` [V] whose audio reaches ``power`` [W], the audio power at the point
    before it and at it), or None when none does: from every :data:`THRESHOLD_GRID_STRIDE`-th point first, then
    the points between the last quiet one and the first loud one of those."""
    step = THRESHOLD_GRID_STRIDE
    coarse = np.arange(0, grid.size, step)
    if coarse[-1] != grid.size - 1:
        coarse = np.append(coarse, grid.size - 1)
    p = _audio_power(grid[coarse], tap, diode, load)
    loud = np.flatnonzero(p >= power)
    if loud.size == 0:
        return None
    j = int(loud[0])
    if j == 0:
        return 0, None, float(p[0])
    lo, hi = int(coarse[j - 1]), int(coarse[j])
    fine = _audio_power(grid[lo + 1:hi], tap, diode, load)
    powers = [float(p[j - 1])] + fine.tolist() + [float(p[j])]
    k = next(k for k, pk in enumerate(powers) if pk >= power)
    return lo + k, powers[k - 1], powers[k]



def assess_stations(frequency_hz, aerial_r_ohm, aerial_x_ohm, aerial_rr_ohm, effective_height_m,
                    parts: TuningParts, stations, noise_category="residential",
                    modulation_depth=det_mod.DEFAULT_MODULATION_DEPTH) -> list:
    """Which stations will be heard, and how well.

    Parameters
    ----------
    frequency_hz : array_like
        Aerial frequency grid, strictly increasing. [Hz]
    aerial_r_ohm : array_like
        Aerial series resistance including every loss. [ohm]
    aerial_x_ohm : array_like
        Aerial series reactance. [ohm]
    aerial_rr_ohm : array_like
        Aerial radiation resistance. [ohm]
    effective_height_m : array_like
        Aerial effective height. [m]
    parts : TuningParts
        Tuning parts, detector, earphone.
    stations : sequence of Station
    noise_category : {"city", "residential", "rural", "quiet rural"}
        Man-made noise environment (ITU-R P.372).
    modulation_depth : float
        AM modulation depth assumed for the audio estimate. [1]

    Returns
    -------
    list of dict
        One dict per station: ``field_v_per_m``, ``open_circuit_voltage_v``,
        ``available_power_w``, ``detector_power_w``, ``tank_voltage_v`` (RMS),
        ``detected_voltage_v``, ``audio_power_w``, ``loaded_q``,
        ``bandwidth_hz``, ``noise_field_v_per_m``, ``signal_to_noise_db``,
        ``verdict`` (one of "clearly heard", "marginal", "not heard") with its
        ``reason``, ``heard_behind`` (stations whose spill-over is audible when
        tuned here), ``spills_over`` (stations this one is heard behind),
        ``audible_width_hz``, ``audible_range_hz`` and ``audible_across_dial`` (where on the dial
        this station stays audible, bounded by the dial: :func:`audible_on_dial`),
        ``warnings``.

    Notes
    -----
    Field: Sommerfeld–Norton flat earth; V_oc = E·h_e. The tank is tuned to
    each station; the tank voltage and the detector's input resistance are
    solved together (:func:`aerial.models.detector.loaded_detector`). The
    noise is man-made noise only, in the tank's −3 dB bandwidth. Spill-over
    uses the single-tuned response at the wanted station's loaded Q.

    Examples
    --------
    >>> f = [500e3, 1700e3]
    >>> x = [-1 / (2 * 3.141592653589793 * fi * 100e-12) for fi in f]
    >>> parts = TuningParts(coil_inductance_h=200e-6, capacitor_min_f=15e-12, capacitor_max_f=365e-12)
    >>> s = Station("Demo Local", 1e6, 10e3, 20e3, 15.0, 1e-3)
    >>> assess_stations(f, [25, 25], x, [0.3, 3.0], [8, 8], parts, [s])[0]["verdict"]
    'clearly heard'
    """
    return assess_stations_by_condition(frequency_hz, aerial_r_ohm, aerial_x_ohm, aerial_rr_ohm, effective_height_m,
                                        parts, [list(stations)], noise_category, modulation_depth)[0]


def assess_stations_by_condition(frequency_hz, aerial_r_ohm, aerial_x_ohm, aerial_rr_ohm, effective_height_m,
                                 parts: TuningParts, conditions, noise_category="residential",
                                 modulation_depth=det_mod.DEFAULT_MODULATION_DEPTH, band=None, coil=None) -> list:
    """The same stations judged under several conditions (by day, by night) in one vectorised pass.

    Parameters
    ----------
    frequency_hz, aerial_r_ohm, aerial_x_ohm, aerial_rr_ohm, effective_height_m, parts, noise_category, modulation_depth
        As :func:`assess_stations`.
    conditions : sequence of sequences of Station
        One list of stations per condition, each the same stations (names and frequencies) with
        that condition's sky-wave field and atmospheric noise.
    band : (float, float), optional
        The band a coil is designed for when the parts give none, as :func:`design_tuning` was
        given it, so the stations are heard with the coil the tuning shows; default the whole
        frequency sweep. [Hz]
    coil : optional
        The coil from :func:`tuning_coil` (then ``band`` is not needed); default: resolved or
        designed here.

    Returns
    -------
    list of lists of dict
        For each condition, what :func:`assess_stations` returns for its stations.

    Notes
    -----
    Every station of every condition goes through the tank and detector solution together (the
    cost of that pass hardly grows with the number of stations); interference and spill-over are
    then judged within each condition only.

    Examples
    --------
    >>> f = [500e3, 1700e3]
    >>> x = [-1 / (2 * 3.141592653589793 * fi * 100e-12) for fi in f]
    >>> parts = TuningParts(coil_inductance_h=200e-6, capacitor_min_f=15e-12, capacitor_max_f=365e-12)
    >>> day = Station("Demo Far", 1e6, 10e3, 400e3, 15.0, 1e-3)
    >>> night = Station("Demo Far", 1e6, 10e3, 400e3, 15.0, 1e-3, sky_wave_field_v_per_m=1e-3)  # 1 mV/m by sky wave
    >>> [r[0]["verdict"] for r in assess_stations_by_condition(f, [25, 25], x, [0.3, 3.0], [8, 8], parts,
    ...                                                         [[day], [night]])]
    ['not heard', 'marginal']
    """
    _check_parts(parts)
    noise_mod.check_noise_category(noise_category)
    if not (0 < modulation_depth <= 1):
        raise ModelInputError(f"modulation_depth must lie in (0, 1], got {modulation_depth!r}")
    conditions = [list(c) for c in conditions]
    n = len(conditions[0]) if conditions else 0
    if any(len(c) != n for c in conditions):
        raise ModelInputError("every condition must list the same stations")
    if n == 0:
        return [[] for _ in conditions]
    every = [s for c in conditions for s in c]
    _check_stations(every)
    aerial = _Aerial(frequency_hz, aerial_r_ohm, aerial_x_ohm, aerial_rr_ohm, effective_height_m)
    common: list = []
    diode = _diode(parts)
    _apply_calibration(aerial, parts, diode, common)
    coil = _station_coil(aerial, parts, band) if coil is None else coil
    together = _station_arrays(aerial, coil, parts, diode, every, noise_category, modulation_depth)
    # the dial an audible width is bounded by: the band the tuning is for, else the sweep [Hz]
    together["dial_hz"] = (float(aerial.f[0]), float(aerial.f[-1])) if band is None else (float(band[0]), float(band[1]))
    return [_judged_rows(aerial, parts, stations, _condition_arrays(together, k * n, (k + 1) * n), common)
            for k, stations in enumerate(conditions)]


def _condition_arrays(a: dict, lo: int, hi: int) -> dict:
    """The stations lo..hi of a joint pass: their figures, and the n × n block of who spills onto whom."""
    total = len(a["fs"])

    def cut(v):
        if isinstance(v, tuple) and hasattr(v, "_fields"):
            return type(v)(*(cut(x) for x in v))
        if isinstance(v, np.ndarray) and v.ndim >= 1 and v.shape[0] == total:
            return v[lo:hi, lo:hi] if v.ndim == 2 and v.shape[1] == total else v[lo:hi]
        return v

    return {k: cut(v) for k, v in a.items()}


def _judged_rows(aerial, parts, stations, a, common) -> list:
    judged = judge_stations(a, parts, [s.name for s in stations])
    results = []
    for i, s in enumerate(stations):
        warn = list(common) + _station_warnings(aerial, a, i)
        results.append(_station_row(s, a, i, judged[i], warn))
    _spill_over(results, stations, a)
    if parts.arrangement in tank_mod.NO_DC_PATH_ARRANGEMENTS:
        for r in results:
            r["warnings"].append(tank_mod.BLEED_NOTE)
    if parts.earphone_ohm < LOW_IMPEDANCE_EARPHONE_OHM:
        for r in results:
            r["warnings"].append(LOW_IMPEDANCE_NOTE)
    return results


def _check_stations(stations):
    for s in stations:
        for name in ("frequency_hz", "power_w", "distance_m", "soil_relative_permittivity"):
            v = float(getattr(s, name))
            if not (np.isfinite(v) and v > 0):
                raise ModelInputError(f"station '{s.name}': {name} must be positive, got {v!r}")


def _station_coil(aerial, parts, band=None) -> _Coil:
    """The tank coil: given, from its winding, or designed for the band (default the sweep); a designed
    coil's ``design_notes`` say how it was chosen."""
    if not _coil_given(parts):
        if parts.capacitor_min_f is None:
            raise ModelInputError("give the coil (inductance or winding) or the capacitor range to design one")
        band = (aerial.f[0], aerial.f[-1]) if band is None else (float(band[0]), float(band[1]))
        return _designed_coil(band, aerial, parts)
    return _resolve_coil(parts)


def tuning_coil(frequency_hz, aerial_r_ohm, aerial_x_ohm, parts: TuningParts, band=None):
    """The tank coil :func:`design_tuning` works with for these arguments: the one given, or the one designed.

    Worked out once per report and handed to :func:`design_tuning`, :func:`assess_stations_by_condition`
    and :func:`design_for_stations` (``coil=``), so the stations are heard with the coil the tuning shows.

    Parameters
    ----------
    frequency_hz, aerial_r_ohm, aerial_x_ohm, parts, band
        As :func:`design_tuning`.

    Returns
    -------
    object
        The resolved coil (its inductance [H] is ``.inductance``).

    Examples
    --------
    >>> f = [500e3, 1700e3]
    >>> x = [-1 / (2 * 3.141592653589793 * fi * 100e-12) for fi in f]
    >>> parts = TuningParts(capacitor_min_f=15e-12, capacitor_max_f=365e-12)
    >>> c = tuning_coil(f, [25, 25], x, parts, band=(530e3, 1600e3))
    >>> design_tuning(f, [25, 25], x, parts, band=(530e3, 1600e3), coil=c)["coil"]["inductance_h"] == c.inductance
    True
    """
    _check_parts(parts)
    aerial = _Aerial(frequency_hz, aerial_r_ohm, aerial_x_ohm)
    _apply_calibration(aerial, parts, _diode(parts), [])
    f_lo, f_hi = (aerial.f[0], aerial.f[-1]) if band is None else (float(band[0]), float(band[1]))
    if not (0 < f_lo < f_hi):
        raise ModelInputError("band must be (f_lo, f_hi) with 0 < f_lo < f_hi")
    return _station_coil(aerial, parts, (f_lo, f_hi))


def _station_heights(aerial, stations, fs):
    """Effective height toward each station: its own (by bearing) where given, else the aerial's at its frequency. [m]"""
    own = np.array([np.nan if s.effective_height_m is None else float(s.effective_height_m) for s in stations])
    return np.where(np.isfinite(own), own, aerial.effective_height(fs))


def _station_arrays(aerial, coil, parts, diode, stations, noise_category, modulation_depth) -> dict:
    """Every per-station figure as arrays over the stations (one vectorised pass through the network)."""
    load = float(parts.earphone_ohm)
    fs = np.array([float(s.frequency_hz) for s in stations])
    gw = gw_mod.groundwave_field(np.array([s.power_w for s in stations]), np.array([s.distance_m for s in stations]),
                                 fs, np.array([s.soil_relative_permittivity for s in stations]),
                                 np.array([s.soil_conductivity_s_per_m for s in stations]))
    he = _station_heights(aerial, stations, fs)
    r_a, _ = aerial.impedance(fs)
    sky = np.array([float(s.sky_wave_field_v_per_m) for s in stations])
    field = np.hypot(gw.field, sky)
    v_oc = field * he
    lv = tn_mod.station_levels(fs, v_oc, _za(aerial), _net_parts(coil, parts), diode, load)
    v_det = lv.detector_voltage
    audio = det_mod.audio_output(np.sqrt(2.0) * v_det, diode, load, modulation_depth)  # the carrier's detection too
    fam = noise_mod.man_made_noise_figure(fs, noise_category)
    atm = np.array([-np.inf if s.atmospheric_noise_db is None else float(s.atmospheric_noise_db) for s in stations])
    fam_total, _ = atm_mod.combine_noise_figures(fam.noise_figure_db, atm)
    en = noise_mod.v_per_m_from_dbuv_per_m(noise_mod.noise_field_dbuv_per_m(fam_total, fs, lv.bandwidth))
    return {
        "fs": fs, "gw": gw, "he": he, "r_a": r_a, "rr": aerial.radiation_resistance(fs), "v_oc": v_oc,
        "c_need": lv.capacitance, "v_top": lv.top_voltage, "v_det": v_det,
        "converged": lv.converged, "audio": audio, "p_det": v_det**2 / lv.input_resistance,
        "p_av": v_oc**2 / (4.0 * r_a), "ql": lv.loaded_q, "bw": lv.bandwidth, "fam": fam, "en": en,
        "snr": noise_mod.db_from_voltage_ratio(field / en), "field": field, "sky": sky, "fam_total": fam_total,
        "threshold": _threshold_voltage(1.0, diode, load), "others": lv.others,
    }


def _station_warnings(aerial, a, i) -> list:
    warn = []
    gw, fam = a["gw"], a["fam"]
    if aerial.outside(a["fs"][i]):
        warn.append(f"{si_text(float(a['fs'][i]), 'Hz')} lies outside the swept bands ({si_text(aerial.f[0], 'Hz')} to "
                    f"{si_text(aerial.f[-1], 'Hz')}): its figures take the aerial's values at the nearest band edge; "
                    "add its band to [site] bands")
    if gw.beyond_flat_earth[i] if np.ndim(gw.beyond_flat_earth) else gw.beyond_flat_earth:
        warn.append("beyond the flat-earth range: curved-earth effects not included, field likely lower")
    if np.ravel(gw.too_close)[i]:
        warn.append("within one wavelength of the transmitter: the ground-wave formula is not valid this close")
    if np.ravel(fam.below_range)[i]:  # the atmospheric noise is added to it here (the model's note says it is not)
        warn.append(noise_mod.BELOW_RANGE_EXTENDED)
    if not a["converged"] or not bool(np.ravel(a["audio"].converged)[i]):
        warn.append("the tank-voltage / detector solution did not converge fully")
    return warn


def _tuning_need(parts, c_need) -> str:
    """What it would take to tune a station the capacitor cannot reach ("" when it can)."""
    cmin, cmax = parts.capacitor_min_f, parts.capacitor_max_f
    if cmin is None or cmin <= c_need <= cmax:
        return ""
    rng = f"the capacitor gives {_pf(cmin)} to {_pf(cmax)}"
    if c_need < 0:
        return (f"needs less capacitance than the aerial alone gives: even with no capacitor the coil tunes below "
                f"this station; {rng}; use a smaller coil, a tap or a series capacitor")
    if c_need < cmin:
        return f"needs {_pf(c_need)}; {rng}: use a smaller coil, or a tap or series capacitor for the aerial"
    return f"needs {_pf(c_need)}; {rng}: use a larger coil or add fixed capacitance"


def judge_stations(a: dict, parts: TuningParts, names) -> list:
    """One verdict per station under one set of conditions (fields, noise and interference).

    Parameters
    ----------
    a : dict
        Arrays over the stations: ``c_need`` [F], ``audio`` (audio power [W]), ``snr`` [dB],
        ``others`` (n × n RMS detector voltage of station j when tuned to i [V]) and
        ``threshold`` (just-audible detector voltage [V]).
    parts : TuningParts
    names : sequence of str

    Returns
    -------
    list of dict
        ``verdict`` (one of :data:`VERDICTS`), ``verdict_text`` (the verdict in words, with the
        interferer's name and level or what tuning needs), ``reason``, and ``interference``
        (the strongest audible other station: ``name``, ``level_relative_db``) when there is one.

    Notes
    -----
    Called once per condition (day, and a night column can call it again with night-time
    fields and noise). Order of judgement: out of the tuning range; too little audio; below the
    noise; swamped (another station less than :data:`SWAMP_DB` below); heard with another
    station underneath (less than the interference margin below); heard.
    """
    margin = DEFAULT_INTERFERENCE_MARGIN_DB if parts.interference_margin_db is None else parts.interference_margin_db
    others = np.array(a["others"], dtype=float)
    own = np.diag(others).copy()
    audible = others >= a["threshold"]
    np.fill_diagonal(audible, False)
    rel = np.where(audible, 20.0 * np.log10(np.maximum(others, 1e-300) / np.maximum(own, 1e-300)[:, None]), -np.inf)
    out = []
    for i, name in enumerate(names):
        pa, sn = float(a["audio"].audio_power[i]), float(a["snr"][i])
        need = _tuning_need(parts, float(a["c_need"][i]))
        j = int(np.argmax(rel[i])) if len(names) > 1 else 0
        worst = float(rel[i, j]) if len(names) > 1 else -np.inf
        v = {"interference": {"name": names[j], "level_relative_db": worst}} if np.isfinite(worst) else {}
        level = f"audio {watts_words(pa)}, {sn:.0f} dB above the noise"
        if need:
            v = {"verdict": "out of the tuning range", "verdict_text": f"out of the tuning range ({need})",
                 "reason": f"the tuning capacitor cannot reach {_khz(a['fs'][i])} ({need})"}
        elif pa < AUDIBLE_POWER_W:
            v.update(verdict="not heard", verdict_text="not heard: too little audio",
                     reason=f"too little audio ({watts_words(pa)}; about {watts_words(AUDIBLE_POWER_W)} is "
                            "assumed to be just audible)")
        elif sn < MARGINAL_SNR_DB:
            v.update(verdict="below the noise", verdict_text=f"below the noise ({sn:.0f} dB signal-to-noise)",
                     reason=f"buried in the noise ({sn:.0f} dB signal-to-noise)")
        elif worst > -SWAMP_DB:
            how = f"{-worst:.0f} dB down" if worst <= 0 else f"{worst:.0f} dB louder"
            v.update(verdict="swamped", verdict_text=f"swamped by {names[j]} ({how})",
                     reason=f"{names[j]} comes through {how} at the detector; {level}")
        else:
            clear = pa >= CLEAR_POWER_W and sn >= CLEAR_SNR_DB
            verdict = "clearly heard" if clear else "marginal"
            why = "" if clear else ("weak audio: " if pa < CLEAR_POWER_W else "noisy: ")
            v.update(verdict=verdict, verdict_text=verdict, reason=why + level)
            if worst > -margin:
                v.update(verdict="heard with interference",
                         verdict_text=f"heard with {names[j]} underneath ({-worst:.0f} dB down)",
                         reason=why + level + f"; {names[j]} {-worst:.0f} dB down (less than the {margin:g} dB margin)")
        out.append(v)
    return out


def audible_on_dial(frequency_hz, loaded_q, level_ratio, dial_hz) -> dict:
    """Where on the dial a station stays audible, bounded by the dial.

    Parameters
    ----------
    frequency_hz : float
        The station's frequency. [Hz]
    loaded_q : float
        The tank's loaded Q with the station tuned in. [1]
    level_ratio : float
        The just-audible detector voltage over the station's own when tuned in (≥ 1: not heard). [1]
    dial_hz : (float, float)
        The dial: the band the tuning is designed for, widened to the station's frequency when it
        lies outside. [Hz]

    Returns
    -------
    dict
        ``audible_width_hz`` (the stretch of the dial over which the station stays audible, 0 when
        it is not heard), ``audible_range_hz`` ([low, high] on the dial, when heard) and
        ``audible_across_dial`` (true when it is audible wherever the dial is set).

    Notes
    -----
    The span is :func:`aerial.models.tank.audible_tuning_span` at the station's loaded Q; at a
    loaded Q near 1 it runs to many times the station's frequency, which no dial reaches, so it is
    cut at the dial's ends and a station heard from one end to the other is flagged instead.

    Examples
    --------
    >>> w = audible_on_dial(1.13e6, 0.8, 0.1, (520e3, 1710e3))  # a strong local, a very broad tank
    >>> w["audible_across_dial"], round(w["audible_width_hz"] / 1e3)
    (True, 1190)
    >>> audible_on_dial(1e6, 50.0, 2.0, (520e3, 1710e3))  # not heard even when tuned in
    {'audible_width_hz': 0.0, 'audible_across_dial': False}
    """
    if not level_ratio < 1.0:  # not heard even when tuned in (a failed solution included)
        return {"audible_width_hz": 0.0, "audible_across_dial": False}
    lo_dial, hi_dial = min(dial_hz[0], frequency_hz), max(dial_hz[1], frequency_hz)
    low, high = (float(v) for v in tank_mod.audible_tuning_span(frequency_hz, loaded_q, level_ratio))
    low, high = max(low, lo_dial), min(high, hi_dial)
    return {"audible_width_hz": high - low, "audible_range_hz": [low, high],
            "audible_across_dial": bool(low <= lo_dial and high >= hi_dial)}


def _station_row(s, a, i, judged, warn) -> dict:
    fs, gw, v_top, audio = a["fs"], a["gw"], a["v_top"], a["audio"]
    threshold, ql = a["threshold"], a["ql"]
    pa = float(audio.audio_power[i])
    r_ratio = threshold / a["v_det"][i] if np.isfinite(threshold) else np.inf
    audible = audible_on_dial(float(fs[i]), float(ql[i]), float(r_ratio), a["dial_hz"])
    return {
        "name": s.name,
        "frequency_hz": _num(fs[i], "frequency_hz", warn),
        "distance_m": _num(s.distance_m, "distance_m", warn),
        "power_w": _num(s.power_w, "power_w", warn),
        "field_v_per_m": _num(a["field"][i], "field_v_per_m", warn),
        "ground_wave_field_v_per_m": _num(gw.field[i], "ground_wave_field_v_per_m", warn),
        "sky_wave_field_v_per_m": _num(a["sky"][i], "sky_wave_field_v_per_m", warn),
        "noise_figure_db": _num(a["fam_total"][i], "noise_figure_db", warn),
        "ground_attenuation_ratio": _num(gw.attenuation[i], "ground_attenuation_ratio", warn),
        "effective_height_m": _num(a["he"][i], "effective_height_m", warn),
        "open_circuit_voltage_v": _num(a["v_oc"][i], "open_circuit_voltage_v", warn),
        "aerial_efficiency_ratio": _num(a["rr"][i] / a["r_a"][i], "aerial_efficiency_ratio", warn),
        "available_power_w": _num(a["p_av"][i], "available_power_w", warn),
        "capacitor_setting_f": _num(a["c_need"][i], "capacitor_setting_f", warn),
        "tunable": judged["verdict"] != "out of the tuning range",
        "tank_voltage_v": _num(v_top[i], "tank_voltage_v", warn),
        "detector_power_w": _num(a["p_det"][i], "detector_power_w", warn),
        "detector_power_if_tuned_w": _num(a["p_det"][i], "detector_power_if_tuned_w", warn),
        **({} if judged["verdict"] != "out of the tuning range" else {
            "detector_power_note": "the capacitor cannot tune this station: the power is what the detector "
                                   "would get if it could"}),
        "detector_input_resistance_ohm": _num(audio.input_resistance[i], "detector_input_resistance_ohm", warn),
        "detected_voltage_v": _num(audio.detected_voltage[i], "detected_voltage_v", warn),
        "audio_voltage_v": _num(audio.audio_voltage[i], "audio_voltage_v", warn),
        "audio_power_w": _num(pa, "audio_power_w", warn),
        "loaded_q": _num(ql[i], "loaded_q", warn),
        "bandwidth_hz": _num(a["bw"][i], "bandwidth_hz", warn),
        "noise_field_v_per_m": _num(a["en"][i], "noise_field_v_per_m", warn),
        "signal_to_noise_db": _num(a["snr"][i], "signal_to_noise_db", warn),
        "verdict": judged["verdict"],
        "verdict_text": judged["verdict_text"],
        "reason": judged["reason"],
        **({"interference": {"name": judged["interference"]["name"], "level_relative_db": _num(
            judged["interference"]["level_relative_db"], "level_relative_db", warn)}} if "interference" in judged else {}),
        "audible_width_hz": _num(audible["audible_width_hz"], "audible_width_hz", warn),
        **({"audible_range_hz": [_num(v, "audible_range_hz", warn) for v in audible["audible_range_hz"]]}
           if "audible_range_hz" in audible else {}),
        "audible_across_dial": audible["audible_across_dial"],
        "heard_behind": [],
        "spills_over": [],
        "warnings": warn,
    }


def _spill_over(results, stations, a):
    """Station j heard while tuned to station i: every pair at once, as an n × n array."""
    v_spill = a["others"]
    own = np.diag(v_spill)
    heard = v_spill >= a["threshold"]
    np.fill_diagonal(heard, False)
    heard &= np.array([r["tunable"] for r in results])[:, np.newaxis]
    for i, j in zip(*np.nonzero(heard)):
        rel = float(noise_mod.db_from_voltage_ratio(v_spill[i, j] / own[i]))
        results[i]["heard_behind"].append({"name": stations[j].name, "level_relative_db": _num(rel, "level", [])})
        results[j]["spills_over"].append(stations[i].name)


# ------------------------------------------------------------------------- design for the stations


def design_for_stations(frequency_hz, aerial_r_ohm, aerial_x_ohm, aerial_rr_ohm, effective_height_m,
                        parts: TuningParts, stations, band, spacing_hz=9e3, coil=None) -> dict | None:
    """Coupling, taps and capacitor that hear the weakest wanted station best while keeping the others down.

    Parameters
    ----------
    frequency_hz, aerial_r_ohm, aerial_x_ohm, aerial_rr_ohm, effective_height_m : array_like
        The aerial on its grid (as :func:`assess_stations`).
    parts : TuningParts
        The site's parts: the coil (kept when given, else designed per coupling for the band),
        the capacitor range (optional when the coil is given), detector, earphone and the
        interference margin.
    stations : sequence of Station
        The listed stations; those inside ``band`` are the wanted ones.
    band : (float, float)
        The band the tank covers. [Hz]
    spacing_hz : float
        Channel spacing for the adjacent-channel rejection figure. [Hz]
    coil : optional
        The site's coil from :func:`tuning_coil`; default: resolved or designed here.

    Returns
    -------
    dict or None
        None when no listed station lies in the band. Otherwise ``margin_db``, ``wanted``,
        ``current`` (the parts as wired), ``chosen`` (the best coupling and taps with the site's coil
        and capacitor), ``suggested`` (the same with a standard variable capacitor chosen to reach
        the wanted stations), each with their figures and its comparison with ``current``;
        ``meets_margin``, ``summary`` (the recommendation in words), ``tradeoff`` (every candidate),
        ``remedies`` when no single tank meets the margin, ``notes``.

    Notes
    -----
    See :mod:`aerial.estimate.station_design`; the detector's input resistance is looked up from
    a table of the detector model, each station tuned at its weak-signal loading then solved.
    A design is never recommended that gives the weakest wanted station less than the parts as
    wired do (by more than ``station_design.NO_WORSE_DB``) unless it meets the margin.

    Examples
    --------
    >>> f = [500e3, 1700e3]
    >>> x = [-1 / (2 * 3.141592653589793 * fi * 150e-12) for fi in f]
    >>> parts = TuningParts(coil_inductance_h=200e-6, capacitor_min_f=15e-12, capacitor_max_f=365e-12)
    >>> st = [Station("Demo A", 700e3, 10e3, 20e3, 15.0, 1e-3), Station("Demo B", 720e3, 50e3, 10e3, 15.0, 1e-3)]
    >>> d = design_for_stations(f, [25, 25], x, [0.3, 3.0], [8, 8], parts, st, (520e3, 1710e3))
    >>> d["chosen"]["detector_tap_ratio"] <= 1.0
    True
    """
    _check_parts(parts)
    lo, hi = float(band[0]), float(band[1])
    wanted = [s for s in stations if lo <= s.frequency_hz <= hi]
    coil_given = _coil_given(parts)
    if not wanted or (parts.capacitor_min_f is None and not coil_given):
        return None
    aerial = _Aerial(frequency_hz, aerial_r_ohm, aerial_x_ohm, aerial_rr_ohm, effective_height_m)
    scene, base = _design_scene(aerial, parts, wanted, spacing_hz, (lo, hi), coil)
    rows, current = _design_rows(scene, aerial, parts, base, (lo, hi))
    if parts.capacitor_min_f is not None:
        reach = (current["capacitance_f"] >= parts.capacitor_min_f) & (current["capacitance_f"] <= parts.capacitor_max_f)
        current = sd_mod.out_of_reach(current, reach)
    usable = [r for r in rows if r["fits_yours"] or r["capacitor"] is not None]
    if not usable:
        return None
    can_hear = sd_mod.hearable(usable + [current], scene.threshold)
    *rows, current = sd_mod.rescore_many(rows + [current], can_hear, scene.margin_db, scene.threshold)
    chosen, suggested = _pick(rows, current, parts)
    out = {
        "margin_db": scene.margin_db,
        "margin_source": "default" if parts.interference_margin_db is None else "site",
        "capacitor_given": parts.capacitor_min_f is not None,
        "capacitor_assumed": bool(parts.capacitor_assumed),
        "detector_tap_designed": bool(parts.detector_tap_designed),
        "wanted": scene.names,
        "channel_spacing_hz": float(spacing_hz),
        "chosen": {**_design_dict(chosen, scene), **_versus(chosen, current, scene)},
        "suggested": {**_design_dict(suggested, scene), **_versus(suggested, current, scene)},
        "current": _design_dict(current, scene),
        "meets_margin": bool(chosen["meets_margin"]),
        "tradeoff": [{**_design_dict(r, scene, brief=True), "chosen": r is chosen, "suggested": r is suggested}
                     for r in rows if r["fits_yours"] or r["capacitor"] is not None],
        "notes": [],
    }
    out["summary"] = _design_summary(out, parts.capacitor_min_f is not None, parts.capacitor_assumed,
                                     parts.detector_tap_designed)
    never = [n for n, ok in zip(scene.names, can_hear) if not ok]
    if never and can_hear.any():
        out["not_designed_for"] = never
        out["notes"].append("too weak to hear with any of these designs, so left out of the objective (still counted "
                            "as interferers): " + ", ".join(never))
    remedies = _remedies_for_designs(scene, parts, chosen, suggested, current, len(wanted))
    if remedies:
        out["remedies"] = remedies
    return out


def _remedies_for_designs(scene, parts, chosen, suggested, current, n_wanted) -> list:
    """The remedies for each design shown that misses the margin: the best with the site's parts, and the
    suggestion when it is another design. Each remedy says which design it applies to."""
    if n_wanted < 2:
        return []
    designs = [(chosen, "yours")]
    if suggested is not chosen:
        designs.append((suggested, "suggested"))
    out = []
    for row, which in designs:
        if row["meets_margin"] or not np.isfinite(row["worst_separation_db"]):
            continue
        words = _remedy_design_words(row, which, row is current, parts.capacitor_min_f is not None,
                                     suggested is chosen, parts.capacitor_assumed, parts.detector_tap_designed)
        for r in _remedies(scene, row, parts):
            out.append({**r, "applies_to": which, "applies_to_text": words})
    return out


def parts_words(assumed: bool, designed: bool = False) -> dict:
    """How the design's words name the site's tuning parts: the user's own, or the ones assumed for them;
    and the parts as the site wires them ("as wired"), or as the band design chose them (``designed``: the
    detector's tap, with the coil and perhaps the coupling, chosen by :func:`design_coupling`).

    >>> parts_words(False)["coil and capacitor"], parts_words(True)["parts"], parts_words(True, True)["as wired"]
    ('your coil and capacitor', 'the assumed parts', 'as designed for the band')
    """
    wired = "as designed for the band" if designed else "as wired"
    if assumed:
        return {"coil and capacitor": "the designed coil and the assumed capacitor", "capacitor": "the assumed capacitor",
                "parts": "the assumed parts", "as wired": wired}
    if designed:
        return {"coil and capacitor": "the designed coil and your capacitor", "capacitor": "your capacitor",
                "parts": "the designed parts", "as wired": wired}
    return {"coil and capacitor": "your coil and capacitor", "capacitor": "your capacitor", "parts": "your parts",
            "as wired": wired}


def _remedy_design_words(row, which, as_wired, capacitor_given, same, assumed=False, designed=False) -> str:
    """Which design a set of remedies is worked out for, in words ("for your parts as wired", ...)."""
    said = parts_words(assumed, designed)
    how = f"the coupling and taps {said['as wired']}" if as_wired else (
        f"{_setting_text(row['coupling'])}, detector at {row['detector_tap_fraction']:.2f} of the turns")
    if which == "yours" and capacitor_given:
        who = f"{said['parts']} {said['as wired']}" if as_wired else f"{said['coil and capacitor']} with {how}"
        return f"for {who}" + (" (the suggestion too)" if same else "")
    cap = row.get("capacitor")
    cap_words = f", a {cap[1] * 1e12:.0f}–{cap[0] * 1e12:.0f} pF capacitor" if cap is not None else ""
    return f"for the suggested design ({how}{cap_words})"


def _design_scene(aerial, parts, wanted, spacing_hz, band=None, coil=None):
    """The design's :class:`station_design.Scene` (aerial EMF of each wanted station) and the site's coil
    (``coil``, or resolved here)."""
    diode = _diode(parts)
    _apply_calibration(aerial, parts, diode, [])
    fs = np.array([s.frequency_hz for s in wanted])
    gw = gw_mod.groundwave_field(np.array([s.power_w for s in wanted]), np.array([s.distance_m for s in wanted]), fs,
                                 np.array([s.soil_relative_permittivity for s in wanted]),
                                 np.array([s.soil_conductivity_s_per_m for s in wanted]))
    emf = np.hypot(gw.field, [s.sky_wave_field_v_per_m for s in wanted]) * _station_heights(aerial, wanted, fs)
    margin = DEFAULT_INTERFERENCE_MARGIN_DB if parts.interference_margin_db is None else parts.interference_margin_db
    load = float(parts.earphone_ohm)
    base = _station_coil(aerial, parts, band) if coil is None else coil
    scene = sd_mod.Scene(_za(aerial), base.q, fs, emf, [s.name for s in wanted], diode, load,
                         _threshold_voltage(1.0, diode, load), float(margin), float(spacing_hz),
                         tn_mod.input_resistance_table(diode, load))
    return scene, base


def _pick(rows, current, parts) -> tuple:
    """(chosen, suggested): the best with the site's capacitor, and the best with a standard one."""
    yours = [r for r in rows if r["fits_yours"]] if parts.capacitor_min_f is not None else []
    std = [r for r in rows if r["capacitor"] is not None]
    baseline = current
    if parts.capacitor_min_f is None and current["capacitor"] is None and std:
        # no capacitor of the site's own, and no common one tunes the coupling as wired: the strongest
        # design for the weakest station is the one the others must not fall behind
        baseline = max(std, key=lambda r: r["weakest_power_w"])
    k = sd_mod.choose(std, baseline)
    suggested = baseline if k < 0 else std[k]
    if parts.capacitor_min_f is None:
        return suggested, suggested
    k = sd_mod.choose(yours, current)
    return (current if k < 0 else yours[k]), suggested


def _current_coupling(parts: TuningParts) -> dict:
    return {"arrangement": parts.arrangement, "tap_fraction": parts.tap_fraction,
            "series_capacitance": parts.series_capacitance_f, "coupling_coefficient": parts.coupling_coefficient,
            "primary_inductance": parts.primary_inductance_h}


def _design_rows(scene, aerial, parts, base: _Coil, band) -> tuple:
    """Every candidate coupling × detector tap, with whether the site's capacitor reaches every wanted
    station (``fits_yours``) and the standard capacitor that would (``capacitor``, or None); and the
    parts as wired, solved the same way. Returns (rows, current).

    Every candidate is solved in one stacked pass (:func:`station_design.evaluate_many`)."""
    coil_given = _coil_given(parts)
    tried = []
    for cpl in sd_mod.candidates(parts.arrangement):
        lp = None
        if cpl["arrangement"] == "separate primary":
            lp = sd_mod.PRIMARY_FRACTION * base.inductance
            cpl = {**cpl, "primary_inductance": lp}
        cfg = _config(parts, arrangement=cpl["arrangement"], tap_fraction=cpl.get("tap_fraction"),
                      series_capacitance=cpl.get("series_capacitance"), primary_inductance=lp,
                      coupling_coefficient=cpl.get("coupling_coefficient"))
        tried.append((cpl, cfg, None if coil_given else parts._replace(
            arrangement=cfg["arrangement"], tap_fraction=cfg["tap_fraction"], series_capacitance_f=cfg["series_capacitance"],
            primary_inductance_h=cfg["primary_inductance"], coupling_coefficient=cfg["coupling_coefficient"])))
    if not coil_given:  # every coupling's coil searched for together first
        _covering_coils_many(band, aerial, [sub for _, _, sub in tried])
    couplings = []
    for cpl, cfg, sub in tried:
        coil = base
        if not coil_given:
            coil = _designed_coil(band, aerial, sub)
            if cpl.get("primary_inductance") is not None:
                cpl = {**cpl, "primary_inductance": sd_mod.PRIMARY_FRACTION * coil.inductance}
        couplings.append((cpl, {**cfg, "self_capacitance": coil.self_capacitance}, coil))
    settings = _needed_stack(scene.frequency, aerial, scene.q_fun, [(cfg, coil) for _, cfg, coil in couplings])
    todo = []
    for (cpl, _, coil), c, ends in zip(couplings, settings, sd_mod.row_extremes(settings)):
        yours = parts.capacitor_min_f is not None and sd_mod.fits(c, parts.capacitor_min_f, parts.capacitor_max_f,
                                                                  extremes=ends)
        if not yours and sd_mod.standard_capacitor(c, ends) is None:
            continue  # no capacitor reaches every wanted station with this coil and coupling (closed form)
        todo += [(cpl, coil, m) for m in sd_mod.DETECTOR_TAPS]
    todo.append((_current_coupling(parts), base, parts.detector_tap_fraction))
    nets = [sd_mod.candidate_parts(scene, cpl, coil.inductance, coil.block, m, coil.self_capacitance)
            for cpl, coil, m in todo]
    solved = sd_mod.evaluate_many(scene, nets)
    ends = sd_mod.row_extremes([ev["capacitance_f"] for ev in solved])
    rows = [_design_row(scene, ev, cpl, coil, m, parts, e) for ev, (cpl, coil, m), e in zip(solved, todo, ends)]
    return rows[:-1], rows[-1]


def _needed_stack(f, aerial, q_fun, configs) -> np.ndarray:
    """:func:`_needed` at ``f`` for many (cfg, coil) pairs in one stacked solve: one row of settings each. [F]"""
    if not configs:
        return np.zeros((0, np.size(f)))
    f = np.atleast_1d(np.asarray(f, dtype=float))
    nets = [tn_mod.network_parts(cfg["arrangement"], coil.inductance, q_fun, cfg["detector_tap"], cfg["tap_fraction"],
                                 cfg["series_capacitance"], cfg["primary_inductance"], cfg["coupling_coefficient"],
                                 coil.block, self_capacitance=cfg.get("self_capacitance", 0.0))
            for cfg, coil in configs]
    g = np.array([[cfg["detector_conductance"]] for cfg, _ in configs])
    s = net_mod.solve_network_stack(f, _za(aerial)(f), nets, 0.0, g, outputs=("top_impedance",))
    return -np.imag(1.0 / s.top_impedance) / (2.0 * np.pi * f)


def _design_row(scene, ev, cpl, coil: _Coil, m, parts, extremes=None) -> dict:
    """One solved candidate (:func:`station_design.evaluate`); whether the site's capacitor and which standard
    one reach its settings (``extremes``: the settings' smallest and largest, when worked out already)."""
    c = ev["capacitance_f"]
    fits_yours = parts.capacitor_min_f is not None and sd_mod.fits(c, parts.capacitor_min_f, parts.capacitor_max_f,
                                                                   extremes=extremes)
    return {**ev, "coupling": cpl, "coil_inductance_h": coil.inductance, "block": coil.block,
            "self_capacitance_f": coil.self_capacitance, "detector_tap_fraction": float(m),
            "fits_yours": bool(fits_yours), "capacitor": sd_mod.standard_capacitor(c, extremes),
            "your_capacitor": (parts.capacitor_max_f, parts.capacitor_min_f) if parts.capacitor_min_f is not None else None,
            "meets_margin": bool(ev["worst_separation_db"] >= scene.margin_db)}


def _setting_text(cpl) -> str:
    arr = cpl["arrangement"]
    if arr == "coil tap":
        return f"aerial tap at {cpl['tap_fraction']:.2f} of the turns"
    if arr == "series capacitor":
        return f"{_pf(cpl['series_capacitance'])} series capacitor"
    if arr == "separate primary":
        lp = f" {_uh(cpl['primary_inductance'])}" if cpl.get("primary_inductance") else ""
        return f"separate primary{lp}, k = {cpl['coupling_coefficient']:.2f}"
    return "aerial straight to the tank top"


def _design_dict(row, scene, brief=False) -> dict:
    cpl = row["coupling"]
    unreachable = [n for n, u in zip(scene.names, row.get("unreachable", [])) if u]
    out = {
        "arrangement": cpl["arrangement"],
        "setting": _setting_text(cpl),
        "detector_tap_ratio": row["detector_tap_fraction"],
        "coil_inductance_h": row["coil_inductance_h"],
        "weakest_station": scene.names[row["weakest"]],
        "weakest_detector_power_w": _num(row["weakest_power_w"], "weakest_detector_power_w", []),
        "adjacent_rejection_db": _num(row["rejection_db"], "adjacent_rejection_db", []),
        "meets_margin": bool(row["meets_margin"]),
        "separated": bool(row.get("separated", row["meets_margin"])),
        "inaudible": [scene.names[i] for i in row.get("inaudible", [])],
        "others_audible": bool(np.isfinite(row["worst_separation_db"])),
        "fits_your_capacitor": bool(row.get("fits_yours", True)),
    }
    if unreachable:
        out["out_of_reach"] = unreachable
    if row.get("capacitor") is not None:
        out["standard_capacitor_max_f"], out["standard_capacitor_min_f"] = (float(v) for v in row["capacitor"])
    for key, src in (("aerial_tap_ratio", "tap_fraction"), ("series_capacitance_f", "series_capacitance"),
                     ("coupling_coefficient_ratio", "coupling_coefficient"),
                     ("primary_inductance_h", "primary_inductance")):
        if cpl.get(src) is not None:
            out[key] = float(cpl[src])
    if np.isfinite(row["worst_separation_db"]):
        i, j = row["pair"]
        out["worst_separation_db"] = _num(row["worst_separation_db"], "worst_separation_db", [])
        out["worst_pair"] = [scene.names[i], scene.names[j]]
    if not brief:
        out["stations"] = [{"name": n, "detector_power_w": _num(p, "detector_power_w", [])}
                           for n, p in zip(scene.names, row["power_w"])]
    return out


def _versus(row, current, scene) -> dict:
    """A design against the parts as wired: the weakest wanted station's detector power with each."""
    w = row["weakest"]
    out = {"as_wired": row is current,
           "weakest_station_as_wired_w": _num(current["power_w"][w], "weakest_station_as_wired_w", [])}
    if current["weakest_power_w"] > 0 and row["weakest_power_w"] > 0:
        out["weakest_change_db"] = _num(10.0 * np.log10(row["weakest_power_w"] / current["weakest_power_w"]),
                                        "weakest_change_db", [])
    return out


def _design_line(r, cur, margin, capacitor_words, wired="as wired") -> str:
    """One recommendation in words, its numbers beside it; ``wired`` names the parts the design is compared with."""
    what = f"keep the coupling and taps {wired}" if r["as_wired"] else \
        f"{r['setting']}, detector at {r['detector_tap_ratio']:.2f} of the turns"
    if capacitor_words:
        what = f"{capacitor_words}, keeping the coupling and taps {wired}" if r["as_wired"] else \
            f"{capacitor_words} with {what}"
    name = r["weakest_station"]
    alone = len(r.get("stations", [])) == 1  # one station listed: no other to keep down, none weaker
    if r["weakest_detector_power_w"] > 0:
        who = f"the only listed station, {name}," if alone else f"the weakest wanted station, {name},"
        text = f"{what}: {who} gets {eng_w(r['weakest_detector_power_w'])} at the detector"
    else:
        text = f"{what}: {name} stays out of the capacitor's reach"
    if r["as_wired"]:
        pass
    else:
        before = r["weakest_station_as_wired_w"]
        text += f" ({eng_w(before)} {wired}" if before > 0 else f" (out of the capacitor's reach {wired}"
        if before > 0:
            ch = 10.0 * np.log10(max(r["weakest_detector_power_w"], 1e-300) / before)
            text += f": {abs(ch):.1f} dB {'more' if ch >= 0 else 'less'}"
        text += ")"
    missed = [n for n in cur.get("out_of_reach", []) if r["as_wired"] is False and n != name]
    if missed:
        text += f"; {wired}, the capacitor cannot reach {', '.join(missed)}"
    if r["meets_margin"]:
        if not alone:
            text += f"; every other listed station stays at least {margin:g} dB below"
        before = r.get("weakest_station_as_wired_w", 0.0)
        if before > 0 and r["weakest_detector_power_w"] < before * 10.0 ** (-NO_WORSE_DB_WORDS / 10.0):
            loss = 10.0 * np.log10(before / max(r["weakest_detector_power_w"], 1e-300))
            text += (f" — {loss:.1f} dB less for {name} than {wired}, accepted because it buys the {margin:g} dB "
                     f"margin the parts {wired} miss")
    elif r["separated"] and r["inaudible"]:
        others = "" if alone else f" the others stay {margin:g} dB down but"
        text += (f";{others} {', '.join(r['inaudible'])} stays below the earphone's "
                 "audibility threshold — not a success")
    else:
        faint = [n for n in r["inaudible"] if n not in r.get("out_of_reach", [])]
        if faint:
            text += (f"; {', '.join(faint)} {'stays' if len(faint) == 1 else 'stay'} below the earphone's audibility "
                     "threshold")
        sep = r.get("worst_separation_db")
        if sep is not None:
            text += (f"; no single tuned circuit keeps every other listed station {margin:g} dB down (worst: "
                     f"{r['worst_pair'][1]} {abs(sep):.0f} dB {'below' if sep >= 0 else 'above'} {r['worst_pair'][0]})")
        if r["as_wired"] and not cur["meets_margin"]:
            text += (f"; every design that separates better leaves a wanted station worse off than these parts do "
                     f"(more than {NO_WORSE_DB_WORDS:g} dB for the weakest, or below the audibility threshold) without "
                     "reaching the margin, so none is recommended over them")
    return text


def eng_w(p) -> str:
    """A detector power in words, three figures, e.g. '2.73 nW' (:func:`watts_words`)."""
    if not p or p <= 0:
        return "nothing (out of the capacitor's reach)"
    return watts_words(p, 3)


#: Said with the design's words (the design never costs the weakest station more than this unless it
#: buys the margin: :data:`station_design.NO_WORSE_DB`). [dB]
NO_WORSE_DB_WORDS = sd_mod.NO_WORSE_DB


def _design_summary(d, capacitor_given, assumed=False, designed=False) -> list:
    """The recommendations in words: with the site's coil and capacitor (or the ones assumed for it), and with a
    standard capacitor; against the parts as wired, or as the band design chose them (``designed``)."""
    m, cur = d["margin_db"], d["current"]
    said = parts_words(assumed, designed)
    lines = []
    if capacitor_given:
        lines.append(f"with {said['coil and capacitor']}: " + _design_line(d["chosen"], cur, m, "", said["as wired"]))
    s, c = d["suggested"], d["chosen"]
    same = capacitor_given and (s["setting"], s["detector_tap_ratio"]) == (c["setting"], c["detector_tap_ratio"])
    if "standard_capacitor_max_f" in s and not (s["as_wired"] and capacitor_given):
        words = (f"a {s['standard_capacitor_min_f'] * 1e12:.0f}–{s['standard_capacitor_max_f'] * 1e12:.0f} pF "
                 "variable capacitor (a common size)")
        if same:
            lines.append(f"suggested: the same; {said['capacitor']} reaches every wanted station (a common "
                         f"{s['standard_capacitor_min_f'] * 1e12:.0f}–{s['standard_capacitor_max_f'] * 1e12:.0f} pF "
                         "one would too)")
        else:
            lines.append("suggested: " + _design_line(s, cur, m, words, said["as wired"]))
    elif capacitor_given and s["as_wired"]:
        why = ("no common capacitor with another coupling or tap does better for the weakest wanted station")
        if cur.get("out_of_reach"):
            why = (f"no common capacitor with another coupling or tap reaches {', '.join(cur['out_of_reach'])} "
                   "without leaving a station these parts hear worse off")
        lines.append(f"suggested: keep {said['parts']} {said['as wired']} ({why})")
    elif not lines:
        lines.append("no common variable capacitor reaches every wanted station with this coil: a different coil "
                     "is needed")
    return lines


def _remedies(scene, row, parts) -> list:
    """The usual remedies for the pair one tank cannot separate, with their computed effect."""
    i, j = row["pair"]
    cpl = row["coupling"]
    lp = cpl.get("primary_inductance")
    net = tn_mod.network_parts(cpl["arrangement"], row["coil_inductance_h"], scene.q_fun, row["detector_tap_fraction"],
                               cpl.get("tap_fraction"), cpl.get("series_capacitance"), lp,
                               cpl.get("coupling_coefficient"), row["block"], self_capacitance=row["self_capacitance_f"])
    out = []
    for r in sd_mod.remedies(scene, net, row["coil_inductance_h"], row["block"], row["detector_tap_fraction"], i, j,
                             row["self_capacitance_f"]):
        r = {k: (_num(v, k, []) if isinstance(v, float) else v) for k, v in r.items()}
        r["wanted"], r["interferer"] = scene.names[i], scene.names[j]
        r["margin_db"] = scene.margin_db
        r["separation_before_db"] = _num(row["worst_separation_db"], "separation_before_db", [])
        if "coupling_coefficient" in r:
            r["coupling_coefficient_ratio"] = r.pop("coupling_coefficient")
        r["meets_margin"] = bool(r["separation_db"] >= scene.margin_db and r["wanted_audible"])
        r["wanted_power_before_w"] = _num(row["power_w"][i], "wanted_power_before_w", [])
        r["wanted_power_change_db"] = _num(10.0 * np.log10(max(r["wanted_power_w"], 1e-300)
                                                           / max(r["wanted_power_before_w"], 1e-300)),
                                           "wanted_power_change_db", [])
        r["verdict_text"] = remedy_verdict(r)
        out.append(r)
    return out


#: A remedy costing the wanted station more than this at the detector is not called an improvement [dB].
REMEDY_POWER_LOSS_DB = 3.0


def remedy_verdict(r) -> str:
    """A remedy's verdict in words that follow its numbers (separation and the wanted station's power).

    >>> remedy_verdict({"meets_margin": False, "separation_db": -35.0, "separation_before_db": -47.0,
    ...                 "wanted_power_change_db": -35.3})
    'worse: the wanted station loses 35.3 dB at the detector, still short of the margin'
    """
    loss = -r["wanted_power_change_db"]
    better = r["separation_db"] > r["separation_before_db"]
    if not r.get("wanted_audible", True) and r["separation_db"] >= r.get("margin_db", -np.inf):
        lost = f" (the wanted station loses {loss:.1f} dB at the detector)" if loss > 0 else ""
        return (f"keeps {r.get('interferer', 'the other station')} {r['separation_db']:.0f} dB down but leaves "
                f"{r.get('wanted', 'the wanted station')} below the earphone's audibility threshold{lost} — "
                "not a success")
    if r["meets_margin"]:
        if loss > REMEDY_POWER_LOSS_DB:
            return f"meets the margin, but the wanted station loses {loss:.1f} dB at the detector"
        return "meets the margin"
    if not better:
        return "does not help: no better separated than the single circuit"
    if loss > REMEDY_POWER_LOSS_DB:
        return f"worse: the wanted station loses {loss:.1f} dB at the detector, still short of the margin"
    return "better, still short of the margin"

