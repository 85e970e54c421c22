"""The demo budget case end to end, as a user runs it: ``pathcast run scenarios/demo/budget.yaml --profile``.

Each run is a fresh process of the command line (imports, load, LP, hand-off, solve, results, files, figures, memo),
timed from outside: wall time, CPU time and peak memory of the child (``ru_maxrss`` of RUSAGE_CHILDREN, measured
through a one-child wrapper so that each run has its own peak). Stage times come from the run's manifest.json.
Writes a JSON file for ``run_benchmarks.py --report ... --demo FILE`` (a script, not a test).

    python benchmarks/demo_case.py --runs 3 --json benchmarks/out/demo.json
"""

from __future__ import annotations

import argparse
import json
import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
SCENARIO = ROOT / "scenarios" / "demo" / "budget.yaml"

# the child measures its own child: wall, CPU and peak memory of one `pathcast run` process
_WRAPPER = """
import json, resource, subprocess, sys, time
started = time.perf_counter()
done = subprocess.run(sys.argv[1:], capture_output=True, text=True)
wall = time.perf_counter() - started
usage = resource.getrusage(resource.RUSAGE_CHILDREN)
print(json.dumps({"code": done.returncode, "wall_s": wall, "cpu_s": usage.ru_utime + usage.ru_stime,
                  "peak_rss_mb": usage.ru_maxrss / 1024.0, "stdout": done.stdout, "stderr": done.stderr[-2000:]}))
"""


def one_run(scenario: Path, out: Path) -> dict:
    pathcast = Path(sys.executable).parent / "pathcast"
    cmd = [
        sys.executable,
        "-c",
        _WRAPPER,
        str(pathcast),
        "run",
        str(scenario),
        "--profile",
        "--out",
        str(out),
    ]
    done = subprocess.run(cmd, capture_output=True, text=True, check=True)
    record = json.loads(done.stdout.strip().splitlines()[-1])
    if record["code"] != 0:
        raise RuntimeError(f"pathcast run failed ({record['code']}):\n{record['stderr']}")
    manifest = json.loads((out / "manifest.json").read_text())
    summary = json.loads((out / "summary.json").read_text())
    return {
        "wall_s": record["wall_s"],
        "cpu_s": record["cpu_s"],
        "peak_rss_mb": record["peak_rss_mb"],
        "stages": manifest["stage_times_s"],
        "lp": {k: manifest["lp"][k] for k in ("rows", "columns", "nonzeros")},
        "iterations": manifest["solver"]["iterations"],
        "objective_million": manifest["solver"]["objective_million"],
        "summary": {k: v for k, v in summary.items() if isinstance(v, int | float)},
        "profile": record["stdout"],
        "load_average_after": list(os.getloadavg()),
    }


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--runs", type=int, default=3, help="runs; the median is reported (default 3)")
    parser.add_argument("--scenario", type=Path, default=SCENARIO)
    parser.add_argument("--json", type=Path, default=ROOT / "benchmarks" / "out" / "demo.json")
    parser.add_argument("--beside", default="", help="what else ran on the machine (for the report)")
    args = parser.parse_args(argv)
    runs = []
    with tempfile.TemporaryDirectory(prefix="pathcast-demo-") as work:
        for r in range(args.runs):
            runs.append(one_run(args.scenario, Path(work) / f"run{r}"))
            print(
                f"[{time.strftime('%H:%M:%S')}] run {r + 1}: {runs[-1]['wall_s']:.1f} s wall, "
                f"stages {runs[-1]['stages']['total_s']:.1f} s, peak {runs[-1]['peak_rss_mb']:.0f} MB",
                file=sys.stderr,
                flush=True,
            )
    median = {
        "wall_s": statistics.median(r["wall_s"] for r in runs),
        "cpu_s": statistics.median(r["cpu_s"] for r in runs),
        "peak_rss_mb": statistics.median(r["peak_rss_mb"] for r in runs),
        "stages": {k: statistics.median(r["stages"][k] for r in runs) for k in runs[0]["stages"]},
    }
    args.json.parent.mkdir(parents=True, exist_ok=True)
    args.json.write_text(
        json.dumps(
            {
                "command": f"pathcast run {args.scenario.relative_to(ROOT) if args.scenario.is_relative_to(ROOT) else args.scenario} --profile",
                "runs": runs,
                "median": median,
                "beside": args.beside,
                "cores": os.cpu_count(),
            },
            indent=1,
        )
    )
    print(f"median {median['wall_s']:.1f} s wall, stages {median['stages']['total_s']:.1f} s; {args.json}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
