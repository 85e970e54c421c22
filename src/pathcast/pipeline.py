"""Orchestration: scenario file -> inputs -> LP (plus users' rules) -> HiGHS -> RunResult, with stage times.

Compute only: nothing here prints or writes files (the CLI and writers do)."""

from __future__ import annotations

import platform
import time
from collections.abc import Callable, Sequence
from dataclasses import dataclass, field, replace
from importlib import metadata as importlib_metadata
from pathlib import Path

import numpy as np

from .errors import InfeasibleError, ScenarioError, SolverError
from .model.build import PathwayModel, build_linear_program
from .model.policy import PolicyValues
from .model.solution_values import read_solution
from .results.extract import headline_from_values, tables_from_values
from .results.run_result import RunResult
from .scenario.extensions import ExtensionSpec, extension_specs
from .scenario.inputs import ModelInputs, prepare_inputs
from .scenario.loader import LoadedScenario, load_scenario
from .scenario.plausibility import check_inputs
from .scenario.solver_options import SETTING_OPTIONS, check_solver_settings
from .solve import Solution, SolverOptions, find_conflict, solve_lp

__all__ = [
    "run_scenario",
    "solve_inputs",
    "check_optimal",
    "StageTimes",
    "Run",
    "solver_options_from",
    "package_versions",
    "overshoot_figures",
]

Progress = Callable[[str], None]


@dataclass
class StageTimes:
    """Seconds spent in each stage of one run."""

    load_s: float = 0.0
    build_lp_s: float = 0.0
    handoff_s: float = 0.0
    solve_s: float = 0.0
    extract_s: float = 0.0

    @property
    def total_s(self) -> float:
        return self.load_s + self.build_lp_s + self.handoff_s + self.solve_s + self.extract_s

    def as_dict(self) -> dict[str, float]:
        out = {k: round(v, 4) for k, v in self.__dict__.items()}
        out["total_s"] = round(self.total_s, 4)
        return out


@dataclass
class Run:
    """A finished run: the result plus what produced it (kept for analytics that re-solve)."""

    result: RunResult
    model: PathwayModel = field(repr=False)
    solution: Solution = field(repr=False)
    times: StageTimes


def package_versions() -> dict[str, str]:
    out = {"python": platform.python_version()}
    for name in (
        "pathcast",
        "pyomo",
        "highspy",
        "numpy",
        "pandas",
        "scipy",
        "pydantic",
        "pint",
        "matplotlib",
    ):
        try:
            out[name] = importlib_metadata.version(name)
        except importlib_metadata.PackageNotFoundError:
            out[name] = "not installed"
    return out


def solver_options_from(inputs: ModelInputs, override: dict | None = None) -> SolverOptions:
    settings = dict(inputs.solver)
    for key, value in (override or {}).items():
        if value is not None:
            settings[key] = value
    return SolverOptions(
        method=settings.get("method", "auto"),
        time_limit_s=settings.get("time_limit_s"),
        threads=settings.get("threads"),
        options=dict(settings.get("options") or {}),
        log=bool(settings.get("log", False)),
    )


def solve_inputs(
    inputs: ModelInputs,
    *,
    solver: dict | None = None,
    progress: Progress | None = None,
    times: StageTimes | None = None,
    input_hash: str = "",
    source: str = "",
    metadata: dict | None = None,
    require_optimal: bool = True,
) -> Run:
    """Build and solve the model of ``inputs``; raise InfeasibleError or SolverError unless it solves to optimality.

    ``inputs`` are first checked to be finite and plausible (:func:`~pathcast.scenario.plausibility.check_inputs`)
    and the solver settings against HiGHS's option list (:mod:`pathcast.scenario.solver_options`), both ScenarioError. An infeasible model raises InfeasibleError naming the scenario limits that conflict (HiGHS's
    irreducible infeasible subsystem, :mod:`pathcast.infeasibility`); an unbounded one (a cost that falls without
    limit) raises ScenarioError naming what lowers the cost."""
    say = progress or (lambda _message: None)
    times = times or StageTimes()
    check_inputs(inputs)
    options = solver_options_from(inputs, solver)
    settings = {"options": options.options, "threads": options.threads, "time_limit_s": options.time_limit_s}
    check_solver_settings(settings, lambda _path: source or f"scenario {inputs.name!r}")
    started = time.perf_counter()
    say("building the linear program" + (" and the extensions' rules" if inputs.extensions else ""))
    model = build_linear_program(inputs)
    matrix, _, _ = model.lp.matrix()
    times.build_lp_s = time.perf_counter() - started
    say(
        f"solving with HiGHS ({matrix.shape[0]:,} rows, {matrix.shape[1]:,} columns, {matrix.nnz:,} nonzeros)"
    )
    solution = solve_lp(model.lp, options)
    times.handoff_s = solution.handoff_s
    times.solve_s = solution.solve_s
    if require_optimal:
        check_optimal(model, solution, source or f"scenario {inputs.name!r}", say)
    started = time.perf_counter()
    say("reading results")
    values = read_solution(model, solution)
    tables = tables_from_values(values)
    summary = headline_from_values(values, tables)
    if inputs.budget_overshoot_price is not None:
        summary.update(overshoot_figures(values.policy, inputs.budget_overshoot_price))
    times.extract_s = time.perf_counter() - started
    highs = solution.highs
    info = highs.getInfo() if highs is not None else None
    manifest = {
        "scenario": inputs.name,
        "source": source,
        "input_hash": input_hash,
        "versions": package_versions(),
        "solver": {
            "name": "HiGHS",
            "status": solution.status,
            "method": solution.method,
            "options": solution.options,
            "objective_million": solution.objective,
            "iterations": solution.iterations,
            "primal_infeasibility": float(info.max_primal_infeasibility) if info else None,
            "dual_infeasibility": float(info.max_dual_infeasibility) if info else None,
        },
        "lp": {
            "rows": solution.rows,
            "columns": solution.columns,
            "nonzeros": solution.nonzeros,
            "coefficient_range": coefficient_ranges(matrix),
        },
        "stage_times_s": times.as_dict(),
    }
    result = RunResult.create(
        inputs.name,
        tables,
        summary,
        manifest,
        metadata or {"currency": inputs.currency, "price_year": inputs.price_year},
    )
    return Run(result=result, model=model, solution=solution, times=times)


def overshoot_figures(policy: PolicyValues, price: float) -> dict[str, float]:
    """The summary's figures of a priced budget overshoot: the overshoot [MtCO2], its price [currency/tCO2] and its
    cost [million currency of the price year, undiscounted, paid in the budget's last year]."""
    # solver tolerances leave no negative overshoot
    overshoot = max(0.0, float(policy.budget_overshoot_mtco2))
    return {
        "budget_overshoot_mtco2": overshoot,
        "budget_overshoot_price_per_tco2": float(price),
        "budget_overshoot_cost_million": overshoot * float(price),
    }


def check_optimal(model: PathwayModel, solution: Solution, where: str, say: Progress | None = None) -> None:
    """The one status check of every solve: return when ``solution`` is optimal; otherwise raise InfeasibleError
    naming the scenario limits that conflict (HiGHS's irreducible infeasible subsystem), ScenarioError for an
    unbounded model (naming what lowers the cost), or SolverError for a time limit or another stop."""
    if solution.status == "optimal":
        return
    if solution.status in ("infeasible", "unbounded_or_infeasible"):
        from .infeasibility import explain_no_optimum

        if say is not None:
            say("asking HiGHS which limits conflict")
        message, diagnosis, infeasible = explain_no_optimum(
            model, find_conflict(solution), solution.status, where
        )
        if infeasible:
            raise InfeasibleError(message, diagnosis=diagnosis)
        raise ScenarioError(message, file=where)
    raise SolverError(
        f"{where}: HiGHS stopped with status {solution.status!r} after {solution.solve_s:.1f} s; try another solver "
        "method (--method) or a longer time limit."
    )


def coefficient_ranges(matrix) -> dict[str, float]:
    data = np.abs(matrix.data)
    data = data[data > 0]
    if not len(data):
        return {"min": 0.0, "max": 0.0}
    return {"min": float(data.min()), "max": float(data.max())}


def run_scenario(
    scenario: str | Path | LoadedScenario,
    *,
    solver: dict | None = None,
    progress: Progress | None = None,
    inputs_hook: Callable[[ModelInputs], ModelInputs] | None = None,
    extensions: Sequence[ExtensionSpec] = (),
    budget_overshoot_price: float | None = None,
) -> Run:
    """Load (unless given loaded), validate, build and solve one scenario; ``extensions`` are applied after the
    scenario's own (``--extension`` on the command line).

    ``budget_overshoot_price`` [currency/tCO2] (``--allow-overshoot``) relaxes the carbon budget: emissions above it
    cost that price, paid in the budget's last year, and the summary gains the overshoot [MtCO2], its price and its
    cost [million currency] (:func:`overshoot_figures`). ScenarioError for a negative price or a scenario without a
    budget. ``inputs_hook`` sees the inputs last, just before the solve."""
    say = progress or (lambda _message: None)
    if budget_overshoot_price is not None and not budget_overshoot_price >= 0:
        raise ScenarioError(
            f"--allow-overshoot {budget_overshoot_price!r}: expected a price >= 0 [currency/tCO2]."
        )
    times = StageTimes()
    started = time.perf_counter()
    if isinstance(scenario, LoadedScenario):
        loaded = scenario
    else:
        say(f"reading {scenario}")
        loaded = load_scenario(scenario)
    check_solver_settings(loaded.scenario.solver.model_dump(), loaded.file_of)
    overrides = {
        key: value for key, value in (solver or {}).items() if key in SETTING_OPTIONS and value is not None
    }
    if overrides:
        check_solver_settings(overrides, lambda _path: "command line", prefix=())
    inputs = prepare_inputs(loaded.scenario)
    check_inputs(inputs, loaded)
    rules = (*extension_specs(loaded), *extensions)
    if rules:
        inputs = replace(inputs, extensions=rules)
    if budget_overshoot_price is not None:
        if inputs.budget_mt is None:
            raise ScenarioError(
                f"{loaded.path}: policy.carbon_budget: got none; expected a carbon budget for --allow-overshoot "
                "to relax.",
                file=str(loaded.path),
                field="policy.carbon_budget",
            )
        inputs = replace(inputs, budget_overshoot_price=float(budget_overshoot_price))
    if inputs_hook is not None:
        inputs = inputs_hook(inputs)
    times.load_s = time.perf_counter() - started
    meta = loaded.scenario.metadata
    metadata = meta.model_dump()
    metadata["files"] = [str(p) for p in loaded.files]
    run = solve_inputs(
        inputs,
        solver=solver,
        progress=progress,
        times=times,
        input_hash=loaded.input_hash,
        source=str(loaded.path),
        metadata=metadata,
    )
    return _with_assumptions(run, loaded)


def _with_assumptions(run: Run, loaded: LoadedScenario) -> Run:
    """The run whose result carries the assumptions table of its loaded scenario (results.assumptions), so that
    reports of the result, or of its folder, need not read the scenario file again."""
    from .results.assumptions import ASSUMPTIONS_TABLE, assumptions_table

    r = run.result
    tables = {**r.tables, ASSUMPTIONS_TABLE: assumptions_table(loaded)}
    result = RunResult.create(r.scenario_name, tables, dict(r.summary), dict(r.manifest), dict(r.metadata))
    return replace(run, result=result)


def with_changes(inputs: ModelInputs, **changes) -> ModelInputs:
    """A copy of ``inputs`` with fields replaced (used by analytics that re-solve variants)."""
    return replace(inputs, **changes)
