"""Diode envelope detector driving an earphone, from a Shockley diode model.

The detector is a diode feeding a load resistance R_L (the earphone, or a
resistor across it) bypassed for radio frequency by a capacitor. The diode
sees the tank's RF peak voltage Vp; the capacitor holds the detected voltage
Vdc. Averaging the Shockley current over one RF cycle gives the equations used
below (I0, I1 are modified Bessel functions, x = Vp/(nVT)):

* average current:      Vdc/R_L = Is·[e^(−Vdc/nVT)·I0(x) − 1]
* RF fundamental:       I1_peak = 2·Is·e^(−Vdc/nVT)·I1(x)
* RF input resistance:  R_in = Vp / I1_peak   (→ nVT/Is small-signal, → R_L/2 strong-signal)

References
----------
.. [1] W. Shockley, "The theory of p-n junctions in semiconductors and p-n
   junction transistors", Bell System Technical Journal 28, 435-489, 1949.
.. [2] F. E. Terman, Radio Engineers' Handbook, McGraw-Hill, 1943, section on
   diode detectors: square-law and linear (peak) detection (from memory).
"""

from __future__ import annotations

import numpy as np
from aerial.core.constants import BOLTZMANN as Boltzmann
from aerial.core.constants import ELEMENTARY_CHARGE as elementary_charge

from aerial.core.errors import ModelInputError
from aerial.core.records import NamedTuple
from aerial.models.checks import positive as _check
from aerial.models.special_functions import ive, ive_pair

#: Default junction temperature. [K]
DEFAULT_TEMPERATURE_K = 300.0

#: Forward current at which a diode is said to "conduct" in :func:`conduction_voltage`. [A]
CONDUCTION_CURRENT_A = 1e-3

#: Default relative tolerance of the loaded-detector solver. [1]
DETECTOR_RTOL = 1e-10
#: Default iteration limit of the loaded-detector solver (Newton steps, with halving as a guard). [1]
DETECTOR_MAX_ITER = 200

#: Default modulation depth of an AM broadcast for audio estimates (assumption: a typical average). [1]
DEFAULT_MODULATION_DEPTH = 0.3


class Diode(NamedTuple):
    """Shockley parameters of a detector diode.

    Attributes
    ----------
    name : str
        Plain name.
    saturation_current_a : float
        Saturation current Is. [A]
    ideality : float
        Ideality factor n (1 ... 2). [1]
    description : str
        What the preset stands for.
    """

    name: str
    saturation_current_a: float
    ideality: float
    description: str


#: Typical order-of-magnitude parameters (assumptions, not a particular part).
#: Common practice: metal–semiconductor junctions conduct from about 0.15-0.46 V,
#: silicon pn junctions from about 0.6 V.
DIODE_PRESETS: dict[str, Diode] = {
    "germanium": Diode("germanium", 2e-6, 1.3,
                       "germanium point-contact (a metal whisker on germanium): low turn-on, some leakage"),
    "schottky": Diode("schottky", 3e-8, 1.05, "metal-semiconductor (Schottky) junction, low barrier"),
    "silicon": Diode("silicon", 2e-9, 1.9, "silicon pn junction: turns on near 0.6 V, poor for weak signals"),
}


def get_diode(name: str) -> Diode:
    """Look up a diode preset by name.

    Examples
    --------
    >>> get_diode("schottky").ideality
    1.05
    """
    if name not in DIODE_PRESETS:
        valid = ", ".join(f"'{k}'" for k in DIODE_PRESETS)
        raise ModelInputError(f"'{name}' is not a valid detector, must be one of {valid}")
    return DIODE_PRESETS[name]




def thermal_voltage(temperature=DEFAULT_TEMPERATURE_K):
    """Thermal voltage kT/q.

    Parameters
    ----------
    temperature : array_like
        [K]

    Returns
    -------
    ndarray
        [V]

    Examples
    --------
    >>> round(float(thermal_voltage(300.0)) * 1e3, 2)
    25.85
    """
    return Boltzmann * _check("temperature", temperature) / elementary_charge


def conduction_voltage(saturation_current, ideality, current=CONDUCTION_CURRENT_A,
                       temperature=DEFAULT_TEMPERATURE_K):
    """Forward voltage at which the diode passes ``current`` (Shockley equation).

    Parameters
    ----------
    saturation_current : array_like
        Is. [A]
    ideality : array_like
        n. [1]
    current : array_like
        Forward current. [A]
    temperature : float
        [K]

    Returns
    -------
    ndarray
        V = nVT·ln(1 + I/Is). [V]

    References
    ----------
    Shockley, Bell System Technical Journal 28, 1949.

    Examples
    --------
    >>> round(float(conduction_voltage(2e-9, 1.9)), 2)
    0.64
    """
    n = _check("ideality", ideality)
    return n * thermal_voltage(temperature) * np.log1p(_check("current", current) / _check("saturation_current", saturation_current))


def _log_i0(x, scaled=None):
    """ln I0(x) from e^-x I0(x) (``scaled``, when the caller has it already)."""
    return np.log(ive(0, x) if scaled is None else scaled) + x


def open_circuit_detected_voltage(peak_voltage, ideality, temperature=DEFAULT_TEMPERATURE_K):
    """DC output of a peak detector with no load (infinite load resistance).

    Parameters
    ----------
    peak_voltage : array_like
        RF peak voltage at the diode. [V]
    ideality : float
        n. [1]
    temperature : float
        [K]

    Returns
    -------
    ndarray
        Vdc = nVT·ln I0(Vp/nVT). [V]

    Notes
    -----
    Square law Vdc ≈ Vp²/(4nVT) for Vp ≲ nVT; linear Vdc → Vp − nVT·ln√(2πVp/nVT)
    for Vp ≫ nVT [2]_. Computed with exponentially scaled Bessel functions.

    References
    ----------
    .. [2] Terman, Radio Engineers' Handbook, 1943 (from memory).

    Examples
    --------
    >>> round(float(open_circuit_detected_voltage(1.0, 1.0)), 3)
    0.929
    """
    vt = _check("ideality", ideality) * thermal_voltage(temperature)
    return vt * _log_i0(_check("peak_voltage", peak_voltage, allow_zero=True) / vt)


def square_law_detected_voltage(peak_voltage, ideality, temperature=DEFAULT_TEMPERATURE_K):
    """Small-signal approximation Vdc ≈ Vp²/(4nVT) of the unloaded detector. [V]

    Examples
    --------
    >>> v = 1e-3
    >>> abs(float(square_law_detected_voltage(v, 1.0)) / float(open_circuit_detected_voltage(v, 1.0)) - 1) < 1e-3
    True
    """
    vt = _check("ideality", ideality) * thermal_voltage(temperature)
    return _check("peak_voltage", peak_voltage, allow_zero=True) ** 2 / (4.0 * vt)


class Detection(NamedTuple):
    detected_voltage: np.ndarray  #: DC across the load [V]
    input_resistance: np.ndarray  #: RF input resistance seen by the tank [ohm]
    converged: np.ndarray  #: solver converged
    iterations: int


def loaded_detector(peak_voltage, saturation_current, ideality, load_resistance,
                    temperature=DEFAULT_TEMPERATURE_K, rtol=DETECTOR_RTOL, max_iter=DETECTOR_MAX_ITER):
    """Detected voltage and RF input resistance of a diode detector with a resistive load.

    Parameters
    ----------
    peak_voltage : array_like
        RF peak voltage across the detector. [V]
    saturation_current : float
        Is. [A]
    ideality : float
        n. [1]
    load_resistance : array_like
        DC load (earphone) resistance. [ohm]
    temperature : float
        [K]
    rtol : float
        Relative tolerance on the detected voltage. [1]
    max_iter : int
        Bisection limit.

    Returns
    -------
    Detection

    Notes
    -----
    Solves Vdc/R_L = Is[e^(−Vdc/nVT) I0(x) − 1], x = Vp/nVT, written as
    h(Vdc) = ln(Vdc/R_L + Is) − ln Is + Vdc/nVT − ln I0(x) = 0. h increases and
    is concave in Vdc and the root lies between 0 and the open-circuit value,
    so Newton's method started at Vdc = 0 climbs to the root from below without
    overshooting (quadratic convergence; a step that leaves the bracket kept by
    the signs of h is replaced by halving, as a guard against round-off). It
    stops after the first step smaller than ``rtol`` × Vdc; as the error after a
    Newton step is of the order of the step squared, the root is then exact to
    rounding. Then R_in = Vp / (2 Is e^(−Vdc/nVT) I1(x)), which tends to nVT/Is
    (the diode's zero-bias "video" resistance) for weak signals and to R_L/2 for
    strong ones.

    References
    ----------
    Shockley 1949; Terman, Radio Engineers' Handbook, 1943 (from memory).

    Examples
    --------
    >>> d = loaded_detector(2.0, 3e-8, 1.05, 10e3)
    >>> bool(d.converged), round(float(d.input_resistance) / 5e3, 1)  # about R_L/2 at 2 V
    (True, 1.2)
    """
    vp = _check("peak_voltage", peak_voltage, allow_zero=True)
    i_s = float(_check("saturation_current", saturation_current))
    rl = _check("load_resistance", load_resistance)
    vt = float(_check("ideality", ideality)) * thermal_voltage(temperature)
    if not (0 < rtol < 0.1):
        raise ModelInputError(f"rtol must lie between 0 and 0.1, got {rtol!r}")
    vp, rl = np.broadcast_arrays(vp, rl)
    x = vp / vt
    i0, i1 = ive_pair(x)  # both orders at once: they share the region and the continued fractions
    li0 = _log_i0(x, i0)
    vdc, converged, it = _detector_root(li0, rl, i_s, vt, rtol, max_iter)
    small = x < 1e-6
    # ln I1(x) (I1 kept off zero); a vanishing signal takes the zero-bias resistance (no exponent worked out for it)
    exponent = np.where(small, 0.0, vdc / vt - (np.log(np.maximum(i1, 1e-300)) + x))
    r_in = vp / (2.0 * i_s) * np.exp(exponent)
    r_in = np.where(small, vt / i_s, r_in)
    return Detection(vdc, r_in, converged, it)


def _detector_root(li0, rl, i_s, vt, rtol, max_iter):
    """Root of ln(V/R_L + Is) − ln Is + V/nVT − ln I0 = 0 in V (Newton from V = 0 inside a bracket).

    While every value lies below its root (the usual climb: h <= 0 everywhere) the bracket's lower ends are the
    values themselves and a Newton step cannot fall below them, so only the upper ends are checked: the same
    steps, in fewer array operations.
    """
    lo = np.zeros(np.shape(li0))
    hi = np.asarray(vt * np.maximum(li0, 0.0))  # ln I0(x) >= 0; round-off can make it a hair negative
    a = rl * i_s  # the load's share of the diode current's scale: h'(V) = 1/(V + R_L·Is) + 1/nVT
    inv_vt = 1.0 / vt
    v = lo.copy()
    done = hi <= 0.0
    closed = None  # rtol·hi + 1e-300, worked out again only when hi moves
    it = 0
    for it in range(1, int(max_iter) + 1):
        h = np.log1p(v / a) + v * inv_vt - li0  # ln(1 + V/(R_L·Is)) = ln(V/R_L + Is) − ln Is, without the cancellation
        below = h <= 0.0
        climbing = bool(below.all())
        if climbing:  # lo = v everywhere, hi as it was (lo may then share v's array: v is rebound, never written to)
            lo = v
        else:
            if not isinstance(lo, np.ndarray):  # v of a single value comes back a numpy scalar
                lo = np.array(lo)
            np.copyto(lo, v, where=below)
            np.copyto(hi, v, where=~below)
            closed = None
        step = h / (1.0 / (v + a) + inv_vt)
        nxt = v - step
        # a step from below the root never falls below v = lo (step <= 0): only the upper end can be passed
        inside = (nxt <= hi) if climbing else (nxt >= lo) & (nxt <= hi)
        if not inside.all():
            nxt = np.where(inside, nxt, 0.5 * (lo + hi))
        if closed is None:
            closed = rtol * hi + 1e-300
        moved = (nxt - v) if climbing else np.abs(nxt - v)  # nxt >= v while climbing
        done = done | (moved <= rtol * nxt) | (hi - lo <= closed)
        v = nxt
        if done.all():
            break
    return v, np.asarray(done), it


class AudioOutput(NamedTuple):
    audio_voltage: np.ndarray  #: peak audio voltage across the earphone [V]
    audio_power: np.ndarray  #: audio power into the earphone [W]
    detected_voltage: np.ndarray  #: DC across the earphone for the unmodulated carrier [V]
    input_resistance: np.ndarray  #: detector RF input resistance at the carrier [ohm]
    converged: np.ndarray


def audio_output(peak_voltage, diode: Diode, earphone_resistance,
                 modulation_depth=DEFAULT_MODULATION_DEPTH, temperature=DEFAULT_TEMPERATURE_K):
    """Audio delivered to an earphone by the detector for an AM carrier.

    Parameters
    ----------
    peak_voltage : array_like
        Carrier peak voltage across the detector. [V]
    diode : Diode
        Detector parameters.
    earphone_resistance : float
        Earphone impedance, taken as the detector's DC and audio load. [ohm]
    modulation_depth : float
        AM modulation depth m (0 < m ≤ 1). [1]
    temperature : float
        [K]

    Returns
    -------
    AudioOutput

    Notes
    -----
    The envelope swings between Vp(1 − m) and Vp(1 + m) slowly compared with the
    RF; the audio peak is half the difference of the detected voltages at those
    two envelope values, and P = V_audio²/(2 R_L). Low-impedance (≈ 32 Ω)
    headphones load the detector so heavily that R_in ≈ R_L/2 ≈ 16 Ω collapses
    the tank's voltage; without a matching transformer they hear almost nothing.

    References
    ----------
    Terman, Radio Engineers' Handbook, 1943 (detection of modulated waves, from memory).

    Examples
    --------
    >>> a = audio_output(1.0, get_diode("germanium"), 10e3)
    >>> 1e-7 < float(a.audio_power) < 1e-5
    True
    """
    m = float(modulation_depth)
    if not (0 < m <= 1):
        raise ModelInputError(f"modulation_depth must lie in (0, 1], got {modulation_depth!r}")
    vp, rl = np.broadcast_arrays(_check("peak_voltage", peak_voltage, allow_zero=True),
                                 np.asarray(earphone_resistance, dtype=float))
    # the carrier and the envelope's two extremes in one call of the detector model
    d = loaded_detector(np.stack([vp, vp * (1 + m), vp * (1 - m)]), diode.saturation_current_a, diode.ideality,
                        np.stack([rl] * 3), temperature)
    carrier, high, low = d.detected_voltage
    va = 0.5 * (high - low)
    return AudioOutput(va, va**2 / (2.0 * rl), carrier, d.input_resistance[0], np.all(d.converged, axis=0))
