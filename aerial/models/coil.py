"""Single-layer air-cored tuning coils: inductance, winding for a wanted inductance, AC loss, Q.

Conventions
-----------
* ``form_diameter`` is the outside diameter of the former the wire is wound on;
  the current sheet sits at the wire centres, so its diameter is
  ``form_diameter + wire_diameter``.
* ``pitch`` is the centre-to-centre spacing of neighbouring turns. Close-wound
  means ``pitch`` equals the wire's outside diameter (bare diameter plus enamel).
* The winding length is ``turns * pitch``.

References
----------
.. [1] H. Nagaoka, "The inductance coefficients of solenoids", Journal of the
   College of Science, Imperial University of Tokyo, vol. 27, art. 6, 1909.
.. [2] H. A. Wheeler, "Simple inductance formulas for radio coils",
   Proc. IRE, vol. 16, no. 10, pp. 1398-1400, 1928.
.. [3] P. L. Dowell, "Effects of eddy currents in transformer windings",
   Proc. IEE, vol. 113, no. 8, pp. 1387-1394, 1966 (from memory).
.. [4] S. Ramo, J. R. Whinnery, T. Van Duzer, Fields and Waves in Communication
   Electronics, Wiley, internal impedance of a round wire (from memory).
.. [5] R. G. Medhurst, "H.F. resistance and self-capacitance of single-layer
   solenoids", Wireless Engineer, vol. 24, pp. 35-43 and 80-92, 1947 (from memory).
"""

from __future__ import annotations

import numpy as np

from aerial.core.constants import MU_0 as mu_0
from aerial.core.errors import ModelInputError
from aerial.core.records import NamedTuple
from aerial.core.units import INCH_M
from aerial.models.checks import positive as _positive
from aerial.models.conductor import COPPER_RESISTIVITY, skin_depth
from aerial.models.roots import bracketed_root
from aerial.models.special_functions import ellipe, ellipk, ive
from aerial.models.winding import CoilWinding  # noqa: F401  (the coil as wound, read from here too)

#: Wheeler (1928) states about 1 % accuracy for winding lengths above this fraction of the diameter. [1]
WHEELER_MIN_LENGTH_TO_DIAMETER = 0.4

#: Default relative tolerance of the turns solver. [1]
TURNS_RTOL = 1e-10
#: Default iteration limit of the turns solver.
TURNS_MAX_ITER = 200

#: Ratio of an enamelled strand's outside diameter to its bare diameter (assumption). [1]
STRAND_INSULATION_RATIO = 1.1
#: Fraction of a stranded bundle's cross-section filled by strands (assumption, round packing). [1]
STRAND_PACKING = 0.7

#: Below this winding length / diameter the one-dimensional field behind Dowell's method fails. [1]
DOWELL_MIN_LENGTH_TO_DIAMETER = 1.0
#: Above this pitch / wire diameter the turns are too far apart for Dowell's layer model. [1]
DOWELL_MAX_PITCH_RATIO = 2.0




def nagaoka_coefficient(length_to_diameter):
    """Nagaoka's coefficient of a uniform cylindrical current sheet.

    Parameters
    ----------
    length_to_diameter : array_like
        Winding length divided by the current-sheet diameter. [1]

    Returns
    -------
    ndarray
        Nagaoka's coefficient K, 0 < K < 1. [1]

    Notes
    -----
    With k² = d²/(d² + l²) and k' = √(1 − k²) = l/√(d² + l²) [1]_:

        K = 4/(3π k') · [ (k'²/k²)(K(k) − E(k)) + E(k) − k ]

    where K(k), E(k) are the complete elliptic integrals of the first and
    second kind (:func:`~aerial.models.special_functions.ellipk` and ``ellipe`` take m = k²). The
    inductance of the sheet is L = µ0 N² π r² K / l. Exact for a current sheet;
    a round-wire winding differs by Rosa's small spacing corrections, not applied.

    References
    ----------
    .. [1] H. Nagaoka, "The inductance coefficients of solenoids", J. College of
       Science, Imperial University of Tokyo, vol. 27, art. 6, 1909.

    Examples
    --------
    >>> round(float(nagaoka_coefficient(1.0)), 4)
    0.6884
    """
    x = _positive("length_to_diameter", length_to_diameter)
    m = 1.0 / (1.0 + x**2)  # k²
    k = np.sqrt(m)
    kp = x / np.sqrt(1.0 + x**2)  # k'
    big_k = ellipk(m)
    big_e = ellipe(m)
    return 4.0 / (3.0 * np.pi * kp) * ((kp**2 / m) * (big_k - big_e) + big_e - k)


def current_sheet_inductance(diameter, length, turns):
    """Inductance of a single-layer solenoid treated as a current sheet (Nagaoka).

    Parameters
    ----------
    diameter : array_like
        Current-sheet diameter (form diameter plus one wire diameter). [m]
    length : array_like
        Winding length. [m]
    turns : array_like
        Number of turns. [1]

    Returns
    -------
    ndarray
        Inductance. [H]

    Notes
    -----
    L = µ0 N² π (d/2)² K(l/d) / l, with K Nagaoka's coefficient [1]_.

    References
    ----------
    .. [1] H. Nagaoka, J. College of Science, Imperial University of Tokyo, 27, 1909.

    Examples
    --------
    >>> round(float(current_sheet_inductance(0.05, 0.05, 60)) * 1e6, 1)
    122.3
    """
    d = _positive("diameter", diameter)
    l = _positive("length", length)
    n = _positive("turns", turns)
    return mu_0 * n**2 * np.pi * (d / 2.0) ** 2 / l * nagaoka_coefficient(l / d)


class WheelerResult(NamedTuple):
    inductance: np.ndarray  #: [H]
    within_stated_accuracy: np.ndarray  #: True where l > 0.4 d (Wheeler: about 1 %)


def wheeler_inductance(diameter, length, turns):
    """Wheeler's formula for a single-layer solenoid.

    Parameters
    ----------
    diameter : array_like
        Current-sheet diameter. [m]
    length : array_like
        Winding length. [m]
    turns : array_like
        Number of turns. [1]

    Returns
    -------
    WheelerResult
        ``inductance`` [H] and ``within_stated_accuracy`` (False where l ≤ 0.4 d,
        outside the range for which Wheeler states about 1 % accuracy).

    Notes
    -----
    L[µH] = d² n² / (18 d + 40 l) with d and l in inches [1]_.

    References
    ----------
    .. [1] H. A. Wheeler, "Simple inductance formulas for radio coils",
       Proc. IRE 16(10), 1398-1400, 1928.

    Examples
    --------
    >>> r = wheeler_inductance(0.05, 0.05, 60)
    >>> round(float(r.inductance) * 1e6, 1), bool(r.within_stated_accuracy)
    (122.2, True)
    """
    d = _positive("diameter", diameter) / INCH_M
    l = _positive("length", length) / INCH_M
    n = _positive("turns", turns)
    microhenry = d**2 * n**2 / (18.0 * d + 40.0 * l)  # [2] Wheeler 1928
    return WheelerResult(microhenry * 1e-6, np.asarray(l > WHEELER_MIN_LENGTH_TO_DIAMETER * d))


_INDUCTANCE_MODELS = ("nagaoka", "wheeler")


def solenoid_inductance(form_diameter, wire_diameter, turns, pitch=None, model="nagaoka"):
    """Inductance of a single-layer coil from its winding.

    Parameters
    ----------
    form_diameter : array_like
        Outside diameter of the coil former. [m]
    wire_diameter : array_like
        Outside diameter of the wire (bare or over the enamel). [m]
    turns : array_like
        Number of turns. [1]
    pitch : array_like, optional
        Turn-to-turn spacing; default close-wound (``wire_diameter``). [m]
    model : {"nagaoka", "wheeler"}
        Current sheet with Nagaoka's coefficient, or Wheeler's formula.

    Returns
    -------
    ndarray
        Inductance. [H]

    Notes
    -----
    Current-sheet diameter = form diameter + wire diameter; winding length = turns × pitch.

    References
    ----------
    Nagaoka 1909; Wheeler, Proc. IRE 16, 1928.

    Examples
    --------
    >>> round(float(solenoid_inductance(0.0495, 0.0005, 60, pitch=50e-3 / 60)) * 1e6, 1)
    122.3
    """
    if model not in _INDUCTANCE_MODELS:
        raise ModelInputError(f"'{model}' is not a valid inductance model, must be one of 'nagaoka', 'wheeler'")
    wd = _positive("wire_diameter", wire_diameter)
    p = wd if pitch is None else _positive("pitch", pitch)
    if np.any(p < wd * (1 - 1e-9)):
        raise ModelInputError("pitch must be at least the wire diameter (turns cannot overlap)")
    d = _positive("form_diameter", form_diameter) + wd
    n = _positive("turns", turns)
    if model == "wheeler":
        return wheeler_inductance(d, n * p, n).inductance
    return current_sheet_inductance(d, n * p, n)


class WindingDesign(NamedTuple):
    turns: float  #: exact (fractional) turns for the wanted inductance [1]
    turns_whole: int  #: turns rounded up to a whole number [1]
    winding_length: float  #: for ``turns_whole`` turns [m]
    inductance_whole: float  #: inductance with ``turns_whole`` turns [H]
    wire_length: float  #: wire on the coil, without leads [m]
    converged: bool
    iterations: int


def winding_for_inductance(inductance, form_diameter, wire_diameter, pitch=None,
                           rtol=TURNS_RTOL, max_iter=TURNS_MAX_ITER):
    """Turns and winding length of a single-layer coil for a wanted inductance.

    Parameters
    ----------
    inductance : float
        Wanted inductance. [H]
    form_diameter : float
        Outside diameter of the former. [m]
    wire_diameter : float
        Outside diameter of the wire. [m]
    pitch : float, optional
        Turn spacing; default close-wound (``wire_diameter``). [m]
    rtol : float
        Relative tolerance on the turns. [1]
    max_iter : int
        Iteration limit of the root finder.

    Returns
    -------
    WindingDesign
        Turns (exact and whole), winding length, inductance achieved, wire length,
        convergence flag and iteration count.

    Notes
    -----
    Solves µ0 N² π r² K(l/d)/l = L for N with l = N·pitch (Brent's method,
    :func:`aerial.models.roots.bracketed_root`);
    L grows monotonically with N at fixed pitch.

    References
    ----------
    Nagaoka 1909 (current-sheet inductance); Brent 1973, ch. 4 (the root finder; from memory).

    Examples
    --------
    >>> w = winding_for_inductance(240e-6, 0.06, 0.5e-3)
    >>> w.converged, w.turns_whole, round(w.winding_length * 1e3, 1)
    (True, 63, 31.5)
    """
    target = float(_positive("inductance", inductance))
    fd = float(_positive("form_diameter", form_diameter))
    wd = float(_positive("wire_diameter", wire_diameter))
    p = wd if pitch is None else float(_positive("pitch", pitch))
    if p < wd * (1 - 1e-9):
        raise ModelInputError("pitch must be at least the wire diameter (turns cannot overlap)")
    if not (0 < rtol < 0.1):
        raise ModelInputError(f"rtol must lie between 0 and 0.1, got {rtol!r}")
    if int(max_iter) < 1:
        raise ModelInputError(f"max_iter must be a positive integer, got {max_iter!r}")
    d = fd + wd

    def excess(n):
        return float(current_sheet_inductance(d, n * p, n)) / target - 1.0

    lo, hi = 1e-3, 1.0
    while excess(hi) < 0:
        hi *= 2.0
        if hi > 1e7:
            raise ModelInputError("the wanted inductance needs more than ten million turns on this former")
    found = bracketed_root(excess, lo, hi, rtol=rtol, max_iter=int(max_iter))
    n = found.root
    whole = max(1, int(np.ceil(n - 1e-6)))
    return WindingDesign(
        turns=float(n),
        turns_whole=whole,
        winding_length=whole * p,
        inductance_whole=float(current_sheet_inductance(d, whole * p, whole)),
        wire_length=whole * np.pi * d,
        converged=found.converged,
        iterations=found.iterations,
    )


def isolated_wire_ac_factor(wire_diameter, frequency, resistivity=COPPER_RESISTIVITY):
    """AC/DC resistance ratio of a straight isolated round wire (skin effect only).

    Parameters
    ----------
    wire_diameter : array_like
        Bare wire diameter. [m]
    frequency : array_like
        Frequency. [Hz]
    resistivity : array_like
        Conductor resistivity. [ohm m]

    Returns
    -------
    ndarray
        R_ac / R_dc ≥ 1. [1]

    Notes
    -----
    R_ac/R_dc = Re[(γa/2) I0(γa)/I1(γa)], γ = (1 + j)/δ (exponentially scaled Bessel
    functions avoid overflow). Tends to a/(2δ) + 1/4 for a ≫ δ.

    References
    ----------
    Ramo, Whinnery & Van Duzer, Fields and Waves, round-wire internal impedance (from memory).

    Examples
    --------
    >>> round(float(isolated_wire_ac_factor(1.628e-3, 1e6)), 1)
    6.4
    """
    a = _positive("wire_diameter", wire_diameter) / 2.0
    delta = skin_depth(frequency, resistivity)
    ga = (1.0 + 1.0j) * a / delta
    return np.real(ga / 2.0 * ive(0, ga) / ive(1, ga))


def _dowell_factor(delta_ratio, layers):
    """Dowell's AC/DC resistance factor for ``layers`` layers of normalised thickness Δ."""
    x = np.asarray(delta_ratio, dtype=float)
    m = np.asarray(layers, dtype=float)
    small = x < 0.05
    xs = np.where(small, 0.05, x)
    e2 = np.exp(-2.0 * xs)
    e4 = e2 * e2
    # (sinh 2Δ + sin 2Δ)/(cosh 2Δ − cos 2Δ), scaled by 2e^{-2Δ} to avoid overflow  [3] Dowell 1966
    skin = (1.0 - e4 + 2.0 * np.sin(2.0 * xs) * e2) / (1.0 + e4 - 2.0 * np.cos(2.0 * xs) * e2)
    e1 = np.exp(-xs)
    # (sinh Δ − sin Δ)/(cosh Δ + cos Δ), scaled by 2e^{-Δ}
    prox = (1.0 - e1 * e1 - 2.0 * np.sin(xs) * e1) / (1.0 + e1 * e1 + 2.0 * np.cos(xs) * e1)
    full = xs * (skin + (2.0 / 3.0) * (m**2 - 1.0) * prox)
    series = 1.0 + (5.0 * m**2 - 1.0) / 45.0 * x**4  # low-frequency expansion of the same expression
    return np.where(small, series, full)


class CoilLoss(NamedTuple):
    ac_resistance: np.ndarray  #: series AC resistance of the winding [ohm]
    dc_resistance: np.ndarray  #: [ohm]
    ac_factor: np.ndarray  #: ac_resistance / dc_resistance [1]
    unloaded_q: np.ndarray  #: ωL / R_ac [1]
    warnings: list  #: plain-English notes where the method's range ends


def coil_loss(frequency, inductance, form_diameter, wire_diameter, turns, pitch=None,
              strands=1, strand_diameter=None, resistivity=COPPER_RESISTIVITY):
    """AC resistance and unloaded Q of a single-layer coil, solid or stranded wire.

    Parameters
    ----------
    frequency : array_like
        Frequency. [Hz]
    inductance : float
        Coil inductance. [H]
    form_diameter : float
        Outside diameter of the former. [m]
    wire_diameter : float
        Outside diameter of the wire (for stranded wire: of the whole bundle). [m]
    turns : float
        Number of turns. [1]
    pitch : float, optional
        Turn spacing; default close-wound. [m]
    strands : int
        Number of insulated strands (1 = solid wire). [1]
    strand_diameter : float, optional
        Bare diameter of one strand; required when ``strands`` > 1. [m]
        For solid wire the bare diameter is taken as ``wire_diameter``.
    resistivity : float
        Conductor resistivity. [ohm m]

    Returns
    -------
    CoilLoss

    Notes
    -----
    Dowell's one-dimensional method [3]_: a round wire of diameter d becomes a
    square conductor of side h = d√π/2; the layer porosity is η = h/pitch
    (stranded: η = √N·h_s/pitch); Δ = (h/δ)√η and for m layers

        F = Δ [ (sinh 2Δ + sin 2Δ)/(cosh 2Δ − cos 2Δ)
                + (2/3)(m² − 1)(sinh Δ − sin Δ)/(cosh Δ + cos Δ) ].

    A solid single-layer coil has m = 1 (skin effect plus the proximity of the
    coil's own field); a stranded bundle is treated as m = √N layers of strands,
    each strand carrying an equal share of the current (ideal transposition).
    The isolated-wire skin-effect factor [4]_ is kept as a floor.
    Unloaded Q = ωL/R_ac. Dielectric loss of the former and self-capacitance are
    not included.

    Range: the field must be parallel to the winding (winding length ≥ diameter)
    and the turns close (pitch ≤ 2 d); outside, a warning is returned. Stranded
    wire stops helping once the strands are no longer thin against the skin depth
    (Δ of a strand above about 1) — a warning says so.

    References
    ----------
    .. [3] P. L. Dowell, Proc. IEE 113(8), 1387-1394, 1966 (from memory).
    .. [4] Ramo, Whinnery & Van Duzer, Fields and Waves (from memory).

    Examples
    --------
    >>> r = coil_loss(1e6, 122e-6, 0.0495, 0.5e-3, 60, pitch=50e-3/60)
    >>> 100 < float(r.unloaded_q) < 300
    True
    """
    f = _positive("frequency", frequency)
    L = float(_positive("inductance", inductance))
    fd = float(_positive("form_diameter", form_diameter))
    wd = float(_positive("wire_diameter", wire_diameter))
    n = float(_positive("turns", turns))
    p = wd if pitch is None else float(_positive("pitch", pitch))
    rho = float(_positive("resistivity", resistivity))
    if p < wd * (1 - 1e-9):
        raise ModelInputError("pitch must be at least the wire diameter (turns cannot overlap)")
    strands = int(strands)
    if strands < 1:
        raise ModelInputError(f"strands must be a whole number of at least 1, got {strands!r}")
    warnings = []
    d_sheet = fd + wd
    length = n * p
    wire_len = n * np.pi * d_sheet
    delta = skin_depth(f, rho)
    if strands == 1:
        bare = wd if strand_diameter is None else float(_positive("strand_diameter", strand_diameter))
        area = np.pi * bare**2 / 4.0
        h = bare * np.sqrt(np.pi) / 2.0
        eta = min(h / p, 1.0)
        layers = 1.0
        floor = isolated_wire_ac_factor(bare, f, rho)
    else:
        if strand_diameter is None:
            raise ModelInputError("strand_diameter is needed for stranded wire (strands > 1)")
        ds = float(_positive("strand_diameter", strand_diameter))
        bundle = STRAND_INSULATION_RATIO * ds * np.sqrt(strands / STRAND_PACKING)
        if bundle > p * (1 + 1e-6):
            raise ModelInputError(
                f"{strands} strands of {ds * 1e3:.3g} mm make a bundle about {bundle * 1e3:.3g} mm across, "
                f"wider than the pitch of {p * 1e3:.3g} mm"
            )
        area = strands * np.pi * ds**2 / 4.0
        h = ds * np.sqrt(np.pi) / 2.0
        layers = np.sqrt(strands)
        eta = min(layers * h / p, 1.0)
        floor = isolated_wire_ac_factor(ds, f, rho)
        strand_delta = h * np.sqrt(eta) / delta
        if np.any(strand_delta > 1.0):
            f_limit = float(np.min(f[np.broadcast_to(strand_delta > 1.0, f.shape)])) if f.ndim else float(f)
            warnings.append(
                f"stranded wire: at {f_limit / 1e3:.0f} kHz and above the strands are no longer thin against "
                "the skin depth, so stranding gives little or no gain over solid wire there"
            )
    r_dc = rho * wire_len / area
    x = h * np.sqrt(eta) / delta
    factor = np.maximum(_dowell_factor(x, layers), floor)
    r_ac = r_dc * factor
    q = 2.0 * np.pi * f * L / r_ac
    if length / d_sheet < DOWELL_MIN_LENGTH_TO_DIAMETER:
        warnings.append(
            f"short coil (winding length {length / d_sheet:.2f} of its diameter): the loss method assumes a long "
            "coil; the end fields of a short coil add loss, so the real Q is likely lower"
        )
    if p / wd > DOWELL_MAX_PITCH_RATIO:
        warnings.append(
            f"widely spaced turns (pitch {p / wd:.1f} wire diameters): outside the close-wound range of the "
            "loss method; the loss is taken as at least that of a straight isolated wire"
        )
    return CoilLoss(r_ac, np.full_like(np.asarray(r_ac), r_dc), factor, q, warnings)


#: Medhurst's table (1947) of the self-capacitance coefficient H = C/D [pF per cm of coil diameter]
#: of a single-layer solenoid against its winding length / diameter (values from memory of the
#: table as usually reproduced). [1], [pF/cm]
MEDHURST_LENGTH_TO_DIAMETER = (0.10, 0.15, 0.20, 0.25, 0.30, 0.35, 0.40, 0.45, 0.50, 0.60, 0.70, 0.80, 0.90,
                               1.0, 1.5, 2.0, 2.5, 3.0, 3.5, 4.0, 4.5, 5.0, 6.0, 7.0, 8.0, 9.0, 10.0, 15.0,
                               20.0, 25.0, 30.0, 40.0, 50.0)
MEDHURST_H_PF_PER_CM = (0.96, 0.79, 0.70, 0.64, 0.60, 0.57, 0.54, 0.52, 0.50, 0.48, 0.47, 0.46, 0.46,
                        0.46, 0.47, 0.50, 0.56, 0.61, 0.67, 0.72, 0.77, 0.81, 0.92, 1.01, 1.12, 1.22, 1.32, 1.86,
                        2.36, 2.90, 3.40, 4.60, 5.80)


class SelfCapacitance(NamedTuple):
    capacitance: np.ndarray  #: self-capacitance across the winding [F]
    within_table: np.ndarray  #: False where l/D lies outside Medhurst's table (0.1-50): edge value used [bool]


def medhurst_self_capacitance(diameter, length):
    """Self-capacitance of a single-layer solenoid from its winding (Medhurst's table).

    Parameters
    ----------
    diameter : array_like
        Diameter of the winding (to the wire centres). [m]
    length : array_like
        Winding length. [m]

    Returns
    -------
    SelfCapacitance
        ``capacitance`` [F] and ``within_table`` (False outside l/D = 0.1-50, where the
        table's end value is used).

    Notes
    -----
    Medhurst measured the self-capacitance of many single-layer coils and tabulated
    C = H·D, C in pF and D in cm, with H a function of l/D alone (the wire size and the pitch
    matter little) [5]_. H is interpolated in the table linearly in log(l/D). It is lowest,
    about 0.46 pF/cm, near l/D = 1, and grows for long thin coils (where it approaches the
    empirical fit H ≈ 0.1126·l/D + 0.08 + 0.27/√(l/D), also Medhurst's) and for short flat
    ones. The coils were measured with one end earthed, as a tank coil is used. The figure is
    the capacitance seen across the coil's ends; it adds to the tuning capacitor and sets the
    coil's self-resonance 1/(2π√(L·C)).

    References
    ----------
    .. [5] R. G. Medhurst, Wireless Engineer 24, 1947 (from memory).

    Examples
    --------
    >>> r = medhurst_self_capacitance(0.10, 0.10)  # l/D = 1: H = 0.46 pF/cm
    >>> round(float(r.capacitance) * 1e12, 2), bool(r.within_table)
    (4.6, True)
    """
    d = _positive("diameter", diameter)
    x = _positive("length", length) / d
    lx = np.log(np.asarray(MEDHURST_LENGTH_TO_DIAMETER))
    h = np.interp(np.log(x), lx, np.asarray(MEDHURST_H_PF_PER_CM))
    within = (x >= MEDHURST_LENGTH_TO_DIAMETER[0] * (1 - 1e-9)) & (x <= MEDHURST_LENGTH_TO_DIAMETER[-1] * (1 + 1e-9))
    return SelfCapacitance(h * (d * 100.0) * 1e-12, np.asarray(within))


def self_capacitance_note(self_capacitance, diameter, length):
    """The caution for a winding outside Medhurst's table, or None inside it.

    Parameters
    ----------
    self_capacitance : SelfCapacitance
        What :func:`medhurst_self_capacitance` gave for this winding.
    diameter : float
        Diameter of the winding (to the wire centres). [m]
    length : float
        Winding length. [m]

    Returns
    -------
    str or None
        One sentence naming the winding's length-to-diameter ratio, for any
        output that shows a self-capacitance from :func:`medhurst_self_capacitance`.

    Examples
    --------
    >>> self_capacitance_note(medhurst_self_capacitance(0.05, 0.05), 0.05, 0.05) is None
    True
    >>> self_capacitance_note(medhurst_self_capacitance(0.05, 3.0), 0.05, 3.0)[:40]
    'winding length 60.00 of its diameter lie'
    """
    if bool(np.all(self_capacitance.within_table)):
        return None
    return (f"winding length {float(length) / float(diameter):.2f} of its diameter lies outside Medhurst's "
            f"self-capacitance table ({MEDHURST_LENGTH_TO_DIAMETER[0]:g}-{MEDHURST_LENGTH_TO_DIAMETER[-1]:g}): "
            "the table's end value is used")


class StrandedRange(NamedTuple):
    better_from: float | None  #: lowest frequency where stranded wire loses less [Hz]
    better_up_to: float | None  #: highest frequency where stranded wire loses less [Hz]


def stranded_advantage_range(form_diameter, bundle_diameter, turns, strands, strand_diameter,
                             pitch=None, resistivity=COPPER_RESISTIVITY,
                             f_low=1e4, f_high=3e7, points=400):
    """Frequency range where a stranded winding loses less than solid wire of the same outside diameter.

    Parameters
    ----------
    form_diameter : float
        Former diameter. [m]
    bundle_diameter : float
        Outside diameter of the stranded bundle (and of the solid wire compared). [m]
    turns : float
        Number of turns. [1]
    strands : int
        Number of strands. [1]
    strand_diameter : float
        Bare strand diameter. [m]
    pitch : float, optional
        Turn spacing; default close-wound. [m]
    resistivity : float
        [ohm m]
    f_low, f_high : float
        Search range. [Hz]
    points : int
        Number of log-spaced frequencies searched.

    Returns
    -------
    StrandedRange
        ``better_from`` and ``better_up_to`` [Hz], None at an end where the
        advantage reaches the edge of the search range, both None when stranding
        never helps. Below ``better_from`` the thinner total copper of the bundle
        costs more than the skin effect it saves; above ``better_up_to`` the
        proximity loss between strands outweighs the gain ("where stranding
        stops helping").

    Notes
    -----
    Both windings are evaluated with :func:`coil_loss` (Dowell's method).

    References
    ----------
    Dowell, Proc. IEE 113(8), 1966.

    Examples
    --------
    >>> r = stranded_advantage_range(0.06, 0.9e-3, 80, 27, 0.1e-3)
    >>> r.better_up_to is not None and 1e6 < r.better_up_to < 1e7
    True
    """
    f = np.geomspace(f_low, f_high, int(points))
    L = 1e-4  # cancels in the comparison
    solid = coil_loss(f, L, form_diameter, bundle_diameter, turns, pitch).ac_resistance
    litz = coil_loss(f, L, form_diameter, bundle_diameter, turns, pitch, strands, strand_diameter).ac_resistance
    better = np.flatnonzero(litz < solid)
    if better.size == 0:
        return StrandedRange(None, None)
    lo = None if better[0] == 0 else float(f[better[0]])
    hi = None if better[-1] == f.size - 1 else float(f[better[-1]])
    return StrandedRange(lo, hi)
