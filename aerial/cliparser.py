"""The command line's full parser (argparse): help, the version, every mistake's one-line message.

:func:`aerial.cli.build_parser` makes it from these pieces. A plain, well-formed command line is read by
:func:`aerial.cli.quick_arguments` without loading argparse (about 5 ms of every run's start-up: argparse,
gettext and locale, and the parser's set-up); anything else -- help, ``--version``, a mistake -- comes here.
"""

from __future__ import annotations

import argparse
import os
import sys

from aerial.core.errors import AerialError
from aerial.core.version import __version__


def terminal_columns() -> int:
    """The terminal's width as ``shutil.get_terminal_size().columns`` gives it (COLUMNS first, else 80).

    argparse asks shutil for it each time it checks an option; shutil loads the compression
    libraries, which nothing else in a run needs.
    """
    try:
        columns = int(os.environ["COLUMNS"])
    except (KeyError, ValueError):
        columns = 0
    if columns <= 0:
        try:
            columns = os.get_terminal_size(sys.__stdout__.fileno()).columns or 80
        except (AttributeError, ValueError, OSError):
            columns = 80
    return columns


class HelpFormatter(argparse.HelpFormatter):
    """argparse's help layout, its width found without loading shutil (:func:`terminal_columns`)."""

    def __init__(self, prog, indent_increment=2, max_help_position=24, width=None):
        super().__init__(prog, indent_increment, max_help_position,
                         terminal_columns() - 2 if width is None else width)


class VersionAction(argparse.Action):
    """``--version``: print ``aerial X.Y.Z`` and exit, as argparse's own version action does.

    argparse's lays the line out with its help formatter, which loads textwrap for one short line.
    """

    def __init__(self, option_strings, dest=argparse.SUPPRESS, default=argparse.SUPPRESS, help=None):
        super().__init__(option_strings=option_strings, dest=dest, default=default, nargs=0, help=help)

    def __call__(self, parser, namespace, values, option_string=None):
        try:
            sys.stdout.write(f"aerial {__version__}\n")
        except (AttributeError, OSError):  # no stdout, or a closed one: as argparse's action, say nothing
            pass
        parser.exit()


class CommandParser(argparse.ArgumentParser):
    """A parser that takes an option only as spelt in full and says a mistake in one line.

    ``options(parser)``, when given, adds the parser's arguments the first time it parses or shows its help:
    a run builds the options of its own command only.
    """

    def __init__(self, *args, options=None, **kwargs):
        kwargs.setdefault("allow_abbrev", False)  # "--unit us" is a slip to point out, not "--units us"
        kwargs.setdefault("formatter_class", HelpFormatter)
        super().__init__(*args, **kwargs)
        self.words: list[str] = []
        self.options_to_add = options

    def with_options(self) -> CommandParser:
        """This parser with its arguments added (once)."""
        add, self.options_to_add = self.options_to_add, None
        if add is not None:
            add(self)
        return self

    def parse_known_args(self, args=None, namespace=None):
        self.with_options()
        self.words = list(sys.argv[1:] if args is None else args)  # for the error line below
        return super().parse_known_args(args, namespace)

    def format_usage(self):
        return super(CommandParser, self.with_options()).format_usage()

    def format_help(self):
        return super(CommandParser, self.with_options()).format_help()

    def error(self, message):  # one line, exit 2, no usage dump
        # main() puts "aerial: " before the line, so only a subcommand's own name goes here
        command = self.prog.partition(" ")[2]
        unknown = unknown_options(self, self.words)
        if unknown and "required" in message:  # "--diam 50mm": the misspelling, not what it left missing
            close = closest_option(self, unknown)
            raise AerialError(f"{command + ': ' if command else ''}unrecognized arguments: {' '.join(unknown)}"
                              + (f'; did you mean "{close}"?' if close else "") + f" (see '{self.prog} --help')")
        raise AerialError(f"{command + ': ' if command else ''}{message}{closest_choice(message)} "
                          f"(see '{self.prog} --help')")


class Later:
    """A command's parser as ``add_parser`` describes it, kept until :meth:`Commands.parser` makes it."""

    def __init__(self, **kwargs):
        self.kwargs = kwargs


class Commands(argparse._SubParsersAction):
    """The commands, each one's parser made the first time it is needed (its command run or its help shown).

    argparse looks its message catalogue up three times to set a parser up (a few file-system checks each),
    so a run makes the parser of its own command only; ``aerial --help`` lists the commands from their help
    lines alone.
    """

    def __call__(self, parser, namespace, values, option_string=None):
        self.parser(values[0])
        super().__call__(parser, namespace, values, option_string)

    def parser(self, name: str) -> CommandParser:
        """The parser of command ``name``, made now if it was not yet."""
        made = self.choices[name]
        if isinstance(made, Later):
            made = self.choices[name] = CommandParser(**made.kwargs)
        return made

    def parsers(self) -> dict:
        """Every command's parser by name (the docs' command reference shows them all)."""
        return {name: self.parser(name) for name in self.choices}


def unrecognized(parser: argparse.ArgumentParser, command: str | None, extras: list[str]) -> AerialError:
    """The one line for words no option takes: the command, the words, the closest option when one is near."""
    own = parser.commands.parser(command) if command else parser
    close = closest_option(own, extras)
    return AerialError(f"{command + ': ' if command else ''}unrecognized arguments: {' '.join(extras)}"
                       + (f'; did you mean "{close}"?' if close else "") + f" (see '{own.prog} --help')")


def looks_like_option(word: str) -> bool:
    """'--unit' or '-x', not a negative number given as a value."""
    return word.startswith("--") and len(word) > 2 or (len(word) > 1 and word[0] == "-" and word[1].isalpha())


def unknown_options(parser: argparse.ArgumentParser, words) -> list[str]:
    """The words that look like options but are none of ``parser``'s, as written ("--unit", "--unitz=us")."""
    known = {o for action in parser._actions for o in action.option_strings}
    return [w for w in words if looks_like_option(w) and w.partition("=")[0] not in known]


def closest_option(parser: argparse.ArgumentParser, words) -> str | None:
    """The option of ``parser`` closest to the first of ``words`` that is a misspelt option, or None."""
    from aerial.core.units import closest_word  # only for a mistake: ``aerial --version`` never loads the units

    options = {o.lstrip("-"): o for action in parser._actions for o in action.option_strings if o.startswith("--")}
    for word in unknown_options(parser, words):
        close = closest_word(word.partition("=")[0].lstrip("-"), list(options))
        if close:
            return options[close]
    return None


def closest_choice(message: str) -> str:
    """'; did you mean "report"?' for argparse's invalid-choice message when a choice is close, else ''."""
    import re

    from aerial.core.units import closest_word

    m = re.search(r"invalid choice: '([^']*)' \(choose from (.*)\)", message)
    if not m:
        return ""
    choices = [c.strip().strip("'\"") for c in m.group(2).split(",")]
    close = closest_word(m.group(1).lower(), choices)
    return f'; did you mean "{close}"?' if close else ""
