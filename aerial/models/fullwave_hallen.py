"""A second, independent moment solution for the straight base-fed monopole: Hallen's equation.

Used to check :func:`aerial.models.fullwave.solve_full_wave` with a different
integral equation, basis and testing: Hallen's (vector-potential) equation,
pulse basis functions and point matching, on the equivalent centre-fed dipole
(the monopole over a perfect ground plus its image).

References
----------
.. [1] E. Hallen, "Theoretical investigations into the transmitting and
   receiving qualities of antennae", Nova Acta Regiae Soc. Sci. Upsaliensis,
   Ser. IV, 11(4), 1938. (from memory)
.. [2] C. A. Balanis, *Antenna Theory: Analysis and Design*, 3rd ed., Wiley,
   2005, sec. 8.3 (Hallen's integral equation, pulse basis, point matching;
   numbering from memory).
"""

from __future__ import annotations

import numpy as np
from aerial.core.constants import SPEED_OF_LIGHT as C0
from aerial.core.constants import MU_0 as mu_0

from aerial.core.threads import blas_threads
from aerial.core.errors import ModelInputError

ETA0 = mu_0 * C0

#: Default number of pulses on the monopole. [1]
DEFAULT_PULSES = 200


def hallen_monopole_impedance(height, radius, frequency, n_pulses: int = DEFAULT_PULSES):
    """Input impedance of a thin straight monopole over a perfect ground by Hallen's equation.

    Parameters
    ----------
    height : float
        Monopole height, fed at the ground (no base gap). [m]
    radius : float
        Wire radius. [m]
    frequency : float
        Frequency. [Hz]
    n_pulses : int
        Pulses along the monopole (the dipole has twice as many). [1]

    Returns
    -------
    complex
        Input impedance of the monopole (half the dipole's). [ohm]

    Notes
    -----
    For the dipole of half-length h with a delta gap V at z = 0 and time
    dependence exp(j omega t) ([2]_ eq. 8-24, from memory)::

        int_{-h}^{h} I(z') e^{-jkR} / (4 pi R) dz' = -j/eta [C cos(kz) + (V/2) sin(k|z|)],

    R = sqrt((z - z')^2 + a^2) (reduced kernel). The current is symmetric;
    n pulses on 0 < z < h (each paired with its mirror) and the constant C are
    the unknowns, matched at the n pulse centres and at the wire end z = h.
    The 1/R part of each pulse integral is analytic, the rest by 8-point
    Gauss-Legendre. The gap current is extrapolated linearly from the first
    two pulses.

    Examples
    --------
    >>> z = hallen_monopole_impedance(0.25, 1e-4, C0)     # quarter wave, a = 1e-4 lambda
    >>> 39.0 < z.real < 41.5
    True
    """
    if not (height > 0 and radius > 0 and frequency > 0 and radius < height):
        raise ModelInputError("height, radius and frequency must be positive, radius < height")
    n = int(n_pulses)
    if n < 4:
        raise ModelInputError("n_pulses must be at least 4")
    k = 2 * np.pi * frequency / C0
    dz = height / n
    edges = np.arange(n + 1) * dz
    zc = 0.5 * (edges[:-1] + edges[1:])
    zm = np.concatenate([zc, [height]])  # matching points
    xg, wg = np.polynomial.legendre.leggauss(8)

    def pulse(z, lo, hi):
        # int_lo^hi e^{-jkR}/(4 pi R) dz', R = sqrt((z - z')^2 + a^2)
        static = np.arcsinh((hi - z) / radius) - np.arcsinh((lo - z) / radius)
        zp = 0.5 * (lo + hi) + 0.5 * (hi - lo) * xg[:, None, None]
        r = np.sqrt((z - zp) ** 2 + radius**2)
        smooth = 0.5 * (hi - lo) * np.sum(wg[:, None, None] * (np.exp(-1j * k * r) - 1.0) / r, axis=0)
        return (static + smooth) / (4 * np.pi)

    z = zm[:, None]
    kern = pulse(z, edges[None, :-1], edges[None, 1:]) + pulse(z, -edges[None, 1:], -edges[None, :-1])
    a = np.zeros((n + 1, n + 1), dtype=complex)
    a[:, :n] = kern
    a[:, n] = 1j / ETA0 * np.cos(k * zm)
    v_dipole = 1.0
    rhs = -1j / ETA0 * (v_dipole / 2) * np.sin(k * np.abs(zm))
    with blas_threads(n + 1):
        sol = np.linalg.solve(a, rhs)
    i_gap = 1.5 * sol[0] - 0.5 * sol[1]
    return complex(0.5 * v_dipole / i_gap)


__all__ = ["hallen_monopole_impedance", "DEFAULT_PULSES"]
