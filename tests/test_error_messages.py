"""Every error path says, in one sentence, the file, the field path, the value and what was expected."""

from __future__ import annotations

import re

import pytest

from pathcast.cli import main
from pathcast.errors import ScenarioError, SolverError
from pathcast.scenario.loader import load_scenario
from tests.conftest import DATA, tiny_mapping, write_scenario


def _error(tmp_path, change) -> str:
    m = tiny_mapping()
    change(m)
    path = write_scenario(tmp_path, m)
    with pytest.raises(ScenarioError) as info:
        load_scenario(path)
    message = str(info.value)
    assert str(path) in message and message.endswith(".") and "\n" not in message
    return message


def test_misspelt_field_suggests_the_right_one(tmp_path):
    def change(m):
        m["technologies"]["generators"]["solar_pv"]["capx"] = m["technologies"]["generators"]["solar_pv"].pop(
            "capex"
        )

    message = _error(tmp_path, change)
    assert re.search(
        r"technologies\.generators\.solar_pv\.capx: got 'capx'; expected one of the fields .*\(did you mean 'capex'\?\)",
        message,
    )


def test_unknown_fuel_suggests_nearest(tmp_path):
    message = _error(
        tmp_path, lambda m: m["technologies"]["generators"]["gas_combined_cycle"].update(fuel="natrual_gas")
    )
    assert re.search(
        r"technologies\.generators\.gas_combined_cycle\.fuel: got 'natrual_gas'; expected one of the commodities \[.*\] \(did you mean 'natural_gas'\?\)",
        message,
    )


def test_unknown_profile_suggests_nearest(tmp_path):
    message = _error(
        tmp_path, lambda m: m["technologies"]["generators"]["solar_pv"].update(availability="solr")
    )
    assert "solar_pv.availability: got 'solr'" in message and "(did you mean 'solar'?)" in message


def test_unknown_commodity_in_fuel_demand(tmp_path):
    message = _error(
        tmp_path, lambda m: m["demand"]["fuels"]["transport"].update(served_by=["diesel", "synthetic_disel"])
    )
    assert (
        "demand.fuels.transport.served_by.1: got 'synthetic_disel'" in message
        and "did you mean 'synthetic_diesel'" in message
    )


def test_wrong_profile_length(tmp_path):
    message = _error(
        tmp_path, lambda m: m["time"]["representative_days"][0]["availability"].update(solar=[0.5] * 23)
    )
    assert re.search(
        r"time\.representative_days\.0\.availability\.solar: got '23 values'; expected 24 hourly values",
        message,
    )


def test_demand_shape_length(tmp_path):
    message = _error(tmp_path, lambda m: m["time"]["representative_days"][1].update(demand_shape=[1.0] * 25))
    assert (
        "time.representative_days.1.demand_shape: got '25 values'; expected 24 hourly values for day 'winter'"
        in message
    )


def test_day_weights_must_sum_to_365(tmp_path):
    message = _error(tmp_path, lambda m: m["time"]["representative_days"][0].update(weight_days=170))
    assert (
        "time.representative_days.weight_days: got 355.0; expected day weights that sum to 365 days"
        in message
    )


def test_negative_cost(tmp_path):
    message = _error(tmp_path, lambda m: m["technologies"]["generators"]["wind_onshore"].update(fixed_om=-5))
    assert (
        "technologies.generators.wind_onshore.fixed_om: got -5; expected greater than or equal to 0"
        in message
    )


def test_unit_string_of_the_wrong_dimension(tmp_path):
    message = _error(
        tmp_path, lambda m: m["technologies"]["generators"]["wind_onshore"].update(capex="1.3 USD/kWh")
    )
    assert "wind_onshore.capex: got '1.3 USD/kWh'; expected a quantity convertible to USD/kW" in message


def test_foreign_currency_is_refused(tmp_path):
    message = _error(
        tmp_path, lambda m: m["technologies"]["generators"]["wind_onshore"].update(capex="1300 EUR/kW")
    )
    assert "money in the scenario's currency 'USD', not 'EUR'" in message


def test_unreachable_demand(tmp_path):
    def change(m):
        m["commodities"]["kerosene"] = {"emission_factor": 0.0715}
        m["demand"]["fuels"]["aviation"] = {"served_by": ["kerosene"], "base_year_pj": 10}

    message = _error(tmp_path, change)
    assert (
        "demand.fuels.aviation.served_by: got ['kerosene']; expected at least one commodity that some chain of supplies and converters can provide"
        in message
    )


def test_missing_required_field(tmp_path):
    message = _error(tmp_path, lambda m: m["technologies"]["generators"]["wind_onshore"].pop("lifetime"))
    assert (
        "technologies.generators.wind_onshore: got 'nothing'; expected the required field 'lifetime'"
        in message
    )


def test_budget_year_outside_horizon(tmp_path):
    message = _error(tmp_path, lambda m: m["policy"]["carbon_budget"].update(last_year=2040))
    assert "policy.carbon_budget.last_year: got 2040; expected a year from 2025 to 2029" in message


def test_extends_loop(tmp_path):
    (tmp_path / "a.yaml").write_text("extends: b.yaml\n")
    (tmp_path / "b.yaml").write_text("extends: a.yaml\n")
    with pytest.raises(
        ScenarioError,
        match=r"b\.yaml: extends: got 'a\.yaml'; expected no loop of extends \(a\.yaml -> b\.yaml -> a\.yaml\)",
    ):
        load_scenario(tmp_path / "a.yaml")


def test_extends_missing_parent(tmp_path):
    (tmp_path / "a.yaml").write_text("extends: nowhere.yaml\n")
    with pytest.raises(
        ScenarioError, match=r"a\.yaml: extends: got '.*nowhere\.yaml'; expected an existing scenario file"
    ):
        load_scenario(tmp_path / "a.yaml")


def test_error_is_located_in_the_file_that_set_the_field(tmp_path):
    write_scenario(tmp_path, tiny_mapping(), "base.yaml")
    (tmp_path / "variant.yaml").write_text(
        "extends: base.yaml\ntechnologies:\n  generators:\n    solar_pv: {lifetime: 0}\n"
    )
    with pytest.raises(
        ScenarioError,
        match=r"variant\.yaml: technologies\.generators\.solar_pv\.lifetime: got 0; expected greater than or equal to 1",
    ):
        load_scenario(tmp_path / "variant.yaml")


def test_yaml_syntax_error(tmp_path):
    (tmp_path / "bad.yaml").write_text("metadata: {name: x\n")
    with pytest.raises(ScenarioError, match=r"bad\.yaml: not valid YAML at line \d+, column \d+"):
        load_scenario(tmp_path / "bad.yaml")


def test_missing_file():
    with pytest.raises(ScenarioError, match=r"nowhere\.yaml: no such scenario file\."):
        load_scenario("nowhere.yaml")


def test_days_csv_with_wrong_columns(tmp_path):
    (tmp_path / "days.csv").write_text("day,weight,hour,demand\nd,365,0,1\n")
    m = tiny_mapping()
    m["time"]["representative_days"] = "days.csv"
    path = write_scenario(tmp_path, m)
    with pytest.raises(
        ScenarioError,
        match=r"days\.csv: \(columns\): got \[.*\]; expected the columns \['day', 'weight_days', 'hour', 'demand'\]",
    ):
        load_scenario(path)


def test_reserve_margin_without_firm_capacity(tmp_path):
    def change(m):
        gens = m["technologies"]["generators"]
        for g in gens.values():
            g["capacity_credit"] = 0.0
        m["technologies"]["storage"]["battery"]["capacity_credit"] = 0.0

    message = _error(tmp_path, change)
    assert (
        "policy.reserve_margin: got 0.1; expected null (no reserve-margin row), or some generator or storage with a "
        "capacity credit above 0 to meet it" in message
    )


def test_unknown_solver_method_in_scenario(tmp_path):
    message = _error(tmp_path, lambda m: m.update(solver={"method": "barrier"}))
    assert (
        "solver.method: got 'barrier'; expected one of 'auto', 'simplex', 'ipm', 'ipm-crossover' or 'pdlp'"
        in message
    )


def test_pooled_curtailment_must_be_true_or_false(tmp_path):
    message = _error(tmp_path, lambda m: m.update(solver={"pooled_curtailment": "maybe"}))
    assert "solver.pooled_curtailment: got 'maybe'; expected a valid boolean" in message


def test_solver_failure_is_exit_code_4(tmp_path, capsys):
    code = main(
        ["run", str(DATA / "tiny.yaml"), "--out", str(tmp_path / "out"), "--time-limit", "0.00001", "--quiet"]
    )
    assert code == 4
    err = capsys.readouterr().err
    assert re.search(r"HiGHS stopped with status 'time_limit'", err) and "Traceback" not in err
    assert not (tmp_path / "out").exists()


def test_solver_error_class():
    from pathcast.solve import highs_options_for

    with pytest.raises(SolverError, match=r"solver method 'barrier' is not one of \['auto', 'simplex'"):
        highs_options_for("barrier", 10)


def test_cli_bad_input_is_exit_code_2_without_traceback(tmp_path, capsys):
    m = tiny_mapping()
    m["technologies"]["generators"]["solar_pv"]["availability"] = "solr"
    path = write_scenario(tmp_path, m)
    out = tmp_path / "results"
    assert main(["run", str(path), "--out", str(out)]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") <= 2 and "Traceback" not in err and "did you mean 'solar'" in err
    assert not out.exists()
    assert main(["check", str(path)]) == 2


def test_cli_usage_error_is_exit_code_2(capsys):
    with pytest.raises(SystemExit) as info:
        main(["run"])
    assert info.value.code == 2
    assert "see 'pathcast --help'" in capsys.readouterr().err
