"""The pathway LP as a Pyomo ``ConcreteModel``: one ``Var`` component per variable family and one ``Constraint``
component per constraint family, each row built as a ``LinearExpression`` from the prepared sparse arrays (no
Set-filtered rules or per-element look-ups in the hot path)."""

from __future__ import annotations

import math

import numpy as np
import pyomo.environ as pyo
from pyomo.common.gc_manager import PauseGC
from pyomo.core.expr.numeric_expr import LinearExpression

from .linear_program import LinearProgram

__all__ = ["to_pyomo", "PyomoHandles"]


class PyomoHandles:
    """The Pyomo model with flat lists of its variables and constraints in the LP's column and row order."""

    def __init__(self, model: pyo.ConcreteModel, variables: list, constraints: list):
        self.model = model
        self.variables = variables
        self.constraints = constraints


def to_pyomo(lp: LinearProgram) -> PyomoHandles:
    matrix, row_lower, row_upper = lp.matrix()
    col_lower, col_upper = lp.column_bounds()
    cost = lp.cost_vector()
    model = pyo.ConcreteModel(name="pathcast")
    flat_vars: list = []
    with PauseGC():
        for block in lp.variables.values():
            var = pyo.Var(range(block.size), domain=pyo.Reals, dense=True)
            model.add_component(block.name, var)
            datas = list(var.values())
            lower = [None if math.isinf(v) else v for v in block.lower.tolist()]
            upper = [None if math.isinf(v) else v for v in block.upper.tolist()]
            for v, lo, hi in zip(datas, lower, upper, strict=True):
                v.setlb(lo)
                v.setub(hi)
            flat_vars.extend(datas)

        indptr = matrix.indptr.tolist()
        indices = matrix.indices.tolist()
        data = matrix.data.tolist()
        lower_all = row_lower.tolist()
        upper_all = row_upper.tolist()
        flat_cons: list = []
        start_row = 0
        for block in lp.row_blocks.values():
            n = block.size
            exprs = []
            for i in range(start_row, start_row + n):
                a, b = indptr[i], indptr[i + 1]
                expr = LinearExpression(constant=0.0, linear_coefs=data[a:b], linear_vars=[flat_vars[j] for j in indices[a:b]])
                lo = lower_all[i]
                hi = upper_all[i]
                exprs.append((None if lo == -math.inf else lo, expr, None if hi == math.inf else hi))
            con = pyo.Constraint(range(n), rule=lambda m, i, _e=exprs: _e[i])
            model.add_component(block.name, con)
            flat_cons.extend(con.values())
            start_row += n

        nz = np.flatnonzero(cost)
        objective = LinearExpression(constant=0.0, linear_coefs=cost[nz].tolist(),
                                     linear_vars=[flat_vars[j] for j in nz.tolist()])
        model.total_discounted_cost = pyo.Objective(expr=objective, sense=pyo.minimize)
    return PyomoHandles(model, flat_vars, flat_cons)
