"""Careless and hostile inputs: result folders that cannot escape or delete what pathcast did not write, numbers that
must make sense, a key given twice, text encodings, spreadsheet formulas and files that expand without bound.

Each test feeds the exact input a reviewer found mishandled and checks the one-sentence answer (exit 2, file, field
path, value, what was expected) and that nothing outside pathcast's own folders changed.
"""

from __future__ import annotations

import json
import os
import re
import shutil
from pathlib import Path

import openpyxl
import pandas as pd
import pytest

from pathcast.cli import main
from pathcast.errors import ScenarioError
from pathcast.results.folders import OWNER_MARKER, atomic_folder, check_folder_name, safe_folder_name
from pathcast.results.run_result import RunResult
from pathcast.results.writers import read_result, spreadsheet_safe, write_result
from pathcast.scenario.loader import load_scenario
from tests.conftest import DATA, tiny_mapping, write_scenario

DEMO = Path(__file__).parents[1] / "scenarios" / "demo"


def _check(capsys, path: Path) -> tuple[int, str]:
    code = main(["check", str(path)])
    captured = capsys.readouterr()
    assert "Traceback" not in captured.err + captured.out
    return code, captured.err.strip()


def _changed(tmp_path: Path, change) -> Path:
    m = tiny_mapping()
    change(m)
    return write_scenario(tmp_path, m)


# --- 1. output paths are safe by construction ------------------------------------------------------------------


@pytest.mark.parametrize("name", ["", ".", "..", "../../x", "/tmp/anywhere", "a/b", "nul", "-rf", "x" * 65])
def test_scenario_names_that_are_no_folder_name_are_refused_at_check(tmp_path, capsys, name):
    path = _changed(tmp_path, lambda m: m["metadata"].update(name=name))
    code, err = _check(capsys, path)
    assert code == 2
    assert f"metadata.name: got {name!r}; expected a folder name of 1 to 64 characters" in err
    assert err.count("\n") == 0 and str(path) in err


def test_the_folder_name_rule_and_its_suggestion():
    # rule stated in README "Outputs" and pathcast.results.folders (letters, digits, '_', '-', '.'; '.' not leading)
    assert check_folder_name("arvenna_budget-2.v1") is None
    assert check_folder_name(".hidden") is not None and check_folder_name("CON") is not None
    for bad in ("../../x", "my scenario", "", "é"):
        assert check_folder_name(safe_folder_name(bad)) is None


def _user_folder(tmp_path: Path) -> Path:
    folder = tmp_path / "mydocs"
    folder.mkdir()
    (folder / "report.docx").write_bytes(b"the user's own report")
    return folder


def test_run_refuses_an_out_folder_that_holds_a_users_file(tmp_path, capsys):
    folder = _user_folder(tmp_path)
    code = main(["run", str(DATA / "tiny.yaml"), "--out", str(folder), "--quiet"])
    err = capsys.readouterr().err
    assert code == 2 and "Traceback" not in err
    assert "output folder: got a folder that pathcast did not write (it holds 'report.docx')" in err
    assert (folder / "report.docx").read_bytes() == b"the user's own report"
    assert sorted(p.name for p in folder.iterdir()) == ["report.docx"]
    assert sorted(p.name for p in tmp_path.iterdir()) == ["mydocs"]  # nothing written beside it either


@pytest.mark.parametrize("out", [".", ".."])
def test_run_refuses_the_current_folder_and_its_parent(tmp_path, capsys, monkeypatch, out):
    work = tmp_path / "work"
    work.mkdir()
    (work / "notes.txt").write_text("keep")
    monkeypatch.chdir(work)
    code = main(["run", str(DATA / "tiny.yaml"), "--out", out, "--quiet"])
    err = capsys.readouterr().err
    assert code == 2 and "Traceback" not in err
    assert "got the current folder, one of its parents" in err
    assert sorted(p.name for p in work.iterdir()) == ["notes.txt"]
    assert sorted(p.name for p in tmp_path.iterdir()) == ["work"]


def test_run_refuses_an_out_path_that_is_a_file(tmp_path, capsys):
    target = tmp_path / "report.docx"
    target.write_text("mine")
    code = main(["run", str(DATA / "tiny.yaml"), "--out", str(target), "--quiet"])
    assert code == 2 and "output folder: got a file" in capsys.readouterr().err
    assert target.read_text() == "mine"


def _tiny_result(run, capacity: pd.DataFrame | None = None) -> RunResult:
    """The solved tiny run's result, with its capacity table replaced when given."""
    r = run.result
    tables = dict(r.tables)
    if capacity is not None:
        tables["capacity"] = capacity
    return RunResult(r.scenario_name, tables, dict(r.summary), dict(r.manifest), dict(r.metadata))


def test_a_folder_pathcast_wrote_is_replaced_and_leftovers_of_interrupted_writes_are_cleaned(tmp_path):
    target = tmp_path / "results" / "tiny"
    with atomic_folder(target) as tmp:
        (tmp / "a.csv").write_text("1\n")
    assert (target / OWNER_MARKER).is_file()
    # what an interrupted write leaves: a temporary folder of a process that is gone, and the old copy of a swap
    dead = tmp_path / "results" / ".tiny.tmp-999999999-0123abcd"
    dead.mkdir()
    (dead / "half.csv").write_text("")
    old = tmp_path / "results" / ".tiny.old"
    old.mkdir()
    (old / OWNER_MARKER).write_text("{}")
    alive = (
        tmp_path / "results" / f".tiny.tmp-{os.getppid()}-0123abcd"
    )  # a process that still runs: left alone
    alive.mkdir()
    with atomic_folder(target) as tmp:
        (tmp / "b.csv").write_text("2\n")
    assert sorted(p.name for p in target.iterdir()) == [OWNER_MARKER, "b.csv"]
    assert not dead.exists() and not old.exists() and alive.exists()


def test_a_result_folder_of_an_earlier_version_is_recognised_by_its_manifest(tmp_path):
    legacy = tmp_path / "old_result"
    legacy.mkdir()
    (legacy / "manifest.json").write_text(json.dumps({"versions": {"pathcast": "0.1.0"}}))
    (legacy / "capacity.csv").write_text("technology\n")
    with atomic_folder(legacy) as tmp:
        (tmp / "capacity.csv").write_text("technology\nsolar_pv\n")
    assert (legacy / "capacity.csv").read_text() == "technology\nsolar_pv\n"


def test_a_failed_write_leaves_the_previous_folder_and_no_temporary_folder(tmp_path):
    target = tmp_path / "r"
    with atomic_folder(target) as tmp:
        (tmp / "first.csv").write_text("1\n")
    with pytest.raises(RuntimeError, match="disk full"), atomic_folder(target) as tmp:
        (tmp / "second.csv").write_text("")
        raise RuntimeError("disk full")
    assert sorted(p.name for p in tmp_path.iterdir()) == ["r"]
    assert (target / "first.csv").is_file() and not (target / "second.csv").exists()


def test_result_folders_follow_the_umask(tmp_path, tiny_run):
    previous = os.umask(0o022)
    try:
        write_result(_tiny_result(tiny_run), tmp_path / "shared", parquet=False, excel=False)
    finally:
        os.umask(previous)
    assert (
        tmp_path / "shared"
    ).stat().st_mode & 0o777 == 0o755  # readable by the team, as any program's output


# --- 2. numbers must make sense ---------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("change", "where", "expected"),
    [
        (
            lambda m: m["demand"]["electricity"].update(yearly_twh={2025: -40.0, 2030: 45.0}),
            "demand.electricity.yearly_twh",
            "a value of at least 0 TWh for 2025",
        ),
        (
            lambda m: m["demand"]["electricity"].update(growth=-1.5),
            "demand.electricity.growth",
            "a value above -1",
        ),
        (
            lambda m: m["demand"]["electricity"].update(growth={2030: 3.0}),
            "demand.electricity.growth",
            "a value of at most 1 for 2030",
        ),
        (
            lambda m: m["technologies"]["supplies"]["gas_import"].update(price=float("inf")),
            "technologies.supplies.gas_import.price",
            "a finite number",
        ),
        (
            lambda m: m["technologies"]["supplies"]["gas_import"].update(price=-2.0),
            "technologies.supplies.gas_import.price",
            "a value of at least 0 USD/GJ",
        ),
        (
            lambda m: m["policy"].update(carbon_price=-50),
            "policy.carbon_price",
            "a value of at least 0 USD/tCO2",
        ),
        (
            lambda m: m["technologies"]["generators"]["solar_pv"].update(capex=float("nan")),
            "technologies.generators.solar_pv.capex",
            "a finite number",
        ),
        (
            lambda m: m["technologies"]["generators"]["solar_pv"].update(max_build_mw_per_year=float("inf")),
            "technologies.generators.solar_pv.max_build_mw_per_year",
            "a finite number",
        ),
        (
            lambda m: m["technologies"]["generators"]["gas_combined_cycle"]["existing"][0].update(
                capacity_mw=float("nan")
            ),
            "technologies.generators.gas_combined_cycle.existing.0.capacity_mw",
            "a finite number",
        ),
        (
            lambda m: m["demand"]["electricity"].update(base_year_twh=float("inf")),
            "demand.electricity.base_year_twh",
            "a finite number",
        ),
        (
            lambda m: m["technologies"]["supplies"]["gas_import"].update(potential_pj=-1),
            "technologies.supplies.gas_import.potential_pj",
            "a value of at least 0 PJ",
        ),
    ],
    ids=[
        "negative_yearly_demand",
        "growth_below_minus_one",
        "growth_above_one",
        "infinite_price",
        "negative_fuel_price",
        "negative_carbon_price",
        "nan_capex",
        "infinite_build_limit",
        "nan_existing_capacity",
        "infinite_demand",
        "negative_potential",
    ],
)
def test_numbers_that_make_no_sense_are_refused(tmp_path, change, where, expected):
    path = _changed(tmp_path, change)
    with pytest.raises(ScenarioError, match=rf"{str(path)}: {where}: got .*; expected {expected}") as info:
        load_scenario(path)
    assert "\n" not in str(info.value)


def test_a_nan_cell_in_the_representative_days_csv_is_located(tmp_path, capsys):
    shutil.copytree(DEMO, tmp_path / "demo")
    days = tmp_path / "demo" / "representative_days.csv"
    lines = days.read_text().splitlines()
    header = lines[0].split(",")
    cells = lines[5].split(",")
    cells[header.index("demand")] = "nan"
    lines[5] = ",".join(cells)
    days.write_text("\n".join(lines) + "\n")
    code, err = _check(capsys, tmp_path / "demo" / "budget.yaml")
    assert code == 2 and f"{days}: line 6.demand: got 'nan'; expected a finite number." in err


def test_a_year_given_twice_in_a_year_table_csv_is_refused(tmp_path):
    (tmp_path / "price.csv").write_text("year,value\n2025,5\n2025,6\n")
    path = _changed(tmp_path, lambda m: m["technologies"]["supplies"]["gas_import"].update(price="price.csv"))
    with pytest.raises(ScenarioError, match=r"price\.csv: line 3\.year: got 2025; expected each year once"):
        load_scenario(path)


# --- 3. a key given twice -----------------------------------------------------------------------------------------


def test_a_key_given_twice_names_file_line_and_key(tmp_path, capsys):
    shutil.copytree(DEMO, tmp_path / "demo")
    reference = tmp_path / "demo" / "reference.yaml"
    lines = reference.read_text().splitlines()
    at = next(i for i, line in enumerate(lines) if line.strip().startswith("discount_rate:"))
    lines.insert(at + 1, lines[at].replace(lines[at].split(":", 1)[1], " 0.5"))
    reference.write_text("\n".join(lines) + "\n")
    code, err = _check(capsys, tmp_path / "demo" / "budget.yaml")
    assert code == 2
    assert (
        f"{reference}: line {at + 2}: got the key 'discount_rate' (metadata.discount_rate) a second time in one "
        f"mapping (first at line {at + 1}); expected each key once." in err
    )


# --- 4. tables are safe to open -----------------------------------------------------------------------------------


def test_a_formula_as_technology_name_is_refused_at_check(tmp_path):
    def change(m):
        m["technologies"]["generators"]['=HYPERLINK("http://x","y")'] = m["technologies"]["generators"][
            "solar_pv"
        ]

    path = _changed(tmp_path, change)
    with pytest.raises(
        ScenarioError, match=r"got '=HYPERLINK.*expected a name that starts with a letter, digit"
    ):
        load_scenario(path)


def test_text_cells_that_start_a_formula_are_written_as_text_in_csv_and_excel(tmp_path, tiny_run):
    # OWASP "CSV Injection" guidance: prefix such cells with an apostrophe so spreadsheets show them as text
    frame = pd.DataFrame(
        {"technology": ["=1+1", "+cmd", "-x", "@SUM(A1)", "\tx", "solar_pv"], "capacity_mw": [1.0] * 6}
    )
    assert list(spreadsheet_safe(frame)["technology"]) == [
        "'=1+1",
        "'+cmd",
        "'-x",
        "'@SUM(A1)",
        "'\tx",
        "solar_pv",
    ]
    folder = write_result(_tiny_result(tiny_run, frame), tmp_path / "r", parquet=True, excel=True)
    assert "'=1+1" in (folder / "capacity.csv").read_text()
    sheet = openpyxl.load_workbook(folder / "results.xlsx")["capacity"]
    cells = [sheet.cell(row=r, column=1) for r in range(2, 8)]
    assert all(c.data_type == "s" for c in cells) and cells[0].value == "'=1+1"
    assert list(read_result(folder).tables["capacity"]["technology"]) == list(
        frame["technology"]
    )  # round trip
    assert list(pd.read_parquet(folder / "capacity.parquet")["technology"]) == list(
        frame["technology"]
    )  # raw


# --- 6. any text encoding -------------------------------------------------------------------------------------------


def test_a_latin1_scenario_is_a_located_error(tmp_path, capsys):
    path = tmp_path / "latin.yaml"
    text = (DATA / "tiny.yaml").read_text().replace("description:", "description: Énergie", 1)
    path.write_bytes(text.encode("latin-1"))
    code, err = _check(capsys, path)
    line = next(i for i, t in enumerate(text.splitlines(), start=1) if "Énergie" in t)
    assert (
        code == 2
        and f"{path}: line {line}, column " in err
        and "got the byte 0xc9, which is not UTF-8" in err
    )


def test_a_latin1_csv_is_a_located_error(tmp_path):
    (tmp_path / "price.csv").write_bytes("year,value\n2025,5 \xe9\n".encode("latin-1"))
    path = _changed(tmp_path, lambda m: m["technologies"]["supplies"]["gas_import"].update(price="price.csv"))
    with pytest.raises(
        ScenarioError, match=r"price\.csv: line 2, column 8: got the byte 0xe9, which is not UTF-8"
    ):
        load_scenario(path)


def test_a_utf8_file_with_a_byte_order_mark_is_read(tmp_path):
    path = tmp_path / "bom.yaml"
    path.write_bytes(b"\xef\xbb\xbf" + (DATA / "tiny.yaml").read_bytes())
    assert load_scenario(path).scenario.metadata.name


# --- 8. bounded work on hostile files ---------------------------------------------------------------------------


def test_nested_aliases_that_would_expand_to_billions_are_refused(tmp_path, capsys):
    lines = ["a0: &a0 [x, x, x, x, x, x, x, x, x]"]
    lines += [f"a{i}: &a{i} [" + ", ".join([f"*a{i - 1}"] * 9) + "]" for i in range(1, 10)]
    path = tmp_path / "bomb.yaml"
    path.write_text("\n".join(lines) + "\n")
    assert path.stat().st_size < 600
    code, err = _check(capsys, path)
    assert (
        code == 2 and "expands to 4,412,961,516 values through its aliases; expected at most 2,000,000" in err
    )


def test_more_aliases_than_the_limit_are_refused(tmp_path, capsys):
    path = tmp_path / "many.yaml"
    path.write_text("a: &a 1\nb: [" + ", ".join(["*a"] * 101) + "]\n")
    code, err = _check(capsys, path)
    assert code == 2 and "got more than 100 YAML aliases" in err


def test_a_recursive_alias_is_refused(tmp_path, capsys):
    path = tmp_path / "loop.yaml"
    path.write_text("a: &a\n  - *a\n")
    code, err = _check(capsys, path)
    assert code == 2 and "line 1: got a YAML alias that refers to a node containing it" in err


def test_a_file_over_the_size_limit_is_refused(tmp_path, monkeypatch):
    from pathcast.scenario import loader

    monkeypatch.setattr(loader, "MAX_YAML_BYTES", 100)
    with pytest.raises(
        ScenarioError,
        match=r"tiny\.yaml: \(file\): got [\d,]+ bytes; expected a scenario file of at most 100 bytes",
    ):
        load_scenario(DATA / "tiny.yaml")


# --- cases the fuzz test found (tests/test_fuzz.py) ---------------------------------------------------------------


@pytest.mark.parametrize(
    ("column", "value", "expected"),
    [
        ("demand", "-1", "a demand value of at least 0"),
        ("solar", "1e40", "an availability factor from 0 to 1"),
    ],
)
def test_out_of_range_cells_of_the_days_csv_name_the_csv_line_and_column(
    tmp_path, capsys, column, value, expected
):
    shutil.copytree(DEMO, tmp_path / "demo")
    days = tmp_path / "demo" / "representative_days.csv"
    lines = days.read_text().splitlines()
    header = lines[0].split(",")
    cells = lines[18].split(",")
    cells[header.index(column)] = value
    lines[18] = ",".join(cells)
    days.write_text("\n".join(lines) + "\n")
    code, err = _check(capsys, tmp_path / "demo" / "budget.yaml")
    assert code == 2 and f"{days}: line 19.{column}: got {value!r}; expected {expected}." in err


@pytest.mark.parametrize(
    ("change", "where"),
    [
        (lambda m: m["policy"]["carbon_budget"].update(last_year=0), "policy.carbon_budget.last_year: got 0"),
        (
            lambda m: m["technologies"]["generators"]["gas_combined_cycle"]["existing"][0].update(
                retirement_year=10**40
            ),
            "technologies.generators.gas_combined_cycle.existing.0.retirement_year",
        ),
        (
            lambda m: m["technologies"]["converters"]["fuel_synthesis"].update(first_build_year=1e30),
            "technologies.converters.fuel_synthesis.first_build_year: got 1e+30; expected a whole year from 1900",
        ),
    ],
    ids=["budget_last_year_zero", "huge_retirement_year", "float_first_build_year"],
)
def test_years_outside_any_plausible_range_are_refused(tmp_path, change, where):
    path = _changed(tmp_path, change)
    with pytest.raises(ScenarioError, match=re.escape(where)):
        load_scenario(path)


def test_a_currency_that_is_no_code_is_reported_not_crashed_on(tmp_path):
    path = _changed(tmp_path, lambda m: m["metadata"].update(currency=42))
    with pytest.raises(ScenarioError, match=r"metadata\.currency: got 42; expected"):
        load_scenario(path)
