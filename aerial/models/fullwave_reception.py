"""Received voltage of a full-wave solution for a ground wave arriving from a bearing.

By reciprocity the open-circuit voltage per unit vertical field of a wave
arriving along the ground from bearing beta equals the vertical current
moment of the transmitting solution (1 V at the feed), each piece weighted
by the phase of the incident wave at its position, divided by the feed
current. Over a perfect ground only vertical currents count at grazing
incidence (a horizontal current and its image cancel there), and the field
E0 is the field at the ground, its reflection included.

Frame: metres, x east, y north, z up; bearings in degrees clockwise from
north, the direction the wave comes from.
"""

from __future__ import annotations

import numpy as np
from aerial.core.constants import SPEED_OF_LIGHT

from aerial.core.errors import ModelInputError

#: Bearings tried for the best and worst arrival. [deg]
BEARING_STEP_DEG = 5.0


def arrival_effective_height(result, bearing_deg):
    """Open-circuit voltage per unit field for waves from the given bearings (complex).

    Parameters
    ----------
    result : FullWaveResult
        A full-wave solution with ``current_ends``, ``current_position``,
        ``current_direction`` and ``current_length``.
    bearing_deg : array_like, shape (B,)
        Where the wave comes from, clockwise from north. [deg]

    Returns
    -------
    ndarray of complex, shape (F, B)
        h(f, beta) = (1/I0) sum_p L_p t_z,p Ibar_p exp(j k u . r_p). [m]

    Notes
    -----
    u = (sin beta, cos beta, 0) points toward the station; the incident
    wave is E0 exp(j k u . r). With every phase 1 (a building small against
    the wavelength) this is the solver's own ``effective_height``.

    References
    ----------
    C. A. Balanis, *Antenna Theory*, 3rd ed., Wiley, 2005, sec. 2.12
    (vector effective length by reciprocity). (from memory)
    """
    if getattr(result, "current_length", None) is None:
        raise ModelInputError("the full-wave result carries no piece lengths; solve again with this version")
    beta = np.radians(np.atleast_1d(np.asarray(bearing_deg, dtype=float)))
    u = np.stack([np.sin(beta), np.cos(beta)], axis=1)  # (B, 2)
    k = 2 * np.pi * np.asarray(result.frequency, float) / SPEED_OF_LIGHT  # (F,)
    pos = np.asarray(result.current_position, float)
    moment = (np.asarray(result.current_direction, float)[:, 2] * np.asarray(result.current_length, float))[None, :] \
        * 0.5 * (result.current_ends[:, :, 0] + result.current_ends[:, :, 1])  # (F, P)
    phase = np.exp(1j * k[:, None, None] * (pos[None, None, :, :2] * u[None, :, None, :]).sum(-1))  # (F, B, P)
    return np.einsum("fp,fbp->fb", moment, phase) / np.asarray(result.feed_current)[:, None]


def bearing_range(result, bearings_deg=None):
    """Smallest and largest |h| over the bearings, with the bearings where they occur.

    Returns
    -------
    dict
        ``worst_m``, ``best_m`` (F,) [m]; ``worst_bearing_deg``, ``best_bearing_deg`` (F,) [deg].
    """
    b = np.arange(0.0, 360.0, BEARING_STEP_DEG) if bearings_deg is None else np.asarray(bearings_deg, float)
    h = np.abs(arrival_effective_height(result, b))
    return {"worst_m": h.min(axis=1), "best_m": h.max(axis=1), "worst_bearing_deg": b[np.argmin(h, axis=1)],
            "best_bearing_deg": b[np.argmax(h, axis=1)]}


__all__ = ["arrival_effective_height", "bearing_range", "BEARING_STEP_DEG"]
