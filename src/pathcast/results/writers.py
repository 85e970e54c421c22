"""Write a RunResult to a folder (CSV always, Parquet, one Excel workbook, summary.json, manifest.json) and read it
back. Writing goes to a temporary folder beside the target that is renamed at the end, so a failed run never leaves a
half-written result folder."""

from __future__ import annotations

import json
from pathlib import Path
from types import MappingProxyType

import pandas as pd

from ..errors import ScenarioError
from .folders import atomic_folder
from .run_result import OPTIONAL_TABLES, TABLES, TEXT_TABLES, RunResult

__all__ = ["write_result", "read_result", "atomic_folder", "spreadsheet_safe", "FORMULA_STARTS"]

# A text cell starting with one of these is read as a formula by spreadsheet programs; it is written with a leading
# apostrophe so that they show it as text (OWASP, "CSV Injection", community guidance). pathcast check also refuses
# names that start so, so in practice only free text can need it.
FORMULA_STARTS = ("=", "+", "-", "@", "\t", "\r")

EXCEL_ROW_LIMIT = 1_048_575


def _json_default(value):
    if hasattr(value, "item"):
        return value.item()
    return str(value)


def _escape_cell(value):
    # a lone "-" (a dimensionless unit, an empty mark) cannot be a formula and stays as it is
    if isinstance(value, str) and value.startswith(FORMULA_STARTS) and value != "-":
        return "'" + value
    return value


def _unescape_cell(value):
    if (
        isinstance(value, str)
        and value.startswith("'")
        and value[1:2]
        and value[1:].startswith(FORMULA_STARTS)
    ):
        return value[1:]
    return value


def spreadsheet_safe(frame: pd.DataFrame) -> pd.DataFrame:
    """``frame`` with every text cell that a spreadsheet would run as a formula prefixed by an apostrophe."""
    text_columns = [
        c for c in frame.columns if frame[c].dtype == object or pd.api.types.is_string_dtype(frame[c])
    ]
    if not text_columns:
        return frame
    needs = [c for c in text_columns if frame[c].map(lambda v: _escape_cell(v) is not v).any()]
    if not needs:
        return frame
    frame = frame.copy()
    for column in needs:
        frame[column] = frame[column].map(_escape_cell)
    return frame


def write_result(result: RunResult, folder: Path, *, parquet: bool = True, excel: bool = True) -> Path:
    """Write every table as CSV (and Parquet), an Excel workbook of the yearly tables, summary.json and manifest.json."""
    folder = Path(folder)
    with atomic_folder(folder, kind="result") as tmp:
        names = [*TABLES, *(n for n in OPTIONAL_TABLES if n in result.tables)]
        # CSV and Excel get spreadsheet-safe text; Parquet keeps the raw text
        shown = {name: spreadsheet_safe(result.tables[name]) for name in names}
        for name in names:
            shown[name].to_csv(tmp / f"{name}.csv", index=False)
            if parquet:
                result.tables[name].to_parquet(tmp / f"{name}.parquet", index=False)
        if excel:
            with pd.ExcelWriter(tmp / "results.xlsx", engine="openpyxl") as book:
                for name in names:
                    frame = shown[name]
                    if len(frame) <= EXCEL_ROW_LIMIT:
                        frame.to_excel(book, sheet_name=name[:31], index=False)
        (tmp / "summary.json").write_text(json.dumps(dict(result.summary), indent=2, default=_json_default))
        (tmp / "manifest.json").write_text(json.dumps(dict(result.manifest), indent=2, default=_json_default))
        (tmp / "metadata.json").write_text(json.dumps(dict(result.metadata), indent=2, default=_json_default))
    return folder


def read_result(folder: Path) -> RunResult:
    """Read a result folder written by :func:`write_result` (CSV tables)."""
    folder = Path(folder)
    summary_path = folder / "summary.json"
    if not summary_path.is_file():
        raise ScenarioError(
            f"{folder}: (folder): got a folder without summary.json; expected a pathcast result folder "
            "written by 'pathcast run'.",
            file=str(folder),
        )
    tables = {}
    for name in (*TABLES, *OPTIONAL_TABLES):
        path = folder / f"{name}.csv"
        if name in OPTIONAL_TABLES and not path.is_file():
            continue
        if not path.is_file():
            raise ScenarioError(
                f"{folder}: {name}.csv: got no such file; expected every table of a pathcast result folder.",
                file=str(folder),
            )
        text = {"dtype": str, "keep_default_na": False} if name in TEXT_TABLES else {}
        frame = pd.read_csv(path, **text)
        for column in frame.columns:
            if frame[column].dtype == object or pd.api.types.is_string_dtype(frame[column]):
                frame[column] = frame[column].map(_unescape_cell)
        tables[name] = frame
    summary = json.loads(summary_path.read_text())
    manifest = (
        json.loads((folder / "manifest.json").read_text()) if (folder / "manifest.json").is_file() else {}
    )
    metadata = (
        json.loads((folder / "metadata.json").read_text()) if (folder / "metadata.json").is_file() else {}
    )
    return RunResult(
        summary.get("scenario", folder.name),
        MappingProxyType(tables),
        MappingProxyType(summary),
        MappingProxyType(manifest),
        MappingProxyType(metadata),
    )
