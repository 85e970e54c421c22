"""Write an ensemble's summary: DIR/tables/ (CSV and Parquet), DIR/figures/ (PNG) and DIR/summary.json. Each folder
is replaced as a whole (``atomic_folder``); DIR/members/ is never touched here."""

from __future__ import annotations

import math
from pathlib import Path

import pandas as pd

from ..results.writers import atomic_folder
from .figures import ensemble_figures, save_png
from .store import write_json_atomic
from .summary import EnsembleSummary

__all__ = ["write_ensemble_outputs", "TABLE_FILES"]

TABLE_FILES = (
    "members",
    "yearly",
    "capacity",
    "yearly_percentiles",
    "headline_percentiles",
    "tornado",
    "correlations",
)


def _parquet_ready(frame: pd.DataFrame) -> pd.DataFrame:
    """Object columns that mix numbers and text (an absolute input given as paths and numbers) become text."""
    frame = frame.copy()
    for column in frame.columns:
        if frame[column].dtype == object:
            kinds = {
                type(v)
                for v in frame[column]
                if v is not None and not (isinstance(v, float) and math.isnan(v))
            }
            if len(kinds) > 1 and not kinds <= {int, float, bool}:
                frame[column] = frame[column].map(lambda v: None if v is None else str(v))
    return frame


def _clean(value):
    if isinstance(value, float) and not math.isfinite(value):
        return None
    if isinstance(value, dict):
        return {k: _clean(v) for k, v in value.items()}
    return value


def write_ensemble_outputs(
    summary: EnsembleSummary, folder: Path | str | None = None, *, figures: bool = True
) -> list[Path]:
    folder = Path(folder or summary.folder)
    written: list[Path] = []
    frames = {
        "members": summary.members,
        "yearly": summary.yearly,
        "capacity": summary.capacity,
        "yearly_percentiles": summary.yearly_percentiles,
        "headline_percentiles": summary.headline_percentiles,
        "tornado": summary.tornado,
        "correlations": summary.correlations,
    }
    with atomic_folder(folder / "tables") as tmp:
        for name, frame in frames.items():
            if frame is None:
                continue
            frame = _parquet_ready(frame)
            frame.to_csv(tmp / f"{name}.csv", index=False)
            frame.to_parquet(tmp / f"{name}.parquet", index=False)
    written += sorted((folder / "tables").iterdir())
    if figures:
        with atomic_folder(folder / "figures") as tmp:
            for name, fig in ensemble_figures(summary).items():
                save_png(fig, tmp / f"{name}.png")
        written += sorted((folder / "figures").glob("*.png"))
    design = summary.design
    data = {
        "name": design["name"],
        "design": design["design"],
        "base": design["base"],
        "base_hash": design["base_hash"],
        "currency": design.get("currency"),
        "price_year": design.get("price_year"),
        "inputs": {
            label: {k: info[k] for k in ("path", "as", "distribution")}
            for label, info in design["inputs"].items()
        },
        **_clean(summary.stats),
        "headline_percentiles": {
            row["quantity"]: _clean({k: row[k] for k in ("p5", "p25", "p50", "p75", "p95", "mean")})
            for row in summary.headline_percentiles.to_dict("records")
        },
    }
    written.append(write_json_atomic(folder / "summary.json", data))
    return written
