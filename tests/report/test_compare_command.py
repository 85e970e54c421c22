"""`pathcast compare`: scenario files and result folders in, comparison.csv and the overlay charts out, JSON or text
on the terminal; a folder that is not an earlier comparison is never replaced."""

from __future__ import annotations

import json

import pandas as pd
import pytest

from pathcast.cli import main
from pathcast.report.figures import OVERLAY_FIGURES
from tests.conftest import DATA


def test_compare_command(reference_folder, tmp_path, capsys):
    out = tmp_path / "comparison"
    code = main(
        ["compare", str(reference_folder), str(DATA / "tiny.yaml"), "--out", str(out), "--json", "--quiet"]
    )
    assert code == 0
    document = json.loads(capsys.readouterr().out)
    assert document["schema_version"] == 1
    printed = document["scenarios"]
    assert list(printed) == ["tiny_reference", "tiny"]
    assert printed["tiny"]["budget_exhaustion_year"] is None
    table = pd.read_csv(out / "comparison.csv", index_col="metric")
    assert float(table.loc["cumulative_emissions_mtco2", "tiny"]) == pytest.approx(
        printed["tiny"]["cumulative_emissions_mtco2"]
    )
    for name in OVERLAY_FIGURES:
        assert (out / f"{name}.png").is_file() and (out / f"{name}.svg").is_file()


def test_compare_command_text(tiny_folder, tmp_path, capsys):
    code = main(["compare", str(tiny_folder), "--out", str(tmp_path / "c"), "--quiet"])
    text = capsys.readouterr().out
    assert code == 0
    assert "total discounted system cost [million]" in text and "screening-level" in text


def test_compare_refuses_foreign_folder(tiny_folder, tmp_path, capsys):
    foreign = tmp_path / "notes"
    foreign.mkdir()
    (foreign / "keep.txt").write_text("mine")
    code = main(["compare", str(tiny_folder), "--out", str(foreign), "--quiet"])
    assert code == 2
    assert "a folder with other files and no comparison.csv" in capsys.readouterr().err
    assert (foreign / "keep.txt").read_text() == "mine"


def test_compare_missing_input(tmp_path, capsys):
    code = main(["compare", str(tmp_path / "nothing.yaml"), "--out", str(tmp_path / "c"), "--quiet"])
    assert code == 2
    assert (
        "got no such file or folder; expected a scenario YAML file or a result folder"
        in capsys.readouterr().err
    )
