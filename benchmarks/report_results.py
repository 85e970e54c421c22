"""Write benchmarks/RESULTS.md from the JSON files of run_benchmarks.py (``--report``)."""

from __future__ import annotations

import json
import math
from pathlib import Path

__all__ = ["write_report", "NOTES"]

# Narrative kept beside the tables; edited by hand after a run (the tables are regenerated).
NOTES_FILE = Path(__file__).resolve().parent / "results_notes.md"
NOTES = NOTES_FILE.read_text() if NOTES_FILE.exists() else ""


def _size_key(size: str) -> tuple[int, int, int]:
    return tuple(int(p) for p in size.split("x"))


def _fit(rows: list[dict]) -> dict | None:
    import numpy as np

    techs = max(_size_key(r["size"])[2] for r in rows)
    pts = [
        (
            _size_key(r["size"])[0] * _size_key(r["size"])[1],
            r["times"]["build_lp_s"] + r["times"]["build_pyomo_s"],
            r["times"]["build_lp_s"]
            + r["times"]["build_pyomo_s"]
            + r["times"]["handoff_s"]
            + r["times"]["extract_s"],
        )
        for r in rows
        if _size_key(r["size"])[2] == techs
    ]
    if len(pts) < 2:
        return None
    x = np.log([p[0] for p in pts])
    return {
        "technologies": techs,
        "points": len(pts),
        "build": float(np.polyfit(x, np.log([p[1] for p in pts]), 1)[0]),
        "overhead": float(np.polyfit(x, np.log([p[2] for p in pts]), 1)[0]),
    }


def _time_cell(value: float, stopped: bool) -> str:
    """A solve time [s]; '> T (time limit)' for a solve HiGHS stopped before the optimum."""
    return f"> {value:.0f} (time limit)" if stopped else f"{value:.1f}"


def _ratio_cell(value: float | None, stopped: bool) -> str:
    """A speed-up; a lower bound ('>=') where the slower solve was stopped by its time limit."""
    return "-" if value is None else (f">= {value:.2f}" if stopped else f"{value:.2f}")


def _defaults_cell(row: dict) -> str:
    return _time_cell(row.get("defaults_solve_s", math.nan), bool(row.get("speedup_is_lower_bound")))


def _speedup_cell(row: dict) -> str:
    return _ratio_cell(row.get("speedup_vs_defaults", math.nan), bool(row.get("speedup_is_lower_bound")))


def write_report(files: list[Path], target: Path, demo: Path | None = None) -> None:
    by_size: dict[str, dict] = {}
    build_by_size: dict[str, dict] = {}
    meta = {}
    for f in files:
        data = json.loads(f.read_text())
        meta = {"cores": data["cores"], "versions": data["versions"]}
        for row in data.get("rows", []):
            earlier = by_size.get(row["size"])
            if earlier is not None and earlier.get("methods") and not row.get("methods"):
                row = dict(row, methods=earlier["methods"])  # keep a method comparison made in another run
            by_size[row["size"]] = row
        for row in data.get("build_rows", []):
            build_by_size[row["size"]] = row
    rows = sorted(by_size.values(), key=lambda r: _size_key(r["size"]))
    build_rows = sorted(build_by_size.values(), key=lambda r: _size_key(r["size"]))
    fit = _fit(build_rows) if len(build_rows) >= 2 else (_fit(rows) if rows else None)
    out = [
        "# Benchmark results",
        "",
        "Produced by `benchmarks/run_benchmarks.py` (synthetic scenarios from `benchmarks/scenario_generator.py`) and "
        "`python benchmarks/run_benchmarks.py --report <json files>`. Every number is from a run on this machine; "
        "with 2 cores, what runs on the other core moves a solve's time by up to 15 per cent (the same LP and "
        "options: 410-476 s at national size), so compare the columns of one row, which were measured side by "
        "side, alternately (see How these numbers were taken).",
        "",
        f"Machine: {meta.get('cores')} cores (CPU only). Versions: "
        + ", ".join(f"{k} {v}" for k, v in meta.get("versions", {}).items())
        + ".",
        "",
        "## Pathcast end to end against the bare solver",
        "",
        "Times in seconds, medians over *n* runs (one run where a run takes over a minute). *bare* = a fresh "
        "highspy reads pathcast's MPS file and solves it with the same options (read + solve). *overhead* = "
        "build LP + build Pyomo + hand-off + extraction. *defaults* = HiGHS with no options set on the same MPS "
        "file; *speed-up* = defaults solve / bare solve with pathcast's options.",
        "",
        "| size (years x hours x techs) | rows | columns | nonzeros | n | load | build LP | build Pyomo | hand-off "
        "| solve | extract | pathcast total | bare read | bare solve | ratio total/bare | overhead [us/row] "
        "| peak MB pathcast / bare | memory ratio | defaults solve | speed-up vs defaults | objective rel. diff |",
        "|" + "---|" * 21,
    ]
    for r in rows:
        t = r["times"]
        out.append(
            f"| {r['size']} | {r['rows']:,} | {r['columns']:,} | {r['nonzeros']:,} | {r['runs']} | {t['load_s']:.2f} "
            f"| {t['build_lp_s']:.2f} | {t['build_pyomo_s']:.2f} | {t['handoff_s']:.2f} | {t['solve_s']:.1f} "
            f"| {t['extract_s']:.2f} | {t['total_s']:.1f} | {r['bare_read_s']:.2f} | {r['bare_solve_s']:.1f} "
            f"| {r['ratio']:.3f} | {r['overhead_us_per_row']:.1f} | {r['peak_rss_mb']:.0f} / {r['bare_peak_rss_mb']:.0f} "
            f"| {r['memory_ratio']:.2f} | {_defaults_cell(r)} "
            f"| {_speedup_cell(r)} | {r['objective_rel_diff']:.1e} |"
        )
    for r in rows:
        ref = r.get("speedup_reference_bare_solve_s")
        if ref:
            later = [f"{r['defaults_solve_s'] / r['bare_solve_s']:.2f}x"]
            if "baseline_defaults_solve_s" in r:
                later.append(f"{r['baseline_defaults_solve_s'] / r['bare_solve_s']:.2f}x")
            out += [
                "",
                f"{r['size']}: the times of this row are from a run of pathcast and the bare solver one "
                f"after the other; the defaults were solved in an earlier run, and the speed-ups divide by the "
                f"bare solve of that run ({ref:.1f} s). Against this row's {r['bare_solve_s']:.1f} s they are "
                + " and ".join(later)
                + ".",
            ]
            first = r.get("first_pair")
            if first:
                out.append(
                    f"The earlier run's pair: pathcast {first['pathcast_total_s']:.1f} s, bare read + solve "
                    f"{first['bare_total_s']:.1f} s, ratio {first['ratio']:.3f}."
                )
    out.append("")
    strategy_rows = [r for r in rows if "baseline_defaults_solve_s" in r]
    if strategy_rows:
        out += [
            "## Pathcast's strategy against HiGHS's defaults",
            "",
            "The strategy is the formulation (pooled curtailment) and the options (`auto`). *per-generator LP* = "
            "the same scenario with `solver.pooled_curtailment: false` (one output variable and limit row per "
            "generator and hour), solved by HiGHS with no options set. Solve times [s] of fresh highspy "
            "processes on MPS files written by pathcast; CPU = process CPU time of the solve. '>' marks a solve "
            "stopped by its time limit (the speed-up is then a lower bound).",
            "",
            "| size | rows pooled / per-generator | pathcast's options, pooled LP | defaults, pooled LP "
            "| defaults, per-generator LP | speed-up, options alone | speed-up, formulation + options "
            "| same, CPU time | objective rel. diff |",
            "|" + "---|" * 9,
        ]
        for r in strategy_rows:
            stopped = bool(r.get("baseline_is_lower_bound"))
            out.append(
                f"| {r['size']} | {r['rows']:,} / {r['baseline_rows']:,} "
                f"| {r.get('speedup_reference_bare_solve_s') or r['bare_solve_s']:.1f} "
                f"| {_defaults_cell(r)} | {_time_cell(r['baseline_defaults_solve_s'], stopped)} "
                f"| {_speedup_cell(r)} | {_ratio_cell(r['speedup_vs_baseline'], stopped)} "
                f"| {_ratio_cell(r.get('speedup_vs_baseline_cpu'), stopped)} "
                f"| {r['baseline_objective_rel_diff']:.1e} |"
            )
        out.append("")
    if build_rows:
        out += [
            "## Modelling overhead and memory by size, without the solve",
            "",
            "`--build-only`: every pathcast stage but the solve (extraction from an all-zero solution), median of "
            "*n* runs, alternating with a fresh highspy reading the same LP from MPS (no solve). Peak memory is "
            "VmHWM of each process.",
            "",
            "| size | rows | columns | nonzeros | n | load | build LP | build Pyomo | hand-off | extract "
            "| overhead [s] | overhead [us/row] | same, CPU time [us/row] | peak MB pathcast | peak MB bare read "
            "| bare read [s] |",
            "|" + "---|" * 16,
        ]
        for r in build_rows:
            t = r["times"]
            out.append(
                f"| {r['size']} | {r['rows']:,} | {r['columns']:,} | {r['nonzeros']:,} | {r['runs']} "
                f"| {t['load_s']:.2f} | {t['build_lp_s']:.2f} | {t['build_pyomo_s']:.2f} | {t['handoff_s']:.2f} "
                f"| {t['extract_s']:.2f} | {r['overhead_s']:.2f} | {r['overhead_us_per_row']:.1f} "
                f"| {r.get('cpu_overhead_us_per_row', math.nan):.1f} "
                f"| {r['peak_rss_mb']:.0f} | {r['bare_read_peak_rss_mb']:.0f} | {r['bare_read_s']:.2f} |"
            )
        out.append("")
    if fit:
        out.append(
            f"Build time (array LP + Pyomo) grows as (years x hours)^{fit['build']:.2f}, the whole modelling "
            f"overhead as (years x hours)^{fit['overhead']:.2f} (least-squares fit of the logs over "
            f"{fit['points']} sizes with {fit['technologies']} technologies)."
        )
        out.append("")
    out += [
        "## Coefficient ranges (as HiGHS prints them, pathcast's options)",
        "",
        "| size | matrix | cost | bound | rhs |",
        "|---|---|---|---|---|",
    ]
    for r in rows:
        g = r.get("ranges_highs_log") or {}
        cells = [
            f"[{g[k][0]:.0e}, {g[k][1]:.0e}]" if k in g else "-" for k in ("matrix", "cost", "bound", "rhs")
        ]
        out.append(f"| {r['size']} | " + " | ".join(cells) + " |")
    out.append("")
    method_rows = [r for r in rows if r.get("methods")]
    if method_rows:
        out += [
            "## Solver methods on the same MPS file (one run each)",
            "",
            "Duals compared with pathcast's own vertex solution: carbon = relative difference of the carbon-budget "
            "dual; prices = largest difference of an hourly balance dual relative to the largest one.",
            "",
            "| size | method | options | status | solve [s] | IPM / crossover / simplex iterations | duals valid "
            "| carbon dual diff | price diff |",
            "|---|---|---|---|---|---|---|---|---|",
        ]
        for r in method_rows:
            for name, m in r["methods"].items():
                it = m["iterations"]
                fmt = lambda v: "-" if v is None else f"{v:.1e}"  # noqa: E731
                out.append(
                    f"| {r['size']} | {name} | `{json.dumps(m['options'])}` | {m['status']} | {m['solve_s']:.1f} "
                    f"| {it['ipm']} / {it['crossover']} / {it['simplex']} | {m.get('dual_valid')} "
                    f"| {fmt(m.get('carbon_dual_rel_diff'))} | {fmt(m.get('price_max_rel_diff'))} |"
                )
        out.append("")
    if demo and demo.exists():
        d = json.loads(demo.read_text())
        out += ["## Demo budget case", "", d.get("text", ""), ""]
    if NOTES:
        out += [NOTES.strip(), ""]
    target.write_text("\n".join(out))
