"""Write benchmarks/RESULTS.md from the JSON files of run_benchmarks.py (``--report``), with the old solve path's
numbers (benchmarks/before_pyomo_route.json, or ``--before``) as labelled "before" columns."""

from __future__ import annotations

import json
import math
from pathlib import Path

__all__ = ["write_report", "NOTES", "BEFORE_FILE"]

# Narrative kept beside the tables; edited by hand after a run (the tables are regenerated).
NOTES_FILE = Path(__file__).resolve().parent / "results_notes.md"
NOTES = NOTES_FILE.read_text() if NOTES_FILE.exists() else ""
# the old route's numbers (array LP -> flat Pyomo model -> standard-form hand-off), parsed from RESULTS.md before 004e698
BEFORE_FILE = Path(__file__).resolve().parent / "before_pyomo_route.json"


def _size_key(size: str) -> tuple[int, int, int]:
    return tuple(int(p) for p in size.split("x"))


def _fit(rows: list[dict], key: str = "times") -> dict | None:
    """Least-squares slopes of log(array LP time) and log(whole overhead) against log(years x hours), over the sizes
    with the most technologies; ``key`` "cpu_times" fits the CPU times (None where a row has none)."""
    import numpy as np

    techs = max(_size_key(r["size"])[2] for r in rows)
    chosen = [r for r in rows if _size_key(r["size"])[2] == techs]
    if len(chosen) < 2 or any(key not in r for r in chosen):
        return None
    x = np.log([_size_key(r["size"])[0] * _size_key(r["size"])[1] for r in chosen])
    build = [r[key]["build_lp_s"] for r in chosen]
    overhead = [r[key]["build_lp_s"] + r[key]["handoff_s"] + r[key]["extract_s"] for r in chosen]
    return {
        "technologies": techs,
        "points": len(chosen),
        "build": float(np.polyfit(x, np.log(build), 1)[0]),
        "overhead": float(np.polyfit(x, np.log(overhead), 1)[0]),
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


def _f(value: float | None, fmt: str) -> str:
    return "-" if value is None or (isinstance(value, float) and math.isnan(value)) else format(value, fmt)


def _load(files: list[Path]) -> tuple[dict, dict, dict]:
    """Rows by size (end to end and build-only) merged over ``files`` (later files win), and the last file's meta."""
    by_size: dict[str, dict] = {}
    build_by_size: dict[str, dict] = {}
    meta: dict = {}
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
    return by_size, build_by_size, meta


def write_report(
    files: list[Path], target: Path, demo: Path | None = None, before: Path | None = BEFORE_FILE
) -> None:
    by_size, build_by_size, meta = _load(files)
    old_by_size, old_build_by_size = {}, {}
    if before is not None and before.exists():
        old_by_size, old_build_by_size, _ = _load([before])
    rows = sorted(by_size.values(), key=lambda r: _size_key(r["size"]))
    build_rows = sorted(build_by_size.values(), key=lambda r: _size_key(r["size"]))
    fit = _fit(build_rows) if len(build_rows) >= 2 else (_fit(rows) if len(rows) >= 2 else None)
    out = [
        "# Benchmark results",
        "",
        "Produced by `benchmarks/run_benchmarks.py` (synthetic scenarios from `benchmarks/scenario_generator.py`), "
        "`benchmarks/demo_case.py` and `python benchmarks/run_benchmarks.py --report <json files> --demo <json>`. "
        "Every number is from a run on this machine. With 2 cores, what else runs moves a solve's time: by up to 15 per "
        "cent on a quiet machine (the same LP and options: 410-476 s at national size), by up to 3x when other "
        "sessions load both cores. Compare the columns of one row, which were measured side by side, "
        "alternately, and prefer CPU times where both are given (see How these numbers were taken).",
        "",
        "The solve path is the one of commit 004e698: the array LP goes to HiGHS directly (`highs_lp`, `solve_lp`); "
        "Pyomo is imported only for users' extensions. Columns marked *before* are the old path (array LP -> flat "
        "Pyomo model -> standard-form hand-off), copied from this file as it stood before that commit "
        "(`benchmarks/before_pyomo_route.json`); they were measured in other sessions, on the same machine and the "
        "same LPs (equal rows, columns and nonzeros).",
        "",
        f"Machine: {meta.get('cores')} cores (CPU only). Versions: "
        + ", ".join(f"{k} {v}" for k, v in meta.get("versions", {}).items())
        + ".",
        "",
    ]
    if rows:
        out += [
            "## Pathcast end to end against the bare solver",
            "",
            "Times in seconds, medians over *n* runs (one run where a run takes over a minute). *bare* = a fresh "
            "highspy reads pathcast's MPS file and solves it with the same options (read + solve). Both end in "
            "the same HiGHS model, so *overhead* = build LP + hand-off (`highs_lp`, options, `passModel`) + "
            "extraction, per row of the LP.",
            "",
            "| size (years x hours x techs) | rows | columns | nonzeros | n | load | build LP | hand-off | solve "
            "| extract | pathcast total | bare read | bare solve | ratio total/bare | before: ratio | overhead [s] "
            "| overhead [us/row] | before: overhead [us/row] | peak MB pathcast / bare | before: peak MB "
            "| memory ratio | objective rel. diff |",
            "|" + "---|" * 22,
        ]
        for r in rows:
            t, old = r["times"], old_by_size.get(r["size"], {})
            out.append(
                f"| {r['size']} | {r['rows']:,} | {r['columns']:,} | {r['nonzeros']:,} | {r['runs']} "
                f"| {t['load_s']:.2f} | {t['build_lp_s']:.2f} | {t['handoff_s']:.2f} | {t['solve_s']:.1f} "
                f"| {t['extract_s']:.2f} | {t['total_s']:.1f} | {r['bare_read_s']:.2f} | {r['bare_solve_s']:.1f} "
                f"| {r['ratio']:.3f} | {_f(old.get('ratio'), '.3f')} | {r['overhead_s']:.2f} "
                f"| {r['overhead_us_per_row']:.1f} | {_f(old.get('overhead_us_per_row'), '.1f')} "
                f"| {r['peak_rss_mb']:.0f} / {r['bare_peak_rss_mb']:.0f} "
                f"| {_f(old.get('peak_rss_mb'), '.0f')} / {_f(old.get('bare_peak_rss_mb'), '.0f')} "
                f"| {r['memory_ratio']:.2f} | {r['objective_rel_diff']:.1e} |"
            )
        out.append("")
    if build_rows:
        out += [
            "## Modelling overhead and memory by size, without the solve",
            "",
            "`--build-only`: every pathcast stage but the solve (extraction from an all-zero solution), median of "
            "*n* runs, alternating with a fresh highspy reading the same LP from MPS (no solve). Overhead = build LP "
            "+ hand-off + extract; CPU = the process's own CPU time (less sensitive to other programs on the "
            "cores). Peak memory is VmHWM of each process. *load average*: the machine's 1-minute load after the size's runs "
            "(2 cores).",
            "",
            "| size | rows | columns | nonzeros | n | load | build LP | hand-off | extract | overhead [s] "
            "| overhead [us/row] | CPU [us/row] | before: wall / CPU [us/row] | peak MB pathcast | before: peak MB "
            "| peak MB bare read | bare read [s] | load average |",
            "|" + "---|" * 18,
        ]
        for r in build_rows:
            t, old = r["times"], old_build_by_size.get(r["size"], {})
            out.append(
                f"| {r['size']} | {r['rows']:,} | {r['columns']:,} | {r['nonzeros']:,} | {r['runs']} "
                f"| {t['load_s']:.2f} | {t['build_lp_s']:.2f} | {t['handoff_s']:.2f} | {t['extract_s']:.2f} "
                f"| {r['overhead_s']:.2f} | {r['overhead_us_per_row']:.1f} "
                f"| {r.get('cpu_overhead_us_per_row', math.nan):.1f} "
                f"| {_f(old.get('overhead_us_per_row'), '.1f')} / {_f(old.get('cpu_overhead_us_per_row'), '.1f')} "
                f"| {r['peak_rss_mb']:.0f} | {_f(old.get('peak_rss_mb'), '.0f')} "
                f"| {r['bare_read_peak_rss_mb']:.0f} | {r['bare_read_s']:.2f} "
                f"| {_f((r.get('load_average') or [None])[0], '.1f')} |"
            )
        out.append("")
        cpu_fit = _fit(build_rows, "cpu_times")
        if fit:
            out.append(
                f"Array LP build time grows as (years x hours)^{fit['build']:.2f}, the whole modelling overhead as "
                f"(years x hours)^{fit['overhead']:.2f}"
                + (f" (CPU time: ^{cpu_fit['build']:.2f} and ^{cpu_fit['overhead']:.2f})" if cpu_fit else "")
                + f"; least-squares fits of the logs over {fit['points']} sizes with {fit['technologies']} "
                "technologies. The overhead grows more slowly than the LP because results extraction has a fixed "
                "part."
            )
            out.append("")
    extended = [r for r in build_rows if r.get("with_extension")]
    if extended:
        spec = extended[0]["with_extension"]["extension"]
        out += [
            "## The cost of an extension",
            "",
            f"The same `--build-only` runs, alternately with a build that applies `{spec}` (one rule per year on "
            "`model.capacity`: two technologies' capacity summed and capped). Per-row figures divide by the rows "
            "of the LP without the extension. *Pyomo import* is paid once per process by the first extension "
            "(`import pyomo.environ`); *apply_extensions* is the labelled Pyomo model, the user's function and "
            "the compilation of its constraints into LP rows.",
            "",
            "| size | base rows | rows added | n | overhead without / with [us/row] | extra, wall [us/row] "
            "| extra, CPU [us/row] | Pyomo import [s] | apply_extensions [s] | apply_extensions [us/row] "
            "| peak MB without / with |",
            "|" + "---|" * 11,
        ]
        for r in extended:
            e = r["with_extension"]
            out.append(
                f"| {r['size']} | {r['rows']:,} | {e['rows_added']} | {e['runs']} "
                f"| {r['overhead_us_per_row']:.1f} / {e['overhead_us_per_row']:.1f} | {e['extra_us_per_row']:.1f} "
                f"| {e['extra_cpu_us_per_row']:.1f} | {e['times']['pyomo_import_s']:.2f} "
                f"| {e['times']['extensions_s']:.3f} | {e['apply_us_per_row']:.2f} "
                f"| {r['peak_rss_mb']:.0f} / {e['peak_rss_mb']:.0f} |"
            )
        out.append("")
    # solver-only tables: measured on MPS files of the same LPs; from this run where it made them, else earlier
    solver_rows = {**old_by_size, **{k: v for k, v in by_size.items() if "baseline_defaults_solve_s" in v}}
    strategy_rows = sorted(
        (r for r in solver_rows.values() if "baseline_defaults_solve_s" in r),
        key=lambda r: _size_key(r["size"]),
    )
    if strategy_rows:
        out += [
            "## Pathcast's strategy against HiGHS's defaults",
            "",
            "Solver-only measurements on MPS files of the same LPs, from the earlier sessions (the solve path does "
            "not change the LP HiGHS gets, so they were not re-measured). The strategy is the formulation (pooled "
            "curtailment) and the options (`auto`). *per-generator LP* = the same scenario with "
            "`solver.pooled_curtailment: false` (one output variable and limit row per generator and hour), solved "
            "by HiGHS with no options set. Solve times [s] of fresh highspy processes; CPU = process CPU time of "
            "the solve. '>' marks a solve stopped by its time limit (the speed-up is then a lower bound).",
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
    range_rows = {**old_by_size, **{k: v for k, v in by_size.items() if v.get("ranges_highs_log")}}
    if range_rows:
        out += [
            "## Coefficient ranges (as HiGHS prints them, pathcast's options)",
            "",
            "| size | matrix | cost | bound | rhs | measured |",
            "|---|---|---|---|---|---|",
        ]
        for r in sorted(range_rows.values(), key=lambda r: _size_key(r["size"])):
            g = r.get("ranges_highs_log") or {}
            cells = [
                f"[{g[k][0]:.0e}, {g[k][1]:.0e}]" if k in g else "-"
                for k in ("matrix", "cost", "bound", "rhs")
            ]
            when = (
                "this run"
                if r["size"] in by_size and by_size[r["size"]].get("ranges_highs_log")
                else "before"
            )
            out.append(f"| {r['size']} | " + " | ".join(cells) + f" | {when} |")
        out.append("")
    method_rows = sorted(
        (r for r in {**old_by_size, **by_size}.values() if r.get("methods")),
        key=lambda r: _size_key(r["size"]),
    )
    if method_rows:
        out += [
            "## Solver methods on the same MPS file (one run each, earlier session)",
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
        out += _demo_section(json.loads(demo.read_text()))
    if NOTES:
        out += [NOTES.strip(), ""]
    target.write_text("\n".join(out))


def _demo_section(d: dict) -> list[str]:
    """The demo case table from benchmarks/demo_case.py's JSON: each run and the median."""
    stages = ("load_s", "build_lp_s", "handoff_s", "solve_s", "extract_s", "total_s")
    out = [
        f"## Demo budget case (`{d['command']}`)",
        "",
        f"{len(d['runs'])} runs, each a fresh process of the command line; *command* = the whole process (imports, "
        "files, figures, memo), timed from outside; stages from the run's manifest. "
        + (f"Beside it: {d['beside']}." if d.get("beside") else ""),
        "",
        "| run | load | build LP | hand-off | solve | extract | stages | command wall [s] | command CPU [s] "
        "| peak MB | simplex iterations | load average after |",
        "|" + "---|" * 12,
    ]
    for i, r in enumerate(d["runs"], start=1):
        s = r["stages"]
        out.append(
            f"| {i} | "
            + " | ".join(f"{s[k]:.2f}" for k in stages)
            + f" | {r['wall_s']:.1f} | {r['cpu_s']:.1f} | {r['peak_rss_mb']:.0f} | {r['iterations']['simplex']:,} "
            f"| {_f((r.get('load_average_after') or [None])[0], '.1f')} |"
        )
    m = d["median"]
    out.append(
        "| median | "
        + " | ".join(f"{m['stages'][k]:.2f}" for k in stages)
        + f" | {m['wall_s']:.1f} | {m['cpu_s']:.1f} | {m['peak_rss_mb']:.0f} | | |"
    )
    lp = d["runs"][0]["lp"]
    out += [
        "",
        f"LP: {lp['rows']:,} rows, {lp['columns']:,} columns, {lp['nonzeros']:,} nonzeros; objective "
        f"{d['runs'][0]['objective_million']:,.2f} million.",
        "",
    ]
    return out
