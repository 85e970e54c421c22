"""The command line imports only what the command needs.

After ``pathcast --help``, ``--version``, ``check`` on the demo and ``<command> --help``, none of the solver, plotting,
table or cluster libraries is loaded: each check runs ``pathcast.cli.main`` in a fresh interpreter and lists
``sys.modules``. A functional guard, not timed; the start-up time is measured by benchmarks/cli_startup.py.
"""

from __future__ import annotations

import json
import subprocess
import sys
import typing
from importlib.util import find_spec
from pathlib import Path

import pytest

import pathcast
from pathcast.cli import COMMANDS, build_parser, command_in

DEMO = Path(__file__).parents[1] / "scenarios" / "demo" / "budget.yaml"

# Packages (and their submodules) that no light command may import.
HEAVY = ("pyomo", "highspy", "scipy.optimize", "matplotlib", "dask", "distributed", "pandas")

# pint (the unit strings of scenario files) imports dask.base when dask is installed, through
# pathcast.scenario.schema -> pathcast.scenario.units -> pint -> pint.compat -> dask.base, so 'check' may load
# dask's core modules, but not the cluster, arrays or data frames.
HEAVY_FOR_CHECK = tuple(name for name in HEAVY if name != "dask") + (
    "dask.distributed",
    "dask.array",
    "dask.dataframe",
)

PROBE = """
import json, sys
from pathcast.cli import main
try:
    code = main(json.loads(sys.argv[1]))
except SystemExit as stop:  # --help and --version leave through argparse
    code = stop.code
with open(sys.argv[2], "w") as out:
    json.dump({"code": code, "modules": sorted(sys.modules)}, out)
"""


def loaded_after(argv: list[str], tmp_path: Path) -> tuple[int, set[str], str]:
    """(exit code, modules in sys.modules, standard output) after ``pathcast.cli.main(argv)`` in a fresh process."""
    record = tmp_path / "modules.json"
    done = subprocess.run(
        [sys.executable, "-c", PROBE, json.dumps(argv), str(record)],
        capture_output=True,
        text=True,
        cwd=tmp_path,
        check=True,
        timeout=120,
    )
    data = json.loads(record.read_text())
    return data["code"], set(data["modules"]), done.stdout


def heavy_in(modules: set[str], heavy: tuple[str, ...]) -> list[str]:
    return sorted(m for m in modules if any(m == name or m.startswith(name + ".") for name in heavy))


@pytest.mark.parametrize(
    ("argv", "printed"),
    [(["--help"], "check"), (["--version"], f"pathcast {pathcast.__version__}")],
    ids=["help", "version"],
)
def test_help_and_version_load_no_heavy_module(tmp_path, argv, printed):
    code, modules, out = loaded_after(argv, tmp_path)
    assert code == 0 and printed in out
    assert heavy_in(modules, HEAVY) == []
    assert not any(m.startswith("pathcast.commands.") for m in modules)  # no command module for the top level
    assert "pathcast.scenario.loader" not in modules


def test_check_on_the_demo_loads_no_solver_plotting_or_table_module(tmp_path):
    code, modules, out = loaded_after(["check", str(DEMO)], tmp_path)
    assert code == 0 and "valid scenario 'arvenna_budget'" in out
    assert heavy_in(modules, HEAVY_FOR_CHECK) == []
    assert "pathcast.scenario.loader" in modules  # it did validate
    assert "pathcast.pipeline" not in modules and "pathcast.solve" not in modules


@pytest.mark.xfail(
    find_spec("dask") is not None,
    reason="pint.compat imports dask.base when dask is installed "
    "(pathcast.scenario.units -> pint -> pint.compat -> dask.base); remove this mark when that chain is broken",
    strict=True,
)
def test_check_on_the_demo_loads_no_dask(tmp_path):
    code, modules, _ = loaded_after(["check", str(DEMO)], tmp_path)
    assert code == 0 and heavy_in(modules, ("dask",)) == []


@pytest.mark.parametrize("command", list(COMMANDS))
def test_command_help_loads_no_heavy_module(tmp_path, command):
    code, modules, out = loaded_after([command, "--help"], tmp_path)
    assert code == 0 and f"pathcast {command}" in out
    assert heavy_in(modules, HEAVY) == []
    assert f"pathcast.commands.{COMMANDS[command][0]}" in modules
    others = {f"pathcast.commands.{m}" for name, (m, _) in COMMANDS.items() if name != command}
    if command != "memo":  # memo's module uses compare's Source and gather_results
        assert not modules & others


def test_command_in_finds_the_first_word_that_is_not_an_option():
    assert command_in(["check", "a.yaml", "--json"]) == "check"
    assert command_in(["--help"]) is None
    assert command_in([]) is None
    assert command_in(["--", "run", "x.yaml"]) == "run"


def test_the_complete_parser_has_every_command_and_its_arguments():
    parser = build_parser()
    args = parser.parse_args(["run", "x.yaml", "--method", "ipm", "--time-limit", "5"])
    assert args.method == "ipm" and args.time_limit == 5.0 and callable(args._execute)
    for name in COMMANDS:  # every command takes one positional argument at least
        assert callable(parser.parse_args([name, "x.yaml"])._execute)


def test_an_unknown_command_exits_2_in_one_sentence_with_a_did_you_mean(capsys):
    from pathcast.cli import main

    with pytest.raises(SystemExit) as stop:
        main(["chekc", str(DEMO)])
    assert stop.value.code == 2
    err = capsys.readouterr().err
    assert err == (
        "pathcast: got command 'chekc' (did you mean 'check'?); expected one of run, check, ensemble, compare, "
        "memo, rates, delay; see 'pathcast --help'.\n"
    )


def test_version_before_an_unknown_word_still_prints_the_version(capsys):
    from pathcast.cli import main

    with pytest.raises(SystemExit) as stop:
        main(["--version", "chekc"])
    assert stop.value.code == 0 and capsys.readouterr().out == f"pathcast {pathcast.__version__}\n"


def test_the_method_names_are_one_list():
    """The CLI's --method choices (light module), the solver's and the scenario schema's are the same names."""
    from pathcast.scenario.schema import SolverSettings
    from pathcast.solve import METHODS as SOLVER_METHODS
    from pathcast.solver_methods import METHODS

    assert SOLVER_METHODS is METHODS
    assert typing.get_args(SolverSettings.model_fields["method"].annotation) == METHODS


def test_public_names_resolve_on_first_use():
    for name in pathcast.__all__:
        assert getattr(pathcast, name) is not None
    from pathcast.pipeline import run_scenario

    assert pathcast.run_scenario is run_scenario
    assert set(pathcast.__all__) <= set(dir(pathcast))
    with pytest.raises(AttributeError, match="module 'pathcast' has no attribute 'run_scenarios'"):
        _ = pathcast.run_scenarios
