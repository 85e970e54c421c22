"""Run an ensemble of variants of a scenario (sensitivity and uncertainty): sample the inputs named in the ensemble
file, solve every member (in parallel on a dask.distributed cluster unless --serial), store each member as it
finishes (a re-run resumes), and write tables, percentiles and fan charts to results/<ensemble name>/."""

from __future__ import annotations

import argparse
import math
import sys
from pathlib import Path

from ..errors import EXIT_INFEASIBLE, EXIT_SOLVER_FAILURE


def add_arguments(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("file", help="ensemble YAML file")
    parser.add_argument(
        "--workers",
        type=int,
        default=None,
        help="worker processes of the local cluster (default: CPU cores, at most one per member)",
    )
    parser.add_argument(
        "--scheduler",
        default=None,
        metavar="ADDRESS",
        help="connect to this running dask scheduler (e.g. tcp://10.0.0.5:8786) instead of a local cluster",
    )
    parser.add_argument(
        "--out", type=Path, default=None, help="ensemble folder (default: results/<ensemble name>)"
    )
    parser.add_argument(
        "--serial", action="store_true", help="solve the members one after another in this process"
    )
    parser.add_argument(
        "--limit", type=int, default=None, metavar="N", help="solve at most N of the members still to do"
    )
    parser.add_argument(
        "--retry-failed",
        action="store_true",
        help="solve again the members stored as failed (invalid or infeasible ones are kept otherwise)",
    )
    parser.add_argument("--no-figures", action="store_true", help="skip the PNG figures")
    parser.add_argument("--quiet", action="store_true", help="no progress bar")


def execute(args: argparse.Namespace) -> int:
    from ..ensemble import run_ensemble

    if args.workers is not None and args.workers < 1:
        from ..errors import ScenarioError

        raise ScenarioError(
            f"--workers: got {args.workers!r}; expected a whole number of worker processes >= 1."
        )
    run = run_ensemble(
        args.file,
        args.out,
        workers=args.workers,
        scheduler=args.scheduler,
        serial=args.serial,
        limit=args.limit,
        retry_failed=args.retry_failed,
        progress=not args.quiet,
        figures=not args.no_figures,
    )
    from ..ensemble.summary import summarise_ensemble

    summary = summarise_ensemble(run.out)
    s = summary.stats
    print(
        f"Ensemble {run.spec.name}: {s['members']} members ({run.unique} distinct scenarios), {s['solved']} solved, "
        f"{s['failed']} failed, {s['pending']} not run; this run solved {run.solved_now} and skipped "
        f"{run.skipped} in {run.wall_s:.1f} s ({run.mode}, {run.workers} worker{'s' if run.workers != 1 else ''})."
    )
    probability = s.get("probability_within_budget")
    if probability is not None and not math.isnan(probability):
        print(f"Probability of staying within the carbon budget: {probability:.0%}.")
    failed = summary.members[summary.members["status"] == "failed"]
    for row in failed.head(5).itertuples():
        print(f"  member {row.member} ({row.role}): {row.error_type}: {row.error_message}", file=sys.stderr)
    if len(failed) > 5:
        print(
            f"  ... and {len(failed) - 5} more failed members (see {run.out / 'tables' / 'members.csv'})",
            file=sys.stderr,
        )
    print(f"Results written to {run.out}/")
    if s["solved"] == 0 and s["failed"]:
        return EXIT_INFEASIBLE if s["infeasible"] == s["failed"] else EXIT_SOLVER_FAILURE
    return 0
