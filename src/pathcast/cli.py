"""Command line: parse and dispatch only. This is the one place where exceptions become exit codes.

Exit codes: 0 ok, 2 bad input, 3 infeasible target, 4 solver failure (1 for an unexpected internal error).
Each command lives in ``pathcast.commands.<name>`` with ``add_arguments(parser)`` and ``execute(args) -> int``.
Only the module of the command being run is imported (``--help`` and ``--version`` import none), and each command
module imports its heavy dependencies (Pyomo, HiGHS, pandas, matplotlib, dask) inside ``execute``, so the command line
starts in a fraction of a second; ``tests/test_cli_imports.py`` guards this and ``benchmarks/cli_startup.py`` times it.
"""

from __future__ import annotations

import argparse
import importlib
import sys
from collections.abc import Iterable, Sequence

from .errors import EXIT_BAD_INPUT, PathcastError, did_you_mean

__all__ = ["main", "build_parser", "command_in", "COMMANDS"]

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

_TOP_OPTIONS = {"-h", "--help", "--version"}  # top-level options; they take no value


class _Parser(argparse.ArgumentParser):
    def error(self, message: str):  # one sentence, exit code 2, no usage dump
        self.exit(EXIT_BAD_INPUT, f"pathcast: {message}; see 'pathcast --help'.\n")


def command_in(argv: Sequence[str]) -> str | None:
    """The command named in ``argv`` (its first word that is not an option), or None.

    The top-level options (``--help``, ``--version``) take no value, so the first such word is the command.
    """
    for token in argv:
        if token == "--":
            continue
        if not token.startswith("-"):
            return token
    return None


def build_parser(commands: Iterable[str] | None = None) -> argparse.ArgumentParser:
    """The argument parser; ``commands`` names the commands whose modules are imported to add their arguments.

    Every command is listed in ``--help`` either way; None imports them all (the complete parser).
    """
    parser = _Parser(
        prog="pathcast",
        description="Least-cost decarbonisation pathways under a carbon budget "
        "(screening-level planning model).",
    )
    from . import __version__

    parser.add_argument("--version", action="version", version=f"pathcast {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)
    sub.required = True
    wanted = set(COMMANDS) if commands is None else set(commands)
    for name, (module_name, help_text) in COMMANDS.items():
        if name not in wanted:
            sub.add_parser(name, help=help_text)
            continue
        module = importlib.import_module(f"pathcast.commands.{module_name}")
        command = sub.add_parser(name, help=help_text, description=module.__doc__)
        module.add_arguments(command)
        command.set_defaults(_execute=module.execute)
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    argv = sys.argv[1:] if argv is None else list(argv)
    command = command_in(argv)
    parser = build_parser([] if command is None else [command])
    if (
        command is not None
        and command not in COMMANDS
        and not set(argv[: argv.index(command)]) & _TOP_OPTIONS
    ):
        parser.error(
            f"got command {command!r}{did_you_mean(command, COMMANDS)}; expected one of {', '.join(COMMANDS)}"
        )
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
