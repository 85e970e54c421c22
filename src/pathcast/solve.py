"""Hand the Pyomo model to HiGHS in memory (Pyomo's standard-form compiler -> ``highspy.HighsLp``), solve, and read
the primal values and row duals back in the LP's own column and row order.

Duals follow the usual sign convention of a minimisation: a binding ``<=`` row has a dual <= 0, a binding ``>=`` row
a dual >= 0. They are the change of the total discounted cost [million currency] per unit of the row's right-hand side.
"""

from __future__ import annotations

import math
import time
from dataclasses import dataclass, field

import highspy
import numpy as np
from pyomo.common.gc_manager import PauseGC
from pyomo.repn.plugins.standard_form import LinearStandardFormCompiler

from .errors import SolverError
from .model.pyomo_model import PyomoHandles
from .scenario.solver_options import highs_value, quiet_highs
from .solver_methods import METHODS

__all__ = [
    "SolverOptions",
    "Solution",
    "Conflict",
    "handoff",
    "solve_highs",
    "highs_options_for",
    "new_highs",
    "find_conflict",
    "METHODS",
    "CONFLICT_TIME_LIMIT_S",
]

# time HiGHS may spend looking for an irreducible infeasible subsystem of an infeasible LP [s] (common practice, no
# source: a diagnosis should not take longer than a national solve)
CONFLICT_TIME_LIMIT_S = 120.0


@dataclass(frozen=True)
class SolverOptions:
    method: str = "auto"
    time_limit_s: float | None = None
    threads: int | None = None
    options: dict = field(default_factory=dict)
    log: bool = False


@dataclass
class Solution:
    status: str  # "optimal", "infeasible", "unbounded", "time_limit", "error: ..."
    objective: float  # [million currency], discounted
    x: np.ndarray  # primal values, LP column order
    row_dual: np.ndarray  # LP row order
    method: str
    options: dict
    handoff_s: float
    solve_s: float
    rows: int
    columns: int
    nonzeros: int
    iterations: dict
    highs: object = field(repr=False, default=None)
    row_map: np.ndarray | None = field(repr=False, default=None)  # LP row of each HiGHS row
    col_map: np.ndarray | None = field(repr=False, default=None)  # LP column of each HiGHS column


def highs_options_for(method: str, n_rows: int) -> dict:
    """HiGHS options for a method; ``auto`` is the choice measured best on pathcast's own LPs.

    ``auto``: dual simplex with HiGHS's "max value" scaling (``simplex_scale_strategy`` 4) at every size. Measured in
    benchmarks/RESULTS.md side by side on the same MPS files: about 1.3-1.6x faster than HiGHS's defaults (dual
    simplex, equilibration scaling), while the interior-point solver (IPX) stalls on these LPs after presolve
    ("no progress"; with crossover on, HiGHS then falls back to simplex, so IPM + crossover is never faster), and
    PDLP is several times slower and only to 1e-4-level accuracy. Simplex ends at a vertex, so the row duals (hourly
    electricity prices, the carbon shadow price) are exact and always valid.

    ``ipm`` (no crossover) returns duals of an interior point: valid as prices only when HiGHS reports the model
    optimal (``dual_valid``); pathcast reads duals only from an optimal solution."""
    if method == "auto":
        method = "simplex"
    if method == "simplex":
        return {"solver": "simplex", "simplex_strategy": 1, "simplex_scale_strategy": 4}
    if method == "ipm":
        return {"solver": "ipm", "run_crossover": "off"}
    if method == "ipm-crossover":
        return {"solver": "ipm", "run_crossover": "on"}
    if method == "pdlp":
        return {"solver": "pdlp"}
    raise SolverError(f"solver method {method!r} is not one of {list(METHODS)}.")


def handoff(handles: PyomoHandles, n_rows: int, n_cols: int):
    """Compile the Pyomo model to standard form and fill a HighsLp; return it with the row and column maps.

    The compiler is given the ``Var`` components (one per block, in LP order) as its column order: it then keeps the
    LP's column order without a per-variable look-up. Rows come out in the order the ``Constraint`` components were
    declared, which is the LP's row order; both orders are checked object by object (identity), and only if they
    differ (a row or column dropped, e.g. an empty row) are the maps built by look-up."""
    with PauseGC():  # the compiler makes a few objects per row; no cyclic GC passes while it runs
        compiled = LinearStandardFormCompiler().write(
            handles.model, mixed_form=True, column_order=handles.var_components or handles.variables
        )
        return _fill_highs_lp(handles, compiled)


def _fill_highs_lp(handles: PyomoHandles, compiled):
    """The HighsLp of a compiled standard form, with the row and column maps (see handoff)."""
    columns = compiled.columns
    if len(columns) == len(handles.variables) and all(
        a is b for a, b in zip(columns, handles.variables, strict=True)
    ):
        col_map = np.arange(len(columns), dtype=np.int64)
    else:
        position = {id(v): i for i, v in enumerate(handles.variables)}
        col_map = np.fromiter((position[id(v)] for v in columns), dtype=np.int64, count=len(columns))
    row_cons = [c for c, _ in compiled.rows]
    if len(row_cons) == len(handles.constraints) and all(
        a is b for a, b in zip(row_cons, handles.constraints, strict=True)
    ):
        row_map = np.arange(len(row_cons), dtype=np.int64)
    else:
        row_position = {id(c): i for i, c in enumerate(handles.constraints)}
        row_map = np.fromiter((row_position[id(c)] for c in row_cons), dtype=np.int64, count=len(row_cons))
    senses = np.fromiter((s for _, s in compiled.rows), dtype=np.int64, count=len(compiled.rows))

    # mixed form: sense 1 is "<= rhs", 0 is "== rhs", -1 is ">= rhs" (coefficients as written)
    A = compiled.A.tocsc()
    rhs = np.asarray(compiled.rhs, dtype=float)
    lower = np.where(senses <= 0, rhs, -math.inf)
    upper = np.where(senses >= 0, rhs, math.inf)

    lp = highspy.HighsLp()
    lp.num_col_ = len(columns)
    lp.num_row_ = len(compiled.rows)
    cost = np.asarray(compiled.c.todense()).ravel() if compiled.c.shape[0] else np.zeros(lp.num_col_)
    lp.col_cost_ = cost
    bounds = [v.bounds for v in columns]
    lp.col_lower_ = np.fromiter(
        (-math.inf if b[0] is None else b[0] for b in bounds), dtype=float, count=len(bounds)
    )
    lp.col_upper_ = np.fromiter(
        (math.inf if b[1] is None else b[1] for b in bounds), dtype=float, count=len(bounds)
    )
    lp.row_lower_ = lower
    lp.row_upper_ = upper
    lp.a_matrix_.format_ = highspy.MatrixFormat.kColwise
    lp.a_matrix_.start_ = A.indptr
    lp.a_matrix_.index_ = A.indices
    lp.a_matrix_.value_ = A.data
    lp.offset_ = float(compiled.c_offset[0]) if len(compiled.c_offset) else 0.0
    return lp, col_map, row_map


def solve_highs(
    handles: PyomoHandles, n_rows: int, n_cols: int, options: SolverOptions, release_model: bool = True
) -> Solution:
    """Hand the model to HiGHS and solve it. With ``release_model`` (the default) the Pyomo model in ``handles`` is
    released once HiGHS holds the LP (``handles.release()``), which lowers the peak memory of a run; pass False to
    keep using the Pyomo model afterwards."""
    started = time.perf_counter()
    try:
        lp, col_map, row_map = handoff(handles, n_rows, n_cols)
    finally:
        if release_model:
            handles.release()  # also undoes the build's gc.freeze(), on success or failure
    h = new_highs(log=options.log)
    highs_opts = highs_options_for(options.method, lp.num_row_)
    if options.time_limit_s:
        highs_opts["time_limit"] = float(options.time_limit_s)
    if options.threads:
        highs_opts["threads"] = int(options.threads)
    highs_opts.update(options.options)
    for key, value in highs_opts.items():
        status = h.setOptionValue(key, highs_value(h, key, value))
        if status == highspy.HighsStatus.kError:
            raise SolverError(
                f"solver options: got {key!r} = {value!r}; expected a HiGHS option name and a value HiGHS accepts "
                "(check them with 'pathcast check')."
            )
    h.passModel(lp)
    if int(h.getOptionValue("threads")[1]) != 0:
        # HiGHS keeps one thread scheduler per process, sized by the first solve; a solve that asks for another
        # number of threads is refused (status "not set") until that scheduler is reset. pathcast solves one LP at
        # a time in a process, so resetting here is safe.
        highspy.Highs.resetGlobalScheduler(True)
    handoff_s = time.perf_counter() - started
    started = time.perf_counter()
    h.run()
    solve_s = time.perf_counter() - started
    model_status = h.getModelStatus()
    status = _status_name(model_status)
    info = h.getInfo()
    iterations = {
        "simplex": int(info.simplex_iteration_count),
        "ipm": int(info.ipm_iteration_count),
        "crossover": int(info.crossover_iteration_count),
    }
    x = np.zeros(n_cols)
    duals = np.zeros(n_rows)
    objective = math.nan
    if status == "optimal":
        sol = h.getSolution()
        x[col_map] = np.asarray(sol.col_value)
        if sol.dual_valid:
            duals[row_map] = np.asarray(sol.row_dual)
        objective = float(info.objective_function_value)
    return Solution(
        status=status,
        objective=objective,
        x=x,
        row_dual=duals,
        method=options.method,
        options=highs_opts,
        handoff_s=handoff_s,
        solve_s=solve_s,
        rows=lp.num_row_,
        columns=lp.num_col_,
        nonzeros=len(lp.a_matrix_.value_),
        iterations=iterations,
        highs=h,
        row_map=row_map,
        col_map=col_map,
    )


def new_highs(log: bool = False) -> highspy.Highs:
    """A HiGHS instance; its start-up banner (printed from C++ to standard output) is kept off the screen unless
    ``log`` is asked for."""
    return quiet_highs(log)


@dataclass(frozen=True)
class Conflict:
    """Why HiGHS found no optimum, in the LP's own row and column numbers.

    kind: 'infeasible' (``rows`` and ``columns`` form an irreducible infeasible subsystem: dropping any one of them
    makes the rest feasible), 'unbounded' (``columns`` carry a primal ray along which the cost falls without limit)
    or 'unknown' (HiGHS gave neither). ``column_sides`` says which bound of each IIS column takes part: 'lower',
    'upper' or 'both'."""

    kind: str
    rows: np.ndarray = field(default_factory=lambda: np.zeros(0, dtype=np.int64))
    columns: np.ndarray = field(default_factory=lambda: np.zeros(0, dtype=np.int64))
    column_sides: tuple[str, ...] = ()
    ray: np.ndarray = field(default_factory=lambda: np.zeros(0))  # ray values of ``columns`` (unbounded)


def find_conflict(solution: Solution, time_limit_s: float = CONFLICT_TIME_LIMIT_S) -> Conflict:
    """Ask HiGHS why ``solution`` (infeasible or unbounded) has no optimum: an irreducible infeasible subsystem
    (HiGHS's ``getIis``, first its light test, then from the LP) or, for an unbounded model, its primal ray."""
    h = solution.highs
    if h is None:
        return Conflict("unknown")
    MS = highspy.HighsModelStatus
    row_map = solution.row_map if solution.row_map is not None else np.arange(h.getNumRow())
    col_map = solution.col_map if solution.col_map is not None else np.arange(h.getNumCol())
    h.setOptionValue("iis_time_limit", float(time_limit_s))
    strategies = (int(highspy.IisStrategy.kIisStrategyLight), int(highspy.IisStrategy.kIisStrategyFromLp))
    for strategy in strategies:
        h.setOptionValue("iis_strategy", strategy)
        try:
            status, iis = h.getIis()
        except RuntimeError:  # pragma: no cover - HiGHS raised inside its IIS search
            break
        if h.getModelStatus() in (MS.kUnbounded,):
            break
        rows = np.asarray(iis.row_index_, dtype=np.int64)
        cols = np.asarray(iis.col_index_, dtype=np.int64)
        if status != highspy.HighsStatus.kError and iis.valid_ and (rows.size or cols.size):
            return Conflict(
                "infeasible",
                rows=row_map[rows],
                columns=col_map[cols],
                column_sides=tuple(_bound_side(b) for b in iis.col_bound_),
            )
    if h.getModelStatus() in (MS.kUnbounded, MS.kUnboundedOrInfeasible):
        ray = h.getPrimalRay()
        if len(ray) == 3 and ray[1]:
            values = np.asarray(ray[2], dtype=float)
            used = np.flatnonzero(np.abs(values) > 1e-9)
            return Conflict("unbounded", columns=col_map[used], ray=values[used])
        if h.getModelStatus() == MS.kUnbounded:
            return Conflict("unbounded")
    return Conflict("unknown")


def _bound_side(status) -> str:
    """'lower', 'upper' or 'both' for an IIS bound status (HiGHS's IisBoundStatus)."""
    code = int(status)
    if code == int(highspy.IisBoundStatus.kIisBoundStatusLower):
        return "lower"
    if code == int(highspy.IisBoundStatus.kIisBoundStatusUpper):
        return "upper"
    return "both"


def _status_name(status) -> str:
    MS = highspy.HighsModelStatus
    if status == MS.kOptimal:
        return "optimal"
    if status in (MS.kInfeasible,):
        return "infeasible"
    if status in (MS.kUnbounded, MS.kUnboundedOrInfeasible):
        return "unbounded_or_infeasible"
    if status == MS.kTimeLimit:
        return "time_limit"
    if status == MS.kIterationLimit:
        return "iteration_limit"
    return f"error: {status}"
