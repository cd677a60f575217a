"""The figures ``aerial layout`` prints for a layout: the same model ``aerial report`` uses for that wire.

The search ranks every candidate with a fast vectorised screening model
(:func:`aerial.planner.search.layout_figures`); the layouts it lists are then
built as wires (top, lead-in to the entry, an earth lead straight down from
the entry, the site's counterpoises) and computed by
:func:`aerial.models.closed_form.closed_form_response`, the report's own
closed forms, so that a layout and a report of the same wire agree.
Frame: metres, x east, y north, z up.
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from aerial.core.errors import ModelInputError

#: Said of each listed layout's figures.
REPORT_MODEL = "closed forms of 'aerial report' for this wire"


def planned_wires(site, layout: dict, size, entry_xyz, floor_m: float = 0.0) -> list:
    """The wires of a listed layout as :class:`aerial.site.reader.WireRun` objects.

    Parameters
    ----------
    site : Site
        The site (its counterpoises are kept).
    layout : dict
        A layout with ``top_points_m``, ``lead_in_points_m`` and ``lead_in_length_m``. [m]
    size : WireSize
        The aerial's wire.
    entry_xyz : tuple of float
        Where the lead-in ends (the receiver's terminals). [m]
    floor_m : float
        Height subtracted from every point (a conductive balcony slab the
        heights are reckoned from); 0 for a house or a garden. [m]
    """
    from aerial.site.reader import WireRun

    def lowered(points):
        p = np.array(points, dtype=float)
        p[:, 2] = np.maximum(p[:, 2] - floor_m, 0.05)
        return p

    ex, ey, eh = entry_xyz
    top = lowered(layout["top_points_m"])
    wires = [WireRun("planned top", "aerial", top, size, "plan", (None,) * len(top))]
    if layout["lead_in_length_m"] > 0:
        wires.append(WireRun("planned lead-in", "lead-in", lowered(layout["lead_in_points_m"]), size, "plan",
                             (None, None)))
    feed_z = max(eh - floor_m, 0.0)
    if feed_z > 0.05:
        wires.append(WireRun("earth lead", "earth lead", np.array([[ex, ey, feed_z], [ex, ey, 0.0]]), size, "plan",
                             (None, None)))
    return wires + [w for w in site.wires if w.role == "counterpoise"]


def planned_site(site, wires, entry_xyz, floor_m: float = 0.0):
    """``site`` with its wires replaced by ``wires`` and the receiver moved to the entry."""
    ex, ey, eh = entry_xyz
    return replace(site, wires=wires, receiver=replace(site.receiver, x_m=ex, y_m=ey, height_m=max(eh - floor_m, 0.0)))


def report_figures(site, layout: dict, size, entry_xyz, frequency, floor_m: float = 0.0) -> dict:
    """Effective height, capacitance, radiation and conductor-loss resistance of a layout, as the report has them.

    Parameters
    ----------
    frequency : array_like
        The ranking frequencies. [Hz]

    Returns
    -------
    dict
        ``effective_height_m``, ``capacitance_f`` (presented), ``static_capacitance_f``,
        ``radiation_resistance_ohm``, ``conductor_loss_ohm``: arrays over
        ``frequency`` [m, F, F, ohm, ohm]; ``shape`` (str).

    Raises
    ------
    ModelInputError
        When the closed forms cannot take the wires.
    """
    from aerial.geometry.resolve import resolve
    from aerial.models.closed_form import closed_form_response

    wires = planned_wires(site, layout, size, entry_xyz, floor_m)
    geo = resolve(planned_site(site, wires, entry_xyz, floor_m), wires=wires)
    r = closed_form_response(geo.segments, np.atleast_1d(np.asarray(frequency, float)), building=geo.building)
    return {
        "effective_height_m": np.asarray(r["effective_height_m"], float),
        "capacitance_f": np.asarray(r["capacitance_f"], float),
        "static_capacitance_f": np.asarray(r["static_capacitance_f"], float),
        "radiation_resistance_ohm": np.asarray(r["radiation_resistance_ohm"], float),
        "conductor_loss_ohm": np.asarray(r["conductor_loss_ohm"], float),
        "shape": r["shape"]["kind"],
        "reliable": bool(np.all(r["reliable"])),
    }


def safe_report_figures(*args, **kwargs):
    """:func:`report_figures`, or (None, reason) when the closed forms cannot take the wires."""
    try:
        return report_figures(*args, **kwargs), None
    except ModelInputError as err:
        return None, str(err)
