"""The shared page of ``aerial report --page FILE``: the terminal report's content as one HTML file.

Built only from the result dict of :func:`aerial.estimate.assemble.analyse` (and,
for the plan drawing, the site's surroundings from its ``[plan]`` table).
"""

from __future__ import annotations

import numpy as np

from aerial.outputs import charts, site_drawings
from aerial.outputs.page import (VERDICT_CLASS, VERDICT_MARK, bullets, dict_rows_table, document, esc, figure,
                                 format_value, generic_block, key_label, length_range_text, range_text, section,
                                 site_file_name, table)
from aerial.outputs.terminal import (Lengths, audible_dial_words, untunable_words, centre_index, design_power_words, design_separation_words,
                                     coupling_words, detector_tap_words,
                                     design_shown_rows, detector_power_words, effective_length_words, eng,
                                     tuning_cell_text)

#: Lengths in metres: the page's unit system when none is asked for.
METRES = Lengths("si")

#: Top-level keys of the result the report page shows in its own sections; any other key is shown generically.
KNOWN_KEYS = {"aerial_version", "site", "geometry", "bands", "frequencies_hz", "aerial", "earth", "ranges", "what_if",
              "tuning", "stations", "cautions", "warnings", "pictures", "page",
              "building"}  # the building: its assumption, in words, heads the warnings

#: Tuning table columns: heading, row key, unit ("" plain number, "%" a ratio, "dB").
TUNING_COLUMNS = (("frequency", "frequency_hz", "Hz"), ("total C at resonance", "total_capacitance_f", "F"),
                  ("capacitor setting", "capacitor_setting_f", "F"), ("aerial's share of C", "aerial_share_ratio", "%"),
                  ("loaded Q", "loaded_q", ""), ("bandwidth", "bandwidth_hz", "Hz"),
                  ("9 kHz away", "rejection_9khz_db", "dB"), ("10 kHz away", "rejection_10khz_db", "dB"),
                  ("to detector", "power_transfer_ratio", "%"))


def _nearest(freqs, f) -> int:
    return int(np.argmin(np.abs(np.asarray(freqs, float) - f)))


def _centre_index(result) -> int | None:
    """Index into ``ranges`` of the first band's centre (or its middle point)."""
    labels = (result.get("ranges") or {}).get("labels") or []
    if not labels:
        return None
    for j, label in enumerate(labels):
        if label.endswith("centre"):
            return j
    return len(labels) // 2


def headline(result, L: Lengths = METRES) -> list[tuple[str, str, str]]:
    """The headline figures: (what, value, low–high range) at the first band's centre, the earth and the verdicts
    (lengths in ``L``'s unit system)."""
    a, ranges = result["aerial"], result.get("ranges") or {}
    out = []
    j = _centre_index(result)
    if j is not None:
        f = ranges["frequencies_hz"][j]
        i = _nearest(result["frequencies_hz"], f)
        where = f"at {eng(f, 'Hz')}"
        field = eng(result["site"].get("field_strength_v_per_m"), "V/m")
        loss = a["conductor_loss_ohm"][i] + a["ground_loss_ohm"][i]
        out += [(f"capacitance presented {where}", eng(a["capacitance_f"][i], "F"), range_text(ranges["capacitance_f"][j], "F")),
                (f"effective height {where}", L(a["effective_height_m"][i]),
                 length_range_text(ranges["effective_height_m"][j], L)),
                (f"loss resistance {where}", eng(loss, "Ω"), range_text(ranges["loss_resistance_ohm"][j], "Ω")),
                (f"power available in {field} {where}", eng(a["available_power_w"][i], "W"),
                 range_text(ranges["available_power_w"][j], "W"))]
    earth = result.get("earth") or {}
    zt, fc = earth.get("impedance_ohm"), earth.get("centre_frequency_hz")
    if zt is not None and fc and len(zt) and earth.get("resistance_range_at_centre_ohm"):
        # the figure the loss budget uses (electrodes as lossy lines), with its range by the same model
        j = _nearest(result["frequencies_hz"], fc)
        out.append((f"earth resistance, {eng(fc, 'Hz')}", eng(zt[j][0], "Ω"),
                    range_text(earth["resistance_range_at_centre_ohm"], "Ω")))
    elif earth.get("resistance_ohm") is not None:
        out.append(("earth system resistance (DC)", eng(earth["resistance_ohm"], "Ω"),
                    range_text([earth.get("resistance_low_ohm"), earth.get("resistance_high_ohm")], "Ω")))
    cov = ((result.get("tuning") or {}).get("coverage") or {})
    if cov.get("verdict"):
        out.append(("band coverage", cov["verdict"], ""))
    stations = result.get("stations") or []
    if stations:
        def counted(verdicts) -> str:
            counts: dict = {}
            for v in verdicts:
                counts[v] = counts.get(v, 0) + 1
            return ", ".join(f"{n} {v}" for v, n in counts.items())

        day = counted(s.get("verdict", "") for s in stations)
        night = counted((s.get("night") or {}).get("verdict", "") for s in stations) \
            if all(s.get("night") for s in stations) else ""
        # the stations table's two verdict columns: by day, and by night when that differs
        text = f"by day {day}; by night {night}" if night and night != day else day
        out.append((f"stations ({len(stations)} listed)", text, ""))
    return out


def site_sentence(result, L: Lengths = METRES) -> str:
    """The site in a sentence, from the resolved geometry and the site's settings (lengths in ``L``'s unit system)."""
    site, geo = result["site"], result["geometry"]
    shape = geo.get("shape")
    kind = shape.get("kind") if isinstance(shape, dict) else shape
    aerial_wires = [w for w in geo.get("wires", []) if w.get("role") == "aerial"]
    size = aerial_wires[0].get("size") if aerial_wires else None
    material = aerial_wires[0].get("material") if aerial_wires else None
    what = f"{'An' if (kind or 'x')[0] in 'aeiouAEIOU' else 'A'} {kind or 'wire'} aerial"
    if size:
        what += f" of {L.text(size)}{' ' + material if material else ''} wire"
    parts = [f"{what}: {L(geo['total_length_m'])} of wire with its lead-in, highest point {L(geo['max_height_m'])}, "
             f"mean height {L(geo['mean_height_m'])}"]
    earth = result.get("earth") or {}
    if earth.get("parts"):
        parts.append("earthed through " + " and ".join(L.text(p.get("description", p.get("kind", "")))
                                                      for p in earth["parts"]))
    soil = site.get("soil")
    soil = soil.get("category") if isinstance(soil, dict) else soil
    setting = [f"{soil} soil" if soil else "", f"{site['noise_category']} man-made noise" if site.get("noise_category")
               else "", f"region {site['region']}" if site.get("region") else ""]
    if any(setting):
        parts.append(", ".join(x for x in setting if x))
    bands = result.get("bands") or []
    if 0 < len(bands) <= 3:
        parts.append("listening on " + ", ".join(f"{b['name']} ({eng(b['from_hz'], 'Hz')} – {eng(b['to_hz'], 'Hz')})"
                                                 for b in bands))
    elif bands:
        lo, hi = min(b["from_hz"] for b in bands), max(b["to_hz"] for b in bands)
        parts.append(f"listening on {len(bands)} bands between {eng(lo, 'Hz')} and {eng(hi, 'Hz')}")
    n = len(result.get("stations") or [])
    parts.append(f"{n} station{'s' if n != 1 else ''} listed")
    return "; ".join(parts) + "."


def _summary(result, surroundings, units: str = "si") -> str:
    site, L = result["site"], Lengths(units)
    facts = "".join(f'<div class="figure-card"><dt>{esc(what)}</dt><dd>'
                    f'<span class="value{" long" if len(value) > 24 else ""}">{esc(value)}</span>'
                    + (f'<span class="range">{esc(rng)}</span>' if rng else "") + "</dd></div>"
                    for what, value, rng in headline(result, L))
    scene = site_drawings.report_scene(result, surroundings)
    return (f'<header id="summary" class="sheet"><h1>{esc(site["name"])}</h1>'
            f'<p class="sentence">{esc(site_sentence(result, L))}</p>'
            f'<p class="meta">Site file {esc(site_file_name(site))} · model: {esc(result["aerial"]["model"])} · '
            f'aerial {esc(result.get("aerial_version", ""))}</p>'
            f'<section id="headline"><h2>Headline figures</h2><p class="hint">Value, then the range it may take given '
            f'the stated tolerances (support heights, soil).</p><dl class="cards">{facts}</dl></section>'
            + section("drawings", "Where the wire goes",
                      figure(site_drawings.plan_chart(scene, units), "Plan view: the wires as aerial understood them"
                             + (", with the overhead lines and their fall zones" if scene.get("zones") else ""),
                             "plan-view")
                      + figure(site_drawings.elevation_chart(scene, units), "Side elevation with the heights of the fixing "
                               "points", "side-elevation"))
            + "</header>")


def _wires_table(geo, L: Lengths) -> str:
    rows = []
    for w in geo["wires"]:
        zs = [p[2] for p in w["points_m"]]
        rows.append([w["name"], w["role"], L(w["length_m"]), L.text(w.get("size", "")), L(min(zs)), L(max(zs)),
                     len(w["points_m"])])
    return table(["wire", "role", "length", "size", "lowest", "highest", "points"], rows,
                 "Wires as aerial understood them")


def _aerial_table(result, L: Lengths) -> str:
    a, ranges = result["aerial"], result.get("ranges") or {}
    freqs = result["frequencies_hz"]
    field = eng(result["site"].get("field_strength_v_per_m"), "V/m")
    rows = []
    for j, label in enumerate(ranges.get("labels", [])):
        i = _nearest(freqs, ranges["frequencies_hz"][j])
        loss = a["conductor_loss_ohm"][i] + a["ground_loss_ohm"][i]

        def cell(value, key, unit):
            pair = ranges.get(key, [None] * (j + 1))[j]
            rng = length_range_text(pair, L) if unit == "m" else range_text(pair, unit)
            return (L(value) if unit == "m" else eng(value, unit)) + (f" ({rng})" if rng else "")

        rows.append([f"{eng(freqs[i], 'Hz', 4)} ({label})", cell(a["capacitance_f"][i], "capacitance_f", "F"),
                     cell(a["effective_height_m"][i], "effective_height_m", "m"),
                     eng(a["radiation_resistance_ohm"][i], "Ω"), cell(loss, "loss_resistance_ohm", "Ω"),
                     eng(a["reactance_ohm"][i], "Ω"), f"{100 * a['efficiency'][i]:.2g} %",
                     cell(a["open_circuit_voltage_v"][i], "open_circuit_voltage_v", "V"),
                     cell(a["available_power_w"][i], "available_power_w", "W")])
    return table(["frequency", "capacitance presented", "effective height", "radiation resistance", "loss resistance",
                  "reactance", "efficiency", f"open-circuit voltage in {field}", "power available"], rows,
                 "The aerial at the band edges and centres — value (low – high from the stated tolerances)", "wide")


def _aerial_section(result, L: Lengths) -> str:
    a = result["aerial"]
    extra = []
    conv = a.get("convergence")
    if conv:
        extra.append(f"full-wave convergence: {conv.get('pieces')} pieces against twice as many change the impedance by "
                     f"{100 * conv.get('relative_change', 0):.2g} % at {eng(conv.get('frequency_hz'), 'Hz')} "
                     f"({'converged' if conv.get('converged') else 'NOT converged'})")
    for key, value in a.items():
        if isinstance(value, str) and key != "model":
            extra.append(f"{key_label(key)}: {L.text(value)}")
    budget = a.get("loss_budget")
    freqs = result.get("frequencies_hz")
    if budget and freqs is not None and len(freqs):
        i = centre_index(result)
        extra.append(f"loss budget at {eng(freqs[i], 'Hz', 4)}: wire {eng(a['conductor_loss_ohm'][i], 'Ω')}; soil under "
                     f"the aerial {eng(budget['soil_under_aerial_ohm'][i], 'Ω')} ({budget['soil_treatment']}); earth "
                     f"electrode {eng(budget['electrode_ohm'][i], 'Ω')} ({budget['electrode_treatment']})")
    body = (_wires_table(result["geometry"], L) + _aerial_table(result, L) + bullets(extra)
            + bullets((result.get("ranges") or {}).get("notes", []), "notes", L))
    return section("aerial", "The aerial", body, "sheet")


def _earth_section(result, L: Lengths) -> str:
    earth = result.get("earth") or {}
    if not earth:
        return ""
    fc = earth.get("centre_frequency_hz")

    def r_range(p):
        return range_text(p["resistance_range_at_centre_ohm"], "Ω") if p.get("resistance_range_at_centre_ohm") else ""

    def z_text(z):
        return f"{eng(z[0], 'Ω')} {'+' if z[1] >= 0 else '−'} j{eng(abs(z[1]), 'Ω')}" if z else ""

    def dc_text(p):  # the value alone: its DC range is in the JSON; the RF range is the one that matters here
        return eng(p.get("resistance_ohm"), "Ω")

    rows = [[L.text(p.get("description", p.get("kind", ""))), dc_text(p),
             z_text(p.get("impedance_at_centre_ohm")), r_range(p),
             effective_length_words(p, L),
             p.get("method", "")]
            for p in earth.get("parts", [])]
    zt = earth.get("impedance_ohm")
    total_z = ""
    if zt is not None and fc and len(zt):
        j = int(np.argmin(np.abs(np.asarray(result["frequencies_hz"]) - fc)))
        total_z = z_text(zt[j])
    rows.append([("whole earth system", "total"), (dc_text(earth), "total"),
                 (total_z, "total"), (r_range(earth), "total"), "", ""])
    at = f"impedance at {eng(fc, 'Hz')}" if fc else "impedance"
    body = table(["part", "R (DC)", at, "R range", "effective length", "method"], rows)
    if earth.get("impedance_method"):
        body += bullets([earth["impedance_method"]], "notes", L)
    others = {k: v for k, v in earth.items() if k not in ("parts", "resistance_ohm", "resistance_low_ohm",
                                                          "resistance_high_ohm", "impedance_ohm", "impedance_method",
                                                          "centre_frequency_hz", "resistance_range_at_centre_ohm")}
    return section("earth", "Earth system", body + (generic_block("earth", others, L) if others else ""))


def _what_if_section(result, L: Lengths) -> str:
    rows = result.get("what_if") or []
    if not rows:
        return ""
    f = rows[0].get("frequency_hz")
    return section("what-if", f"What would help (at {eng(f, 'Hz', 4)})", dict_rows_table(rows, skip=("frequency_hz", "model"), L=L))


def _tuning_table(tuning, L: Lengths) -> str:
    rows = tuning.get("rows") or []
    if not rows:
        return ""
    spacings = [int(round(v / 1e3)) for v in tuning.get("channel_spacings_hz", [9e3, 10e3])]
    columns = [c for c in TUNING_COLUMNS if not c[1].startswith("rejection_") or int(c[1].split("_")[1][:-3]) in spacings]
    out = []
    for k in np.unique(np.linspace(0, len(rows) - 1, min(len(rows), 7)).round().astype(int)):
        r = rows[int(k)]
        cells = [tuning_cell_text(r, key, unit) for _, key, unit in columns]
        out.append(cells)
    html = table([c[0] for c in columns], out, "Tuning across the band (selected frequencies)", "wide")
    stuck = untunable_words(rows)
    if stuck is not None:
        html += bullets([stuck], L=L)
    return html


def _design_rows(design) -> list[list]:
    """Rows of the stations' tuning design: as wired, with your parts, suggested, the best of every other coupling."""
    rows = []
    for label, r, cap in design_shown_rows(design):
        rows.append([(label, "total") if label not in ("", "other") else label, r["setting"], f"{r['detector_tap_ratio']:.2f}", cap,
                     design_power_words(r), design_separation_words(r), f"{r['adjacent_rejection_db']:.1f} dB"])
    return rows


def _remedy_line(r) -> str:
    def rel(db):
        return f"{abs(db):.0f} dB {'below' if db >= 0 else 'above'}"

    if r.get("kind") == "second tuned circuit":
        what = (f"a second tuned circuit for the aerial ({eng(r['primary_inductance_h'], 'H')} tuned by about "
                f"{eng(r['primary_capacitor_f'], 'F')}) coupled to the tank at k = {r['coupling_coefficient_ratio']:.3f}")
    else:
        where = "in the aerial lead" if str(r.get("kind", "")).startswith("parallel") else "from the aerial terminal to earth"
        what = (f"a {r.get('kind')} {where}: {eng(r.get('trap_inductance_h'), 'H')} with "
                f"{eng(r.get('trap_capacitor_f'), 'F')}, tuned to {eng(r.get('tuned_to_hz'), 'Hz')}")
    verdict = r.get("verdict_text") or ("meets the margin" if r["meets_margin"] else "still short of the margin")
    before = f" (was {eng(r['wanted_power_before_w'], 'W')})" if r.get("wanted_power_before_w") is not None else ""
    lead = f"{r['applies_to_text'][0].upper()}{r['applies_to_text'][1:]}: " if r.get("applies_to_text") else ""
    return (f"{lead}{what}: {r['interferer']} {rel(r['separation_db'])} {r['wanted']} "
            f"(was {rel(r['separation_before_db'])}); "
            f"{r['wanted']} then gets {eng(r['wanted_power_w'], 'W')} at the detector{before} — {verdict}")


def _station_design_block(result, L: Lengths) -> str:
    """The tuning designed for the listed stations: trade-off table, remedies, notes and its picture."""
    design = (result.get("tuning") or {}).get("station_design")
    if not design or not design.get("chosen") or not design.get("current"):
        return ""
    spacing = design.get("channel_spacing_hz", 9e3)
    head = ["", "coupling", "detector tap", "capacitor", "weakest station at the detector", "worst separation",
            f"{eng(spacing, 'Hz')} away"]
    summary = list(design.get("summary", []))
    parts = "the assumed parts" if design.get("capacitor_assumed") else "your parts"
    try:
        remedies = [_remedy_line(r) for r in design.get("remedies", [])]
    except (KeyError, TypeError):  # a remedy of a kind this page does not know: shown as plain facts
        remedies = [format_value("remedy", r, L) for r in design.get("remedies", [])]
    body = (table(head, _design_rows(design), f"Others kept {design['margin_db']:g} dB down; best of each coupling",
                  "wide")
            + bullets(summary + remedies, "advice", L) + bullets(design.get("notes", []), "notes", L)
            + figure(charts.station_design_chart(result), "The weakest wanted station's power at the detector against "
                     f"the rejection of the next channel, one mark per coupling and detector tap; the best with {parts} "
                     f"ringed, the suggestion with a standard capacitor a diamond, {parts} "
                     f"{'as designed for the band' if design.get('detector_tap_designed') else 'as wired'} crossed",
                     "station-tuning"))
    return section("station-design", "Tuning for your stations", body, "sheet")


def _tuning_section(result, L: Lengths) -> str:
    tuning = result.get("tuning") or {}
    if not tuning:
        return ""
    band, coil = tuning.get("band") or {}, tuning.get("coil") or {}
    intro = (f"{coupling_words(tuning)} for {band.get('name', 'the band')}, coil "
             f"{eng(coil.get('inductance_h'), 'H')}")
    if coil.get("turns"):
        intro += f" ({coil['turns']:.0f} turns" + (f" over {L(coil['winding_length_m'])}"
                                                   if coil.get("winding_length_m") else "") + ")"
    if coil.get("self_capacitance_f"):
        intro += (f", self-capacitance {eng(coil['self_capacitance_f'], 'F')} (Medhurst; part of the total C), "
                  f"self-resonance {eng(coil.get('self_resonance_hz'), 'Hz')}")
    if detector_tap_words(tuning):
        intro += f", {detector_tap_words(tuning)}"
    if tuning.get("source") == "measured":
        intro += "; aerial from the bench measurement"
    if tuning.get("channel_spacings_hz"):
        intro += "; channels " + " or ".join(eng(v, "Hz") for v in tuning["channel_spacings_hz"]) + " apart"
    cov = tuning.get("coverage") or {}
    verdict = ""
    if cov.get("verdict"):
        klass = "good" if cov.get("covered") else "caution"
        mark = "✔" if cov.get("covered") else "⚠"
        verdict = f'<p class="verdict {klass}"><strong>Band coverage:</strong> {mark} {esc(L.text(cov["verdict"]))}</p>'
    known = {"arrangement", "coil", "detector", "earphone_ohm", "rows", "coverage", "advice", "notes", "warnings",
             "band", "source", "range_curve", "detector_tap_ratio", "detector_tap_designed", "coupling_designed",
             "designed_tap_ratio", "designed_series_capacitance_f",  # said in the intro
             "station_design", "channel_spacings_hz"}  # the stations' tuning design has its own block
    extra = "".join(f"<h3>{esc(key_label(k).capitalize())}</h3>{generic_block(k, v, L)}"
                    for k, v in tuning.items() if k not in known and v not in (None, [], {}, ""))
    body = (f"<p>{esc(intro)}; detector: {esc(tuning.get('detector', ''))}, earphone "
            f"{esc(eng(tuning.get('earphone_ohm'), 'Ω'))}.</p>" + _tuning_table(tuning, L) + verdict
            + bullets(tuning.get("advice", []), "advice", L) + bullets(tuning.get("notes", []), "notes", L)
            + bullets(tuning.get("warnings", []) + (tuning.get("range_curve") or {}).get("warnings", []), "warn", L)
            + extra
            + figure(charts.tuning_chart(result), "Tuned frequency against the capacitor setting; the band shaded, each "
                     "listed station a dotted line (a dot where the capacitor reaches it)", "tuning-range"))
    return section("tuning", "Tuning", body, "sheet")


def _verdict_cell(verdict, words=None) -> tuple[str, str]:
    """(symbol and words, CSS class) of a verdict; ``words`` is the verdict in words when the result has them."""
    klass = VERDICT_CLASS.get(verdict or "", "bad" if verdict else "")
    return (f"{VERDICT_MARK.get(verdict, '')} {words or verdict or '—'}".strip(), f"verdict {klass}")


def _station_reasons(s, L: Lengths) -> list[str]:
    """A station's reasons by day and by night, each sentence of the result written in ``L``'s unit system
    from its own lengths (the station's name is left as it is)."""
    name = s.get("name", "")
    text = L.text(s.get("reason", ""))
    for key, words in (("spills_over", "also comes through when tuned to"), ("heard_behind", "other stations heard behind it")):
        if s.get(key):
            text += ("; " if text else "") + words + ": " + ", ".join(
                f"{x['name']} ({x['level_relative_db']:+.1f} dB against it)"
                if isinstance(x, dict) and "name" in x and isinstance(x.get("level_relative_db"), (int, float))
                else format_value(key, x) for x in s[key])
    across = audible_dial_words(s)
    if across:
        text += ("; " if text else "") + across
    text += "".join(f"; {L.text(w)}" for w in s.get("warnings", []))
    out = [f"{name}{' by day' if s.get('night') else ''}: {text}"] if text else []
    night = s.get("night") or {}
    if night.get("reason"):
        sky = night.get("sky_wave_field_v_per_m")
        out.append(f"{name} by night: {L.text(night['reason'])}" + (f" (sky wave {eng(sky, 'V/m')}" if sky else "")
                   + (", fading" if sky and night.get("fading") else "") + (")" if sky else "")
                   + (" (no sky wave: daylight at the path's midpoint)" if night.get("sky_wave_in_daylight") else ""))
    return out


def _stations_section(result, L: Lengths) -> str:
    stations = result.get("stations") or []
    if not stations:
        return ""
    nights = any(s.get("night") for s in stations)
    rows = []
    for s in stations:
        row = [s.get("name", ""), eng(s.get("frequency_hz"), "Hz"), L.distance(s.get("distance_m")),
               eng(s.get("field_v_per_m"), "V/m"), detector_power_words(s),
               format_value("audio_power_w", s.get("audio_power_w")),
               "—" if s.get("signal_to_noise_db") is None else f"{s['signal_to_noise_db']:.0f} dB",
               _verdict_cell(s.get("verdict"), s.get("verdict_text"))]
        if nights:
            night = s.get("night") or {}
            field = eng(night.get("field_v_per_m"), "V/m") if night else "—"
            row += [field + (" fading" if night.get("fading") else ""),
                    _verdict_cell(night.get("verdict"), night.get("verdict_text"))]
        rows.append(row)
    headers = ["station", "frequency", "distance", "field", "at the detector", "audio", "signal-to-noise",
               "by day" if nights else "verdict"] + (["night field", "by night"] if nights else [])
    when = next((s["night"]["listening_time"] for s in stations if (s.get("night") or {}).get("listening_time")), "")
    caption = (f"Stations (by day: ground wave; by night{', ' + when if when else ''}: ground and sky wave) — "
               if nights else "Stations — ")
    shown = {s.get("verdict") for s in stations} | {(s.get("night") or {}).get("verdict") for s in stations}
    caption += ", ".join(f"{mark} {v}" for v, mark in VERDICT_MARK.items() if v in shown)
    body = (table(headers, rows, caption)
            + bullets([line for s in stations for line in _station_reasons(s, L)], "reasons")
            + figure(charts.station_chart(result), "Power each station delivers to the detector, and the noise that "
                     "comes with it in the tuned bandwidth (the gap is the signal-to-noise ratio)"
                     + ("; hollow marks: by night" if nights else ""), "station-power"))
    return section("stations", "Stations", body, "sheet")


def _pictures_section(result) -> str:
    body = (figure(charts.impedance_chart(result), "Series resistance (solid) and reactance (dashed) at the receiver "
                   "terminals; the hatched band is the range from the stated tolerances, joined between the band edges "
                   "and centre", "impedance")
            + figure(charts.capacitance_chart(result), "Capacitance the aerial presents; hatched: the range from the "
                     "stated tolerances", "capacitance"))
    return section("frequency-pictures", "Across the band", body, "sheet")


def _safety_section(result, L: Lengths) -> str:
    body = ""
    if result.get("warnings"):
        body += '<h3 id="warnings">Warnings</h3>' + bullets(result["warnings"], "warn", L)
    body += ('<h3 id="cautions">Safety cautions</h3>' + bullets(result.get("cautions", []), "caution-list", L))
    return section("safety", "Warnings and safety", body, "sheet")


def _extras(result, L: Lengths) -> str:
    out = ""
    for key, value in result.items():
        if key in KNOWN_KEYS or value in (None, [], {}, ""):
            continue
        out += section(f"more-{key.replace('_', '-')}", key_label(key).capitalize(), generic_block(key, value, L))
    return out


def report_page(result: dict, surroundings: dict | None = None, units: str = "si") -> str:
    """The whole report as one self-contained HTML document (text).

    Parameters
    ----------
    result : dict
        The result of :func:`aerial.estimate.assemble.analyse` (as ``aerial report --json`` prints it).
    surroundings : dict, optional
        The site's plan surroundings (:func:`aerial.outputs.site_drawings.site_surroundings`) for the plan view.
    units : str
        "si" (metres) or "us" (feet, inches, miles): every length and station distance on the page, in its
        tables, its text and its drawings, written as the terminal report writes it
        (:class:`aerial.outputs.terminal.Lengths`).
    """
    L = Lengths(units)
    body = (_summary(result, surroundings, units) + _aerial_section(result, L) + _earth_section(result, L)
            + _what_if_section(result, L))
    body += (_pictures_section(result) + _tuning_section(result, L) + _station_design_block(result, L)
             + _stations_section(result, L) + _extras(result, L))
    body += _safety_section(result, L)
    return document(f"{result['site']['name']} — aerial report", body, result["site"].get("file"))
