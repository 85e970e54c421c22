"""Fast re-solves: a member warm-started from the base scenario's optimal basis reaches the same optimum as the
ordinary pipeline, in fewer simplex iterations."""

from __future__ import annotations

import pytest

from pathcast.ensemble.members import member_mapping, overrides_for, scenario_hash
from pathcast.ensemble.sampling import design_members
from pathcast.ensemble.spec import load_ensemble
from pathcast.ensemble.worker import MemberTask, SharedContext, solve_base, solve_member
from pathcast.pipeline import run_scenario


@pytest.fixture(scope="module")
def spec():
    from pathlib import Path

    return load_ensemble(Path(__file__).resolve().parents[1] / "data" / "ensemble_lhs.yaml")


def _context(spec, basis=None) -> SharedContext:
    return SharedContext(
        base_raw=spec.base_raw,
        base_path=str(spec.base_path),
        base_hash=spec.base_hash,
        provenance=dict(spec.base.provenance),
        files=tuple(spec.base.files),
        warm_start=True,
        basis=basis,
    )


def test_warm_started_member_matches_the_pipeline(spec, tmp_path):
    base_record, basis = solve_base(_context(spec))
    assert base_record["status"] == "solved" and basis is not None
    member = design_members(spec)[1]
    raw = member_mapping(spec, member.samples)
    task = MemberTask(scenario_hash(raw), member.samples, overrides_for(spec, member.samples))
    record = solve_member(task, _context(spec, basis))
    assert record["status"] == "solved"
    assert record["solver"]["warm_start"] is True

    import yaml

    path = tmp_path / "member.yaml"
    path.write_text(yaml.safe_dump(raw), encoding="utf-8")
    reference = run_scenario(path).result.summary  # the ordinary pipeline, cold start
    assert record["headline"]["objective_million"] == pytest.approx(reference["objective_million"], rel=1e-7)
    assert record["headline"]["cumulative_emissions_mtco2"] == pytest.approx(
        reference["cumulative_emissions_mtco2"], rel=1e-7
    )
    # fewer simplex iterations than a cold start: the point of the warm start
    assert record["solver"]["iterations"]["simplex"] < base_record["solver"]["iterations"]["simplex"]


def test_failed_member_is_a_record_not_an_exception(spec):
    task = MemberTask(
        "x" * 64, {"budget_mt": -5}, ((("policy", "carbon_budget", "total_mt"), "absolute", -5),)
    )
    record = solve_member(task, _context(spec))
    assert record["status"] == "failed"
    assert record["error"]["type"] == "ScenarioError" and record["error"]["deterministic"] is True
    assert "policy.carbon_budget.total_mt: got -5" in record["error"]["message"]
