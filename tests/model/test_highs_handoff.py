"""The one solve path hands the array LP to HiGHS column by column: the HighsLp must hold exactly the LP's costs,
bounds and coefficients in the LP's own order, and the solution must satisfy the LP (checks of the hand-off itself;
the optimum is checked against an independent scipy.optimize.linprog formulation in test_linprog_reference.py).
Tolerances: HiGHS's default primal and dual feasibility tolerances, 1e-7 (HiGHS documentation, option list)."""

from __future__ import annotations

import numpy as np

from pathcast.model.build import build_linear_program
from pathcast.scenario.inputs import prepare_inputs
from pathcast.scenario.loader import load_scenario
from pathcast.solve import SolverOptions, basis_arrays, highs_lp, solve_lp
from tests.conftest import DATA


def _model():
    return build_linear_program(prepare_inputs(load_scenario(DATA / "tiny.yaml").scenario))


def test_highs_lp_holds_the_lp_in_its_own_order():
    model = _model()
    matrix, row_lower, row_upper = model.lp.matrix()
    col_lower, col_upper = model.lp.column_bounds()
    h = highs_lp(model.lp)
    assert (h.num_row_, h.num_col_) == matrix.shape
    np.testing.assert_array_equal(np.asarray(h.col_cost_), model.lp.cost_vector())
    np.testing.assert_array_equal(np.asarray(h.col_lower_), col_lower)
    np.testing.assert_array_equal(np.asarray(h.col_upper_), col_upper)
    np.testing.assert_array_equal(np.asarray(h.row_lower_), row_lower)
    np.testing.assert_array_equal(np.asarray(h.row_upper_), row_upper)
    csc = matrix.tocsc()
    np.testing.assert_array_equal(np.asarray(h.a_matrix_.start_), csc.indptr)
    np.testing.assert_array_equal(np.asarray(h.a_matrix_.index_), csc.indices)
    np.testing.assert_array_equal(np.asarray(h.a_matrix_.value_), csc.data)


def test_the_solution_satisfies_the_lp_and_its_objective_is_the_cost_of_x():
    model = _model()
    solution = solve_lp(model.lp, SolverOptions(method="simplex"))
    assert solution.status == "optimal"
    matrix, row_lower, row_upper = model.lp.matrix()
    col_lower, col_upper = model.lp.column_bounds()
    x = solution.x
    activity = matrix @ x
    scale = 1e-7 * np.maximum(1.0, np.abs(activity))
    assert np.all(activity >= row_lower - scale) and np.all(activity <= row_upper + scale)
    assert np.all(x >= col_lower - 1e-7) and np.all(x <= col_upper + 1e-7)
    cost = float(model.lp.cost_vector() @ x)
    assert abs(cost - solution.objective) <= 1e-9 * abs(solution.objective)


def test_a_basis_kept_from_one_solve_warm_starts_the_next():
    model = _model()
    first = solve_lp(model.lp, SolverOptions(method="simplex"), keep_basis=True)
    assert first.basis is not None and len(first.basis[0]) == first.columns
    again = solve_lp(model.lp, SolverOptions(method="simplex"), basis=first.basis)
    assert again.warm_start and again.status == "optimal"
    assert again.iterations["simplex"] <= 1  # started at the optimum (HiGHS may take one step to confirm it)
    assert abs(again.objective - first.objective) <= 1e-9 * abs(first.objective)
    assert np.array_equal(basis_arrays(again.highs)[0], first.basis[0])
