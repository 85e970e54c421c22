"""One reader of FILE|RESULTDIR (pathcast.results.sources.load_run): a scenario file is solved, a result folder read
back, and rates, compare and memo refuse a missing path, a folder that is not a result folder and a result folder
without one of its tables in the same words. Every folder under tmp_path."""

from __future__ import annotations

import re
import shutil

import pytest

from pathcast.cli import main
from pathcast.errors import ScenarioError
from pathcast.results.sources import load_run, load_runs
from pathcast.results.writers import write_result
from tests.conftest import DATA

MISSING = (
    r"missing\.yaml: \(path\): got no such file or folder; expected a scenario YAML file or a result folder "
    r"written by 'pathcast run'\."
)
NOT_A_RESULT = (
    r"stray: \(folder\): got a folder without summary\.json; expected a pathcast result folder written by "
    r"'pathcast run'\."
)
NO_TABLE = r"cut: capacity\.csv: got no such file; expected every table of a pathcast result folder\."
ENSEMBLE = (
    r"ens: \(folder\): got an ensemble folder written by 'pathcast ensemble'; expected a scenario YAML file or a "
    r"result folder written by 'pathcast run' \(an ensemble folder is read by 'pathcast memo'\)\."
)


@pytest.fixture(scope="module")
def result_folder(tiny_run, tmp_path_factory):
    return write_result(
        tiny_run.result, tmp_path_factory.mktemp("sources") / "tiny", parquet=False, excel=False
    )


def test_a_result_folder_is_read_back_and_a_scenario_file_solved(tiny_run, result_folder):
    read = load_run(result_folder)
    assert read.from_folder and read.path == result_folder
    assert dict(read.result.summary) == dict(tiny_run.result.summary)
    solved = load_run(DATA / "tiny.yaml")
    assert not solved.from_folder and solved.loaded is not None
    # the same LP solved twice: the same optimum (computed, no outside source)
    assert solved.result.summary["total_discounted_cost_million"] == pytest.approx(
        tiny_run.result.summary["total_discounted_cost_million"], rel=1e-9
    )


def test_a_missing_path(tmp_path):
    with pytest.raises(ScenarioError, match=MISSING):
        load_run(tmp_path / "missing.yaml")


def test_a_folder_that_is_not_a_result_folder(tmp_path):
    stray = tmp_path / "stray"
    stray.mkdir()
    (stray / "notes.txt").write_text("not a result")
    with pytest.raises(ScenarioError, match=NOT_A_RESULT):
        load_run(stray)


def test_a_result_folder_missing_a_table(result_folder, tmp_path):
    cut = shutil.copytree(result_folder, tmp_path / "cut")
    (cut / "capacity.csv").unlink()
    with pytest.raises(ScenarioError, match=NO_TABLE):
        load_run(cut)


def test_an_ensemble_folder_is_named_as_such(tmp_path):
    ensemble = tmp_path / "ens"
    ensemble.mkdir()
    (ensemble / "ensemble.json").write_text("{}")
    (ensemble / "summary.json").write_text("{}")
    with pytest.raises(ScenarioError, match=ENSEMBLE):
        load_run(ensemble)


def test_every_path_is_checked_before_anything_is_solved(tmp_path):
    said: list[str] = []
    with pytest.raises(ScenarioError, match=MISSING):
        load_runs([DATA / "tiny.yaml", tmp_path / "missing.yaml"], progress=said.append)
    assert said == []  # the scenario before the missing path was not even read


@pytest.mark.parametrize("command", ["rates", "compare", "memo"])
def test_rates_compare_and_memo_use_the_same_words(command, result_folder, tmp_path, capsys):
    cut = shutil.copytree(result_folder, tmp_path / "cut")
    (cut / "capacity.csv").unlink()
    stray = tmp_path / "stray"
    stray.mkdir()
    out = [] if command == "rates" else ["--out", str(tmp_path / "out")]
    cases = [(cut, NO_TABLE)]
    if command != "memo":  # memo also takes ENSEMBLEDIR, so its words for these name that too (split_inputs)
        cases += [(tmp_path / "missing.yaml", MISSING), (stray, NOT_A_RESULT)]
    for path, words in cases:
        assert main([command, str(path), *out, "--quiet"]) == 2
        err = capsys.readouterr().err
        assert len(err.strip().splitlines()) == 1 and re.search(words, err)
    assert not (tmp_path / "out").exists()
