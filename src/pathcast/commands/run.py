"""Solve a scenario: least-cost yearly build-out of power and fuel supply, written to results/<scenario>/."""

from __future__ import annotations

import argparse
import sys
from dataclasses import replace
from pathlib import Path
from typing import TYPE_CHECKING

from ..errors import InfeasibleError, ScenarioError
from ..solver_methods import METHODS
from . import progress_printer

if TYPE_CHECKING:
    from ..pipeline import Run


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
    progress = progress_printer(args.quiet)

    from ..analysis.achievability import diagnose_budget, explain
    from ..pipeline import run_scenario
    from ..report.console import render_profile, render_summary
    from ..results.folders import refuse_unsafe_target
    from ..scenario.extensions import parse_extension_argument
    from ..results.writers import write_result

    solver = {"method": args.method, "time_limit_s": args.time_limit, "log": args.solver_log}
    overshoot_price = getattr(args, "allow_overshoot", None)
    captured = {}

    def hook(inputs):
        # the output folder is checked before solving: a folder pathcast did not write is refused, never replaced
        refuse_unsafe_target(args.out or Path("results") / inputs.name)
        if overshoot_price is not None:
            if inputs.budget_mt is None:
                raise ScenarioError(
                    f"{args.file}: policy.carbon_budget: got none; expected a carbon budget for "
                    "--allow-overshoot to relax.",
                    file=str(args.file),
                    field="policy.carbon_budget",
                )
            if overshoot_price < 0:
                raise ScenarioError(
                    f"--allow-overshoot {overshoot_price!r}: expected a price >= 0 [currency/tCO2]."
                )
            inputs = replace(inputs, budget_overshoot_price=overshoot_price)
        captured["inputs"] = inputs
        return inputs

    try:
        run = run_scenario(
            args.file,
            progress=progress,
            solver=solver,
            inputs_hook=hook,
            extensions=[parse_extension_argument(text) for text in args.extension],
        )
    except InfeasibleError:
        inputs = captured.get("inputs")
        if inputs is None or inputs.budget_mt is None or overshoot_price is not None:
            raise
        diagnosis = diagnose_budget(inputs, budget_infeasible=True, solver=solver, progress=progress)
        if diagnosis.achievable:  # pragma: no cover - HiGHS said infeasible, so this cannot be
            raise
        raise InfeasibleError(explain(diagnosis), diagnosis=diagnosis.as_dict()) from None
    diagnosis = None
    if overshoot_price is None:
        diagnosis = diagnose_budget(captured["inputs"], budget_run=run, solver=solver, progress=progress)
    else:
        run = _with_overshoot(run, overshoot_price)
    out = args.out or Path("results") / run.result.scenario_name
    progress(f"writing tables to {out}")
    write_result(run.result, out, parquet=not args.no_parquet, excel=not args.no_excel)
    if diagnosis is not None and not diagnosis.achievable:
        print(
            f"pathcast: the pathway found sheds demand; its tables are in {out}/ for inspection.",
            file=sys.stderr,
        )
        raise InfeasibleError(explain(diagnosis), diagnosis=diagnosis.as_dict())
    if args.json:
        import json

        print(
            json.dumps(
                {
                    "result_folder": str(out),
                    "summary": dict(run.result.summary),
                    "stage_times_s": run.result.manifest.get("stage_times_s"),
                },
                indent=2,
                default=str,
            )
        )
        return 0
    print(render_summary(run.result))
    if overshoot_price is not None:
        s = run.result.summary
        print(
            f"  budget overshoot {s['budget_overshoot_mtco2']:,.3f} MtCO2 at {overshoot_price:,.2f} "
            f"{s.get('currency', '')}/tCO2 (paid in {s['budget_last_year']}: {s['budget_overshoot_cost_million']:,.1f} "
            f"million {s.get('currency', '')})"
        )
    if args.profile:
        print(render_profile(run.result))
    print(f"Results written to {out}/")
    return 0


def _with_overshoot(run: Run, price: float) -> Run:
    """The run with its budget overshoot [MtCO2] and its cost [million currency, undiscounted] in the summary."""
    from ..results.run_result import RunResult

    block = run.model.lp.variables["budget_overshoot"]
    overshoot = max(0.0, float(run.solution.x[block.all()].sum()))
    r = run.result
    summary = dict(
        r.summary,
        budget_overshoot_mtco2=overshoot,
        budget_overshoot_price_per_tco2=price,
        budget_overshoot_cost_million=overshoot * price,
    )
    result = RunResult.create(r.scenario_name, dict(r.tables), summary, dict(r.manifest), dict(r.metadata))
    return replace(run, result=result)
