"""Write a RunResult to a folder (CSV always, Parquet, one Excel workbook, summary.json, manifest.json) and read it
back. Writing goes to a temporary folder beside the target that is renamed at the end, so a failed run never leaves a
half-written result folder."""

from __future__ import annotations

import json
import os
import shutil
import tempfile
from pathlib import Path
from types import MappingProxyType

import pandas as pd

from ..errors import ScenarioError
from .run_result import TABLES, RunResult

__all__ = ["write_result", "read_result", "atomic_folder"]

EXCEL_ROW_LIMIT = 1_048_575


class atomic_folder:
    """Context manager: yields a temporary folder; on success it replaces ``target`` as a whole."""

    def __init__(self, target: Path):
        self.target = Path(target)

    def __enter__(self) -> Path:
        self.target.parent.mkdir(parents=True, exist_ok=True)
        self.tmp = Path(tempfile.mkdtemp(prefix=f".{self.target.name}.", dir=self.target.parent))
        return self.tmp

    def __exit__(self, kind, error, trace) -> bool:
        if kind is not None:
            shutil.rmtree(self.tmp, ignore_errors=True)
            return False
        if self.target.exists():
            old = self.target.with_name(f".{self.target.name}.old")
            shutil.rmtree(old, ignore_errors=True)
            os.replace(self.target, old)
            os.replace(self.tmp, self.target)
            shutil.rmtree(old, ignore_errors=True)
        else:
            os.replace(self.tmp, self.target)
        return False


def _json_default(value):
    if hasattr(value, "item"):
        return value.item()
    return str(value)


def write_result(result: RunResult, folder: Path, *, parquet: bool = True, excel: bool = True) -> Path:
    """Write every table as CSV (and Parquet), an Excel workbook of the yearly tables, summary.json and manifest.json."""
    folder = Path(folder)
    with atomic_folder(folder) as tmp:
        for name in TABLES:
            frame = result.tables[name]
            frame.to_csv(tmp / f"{name}.csv", index=False)
            if parquet:
                frame.to_parquet(tmp / f"{name}.parquet", index=False)
        if excel:
            with pd.ExcelWriter(tmp / "results.xlsx", engine="openpyxl") as book:
                for name in TABLES:
                    frame = result.tables[name]
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
    for name in TABLES:
        path = folder / f"{name}.csv"
        if not path.is_file():
            raise ScenarioError(
                f"{folder}: {name}.csv: got no such file; expected every table of a pathcast result folder.",
                file=str(folder),
            )
        tables[name] = pd.read_csv(path)
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
