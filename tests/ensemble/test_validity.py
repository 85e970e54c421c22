"""Numbers of an ensemble file must be finite and plausible, and every value an input can take must be one its
scenario field accepts: refused when the file is read (pathcast check and pathcast ensemble), one located sentence
naming the ensemble file, the input, the value and the rule.

The field rules are those of the scenario schema (capex >= 0, a carbon budget >= 0, a reserve margin from 0 to 2);
the plausibility bound of 1e12 is pathcast's own (common practice, no source).
"""

from __future__ import annotations

import json
import warnings

import pytest

from pathcast.cli import main
from pathcast.ensemble.spec import load_ensemble
from pathcast.ensemble.validity import PLAUSIBLE_LIMIT, leading_number
from pathcast.errors import ScenarioError

HEAD = "name: t\nbase: BASE\ndesign: latin_hypercube\nmembers: 20\nseed: 3\ninputs:\n"


def solar(body: str, apply: str = "multiplier") -> str:
    return HEAD + f"  solar:\n    path: technologies.generators.solar_pv.capex.base\n    as: {apply}\n{body}"


def budget(body: str) -> str:
    return HEAD + f"  budget:\n    path: policy.carbon_budget.total_mt\n    as: absolute\n{body}"


@pytest.mark.parametrize(
    ("body", "where", "shown"),
    [
        ("    distribution: uniform\n    low: 0.8\n    high: .inf\n", "high", "inf"),
        ("    distribution: uniform\n    low: .nan\n    high: 1.2\n", "low", "nan"),
        ("    distribution: triangular\n    low: -.inf\n    mode: 1\n    high: 1.2\n", "low", "-inf"),
        ("    values: [1.0, 'inf']\n", "values.1", "'inf'"),
        ("    values: [1.0, 'NaN']\n", "values.1", "'NaN'"),
    ],
)
def test_non_finite_numbers_are_refused(write_ensemble, body, where, shown):
    with pytest.raises(
        ScenarioError,
        match=rf"ensemble\.yaml: inputs\.solar\.{where}: got {shown}; expected a finite number\.$",
    ):
        load_ensemble(write_ensemble(solar(body)))


@pytest.mark.parametrize(
    ("body", "where", "shown"),
    [
        ("    values: [800, 1e300]\n", "values.1", "'1e300'"),  # YAML reads 1e300 (no dot) as text
        ("    values: [800, 1.0e+300]\n", "values.1", r"1e\+300"),
        ("    values: ['800 USD/kW', '1e300 USD/kW']\n", "values.1", "'1e300 USD/kW'"),
        ("    distribution: uniform\n    low: 100\n    high: 1.0e+13\n", "high", r"10000000000000\.0"),
    ],
)
def test_a_huge_cost_is_refused(write_ensemble, body, where, shown):
    with pytest.raises(
        ScenarioError,
        match=rf"inputs\.solar\.{where}: got {shown}; expected a number of magnitude at most 1e\+12 \(the "
        r"plausibility bound on every value of an ensemble file, in the unit it is written in\)\.$",
    ):
        load_ensemble(write_ensemble(solar(body, apply="absolute")))


def test_a_huge_reference_budget_is_refused(write_ensemble):
    text = solar("    values: [1.0]\n").replace("inputs:\n", "reference_budget_mt: 1.0e+20\ninputs:\n")
    with pytest.raises(
        ScenarioError, match=r"reference_budget_mt: got 1e\+20; expected a number of magnitude"
    ):
        load_ensemble(write_ensemble(text))


@pytest.mark.parametrize(
    ("body", "where", "shown", "origin"),
    [
        (
            "    distribution: uniform\n    low: -0.5\n    high: 1.2\n",
            "low",
            "-0.5",
            "the distribution's low end",
        ),
        (
            "    distribution: triangular\n    low: -1\n    mode: 1\n    high: 2\n",
            "low",
            "-1.0",
            "the distribution's low end",
        ),
        ("    values: [1.0, -2.0]\n", "values.1", "-2.0", "a listed value"),
    ],
)
def test_negative_multipliers_are_refused(write_ensemble, body, where, shown, origin):
    with pytest.raises(
        ScenarioError,
        match=rf"inputs\.solar\.{where}: got {shown} \({origin}\); expected a multiplier of at least 0 \(it scales "
        r"technologies\.generators\.solar_pv\.capex\.base; a negative one would flip its sign: give negative values "
        r"with 'as: absolute'\)\.$",
    ):
        load_ensemble(write_ensemble(solar(body)))


def test_a_normal_multiplier_that_samples_below_zero_is_refused(write_ensemble):
    # mean 1, sd 1: about 16 % of the distribution lies below 0, so 20 Latin-hypercube members sample some there
    with pytest.raises(
        ScenarioError,
        match=r"inputs\.solar: got -[0-9.]+ \(the smallest value the design samples, member \d+\); expected a "
        r"multiplier of at least 0",
    ):
        load_ensemble(write_ensemble(solar("    distribution: normal\n    mean: 1\n    sd: 1\n")))


def test_a_multiplier_that_makes_the_field_huge_is_refused(write_ensemble):
    # 800 USD/kW (tests/data/tiny.yaml) x 1e10 = 8e12 USD/kW, above the 1e12 bound
    with pytest.raises(
        ScenarioError,
        match=r"inputs\.solar\.high: got 10000000000\.0 \(the distribution's high end\); expected a value that makes "
        r"technologies\.generators\.solar_pv\.capex\.base a number of magnitude at most 1e\+12 .*, not "
        r"8000000000000\.0\.$",
    ):
        load_ensemble(write_ensemble(solar("    distribution: uniform\n    low: 1\n    high: 1.0e+10\n")))


def test_a_lognormal_that_samples_huge_values_is_refused(write_ensemble):
    with pytest.raises(
        ScenarioError,
        match=r"inputs\.solar: got [0-9.e+]+ \(the largest value the design samples, member \d+\); expected a value "
        r"that makes technologies\.generators\.solar_pv\.capex\.base a number of magnitude at most 1e\+12",
    ):
        load_ensemble(write_ensemble(solar("    distribution: lognormal\n    median: 1\n    sigma: 20\n")))


def test_a_bounded_range_outside_the_field_rule_is_refused(write_ensemble):
    with pytest.raises(
        ScenarioError,
        match=r"ensemble\.yaml: inputs\.budget\.low: got -5\.0 \(the distribution's low end\); expected a value the "
        r"scenario field policy\.carbon_budget\.total_mt accepts: .*0",
    ):
        load_ensemble(write_ensemble(budget("    distribution: uniform\n    low: -5\n    high: 30\n")))


def test_a_normal_that_samples_outside_the_field_rule_is_refused(write_ensemble):
    # mean 5 MtCO2, sd 10 MtCO2, no truncation: members sample negative budgets
    with pytest.raises(
        ScenarioError,
        match=r"inputs\.budget: got -[0-9.]+ \(the smallest value the design samples, member \d+\); expected a value "
        r"the scenario field policy\.carbon_budget\.total_mt accepts: ",
    ):
        load_ensemble(write_ensemble(budget("    distribution: normal\n    mean: 5\n    sd: 10\n")))


def test_a_truncated_normal_inside_the_rule_is_accepted(write_ensemble):
    spec = load_ensemble(
        write_ensemble(budget("    distribution: normal\n    mean: 5\n    sd: 10\n    low: 0\n"))
    )
    assert spec.file.inputs["budget"].low == 0


def test_a_listed_value_outside_the_field_rule_is_refused(write_ensemble):
    text = HEAD.replace("latin_hypercube\nmembers: 20\nseed: 3", "grid") + (
        "  margin:\n    path: policy.reserve_margin\n    as: absolute\n    values: [0.1, 3]\n"
    )
    with pytest.raises(
        ScenarioError,
        match=r"inputs\.margin\.values\.1: got 3 \(a listed value\); expected a value the scenario field "
        r"policy\.reserve_margin accepts: ",
    ):
        load_ensemble(write_ensemble(text))


def test_leading_number_reads_numbers_and_quantities():
    assert leading_number("900 USD/kW") == 900.0 and leading_number("1e300") == 1e300
    assert leading_number("inf GW") == float("inf") and leading_number("solar") is None
    assert leading_number("infrastructure") is None and leading_number(True) is None
    assert leading_number(10**400) == float("inf") and PLAUSIBLE_LIMIT == 1e12


def test_check_says_it_is_an_ensemble_file_and_which_command_reads_it(data_dir, capsys):
    path = data_dir / "ensemble_lhs.yaml"
    assert main(["check", str(path)]) == 0
    out = capsys.readouterr().out.strip()
    assert out == (
        f"{path}: valid ensemble file 'tiny_lhs' (latin_hypercube, 6 members, 4 inputs) around the base scenario "
        f"tiny.yaml; 'pathcast ensemble {path}' runs it."
    )
    assert main(["check", str(path), "--json"]) == 0
    facts = json.loads(capsys.readouterr().out)
    assert facts["kind"] == "ensemble" and facts["command"] == f"pathcast ensemble {path}"


def test_check_refuses_an_invalid_ensemble_file_in_one_sentence(write_ensemble, capsys):
    path = write_ensemble(solar("    distribution: uniform\n    low: -0.5\n    high: 1.2\n"))
    assert main(["check", str(path)]) == 2
    err = capsys.readouterr().err.strip()
    assert len(err.splitlines()) == 1 and err.startswith(f"pathcast: {path}: inputs.solar.low: got -0.5 ")


def test_a_lognormal_so_wide_that_samples_overflow_is_refused_without_warnings(write_ensemble, capsys):
    # sigma 1e10: exp() of the upper samples overflows to inf; one sentence, and no numpy warning before it
    text = solar("    distribution: lognormal\n    median: 1\n    sigma: 1.0e+10\n")
    with (
        warnings.catch_warnings(),
        pytest.raises(
            ScenarioError,
            match=r"inputs\.solar: got inf \(the largest value the design samples, member \d+\); expected a finite "
            r"multiplier \(it scales technologies\.generators\.solar_pv\.capex\.base\); a smaller sigma, or a bounded "
            r"distribution, keeps the samples inside\.$",
        ),
    ):
        warnings.simplefilter("error")  # a RuntimeWarning would escape instead of the ScenarioError
        load_ensemble(write_ensemble(text))
    assert capsys.readouterr().err == ""


def test_a_value_beyond_the_scenario_plausibility_bound_is_refused(write_ensemble):
    # 5e6 TWh/yr passes the schema (> 0) but not pathcast run's plausibility bound of 1e6 TWh/yr on electricity demand
    text = HEAD.replace("latin_hypercube\nmembers: 20\nseed: 3", "grid") + (
        "  demand:\n    path: demand.electricity.base_year_twh\n    as: absolute\n    values: [10, 5000000]\n"
    )
    with pytest.raises(
        ScenarioError,
        match=r"inputs\.demand\.values\.1: got 5000000 \(a listed value\); expected a value the scenario field "
        r"demand\.electricity\.base_year_twh accepts: .*plausibility bound",
    ):
        load_ensemble(write_ensemble(text))
