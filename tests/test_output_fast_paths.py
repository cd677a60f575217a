"""The report's short cuts through rich give rich's own layout: text that fits is justified without
rich's line breaking, and tables are measured once from their cells.

Each short cut is checked against the long way round, done here with rich itself (rich's
Text.wrap on a copy holding the glued spaces, rich's own table measurement and printing).
Input/output handling tests; no physics here.
"""

from __future__ import annotations

import io

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from rich.measure import Measurement
from rich.table import Table
from rich.text import Text

from aerial.outputs.terminal import ReportConsole, _natural_widths, glue, show, wrap_held


def _same_lines(a, b):
    assert [(x.plain, x.style, x.justify, x.overflow, x.end, list(x.spans)) for x in a] == \
        [(y.plain, y.style, y.justify, y.overflow, y.end, list(y.spans)) for y in b]


WORDS = st.sampled_from(["12 dB", "5.5–7.7 m", "aerial", "loaded Q", " ", "  ", "\n", "\t", "x" * 12, "Ω", "漢字",
                         "e\u0301", "\u00a0", "(0.50, -0.50, 1.00)", "— (cannot tune)", ""])


@settings(max_examples=400, deadline=None)
@given(words=st.lists(WORDS, max_size=8), width=st.integers(1, 40),
       justify=st.sampled_from([None, "default", "left", "center", "right", "full"]),
       overflow=st.sampled_from([None, "fold", "crop", "ellipsis", "ignore"]),
       styled=st.booleans(), no_wrap=st.sampled_from([None, False, True]))
def test_wrapping_text_is_rich_own_wrapping(words, width, justify, overflow, styled, no_wrap):
    console = ReportConsole(width=80, file=io.StringIO())
    text = glue("".join(words))
    if styled and len(text):
        text.stylize("bold", 0, max(1, len(text) // 2))
        text.style = "dim"
    options = {"justify": justify, "overflow": overflow, "no_wrap": no_wrap}
    # the short cut against the long way
    _same_lines(text.wrap(console, width, **options), wrap_held(text, console, width, **options))


def _tables():
    a = Table(title="Title [dim]with markup[/dim]", title_justify="left")
    for name, justify in (("frequency", "right"), ("what", "left"), ("", "right")):
        a.add_column(name, justify=justify)
    a.add_row("520 kHz\n[dim]MF low[/dim]", "a longer text with 12 000 km in it", "")
    a.add_row("", glue(Text("styled 3 dB", style="green")), "[bold]x[/bold]")
    b = Table(show_header=False, box=None, padding=(0, 1))
    b.add_column("count", justify="right")
    b.add_column("cause")
    b.add_row("4", "dog-leg folds back on itself")
    c = Table(title="empty column")
    c.add_column("")
    c.add_column("b")
    c.add_row("", "1")
    return a, b, c


@pytest.mark.parametrize("index", range(3))
def test_natural_widths_are_rich_measurement(index):
    console = ReportConsole(width=80, file=io.StringIO())
    table = _tables()[index]
    from aerial.outputs.terminal import _render_cells

    _render_cells(console, table)
    rich_width = Measurement.get(console, console.options.update_width(100_000), table).maximum
    assert sum(_natural_widths(console, table)) + table._extra_width == rich_width


@pytest.mark.parametrize("index", range(3))
@pytest.mark.parametrize("colour", [False, True])
def test_a_table_that_fits_prints_as_rich_prints_it(index, colour):
    def console(width):
        c = ReportConsole(width=width, file=io.StringIO(), force_terminal=colour, color_system="truecolor" if colour
                          else None, highlight=False)
        c.fit_to_content = False
        return c

    fitted = 0
    for width in (30, 60, 100, 200):
        # a table wider than the console is listed row by row or shared out: the report's own layout, not rich's
        ours, theirs = console(width), console(width)
        table = _tables()[index]
        if Measurement.get(theirs, theirs.options.update_width(100_000), table).maximum > width:
            continue
        fitted += 1
        show(ours, _tables()[index])
        for column in table.columns:
            column.overflow = "fold"
        theirs.print(table)
        assert ours.file.getvalue() == theirs.file.getvalue(), width
    assert fitted >= 2
