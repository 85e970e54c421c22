"""Users' rules in Pyomo (README, Extensions): the two worked examples and independent checks of what a rule does.

Independent routes (hand calculation / LP duality, no outside source needed):
- a cap written as a rule gives the optimum of the same cap written as the scenario's own limit (max_total_mw);
- the dual of a binding rule equals the change of the optimum for a small change of its right-hand side
  (LP sensitivity: the dual is the derivative of the optimal value while the basis stays optimal);
- a share rule holds with equality where it binds.
"""

from __future__ import annotations

import re
import shutil
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest

from pathcast.cli import main
from pathcast.errors import ScenarioError
from pathcast.pipeline import run_scenario, solve_inputs
from pathcast.scenario.extensions import ExtensionSpec, parse_extension_argument
from pathcast.scenario.inputs import prepare_inputs
from pathcast.scenario.loader import load_scenario
from tests.conftest import DATA, tiny_mapping, write_scenario

ROOT = Path(__file__).parents[2]


def _rule(tmp_path: Path, body: str, name: str = "rules.py") -> Path:
    path = tmp_path / name
    path.write_text("import pyomo.environ as pyo\n\n\ndef extend(model, inputs):\n" + body)
    return path


def _solve(path: Path | None = None, scenario: Path = DATA / "tiny.yaml", **extra):
    extensions = [ExtensionSpec(path)] if path else []
    return run_scenario(scenario, extensions=extensions, **extra)


def _capacity_gw(run, technology: str) -> np.ndarray:
    cap = run.result.capacity
    return cap[cap["technology"] == technology].sort_values("year")["capacity_mw"].to_numpy() / 1000.0


def test_a_cap_as_a_rule_equals_the_same_cap_as_the_scenarios_own_limit(tmp_path):
    rules = _rule(
        tmp_path,
        "    model.solar_cap = pyo.Constraint(model.year, rule=lambda m, y: m.capacity['solar_pv', y] <= 1.0)\n",
    )
    with_rule = _solve(rules)
    mapping = tiny_mapping()
    mapping["technologies"]["generators"]["solar_pv"]["max_total_mw"] = 1000.0
    with_limit = _solve(scenario=write_scenario(tmp_path, mapping, "limit.yaml"))
    free = _solve()
    assert _capacity_gw(free, "solar_pv").max() > 1.0  # the cap would bind
    assert (
        abs(with_rule.solution.objective - with_limit.solution.objective)
        <= 1e-9 * with_limit.solution.objective
    )
    np.testing.assert_allclose(
        _capacity_gw(with_rule, "solar_pv"), _capacity_gw(with_limit, "solar_pv"), atol=1e-9
    )
    table = with_rule.result.tables["extension_constraints"]
    assert list(table["constraint"].unique()) == ["solar_cap"] and len(table) == 5
    binding = table[table["binding"]]
    assert set(binding["index"]) >= {"2029"} and (binding["dual_million_per_unit"] <= 0).all()


def test_the_dual_of_a_binding_rule_is_the_change_of_the_optimum(tmp_path):
    body = "    model.solar_cap = pyo.Constraint(expr=model.capacity['solar_pv', 2029] <= {cap})\n"
    base = _solve(_rule(tmp_path, body.format(cap=1.0), "a.py"))
    step = 1e-3  # [GW]
    relaxed = _solve(_rule(tmp_path, body.format(cap=1.0 + step), "b.py"))
    dual = float(base.result.tables["extension_constraints"]["dual_million_per_unit"].iloc[0])
    assert dual < 0  # a binding upper limit costs money (minimisation sign convention)
    change = (relaxed.solution.objective - base.solution.objective) / step
    assert abs(change - dual) <= 1e-6 * abs(dual)


def test_example_2_rooftop_share_holds_where_it_binds(tmp_path):
    mapping = tiny_mapping()
    solar = dict(mapping["technologies"]["generators"]["solar_pv"])
    mapping["technologies"]["generators"]["solar_rooftop"] = {**solar, "capex": 1300, "fixed_om": 20}
    shutil.copy(ROOT / "scenarios" / "examples" / "rooftop_share.py", tmp_path / "rooftop_share.py")
    mapping["extensions"] = [{"file": "rooftop_share.py"}]
    run = run_scenario(write_scenario(tmp_path, mapping))
    cap = run.result.capacity.set_index(["technology", "year"])["new_mw"]
    years = sorted(run.result.capacity["year"].unique())
    built = [y for y in years if cap["solar_pv", y] + cap["solar_rooftop", y] > 1e-6]
    assert built, "the test needs solar to be built"
    for y in (
        built
    ):  # rooftop costs more, so the share binds exactly (hand reasoning: the cheaper kind fills the rest)
        total = cap["solar_pv", y] + cap["solar_rooftop", y]
        assert abs(cap["solar_rooftop", y] - 0.30 * total) <= 1e-6 * max(1.0, total)
    table = run.result.tables["extension_constraints"]
    assert table[table["index"].isin([str(y) for y in built])]["binding"].all()


def test_a_cost_term_changes_the_optimum(tmp_path):
    # a charge of 10,000 million per GW of new wind (discounted) makes building wind pointless
    rules = _rule(
        tmp_path,
        "    model.extra_cost['wind_levy'] = sum(1e4 * model.new['wind_onshore', y] for y in model.year)\n",
    )
    run = _solve(rules)
    new = run.result.capacity
    assert new[new["technology"] == "wind_onshore"]["new_mw"].max() <= 1e-6
    assert _solve().result.capacity.query("technology == 'wind_onshore'")["new_mw"].max() > 1.0


def test_rules_stay_in_variants_that_analyses_re_solve(tmp_path):
    rules = _rule(
        tmp_path,
        "    model.solar_cap = pyo.Constraint(model.year, rule=lambda m, y: m.capacity['solar_pv', y] <= 1.0)\n",
    )
    loaded = load_scenario(DATA / "tiny.yaml")
    inputs = replace(
        prepare_inputs(loaded.scenario), extensions=(ExtensionSpec(rules),), budget_mt=None, budget_years=None
    )
    run = solve_inputs(inputs)
    assert _capacity_gw(run, "solar_pv").max() <= 1.0 + 1e-9


@pytest.mark.slow
def test_example_1_fossil_cap_on_the_demo(tmp_path):
    run = run_scenario(ROOT / "scenarios" / "demo" / "budget_fossil_cap.yaml")
    cap = run.result.capacity
    fossil = cap[cap["technology"].isin(["coal_steam", "gas_combined_cycle", "gas_open_cycle"])]
    by_year = fossil.groupby("year")["capacity_mw"].sum()
    assert (by_year[by_year.index >= 2035] <= 5000.0 + 1e-6).all()
    table = run.result.tables["extension_constraints"]
    assert len(table) == 16 and set(table["index"]) == {str(y) for y in range(2035, 2051)}


def test_command_line_extension_and_its_table(tmp_path, capsys):
    rules = _rule(
        tmp_path, "    model.solar_cap = pyo.Constraint(expr=model.capacity['solar_pv', 2029] <= 1.0)\n"
    )
    out = tmp_path / "out"
    code = main(
        ["run", str(DATA / "tiny.yaml"), "--extension", f"{rules}:extend", "--out", str(out), "--quiet"]
    )
    assert code == 0, capsys.readouterr().err
    assert (out / "extension_constraints.csv").is_file()
    from pathcast.results.writers import read_result

    assert list(read_result(out).tables["extension_constraints"]["constraint"]) == ["solar_cap"]


def test_parse_extension_argument():
    assert parse_extension_argument("rules.py").function == "extend"
    assert parse_extension_argument("rules.py:cap").function == "cap"
    assert parse_extension_argument(r"C:\rules.py").file == Path(r"C:\rules.py")


# --- bad input: one sentence naming the file, the function and what went wrong; exit 2; nothing written --------


@pytest.mark.parametrize(
    ("body", "expected"),
    [
        (
            None,
            r"--extension .*missing\.py: got '.*missing\.py', no such file; expected a Python file with a function extend\(model, inputs\)",
        ),
        (
            "def extnd(model, inputs):\n    pass\n",
            r"rules\.py: got no function 'extend'; expected a function extend\(model, inputs\) \(did you mean 'extnd'\?\)",
        ),
        (
            "def extend(model, inputs):\n    raise RuntimeError('boom')\n",
            r"rules\.py: extend\(model, inputs\): raised RuntimeError: boom; expected",
        ),
        (
            "import nonexistent_module_xyz\n",
            r"rules\.py: importing it raised ModuleNotFoundError: No module named 'nonexistent_module_xyz'",
        ),
        (
            "def extend(model, inputs):\n    model.c = __import__('pyomo.environ').environ.Constraint(expr=model.capacity['solr_pv', 2029] <= 1)\n",
            r"rules\.py: extend\(model, inputs\): got the technology 'solr_pv' in model\.capacity\[\('solr_pv', 2029\)\]; expected one of \[.*\] \(did you mean 'solar_pv'\?\)",
        ),
        (
            "def extend(model, inputs):\n    model.c = __import__('pyomo.environ').environ.Constraint(expr=model.capacity['solar_pv', 2051] <= 1)\n",
            r"got the year 2051 in model\.capacity\[\('solar_pv', 2051\)\]; expected one of \[2025, 2026, 2027, 2028, 2029\]",
        ),
        (
            "def extend(model, inputs):\n    model.c = __import__('pyomo.environ').environ.Constraint(expr=model.capacity['solar_pv', 2029] ** 2 <= 1)\n",
            r"constraint c: got a nonlinear expression; expected a linear one",
        ),
    ],
    ids=[
        "missing_file",
        "no_such_function",
        "raises",
        "import_fails",
        "unknown_technology",
        "unknown_year",
        "nonlinear",
    ],
)
def test_bad_extensions_are_one_sentence_and_write_nothing(tmp_path, capsys, body, expected):
    rules = tmp_path / ("missing.py" if body is None else "rules.py")
    if body is not None:
        rules.write_text(body)
    out = tmp_path / "out"
    code = main(["run", str(DATA / "tiny.yaml"), "--extension", str(rules), "--out", str(out), "--quiet"])
    err = capsys.readouterr().err
    assert code == 2 and "Traceback" not in err and err.count("\n") == 1, err
    assert re.search(expected, err), err
    assert not out.exists() and sorted(p.name for p in tmp_path.iterdir()) == (
        [] if body is None else ["rules.py"]
    )


def test_a_scenario_naming_a_missing_extension_file_is_refused_at_check(tmp_path):
    mapping = tiny_mapping()
    mapping["extensions"] = [{"file": "nowhere.py"}]
    path = write_scenario(tmp_path, mapping)
    with pytest.raises(
        ScenarioError, match=r"extensions\.0\.file: got 'nowhere\.py'; expected an existing Python file"
    ):
        load_scenario(path)
