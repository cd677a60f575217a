"""Rich rendering of the result dicts. No computation here: everything comes from the API's dicts.

Every renderer takes ``units``: ``"si"`` or ``"us"`` (lengths in feet and
inches, station distances in miles; the dicts themselves stay SI). Tables go
through :func:`show`, which never cuts a number: on a console marked
``fit_to_content`` (stdout not a terminal) a table widens to its content;
on a fixed width a table that cannot fit is listed row by row.
"""

from __future__ import annotations

import math
import re

import numpy as np
from rich.cells import cell_len
from rich.console import Console, Group
from rich.measure import Measurement
from rich.panel import Panel
from rich.table import Table
from rich.markup import escape
from rich.containers import Lines
from rich.text import DEFAULT_JUSTIFY, DEFAULT_OVERFLOW, Text

from aerial.core.lengthtext import metric_length, text_in
from aerial.core.units import FOOT_M, distance_text, length_text, si_text


# --------------------------------------------------------------------------- keeping numbers with their units

#: The space rich must not break a line at: between a number and its unit, inside a coordinate triple,
#: between the groups of "12 000". It is printed as an ordinary space.
GLUE = "\u00a0"
#: Stands in for :data:`GLUE` while rich wraps (rich takes a no-break space for an ordinary one): one
#: cell wide, not a space, never printed.
_HOLD = "\ue000"
_UNIT = r"(?:[GMkmµunpf]?(?:Hz|F|H|Ω|W|V/m|V|m|s)|cm|dB|%|ft|in|mi|AWG|SWG|turns)"
#: Where rich may break a line in glued text: any run of white space other than :data:`GLUE`.
_WORD_BREAK = re.compile(rf"[^\S{GLUE}]+")
_GLUE_AT = re.compile(rf"(?<=\d) (?={_UNIT}(?![\w/]))|(?<=\d), (?=[-−]?\d)|(?<=\d) (?=\d{{3}}(?![\d.]))")


_QUANTITY = re.compile(rf"(?<![\d.])[-−+]?\d+(?:\.\d+)?(?: \d{{3}})*(?:[–-]\d+(?:\.\d+)?)? {_UNIT}(?![\w/])")


def quantities_kept_html(escaped: str) -> str:
    """HTML text with each number and its unit wrapped in ``<span class="q">`` (kept on one line by the page's CSS).

    >>> quantities_kept_html("36 Ω (17.3 Ω – 45.9 Ω), j28 Ω")
    '<span class="q">36 Ω</span> (<span class="q">17.3 Ω</span> – <span class="q">45.9 Ω</span>), j<span class="q">28 Ω</span>'
    """
    return _QUANTITY.sub(lambda m: f'<span class="q">{m.group(0)}</span>', escaped)


class Glued(Text):
    """Text that rich wraps only at spaces other than :data:`GLUE`, printed with ordinary spaces."""

    def __rich_measure__(self, console, options) -> Measurement:
        plain = self.plain
        known = getattr(self, "_measured", None)  # a table measures each cell several times
        if known is not None and known[0] == plain:
            return known[1]
        widest = max((cell_len(line) for line in plain.splitlines()), default=0)
        words = [w for w in _WORD_BREAK.split(plain) if w]
        measured = Measurement(max((cell_len(w) for w in words), default=widest), widest)
        self._measured = (plain, measured)
        return measured

    def wrap(self, console, width, **options):
        plain = self.plain
        if _HOLD not in plain:
            if "\t" not in plain and all(_fits_unbroken(line, width) for line in plain.split("\n")):
                return self._unbroken(console, width, options)
            if GLUE not in plain:  # nothing to hold together
                return Text.wrap(self, console, width, **options)
        return wrap_held(self, console, width, **options)

    def _unbroken(self, console, width, options) -> Lines:
        """What :meth:`wrap` gives for text whose every line fits: its lines, each justified as rich justifies it."""
        lines = self.split(allow_blank=True)
        justify = options.get("justify") or self.justify or DEFAULT_JUSTIFY
        overflow = options.get("overflow") or self.overflow or DEFAULT_OVERFLOW
        for line in lines:
            if options.get("overflow") != "ignore":  # rich neither justifies nor pads text told to overflow
                Lines([line]).justify(console, width, justify=justify, overflow=overflow)
            if GLUE in line.plain:
                line.plain = line.plain.replace(GLUE, " ")
        return lines


def wrap_held(text: Text, console, width: int, **options) -> Lines:
    """rich's line breaking of ``text`` with its glued spaces held (a copy breaks, then they print as spaces)."""
    held = text.copy()
    held.plain = text.plain.replace(GLUE, _HOLD)
    lines = Text.wrap(held, console, width, **options)
    for line in lines:
        line.plain = line.plain.replace(_HOLD, " ")
    return lines


def _fits_unbroken(line: str, width: int) -> bool:
    """True when rich would neither break ``line`` (no line break in it) at ``width`` nor strip or crop it: it fits,
    and has no white space at its end (which right or centred justification would strip)."""
    return len(line) <= width and cell_len(line) <= width and not line[-1:].isspace()


def glue(text) -> Glued:
    """``text`` (a plain string or a rich Text) with each number kept on one line with its unit.

    Examples
    --------
    >>> glue("at least 20 dB below, at (0.50, -0.50, 1.00) m; 12 000 km").plain.count(GLUE)
    5
    """
    if not isinstance(text, Text):
        text = Text(str(text))
    kept = Glued(_GLUE_AT.sub(lambda m: m.group(0).replace(" ", GLUE), text.plain), style=text.style,
                 justify=text.justify, overflow=text.overflow, no_wrap=text.no_wrap, end=text.end,
                 tab_size=text.tab_size)
    kept.spans = list(text.spans)
    return kept


class ReportConsole(Console):
    """A rich console whose printed strings and table cells keep every number with its unit."""

    def render_str(self, text, **options) -> Text:
        if ":" not in text and "emoji" not in options:  # no emoji code to look for (rich looks at every string)
            options["emoji"] = False
        return glue(super().render_str(text, **options))

    def print(self, *objects, sep: str = " ", end: str = "\n", **options) -> None:
        """As rich prints, with lines of text kept whole (rich joins them into plain Text otherwise)."""
        if objects and all(isinstance(o, (str, Text)) for o in objects):
            words = {k: options[k] for k in ("emoji", "markup", "highlight") if k in options}
            line = glue(Text(sep).join(self.render_str(o, **words) if isinstance(o, str) else o for o in objects))
            line.end = end
            objects = (Group(line),)
        super().print(*objects, sep=sep, end=end, **options)


# --------------------------------------------------------------------------- number formats


def eng(value, unit: str, digits: int = 3) -> str:
    """Engineering notation with an SI prefix: eng(1.8e-10, 'F') -> '180 pF'."""
    if value is None:
        return "—"
    v = float(value)
    return si_text(v, unit, digits) if math.isfinite(v) else "—"


#: Said under a value whose low and high ends round to the same figure.
NO_SPREAD = "no spread"


def rng(pair, unit: str, digits: int = 2) -> str:
    """ "low – high" of a pair; one figure when both ends round to it.

    Two figures for the DC earth resistance's spread over a soil category (a factor of ten); the
    resistance at the working frequency takes three, as the page and its headline give it.
    """
    if pair is None:
        return "—"
    lo, hi = eng(pair[0], unit, digits), eng(pair[1], unit, digits)
    return lo if lo == hi else f"{lo} – {hi}"


def span(pair, unit: str) -> str:
    """A compact dim range "(5.7–7.7 m)" under a value."""
    if pair is None or pair[0] is None or pair[1] is None:
        return ""
    lo, hi = eng(pair[0], unit, 3), eng(pair[1], unit, 3)
    if lo == hi:
        return f"[dim]({NO_SPREAD})[/dim]"
    lo_num, lo_unit = lo.rsplit(" ", 1)
    hi_num, hi_unit = hi.rsplit(" ", 1)
    text = f"({lo_num}–{hi_num} {hi_unit})" if lo_unit == hi_unit else f"({lo}–{hi})"
    return f"[dim]{text}[/dim]"


class Lengths:
    """Lengths for people in one unit system: ``"si"`` (metres) or ``"us"`` (feet, inches, miles).

    Examples
    --------
    >>> Lengths("us")(6.72), Lengths("us")(0.0016), Lengths("us").distance(95e3)
    ('22 ft', '0.063 in', '59 mi')
    >>> Lengths("us").text("raise the wire 3 m; add 10 m; 2 mm2 wire at 1 m·pF and 5 mV/m")
    'raise the wire 9.84 ft; add 32.8 ft; 2 mm2 wire at 1 m·pF and 5 mV/m'
    >>> Lengths("us").text("paths of 50–12 000 km; a 2-4 m pole")
    'paths of 31.1–7460 mi; a 6.56–13.1 ft pole'
    >>> Lengths("si")(6.72), Lengths("si").distance(95e3), Lengths("si").distance(2e6)
    ('6.72 m', '95 km', '2000 km')
    """

    #: A metric length written in free text (the fallback for text that does not keep its lengths).
    PATTERN = metric_length()

    def __init__(self, system: str = "si"):
        if system not in ("si", "us"):
            raise ValueError(f"'{system}' is not a valid unit system, must be one of 'si', 'us'")
        self.us = system == "us"

    def __call__(self, metres, digits: int = 3) -> str:
        """A length: '6.72 m' or '22 ft' (below a foot: inches)."""
        if metres is None or not math.isfinite(float(metres)):
            return "—"
        return length_text(float(metres), digits, "us" if self.us else "si")

    def distance(self, metres) -> str:
        """A station distance: miles, or km (metres below 1 km; never megametres)."""
        if metres is None:
            return "—"
        return distance_text(metres, "us" if self.us else "si")

    def plain(self, metres, decimals: int = 1) -> str:
        """A bare number in the system's main unit (m or ft), for coordinates."""
        return f"{float(metres) / (FOOT_M if self.us else 1.0):.{decimals}f}"

    @property
    def unit(self) -> str:
        return "ft" if self.us else "m"

    def span(self, pair) -> str:
        """A dim range '(5.7–7.7 m)' under a value."""
        if not self.us:
            return span(pair, "m")
        if pair is None or pair[0] is None or pair[1] is None:
            return ""
        lo, hi = self(pair[0]), self(pair[1])
        if lo == hi:
            return f"[dim]({NO_SPREAD})[/dim]"
        same = lo.rsplit(" ", 1)[1] == hi.rsplit(" ", 1)[1]
        return f"[dim]({lo.rsplit(' ', 1)[0] if same else lo}–{hi})[/dim]"

    def text(self, words) -> str:
        """Free text with every metric length in it written in this system (unchanged under "si").

        A :class:`~aerial.core.lengthtext.LengthText` is written from its exact lengths, so a figure in a
        sentence is the figure of the tables; other text is read back from its digits.
        """
        return text_in(words, "us" if self.us else "si")


FIT_LIMIT = 200
"""Widest line [characters] a table takes when the output is piped with no width asked for."""


def show(console, table: Table) -> None:
    """Print a table without cutting anything.

    On a console marked ``fit_to_content`` the console widens to the table's
    natural width for this one table, up to :data:`FIT_LIMIT` characters; a wider
    table has its columns shared out over that width (long texts wrap), and only a
    table whose words alone are wider keeps its natural width. Otherwise a table wider than the console
    gives each column at least its longest word (a number with its unit is one
    word) and shares the rest by what each column would still use; when even
    that is wider than the console, the rows are listed one field per line.
    """
    for column in table.columns:
        column.overflow = "fold"  # a last resort: a squeezed cell folds, never ends in "…"
    _render_cells(console, table)
    widths = _natural_widths(console, table)
    natural = sum(widths) + table._extra_width
    if getattr(console, "fit_to_content", False):
        if natural <= console.width:
            _print_at(console, table, widths)
            return
        old = console.width
        # up to FIT_LIMIT the table keeps its natural width; past it (long verdict texts) its
        # columns are shared out over FIT_LIMIT and long texts wrap, unless even its words cannot fit
        console.width = FIT_LIMIT
        try:
            if natural <= FIT_LIMIT or not _share_width(console, table, natural):
                console.width = natural
                _print_at(console, table, widths)
            else:
                console.print(table)
        finally:
            console.width = old
        return
    if natural > console.width:
        if _share_width(console, table, natural):
            console.print(table)
        else:
            _list_rows(console, table)
        return
    _print_at(console, table, widths)


def _print_at(console, table: Table, widths: list[int]) -> None:
    """Print a table that fits with each column at its natural width (padding included), as rich would.

    Rich measures every cell again to lay out the table; given its columns' widths it does not. (A table
    stretched to the console's width is left to rich: its stretching reads the columns' own widths.)
    """
    if table.expand or any(column.ratio is not None for column in table.columns):
        console.print(table)
        return
    for index, (column, width) in enumerate(zip(table.columns, widths)):
        column.width = width - table._get_padding_width(index)
    console.print(table)


def _render_cells(console, table: Table) -> None:
    """Turn the table's markup strings into text once, as rich would each time it measures or draws them.

    Rich parses a string cell's markup afresh at every measurement and again to draw it; the
    text it gets is the same each time, so it is made here once (an empty cell stays "").
    """
    highlight = table.highlight
    for column in table.columns:
        if isinstance(column.header, str) and column.header:
            column.header = console.render_str(column.header, highlight=highlight)
        column._cells = [console.render_str(cell, highlight=highlight) if isinstance(cell, str) and cell else cell
                         for cell in column._cells]


def _natural_widths(console, table: Table) -> list[int]:
    """Each column's width with every cell on one line, padding included, as rich measures it.

    Rich measures a column through a padding object made for each of its cells; a column with
    no size limits of its own is its widest cell plus its padding, taken here from the cells.
    """
    options = console.options.update_width(100_000 - table._extra_width)
    widths = []
    for index, column in enumerate(table.columns):
        parts = [*([column.header] if table.show_header else []), *column._cells,
                 *([column.footer] if table.show_footer else [])]
        if table.collapse_padding or not parts or (column.width, column.min_width, column.max_width) != (None,) * 3:
            widths.append(table._measure_column(console, options, column).maximum)
            continue
        pad = table._get_padding_width(index)
        widths.append(max(_padded(_widest(console, options, part), pad) for part in parts))
    return widths


def _widest(console, options, cell) -> int:
    """A cell's width on one line, as rich's measurement gives it (read directly from glued text)."""
    if type(cell) is Glued:
        return min(max(cell.__rich_measure__(console, options).maximum, 0), options.max_width)
    return Measurement.get(console, options, cell).maximum


def _padded(width: int, pad: int) -> int:
    """A cell's width with its padding, as rich's measurement gives it (nothing when under one cell)."""
    return width + pad if width + pad >= 1 else 0


def _share_width(console, table: Table, natural: int) -> bool:
    """Set each column's width so that the table fills the console; False when its words cannot fit.

    Each column gets its longest word (rich's own squeeze can fold a header or a figure below it)
    and the room left is shared in proportion to what each column would still use.
    """
    options = console.options.update_width(100_000)
    ranges = []
    for column in table.columns:
        parts = [column.header, *column.cells]
        sizes = [Measurement.get(console, options, part) for part in parts if part is not None and part != ""]
        ranges.append((max((m.minimum for m in sizes), default=1), max((m.maximum for m in sizes), default=1)))
    overhead = natural - sum(hi for _, hi in ranges)
    room = console.width - overhead - sum(lo for lo, _ in ranges)
    if room < 0:
        return False
    want = [hi - lo for lo, hi in ranges]
    total = sum(want) or 1
    widths = [lo + int(room * w / total) for (lo, _), w in zip(ranges, want)]
    for column, width in zip(table.columns, widths):
        column.width = max(width, 1)
    return True


def _list_rows(console, table: Table) -> None:
    """A table too wide for the console, one field per line; a long field goes on indented under itself."""
    if table.title:
        console.print(Text(str(table.title), style="italic"))
    headers = [console.render_str(h) if isinstance(h, str) else h if isinstance(h, Text) else Text(str(h))
               for h in (c.header for c in table.columns)]
    cells = [list(c.cells) for c in table.columns]
    for row in range(table.row_count):
        for col, header in enumerate(headers):
            cell = cells[col][row]
            value = console.render_str(cell) if isinstance(cell, str) else cell
            if not isinstance(value, Text):
                value = Text(str(value))
            label = header + Text(": ") if header.plain.strip() else Text("")
            body = glue(label + Text(" ").join(value.split("\n")))
            for i, line in enumerate(body.wrap(console, max(console.width - 6, 20))):
                console.print(Text("• " if col == 0 and i == 0 else "      " if i else "    ") + line)


def percent(ratio) -> str:
    """A ratio as a percentage, two figures below 10 % (a small share is not "0 %").

    >>> percent(0.0042), percent(0.016), percent(0.43), percent(1.0)
    ('0.42 %', '1.6 %', '43 %', '100 %')
    """
    p = 100.0 * float(ratio)
    return f"{p:.0f} %" if abs(p) >= 9.95 or p == 0 else f"{float(f'{p:.2g}'):g} %"


def db(x) -> str:
    if x is None:
        return "—"
    return f"{(round(float(x), 1) or 0.0):+.1f} dB"  # never "-0.0 dB"


def effective_length_words(part: dict, L) -> str:
    """The earth table's effective-length cell, said against the electrode's own length.

    ``L`` formats a length in metres as text.

    A rod's effective length is usually far beyond any rod one can drive, so a
    bare "16.5 m" beside a 2.4 m rod misleads; it is said as how far a longer
    rod would keep helping. A buried wire or pipe is said the same way when it is
    shorter than its effective length (a bare "101 m" beside an 18 m pipe reads as
    nonsense), and as the part of it that counts when it is longer.
    """
    le = part.get("effective_length_m")
    if le is None:
        return "—"
    own = part.get("length_m")
    if part.get("kind") != "rods":
        if own is None:
            return L(le)
        if le >= own:
            return f"all of it; a longer one helps up to about {L(le)}"
        return f"about {L(le)} of it; more adds little"
    if own is not None and le <= own:
        return "a longer rod would not help here"
    return f"a longer rod helps up to about {L(le)}"


def band_point_words(label: str) -> str:
    """A band point's short name under its frequency: the band (without "broadcast") and where in it.

    >>> band_point_words("MF broadcast low edge"), band_point_words("HF 120 m centre")
    ('MF low', 'HF 120 m centre')
    """
    for ending, where in ((" low edge", "low"), (" high edge", "high"), (" centre", "centre")):
        if label.endswith(ending):
            band = label[: -len(ending)]
            return f"{band.removesuffix(' broadcast')} {where}"
    return label


def centre_index(result: dict) -> int:
    """Index in ``frequencies_hz`` of the frequency the earth table, the what-if table and the loss budget share."""
    freqs = result["frequencies_hz"]
    fc = (result.get("earth") or {}).get("centre_frequency_hz")
    if fc is None:
        fc = (result.get("what_if") or [{}])[0].get("frequency_hz")
    if fc is None:
        return len(freqs) // 2
    return _nearest(freqs, fc)


def _nearest(freqs, f):
    freqs = np.asarray(freqs, float)
    return int(np.argmin(np.abs(freqs - f)))


# --------------------------------------------------------------------------- pieces


def _geometry_table(geo: dict, L: Lengths) -> Table:
    t = Table(title="Wires as aerial understood them", title_justify="left")
    for col in ("wire", "role", "length", "size", "lowest", "highest", f"points (x, y, height) {L.unit}"):
        t.add_column(col, overflow="fold")
    for w in geo["wires"]:
        pts = w["points_m"]
        zs = [p[2] for p in pts]
        # a long polyline shows its ends and how many points lie between (the JSON has them all)
        shown = pts if len(pts) <= 3 else [pts[0], f"{len(pts) - 2} points", pts[-1]]
        text = " → ".join(p if isinstance(p, str) else "(" + ", ".join(L.plain(v, 2) for v in p) + ")" for p in shown)
        t.add_row(escape(w["name"]), w["role"], L(w["length_m"]), escape(L.text(w["size"])), L(min(zs)), L(max(zs)),
                  text)
    return t


def _summary_line(geo: dict, L: Lengths) -> str:
    feed = ", ".join(L.plain(v, 2) for v in geo["feed_m"])
    parts = [
        f"aerial + lead-in {L(geo['total_length_m'])}",
        f"highest {L(geo['max_height_m'])}",
        f"mean height {L(geo['mean_height_m'])}",
        f"receiver terminals at ({feed}) {L.unit}",
    ]
    wires = geo.get("wires") or []
    if wires:
        lead = sum(w.get("length_m", 0.0) for w in wires if w.get("role") == "earth lead")
        counterpoise = [w.get("length_m", 0.0) for w in wires if w.get("role") == "counterpoise"]
        if lead:
            parts.append(f"earth lead {L(lead)}")
        if counterpoise:
            parts.append(f"counterpoise {len(counterpoise)} × {L(max(counterpoise))}" if len(counterpoise) > 1
                         else f"counterpoise {L(counterpoise[0])}")
    elif geo.get("earth_lead_length_m"):
        parts.append(f"earth lead {L(geo['earth_lead_length_m'])}")
    shape = geo.get("shape")
    if isinstance(shape, dict):
        shape = shape.get("kind")
    if shape:
        parts.append(f"shape: {shape}")
    return " · ".join(parts)


def _lines(console, title, lines, style, L: Lengths | None = None):
    if not lines:
        return
    lines = [L.text(x) if L is not None else str(x) for x in lines]
    body = Text()
    for i, line in enumerate(lines):
        if i:
            body.append("\n")
        body.append("• " + line)
    if len(title) + 6 > console.width:  # rich would cut a title too long for the border
        console.print(Text(title, style="bold"))
        title = None
    console.print(Panel(glue(body), title=title, title_align="left", border_style=style))


# --------------------------------------------------------------------------- commands


def render_check(summary: dict, console, units: str = "si") -> None:
    L = Lengths(units)
    site = summary["site"]
    console.print(f"[bold]{escape(site['name'])}[/bold]  ({escape(site['file'])})")
    show(console, _geometry_table(summary["geometry"], L))
    console.print(escape(_summary_line(summary["geometry"], L)))
    # four figures: the LF broadcast band's edges are 148.5 and 283.5 kHz
    bands = ", ".join(f"{b['name']} {eng(b['from_hz'], 'Hz', 4)}–{eng(b['to_hz'], 'Hz', 4)}" for b in summary["bands"])
    earth = ", ".join(kind.replace("_", " ") for kind in summary["earth"]) or "none"
    console.print(f"bands: {bands} ({summary['frequency_count']} frequencies) · earth: {escape(earth)} · "
                  f"stations: {summary['stations']}")
    _lines(console, "Warnings", summary.get("warnings", []), "yellow", L)
    console.print("[green]The site file is valid.[/green]")


def _building_line(building, console, L) -> None:
    """One line naming the building the wire hangs on, when the site describes one."""
    if building:
        console.print(f"building: {escape(building['construction'])}, {L(building['height_m'])} high "
                      f"(from the {escape('[' + building['source'] + ']')} table)")


def render_report(result: dict, console, units: str = "si") -> None:
    L = Lengths(units)
    site = result["site"]
    geo = result["geometry"]
    a = result["aerial"]
    console.print(f"[bold]{escape(site['name'])}[/bold]  ({escape(site['file'])})")
    console.print(escape(_summary_line(geo, L)))
    console.print(f"model: {escape(a['model'])}")
    _building_line(result.get("building"), console, L)
    show(console, _geometry_table(geo, L))

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
            f"{eng(freqs[i], 'Hz', 4)}\n[dim]{escape(band_point_words(label))}[/dim]",
            f"{eng(a['capacitance_f'][i], 'F')}\n{span(ranges['capacitance_f'][j], 'F')}",
            f"{L(a['effective_height_m'][i])}\n{L.span(ranges['effective_height_m'][j])}",
            eng(a["radiation_resistance_ohm"][i], "Ω"),
            f"{eng(loss, 'Ω')}\n{span(ranges['loss_resistance_ohm'][j], 'Ω')}",
            eng(a["reactance_ohm"][i], "Ω"),
            f"{100 * a['efficiency'][i]:.2g} %",
            f"{eng(a['open_circuit_voltage_v'][i], 'V')}\n{span(ranges['open_circuit_voltage_v'][j], 'V')}",
            f"{eng(a['available_power_w'][i], 'W')}\n{span(ranges['available_power_w'][j], 'W')}",
        )
    show(console, t)
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
        i = centre_index(result)
        console.print(
            f"loss budget at {eng(freqs[i], 'Hz', 4)}: wire {eng(a['conductor_loss_ohm'][i], 'Ω')}; soil under the aerial "
            f"{eng(budget['soil_under_aerial_ohm'][i], 'Ω')} ({escape(budget['soil_treatment'])}); earth electrode "
            f"{eng(budget['electrode_ohm'][i], 'Ω')} ({escape(budget['electrode_treatment'])})")
    for note in ranges.get("notes", []):
        console.print(f"[dim]{escape(L.text(note))}[/dim]")

    earth = result.get("earth", {})
    if earth:
        et = Table(title="Earth system", title_justify="left")
        fc = earth.get("centre_frequency_hz")
        at = f"at {eng(fc, 'Hz', 4)}" if fc else "at radio frequency"
        for col in ("part", "resistance (DC)", f"impedance {at}", "effective length", "method"):
            et.add_column(col)
        for part in earth.get("parts", []):
            z = part.get("impedance_at_centre_ohm")
            zs = f"{eng(z[0], 'Ω')} {'+' if z[1] >= 0 else '−'} j{eng(abs(z[1]), 'Ω')}" if z else ""
            if z and part.get("resistance_range_at_centre_ohm"):
                zs += f"\n[dim](R {rng(part['resistance_range_at_centre_ohm'], 'Ω', 3)})[/dim]"
            et.add_row(escape(L.text(part.get("description", ""))), rng([part.get("resistance_low_ohm"), part.get("resistance_high_ohm")], "Ω")
                       if part.get("resistance_low_ohm") is not None else eng(part.get("resistance_ohm"), "Ω"),
                       zs, effective_length_words(part, L), escape(part.get("method", "")))
        zt = earth.get("impedance_ohm")
        zt_s = ""
        if zt is not None and fc:
            j = int(np.argmin(np.abs(np.asarray(result["frequencies_hz"]) - fc)))
            zt_s = f"[bold]{eng(zt[j][0], 'Ω')} {'+' if zt[j][1] >= 0 else '−'} j{eng(abs(zt[j][1]), 'Ω')}[/bold]"
            if earth.get("resistance_range_at_centre_ohm"):
                zt_s += f"\n(R {rng(earth['resistance_range_at_centre_ohm'], 'Ω', 3)})"
        et.add_row("[bold]whole earth system[/bold]",
                   f"[bold]{eng(earth.get('resistance_ohm'), 'Ω')}[/bold] ({rng([earth.get('resistance_low_ohm'), earth.get('resistance_high_ohm')], 'Ω')})",
                   zt_s, "", "")
        show(console, et)
        if earth.get("resistance_range_at_centre_ohm"):
            console.print("[dim]R low–high under an impedance: its resistance with the soil anywhere between its "
                          "category's bounds, by the same model as the impedance above it.[/dim]")

    wi = result.get("what_if")
    if wi:
        model = "" if a["model"].startswith("closed form") else ", by the closed forms: compare the rows, not the main table"
        wt = Table(title=f"What would help (at {eng(wi[0]['frequency_hz'], 'Hz', 4)}{model})", title_justify="left")
        for col in ("change", "effective height", "capacitance", "loss resistance", "available power", "change"):
            wt.add_column(col, justify="left" if col == "change" else "right")
        for row in wi:
            wt.add_row(escape(L.text(row["change"])), L(row["effective_height_m"]), eng(row["capacitance_f"], "F"),
                       eng(row["loss_resistance_ohm"], "Ω"), eng(row["available_power_w"], "W"), db(row["power_change_db"]))
        show(console, wt)
        for row in wi:
            if row.get("note"):
                console.print(f"[dim]{escape(L.text(row['change']))}: {escape(L.text(row['note']))}[/dim]")

    _render_tuning(result.get("tuning"), console, L)
    _render_stations(result.get("stations"), console, L)
    _render_station_design(result.get("tuning"), console)
    if result.get("pictures"):
        console.print("pictures: " + escape(", ".join(result["pictures"])))
    _lines(console, "Warnings", result.get("warnings", []), "yellow", L)
    _lines(console, "Safety", result.get("cautions", []), "red", L)


def tuning_cell_words(row, key):
    """A tuning-table cell said in words when its figure would mislead, else None.

    Where no positive capacitor setting resonates the tank, the setting, the aerial's share,
    loaded Q, bandwidth, rejections and power transfer are shown as "—" (the reason is printed
    under the table); a loaded Q below 1 is "< 1 (no useful resonance)"; a bandwidth wider than
    the search window is a lower bound ("≥ …").
    """
    if row.get("resonates_with_positive_capacitor") is False:
        if key == "capacitor_setting_f":
            return "— (cannot tune)"
        if key not in ("frequency_hz", "total_capacitance_f"):
            return "—"
        return None
    c_aerial = row.get("aerial_shunt_capacitance_f")
    if key == "aerial_share_ratio" and c_aerial is not None and c_aerial < 0:
        return f"{eng(c_aerial, 'F')} (reflects inductance)"
    if key == "loaded_q" and row.get("loaded_q") is not None and row["loaded_q"] < 1.0:
        return "< 1 (no useful resonance)"
    if key == "bandwidth_hz" and row.get("bandwidth_hz") is not None and row.get("bandwidth_is_lower_bound"):
        return f"≥ {eng(row['bandwidth_hz'], 'Hz')}"
    return None


def _render_tuning(tuning, console, L: Lengths) -> None:
    if not tuning:
        return
    rows = tuning.get("rows") or []
    band = tuning.get("band", {})
    coil = tuning.get("coil", {})
    title = f"Tuning: {coupling_words(tuning)}, {band.get('name', '')}, coil {eng(coil.get('inductance_h'), 'H')}"
    if coil.get("turns"):
        title += f" ({coil['turns']:.0f} turns"
        if coil.get("winding_length_m"):
            title += f" over {L(coil['winding_length_m'])}"
        title += ")"
    if coil.get("self_capacitance_f"):
        title += (f", self-capacitance {eng(coil['self_capacitance_f'], 'F')} (Medhurst; in the total C), "
                  f"self-resonance {eng(coil.get('self_resonance_hz'), 'Hz')}")
    detector = detector_tap_words(tuning)
    if detector:
        title += f", {detector}"
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
            t.add_row(*[tuning_cell_text(r, key, unit) for _, key, unit in cols])
        show(console, t)
        stuck = untunable_words(rows)
        if stuck is not None:
            console.print(f"[yellow]{escape(L.text(stuck))}[/yellow]")
    cov = tuning.get("coverage", {})
    if cov.get("verdict"):
        style = "green" if cov.get("covered") else "yellow"
        console.print(f"[{style}]Band coverage: {escape(L.text(cov['verdict']))}[/{style}]")
    for line in tuning.get("advice", []):
        console.print(f"  → {escape(L.text(line))}")
    for line in tuning.get("notes", []):
        console.print(f"[dim]{escape(L.text(line))}[/dim]")


def coupling_words(tuning: dict) -> str:
    """The tuning's coupling in words, with its part when the band design chose it, the same in the report and on
    the page.

    >>> coupling_words({"arrangement": "coil tap", "coupling_designed": True, "designed_tap_ratio": 0.1})
    'coil tap coupling (aerial at 0.10 of the turns, designed)'
    """
    text = f"{tuning.get('arrangement', '')} coupling"
    if tuning.get("coupling_designed") and tuning.get("designed_tap_ratio") is not None:
        text += f" (aerial at {tuning['designed_tap_ratio']:.2f} of the turns, designed)"
    elif tuning.get("coupling_designed") and tuning.get("designed_series_capacitance_f") is not None:
        text += f" ({eng(tuning['designed_series_capacitance_f'], 'F')}, designed)"
    return text


def detector_tap_words(tuning: dict) -> str:
    """Where the tuning's detector joins the coil, in words, the same in the report and on the page; "" for
    the top of the coil as the site leaves it (the usual case, not said).

    >>> detector_tap_words({"detector_tap_ratio": 0.2, "detector_tap_designed": True})
    'detector at 0.20 of the turns (designed)'
    >>> detector_tap_words({"detector_tap_ratio": 1.0})
    ''
    """
    tap = tuning.get("detector_tap_ratio")
    designed = bool(tuning.get("detector_tap_designed"))
    if tap is None or (tap >= 1.0 and not designed):
        return ""
    where = "detector across the whole coil" if tap >= 1.0 else f"detector at {tap:.2f} of the turns"
    return where + (" (designed)" if designed else "")


def untunable_words(rows: list) -> str | None:
    """Where the tuning table's coil cannot be tuned at all, said at the top of that stretch.

    The reason is quoted at the highest such frequency, where the aerial's excess over the
    capacitance needed is plain: at the first one the two are nearly equal, since that is where
    tuning ends. Where the rows that cannot be tuned come in more than one stretch (a long wire
    tunes again between its resonances), each stretch is named. None when every row resonates.

    >>> rows = [{"frequency_hz": f, "resonates_with_positive_capacitor": 7e5 < f < 1.6e6,
    ...          "reason": "cannot tune here: the aerial alone gives 65 pF"} for f in (5.2e5, 6e5, 1e6, 1.7e6)]
    >>> untunable_words(rows)
    'From 520 kHz to 600 kHz and from 1.7 MHz up: cannot tune here; at 1.7 MHz the aerial alone gives 65 pF'
    """
    stretches: list[list] = []
    previous = False
    for r in rows:
        stuck_here = r.get("resonates_with_positive_capacitor") is False
        if stuck_here:
            if previous:
                stretches[-1].append(r)
            else:
                stretches.append([r])
        previous = stuck_here
    if not stretches:
        return None
    last = stretches[-1][-1]
    reason = str(last.get("reason") or "cannot tune here")
    head, _, why = reason.partition(": ")
    at = eng(last.get("frequency_hz"), "Hz")
    if len(stretches) == 1 and len(stretches[0]) == 1:
        return f"At {at}: {reason}"
    where = []
    for i, s in enumerate(stretches):
        low, high = eng(s[0].get("frequency_hz"), "Hz"), eng(s[-1].get("frequency_hz"), "Hz")
        if i == len(stretches) - 1 and s[-1] is rows[-1]:
            where.append(f"from {low} up")
        elif len(s) == 1:
            where.append(f"at {low}")
        else:
            where.append(f"from {low} to {high}")
    said = " and ".join(where)
    said = said[0].upper() + said[1:]
    return f"{said}: {reason}" if not why else f"{said}: {head}; at {at} {why}"


def tuning_cell_text(row: dict, key: str, unit: str) -> str:
    """The text of one tuning-table cell, the same in the terminal report and on the shared page.

    Words where a figure would mislead (:func:`tuning_cell_words`), "—" for a missing figure,
    rejections in dB, the rest through :func:`_tuning_cell`.
    """
    special = tuning_cell_words(row, key)
    if special is not None:
        return special
    v = row.get(key)
    if v is None:
        return "—"
    if unit == "dB":
        return f"{v:.1f} dB"
    return _tuning_cell(row, key, unit, v)


def _tuning_cell(r: dict, key: str, unit: str, v: float) -> str:
    """One ordinary cell of the tuning table (the cells said in words are :func:`tuning_cell_words`').

    A negative capacitor setting (the aerial alone is more capacitance than the tank needs) and a share
    of more than the whole are said as such; a setting outside the capacitor's range is marked. A loaded
    Q below 1 never reaches here, and its bandwidth is a true figure (searched out to three times the
    frequency), marked "≥" only when an edge lay beyond the search.
    """
    if key == "capacitor_setting_f" and v < 0:
        return f"none: the aerial alone is {eng(-v, 'F')} too much"
    if key == "aerial_share_ratio" and r.get("aerial_shunt_capacitance_f") is not None:
        c = r["aerial_shunt_capacitance_f"]
        return f"{eng(c, 'F')} ({'more than the total' if v > 1 else percent(v)})"
    if unit == "%":
        return percent(v)
    if unit == "":
        return f"{v:.3g}"
    text = eng(v, unit)
    if key == "capacitor_setting_f" and not r.get("within_capacitor_range", True):
        text += " (out of range)"
    return text


VERDICT_STYLES = {"clearly heard": "green", "marginal": "yellow", "heard with interference": "yellow",
                  "swamped": "red", "out of the tuning range": "red", "below the noise": "red", "not heard": "red"}


def design_capacitor_words(r, design) -> str:
    """The variable capacitor a design row uses, in words: the site's own, or the standard size suggested."""
    if r.get("standard_capacitor_max_f") is not None and not r.get("fits_your_capacitor"):
        return f"{eng(r['standard_capacitor_min_f'], 'F')}–{eng(r['standard_capacitor_max_f'], 'F')}"
    if r.get("fits_your_capacitor") or r is design.get("current") or r.get("as_wired"):
        return "assumed" if design.get("capacitor_assumed") else "yours"
    return "—"


def design_shown_rows(design) -> list:
    """(label, row, capacitor words) of the stations' tuning table: the parts as wired, the best with your
    coil and capacitor, the suggestion with a standard capacitor, then the best of each other coupling."""
    best = {}
    for r in design.get("tradeoff") or []:
        b = best.get(r["arrangement"])
        if b is None or (r["meets_margin"], r["weakest_detector_power_w"]) > (b["meets_margin"], b["weakest_detector_power_w"]):
            best[r["arrangement"]] = r
    assumed = bool(design.get("capacitor_assumed"))  # the site gave no parts: a common capacitor was assumed
    own = "assumed" if assumed else "yours"
    # the parts the band design chose (its detector tap, with the coil): "as designed", never the site's own
    first = "as designed" if design.get("detector_tap_designed") else ("as assumed" if assumed else "as wired")
    shown = [(first, design["current"],
              own if design.get("capacitor_given", True) else "not given")]
    chosen, suggested = design["chosen"], design.get("suggested") or design["chosen"]
    if not chosen.get("as_wired") and chosen.get("fits_your_capacitor"):
        shown.append(("assumed parts" if assumed else "your parts", chosen, own))
    if not suggested.get("as_wired"):
        shown.append(("suggested", suggested, design_capacitor_words({**suggested, "fits_your_capacitor": False},
                                                                    design)))
    seen = {(r["setting"], r["detector_tap_ratio"]) for _, r, _ in shown}
    shown += [("other", r, design_capacitor_words(r, design)) for r in best.values()
              if (r["setting"], r["detector_tap_ratio"]) not in seen]
    return shown


def design_power_words(r) -> str:
    p = r["weakest_detector_power_w"]
    name = r["weakest_station"]
    return f"out of reach ({name})" if p <= 0 else f"{eng(p, 'W')} ({name})"


def design_separation_words(r) -> str:
    sep = r.get("worst_separation_db")
    if sep is None:
        return "no other audible"
    text = f"{sep:.0f} dB"
    if r.get("separated") and r.get("inaudible"):
        return text + " (too faint)"
    return text + ("" if r["meets_margin"] else " (short)")


def _render_station_design(tuning, console) -> None:
    design = (tuning or {}).get("station_design")
    if not design:
        return
    spacing = design.get("channel_spacing_hz", 9e3) / 1e3
    t = Table(title=f"Tuning for your stations (others kept {design['margin_db']:g} dB down; "
              "best of each coupling)", title_justify="left")
    for col in ("", "coupling", "detector tap", "capacitor", "weakest station at the detector", "worst separation",
                f"{spacing:.0f} kHz away"):
        t.add_column(col, justify="left" if col in ("", "coupling", "capacitor") else "right")
    for label, r, cap in design_shown_rows(design):
        t.add_row(label, escape(r["setting"]), f"{r['detector_tap_ratio']:.2f}", cap,
                  escape(design_power_words(r)), design_separation_words(r), f"{r['adjacent_rejection_db']:.1f} dB")
    show(console, t)
    for line in design.get("summary", []):
        console.print(f"  → {escape(line)}")
    for line in design.get("notes", []):
        console.print(f"[dim]{escape(line)}[/dim]")
    heading = None
    for r in design.get("remedies", []):
        if r.get("applies_to_text") and r["applies_to_text"] != heading:
            heading = r["applies_to_text"]
            console.print(f"  remedies {escape(heading)}:")
        if r["kind"] == "second tuned circuit":
            what = (f"a second tuned circuit for the aerial (aerial through {eng(r['series_capacitor_f'], 'F')} to "
                    f"{eng(r['primary_inductance_h'], 'H')} tuned by about {eng(r['primary_capacitor_f'], 'F')}) coupled "
                    f"to the tank at k = {r['coupling_coefficient_ratio']:.3f} (critical coupling)")
        else:
            where = "in the aerial lead" if r["kind"].startswith("parallel") else "from the aerial terminal to earth"
            what = (f"a {r['kind']} {where}: {eng(r['trap_inductance_h'], 'H')} with {eng(r['trap_capacitor_f'], 'F')}, "
                    f"tuned to {eng(r['tuned_to_hz'], 'Hz')}")
        def rel(db):
            return f"{abs(db):.0f} dB {'below' if db >= 0 else 'above'}"

        verdict = r.get("verdict_text") or ("meets the margin" if r["meets_margin"] else "still short of the margin")
        before = (f" (was {eng(r['wanted_power_before_w'], 'W')})" if r.get("wanted_power_before_w") is not None
                  else "")
        console.print(f"  → {escape(what)}: {escape(r['interferer'])} {rel(r['separation_db'])} {escape(r['wanted'])} "
                      f"(was {rel(r['separation_before_db'])}); {escape(r['wanted'])} then gets "
                      f"{eng(r['wanted_power_w'], 'W')} at the detector{before} — {escape(verdict)}")


def audible_dial_words(station) -> str | None:
    """A station heard wherever the dial is set, in words, the same in the report and on the page; None otherwise.

    >>> audible_dial_words({"audible_across_dial": True, "audible_range_hz": [520e3, 1710e3], "loaded_q": 2.08})
    'audible across the whole dial (520 kHz to 1.71 MHz): at a loaded Q of 2.1 the tuning is too broad to tune it out'
    """
    if not station.get("audible_across_dial"):
        return None
    low, high = station.get("audible_range_hz") or (None, None)
    q = station.get("loaded_q")
    at = f"at a loaded Q of {q:.2g} " if isinstance(q, (int, float)) else ""
    return (f"audible across the whole dial ({eng(low, 'Hz')} to {eng(high, 'Hz')}): {at}the tuning is too broad "
            "to tune it out")


def detector_power_words(station) -> str:
    """A station's power at the detector, or what it would be if the capacitor could tune it."""
    p = eng(station.get("detector_power_w"), "W")
    return p if station.get("tunable", True) else f"— ({p} if tuned)"


def _render_stations(stations, console, L: Lengths) -> None:
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
        t.add_row(escape(s.get("name", "")), eng(s.get("frequency_hz"), "Hz"), L.distance(s.get("distance_m")),
                  eng(s.get("field_v_per_m"), "V/m"), detector_power_words(s),
                  "—" if s.get("signal_to_noise_db") is None else f"{s['signal_to_noise_db']:.0f} dB",
                  glue(Text(verdict, style=style)), nfield, glue(Text(nv or "—", style=nstyle)))
    show(console, t)
    when = next((s["night"]["listening_time"] for s in stations if (s.get("night") or {}).get("listening_time")), "")
    if when:
        console.print(f"  by night: {escape(when)}")
    for s in stations:
        why = s.get("reason", "")
        if s.get("spills_over"):
            why += ("; " if why else "") + "also comes through when tuned to: " + ", ".join(s["spills_over"])
        across = audible_dial_words(s)
        if across:
            why += ("; " if why else "") + across
        if why:
            console.print(f"  {escape(s.get('name', ''))}: {escape(L.text(why))}")
        night = s.get("night") or {}
        if night.get("reason") and night.get("verdict") != s.get("verdict"):
            sky = night.get("sky_wave_field_v_per_m")
            console.print(f"  {escape(s.get('name', ''))} by night: {escape(L.text(night['reason']))}"
                          + (f" (sky wave {eng(sky, 'V/m')})" if sky else "")
                          + (" (no sky wave: daylight at the path's midpoint)"
                             if night.get("sky_wave_in_daylight") else ""))


def render_layout(result: dict, console, units: str = "si") -> None:
    from aerial.planner.search import layout_reason

    L = Lengths(units)
    console.print(f"[bold]{escape(result['site']['name'])}[/bold]  ({escape(result['site']['file'])})")
    console.print(f"objective: {escape(L.text(result.get('objective', '')))}")
    _render_refusals(result, console, L)
    unit = result.get("score_unit", "")
    label = result.get("score_label", "score")
    at = f" at {eng(result['layouts'][0]['figures_at_hz'], 'Hz', 4)}" if result.get("layouts") and \
        result["layouts"][0].get("figures_at_hz") else ""
    t = Table(title="Best safe layouts", title_justify="left")
    for col in ("#", "layout", "wire", f"eff. height{at}", f"capacitance{at}", f"{label} [{unit}]" if unit else label,
                "vs #1"):
        t.add_column(escape(col), justify="left" if col == "layout" else "right")
    layouts = result.get("layouts", [])
    for i, c in enumerate(layouts, 1):
        t.add_row(str(i), escape(c.get("description", "")), L(c.get("wire_length_m")),
                  L(c.get("effective_height_m")), eng(c.get("capacitance_f"), "F"), f"{c.get('score', 0):.1f}",
                  db(c["score"] - layouts[0]["score"]) if i > 1 else "—")
    show(console, t)
    if result.get("score_meaning"):
        console.print(f"[dim]{escape(L.text(result['score_meaning']))}[/dim]")
    if result.get("figures_model") and layouts:
        diff = result.get("screening_difference_db")
        extra = f" (on these layouts the two differ by up to {diff:.1f} dB)" if diff is not None else ""
        console.print(f"[dim]figures: {escape(result['figures_model'])}{extra}[/dim]")
    reasons = Table(show_header=False, box=None, padding=(0, 0, 0, 2))
    reasons.add_column("rank", justify="right")
    reasons.add_column("reason")
    for i, c in enumerate(layouts, 1):
        if c.get("reason"):
            reasons.add_row(f"{i}.", escape(layout_reason(c, layouts[i] if i < len(layouts) else None, L)))
    if reasons.row_count:
        console.print(reasons)  # at the console's width, each reason's wrapped lines under its first
    present = result.get("present_wire")
    if present:
        console.print(escape(present_wire_words(present, label, unit, L)))
    fw = result.get("full_wave")
    if isinstance(fw, dict) and fw.get("note"):
        console.print(f"full-wave check of the winner: {escape(L.text(fw['note']))}")
    for section, title in (("apartment", "Apartment"), ("code_checklist", "Code checklist (typical requirements, not a compliance check)")):
        lines = result.get(section)
        if lines:
            _lines(console, title, lines, "blue", L)
    if result.get("picture"):
        console.print(f"plan drawing: {escape(str(result['picture']))}")
    _lines(console, "Warnings", result.get("warnings", []), "yellow", L)
    _lines(console, "Safety", result.get("cautions", []), "red", L)


def present_wire_words(present: dict, label: str, unit: str, L: Lengths) -> str:
    """The layout's line on the site's present wire: the report's figures of it and its wavelength flag."""
    from aerial.planner.search import wavelength_words

    where = f" at {eng(present['figures_at_hz'], 'Hz', 4)}" if present.get("figures_at_hz") else ""
    flag = f"; {wavelength_words(present.get('rough_from_hz'))}" if present.get("outside_model_range") else ""
    how = ("with its heights from the balcony slab, as the layouts" if present.get("heights_from_slab_m")
           else "as 'aerial report' figures it")
    return (f"your present wire, {how}{where}: h_e {L(present['effective_height_m'])}, "
            f"{eng(present['capacitance_f'], 'F')}, {label} {present['score']:.1f}" + (f" {unit}" if unit else "")
            + flag)


def _render_refusals(result: dict, console, L: Lengths) -> None:
    """How many candidates were refused, grouped by cause, with the nearest miss."""
    from aerial.planner.refusals import blocking_sentence, nearest_miss_sentence

    ref = result.get("refusals")
    considered = result.get("candidates_considered", 0)
    if not ref:
        console.print(f"candidates: {considered} considered, {result.get('candidates_refused', 0)} refused")
        return
    ranked = considered - ref["total"]
    console.print(f"candidates: {considered:,} considered, {ref['total']:,} refused ({ref['safety']:,} for safety, "
                  f"{ref['geometry']:,} for geometry), {ranked:,} ranked")
    if ref["causes"]:
        console.print("why refused (a layout with several causes counts under each):")
        t = Table(show_header=False, box=None, padding=(0, 1))
        t.add_column("count", justify="right")
        t.add_column("cause")
        for c in ref["causes"]:
            t.add_row(f"{c['count']:,}", escape(("safety: " if c["kind"] == "safety" else "") + c["cause"]))
        show(console, t)
    if ref.get("nearest_miss"):
        console.print(f"  nearest miss: {escape(nearest_miss_sentence(ref['nearest_miss'], L))}")
    for block in ref.get("blocking", []):
        words = blocking_sentence(block, ref["safety"], L, lambda x, y: f"({L.plain(x)}, {L.plain(y)}) {L.unit}")
        console.print(f"  [yellow]blocking:[/yellow] {escape(words)}")
    kept = {k: v for k, v in ref.get("kept_with_penalty", {}).items() if v}
    if kept:
        console.print("  kept with a 3 dB penalty: " + escape(", ".join(f"{v:,} {k}" for k, v in kept.items())))


COIL_ROWS = (
    ("turns", "turns", ""), ("whole turns", "whole_turns", ""), ("inductance", "inductance_h", "H"),
    ("inductance with whole turns", "inductance_whole_turns_h", "H"), ("winding length", "winding_length_m", "m"),
    ("form diameter", "form_diameter_m", "m"), ("winding diameter (to wire centres)", "winding_diameter_m", "m"),
    ("wire diameter", "wire_diameter_m", "m"), ("strands", "strands", ""), ("strand diameter", "strand_diameter_m", "m"),
    ("wire needed", "wire_length_m", "m"), ("DC resistance", "dc_resistance_ohm", "Ω"),
    ("AC resistance", "ac_resistance_ohm", "Ω"), ("AC/DC resistance", "ac_to_dc_resistance_ratio", ""),
    ("unloaded Q", "unloaded_q", ""), ("at frequency", "frequency_hz", "Hz"),
    ("self-capacitance (Medhurst)", "self_capacitance_f", "F"), ("self-resonance", "self_resonance_hz", "Hz"),
)


def _plain_number(value) -> str:
    """A count or ratio as a winder reads it: four significant figures, thousands grouped, never 3.881e+04.

    >>> _plain_number(38806), _plain_number(68.7949), _plain_number(5.1109), _plain_number(69)
    ('38,806', '68.79', '5.111', '69')
    """
    v = float(value)
    if abs(v) >= 1e4:
        return f"{round(v):,}"
    return f"{v:.4g}"


def render_coil(result: dict, console, units: str = "si") -> None:
    L = Lengths(units)
    t = Table(title="Single-layer coil", title_justify="left")
    t.add_column("quantity")
    t.add_column("value", justify="right")
    for label, key, unit in COIL_ROWS:
        value = result.get(key)
        if value is None:
            continue
        text = L(value, 4) if unit == "m" else eng(value, unit) if unit else _plain_number(value)
        t.add_row(label, text)
    show(console, t)
    if result.get("converged") is False:
        console.print("[yellow]• the turns search did not converge; treat the figure as approximate[/yellow]")
    for w in result.get("warnings", []):
        console.print(f"[yellow]• {escape(L.text(w))}[/yellow]")
