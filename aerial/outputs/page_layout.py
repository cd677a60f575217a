"""The shared page of ``aerial layout --page FILE``: ranked layouts, refusals by cause, code checklist.

Built only from the planner's result dict (:func:`aerial.planner.search.plan_layouts`)
and its plan scene (:func:`aerial.outputs.plan_drawing.build_scene`).
"""

from __future__ import annotations

from aerial.outputs import site_drawings
from aerial.planner.refusals import blocking_sentence, nearest_miss_sentence
from aerial.planner.search import layout_reason
from aerial.outputs.page import (bullets, document, esc, figure, generic_block, key_label, section, site_file_name,
                                 table)
from aerial.outputs.terminal import Lengths, eng, present_wire_words

#: Keys the layout page shows in its own sections; any other key is shown generically.
KNOWN_KEYS = {"site", "objective", "score_unit", "ranking_frequencies_hz", "candidates_considered",
              "candidates_refused", "candidates_refused_safety", "excluded", "rules", "layouts", "apartment",
              "code_checklist", "picture", "full_wave", "warnings", "cautions", "page", "refusals", "score_label",
              "score_meaning", "figures_model", "screening_difference_db", "present_wire",
              "ranking_earth_resistance_ohm"}

#: Which of the planner's rules each exclusion cause applies.
CAUSE_RULE = {"crosses an obstacle": "obstacles", "crosses a telephone/cable line": "obstacles",
              "lead-in or sloping wire passes over a building": "buildings",
              "span passes over a roof without clearance": "buildings"}

#: Cause shown for the power-line refusals (the planner counts them apart).
SAFETY_CAUSE = "inside a power line's fall zone, or crossing a power line (refused for safety)"


def refusal_rows(result, L: Lengths | None = None) -> list[list]:
    """(cause, candidates, rule applied) for every cause with at least one candidate, the safety refusals first
    (lengths in the rules written in ``L``'s unit system; default metres)."""
    rules = {k: v if L is None else L.text(v) for k, v in (result.get("rules") or {}).items()}
    rows = []
    causes = (result.get("refusals") or {}).get("causes")
    if causes is not None:  # by power line and by geometric cause
        for c in causes:
            safety = c["kind"] == "safety"
            rows.append([(c["cause"] + " (refused for safety)", "bad") if safety else c["cause"], c["count"],
                         rules.get("fall_zone" if safety else CAUSE_RULE.get(c["cause"], ""), "")])
        return rows
    if result.get("candidates_refused_safety"):
        rows.append([(SAFETY_CAUSE, "bad"), result["candidates_refused_safety"], rules.get("fall_zone", "")])
    for cause, n in (result.get("excluded") or {}).items():
        if n:
            rows.append([cause, n, rules.get(CAUSE_RULE.get(cause, ""), "")])
    return rows


def _why_lines(refusals: dict, L: Lengths) -> list[str]:
    """The nearest miss and any fixed part that blocks most layouts, in words, lengths as the terminal writes them."""
    lines = []
    if refusals.get("nearest_miss"):
        lines.append("Nearest miss: " + nearest_miss_sentence(refusals["nearest_miss"], L))
    lines += ["Blocking: " + blocking_sentence(b, refusals.get("safety", 0), L,
                                              lambda x, y: f"({L.plain(x)}, {L.plain(y)}) {L.unit}")
              for b in refusals.get("blocking", [])]
    return lines


def _flags(lay) -> str:
    flags = [text for key, text in (("over_roof", "over a roof (-3 dB)"), ("outside_lot", "outside the lot"),
                                    ("outside_model_range", "long for the wavelength: rough")) if lay.get(key)]
    return "; ".join(flags) or "—"


def _lead_in_m(lay) -> float | None:
    """The lead-in as the report measures it, on indoors to the receiver: the wire less its top. [m]"""
    if lay.get("wire_length_m") is None or lay.get("top_length_m") is None:
        return None
    return lay["wire_length_m"] - lay["top_length_m"]


def _layouts_table(result, L: Lengths) -> str:
    unit = result.get("score_unit", "")
    rows = []
    for lay in result.get("layouts", []):
        margin = lay.get("clearance_margin_m")
        rows.append([f"#{lay['rank']}", lay.get("description", ""), L(lay.get("wire_length_m")),
                     L(lay.get("top_length_m")), L(_lead_in_m(lay)),
                     L(lay.get("effective_height_m")), eng(lay.get("capacitance_f"), "F"),
                     "no power line listed" if margin is None else L(margin),
                     f"{lay.get('score', 0):.1f}", _flags(lay)])
    if not rows:
        return "<p><strong>No safe layout was found</strong> among the candidate supports: see the causes below.</p>"
    lays = result.get("layouts", [])
    reasons = [f"#{lay['rank']}: {layout_reason(lay, lays[i + 1] if i + 1 < len(lays) else None, L)}"
               for i, lay in enumerate(lays) if lay.get("reason")]  # the terminal's words, in its unit system
    present = result.get("present_wire")
    if present:  # the terminal's own sentence, wavelength flag included
        reasons.append(present_wire_words(present, result.get("score_label", "score"), unit, L))
    at = f" at {eng(lays[0]['figures_at_hz'], 'Hz', 4)}" if lays and lays[0].get("figures_at_hz") else ""
    return (table(["rank", "layout", "wire", "top", "lead-in", f"effective height{at}", f"capacitance{at}",
                   "margin outside the fall zone", f"score [{unit}]" if unit else "score", "flags"], rows,
                  "Best safe layouts, best first", "wide") + bullets(reasons, "reasons"))


def _summary(result, scene, units: str = "si") -> str:
    site, L = result["site"], Lengths(units)
    layouts = result.get("layouts", [])
    sentence = (f"{result.get('candidates_considered', 0)} candidate layouts considered among the site's supports; "
                f"{result.get('candidates_refused', 0)} refused or excluded "
                f"({result.get('candidates_refused_safety', 0)} of them for power-line safety); "
                f"{len(layouts)} shown.")
    cards = []
    if layouts:
        win = layouts[0]
        cards = [("top-ranked layout", win.get("description", ""), ""),
                 ("effective height" + (f" at {eng(win['figures_at_hz'], 'Hz', 4)}" if win.get("figures_at_hz") else ""),
                  L(win.get("effective_height_m")), ""),
                 ("wire (top and lead-in)", L(win.get("wire_length_m")), ""),
                 ("capacitance", eng(win.get("capacitance_f"), "F"), ""),
                 (f"score [{result.get('score_unit', '')}]", f"{win.get('score', 0):.1f}", "")]
    facts = "".join(f'<div class="figure-card{" wide-card" if i == 0 else ""}"><dt>{esc(w)}</dt><dd>'
                    f'<span class="value{" long" if len(v) > 24 else ""}">{esc(v)}</span></dd></div>'
                    for i, (w, v, _) in enumerate(cards))
    drawings = ""
    if scene:
        sc = site_drawings.layout_scene(scene, layouts)
        drawings = section("drawings", "Where the wire would go",
                           figure(site_drawings.plan_chart(sc, units), "Plan view: the chosen layout (#1, bold) and the "
                                  "runners-up, the overhead lines and their fall zones" if layouts else
                                  "Plan view: the candidate supports, the overhead lines and their fall zones "
                                  "(no safe layout was found)", "plan-view")
                           + (figure(site_drawings.elevation_chart(sc, units), "Side elevation of the chosen layout with "
                                     "the heights of its fixing points", "side-elevation") if layouts else ""))
    return (f'<header id="summary" class="sheet"><h1>{esc(site["name"])} — layout plan</h1>'
            f'<p class="sentence">{esc(sentence)}</p>'
            f'<p class="meta">Site file {esc(site_file_name(site))} · ranked by {esc(L.text(result.get("objective", "")))}</p>'
            + (f'<section id="headline"><h2>Headline figures</h2><dl class="cards">{facts}</dl></section>' if facts
               else "") + drawings + "</header>")


def layout_page(result: dict, scene: dict | None = None, units: str = "si") -> str:
    """The planner's result as one self-contained HTML document (text).

    Parameters
    ----------
    result : dict
        As :func:`aerial.planner.search.plan_layouts` returns it (``aerial layout --json``).
    scene : dict, optional
        The plan scene (:func:`aerial.outputs.plan_drawing.build_scene`) for the drawings.
    units : str
        "si" (metres) or "us" (feet, inches, miles): every length on the page, in its tables, its text and
        its drawings, written as the terminal's listing writes it (:class:`aerial.outputs.terminal.Lengths`).
    """
    L = Lengths(units)
    body = _summary(result, scene, units)
    body += section("layouts", "Ranked layouts", _layouts_table(result, L), "sheet")
    refusals = refusal_rows(result, L)
    body += section("refusals", "Refused and excluded layouts, by cause",
                    (table(["cause", "candidates", "rule applied"], refusals) if refusals
                     else "<p>No candidate was refused or excluded.</p>")
                    + bullets(_why_lines(result.get("refusals") or {}, L))
                    + generic_block("rules", result.get("rules") or {}, L))
    if isinstance(result.get("full_wave"), dict):
        body += section("full-wave", "Full-wave check of the winner", generic_block("full_wave", result["full_wave"], L))
    body += section("apartment", "Apartment", bullets(result.get("apartment", []), L=L))
    body += section("code-checklist", "Code checklist (typical requirements, not a compliance check)",
                    bullets(result.get("code_checklist", []), L=L), "sheet")
    for key, value in result.items():
        if key not in KNOWN_KEYS and value not in (None, [], {}, ""):
            body += section(f"more-{key.replace('_', '-')}", key_label(key).capitalize(), generic_block(key, value, L))
    safety = ""
    if result.get("warnings"):
        safety += '<h3 id="warnings">Warnings</h3>' + bullets(result["warnings"], "warn", L)
    safety += '<h3 id="cautions">Safety cautions</h3>' + bullets(result.get("cautions", []), "caution-list", L)
    body += section("safety", "Warnings and safety", safety)
    return document(f"{result['site']['name']} — aerial layout plan", body, result["site"].get("file"))

