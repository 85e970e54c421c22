"""Required and realised rates of CO2 reduction under a carbon budget.

For each start year: what is left of the budget after the pathway's own emissions before that year, and the constant
exponential rate of decline, or the year of a linear decline to zero, that would use exactly that remainder. Also the
pathway's own year-on-year and per-decade reduction rates, the year it exhausts the budget and the warming its
cumulative CO2 implies (TCRE, IPCC AR6 WG1 SPM D.1.1). FILE is a scenario (solved first); RESULTDIR is a folder
written by 'pathcast run'.
"""

from __future__ import annotations

import argparse

from . import progress_printer

# computed by pathcast.results.rates_report.rates_report, rendered by pathcast.report.console.render_rates and
# pathcast.report.json_output.render_rates_json

__all__ = ["add_arguments", "execute"]


def add_arguments(parser: argparse.ArgumentParser) -> None:
    parser.add_argument(
        "source", metavar="FILE|RESULTDIR", help="scenario YAML file, or a result folder of 'pathcast run'"
    )
    parser.add_argument(
        "--from", dest="from_year", type=int, default=None, help="first start year (default: base year)"
    )
    parser.add_argument(
        "--to", dest="to_year", type=int, default=None, help="last start year (default: budget's last year)"
    )
    parser.add_argument("--step", type=int, default=5, help="years between start years (default 5)")
    parser.add_argument(
        "--budget",
        type=float,
        default=None,
        metavar="MT",
        help="carbon budget [MtCO2] to use instead of the scenario's (needed when it has none)",
    )
    parser.add_argument("--json", action="store_true", help="print JSON instead of a text table")
    parser.add_argument("--quiet", action="store_true", help="no progress messages")


def execute(args: argparse.Namespace) -> int:
    from ..report.console import render_rates
    from ..report.json_output import render_rates_json
    from ..results.rates_report import rates_report

    report = rates_report(
        args.source,
        from_year=args.from_year,
        to_year=args.to_year,
        step=args.step,
        budget_mt=args.budget,
        progress=progress_printer(args.quiet or args.json),
    )
    print(render_rates_json(report) if args.json else render_rates(report))
    return 0
