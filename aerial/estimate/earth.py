"""The site's whole earth system: its electrodes combined, with a range from the soil's bounds.

Pure functions over the site's electrode descriptions; the physics is in
:mod:`aerial.models.electrodes`.
"""

from __future__ import annotations

import functools

import numpy as np

from aerial.core.lengthtext import join_text, metres, words
from aerial.core.units import si_text
from aerial.models import electrode_lines as lines
from aerial.models import electrodes as el
from aerial.models import radial_screen as rs

#: Stated typical range for a building's protective earth whose resistance the user does not know [ohm].
#: An assumption: a TN-C-S (PME) supply earth is often under 1 ohm, a TT installation's rod up to ~200 ohm.
BUILDING_EARTH_TYPICAL_OHM = (1.0, 10.0, 100.0)  # low, nominal, high

#: Conductivities tried between the soil's bounds (besides the bounds) for the RF resistance range.
INTERIOR_SOIL_POINTS = 3

#: The "better earth" of the what-if table: eight buried radials of this length at this depth.
WHAT_IF_RADIALS = (8, 10.0, 0.15)

#: Points per e-fold of distance of the ground-field profile under the aerial. [1]
SCREEN_POINTS_PER_E_FOLD = 40

#: How far the ground-field profile reaches, in units of the aerial's largest distance from the hub. [1]
SCREEN_REACH = 100.0

#: Ground fields kept for reuse: a report asks for the same wires' field for the sweep, the earth table, the
#: soil's bounds and the what-if radials. Each entry holds some kB.
_SCREEN_CACHE_SIZE = 16
_screen_cache: dict = {}


def screen_aerial(segments, frequency=None):
    """The ground field the radial-screen model needs: the aerial's return current round the hub.

    The hub is where the earth lead meets the ground (the lowest earth-lead
    point), else the foot of the aerial's lowest point. The aerial's charges
    come from the electrostatic solution (aerial at 1 V, earth lead at 0 V;
    :func:`aerial.models.capacitance.electrostatic_solution`), and the field
    is :func:`aerial.models.radial_screen.static_ground_field` on a log grid
    from 1 mm to ``SCREEN_REACH`` times the aerial's reach. ``frequency`` is
    not used (the quasi-static field serves every frequency where the closed
    forms hold) and kept for the callers' symmetry.

    The same wires asked for again (the same numbers bit for bit) come from a small cache.

    Returns
    -------
    dict
        ``distance_m`` (R,), ``field_per_m`` (R,) [1/m]: H_phi per ampere at the feed.
    """
    key = tuple(np.ascontiguousarray(v).tobytes() + str(np.shape(v)).encode()
                for v in (segments.start, segments.end, segments.radius, segments.grounded))
    hit = _screen_cache.pop(key, None)
    if hit is None:
        hit = _screen_field(segments)
        if len(_screen_cache) >= _SCREEN_CACHE_SIZE:
            _screen_cache.pop(next(iter(_screen_cache)))  # the least recently used
    _screen_cache[key] = hit
    return {k: v.copy() for k, v in hit.items()}


def _screen_field(segments) -> dict:
    """:func:`screen_aerial`, computed."""
    from aerial.models.capacitance import electrostatic_solution

    sol = electrostatic_solution(segments)
    mid = 0.5 * (sol.start + sol.end)
    ends = np.concatenate([segments.start, segments.end])
    grounded = np.concatenate([segments.grounded, segments.grounded])
    pool = ends[grounded] if np.any(grounded) else ends
    hub = pool[int(np.argmin(pool[:, 2]))]
    aer = ~sol.grounded
    q = sol.charge_c[aer]
    s = np.hypot(mid[aer, 0] - hub[0], mid[aer, 1] - hub[1])
    z = mid[aer, 2]
    reach = max(float(np.max(np.hypot(s, z))), 1.0)
    r_far = SCREEN_REACH * reach
    r = np.geomspace(1e-3, r_far, 1 + int(SCREEN_POINTS_PER_E_FOLD * np.log(r_far / 1e-3)))
    return {"distance_m": r, "field_per_m": rs.static_ground_field(np.c_[s, z], q, r)}


def radial_sets(electrodes) -> list:
    """The site's sets of buried radials (arrangement "radials", two or more each), all taken from one hub."""
    return [e for e in electrodes if e.kind == "buried_wires" and e.arrangement == "radials" and e.count >= 2]


def radial_system(electrodes):
    """The set of buried radials with the most wire (the part that stands for the screen), or None."""
    found = radial_sets(electrodes)
    return max(found, key=lambda e: e.count * e.length_m) if found else None


def screen_loss(radials, soil, frequency, aerial) -> dict:
    """Wait's radial-screen ground loss of the aerial over ``radials`` in ``soil``, over ``frequency`` [Hz].

    Returns
    -------
    dict
        ``impedance_ohm`` (complex Delta Z, its real part clipped at zero),
        ``within_radials_ohm``, ``method``, ``warnings``.
    """
    from aerial.site.reader import Electrode

    f = np.atleast_1d(np.asarray(frequency, float))
    sets = [radials] if isinstance(radials, Electrode) else radials  # one set, or a list of them
    counts, lengths = [e.count for e in sets], [e.length_m for e in sets]
    radius = float(np.average([e.diameter_m / 2.0 for e in sets], weights=[n * x for n, x in zip(counts, lengths)]))
    dz, inner = rs.screen_loss_of_field(f, aerial["distance_m"], aerial["field_per_m"], counts, lengths, radius,
                                        soil.conductivity_s_m, soil.relative_permittivity)
    warnings = []
    skin = 1.0 / float(lines.soil_gamma(float(np.sqrt(f.min() * f.max())), 1.0 / soil.conductivity_s_m,
                                        soil.relative_permittivity)[0].real)
    if skin > max(lengths):
        warnings.append(words("Wait's radial screen treats the soil as a surface impedance: rough where the soil's skin "
                              "depth ({skin} here) is not short against the radials ({longest})",
                              skin=metres(skin), longest=metres(max(lengths))))
    what = join_text(" and ", [f"{n} radials of " + metres(x) for n, x in zip(counts, lengths)])
    method = "Wait's radial screen (" + what + ") and the soil beyond, compensation theorem"
    return {"impedance_ohm": np.maximum(dz.real, 0.0) + 1j * dz.imag, "within_radials_ohm": np.maximum(inner, 0.0),
            "method": method, "warnings": warnings}


def _one(e, resistivity: float, radius_default: float) -> tuple[float, str, list]:
    """Resistance [ohm], method and warnings for one electrode description."""
    if e.kind == "rods":
        a = e.diameter_m / 2.0
        if e.count == 1:
            est = el.dwight_rod(e.length_m, a, resistivity)
        elif e.count == 2 and e.spacing_m > e.length_m:
            est = el.dwight_two_rods(e.length_m, a, e.spacing_m, resistivity)
        else:
            est = el.multiple_rods(e.count, e.length_m, a, e.spacing_m, resistivity)
    elif e.kind == "buried_wires":
        a = e.diameter_m / 2.0
        if e.arrangement == "radials" and e.count >= 2:
            est = el.dwight_star(e.count, e.length_m, a, e.depth_m, resistivity)
        else:
            one = el.sunde_buried_wire(e.length_m, a, e.depth_m, resistivity)
            if e.count > 1:
                par = el.parallel_combination([one.resistance_ohm] * e.count)
                est = el.ElectrodeEstimate(par.resistance_ohm, one.warnings + par.warnings, one.method + ", in parallel")
            else:
                est = one
    elif e.kind == "water_pipe":
        est = el.water_pipe(e.length_m, e.diameter_m / 2.0, e.depth_m, resistivity)
        # Continuity is the site's business: unknown is warned by the site reader, checked (true) needs no
        # warning, and the safety cautions always carry the reminder; the model's own line would repeat them.
        if e.continuous_metal is not False:
            est = el.ElectrodeEstimate(est.resistance_ohm, tuple(w for w in est.warnings if w != el.WATER_PIPE_CONTINUITY),
                                       est.method)
    elif e.kind == "counterpoise":
        est = el.dwight_star(max(e.count, 2), e.length_m, radius_default, max(e.depth_m, 0.05), resistivity)
        est = el.ElectrodeEstimate(est.resistance_ohm, est.warnings + (
            "counterpoise loss estimated as if its wires were buried radials at their height: a rough guide only",),
            "counterpoise as radials (rough)")
    else:
        raise ValueError(e.kind)
    return float(np.asarray(est.resistance_ohm)), est.method, list(est.warnings), _description(e)


@functools.lru_cache(maxsize=64)  # the soil's bounds run the same electrodes again and again
def _description(e) -> str:
    """What one electrode is, in words (the same whatever the soil)."""
    if e.kind == "rods":
        # enough digits that a rod given in feet and inches reads back exactly under --units us (8 ft, 5/8 in)
        return words("{count} rod{s} {length} × {diameter}", count=e.count, s="s" if e.count > 1 else "",
                     length=metres(e.length_m), diameter=metres(e.diameter_m))
    if e.kind == "buried_wires":
        if e.arrangement == "radials" and e.count >= 2:
            return words("{count} buried radials {length} at {depth}", count=e.count,
                         length=metres(e.length_m), depth=metres(e.depth_m))
        return words("{count} buried wire{s} {length} at {depth}", count=e.count, s="s" if e.count > 1 else "",
                     length=metres(e.length_m), depth=metres(e.depth_m))
    if e.kind == "water_pipe":
        return "metal water pipe, " + metres(e.length_m) + " buried"
    return f"counterpoise, {e.count} wire(s) " + metres(e.length_m)


def earth_system(electrodes, soil, counterpoise_wires=(), path: str = "<site>", bounds: bool = True) -> dict:
    """Combined earth resistance with a low/high range from the soil's conductivity bounds.

    Parameters
    ----------
    electrodes : list of aerial.site.reader.Electrode
    soil : aerial.site.reader.SoilSpec
    counterpoise_wires : list of WireRun
        Counterpoise wires (used only when there is no electrode).
    bounds : bool
        False for a caller that reads the value alone (the soil's bounds in
        :func:`resistance_bounds` come from its own runs): the electrode
        formulas then run once, at the soil's conductivity, and the range is
        that value.

    Returns
    -------
    dict
        ``resistance_ohm``, ``resistance_low_ohm``, ``resistance_high_ohm`` [ohm], ``parts``, ``warnings``.
    """
    from aerial.site.reader import Electrode

    items = list(electrodes)
    warnings: list[str] = []
    if not items and counterpoise_wires:
        lengths = [w.length_m for w in counterpoise_wires]
        h = float(np.mean([w.points_m[:, 2].mean() for w in counterpoise_wires]))
        items = [Electrode("counterpoise", "earth.counterpoise", len(lengths), float(np.mean(lengths)), 0.0, 0.0, h)]
        radius = counterpoise_wires[0].size.radius_m
    else:
        radius = 1e-3
    parts = []
    nominal, low, high = [], [], []
    for e in items:
        if e.kind == "building_earth":
            if e.resistance_ohm is not None:
                r = (e.resistance_ohm,) * 3
                method = "measured (user-given)"
            else:
                r = (BUILDING_EARTH_TYPICAL_OHM[1], BUILDING_EARTH_TYPICAL_OHM[0], BUILDING_EARTH_TYPICAL_OHM[2])
                method = "typical range (assumption: 1-100 ohm; the building's supply earthing decides)"
                warnings.append("The building's protective earth resistance is not known: a typical 1-100 ohm "
                                "range is assumed. Its long conductor to the main earthing terminal also acts as "
                                "an inductive lead at radio frequencies.")
            parts.append({"kind": e.kind, "description": "building protective earth", "resistance_ohm": r[0],
                          "resistance_low_ohm": r[1], "resistance_high_ohm": r[2], "method": method})
            nominal.append(r[0]); low.append(r[1]); high.append(r[2])
            continue
        rn, method, w, what = _one(e, 1.0 / soil.conductivity_s_m, radius)
        rl = _one(e, 1.0 / soil.conductivity_high_s_m, radius)[0] if bounds else rn
        rh = _one(e, 1.0 / soil.conductivity_low_s_m, radius)[0] if bounds else rn
        if not all(np.isfinite(v) and v > 0 for v in (rn, rl, rh)):
            from aerial.core.errors import SiteError

            raise SiteError(path, e.key, what, "outside the range of the electrode formula (its resistance "
                            "comes out non-positive): check the length, diameter and depth")
        warnings += w
        parts.append({"kind": e.kind, "description": what, "length_m": float(e.length_m), "resistance_ohm": rn,
                      "resistance_low_ohm": rl, "resistance_high_ohm": rh, "method": method})
        nominal.append(rn); low.append(rl); high.append(rh)
    if not parts:
        return {"resistance_ohm": 0.0, "resistance_low_ohm": 0.0, "resistance_high_ohm": 0.0, "parts": [],
                "warnings": ["No earth system described: ground loss taken as zero (optimistic)."]}
    if len(parts) > 1:
        comb = el.parallel_combination(nominal)
        warnings += list(comb.warnings)
        r = float(np.asarray(comb.resistance_ohm))
        rl = float(np.asarray(el.parallel_combination(low).resistance_ohm))
        rh = float(np.asarray(el.parallel_combination(high).resistance_ohm))
    else:
        r, rl, rh = nominal[0], low[0], high[0]
    warnings.append("Earth resistance here is the low-frequency (DC) value in uniform soil; the loss budget uses "
                    "each electrode's impedance at the working frequency (a lossy line in the soil, Sunde).")
    return {"resistance_ohm": r, "resistance_low_ohm": min(rl, r), "resistance_high_ohm": max(rh, r),
            "parts": parts, "warnings": warnings}


def _line_of(e, soil, frequency, resistivity):
    """The electrode as a lossy line at ``frequency`` (None for a counterpoise, which is not in the soil)."""
    eps = soil.relative_permittivity
    if e.kind == "rods":
        return lines.rod_line(frequency, e.length_m, e.diameter_m / 2.0, resistivity, eps)
    if e.kind in ("buried_wires", "water_pipe"):
        depth = max(e.depth_m, 1e-3)
        return lines.buried_wire_line(frequency, e.length_m, e.diameter_m / 2.0, depth, resistivity, eps)
    return None


def electrode_impedance(electrodes, soil, frequency, counterpoise_wires=(), fixed: str = "nominal",
                        aerial=None, dc: dict | None = None) -> dict:
    """The earth system's impedance at radio frequency: each electrode a lossy line in the soil.

    Parameters
    ----------
    electrodes : list of aerial.site.reader.Electrode
    soil : aerial.site.reader.SoilSpec
    frequency : array_like
        [Hz]
    counterpoise_wires : list of WireRun
        Used only when there is no electrode.
    fixed : {"nominal", "low", "high"}
        Which figure of a part that does not depend on the soil (a building
        earth of unknown resistance) to use: its value or either end of its range.
    aerial : dict, optional
        :func:`screen_aerial` of the wires. With buried radials and an aerial
        with a vertical down-lead, the radials are Wait's radial screen under
        the aerial (:func:`screen_loss`): their part is the aerial's ground
        loss over the screen and the soil, and the system's impedance is that
        alone (other electrodes bonded at the hub carry none of the aerial's
        return current in this model, which leaves them out: pessimistic).
    dc : dict, optional
        :func:`earth_system` of the same electrodes and soil, when the caller
        has it already (it depends on the soil's conductivity alone).

    Returns
    -------
    dict
        ``impedance_ohm`` (complex array over ``frequency``, the parts in
        parallel), ``parts`` (one per electrode: ``description``,
        ``impedance_ohm`` complex array, ``effective_length_m`` array or None,
        ``method``) and ``notes``.

    Notes
    -----
    Each electrode's line impedance (:mod:`aerial.models.electrode_lines`) is
    scaled by the ratio of its DC formula (the one :func:`earth_system` uses:
    Dwight's star, the multiple-rod factors, the water-pipe formula) to the
    single line's DC value, so every electrode tends exactly to its DC formula
    as the frequency falls; the scaling carries the crowding of several arms or
    rods over from DC to radio frequency (an approximation: at MF the arms'
    mutual coupling changes less than their own impedance). A counterpoise
    above the soil and a building's protective earth keep their DC values.
    """
    f = np.atleast_1d(np.asarray(frequency, float))
    fixed_key = {"nominal": "resistance_ohm", "low": "resistance_low_ohm", "high": "resistance_high_ohm"}[fixed]
    if dc is None:
        dc = earth_system(electrodes, soil, counterpoise_wires)
    rho = 1.0 / soil.conductivity_s_m
    items = [e for e in electrodes]
    parts = []
    for e, part in zip(items, dc["parts"]):
        line = _line_of(e, soil, f, rho)
        if line is None:
            parts.append({"description": part["description"], "impedance_ohm": np.full(f.size, part[fixed_key] + 0j),
                          "effective_length_m": None, "method": part["method"] + " (frequency-independent)"})
            continue
        scale = part["resistance_ohm"] / line.dc_resistance
        parts.append({"description": part["description"], "impedance_ohm": line.impedance * scale,
                      "effective_length_m": line.effective_length, "method": line.method + ", scaled to "
                      + part["method"] + " at DC"})
    notes = ["Earth electrodes at the working frequency: each a lossy line in the soil (Sunde), tending to "
             "its DC resistance formula as the frequency falls."]
    radials = radial_system(items) if aerial is not None else None
    if radials is not None:
        screen = screen_loss(radial_sets(items), soil, f, aerial)
        n = items.index(radials)
        parts[n] = dict(parts[n], impedance_ohm=screen["impedance_ohm"], method=screen["method"])
        z = screen["impedance_ohm"]
        notes = ["Buried radials as Wait's radial screen under the aerial: the ground loss over the screen and the "
                 "soil (compensation theorem); other electrodes bonded at the hub are left out of the total."]
        return {"impedance_ohm": z, "parts": parts, "frequency_hz": f, "notes": notes, "screen": screen}
    if not parts:
        z = np.full(f.size, dc["resistance_ohm"] + 0j)
    else:
        with np.errstate(divide="ignore"):
            z = 1.0 / np.sum([1.0 / p["impedance_ohm"] for p in parts], axis=0)
    return {"impedance_ohm": z, "parts": parts, "frequency_hz": f, "notes": notes}


def soil_permittivities(soil) -> tuple:
    """The relative permittivities a soil's range is run with: its value and the ends of its range. [1]

    >>> from aerial.site.reader import SoilSpec
    >>> soil_permittivities(SoilSpec("medium-dry", 15.0, 1e-3, 3e-4, 3e-3, "ITU-R P.527", 7.0, 22.0))
    (15.0, 7.0, 22.0)
    >>> soil_permittivities(SoilSpec("measured", 12.0, 1e-3, 5e-4, 2e-3, "given"))
    (12.0,)
    """
    low, high = soil.permittivity_bounds
    return tuple(dict.fromkeys([float(soil.relative_permittivity), float(low), float(high)]))


def soil_bound(soil, end: str):
    """The soil at one end of its range: ``end`` "low" (least conductive, lowest permittivity) or "high"."""
    low, high = soil.permittivity_bounds
    if end == "low":
        return soil._replace(conductivity_s_m=soil.conductivity_low_s_m, relative_permittivity=low)
    return soil._replace(conductivity_s_m=soil.conductivity_high_s_m, relative_permittivity=high)


def resistance_bounds(electrodes, soil, frequency, counterpoise_wires=(), aerial=None) -> dict:
    """Low and high earth resistance at radio frequency, the soil at its conductivity bounds. [ohm]

    The same model as the value (:func:`electrode_impedance`, each electrode
    a lossy line in the soil) run with the soil's conductivity at each end of
    its category's bounds (a measured soil: a factor of two either way) and
    at ``INTERIOR_SOIL_POINTS`` log-spaced values between them, each with the
    permittivity at the low and high ends of the category's range and at its
    value (:func:`soil_permittivities`; ITU-R P.527 categories; a permittivity
    given in the site file is kept); the real part of the impedance is the
    loss resistance.
    The interior points are there because the line's resistance need not
    fall steadily as the conductivity rises: where the soil's displacement
    current rivals its conduction current (dry soil, upper MF and HF) the
    largest resistance can lie inside the bounds. A building earth of unknown
    resistance takes the low end of its range with the best soil and the
    high end with the worst.

    Returns
    -------
    dict
        ``low_ohm``, ``high_ohm``: arrays over ``frequency`` [ohm], the whole
        system; ``parts_low_ohm``, ``parts_high_ohm``: one array per electrode.
        Each low/high is the smaller/larger of the two bound runs at every
        frequency (the line model need not be monotonic in the soil), so it
        also holds the value wherever the value lies between the runs.
    """
    sigmas = np.geomspace(soil.conductivity_high_s_m, soil.conductivity_low_s_m, INTERIOR_SOIL_POINTS + 2)
    fixed = ["low"] + ["nominal"] * INTERIOR_SOIL_POINTS + ["high"]
    runs = []
    for sg, fx in zip(sigmas, fixed):
        # the DC sums depend on the conductivity alone: once per conductivity, shared by its permittivities
        dc = earth_system(electrodes, soil._replace(conductivity_s_m=float(sg)), counterpoise_wires, bounds=False)
        runs += [electrode_impedance(electrodes, soil._replace(conductivity_s_m=float(sg), relative_permittivity=float(ep)),
                                     frequency, counterpoise_wires, fixed=fx, aerial=aerial, dc=dc)
                 for ep in soil_permittivities(soil)]
    whole = np.stack([r["impedance_ohm"].real for r in runs])
    parts = [np.stack([r["parts"][n]["impedance_ohm"].real for r in runs]) for n in range(len(runs[0]["parts"]))]
    return {"low_ohm": whole.min(axis=0), "high_ohm": whole.max(axis=0),
            "parts_low_ohm": [p.min(axis=0) for p in parts], "parts_high_ohm": [p.max(axis=0) for p in parts]}


def improved_earth(electrodes, soil, frequency=None, radial_length_m: float | None = None, aerial=None) -> dict:
    """The what-if earth: the site's electrodes plus eight 10 m buried radials (``radial_length_m`` [m] another length).

    With ``frequency`` [Hz] the resistance is the real part of the earth
    system's impedance there (electrodes as lossy lines) and the description
    names the radials' effective length at that frequency in this soil.
    """
    from aerial.site.reader import Electrode

    n, length, depth = WHAT_IF_RADIALS
    length = length if radial_length_m is None else float(radial_length_m)
    extra = Electrode("buried_wires", "what-if", n, length, 1.628e-3, 0.0, depth, arrangement="radials")
    out = earth_system(list(electrodes) + [extra], soil)
    out["description"] = f"add {n} buried radials of " + metres(length)
    if frequency is not None:
        rf = electrode_impedance(list(electrodes) + [extra], soil, [float(frequency)], aerial=aerial, dc=out)
        out["resistance_ohm"] = float(rf["impedance_ohm"][0].real)
        l_eff = float(rf["parts"][-1]["effective_length_m"][0])
        how = "their effective length"
        if "screen" in rf:
            l_eff = screen_effective_length(radial_sets(electrodes), extra, soil, float(frequency), aerial)
            how = "Wait's screen"
        out["effective_length_m"] = l_eff
        out["note"] = ("radials longer than " + metres(l_eff)
                       + f" add nothing at {si_text(float(frequency), 'Hz', 4)} in this soil ({how})")  # as the table's heading
    return out


def screen_effective_length(fixed, radials, soil, frequency: float, aerial) -> float:
    """Length of ``radials`` beyond which Wait's screen lowers the aerial's ground loss by less than 10 %. [m]

    ``fixed``: other sets of radials at the same hub, kept as they are. The loss is integrated with
    ``radials.count`` radials of lengths from 1 m to a quarter wavelength (log spaced, 16 per decade); the
    effective length is the shortest whose loss is within ``EFFECTIVE_LENGTH_CHANGE`` of the quarter-wave one.
    """
    from aerial.core.constants import SPEED_OF_LIGHT

    top = max(0.25 * SPEED_OF_LIGHT / frequency, 2.0)
    lengths = np.geomspace(1.0, top, 1 + int(np.ceil(16 * np.log10(top))))
    # every length in one pass: the loss :func:`screen_loss` gives each (its real part, clipped at zero)
    sets = list(fixed) + [radials]
    counts = [e.count for e in sets]
    rows = np.array([[e.length_m for e in fixed] + [float(n)] for n in lengths])
    # each system's wire radius: the sets' radii averaged with their wire lengths as weights, every row at once
    wire = np.multiply(counts, rows)
    radii = np.multiply([e.diameter_m / 2.0 for e in sets], wire).sum(axis=1) / wire.sum(axis=1)
    dz = rs.screen_loss_by_length(frequency, aerial["distance_m"], aerial["field_per_m"], counts, rows, radii,
                                  soil.conductivity_s_m, soil.relative_permittivity)
    loss = np.maximum(dz.real, 0.0)
    ok = loss <= loss[-1] * (1.0 + lines.EFFECTIVE_LENGTH_CHANGE) + 1e-12
    return float(lengths[int(np.argmax(ok))])


def as_counterpoise_site(site):
    """Counterpoise wires of a site (for the earth estimate when there is no electrode)."""
    return [w for w in site.wires if w.role == "counterpoise"]


__all__ = ["earth_system", "improved_earth", "electrode_impedance", "resistance_bounds", "BUILDING_EARTH_TYPICAL_OHM",
           "soil_permittivities", "soil_bound", "screen_aerial", "radial_system", "radial_sets", "screen_loss",
           "screen_effective_length"]
