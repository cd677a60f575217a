"""Parallel tank circuit fed from an aerial: coupling, tuning, loaded Q, selectivity, calibration.

The tank is a coil L (series loss resistance R_c) in parallel with a variable
capacitor C, its "top" the node the detector hangs on, its bottom earthed. The
aerial is an EMF V_oc (its open-circuit voltage E·h_e) behind its series
impedance Za = Ra + jXa. Each coupling arrangement is reduced to what the tank
top sees: an added admittance Y_a and a Norton current per volt of aerial EMF.

Coupling arrangements (plain names):

* ``"direct"``: the aerial goes to the tank top. Y_a = 1/Za.
* ``"series capacitor"``: the aerial reaches the tank top through a coupling
  capacitor Cc. Y_a = 1/(Za + 1/(jωCc)). The aerial then has no DC path to
  earth: add a bleed resistor or RF choke from the aerial terminal to earth.
* ``"coil tap"``: the aerial goes to a tap at a fraction n of the turns from the
  earthy end (ideal autotransformer, tight coupling): Y_a = n²/Za, current n/Za.
* ``"separate primary"``: the aerial feeds a primary winding Lp (to earth)
  coupled to the tank coil by k; M = k√(Lp·L). The tank coil branch becomes
  Z_s = R_c + jωL + (ωM)²/(Za + R_p + jωLp) and carries the EMF
  jωM·V_oc/(Za + R_p + jωLp). Y_a = 1/Z_s − 1/(R_c + jωL).

References
----------
.. [1] A. I. Zverev, Handbook of Filter Synthesis, Wiley, 1967: loaded Q,
   insertion loss of a resonator P/P_av = (1 − Q_L/Q_u)² (from memory).
.. [2] F. E. Terman, Radio Engineers' Handbook, McGraw-Hill, 1943: series-parallel
   conversion, coupled circuits and reflected impedance, the universal
   resonance curve (from memory).
"""

from __future__ import annotations

import numpy as np

from aerial.core.errors import ModelInputError
from aerial.core.records import NamedTuple
from aerial.models.checks import positive as _positive

ARRANGEMENTS = ("direct", "series capacitor", "coil tap", "separate primary")

#: Arrangements that leave the aerial with no DC path to earth (static charge builds up).
NO_DC_PATH_ARRANGEMENTS = ("series capacitor",)

#: The remedy for an aerial with no DC path to earth, in the words every note and caution uses
#: (100 kΩ to 1 MΩ: common practice, from memory; far above the aerial's reactance at MF, so it does not load the tank).
BLEED_REMEDY = "a bleed resistor (about 100 kΩ to 1 MΩ) or an RF choke from the aerial terminal to earth"

BLEED_NOTE = (
    "the series capacitor leaves the aerial with no DC path to earth: static charge will build up on it; "
    f"add {BLEED_REMEDY}"
)

#: Channel spacings at which adjacent-channel rejection is reported (ITU Regions 1/3 and 2). [Hz]
CHANNEL_SPACINGS_HZ = (9e3, 10e3)


def check_arrangement(name: str) -> str:
    """Return ``name`` if it is a known coupling arrangement, else raise.

    Examples
    --------
    >>> check_arrangement("coil tap")
    'coil tap'
    """
    if name not in ARRANGEMENTS:
        valid = ", ".join(f"'{a}'" for a in ARRANGEMENTS)
        raise ModelInputError(f"'{name}' is not a valid coupling arrangement, must be one of {valid}")
    return name




def resonant_frequency(inductance, capacitance):
    """f0 = 1/(2π√(LC)).

    Parameters
    ----------
    inductance : array_like
        [H]
    capacitance : array_like
        [F]

    Returns
    -------
    ndarray
        [Hz]

    References
    ----------
    Terman, Radio Engineers' Handbook, 1943.

    Examples
    --------
    >>> round(float(resonant_frequency(240e-6, 100e-12)) / 1e3, 1)
    1027.3
    """
    return 1.0 / (2.0 * np.pi * np.sqrt(_positive("inductance", inductance) * _positive("capacitance", capacitance)))


def resonant_capacitance(frequency, inductance):
    """C = 1/((2πf)² L). [F]

    Examples
    --------
    >>> round(float(resonant_capacitance(1e6, 240e-6)) * 1e12, 2)
    105.54
    """
    w = 2.0 * np.pi * _positive("frequency", frequency)
    return 1.0 / (w**2 * _positive("inductance", inductance))


def resonant_inductance(frequency, capacitance):
    """L = 1/((2πf)² C). [H]

    Examples
    --------
    >>> round(float(resonant_inductance(1e6, 105.54e-12)) * 1e6, 1)
    240.0
    """
    w = 2.0 * np.pi * _positive("frequency", frequency)
    return 1.0 / (w**2 * _positive("capacitance", capacitance))


class ShuntEquivalent(NamedTuple):
    capacitance: np.ndarray  #: shunt capacitance (negative when the impedance is inductive) [F]
    conductance: np.ndarray  #: shunt conductance [S]
    resistance: np.ndarray  #: shunt resistance, 1/conductance (clamped at 1e15 ohm for a lossless branch) [ohm]


def shunt_from_admittance(frequency, admittance):
    """Shunt capacitance and resistance of an admittance Y = G + jB at one frequency.

    Parameters
    ----------
    frequency : array_like
        [Hz]
    admittance : array_like of complex
        [S]

    Returns
    -------
    ShuntEquivalent
        C = B/ω, G, R = 1/G.

    Examples
    --------
    >>> s = shunt_from_admittance(1e6, 1e-4 + 1j * 2 * 3.141592653589793e-4)
    >>> round(float(s.capacitance) * 1e12, 1), round(float(s.resistance))
    (100.0, 10000)
    """
    w = 2.0 * np.pi * _positive("frequency", frequency)
    y = np.asarray(admittance, dtype=complex)
    g = np.real(y)
    return ShuntEquivalent(np.imag(y) / w, g, 1.0 / np.maximum(g, 1e-15))


def series_to_shunt(frequency, resistance, reactance):
    """Series R + jX converted to its shunt equivalent at one frequency.

    Parameters
    ----------
    frequency : array_like
        [Hz]
    resistance : array_like
        Series resistance. [ohm]
    reactance : array_like
        Series reactance (negative for a capacitive aerial). [ohm]

    Returns
    -------
    ShuntEquivalent

    Notes
    -----
    Y = 1/(R + jX) = R/(R² + X²) − jX/(R² + X²): C_p = −X/(ω(R² + X²)),
    R_p = (R² + X²)/R [2]_.

    References
    ----------
    .. [2] Terman, Radio Engineers' Handbook, 1943 (from memory).

    Examples
    --------
    >>> s = series_to_shunt(1e6, 25.0, -795.8)
    >>> round(float(s.capacitance) * 1e12, 1), round(float(s.resistance) / 1e3, 1)
    (199.8, 25.4)
    """
    r = np.asarray(resistance, dtype=float)
    x = np.asarray(reactance, dtype=float)
    if np.any(r < 0) or not np.all(np.isfinite(r)) or not np.all(np.isfinite(x)):
        raise ModelInputError("resistance must be non-negative and finite, reactance finite")
    z = r + 1j * x
    if np.any(np.abs(z) == 0):
        raise ModelInputError("a zero impedance has no shunt equivalent")
    return shunt_from_admittance(frequency, 1.0 / z)


class TankCoupling(NamedTuple):
    coil_admittance: np.ndarray  #: tank coil branch alone, 1/(R_c + jωL) [S]
    aerial_admittance: np.ndarray  #: admittance the aerial adds at the tank top [S]
    current_per_volt: np.ndarray  #: Norton current into the tank top per volt of aerial EMF [S]


def tank_coupling(arrangement, frequency, aerial_resistance, aerial_reactance, coil_inductance,
                  coil_resistance, series_capacitance=None, tap_fraction=None,
                  primary_inductance=None, coupling_coefficient=None, primary_resistance=0.0):
    """What the tank top sees of the aerial for a coupling arrangement.

    Parameters
    ----------
    arrangement : {"direct", "series capacitor", "coil tap", "separate primary"}
        Coupling arrangement (see the module notes).
    frequency : array_like
        [Hz]
    aerial_resistance : array_like
        Aerial series resistance, radiation plus losses. [ohm]
    aerial_reactance : array_like
        Aerial series reactance. [ohm]
    coil_inductance : float
        Tank coil inductance. [H]
    coil_resistance : array_like
        Tank coil series loss resistance. [ohm]
    series_capacitance : float, optional
        Coupling capacitor ("series capacitor"). [F]
    tap_fraction : float, optional
        Turns fraction of the tap from the earthy end, 0 < n ≤ 1 ("coil tap"). [1]
    primary_inductance : float, optional
        Primary winding inductance ("separate primary"). [H]
    coupling_coefficient : float, optional
        Coupling coefficient k between primary and tank coil, 0 < k < 1. [1]
    primary_resistance : array_like
        Primary winding loss resistance. [ohm]

    Returns
    -------
    TankCoupling

    Notes
    -----
    See the module notes for each arrangement; the separate primary uses the
    reflected impedance (ωM)²/Z_primary [2]_; the tap an ideal autotransformer.

    References
    ----------
    .. [2] Terman, Radio Engineers' Handbook, 1943 (from memory).

    Examples
    --------
    >>> t = tank_coupling("coil tap", 1e6, 25.0, -800.0, 240e-6, 5.0, tap_fraction=0.5)
    >>> round(float((t.aerial_admittance * (25 - 800j)).real), 3)
    0.25
    """
    check_arrangement(arrangement)
    f = _positive("frequency", frequency)
    w = 2.0 * np.pi * f
    za = np.asarray(aerial_resistance, dtype=float) + 1j * np.asarray(aerial_reactance, dtype=float)
    if np.any(np.real(za) < 0):
        raise ModelInputError("aerial resistance must not be negative")
    L = _positive("coil_inductance", coil_inductance)
    rc = np.asarray(coil_resistance, dtype=float)
    z_coil = rc + 1j * w * L
    y_coil = 1.0 / z_coil
    if arrangement == "direct":
        zs = za
        return TankCoupling(y_coil, 1.0 / zs, 1.0 / zs)
    if arrangement == "series capacitor":
        if series_capacitance is None:
            raise ModelInputError("the 'series capacitor' arrangement needs series_capacitance [F]")
        zs = za + 1.0 / (1j * w * _positive("series_capacitance", series_capacitance))
        return TankCoupling(y_coil, 1.0 / zs, 1.0 / zs)
    if arrangement == "coil tap":
        if tap_fraction is None:
            raise ModelInputError("the 'coil tap' arrangement needs tap_fraction (0 < n <= 1)")
        n = _positive("tap_fraction", tap_fraction)
        if np.any(n > 1):
            raise ModelInputError(f"tap_fraction must not exceed 1, got {tap_fraction!r}")
        return TankCoupling(y_coil, n**2 / za, n / za)
    # separate primary
    if primary_inductance is None or coupling_coefficient is None:
        raise ModelInputError("the 'separate primary' arrangement needs primary_inductance [H] and coupling_coefficient")
    lp = _positive("primary_inductance", primary_inductance)
    k = _positive("coupling_coefficient", coupling_coefficient)
    if np.any(k >= 1):
        raise ModelInputError(f"coupling_coefficient must be below 1, got {coupling_coefficient!r}")
    m = k * np.sqrt(lp * L)
    zp = za + np.asarray(primary_resistance, dtype=float) + 1j * w * lp
    zs = z_coil + (w * m) ** 2 / zp  # [2] reflected impedance
    emf = 1j * w * m / zp
    return TankCoupling(y_coil, 1.0 / zs - y_coil, emf / zs)


def capacitance_needed(frequency, coil_admittance, aerial_admittance, detector_conductance=0.0):
    """Tank capacitor setting that brings the tank top to resonance.

    Parameters
    ----------
    frequency : array_like
        [Hz]
    coil_admittance, aerial_admittance : array_like of complex
        From :func:`tank_coupling`. [S]
    detector_conductance : array_like
        The detector's RF input conductance at the tank top (no susceptance). [S]

    Returns
    -------
    ndarray
        C = −Im(Y_coil + Y_aerial)/ω; negative when the aerial alone already
        tunes the coil above ``frequency``. [F]

    Examples
    --------
    >>> w = 2 * 3.141592653589793 * 1e6
    >>> round(float(capacitance_needed(1e6, 1 / (1j * w * 240e-6), 0.0)) * 1e12, 2)
    105.54
    """
    w = 2.0 * np.pi * _positive("frequency", frequency)
    return -np.imag(np.asarray(coil_admittance) + np.asarray(aerial_admittance)) / w


def loaded_q(unloaded_q, *external_q):
    """Loaded Q from the unloaded Q and the Q of each external load: 1/Q_L = 1/Q_u + Σ 1/Q_ext.

    Parameters
    ----------
    unloaded_q : array_like
        [1]
    *external_q : array_like
        Q of each load taken alone (np.inf for none). [1]

    Returns
    -------
    ndarray
        [1]

    References
    ----------
    Zverev, Handbook of Filter Synthesis, 1967 (from memory).

    Examples
    --------
    >>> float(loaded_q(200.0, 200.0))
    100.0
    """
    qu = _positive("unloaded_q", unloaded_q)
    inv = 1.0 / qu
    for q in external_q:
        inv = inv + 1.0 / _positive("external_q", q)
    return np.minimum(1.0 / inv, qu)  # no rounding above Q_u


def bandwidth(frequency, q):
    """−3 dB bandwidth f0/Q_L. [Hz]

    Examples
    --------
    >>> float(bandwidth(1e6, 50.0))
    20000.0
    """
    return _positive("frequency", frequency) / _positive("q", q)


def single_tuned_response(frequency, centre_frequency, q):
    """Relative voltage response |H| = 1/|1 + jQ(f/f0 − f0/f)| of a single tuned circuit.

    Parameters
    ----------
    frequency : array_like
        [Hz]
    centre_frequency : array_like
        [Hz]
    q : array_like
        Loaded Q. [1]

    Returns
    -------
    ndarray
        0 < |H| ≤ 1. [1]

    References
    ----------
    Terman, Radio Engineers' Handbook, 1943 (universal resonance curve, from memory).

    Examples
    --------
    >>> round(float(single_tuned_response(1.01e6, 1e6, 50.0)), 3)  # f0/(2Q) away: about −3 dB
    0.709
    """
    f = _positive("frequency", frequency)
    f0 = _positive("centre_frequency", centre_frequency)
    y = _positive("q", q) * (f / f0 - f0 / f)
    return 1.0 / np.sqrt(1.0 + y**2)


def audible_tuning_span(frequency, q, level_ratio):
    """The tuned frequencies over which a signal stays at least ``level_ratio`` of its level when tuned in.

    A single tuned circuit of loaded Q tuned to f_t passes a signal at f with
    |H| = 1/√(1 + Q²(f/f_t − f_t/f)²) of the level it gives when tuned to f. The span is where
    |H| ≥ ``level_ratio``: with a detector, the ratio of the just-audible voltage to the signal's
    own, it is the stretch of the dial over which the signal stays audible.

    Parameters
    ----------
    frequency : array_like
        The signal's frequency. [Hz]
    q : array_like
        Loaded Q, taken as the same across the span. [1]
    level_ratio : array_like
        The lowest relative level that counts, r > 0; at r ≥ 1 (infinite included) the signal is not
        heard even when tuned in, and the span is the frequency alone. [1]

    Returns
    -------
    low, high : ndarray
        The lowest and the highest tuned frequency; low ≤ frequency ≤ high. [Hz]

    Notes
    -----
    |H| ≥ r ⇔ Q·|u − 1/u| ≤ x with u = f/f_t and x = √(1/r² − 1), so with y = x/Q

        f_t from f·(√(y² + 4) − y)/2 to f·(√(y² + 4) + y)/2,

    a width of exactly f·x/Q (the universal resonance curve's f·x/Q near resonance holds across the
    whole curve), geometrically centred on f. The low end never reaches 0 Hz, but the high end grows
    without bound as Q falls: at Q ≈ 1 a strong signal spans many times its own frequency, so a
    caller bounds the span by the dial the tuning actually covers.

    References
    ----------
    Terman, Radio Engineers' Handbook, McGraw-Hill, 1943 (universal resonance curve, from memory).

    Examples
    --------
    >>> low, high = audible_tuning_span(1e6, 50.0, 1 / 2**0.5)  # the −3 dB points
    >>> round(float(high - low)), round(float(low * high / 1e12), 9)  # the bandwidth f/Q, centred geometrically
    (20000, 1.0)
    >>> [float(v) for v in audible_tuning_span(1e6, 50.0, 2.0)]  # not heard even when tuned in
    [1000000.0, 1000000.0]
    """
    f = _positive("frequency", frequency)
    qq = _positive("q", q)
    r = np.asarray(level_ratio, dtype=float)
    if np.any(np.isnan(r) | (r <= 0)):
        raise ModelInputError(f"level_ratio must be positive (infinite: not heard), got {level_ratio!r}")
    heard = r < 1
    x = np.sqrt(1.0 / np.where(heard, r, 0.5) ** 2 - 1.0)
    y = np.where(heard, x / qq, 0.0)
    root = np.sqrt(y**2 + 4.0)
    return f * (root - y) / 2.0, f * (root + y) / 2.0


def adjacent_rejection_db(centre_frequency, q, offset):
    """Rejection of a signal ``offset`` away, the weaker of the two sides. [dB]

    Parameters
    ----------
    centre_frequency : array_like
        [Hz]
    q : array_like
        Loaded Q. [1]
    offset : array_like
        Frequency offset (one or two channel spacings). [Hz]

    Returns
    -------
    ndarray
        Rejection ≥ 0. [dB]

    Examples
    --------
    >>> round(float(adjacent_rejection_db(1e6, 50.0, 9e3)), 2)
    2.56
    """
    f0 = _positive("centre_frequency", centre_frequency)
    d = _positive("offset", offset)
    below = np.maximum(f0 - d, f0 * 1e-3)
    worst = np.maximum(single_tuned_response(f0 + d, f0, q), single_tuned_response(below, f0, q))
    return -20.0 * np.log10(worst)


def matched_power_ratio(loaded, unloaded):
    """Power to the load over power available when both ports are matched: (1 − Q_L/Q_u)².

    Parameters
    ----------
    loaded, unloaded : array_like
        Q_L and Q_u. [1]

    Returns
    -------
    ndarray
        [1]

    References
    ----------
    Zverev, Handbook of Filter Synthesis, 1967 (from memory).

    Examples
    --------
    >>> float(matched_power_ratio(50.0, 200.0))
    0.5625
    """
    ratio = _positive("loaded", loaded) / _positive("unloaded", unloaded)
    return np.clip(1.0 - ratio, 0.0, 1.0) ** 2


class ResonanceCalibration(NamedTuple):
    aerial_admittance: complex  #: what the aerial adds at the tank top [S]
    shunt_capacitance: float  #: [F]
    shunt_resistance: float | None  #: [ohm]; None without a bandwidth reading
    total_capacitance: float  #: at resonance [F]
    loaded_q: float | None  #: f/bandwidth [1]
    warnings: list


def calibrate_from_resonance(frequency, coil_inductance, capacitor_setting, bandwidth=None,
                             coil_unloaded_q=None, detector_conductance=0.0):
    """What the aerial adds across the tank, from a measured resonance.

    Parameters
    ----------
    frequency : float
        Frequency at which a known station peaks. [Hz]
    coil_inductance : float
        Tank coil inductance. [H]
    capacitor_setting : float
        Tank capacitor setting at the peak (0 allowed). [F]
    bandwidth : float, optional
        Measured −3 dB bandwidth at that setting. [Hz]
    coil_unloaded_q : float, optional
        Unloaded Q of the coil; needed with ``bandwidth``. [1]
    detector_conductance : float
        Detector's RF input conductance at the tank top during the measurement. [S]

    Returns
    -------
    ResonanceCalibration
        The aerial's shunt capacitance (and, with a bandwidth, shunt resistance).

    Notes
    -----
    C_total = 1/(ω²L); C_aerial = C_total − C_setting. With a bandwidth:
    Q_L = f/B, G_total = ωC_total/Q_L, G_aerial = G_total − ωC_total/Q_u − G_det.
    The values come from measurement and include strays (wiring, the capacitor's
    own minimum, the coil's self-capacitance).

    References
    ----------
    Terman, Radio Engineers' Handbook, 1943 (from memory).

    Examples
    --------
    >>> c = calibrate_from_resonance(1e6, 240e-6, 5.554e-12)
    >>> round(c.shunt_capacitance * 1e12, 1)
    100.0
    """
    f = float(_positive("frequency", frequency))
    L = float(_positive("coil_inductance", coil_inductance))
    cs = float(capacitor_setting)
    if not np.isfinite(cs) or cs < 0:
        raise ModelInputError(f"capacitor_setting must be zero or positive, got {capacitor_setting!r}")
    w = 2.0 * np.pi * f
    warnings = []
    c_total = 1.0 / (w**2 * L)
    c_a = c_total - cs
    if c_a < 0:
        warnings.append(
            "the measured peak is higher than the coil and capacitor alone allow: check the coil's inductance and "
            "the capacitor reading; the aerial's capacitance was set to zero"
        )
        c_a = 0.0
    g = 0.0
    ql = None
    r_a = None
    if bandwidth is not None:
        b = float(_positive("bandwidth", bandwidth))
        ql = f / b
        if coil_unloaded_q is None:
            raise ModelInputError("a bandwidth reading needs coil_unloaded_q to separate the coil's loss from the aerial's")
        qu = float(_positive("coil_unloaded_q", coil_unloaded_q))
        g = w * c_total / ql - w * c_total / qu - float(detector_conductance)
        if g <= 0:
            warnings.append(
                "the measured bandwidth is narrower than the coil and detector alone allow: the aerial's loss "
                "could not be found (check the bandwidth reading and the coil's Q)"
            )
            g = 0.0
        else:
            r_a = 1.0 / g
    return ResonanceCalibration(complex(g, w * c_a), c_a, r_a, c_total, ql, warnings)


def aerial_impedance_from_admittance(arrangement, frequency, aerial_admittance, coil_inductance,
                                     coil_resistance, series_capacitance=None, tap_fraction=None,
                                     primary_inductance=None, coupling_coefficient=None,
                                     primary_resistance=0.0):
    """Invert :func:`tank_coupling`: the aerial's own series impedance from what the tank top sees.

    Parameters
    ----------
    arrangement : str
        As in :func:`tank_coupling`.
    frequency : float
        [Hz]
    aerial_admittance : complex
        Admittance the aerial adds at the tank top. [S]
    coil_inductance, coil_resistance, series_capacitance, tap_fraction, primary_inductance,
    coupling_coefficient, primary_resistance
        As in :func:`tank_coupling`.

    Returns
    -------
    complex
        Za = Ra + jXa [ohm]; ``complex(nan)`` never: a zero admittance raises.

    Examples
    --------
    >>> za = aerial_impedance_from_admittance("direct", 1e6, 1 / (25 - 800j), 240e-6, 5.0)
    >>> round(za.real, 6), round(za.imag, 6)
    (25.0, -800.0)
    """
    check_arrangement(arrangement)
    y = complex(aerial_admittance)
    if y == 0:
        raise ModelInputError("the aerial adds nothing at the tank top: no impedance can be inferred")
    w = 2.0 * np.pi * float(_positive("frequency", frequency))
    if arrangement == "direct":
        return 1.0 / y
    if arrangement == "series capacitor":
        return 1.0 / y - 1.0 / (1j * w * float(_positive("series_capacitance", series_capacitance)))
    if arrangement == "coil tap":
        n = float(_positive("tap_fraction", tap_fraction))
        return n**2 / y
    L = float(_positive("coil_inductance", coil_inductance))
    z_coil = float(coil_resistance) + 1j * w * L
    lp = float(_positive("primary_inductance", primary_inductance))
    m = float(_positive("coupling_coefficient", coupling_coefficient)) * np.sqrt(lp * L)
    zs = 1.0 / (y + 1.0 / z_coil)
    zr = zs - z_coil
    return (w * m) ** 2 / zr - float(primary_resistance) - 1j * w * lp
