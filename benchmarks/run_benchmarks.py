"""Speed and memory of pathcast against the bare solver, size by size (a script, not a test).

For each size (years x representative hours x technologies) a synthetic scenario is generated
(benchmarks/scenario_generator.py) and measured side by side in one run:

- pathcast, end to end, in its own subprocess: (a) scenario load + validation, (b) the array LP
  (``build_linear_program``, with the extensions' rules if any, and ``LinearProgram.matrix()``), (c) the hand-off to
  HiGHS (``highs_lp`` + options + ``passModel``, inside ``solve_lp``), (d) HiGHS solve, (e) results extraction,
  (f) peak memory (VmHWM);
- the reference path: the same LP, written once to MPS by pathcast (``writeModel`` after ``passModel``), read and
  solved by a fresh ``highspy`` alone with the same options, in its own subprocess (the floor: bare read + solve).
  Both paths end in the same HiGHS model, so pathcast's overhead is build LP + hand-off + extraction;
- HiGHS with its default options on the same MPS file (for the speed-up of the strategy pathcast chooses);
- optionally (``--methods``) every solver method on the same MPS file, with its duals compared to a vertex solution.

Each measurement is the median over ``--repeats`` runs; a case whose first run takes more than ``--long-run-s``
seconds is run once. Repeats alternate pathcast / bare / defaults so that the machine's noise hits them alike.

    python benchmarks/run_benchmarks.py --sizes 6x48x20,12x96x20 --repeats 3
    python benchmarks/run_benchmarks.py --sizes 12x96x20 --methods simplex,ipm,ipm-crossover,pdlp --time-limit 600
    python benchmarks/run_benchmarks.py --build-only --extension benchmarks/extension_rules.py:extend --repeats 3

Results: JSON per run in ``--out`` (default benchmarks/out, git-ignored) and, with ``--write-results``, the report
benchmarks/RESULTS.md.
"""

from __future__ import annotations

import argparse
import json
import math
import os
import re
import statistics
import subprocess
import sys
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))
DEFAULT_SIZES = "6x48x20,12x96x20,18x144x20,24x192x20,36x288x20"


# ------------------------------------------------------------------------------------------------- workers
def _peak_rss_mb() -> float:
    """Peak resident memory of this process [MB]: VmHWM of /proc/self/status, which starts afresh at exec (unlike
    ``ru_maxrss``, which a child started by fork + exec inherits from its parent); ``ru_maxrss`` elsewhere."""
    try:
        for line in Path("/proc/self/status").read_text().splitlines():
            if line.startswith("VmHWM:"):
                return float(line.split()[1]) / 1024.0  # kB
    except OSError:
        pass
    import resource

    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0  # Linux: kilobytes


def _lp_ranges(lp) -> dict:
    """Coefficient ranges of a HighsLp, as HiGHS prints them (absolute values of finite nonzeros)."""
    import numpy as np

    def span(values) -> list[float]:
        a = np.abs(np.asarray(values, dtype=float))
        a = a[np.isfinite(a) & (a > 0)]
        return [float(a.min()), float(a.max())] if len(a) else [0.0, 0.0]

    return {
        "matrix": span(lp.a_matrix_.value_),
        "cost": span(lp.col_cost_),
        "bound": span(np.concatenate([np.asarray(lp.col_lower_), np.asarray(lp.col_upper_)])),
        "rhs": span(np.concatenate([np.asarray(lp.row_lower_), np.asarray(lp.row_upper_)])),
    }


def worker_pathcast(args: argparse.Namespace) -> dict:
    """One pathcast run through the pipeline the CLI uses; times come from the pipeline's own stage timer."""
    import numpy as np

    from pathcast.pipeline import run_scenario

    if args.prepare_only:
        return prepare_mps(args)
    started, cpu_started = time.perf_counter(), time.process_time()
    run = run_scenario(
        args.scenario,
        solver={"method": args.method, "time_limit_s": args.time_limit},
        extensions=_extension_specs(args),
    )
    wall, cpu = time.perf_counter() - started, time.process_time() - cpu_started
    peak = _peak_rss_mb()
    sol = run.solution
    out = {
        "kind": "pathcast",
        "times": run.times.as_dict(),
        "wall_s": wall,
        "cpu_s": cpu,
        "peak_rss_mb": peak,
        "rows": sol.rows,
        "columns": sol.columns,
        "nonzeros": sol.nonzeros,
        "objective": sol.objective,
        "status": sol.status,
        "method": sol.method,
        "options": sol.options,
        "iterations": sol.iterations,
    }
    offsets = run.model.lp.row_offsets()
    blocks = run.model.lp.row_blocks
    if "carbon_budget" in blocks:
        out["carbon_dual"] = float(sol.row_dual[offsets["carbon_budget"]])
    balance = offsets["electricity_balance"] + np.arange(blocks["electricity_balance"].size)
    out["balance_duals"] = sol.row_dual[balance].tolist()
    if args.write_mps:
        h = sol.highs
        lp = h.getLp()
        out["ranges"] = _lp_ranges(lp)
        h.writeModel(str(args.write_mps))
        # rows whose duals are checked: the carbon budget and the electricity balances (HiGHS holds the LP in the
        # LP's own row order, so a row's position in the MPS file is its LP row number)
        budget = [int(offsets["carbon_budget"])] if "carbon_budget" in blocks else []
        balance = balance.tolist()
        checked = {
            "carbon_budget": budget,
            "electricity_balance": balance,
            "reference_duals": {
                "carbon_budget": [float(sol.row_dual[i]) for i in budget],
                "electricity_balance": [float(sol.row_dual[i]) for i in balance],
            },
        }
        Path(str(args.write_mps) + ".rows.json").write_text(json.dumps(checked))
    return out


def _extension_specs(args: argparse.Namespace) -> tuple:
    """The ``--extension FILE[:function]`` of the benchmark, as the command line's ``--extension`` reads it."""
    if not getattr(args, "extension", None):
        return ()
    from pathcast.scenario.extensions import parse_extension_argument

    spec = parse_extension_argument(args.extension)
    return (type(spec)(Path(spec.file).resolve(), spec.function, spec.origin),)


def prepare_mps(args: argparse.Namespace) -> dict:
    """Build the LP through pathcast's own path (load, array LP, ``highs_lp``), pass it to HiGHS and write the MPS
    file and the positions of the checked rows, without solving (for --concurrent)."""
    import numpy as np

    from pathcast.model.build import build_linear_program
    from pathcast.scenario.inputs import prepare_inputs
    from pathcast.scenario.loader import load_scenario
    from pathcast.solve import highs_lp, new_highs

    model = build_linear_program(prepare_inputs(load_scenario(args.scenario).scenario))
    lp = highs_lp(model.lp)
    h = new_highs()
    h.passModel(lp)
    h.writeModel(str(args.write_mps))
    offsets, blocks = model.lp.row_offsets(), model.lp.row_blocks
    budget = [int(offsets["carbon_budget"])] if "carbon_budget" in blocks else []
    balance = (offsets["electricity_balance"] + np.arange(blocks["electricity_balance"].size)).tolist()
    checked = {"carbon_budget": budget, "electricity_balance": balance}
    Path(str(args.write_mps) + ".rows.json").write_text(json.dumps(checked))
    return {"kind": "prepare", "rows": int(lp.num_row_), "ranges": _lp_ranges(lp)}


def worker_build(args: argparse.Namespace) -> dict:
    """Every pathcast stage except the solve, timed like the pipeline: load + validation, the array LP (families,
    then the extension's rules when ``--extension`` is given, then ``matrix()``), the hand-off (``highs_lp``, a HiGHS
    instance, options, ``passModel``, as in ``solve_lp``) and results extraction from an all-zero solution (the
    extraction's work does not depend on the values). Then the MPS file.

    With an extension, ``build_lp_s`` is what the pipeline would count (families + Pyomo import + rules + matrix);
    ``families_s``, ``pyomo_import_s``, ``extensions_s`` (``apply_extensions``: the labelled Pyomo model, the user's
    function, the compilation into LP rows) and ``matrix_s`` are its parts."""
    import numpy as np

    from pathcast.model.build import build_linear_program
    from pathcast.pipeline import solver_options_from
    from pathcast.results.extract import extract_tables, headline_figures
    from pathcast.scenario.inputs import prepare_inputs
    from pathcast.scenario.loader import load_scenario
    from pathcast.solve import Solution, highs_lp, highs_options_for, new_highs

    t, cpu = {}, {}
    clock, cpu_clock = time.perf_counter(), time.process_time()

    def lap(name: str) -> None:
        # wall time, and this process's CPU time (less sensitive to other processes on a shared machine)
        nonlocal clock, cpu_clock
        now, cpu_now = time.perf_counter(), time.process_time()
        t[name], cpu[name] = now - clock, cpu_now - cpu_clock
        clock, cpu_clock = now, cpu_now

    inputs = prepare_inputs(load_scenario(args.scenario).scenario)
    lap("load_s")
    model = build_linear_program(inputs)  # the families (the inputs carry no extension)
    base_rows = int(sum(b.size for b in model.lp.row_blocks.values()))
    lap("families_s")
    specs = _extension_specs(args)
    if specs:
        import pyomo.environ  # noqa: F401  (what a run's first extension pays once)

        lap("pyomo_import_s")
        from pathcast.model.extension import apply_extensions

        added = len(apply_extensions(model, specs))
        lap("extensions_s")
    matrix, _, _ = model.lp.matrix()
    lap("matrix_s")
    for d in (t, cpu):
        d["build_lp_s"] = sum(
            d.get(k, 0.0) for k in ("families_s", "pyomo_import_s", "extensions_s", "matrix_s")
        )
    clock, cpu_clock = time.perf_counter(), time.process_time()
    lp = highs_lp(model.lp)
    h = new_highs()
    options = highs_options_for(solver_options_from(inputs).method, lp.num_row_)
    for key, value in options.items():
        h.setOptionValue(key, value)
    h.passModel(lp)
    lap("handoff_s")
    solution = Solution(
        status="optimal",
        objective=0.0,
        x=np.zeros(matrix.shape[1]),
        row_dual=np.zeros(matrix.shape[0]),
        method="auto",
        options=options,
        handoff_s=0.0,
        solve_s=0.0,
        rows=lp.num_row_,
        columns=lp.num_col_,
        nonzeros=len(lp.a_matrix_.value_),
        iterations={},
        highs=h,
    )
    tables = extract_tables(model, solution)
    headline_figures(model, solution, tables)
    lap("extract_s")
    peak = _peak_rss_mb()
    if args.write_mps:
        h.writeModel(str(args.write_mps))
    out = {
        "kind": "build",
        "times": t,
        "cpu_times": cpu,
        "peak_rss_mb": peak,
        "rows": int(lp.num_row_),
        "base_rows": base_rows,
        "columns": int(lp.num_col_),
        "nonzeros": len(lp.a_matrix_.value_),
    }
    if specs:
        out["extension"] = args.extension
        out["extension_rows"] = added
    return out


def worker_read(args: argparse.Namespace) -> dict:
    """A fresh highspy reads the MPS file (no solve): the bare solver's read time and memory before solving."""
    import highspy

    h = highspy.Highs()
    h.setOptionValue("output_flag", False)
    started = time.perf_counter()
    h.readModel(str(args.mps))
    return {"kind": "read", "read_s": time.perf_counter() - started, "peak_rss_mb": _peak_rss_mb()}


def _overhead(times: dict) -> float:
    """pathcast's work beyond the bare read + solve [s]: array LP, hand-off to HiGHS, results extraction."""
    return times["build_lp_s"] + times["handoff_s"] + times["extract_s"]


def _build_summary(builds: list[dict], base_rows: int) -> dict:
    """Medians of --build-only runs of one case; per-row figures divide by the rows of the LP without extensions."""
    times = {k: _median([b["times"][k] for b in builds]) for k in builds[0]["times"]}
    cpu = {k: _median([b["cpu_times"][k] for b in builds]) for k in builds[0]["cpu_times"]}
    return {
        "runs": len(builds),
        "times": times,
        "cpu_times": cpu,
        "overhead_s": _overhead(times),
        "overhead_us_per_row": _overhead(times) * 1e6 / base_rows,
        "cpu_overhead_us_per_row": _overhead(cpu) * 1e6 / base_rows,
        "peak_rss_mb": _median([b["peak_rss_mb"] for b in builds]),
    }


def measure_build(sizes: list[str], args: argparse.Namespace) -> list[dict]:
    """Stage times without the solve, median of --repeats, alternating with the bare read of the same LP (and, with
    --extension, with the same build plus the extension's rules)."""
    from scenario_generator import write_scenario

    rows = []
    out_dir = Path(args.out)
    for size in sizes:
        scenario = write_scenario(out_dir / "scenarios", size, per_generator=args.per_generator)
        mps = out_dir / "mps" / (scenario.stem + ".build.mps")
        mps.parent.mkdir(parents=True, exist_ok=True)
        builds, extended, reads = [], [], []
        for r in range(args.repeats):
            extra = ["--write-mps", str(mps)] if r == 0 else []
            builds.append(_run_worker(["--worker", "build", "--scenario", str(scenario), *extra]))
            if args.extension:
                extended.append(
                    _run_worker(
                        ["--worker", "build", "--scenario", str(scenario), "--extension", args.extension]
                    )
                )
            reads.append(_run_worker(["--worker", "read", "--mps", str(mps)]))
        base_rows = builds[0]["rows"]
        row = {
            "size": size,
            "formulation": "per_generator" if args.per_generator else "pooled",
            "rows": base_rows,
            "columns": builds[0]["columns"],
            "nonzeros": builds[0]["nonzeros"],
            **_build_summary(builds, base_rows),
            "bare_read_s": _median([x["read_s"] for x in reads]),
            "bare_read_peak_rss_mb": _median([x["peak_rss_mb"] for x in reads]),
            "load_average": list(os.getloadavg()),
        }
        message = (
            f"[{time.strftime('%H:%M:%S')}] build {size}: {row['rows']:,} rows, overhead {row['overhead_s']:.2f} s = "
            f"{row['overhead_us_per_row']:.1f} us/row (CPU {row['cpu_overhead_us_per_row']:.1f}), peak "
            f"{row['peak_rss_mb']:.0f} MB (bare read {row['bare_read_peak_rss_mb']:.0f} MB)"
        )
        if extended:
            ext = _build_summary(extended, base_rows)
            ext["extension"] = args.extension
            ext["rows_added"] = extended[0]["extension_rows"]
            ext["extra_us_per_row"] = ext["overhead_us_per_row"] - row["overhead_us_per_row"]
            ext["extra_cpu_us_per_row"] = ext["cpu_overhead_us_per_row"] - row["cpu_overhead_us_per_row"]
            ext["apply_us_per_row"] = ext["times"]["extensions_s"] * 1e6 / base_rows
            row["with_extension"] = ext
            message += (
                f"; with the extension (+{ext['rows_added']} rows) {ext['overhead_us_per_row']:.1f} us/row, "
                f"apply_extensions {ext['times']['extensions_s']:.3f} s, Pyomo import "
                f"{ext['times']['pyomo_import_s']:.2f} s, peak {ext['peak_rss_mb']:.0f} MB"
            )
        rows.append(row)
        print(message, file=sys.stderr, flush=True)
    return rows


def worker_bare(args: argparse.Namespace) -> dict:
    """A fresh highspy reads the MPS file and solves it; nothing from pathcast is imported."""
    import highspy
    import numpy as np

    options = json.loads(args.options)
    h = highspy.Highs()
    h.setOptionValue("output_flag", True)
    h.setOptionValue("log_to_console", False)
    if args.log_file:
        h.setOptionValue("log_file", str(args.log_file))
    for key, value in options.items():
        h.setOptionValue(key, value)
    if args.time_limit:
        h.setOptionValue("time_limit", float(args.time_limit))
    started = time.perf_counter()
    h.readModel(str(args.mps))
    read_s = time.perf_counter() - started
    started, cpu_started = time.perf_counter(), time.process_time()
    h.run()
    solve_s, solve_cpu_s = time.perf_counter() - started, time.process_time() - cpu_started
    peak = _peak_rss_mb()
    info = h.getInfo()
    status = h.modelStatusToString(h.getModelStatus())
    lp = h.getLp()
    out = {
        "kind": "bare",
        "options": options,
        "read_s": read_s,
        "solve_s": solve_s,
        "solve_cpu_s": solve_cpu_s,
        "peak_rss_mb": peak,
        "status": status,
        "objective": float(info.objective_function_value),
        "rows": int(lp.num_row_),
        "columns": int(lp.num_col_),
        "nonzeros": len(lp.a_matrix_.value_),
        "iterations": {
            "simplex": int(info.simplex_iteration_count),
            "ipm": int(info.ipm_iteration_count),
            "crossover": int(info.crossover_iteration_count),
        },
        "max_primal_infeasibility": float(info.max_primal_infeasibility),
        "max_dual_infeasibility": float(info.max_dual_infeasibility),
    }
    rows_file = Path(str(args.mps) + ".rows.json")
    if rows_file.exists() and len(np.asarray(h.getSolution().row_dual)) == out["rows"]:
        checked = json.loads(rows_file.read_text())
        raw = np.asarray(h.getSolution().row_dual)
        out["dual_valid"] = bool(h.getSolution().dual_valid)
        out["carbon_dual"] = float(raw[checked["carbon_budget"][0]]) if checked["carbon_budget"] else None
        out["balance_duals"] = raw[checked["electricity_balance"]].tolist()
    if args.check_duals and rows_file.exists() and "reference_duals" in json.loads(rows_file.read_text()):
        checked = json.loads(rows_file.read_text())
        sol = h.getSolution()
        out["dual_valid"] = bool(sol.dual_valid)
        duals = np.asarray(sol.row_dual)
        ref_budget = np.asarray(checked["reference_duals"]["carbon_budget"])
        ref_balance = np.asarray(checked["reference_duals"]["electricity_balance"])
        if len(duals) == out["rows"] and sol.dual_valid:
            budget = duals[checked["carbon_budget"]] if checked["carbon_budget"] else np.zeros(0)
            balance = duals[checked["electricity_balance"]]
            scale = max(float(np.abs(ref_balance).max()), 1e-12)
            out["carbon_dual"] = budget.tolist()
            out["carbon_dual_reference"] = ref_budget.tolist()
            out["carbon_dual_rel_diff"] = (
                float(abs(budget[0] - ref_budget[0]) / max(abs(ref_budget[0]), 1e-12))
                if len(budget)
                else None
            )
            # hourly prices: largest difference relative to the largest price, and the share of hours that differ
            # by more than 1 % of it (a vertex can have other, equally valid duals where the LP is degenerate)
            diff = np.abs(balance - ref_balance) / scale
            out["price_max_rel_diff"] = float(diff.max())
            out["price_share_hours_off_1pct"] = float((diff > 0.01).mean())
    return out


# ------------------------------------------------------------------------------------------------- driver
def _run_worker(argv: list[str]) -> dict:
    cmd = [sys.executable, str(Path(__file__).resolve()), *argv]
    done = subprocess.run(cmd, capture_output=True, text=True)
    if done.returncode != 0:
        raise RuntimeError(f"worker {' '.join(argv)} failed:\n{done.stderr[-3000:]}")
    return json.loads(done.stdout.strip().splitlines()[-1])


def _median(values: list[float]) -> float:
    return float(statistics.median(values)) if values else math.nan


def _parse_ranges(log_file: Path) -> dict:
    text = log_file.read_text() if log_file.exists() else ""
    out = {}
    for name in ("Matrix", "Cost", "Bound", "RHS"):
        found = re.search(rf"{name}\s+\[([0-9.e+-]+),\s*([0-9.e+-]+)\]", text)
        if found:
            out[name.lower()] = [float(found.group(1)), float(found.group(2))]
    return out


def _case_paths(size: str, args: argparse.Namespace) -> tuple[Path, Path, Path]:
    """Write the generated scenario of ``size``; return it with the MPS file path and the log folder."""
    sys.path.insert(0, str(HERE))
    from scenario_generator import write_scenario

    out_dir = Path(args.out)
    scenario = write_scenario(out_dir / "scenarios", size, per_generator=args.per_generator)
    mps = out_dir / "mps" / (scenario.stem + ".mps")
    mps.parent.mkdir(parents=True, exist_ok=True)
    logs = out_dir / "logs"
    logs.mkdir(parents=True, exist_ok=True)
    return scenario, mps, logs


def _per_generator_case(size: str, args: argparse.Namespace) -> tuple[Path, dict]:
    """MPS file of the per-generator formulation of ``size`` (the LP before pooling), written through pathcast."""
    per_args = argparse.Namespace(**{**vars(args), "per_generator": True})
    scenario, mps, _ = _case_paths(size, per_args)
    prep = _run_worker(
        ["--worker", "pathcast", "--prepare-only", "--scenario", str(scenario), "--write-mps", str(mps)]
    )
    return mps, prep


def _baseline_fields(
    runs: list[dict], prep: dict, bare_solve_s: float, bare_solve_cpu_s: float | None, bare_objective: float
) -> dict:
    """Row fields of HiGHS defaults on the per-generator LP, against pathcast's options on pathcast's LP."""
    solve = _median([r["solve_s"] for r in runs])
    cpu = _median([r["solve_cpu_s"] for r in runs]) if all("solve_cpu_s" in r for r in runs) else None
    return {
        "baseline_rows": prep["rows"],
        "baseline_columns": runs[0]["columns"],
        "baseline_nonzeros": runs[0]["nonzeros"],
        "baseline_defaults_solve_s": solve,
        "baseline_defaults_solve_cpu_s": cpu,
        "baseline_defaults_status": runs[0]["status"],
        "baseline_objective": runs[0]["objective"],
        "speedup_vs_baseline": solve / bare_solve_s,
        "speedup_vs_baseline_cpu": cpu / bare_solve_cpu_s if cpu and bare_solve_cpu_s else None,
        "baseline_is_lower_bound": runs[0]["status"] != "Optimal",
        "baseline_objective_rel_diff": abs(runs[0]["objective"] - bare_objective)
        / max(abs(bare_objective), 1e-12),
    }


def measure_size(size: str, args: argparse.Namespace) -> dict:
    scenario, mps, logs = _case_paths(size, args)
    common = ["--time-limit", str(args.time_limit)] if args.time_limit else []
    method = args.method

    def say(message: str) -> None:
        print(f"[{time.strftime('%H:%M:%S')}] {size}: {message}", file=sys.stderr, flush=True)

    pathcast_runs, bare_runs, default_runs, baseline_runs = [], [], [], []
    baseline_mps, baseline_prep = (
        _per_generator_case(size, args) if args.against_per_generator else (None, None)
    )
    first = _run_worker(
        [
            "--worker",
            "pathcast",
            "--scenario",
            str(scenario),
            "--method",
            method,
            "--write-mps",
            str(mps),
            *common,
        ]
    )
    pathcast_runs.append(first)
    say(
        f"pathcast {first['times']['total_s']:.1f} s ({first['rows']:,} rows), solve {first['times']['solve_s']:.1f} s"
    )
    chosen = json.dumps({k: v for k, v in first["options"].items() if k != "time_limit"})
    long_case = first["times"]["total_s"] > args.long_run_s
    repeats = 1 if long_case else args.repeats
    with_defaults = not args.no_defaults
    for r in range(repeats):
        if r > 0:
            pathcast_runs.append(
                _run_worker(
                    ["--worker", "pathcast", "--scenario", str(scenario), "--method", method, *common]
                )
            )
        bare_runs.append(
            _run_worker(
                [
                    "--worker",
                    "bare",
                    "--mps",
                    str(mps),
                    "--options",
                    chosen,
                    "--check-duals",
                    "--log-file",
                    str(logs / f"{scenario.stem}.chosen.{r}.log"),
                    *common,
                ]
            )
        )
        if with_defaults:
            default_runs.append(
                _run_worker(
                    [
                        "--worker",
                        "bare",
                        "--mps",
                        str(mps),
                        "--options",
                        "{}",
                        "--check-duals",
                        "--log-file",
                        str(logs / f"{scenario.stem}.defaults.{r}.log"),
                        *_defaults_limit(args),
                    ]
                )
            )
        if baseline_mps is not None:
            baseline_runs.append(
                _run_worker(
                    [
                        "--worker",
                        "bare",
                        "--mps",
                        str(baseline_mps),
                        "--options",
                        "{}",
                        "--log-file",
                        str(logs / f"{scenario.stem}.per_generator.defaults.{r}.log"),
                        *_defaults_limit(args),
                    ]
                )
            )
        say(
            f"repeat {r + 1}/{repeats}: pathcast {pathcast_runs[-1]['times']['total_s']:.1f} s, bare "
            f"{bare_runs[-1]['read_s'] + bare_runs[-1]['solve_s']:.1f} s"
            + (f", defaults solve {default_runs[-1]['solve_s']:.1f} s" if with_defaults else "")
        )

    methods = {}
    for name in [m for m in args.methods.split(",") if m] if args.methods else []:
        from pathcast.solve import highs_options_for

        opts = {} if name == "defaults" else highs_options_for(name, first["rows"])
        if args.threads:
            opts["threads"] = args.threads
        result = _run_worker(
            [
                "--worker",
                "bare",
                "--mps",
                str(mps),
                "--options",
                json.dumps(opts),
                "--check-duals",
                "--log-file",
                str(logs / f"{scenario.stem}.{name}.log"),
                *common,
            ]
        )
        methods[name] = result
        say(f"method {name}: {result['status']} in {result['solve_s']:.1f} s")

    times = {key: _median([p["times"][key] for p in pathcast_runs]) for key in first["times"]}
    bare_read = _median([b["read_s"] for b in bare_runs])
    bare_solve = _median([b["solve_s"] for b in bare_runs])
    bare_total = _median([b["read_s"] + b["solve_s"] for b in bare_runs])
    overhead = _overhead(times)
    objective, bare_objective = first["objective"], bare_runs[0]["objective"]
    row = {
        "size": size,
        "formulation": "per_generator" if args.per_generator else "pooled",
        "rows": first["rows"],
        "columns": first["columns"],
        "nonzeros": first["nonzeros"],
        "runs": len(pathcast_runs),
        "method": method,
        "options": json.loads(chosen),
        "times": times,
        "pathcast_total_s": times["total_s"],
        "bare_read_s": bare_read,
        "bare_solve_s": bare_solve,
        "bare_total_s": bare_total,
        "ratio": times["total_s"] / bare_total,
        "overhead_s": overhead,
        "overhead_us_per_row": overhead * 1e6 / first["rows"],
        "peak_rss_mb": _median([p["peak_rss_mb"] for p in pathcast_runs]),
        "bare_peak_rss_mb": _median([b["peak_rss_mb"] for b in bare_runs]),
        "objective": objective,
        "bare_objective": bare_objective,
        "objective_rel_diff": abs(objective - bare_objective) / max(abs(bare_objective), 1e-12),
        "ranges_lp": first.get("ranges"),
        "ranges_highs_log": _parse_ranges(logs / f"{scenario.stem}.chosen.0.log"),
        "chosen_duals": {
            k: bare_runs[0].get(k) for k in ("dual_valid", "carbon_dual_rel_diff", "price_max_rel_diff")
        },
        "methods": methods,
    }
    row["memory_ratio"] = row["peak_rss_mb"] / row["bare_peak_rss_mb"]
    if default_runs:
        row["defaults_solve_s"] = _median([d["solve_s"] for d in default_runs])
        row["defaults_status"] = default_runs[0]["status"]
        row["speedup_vs_defaults"] = row["defaults_solve_s"] / bare_solve
        row["speedup_is_lower_bound"] = default_runs[0]["status"] != "Optimal"
        row["defaults_objective_rel_diff"] = abs(default_runs[0]["objective"] - bare_objective) / max(
            abs(bare_objective), 1e-12
        )
    if baseline_runs:
        row.update(
            _baseline_fields(
                baseline_runs,
                baseline_prep,
                bare_solve,
                _median([b["solve_cpu_s"] for b in bare_runs]),
                bare_objective,
            )
        )
    return row


def _dual_diffs(result: dict, reference: dict) -> dict:
    """Carbon-budget dual and hourly balance duals of ``result`` against ``reference`` (relative)."""
    import numpy as np

    out = {"dual_valid": result.get("dual_valid", True)}
    if result.get("carbon_dual") is not None and reference.get("carbon_dual") is not None:
        out["carbon_dual_rel_diff"] = abs(result["carbon_dual"] - reference["carbon_dual"]) / max(
            abs(reference["carbon_dual"]), 1e-12
        )
    if result.get("balance_duals") and reference.get("balance_duals"):
        a, b = np.asarray(result["balance_duals"]), np.asarray(reference["balance_duals"])
        out["price_max_rel_diff"] = float(np.abs(a - b).max() / max(float(np.abs(b).max()), 1e-12))
    return out


def _defaults_limit(args: argparse.Namespace) -> list[str]:
    """Time limit of the HiGHS-defaults solve: --defaults-time-limit, else --time-limit."""
    limit = args.defaults_time_limit or args.time_limit
    return ["--time-limit", str(limit)] if limit else []


def measure_concurrent(size: str, args: argparse.Namespace) -> dict:
    """One run of pathcast end to end, the bare solver with pathcast's options and (unless --no-defaults) HiGHS defaults, started at the
    same moment (each single-threaded HiGHS; on 2 cores all three share the machine alike). For the national size,
    where one solve takes many minutes."""
    from pathcast.solve import highs_options_for

    scenario, mps, logs = _case_paths(size, args)
    prep = _run_worker(
        ["--worker", "pathcast", "--prepare-only", "--scenario", str(scenario), "--write-mps", str(mps)]
    )
    common = ["--time-limit", str(args.time_limit)] if args.time_limit else []
    chosen = highs_options_for(args.method, prep["rows"])
    cmds = {
        "pathcast": ["--worker", "pathcast", "--scenario", str(scenario), "--method", args.method, *common],
        "bare": [
            "--worker",
            "bare",
            "--mps",
            str(mps),
            "--options",
            json.dumps(chosen),
            "--log-file",
            str(logs / f"{scenario.stem}.chosen.0.log"),
            *common,
        ],
        "defaults": [
            "--worker",
            "bare",
            "--mps",
            str(mps),
            "--options",
            "{}",
            "--log-file",
            str(logs / f"{scenario.stem}.defaults.0.log"),
            *_defaults_limit(args),
        ],
    }
    if args.no_defaults:
        del cmds["defaults"]
    if args.against_per_generator:
        baseline_mps, baseline_prep = _per_generator_case(size, args)
        cmds["baseline"] = [
            "--worker",
            "bare",
            "--mps",
            str(baseline_mps),
            "--options",
            "{}",
            "--log-file",
            str(logs / f"{scenario.stem}.per_generator.defaults.0.log"),
            *_defaults_limit(args),
        ]
    # at most --at-most solves at a time, started in the order pathcast, defaults, bare: on 2 cores with
    # --at-most 2 each single-threaded solve has a core of its own, and the long defaults solve overlaps both others
    order = [k for k in ("pathcast", "defaults", "bare", "baseline") if k in cmds]
    slots = args.at_most or len(order)
    results, running = {}, {}
    while order or running:
        while order and len(running) < slots:
            k = order.pop(0)
            # output to files, not pipes: a worker's JSON line (hourly duals) outgrows a pipe's buffer
            out_file, err_file = logs / f"{scenario.stem}.{k}.out", logs / f"{scenario.stem}.{k}.err"
            with out_file.open("w") as out, err_file.open("w") as err:  # the child keeps its own copies
                running[k] = subprocess.Popen(
                    [sys.executable, str(Path(__file__).resolve()), *cmds[k]], stdout=out, stderr=err
                )
            print(f"[{time.strftime('%H:%M:%S')}] {size}: {k} started", file=sys.stderr, flush=True)
        finished = [k for k, p in running.items() if p.poll() is not None]
        if not finished:
            time.sleep(1.0)
            continue
        for k in finished:
            code = running.pop(k).returncode
            stdout = (logs / f"{scenario.stem}.{k}.out").read_text()
            if code != 0 or not stdout.strip():
                stderr = (logs / f"{scenario.stem}.{k}.err").read_text()
                raise RuntimeError(f"worker {k} failed:\n{stderr[-3000:]}")
            results[k] = json.loads(stdout.strip().splitlines()[-1])
            (logs / f"{scenario.stem}.{k}.json").write_text(json.dumps(results[k]))
            print(f"[{time.strftime('%H:%M:%S')}] {size}: {k} done", file=sys.stderr, flush=True)
    first, bare, dflt = results["pathcast"], results["bare"], results.get("defaults")
    times = first["times"]
    overhead = _overhead(times)
    row = {
        "size": size,
        "formulation": "per_generator" if args.per_generator else "pooled",
        "rows": first["rows"],
        "columns": first["columns"],
        "nonzeros": first["nonzeros"],
        "runs": 1,
        "concurrent": True,
        "at_most": args.at_most,
        "method": args.method,
        "options": chosen,
        "times": times,
        "pathcast_cpu_s": first.get("cpu_s"),
        "bare_solve_cpu_s": bare.get("solve_cpu_s"),
        "pathcast_total_s": times["total_s"],
        "bare_read_s": bare["read_s"],
        "bare_solve_s": bare["solve_s"],
        "bare_total_s": bare["read_s"] + bare["solve_s"],
        "ratio": times["total_s"] / (bare["read_s"] + bare["solve_s"]),
        "overhead_s": overhead,
        "overhead_us_per_row": overhead * 1e6 / first["rows"],
        "peak_rss_mb": first["peak_rss_mb"],
        "bare_peak_rss_mb": bare["peak_rss_mb"],
        "objective": first["objective"],
        "bare_objective": bare["objective"],
        "objective_rel_diff": abs(first["objective"] - bare["objective"])
        / max(abs(bare["objective"]), 1e-12),
        "ranges_lp": prep["ranges"],
        "ranges_highs_log": _parse_ranges(logs / f"{scenario.stem}.chosen.0.log"),
        "chosen_duals": _dual_diffs(bare, first),
        "methods": {},
    }
    if dflt is not None:
        row.update(
            {
                "defaults_solve_s": dflt["solve_s"],
                "defaults_status": dflt["status"],
                "speedup_vs_defaults": dflt["solve_s"] / bare["solve_s"],
                "defaults_solve_cpu_s": dflt.get("solve_cpu_s"),
                "speedup_vs_defaults_cpu": (
                    dflt["solve_cpu_s"] / bare["solve_cpu_s"]
                    if dflt.get("solve_cpu_s") and bare.get("solve_cpu_s")
                    else None
                ),
                # a defaults solve stopped by its time limit gives a lower bound on the speed-up
                "speedup_is_lower_bound": dflt["status"] != "Optimal",
                "defaults_objective_rel_diff": abs(dflt["objective"] - bare["objective"])
                / max(abs(bare["objective"]), 1e-12),
                "defaults_duals": _dual_diffs(dflt, first),
            }
        )
    if "baseline" in results:
        row.update(
            _baseline_fields(
                [results["baseline"]],
                baseline_prep,
                bare["solve_s"],
                bare.get("solve_cpu_s"),
                bare["objective"],
            )
        )
    row["memory_ratio"] = row["peak_rss_mb"] / row["bare_peak_rss_mb"]
    return row


def build_exponent(rows: list[dict]) -> dict | None:
    """Least-squares slope of log(array LP build time) against log(years x hours) over the sizes with the most technologies."""
    import numpy as np

    techs = max(int(r["size"].split("x")[2]) for r in rows)
    pts = [
        (
            int(r["size"].split("x")[0]) * int(r["size"].split("x")[1]),
            r["times"]["build_lp_s"],
        )
        for r in rows
        if int(r["size"].split("x")[2]) == techs
    ]
    if len(pts) < 2:
        return None
    x, y = np.log([p[0] for p in pts]), np.log([p[1] for p in pts])
    slope, _ = np.polyfit(x, y, 1)
    return {"technologies": techs, "points": len(pts), "exponent": float(slope)}


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(
        description=__doc__.split("\n\n")[0], formatter_class=argparse.RawDescriptionHelpFormatter
    )
    parser.add_argument(
        "--sizes",
        default=DEFAULT_SIZES,
        help=f"comma-separated YEARSxHOURSxTECHNOLOGIES (default {DEFAULT_SIZES})",
    )
    parser.add_argument(
        "--repeats", type=int, default=3, help="runs per case; the median is reported (default 3)"
    )
    parser.add_argument(
        "--long-run-s", type=float, default=60.0, help="a case slower than this runs once (default 60)"
    )
    parser.add_argument("--method", default="auto", help="pathcast solver method (default auto)")
    parser.add_argument(
        "--methods",
        default="",
        help="also solve the MPS with each of these methods "
        "(simplex, ipm, ipm-crossover, pdlp, defaults), comma-separated",
    )
    parser.add_argument("--threads", type=int, default=None, help="HiGHS threads for --methods runs")
    parser.add_argument("--time-limit", type=float, default=None, help="HiGHS time limit per solve [s]")
    parser.add_argument("--no-defaults", action="store_true", help="skip the HiGHS-defaults comparison")
    parser.add_argument(
        "--concurrent",
        action="store_true",
        help="one run each, pathcast, bare and defaults started "
        "together (for sizes whose solves take many minutes)",
    )
    parser.add_argument(
        "--at-most",
        type=int,
        default=None,
        help="with --concurrent: run at most this many of the "
        "solves at a time, started in the order pathcast, defaults, bare (2 on a 2-core machine)",
    )
    parser.add_argument(
        "--defaults-time-limit",
        type=float,
        default=None,
        help="time limit of the defaults solve [s]; one that stops there gives a lower bound on the speed-up",
    )
    parser.add_argument(
        "--per-generator",
        action="store_true",
        help="build the LP with one output variable and "
        "limit row per generator (solver.pooled_curtailment: false), the formulation before pooling",
    )
    parser.add_argument(
        "--against-per-generator",
        action="store_true",
        help="also solve the per-generator "
        "formulation with HiGHS defaults: the speed-up of pathcast's whole strategy (formulation + "
        "options) over the LP a plain formulation gives",
    )
    parser.add_argument(
        "--out", default=str(HERE / "out"), help="folder for scenarios, MPS files, logs and JSON"
    )
    parser.add_argument(
        "--json", default=None, help="file for the result rows (default <out>/results-<time>.json)"
    )
    parser.add_argument(
        "--report",
        nargs="+",
        metavar="JSON",
        default=None,
        help="write benchmarks/RESULTS.md from these result files (rows merged, later files win)",
    )
    parser.add_argument(
        "--demo", default=None, help="with --report: JSON of benchmarks/demo_case.py (see RESULTS.md)"
    )
    parser.add_argument(
        "--before",
        default=str(HERE / "before_pyomo_route.json"),
        help="with --report: the old route's numbers, shown as 'before' columns (default "
        "benchmarks/before_pyomo_route.json; '' for none)",
    )
    parser.add_argument(
        "--build-only",
        action="store_true",
        help="stage times and memory without the solve (build-time growth with size; every size in minutes)",
    )
    parser.add_argument(
        "--extension",
        default=None,
        metavar="FILE[:function]",
        help="with --build-only: also build each size with this extension's rules, alternately "
        "(benchmarks/extension_rules.py:extend is one rule per year on model.capacity)",
    )
    parser.add_argument("--worker", choices=("pathcast", "bare", "build", "read"), help=argparse.SUPPRESS)
    parser.add_argument("--scenario", help=argparse.SUPPRESS)
    parser.add_argument("--write-mps", help=argparse.SUPPRESS)
    parser.add_argument("--prepare-only", action="store_true", help=argparse.SUPPRESS)
    parser.add_argument("--mps", help=argparse.SUPPRESS)
    parser.add_argument("--options", default="{}", help=argparse.SUPPRESS)
    parser.add_argument("--check-duals", action="store_true", help=argparse.SUPPRESS)
    parser.add_argument("--log-file", help=argparse.SUPPRESS)
    args = parser.parse_args(argv)

    workers = {"pathcast": worker_pathcast, "bare": worker_bare, "build": worker_build, "read": worker_read}
    if args.worker:
        print(json.dumps(workers[args.worker](args)))
        return 0

    from pathcast.pipeline import package_versions

    if args.report:
        from report_results import write_report

        write_report(
            [Path(p) for p in args.report],
            HERE / "RESULTS.md",
            Path(args.demo) if args.demo else None,
            Path(args.before) if args.before else None,
        )
        return 0
    if args.build_only:
        sizes = [s for s in args.sizes.split(",") if s]
        out_json = (
            Path(args.json) if args.json else Path(args.out) / f"build-{time.strftime('%Y%m%d-%H%M%S')}.json"
        )
        out_json.parent.mkdir(parents=True, exist_ok=True)
        rows = measure_build(sizes, args)
        out_json.write_text(
            json.dumps(
                {"cores": os.cpu_count(), "versions": package_versions(), "build_rows": rows}, indent=1
            )
        )
        return 0
    rows = []
    out_json = (
        Path(args.json) if args.json else Path(args.out) / f"results-{time.strftime('%Y%m%d-%H%M%S')}.json"
    )
    out_json.parent.mkdir(parents=True, exist_ok=True)
    for size in [s for s in args.sizes.split(",") if s]:
        rows.append(measure_concurrent(size, args) if args.concurrent else measure_size(size, args))
        report = {
            "cores": os.cpu_count(),
            "versions": package_versions(),
            "rows": rows,
            "build_exponent": build_exponent(rows),
        }
        out_json.write_text(json.dumps(report, indent=1))
    print_table(rows, build_exponent(rows))
    print(f"results in {out_json}", file=sys.stderr)
    return 0


def print_table(rows: list[dict], exponent: dict | None) -> None:
    head = (
        f"{'size':>11} {'rows':>8} {'cols':>8} {'nnz':>9} {'n':>2} {'load':>6} {'lp':>6} {'hand':>6} "
        f"{'solve':>7} {'extr':>6} {'total':>7} {'bare':>7} {'ratio':>6} {'us/row':>6} {'mem':>5} {'dflt':>7} "
        f"{'x dflt':>6} {'objdiff':>8}"
    )
    print(head)
    for r in rows:
        t = r["times"]
        print(
            f"{r['size']:>11} {r['rows']:>8,} {r['columns']:>8,} {r['nonzeros']:>9,} {r['runs']:>2} {t['load_s']:>6.2f} "
            f"{t['build_lp_s']:>6.2f} {t['handoff_s']:>6.2f} {t['solve_s']:>7.2f} "
            f"{t['extract_s']:>6.2f} {t['total_s']:>7.2f} {r['bare_total_s']:>7.2f} {r['ratio']:>6.3f} "
            f"{r['overhead_us_per_row']:>6.1f} {r['memory_ratio']:>5.2f} {r.get('defaults_solve_s', math.nan):>7.2f} "
            f"{r.get('speedup_vs_defaults', math.nan):>6.2f} {r['objective_rel_diff']:>8.1e}"
        )
    if exponent:
        print(f"build time ~ (years x hours)^{exponent['exponent']:.2f} over {exponent['points']} sizes")


if __name__ == "__main__":
    sys.exit(main())
