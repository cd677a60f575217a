"""The ``aerial`` command line: parse, call the Python API, render.

Every command opens the input, calls one API function and renders the
result: the rich report for people or ``--json`` for scripts. Errors the
user can fix come out as one line on stderr and exit code 2; Ctrl-C exits
130 with one line. Data goes to stdout, diagnostics to stderr.
"""

from __future__ import annotations

import contextlib
import os
import sys
import time
import types
import typing

from aerial.core.version import __version__
from aerial.core.errors import AerialError, SafetyRefusal

if typing.TYPE_CHECKING:
    import argparse

EXIT_OK = 0
EXIT_USER = 2
EXIT_REFUSED = 3
EXIT_INTERRUPTED = 130

#: Most lines of reasons under a refusal.
MAX_REASON_LINES = 4
#: Most layouts ``aerial layout --best`` shows (the planner's own limit).
MAX_BEST = 100

#: Set when Ctrl-C arrived (by :func:`raise_interrupt`): a library that turns the interrupt into an error of
#: its own while it loads (numpy does) is still reported as an interruption.
_INTERRUPT = {"seen": False}


def raise_interrupt(signum, frame):
    """SIGINT handler while a command runs: remember it, then raise KeyboardInterrupt as Python does."""
    _INTERRUPT["seen"] = True
    raise KeyboardInterrupt


def interrupted() -> int:
    sys.stderr.write("aerial: interrupted\n")
    return EXIT_INTERRUPTED


def _quiet_stdout() -> None:
    """Point stdout at the null device, so that Python's own flush at exit cannot fail a second time."""
    try:
        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, sys.stdout.fileno())
    except (OSError, ValueError, AttributeError):
        pass


def flush_output(code: int) -> int:
    """Flush stdout; a full disk or a closed reader becomes one line and exit 2 (a reader gone: exit as is)."""
    try:
        sys.stdout.flush()
    except BrokenPipeError:
        _quiet_stdout()
    except OSError as err:
        _quiet_stdout()
        sys.stderr.write(f"aerial: {os_error_line(err)}\n")
        return EXIT_USER
    return code


def os_error_line(err: OSError) -> str:
    """One line for an operating-system fault on a file the user named (or on the output)."""
    from aerial.core.errors import os_error_words

    if err.filename is None:
        return f"cannot write the output ({os_error_words(err)})"
    return f"{one_line(err.filename)}: {os_error_words(err)}"


def one_line(text) -> str:
    """``text`` with line breaks and other control characters written as escapes: one terminal line."""
    return "".join(ch if ch.isprintable() else repr(ch)[1:-1] for ch in str(text))


#: Width of the report when stdout is not a terminal and no --width is given: prose wraps here,
#: tables widen to their content (never cut).
PIPE_WIDTH = 100
#: Seconds a run must have taken before progress lines appear on a stderr that is not a terminal.
PROGRESS_LINES_AFTER_S = 2.0
UNIT_SYSTEMS = ("si", "us")


def _width(text: str) -> int:
    try:
        value = int(text)
    except ValueError:
        value = None
    if value is not None and 40 <= value <= 1000:
        return value
    from argparse import ArgumentTypeError  # only for a mistake, which argparse then words

    if value is None:
        raise ArgumentTypeError(f"invalid width {text!r}: expected a whole number of characters")
    raise ArgumentTypeError(f"invalid width {value}: expected 40 to 1000 characters")


def _output_options(o: argparse.ArgumentParser, progress: bool) -> None:
    """The options every command that renders a report shares."""
    o.add_argument("--width", type=_width, metavar="N",
                   help="report width in characters (default: the terminal's; when the output is not a terminal, "
                        "COLUMNS if set, else wide enough for every table up to 200 characters, long texts wrapping); "
                        "tables that do not fit are listed row by row, never cut")
    o.add_argument("--units", choices=UNIT_SYSTEMS, default="si",
                   help="lengths in the report, the shared page and the drawings: si (metres) or us (feet and inches, station "
                        "distances in miles; the report's what-if steps in round feet); --json stays SI")
    if progress:
        o.add_argument("--quiet", action="store_true",
                       help="no progress on stderr (by default a bar on a terminal, else a line per stage)")


def _check_options(c: argparse.ArgumentParser) -> None:
    _output_options(c, False)
    c.add_argument("site", metavar="SITE", help="site file (TOML)")
    c.add_argument("--json", action="store_true", help="print machine-readable JSON instead of the report")


def _report_options(r: argparse.ArgumentParser) -> None:
    _output_options(r, True)
    r.add_argument("site", metavar="SITE", nargs="?", help="site file (TOML); omit for the built-in example")
    r.add_argument("--json", action="store_true", help="print machine-readable JSON instead of the report")
    r.add_argument("--full-wave", action="store_true", help="use the method-of-moments wire solver instead of closed forms")
    r.add_argument("--lossy-ground", action="store_true",
                   help="full wave: solve the wire over the site's soil exactly (Sommerfeld integrals) instead of over "
                        "a perfect ground")
    r.add_argument("--quick-ground", action="store_true",
                   help="with --lossy-ground: use the fast reflection-coefficient approximation instead (rough for "
                        "wires lower than a tenth of a wavelength)")
    r.add_argument("--step", metavar="FREQ", help='sweep step, e.g. "1 kHz" (default depends on the band)')
    r.add_argument("--pictures", metavar="DIR", help="write SVG pictures of impedance, capacitance, tuning range and stations into DIR")
    r.add_argument("--page", metavar="FILE",
                   help="also write the whole report as one self-contained HTML page (pictures inside) to FILE, to share or print")
    r.add_argument("--force", action="store_true", help="replace picture or page files that already exist")
    r.add_argument("--allow-large", action="store_true",
                   help="full wave: run a sweep beyond the stated memory and time budget")


def _layout_options(lay: argparse.ArgumentParser) -> None:
    _output_options(lay, True)
    lay.add_argument("site", metavar="SITE", help="site file (TOML) with a [plan] table")
    lay.add_argument("--json", action="store_true", help="print machine-readable JSON instead of the report")
    lay.add_argument("--best", type=int, default=5, metavar="N", help="how many layouts to show (default 5)")
    lay.add_argument("--full-wave", action="store_true", help="refine the winning layout with the wire solver")
    lay.add_argument("--picture", metavar="FILE", help="write a plan drawing (SVG, or PNG by extension) to FILE")
    lay.add_argument("--page", metavar="FILE",
                     help="also write the ranked layouts, refusals and code checklist as one self-contained HTML page to FILE")
    lay.add_argument("--force", action="store_true", help="replace the picture or page file if it exists")
    lay.add_argument("--allow-large", action="store_true", help="run a search beyond the stated time and memory budget")


def _coil_options(coil: argparse.ArgumentParser) -> None:
    _output_options(coil, False)
    coil.add_argument("--diameter", required=True, metavar="LEN",
                      help='the former\'s outside diameter, e.g. "50 mm" (the turns are taken at the wire centres, '
                           'one wire diameter more)')
    coil.add_argument("--wire", required=True, metavar="WIRE",
                      help='wire gauge, e.g. "26 AWG" or "24 SWG", or its diameter, e.g. "0.4 mm"')
    g = coil.add_mutually_exclusive_group(required=True)
    g.add_argument("--turns", type=float, help="number of turns (gives the inductance)")
    g.add_argument("--inductance", metavar="L", help='wanted inductance, e.g. "240 uH" (gives the turns)')
    coil.add_argument("--pitch", metavar="LEN", help="turn-to-turn pitch (default: close-wound, one wire diameter)")
    coil.add_argument("--strands", type=int, default=1,
                      help="strands of a stranded (litz) wire; --wire is then the whole bundle")
    coil.add_argument("--strand-size", metavar="WIRE", help='each strand\'s gauge or diameter, e.g. "40 AWG" (with --strands)')
    coil.add_argument("--frequency", metavar="FREQ", default="1 MHz", help='frequency for the Q estimate (default "1 MHz")')
    coil.add_argument("--json", action="store_true", help="print machine-readable JSON")


def build_parser() -> argparse.ArgumentParser:
    """The command line's parser; a command's parser and options are made when that command is parsed or shown."""
    from aerial.cliparser import CommandParser, Commands, Later, VersionAction

    p = CommandParser(
        prog="aerial",
        description="Estimate how well a wire receiving aerial and its earth system will work.",
        epilog="Site files are TOML; see docs/site-file.md. Figures are estimates: local codes and licensed practice govern.",
    )
    p.add_argument("--version", action=VersionAction, help="show program's version number and exit")
    sub = p.commands = p.add_subparsers(dest="command", metavar="COMMAND", parser_class=Later, action=Commands)
    sub.add_parser("check", help="validate a site file and summarise the wires as aerial understood them",
                   description="Validate a site file and summarise the resolved wires.", options=_check_options)
    sub.add_parser("report", help="run the whole chain: aerial figures, earth, tuning, stations, cautions",
                   description="Run the whole chain for a site (the built-in example when SITE is left out).",
                   options=_report_options)
    sub.add_parser("layout", help="search the site's supports for the best safe wire layouts",
                   description="Rank wire layouts among the site's candidate supports, keeping clear of power lines.",
                   options=_layout_options)
    sub.add_parser("coil", help="single-layer coil helper: inductance from turns, or turns for an inductance",
                   description="Single-layer solenoid: inductance from turns, or turns for a wanted inductance.",
                   options=_coil_options)
    return p


#: The options of each command, as given to argparse (:func:`build_parser`) and to the quick reading.
COMMAND_OPTIONS = {"check": _check_options, "report": _report_options, "layout": _layout_options,
                   "coil": _coil_options}


class _Options:
    """A command's options as its ``..._options`` function gives them to argparse's ``add_argument``."""

    def __init__(self):
        self.arguments: list[tuple[tuple, dict]] = []  # (option strings or the positional's name, settings)
        self.grouped = False

    def add_argument(self, *names, **settings) -> None:
        self.arguments.append((names, settings))

    def add_mutually_exclusive_group(self, **settings) -> _Options:
        self.grouped = True
        return self


#: What :func:`_quick_value` gives for a word argparse would refuse.
_MISTAKE = object()


def _quick_value(settings: dict, word: str):
    """``word`` converted and checked as argparse does (``type``, ``choices``); ``_MISTAKE`` when it fails."""
    try:
        value = settings["type"](word) if "type" in settings else word
    except Exception:  # argparse words the mistake, reading the line again
        return _MISTAKE
    return value if "choices" not in settings or value in settings["choices"] else _MISTAKE



def _command_options(command: str):
    """The options of ``command`` for the quick reading, or None when they are not all plain.

    (defaults by destination in argparse's order, option strings -> (destination, settings), the positionals
    in order as (destination, settings), the destinations a command line must give)
    """
    options = _Options()
    COMMAND_OPTIONS[command](options)
    if options.grouped:
        return None
    defaults, flags, positionals, required = {"command": command}, {}, [], set()
    for names, settings in options.arguments:
        if settings.get("action", "store") not in ("store", "store_true"):
            return None
        if isinstance(settings.get("default"), str) and "type" in settings:
            return None  # argparse converts such a default: none of ours has one
        if names[0].startswith("-"):
            if "nargs" in settings:
                return None
            dest = settings.get("dest") or next((n for n in names if n.startswith("--")), names[0]).lstrip("-")
            dest = dest.replace("-", "_")
            flags.update((name, (dest, settings)) for name in names)
            if settings.get("required"):
                required.add(dest)
        else:
            if settings.get("nargs", "?") != "?":
                return None
            dest = names[0]
            positionals.append((dest, settings))
            if "nargs" not in settings:
                required.add(dest)
        defaults[dest] = settings.get("default", False if settings.get("action") == "store_true" else None)
    return defaults, flags, positionals, required


def quick_arguments(words):
    """The arguments of a plain command line, read as argparse reads them; None for any other command line.

    Plain: a command, then its options spelt in full, each at most once (a value as the next word, never one
    starting with "-"), and its positional words, none starting with "-". Anything else -- no command, help,
    ``--version``, ``--option=value``, "--", a mistake of any kind, the coil command's group of options --
    is left to argparse (:func:`build_parser`), which reads it or says what is wrong. Loading and setting
    argparse up costs about 5 ms of every run's start-up; tests/test_cli.py checks that both read a command
    line alike.
    """
    if not words or not all(isinstance(word, str) for word in words) or words[0] not in COMMAND_OPTIONS:
        return None
    command = _command_options(words[0])
    if command is None:
        return None
    values, flags, positionals, required = command
    given = set()
    rest = iter(words[1:])
    for word in rest:
        if word.startswith("-"):
            dest, settings = flags.get(word, (None, None))
            if dest is None or dest in given:
                return None
            if settings.get("action") == "store_true":
                value = True
            else:
                word = next(rest, "-")
                value = _MISTAKE if word.startswith("-") else _quick_value(settings, word)
        elif positionals:
            dest, settings = positionals.pop(0)
            value = _quick_value(settings, word)
        else:
            return None
        if value is _MISTAKE:
            return None
        values[dest] = value
        given.add(dest)
    return None if required - given else types.SimpleNamespace(**values)


def _console(stderr=False, width=None):
    """A rich console for the report (or, with ``stderr``, for the progress bar).

    Its width: ``width`` (--width) when given; else on a stdout that is not a terminal the
    COLUMNS variable when it holds a width, and when neither is set tables widen to their
    content up to :data:`aerial.outputs.terminal.FIT_LIMIT` (prose wraps at :data:`PIPE_WIDTH`);
    on a terminal, the terminal's.
    """
    if stderr:
        from rich.console import Console as base
    else:
        from aerial.outputs.terminal import ReportConsole as base

    class _Console(base):
        def on_broken_pipe(self) -> None:
            # rich exits with status 1 here; a reader that went away (`| head`) is not an error
            devnull = os.open(os.devnull, os.O_WRONLY)
            os.dup2(devnull, sys.stdout.fileno())
            raise BrokenPipeError

    piped = not stderr and width is None and not sys.stdout.isatty()
    if piped:
        width = _columns()
    fit = piped and width is None
    width = PIPE_WIDTH if fit else width
    console = _Console(stderr=stderr, highlight=False, soft_wrap=False, width=width)
    if width is not None:
        # with its width given, rich still asks the terminals for their height at every print and
        # every look at its width: taken once, as it would find it each time
        console.height = console.height
    console.fit_to_content = fit
    return console


def _columns() -> int | None:
    """The width the COLUMNS variable asks for (kept within --width's limits), or None when it holds none."""
    text = os.environ.get("COLUMNS", "").strip()
    if not text.isdigit() or int(text) == 0:
        return None
    return min(max(int(text), 40), 1000)


def _print_json(data) -> None:
    from aerial.estimate.plain import json_text

    sys.stdout.write(json_text(data))
    sys.stdout.write("\n")


class _ProgressLines:
    """Progress for a stderr that is not a terminal: a line per stage and per tenth of a long step.

    Silent for the first ``PROGRESS_LINES_AFTER_S`` seconds, so a quick run prints nothing.
    """

    def __init__(self, stream):
        self.stream = stream
        self.t0 = time.monotonic()
        self.label = "working"
        self.tenth = -1

    def _say(self, text: str) -> None:
        if time.monotonic() - self.t0 < PROGRESS_LINES_AFTER_S:
            return
        self.stream.write(f"aerial: {text} ({time.monotonic() - self.t0:.0f} s)\n")
        self.stream.flush()

    def stage(self, text: str) -> None:
        self.label, self.tenth = text, -1
        self._say(text)

    def __call__(self, done, total) -> None:
        if not total:
            return
        tenth = int(10 * done // total)
        if tenth > self.tenth and (tenth > 0 or done >= total):
            self.tenth = tenth
            self._say(f"{self.label}: {10 * tenth} % ({done}/{total})")


@contextlib.contextmanager
def _progress(enabled: bool):
    """Yield a ``progress(done, total)`` callback with a ``stage(text)`` method, or None when disabled.

    On a terminal a rich bar appears after half a second; otherwise lines go to stderr
    (:class:`_ProgressLines`).
    """
    if not enabled:
        yield None
        return
    if not sys.stderr.isatty():
        yield _ProgressLines(sys.stderr)
        return
    from rich.progress import BarColumn, Progress, TextColumn, TimeRemainingColumn

    prog = Progress(TextColumn("{task.description}"), BarColumn(), TextColumn("{task.completed}/{task.total}"),
                    TimeRemainingColumn(), console=_console(stderr=True), transient=True)
    state = {"task": None, "label": "working"}
    t0 = time.monotonic()

    class _Bar:
        def stage(self, text):
            state["label"] = text
            if state["task"] is not None:
                prog.update(state["task"], description=text)

        def __call__(self, done, total):
            if state["task"] is None and time.monotonic() - t0 > 0.5:
                prog.start()
                state["task"] = prog.add_task(state["label"], total=total)
            if state["task"] is not None:
                prog.update(state["task"], completed=done, total=total, description=state["label"])

    try:
        yield _Bar()
    finally:
        if state["task"] is not None:
            prog.stop()


def _render(args, result, renderer_name: str) -> int:
    """One rendering path for every command: JSON for scripts, the rich report for people."""
    if args.json:
        _print_json(result)
    else:
        from aerial.outputs import terminal as report

        getattr(report, renderer_name)(result, _console(width=args.width), units=args.units)
    return EXIT_OK


def _note_page(result) -> None:
    """Say on stderr where the shared page went (stdout stays the report or the JSON)."""
    if result.get("page"):
        sys.stderr.write(f"aerial: page written to {one_line(result['page'])}\n")


def cmd_check(args) -> int:
    from aerial.api import check_site

    return _render(args, check_site(args.site), "render_check")


def cmd_report(args) -> int:
    from aerial.api import run_report

    step = None
    if args.step is not None:
        from aerial.core import units

        try:
            step = units.parse_quantity(args.step, units.FREQUENCY_UNITS, "a frequency step", "Hz")
        except units.UnitError as err:
            raise AerialError(f"--step {args.step}: {err.expected}") from None
        if not 100 <= step <= 1e6:
            raise AerialError(f"--step {args.step}: expected a step from 100 Hz to 1 MHz")
    with _progress(not args.quiet) as update:
        result = run_report(args.site, full_wave=args.full_wave, step_hz=step, progress=update,
                            pictures=args.pictures, force=args.force,
                            ground=_ground_option(args), allow_large=args.allow_large,
                            page=args.page, units="si" if args.json else args.units,  # JSON: the SI steps always
                            page_units=args.units, beside=True)
    _note_page(result)
    return _render(args, result, "render_report")


def _ground_option(args) -> str:
    if args.quick_ground and not args.lossy_ground:
        raise AerialError("--quick-ground: only with --lossy-ground (it chooses how the soil is treated)")
    if not args.lossy_ground:
        return "perfect"
    return "reflection-coefficient" if args.quick_ground else "lossy"


def cmd_layout(args) -> int:
    from aerial.api import run_layout

    if not 1 <= args.best <= MAX_BEST:
        raise AerialError(f"--best {args.best}: expected a whole number from 1 to {MAX_BEST}")
    with _progress(not args.quiet) as update:
        result = run_layout(args.site, best=args.best, full_wave=args.full_wave, picture=args.picture,
                            force=args.force, allow_large=args.allow_large, progress=update, page=args.page,
                            units=args.units)
    _note_page(result)
    return _render(args, result, "render_layout")


def cmd_coil(args) -> int:
    from aerial.api import coil_helper

    result = coil_helper(diameter=args.diameter, wire=args.wire, turns=args.turns, inductance=args.inductance,
                         pitch=args.pitch, strands=args.strands, frequency=args.frequency, strand_size=args.strand_size)
    return _render(args, result, "render_coil")


COMMANDS = {"check": cmd_check, "report": cmd_report, "layout": cmd_layout, "coil": cmd_coil}


def _check_empty_options(args) -> None:
    """An option given an empty value ("") is a slip, never "leave it out"."""
    for option in ("site", "picture", "pictures", "step", "pitch", "inductance", "diameter", "wire", "frequency",
                   "strand_size"):
        value = getattr(args, option, None)
        if isinstance(value, str) and not value.strip():
            if option == "site":
                raise AerialError("the site file name is empty; expected the path of a site file (.toml)")
            raise AerialError(f"--{option.replace('_', '-')} is empty; expected a value (see 'aerial {args.command} --help')")


def _arguments(argv):
    """The command line read: at once when it is plain (:func:`quick_arguments`), else by argparse.

    None when it names no command (the usage and one line are shown on stderr).
    """
    args = quick_arguments(sys.argv[1:] if argv is None else list(argv))
    if args is not None:
        return args
    parser = build_parser()
    args, extras = parser.parse_known_args(argv)
    if extras:
        from aerial.cliparser import unrecognized

        raise unrecognized(parser, args.command, extras)
    if args.command is None:
        parser.print_usage(sys.stderr)
        sys.stderr.write("aerial: a command is needed; 'aerial --help' lists them\n")
        return None
    return args


def main(argv=None) -> int:
    """Entry point of the ``aerial`` console script; returns the exit code."""
    args = None
    try:
        args = _arguments(argv)
        if args is None:
            return EXIT_USER
        _check_empty_options(args)
        return COMMANDS[args.command](args)
    except SafetyRefusal as err:
        # one short line, then a few lines of reasons (the message's own line breaks)
        text = str(err)
        if getattr(args, "units", "si") == "us":  # the distances to keep in the user's feet, as the report has them
            from aerial.core.lengthtext import text_in

            text = text_in(err.args[0] if err.args and isinstance(err.args[0], str) else text, "us")
        first, *reasons = [line for line in text.split("\n") if line.strip()] or [""]
        sys.stderr.write(f"aerial: refused: {one_line(first)}\n")
        for line in reasons[:MAX_REASON_LINES]:
            sys.stderr.write(f"  {one_line(line.strip())}\n")
        if len(reasons) > MAX_REASON_LINES:
            sys.stderr.write(f"  … and {len(reasons) - MAX_REASON_LINES} more\n")
        return EXIT_REFUSED
    except AerialError as err:
        sys.stderr.write(f"aerial: {one_line(err)}\n")
        return EXIT_USER
    except KeyboardInterrupt:
        return interrupted()
    except BrokenPipeError:
        # the reader went away (e.g. `| head`): not an error
        try:
            sys.stdout = open(os.devnull, "w")
        except OSError:
            pass
        return EXIT_OK
    except MemoryError:
        sys.stderr.write("aerial: out of memory; use a coarser segmentation or fewer supports\n")
        return EXIT_USER
    except OSError as err:  # a full disk, a read-only folder, a name too long: the user's to fix
        if err.filename is None:
            _quiet_stdout()
        sys.stderr.write(f"aerial: {os_error_line(err)}\n")
        return EXIT_USER
    except Exception as err:  # a bug: still one line for the user
        if _INTERRUPT["seen"]:  # Ctrl-C while a library loaded, reported by it as an error of its own
            return interrupted()
        if os.environ.get("AERIAL_DEBUG"):
            raise
        sys.stderr.write(f"aerial: internal error ({type(err).__name__}: {one_line(err)}); "
                         "please report it with the site file (set AERIAL_DEBUG=1 for details)\n")
        return 1


if __name__ == "__main__":  # pragma: no cover - the console script is aerial.__main__.run
    import signal

    signal.signal(signal.SIGINT, raise_interrupt)
    sys.exit(flush_output(main()))
