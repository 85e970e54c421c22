"""The Pyomo route (array LP -> Pyomo model -> standard-form compiler -> HighsLp) against the bare array LP passed
straight to highspy from ``LinearProgram.matrix()``: an independent check of the hand-off. The objectives must agree
to 1e-7 relative (common practice for an LP solved twice to HiGHS's default tolerances, no source)."""

from __future__ import annotations

import highspy
import numpy as np

from pathcast.model.build import build_linear_program
from pathcast.model.pyomo_model import to_pyomo
from pathcast.scenario.inputs import prepare_inputs
from pathcast.scenario.loader import load_scenario
from pathcast.solve import SolverOptions, solve_highs
from tests.conftest import DATA


def _bare_objective(lp) -> float:
    """Solve the arrays of ``lp`` with highspy directly: no Pyomo object is involved."""
    matrix, row_lower, row_upper = lp.matrix()
    col_lower, col_upper = lp.column_bounds()
    csc = matrix.tocsc()
    h = highspy.Highs()
    h.setOptionValue("output_flag", False)
    model = highspy.HighsLp()
    model.num_col_, model.num_row_ = matrix.shape[1], matrix.shape[0]
    model.col_cost_ = lp.cost_vector()
    model.col_lower_, model.col_upper_ = col_lower, col_upper
    model.row_lower_, model.row_upper_ = row_lower, row_upper
    model.a_matrix_.format_ = highspy.MatrixFormat.kColwise
    model.a_matrix_.start_ = csc.indptr
    model.a_matrix_.index_ = csc.indices
    model.a_matrix_.value_ = csc.data
    h.passModel(model)
    h.run()
    assert h.getModelStatus() == highspy.HighsModelStatus.kOptimal
    return float(h.getInfo().objective_function_value)


def test_pyomo_route_matches_bare_array_lp_on_tiny():
    inputs = prepare_inputs(load_scenario(DATA / "tiny.yaml").scenario)
    model = build_linear_program(inputs)
    matrix, _, _ = model.lp.matrix()
    solution = solve_highs(
        to_pyomo(model.lp), matrix.shape[0], matrix.shape[1], SolverOptions(method="simplex")
    )
    assert solution.status == "optimal"
    assert (solution.rows, solution.columns, solution.nonzeros) == (
        matrix.shape[0],
        matrix.shape[1],
        matrix.nnz,
    )
    bare = _bare_objective(model.lp)
    assert abs(solution.objective - bare) <= 1e-7 * abs(bare)


def test_handoff_keeps_lp_order_and_bounds_on_tiny():
    inputs = prepare_inputs(load_scenario(DATA / "tiny.yaml").scenario)
    model = build_linear_program(inputs)
    from pathcast.solve import handoff

    matrix, row_lower, row_upper = model.lp.matrix()
    highs_lp, col_map, row_map = handoff(to_pyomo(model.lp), *matrix.shape)
    col_lower, col_upper = model.lp.column_bounds()
    np.testing.assert_array_equal(np.asarray(highs_lp.col_lower_), col_lower[col_map])
    np.testing.assert_array_equal(np.asarray(highs_lp.col_upper_), col_upper[col_map])
    np.testing.assert_allclose(np.asarray(highs_lp.col_cost_), model.lp.cost_vector()[col_map], rtol=1e-15)
    lower = np.asarray(highs_lp.row_lower_)
    upper = np.asarray(highs_lp.row_upper_)
    np.testing.assert_array_equal(lower, row_lower[row_map])
    np.testing.assert_array_equal(upper, row_upper[row_map])
