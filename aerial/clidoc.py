"""The command reference (docs/cli.md), generated from the parser's own help so it cannot go stale.

Regenerate with ``python -m aerial.clidoc > docs/cli.md``; a test fails when the file is out of date.
"""

from __future__ import annotations

import os


def cli_markdown() -> str:
    from aerial.cli import build_parser

    old = os.environ.get("COLUMNS")
    os.environ["COLUMNS"] = "100"  # argparse wraps to the terminal width: fix it
    try:
        parser = build_parser()
        parts = ["# Command reference", "", "Generated from `aerial --help` by `python -m aerial.clidoc`; do not edit by hand.", ""]
        parts += ["## aerial", "", "```", parser.format_help().rstrip(), "```", ""]
        for name, p in parser.commands.parsers().items():
            parts += [f"## aerial {name}", "", "```", p.format_help().rstrip(), "```", ""]
        parts += [
            "## Exit codes",
            "",
            "| code | meaning |",
            "|---|---|",
            "| 0 | done |",
            "| 2 | the input or an option cannot be used as written (one line on stderr says which and why) |",
            "| 3 | refused for safety (e.g. a wire inside a power line's fall zone) |",
            "| 130 | interrupted (Ctrl-C) |",
            "| 1 | an internal error: please report it with the site file |",
            "",
        ]
        return "\n".join(parts)
    finally:
        if old is None:
            os.environ.pop("COLUMNS", None)
        else:
            os.environ["COLUMNS"] = old


if __name__ == "__main__":  # pragma: no cover
    print(cli_markdown(), end="")
