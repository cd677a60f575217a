"""Low-frequency resistance of earth electrodes in uniform soil.

Driven rods (Dwight), two rods (Dwight), several rods with the multiple-rod
factors of IEEE Std 142, a buried horizontal wire (Sunde), a star of buried
radials (Dwight's published formulas for 2, 3, 4, 6 and 8 arms; an
average-potential computation for any number), a metal water pipe as a long
buried conductor, and unlike electrodes in parallel.

All results are DC (quasi-static) resistances in uniform soil of the given
resistivity. At MF the soil's permittivity and skin depth (about 5 m at 1 MHz
in 0.01 S/m soil) change the figure; the substitution 1/rho -> sigma + j omega
eps is an approximation the caller may apply.

Every function returns an :class:`ElectrodeEstimate`: the resistance and a
list of warnings saying where an input lies outside the formula's range.

References
----------
.. [1] H. B. Dwight, "Calculation of resistances to ground", Electrical
   Engineering 55, pp. 1319-1328, 1936. (from memory)
.. [2] IEEE Std 142-2007, *Recommended Practice for Grounding of Industrial
   and Commercial Power Systems* (Green Book), ch. 4 (rod formula, table of
   Dwight's formulas, multiple-rod factors). (from memory)
.. [3] E. D. Sunde, *Earth Conduction Effects in Transmission Systems*,
   Van Nostrand, 1949, ch. 3 (buried wire). (from memory)
.. [4] NFPA 70, National Electrical Code, Article 250 (a metal water pipe is a
   grounding electrode only with at least 3 m in contact with the earth).
   (from memory; check the edition)
"""

from __future__ import annotations

import numpy as np

from aerial.core.errors import ModelInputError
from aerial.core.records import NamedTuple
from aerial.models.checks import positive as _positive

#: IEEE Std 142 multiple-rod factors F for n rods about one rod length apart
#: (R_n = R_1 F / n). (from memory)
MULTIPLE_ROD_COUNTS = np.array([1, 2, 3, 4, 8, 12, 16, 20, 24])
MULTIPLE_ROD_FACTORS = np.array([1.00, 1.16, 1.29, 1.36, 1.68, 1.80, 1.92, 2.00, 2.16])
#: Spacing, in rod lengths, accepted as "about one rod length" for the table.
ROD_SPACING_RANGE = (0.75, 1.5)
#: NFPA 70 Art. 250: a water pipe needs this much metal in contact with earth. [m]
WATER_PIPE_MIN_CONTACT_M = 3.0
#: Gauss-Legendre points per panel and number of graded panels in the
#: average-potential star integral (relative accuracy better than 1e-6).
STAR_QUADRATURE_POINTS = 16
STAR_QUADRATURE_PANELS = 14

# Dwight (1936) star formulas as tabulated in IEEE Std 142 (from memory):
# R = rho / (2 n pi L) [ln(2L/a) + ln(2L/s) + c0 + c1 s/L + c2 s^2/L^2 + c4 s^4/L^4],
# L = arm length, s = twice the depth.
_DWIGHT_STAR = {
    3: (1.071, -0.209, 0.238, -0.054),
    4: (2.912, -1.071, 0.645, -0.145),
    6: (6.851, -3.128, 1.758, -0.490),
    8: (10.98, -5.51, 3.26, -1.17),
}


class ElectrodeEstimate(NamedTuple):
    """Resistance of an earth electrode with the warnings that go with it.

    Attributes
    ----------
    resistance_ohm : ndarray
        Resistance to remote earth. [ohm]
    warnings : tuple of str
        Plain-English notes on inputs outside the formula's range and on
        what the formula leaves out.
    method : str
        The formula used.
    """

    resistance_ohm: np.ndarray
    warnings: tuple = ()
    method: str = ""




def resistivity_from_conductivity(conductivity):
    """Soil resistivity from conductivity.

    Parameters
    ----------
    conductivity : array_like
        Soil conductivity. [S/m]

    Returns
    -------
    ndarray
        Resistivity rho = 1/sigma. [ohm m]

    Notes
    -----
    Definition.

    References
    ----------
    IEEE Std 80 / IEEE Std 142 (soil resistivity). (from memory)

    Examples
    --------
    >>> float(resistivity_from_conductivity(0.01))
    100.0
    """
    return 1.0 / _positive("conductivity", conductivity)


def dwight_rod(length, radius, resistivity):
    """Resistance of one driven rod (Dwight).

    Parameters
    ----------
    length : array_like
        Driven length. [m]
    radius : array_like
        Rod radius. [m]
    resistivity : array_like
        Soil resistivity. [ohm m]

    Returns
    -------
    ElectrodeEstimate
        R = rho / (2 pi L) [ln(4L/a) - 1]. [ohm]

    Notes
    -----
    Dwight [1]_ eq. for a single rod, top at the surface, uniform soil. Valid
    for L >> a (flagged below L/a = 20).

    References
    ----------
    .. [1] H. B. Dwight, "Calculation of resistances to ground", Electrical
       Engineering 55, 1936; the same form is in IEEE Std 142, ch. 4.
       (from memory)

    Examples
    --------
    >>> round(float(dwight_rod(2.44, 15.875e-3 / 2, 100.0).resistance_ohm), 2)
    39.88
    """
    L = _positive("length", length)
    a = _positive("radius", radius)
    rho = _positive("resistivity", resistivity)
    warnings = []
    if np.any(L < 20 * a):
        warnings.append("rod shorter than 20 radii: Dwight's thin-rod formula is unreliable")
    r = rho / (2 * np.pi * L) * (np.log(4 * L / a) - 1.0)
    return ElectrodeEstimate(r, tuple(warnings), "Dwight single rod")


def dwight_two_rods(length, radius, spacing, resistivity):
    """Resistance of two driven rods connected together (Dwight).

    Parameters
    ----------
    length : array_like
        Driven length of each rod. [m]
    radius : array_like
        Rod radius. [m]
    spacing : array_like
        Distance between the rods; the formula assumes spacing > length. [m]
    resistivity : array_like
        Soil resistivity. [ohm m]

    Returns
    -------
    ElectrodeEstimate
        Resistance of the pair. [ohm]

    Notes
    -----
    R = rho/(4 pi L) [ln(4L/a) - 1] + rho/(4 pi s) [1 - L^2/(3 s^2) + 2 L^4/(5 s^4)]
    ([1]_, two rods, s > L; flagged otherwise).

    References
    ----------
    .. [1] H. B. Dwight, "Calculation of resistances to ground", Electrical
       Engineering 55, 1936 (also tabulated in IEEE Std 142). (from memory)

    Examples
    --------
    >>> round(float(dwight_two_rods(3.0, 8e-3, 6.0, 100.0).resistance_ohm), 2)
    18.0
    """
    L = _positive("length", length)
    a = _positive("radius", radius)
    s = _positive("spacing", spacing)
    rho = _positive("resistivity", resistivity)
    warnings = []
    if np.any(s <= L):
        warnings.append("rod spacing not above the rod length: Dwight's two-rod series is outside its range")
    if np.any(L < 20 * a):
        warnings.append("rod shorter than 20 radii: Dwight's thin-rod formula is unreliable")
    r = rho / (4 * np.pi * L) * (np.log(4 * L / a) - 1.0) + rho / (4 * np.pi * s) * (
        1.0 - L**2 / (3 * s**2) + 2 * L**4 / (5 * s**4)
    )
    return ElectrodeEstimate(r, tuple(warnings), "Dwight two rods")


def multiple_rods(count, length, radius, spacing, resistivity):
    """Resistance of several driven rods about one rod length apart (IEEE Std 142 factors).

    Parameters
    ----------
    count : array_like of int
        Number of rods. [1]
    length : array_like
        Driven length of each rod. [m]
    radius : array_like
        Rod radius. [m]
    spacing : array_like
        Distance between neighbouring rods. [m]
    resistivity : array_like
        Soil resistivity. [ohm m]

    Returns
    -------
    ElectrodeEstimate
        R_n = R_1 F(n) / n with F interpolated linearly in n in the table. [ohm]

    Notes
    -----
    F = 1.16, 1.29, 1.36, 1.68, 1.80, 1.92, 2.00, 2.16 for n = 2, 3, 4, 8, 12,
    16, 20, 24 ([1]_, from memory). Rod counts above 24 use F(24) and are
    flagged; spacing outside 0.75-1.5 rod lengths is flagged (closer rods
    shield each other more and the factor is optimistic).

    References
    ----------
    .. [1] IEEE Std 142-2007 (Green Book), ch. 4, multiple-rod factors.
       (from memory)

    Examples
    --------
    >>> r1 = float(dwight_rod(3.0, 8e-3, 100.0).resistance_ohm)
    >>> r4 = float(multiple_rods(4, 3.0, 8e-3, 3.0, 100.0).resistance_ohm)
    >>> round(r4 / r1, 3)
    0.34
    """
    n = np.asarray(count)
    if np.any(~np.isfinite(n.astype(float)) | (n < 1) | (n != np.round(n))):
        raise ModelInputError(f"count must be a whole number of rods, 1 or more; got {count!r}")
    s = _positive("spacing", spacing)
    single = dwight_rod(length, radius, resistivity)
    L = np.asarray(length, dtype=float)
    warnings = list(single.warnings)
    if np.any(n > MULTIPLE_ROD_COUNTS[-1]):
        warnings.append(
            f"more than {MULTIPLE_ROD_COUNTS[-1]} rods: outside the IEEE Std 142 table, factor held at its last value"
        )
    ratio = s / L
    if np.any((ratio < ROD_SPACING_RANGE[0]) | (ratio > ROD_SPACING_RANGE[1])):
        warnings.append(
            "rod spacing far from one rod length: the multiple-rod factors assume about one rod length "
            "(closer spacing gives a higher resistance than shown)"
        )
    f = np.interp(n.astype(float), MULTIPLE_ROD_COUNTS, MULTIPLE_ROD_FACTORS)
    return ElectrodeEstimate(single.resistance_ohm * f / n, tuple(warnings), "IEEE Std 142 multiple-rod factor")


def sunde_buried_wire(length, radius, depth, resistivity):
    """Resistance of a straight horizontal wire buried at a depth (Sunde).

    Parameters
    ----------
    length : array_like
        Buried length. [m]
    radius : array_like
        Wire radius. [m]
    depth : array_like
        Burial depth. [m]
    resistivity : array_like
        Soil resistivity. [ohm m]

    Returns
    -------
    ElectrodeEstimate
        R = rho/(pi l) [ln(2l / sqrt(2 a d)) - 1]. [ohm]

    Notes
    -----
    Sunde [1]_ (uniform leakage, image in the surface); valid for
    l >> d >> a (flagged when l < 10 d or d < 10 a).

    References
    ----------
    .. [1] E. D. Sunde, *Earth Conduction Effects in Transmission Systems*,
       Van Nostrand, 1949, ch. 3. (from memory)

    Examples
    --------
    >>> round(float(sunde_buried_wire(10.0, 1e-3, 0.3, 100.0).resistance_ohm), 2)
    18.16
    """
    ell = _positive("length", length)
    a = _positive("radius", radius)
    d = _positive("depth", depth)
    rho = _positive("resistivity", resistivity)
    warnings = []
    if np.any(ell < 10 * d):
        warnings.append("buried wire shorter than 10 depths: Sunde's long-wire formula is unreliable")
    if np.any(d < 10 * a):
        warnings.append("burial depth under 10 wire radii: Sunde's formula is unreliable")
    r = rho / (np.pi * ell) * (np.log(2 * ell / np.sqrt(2 * a * d)) - 1.0)
    return ElectrodeEstimate(r, tuple(warnings), "Sunde buried wire")


def _gauss_panels(upper, scale):
    """Graded Gauss-Legendre nodes and weights on [0, upper], finer towards 0 (scale ~ the depth)."""
    x, w = np.polynomial.legendre.leggauss(STAR_QUADRATURE_POINTS)
    upper = np.asarray(upper, dtype=float)
    lo = np.minimum(scale, upper) / 20.0
    edges = np.geomspace(lo, upper, STAR_QUADRATURE_PANELS)  # shape (P, ...)
    edges = np.concatenate([np.zeros((1,) + np.shape(upper)), edges], axis=0)
    a, b = edges[:-1], edges[1:]
    half = 0.5 * (b - a)
    mid = 0.5 * (b + a)
    nodes = mid[:, None] + half[:, None] * x.reshape((1, -1) + (1,) * np.ndim(upper))
    weights = half[:, None] * w.reshape((1, -1) + (1,) * np.ndim(upper))
    return nodes.reshape((-1,) + np.shape(upper)), weights.reshape((-1,) + np.shape(upper))


def star_average_potential(n_arms, arm_length, radius, depth, resistivity):
    """Resistance of n equal buried radials from a common point, by the average-potential method.

    Parameters
    ----------
    n_arms : int
        Number of straight arms, spaced evenly round the centre. [1]
    arm_length : array_like
        Length of each arm. [m]
    radius : array_like
        Wire radius. [m]
    depth : array_like
        Burial depth. [m]
    resistivity : array_like
        Soil resistivity. [ohm m]

    Returns
    -------
    ElectrodeEstimate
        Resistance of the star. [ohm]

    Notes
    -----
    Dwight's own method [1]_: uniform leakage current on every arm, images in
    the soil surface (same sign), potential averaged over one arm::

        R = rho / (4 pi n L^2) sum_j [M(theta_j) + M_img(theta_j)]

    with M(0) = 2[L asinh(L/a) - sqrt(L^2 + a^2) + a] (the arm itself),
    M(theta) = 2 L ln[(1 + sin(theta/2)) / sin(theta/2)] for two arms meeting
    at angle theta, and the image terms (offset 2d) integrated once in closed
    form and once by graded Gauss-Legendre quadrature. Reproduces Dwight's
    published 3-, 4-, 6- and 8-arm formulas (tested). Valid for L >> d >> a.

    References
    ----------
    .. [1] H. B. Dwight, "Calculation of resistances to ground", Electrical
       Engineering 55, 1936 (average-potential method). (from memory)

    Examples
    --------
    >>> r = star_average_potential(4, 10.0, 1e-3, 0.3, 100.0)
    >>> round(float(r.resistance_ohm), 1)
    6.5
    """
    n = int(n_arms)
    if n != n_arms or n < 1:
        raise ModelInputError(f"n_arms must be a whole number, 1 or more; got {n_arms!r}")
    L = _positive("arm_length", arm_length)
    a = _positive("radius", radius)
    d = _positive("depth", depth)
    rho = _positive("resistivity", resistivity)
    L, a, d, rho = np.broadcast_arrays(L, a, d, rho)
    D = 2 * d
    total = 2 * (L * np.arcsinh(L / a) - np.sqrt(L**2 + a**2) + a)  # self
    total = total + 2 * (L * np.arcsinh(L / D) - np.sqrt(L**2 + D**2) + D)  # own image
    if n > 1:
        s, w = _gauss_panels(L, d)
        for j in range(1, n):
            th = 2 * np.pi * j / n
            half = np.sin(th / 2)
            total = total + 2 * L * np.log((1 + half) / half)
            c, sn = np.cos(th), np.sin(th)
            rho_s = np.sqrt((s * sn) ** 2 + D**2)
            inner = np.arcsinh((L - s * c) / rho_s) + np.arcsinh(s * c / rho_s)
            total = total + np.sum(w * inner, axis=0)
    r = rho / (4 * np.pi * n * L**2) * total
    warnings = []
    if np.any(L < 10 * d):
        warnings.append("radials shorter than 10 burial depths: the star formula is unreliable")
    if np.any(d < 10 * a):
        warnings.append("burial depth under 10 wire radii: the star formula is unreliable")
    return ElectrodeEstimate(r, tuple(warnings), "average-potential star (Dwight's method)")


def dwight_star(n_arms, arm_length, radius, depth, resistivity):
    """Resistance of a star of n buried radials: Dwight's published formulas.

    Parameters
    ----------
    n_arms : int
        Number of arms: 2 (a straight wire of length 2L), 3, 4, 6 or 8 use
        Dwight's formulas; any other count uses :func:`star_average_potential`
        and says so in the warnings. [1]
    arm_length : array_like
        Length of each arm. [m]
    radius : array_like
        Wire radius. [m]
    depth : array_like
        Burial depth. [m]
    resistivity : array_like
        Soil resistivity. [ohm m]

    Returns
    -------
    ElectrodeEstimate
        Resistance of the star. [ohm]

    Notes
    -----
    With s = 2 x depth ([1]_, table of formulas, from memory)::

        2 arms: R = rho/(4 pi L) [ln(4L/a) + ln(4L/s) - 2 + s/(2L) - s^2/(16 L^2) + s^4/(512 L^4)]
        n arms: R = rho/(2 n pi L) [ln(2L/a) + ln(2L/s) + c0 + c1 s/L + c2 s^2/L^2 + c4 s^4/L^4]
        n = 3: 1.071, -0.209, 0.238, -0.054      n = 4: 2.912, -1.071, 0.645, -0.145
        n = 6: 6.851, -3.128, 1.758, -0.490      n = 8: 10.98, -5.51, 3.26, -1.17

    Valid for L >> s >> a.

    References
    ----------
    .. [1] H. B. Dwight, "Calculation of resistances to ground", Electrical
       Engineering 55, 1936; tabulated in IEEE Std 142, ch. 4. (from memory)

    Examples
    --------
    >>> round(float(dwight_star(4, 10.0, 1e-3, 0.3, 100.0).resistance_ohm), 1)
    6.5
    """
    n = int(n_arms)
    if n != n_arms or n < 1:
        raise ModelInputError(f"n_arms must be a whole number, 1 or more; got {n_arms!r}")
    if n not in _DWIGHT_STAR and n != 2:
        est = star_average_potential(n, arm_length, radius, depth, resistivity)
        note = f"no published Dwight formula for {n} arm(s): average-potential computation used"
        return ElectrodeEstimate(est.resistance_ohm, est.warnings + (note,), est.method)
    L = _positive("arm_length", arm_length)
    a = _positive("radius", radius)
    d = _positive("depth", depth)
    rho = _positive("resistivity", resistivity)
    s = 2 * d
    x = s / L
    if n == 2:
        r = rho / (4 * np.pi * L) * (np.log(4 * L / a) + np.log(4 * L / s) - 2 + x / 2 - x**2 / 16 + x**4 / 512)
    else:
        c0, c1, c2, c4 = _DWIGHT_STAR[n]
        r = rho / (2 * n * np.pi * L) * (np.log(2 * L / a) + np.log(2 * L / s) + c0 + c1 * x + c2 * x**2 + c4 * x**4)
    warnings = []
    if np.any(L < 10 * d):
        warnings.append("radials shorter than 10 burial depths: Dwight's series is unreliable")
    if np.any(d < 10 * a):
        warnings.append("burial depth under 10 wire radii: Dwight's formula is unreliable")
    return ElectrodeEstimate(r, tuple(warnings), f"Dwight {n}-arm star")


#: The water-pipe warning that holds until the user has checked the pipe is metal all the way.
WATER_PIPE_CONTINUITY = ("a water pipe counts only if it is metal all the way: a plastic section or insulating joint "
                         "isolates it")


def water_pipe(buried_length, radius, depth, resistivity):
    """Resistance of a metal water pipe treated as a long buried conductor.

    Parameters
    ----------
    buried_length : array_like
        Length of metal pipe in contact with the soil. [m]
    radius : array_like
        Outer radius of the pipe. [m]
    depth : array_like
        Burial depth. [m]
    resistivity : array_like
        Soil resistivity. [ohm m]

    Returns
    -------
    ElectrodeEstimate
        :func:`sunde_buried_wire` of the pipe's buried length and radius,
        with warnings. [ohm]

    Notes
    -----
    Counts only if the pipe is metal all the way: one plastic section or
    insulating joint isolates the rest. The pipe's own resistance along long
    runs and coatings are neglected (optimistic). Codes accept a water pipe
    as an electrode only with at least 3 m in contact with the earth [2]_
    (flagged below).

    References
    ----------
    .. [1] E. D. Sunde, *Earth Conduction Effects in Transmission Systems*, 1949.
       (from memory)
    .. [2] NFPA 70 (National Electrical Code), Article 250. (from memory; check
       the edition)

    Examples
    --------
    >>> r = water_pipe(20.0, 0.01, 0.8, 100.0)
    >>> round(float(r.resistance_ohm), 2)
    7.57
    """
    est = sunde_buried_wire(buried_length, radius, depth, resistivity)
    warnings = list(est.warnings)
    warnings.append(WATER_PIPE_CONTINUITY)
    if np.any(np.asarray(buried_length, dtype=float) < WATER_PIPE_MIN_CONTACT_M):
        warnings.append("less than 3 m of pipe in contact with the earth: not accepted as an electrode by NFPA 70 Art. 250")
    return ElectrodeEstimate(est.resistance_ohm, tuple(warnings), "water pipe as a buried wire (Sunde)")


def parallel_combination(resistances):
    """Resistance of unlike electrodes bonded together, neglecting their mutual resistance.

    Parameters
    ----------
    resistances : sequence of array_like
        Resistance of each electrode on its own. [ohm]

    Returns
    -------
    ElectrodeEstimate
        1 / sum(1/R_i). [ohm]

    Notes
    -----
    Electrodes closer than a few times their size share the same soil and
    their combined resistance is higher than the parallel value: this figure
    is optimistic, and says so in its warnings.

    References
    ----------
    Parallel resistors; IEEE Std 142, ch. 4 (mutual resistance of electrodes).
    (from memory)

    Examples
    --------
    >>> round(float(parallel_combination([40.0, 40.0]).resistance_ohm), 1)
    20.0
    """
    rs = [_positive("resistances", r) for r in resistances]
    if not rs:
        raise ModelInputError("resistances must hold at least one electrode resistance")
    g = sum(1.0 / r for r in rs)
    warnings = ()
    if len(rs) > 1:
        warnings = (
            "electrodes combined in parallel without their mutual resistance: the figure is optimistic "
            "unless they are several times their own size apart",
        )
    return ElectrodeEstimate(1.0 / g, warnings, "parallel combination")
