"""Command line: parse and dispatch only. This is the one place where exceptions become exit codes.

Exit codes: 0 ok, 2 bad input, 3 infeasible target, 4 solver failure (1 for an unexpected internal error).
Each command lives in ``pathcast.commands.<name>`` with ``add_arguments(parser)`` and ``execute(args) -> int``.
"""

from __future__ import annotations

import argparse
import importlib
import sys
from collections.abc import Sequence

from .errors import EXIT_BAD_INPUT, PathcastError

__all__ = ["main", "COMMANDS"]

# name -> (module under pathcast.commands, one-line help)
COMMANDS: dict[str, tuple[str, str]] = {
    "run": ("run", "solve a scenario and write its tables to results/<scenario>/"),
    "check": ("check", "validate a scenario file without solving"),
    "ensemble": (
        "ensemble",
        "solve many variants of a scenario (sensitivity, uncertainty) and summarise them",
    ),
    "compare": ("compare", "compare scenarios side by side: comparison.csv and overlay charts"),
    "memo": (
        "memo",
        "write a planning memo (memo.md and self-contained memo.html) of one or several scenarios",
    ),
    "rates": ("rates", "required and realised CO2 reduction rates under the carbon budget"),
    "delay": (
        "delay",
        "cost of delayed action: reference pathway until a start year, least-cost under the budget after",
    ),
}


class _Parser(argparse.ArgumentParser):
    def error(self, message: str):  # one sentence, exit code 2, no usage dump
        self.exit(EXIT_BAD_INPUT, f"pathcast: {message}; see 'pathcast --help'.\n")


def build_parser() -> argparse.ArgumentParser:
    parser = _Parser(
        prog="pathcast",
        description="Least-cost decarbonisation pathways under a carbon budget "
        "(screening-level planning model).",
    )
    from . import __version__

    parser.add_argument("--version", action="version", version=f"pathcast {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)
    sub.required = True
    for name, (module_name, help_text) in COMMANDS.items():
        module = importlib.import_module(f"pathcast.commands.{module_name}")
        command = sub.add_parser(name, help=help_text, description=module.__doc__)
        module.add_arguments(command)
        command.set_defaults(_execute=module.execute)
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    parser = build_parser()
    args = parser.parse_args(argv)
    try:
        return int(args._execute(args) or 0)
    except PathcastError as error:
        print(f"pathcast: {error}", file=sys.stderr)
        return error.exit_code
    except KeyboardInterrupt:
        print("pathcast: interrupted.", file=sys.stderr)
        return 130


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
