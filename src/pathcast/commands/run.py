"""Solve a scenario: least-cost yearly build-out of power and fuel supply, written to results/<scenario>/."""

# computed by pathcast.analysis.achievability.run_checking_budget (the run and the verdict on its carbon budget),
# rendered by pathcast.report.console and pathcast.report.json_output

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from ..solver_methods import METHODS
from . import progress_printer


def add_arguments(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("file", help="scenario YAML file")
    parser.add_argument(
        "--out", type=Path, default=None, help="result folder (default: results/<scenario name>)"
    )
    parser.add_argument(
        "--method",
        choices=METHODS,
        default=None,
        help="HiGHS algorithm (overrides the scenario's solver.method)",
    )
    parser.add_argument("--time-limit", type=float, default=None, help="HiGHS time limit [s]")
    parser.add_argument(
        "--extension",
        action="append",
        default=[],
        metavar="FILE[:FUNCTION]",
        help="a Python file whose function (default 'extend') adds your own rules to the model, after the "
        "scenario's own extensions (README, Extensions); repeatable",
    )
    parser.add_argument("--solver-log", action="store_true", help="show HiGHS's own log")
    parser.add_argument("--profile", action="store_true", help="print stage times and the LP size")
    parser.add_argument("--no-parquet", action="store_true", help="skip Parquet files")
    parser.add_argument("--no-excel", action="store_true", help="skip the Excel workbook")
    parser.add_argument("--quiet", action="store_true", help="print only the summary")
    parser.add_argument(
        "--json",
        action="store_true",
        help="print summary.json (plus the result folder) instead of the text summary",
    )
    parser.add_argument(
        "--allow-overshoot",
        type=float,
        default=None,
        metavar="PRICE",
        help="relax the carbon budget: emissions above it cost PRICE [currency/tCO2], paid in the "
        "budget's last year; the overshoot is reported (default: the budget is a hard limit, and an "
        "unachievable one exits with code 3 and an explanation)",
    )


def execute(args: argparse.Namespace) -> int:
    from ..analysis.achievability import run_checking_budget
    from ..report.console import render_run
    from ..report.json_output import render_run_json
    from ..results.folders import refuse_unsafe_target
    from ..results.writers import write_result
    from ..scenario.extensions import parse_extension_argument

    progress = progress_printer(args.quiet)

    def out_of(name: str) -> Path:
        return args.out or Path("results") / name

    def check_out(inputs):  # a folder pathcast did not write is refused before solving, never replaced
        refuse_unsafe_target(out_of(inputs.name))
        return inputs

    checked = run_checking_budget(
        args.file,
        solver={"method": args.method, "time_limit_s": args.time_limit, "log": args.solver_log},
        progress=progress,
        inputs_hook=check_out,
        extensions=[parse_extension_argument(text) for text in args.extension],
        budget_overshoot_price=args.allow_overshoot,
    )
    result = checked.run.result
    out = out_of(result.scenario_name)
    progress(f"writing tables to {out}")
    write_result(result, out, parquet=not args.no_parquet, excel=not args.no_excel)
    if not checked.achievable:
        print(
            f"pathcast: the pathway found sheds demand; its tables are in {out}/ for inspection.",
            file=sys.stderr,
        )
        checked.raise_if_not_achievable()
    print(render_run_json(result, out) if args.json else render_run(result, out, profile=args.profile))
    return 0
