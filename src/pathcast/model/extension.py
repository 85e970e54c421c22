"""Users' own rules, written in Pyomo against labelled variables, added to the pathway LP.

An extension is a Python file named in the scenario (``extensions: [{file: rules.py, function: extend}]``) or on the
command line (``pathcast run FILE --extension rules.py:extend``). Its function receives ``(model, inputs)``:

* ``model`` is a Pyomo ``ConcreteModel`` with one ``Var`` component per variable family of the LP, indexed by labels:
  ``model.capacity["solar_pv", 2040]`` [GW], ``model.new[t, y]`` [GW/yr], ``model.generation[g, y, day, hour]`` [GW],
  ``model.supply[s, y]`` [PJ/yr], ``model.emissions[y]`` [MtCO2/yr], ... (README, "Extensions", lists them with their
  units), and the sets ``model.technology``, ``model.year``, ``model.day``, ``model.hour``, ``model.supply_name``,
  ``model.commodity``. Variables are created when the rule first uses them, so an extension costs nothing for the
  columns it does not touch.
* ``inputs`` is the :class:`~pathcast.scenario.inputs.ModelInputs` of the run (years, technologies, demand, ...).

The function adds ``Constraint`` components (any name; indexed or not) and, for objective terms, entries of
``model.extra_cost[name] = expression`` [million currency of the price year, discounted: multiply by
``inputs.discount_factor`` yourself]. Each constraint becomes a row of the LP (block ``extension.<component>``), so its
dual appears in the results table ``extension_constraints``; a rule must be linear.

Why the family constraints are not Pyomo components too: they are built as arrays (a national model has a few hundred
thousand rows) and handed to HiGHS as arrays; the Pyomo model exists only so that users can write rules against
labelled variables. DEVELOPERS.md gives the measured costs.
"""

from __future__ import annotations

import ast
import importlib.util
import math
import re
import sys
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING

import numpy as np

from ..errors import ScenarioError, did_you_mean
from ..scenario.extensions import ExtensionSpec
from .labels import BlockLabels, block_labels

if TYPE_CHECKING:  # annotations only: build.py imports this module when a scenario has extensions
    from .build import PathwayModel

__all__ = [
    "ExtensionRow",
    "apply_extensions",
    "load_extension",
    "EXTENSION_PREFIX",
    "read_extension_rows",
]

EXTENSION_PREFIX = "extension."


@dataclass(frozen=True)
class ExtensionRow:
    """One row an extension added: its block and index labels, bounds and where it sits in the LP."""

    block: str  # LP row block name, "extension.<component>"
    component: str
    index: str  # the constraint's index, as text ("" for a scalar constraint)
    lower: float
    upper: float


def load_extension(spec: ExtensionSpec) -> Callable:
    """Import the extension file and return its function; a missing file or function, or a file that fails to import,
    is a one-sentence ScenarioError."""
    path = Path(spec.file)
    if not path.is_file():
        raise ScenarioError(
            f"{spec.origin}: got {str(path)!r}, no such file; expected a Python file with a function "
            f"{spec.function}(model, inputs).",
            file=str(path),
        )
    name = f"pathcast_extension_{abs(hash(str(path.resolve())))}"
    module_spec = importlib.util.spec_from_file_location(name, path)
    if module_spec is None or module_spec.loader is None:
        raise ScenarioError(f"{path}: got a file Python cannot import; expected a Python source file (.py).")
    module = importlib.util.module_from_spec(module_spec)
    try:
        sys.modules[name] = module
        module_spec.loader.exec_module(module)
    except Exception as error:  # the user's file: report any failure as bad input
        sys.modules.pop(name, None)
        raise ScenarioError(
            f"{path}: importing it raised {type(error).__name__}: {_one_line(error)}; expected a Python file that "
            "imports cleanly."
        ) from None
    function = getattr(module, spec.function, None)
    if not callable(function):
        choices = [n for n, v in vars(module).items() if callable(v) and not n.startswith("_")]
        raise ScenarioError(
            f"{path}: got no function {spec.function!r}; expected a function {spec.function}(model, inputs)"
            f"{did_you_mean(spec.function, choices)}."
        )
    return function


def read_extension_rows(model: PathwayModel, x: np.ndarray, row_dual: np.ndarray) -> list[dict]:
    """One record per row the extensions added: its bounds, its value at the optimum (``activity``, in the units
    the rule was written in: GW for model.capacity, ...), its dual [million currency of the price year, discounted,
    per unit of the row; minimisation sign: <= 0 for a binding upper limit] and whether it binds (to 1e-7 relative,
    common practice, no source)."""
    rows = model.context.extension_rows
    if not rows:
        return []
    matrix, _, _ = model.lp.matrix()
    offsets = model.lp.row_offsets()
    activity_all = matrix @ x
    out: list[dict] = []
    seen: dict[str, int] = {}  # rows of each block met so far
    for row in rows:
        r = offsets[row.block] + seen.get(row.block, 0)
        seen[row.block] = seen.get(row.block, 0) + 1
        activity = float(activity_all[r])
        bound = row.upper if math.isfinite(row.upper) else row.lower
        binding = abs(activity - bound) <= 1e-7 * max(1.0, abs(bound))
        out.append(
            {
                "constraint": row.component,
                "index": row.index,
                "lower": row.lower,
                "upper": row.upper,
                "activity": activity,
                "dual_million_per_unit": float(row_dual[r]),
                "binding": bool(binding),
            }
        )
    return out


def _one_line(error: BaseException) -> str:
    text = " ".join(str(error).split())
    return text if len(text) <= 200 else text[:197] + "..."


def _labelled_model(model: PathwayModel):
    """The Pyomo model of labelled variables (created lazily: ``dense=False``) and the labels of each block."""
    import pyomo.environ as pyo

    ctx = model.context
    labels = block_labels(ctx)
    m = pyo.ConcreteModel(name="pathcast")
    m.technology = pyo.Set(initialize=[t.name for t in ctx.capacity_techs], ordered=True)
    m.year = pyo.Set(initialize=[int(y) for y in ctx.inputs.years], ordered=True)
    m.day = pyo.Set(initialize=list(ctx.inputs.day_names), ordered=True)
    m.hour = pyo.Set(initialize=list(range(ctx.H)), ordered=True)
    m.supply_name = pyo.Set(initialize=[s.name for s in ctx.inputs.supplies], ordered=True)
    m.commodity = pyo.Set(initialize=list(ctx.inputs.fuels), ordered=True)
    shared = {"year": m.year, "day": m.day, "hour": m.hour}
    for name, entry in labels.items():
        sets = []
        for dim, axis in zip(entry.dims, entry.labels, strict=True):
            if dim in shared:
                sets.append(shared[dim])
            else:
                component = pyo.Set(initialize=list(axis), ordered=True)
                m.add_component(f"{name}_{dim}", component)
                sets.append(component)
        index = sets[0]
        for more in sets[1:]:
            index = index * more  # a virtual product: nothing is enumerated
        block = entry.block
        lower = block.lower
        domain = pyo.NonNegativeReals if bool((lower == 0.0).all()) else pyo.Reals
        m.add_component(name, pyo.Var(index, dense=False, domain=domain))
    m.extra_cost = pyo.Expression(pyo.Any)
    return m, labels


_BAD_INDEX = re.compile(r"Index '(?P<index>.*)' is not valid for indexed component '(?P<component>[\w.]+)'")


def _explain_key_error(error: KeyError, labels: dict[str, BlockLabels], where: str) -> ScenarioError | None:
    """A one-sentence error for an unknown technology, year, ... used in an extension, or None."""
    match = _BAD_INDEX.search(str(error))
    if not match:
        return None
    component, text = match["component"], match["index"]
    entry = labels.get(component)
    try:
        index = ast.literal_eval(text)
    except (ValueError, SyntaxError):
        index = text
    key = index if isinstance(index, tuple) else (index,)
    if entry is None:
        return ScenarioError(
            f"{where}: got the index {index!r} of model.{component}; expected a valid index."
        )
    if len(key) != len(entry.dims):
        return ScenarioError(
            f"{where}: got the index {index!r} of model.{component}; expected {len(entry.dims)} labels "
            f"({', '.join(entry.dims)})."
        )
    for dim, label, axis in zip(entry.dims, key, entry.labels, strict=True):
        if label not in axis:
            shown = list(axis) if len(axis) <= 12 else [*list(axis)[:12], "..."]
            hint = did_you_mean(str(label), [str(a) for a in axis])
            extra = ""
            if component == "generation" and dim == "technology":
                extra = (
                    " (wind, solar and other free generators have no generation variable: use model.capacity)"
                )
            return ScenarioError(
                f"{where}: got the {dim} {label!r} in model.{component}[{text}]; expected one of {shown}{hint}{extra}."
            )
    return ScenarioError(f"{where}: got the index {index!r} of model.{component}; expected a valid index.")


def apply_extensions(
    model: PathwayModel, extensions: Sequence[ExtensionSpec | tuple[ExtensionSpec, Callable]]
) -> list[ExtensionRow]:
    """Run each extension's function on a labelled Pyomo model of ``model``'s variables, then add the constraints
    and cost terms it wrote to the LP as row blocks ``extension.<component>`` and objective coefficients."""
    if not extensions:
        return []
    import pyomo.environ as pyo
    from pyomo.repn import generate_standard_repn

    m, labels = _labelled_model(model)
    before = {c.local_name for c in m.component_objects(descend_into=False)}
    for item in extensions:
        spec, function = item if isinstance(item, tuple) else (item, load_extension(item))
        where = f"{spec.file}: {spec.function}(model, inputs)"
        try:
            function(m, model.inputs)
        except ScenarioError:
            raise
        except KeyError as error:
            explained = _explain_key_error(error, labels, where)
            if explained is not None:
                raise explained from None
            raise ScenarioError(
                f"{where}: raised KeyError: {_one_line(error)}; expected it to add constraints without error."
            ) from None
        except Exception as error:  # the user's code: any failure is bad input, reported in one sentence
            raise ScenarioError(
                f"{where}: raised {type(error).__name__}: {_one_line(error)}; expected it to add constraints "
                "without error."
            ) from None
    added = [c for c in m.component_objects(descend_into=False) if c.local_name not in before]
    origin = ", ".join(str(e[0].file if isinstance(e, tuple) else e.file) for e in extensions)
    for component in added:
        if isinstance(component, pyo.Objective):
            raise ScenarioError(
                f"{origin}: got an Objective component {component.local_name!r}; expected cost terms as "
                "model.extra_cost[name] = expression (pathcast keeps its own objective)."
            )
        if not isinstance(component, pyo.Constraint | pyo.Set | pyo.Param | pyo.Expression):
            raise ScenarioError(
                f"{origin}: got a {type(component).__name__} component {component.local_name!r}; expected "
                "Constraint components (and cost terms in model.extra_cost)."
            )

    # map every variable the rules used to its LP column
    column_of: dict[int, int] = {}
    for name, entry in labels.items():
        var = getattr(m, name)
        positions = entry.positions() if entry.pair_axis is None else None
        for key, data in var.items():
            key = key if isinstance(key, tuple) else (key,)
            column_of[id(data)] = entry.column(key, positions)

    def linear(expr, what: str) -> tuple[np.ndarray, np.ndarray, float]:
        repn = generate_standard_repn(expr, compute_values=True, quadratic=False)
        if not repn.is_linear():
            raise ScenarioError(
                f"{what}: got a nonlinear expression; expected a linear one (pathcast solves an LP)."
            )
        cols, coefs = [], []
        for var, coef in zip(repn.linear_vars, repn.linear_coefs, strict=True):
            if id(var) not in column_of:
                raise ScenarioError(
                    f"{what}: got the variable {var.name!r}, which is not one of pathcast's; expected rules on "
                    "model.<family>[...] variables only."
                )
            cols.append(column_of[id(var)])
            coefs.append(float(coef))
        return np.array(cols, dtype=int), np.array(coefs, dtype=float), float(repn.constant or 0.0)

    lp = model.lp
    rows: list[ExtensionRow] = []
    for component in added:
        if isinstance(component, pyo.Constraint):
            by_sense: dict[str, list[tuple[str, np.ndarray, np.ndarray, float]]] = {
                "<=": [],
                ">=": [],
                "==": [],
            }
            for index, data in component.items():
                if not data.active:
                    continue
                label = "" if index is None else str(index)
                what = (
                    f"{origin}: constraint {component.local_name}[{label}]"
                    if label
                    else f"{origin}: constraint {component.local_name}"
                )
                cols, coefs, constant = linear(data.body, what)
                lower = -math.inf if data.lower is None else float(pyo.value(data.lower)) - constant
                upper = math.inf if data.upper is None else float(pyo.value(data.upper)) - constant
                if not cols.size:
                    raise ScenarioError(
                        f"{what}: got a constraint on no variable; expected one on model variables."
                    )
                if data.equality:
                    by_sense["=="].append((label, cols, coefs, upper))
                else:
                    if math.isfinite(upper):
                        by_sense["<="].append((label, cols, coefs, upper))
                    if math.isfinite(lower):
                        by_sense[">="].append((label, cols, coefs, lower))
            mixed = sum(bool(v) for v in by_sense.values()) > 1  # ranged rows: one block per side
            for sense, entries in by_sense.items():
                if not entries:
                    continue
                suffix = {"<=": ".upper", ">=": ".lower", "==": ".equal"}[sense] if mixed else ""
                block_name = f"{EXTENSION_PREFIX}{component.local_name}{suffix}"
                block = lp.add_rows(
                    block_name,
                    ("index",),
                    (len(entries),),
                    sense,
                    "as written",
                    rhs=np.array([e[3] for e in entries]),
                )
                for r, (label, cols, coefs, rhs) in enumerate(entries):
                    block.add(np.full(cols.size, r), cols, coefs)
                    rows.append(
                        ExtensionRow(
                            block_name,
                            component.local_name,
                            label,
                            rhs if sense in ("==", ">=") else -math.inf,
                            rhs if sense in ("==", "<=") else math.inf,
                        )
                    )
    for key, expression in m.extra_cost.items():
        cols, coefs, _constant = linear(expression.expr, f"{origin}: extra_cost[{key!r}]")
        lp.add_cost(cols, coefs)  # a constant term cannot change the optimum and is left out of the objective
    model.context.extension_rows = rows
    return rows
