"""Merge the national-size runs into one result row (a script, not a test).

The national benchmark was run in pieces, so that no more than two single-threaded solves shared the 2 cores:
a first ``--concurrent --at-most 2`` run (pathcast, HiGHS defaults, bare solver), HiGHS defaults on the
per-generator LP (the ``baseline`` worker of ``--against-per-generator``), and a second run of pathcast and the bare
solver one after the other (``--concurrent --at-most 1 --no-defaults``). The merged row takes its stage times and
its end-to-end ratio from the second run. Its speed-ups divide the defaults solves by the first run's bare solve,
which ran beside the same defaults solve. The first run's pair is kept under ``first_pair``.

    python benchmarks/merge_national.py FIRST.json SECOND.json BASELINE_WORKER.json OUT.json
"""

from __future__ import annotations

import json
import sys
from pathlib import Path

from run_benchmarks import _baseline_fields

__all__ = ["merge"]


def merge(first: dict, second: dict, baseline: dict) -> dict:
    r1, r2 = first["rows"][0], second["rows"][0]
    row = dict(r2)
    for key in (
        "defaults_solve_s",
        "defaults_status",
        "defaults_solve_cpu_s",
        "defaults_objective_rel_diff",
        "defaults_duals",
        "speedup_is_lower_bound",
    ):
        row[key] = r1[key]
    row["speedup_vs_defaults"] = r1["defaults_solve_s"] / r1["bare_solve_s"]
    row["speedup_vs_defaults_cpu"] = r1["defaults_solve_cpu_s"] / r1["bare_solve_cpu_s"]
    row["speedup_reference_bare_solve_s"] = r1["bare_solve_s"]
    row.update(
        _baseline_fields(
            [baseline],
            {"rows": baseline["rows"]},
            r1["bare_solve_s"],
            r1["bare_solve_cpu_s"],
            r1["bare_objective"],
        )
    )
    row["first_pair"] = {
        k: r1[k] for k in ("pathcast_total_s", "bare_total_s", "ratio", "pathcast_cpu_s", "bare_solve_cpu_s")
    }
    return {"cores": second["cores"], "versions": second["versions"], "rows": [row]}


def main(argv: list[str]) -> int:
    first, second, baseline, out = (Path(a) for a in argv)
    worker = json.loads(baseline.read_text().strip().splitlines()[-1])
    merged = merge(json.loads(first.read_text()), json.loads(second.read_text()), worker)
    out.write_text(json.dumps(merged, indent=1))
    return 0


if __name__ == "__main__":
    raise SystemExit(main(sys.argv[1:]))
