"""Designs and member scenarios: reproducible samples, Latin-hypercube marginals, grid and one-at-a-time members,
multipliers on numbers, quantities with units and {year: value} paths, and the member hash."""

from __future__ import annotations

import numpy as np
import pytest
from scipy import stats

from pathcast.ensemble.members import member_mapping, scale_value, scenario_hash
from pathcast.ensemble.sampling import design_members, frozen_distribution, inverse_cdf
from pathcast.ensemble.spec import load_ensemble, member_count
from pathcast.scenario.loader import load_scenario_mapping

KS_P_THRESHOLD = (
    0.05  # reject a marginal when the Kolmogorov-Smirnov p-value falls below 5 % (common practice)
)

LHS = """name: lhs
base: BASE
design: latin_hypercube
members: {members}
seed: {seed}
inputs:
  tri:
    path: technologies.generators.solar_pv.capex.base
    as: multiplier
    distribution: triangular
    low: 0.6
    mode: 0.9
    high: 1.3
  uni:
    path: technologies.generators.wind_onshore.capex
    as: multiplier
    distribution: uniform
    low: 0.8
    high: 1.2
  norm:
    path: demand.electricity.growth
    as: absolute
    distribution: normal
    mean: 0.03
    sd: 0.01
  trunc:
    path: policy.carbon_budget.total_mt
    as: absolute
    distribution: normal
    mean: 25
    sd: 4
    low: 20
    high: 32
  logn:
    path: technologies.supplies.gas_import.price
    as: multiplier
    distribution: lognormal
    median: 1.0
    sigma: 0.3
  pick:
    path: technologies.storage.battery.lifetime
    as: absolute
    distribution: choice
    values: [10, 15, 20]
    probabilities: [0.2, 0.5, 0.3]
"""


def test_same_seed_same_samples_other_seed_other_samples(write_ensemble):
    first = design_members(load_ensemble(write_ensemble(LHS.format(members=12, seed=3), "a.yaml")))
    again = design_members(load_ensemble(write_ensemble(LHS.format(members=12, seed=3), "b.yaml")))
    other = design_members(load_ensemble(write_ensemble(LHS.format(members=12, seed=4), "c.yaml")))
    assert [m.samples for m in first] == [m.samples for m in again]
    assert [m.samples for m in first] != [m.samples for m in other]


def test_latin_hypercube_marginals_pass_kolmogorov_smirnov(write_ensemble):
    """One-sample Kolmogorov-Smirnov test (scipy.stats.kstest) of each continuous marginal against its stated
    distribution: p-value above 5 %; and, the property of a Latin hypercube (one point in each of the n equal-probability
    strata), the KS distance is at most 1/n."""
    n = 200
    spec = load_ensemble(write_ensemble(LHS.format(members=n, seed=7)))
    members = design_members(spec)
    for label in ("tri", "uni", "norm", "trunc", "logn"):
        values = np.array([m.samples[label] for m in members])
        dist = frozen_distribution(spec.file.inputs[label])
        result = stats.kstest(values, dist.cdf)
        assert result.pvalue > KS_P_THRESHOLD, label
        assert result.statistic <= 1.0 / n + 1e-12, label
    trunc = np.array([m.samples["trunc"] for m in members])
    assert trunc.min() >= 20 and trunc.max() <= 32


def test_choice_marginal_matches_its_probabilities(write_ensemble):
    n = 200
    members = design_members(load_ensemble(write_ensemble(LHS.format(members=n, seed=7))))
    picks = [m.samples["pick"] for m in members]
    # stratified: each value appears in proportion to its probability, to within one member
    for value, probability in ((10, 0.2), (15, 0.5), (20, 0.3)):
        assert abs(picks.count(value) - probability * n) <= 1


def test_inverse_cdf_of_a_triangular_input(write_ensemble):
    spec = load_ensemble(write_ensemble(LHS.format(members=4, seed=1)))
    low, mode, high = inverse_cdf(spec.file.inputs["tri"], np.array([0.0, (0.9 - 0.6) / (1.3 - 0.6), 1.0]))
    assert (low, mode, high) == pytest.approx((0.6, 0.9, 1.3))  # the CDF at the mode is (mode-low)/(high-low)


def test_grid_design_multiplies_the_levels(write_ensemble):
    text = """name: g
base: BASE
design: grid
grid_levels: 2
inputs:
  budget:
    path: policy.carbon_budget.total_mt
    as: absolute
    values: [20, 25, 30]
  gas:
    path: technologies.supplies.gas_import.price
    as: multiplier
    distribution: uniform
    low: 0.5
    high: 1.5
"""
    spec = load_ensemble(write_ensemble(text))
    members = design_members(spec)
    assert len(members) == 6
    assert member_count(spec) == 6  # 3 values x 2 grid levels, counted without sampling
    assert sorted({m.samples["gas"] for m in members}) == pytest.approx(
        [0.75, 1.25]
    )  # mid-quantiles 1/4 and 3/4
    assert [m.samples["budget"] for m in members[:2]] == [20, 20]


def test_one_at_a_time_design(data_dir):
    spec = load_ensemble(data_dir / "ensemble_oat.yaml")
    members = design_members(spec)
    assert member_count(spec) == len(members) == 5  # the base, then a low and a high per input
    assert [m.role for m in members] == [
        "base",
        "gas_price:low",
        "gas_price:high",
        "budget_mt:low",
        "budget_mt:high",
    ]
    assert members[0].samples == {}
    assert members[1].samples["gas_price"] == pytest.approx(0.6)  # 10 % quantile of uniform(0.5, 1.5)
    assert members[2].samples["gas_price"] == pytest.approx(1.4)
    assert members[3].samples == {"budget_mt": 20} and members[4].samples == {"budget_mt": 30}


def test_scale_value_on_numbers_units_and_time_paths():
    assert scale_value(8, 1.5) == 12.0
    assert scale_value("56.1 kg/GJ", 2.0) == "112.2 kg/GJ"
    assert scale_value({2025: 15, 2029: "17 USD/GJ"}, 2.0) == {2025: 30.0, 2029: "34.0 USD/GJ"}


def test_member_mapping_applies_samples_and_hash_matches_the_loader(data_dir):
    spec = load_ensemble(data_dir / "ensemble_lhs.yaml")
    member = design_members(spec)[0]
    raw = member_mapping(spec, member.samples)
    generators = raw["technologies"]["generators"]
    assert generators["solar_pv"]["capex"]["base"] == pytest.approx(800 * member.samples["solar_capex"])
    assert raw["policy"]["carbon_budget"]["total_mt"] == member.samples["budget_mt"]
    assert (
        spec.base_raw["technologies"]["generators"]["solar_pv"]["capex"]["base"] == 800
    )  # the base is untouched
    loaded = load_scenario_mapping(raw, spec.base_path)
    assert scenario_hash(raw) == loaded.input_hash
    assert scenario_hash(member_mapping(spec, {})) == spec.base_hash


def test_multiplier_on_a_time_path_scales_every_year(data_dir, write_ensemble):
    text = """name: p
base: BASE
design: grid
inputs:
  diesel:
    path: technologies.supplies.diesel_import.price
    as: multiplier
    values: [2]
"""
    spec = load_ensemble(write_ensemble(text))
    raw = member_mapping(spec, design_members(spec)[0].samples)
    assert raw["technologies"]["supplies"]["diesel_import"]["price"] == {
        2025: 30.0,
        2029: 34.0,
    }  # tiny.yaml x 2
