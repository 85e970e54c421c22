"""`pathcast run` computes in one call (pathcast.analysis.achievability.run_checking_budget) what the library gives:
run_scenario with an overshoot price returns the summary that `pathcast run --allow-overshoot` prints and writes.

Fixture: tests/data/analytics_tight.yaml (a 10 MtCO2 budget over 2025-2029 that the slow build-out cannot meet).
Checks are computed (the LP's own accounting), no outside source.
"""

from __future__ import annotations

import json

import pytest

from pathcast.analysis.achievability import run_checking_budget
from pathcast.cli import main
from pathcast.errors import ScenarioError
from pathcast.pipeline import overshoot_figures, run_scenario
from tests.conftest import DATA, tiny_mapping, write_scenario

PRICE = 100.0  # [currency/tCO2]


@pytest.fixture(scope="module")
def overshoot_run():
    return run_scenario(DATA / "analytics_tight.yaml", budget_overshoot_price=PRICE)


def test_run_scenario_with_an_overshoot_price_gives_the_summary_pathcast_run_writes(
    overshoot_run, tmp_path, capsys
):
    out = tmp_path / "overshoot"
    argv = ["run", str(DATA / "analytics_tight.yaml"), "--out", str(out), "--no-excel", "--no-parquet"]
    assert main([*argv, "--quiet", "--json", "--allow-overshoot", str(PRICE)]) == 0
    printed = json.loads(capsys.readouterr().out)
    written = json.loads((out / "summary.json").read_text())
    library = json.loads(json.dumps(dict(overshoot_run.result.summary), default=str))
    assert printed["summary"] == written
    assert written.keys() == library.keys()
    for key, value in library.items():  # the same LP solved twice
        assert written[key] == (
            pytest.approx(value, rel=1e-9, abs=1e-9) if isinstance(value, float) else value
        )
    # computed: everything above the budget is overshoot, paid at the price
    s = overshoot_run.result.summary
    inside = overshoot_run.result.emissions_total.query("2025 <= year <= 2029")["emissions_mtco2"].sum()
    assert s["budget_overshoot_mtco2"] == pytest.approx(inside - 10.0, rel=1e-6)
    assert s["budget_overshoot_price_per_tco2"] == PRICE
    assert s["budget_overshoot_cost_million"] == pytest.approx(s["budget_overshoot_mtco2"] * PRICE, rel=1e-12)
    # and the text summary prints the same figures
    assert main([*argv, "--quiet", "--allow-overshoot", str(PRICE)]) == 0
    text = capsys.readouterr().out
    assert f"budget overshoot {s['budget_overshoot_mtco2']:,.3f} MtCO2 at 100.00" in text


def test_a_run_without_an_overshoot_price_has_no_overshoot_figures(tiny_run):
    assert not {k for k in tiny_run.result.summary if k.startswith("budget_overshoot")}


def test_overshoot_figures_never_report_a_negative_overshoot(overshoot_run):
    from dataclasses import replace

    from pathcast.model.solution_values import read_solution

    policy = read_solution(overshoot_run.model, overshoot_run.solution).policy
    assert overshoot_figures(policy, PRICE)["budget_overshoot_mtco2"] == policy.budget_overshoot_mtco2
    tolerance = replace(policy, budget_overshoot_mtco2=-1e-9)  # a solver tolerance below zero
    assert overshoot_figures(tolerance, PRICE) == {
        "budget_overshoot_mtco2": 0.0,
        "budget_overshoot_price_per_tco2": PRICE,
        "budget_overshoot_cost_million": 0.0,
    }


def test_run_scenario_refuses_a_negative_price_and_a_scenario_without_a_budget(tmp_path):
    with pytest.raises(
        ScenarioError, match=r"--allow-overshoot -5\.0: expected a price >= 0 \[currency/tCO2\]\."
    ):
        run_scenario(DATA / "tiny.yaml", budget_overshoot_price=-5.0)
    with pytest.raises(ScenarioError, match=r"--allow-overshoot nan: expected a price >= 0"):
        run_scenario(DATA / "tiny.yaml", budget_overshoot_price=float("nan"))
    mapping = tiny_mapping()
    del mapping["policy"]["carbon_budget"]
    path = write_scenario(tmp_path, mapping)
    with pytest.raises(
        ScenarioError,
        match=r"scenario\.yaml: policy\.carbon_budget: got none; expected a carbon budget for --allow-overshoot to "
        r"relax\.",
    ):
        run_scenario(path, budget_overshoot_price=50.0)


def test_run_checking_budget_gives_the_verdict(tmp_path):
    achievable = run_checking_budget(DATA / "tiny.yaml")
    assert achievable.achievable and achievable.diagnosis is not None and achievable.diagnosis.achievable
    achievable.raise_if_not_achievable()  # nothing raised
    assert achievable.diagnosis.no_budget_run is None  # an achievable budget needs no extra solve
    priced = run_checking_budget(DATA / "analytics_tight.yaml", budget_overshoot_price=PRICE)
    assert priced.diagnosis is None and priced.achievable  # a priced overshoot is no hard limit
    mapping = tiny_mapping()
    del mapping["policy"]["carbon_budget"]
    no_budget = run_checking_budget(write_scenario(tmp_path, mapping))
    assert no_budget.diagnosis is None and no_budget.achievable
