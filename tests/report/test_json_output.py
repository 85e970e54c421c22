"""Every command with --json prints one JSON object whose first key is "schema_version": 1 (README, Commands), and
the text and JSON of a command come from the renderers of pathcast.report. In-process, every folder under tmp_path."""

from __future__ import annotations

import argparse
import json
import math

import numpy as np
import pytest

from pathcast.cli import COMMANDS, build_parser, main
from pathcast.report.json_output import SCHEMA_VERSION, plain, render_document
from tests.conftest import DATA

# the --json commands and an argument list each (the result folder is filled in by the test)
JSON_COMMANDS = {
    "run": ["run", str(DATA / "tiny.yaml"), "--quiet", "--no-excel", "--no-parquet", "--out", "{tmp}/run"],
    "check": ["check", str(DATA / "tiny.yaml")],
    "rates": ["rates", "{folder}", "--from", "2025", "--to", "2026", "--step", "1"],
    "delay": ["delay", str(DATA / "tiny.yaml"), "--start", "2025", "--quiet"],
    "compare": ["compare", "{folder}", "--out", "{tmp}/comparison", "--quiet"],
}


def _commands_with_json() -> set[str]:
    parser = build_parser()
    sub = next(a for a in parser._actions if isinstance(a, argparse._SubParsersAction))
    return {
        name
        for name, command in sub.choices.items()
        if any("--json" in action.option_strings for action in command._actions)
    }


def test_every_command_with_json_is_checked_here():
    assert _commands_with_json() == set(JSON_COMMANDS)
    assert set(JSON_COMMANDS) <= set(COMMANDS)


@pytest.mark.parametrize("command", sorted(JSON_COMMANDS))
def test_json_output_carries_the_schema_version_first(command, tiny_folder, tmp_path, capsys):
    argv = [a.format(tmp=tmp_path, folder=tiny_folder) for a in JSON_COMMANDS[command]]
    assert main([*argv, "--json"]) == 0
    text = capsys.readouterr().out
    document = json.loads(text)
    assert next(iter(document)) == "schema_version" and document["schema_version"] == SCHEMA_VERSION == 1
    assert "NaN" not in text  # NaN is written as null


def test_shapes(tiny_folder, tmp_path, capsys):
    assert main(["check", str(DATA / "tiny.yaml"), "--json"]) == 0
    facts = json.loads(capsys.readouterr().out)
    assert facts["valid"] is True and facts["scenario"] == "tiny" and facts["years"][0] == 2025
    assert main(["compare", str(tiny_folder), "--out", str(tmp_path / "c"), "--json", "--quiet"]) == 0
    document = json.loads(capsys.readouterr().out)
    assert list(document) == ["schema_version", "scenarios"] and list(document["scenarios"]) == ["tiny"]


def test_an_ensemble_file_checks_with_the_schema_version(capsys):
    assert main(["check", str(DATA / "ensemble_lhs.yaml"), "--json"]) == 0
    facts = json.loads(capsys.readouterr().out)
    assert facts["schema_version"] == 1 and facts["kind"] == "ensemble"


def test_plain_values():
    assert plain(np.float64(1.5)) == 1.5 and type(plain(np.int64(3))) is int
    assert plain(math.nan) is None and plain(np.float32("nan")) is None and plain("x") == "x"
    assert json.loads(render_document({"a": np.int64(2)})) == {"schema_version": 1, "a": 2}
