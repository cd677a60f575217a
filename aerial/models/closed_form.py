"""Closed-form electrical response of any wire aerial over a perfect ground.

:func:`closed_form_response` combines the pieces:

1. :func:`aerial.models.shapes.classify` names the shape (vertical, sloping
   wire, inverted-L, T, irregular) and measures its down-lead and top arms;
2. :func:`aerial.models.capacitance.electrostatic_solution` gives the static
   capacitance and effective height of the actual wires, including the
   shielding between sections and the induced charge on the earth lead;
3. the shape's transmission-line model (:mod:`aerial.models.short_aerial`)
   gives the frequency dependence of reactance and effective height, scaled
   so that its static limit equals the electrostatic figures;
4. :mod:`aerial.models.conductor` gives the skin-effect resistance, referred
   to the feed current with the line model's current distribution.

Ground loss and efficiency are left to the caller.

Validity: electrically short aerials (total wire length below lambda/8 for
reliable reactance and effective height), thin wires, perfect flat ground.
Outside it the figures are returned with warnings, never NaN.
"""

from __future__ import annotations

import numpy as np
from aerial.core.constants import SPEED_OF_LIGHT

from aerial.core.errors import ModelInputError
from aerial.core.lengthtext import metres
from aerial.core.units import si_text
from aerial.models import short_aerial as sa
from aerial.models.building import facade_static_figures
from aerial.models.capacitance import electrostatic_solution
from aerial.models.conductor import resistance_per_m
from aerial.models.segments import Segments
from aerial.models.shapes import SECTION_DOWN_LEAD, SECTION_EARTH_LEAD, classify

#: k times the total wire length at which the line models are evaluated for
#: their static limit (relative error of the limit ~ its square). [rad]
STATIC_ELECTRICAL_LENGTH = 1e-4


def _sin2_integral(x):
    """G(x) = integral_0^x sin^2(t) dt = x/2 - sin(2x)/4, with a series for small x."""
    x = np.asarray(x, dtype=float)
    series = x**3 / 3 - x**5 / 15 + 2 * x**7 / 315
    return np.where(np.abs(x) < 0.05, series, x / 2 - np.sin(2 * x) / 4)


def _safe(x):
    return np.where(np.abs(x) < 1e-12, np.where(x < 0, -1e-12, 1e-12), x)


def _segment_r_per_m(segments: Segments, frequency):
    """AC resistance per metre of every segment at every frequency, (S, F) [ohm/m]: one evaluation per kind of wire.

    The segments of one wire share its radius, resistivity and permeability, so
    :func:`aerial.models.conductor.resistance_per_m` runs once per kind over the frequencies and the rows are
    repeated for the segments of that kind (the values are those of a call over all segments). A kind's row at
    the same frequencies is kept for the next call (a report's tolerance and what-if runs move the wires, not
    their kind).
    """
    kinds = list(zip(segments.radius.tolist(), segments.resistivity.tolist(), segments.relative_permeability.tolist()))
    unique = {kind: k for k, kind in enumerate(dict.fromkeys(kinds))}  # each kind once, numbered as first met
    which = [unique[kind] for kind in kinds]
    rows = np.empty((len(unique), frequency.size))
    freq_key = frequency.tobytes()
    for k, (radius, resistivity, permeability) in enumerate(unique):
        key = (radius, resistivity, permeability, freq_key)
        row = _R_PER_M_ROWS.get(key)
        if row is None:
            row = resistance_per_m(np.full((1, 1), radius), frequency[None, :], np.full((1, 1), resistivity),
                                   np.full((1, 1), permeability))[0]
            if len(_R_PER_M_ROWS) >= 32:
                _R_PER_M_ROWS.pop(next(iter(_R_PER_M_ROWS)))
            _R_PER_M_ROWS[key] = row
        rows[k] = row
    return rows[which]


#: Each kind of wire's AC resistance per metre by frequencies, from earlier calls (the last 32). [ohm/m]
_R_PER_M_ROWS: dict = {}


def _section_r_per_m(segments: Segments, r_per_m, mask):
    """Length-weighted mean AC resistance per metre of the segments in ``mask``, per frequency [ohm/m].

    ``r_per_m``: every segment's, (S, F) (:func:`_segment_r_per_m`).
    """
    idx = np.flatnonzero(mask)
    if idx.size == 0:
        return np.zeros(r_per_m.shape[1])
    w = segments.length[idx, None]
    return np.sum(r_per_m[idx] * w, axis=0) / np.sum(w)


class _LineModel:
    """A shape's transmission-line model: effective height, reactance and loss shape vs frequency."""

    def __init__(self, kind, shape, z0_form, total_length):
        self.kind = kind
        self.shape = shape
        self.z0_form = z0_form
        self.total_length = total_length

    def evaluate(self, f, c_static=None):
        sh = self.shape
        k = sa.wavenumber(f)
        if self.kind in ("inverted-L", "T"):
            r = sa.top_loaded(
                sh.downlead_length_m,
                list(sh.top_lengths_m),
                sh.downlead_radius_m,
                f,
                top_radius=list(sh.top_radii_m),
                top_height=list(sh.top_heights_m),
                z0_form=self.z0_form,
            )
        elif self.kind == "vertical":
            r = sa.vertical_monopole(sh.downlead_length_m, sh.downlead_radius_m, f, self.z0_form)
        elif self.kind == "sloping wire":
            r = sa.sloping_wire(sh.downlead_length_m, sh.downlead_rise_m, sh.downlead_radius_m, f, self.z0_form)
        else:  # irregular: uniform line of the total length matched to the static capacitance
            ell = self.total_length
            z0 = ell / (SPEED_OF_LIGHT * c_static)
            th = k * ell
            s = _safe(np.sin(th))
            he = (1 - np.cos(th)) / (k * s)
            x = -z0 * np.cos(th) / s
            zeros = np.zeros_like(th)
            r = sa.ShortAerialResult(
                he, x, zeros, zeros, th > 2 * np.pi * sa.MAX_RELIABLE_LENGTH_WAVELENGTHS, th >= np.pi / 2
            )
        return r

    def loss_weights(self, f, result):
        """Per-section factors W with loss = sum R'_section W_section [m], from the line current shape."""
        sh = self.shape
        k = sa.wavenumber(f)
        if self.kind in ("inverted-L", "T"):
            delta = result.loading_angle_rad
            h = sh.downlead_length_m
            theta = delta + k * h
            s2 = _safe(np.sin(theta)) ** 2
            w = {SECTION_DOWN_LEAD: (_sin2_integral(theta) - _sin2_integral(delta)) / (k * s2)}
            adm = [np.tan(k * li) / sa.horizontal_wire_z0(hi, ai) for li, hi, ai in
                   zip(sh.top_lengths_m, sh.top_heights_m, sh.top_radii_m)]
            total = _safe(sum(adm))
            i_junction2 = np.sin(delta) ** 2 / s2
            for i, (li, yi) in enumerate(zip(sh.top_lengths_m, adm)):
                share2 = (yi / total) ** 2
                arm = _sin2_integral(k * li) / (k * _safe(np.sin(k * li)) ** 2)
                w[i + 1] = i_junction2 * share2 * arm
            return w
        length = sh.downlead_length_m if self.kind in ("vertical", "sloping wire") else self.total_length
        th = k * length
        return {SECTION_DOWN_LEAD: _sin2_integral(th) / (k * _safe(np.sin(th)) ** 2)}


def closed_form_response(segments: Segments, frequency, *, z0_form: str = sa.DEFAULT_Z0_FORM, shape=None,
                         building=None, shielding_case: int = 1, convergence_check: bool = True) -> dict:
    """Per-frequency capacitance, effective height, radiation resistance, reactance and conductor loss.

    Parameters
    ----------
    segments : Segments
        Aerial and earth lead. Frame: m, x east, y north, z up; ground z = 0.
    frequency : array_like
        Frequencies. [Hz]
    z0_form : {"uniform-charge", "schelkunoff"}
        Average characteristic impedance of the vertical in the line model.
    shape : AerialShape, optional
        The shape to model the wires as (default: :func:`classify` them).
        Tolerance runs pass the nominal wires' shape measured on the moved
        wires (:func:`aerial.models.shapes.measure_like`) so that a range
        comes from the same model as its value.
    building : BuildingBody, optional
        The building beside the wire (:mod:`aerial.models.building`): the
        static capacitance and effective height then come from the wire, its
        images in the ground and the facade, and the field shielded by the
        building, blended by its construction's shielding fraction; the
        effective height at each frequency takes in the building's own
        induced currents (:func:`aerial.models.building.building_charge_factor`,
        held above ``current_limit_hz`` with a warning).
    shielding_case : {0, 1, 2}
        Which shielding fraction of the construction: 0 the least, 1 the
        nominal, 2 the most.
    convergence_check : bool
        Check the electrostatic solution against a half-density subdivision
        and warn when it moved beyond its tolerance (default). False skips
        that second solve, and the warning, for a caller that does not read
        the warnings (the figures are the same).

    Returns
    -------
    dict
        ``frequency_hz`` [Hz]; ``capacitance_f`` [F] (the capacitance the
        aerial presents to a tuning circuit, -1/(omega X) where X < 0, the
        static value where it is not); ``static_capacitance_f`` [F];
        ``effective_height_m`` [m]; ``radiation_resistance_ohm`` [ohm];
        ``reactance_ohm`` [ohm]; ``conductor_loss_ohm`` [ohm] (skin-effect
        loss of the aerial and earth-lead wires referred to the feed
        current); ``reliable`` (bool per frequency); ``wavelength_validity``
        (dict, :func:`wavelength_validity`); ``static_effective_height_m``
        [m]; ``model`` (str); ``shape`` (dict); ``warnings`` (list of str);
        with a building also ``building`` (dict: shielding fractions, the
        static figures in open ground, beside a perfect facade and over the
        construction's range, the facade distance, the screened lead length,
        ``current_ratio`` per frequency and ``current_limit_hz``).
        All per-frequency entries are numpy arrays of the input's length.

    Notes
    -----
    Static part: C_s and h_e,s from the electrostatic moment solution (exact
    in the short limit; aerial at 1 V, earth lead at 0 V).

    Frequency dependence: the shape's line model -- vertical: X = -Zv cot(kh),
    h_e = tan(kh/2)/k; sloping wire: the same along the wire with h_e scaled
    by rise/length; inverted-L and T: the top-loading angle,
    delta = arctan(Zv sum tan(k l_i)/Zt_i), h_e = [cos delta - cos(delta + kh)]
    / [k sin(delta + kh)], X = -Zv cot(delta + kh); irregular: a uniform line
    of the total aerial length with Z0 = length / (c C_s).

    Normalisation: the line model is evaluated at a frequency where k times
    the total length is ``STATIC_ELECTRICAL_LENGTH`` to get its static
    capacitance C_0 = -1/(omega X) and effective height h_0, then::

        X(f)   = X_line(f) C_0 / C_s          (every line impedance scaled alike)
        h_e(f) = h_line(f) h_e,s / h_0
        Rr(f)  = 160 pi^2 (h_e(f) / lambda)^2

    so the static limit is the electrostatic solution and the line model
    supplies only the shape of the frequency dependence (and the first
    resonance, which the scaling leaves in place).

    Conductor loss: R = sum over sections of R'_sec integral |I/I0|^2 ds with
    the line model's standing-wave current (vertical I(z)/I0 =
    sin(delta + k(h - z))/sin(delta + kh); arms share the junction current in
    proportion to their input admittances and fall as sin(k(l - x))); R'_sec
    the length-weighted skin-effect resistance of the section's wires. The
    earth lead carries the feed current throughout (R' x length).

    References
    ----------
    .. [1] E. A. Laport, *Radio Antenna Engineering*, McGraw-Hill, 1952, ch. 1
       (top-loading angle). (from memory)
    .. [2] R. F. Harrington, *Field Computation by Moment Methods*, 1968,
       ch. 2 (electrostatic moment method). (from memory)
    .. [3] S. Ramo, J. R. Whinnery and T. Van Duzer, *Fields and Waves in
       Communication Electronics*, 3rd ed., 1994, sec. 5.5 (internal
       impedance). (from memory)

    Examples
    --------
    >>> from aerial.models.segments import polyline_segments
    >>> s = polyline_segments([[0, 0, 0.02], [0, 0, 10], [20, 0, 10]], 1e-3)
    >>> r = closed_form_response(s, [0.5e6, 1e6])
    >>> r["model"]
    'closed form: inverted-L, top-loading angle normalised to electrostatic moment solution'
    >>> [round(x * 1e12) for x in r["capacitance_f"]]
    [187, 206]
    """
    f = _checked_frequencies(frequency, z0_form)
    if shape is None:
        shape = classify(segments)
    elif len(shape.segment_section) != len(segments):
        raise ModelInputError(f"the shape given describes {len(shape.segment_section)} segments, not {len(segments)}")
    es = electrostatic_solution(segments, convergence_check=convergence_check)
    c_s = es.capacitance_f
    he_s = es.effective_height_m
    warnings: list[str] = []
    if convergence_check and not es.converged:
        warnings.append(
            f"electrostatic solution changed by {es.relative_change:.1%} between subdivisions "
            "(above its tolerance): capacitance and effective height are approximate"
        )
    if c_s <= 0 or not np.isfinite(c_s):
        raise ModelInputError("the electrostatic solution gave no positive capacitance; check that the wires, "
                              "lead-in and earth lead stay above the ground and outside the building, and that "
                              "no wire doubles back along another")
    beside = None
    if building is not None:
        beside, he_f = _beside_building(segments, building, es, int(shielding_case), f, warnings)
        c_s, he_s = beside["static_capacitance_range_f"][shielding_case], beside["static_effective_height_range_m"][shielding_case]

    kind = shape.kind
    total = shape.total_length_m
    model = _LineModel(kind, shape, z0_form, total)
    res, x, he = _normalised_line(model, f, c_s, he_s if beside is None else he_f, total)
    rr = sa.radiation_resistance(he, f)

    omega = 2 * np.pi * f
    negative = x < 0
    cap = np.where(negative, -1.0 / (omega * np.where(negative, x, -1.0)), c_s)
    too_long = np.asarray(res.too_long, bool)
    past = np.asarray(res.past_resonance, bool) | ~negative

    r_per_m = _segment_r_per_m(segments, f)
    loss = _aerial_loss(segments, shape, model, f, res, r_per_m)
    loss = loss + _earth_lead_loss(segments, shape, f, warnings, r_per_m)
    validity = wavelength_validity(total, f, too_long, past)
    warnings.extend(_validity_warnings(shape, validity))
    n = f.size
    extra = {} if beside is None else {"building": beside}
    return extra | {
        "frequency_hz": f,
        "capacitance_f": np.asarray(cap, float),
        "static_capacitance_f": np.full(n, c_s),
        "effective_height_m": he,
        "static_effective_height_m": np.full(n, he_s),
        "radiation_resistance_ohm": np.asarray(rr, float),
        "reactance_ohm": x,
        "conductor_loss_ohm": np.asarray(loss, float),
        "reliable": ~(too_long | past),
        "wavelength_validity": validity,
        "model": f"closed form: {kind}, {_METHOD_OF_KIND[kind]} normalised to electrostatic moment solution",
        "shape": shape.as_dict(),
        "warnings": warnings,
    }


#: How each shape's frequency dependence is modelled (named in the result's ``model``).
_METHOD_OF_KIND = {
    "vertical": "open-line (sinusoidal current)",
    "sloping wire": "open-line along the slope",
    "inverted-L": "top-loading angle",
    "T": "top-loading angle",
    "irregular": "uniform-line equivalent",
}


def _beside_building(segments, building, es, case, f, warnings):
    """The static figures beside the building, as a JSON-ready dict, and the case's static effective height
    with the building's own currents at each frequency [m]; appends its caveats to ``warnings``."""
    if case not in (0, 1, 2):
        raise ModelInputError(f"shielding_case must be 0, 1 or 2; got {case!r}")
    fig = facade_static_figures(segments, building, es.capacitance_f, es.effective_height_m, frequency=f)
    warnings.extend(fig["notes"])
    f_limit = fig["limit_frequency_hz"]
    if float(np.max(f)) > f_limit:
        warnings.append(
            f"above {si_text(f_limit, 'Hz')} the building (" + metres(building.height_m)
            + ") nears its own first resonance: "
            "the closed form's allowance for the building's currents stops holding there and its figures are held "
            "at their value at that frequency, which can be several dB off (--full-wave models the building)"
        )
    return {
        "construction": building.construction,
        "shielding_ratio": list(fig["shielding"]),
        "open_ground_static_capacitance_f": float(es.capacitance_f),
        "open_ground_static_effective_height_m": float(es.effective_height_m),
        "facade_static_capacitance_f": fig["facade_capacitance_f"],
        "facade_static_effective_height_m": fig["facade_effective_height_m"],
        "static_capacitance_range_f": list(fig["capacitance_f"]),
        "static_effective_height_range_m": list(fig["effective_height_m"]),
        "facade_distance_m": fig["facade_distance_m"],
        "screened_wire_m": fig["shielded_lead_m"],
        "height_m": float(building.height_m),
        "current_ratio": fig["effective_height_by_frequency_m"][case] / fig["effective_height_m"][case],
        "current_limit_hz": float(f_limit),
    }, fig["effective_height_by_frequency_m"][case]


def _checked_frequencies(frequency, z0_form):
    """The frequencies as a 1-D float array [Hz]; raises on a bad list or Z0 form."""
    if z0_form not in sa.Z0_FORMS:
        raise ModelInputError(
            f"{z0_form!r} is not a valid z0_form, must be one of " + ", ".join(repr(c) for c in sa.Z0_FORMS)
        )
    f = np.atleast_1d(np.asarray(frequency, dtype=float))
    if f.ndim != 1 or f.size == 0 or np.any(~np.isfinite(f) | (f <= 0)):
        raise ModelInputError(f"frequency must be a non-empty list of positive frequencies in Hz; got {frequency!r}")
    return f


def _normalised_line(model, f, c_s, he_s, total):
    """The line model scaled to the electrostatic limit: (line result, reactance [ohm], |h_e| [m])."""
    f_ref = STATIC_ELECTRICAL_LENGTH * SPEED_OF_LIGHT / (2 * np.pi * total)
    # the reference frequency evaluated with the others (the line models work element by element)
    both = model.evaluate(np.concatenate([[f_ref], f]), c_s)
    c0 = float(-1.0 / (2 * np.pi * f_ref * both.reactance_ohm[0]))
    h0 = float(both.effective_height_m[0])
    res = sa.ShortAerialResult(**{name: np.asarray(getattr(both, name))[1:] for name in both._fields})
    x = np.asarray(res.reactance_ohm, float) * (c0 / c_s)
    he = np.asarray(res.effective_height_m, float) * (he_s / h0 if h0 != 0 else 0.0)
    return res, x, np.abs(he)


def _aerial_loss(segments, shape, model, f, res, r_per_m):
    """Skin-effect loss of the aerial wires referred to the feed current, per frequency. [ohm]

    ``r_per_m``: every segment's AC resistance per metre, (S, F) (:func:`_segment_r_per_m`). [ohm/m]
    """
    sections = np.asarray(shape.segment_section)
    weights = model.loss_weights(f, res)
    loss = np.zeros_like(f)
    if shape.kind == "irregular":
        r_aer = _section_r_per_m(segments, r_per_m, segments.aerial)
        return loss + r_aer * weights[SECTION_DOWN_LEAD]
    for sec, w in weights.items():
        loss = loss + _section_r_per_m(segments, r_per_m, sections == sec) * np.asarray(w, float)
    return loss


def _earth_lead_loss(segments, shape, f, warnings, r_per_m):
    """Skin-effect loss of the earth-lead wires, per frequency [ohm]; appends its caveats to ``warnings``.

    ``r_per_m``: every segment's AC resistance per metre, (S, F) (:func:`_segment_r_per_m`). [ohm/m]
    """
    earth = np.asarray(shape.segment_section) == SECTION_EARTH_LEAD
    if not np.any(earth):
        return np.zeros_like(f)
    low = np.minimum(segments.start[earth, 2], segments.end[earth, 2])
    ends = np.concatenate([segments.start[earth], segments.end[earth]])
    at_feed = int(np.sum(np.linalg.norm(ends - segments.feed, axis=1) < 1e-3))
    r_earth = _section_r_per_m(segments, r_per_m, earth)
    if not np.any(low <= 1e-3):
        # a counterpoise: the feed current divides between its arms and falls to zero at their
        # free ends (triangular), so each of n arms dissipates R' L_i (1/n)^2 / 3
        n_arms = max(at_feed, 1)
        warnings.append(
            "the earth side does not reach the ground: treated as a counterpoise insulated above the ground "
            "(floating in the electrostatic solution); the soil's loss under it is estimated roughly"
        )
        return r_earth * float(np.sum(segments.length[earth])) / (3.0 * n_arms**2)
    if at_feed > 1:
        warnings.append(
            "the earth-lead wires branch: their conductor loss assumes the full feed current along every "
            "one of them, which overstates it"
        )
    return r_earth * float(np.sum(segments.length[earth]))


def wavelength_validity(total_length_m: float, frequency, too_long, past) -> dict:
    """Where a closed-form aerial is long for the wavelength: the one test ``aerial report`` and ``aerial layout`` share.

    Parameters
    ----------
    total_length_m : float
        The aerial's total wire length (top and down-lead). [m]
    frequency : array_like
        The frequencies the figures were computed at. [Hz]
    too_long, past : array_like of bool
        Per frequency: the wire longer than ``MAX_RELIABLE_LENGTH_WAVELENGTHS``
        of a wavelength; at or past its first resonance.

    Returns
    -------
    dict
        ``long_from_hz`` (the frequency from which the wire passes 1/8 wave,
        None when no frequency does) [Hz], ``resonance_from_hz`` (the lowest
        frequency at or past the first resonance, or None) [Hz], ``rough_from_hz``
        (the lower of the two, or None) [Hz] and ``warnings`` (the sentences,
        empty when the figures hold at every frequency).

    Notes
    -----
    The line models hold while the wire is short against the wavelength,
    l < lambda/8, i.e. f < c / (8 l).

    References
    ----------
    The short-aerial (lumped) treatment and its limit to wires short against the wavelength:
    Balanis, *Antenna Theory*, 3rd ed., sec. 4.2 (small dipole, l <= lambda/50) and 4.3
    (l <= lambda/10), and Laport, *Radio Antenna Engineering*, ch. 1 (module references of
    :mod:`aerial.models.short_aerial`). The 1/8-wave line drawn here is common practice
    (from memory); past it, ``--full-wave`` gives the figures.

    Examples
    --------
    >>> v = wavelength_validity(35.6, [0.52e6, 1.71e6], [False, True], [False, False])
    >>> round(v["long_from_hz"] / 1e6, 2), v["resonance_from_hz"]
    (1.05, None)
    """
    f = np.atleast_1d(np.asarray(frequency, float))
    too_long = np.broadcast_to(np.asarray(too_long, bool), f.shape)
    past = np.broadcast_to(np.asarray(past, bool), f.shape)
    total = float(total_length_m)
    long_from = float(sa.MAX_RELIABLE_LENGTH_WAVELENGTHS * SPEED_OF_LIGHT / total) if np.any(too_long) else None
    resonance_from = float(f[past].min()) if np.any(past) else None
    warnings = []
    if long_from is not None:
        warnings.append(
            "total wire length " + metres(total)
            + f" is above 1/8 wavelength from {si_text(long_from, 'Hz')} up: "
            "reactance, capacitance, effective height and radiation resistance are unreliable there"
        )
    if resonance_from is not None:
        warnings.append(
            "at or past the first resonance at "
            + f"{si_text(resonance_from, 'Hz')} and above: the line model does not describe the aerial there; "
            "where its reactance comes out inductive, the capacitance shown is the static value"
        )
    known = [v for v in (long_from, resonance_from) if v is not None]
    return {"long_from_hz": long_from, "resonance_from_hz": resonance_from,
            "rough_from_hz": min(known) if known else None, "warnings": warnings}


def _validity_warnings(shape, validity: dict) -> list:
    """Plain-English warnings on where the closed form leaves its validity range (``validity``: its
    :func:`wavelength_validity`)."""
    kind = shape.kind
    warnings = list(validity["warnings"])
    if kind == "irregular":
        warnings.append(
            "irregular shape (" + "; ".join(shape.notes[-1:]) + "): the frequency dependence comes from a "
            "uniform-line equivalent of the total wire length (Z0 = length / (c C_static)), so reactance and "
            "effective height away from the short limit are rough"
        )
    if kind == "sloping wire":
        warnings.append(
            "sloping wire: the horizontal part of its current is taken not to radiate (true close to a good ground)"
        )
    return warnings
