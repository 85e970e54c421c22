"""The pathway LP as a Pyomo ``ConcreteModel``: one ``Var`` component per variable family and one ``Constraint``
component per constraint family, each row a ``LinearExpression`` built from the prepared sparse arrays.

How the build is kept lean (measured in benchmarks/RESULTS.md; Pyomo's guidance on building expressions faster):

- everything runs inside ``PauseGC`` (no cyclic garbage collection while a few million objects are created);
- numbers enter Pyomo as Python floats (``tolist()``), never numpy scalars;
- variable bounds come from the domain where a whole block is non-negative, and only finite, non-default bounds are
  set one by one;
- the terms of all rows are made in one pass over the nonzeros (a bare variable where the coefficient is 1, else a
  monomial), and each row's ``LinearExpression`` takes its slice of that list as its arguments, with no further
  per-term work;
- a row family has one sense, so each row becomes its relational expression (``==``, ``<=`` or ``>=``) directly,
  without Pyomo converting a ``(lower, body, upper)`` tuple row by row.
"""

from __future__ import annotations

import gc
import math

import numpy as np
import pyomo.environ as pyo
from pyomo.common.gc_manager import PauseGC
from pyomo.core.expr.numeric_expr import LinearExpression, MonomialTermExpression
from pyomo.core.expr.relational_expr import EqualityExpression, InequalityExpression

from .linear_program import LinearProgram

__all__ = ["to_pyomo", "PyomoHandles"]


class PyomoHandles:
    """The Pyomo model with flat lists of its variables and constraints in the LP's column and row order.

    ``var_components`` and ``con_components`` are the ``Var`` and ``Constraint`` components in that same order (one
    per block), which is what the hand-off passes to Pyomo's compiler as the column order."""

    def __init__(
        self,
        model: pyo.ConcreteModel,
        variables: list,
        constraints: list,
        var_components: list | None = None,
        con_components: list | None = None,
    ):
        self.model = model
        self.variables = variables
        self.constraints = constraints
        self.var_components = var_components if var_components is not None else []
        self.con_components = con_components if con_components is not None else []

    def release(self) -> None:
        """Drop the Pyomo model and the lists (HiGHS holds its own copy of the LP once it is passed): at national
        size this frees a few hundred MB before the solve, whose working memory then comes on top of less."""
        model = self.model
        self.model = None
        self.variables = []
        self.constraints = []
        self.var_components = []
        self.con_components = []
        if model is not None:
            # a block refers to itself (so only the slow cycle collector would free it); deleting its components
            # lets reference counting free them, and their rows and terms, at once
            for component in list(model.component_objects(descend_into=False)):
                model.del_component(component)
        gc.unfreeze()


def _add_variables(model: pyo.ConcreteModel, lp: LinearProgram) -> tuple[list, list]:
    flat_vars: list = []
    components: list = []
    for block in lp.variables.values():
        lower, upper = block.lower, block.upper
        non_negative = bool((lower == 0.0).all())
        var = pyo.Var(
            range(block.size), domain=pyo.NonNegativeReals if non_negative else pyo.Reals, dense=True
        )
        model.add_component(block.name, var)
        datas = list(var.values())
        if not non_negative:
            set_lower = np.flatnonzero(np.isfinite(lower))
            for i, value in zip(set_lower.tolist(), lower[set_lower].tolist(), strict=True):
                datas[i].setlb(value)
        set_upper = np.flatnonzero(np.isfinite(upper))
        for i, value in zip(set_upper.tolist(), upper[set_upper].tolist(), strict=True):
            datas[i].setub(value)
        flat_vars.extend(datas)
        components.append(var)
    return flat_vars, components


def _terms(matrix, flat_vars: list) -> list:
    """One Pyomo term per nonzero of the CSR matrix, in storage order: the variable itself where the coefficient is
    exactly 1, else ``coefficient * variable`` as a monomial."""
    variables = [flat_vars[j] for j in matrix.indices.tolist()]
    coefs = matrix.data.tolist()
    terms = list(map(MonomialTermExpression, zip(coefs, variables, strict=True)))
    for k in np.flatnonzero(matrix.data == 1.0).tolist():
        terms[k] = variables[k]
    return terms


def _relations(block_sense: str, exprs: list, lower: list, upper: list) -> list:
    """Relational expressions of one row family (one sense); rows whose bound is infinite become ``(lo, e, hi)``."""
    if block_sense == "==":
        return [EqualityExpression((e, u)) for e, u in zip(exprs, upper, strict=True)]
    if block_sense == "<=":
        return [
            InequalityExpression((e, u), False) if u != math.inf else (None, e, None)
            for e, u in zip(exprs, upper, strict=True)
        ]
    return [
        InequalityExpression((lo, e), False) if lo != -math.inf else (None, e, None)
        for e, lo in zip(exprs, lower, strict=True)
    ]


def to_pyomo(lp: LinearProgram) -> PyomoHandles:
    matrix, row_lower, row_upper = lp.matrix()
    cost = lp.cost_vector()
    model = pyo.ConcreteModel(name="pathcast")
    gc.unfreeze()  # objects an earlier build froze (see below) become collectable again
    with PauseGC():
        flat_vars, var_components = _add_variables(model, lp)
        terms = _terms(matrix, flat_vars)
        indptr = matrix.indptr.tolist()
        lower_all = row_lower.tolist()
        upper_all = row_upper.tolist()
        flat_cons: list = []
        con_components: list = []
        start_row = 0
        for block in lp.row_blocks.values():
            n = block.size
            stop = start_row + n
            exprs = [
                LinearExpression(terms[a:b])
                for a, b in zip(indptr[start_row:stop], indptr[start_row + 1 : stop + 1], strict=True)
            ]
            relations = _relations(block.sense, exprs, lower_all[start_row:stop], upper_all[start_row:stop])
            con = pyo.Constraint(range(n), rule=lambda m, i, _r=relations: _r[i])
            model.add_component(block.name, con)
            flat_cons.extend(con.values())
            con_components.append(con)
            start_row = stop

        nz = np.flatnonzero(cost)
        objective = LinearExpression(
            constant=0.0, linear_coefs=cost[nz].tolist(), linear_vars=[flat_vars[j] for j in nz.tolist()]
        )
        model.total_discounted_cost = pyo.Objective(expr=objective, sense=pyo.minimize)
        # The model's millions of objects live until the solve: freezing them keeps every later garbage collection
        # from scanning them again (measured: 0.75 s in the build and 2.6 s in the hand-off at 303 000 rows, a
        # third of both). They stay freed by reference counting; cycles among them wait for the next build or
        # release(), which unfreeze.
        gc.freeze()
    return PyomoHandles(model, flat_vars, flat_cons, var_components, con_components)
