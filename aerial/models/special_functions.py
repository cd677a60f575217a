"""Special functions for the closed-form models, in plain numpy.

The closed-form models need a handful of classical functions: modified Bessel
functions of orders 0 and 1 (round-wire and clad-wire internal impedance, the
diode detector, the coil's wire loss), the complete elliptic integrals (the
current-sheet coil, the ground charge of a vertical), the exponential integral
(the far tail of the ground-loss integral) and the Faddeeva function (the
Sommerfeld-Norton ground wave). They are written here with well-known
published algorithms so that a report does not have to load a large
special-function library at start-up.

Every function is vectorised over numpy arrays, returns a finite value for
every finite argument in its stated domain, and states its accuracy; the tests
compare each one with a general-purpose reference library over a dense grid.

References
----------
.. [1] M. Abramowitz and I. A. Stegun (eds.), *Handbook of Mathematical
   Functions*, NBS Applied Mathematics Series 55, 1964: 5.1.11 and 5.1.22
   (exponential integral), 7.1.4 (continued fraction of w(z)), 9.6.10-9.6.13
   and 9.7.1 (modified Bessel functions), 17.6 (arithmetic-geometric mean).
.. [2] NIST Digital Library of Mathematical Functions, https://dlmf.nist.gov,
   sections 6.6 and 6.9 (exponential integral), 10.25-10.40 (modified Bessel
   functions), 19.8 (arithmetic-geometric mean).
.. [3] W. H. Press, S. A. Teukolsky, W. T. Vetterling and B. P. Flannery,
   *Numerical Recipes*, 3rd ed., Cambridge University Press, 2007,
   sec. 5.2 (modified Lentz method for continued fractions), 6.3
   (exponential integral), 6.6 (Steed's method and the Wronskian for
   modified Bessel functions). (from memory)
.. [4] I. J. Thompson and A. R. Barnett, "Modified Bessel functions I_nu(z)
   and K_nu(z) of real order and complex argument, to selected accuracy",
   Computer Physics Communications 47, 1987, pp. 245-257 (Steed's continued
   fraction for K at complex argument). (from memory)
.. [5] J. A. C. Weideman, "Computation of the complex error function",
   SIAM Journal on Numerical Analysis 31, 1994, pp. 1497-1518 (rational
   series for w(z) in the upper half-plane). (from memory)
.. [6] W. Gautschi, "Efficient computation of the complex error function",
   SIAM Journal on Numerical Analysis 7, 1970, pp. 187-198 (Laplace continued
   fraction for large |z|). (from memory)
"""

from __future__ import annotations

import math

import numpy as np

from aerial.core.errors import ModelInputError

#: Euler's constant gamma (A&S 6.1.3). [1]
EULER_GAMMA = 0.57721566490153286061

_EPS = 2.0**-53
_TINY = 1e-300
# |z| at and below which the Bessel functions are summed as power series
_BESSEL_SERIES_RADIUS = 2.0
# |z| above which I_nu comes from the large-argument expansion (its smallest term is below 1e-18 there)
_BESSEL_ASYMPTOTIC_RADIUS = 20.0
_MAX_TERMS = 400
# |z| at and above which w(z) comes from the Laplace continued fraction instead of Weideman's series
_FADDEEVA_FRACTION_RADIUS = 6.0
_FADDEEVA_FRACTION_DEPTH = 60
_FADDEEVA_TERMS = 40


def _order(v):
    if isinstance(v, (bool, np.bool_)) or v not in (0, 1):
        raise ModelInputError(f"only the orders 0 and 1 are provided; got {v!r}")
    return int(v)


def _as_argument(z, name):
    """Array of z as float or complex, finite; raise otherwise."""
    arr = np.asarray(z)
    kind = arr.dtype.kind
    if kind == "c":
        arr = arr.astype(np.complex128, copy=False)
    elif kind in "fiu":
        arr = arr.astype(np.float64, copy=False)
    else:
        raise ModelInputError(f"{name} must be numeric; got {z!r}")
    if not np.isfinite(arr).all():
        raise ModelInputError(f"{name} must be finite")
    return arr


def _factorial_table(count):
    """k! for k = 0 .. count - 1, as floats. [1]"""
    return np.concatenate([[1.0], np.cumprod(np.arange(1.0, count))])


# Series coefficients, worked out once. A whole series is then a few array
# operations (powers times coefficients, summed along the last axis) rather
# than a Python loop per term: the detector model calls these hundreds of
# times per report with a handful of values each.
_SERIES_LENGTH = 64
_FACTORIAL = _factorial_table(_SERIES_LENGTH + 1)
_I_COEFFICIENTS = (1.0 / (_FACTORIAL[:-1] ** 2), 1.0 / (_FACTORIAL[:-1] * _FACTORIAL[1:]))  # 1/(k! (k+v)!)
_HARMONIC = np.concatenate([[0.0], np.cumsum(1.0 / np.arange(1.0, _SERIES_LENGTH))])  # H_k
_K0_COEFFICIENTS = _HARMONIC * _I_COEFFICIENTS[0]  # H_k / (k!)^2
_K1_COEFFICIENTS = (_HARMONIC + _HARMONIC + 1.0 / np.arange(1.0, _SERIES_LENGTH + 1) - 2.0 * EULER_GAMMA) * _I_COEFFICIENTS[1]


# The largest |z| at which k + 1 terms bring (|z|^2/4)^k / (k!)^2 below 1e-17 (increasing in k):
# 2 (1e-17 k!^2)^(1/2k), with ln k! = lgamma(k + 1) (in plain floats: numpy calls per k cost some two million
# instructions at every start-up).
_ASCENDING_RADII = [2.0 * math.exp((math.log(1e-17) / 2.0 + math.lgamma(k + 1.0)) / k) for k in range(1, _SERIES_LENGTH)]


def _ascending_length(radius):
    """Terms of sum (r^2/4)^k / (k!)^2 needed to bring the last one below 1e-17 of the first (scalar)."""
    k, above = 0, len(_ASCENDING_RADII)  # k: the radii below ``radius`` (bisect_left, without loading bisect)
    while k < above:
        middle = (k + above) // 2
        if _ASCENDING_RADII[middle] < radius:
            k = middle + 1
        else:
            above = middle
    if k >= len(_ASCENDING_RADII):
        raise ValueError("ascending series used beyond its radius")
    return k + 2


def _bessel_i_series(orders, z):
    """I_v(z) for each order v (0 or 1) of ``orders``, by its power series (A&S 9.6.10); for |z| <= 20.

    The sum is at least its first term for real z and for |arg z| <= pi/4
    (there |I_0| >= 1 and |I_1| >= |z|/2), so the terms kept reach 1e-17 of it.
    The orders share one table of powers of z^2/4.
    """
    length = _ascending_length(float(np.abs(z).max())) if z.size else 1
    powers = np.power((0.25 * z * z)[..., None], np.arange(length))
    return tuple(powers @ _I_COEFFICIENTS[0][:length] if v == 0 else 0.5 * z * (powers @ _I_COEFFICIENTS[1][:length])
                 for v in orders)


def _bessel_k_series(z):
    """K_0(z) and K_1(z) by their ascending series (A&S 9.6.13 and 9.6.11); for 0 < |z| <= 2."""
    length = _ascending_length(float(np.abs(z).max())) if z.size else 1
    q = 0.25 * z * z
    log_half = np.log(0.5 * z)
    powers = np.power(q[..., None], np.arange(length))
    i0 = powers @ _I_COEFFICIENTS[0][:length]
    i1 = 0.5 * z * (powers @ _I_COEFFICIENTS[1][:length])
    # K0 = -(ln(z/2) + gamma) I0 + sum H_k q^k / (k!)^2
    # K1 = 1/z + ln(z/2) I1 - (z/4) sum (psi(k+1) + psi(k+2)) q^k / (k! (k+1)!), psi(k+1) = -gamma + H_k
    k0 = -(log_half + EULER_GAMMA) * i0 + powers @ _K0_COEFFICIENTS[:length]
    k1 = 1.0 / z + log_half * i1 - 0.25 * z * (powers @ _K1_COEFFICIENTS[:length])
    return k0, k1


def _bessel_k_steed(z):
    """Scaled e^z K_0(z) and e^z K_1(z) by Steed's continued fraction ([3]_ sec. 6.6, [4]_); 2 < |z| <= 20, Re z >= 0."""
    b = 2.0 * (1.0 + z)
    d = 1.0 / b
    h = d.copy()
    delh = d.copy()
    q1 = np.zeros_like(z)
    q2 = np.ones_like(z)
    a1 = 0.25  # 1/4 - nu^2 with nu = 0
    q = np.full_like(z, a1)
    c = a1
    a = -a1
    s = 1.0 + q * delh
    for i in range(2, _MAX_TERMS):
        a -= 2 * (i - 1)
        c = -a * c / i
        qnew = (q1 - b * q2) / a
        q1, q2 = q2, qnew
        q = q + c * qnew
        b = b + 2.0
        d = 1.0 / (b + a * d)
        delh = (b * d - 1.0) * delh
        h = h + delh
        dels = q * delh
        s = s + dels
        if np.all(np.abs(dels) <= _EPS * np.abs(s)):
            break
    k0 = np.sqrt(np.pi / (2.0 * z)) / s
    k1 = k0 * (z + 0.5 - a1 * h) / z
    return k0, k1


def _bessel_i_ratio(z):
    """I_1(z)/I_0(z) by its continued fraction (modified Lentz, [3]_ sec. 5.2); for 0 < |z| <= 20."""
    f = np.full_like(z, _TINY)
    c = f.copy()
    dd = np.zeros_like(z)
    inv = 1.0 / z
    for j in range(1, _MAX_TERMS):
        bj = 2.0 * j * inv
        dd = bj + dd
        dd = np.where(dd == 0, _TINY, dd)
        c = bj + 1.0 / c
        c = np.where(c == 0, _TINY, c)
        dd = 1.0 / dd
        delta = c * dd
        f = f * delta
        if np.all(np.abs(delta - 1.0) <= _EPS):
            break
    return f


def _hankel_coefficients(v):
    """a_k(v) = (4v^2 - 1)(4v^2 - 9)...(4v^2 - (2k-1)^2) / (k! 8^k) (DLMF 10.17.1), k < 64."""
    k = np.arange(1.0, _SERIES_LENGTH)
    return np.concatenate([[1.0], np.cumprod((4.0 * v * v - (2.0 * k - 1.0) ** 2) / (8.0 * k))])


_HANKEL = (_hankel_coefficients(0), _hankel_coefficients(1))


_HANKEL_SIZES = (np.abs(_HANKEL[0][1:]), np.abs(_HANKEL[1][1:]))
_HANKEL_POWERS = np.arange(1, _SERIES_LENGTH)


def _hankel_length(radius):
    """Terms of the large-argument expansion at |z| >= radius until they fall below 1e-18 (scalar, radius >= 20).

    The first k (from 1) at which both orders' terms |a_k|/radius^k are that small, every k tried at once."""
    with np.errstate(over="ignore"):  # a far argument's high powers overflow: its first terms are already small
        scale = float(radius) ** _HANKEL_POWERS
    small = np.flatnonzero((_HANKEL_SIZES[0] / scale <= 1e-18) & (_HANKEL_SIZES[1] / scale <= 1e-18))
    if small.size == 0:
        raise ValueError("large-argument expansion used below its radius")
    return int(small[0]) + 2


def _hankel_powers(z):
    """Powers 1/z^k, k < the expansion's length at min |z|, for :func:`_hankel_sums` (shared by the orders)."""
    length = _hankel_length(float(np.min(np.abs(z)))) if z.size else 1
    return np.power((1.0 / z)[..., None], np.arange(length))


def _hankel_sums(v, z, powers=None):
    """Sums of (-1)^k a_k(v)/z^k and of a_k(v)/z^k of the large-argument expansions (DLMF 10.40.1, 10.40.2)."""
    powers = _hankel_powers(z) if powers is None else powers
    length = powers.shape[-1]
    coefficients = _HANKEL[v][:length]
    fall = powers @ coefficients
    grow = powers @ (coefficients * (-1.0) ** np.arange(length))
    return grow, fall


def _bessel_i_asymptotic(orders, z):
    """e^{-|Re z|} I_v(z) for each order v of ``orders``, |z| > 20, Re z >= 0, from the large-argument
    expansion (DLMF 10.40.5)."""
    powers = _hankel_powers(z)
    root = np.sqrt(2.0 * np.pi * z)
    out = []
    for v in orders:
        grow, fall = _hankel_sums(v, z, powers)
        if not np.iscomplexobj(z):
            out.append(grow / root)  # the e^-z term is below e^-40 of the first here
            continue
        upper = np.imag(z) >= 0
        connect = np.where(upper, 1j * np.exp(1j * np.pi * v), -1j * np.exp(-1j * np.pi * v))
        out.append((np.exp(1j * z.imag) * grow + connect * np.exp(-2.0 * z.real - 1j * z.imag) * fall) / root)
    return tuple(out)


def _bessel_k_large(z):
    root = np.sqrt(np.pi / (2.0 * z))
    powers = _hankel_powers(z)  # shared by the orders
    return root * _hankel_sums(0, z, powers)[1], root * _hankel_sums(1, z, powers)[1]


def _bessel_k_small(z):
    k0, k1 = _bessel_k_series(z)
    scale = np.exp(z)
    return k0 * scale, k1 * scale


def _bessel_k_pair(z):
    """e^z K_0(z) and e^z K_1(z) for Re z >= 0, z != 0: series, Steed's fraction, or DLMF 10.40.2 above |z| = 20."""
    mag = np.abs(z)
    small = mag <= _BESSEL_SERIES_RADIUS
    large = mag > _BESSEL_ASYMPTOTIC_RADIUS
    pieces = [(small, _bessel_k_small), (~(small | large), _bessel_k_steed), (large, _bessel_k_large)]
    return _by_region(z, pieces, 2)  # each region's function once, for both orders


def _by_region(x, pieces, count):
    """Evaluate ``[(mask, function), ...]``, each function giving ``count`` arrays at once, into a tuple of
    ``count`` arrays; a mask that covers everything skips the indexing."""
    out = tuple(np.empty_like(x) for _ in range(count))
    for mask, function in pieces:
        if mask.all():
            return function(x)
        if mask.any():
            for o, values in zip(out, function(x[mask])):
                o[mask] = values
    return out


def _bessel_i_wronskian(orders, z):
    """e^{-|Re z|} I_v(z) for each order v of ``orders``, 2 < |z| <= 20, from I_1/I_0 and the Wronskian
    I_0 K_1 + I_1 K_0 = 1/z ([3]_ sec. 6.6): one continued fraction of each kind serves both orders."""
    k0, k1 = _bessel_k_steed(z)
    ratio = _bessel_i_ratio(z)
    # K = kve e^{-z}, so e^{-Re z} I0 = e^{i Im z} / (z (kve1 + f kve0))
    i0 = 1.0 / (z * (k1 + ratio * k0))
    if np.iscomplexobj(z):
        i0 = i0 * np.exp(1j * z.imag)
    return tuple(i0 if v == 0 else i0 * ratio for v in orders)


def ive(v, z):
    """Exponentially scaled modified Bessel function of the first kind, e^{-|Re z|} I_v(z).

    Parameters
    ----------
    v : {0, 1}
        Order. [1]
    z : array_like
        Argument, real or complex. [1]

    Returns
    -------
    ndarray
        e^{-|Re z|} I_v(z), real for real z. [1]

    Notes
    -----
    Power series (A&S 9.6.10) for |z| <= 2; between 2 and 20 the ratio
    I_1/I_0 from its continued fraction (modified Lentz) and K_0, K_1 from
    Steed's continued fraction, joined by the Wronskian
    I_0 K_1 + I_1 K_0 = 1/z ([3]_ sec. 6.6); above 20 the large-argument
    expansion with both exponentials (DLMF 10.40.5). Re z < 0 by
    I_v(-z) = (-1)^v I_v(z). The scaling keeps every result finite.

    Accuracy (measured against a reference library over |z| from 1e-8 to
    1e5): relative error below 1e-13 for real z and for |arg z| <= pi/4; for
    pi/4 < |arg z| <= pi/2 (the J-like functions of the imaginary axis) the
    error is below 1e-13 of max(|I_v(z)|, e^{|Re z|}/sqrt(2 pi |z|)), so it is
    absolute near the zeros there.

    References
    ----------
    Abramowitz and Stegun 9.6.10; DLMF 10.40.5; Press et al., *Numerical
    Recipes*, 3rd ed., sec. 6.6 (from memory); Thompson and Barnett, Comput.
    Phys. Commun. 47, 1987 (from memory).

    Examples
    --------
    >>> round(float(ive(0, 1.0) * np.exp(1.0)), 10)    # I0(1), A&S Table 9.8
    1.2660658778
    >>> float(ive(1, 0.0))
    0.0
    """
    return _ive_orders((_order(v),), z)[0]


def ive_pair(z):
    """e^{-|Re z|} I_0(z) and e^{-|Re z|} I_1(z) together: :func:`ive` of both orders, with the work they
    share (region, powers, continued fractions) done once. [1]

    References
    ----------
    As :func:`ive`: Abramowitz and Stegun 9.6.10; DLMF 10.40.5; Press et al., *Numerical Recipes*,
    3rd ed., sec. 6.6 (from memory).

    Examples
    --------
    >>> i0, i1 = ive_pair(np.array([0.5, 5.0, 50.0]))
    >>> bool(np.all(i0 == ive(0, [0.5, 5.0, 50.0])) and np.all(i1 == ive(1, [0.5, 5.0, 50.0])))
    True
    """
    return _ive_orders((0, 1), z)


def _ive_orders(orders, z):
    """:func:`ive` of each order of ``orders`` (a tuple of arrays)."""
    z = _as_argument(z, "z")
    flip = z.real < 0
    turned = bool(flip.any())
    w = np.where(flip, -z, z) if turned else z
    mag = np.abs(w)
    top = float(mag.max()) if w.size else 0.0
    complex_arg = w.dtype.kind == "c"
    if top <= _BESSEL_ASYMPTOTIC_RADIUS and (not complex_arg or bool((np.abs(w.imag) <= w.real).all())):
        scale = np.exp(-w.real)  # all in the series' region (the detector's case)
        out = tuple(i * scale for i in _bessel_i_series(orders, w))
    else:
        near = mag <= _BESSEL_ASYMPTOTIC_RADIUS
        series = (mag <= _BESSEL_SERIES_RADIUS) | (near & (np.abs(w.imag) <= w.real))
        out = _by_region(w, [
            (series, lambda x: tuple(i * np.exp(-x.real) for i in _bessel_i_series(orders, x))),
            (near & ~series, lambda x: _bessel_i_wronskian(orders, x)),
            (~near, lambda x: _bessel_i_asymptotic(orders, x)),
        ], len(orders))
    if turned:
        out = tuple(np.where(flip, -o, o) if v == 1 else o for v, o in zip(orders, out))
    return out


def kve(v, z):
    """Exponentially scaled modified Bessel function of the second kind, e^{z} K_v(z).

    Parameters
    ----------
    v : {0, 1}
        Order. [1]
    z : array_like
        Argument, real or complex, with Re z >= 0 and z != 0. [1]

    Returns
    -------
    ndarray
        e^{z} K_v(z), real for real z. [1]

    Notes
    -----
    Ascending series (A&S 9.6.13 and 9.6.11) for |z| <= 2, Steed's continued
    fraction ([3]_ sec. 6.6, [4]_) up to |z| = 20, the large-argument
    expansion (DLMF 10.40.2) above. Accuracy (measured against a
    reference library over |z| from 1e-8 to 1e5, |arg z| <= pi/2): relative
    error below 1e-13 for |arg z| <= pi/4; on the rest of the right
    half-plane below 1e-13 of max(|K_v(z)|, sqrt(pi/(2|z|)) e^{-Re z}).

    References
    ----------
    Abramowitz and Stegun 9.6.11, 9.6.13; Press et al., *Numerical Recipes*,
    3rd ed., sec. 6.6 (from memory); Thompson and Barnett, Comput. Phys.
    Commun. 47, 1987 (from memory).

    Examples
    --------
    >>> round(float(kve(0, 1.0) * np.exp(-1.0)), 10)   # K0(1), A&S Table 9.8
    0.4210244382
    """
    v = _order(v)
    z = _as_argument(z, "z")
    if np.any(z.real < 0) or np.any(z == 0):
        raise ModelInputError("kve needs Re z >= 0 and z != 0")
    k0, k1 = _bessel_k_pair(z)
    return k0 if v == 0 else k1


#: Values the arithmetic-geometric mean takes at a time: each group goes on only until all of its own
#: values have converged, and a group this small stays in the processor's cache. [1]
AGM_GROUP = 1 << 13


def _agm_elliptic(m):
    """K(m) and E(m) by the arithmetic-geometric mean (A&S 17.6.3, 17.6.4) for m < 1.

    The values are taken in groups of ``AGM_GROUP``, and each group takes as many steps as its
    slowest value needs (the mean converges more slowly the further sqrt(1 - m) is from 1: of the
    quarter of a million values the ground-charge model sends, most need three steps and few
    five). A value converged earlier than its group moves by at most an ulp in the further steps.
    """
    flat = m.reshape(-1)
    big_k, big_e = np.empty_like(flat), np.empty_like(flat)
    for i in range(0, flat.size, AGM_GROUP):
        _agm_group(flat[i:i + AGM_GROUP], big_k[i:i + AGM_GROUP], big_e[i:i + AGM_GROUP])
    return big_k.reshape(m.shape), big_e.reshape(m.shape)


def _agm_group(m, big_k, big_e, work=None, low=None):
    """:func:`_agm_elliptic` of one group, into ``big_k`` and ``big_e``; the steps work in place.

    ``work``: four float arrays of m's shape to work in (none of them ``m``, ``big_k`` or ``big_e``),
    else fresh ones; ``low``: the smallest m, when the caller has it. The mean stops when every term
    (1/2) 2^n c_n^2 is below a quarter ulp of max(1, |m|), the scale of 1 - (1/2) sum 2^n c_n^2 in
    E = K (1 - ...).
    """
    b, total, c, a = (np.empty_like(m) for _ in range(4)) if work is None else work
    np.subtract(1.0, m, out=b)
    np.sqrt(b, out=b)
    np.multiply(0.5, m, out=total)  # (1/2) 2^0 c_0^2 with c_0^2 = m
    # a quarter ulp of max(1, |m|): one figure for the whole group unless it holds m below -1
    low = float(np.min(m)) if low is None else low
    limit = 0.25 * _EPS if low >= -1.0 else 0.25 * _EPS * np.maximum(1.0, np.abs(m))
    scalar_limit = np.ndim(limit) == 0
    # the first step from a_0 = 1 (the same numbers as the general step: 1 b_0 = b_0), then the rest
    np.subtract(1.0, b, out=c)
    c *= 0.5  # c_1 = (1 - b_0) / 2
    np.sqrt(b, out=b)  # b_1 = sqrt(b_0)
    np.subtract(1.0, c, out=a)  # a_1 = (1 + b_0) / 2
    weight = 1.0
    c *= c
    total += c  # (1/2) 2 c_1^2
    if (c.max() <= limit) if scalar_limit else np.all(c <= limit):
        return _agm_finish(a, total, big_k, big_e)
    for _ in range(63):
        np.subtract(a, b, out=c)
        c *= 0.5  # c_n = (a_{n-1} - b_{n-1}) / 2
        b *= a
        np.sqrt(b, out=b)  # b_n = sqrt(a_{n-1} b_{n-1})
        a -= c  # a_n = (a_{n-1} + b_{n-1}) / 2
        weight *= 2.0
        c *= c
        c *= weight
        total += c  # (1/2) 2^n c_n^2
        if (c.max() <= limit) if scalar_limit else np.all(c <= limit):
            break
    _agm_finish(a, total, big_k, big_e)


def _agm_finish(a, total, big_k, big_e):
    """K = pi / (2 a) and E = K (1 - total) into ``big_k`` and ``big_e``, from the mean's last ``a`` and the
    sum ``total`` of (1/2) 2^n c_n^2 (both overwritten)."""
    a *= 2.0
    np.divide(np.pi, a, out=big_k)  # K = pi / (2 a)
    np.subtract(1.0, total, out=total)
    np.multiply(big_k, total, out=big_e)


def ellipe_into(m, out, work):
    """E(m) of :func:`ellipe` into ``out``, working in ``work``: for a caller's loop over blocks of one shape.

    Parameters
    ----------
    m : ndarray
        Parameter, real float64, m <= 1. [1]
    out : ndarray
        Where E(m) goes, m's shape. [1]
    work : sequence of 5 ndarray
        Scratch arrays of m's shape (none of them ``m`` or ``out``), overwritten. [1]

    Returns
    -------
    ndarray
        ``out``, the same values :func:`ellipe` gives.

    References
    ----------
    As :func:`ellipe`: Abramowitz and Stegun 17.6; DLMF 19.8.

    Examples
    --------
    >>> m = np.array([0.5, 1.0])
    >>> e = ellipe_into(m, np.empty(2), [np.empty(2) for _ in range(5)])
    >>> bool(np.array_equal(e, ellipe(m)))
    True
    """
    m, low, high = _elliptic_parameter(m)
    if high < 1.0 and m.size <= AGM_GROUP:  # every value as it is, in one group
        _agm_group(m, work[4], out, work[:4], low)
    else:
        out[...] = ellipe(m)
    return out


def _elliptic_parameter(m):
    """m as a float array, its smallest value (None when not worked out) and its largest; raises unless every
    m is real, finite and at most 1."""
    arr = np.asarray(m)
    low = None
    if arr.dtype.kind in "fiu" and arr.size:
        arr = arr.astype(np.float64, copy=False)
        low, high = float(np.min(arr)), float(np.max(arr))  # NaN in either: not finite
        if not (np.isfinite(low) and np.isfinite(high)):
            raise ModelInputError("m must be finite")
    else:
        arr = _as_argument(m, "m")
        high = float(np.max(arr.real)) if arr.size else 0.0
    if np.iscomplexobj(arr) or high > 1.0:
        raise ModelInputError("the elliptic parameter m must be real and at most 1")
    return arr, low, high


def ellipk(m):
    """Complete elliptic integral of the first kind K(m), parameter m = k^2.

    Parameters
    ----------
    m : array_like
        Parameter, real, m <= 1. [1]

    Returns
    -------
    ndarray
        K(m); +inf at m = 1. [1]

    Notes
    -----
    K(m) = pi / (2 AGM(1, sqrt(1 - m))) (A&S 17.6.1; DLMF 19.8.5). Relative
    error below 1e-14 (measured against a reference library for
    -1e6 <= m < 1).

    References
    ----------
    Abramowitz and Stegun 17.6; DLMF 19.8.

    Examples
    --------
    >>> round(float(ellipk(0.5)), 10)    # A&S Table 17.1, alpha = 45 deg
    1.8540746773
    """
    return _complete_elliptic(m, 0, np.inf)


def ellipe(m):
    """Complete elliptic integral of the second kind E(m), parameter m = k^2.

    Parameters
    ----------
    m : array_like
        Parameter, real, m <= 1. [1]

    Returns
    -------
    ndarray
        E(m); 1 at m = 1. [1]

    Notes
    -----
    E(m) = K(m) (1 - (1/2) sum_n 2^n c_n^2) over the arithmetic-geometric
    mean sequence, c_0^2 = m (A&S 17.6.3, 17.6.4). Relative error below
    1e-14 (measured against a reference library for -1e6 <= m <= 1).

    References
    ----------
    Abramowitz and Stegun 17.6; DLMF 19.8.

    Examples
    --------
    >>> round(float(ellipe(0.5)), 10)    # A&S Table 17.1, alpha = 45 deg
    1.350643881
    """
    return _complete_elliptic(m, 1, 1.0)


def _complete_elliptic(m, which, at_one):
    """K(m) (``which`` 0) or E(m) (1) by the arithmetic-geometric mean, ``at_one`` at m = 1."""
    m, _, high = _elliptic_parameter(m)
    if high < 1.0:  # no m at 1: the mean of every value as it is
        return _agm_elliptic(np.atleast_1d(m))[which].reshape(m.shape)
    edge = m == 1.0
    value = _agm_elliptic(np.atleast_1d(np.where(edge, 0.0, m)))[which]
    return np.where(edge, at_one, value.reshape(m.shape))


def _exp1_series(z):
    """E1(z) = -gamma - ln z - sum (-z)^n / (n n!) (A&S 5.1.11)."""
    term = np.ones_like(z)
    total = np.zeros_like(z)
    for n in range(1, _MAX_TERMS):
        term = -term * z / n
        part = term / n
        total = total + part
        if np.all(np.abs(part) <= _EPS * np.abs(total)):
            break
    return -EULER_GAMMA - np.log(z) - total


def _exp1_fraction(z):
    """E1(z) from its continued fraction (A&S 5.1.22, even form; modified Lentz, [3]_ sec. 6.3)."""
    b = z + 1.0
    c = np.full_like(z, 1.0 / _TINY)
    d = 1.0 / b
    h = d.copy()
    for i in range(1, 4 * _MAX_TERMS):
        an = -float(i * i)
        b = b + 2.0
        d = 1.0 / (an * d + b)
        c = b + an / c
        step = c * d
        h = h * step
        if np.all(np.abs(step - 1.0) <= _EPS):
            break
    return h * np.exp(-z)


def exp1(z):
    """Exponential integral E1(z) = integral from z to infinity of e^{-t}/t dt.

    Parameters
    ----------
    z : array_like
        Argument: real and positive, or complex and non-zero (principal
        branch, cut along the negative real axis). [1]

    Returns
    -------
    ndarray
        E1(z), real for real z. [1]

    Notes
    -----
    Ascending series (A&S 5.1.11; DLMF 6.6.2) for |z| <= 2 and on the
    negative-real side near the cut; elsewhere the continued fraction
    (A&S 5.1.22; DLMF 6.9.1) by the modified Lentz method. Relative error
    below 1e-13 over the whole cut plane (|z| from 1e-8 to 1e4, checked
    against a reference library and, near |z| = 5, where that library is
    itself good only to about 1e-12, against a multiple-precision one).
    e^{-z} underflows to 0 for Re z above about 745 and overflows to inf
    for Re z below about -709.

    References
    ----------
    Abramowitz and Stegun 5.1.11, 5.1.22; DLMF 6.6, 6.9; Press et al.,
    *Numerical Recipes*, 3rd ed., sec. 6.3 (from memory).

    Examples
    --------
    >>> round(float(exp1(1.0)), 10)       # A&S Table 5.1
    0.2193839344
    """
    z = _as_argument(z, "z")
    if np.iscomplexobj(z):
        if np.any(z == 0):
            raise ModelInputError("exp1 is infinite at z = 0")
    elif np.any(z <= 0):
        raise ModelInputError("exp1 of a real argument needs z > 0")
    mag = np.abs(z)
    series = (mag <= 2.0) | ((z.real < 0) & (mag + z.real <= 4.0) & (mag <= 40.0))
    out = np.empty_like(z)
    if series.any():
        out[series] = _exp1_series(z[series])
    if (~series).any():
        out[~series] = _exp1_fraction(z[~series])
    return out


def _weideman_coefficients(n):
    """Coefficients a_1..a_n of Weideman's rational series for w(z) ([5]_, eq. 3.6-3.9)."""
    m = 2 * n
    half = np.sqrt(n / np.sqrt(2.0))
    k = np.arange(-m + 1, m)
    theta = k * np.pi / m
    t = half * np.tan(theta / 2.0)
    f = np.exp(-t * t) * (half * half + t * t)
    j = np.arange(1, n + 1)
    a = (np.cos(np.outer(j, theta)) @ f) / (2 * m)
    return half, a


_WEIDEMAN = {}


def _faddeeva_upper_series(z):
    """w(z) for Im z >= 0 by Weideman's rational series with 40 terms ([5]_)."""
    if _FADDEEVA_TERMS not in _WEIDEMAN:
        _WEIDEMAN[_FADDEEVA_TERMS] = _weideman_coefficients(_FADDEEVA_TERMS)
    half, a = _WEIDEMAN[_FADDEEVA_TERMS]
    denom = half - 1j * z
    big_z = (half + 1j * z) / denom
    p = np.zeros_like(big_z)
    for coef in a[::-1]:  # Horner: p = sum a_n Z^(n-1)
        p = p * big_z + coef
    return 2.0 * p / (denom * denom) + 1.0 / (np.sqrt(np.pi) * denom)


def _faddeeva_upper_fraction(z):
    """w(z) for Im z >= 0, |z| >= 6 by the Laplace continued fraction (A&S 7.1.4; [6]_)."""
    tail = np.zeros_like(z)
    for n in range(_FADDEEVA_FRACTION_DEPTH, 0, -1):
        tail = (0.5 * n) / (z - tail)
    return 1j / (np.sqrt(np.pi) * (z - tail))


def wofz(z):
    """Faddeeva function w(z) = e^{-z^2} erfc(-i z).

    Parameters
    ----------
    z : array_like
        Argument, complex (or real). [1]

    Returns
    -------
    ndarray of complex
        w(z). [1]

    Notes
    -----
    In the closed upper half-plane: Weideman's rational series with N = 40
    terms ([5]_) for |z| < 6, the Laplace continued fraction
    w(z) = (i/sqrt(pi)) / (z - (1/2)/(z - 1/(z - (3/2)/(z - ...))))
    (A&S 7.1.4) taken 60 deep for |z| >= 6. Below the real axis by
    w(z) = 2 e^{-z^2} - w(-z) (A&S 7.1.11), which grows like e^{(Im z)^2}
    and overflows (to inf) where the function itself is beyond the floating
    range. Accuracy (measured against a reference library for |z| from 1e-8
    to 1e4): relative error below 1e-13 in the closed upper half-plane; below
    the axis below 1e-13 (1 + |z|^2) of max(|w(z)|, 2|e^{-z^2}|), so absolute
    near the zeros of w there (the factor 1 + |z|^2 is the rounding of z^2
    itself, which any evaluation of e^{-z^2} inherits).

    References
    ----------
    Weideman, SIAM J. Numer. Anal. 31, 1994 (from memory); Gautschi, SIAM J.
    Numer. Anal. 7, 1970 (from memory); Abramowitz and Stegun 7.1.4, 7.1.11.

    Examples
    --------
    >>> round(float(wofz(0.0).real), 12)
    1.0
    >>> w = wofz(1.0)        # e^-1 + (2i/sqrt(pi)) F(1), Dawson's F(1) = 0.5380795069 (A&S Table 7.5)
    >>> round(float(w.real), 10), round(float(w.imag), 10)
    (0.3678794412, 0.6071577058)
    """
    z = _as_argument(z, "z").astype(complex)
    lower = z.imag < 0
    u = np.where(lower, -z, z)
    out = np.empty_like(u)
    far = np.abs(u) >= _FADDEEVA_FRACTION_RADIUS
    if far.any():
        out[far] = _faddeeva_upper_fraction(u[far])
    if (~far).any():
        out[~far] = _faddeeva_upper_series(u[~far])
    if lower.any():
        zl = z[lower]
        with np.errstate(over="ignore", invalid="ignore"):
            out[lower] = 2.0 * np.exp(-zl * zl) - out[lower]
    return out
