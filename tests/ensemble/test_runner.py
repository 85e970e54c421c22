"""Running ensembles: serial and on a 2-worker dask LocalCluster (same results), resuming after an interruption
(only the rest is solved), failed members recorded while the others finish, outputs, CLI and memo section."""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest

from pathcast.cli import main
from pathcast.ensemble import ensemble_robustness_section, run_ensemble, summarise_ensemble
from pathcast.ensemble import worker as worker_module
from pathcast.ensemble.store import MemberStore

COMPARED = [
    "total_discounted_cost_million",
    "cumulative_emissions_mtco2",
    "final_year_emissions_mtco2",
    "carbon_price_final_year_per_tco2",
    "required_reduction_rate_per_yr",
]


@pytest.fixture
def count_solves(monkeypatch):
    """Count the members built and solved in this process (serial runs)."""
    calls = []
    original = worker_module._solve

    def counting(context, task, **kwargs):
        calls.append(task.hash)
        return original(context, task, **kwargs)

    monkeypatch.setattr(worker_module, "_solve", counting)
    return calls


@pytest.fixture(scope="module")
def serial_lhs(tmp_path_factory):
    from pathlib import Path

    out = tmp_path_factory.mktemp("serial") / "lhs"
    run = run_ensemble(
        Path(__file__).resolve().parents[1] / "data" / "ensemble_lhs.yaml", out, serial=True, progress=False
    )
    return run


def test_serial_run_writes_members_tables_and_figures(serial_lhs):
    out = serial_lhs.out
    assert serial_lhs.solved_now == 6 and serial_lhs.failed_now == 0 and serial_lhs.reference_solves == 1
    files = sorted(p.name for p in (out / "members").iterdir())
    assert len(files) == 7 and all(
        f.endswith(".json") for f in files
    )  # 6 members + the base; no temporary files
    members = pd.read_parquet(out / "tables" / "members.parquet")
    assert len(members) == 6 and (members["status"] == "solved").all()
    assert {"solar_capex_multiplier", "gas_price_multiplier", "demand_growth", "budget_mt"} <= set(
        members.columns
    )
    assert members["warm_start"].all()
    assert pd.read_csv(out / "tables" / "members.csv").shape == members.shape
    percentiles = pd.read_csv(out / "tables" / "yearly_percentiles.csv")
    assert {"emissions_mtco2", "cumulative_mtco2", "capacity_mw"} <= set(percentiles["quantity"])
    assert (percentiles["p5"] <= percentiles["p50"] + 1e-9).all() and (
        percentiles["p50"] <= percentiles["p95"] + 1e-9
    ).all()
    for name in ("emissions_fan", "capacity_fan", "distributions", "budget_probability"):
        assert (out / "figures" / f"{name}.png").stat().st_size > 10_000
    summary = json.loads((out / "summary.json").read_text())
    # the budget is a constraint of every member and all demand is served: all stay within their budget
    assert summary["probability_within_budget"] == 1.0


@pytest.mark.slow  # starts a local dask cluster of worker processes (about 4-6 s)
def test_distributed_run_equals_serial_run(serial_lhs, tmp_path):
    distributed = run_ensemble(serial_lhs.spec, tmp_path / "dask", workers=2, progress=False, figures=False)
    assert distributed.mode == "local cluster" and distributed.workers == 2
    assert distributed.solved_now == 6
    a = summarise_ensemble(serial_lhs.out).members.set_index("hash")
    b = summarise_ensemble(distributed.out).members.set_index("hash").loc[a.index]
    for column in COMPARED:
        np.testing.assert_allclose(
            b[column].to_numpy(float), a[column].to_numpy(float), rtol=1e-9, err_msg=column
        )
    ca = summarise_ensemble(serial_lhs.out).capacity.sort_values(["member", "technology", "year"])
    cb = summarise_ensemble(distributed.out).capacity.sort_values(["member", "technology", "year"])
    np.testing.assert_allclose(
        cb["capacity_mw"].to_numpy(float), ca["capacity_mw"].to_numpy(float), atol=1e-6
    )


def test_interrupted_run_resumes_and_solves_only_the_rest(data_dir, tmp_path, count_solves):
    out = tmp_path / "resume"
    first = run_ensemble(
        data_dir / "ensemble_lhs.yaml", out, serial=True, limit=2, progress=False, figures=False
    )
    assert first.solved_now == 2 and len(count_solves) == 3  # the base (for its basis) + 2 members
    assert summarise_ensemble(out).stats["pending"] == 4
    count_solves.clear()
    second = run_ensemble(data_dir / "ensemble_lhs.yaml", out, serial=True, progress=False, figures=False)
    assert second.skipped == 2 and second.solved_now == 4 and second.reference_solves == 0
    assert len(count_solves) == 4  # the basis was kept, so the base is not solved again
    count_solves.clear()
    third = run_ensemble(data_dir / "ensemble_lhs.yaml", out, serial=True, progress=False, figures=False)
    assert third.attempted == 0 and third.skipped == 6 and count_solves == []


def test_failed_member_is_reported_and_the_others_finish(data_dir, tmp_path, count_solves, capsys):
    out = tmp_path / "fail"
    code = main(
        [
            "ensemble",
            str(data_dir / "ensemble_fail.yaml"),
            "--serial",
            "--out",
            str(out),
            "--quiet",
            "--no-figures",
        ]
    )
    assert code == 0
    captured = capsys.readouterr()
    assert "4 members (4 distinct scenarios), 3 solved, 1 failed" in captured.out
    # each year is valid alone (checked when the file is read); together they break a rule between fields, found
    # when the member is validated before its solve: one located sentence naming the file, inputs and values
    assert (
        f"member 3 (sample): ScenarioError: {data_dir / 'ensemble_fail.yaml'}: the member with "
        "inputs.first_year = 2027 and inputs.last_year = 2026: got a scenario whose field metadata breaks the "
        "scenario's rule; expected " in captured.err
    )
    members = pd.read_csv(out / "tables" / "members.csv")
    assert list(members["status"]) == ["solved", "solved", "solved", "failed"]
    assert members.loc[3, "error_type"] == "ScenarioError"
    # a re-run keeps the invalid member's record (it would fail again) unless asked to retry it
    count_solves.clear()
    assert (
        run_ensemble(
            data_dir / "ensemble_fail.yaml", out, serial=True, progress=False, outputs=False
        ).attempted
        == 0
    )
    assert (
        run_ensemble(
            data_dir / "ensemble_fail.yaml",
            out,
            serial=True,
            progress=False,
            outputs=False,
            retry_failed=True,
        ).failed_now
        == 1
    )


def test_transient_failure_is_solved_again(data_dir, tmp_path):
    out = tmp_path / "transient"
    run = run_ensemble(data_dir / "ensemble_fail.yaml", out, serial=True, progress=False, outputs=False)
    store = MemberStore(out)
    digest = run.hashes[0]
    store.put(
        {
            "hash": digest,
            "samples": {},
            "status": "failed",
            "error": {"type": "KilledWorker", "message": "worker died", "deterministic": False},
        }
    )
    again = run_ensemble(data_dir / "ensemble_fail.yaml", out, serial=True, progress=False, outputs=False)
    assert again.solved_now == 1 and store.get(digest)["status"] == "solved"


def test_one_at_a_time_tornado_and_memo_section(data_dir, tmp_path):
    out = tmp_path / "oat"
    run = run_ensemble(data_dir / "ensemble_oat.yaml", out, serial=True, progress=False)
    assert run.solved_now == 5 and run.reference_solves == 1  # the base is a member: solved once
    tornado = pd.read_csv(out / "tables" / "tornado.csv")
    emissions = tornado[
        (tornado["metric"] == "cumulative_emissions_mtco2") & (tornado["input"] == "budget_mt")
    ].iloc[0]
    # the budget binds in tiny.yaml, so cumulative emissions follow it (20 and 30 MtCO2, values of the fixture)
    assert emissions["at_low"] == pytest.approx(20.0, abs=1e-6) and emissions["at_high"] == pytest.approx(
        30.0, abs=1e-6
    )
    cost = tornado[
        (tornado["metric"] == "total_discounted_cost_million") & (tornado["input"] == "gas_price")
    ].iloc[0]
    assert cost["at_low"] < cost["base"] < cost["at_high"]  # dearer gas costs more
    assert (out / "figures" / "tornado.png").is_file()
    section = ensemble_robustness_section(out)
    assert section.startswith("## Robustness across an ensemble")
    assert "Probability of staying within the carbon budget: **100%**, 5 of the 5 members" in section
    assert "Inputs that move the total cost most" in section
    assert "emissions_fan.png" in section


def test_cli_rejects_zero_workers(data_dir, capsys):
    assert main(["ensemble", str(data_dir / "ensemble_lhs.yaml"), "--workers", "0"]) == 2
    assert "--workers: got 0; expected a whole number of worker processes >= 1." in capsys.readouterr().err


def test_reference_budget_replaces_the_members_own(write_ensemble, tmp_path):
    text = """name: ref
base: BASE
design: grid
reference_budget_mt: 20
inputs:
  gas:
    path: technologies.supplies.gas_import.price
    as: multiplier
    values: [1.0]
"""
    out = tmp_path / "ref"
    run_ensemble(write_ensemble(text), out, serial=True, progress=False, figures=False)
    summary = summarise_ensemble(out)
    row = summary.members.iloc[0]
    # tiny.yaml's own 25 MtCO2 budget binds, so 25 MtCO2 are emitted: 5 over the reference budget of 20
    assert row["budget_mtco2"] == 20 and row["budget_margin_mtco2"] == pytest.approx(-5.0, abs=1e-6)
    assert summary.stats["probability_within_budget"] == 0.0
    last = summary.yearly.sort_values("year").iloc[-1]
    assert (
        last["cumulative_in_budget_period_mtco2"] == pytest.approx(25.0, abs=1e-6)
        and last["budget_mtco2"] == 20
    )


@pytest.mark.slow  # starts a local dask cluster for the CLI to connect to (about 2-3 s)
def test_cli_connects_to_an_existing_scheduler(data_dir, tmp_path, capsys):
    from distributed import LocalCluster

    with LocalCluster(n_workers=1, threads_per_worker=1, processes=True, dashboard_address=None) as cluster:
        address = cluster.scheduler_address
        code = main(
            [
                "ensemble",
                str(data_dir / "ensemble_fail.yaml"),
                "--scheduler",
                address,
                "--out",
                str(tmp_path / "remote"),
                "--quiet",
                "--no-figures",
            ]
        )
    assert code == 0
    out = capsys.readouterr().out
    assert f"(scheduler {address}, 1 worker)" in out and "3 solved, 1 failed" in out
