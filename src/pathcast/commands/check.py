"""Validate a scenario file (and the files it extends and reads) without building or solving anything. An ensemble
file (one with 'inputs' and 'design') is validated as one, with its base scenario and the range of every input, and
the outcome names the command that reads it, 'pathcast ensemble'."""

from __future__ import annotations

import argparse

# computed by pathcast.scenario.facts.check_file, rendered by pathcast.report.console.render_check and
# pathcast.report.json_output.render_check_json


def add_arguments(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("file", help="scenario YAML file (or ensemble file)")
    parser.add_argument("--json", action="store_true", help="print the outcome as JSON")


def execute(args: argparse.Namespace) -> int:
    from ..report.console import render_check
    from ..report.json_output import render_check_json
    from ..scenario.facts import check_file  # pydantic, pint, networkx: only when a file is checked

    facts = check_file(args.file)
    print(render_check_json(facts) if args.json else render_check(facts))
    return 0
