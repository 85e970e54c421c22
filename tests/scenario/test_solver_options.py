"""solver.options, solver.threads and solver.time_limit_s are checked against HiGHS's own option list by
'pathcast check' and 'pathcast run' (exit 2), every bad one reported at once; HiGHS is imported only when there is a
HiGHS setting to check."""

from __future__ import annotations

import json
import re
import subprocess
import sys

import pytest

from pathcast.cli import main
from pathcast.errors import ScenarioError
from pathcast.scenario.solver_options import (
    check_solver_settings,
    highs_option_table,
    solver_setting_problems,
)
from tests.conftest import DATA, tiny_mapping, write_scenario


def _both(tmp_path, solver: dict, capsys) -> str:
    m = tiny_mapping()
    m["solver"] = solver
    path = write_scenario(tmp_path, m)
    assert main(["check", str(path)]) == 2
    checked = capsys.readouterr().err
    out = tmp_path / "results"
    assert main(["run", str(path), "--out", str(out), "--quiet"]) == 2
    ran = capsys.readouterr().err
    assert checked == ran and not out.exists() and ran.count("\n") == 1 and "Traceback" not in ran
    return ran.removeprefix("pathcast: ").strip()


def test_unknown_option_names_are_all_reported_with_did_you_mean(tmp_path, capsys):
    err = _both(tmp_path, {"options": {"presolv": "off", "simplex_strateg": 4, "presolve": "on"}}, capsys)
    path = tmp_path / "scenario.yaml"
    assert err == (
        f"{path}: solver.options: got 'presolv', 'simplex_strateg'; expected HiGHS option names (did you mean "
        "'presolve' for 'presolv', 'simplex_strategy' for 'simplex_strateg'?)."
    )


def test_one_unknown_name_gets_a_plain_did_you_mean(tmp_path, capsys):
    err = _both(tmp_path, {"options": {"time_limt": 10}}, capsys)
    assert err.endswith(
        "solver.options: got 'time_limt'; expected HiGHS option names (did you mean 'time_limit'?)."
    )


def test_bad_values_are_checked_for_type_and_range_one_sentence_each(tmp_path, capsys):
    solver = {
        "threads": 2**40,
        "options": {"simplex_strategy": 99, "mip_rel_gap": "small", "presolve": "maybe", "nosuch_option": 1},
    }
    err = _both(tmp_path, solver, capsys)
    path = tmp_path / "scenario.yaml"
    sentences = err.split(f" {path}: ")
    assert len(sentences) == 5  # one for the unknown name, one per bad value
    assert sentences[0] == f"{path}: solver.options: got 'nosuch_option'; expected HiGHS option names."
    assert (
        "solver.threads: got 1099511627776; expected a whole number in {0, 2147483647} (HiGHS option 'threads')."
        in err
    )
    assert "solver.options.simplex_strategy: got 99; expected a whole number in {0, 4}" in err
    assert (
        "solver.options.mip_rel_gap: got 'small'; expected a number in [0, inf] (HiGHS option 'mip_rel_gap')."
        in err
    )
    assert re.search(
        r"solver\.options\.presolve: got 'maybe'; expected a string as HiGHS describes it: .*\"off\"", err
    )


def test_valid_options_pass_and_yaml_off_reaches_highs_as_off(tmp_path, capsys):
    m = tiny_mapping()
    # YAML 1.1 reads an unquoted off as false: written as YAML text, not as a Python string
    path = tmp_path / "scenario.yaml"
    write_scenario(tmp_path, m)
    path.write_text(
        path.read_text()
        + "solver:\n  threads: 1\n  options: {presolve: off, simplex_strategy: 4, time_limit: 100}\n"
    )
    assert main(["check", str(path)]) == 0
    assert (
        main(["run", str(path), "--out", str(tmp_path / "out"), "--quiet", "--no-excel", "--no-parquet"]) == 0
    )
    manifest = json.loads((tmp_path / "out" / "manifest.json").read_text())
    assert manifest["solver"]["status"] == "optimal"
    assert manifest["solver"]["options"]["simplex_strategy"] == 4


def test_time_limit_from_the_command_line_is_checked(tmp_path, capsys):
    code = main(
        ["run", str(DATA / "tiny.yaml"), "--out", str(tmp_path / "out"), "--time-limit", "-1", "--quiet"]
    )
    assert code == 2
    err = capsys.readouterr().err
    assert (
        "command line: time_limit_s: got -1.0; expected a number in [0, inf] (HiGHS option 'time_limit')."
        in err
    )
    assert not (tmp_path / "out").exists()


def test_check_solver_settings_raises_one_error_for_all(tmp_path):
    with pytest.raises(
        ScenarioError,
        match=r"^f\.yaml: solver\.options: got 'presolv'; expected HiGHS option names \(did you mean 'presolve'\?\)\. "
        r"f\.yaml: solver\.options\.threads: got -1; expected a whole number in \{0, 2147483647\}",
    ) as info:
        check_solver_settings({"options": {"presolv": 1, "threads": -1}}, lambda _path: "f.yaml")
    assert info.value.field == "solver.options"
    assert solver_setting_problems({"options": {"time_limit": float("nan")}}, lambda _path: "f.yaml")
    assert solver_setting_problems({"options": {"run_crossover": [1]}}, lambda _path: "f.yaml")
    assert solver_setting_problems({"method": "simplex", "options": {}}, lambda _path: "f.yaml") == []


def test_option_table_is_highs_own():
    table = highs_option_table()
    # HiGHS documents these options (its option listing): names, types, ranges
    assert table["threads"].type == "integer" and table["threads"].range == "{0, 2147483647}"
    assert table["time_limit"].type == "double" and table["time_limit"].range == "[0, inf]"
    assert table["presolve"].type == "string" and '"choose"' in table["presolve"].description
    assert table["output_flag"].type == "bool"
    assert "simplex_scale_strategy" in table and "log_dev_level" in table  # an advanced option too


PROBE = """
import json, sys
from pathcast.scenario.solver_options import solver_setting_problems
solver_setting_problems({"method": "auto", "options": {}}, lambda p: "f.yaml")
print(json.dumps("highspy" in sys.modules))
"""


def test_no_highs_import_without_highs_settings():
    done = subprocess.run(
        [sys.executable, "-c", PROBE], capture_output=True, text=True, check=True, timeout=120
    )
    assert json.loads(done.stdout.strip().splitlines()[-1]) is False


def test_solve_inputs_checks_the_settings_of_analysis_runs(tiny_run):
    # 'pathcast delay' and the analytics solve ModelInputs without the scenario file: the scenario is named instead
    from dataclasses import replace

    from pathcast.pipeline import solve_inputs

    inputs = replace(tiny_run.model.inputs, solver={"options": {"presolv": "off"}})
    with pytest.raises(
        ScenarioError,
        match=r"^scenario 'tiny': solver\.options: got 'presolv'; expected HiGHS option names \(did you mean "
        r"'presolve'\?\)\.$",
    ):
        solve_inputs(inputs)


def test_a_thread_count_different_from_an_earlier_solve_in_the_process_still_solves(tiny_run):
    # HiGHS sizes one thread scheduler per process at its first solve and refuses another 'threads' value until it is
    # reset (HiGHS's own error: "global scheduler has already been initialized"); solve_highs resets it
    from dataclasses import replace

    from pathcast.pipeline import solve_inputs

    inputs = tiny_run.model.inputs
    objectives = [
        solve_inputs(replace(inputs, solver={"threads": threads})).solution.objective
        for threads in (2, 1, None)
    ]
    assert objectives == pytest.approx([tiny_run.solution.objective] * 3, rel=1e-7)
