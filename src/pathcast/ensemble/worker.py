"""Solve one member inside a worker process and send back only a compact, JSON-ready record (headline figures,
yearly emissions, capacity by technology and year, carbon price path, times) -- never a model object.

Every member goes through the project's one solve path (:func:`pathcast.solve.solve_lp` on the member's own array LP,
then :func:`pathcast.pipeline.check_optimal`), warm-started from the base scenario's optimal basis when the member's
LP has the base's dimensions: dual simplex then starts from that basis (``Highs.setBasis``). Every member starts from
the same base basis in a fresh ``Highs`` instance, so its result does not depend on which worker solved it or in what
order.
"""

from __future__ import annotations

import copy
import time
from dataclasses import dataclass, field, replace
from typing import Any

import numpy as np

from ..errors import PathcastError, ScenarioError
from ..model.build import build_linear_program
from ..pipeline import check_optimal, solver_options_from
from ..results.extract import extract_tables, headline_figures
from ..scenario.inputs import prepare_inputs
from ..scenario.loader import load_scenario_mapping
from ..scenario.plausibility import check_inputs
from ..solve import solve_lp
from .members import Override, apply_overrides
from .validity import member_error

__all__ = [
    "SharedContext",
    "MemberTask",
    "solve_member",
    "solve_base",
    "compact_result",
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
        lap("build_lp_s")
        options = solver_options_from(inputs)
        if options.threads is None and _in_dask_worker():
            # one HiGHS thread per worker process; not in a serial run, where HiGHS's thread pool may already run
            # with more threads from an earlier solve in the same process
            options = replace(options, threads=MEMBER_THREADS)
        basis = context.basis if warm_start else None
        solution = solve_lp(model.lp, options, basis=basis, keep_basis=keep_basis)
        times["handoff_s"] = round(solution.handoff_s, 6)
        times["solve_s"] = round(solution.solve_s, 6)
        clock = time.perf_counter()
        record["solver"] = {
            "status": solution.status,
            "warm_start": solution.warm_start,
            "method": solution.method,
            "iterations": solution.iterations,
        }
        check_optimal(model, solution, f"scenario {inputs.name!r}")
        tables = extract_tables(model, solution)
        summary = headline_figures(model, solution, tables)
        record.update(compact_result(tables, summary))
        record["status"] = "solved"
        if keep_basis and solution.basis is not None:
            record["_basis"] = solution.basis
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
