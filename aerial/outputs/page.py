"""One self-contained HTML page to share: the report or the layout plan, with inline SVG pictures.

The page is built from the same result dict as the terminal report and the
JSON (one rendering path per format, no second set of figures). It loads
nothing from the network: the style sheet and the pictures are inside the file,
and its Content-Security-Policy forbids any fetch and any script. Every string
that came from the site file is HTML-escaped, the site file is named without
its folder, and the user's home folder and working folder are removed from any
text, so the page can be passed on as it is. A print style sheet lays it out
on A4 or US Letter.

Sections the page does not know by name (keys other parts of aerial add to the
result later) are still shown, as generic tables and lists.
"""

from __future__ import annotations

import html
import os
from importlib import resources
from pathlib import Path

from aerial.core.version import __version__
from aerial.outputs.terminal import NO_SPREAD, Lengths, eng, quantities_kept_html

#: Content-Security-Policy of the page: nothing may be fetched and no script may run.
CSP = "default-src 'none'; style-src 'unsafe-inline'; img-src data:; base-uri 'none'; form-action 'none'"

#: Unit of a JSON key by its suffix (longest first), for generic tables.
SUFFIX_UNITS = (("_v_per_m", "V/m"), ("_s_m", "S/m"), ("_ohm", "Ω"), ("_hz", "Hz"), ("_db", "dB"), ("_w", "W"),
                ("_v", "V"), ("_f", "F"), ("_h", "H"), ("_m", "m"), ("_ratio", "%"), ("_s", "s"), ("_a", "A"))

#: Symbols beside each station verdict: the word and the shape carry the meaning, the colour only helps.
VERDICT_MARK = {"clearly heard": "●", "marginal": "■", "heard with interference": "▲", "swamped": "▼",
                "out of the tuning range": "◆", "below the noise": "✚", "not heard": "✕"}
#: CSS class of each verdict (the colour only helps; the word and the symbol carry the meaning).
VERDICT_CLASS = {"clearly heard": "good", "marginal": "caution", "heard with interference": "caution"}


def esc(value) -> str:
    """HTML-escaped text of any value (quotes too: safe in attributes).

    >>> esc('<script>alert("x")</script>')
    '&lt;script&gt;alert(&quot;x&quot;)&lt;/script&gt;'
    """
    return html.escape("" if value is None else str(value), quote=True)


def stylesheet() -> str:
    """The page's CSS (package data ``aerial/outputs/page.css``)."""
    return resources.files("aerial.outputs").joinpath("page.css").read_text(encoding="utf-8")


# --------------------------------------------------------------------------- values


def key_label(key: str) -> str:
    """A column heading from a JSON key: the unit suffix dropped, underscores as spaces.

    >>> key_label("detector_power_w")
    'detector power'
    """
    for suffix, _ in SUFFIX_UNITS:
        if key.endswith(suffix):
            key = key[: -len(suffix)]
            break
    return key.replace("_", " ")


def format_value(key: str, value, L: Lengths | None = None) -> str:
    """Plain text of one JSON value, its unit taken from the key's suffix.

    ``L`` (:class:`aerial.outputs.terminal.Lengths`) writes the lengths, station distances and the
    lengths inside free text in its unit system, as the terminal report does; default metres.

    >>> format_value("bandwidth_hz", 8550.0), format_value("share_ratio", 0.25), format_value("x", None)
    ('8.55 kHz', '25 %', '—')
    >>> format_value("field_range_v_per_m", [1e-4, 1e-3]), format_value("frequencies_hz", [7e5, 1.4e6])
    ('100 µV/m – 1 mV/m', '700 kHz, 1.4 MHz')
    >>> us = Lengths("us")
    >>> format_value("effective_height_m", 6.72, us), format_value("distance_m", 95e3, us)
    ('22 ft', '59 mi')
    >>> format_value("change", "raise the wire 3.048 m", us)
    'raise the wire 10 ft'
    """
    if value is None:
        return "—"
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, str):
        return value if L is None else L.text(value)
    if isinstance(value, dict):
        return "; ".join(f"{key_label(k)}: {format_value(k, v, L)}" for k, v in value.items())
    if isinstance(value, (list, tuple)):
        if len(value) == 2 and "range" in key \
                and all(isinstance(v, (int, float)) and not isinstance(v, bool) for v in value):
            return f"{format_value(key, value[0], L)} – {format_value(key, value[1], L)}"
        return ", ".join(format_value(key, v, L) for v in value) or "—"
    unit = next((u for s, u in SUFFIX_UNITS if key.endswith(s)), None)
    v = float(value)
    if unit == "m" and L is not None:
        return L.distance(v) if key.endswith("distance_m") else L(v)
    if unit == "dB":
        return f"{v:+.1f} dB" if "change" in key else f"{v:.1f} dB"
    if unit == "%":
        return f"{100 * v:.3g} %"
    if unit:
        return eng(v, unit)
    return f"{v:.4g}"


def range_text(pair, unit: str) -> str:
    """ "low – high unit" of a (low, high) pair, or an empty string."""
    if not pair or pair[0] is None or pair[1] is None:
        return ""
    lo, hi = eng(pair[0], unit), eng(pair[1], unit)
    return NO_SPREAD if lo == hi else f"{lo} – {hi}"


def length_range_text(pair, L: Lengths) -> str:
    """ "low – high" of a (low, high) pair of lengths [m] in ``L``'s unit system, or an empty string.

    >>> length_range_text([5.59, 7.77], Lengths("us")), length_range_text([5.59, 7.77], Lengths("si"))
    ('18.3 ft – 25.5 ft', '5.59 m – 7.77 m')
    """
    if not pair or pair[0] is None or pair[1] is None:
        return ""
    lo, hi = L(pair[0]), L(pair[1])
    return NO_SPREAD if lo == hi else f"{lo} – {hi}"


# --------------------------------------------------------------------------- building blocks


def table(headers, rows, caption=None, cls="") -> str:
    """An HTML table; every cell is escaped text (a cell may be a (text, css class) pair)."""
    out = [f'<table class="{esc(cls)}">' if cls else "<table>"]
    if caption:
        out.append(f"<caption>{esc(caption)}</caption>")
    out.append("<thead><tr>" + "".join(f'<th scope="col">{esc(h)}</th>' for h in headers) + "</tr></thead><tbody>")
    for row in rows:
        cells = []
        for cell in row:
            text, klass = cell if isinstance(cell, tuple) else (cell, "")
            shown = quantities_kept_html(esc(text))
            cells.append(f'<td class="{esc(klass)}">{shown}</td>' if klass else f"<td>{shown}</td>")
        out.append("<tr>" + "".join(cells) + "</tr>")
    out.append("</tbody></table>")
    return "".join(out)


def dict_rows_table(rows: list, caption=None, skip=(), L: Lengths | None = None) -> str:
    """A table of a list of row dicts: one column per key (in first-seen order), each cell with its unit from the key
    name (lengths in ``L``'s unit system, as :func:`format_value` writes them)."""
    keys = []
    for r in rows:
        for k in r:
            if k not in keys and k not in skip:
                keys.append(k)
    # every cell carries its own unit and prefix ("58.5 pF", "25.4 ft"), as :func:`format_value` writes it: a unit
    # in the heading as well would say "[F]" over picofarads
    headers = [key_label(k) for k in keys]
    return table(headers, [[format_value(k, r.get(k), L) for k in keys] for r in rows], caption)


def bullets(lines, cls="", L: Lengths | None = None) -> str:
    """A list of lines; with ``L`` every length in them is written in its unit system (:meth:`Lengths.text`)."""
    if not lines:
        return ""
    klass = f' class="{esc(cls)}"' if cls else ""
    shown = (str(x) if L is None else L.text(x) for x in lines)
    return f"<ul{klass}>" + "".join(f"<li>{esc(x)}</li>" for x in shown) + "</ul>"


def figure(svg: str | None, caption: str, ident: str) -> str:
    """A figure holding an inline SVG (already text, produced by aerial) and its caption."""
    if not svg:
        return ""
    body = svg[svg.index("<svg"):]  # drop the XML declaration and doctype: inline SVG
    return f'<figure id="{esc(ident)}" class="picture">{body}<figcaption>{esc(caption)}</figcaption></figure>'


def section(ident: str, title: str, body: str, cls: str = "") -> str:
    if not body.strip():
        return ""
    klass = f' class="{esc(cls)}"' if cls else ""
    return f'<section id="{esc(ident)}"{klass}><h2>{esc(title)}</h2>{body}</section>'


def generic_block(key: str, value, L: Lengths | None = None) -> str:
    """Any JSON value as HTML: a list of row dicts as a table, strings as a list, a dict as a definition list
    (lengths in ``L``'s unit system, as :func:`format_value` writes them)."""
    if isinstance(value, list):
        if value and all(isinstance(v, dict) for v in value):
            return dict_rows_table(value, L=L)
        return bullets([format_value(key, v, L) for v in value])
    if isinstance(value, dict):
        items = []
        for k, v in value.items():
            if isinstance(v, list) and v and all(isinstance(x, dict) for x in v):
                items.append(f"<dt>{esc(key_label(k))}</dt><dd>{dict_rows_table(v, L=L)}</dd>")
            else:
                items.append(f"<dt>{esc(key_label(k))}</dt><dd>{esc(format_value(k, v, L))}</dd>")
        return "<dl class=\"facts\">" + "".join(items) + "</dl>" if items else ""
    return f"<p>{esc(format_value(key, value, L))}</p>"


# --------------------------------------------------------------------------- whole page


def scrub_paths(text: str, site_file=None) -> str:
    """Remove the folders of the user's machine (site folder, working folder, home) from ``text``.

    >>> scrub_paths("see " + os.path.join(os.path.expanduser("~"), "x.toml")) == "see ~" + os.sep + "x.toml"
    True
    """
    prefixes = []
    if site_file:
        try:
            prefixes.append((str(Path(site_file).resolve().parent) + os.sep, ""))
        except OSError:
            pass
    prefixes.append((os.getcwd() + os.sep, ""))
    home = os.path.expanduser("~")
    prefixes.append((home + os.sep, "~" + os.sep))
    prefixes.append((home, "~"))
    for prefix, new in sorted(prefixes, key=lambda p: -len(p[0])):
        if len(prefix.strip(os.sep)) > 1:
            text = text.replace(prefix, new).replace(esc(prefix), esc(new))
    return text


def document(title: str, body: str, site_file=None) -> str:
    """The complete HTML document around ``body``: inline style, no script, nothing fetched."""
    page = (
        "<!DOCTYPE html>\n"
        '<html lang="en"><head><meta charset="utf-8">'
        f'<meta http-equiv="Content-Security-Policy" content="{CSP}">'
        '<meta name="viewport" content="width=device-width, initial-scale=1">'
        f'<meta name="generator" content="aerial {esc(__version__)}">'
        f"<title>{esc(title)}</title><style>{stylesheet()}</style></head>\n"
        f"<body><main>{body}</main>"
        f'<footer><p>Made with aerial {esc(__version__)}. Figures are estimates: local electrical codes and licensed '
        "practice govern the installation.</p></footer></body></html>\n"
    )
    return scrub_paths(page, site_file)


def site_file_name(site: dict) -> str:
    """The site file's name without its folder (the page must not show the user's folders)."""
    f = site.get("file")
    return Path(str(f)).name if f else "the built-in example"
