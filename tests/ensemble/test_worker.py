"""Fast re-solves: the base HiGHS model with a member's costs and bounds equals the member's own hand-off, and a
warm-started member reaches the same optimum as the ordinary pipeline."""

from __future__ import annotations

import numpy as np
import pytest

from pathcast.ensemble.members import member_mapping, overrides_for, scenario_hash
from pathcast.ensemble.sampling import design_members
from pathcast.ensemble.spec import load_ensemble
from pathcast.ensemble.worker import BaseTemplate, MemberTask, SharedContext, solve_base, solve_member
from pathcast.model.build import build_linear_program
from pathcast.model.pyomo_model import to_pyomo
from pathcast.pipeline import run_scenario
from pathcast.scenario.inputs import prepare_inputs
from pathcast.scenario.loader import load_scenario_mapping
from pathcast.solve import handoff


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


def test_in_place_model_equals_the_members_own_handoff(spec):
    member = design_members(spec)[0]
    raw = member_mapping(spec, member.samples)
    model = build_linear_program(prepare_inputs(load_scenario_mapping(raw, spec.base_path).scenario))
    matrix, row_lower, row_upper = model.lp.matrix()
    own, own_cols, own_rows = handoff(to_pyomo(model.lp), *matrix.shape)
    template = BaseTemplate(_context(spec))
    adapted, cols, rows = template.adapt((model.lp, matrix, row_lower, row_upper))
    assert np.array_equal(cols, own_cols) and np.array_equal(rows, own_rows)
    for name in ("col_cost_", "col_lower_", "col_upper_", "row_lower_", "row_upper_"):
        assert np.array_equal(np.asarray(getattr(adapted, name)), np.asarray(getattr(own, name))), name
    # the capex, price, demand and budget samples change costs and bounds, not the matrix
    base_model = build_linear_program(prepare_inputs(spec.base.scenario))
    assert not np.array_equal(base_model.lp.cost_vector(), model.lp.cost_vector())


def test_warm_started_member_matches_the_pipeline(spec, tmp_path):
    base_record, basis = solve_base(_context(spec))
    assert base_record["status"] == "solved" and basis is not None
    member = design_members(spec)[1]
    raw = member_mapping(spec, member.samples)
    task = MemberTask(scenario_hash(raw), member.samples, overrides_for(spec, member.samples))
    record = solve_member(task, _context(spec, basis))
    assert record["status"] == "solved"
    assert record["solver"]["path"] == "in_place" and record["solver"]["warm_start"] is True

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
