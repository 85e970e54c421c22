"""The ensemble file: strict validation with located one-sentence errors (pytest.raises(match=...))."""

from __future__ import annotations

import re

import pytest

from pathcast.ensemble.spec import load_ensemble
from pathcast.errors import ScenarioError

GOOD_INPUT = """
  solar:
    path: technologies.generators.solar_pv.capex.base
    as: multiplier
    distribution: uniform
    low: 0.8
    high: 1.2
"""


def header(design: str = "latin_hypercube", extra: str = "members: 4\nseed: 1\n") -> str:
    return f"name: t\nbase: BASE\ndesign: {design}\n{extra}inputs:\n"


def test_valid_file_loads_with_paths_and_base_values(write_ensemble):
    spec = load_ensemble(write_ensemble(header() + GOOD_INPUT))
    assert spec.paths["solar"] == ("technologies", "generators", "solar_pv", "capex", "base")
    assert spec.base_values["solar"] == 800  # tests/data/tiny.yaml
    assert spec.file.inputs["solar"].apply == "multiplier"


def test_unknown_path_part_names_the_keys_and_suggests(write_ensemble):
    text = header() + GOOD_INPUT.replace("solar_pv", "solar_p")
    with pytest.raises(
        ScenarioError,
        match=r"inputs\.solar\.path: got 'technologies\.generators\.solar_p\.capex\.base'; "
        r"expected a field path that exists in tiny\.yaml; 'solar_p' is not one of the keys under "
        r"technologies\.generators .*\(did you mean 'solar_pv'\?\)\.$",
    ):
        load_ensemble(write_ensemble(text))


def test_path_into_a_number_is_an_error(write_ensemble):
    text = header() + GOOD_INPUT.replace("capex.base", "capex.base.more")
    with pytest.raises(
        ScenarioError, match=r"technologies\.generators\.solar_pv\.capex\.base holds a single value"
    ):
        load_ensemble(write_ensemble(text))


def test_unknown_distribution_suggests_the_closest(write_ensemble):
    text = header() + GOOD_INPUT.replace("distribution: uniform", "distribution: uniforn")
    with pytest.raises(
        ScenarioError,
        match=r"inputs\.solar\.distribution: got 'uniforn'; expected one of \['uniform', "
        r".*\] \(did you mean 'uniform'\?\)\.$",
    ):
        load_ensemble(write_ensemble(text))


def test_neither_distribution_nor_values(write_ensemble):
    text = header() + "  solar:\n    path: technologies.generators.solar_pv.capex.base\n    as: multiplier\n"
    with pytest.raises(
        ScenarioError,
        match=r"inputs\.solar: got \{.*\}; expected a 'distribution' \(one of .*\) or a "
        r"list of 'values'\.$",
    ):
        load_ensemble(write_ensemble(text))


def test_unknown_field_of_a_distribution(write_ensemble):
    text = header() + GOOD_INPUT.replace("high: 1.2", "high: 1.2\n    hihg: 3")
    with pytest.raises(
        ScenarioError,
        match=r"inputs\.solar\.hihg: got 'hihg'; expected one of the fields \[.*'high'.*\] "
        r"\(did you mean 'high'\?\)\.$",
    ):
        load_ensemble(write_ensemble(text))


def test_unknown_top_level_field(write_ensemble):
    text = header(extra="members: 4\nseed: 1\nseeds: 2\n") + GOOD_INPUT
    with pytest.raises(
        ScenarioError, match=r"seeds: got 'seeds'; expected one of the fields .* \(did you mean 'seed'\?\)"
    ):
        load_ensemble(write_ensemble(text))


def test_missing_as(write_ensemble):
    text = header() + GOOD_INPUT.replace("    as: multiplier\n", "")
    with pytest.raises(
        ScenarioError, match=r"inputs\.solar: got 'nothing'; expected the required field 'as'\.$"
    ):
        load_ensemble(write_ensemble(text))


def test_latin_hypercube_needs_a_seed(write_ensemble):
    text = header(extra="members: 4\n") + GOOD_INPUT
    with pytest.raises(
        ScenarioError,
        match=r"\(top level\): got .*; expected 'seed' \(a whole number, so the samples can "
        r"be made again\) with design latin_hypercube\.$",
    ):
        load_ensemble(write_ensemble(text))


def test_low_not_below_high(write_ensemble):
    text = header() + GOOD_INPUT.replace("low: 0.8", "low: 1.5")
    with pytest.raises(
        ScenarioError, match=r"inputs\.solar: got .*; expected low below high, not low 1\.5 and high 1\.2\.$"
    ):
        load_ensemble(write_ensemble(text))


def test_negative_sd(write_ensemble):
    text = header() + (
        "  gas:\n    path: technologies.supplies.gas_import.price\n    as: multiplier\n"
        "    distribution: normal\n    mean: 1\n    sd: -0.1\n"
    )
    with pytest.raises(ScenarioError, match=r"inputs\.gas\.sd: got -0\.1; expected greater than 0\.$"):
        load_ensemble(write_ensemble(text))


def test_multiplier_on_a_mapping_that_is_no_time_path(write_ensemble):
    text = header() + GOOD_INPUT.replace("capex.base", "capex")
    with pytest.raises(
        ScenarioError,
        match=re.escape(
            "inputs.solar.path: got 'technologies.generators.solar_pv.capex'; "
            "expected a field holding a number, a quantity with a unit or a {year: value} path (this one holds "
            "a mapping with the keys ['annual_decline', 'base']: point the path at one of them, or use "
            "'as: absolute')."
        ),
    ):
        load_ensemble(write_ensemble(text))


def test_multiplier_values_must_be_numbers(write_ensemble):
    text = header("grid", "") + (
        "  gas:\n    path: technologies.supplies.gas_import.price\n    as: multiplier\n"
        "    values: [1, '9 USD/GJ']\n"
    )
    with pytest.raises(
        ScenarioError,
        match=r"inputs\.gas\.values\.1: got '9 USD/GJ'; expected a number \(a multiplier "
        r"of the base value\)\.$",
    ):
        load_ensemble(write_ensemble(text))


def test_grid_member_count_must_match(write_ensemble):
    text = header("grid", "members: 5\n") + (
        "  budget:\n    path: policy.carbon_budget.total_mt\n    as: absolute\n    values: [20, 30]\n"
    )
    with pytest.raises(
        ScenarioError,
        match=r"members: got 5; expected 2 \(the design grid makes that many\) or no "
        r"'members' field\.$",
    ):
        load_ensemble(write_ensemble(text))


def test_same_field_twice(write_ensemble):
    text = header() + GOOD_INPUT + GOOD_INPUT.replace("  solar:", "  solar_again:")
    with pytest.raises(
        ScenarioError,
        match=r"inputs\.solar_again\.path: .*expected a field not varied already "
        r"\(inputs\.solar varies it\)\.$",
    ):
        load_ensemble(write_ensemble(text))


def test_missing_base_file(write_ensemble):
    text = header().replace("BASE", "no_such.yaml") + GOOD_INPUT
    with pytest.raises(ScenarioError, match=r"base: got 'no_such\.yaml'; expected an existing scenario file"):
        load_ensemble(write_ensemble(text))


def test_bad_input_label(write_ensemble):
    text = header() + GOOD_INPUT.replace("  solar:", "  2solar:")
    with pytest.raises(
        ScenarioError,
        match=r"inputs\.2solar: got '2solar'; expected an input label of letters, digits and "
        r"underscores, starting with a letter\.$",
    ):
        load_ensemble(write_ensemble(text))


def test_no_such_ensemble_file(tmp_path):
    with pytest.raises(ScenarioError, match=r"missing\.yaml: no such ensemble file\.$"):
        load_ensemble(tmp_path / "missing.yaml")


def test_year_key_and_list_index_paths(write_ensemble):
    text = header() + (
        "  diesel_2029:\n    path: technologies.supplies.diesel_import.price.2029\n    as: multiplier\n"
        "    distribution: uniform\n    low: 0.9\n    high: 1.1\n"
        "  gas_fleet:\n    path: technologies.generators.gas_combined_cycle.existing.0.capacity_mw\n"
        "    as: multiplier\n    distribution: uniform\n    low: 0.9\n    high: 1.1\n"
    )
    spec = load_ensemble(write_ensemble(text))
    assert spec.paths["diesel_2029"][-1] == 2029
    assert spec.paths["gas_fleet"][-2:] == (0, "capacity_mw")


def test_summary_of_a_folder_that_is_no_ensemble(tmp_path):
    from pathcast.ensemble import ensemble_robustness_section

    with pytest.raises(
        ScenarioError,
        match=r"ensemble\.json: got no such file; expected an ensemble folder written by "
        r"'pathcast ensemble'\.$",
    ):
        ensemble_robustness_section(tmp_path)


def test_a_key_given_twice_names_the_file_line_and_key(write_ensemble):
    # the ensemble file is read with the scenario loader's YAML reader, which refuses duplicate keys
    text = header("grid", "") + (
        "  margin:\n    path: policy.reserve_margin\n    as: absolute\n    values: [0.1]\n    values: [0.2]\n"
    )
    path = write_ensemble(text)
    with pytest.raises(
        ScenarioError,
        match=rf"^{re.escape(str(path))}: line 9: got the key 'values' \(inputs\.margin\.values\) a second time in "
        r"one mapping \(first at line 8\); expected each key once\.$",
    ):
        load_ensemble(path)
