"""Pooled curtailment is a reformulation, not a change of model: the per-generator formulation (one output variable
and limit row per generator and hour) and the pooled one reach the same optimum. Exact equality of the optimum
follows from the LP (curtailing a generator that costs nothing is free, whichever it is); the checks below are
common practice, no source. The independent scipy formulation in test_linprog_reference.py checks the pooled model
against the outside world."""

from __future__ import annotations

import numpy as np
import pytest

from pathcast.pipeline import run_scenario, with_changes
from tests.conftest import DATA


def _run(pooled: bool, **changes):
    def hook(inputs):
        inputs = with_changes(inputs, solver={**inputs.solver, "pooled_curtailment": pooled})
        return with_changes(inputs, **changes) if changes else inputs

    return run_scenario(DATA / "tiny.yaml", inputs_hook=hook)


@pytest.fixture(scope="module")
def both():
    return _run(True), _run(False)


def test_same_optimum_with_fewer_rows(both):
    pooled, per_generator = both
    assert pooled.solution.objective == pytest.approx(per_generator.solution.objective, rel=1e-9)
    ctx = pooled.model.context
    assert [t.name for t in ctx.pooled_generators] == ["solar_pv", "wind_onshore"]
    hours = ctx.Y * ctx.D * ctx.H
    # two limit rows per hour become one curtailment row; two output columns become one curtailment column
    assert per_generator.solution.rows - pooled.solution.rows == hours
    assert per_generator.solution.columns - pooled.solution.columns == hours
    a, b = pooled.result.emissions_total, per_generator.result.emissions_total
    assert a["emissions_mtco2"].to_numpy() == pytest.approx(
        b["emissions_mtco2"].to_numpy(), rel=1e-7, abs=1e-9
    )


def test_capacity_and_carbon_price_agree(both):
    pooled, per_generator = both
    a = pooled.result.capacity.set_index(["technology", "year"])["capacity_mw"]
    b = per_generator.result.capacity.set_index(["technology", "year"])["capacity_mw"]
    # the optimum's value is unique; capacities are too here (no two generators with the same costs and profile)
    assert a.to_numpy() == pytest.approx(b.reindex(a.index).to_numpy(), rel=1e-6, abs=1e-3)
    pa = pooled.result.carbon_price["carbon_price_per_tco2"].to_numpy()
    pb = per_generator.result.carbon_price["carbon_price_per_tco2"].to_numpy()
    assert pa == pytest.approx(pb, rel=1e-6)


def test_pooled_output_stays_within_availability_and_balances_close(both):
    pooled, _ = both
    r = pooled.result
    hourly = r.electricity_hourly
    net = hourly.groupby(["year", "day", "hour"])["power_mw"].sum()
    assert np.abs(net.to_numpy()).max() < 1e-6 * hourly["power_mw"].abs().max()
    ctx = pooled.model.context
    capacity = r.capacity.set_index(["technology", "year"])["capacity_mw"]
    for t in ctx.pooled_generators:
        power = hourly[hourly["technology"] == t.name]
        assert (power["power_mw"] >= -1e-9).all()
        available = (
            capacity.loc[t.name].reindex(power["year"]).to_numpy()
            * t.availability[[ctx.inputs.day_names.index(d) for d in power["day"]], power["hour"]]
        )
        assert (power["power_mw"].to_numpy() <= available + 1e-6).all()


def test_curtailed_energy_is_available_less_generated(both):
    for run in both:
        el = run.result.electricity.set_index(["technology", "year"])
        assert (el["curtailed_twh"] >= 0).all()
        assert (
            el.loc["gas_combined_cycle", "curtailed_twh"] == 0
        ).all()  # burns fuel: never counted as curtailed
        free = el.loc[["solar_pv", "wind_onshore"]]
        # available energy = generated + curtailed, from the capacity and the profiles
        ctx = run.model.context
        capacity = run.result.capacity.set_index(["technology", "year"])["capacity_mw"]
        w = ctx.inputs.day_weights
        for t in ctx.pooled_generators or [g for g in ctx.generators if g.fuel is None]:
            available = (
                capacity.loc[t.name].to_numpy() * float((t.availability * w[:, None]).sum()) / 1e6
            )  # TWh
            both_parts = (
                free.loc[t.name, "generation_twh"].to_numpy() + free.loc[t.name, "curtailed_twh"].to_numpy()
            )
            assert both_parts == pytest.approx(available, rel=1e-6, abs=1e-9)


def test_clean_share_reads_pooled_output(both):
    pooled, per_generator = both
    share = np.full(pooled.model.context.Y, 0.7)
    a, b = _run(True, clean_share=share), _run(False, clean_share=share)
    assert a.solution.objective == pytest.approx(b.solution.objective, rel=1e-9)
    assert a.solution.objective > pooled.solution.objective  # the share binds
    el = a.result.electricity
    gen = el[el["kind"] == "generator"].groupby("technology")["generation_twh"].sum()
    clean = gen.drop("gas_combined_cycle").sum()
    assert clean >= 0.7 * gen.sum() * (1 - 1e-6)
