"""Closed-form models of electrically short wire aerials over a perfect ground.

Radiation resistance from effective height, average characteristic
impedances, the transmission-line reactance of a short monopole, the
top-loading-angle model of inverted-L and T aerials (any number of top arms),
the sloping wire, the capacitance-ratio effective height, and small helpers for
efficiency and received power.

Every function broadcasts over arrays of frequency *and* geometry: e.g.
``inverted_l(height[:, None], top_length[:, None], radius, frequency[None, :])``
evaluates every geometry at every frequency in one call.

Validity
--------
Thin wires (length >> radius) over a perfect, flat ground; the current along
each wire taken as a standing wave on an open-ended uniform line. Reliable
while the total wire length is short compared with a wavelength (below about
lambda/8 the reactance and effective height are within a few per cent of
full-wave values); the transmission-line reactance loses meaning near and past
the first resonance. Functions return flags for both conditions.

References
----------
.. [1] C. A. Balanis, *Antenna Theory: Analysis and Design*, 3rd ed., Wiley,
   2005, ch. 4 (short dipole, radiation resistance; monopole = half the
   dipole) and ch. 8 (induced-EMF impedance). (from memory)
.. [2] S. A. Schelkunoff and H. T. Friis, *Antennas: Theory and Practice*,
   Wiley, 1952 (average characteristic impedance of a monopole). (from memory)
.. [3] E. A. Laport, *Radio Antenna Engineering*, McGraw-Hill, 1952, ch. 1
   (top-loading angle, effective height of top-loaded verticals). (from memory)
.. [4] F. E. Terman, *Radio Engineers' Handbook*, McGraw-Hill, 1943, sec. 10
   (effective height by capacitance ratio). (from memory)
.. [5] G. W. O. Howe, The Electrician, 1914 (average-potential, i.e.
   uniform-charge, capacitance of a wire). (from memory)
"""

from __future__ import annotations

import numpy as np
from aerial.core.constants import SPEED_OF_LIGHT
from aerial.core.constants import MU_0 as mu_0

from aerial.core.errors import ModelInputError
from aerial.core.records import NamedTuple
from aerial.models.checks import positive as _positive
from aerial.models.checks import option as _check_option

ETA0 = mu_0 * SPEED_OF_LIGHT  #: Impedance of free space. [ohm]
_Z_UNIT = ETA0 / (2 * np.pi)  # ~59.96 ohm; the classic rounded value is 60 (eta0 ~ 120 pi)

#: Characteristic-impedance forms accepted by ``z0_form`` arguments.
Z0_FORMS = ("uniform-charge", "schelkunoff")
#: Default form: the uniform-charge (average-potential) impedance, which agrees
#: with the induced-EMF reactance of short monopoles within about 1 %.
DEFAULT_Z0_FORM = "uniform-charge"
#: Total wire length, as a fraction of a wavelength, above which the
#: transmission-line reactance and effective height are flagged unreliable.
MAX_RELIABLE_LENGTH_WAVELENGTHS = 1.0 / 8.0

# Smallest |sin| used as a divisor, keeps outputs finite exactly at a resonance.
_TINY = 1e-12

#: Elements per piece when a call is evaluated in pieces: the temporaries of a piece stay in the
#: processor's cache, so a call of 1e7 elements runs at the speed of one of 1e5. [1]
CHUNK_ELEMENTS = 40_000


def _in_chunks(core, inputs, n_float: int, n_bool: int, writes_out: bool = False):
    """Evaluate the elementwise function ``core(*inputs)`` over their broadcast shape.

    ``core`` returns ``n_float`` float arrays then ``n_bool`` boolean ones. Up to
    :data:`CHUNK_ELEMENTS` elements it is called once (outputs broadcast to
    the full shape); above, on pieces of about that many elements (views of
    the inputs, no copies) written into the full outputs. With ``writes_out``
    the core takes ``out=`` (the pieces of the full outputs, in its return
    order) and works in them, so nothing is copied afterwards.
    """
    arrays = [np.asarray(v, dtype=float) for v in inputs]
    shape = np.broadcast_shapes(*(a.shape for a in arrays))
    if int(np.prod(shape, dtype=np.int64)) <= CHUNK_ELEMENTS:
        return [np.broadcast_to(o, shape) for o in core(*arrays)]
    nd = len(shape)
    arrays = [a.reshape((1,) * (nd - a.ndim) + a.shape) for a in arrays]
    outs = [np.empty(shape) for _ in range(n_float)] + [np.empty(shape, dtype=bool) for _ in range(n_bool)]
    # split along the first axis whose trailing block fits in a piece; an input of length 1 along an
    # axis stays so (work per geometry is not repeated per frequency)
    axis = next(i for i in range(nd) if int(np.prod(shape[i + 1 :], dtype=np.int64)) <= CHUNK_ELEMENTS)
    step = max(1, CHUNK_ELEMENTS // int(np.prod(shape[axis + 1 :], dtype=np.int64)))
    for lead in np.ndindex(*shape[:axis]):
        for start in range(0, shape[axis], step):
            piece = slice(start, start + step)
            parts = [a[tuple(i if a.shape[j] > 1 else 0 for j, i in enumerate(lead))
                       + ((piece if a.shape[axis] > 1 else slice(None)),)] for a in arrays]
            where = lead + (piece,)
            views = [out[where] for out in outs]
            values = core(*parts, out=views) if writes_out else core(*parts)
            for view, value in zip(views, values):
                if not np.may_share_memory(view, value):
                    view[...] = value
    return outs






def wavenumber(frequency):
    """Free-space wavenumber.

    Parameters
    ----------
    frequency : array_like
        Frequency. [Hz]

    Returns
    -------
    ndarray
        k = 2 pi f / c. [rad/m]

    Notes
    -----
    c from :mod:`aerial.core.constants`.

    References
    ----------
    CODATA value of c (exact), in :mod:`aerial.core.constants`.
    """
    return 2 * np.pi * _positive("frequency", frequency) / SPEED_OF_LIGHT


def _safe_divisor(x):
    return np.where(np.abs(x) < _TINY, np.where(x < 0, -_TINY, _TINY), x)


# --------------------------------------------------------------------------------------
# Radiation resistance
# --------------------------------------------------------------------------------------


def radiation_resistance(effective_height, frequency):
    """Radiation resistance of a short vertical aerial over perfect ground from its effective height.

    Parameters
    ----------
    effective_height : array_like
        Effective height referred to the feed current. [m]
    frequency : array_like
        Frequency. [Hz]

    Returns
    -------
    ndarray
        Radiation resistance. [ohm]

    Notes
    -----
    Rr = (4 pi / 3) eta0 (h_e / lambda)^2, which is the published
    160 pi^2 (h_e / lambda)^2 when eta0 is rounded to 120 pi; with the CODATA
    eta0 (:mod:`aerial.core.constants`) the result is 0.06 % lower. Valid while the
    current is nearly in phase along the wire (short aerial).

    References
    ----------
    C. A. Balanis, *Antenna Theory*, 3rd ed., 2005, ch. 4 (monopole = half the
    short dipole); IEEE Std 145 (effective length). (from memory)

    Examples
    --------
    >>> round(float(radiation_resistance(10.0, 1e6)), 3)
    1.756
    """
    he = _positive("effective_height", effective_height, allow_zero=True)
    lam = SPEED_OF_LIGHT / _positive("frequency", frequency)
    return 4 * np.pi * ETA0 / 3 * (he / lam) ** 2


def radiation_resistance_uniform(height, frequency):
    """Radiation resistance of a short monopole with uniform current (h_e = h).

    Parameters
    ----------
    height : array_like
        Monopole height. [m]
    frequency : array_like
        Frequency. [Hz]

    Returns
    -------
    ndarray
        Rr = 160 pi^2 (h/lambda)^2. [ohm]

    Notes
    -----
    Uniform current: h_e = h.

    References
    ----------
    Balanis, *Antenna Theory*, 3rd ed., 2005, sec. 4.2 (infinitesimal dipole,
    80 pi^2 (l/lambda)^2, halved for the monopole with l = 2h). (from memory)
    """
    return radiation_resistance(height, frequency)


def radiation_resistance_triangular(height, frequency):
    """Radiation resistance of a short monopole with triangular current (h_e = h/2).

    Parameters
    ----------
    height : array_like
        Monopole height. [m]
    frequency : array_like
        Frequency. [Hz]

    Returns
    -------
    ndarray
        Rr = 40 pi^2 (h/lambda)^2. [ohm]

    Notes
    -----
    About 1 % low against the induced-EMF value at kh = 0.3 and 5 % at 0.63.

    References
    ----------
    Balanis, *Antenna Theory*, 3rd ed., 2005, sec. 4.3 (small dipole,
    20 pi^2 (l/lambda)^2, halved for the monopole). (from memory)

    Examples
    --------
    >>> round(float(radiation_resistance_triangular(10.0, 1e6)), 4)
    0.439
    """
    return radiation_resistance(0.5 * _positive("height", height), frequency)


# --------------------------------------------------------------------------------------
# Characteristic impedances
# --------------------------------------------------------------------------------------


def monopole_z0_uniform_charge(height, radius):
    """Average characteristic impedance of a vertical wire from its uniform-charge capacitance.

    Parameters
    ----------
    height : array_like
        Wire length (height of a vertical from the ground). [m]
    radius : array_like
        Wire radius. [m]

    Returns
    -------
    ndarray
        Z0 = (eta0/2pi) [ln(h/a) - 1] (about 60 [ln(h/a) - 1]). [ohm]

    Notes
    -----
    Z0 = h / (c C) with C = 2 pi eps0 h / [ln(h/a) - 1], the average-potential
    (Howe) capacitance of a vertical wire rising from a ground plane. For
    short monopoles, X = -Z0 cot(kh) with this Z0 agrees with the induced-EMF
    reactance within about 1 % (10 m, 1 mm, 1 MHz: tested), better than
    Schelkunoff's form. Thin wire, h >> a.

    References
    ----------
    G. W. O. Howe, The Electrician, 1914 (average-potential capacitance).
    (from memory)

    Examples
    --------
    >>> round(float(monopole_z0_uniform_charge(10.0, 1e-3)), 1)
    492.3
    """
    h = _positive("height", height)
    a = _positive("radius", radius)
    return _Z_UNIT * (np.log(h / a) - 1.0)


def monopole_z0_schelkunoff(height, radius):
    """Schelkunoff's average characteristic impedance of a monopole.

    Parameters
    ----------
    height : array_like
        Monopole height. [m]
    radius : array_like
        Wire radius. [m]

    Returns
    -------
    ndarray
        Z0 = (eta0/2pi) [ln(2h/a) - 1] (published as 60 [ln(2h/a) - 1]). [ohm]

    Notes
    -----
    Reads about 8 % high in reactance against induced EMF for a 10 m, 1 mm
    wire at 1 MHz; kept as the published alternative.

    References
    ----------
    S. A. Schelkunoff and H. T. Friis, *Antennas: Theory and Practice*, Wiley,
    1952. (from memory)

    Examples
    --------
    >>> round(float(monopole_z0_schelkunoff(10.0, 1e-3)), 1)
    533.8
    """
    h = _positive("height", height)
    a = _positive("radius", radius)
    return _Z_UNIT * (np.log(2 * h / a) - 1.0)


def monopole_z0(height, radius, z0_form=DEFAULT_Z0_FORM):
    """Average characteristic impedance of a vertical wire; dispatcher over ``z0_form``.

    Parameters
    ----------
    height : array_like
        Wire height. [m]
    radius : array_like
        Wire radius. [m]
    z0_form : {"uniform-charge", "schelkunoff"}
        Which average impedance.

    Returns
    -------
    ndarray
        Characteristic impedance. [ohm]

    Notes
    -----
    See :func:`monopole_z0_uniform_charge` and :func:`monopole_z0_schelkunoff`.

    References
    ----------
    Howe (1914); Schelkunoff and Friis (1952). (from memory)
    """
    _check_option("z0_form", z0_form, Z0_FORMS)
    if z0_form == "uniform-charge":
        return monopole_z0_uniform_charge(height, radius)
    return monopole_z0_schelkunoff(height, radius)


def horizontal_wire_z0(height, radius):
    """Characteristic impedance of a single wire over a perfect ground (image method).

    Parameters
    ----------
    height : array_like
        Height of the wire's axis; must exceed the radius. [m]
    radius : array_like
        Wire radius. [m]

    Returns
    -------
    ndarray
        Z0 = (eta0/2pi) arccosh(H/a) (about 60 ln(2H/a) = 138 log10(4H/d)). [ohm]

    Notes
    -----
    Z0 = 1/(c C'), C' = 2 pi eps0 / arccosh(H/a). Exact for TEM on a round
    wire over a perfect plane.

    References
    ----------
    Image method; e.g. Ramo, Whinnery and Van Duzer, *Fields and Waves in
    Communication Electronics*, 3rd ed., 1994. (from memory)

    Examples
    --------
    >>> round(float(horizontal_wire_z0(10.0, 1e-3)), 1)
    593.8
    """
    H = _positive("height", height)
    a = _positive("radius", radius)
    if np.any(H <= a):
        raise ModelInputError("height must exceed the wire radius (the wire would touch the ground)")
    return _Z_UNIT * np.arccosh(H / a)


def line_reactance(z0, electrical_length):
    """Input reactance of an open-ended lossless line: X = -Z0 cot(theta).

    Parameters
    ----------
    z0 : array_like
        Characteristic impedance. [ohm]
    electrical_length : array_like
        k times the line length. [rad]

    Returns
    -------
    ndarray
        Reactance; finite even exactly at resonance. [ohm]

    Notes
    -----
    X = -Z0 cos(theta) / sin(theta).

    References
    ----------
    Any transmission-line text; e.g. Ramo, Whinnery and Van Duzer, 1994, ch. 5.
    (from memory)
    """
    th = np.asarray(electrical_length, dtype=float)
    return -np.asarray(z0, dtype=float) * np.cos(th) / _safe_divisor(np.sin(th))


def monopole_reactance(height, radius, frequency, z0_form=DEFAULT_Z0_FORM):
    """Transmission-line reactance of a short monopole, X = -Z0 cot(kh).

    Parameters
    ----------
    height : array_like
        Monopole height. [m]
    radius : array_like
        Wire radius. [m]
    frequency : array_like
        Frequency. [Hz]
    z0_form : {"uniform-charge", "schelkunoff"}
        Average characteristic impedance used.

    Returns
    -------
    ndarray
        Input reactance. [ohm]

    Notes
    -----
    Good while kh is well below pi/2 (a quarter wave); the sign changes at
    the first resonance.

    References
    ----------
    Schelkunoff and Friis, *Antennas: Theory and Practice*, 1952. (from memory)

    Examples
    --------
    >>> round(float(monopole_reactance(10.0, 1e-3, 1e6)), 0)
    -2314.0
    """
    z0 = monopole_z0(height, radius, z0_form)
    return line_reactance(z0, wavenumber(frequency) * _positive("height", height))


# --------------------------------------------------------------------------------------
# Top-loaded verticals (inverted-L, T, any number of arms)
# --------------------------------------------------------------------------------------


class ShortAerialResult(NamedTuple):
    """Per-geometry, per-frequency figures of a closed-form short-aerial model.

    Attributes
    ----------
    effective_height_m : ndarray
        Effective height referred to the feed current. [m]
    reactance_ohm : ndarray
        Input reactance. [ohm]
    radiation_resistance_ohm : ndarray
        Radiation resistance. [ohm]
    loading_angle_rad : ndarray
        Top-loading angle delta (0 for an unloaded wire). [rad]
    too_long : ndarray of bool
        Total wire length above ``MAX_RELIABLE_LENGTH_WAVELENGTHS`` of a
        wavelength: reactance and effective height unreliable.
    past_resonance : ndarray of bool
        At or beyond the first resonance (an arm or the whole aerial a
        quarter wave or more, reactance not negative): the line model no
        longer describes the aerial.
    """

    effective_height_m: np.ndarray
    reactance_ohm: np.ndarray
    radiation_resistance_ohm: np.ndarray
    loading_angle_rad: np.ndarray
    too_long: np.ndarray
    past_resonance: np.ndarray

    def warnings(self) -> list[str]:
        """Plain-English warnings for any flagged element."""
        out = []
        if np.any(self.too_long):
            out.append(
                "total wire length above 1/8 wavelength at some frequencies: "
                "reactance and effective height unreliable there"
            )
        if np.any(self.past_resonance):
            out.append(
                "at or past the first resonance at some frequencies: the transmission-line "
                "reactance and effective height do not describe the aerial there"
            )
        return out


def top_loaded(height, top_lengths, radius, frequency, *, top_radius=None, top_height=None, z0_form=DEFAULT_Z0_FORM):
    """Top-loading-angle model of a vertical with any number of horizontal top arms.

    Parameters
    ----------
    height : array_like
        Length of the vertical down-lead from the feed (top-wire height above
        the ground when fed at ground level). [m]
    top_lengths : list or tuple of array_like
        Length of each top arm, measured from the junction; each entry
        broadcasts with the other arguments (a bare scalar or array is one
        arm). [m]
    radius : array_like
        Radius of the vertical wire. [m]
    frequency : array_like
        Frequency. [Hz]
    top_radius : array_like or sequence, optional
        Radius of the top arms (one value, or one per arm); default ``radius``. [m]
    top_height : array_like or sequence, optional
        Height of the top arms above the ground (one value or one per arm);
        default ``height``. [m]
    z0_form : {"uniform-charge", "schelkunoff"}
        Average characteristic impedance of the vertical.

    Returns
    -------
    ShortAerialResult
        Effective height, reactance, radiation resistance, loading angle and
        validity flags, broadcast over all inputs.

    Notes
    -----
    Each arm i is an open line of impedance Zt_i = (eta0/2pi) arccosh(H_i/a_i)
    whose input admittance at the junction is j tan(k l_i)/Zt_i; the arms are
    in parallel. The vertical (impedance Zv) sees that load; its equivalent
    extra electrical length is the top-loading angle ([3]_, from memory)::

        delta = arctan(Zv sum_i tan(k l_i)/Zt_i)
        h_e   = [cos delta - cos(delta + kh)] / [k sin(delta + kh)]
        X     = -Zv cot(delta + kh)
        Rr    = 160 pi^2 (h_e/lambda)^2

    (For a T with equal arms this is the published Zt/2, l_t/2 form.) The
    current on the vertical is I(z)/I0 = sin(delta + k(h - z))/sin(delta + kh)
    and h_e = integral of it over the vertical; the arms' currents are
    horizontal and, close to a perfect ground, add no vertical moment.
    Static limit: h_e -> h (h + 2 d)/(2 (h + d)) with d = Zv sum l_i/Zt_i, the
    capacitance-ratio form. Flags: total wire length above lambda/8; an arm
    of k l >= pi/2, or delta + kh >= pi/2 (first resonance).

    References
    ----------
    .. [3] E. A. Laport, *Radio Antenna Engineering*, McGraw-Hill, 1952,
       ch. 1 (top loading). (from memory)

    Examples
    --------
    >>> r = top_loaded(10.0, [20.0], 1e-3, 1e6)
    >>> round(float(np.degrees(r.loading_angle_rad)), 2), round(float(r.effective_height_m), 3)
    (20.27, 8.274)
    """
    _check_option("z0_form", z0_form, Z0_FORMS)
    h = _positive("height", height)
    a = _positive("radius", radius)
    k = wavenumber(frequency)
    if not isinstance(top_lengths, (list, tuple)):
        top_lengths = [top_lengths]  # one arm given as a scalar or an array
    arms = [_positive("top_lengths", t) for t in top_lengths]
    if not arms:
        raise ModelInputError("top_lengths must hold at least one arm length (use monopole functions for none)")
    n = len(arms)

    def per_arm(value, default, name):
        if value is None:
            return [default] * n
        if isinstance(value, (list, tuple)):
            if len(value) != n:
                raise ModelInputError(f"{name} must have one entry per top arm ({n}); got {len(value)}")
            return [_positive(name, v) for v in value]
        return [_positive(name, value)] * n

    radii = per_arm(top_radius, a, "top_radius")
    heights = per_arm(top_height, h, "top_height")

    def core(h, a, k, *arm_data, out=None):
        return _top_loaded_core(monopole_z0(h, a, z0_form), h, k, arm_data[:n], arm_data[n : 2 * n],
                                arm_data[2 * n :], out)

    he, x, rr, delta, too_long, past = _in_chunks(core, [h, a, k, *arms, *radii, *heights], 4, 2, writes_out=True)
    return ShortAerialResult(
        effective_height_m=he,
        reactance_ohm=x,
        radiation_resistance_ohm=rr,
        loading_angle_rad=delta,
        too_long=too_long,
        past_resonance=past,
    )


def _top_loaded_core(zv, h, k, lengths, radii, heights, out=None):
    """The top-loading-angle figures of :func:`top_loaded` for one piece of the broadcast inputs.

    Whole-piece operations in place, each array reused as soon as it is spent: the formulas
    of :func:`top_loaded` with their operations in the same order, so the same numbers bit for
    bit as the plain expressions, with about half the memory traffic. ``out``: arrays of the
    piece's shape to work and answer in (he, x, rr, delta, too_long, past), or None.
    """
    shape = np.broadcast_shapes(zv.shape, h.shape, k.shape, *(np.shape(v) for v in (*lengths, *radii, *heights)))
    if out is None:
        out = [np.empty(shape) for _ in range(4)] + [np.empty(shape, dtype=bool) for _ in range(2)]
    load = out[3]
    load.fill(0.0)
    arm_past = out[5]
    arm_past.fill(False)
    kl = out[1]
    total = h
    for li, ai, hi in zip(lengths, radii, heights):
        np.multiply(k, li, out=kl)
        arm_past |= kl >= np.pi / 2
        np.tan(kl, out=kl)
        kl /= horizontal_wire_z0(hi, ai)
        load += kl
        total = total + li
    delta = np.multiply(zv, load, out=load)
    np.arctan(delta, out=delta)
    theta = np.multiply(k, h, out=kl)
    theta += delta
    past = arm_past
    past |= theta >= np.pi / 2
    past |= delta < 0
    s = np.sin(theta)
    tiny = np.abs(s) < _TINY
    if tiny.any():  # as _safe_divisor: keeps the outputs finite exactly at a resonance
        s[tiny] = np.where(s[tiny] < 0, -_TINY, _TINY)
    cos_theta = np.cos(theta, out=theta)
    he = np.cos(delta, out=out[0])
    he -= cos_theta
    ks = np.multiply(k, s, out=out[2])
    he /= ks
    x = np.multiply(cos_theta, -zv, out=cos_theta)
    x /= s
    # radiation_resistance(|he|, f) with f = k c/(2 pi): 4 pi eta0/3 (|he|/lambda)^2
    rr = np.abs(he, out=ks)
    rr /= SPEED_OF_LIGHT / (k * SPEED_OF_LIGHT / (2 * np.pi))
    np.multiply(rr, rr, out=rr)
    rr *= 4 * np.pi * ETA0 / 3
    too_long = np.greater(k * total, 2 * np.pi * MAX_RELIABLE_LENGTH_WAVELENGTHS, out=out[4])
    return he, x, rr, delta, too_long, past


def inverted_l(height, top_length, radius, frequency, *, top_radius=None, z0_form=DEFAULT_Z0_FORM):
    """Inverted-L aerial: a vertical of ``height`` and one horizontal top arm.

    Parameters
    ----------
    height : array_like
        Vertical down-lead length (= top height for a ground-level feed). [m]
    top_length : array_like
        Horizontal top length. [m]
    radius : array_like
        Wire radius. [m]
    frequency : array_like
        Frequency. [Hz]
    top_radius : array_like, optional
        Radius of the top wire; default ``radius``. [m]
    z0_form : {"uniform-charge", "schelkunoff"}
        Average characteristic impedance of the vertical.

    Returns
    -------
    ShortAerialResult
        See :func:`top_loaded`.

    Notes
    -----
    :func:`top_loaded` with one arm at the vertical's height. All arguments
    broadcast: 10,000 geometries as column vectors against 100 frequencies as
    a row give 10,000 x 100 results in one call.

    References
    ----------
    E. A. Laport, *Radio Antenna Engineering*, 1952, ch. 1. (from memory)

    Examples
    --------
    >>> r = inverted_l(10.0, 20.0, 1e-3, 0.2e6)
    >>> round(float(r.effective_height_m), 3), round(float(r.reactance_ohm), 0)
    (8.125, -4398.0)
    """
    return top_loaded(height, [top_length], radius, frequency, top_radius=top_radius, z0_form=z0_form)


def t_aerial(height, arm_length, radius, frequency, *, top_radius=None, z0_form=DEFAULT_Z0_FORM):
    """T aerial: a vertical fed at the ground joined to the middle of a horizontal top.

    Parameters
    ----------
    height : array_like
        Vertical length. [m]
    arm_length : array_like
        Length of each of the two equal top arms (half the top). [m]
    radius : array_like
        Wire radius. [m]
    frequency : array_like
        Frequency. [Hz]
    top_radius : array_like, optional
        Radius of the top wire; default ``radius``. [m]
    z0_form : {"uniform-charge", "schelkunoff"}
        Average characteristic impedance of the vertical.

    Returns
    -------
    ShortAerialResult
        See :func:`top_loaded`.

    Notes
    -----
    :func:`top_loaded` with two equal arms (the published Zt/2, l_t/2 form).

    References
    ----------
    E. A. Laport, *Radio Antenna Engineering*, 1952, ch. 1. (from memory)
    """
    return top_loaded(height, [arm_length, arm_length], radius, frequency, top_radius=top_radius, z0_form=z0_form)


def vertical_monopole(height, radius, frequency, z0_form=DEFAULT_Z0_FORM):
    """Unloaded vertical wire as an open line: sinusoidal current, X = -Z0 cot(kh).

    Parameters
    ----------
    height : array_like
        Wire length from the feed. [m]
    radius : array_like
        Wire radius. [m]
    frequency : array_like
        Frequency. [Hz]
    z0_form : {"uniform-charge", "schelkunoff"}
        Average characteristic impedance.

    Returns
    -------
    ShortAerialResult
        With loading angle 0: h_e = (1 - cos kh)/(k sin kh) = tan(kh/2)/k.

    Notes
    -----
    I(z)/I0 = sin(k(h - z))/sin(kh); h_e -> h/2 for kh -> 0 (triangular).

    References
    ----------
    Balanis, *Antenna Theory*, 3rd ed., 2005, ch. 4 (monopole). (from memory)

    Examples
    --------
    >>> round(float(vertical_monopole(10.0, 1e-3, 1e6).effective_height_m), 4)
    5.0184
    """
    h = _positive("height", height)
    k = wavenumber(frequency)

    def core(h, radius, k):
        zv = monopole_z0(h, radius, z0_form)
        theta = k * h
        s = _safe_divisor(np.sin(theta))
        he = (1.0 - np.cos(theta)) / (k * s)
        x = -zv * np.cos(theta) / s
        rr = radiation_resistance(np.abs(he), k * SPEED_OF_LIGHT / (2 * np.pi))
        return he, x, rr, theta > 2 * np.pi * MAX_RELIABLE_LENGTH_WAVELENGTHS, theta >= np.pi / 2

    he, x, rr, too_long, past = _in_chunks(core, [h, radius, k], 3, 2)
    return ShortAerialResult(
        effective_height_m=he,
        reactance_ohm=x,
        radiation_resistance_ohm=rr,
        loading_angle_rad=np.zeros(he.shape),
        too_long=too_long,
        past_resonance=past,
    )


def sloping_wire(length, rise, radius, frequency, z0_form=DEFAULT_Z0_FORM):
    """Straight sloping wire fed at its lower end against ground.

    Parameters
    ----------
    length : array_like
        Wire length along the slope. [m]
    rise : array_like
        Height gained from the feed to the far end (vertical projection). [m]
    radius : array_like
        Wire radius. [m]
    frequency : array_like
        Frequency. [Hz]
    z0_form : {"uniform-charge", "schelkunoff"}
        Average characteristic impedance, taken as that of a vertical wire of
        the same length (an approximation for shallow slopes).

    Returns
    -------
    ShortAerialResult
        h_e of the vertical projection; reactance of the open line.

    Notes
    -----
    Current sinusoidal along the wire, I(s)/I0 = sin(k(L - s))/sin(kL); the
    open-circuit voltage in a vertical field picks up only dz = (rise/L) ds::

        h_e = (rise / L) (1 - cos kL) / (k sin kL),   X = -Z0 cot(kL).

    The horizontal part of the current is neglected (over a perfect ground
    its image nearly cancels it at low height). The impedance of a vertical
    of the same length is used for Z0, so X is approximate for shallow slopes.

    References
    ----------
    Balanis, *Antenna Theory*, 3rd ed., 2005, ch. 4 (effective length of a
    linear current); IEEE Std 145 (effective length). (from memory)

    Examples
    --------
    >>> round(float(sloping_wire(10.0, 10.0, 1e-3, 1e6).effective_height_m), 4)
    5.0184
    """
    L = _positive("length", length)
    r = np.asarray(rise, dtype=float)
    if np.any(~np.isfinite(r) | (np.abs(r) > L * (1 + 1e-12))):
        raise ModelInputError("rise must be finite and no larger than the wire length")
    base = vertical_monopole(L, radius, frequency, z0_form)
    he = base.effective_height_m * (r / L)
    rr = radiation_resistance(np.abs(he), wavenumber(frequency) * SPEED_OF_LIGHT / (2 * np.pi))
    shape = np.broadcast_shapes(np.shape(he), np.shape(base.reactance_ohm))
    return ShortAerialResult(
        effective_height_m=np.broadcast_to(he, shape),
        reactance_ohm=np.broadcast_to(base.reactance_ohm, shape),
        radiation_resistance_ohm=np.broadcast_to(rr, shape),
        loading_angle_rad=np.zeros(shape),
        too_long=np.broadcast_to(base.too_long, shape),
        past_resonance=np.broadcast_to(base.past_resonance, shape),
    )


def effective_height_capacitance_ratio(height, top_capacitance, vertical_capacitance):
    """Static effective height of a top-loaded vertical by the capacitance ratio.

    Parameters
    ----------
    height : array_like
        Vertical height. [m]
    top_capacitance : array_like
        Capacitance of the top wires. [F]
    vertical_capacitance : array_like
        Capacitance of the vertical. [F]

    Returns
    -------
    ndarray
        h_e = h (Ct + Cv/2) / (Ct + Cv). [m]

    Notes
    -----
    The vertical's own charge is spread evenly (mean height h/2) and the top's
    sits at h. Short-aerial limit only; the section capacitances should allow
    for mutual shielding (a plain sum overshoots by a few per cent).

    References
    ----------
    F. E. Terman, *Radio Engineers' Handbook*, 1943; E. A. Laport, *Radio
    Antenna Engineering*, 1952. (from memory)

    Examples
    --------
    >>> float(effective_height_capacitance_ratio(10.0, 1.0, 1.0))
    7.5
    """
    h = _positive("height", height)
    ct = _positive("top_capacitance", top_capacitance, allow_zero=True)
    cv = _positive("vertical_capacitance", vertical_capacitance)
    return h * (ct + 0.5 * cv) / (ct + cv)


# --------------------------------------------------------------------------------------
# Power helpers
# --------------------------------------------------------------------------------------


def efficiency(rr, r_loss):
    """Radiation efficiency Rr / (Rr + R_loss).

    Parameters
    ----------
    rr : array_like
        Radiation resistance. [ohm]
    r_loss : array_like
        Total loss resistance in series (conductor, ground, coil...). [ohm]

    Returns
    -------
    ndarray
        Efficiency, 0 to 1. [1]

    Notes
    -----
    eta = Rr / (Rr + R_loss).

    References
    ----------
    Balanis, *Antenna Theory*, 3rd ed., 2005, sec. 2.14. (from memory)

    Examples
    --------
    >>> float(efficiency(1.0, 9.0))
    0.1
    """
    rr = _positive("rr", rr, allow_zero=True)
    rl = _positive("r_loss", r_loss, allow_zero=True)
    tot = rr + rl
    if np.any(tot <= 0):
        raise ModelInputError("rr + r_loss must be positive")
    return rr / tot


def open_circuit_voltage(e_field, effective_height):
    """Open-circuit voltage of a short aerial in a vertical field.

    Parameters
    ----------
    e_field : array_like
        Vertical electric field strength (RMS or peak, as wanted). [V/m]
    effective_height : array_like
        Effective height. [m]

    Returns
    -------
    ndarray
        V = E h_e, same kind (RMS/peak) as ``e_field``. [V]

    Notes
    -----
    Definition of effective height (IEEE Std 145).

    References
    ----------
    IEEE Std 145, Definitions of Terms for Antennas (effective length).
    (from memory)

    Examples
    --------
    >>> float(open_circuit_voltage(1e-3, 8.0))
    0.008
    """
    return _positive("e_field", e_field, allow_zero=True) * _positive("effective_height", effective_height, allow_zero=True)


def available_power(e_field, effective_height, rr, r_loss):
    """Power available to a conjugate-matched load from a short aerial.

    Parameters
    ----------
    e_field : array_like
        RMS vertical field strength. [V/m]
    effective_height : array_like
        Effective height. [m]
    rr : array_like
        Radiation resistance. [ohm]
    r_loss : array_like
        Series loss resistance. [ohm]

    Returns
    -------
    ndarray
        P = (E h_e)^2 / [4 (Rr + R_loss)]. [W]

    Notes
    -----
    Without loss P = E^2 lambda^2 / (640 pi^2), independent of height
    ([der], since Rr is proportional to h_e^2).

    References
    ----------
    Maximum power transfer to a conjugate load; Balanis, *Antenna Theory*,
    3rd ed., 2005, sec. 2.15. (from memory)

    Examples
    --------
    >>> float(available_power(1e-3, 10.0, 1.0, 0.0))
    2.5e-05
    """
    v = open_circuit_voltage(e_field, effective_height)
    rr = _positive("rr", rr, allow_zero=True)
    rl = _positive("r_loss", r_loss, allow_zero=True)
    tot = rr + rl
    if np.any(tot <= 0):
        raise ModelInputError("rr + r_loss must be positive")
    return v**2 / (4 * tot)
