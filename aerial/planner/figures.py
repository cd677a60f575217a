"""The figures ``aerial layout`` prints for a layout: the same model ``aerial report`` uses for that wire.

The search ranks every candidate with a fast vectorised screening model
(:func:`aerial.planner.search.layout_figures`); the layouts it lists are then
built as wires (top, lead-in to the entry, the earth lead from the entry to
the site's earth point, the site's counterpoises) and computed by
:func:`aerial.estimate.assemble.headline_figures`, the report's own model
(closed forms, building screening, electrodes as lossy lines at each
frequency), so that a layout and a report of the same wire agree.
Frame: metres, x east, y north, z up.
"""

from __future__ import annotations

import numpy as np

from aerial.core.errors import ModelInputError

#: Said of each listed layout's figures.
REPORT_MODEL = "closed forms of 'aerial report' for this wire"


#: Points closer than this are the same point (a planned span on a site span's supports, the entry on the receiver). [m]
SAME_POINT_M = 0.05


def _same(a, b) -> bool:
    return float(np.linalg.norm(np.subtract(a, b, dtype=float))) < SAME_POINT_M


def _site_span(site, a, b):
    """The points of the site's own aerial wire from ``a`` to ``b`` (its sag kept), or None. [m]"""
    for w in site.wires:
        if w.role != "aerial" or len(w.points_m) < 2:
            continue
        p = np.asarray(w.points_m, float)
        if _same(p[0], a) and _same(p[-1], b):
            return p
        if _same(p[0], b) and _same(p[-1], a):
            return p[::-1]
    return None


def _top_wire(site, top) -> np.ndarray:
    """A planned top wire through ``top``; each piece on two supports the site already joins keeps that span's sag."""
    pts = [top[0]]
    for a, b in zip(top[:-1], top[1:]):
        span = _site_span(site, a, b)
        pts.extend(span[1:] if span is not None else [b])
    return np.array(pts, dtype=float)


def _earth_lead(site, start) -> tuple:
    """The earth lead from ``start``: the site's own when it starts there, else to the site's earth point.

    Returns (points [m], wire size); the size is None when the site has no earth lead (straight down).
    """
    own = next((w for w in site.wires if w.role == "earth lead"), None)
    if own is None:
        return np.array([start, [start[0], start[1], 0.0]], dtype=float), None
    p = np.asarray(own.points_m, float)
    if _same(p[0], start):
        return p, own.size
    return np.array([start, p[-1]], dtype=float), own.size


def receiver_xyz(site) -> np.ndarray:
    """Where the site's receiver terminals are: the feed of every wire set the report computes. [m]"""
    rc = site.receiver
    return np.array([rc.x_m, rc.y_m, rc.height_m], dtype=float)


def indoor_run(site, entry_xyz) -> np.ndarray | None:
    """The lead-in's run from the entry to the receiver, or None when the entry is the receiver. [m]

    Along the site's own lead-in when it passes through the entry and ends at the receiver (its bends kept,
    as the report has them); else straight from the entry to the receiver.
    """
    entry, rx = np.asarray(entry_xyz, dtype=float), receiver_xyz(site)
    if _same(entry, rx):
        return None
    own = next((w for w in site.wires if w.role == "lead-in"), None)
    if own is not None:
        p = np.asarray(own.points_m, float)
        p = p if _same(p[-1], rx) else p[::-1] if _same(p[0], rx) else None
        hits = [] if p is None else [i for i, q in enumerate(p[:-1]) if _same(q, entry)]
        if hits:
            return np.concatenate([[entry], p[hits[-1] + 1:]])
    return np.array([entry, rx], dtype=float)


def planned_wires(site, layout: dict, size, entry_xyz, floor_m: float = 0.0) -> list:
    """The wires of a listed layout as :class:`aerial.site.reader.WireRun` objects.

    The lead-in runs on from the entry to the receiver, as the report has it
    (:func:`indoor_run`); the earth lead runs from the receiver to where the
    site's own earth lead meets the ground (the site's own lead, bends and
    size; straight down when the site has none); a span between two supports
    the site already joins keeps that span's sag. A layout that is the site's
    present wire is therefore the same wires the report computes, and its
    length (top + lead-in) the report's.

    Parameters
    ----------
    site : Site
        The site (its counterpoises and earth lead are kept).
    layout : dict
        A layout with ``top_points_m``, ``lead_in_points_m`` and ``lead_in_length_m``. [m]
    size : WireSize
        The aerial's wire.
    entry_xyz : tuple of float
        Where the lead-in enters the building (``[plan.entry]``; the receiver's terminals when not given). [m]
    floor_m : float
        Height subtracted from every point (a conductive balcony slab the
        heights are reckoned from); 0 for a house or a garden. [m]
    """
    from aerial.site.reader import WireRun

    def lowered(points):
        p = np.array(points, dtype=float)
        if floor_m > 0:
            p[:, 2] = np.maximum(p[:, 2] - floor_m, 0.05)
        return p

    top = lowered(_top_wire(site, np.asarray(layout["top_points_m"], float)))
    wires = [WireRun("planned top", "aerial", top, size, "plan", (None,) * len(top))]
    lead_in = np.asarray(layout["lead_in_points_m"], float) if layout["lead_in_length_m"] > 0 else None
    indoor = indoor_run(site, entry_xyz)
    if indoor is not None:
        lead_in = indoor if lead_in is None else np.concatenate([lead_in, indoor[1:]])
    if lead_in is not None:
        wires.append(WireRun("planned lead-in", "lead-in", lowered(lead_in), size, "plan", (None,) * len(lead_in)))
    lead, lead_size = _earth_lead(site, receiver_xyz(site))
    if floor_m > 0:
        lead = lead.copy()
        lead[:, 2] = np.maximum(lead[:, 2] - floor_m, 0.0)
    if lead[0, 2] > 0.05 and float(np.linalg.norm(lead[-1] - lead[0])) > SAME_POINT_M:
        wires.append(WireRun("earth lead", "earth lead", lead, lead_size or size, "plan", (None,) * len(lead)))
    return wires + [w for w in site.wires if w.role == "counterpoise"]


def wires_from_slab(site, floor_m: float) -> list:
    """The site's own wires with their heights reckoned from a balcony slab ``floor_m`` up, as a layout's are.

    The aerial and lead-in are lowered by ``floor_m`` (kept 5 cm above the slab), the earth lead likewise (down to
    the slab), the counterpoises kept, as :func:`planned_wires` builds a listed layout: the present wire and a
    layout on the same supports then describe the same wire. [m]
    """
    out = []
    for w in site.wires:
        if w.role == "counterpoise" or floor_m <= 0:
            out.append(w)
            continue
        p = np.array(w.points_m, dtype=float)
        p[:, 2] = np.maximum(p[:, 2] - floor_m, 0.0 if w.role == "earth lead" else 0.05)
        if w.role == "earth lead" and (p[0, 2] <= 0.05 or float(np.linalg.norm(p[-1] - p[0])) <= SAME_POINT_M):
            continue  # the receiver on the slab: no earth lead above it, as a planned layout has none
        out.append(w._replace(points_m=p))
    return out


def planned_site(site, wires, floor_m: float = 0.0):
    """``site`` with its wires replaced by ``wires`` (the receiver's height reckoned from a balcony slab)."""
    return site._replace(wires=wires, receiver=site.receiver._replace(height_m=max(site.receiver.height_m - floor_m,
                                                                                   0.0)))


def wavelength_validity(site, wires=None, geometry=None) -> dict:
    """Where some wires are long for the wavelength, by the report's own test over the report's own sweep.

    :func:`aerial.models.closed_form.wavelength_validity` of the closed
    form of ``wires`` (default: the site's own) at every frequency of the
    site's bands (:func:`aerial.estimate.assemble.frequency_grid`), as
    ``aerial report`` computes them: a layout is flagged exactly when the
    report of the same wire warns.

    ``geometry``: the wires already resolved, when the caller has them.

    Returns
    -------
    dict
        ``long_from_hz``, ``resonance_from_hz``, ``rough_from_hz`` (each
        None when the figures hold across the bands) [Hz] and ``warnings``
        (the report's sentences).

    Raises
    ------
    ModelInputError
        When the closed forms cannot take the wires.
    """
    from aerial.estimate.assemble import frequency_grid
    from aerial.geometry.resolve import resolve
    from aerial.models.closed_form import closed_form_response

    geo = resolve(site, wires=wires) if geometry is None else geometry
    return closed_form_response(geo.segments, frequency_grid(site), building=geo.building)["wavelength_validity"]


def layout_wavelength_validity(site, layout: dict, size, entry_xyz, floor_m: float = 0.0) -> dict | None:
    """:func:`wavelength_validity` of a listed layout's wires, or None when the closed forms cannot take them."""
    wires = planned_wires(site, layout, size, entry_xyz, floor_m)
    try:
        return wavelength_validity(planned_site(site, wires, floor_m), wires)
    except ModelInputError:
        return None


def wire_lengths(site, layout: dict, size, entry_xyz, floor_m: float = 0.0, wires=None) -> tuple[float, float]:
    """(top, top + lead-in) of a layout's wires as the report measures them, sag included. [m]

    ``wires``: the layout's :func:`planned_wires` when the caller has built them.
    """
    wires = planned_wires(site, layout, size, entry_xyz, floor_m) if wires is None else wires
    top = sum(w.length_m for w in wires if w.role == "aerial")
    return top, top + sum(w.length_m for w in wires if w.role == "lead-in")


def listed_layout_figures(site, layout: dict, size, entry_xyz, frequency, earth_ohm, floor_m: float = 0.0) -> dict:
    """All the listing needs of a layout, from one build of its wires and one resolved geometry.

    The figures of :func:`aerial.estimate.assemble.headline_figures` of its wires (the report's closed forms,
    building screening and earth treatment), with :func:`wavelength_validity` and :func:`wire_lengths`, from
    one build of the wires and one resolved geometry.

    Parameters
    ----------
    frequency : array_like
        [Hz]
    earth_ohm : array_like
        The earth system's resistance at each frequency. [ohm]

    Returns
    -------
    dict
        ``figures`` (:func:`~aerial.estimate.assemble.headline_figures`: arrays over ``frequency``, or None when
        the closed forms cannot take the wires) and
        ``why`` (the reason then, else None); ``validity`` (:func:`wavelength_validity`, or None);
        ``top_length_m`` and ``wire_length_m`` (top + lead-in) [m].
    """
    from aerial.estimate.assemble import headline_figures
    from aerial.geometry.resolve import resolve

    wires = planned_wires(site, layout, size, entry_xyz, floor_m)
    planned = planned_site(site, wires, floor_m)
    top, wire = wire_lengths(site, layout, size, entry_xyz, floor_m, wires=wires)
    out = {"figures": None, "why": None, "validity": None, "top_length_m": top, "wire_length_m": wire}
    f = np.atleast_1d(np.asarray(frequency, float))
    lumped = float(np.mean(np.broadcast_to(np.asarray(earth_ohm, float), f.shape)))  # as the headline resolves
    try:
        geo = resolve(planned, electrode_ohm=lumped, wires=wires)
    except ModelInputError as err:
        return out | {"why": str(err)}
    try:
        out["figures"] = headline_figures(planned, f, earth_ohm, wires=wires, geometry=geo)
    except ModelInputError as err:
        out["why"] = str(err)
    try:
        out["validity"] = wavelength_validity(planned, wires, geometry=geo)
    except ModelInputError:
        pass
    return out
