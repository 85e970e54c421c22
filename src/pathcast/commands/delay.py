"""Delayed action under a carbon budget: follow the reference pathway (no budget, caps or carbon price) until each start
year, then the least-cost pathway under the budget. Reports, per start year, the required rate of decline, the total
discounted cost and its increase over immediate action, the steepest yearly cut, stranded capacity and whether the
budget can still be met (otherwise the tightest feasible budget and the shortfall).
"""

from __future__ import annotations

import argparse
from pathlib import Path
from typing import TYPE_CHECKING

from ..errors import ScenarioError
from . import progress_printer

if TYPE_CHECKING:  # the heavy modules are imported where they are used
    from ..analysis.delay import DelayStudy

# computed by pathcast.analysis.delay.delay_study, rendered by pathcast.report.console.render_delay,
# pathcast.report.json_output.render_delay_json and write_study (the files)

__all__ = ["add_arguments", "execute", "parse_years", "write_study"]


def parse_years(text: str) -> list[int]:
    """'2025,2030,2035' -> [2025, 2030, 2035]."""
    try:
        return [int(part) for part in text.split(",") if part.strip()]
    except ValueError:
        raise ScenarioError(
            f"--start {text!r}: expected whole years separated by commas, e.g. 2025,2030,2035."
        ) from None


def add_arguments(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("file", help="scenario YAML file with a carbon budget")
    parser.add_argument(
        "--start",
        default=None,
        metavar="YEARS",
        help="start years of action, comma-separated (default: every 5 years from the base year inside "
        "the budget period)",
    )
    parser.add_argument(
        "--out",
        type=Path,
        default=None,
        metavar="DIR",
        help="also write delay.csv, delay_pathways.csv, delay_stranded.csv and delay.json to DIR",
    )
    parser.add_argument("--json", action="store_true", help="print JSON instead of a text table")
    parser.add_argument("--quiet", action="store_true", help="no progress messages")


def write_study(study: DelayStudy, folder: Path) -> Path:
    """delay.csv (the table), delay_pathways.csv, delay_stranded.csv and delay.json, written atomically."""
    from ..report.json_output import render_delay_json
    from ..results.writers import atomic_folder

    with atomic_folder(Path(folder)) as tmp:
        study.table.to_csv(tmp / "delay.csv", index=False)
        study.pathways().to_csv(tmp / "delay_pathways.csv", index=False)
        study.stranded().to_csv(tmp / "delay_stranded.csv", index=False)
        (tmp / "delay.json").write_text(render_delay_json(study))
    return Path(folder)


def execute(args: argparse.Namespace) -> int:
    from ..analysis.delay import delay_study
    from ..report.console import render_delay
    from ..report.json_output import render_delay_json

    progress = progress_printer(args.quiet or args.json)
    starts = parse_years(args.start) if args.start is not None else None
    study = delay_study(args.file, starts, progress=progress)
    if args.out is not None:
        write_study(study, args.out)
        progress(f"tables written to {args.out}/")
    print(render_delay_json(study) if args.json else render_delay(study))
    return 0
