"""Run an ensemble of variants of a scenario (sensitivity and uncertainty): sample the inputs named in the ensemble
file, solve every member (in parallel on a dask.distributed cluster unless --serial), store each member as it
finishes (a re-run resumes), and write tables, percentiles and fan charts to results/<ensemble name>/.

With --scheduler tcp://host:port the address is checked first: a malformed one (no tcp:// or tls:// scheme, no
port, a port outside 1-65535) is refused at once (exit 2); a scheduler that does not answer as a dask scheduler
within --connect-timeout seconds (default 10) is an error naming the address (exit 4), and nothing is written to the
output folder before the connection is made."""

from __future__ import annotations

import argparse
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
        help="connect to this running dask scheduler (tcp://host:port or tls://host:port, e.g. "
        "tcp://10.0.0.5:8786) instead of a local cluster",
    )
    parser.add_argument(
        "--connect-timeout",
        type=float,
        default=10.0,  # pathcast.ensemble.scheduler.DEFAULT_CONNECT_TIMEOUT_S (not imported: keeps --help light)
        metavar="S",
        help="seconds the --scheduler address has to answer as a dask scheduler before the run is refused "
        "(default 10)",
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
    from ..ensemble.scheduler import parse_connect_timeout, parse_scheduler_address

    if args.scheduler is not None:  # a malformed address is refused before the ensemble file is even read
        parse_scheduler_address(args.scheduler)
    parse_connect_timeout(args.connect_timeout)
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
        connect_timeout=args.connect_timeout,
        serial=args.serial,
        limit=args.limit,
        retry_failed=args.retry_failed,
        progress=not args.quiet,
        figures=not args.no_figures,
    )
    from ..ensemble.summary import summarise_ensemble
    from ..report.console import render_ensemble

    summary = summarise_ensemble(run.out)
    out, err = render_ensemble(run, summary)
    print(out)
    if err:
        print(err, file=sys.stderr)
    s = summary.stats
    if s["solved"] == 0 and s["failed"]:
        return EXIT_INFEASIBLE if s["infeasible"] == s["failed"] else EXIT_SOLVER_FAILURE
    return 0
