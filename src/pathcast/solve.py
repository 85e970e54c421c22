"""Hand the array LP to HiGHS in memory (``LinearProgram.matrix()`` -> ``highspy.HighsLp``), solve, and read the
primal values and row duals back, in the LP's own column and row order: the one solve path of pathcast.

Duals follow the usual sign convention of a minimisation: a binding ``<=`` row has a dual <= 0, a binding ``>=`` row
a dual >= 0. They are the change of the total discounted cost [million currency] per unit of the row's right-hand side.
"""

from __future__ import annotations

import math
import time
from dataclasses import dataclass, field

import highspy
import numpy as np

from .errors import SolverError
from .model.linear_program import LinearProgram
from .scenario.solver_options import highs_value, quiet_highs
from .solver_methods import METHODS

__all__ = [
    "SolverOptions",
    "Solution",
    "Conflict",
    "solve_lp",
    "highs_lp",
    "highs_basis",
    "basis_arrays",
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
    highs: highspy.Highs | None = field(repr=False, default=None)  # kept for find_conflict
    warm_start: bool = False  # True when HiGHS started from a given basis
    basis: tuple[np.ndarray, np.ndarray] | None = field(repr=False, default=None)  # kept when asked for


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


def highs_lp(lp: LinearProgram) -> highspy.HighsLp:
    """The HiGHS model of the array LP, column by column (CSC), in the LP's own row and column order."""
    matrix, row_lower, row_upper = lp.matrix()
    col_lower, col_upper = lp.column_bounds()
    csc = matrix.tocsc()
    model = highspy.HighsLp()
    model.num_col_, model.num_row_ = int(matrix.shape[1]), int(matrix.shape[0])
    model.col_cost_ = lp.cost_vector()
    model.col_lower_ = col_lower
    model.col_upper_ = col_upper
    model.row_lower_ = row_lower
    model.row_upper_ = row_upper
    model.a_matrix_.format_ = highspy.MatrixFormat.kColwise
    model.a_matrix_.start_ = csc.indptr
    model.a_matrix_.index_ = csc.indices
    model.a_matrix_.value_ = csc.data
    return model


def highs_basis(arrays: tuple[np.ndarray, np.ndarray]) -> highspy.HighsBasis:
    """A HiGHS basis from column and row status arrays (as :func:`basis_arrays` returns them)."""
    basis = highspy.HighsBasis()
    status = highspy.HighsBasisStatus
    basis.col_status = [status(int(v)) for v in arrays[0]]
    basis.row_status = [status(int(v)) for v in arrays[1]]
    basis.valid = True
    return basis


def basis_arrays(h: highspy.Highs) -> tuple[np.ndarray, np.ndarray]:
    """The column and row statuses of HiGHS's current basis, as small integer arrays (kept between solves)."""
    basis = h.getBasis()
    return (
        np.array([int(v) for v in basis.col_status], dtype=np.int8),
        np.array([int(v) for v in basis.row_status], dtype=np.int8),
    )


def solve_lp(
    lp: LinearProgram,
    options: SolverOptions,
    *,
    basis: tuple[np.ndarray, np.ndarray] | None = None,
    keep_basis: bool = False,
) -> Solution:
    """Solve the array LP with HiGHS: the one solve path of pathcast (runs, analyses and ensemble members).

    ``basis`` (column and row statuses of an earlier optimum of an LP of the same shape) warm-starts dual simplex;
    with a basis the method is simplex whatever ``options.method`` says. ``keep_basis`` returns the optimal basis in
    ``Solution.basis`` for later warm starts. The status is not checked here: see
    :func:`pathcast.pipeline.check_optimal`."""
    started = time.perf_counter()
    model = highs_lp(lp)
    h = new_highs(log=options.log)
    warm = basis is not None and (len(basis[0]), len(basis[1])) == (model.num_col_, model.num_row_)
    method = "simplex" if warm else options.method
    highs_opts = highs_options_for(method, model.num_row_)
    if options.time_limit_s:
        highs_opts["time_limit"] = float(options.time_limit_s)
    if options.threads:
        highs_opts["threads"] = int(options.threads)
    highs_opts.update(options.options)
    for key, value in highs_opts.items():
        option_status = h.setOptionValue(key, highs_value(h, key, value))
        if option_status == highspy.HighsStatus.kError:
            raise SolverError(
                f"solver options: got {key!r} = {value!r}; expected a HiGHS option name and a value HiGHS accepts "
                "(check them with 'pathcast check')."
            )
    h.passModel(model)
    if warm and basis is not None:
        warm = h.setBasis(highs_basis(basis)) == highspy.HighsStatus.kOk
    if int(h.getOptionValue("threads")[1]) != 0:
        # HiGHS keeps one thread scheduler per process, sized by the first solve; a solve that asks for another
        # number of threads is refused (status "not set") until that scheduler is reset. pathcast solves one LP at
        # a time in a process, so resetting here is safe.
        highspy.Highs.resetGlobalScheduler(True)
    handoff_s = time.perf_counter() - started
    started = time.perf_counter()
    h.run()
    solve_s = time.perf_counter() - started
    status = _status_name(h.getModelStatus())
    info = h.getInfo()
    iterations = {
        "simplex": int(info.simplex_iteration_count),
        "ipm": int(info.ipm_iteration_count),
        "crossover": int(info.crossover_iteration_count),
    }
    x = np.zeros(model.num_col_)
    duals = np.zeros(model.num_row_)
    objective = math.nan
    if status == "optimal":
        sol = h.getSolution()
        x = np.asarray(sol.col_value, dtype=float)
        if sol.dual_valid:
            duals = np.asarray(sol.row_dual, dtype=float)
        objective = float(info.objective_function_value)
    return Solution(
        status=status,
        objective=objective,
        x=x,
        row_dual=duals,
        method=method,
        options=highs_opts,
        handoff_s=handoff_s,
        solve_s=solve_s,
        rows=model.num_row_,
        columns=model.num_col_,
        nonzeros=len(model.a_matrix_.value_),
        iterations=iterations,
        highs=h,
        warm_start=bool(warm),
        basis=basis_arrays(h) if keep_basis and status == "optimal" else None,
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
    row_map = np.arange(h.getNumRow())  # HiGHS holds the LP in its own order
    col_map = np.arange(h.getNumCol())
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
        ray = h.getPrimalRay()  # type: ignore[attr-defined]  # in highspy at run time; its 1.16 stubs omit it
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
