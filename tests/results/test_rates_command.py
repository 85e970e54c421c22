"""`pathcast rates` in-process, on a scenario file and on a result folder; every output under tmp_path."""

from __future__ import annotations

import json

import pytest

from pathcast.cli import main
from pathcast.results.writers import write_result
from tests.conftest import DATA


def test_rates_on_a_file_prints_the_table(capsys):
    assert (
        main(["rates", str(DATA / "tiny.yaml"), "--from", "2025", "--to", "2028", "--step", "1", "--quiet"])
        == 0
    )
    out = capsys.readouterr().out
    assert "Required reduction rates, scenario 'tiny': budget 25.0 MtCO2 for 2025-2029" in out
    assert out.count("\n  202") >= 4  # one row per start year 2025-2028
    assert "IPCC (2021), AR6 WG1 SPM D.1.1" in out


def test_rates_json_on_a_result_folder_matches_the_file(tiny_run, tmp_path, capsys):
    folder = write_result(tiny_run.result, tmp_path / "tiny", parquet=False, excel=False)
    assert main(["rates", str(folder), "--json", "--from", "2025", "--to", "2027", "--step", "1"]) == 0
    payload = json.loads(capsys.readouterr().out)
    rows = payload["required_rates"]
    assert [r["start_year"] for r in rows] == [2025, 2026, 2027]
    e = tiny_run.result.emissions_total["emissions_mtco2"].to_numpy()
    # closed form, start year counted: r = E0 / remaining budget
    assert rows[1]["exponential_rate_per_year"] == pytest.approx(e[1] / (25.0 - e[0]), rel=1e-9)
    assert payload["budget"] == {"budget_mtco2": 25.0, "first_year": 2025, "last_year": 2029}
    assert payload["budget_account"]["warming"]["warming_best_c"] == pytest.approx(25.0e-6 * 0.45, rel=1e-6)
    assert payload["realised_yearly"][0]["reduction_rate"] is None


def test_rates_with_a_budget_override_marks_exhausted_years(tiny_run, tmp_path, capsys):
    folder = write_result(tiny_run.result, tmp_path / "tiny", parquet=False, excel=False)
    assert main(["rates", str(folder), "--budget", "8", "--from", "2025", "--to", "2027", "--step", "1"]) == 0
    assert "exhausted" in capsys.readouterr().out


def test_rates_error_paths(tmp_path, capsys):
    assert main(["rates", str(tmp_path / "missing.yaml")]) == 2
    assert "missing.yaml: (path): got no such file or folder" in capsys.readouterr().err
    assert main(["rates", str(DATA / "tiny.yaml"), "--from", "2028", "--to", "2026", "--quiet"]) == 2
    assert (
        "--from 2028 is after --to 2026; expected a first start year <= the last." in capsys.readouterr().err
    )
    assert main(["rates", str(DATA / "tiny.yaml"), "--step", "0", "--quiet"]) == 2
    assert "--step 0: expected a whole number of years >= 1." in capsys.readouterr().err
    (tmp_path / "empty").mkdir()
    assert main(["rates", str(tmp_path / "empty")]) == 2
    assert "got a folder without summary.json" in capsys.readouterr().err


def test_rates_error_paths_raise_one_sentence_errors(tiny_run, tmp_path):
    from pathcast.errors import ScenarioError
    from pathcast.results.budget import budget_terms
    from pathcast.results.rates_report import start_years_from
    from pathcast.results.sources import load_run as load_result

    with pytest.raises(
        ScenarioError, match=r"missing\.yaml: \(path\): got no such file or folder; expected a scenario YAML"
    ):
        load_result(tmp_path / "missing.yaml")
    terms = budget_terms(tiny_run.result)
    with pytest.raises(ScenarioError, match=r"--step 0: expected a whole number of years >= 1\."):
        start_years_from(tiny_run.result, terms, None, None, 0)
    with pytest.raises(
        ScenarioError, match=r"--from 2028 is after --to 2026; expected a first start year <= the last\."
    ):
        start_years_from(tiny_run.result, terms, 2028, 2026, 1)
