"""Rich rendering of the result dicts. No computation here: everything comes from the API's dicts."""

from __future__ import annotations

import math

import numpy as np
from rich.panel import Panel
from rich.table import Table
from rich.markup import escape
from rich.text import Text


# --------------------------------------------------------------------------- number formats


def eng(value, unit: str, digits: int = 3) -> str:
    """Engineering notation with an SI prefix: eng(1.8e-10, 'F') -> '180 pF'."""
    if value is None:
        return "—"
    v = float(value)
    if not math.isfinite(v):
        return "—"
    if v == 0:
        return f"0 {unit}"
    prefixes = [(1e9, "G"), (1e6, "M"), (1e3, "k"), (1, ""), (1e-3, "m"), (1e-6, "µ"), (1e-9, "n"), (1e-12, "p"), (1e-15, "f")]
    for scale, p in prefixes:
        if abs(v) >= scale * 0.9995:
            break
    else:
        scale, p = 1e-15, "f"
    x = v / scale
    text = f"{float(f'{x:.{digits}g}'):g}"
    return f"{text} {p}{unit}"


def rng(pair, unit: str) -> str:
    if pair is None:
        return "—"
    return f"{eng(pair[0], unit, 2)} – {eng(pair[1], unit, 2)}"


def span(pair, unit: str) -> str:
    """A compact dim range "(5.7–7.7 m)" under a value."""
    if pair is None or pair[0] is None or pair[1] is None:
        return ""
    lo, hi = eng(pair[0], unit, 3), eng(pair[1], unit, 3)
    lo_num, lo_unit = lo.rsplit(" ", 1)
    hi_num, hi_unit = hi.rsplit(" ", 1)
    text = f"({lo_num}–{hi_num} {hi_unit})" if lo_unit == hi_unit else f"({lo}–{hi})"
    return f"[dim]{text}[/dim]"


def db(x) -> str:
    return "—" if x is None else f"{x:+.1f} dB"


def _nearest(freqs, f):
    freqs = np.asarray(freqs, float)
    return int(np.argmin(np.abs(freqs - f)))


# --------------------------------------------------------------------------- pieces


def _geometry_table(geo: dict) -> Table:
    t = Table(title="Wires as aerial understood them", title_justify="left")
    for col in ("wire", "role", "length", "size", "lowest", "highest", "points (x, y, height) m"):
        t.add_column(col, overflow="fold")
    for w in geo["wires"]:
        pts = w["points_m"]
        zs = [p[2] for p in pts]
        shown = pts if len(pts) <= 3 else [pts[0], "…", pts[-1]]
        text = " → ".join("…" if p == "…" else "(" + ", ".join(f"{v:.2f}" for v in p) + ")" for p in shown)
        t.add_row(w["name"], w["role"], f"{w['length_m']:.2f} m", w["size"], f"{min(zs):.2f} m", f"{max(zs):.2f} m", text)
    return t


def _summary_line(geo: dict) -> str:
    feed = ", ".join(f"{v:.2f}" for v in geo["feed_m"])
    parts = [
        f"aerial + lead-in {geo['total_length_m']:.1f} m",
        f"highest {geo['max_height_m']:.1f} m",
        f"mean height {geo['mean_height_m']:.1f} m",
        f"receiver terminals at ({feed}) m",
    ]
    if geo.get("earth_lead_length_m"):
        parts.append(f"earth lead {geo['earth_lead_length_m']:.1f} m")
    shape = geo.get("shape")
    if isinstance(shape, dict):
        shape = shape.get("kind")
    if shape:
        parts.append(f"shape: {shape}")
    return " · ".join(parts)


def _lines(console, title, lines, style):
    if not lines:
        return
    lines = [str(x) for x in lines]
    body = Text()
    for i, line in enumerate(lines):
        if i:
            body.append("\n")
        body.append("• " + line)
    console.print(Panel(body, title=title, title_align="left", border_style=style))


# --------------------------------------------------------------------------- commands


def render_check(summary: dict, console) -> None:
    site = summary["site"]
    console.print(f"[bold]{escape(site['name'])}[/bold]  ({escape(site['file'])})")
    console.print(_geometry_table(summary["geometry"]))
    console.print(escape(_summary_line(summary["geometry"])))
    bands = ", ".join(f"{b['name']} {eng(b['from_hz'], 'Hz')}–{eng(b['to_hz'], 'Hz')}" for b in summary["bands"])
    console.print(f"bands: {bands} ({summary['frequency_count']} frequencies) · earth: {', '.join(summary['earth']) or 'none'} · "
                  f"stations: {summary['stations']}")
    _lines(console, "Warnings", summary.get("warnings", []), "yellow")
    console.print("[green]The site file is valid.[/green]")


def render_report(result: dict, console) -> None:
    site = result["site"]
    geo = result["geometry"]
    a = result["aerial"]
    console.print(f"[bold]{escape(site['name'])}[/bold]  ({escape(site['file'])})")
    console.print(escape(_summary_line(geo)))
    console.print(f"model: {escape(a['model'])}")
    console.print(_geometry_table(geo))

    freqs = result["frequencies_hz"]
    ranges = result.get("ranges", {})
    labels = ranges.get("labels", [])
    t = Table(title="The aerial at the band edges and centres — value (low–high from the stated tolerances)",
              title_justify="left")
    field = eng(site["field_strength_v_per_m"], "V/m")
    for col in ("frequency", "C presented", "eff. height", "R rad", "R loss", "X", "efficiency",
                f"V open at {field}", "P available"):
        t.add_column(col, justify="right")
    for j, label in enumerate(labels):
        f = ranges["frequencies_hz"][j]
        i = _nearest(freqs, f)
        loss = a["conductor_loss_ohm"][i] + a["ground_loss_ohm"][i]
        t.add_row(
            f"{eng(freqs[i], 'Hz')}\n[dim]{escape(label.split(' ', 1)[0])} {escape(label.rsplit(' ', 2)[-2] if 'edge' in label else 'centre')}[/dim]",
            f"{eng(a['capacitance_f'][i], 'F')}\n{span(ranges['capacitance_f'][j], 'F')}",
            f"{eng(a['effective_height_m'][i], 'm')}\n{span(ranges['effective_height_m'][j], 'm')}",
            eng(a["radiation_resistance_ohm"][i], "Ω"),
            f"{eng(loss, 'Ω')}\n{span(ranges['loss_resistance_ohm'][j], 'Ω')}",
            eng(a["reactance_ohm"][i], "Ω"),
            f"{100 * a['efficiency'][i]:.2g} %",
            f"{eng(a['open_circuit_voltage_v'][i], 'V')}\n{span(ranges['open_circuit_voltage_v'][j], 'V')}",
            f"{eng(a['available_power_w'][i], 'W')}\n{span(ranges['available_power_w'][j], 'W')}",
        )
    console.print(t)
    conv = a.get("convergence")
    if conv:
        state = "converged" if conv.get("converged") else "NOT converged"
        console.print(f"full-wave convergence: {conv['pieces']} pieces against twice as many changes the impedance by "
                      f"{100 * conv['relative_change']:.2g} % at {eng(conv['frequency_hz'], 'Hz')} ({state}, "
                      f"tolerance {100 * conv['tolerance']:.2g} %)")
    if a.get("ground_treatment"):
        console.print(f"ground treatment: {escape(a['ground_treatment'])}")
    budget = a.get("loss_budget")
    if budget and labels:
        i = _nearest(freqs, ranges["frequencies_hz"][len(labels) // 2])
        console.print(
            f"loss budget at {eng(freqs[i], 'Hz')}: wire {eng(a['conductor_loss_ohm'][i], 'Ω')}; soil under the aerial "
            f"{eng(budget['soil_under_aerial_ohm'][i], 'Ω')} ({escape(budget['soil_treatment'])}); earth electrode "
            f"{eng(budget['electrode_ohm'][i], 'Ω')} ({escape(budget['electrode_treatment'])})")
    for note in ranges.get("notes", []):
        console.print(f"[dim]{escape(note)}[/dim]")

    earth = result.get("earth", {})
    if earth:
        et = Table(title="Earth system", title_justify="left")
        for col in ("part", "resistance", "method"):
            et.add_column(col)
        for part in earth.get("parts", []):
            et.add_row(part.get("description", ""), rng([part.get("resistance_low_ohm"), part.get("resistance_high_ohm")], "Ω")
                       if part.get("resistance_low_ohm") is not None else eng(part.get("resistance_ohm"), "Ω"),
                       part.get("method", ""))
        et.add_row("[bold]whole earth system[/bold]",
                   f"[bold]{eng(earth.get('resistance_ohm'), 'Ω')}[/bold] ({rng([earth.get('resistance_low_ohm'), earth.get('resistance_high_ohm')], 'Ω')})", "")
        console.print(et)

    wi = result.get("what_if")
    if wi:
        wt = Table(title=f"What would help (at {eng(wi[0]['frequency_hz'], 'Hz')})", title_justify="left")
        for col in ("change", "effective height", "capacitance", "loss resistance", "available power", "change"):
            wt.add_column(col, justify="left" if col == "change" else "right")
        for row in wi:
            wt.add_row(row["change"], eng(row["effective_height_m"], "m"), eng(row["capacitance_f"], "F"),
                       eng(row["loss_resistance_ohm"], "Ω"), eng(row["available_power_w"], "W"), db(row["power_change_db"]))
        console.print(wt)

    _render_tuning(result.get("tuning"), console)
    _render_stations(result.get("stations"), console)
    if result.get("pictures"):
        console.print("pictures: " + ", ".join(result["pictures"]))
    _lines(console, "Warnings", result.get("warnings", []), "yellow")
    _lines(console, "Safety", result.get("cautions", []), "red")


def _render_tuning(tuning, console) -> None:
    if not tuning:
        return
    rows = tuning.get("rows") or []
    band = tuning.get("band", {})
    coil = tuning.get("coil", {})
    title = f"Tuning: {tuning.get('arrangement', '')} coupling, {band.get('name', '')}, coil {eng(coil.get('inductance_h'), 'H')}"
    if coil.get("turns"):
        title += f" ({coil['turns']:.0f} turns"
        if coil.get("winding_length_m"):
            title += f" over {eng(coil['winding_length_m'], 'm')}"
        title += ")"
    if tuning.get("source") == "measured":
        title += " — aerial from the bench measurement"
    if rows:
        t = Table(title=title, title_justify="left")
        cols = [("frequency", "frequency_hz", "Hz"), ("total C at resonance", "total_capacitance_f", "F"),
                ("capacitor setting", "capacitor_setting_f", "F"), ("aerial's share of C", "aerial_share_ratio", "%"),
                ("loaded Q", "loaded_q", ""), ("bandwidth", "bandwidth_hz", "Hz"),
                ("9 kHz away", "rejection_9khz_db", "dB"), ("10 kHz away", "rejection_10khz_db", "dB"),
                ("to detector", "power_transfer_ratio", "%")]
        spacings = [int(round(v / 1e3)) for v in tuning.get("channel_spacings_hz", [9e3, 10e3])]
        cols = [c for c in cols if not c[1].startswith("rejection_") or int(c[1].split("_")[1][:-3]) in spacings]
        for name, _, _ in cols:
            t.add_column(name, justify="right")
        idx = np.unique(np.linspace(0, len(rows) - 1, min(len(rows), 5)).round().astype(int))
        for k in idx:
            r = rows[int(k)]
            cells = []
            for _, key, unit in cols:
                v = r.get(key)
                if v is None:
                    cells.append("—")
                elif unit == "dB":
                    cells.append(f"{v:.1f} dB")
                elif key == "aerial_share_ratio" and r.get("aerial_shunt_capacitance_f") is not None:
                    cells.append(f"{eng(r['aerial_shunt_capacitance_f'], 'F')} ({100 * v:.0f} %)")
                elif unit == "%":
                    cells.append(f"{100 * v:.0f} %")
                elif unit == "":
                    cells.append(f"{v:.3g}")
                else:
                    text = eng(v, unit)
                    if key == "capacitor_setting_f" and not r.get("within_capacitor_range", True):
                        text += " (out of range)"
                    cells.append(text)
            t.add_row(*cells)
        console.print(t)
    cov = tuning.get("coverage", {})
    if cov.get("verdict"):
        style = "green" if cov.get("covered") else "yellow"
        console.print(f"[{style}]Band coverage: {escape(cov['verdict'])}[/{style}]")
    for line in tuning.get("advice", []):
        console.print(f"  → {escape(line)}")
    for line in tuning.get("notes", []):
        console.print(f"[dim]{escape(line)}[/dim]")


VERDICT_STYLES = {"clearly heard": "green", "marginal": "yellow", "heard with interference": "yellow",
                  "swamped": "red", "out of the tuning range": "red", "below the noise": "red", "not heard": "red"}


def _render_stations(stations, console) -> None:
    if not stations:
        return
    t = Table(title="Stations (by day: ground wave; by night: ground and sky wave)", title_justify="left")
    for col in ("station", "frequency", "distance", "field", "at the detector", "S/N", "by day",
                "night field", "by night"):
        t.add_column(col, justify="left" if col in ("station", "by day", "by night") else "right")
    for s in stations:
        verdict = s.get("verdict", "")
        night = s.get("night") or {}
        nv = night.get("verdict", "")
        nfield = eng(night.get("field_v_per_m"), "V/m") if night else "—"
        if night.get("fading"):
            nfield += " fading"
        style = VERDICT_STYLES.get(verdict, "")
        verdict = s.get("verdict_text", verdict)
        nstyle = VERDICT_STYLES.get(nv, "")
        nv = night.get("verdict_text", nv)
        t.add_row(s.get("name", ""), eng(s.get("frequency_hz"), "Hz"), eng(s.get("distance_m"), "m"),
                  eng(s.get("field_v_per_m"), "V/m"), eng(s.get("detector_power_w"), "W"),
                  "—" if s.get("signal_to_noise_db") is None else f"{s['signal_to_noise_db']:.0f} dB",
                  Text(verdict, style=style), nfield, Text(nv or "—", style=nstyle))
    console.print(t)
    for s in stations:
        why = s.get("reason", "")
        if s.get("spills_over"):
            why += ("; " if why else "") + "heard under: " + ", ".join(s["spills_over"])
        if why:
            console.print(f"  {escape(s.get('name', ''))}: {escape(why)}")
        night = s.get("night") or {}
        if night.get("reason") and night.get("verdict") != s.get("verdict"):
            sky = night.get("sky_wave_field_v_per_m")
            console.print(f"  {escape(s.get('name', ''))} by night: {escape(night['reason'])}"
                          + (f" (sky wave {eng(sky, 'V/m')})" if sky else ""))


def render_layout(result: dict, console) -> None:
    console.print(f"[bold]{escape(result['site']['name'])}[/bold]  ({escape(result['site']['file'])})")
    console.print(f"objective: {escape(result.get('objective', ''))}")
    console.print(f"candidates: {result.get('candidates_considered', 0)} considered, "
                  f"{result.get('candidates_refused', 0)} refused for safety or geometry")
    excluded = {k: v for k, v in (result.get("excluded") or {}).items() if v}
    if excluded:
        console.print("[dim]excluded: " + escape(", ".join(f"{k} ({v})" for k, v in excluded.items())) + "[/dim]")
    unit = result.get("score_unit", "")
    t = Table(title="Best safe layouts", title_justify="left")
    for col in ("#", "layout", "wire", "eff. height", "capacitance", f"score [{unit}]" if unit else "score"):
        t.add_column(col, justify="left" if col == "layout" else "right")
    layouts = result.get("layouts", [])
    for i, c in enumerate(layouts, 1):
        t.add_row(str(i), escape(c.get("description", "")), eng(c.get("wire_length_m"), "m"),
                  eng(c.get("effective_height_m"), "m"), eng(c.get("capacitance_f"), "F"), f"{c.get('score', 0):.1f}")
    console.print(t)
    for i, c in enumerate(layouts, 1):
        if c.get("reason"):
            console.print(f"  {i}. {escape(c['reason'])}")
    fw = result.get("full_wave")
    if isinstance(fw, dict) and fw.get("note"):
        console.print(f"full-wave check of the winner: {escape(fw['note'])}")
    for section, title in (("apartment", "Apartment"), ("code_checklist", "Code checklist (typical requirements, not a compliance check)")):
        lines = result.get(section)
        if lines:
            _lines(console, title, lines, "blue")
    if result.get("picture"):
        console.print(f"plan drawing: {escape(str(result['picture']))}")
    _lines(console, "Warnings", result.get("warnings", []), "yellow")
    _lines(console, "Safety", result.get("cautions", []), "red")


COIL_ROWS = (
    ("turns", "turns", ""), ("whole turns", "whole_turns", ""), ("inductance", "inductance_h", "H"),
    ("inductance with whole turns", "inductance_whole_turns_h", "H"), ("winding length", "winding_length_m", "m"),
    ("form diameter", "form_diameter_m", "m"), ("winding diameter (to wire centres)", "winding_diameter_m", "m"),
    ("wire diameter", "wire_diameter_m", "m"), ("strands", "strands", ""), ("strand diameter", "strand_diameter_m", "m"),
    ("wire needed", "wire_length_m", "m"), ("DC resistance", "dc_resistance_ohm", "Ω"),
    ("AC resistance", "ac_resistance_ohm", "Ω"), ("AC/DC resistance", "ac_to_dc_resistance_ratio", ""),
    ("unloaded Q", "unloaded_q", ""), ("at frequency", "frequency_hz", "Hz"),
)


def render_coil(result: dict, console) -> None:
    t = Table(title="Single-layer coil", title_justify="left")
    t.add_column("quantity")
    t.add_column("value", justify="right")
    for label, key, unit in COIL_ROWS:
        value = result.get(key)
        if value is None:
            continue
        t.add_row(label, eng(value, unit) if unit else f"{value:.4g}")
    console.print(t)
    if result.get("converged") is False:
        console.print("[yellow]• the turns search did not converge; treat the figure as approximate[/yellow]")
    for w in result.get("warnings", []):
        console.print(f"[yellow]• {escape(w)}[/yellow]")
