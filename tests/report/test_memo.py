"""`pathcast memo`: memo.md and a self-contained memo.html holding every headline number of summary.json (equal to
the displayed precision: |shown - value| <= half a unit of the last digit shown), the findings, figures, assumptions
with their sources, the illustrative-numbers notice, the comparison table and the cautions; written atomically."""

from __future__ import annotations

import json
import re
import shutil
from pathlib import Path

import pytest

from pathcast.cli import main
from pathcast.report import memo as memo_module
from pathcast.report.console import CAUTION
from pathcast.report.figures import OVERLAY_FIGURES, SCENARIO_FIGURES
from pathcast.report.memo import MISSING, format_value
from pathcast.results.compare import metric_label
from pathcast.results.writers import write_result
from tests.conftest import DATA, tiny_mapping, write_scenario


def table_rows(markdown: str) -> dict[str, list[str]]:
    """First-column label -> the other cells, for every Markdown table row of the memo."""
    rows = {}
    for line in markdown.splitlines():
        if line.startswith("| ") and not line.startswith("|---"):
            cells = [c.strip() for c in re.split(r"(?<!\\)\|", line.strip())[1:-1]]
            rows.setdefault(cells[0], cells[1:])
    return rows


def shown_equals(text: str, value) -> bool:
    if value is None:
        return text == MISSING
    if isinstance(value, bool):
        return text == ("yes" if value else "no")
    if isinstance(value, str):
        return text == value
    number = float(text.replace(",", ""))
    decimals = len(text.split(".")[1]) if "." in text else 0
    return abs(number - float(value)) <= 0.5 * 10**-decimals + 1e-9


def summary_items(summary: dict):
    for key, value in summary.items():
        if isinstance(value, dict):
            for item, inner in value.items():
                yield f"{key}.{item}", inner
        else:
            yield key, value


@pytest.fixture(scope="module")
def single_memo(tiny_folder, tmp_path_factory):
    out = tmp_path_factory.mktemp("memo") / "tiny_memo"
    assert main(["memo", str(tiny_folder), "--out", str(out), "--quiet"]) == 0
    return out


@pytest.fixture(scope="module")
def double_memo(reference_file, tiny_folder, tmp_path_factory):
    out = tmp_path_factory.mktemp("memo") / "both"
    assert main(["memo", str(reference_file), str(tiny_folder), "--out", str(out), "--quiet"]) == 0
    return out


def test_files_written(single_memo):
    assert (single_memo / "memo.md").is_file() and (single_memo / "memo.html").is_file()
    for name in SCENARIO_FIGURES:
        assert (single_memo / "figures" / f"tiny_{name}.png").is_file()
        assert (single_memo / "figures" / f"tiny_{name}.svg").is_file()
    for name in OVERLAY_FIGURES:
        assert (single_memo / "figures" / f"{name}.png").is_file()


def test_every_headline_number_of_summary_json(single_memo, tiny_folder):
    summary = json.loads((tiny_folder / "summary.json").read_text())
    rows = table_rows((single_memo / "memo.md").read_text())
    html = (single_memo / "memo.html").read_text()
    for key, value in summary_items(summary):
        label = metric_label(key)
        assert label in rows, key
        assert shown_equals(rows[label][0], value), (key, rows[label][0], value)
        assert f"<td>{label}</td>" in html.replace("&#x27;", "'")


def test_finding_holds_headline_numbers(single_memo, tiny_folder):
    summary = json.loads((tiny_folder / "summary.json").read_text())
    text = (single_memo / "memo.md").read_text()
    finding = text.split("## Finding")[1].split("##")[0]
    assert format_value(summary["total_discounted_cost_million"]) + " million USD" in finding
    assert format_value(summary["cumulative_emissions_mtco2"]) + " MtCO2" in finding
    assert "carbon budget of 25.00 MtCO2" in finding
    assert "%/yr (exponential decline)" in finding
    assert "In 2029 the capacity in service is" in finding
    assert "USD/tCO2 in 2027" in finding and "USD/tCO2 in 2029" in finding  # carbon price in two years


def test_illustrative_notice_and_cautions(single_memo):
    for name in ("memo.md", "memo.html"):
        text = (single_memo / name).read_text()
        assert "Illustrative numbers" in text
        assert CAUTION in text.replace("&#x27;", "'")


def test_assumptions_with_sources(single_memo):
    rows = table_rows((single_memo / "memo.md").read_text())
    assert rows["discount rate"][0] == "7 %"
    natural_gas = next(cells for label, cells in rows.items() if label == "natural_gas")
    assert natural_gas[1:3] == ["56.1", "kgCO2/GJ"]  # 56.1 kg/GJ as tests/data/tiny.yaml gives it
    assert "IPCC 2006 Vol.2 Ch.1 Table 1.4" in natural_gas[3]
    text = (single_memo / "memo.md").read_text()
    assert "3 %/yr" in text  # electricity demand growth of tiny.yaml
    assert "800 (2025) to" in text  # solar capex path with its 3 %/yr decline


def test_html_is_self_contained(single_memo):
    html = (single_memo / "memo.html").read_text()
    assert "<script" not in html and "<link" not in html and "http://" not in html and "https://" not in html
    sources = re.findall(r'<img src="([^"]*)"', html)
    assert len(sources) == len(SCENARIO_FIGURES) + len(OVERLAY_FIGURES)
    assert all(s.startswith("data:image/png;base64,") for s in sources)


def test_comparison_of_several(double_memo):
    text = (double_memo / "memo.md").read_text()
    assert "## Comparison of the scenarios" in text
    rows = table_rows(text)
    assert rows["average abatement cost against the first scenario [currency/tCO2]"][0] == MISSING
    assert rows["average abatement cost against the first scenario [currency/tCO2]"][1] != MISSING
    assert "| tiny_reference | tiny |" in text.replace("|  |", "| |").replace("| | ", "| ")
    assert "Assumptions of tiny that differ from tiny_reference." in text
    assert "it would use that budget up in" in text  # the reference measured against tiny's budget
    for name in OVERLAY_FIGURES:
        assert (double_memo / "figures" / f"{name}.png").is_file()
    assert (double_memo / "figures" / "tiny_reference_capacity.png").is_file()


def test_changed_scenario_file_limits_assumptions(tmp_path):
    from pathcast.pipeline import run_scenario

    scenario = write_scenario(tmp_path, tiny_mapping(), "tiny_copy.yaml")
    folder = write_result(run_scenario(scenario).result, tmp_path / "result", parquet=False, excel=False)
    (folder / "assumptions.csv").unlink()  # a result folder of an earlier pathcast, which did not store them
    changed = tiny_mapping()
    changed["metadata"]["discount_rate"] = 0.05
    write_scenario(tmp_path, changed, "tiny_copy.yaml")
    out = tmp_path / "memo"
    assert main(["memo", str(folder), "--out", str(out), "--quiet"]) == 0
    text = (out / "memo.md").read_text()
    assert "has changed since the run" in text
    assert (
        table_rows(text)["discount rate"][0] == "7 %"
    )  # the run's own value from metadata.json, not the new 5 %


def test_default_folder(tiny_folder, tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    assert main(["memo", str(tiny_folder), "--quiet"]) == 0
    assert (tmp_path / "results" / "tiny_memo" / "memo.html").is_file()


def test_refuses_foreign_folder(tiny_folder, tmp_path, capsys):
    code = main(["memo", str(tiny_folder), "--out", str(tiny_folder), "--quiet"])
    assert code == 2
    assert "no memo.md" in capsys.readouterr().err
    assert (tiny_folder / "summary.json").is_file()


def test_failure_leaves_nothing(tiny_folder, tmp_path, monkeypatch):
    def broken(*_args, **_kwargs):
        raise RuntimeError("disk full")

    monkeypatch.setattr(memo_module, "render_html", broken)
    out = tmp_path / "memo"
    with pytest.raises(RuntimeError, match="disk full"):
        main(["memo", str(tiny_folder), "--out", str(out), "--quiet"])
    assert not out.exists()
    assert list(tmp_path.iterdir()) == []


def test_rewrite_replaces_earlier_memo(tiny_folder, tmp_path):
    out = tmp_path / "memo"
    assert main(["memo", str(tiny_folder), "--out", str(out), "--quiet"]) == 0
    (out / "figures" / "stale.png").write_bytes(b"old")
    assert main(["memo", str(tiny_folder), "--out", str(out), "--quiet"]) == 0
    assert not (out / "figures" / "stale.png").exists()


@pytest.mark.parametrize(
    ("value", "metric", "shown"),
    [
        (6700.078970615261, "total_discounted_cost_million", "6,700"),
        (25.000000000000004, "cumulative_emissions_mtco2", "25.00"),
        (-0.0, "final_year_capacity_mw.fuel_synthesis", "0"),
        (136.548, "final_year_capacity_mw.electrolyser", "136.5"),
        (0.5, "unserved_fuel_pj", "0.500"),
        (2025, "base_year", "2025"),
        (3360.7, "peak_build_mw_per_year", "3,361"),
        (0.0745, "required_rate_from_start_per_year", "7.45"),
        (None, "carbon_budget_mtco2", MISSING),
        (float("nan"), "abatement_cost_per_tco2", MISSING),
        (True, "within_budget", "yes"),
    ],
)
def test_format_value(value, metric, shown):
    assert format_value(value, metric) == shown


def test_memo_from_scenario_file(tmp_path):
    """A scenario file as input: solved, and the assumptions come from the loaded scenario."""
    shutil.copy(DATA / "tiny.yaml", tmp_path / "tiny.yaml")
    out = tmp_path / "memo"
    assert main(["memo", str(tmp_path / "tiny.yaml"), "--out", str(out), "--quiet"]) == 0
    text = (out / "memo.md").read_text()
    assert "incomplete" not in text and "tiny.yaml" in text
    assert Path(out / "memo.html").stat().st_size > 10_000
