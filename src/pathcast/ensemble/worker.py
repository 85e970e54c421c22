"""Solve one member inside a worker process and send back only a compact, JSON-ready record (headline figures,
yearly emissions, capacity by technology and year, carbon price path, times) -- never a model object.

Fast re-solves. Members share the LP's structure: when a member's constraint matrix equals the base scenario's (only
costs, column bounds and row bounds differ -- prices, capex, learning rates, demand, budgets), the worker reuses the
base's HiGHS model built once per worker process (:class:`BaseTemplate`: the base LP through
``build_linear_program`` -> ``to_pyomo`` -> ``solve.handoff``) and only replaces its cost and bound arrays, skipping
the Pyomo model and the standard-form hand-off. Each member then starts the dual simplex from the base scenario's
optimal basis (``Highs.setBasis``). Every member starts from the same base basis in a fresh ``Highs`` instance, so
its result does not depend on which worker solved it or in what order. A member whose matrix differs is rebuilt
through Pyomo and, when the dimensions agree, still warm-started.

This repeats the few lines of :func:`pathcast.solve.solve_highs` that set options and read the solution, because
that function has no way to pass a basis in; the maths (LP, hand-off, extraction) is the project's own.
"""

from __future__ import annotations

import copy
import math
import time
from dataclasses import dataclass, field
from typing import Any

import highspy
import numpy as np

from ..errors import InfeasibleError, PathcastError, ScenarioError, SolverError
from ..model.build import build_linear_program
from ..model.pyomo_model import to_pyomo
from ..pipeline import solver_options_from
from ..results.extract import extract_tables, headline_figures
from ..scenario.inputs import prepare_inputs
from ..scenario.loader import load_scenario_mapping
from ..scenario.plausibility import check_inputs
from ..solve import Solution, SolverOptions, _status_name, handoff, highs_options_for, new_highs
from .members import Override, apply_overrides
from .validity import member_error

__all__ = [
    "SharedContext",
    "MemberTask",
    "BaseTemplate",
    "solve_member",
    "solve_base",
    "compact_result",
    "basis_arrays",
    "MEMBER_THREADS",
]

MEMBER_THREADS = 1  # HiGHS threads per member: the ensemble runs members in parallel, one per worker process


@dataclass(frozen=True)
class SharedContext:
    """What every member needs, sent to each worker once (dask scatter): the base scenario and its optimal basis."""

    base_raw: dict
    base_path: str
    base_hash: str
    provenance: dict
    files: tuple
    warm_start: bool
    basis: tuple[np.ndarray, np.ndarray] | None = None  # HiGHS column and row statuses of the base's optimum
    ensemble_file: str = ""  # for the sentence of a member that fails validation
    input_paths: dict[str, str] = field(default_factory=dict)  # input label -> dotted field path


@dataclass(frozen=True)
class MemberTask:
    hash: str
    samples: dict[str, Any]
    overrides: tuple[Override, ...]


class BaseTemplate:
    """The base scenario's HiGHS model in standard form, kept per worker process and reused by every member whose
    constraint matrix is the same."""

    def __init__(self, context: SharedContext):
        loaded = load_scenario_mapping(
            copy.deepcopy(context.base_raw),
            context.base_path,
            provenance=context.provenance,
            files=context.files,
        )
        model = build_linear_program(prepare_inputs(loaded.scenario))
        matrix, row_lower, row_upper = model.lp.matrix()
        handles = to_pyomo(model.lp)
        self.lp, self.col_map, self.row_map = handoff(handles, *matrix.shape)
        self.shape = matrix.shape
        self.indptr, self.indices, self.data = matrix.indptr.copy(), matrix.indices.copy(), matrix.data.copy()
        self.lower_finite, self.upper_finite = np.isfinite(row_lower), np.isfinite(row_upper)
        self.equal = row_lower == row_upper
        self.highs_lower_finite = np.isfinite(np.asarray(self.lp.row_lower_))
        self.highs_upper_finite = np.isfinite(np.asarray(self.lp.row_upper_))
        self.unmapped = np.ones(matrix.shape[1], dtype=bool)
        self.unmapped[self.col_map] = False
        self.basis = _highs_basis(context.basis) if context.basis is not None else None

    def adapt(self, lp_arrays) -> tuple[Any, np.ndarray, np.ndarray] | None:
        """The base HiGHS model with this member's costs and bounds, or None when the member's structure differs."""
        lp, matrix, row_lower, row_upper = lp_arrays
        if matrix.shape != self.shape or not (
            np.array_equal(matrix.indptr, self.indptr)
            and np.array_equal(matrix.indices, self.indices)
            and np.array_equal(matrix.data, self.data)
        ):
            return None
        if not (
            np.array_equal(np.isfinite(row_lower), self.lower_finite)
            and np.array_equal(np.isfinite(row_upper), self.upper_finite)
            and np.array_equal(row_lower == row_upper, self.equal)
        ):
            return None
        cost = lp.cost_vector()
        if np.any(cost[self.unmapped] != 0):
            return None
        col_lower, col_upper = lp.column_bounds()
        hl = self.lp
        hl.col_cost_ = cost[self.col_map]
        hl.col_lower_ = col_lower[self.col_map]
        hl.col_upper_ = col_upper[self.col_map]
        hl.row_lower_ = np.where(self.highs_lower_finite, row_lower[self.row_map], -math.inf)
        hl.row_upper_ = np.where(self.highs_upper_finite, row_upper[self.row_map], math.inf)
        return hl, self.col_map, self.row_map


_TEMPLATES: dict[str, BaseTemplate] = {}


def _template(context: SharedContext) -> BaseTemplate:
    template = _TEMPLATES.get(context.base_hash)
    if template is None:
        _TEMPLATES.clear()  # one ensemble at a time per worker
        template = _TEMPLATES[context.base_hash] = BaseTemplate(context)
    return template


def _highs_basis(arrays: tuple[np.ndarray, np.ndarray]):
    basis = highspy.HighsBasis()
    status = highspy.HighsBasisStatus
    basis.col_status = [status(int(v)) for v in arrays[0]]
    basis.row_status = [status(int(v)) for v in arrays[1]]
    basis.valid = True
    return basis


def basis_arrays(h) -> tuple[np.ndarray, np.ndarray]:
    basis = h.getBasis()
    return (
        np.array([int(v) for v in basis.col_status], dtype=np.int8),
        np.array([int(v) for v in basis.row_status], dtype=np.int8),
    )


def _options(options: SolverOptions, n_rows: int, warm: bool) -> dict:
    opts = highs_options_for("simplex" if warm else options.method, n_rows)
    if options.time_limit_s:
        opts["time_limit"] = float(options.time_limit_s)
    if options.threads:
        opts["threads"] = int(options.threads)
    elif _in_dask_worker():
        # one HiGHS thread per worker process; not in a serial run, where HiGHS's thread pool may already run with
        # more threads from an earlier solve in the same process and would refuse a smaller count
        opts["threads"] = MEMBER_THREADS
    opts.update(options.options)
    return opts


def _in_dask_worker() -> bool:
    try:
        from distributed import get_worker

        get_worker()
    except (ImportError, ValueError):
        return False
    return True


def _solve(context: SharedContext, task: MemberTask, *, warm_start: bool, keep_basis: bool = False) -> dict:
    times: dict[str, float] = {}
    record: dict[str, Any] = {"hash": task.hash, "samples": task.samples}
    clock = time.perf_counter()
    started = clock

    def lap(name: str) -> None:
        nonlocal clock
        now = time.perf_counter()
        times[name] = round(now - clock, 6)
        clock = now

    try:
        raw = apply_overrides(copy.deepcopy(context.base_raw), task.overrides)
        try:  # the member's scenario, validated as a scenario file would be, and its inputs finite and plausible
            loaded = load_scenario_mapping(
                raw, context.base_path, provenance=context.provenance, files=context.files
            )
            lap("validate_s")
            inputs = prepare_inputs(loaded.scenario)
            check_inputs(inputs, loaded)
            lap("inputs_s")
        except ScenarioError as error:
            if not task.samples or not context.ensemble_file:
                raise
            raise member_error(context.ensemble_file, context.input_paths, task.samples, error) from None
        model = build_linear_program(inputs)
        matrix, row_lower, row_upper = model.lp.matrix()
        lap("build_lp_s")
        options = solver_options_from(inputs)
        template = _template(context) if warm_start and context.basis is not None else None
        adapted = template.adapt((model.lp, matrix, row_lower, row_upper)) if template is not None else None
        if adapted is not None:
            hl, col_map, row_map = adapted
            path = "in_place"
        else:
            hl, col_map, row_map = handoff(to_pyomo(model.lp), *matrix.shape)
            path = "rebuilt"
        basis = None
        if (
            template is not None
            and template.basis is not None
            and (hl.num_col_, hl.num_row_) == (len(template.basis.col_status), len(template.basis.row_status))
        ):
            basis = template.basis
        h = new_highs(log=options.log)
        highs_opts = _options(options, hl.num_row_, warm=basis is not None)
        for key, value in highs_opts.items():
            if h.setOptionValue(key, value) == highspy.HighsStatus.kError:
                raise SolverError(f"HiGHS option {key!r} = {value!r} was refused; see the HiGHS option list.")
        h.passModel(hl)
        warm = basis is not None and h.setBasis(basis) == highspy.HighsStatus.kOk
        lap("handoff_s")
        h.run()
        lap("solve_s")
        status = _status_name(h.getModelStatus())
        info = h.getInfo()
        iterations = {
            "simplex": int(info.simplex_iteration_count),
            "ipm": int(info.ipm_iteration_count),
            "crossover": int(info.crossover_iteration_count),
        }
        record["solver"] = {
            "status": status,
            "path": path,
            "warm_start": bool(warm),
            "method": "simplex" if basis is not None else options.method,
            "iterations": iterations,
        }
        if status != "optimal":
            if status in ("infeasible", "unbounded_or_infeasible"):
                raise InfeasibleError(
                    f"scenario {inputs.name!r}: HiGHS reports the model {status.replace('_', ' ')}: the carbon budget, "
                    "caps, clean-electricity share, minimum builds and phase-outs cannot all be met together.",
                    diagnosis={"status": status},
                )
            raise SolverError(
                f"scenario {inputs.name!r}: HiGHS stopped with status {status!r} after "
                f"{times['solve_s']:.1f} s; try another solver method or a longer time limit."
            )
        sol = h.getSolution()
        x = np.zeros(matrix.shape[1])
        x[col_map] = np.asarray(sol.col_value)
        duals = np.zeros(matrix.shape[0])
        if sol.dual_valid:
            duals[row_map] = np.asarray(sol.row_dual)
        solution = Solution(
            status=status,
            objective=float(info.objective_function_value),
            x=x,
            row_dual=duals,
            method=record["solver"]["method"],
            options=highs_opts,
            handoff_s=times["handoff_s"],
            solve_s=times["solve_s"],
            rows=hl.num_row_,
            columns=hl.num_col_,
            nonzeros=len(hl.a_matrix_.value_),
            iterations=iterations,
        )
        tables = extract_tables(model, solution)
        summary = headline_figures(model, solution, tables)
        record.update(compact_result(tables, summary))
        record["status"] = "solved"
        if keep_basis:
            record["_basis"] = basis_arrays(h)
        lap("extract_s")
    except Exception as error:  # a failed member is recorded with its reason; the others go on
        record["status"] = "failed"
        record["error"] = {
            "type": type(error).__name__,
            "message": str(error),
            "deterministic": isinstance(error, PathcastError),
        }
    times["member_s"] = round(time.perf_counter() - started, 6)
    record["times"] = times
    return record


def solve_member(task: MemberTask, context: SharedContext) -> dict:
    """Build and solve one member (warm-started from the base when the context carries its basis)."""
    return _solve(context, task, warm_start=context.warm_start)


def solve_base(context: SharedContext) -> tuple[dict, tuple[np.ndarray, np.ndarray] | None]:
    """Solve the base scenario from scratch; return its record and its optimal basis (None if it failed)."""
    record = _solve(context, MemberTask(context.base_hash, {}, ()), warm_start=False, keep_basis=True)
    return record, record.pop("_basis", None)


def _number(value: Any) -> Any:
    if value is None:
        return None
    if isinstance(value, bool | np.bool_):
        return bool(value)
    if isinstance(value, int | np.integer):
        return int(value)
    if isinstance(value, float | np.floating):
        return float(value)
    if isinstance(value, dict):
        return {str(k): _number(v) for k, v in value.items()}
    return value


def compact_result(tables: dict, summary: dict) -> dict:
    """The small part of a run the ensemble keeps: headline figures, yearly emissions and carbon price, capacity."""
    et = tables["emissions_total"]
    cp = tables["carbon_price"].set_index("year").reindex(et["year"])
    cap = tables["capacity"]
    years = [int(y) for y in et["year"]]
    technologies = {}
    for name, frame in cap.groupby("technology", sort=False):
        frame = frame.set_index("year").reindex(years)
        technologies[str(name)] = {
            "kind": str(frame["kind"].iloc[0]),
            "capacity_mw": [round(float(v), 6) for v in frame["capacity_mw"]],
        }
    return {
        "headline": {k: _number(v) for k, v in summary.items()},
        "yearly": {
            "year": years,
            "emissions_mtco2": [float(v) for v in et["emissions_mtco2"]],
            "cumulative_mtco2": [float(v) for v in et["cumulative_mtco2"]],
            "cumulative_in_budget_period_mtco2": [float(v) for v in et["cumulative_in_budget_period_mtco2"]],
            "budget_mtco2": [float(v) for v in et["budget_mtco2"]],
            "carbon_price_per_tco2": [float(v) for v in cp["carbon_price_per_tco2"]],
        },
        "capacity": technologies,
    }
