"""The command line, in-process; every output under tmp_path."""

from __future__ import annotations

import json
from pathlib import Path

import pandas as pd
import pytest

from pathcast.cli import main
from pathcast.results.run_result import TABLES
from pathcast.results.writers import read_result
from tests.conftest import DATA

DEMO = Path(__file__).parents[1] / "scenarios" / "demo"


def test_run_writes_every_table_and_the_summary(tmp_path, capsys):
    out = tmp_path / "tiny"
    assert main(["run", str(DATA / "tiny.yaml"), "--out", str(out), "--profile"]) == 0
    printed = capsys.readouterr().out
    assert "total discounted system cost" in printed and "screening-level planning model" in printed
    assert "rows" in printed and "solve" in printed  # --profile
    for name in TABLES:
        assert (out / f"{name}.csv").is_file() and (out / f"{name}.parquet").is_file()
    assert set(pd.ExcelFile(out / "results.xlsx").sheet_names) >= {"capacity", "emissions_total", "costs"}
    summary = json.loads((out / "summary.json").read_text())
    manifest = json.loads((out / "manifest.json").read_text())
    assert summary["within_budget"] is True
    assert manifest["solver"]["status"] == "optimal" and len(manifest["input_hash"]) == 64
    assert manifest["versions"]["highspy"] and manifest["lp"]["rows"] > 0
    again = read_result(out)
    assert again.summary == summary
    pd.testing.assert_frame_equal(again.capacity, pd.read_csv(out / "capacity.csv"))


def test_run_json_for_scripts(tmp_path, capsys):
    out = tmp_path / "tiny"
    assert main(["run", str(DATA / "tiny.yaml"), "--out", str(out), "--json", "--quiet", "--no-excel"]) == 0
    printed = json.loads(capsys.readouterr().out)
    assert printed["summary"] == json.loads((out / "summary.json").read_text())
    assert printed["result_folder"] == str(out)


def test_check_reports_a_valid_scenario(capsys):
    assert main(["check", str(DEMO / "budget_no_new_gas.yaml"), "--json"]) == 0
    facts = json.loads(capsys.readouterr().out)
    assert facts["valid"] and facts["representative_days"] == 6 and len(facts["files"]) == 3


@pytest.mark.slow
def test_demo_budget_case_runs(tmp_path):
    out = tmp_path / "demo"
    assert main(["run", str(DEMO / "budget.yaml"), "--out", str(out), "--quiet", "--no-excel"]) == 0
    summary = json.loads((out / "summary.json").read_text())
    assert summary["within_budget"] and summary["unserved_electricity_twh"] < 1e-6
    assert summary["cumulative_emissions_mtco2"] <= 750 * (1 + 1e-6)
