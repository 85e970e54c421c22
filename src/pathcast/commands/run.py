"""Solve a scenario: least-cost yearly build-out of power and fuel supply, written to results/<scenario>/."""

from __future__ import annotations

import argparse
import sys
import time
from pathlib import Path

from ..pipeline import run_scenario
from ..report.console import render_profile, render_summary
from ..results.writers import write_result
from ..solve import METHODS


def add_arguments(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("file", help="scenario YAML file")
    parser.add_argument("--out", type=Path, default=None, help="result folder (default: results/<scenario name>)")
    parser.add_argument("--method", choices=METHODS, default=None, help="HiGHS algorithm (overrides the scenario's solver.method)")
    parser.add_argument("--time-limit", type=float, default=None, help="HiGHS time limit [s]")
    parser.add_argument("--solver-log", action="store_true", help="show HiGHS's own log")
    parser.add_argument("--profile", action="store_true", help="print stage times and the LP size")
    parser.add_argument("--no-parquet", action="store_true", help="skip Parquet files")
    parser.add_argument("--no-excel", action="store_true", help="skip the Excel workbook")
    parser.add_argument("--quiet", action="store_true", help="print only the summary")


def execute(args: argparse.Namespace) -> int:
    started = time.perf_counter()

    def progress(message: str) -> None:
        if not args.quiet:
            print(f"[{time.perf_counter() - started:6.1f} s] {message}", file=sys.stderr, flush=True)

    run = run_scenario(args.file, progress=progress,
                       solver={"method": args.method, "time_limit_s": args.time_limit, "log": args.solver_log})
    out = args.out or Path("results") / run.result.scenario_name
    progress(f"writing tables to {out}")
    write_result(run.result, out, parquet=not args.no_parquet, excel=not args.no_excel)
    print(render_summary(run.result))
    if args.profile:
        print(render_profile(run.result))
    print(f"Results written to {out}/")
    return 0
