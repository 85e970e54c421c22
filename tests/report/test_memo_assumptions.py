"""A run's assumptions travel with its result: run_scenario computes the table from the loaded scenario, write_result
stores it as assumptions.csv and read_result reads it back as text, so the memo of a result folder opens no scenario
file. A result folder of an earlier pathcast (no assumptions.csv) keeps the old fallback: its scenario file when
unchanged since the run, otherwise the few assumptions it records itself, with a note saying where they come from.

The checked values are tests/data/tiny.yaml's own inputs (7 % discount rate, 3 %/yr electricity demand growth,
natural gas 56.1 kgCO2/GJ citing IPCC 2006 Vol.2 Ch.1 Table 1.4, as the file gives them).
"""

from __future__ import annotations

import re
import shutil

import pandas as pd
import pytest

from pathcast.cli import main
from pathcast.results.assumptions import (
    ASSUMPTION_COLUMNS,
    ASSUMPTIONS_TABLE,
    assumptions_table,
    result_assumptions,
)
from pathcast.results.writers import read_result, write_result
from pathcast.scenario import loader
from tests.conftest import DATA, tiny_mapping, write_scenario


def memo_rows(markdown: str) -> list[list[str]]:
    """Every Markdown table row of a memo as its cells."""
    return [
        [c.strip().replace("\\|", "|") for c in re.split(r"(?<!\\)\|", line.strip())[1:-1]]
        for line in markdown.splitlines()
        if line.startswith("| ") and not line.startswith("|---")
    ]


def shows_every_assumption(markdown: str, table: pd.DataFrame) -> bool:
    """Each assumption's item, value, unit and source appear together in one row of the memo's tables."""
    rows = [tuple(row[-4:]) for row in memo_rows(markdown) if len(row) >= 4]
    wanted = table[["item", "value", "unit", "source"]].itertuples(index=False, name=None)
    return all(tuple(str(cell) for cell in row) in rows for row in wanted)


@pytest.fixture
def scenario_run(tmp_path):
    """tiny.yaml copied into its own folder, solved and written as a result folder (CSV only)."""
    from pathcast.pipeline import run_scenario

    (tmp_path / "scenario").mkdir()
    scenario = write_scenario(tmp_path / "scenario", tiny_mapping(), "tiny_copy.yaml")
    run = run_scenario(scenario)
    folder = write_result(run.result, tmp_path / "result", parquet=False, excel=False)
    return scenario, run, folder


def test_the_run_carries_its_assumptions(tiny_run, tiny_folder):
    table = tiny_run.result.tables[ASSUMPTIONS_TABLE]
    assert tuple(table.columns) == ASSUMPTION_COLUMNS
    pd.testing.assert_frame_equal(table, assumptions_table(loader.load_scenario(DATA / "tiny.yaml")))
    assert (tiny_folder / "assumptions.csv").is_file()
    back = read_result(tiny_folder).tables[ASSUMPTIONS_TABLE]
    # read back as text: empty subjects stay "", units such as "-" are not taken as numbers or formulas
    pd.testing.assert_frame_equal(back.reset_index(drop=True), table.reset_index(drop=True))
    discount = table[table["item"] == "discount rate"].iloc[0]
    assert (discount["value"], discount["unit"], discount["subject"]) == ("7 %", "1/yr", "")


def test_memo_of_a_result_folder_opens_no_scenario_file(scenario_run, tmp_path, monkeypatch):
    scenario, run, folder = scenario_run
    shutil.rmtree(scenario.parent)  # the scenario file is gone

    def refuse(*args, **kwargs):
        raise AssertionError(f"the memo of a result folder read a scenario file: {args}")

    monkeypatch.setattr(loader, "load_scenario", refuse)
    out = tmp_path / "memo"
    assert main(["memo", str(folder), "--out", str(out), "--quiet"]) == 0
    text = (out / "memo.md").read_text()
    assert "incomplete" not in text and "cannot be found" not in text
    assert shows_every_assumption(text, run.result.tables[ASSUMPTIONS_TABLE])
    assert "3 %/yr" in text and "IPCC 2006 Vol.2 Ch.1 Table 1.4" in text


def test_a_scenario_changed_after_the_run_does_not_change_the_memo(scenario_run, tmp_path):
    scenario, run, folder = scenario_run
    changed = tiny_mapping()
    changed["metadata"]["discount_rate"] = 0.05
    write_scenario(scenario.parent, changed, scenario.name)
    out = tmp_path / "memo"
    assert main(["memo", str(folder), "--out", str(out), "--quiet"]) == 0
    text = (out / "memo.md").read_text()
    assert "has changed since the run" not in text
    discount = [row for row in memo_rows(text) if "discount rate" in row]
    assert discount and discount[0][-3] == "7 %"  # the run's own value, not the 5 % written since
    assert shows_every_assumption(text, run.result.tables[ASSUMPTIONS_TABLE])


def test_an_earlier_result_folder_reads_an_unchanged_scenario_file(scenario_run, tmp_path):
    scenario, run, folder = scenario_run
    (folder / "assumptions.csv").unlink()  # as an earlier pathcast wrote it
    result = read_result(folder)
    assert ASSUMPTIONS_TABLE not in result.tables
    table, note = result_assumptions(result, folder)
    assert note == ""
    pd.testing.assert_frame_equal(table, run.result.tables[ASSUMPTIONS_TABLE])
    out = tmp_path / "memo"
    assert main(["memo", str(folder), "--out", str(out), "--quiet"]) == 0
    text = (out / "memo.md").read_text()
    assert "incomplete" not in text and shows_every_assumption(text, table)


def test_an_earlier_result_folder_without_its_scenario_says_where_assumptions_come_from(
    scenario_run, tmp_path
):
    scenario, _run, folder = scenario_run
    (folder / "assumptions.csv").unlink()
    shutil.rmtree(scenario.parent)
    table, note = result_assumptions(read_result(folder), folder)
    assert note == (
        f"The assumptions of tiny are incomplete: its scenario file {scenario} cannot be found, so only the "
        f"assumptions recorded in the result folder {folder} are shown."
    )
    assert set(table["source"]) <= {"metadata.json of the result folder", "summary.json of the result folder"}
    out = tmp_path / "memo"
    assert main(["memo", str(folder), "--out", str(out), "--quiet"]) == 0
    text = (out / "memo.md").read_text()
    assert note in text
    discount = [row for row in memo_rows(text) if "discount rate" in row]
    assert discount and discount[0][-3] == "7 %"  # from metadata.json


def test_a_result_without_assumptions_gives_an_empty_table_with_a_note(tiny_run):
    from pathcast.results.run_result import RunResult

    r = tiny_run.result
    bare = RunResult.create(
        r.scenario_name,
        {k: v for k, v in r.tables.items() if k != ASSUMPTIONS_TABLE},
        dict(r.summary),
        dict(r.manifest, source=""),
        dict(r.metadata),
    )
    table, note = result_assumptions(bare)
    assert "its scenario file (not recorded) cannot be found" in note and "the run's metadata" in note
    assert tuple(table.columns) == ASSUMPTION_COLUMNS and "discount rate" in set(table["item"])
