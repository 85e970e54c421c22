"""Ensemble throughput and re-solve saving (a measurement script, not a test).

Measures, on members of a scenario large enough that the solve dominates (default: the demo's budget case):

1. members per minute with 1 and with 2 single-threaded dask workers (LocalCluster started beforehand, the base
   basis already stored, so both runs do only member work);
2. the per-member overhead outside the HiGHS run: inside the worker (validation, inputs, LP arrays, hand-off,
   extraction) and outside it (planning, scheduling, transfer, storing), as a share of the solve;
3. the re-solve saving: members warm-started from the base basis (``solve_lp(..., basis=...)``: dual simplex from the
   stored basis), against the same members solved from scratch through the same path (the scenario's method).

Usage:  python benchmarks/ensemble_benchmark.py [--members 6] [--cold 2] [--scenario FILE] [--results FILE]
Writes the numbers to benchmarks/ENSEMBLE_RESULTS.md (or --results).
"""

from __future__ import annotations

import argparse
import os
import platform
import shutil
import statistics
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]

ENSEMBLE = """name: benchmark_{tag}
base: {base}
design: latin_hypercube
members: {members}
seed: 1
warm_start: {warm}
inputs:
  gas_price:
    path: technologies.supplies.gas_import.price
    as: multiplier
    distribution: uniform
    low: 0.8
    high: 1.2
  solar_capex:
    path: technologies.generators.solar_pv.capex.base
    as: multiplier
    distribution: uniform
    low: 0.8
    high: 1.2
"""


def _ensemble(folder: Path, base: Path, members: int, warm: bool, tag: str) -> Path:
    path = folder / f"{tag}.yaml"
    path.write_text(
        ENSEMBLE.format(tag=tag, base=base, members=members, warm=str(warm).lower()), encoding="utf-8"
    )
    return path


def _import_stack() -> None:
    import pathcast.ensemble.worker  # noqa: F401  (pyomo, highspy, pydantic models, pandas)


def _timed_cluster_run(
    spec_path: Path, out: Path, workers: int, basis_from: Path
) -> tuple[float, object, float]:
    from distributed import Client, LocalCluster

    from pathcast.ensemble import run_ensemble

    shutil.copytree(basis_from / "basis", out / "basis")
    started = time.perf_counter()
    cluster = LocalCluster(
        n_workers=workers, threads_per_worker=1, processes=True, dashboard_address=None, silence_logs=40
    )
    client = Client(cluster)
    client.run(_import_stack)  # imports belong to the worker's start-up, not to its first member
    startup = time.perf_counter() - started
    try:
        started = time.perf_counter()
        run = run_ensemble(spec_path, out, client=client, progress=False, outputs=False)
        wall = time.perf_counter() - started
    finally:
        client.close()
        cluster.close()
    return wall, run, startup


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--members", type=int, default=6, help="members of the throughput runs")
    parser.add_argument(
        "--cold", type=int, default=2, help="members solved from scratch for the re-solve saving"
    )
    parser.add_argument("--scenario", type=Path, default=ROOT / "scenarios" / "demo" / "budget.yaml")
    parser.add_argument("--results", type=Path, default=ROOT / "benchmarks" / "ENSEMBLE_RESULTS.md")
    args = parser.parse_args(argv)

    from pathcast.ensemble import run_ensemble

    work = Path(tempfile.mkdtemp(prefix="pathcast-ensemble-benchmark-"))
    base = args.scenario.resolve()
    warm_file = _ensemble(work, base, args.members, True, "warm")
    cold_file = _ensemble(work, base, args.members, False, "cold")
    load = os.getloadavg()

    # the base solve, from scratch (the basis every warm member starts from)
    reference = work / "reference"
    started = time.perf_counter()
    ref = run_ensemble(warm_file, reference, serial=True, limit=0, progress=False, outputs=False)
    base_s = time.perf_counter() - started
    assert ref.reference_solves == 1

    walls, runs, startups = {}, {}, {}
    for workers in (1, 2):
        walls[workers], runs[workers], startups[workers] = _timed_cluster_run(
            warm_file, work / f"w{workers}", workers, reference
        )
        assert runs[workers].solved_now == args.members, runs[workers]
    rate = {w: args.members / walls[w] * 60.0 for w in walls}
    # separate the machine from the runner: members slowed by CPUs shared with other programs take longer each,
    # while the runner's own share shows as workers left idle (busy = sum of member times / (workers x wall))
    member_mean = {w: statistics.mean(r["times"]["member_s"] for r in runs[w].records) for w in walls}
    busy = {w: sum(r["times"]["member_s"] for r in runs[w].records) / (w * walls[w]) for w in walls}

    records = runs[1].records
    solve = [r["times"]["solve_s"] for r in records]
    member = [r["times"]["member_s"] for r in records]
    inside = [m - s for m, s in zip(member, solve, strict=True)]
    outside = (walls[1] - sum(member)) / args.members
    # the first member of each worker also pays what a process does once (first solve, lazy imports)
    first = records[0]
    steady = records[1:] or records
    steady_inside = statistics.median(r["times"]["member_s"] - r["times"]["solve_s"] for r in steady)
    steady_solve = statistics.median(r["times"]["solve_s"] for r in steady)
    parts = {
        k: statistics.mean(r["times"].get(k, 0.0) for r in records)
        for k in ("validate_s", "inputs_s", "build_lp_s", "handoff_s", "extract_s")
    }
    warm_started = sum(bool(r["solver"]["warm_start"]) for r in records)
    warm_iterations = statistics.mean(r["solver"]["iterations"]["simplex"] for r in records)

    # the same first members solved from scratch (same path, no basis: the scenario's method)
    cold = run_ensemble(cold_file, work / "cold", serial=True, limit=args.cold, progress=False, outputs=False)
    cold_records = [r for r in cold.records if r["status"] == "solved"]
    cold_member = statistics.mean(r["times"]["member_s"] for r in cold_records)
    cold_solve = statistics.mean(r["times"]["solve_s"] for r in cold_records)
    same = [r for r in records if r["hash"] in {c["hash"] for c in cold_records}]
    warm_member = statistics.mean(r["times"]["member_s"] for r in same)
    warm_solve = statistics.mean(r["times"]["solve_s"] for r in same)
    gap = max(
        abs(c["headline"]["objective_million"] - w["headline"]["objective_million"])
        / abs(c["headline"]["objective_million"])
        for c in cold_records
        for w in same
        if w["hash"] == c["hash"]
    )
    cold_method = cold_records[0]["solver"]["method"]
    cold_iter = cold_records[0]["solver"]["iterations"]

    lines = [
        "# Ensemble benchmark",
        "",
        f"Measured by `python benchmarks/ensemble_benchmark.py --members {args.members} --cold {args.cold}` on "
        f"{platform.machine()} with {os.cpu_count()} cores (Python {platform.python_version()}); load average "
        f"{load[0]:.1f} / {load[1]:.1f} / {load[2]:.1f} at the start (other developers share the machine, so the "
        "numbers move by some per cent between runs).",
        "",
        f"Members: Latin hypercube (seed 1) of gas price and solar capex multipliers (0.8-1.2) on "
        f"`{base.relative_to(ROOT) if base.is_relative_to(ROOT) else base}`.",
        "",
        "| measure | value |",
        "|---|---:|",
        f"| base scenario solved from scratch (once; gives the basis) | {base_s:.1f} s |",
        f"| members per minute, 1 worker | {rate[1]:.2f} ({walls[1]:.1f} s for {args.members}) |",
        f"| members per minute, 2 workers | {rate[2]:.2f} ({walls[2]:.1f} s for {args.members}) |",
        f"| speed-up 2 vs 1 worker (goal >= 1.8) | {rate[2] / rate[1]:.2f} x |",
        f"| mean member time in the worker, 1 / 2 workers | {member_mean[1]:.2f} s / {member_mean[2]:.2f} s "
        f"(longer with 2: the two workers share the cores with each other and with other programs) |",
        f"| workers busy (sum of member times / workers x wall), 1 / 2 workers | {busy[1]:.0%} / {busy[2]:.0%} |",
        f"| LocalCluster start-up (not in the rates) | {startups[1]:.1f} s (1 worker), {startups[2]:.1f} s (2 workers) |",
        f"| mean HiGHS run per member (warm) | {statistics.mean(solve):.2f} s, {warm_iterations:.0f} simplex iterations |",
        f"| overhead inside the worker, outside the HiGHS run, mean | {statistics.mean(inside):.3f} s = "
        f"{statistics.mean(inside) / statistics.mean(solve):.1%} of the solve |",
        f"| of which once per worker (the first member's extra time over the steady state) | "
        f"{first['times']['member_s'] - first['times']['solve_s']:.2f} s |",
        f"| overhead inside the worker, steady state (median of members 2-{args.members}) | {steady_inside:.3f} s = "
        f"{steady_inside / steady_solve:.1%} of the solve |",
        f"| overhead outside the worker (plan, schedule, transfer, store) | {outside:.3f} s = "
        f"{outside / statistics.mean(solve):.1%} of the solve |",
        f"| total per-member overhead, mean (goal <= 5 % of the solve) | "
        f"{(statistics.mean(inside) + outside) / statistics.mean(solve):.1%} |",
        f"| total per-member overhead, steady state | {(steady_inside + outside) / steady_solve:.1%} |",
        f"| member solved from scratch ({cold_method}; {cold_iter['ipm']} IPM + {cold_iter['crossover']} crossover + "
        f"{cold_iter['simplex']} simplex iterations) | {cold_member:.1f} s (HiGHS {cold_solve:.1f} s), mean of {len(cold_records)} |",
        f"| same member warm-started from the base basis ({warm_started} of {len(records)} members started from it) "
        f"| {warm_member:.1f} s (HiGHS "
        f"{warm_solve:.1f} s) |",
        f"| re-solve saving per member | {1 - warm_member / cold_member:.0%} of the member time "
        f"({cold_member / warm_member:.1f} x faster); objectives agree to {gap:.1e} (relative) |",
        "",
        "Inside-worker overhead by stage (mean per member): "
        + ", ".join(f"{k[:-2]} {v:.3f} s" for k, v in parts.items())
        + " (handoff = highs_lp, options, passModel and the base basis, in solve_lp).",
        "",
        "Per member (1-worker run): "
        + "; ".join(
            f"{r['times']['solve_s']:.1f} s HiGHS + {r['times']['member_s'] - r['times']['solve_s']:.2f} s other"
            for r in records
        )
        + ".",
        "",
        "The throughput runs start each member from the stored base basis, so they exclude the one base solve an "
        "ensemble makes first; for an ensemble of M members the wall time is about base + M / rate.",
        "",
    ]
    lines.insert(3, f"Load average at the end: {' / '.join(f'{v:.1f}' for v in os.getloadavg())}.")
    lines.insert(4, "")
    args.results.write_text("\n".join(lines), encoding="utf-8")
    print("\n".join(lines))
    shutil.rmtree(work, ignore_errors=True)
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
