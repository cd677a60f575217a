"""The orchestrator: one site in, one JSON-ready result out.

This is the Python API behind ``aerial report``; a notebook user calls
:func:`analyse` and gets the same dict the command line prints with
``--json``. It connects the pure models in :mod:`aerial.models` and knows
nothing of rich or the terminal.
"""

from __future__ import annotations

import math

import numpy as np

from aerial.core.arrays import sorted_unique
from aerial.core.beside import in_copy, shared
from aerial.core.lengthtext import metres, metres_range, words
from aerial.core.version import __version__
from aerial.estimate.plain import finalise
from aerial.core.errors import AerialError, ModelInputError, naming_the_file
from aerial.core.units import FOOT_M, si_text
from aerial.geometry.resolve import EARTH_ROLES, resolve, wires_json
from aerial.estimate.cautions import cautions_for
from aerial.site.reader import JOIN_TOLERANCE_M, MAX_POINTS_PER_BAND, check_sweep_size

METHODS = ("closed-form", "full-wave")

#: Default sweep step by band [Hz] when the site gives none.
DEFAULT_STEP_HZ = ((300e3, 5e3), (2e6, 10e3), (31e6, 25e3))

#: Said in every report of a wire on a block of flats: the models see a wire over open ground.
APARTMENT_NOTE = (
    "The wire is on a block of flats: these figures treat it as a wire over open ground at its height above "
    "the street. A reinforced-concrete or steel-framed building is a grounded conductor close to the wire, so "
    "the real effective height and signal may be far lower; 'aerial layout' reckons heights from the balcony "
    "slab instead (an assumption, stated there). A bench measurement ([receiver.measured]) settles it."
)

#: Height change and added length in the what-if table.
WHAT_IF_RAISE_M = 3.0
WHAT_IF_EXTEND_M = 10.0
#: How far the balcony what-if holds the wire out from the facade, and how far below the aerial a counterpoise runs. [m]
WHAT_IF_STAND_OFF_M = 2.0
WHAT_IF_COUNTERPOISE_DROP_M = 1.0
#: The far-edge move is offered when it takes part of the wire at least this much further from the facade. [m]
WHAT_IF_FAR_EDGE_MIN_GAIN_M = 0.3
#: The what-if steps in round figures of each unit system (raise, extend, stand-off, radial length), in metres:
#: under "us" 10 ft, 30 ft, 6 ft and 30 ft, so the table offers what a tape in feet measures. [m]
WHAT_IF_STEPS_M = {
    "si": {"raise": WHAT_IF_RAISE_M, "extend": WHAT_IF_EXTEND_M, "stand_off": WHAT_IF_STAND_OFF_M, "radial": 10.0},
    "us": {"raise": 10 * FOOT_M, "extend": 30 * FOOT_M, "stand_off": 6 * FOOT_M, "radial": 30 * FOOT_M},
}


def frequency_grid(site, step_hz: float | None = None) -> np.ndarray:
    """Sweep frequencies for the site's bands, band edges included. [Hz]"""
    step_override = step_hz or site.frequency_step_hz.get("all")
    if step_override:
        try:
            check_sweep_size(site.bands, step_override, "--step" if step_hz else "site.frequency_step")
        except ValueError as err:
            raise AerialError(str(err)) from None
    out = []
    for _name, lo, hi in site.bands:
        step = step_override
        if step is None:
            step = next(s for top, s in DEFAULT_STEP_HZ if hi <= top)
        n = max(2, int(math.ceil((hi - lo) / step)) + 1)
        n = min(n, MAX_POINTS_PER_BAND)
        out.append(np.linspace(lo, hi, n))
    return sorted_unique(np.round(np.concatenate(out), 3))


def band_points(site) -> list[tuple[str, float]]:
    """Band edges and centres (geometric) for the report tables. [Hz]"""
    pts = []
    for name, lo, hi in site.bands:
        pts += [(f"{name} low edge", lo), (f"{name} centre", math.sqrt(lo * hi)), (f"{name} high edge", hi)]
    return pts


# --------------------------------------------------------------------------- earth


def earth_system(site) -> dict:
    """Resistance of the site's earth system at low frequency, with its range. [ohm]"""
    from aerial.estimate import earth

    return earth.earth_system(site.electrodes, site.soil, earth.as_counterpoise_site(site), path=site.path)


def _screen_aerial(site, frequency, screen: bool):
    """The site's vertical for Wait's radial screen (None without radials, or when ``screen`` is false)."""
    from aerial.estimate import earth

    if not screen or earth.radial_system(site.electrodes) is None:
        return None
    return earth.screen_aerial(resolve(site).segments)


def earth_at_frequency(site, frequency, screen: bool = True) -> dict:
    """The earth system's impedance over ``frequency`` [Hz]: electrodes as lossy lines in the soil.

    With buried radials under an aerial with a vertical down-lead (and ``screen``, the closed forms' case) the
    radials are Wait's radial screen and the figure is the aerial's ground loss over it
    (:func:`aerial.estimate.earth.electrode_impedance`).
    """
    from aerial.estimate import earth

    return earth.electrode_impedance(site.electrodes, site.soil, frequency, earth.as_counterpoise_site(site),
                                     aerial=_screen_aerial(site, frequency, screen))


def earth_bounds(site, frequency, screen: bool = True) -> dict:
    """The earth system's RF resistance with the soil at its bounds, over ``frequency`` [Hz]. [ohm]"""
    from aerial.estimate import earth

    return earth.resistance_bounds(site.electrodes, site.soil, frequency, earth.as_counterpoise_site(site),
                                   aerial=_screen_aerial(site, frequency, screen))


def what_if_frequency(site, pts) -> float:
    """The frequency of the what-if table and of the earth table's impedance column. [Hz]"""
    return pts[len(pts) // 2][1] if len(site.bands) == 1 else pts[1][1]


def _span(low: float, value: float, high: float) -> list:
    """[low, high] widened to hold ``value``."""
    return [float(min(low, value)), float(max(high, value))]


def _with_screen_length(site, rf: dict, centre_index: int) -> dict:
    """``rf`` with the radial screen's part given Wait's screen's effective length at the centre frequency.

    Where the radials are a screen their loss comes from Wait's model, so their effective length (the
    length beyond which longer radials stop lowering the loss) comes from it too, as in the what-if's note;
    the lossy-line figure would contradict it. Other frequencies keep no figure (None), as the table
    shows the centre alone.
    """
    if "screen" not in rf:
        return rf
    from aerial.estimate import earth

    f = float(rf["frequency_hz"][centre_index])
    radials = earth.radial_system(site.electrodes)
    fixed = [e for e in earth.radial_sets(site.electrodes) if e is not radials]
    l_eff = earth.screen_effective_length(fixed, radials, site.soil, f, _screen_aerial(site, f, True))
    n = list(site.electrodes).index(radials)
    lengths = np.full(len(rf["frequency_hz"]), np.nan)
    lengths[centre_index] = l_eff
    parts = list(rf["parts"])
    parts[n] = dict(parts[n], effective_length_m=lengths)
    return dict(rf, parts=parts)


def _earth_json(earth: dict, rf: dict, centre_index: int, bounds: dict) -> dict:
    """The earth section of the result: DC figures, and each part's impedance and effective length at frequency.

    ``bounds``: :func:`earth_bounds` at the centre frequency alone (the RF ranges of the table).
    """
    out = {k: v for k, v in earth.items() if k != "warnings"}
    z = rf["impedance_ohm"]
    out["impedance_ohm"] = np.stack([z.real, z.imag], axis=1)
    out["impedance_method"] = rf["notes"][0]
    out["resistance_range_at_centre_ohm"] = _span(bounds["low_ohm"][0], z[centre_index].real, bounds["high_ohm"][0])
    parts = []
    for n, (part, line) in enumerate(zip(out.get("parts", []), rf["parts"])):
        part = dict(part)
        zp = line["impedance_ohm"][centre_index]
        part["impedance_at_centre_ohm"] = [float(zp.real), float(zp.imag)]
        part["resistance_range_at_centre_ohm"] = _span(bounds["parts_low_ohm"][n][0], zp.real,
                                                       bounds["parts_high_ohm"][n][0])
        l_eff = line["effective_length_m"]
        part["effective_length_m"] = None if l_eff is None else float(l_eff[centre_index])
        part["impedance_method"] = line["method"]
        parts.append(part)
    out["parts"] = parts
    out["centre_frequency_hz"] = float(rf["frequency_hz"][centre_index])
    return out


# --------------------------------------------------------------------------- aerial


#: Ground treatments of the full-wave solver.
GROUNDS = ("perfect", "lossy", "reflection-coefficient")


def aerial_response(site, geometry, frequency, earth_ohm: float, method: str = "closed-form", progress=None,
                    ground: str = "perfect", allow_large: bool = False, convergence_check: bool = True,
                    screen_method: str | None = None) -> dict:
    """Per-frequency electrical figures of the aerial with its earth. Returns numpy arrays.

    ``convergence_check`` (full wave only): False skips the solver's second
    solve at twice the pieces (the figures are the same).
    ``screen_method``: set when ``earth_ohm`` is the aerial's ground loss over a radial screen (Wait's model,
    :func:`earth_at_frequency`) rather than an electrode resistance; the loss budget then names it as the
    soil's loss under the aerial.
    """
    if method not in METHODS:
        raise ModelInputError(f"'{method}' is not a valid method, must be one of " + ", ".join(f"'{m}'" for m in METHODS))
    if method == "full-wave":
        from aerial.estimate.fullwave_sweep import full_wave_response

        out = full_wave_response(site, geometry, frequency, earth_ohm, progress=progress, ground=ground,
                                 allow_large=allow_large, convergence_check=convergence_check)
    else:
        from aerial.models.closed_form import closed_form_response

        out = dict(closed_form_response(geometry.segments, frequency, building=geometry.building))
        out["ground_loss_ohm"] = np.broadcast_to(np.asarray(earth_ohm, float), (len(frequency),)).copy()
        out["warnings"] = list(out.get("warnings", []))
        earth_f = np.broadcast_to(np.asarray(earth_ohm, float), (len(frequency),)).copy()
        out["loss_budget"] = {
            "soil_under_aerial_ohm": np.zeros(len(frequency)),
            "soil_treatment": "not modelled: closed forms over a perfect ground plane",
            "electrode_ohm": earth_f,
            "electrode_treatment": "earth-system resistance in series at the feed (electrodes as lossy lines in the soil)",
        }
        if screen_method:
            out["loss_budget"] = {
                "soil_under_aerial_ohm": earth_f,
                "soil_treatment": screen_method + ", in series at the feed",
                "electrode_ohm": np.zeros(len(frequency)),
                "electrode_treatment": "none apart: the radials carry the return current to the feed",
            }
    rr = np.asarray(out["radiation_resistance_ohm"], float)
    rc = np.asarray(out["conductor_loss_ohm"], float)
    rg = np.asarray(out["ground_loss_ohm"], float)
    r_total = rr + rc + rg
    x = np.asarray(out["reactance_ohm"], float)
    out["series_resistance_ohm"] = r_total
    out["impedance_ohm"] = np.stack([r_total, x], axis=1)
    out["efficiency"] = rr / r_total
    e = site.field_strength_v_per_m
    voc = e * np.asarray(out["effective_height_m"], float)
    out["open_circuit_voltage_v"] = voc
    out["available_power_w"] = voc**2 / (4.0 * r_total)
    return out


#: Height tolerance taken for the points of a wire given as an explicit polyline (measured points). [m]
POLYLINE_TOLERANCE_M = 0.3


def _point_tolerances(site) -> list:
    """Height tolerance of every point of every aerial wire [m]; points that meet share one value.

    A point at a support takes the support's tolerance, and so does any point
    of another wire that meets it there (a lead-in leaving a support moves
    with the span), so moving the supports never pulls the wires apart.
    Other points are interpolated along their wire; wires with no support
    at all take ``POLYLINE_TOLERANCE_M``.
    """
    supports = site.supports
    anchors, anchor_tol = [], []
    for w in site.wires:
        if w.role in EARTH_ROLES:
            continue
        for xyz, mark in zip(np.asarray(w.points_m, float), list(w.support_at_point) or []):
            if mark in supports:
                anchors.append(xyz)
                anchor_tol.append(supports[mark].height_tolerance_m)
    anchors = np.reshape(np.asarray(anchors, float), (-1, 3))
    anchor_tol = np.asarray(anchor_tol, float)
    out = []
    for w in site.wires:
        if w.role in EARTH_ROLES:
            out.append(None)
            continue
        p = np.asarray(w.points_m, float)
        # each point takes the tolerance of the first anchor it meets
        meets = np.sqrt(np.sum((p[:, None, :] - anchors[None, :, :]) ** 2, axis=2)) < JOIN_TOLERANCE_M
        tol = np.where(meets.any(axis=1), anchor_tol[np.argmax(meets, axis=1)] if len(anchor_tol) else np.nan,
                       np.nan)
        good = ~np.isnan(tol)
        if not np.any(good):
            tol[:] = POLYLINE_TOLERANCE_M
        else:
            idx = np.arange(len(p))
            tol = np.interp(idx, idx[good], tol[good])
        out.append(tol)
    return out


def _perturbed_wires(site, delta_sign: float = 0.0, raise_m: float = 0.0, extend_m: float = 0.0):
    """Aerial wires with support heights moved by their tolerance (sign -1/+1) or by ``raise_m``.

    The receiver end of the lead-in and the earth side stay where they are;
    points where wires meet move together. Should the full move fold a
    piece onto itself, the move is halved until it does not.
    """
    feed = site.feed_m
    tolerances = _point_tolerances(site)
    for scale in (1.0, 0.5, 0.25, 0.0):
        out = []
        for w, tol in zip(site.wires, tolerances):
            if tol is None:
                out.append(w)
                continue
            p = np.array(w.points_m, dtype=float)
            at_feed = np.linalg.norm(p - feed, axis=1) < JOIN_TOLERANCE_M  # the loader joins points this close
            dz = np.where(at_feed, 0.0, scale * (delta_sign * tol + raise_m))
            z = np.maximum(p[:, 2] + dz, 0.3 * p[:, 2] + 0.05 * (~at_feed))
            # a point next to the feed and straight above or below it does not cross the feed's height:
            # the lead-in would fold back along the earth lead that leaves the feed there (two wires on
            # one line have no static solution)
            beside = np.zeros_like(at_feed)
            beside[1:] |= at_feed[:-1]
            beside[:-1] |= at_feed[1:]
            beside &= ~at_feed & (np.linalg.norm(p[:, :2] - feed[:2], axis=1) < JOIN_TOLERANCE_M)
            above = p[:, 2] >= feed[2]
            z = np.where(beside & above, np.maximum(z, feed[2]), np.where(beside, np.minimum(z, feed[2]), z))
            p[:, 2] = z
            out.append(w._replace(points_m=p))
        if all(_keeps_length(w.points_m, w.size.radius_m) for w, t in zip(out, tolerances) if t is not None):
            break
    if extend_m > 0:
        out = _extend_far_end(out, feed, extend_m)
    return out


def _keeps_length(points, radius_m: float) -> bool:
    """Every piece stays a usable thin wire once low points are lifted to the feed gap (as resolve does)."""
    from aerial.models.segments import FEED_GAP_M
    from aerial.site.reader import MIN_LENGTH_TO_RADIUS

    lifted = np.array(points, dtype=float)
    lifted[:, 2] = np.maximum(lifted[:, 2], FEED_GAP_M)
    pieces = np.linalg.norm(np.diff(lifted, axis=0), axis=1)
    return bool(np.all(pieces >= max(JOIN_TOLERANCE_M, MIN_LENGTH_TO_RADIUS * radius_m)))


def _extend_far_end(wires, feed, extend_m):
    """Add ``extend_m`` of wire at the aerial's far end, continuing its last piece.

    The far end is the free end of an aerial wire (joined to no other wire) farthest from the feed; where
    every end is joined (a loop), the end farthest from the feed. A lead-in that runs a long way from the
    span to the receiver can put the span's joined end farther from the feed than its free one: the free
    end is still the one a longer wire would reach out from.
    """
    points = [np.asarray(w.points_m, dtype=float) for w in wires]
    best = None
    for i, w in enumerate(wires):
        if w.role != "aerial":
            continue
        for end in (0, -1):
            p = points[i][end]
            joined = any(np.any(np.linalg.norm(q - p, axis=1) < JOIN_TOLERANCE_M)
                         for j, q in enumerate(points) if j != i)
            d = np.linalg.norm(p - feed)
            if best is None or (not joined, d) > best[0]:
                best = ((not joined, d), i, end)
    if best is None:
        return wires
    _, i, end = best
    w = wires[i]
    p = np.array(w.points_m, dtype=float)
    if end == 0:
        p = p[::-1]
    direction = p[-1] - p[-2]
    direction[2] = 0.0
    norm = np.linalg.norm(direction)
    if norm < 1e-9:
        direction = np.array([1.0, 0.0, 0.0])
    else:
        direction /= norm
    new = p[-1] + extend_m * direction
    p = np.vstack([p, new])
    marks = tuple(w.support_at_point) + (None,) if end == -1 else (None,) + tuple(w.support_at_point)
    if end == 0:
        p = p[::-1]
    wires = list(wires)
    wires[i] = w._replace(points_m=p, support_at_point=marks)
    return wires


#: The headline figures that carry a range.
HEADLINE_KEYS = ("capacitance_f", "effective_height_m", "loss_resistance_ohm", "series_resistance_ohm",
                 "open_circuit_voltage_v", "available_power_w", "ground_loss_ohm")


def _headline(site, wires, frequency, earth_ohm, *, like=None, method="closed-form", ground="perfect", progress=None,
              lumped_ohm=None, shielding_case: int = 1, raw: bool = False, response: dict | None = None,
              geometry=None):
    """Headline figures of ``wires`` at ``frequency`` by one model. Returns arrays over frequency.

    ``earth_ohm``: the earth system's resistance, one value or one per
    frequency [ohm]; ``lumped_ohm``: the full-wave solver's electrode load
    where an earth lead meets the ground (default: ``earth_ohm`` when it is
    one value, else its mean).

    ``like``: the nominal wires' :class:`~aerial.models.shapes.AerialShape`;
    the closed forms then model the moved wires as that shape
    (:func:`aerial.models.shapes.measure_like`), so that a tolerance run uses
    the nominal figure's model. ``raw``: the model's own result under
    ``response`` too. ``response``: the closed forms' result for these
    wires at ``frequency`` from an earlier call (``raw``), when only the
    earth differs: the closed forms do not depend on the earth's resistance,
    which is added in series here. ``geometry``: ``wires`` already resolved
    (:func:`aerial.geometry.resolve.resolve`), for the closed forms.
    """
    f = np.atleast_1d(np.asarray(frequency, float))
    earth_f = np.broadcast_to(np.asarray(earth_ohm, float), f.shape).copy()
    lumped = float(np.mean(earth_f)) if lumped_ohm is None else float(lumped_ohm)
    if response is not None and method != "full-wave":
        r, rg = response, earth_f
    elif method == "full-wave":
        geo = resolve(site, electrode_ohm=lumped, wires=wires)
        from aerial.estimate.fullwave_sweep import full_wave_response

        r = full_wave_response(site, geo, f, earth_f, ground=ground, allow_large=True, progress=progress,
                               convergence_check=False)
        rg = np.asarray(r["ground_loss_ohm"], float)
    else:
        from aerial.models.closed_form import closed_form_response
        from aerial.models.shapes import measure_like

        geo = resolve(site, electrode_ohm=lumped, wires=wires) if geometry is None else geometry
        shape = None
        if like is not None and len(like.segment_section) == len(geo.segments):
            shape = measure_like(geo.segments, like)
        r = closed_form_response(geo.segments, f, shape=shape, building=geo.building,
                                 shielding_case=shielding_case, convergence_check=False)  # its warnings are not read
        rg = earth_f
    rr = np.asarray(r["radiation_resistance_ohm"], float)
    rt = rr + np.asarray(r["conductor_loss_ohm"], float) + rg
    voc = site.field_strength_v_per_m * np.asarray(r["effective_height_m"], float)
    out = {"response": r} if raw else {}
    return out | {
        "capacitance_f": np.asarray(r["capacitance_f"], float),
        "effective_height_m": np.asarray(r["effective_height_m"], float),
        "loss_resistance_ohm": rt - rr,
        "series_resistance_ohm": rt,
        "open_circuit_voltage_v": voc,
        "available_power_w": voc**2 / (4 * rt),
        "ground_loss_ohm": rg,
    }


def _nominal_shape(site, geometry=None):
    """The closed forms' classification of the site's own wires (None when it cannot be had).

    ``geometry``: the site's own wires already resolved (:func:`aerial.geometry.resolve.resolve`; its
    segments do not depend on the electrode resistance it was given).
    """
    from aerial.models.shapes import classify

    try:
        return classify((resolve(site) if geometry is None else geometry).segments)
    except ModelInputError:
        return None


def _full_wave_ranges_fit(site, frequency, main_frequency, allow_large: bool) -> bool:
    """Whether two more full-wave runs at the range frequencies stay, with the sweep, within the time budget."""
    from aerial.estimate.fullwave_sweep import TIME_BUDGET_S, estimate_site_full_wave

    if allow_large:
        return True
    geo = resolve(site)
    main = estimate_site_full_wave(geo, main_frequency)["seconds"]
    extra = 2 * estimate_site_full_wave(geo, frequency)["seconds"]
    return main + extra <= TIME_BUDGET_S


def headline_figures(site, frequency, earth_ohm=None, wires=None, geometry=None) -> dict:
    """The report's headline figures of some wires at some frequencies, by the report's own model.

    Parameters
    ----------
    site : Site
        The site (its building, receiver and soil are used).
    frequency : array_like
        [Hz]
    earth_ohm : float or array_like, optional
        The earth system's resistance at each frequency [ohm]; default: the
        report's, the electrodes as lossy lines in the soil
        (:func:`earth_at_frequency`).
    wires : list of WireRun, optional
        Default: the site's own wires.
    geometry : Geometry, optional
        The wires already resolved (:func:`aerial.geometry.resolve.resolve`), so that a caller who needs
        more of the same wires resolves them once.

    Returns
    -------
    dict
        Arrays over ``frequency``: the keys of the report's headline figures
        plus ``radiation_resistance_ohm``, ``conductor_loss_ohm`` [ohm] and
        ``static_capacitance_f`` [F]; ``shape`` (str) and ``reliable`` (bool).
    """
    f = np.atleast_1d(np.asarray(frequency, float))
    if earth_ohm is None:
        earth_ohm = earth_at_frequency(site, f)["impedance_ohm"].real
    out = _headline(site, site.wires if wires is None else wires, f, earth_ohm, raw=True, geometry=geometry)
    r = out.pop("response")
    out["radiation_resistance_ohm"] = np.asarray(r["radiation_resistance_ohm"], float)
    out["conductor_loss_ohm"] = np.asarray(r["conductor_loss_ohm"], float)
    out["static_capacitance_f"] = np.broadcast_to(np.asarray(r["static_capacitance_f"], float), f.shape).copy()
    out["shape"] = r["shape"]["kind"]
    out["reliable"] = bool(np.all(r["reliable"]))
    return out


def report_centre_frequency(site, freqs=None) -> float:
    """The sweep frequency of the report's what-if table, earth table and loss budget. [Hz]"""
    freqs = frequency_grid(site) if freqs is None else np.asarray(freqs, float)
    return float(freqs[int(np.argmin(np.abs(freqs - what_if_frequency(site, band_points(site)))))])


def uncertainty(site, frequency, earth: dict, *, method: str = "closed-form", nominal: dict | None = None,
                ground: str = "perfect", full_wave_ranges: bool = True, progress=None,
                centre_hz: float | None = None, bounds: dict | None = None, geometry=None) -> dict:
    """Low and high values of the headline figures from the inputs' tolerances.

    Heights move by each support's tolerance (points where wires meet move
    together); the soil goes to its category's bounds. The moved wires are
    computed by the same model as the value: under the closed forms, as the
    nominal wires' shape; under ``method="full-wave"``, by the solver (or,
    with ``full_wave_ranges=False``, the closed forms' relative spread put
    around the full-wave value, and ``method`` in the result says so).
    ``nominal`` (key -> values at ``frequency``) makes every range the
    envelope of the value and the two tolerance runs. The earth system's
    resistance in each run is the value's own RF model (electrodes as lossy
    lines, :func:`earth_bounds`) at each frequency, the soil taken across
    its conductivity and permittivity bounds: the lowered wires take the
    highest resistance, the raised wires the lowest. Under the full wave over
    real soil (``ground`` not "perfect") the soil under the aerial moves too:
    the lowered wires over the soil at the low end of its range (least
    conductive, lowest permittivity), the raised wires at the high end. ``centre_hz`` is where the full-wave value's lumped electrode
    load was taken (default: the middle of ``frequency``). ``bounds``: that
    :func:`earth_bounds` over ``frequency`` and then ``centre_hz``, when the
    caller has it already (the report's earth table takes its last entry). ``earth`` (the DC
    figures) is kept for compatibility and not used. ``geometry``: the site's own wires already resolved,
    when the caller has them.

    Returns
    -------
    dict
        key -> (F, 2) arrays of [low, high]; ``method`` (str): the model of the ranges.
    """
    f = np.atleast_1d(np.asarray(frequency, float))
    like = _nominal_shape(site, geometry)
    f_c = float(f[len(f) // 2]) if centre_hz is None else float(centre_hz)
    b = earth_bounds(site, np.append(f, f_c), screen=method != "full-wave") if bounds is None else bounds
    lo_ohm, hi_ohm = b["high_ohm"][:-1], b["low_ohm"][:-1]
    if method == "full-wave" and full_wave_ranges:
        from aerial.estimate.earth import soil_bound

        run = dict(method="full-wave", ground=ground, progress=progress)
        # over real soil the soil under the aerial moves with the electrodes' soil: the worse end with the lowered wires
        site_lo, site_hi = site, site
        if ground != "perfect":
            site_lo, site_hi = site._replace(soil=soil_bound(site.soil, "low")), site._replace(soil=soil_bound(site.soil, "high"))
        lo = _headline(site_lo, _perturbed_wires(site, -1.0), f, lo_ohm, lumped_ohm=b["high_ohm"][-1], **run)
        hi = _headline(site_hi, _perturbed_wires(site, +1.0), f, hi_ohm, lumped_ohm=b["low_ohm"][-1], **run)
        label = "full wave" if ground == "perfect" else "full wave, the soil under the aerial at its bounds too"
    else:
        lo = _headline(site, _perturbed_wires(site, -1.0), f, lo_ohm, like=like, shielding_case=2)
        hi = _headline(site, _perturbed_wires(site, +1.0), f, hi_ohm, like=like, shielding_case=0)
        label = "closed form"
        if method == "full-wave":
            base = _headline(site, site.wires, f, earth_at_frequency(site, f, screen=False)["impedance_ohm"].real,
                             like=like)
            for key in lo:
                scale = np.asarray(nominal[key], float) / np.where(base[key] != 0, base[key], 1.0)
                lo[key], hi[key] = lo[key] * scale, hi[key] * scale
            label = "closed form, relative spread around the full-wave value (two more full-wave runs would pass " \
                    "the time budget)"
    out = {}
    for key in lo:
        a, b = np.asarray(lo[key], float), np.asarray(hi[key], float)
        low, high = np.minimum(a, b), np.maximum(a, b)
        if nominal is not None and key in nominal:
            v = np.asarray(nominal[key], float)
            low, high = np.minimum(low, v), np.maximum(high, v)
        out[key] = np.stack([low, high], axis=1)
    out["method"] = label
    return out


def what_if(site, frequency: float, earth: dict, units: str = "si", *, nominal: dict | None = None,
            geometry=None, notes: list | None = None) -> list[dict]:
    """What raising the wire, lengthening it, or improving the earth buys, at one frequency.

    ``units``: "si" or "us"; the steps are round figures of that system
    (:data:`WHAT_IF_STEPS_M`: 3 m or 10 ft raised, ...), each computed at
    that value and labelled in metres (the report converts the words).
    ``nominal``: the closed forms' response of the site's own wires at
    ``frequency`` with the earth in series (arrays of one value:
    ``radiation_resistance_ohm``, ``conductor_loss_ohm``,
    ``effective_height_m``, ``capacitance_f``, ``ground_loss_ohm``), when
    the caller has it (the report's closed-form sweep): the first row and
    the earth's resistance are then taken from it instead of computed again.
    ``geometry``: the site's own wires already resolved, when the caller has them.
    ``notes``: where to say why a move is left out (the raised or lengthened wire would run into the
    building, which the models refuse); without it such a move raises as the model does.

    A wire on the balcony of a flat whose earth is the building's (a water
    pipe, the protective earth: nothing in the soil the user can reach) gets
    the moves that can be made from a balcony instead: the wire held out from
    the facade, the wire on the rail's far, outer edge only, and a
    counterpoise along the rail instead of the long riser earth.
    """
    pieces, join = what_if_pieces(site, frequency, units, nominal=nominal, geometry=geometry,
                                  refusals_as_notes=notes is not None)
    return join([piece() for piece in pieces], notes)


def what_if_pieces(site, frequency: float, units: str = "si", *, nominal: dict | None = None, geometry=None,
                   refusals_as_notes: bool = False) -> tuple[list, object]:
    """:func:`what_if` as independent pieces of work and the step that joins them: ``(pieces, join)``.

    Each piece is a function of no arguments that works out some of the table's rows (the wire raised, the
    wire lengthened, the better earth, the balcony's moves) the same in any process, and returns them with
    the notes it has (a move the models refuse, with ``refusals_as_notes``; without it, the refusal is
    raised). ``join(results, notes)`` gives :func:`what_if`'s table from the pieces' results in order, and
    adds their notes to the list ``notes`` (when not None). The report shares the pieces out between two
    processes (:func:`aerial.core.beside.shared`). Arguments as :func:`what_if`'s.
    """
    if units not in WHAT_IF_STEPS_M:
        raise ModelInputError(f"'{units}' is not a valid unit system, must be one of 'si', 'us'")
    step = WHAT_IF_STEPS_M[units]
    first: list = []

    def base():
        """The first row's figures (the site as described, with its response) and the earth's resistance [ohm]."""
        if not first:
            if nominal is None:
                r_earth = float(earth_at_frequency(site, [frequency])["impedance_ohm"][0].real)
                first.append((_headline(site, site.wires, frequency, r_earth, raw=True), r_earth))
            else:
                r_earth = float(nominal["ground_loss_ohm"][0])
                first.append((_headline(site, site.wires, frequency, r_earth, raw=True, response=nominal), r_earth))
        return first[0]

    def moved(label, move):
        def piece():
            _, r_earth = base()
            try:
                return [(label, _row_figures(_headline(site, _perturbed_wires(site, **move), frequency, r_earth)),
                         {})], []
            except ModelInputError as err:
                if not refusals_as_notes:
                    raise
                return [], [words("What would help: \"{what}\" is left out: with it, {why}", what=label,
                                  why=str(err))]
        return piece

    def better_earth():
        from aerial.estimate import earth as earth_mod

        h0, _ = base()
        better = earth_mod.improved_earth(site.electrodes, site.soil, frequency, radial_length_m=step["radial"],
                                          aerial=earth_mod.screen_aerial((resolve(site) if geometry is None
                                                                          else geometry).segments))
        h = _headline(site, site.wires, frequency, better["resistance_ohm"], response=h0["response"])
        extra = {"note": better["note"], "effective_length_m": better["effective_length_m"]} if better.get("note") \
            else {}
        return [(better["description"], _row_figures(h), extra)], []

    def balcony():
        _, r_earth = base()
        return [(label, _row_figures(h), {}) for label, h in _building_moves(site, frequency, r_earth,
                                                                              step["stand_off"])], []

    pieces = []
    if not balcony_without_ground_access(site):
        pieces += [moved("raise the wire " + metres(step["raise"]), {"raise_m": step["raise"]}),
                   moved("add " + metres(step["extend"]) + " to the far end", {"extend_m": step["extend"]}),
                   better_earth]
    pieces.append(balcony)

    def join(results, notes=None) -> list[dict]:
        rows = [("as described", _row_figures(base()[0]), {})]
        for more, said in results:
            rows += more
            if notes is not None:
                notes += said
        p0 = rows[0][1]["available_power_w"]
        out = []
        for label, h, extra in rows:
            p = h["available_power_w"]
            out.append({
                "change": label,
                "frequency_hz": float(frequency),
                **h,
                "power_change_db": 10.0 * math.log10(p / p0) if p > 0 and p0 > 0 else 0.0,
                "model": "closed form",
                **extra,
            })
        return out

    return pieces, join


def _row_figures(h) -> dict:
    """A what-if row's figures (at its one frequency) from :func:`_headline`'s arrays: floats, in the row's order."""
    return {key: float(h[key][0]) for key in ("effective_height_m", "capacitance_f", "loss_resistance_ohm",
                                               "open_circuit_voltage_v", "available_power_w")}


def band_point_indices(freqs, pts) -> np.ndarray:
    """Index of the sweep frequency nearest each band point."""
    return np.array([int(np.argmin(np.abs(freqs - f))) for _, f in pts])


def ranges_at_band_points(site, freqs, resp, earth, pts, *, method, ground, allow_large, progress,
                          bounds: dict | None = None, geometry=None) -> dict:
    """Ranges of the headline figures at the band points, on the sweep's own frequencies (beside their values).

    ``bounds``: :func:`earth_bounds` at the band points' sweep frequencies and then the centre frequency, when
    the caller has it already (:func:`uncertainty`); ``geometry``: the site's own wires already resolved.
    """
    pick = band_point_indices(freqs, pts)
    pf = freqs[pick]
    loss = np.asarray(resp["conductor_loss_ohm"], float) + np.asarray(resp["ground_loss_ohm"], float)
    nominal = {"capacitance_f": resp["capacitance_f"], "effective_height_m": resp["effective_height_m"],
               "loss_resistance_ohm": loss, "series_resistance_ohm": resp["series_resistance_ohm"],
               "open_circuit_voltage_v": resp["open_circuit_voltage_v"], "available_power_w": resp["available_power_w"],
               "ground_loss_ohm": resp["ground_loss_ohm"]}
    nominal = {k: np.asarray(v, float)[pick] for k, v in nominal.items()}
    fits = method != "full-wave" or _full_wave_ranges_fit(site, pf, freqs, allow_large)
    unc = uncertainty(site, pf, earth, method=method, nominal=nominal, ground=ground, full_wave_ranges=fits,
                      progress=progress, bounds=bounds, geometry=geometry,
                      centre_hz=float(freqs[np.argmin(np.abs(freqs - what_if_frequency(site, pts)))]))
    range_method = unc.pop("method")
    return {
        "frequencies_hz": pf,
        "labels": [label for label, _ in pts],
        "method": range_method,
        **unc,
        "notes": _range_notes(site, range_method),
    }


#: Earth electrodes in the soil: a site with one has ground it can reach (a garden, a yard).
GROUND_ELECTRODES = ("rods", "buried_wires")


def on_a_balcony(site) -> bool:
    """Whether the site's wire hangs on a balcony of the building the site describes (or infers)."""
    from aerial.geometry.resolve import building_of

    body, described = building_of(site)
    return body is not None and (site.apartment or described.balcony_floor_m is not None)


def balcony_without_ground_access(site) -> bool:
    """A balcony wire whose earth is the building's (no rod or buried wire in the soil): the user has no ground."""
    return on_a_balcony(site) and not any(e.kind in GROUND_ELECTRODES for e in site.electrodes)


def _building_moves(site, frequency, earth_ohm: float, stand_off_m: float = WHAT_IF_STAND_OFF_M) -> list:
    """What-if rows for a wire on a balcony: held out from the facade, on the rail's far edge, a counterpoise."""
    from aerial.geometry.resolve import building_of
    from aerial.models.building import nearest_facade, plan_distance

    if not on_a_balcony(site):
        return []  # the balcony moves are for a wire on a balcony
    body, _ = building_of(site)
    aerial = [w for w in site.wires if w.role == "aerial"]
    pts = np.vstack([w.points_m for w in aerial])
    outside = pts[plan_distance(pts[:, :2], body.footprint) > 0]
    if len(outside) == 0:
        return []
    _, normal = nearest_facade(body.footprint, outside[:, :2])
    rows = []
    moved = []
    for w in site.wires:
        if w.role == "aerial":
            p = np.array(w.points_m, float)
            p[:, :2] += stand_off_m * normal[:2]
            w = w._replace(points_m=p)
        elif w.role == "lead-in":
            p = np.array(w.points_m, float)
            p[0, :2] += stand_off_m * normal[:2]  # its top follows the aerial
            w = w._replace(points_m=p)
        moved.append(w)
    try:
        rows.append(("hold the wire " + metres(stand_off_m) + " further out (poles on the rail)",
                     _headline(site, moved, frequency, earth_ohm)))
    except ModelInputError:
        pass
    far = _far_edge_wires(site, body)
    if far is not None:
        try:
            rows.append(("the far end of the rail only (not back to the wall)",
                         _headline(site, far, frequency, earth_ohm)))
        except ModelInputError:
            pass
    counterpoise = _rail_counterpoise(site)
    if counterpoise is not None:
        from aerial.estimate import earth as earth_mod

        wires = [w for w in site.wires if w.role not in EARTH_ROLES] + [counterpoise]
        cp_ohm = earth_mod.earth_system([], site.soil, [counterpoise], path=site.path)["resistance_ohm"]
        try:
            rows.append(("a counterpoise along the balcony, not the riser",
                         _headline(site, wires, frequency, cp_ohm)))
        except ModelInputError:
            pass
    return rows


def _far_edge_wires(site, body):
    """The aerial moved onto the outer edge of the rail (its points farthest from the facade), or None.

    Every aerial point nearer the facade than the farthest one is moved out
    to that distance along the facade's normal; pieces that fold to nothing
    (a run along a side rail back to the wall) are dropped, and the lead-in's
    top follows the point it meets. None when the wire is already all on the
    outer edge, or when nothing of it would be left.
    """
    from aerial.models.building import nearest_facade, plan_distance

    aerial = [w for w in site.wires if w.role == "aerial"]
    pts = np.vstack([w.points_m for w in aerial])
    outside = pts[plan_distance(pts[:, :2], body.footprint) > 0]
    if len(outside) == 0:
        return None
    p0, normal = nearest_facade(body.footprint, outside[:, :2])
    dist = (pts - p0) @ normal
    reach = float(dist.max())
    if reach - float(dist.min()) < WHAT_IF_FAR_EDGE_MIN_GAIN_M:
        return None
    moved_points = {}
    out = []
    for w in site.wires:
        if w.role != "aerial":
            out.append(w)
            continue
        p = np.array(w.points_m, float)
        d = (p - p0) @ normal
        q = p + np.maximum(reach - d, 0.0)[:, None] * normal
        for a, b in zip(p, q):
            moved_points[tuple(np.round(a, 6))] = b
        keep = np.r_[True, np.linalg.norm(np.diff(q, axis=0), axis=1) > JOIN_TOLERANCE_M]
        q = q[keep]
        if len(q) < 2:
            continue
        out.append(w._replace(points_m=q))
    if not any(w.role == "aerial" for w in out):
        return None
    final = []
    for w in out:
        if w.role == "lead-in":
            p = np.array(w.points_m, float)
            for i in (0, -1):
                key = tuple(np.round(p[i], 6))
                if key in moved_points:
                    p[i] = moved_points[key]
            w = w._replace(points_m=p)
        final.append(w)
    return final


def _rail_counterpoise(site):
    """A counterpoise from the receiver along the aerial's course, 1 m lower (the balcony floor), or None."""
    if not any(w.role == "earth lead" for w in site.wires):
        return None
    lead = [w for w in site.wires if w.role == "lead-in"]
    aerial = [w for w in site.wires if w.role == "aerial"]
    if not aerial:
        return None
    path = [site.feed_m]
    if lead:
        lp = np.array(lead[0].points_m, float)
        path += list(lp[::-1] if np.linalg.norm(lp[0] - site.feed_m) < np.linalg.norm(lp[-1] - site.feed_m) else lp)[1:]
    ap = np.array(aerial[0].points_m, float)
    ap = ap if np.linalg.norm(ap[0] - path[-1]) <= np.linalg.norm(ap[-1] - path[-1]) else ap[::-1]
    path += list(ap[1:] if np.linalg.norm(ap[0] - path[-1]) < JOIN_TOLERANCE_M else ap)
    p = np.array(path, float)
    p[1:, 2] = np.maximum(p[1:, 2] - WHAT_IF_COUNTERPOISE_DROP_M, 0.3)
    keep = np.r_[True, np.linalg.norm(np.diff(p, axis=0), axis=1) > 0.05]
    p = p[keep]
    if len(p) < 2:
        return None
    return aerial[0]._replace(name="counterpoise along the rail", role="counterpoise", points_m=p, key="what-if",
                   support_at_point=())


# --------------------------------------------------------------------------- main entry


def analyse(site, *, method: str = "closed-form", step_hz: float | None = None, progress=None, what_ifs: bool = True,
            ground: str = "perfect", allow_large: bool = False, units: str = "si", beside: bool = False) -> dict:
    """Run the whole chain for a site.

    Parameters
    ----------
    site : Site
        From :func:`aerial.load_site`.
    method : {"closed-form", "full-wave"}
        Which aerial model produces the per-frequency figures.
    step_hz : float, optional
        Sweep step [Hz]; default depends on the band.
    progress : callable, optional
        ``progress(done, total)`` during long sweeps.
    ground : {"perfect", "lossy", "reflection-coefficient"}
        Full wave only: perfect ground by images, the site's soil as an exact
        half-space (Sommerfeld integrals), or the fast reflection-coefficient
        approximation.
    allow_large : bool
        Full wave only: run even when the estimated memory or time passes the
        budget (:func:`aerial.estimate.fullwave_sweep.check_full_wave_budget`).
    units : {"si", "us"}
        The unit system the what-if steps are round figures of (3 m or
        10 ft raised, ...); every figure stays SI.
    beside : bool
        Work out the ranges and the what-if table in a forked copy of this
        process on the second core while this one works out the tuning and
        the stations (:class:`aerial.core.beside.Beside`; Linux, two cores,
        closed forms only, else in line). The result is the same either way.

    Returns
    -------
    dict
        JSON-ready: SI units, the unit in every key name (docs/json-output.md).
    """
    if method not in METHODS:
        raise ModelInputError(f"'{method}' is not a valid method, must be one of " + ", ".join(f"'{m}'" for m in METHODS))
    if ground not in GROUNDS:
        raise ModelInputError(f"'{ground}' is not a valid ground, must be one of " + ", ".join(f"'{g}'" for g in GROUNDS))
    if units not in WHAT_IF_STEPS_M:
        raise ModelInputError(f"'{units}' is not a valid unit system, must be one of 'si', 'us'")
    with naming_the_file(site):  # a model's complaint about the site's wires names the file, as a site error does
        return _analyse_site(site, method, step_hz, progress, what_ifs, ground, allow_large, units, beside)


def _site_json(site) -> dict:
    """The report's ``site`` section: the site's name, file, region, noise, soil and field strength."""
    return {
        "name": site.name,
        "file": site.path,
        "region": site.region,
        "noise_category": site.noise,
        "soil": {
            "category": site.soil.name,
            "relative_permittivity": site.soil.relative_permittivity,
            "conductivity_s_m": site.soil.conductivity_s_m,
            "conductivity_range_s_m": [site.soil.conductivity_low_s_m, site.soil.conductivity_high_s_m],
            "relative_permittivity_range": list(site.soil.permittivity_bounds),
            "source": site.soil.source,
        },
        "field_strength_v_per_m": site.field_strength_v_per_m,
    }


def _analyse_site(site, method, step_hz, progress, what_ifs, ground, allow_large, units, beside=False) -> dict:
    """:func:`analyse` once its options are checked."""
    warnings: list[str] = list(site.notes)
    freqs = frequency_grid(site, step_hz)
    earth = earth_system(site)
    warnings += earth.get("warnings", [])
    earth_rf = earth_at_frequency(site, freqs, screen=method != "full-wave")
    earth_r = np.asarray(earth_rf["impedance_ohm"].real, float)
    centre_i = int(np.argmin(np.abs(freqs - report_centre_frequency(site, freqs))))
    geometry = resolve(site, electrode_ohm=float(earth_r[centre_i]))
    warnings += _open_ground_warnings(site, geometry)
    if ground != "perfect" and method != "full-wave":
        warnings.append("lossy ground applies to the full-wave solver only; the closed forms assume a perfect "
                        "ground plane with the earth system's resistance in series")
    stage(progress, f"{'full-wave' if method == 'full-wave' else 'closed-form'} sweep of {len(freqs)} frequencies")
    screen = earth_rf.get("screen")
    resp = aerial_response(site, geometry, freqs, earth_r, method=method, progress=progress, ground=ground,
                           allow_large=allow_large, screen_method=screen["method"] if screen else None)
    if screen:
        warnings += screen["warnings"]
    warnings += resp.get("warnings", [])

    result: dict = {
        "aerial_version": __version__,
        "site": _site_json(site),
        "geometry": {
            "wires": wires_json(geometry),
            "feed_m": [float(v) for v in geometry.feed_m],
            "base_fed": geometry.base_fed,
            "total_length_m": geometry.total_length_m,
            "earth_lead_length_m": geometry.earth_lead_length_m,
            "max_height_m": geometry.max_height_m,
            "mean_height_m": geometry.mean_height_m,
            "plan_extent_m": geometry.plan_extent_m(),
            "shape": resp.get("shape"),
        },
        "bands": [{"name": n, "from_hz": lo, "to_hz": hi} for n, lo, hi in site.bands],
        "frequencies_hz": freqs,
        "aerial": {
            "model": resp["model"],
            "capacitance_f": resp["capacitance_f"],
            "static_capacitance_f": resp.get("static_capacitance_f"),
            "effective_height_m": resp["effective_height_m"],
            "radiation_resistance_ohm": resp["radiation_resistance_ohm"],
            "reactance_ohm": resp["reactance_ohm"],
            "impedance_ohm": resp["impedance_ohm"],
            "conductor_loss_ohm": resp["conductor_loss_ohm"],
            "ground_loss_ohm": resp["ground_loss_ohm"],
            "series_resistance_ohm": resp["series_resistance_ohm"],
            "efficiency": resp["efficiency"],
            "open_circuit_voltage_v": resp["open_circuit_voltage_v"],
            "available_power_w": resp["available_power_w"],
        },
    }
    pts = band_points(site)
    result["earth"] = None  # in its place among the keys; worked out with the ranges, which share its soil bounds
    for key in ("convergence", "ground_treatment", "segments", "loss_budget", "building_full_wave"):
        if key in resp:
            result["aerial"][key] = resp[key]
    if geometry.building is not None:
        result["building"] = building_section(geometry, resp)
        warnings[:0] = [result["building"]["assumption"]] + _building_warnings(geometry.building_site)

    stage(progress, "ranges from the tolerances")

    def earth_and_ranges():
        """The earth table and the ranges: they do not need the tuning."""
        # one run of the soil's bounds serves the ranges (at the band points) and the earth table (at the centre)
        bounds = earth_bounds(site, np.append(freqs[band_point_indices(freqs, pts)], freqs[centre_i]),
                              screen=method != "full-wave")
        earth_table = _earth_json(earth, _with_screen_length(site, earth_rf, centre_i), centre_i,
                                  {k: [v[-1:] for v in b] if k.startswith("parts") else b[-1:] for k, b in bounds.items()})
        return earth_table, ranges_at_band_points(site, freqs, resp, earth, pts, method=method, ground=ground,
                                                  allow_large=allow_large, progress=progress, bounds=bounds,
                                                  geometry=geometry)

    moves, join_moves = [], None
    if what_ifs:
        # at the frequency of the earth table and the ranges; the closed-form sweep has the first row already
        here = None if method == "full-wave" else {
            k: np.asarray(resp[k], float)[centre_i:centre_i + 1] for k in
            ("radiation_resistance_ohm", "conductor_loss_ohm", "effective_height_m", "capacitance_f", "ground_loss_ohm")}
        moves, join_moves = what_if_pieces(site, float(freqs[centre_i]), units, nominal=here, geometry=geometry,
                                           refusals_as_notes=True)
    receiver: list = []

    def rx():
        """The tuning and the stations' work (:class:`aerial.estimate.receiver.ReceiverWork`), made on first use."""
        if not receiver:
            from aerial.estimate.receiver import ReceiverWork

            stage(progress, "tuning and stations")
            receiver.append(ReceiverWork(site, freqs, resp, lambda: station_points(
                site, geometry, freqs, method=method, ground=ground, allow_large=allow_large)))
        return receiver[0]

    # in line in this order; with a second core, shared with a forked copy (the full wave's ranges report
    # progress and may use every core: they stay in line)
    done = shared([earth_and_ranges, *moves, lambda: rx().tuning(), lambda: rx().stations(),
                   lambda: rx().station_design()], fork=beside and method != "full-wave")
    result["earth"], result["ranges"] = done[0]
    if join_moves is not None:
        notes: list[str] = []
        result["what_if"] = join_moves(done[1:1 + len(moves)], notes)
        warnings += notes
    tuning, stations, rx_warnings = rx().join(*done[-3:])
    result["tuning"] = tuning
    result["stations"] = stations
    warnings += rx_warnings

    result["cautions"] = cautions_for(site, tuning.get("arrangement"))
    result["warnings"] = _unique(warnings)
    return finalise(result)


def station_points(site, geometry, freqs, *, method="closed-form", ground="perfect", allow_large=False):
    """The aerial with its earth at each station frequency off the swept grid, by the sweep's own model.

    A station below or above every swept band (a long-wave station on a site swept over MF, say), or in
    the gap between two swept bands (a 400 kHz station on a site swept over LF and MF), is heard with the
    aerial's figures at its own frequency, not the band edge's nor a line drawn across the gap: the earth
    system's impedance and the aerial's response are worked out there as for the sweep
    (:func:`earth_at_frequency`, :func:`aerial_response`). Returns ``(frequencies [Hz], response)``, or
    None when every station lies within a swept band (its figures are interpolated on the sweep).
    """
    f = np.asarray(freqs, float)

    def off_grid(fs_hz: float) -> bool:
        if fs_hz < f[0] * (1 - 1e-9) or fs_hz > f[-1] * (1 + 1e-9):
            return True
        return not any(lo * (1 - 1e-9) <= fs_hz <= hi * (1 + 1e-9) for _, lo, hi in site.bands)

    fs = sorted_unique([float(s.frequency_hz) for s in site.stations if off_grid(float(s.frequency_hz))])
    if len(fs) == 0:
        return None
    fs = np.asarray(fs, float)
    earth_rf = earth_at_frequency(site, fs, screen=method != "full-wave")
    screen = earth_rf.get("screen")
    resp = aerial_response(site, geometry, fs, np.asarray(earth_rf["impedance_ohm"].real, float), method=method,
                           ground=ground, allow_large=allow_large, screen_method=screen["method"] if screen else None)
    return fs, resp


def stage(progress, text: str) -> None:
    """Tell a ``progress`` callback that has a ``stage`` method what the run is doing now (not from a forked
    copy working beside this process: the terminal is the caller's)."""
    say = getattr(progress, "stage", None)
    if callable(say) and not in_copy():
        say(text)


def _open_ground_warnings(site, geometry) -> list:
    """Said when a wire on a building is modelled with no building: it is in open ground."""
    if geometry.building is not None:
        return []
    if site.apartment:
        return [APARTMENT_NOTE]
    from aerial.site.building import open_ground_notes

    return open_ground_notes(site)


def _range_notes(site, range_method) -> list:
    from aerial.estimate.earth import radial_system
    from aerial.geometry.resolve import building_of

    earth_model = "earth electrodes as lossy lines"
    if range_method == "closed form" and radial_system(site.electrodes) is not None:
        earth_model = "buried radials as Wait's radial screen"
    notes = [
        "Ranges move every support by its height tolerance and the soil between its category's bounds, by the "
        f"same model as the value ({range_method}, {earth_model}); each range holds the value "
        "and both tolerance runs.",
        "Nearby buildings, trees and wiring are not modelled; measured aerial capacitance can differ from any "
        "formula by a large factor. A bench measurement ([receiver.measured]) replaces the estimate.",
    ]
    if building_of(site)[0] is not None:
        notes[1] = notes[1].replace("Nearby buildings", "Other buildings")
        notes.insert(1, "The building's screening moves between its construction's bounds as well.")
    return notes


#: What each construction does, in words a flat-dweller understands.
CONSTRUCTION_IN_WORDS = {
    "reinforced concrete": "the steel bars in its concrete, joined to the earth through the foundations, screen the "
                           "wire on the side facing it",
    "steel frame": "its steel frame screens the wire on the side facing it almost completely",
    "masonry": "its walls, with the wiring, pipes and steel lintels in them, screen the wire partly",
    "timber frame": "a timber building hardly screens the wire",
    "unknown": "its construction is not known, so anything from no screening to a metal screen is allowed for",
}


def _building_currents_words(resp, fig) -> str:
    """A sentence on how much the building's own induced currents raise the pick-up at the top frequency, or ''."""
    ratio = np.asarray(fig.get("current_ratio", []), float)
    f = np.asarray(resp.get("frequency_hz", []), float)
    if ratio.size == 0 or ratio.size != f.size or float(np.max(ratio)) < 10 ** (0.5 / 20):
        return ""
    i = int(np.argmax(f))
    return (f" The building's own induced currents raise that with frequency: by {20 * np.log10(ratio[i]):.1f} dB "
            f"at {si_text(f[i], 'Hz')}.")


def building_section(geometry, resp) -> dict:
    """The building as the report states it: what was taken, the figures with and without it, the assumption."""
    body, described = geometry.building, geometry.building_site
    fig = dict(resp.get("building") or {})
    text = f"The building is taken as a grounded conductor: {CONSTRUCTION_IN_WORDS[body.construction]}."
    if fig:
        most, nominal, least = fig["static_effective_height_range_m"]
        text += words(" Beside it the wire's effective height is about {nominal} ({spread} as the structure conducts "
                      "better or worse; {open} in open ground).", nominal=metres(nominal),
                      spread=metres_range(least, most, "m", "–"),
                      open=metres(fig["open_ground_static_effective_height_m"]))
        text += _building_currents_words(resp, fig)
        if fig.get("screened_wire_m", 0.0) > 0.05 and body.shielding[1] >= 0.5:
            text += " The lead-in and riser inside it are screened and bonded to it: earth, not aerial."
    else:
        text += " The full-wave solver includes it as a grounded wire grid."
    out = {
        "construction": body.construction,
        "height_m": float(body.height_m),
        "footprint_m": [[float(v) for v in p] for p in body.footprint],
        "source": described.source if described else "building",
        "assumed": list(described.assumed) if described else [],
        "balcony_floor_m": described.balcony_floor_m if described else None,
        "rail_bonded": described.rail_bonded if described else None,
        "assumption": text,
    }
    out.update(fig)
    return {k: v for k, v in out.items() if v is not None}


def _building_warnings(described) -> list:
    out = list(described.assumed) if described else []
    if described is not None and described.rail_bonded:
        out.append("The balcony rail is bonded to the structure: fix the wire on insulators standing clear of the "
                   "rail; a wire touching the rail is shorted to the building.")
    return out


def _unique(items):
    seen = set()
    out = []
    for item in items:
        if item not in seen:
            seen.add(item)
            out.append(item)
    return out
