"""Assemble the pathway LP from its constraint families, then the rules of any extensions."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..scenario.inputs import ModelInputs
from .capacity import add_capacity
from .context import BuildContext
from .dispatch import add_dispatch, add_electricity_balance
from .emissions import add_emissions
from .flexibility import add_flexibility
from .fuels import add_fuels
from .linear_program import LinearProgram
from .policy import add_policy
from .storage import add_storage

__all__ = ["PathwayModel", "build_linear_program", "apply_column_bounds"]


@dataclass
class PathwayModel:
    """The LP in array form plus the context that maps its blocks back to technologies, years and hours."""

    context: BuildContext

    @property
    def lp(self) -> LinearProgram:
        return self.context.lp

    @property
    def inputs(self) -> ModelInputs:
        return self.context.inputs


def build_linear_program(inputs: ModelInputs) -> PathwayModel:
    """Fill the linear program family by family (capacity, dispatch, storage, fuels, emissions, policy,
    flexibility)."""
    ctx = BuildContext(inputs)
    add_capacity(ctx)
    add_dispatch(ctx)
    add_storage(ctx)
    add_fuels(ctx)
    add_electricity_balance(ctx)
    add_emissions(ctx)
    add_policy(ctx)
    add_flexibility(ctx)  # online capacity, ramps, operating reserve: nothing when the scenario has none
    model = PathwayModel(ctx)
    if inputs.extensions:  # users' rules in Pyomo, compiled into rows of this LP (imports Pyomo only then)
        from .extension import apply_extensions

        apply_extensions(model, inputs.extensions)
    apply_column_bounds(ctx.lp, inputs.column_bounds)
    return model


def apply_column_bounds(lp: LinearProgram, bounds: dict[str, tuple[np.ndarray, np.ndarray]]) -> None:
    """Tighten column bounds by block name (``ModelInputs.column_bounds``): NaN keeps the model's own bound; given
    values are clipped into the model's own bounds, so fixing a column to a solved value never makes it infeasible."""
    for name, (lower, upper) in bounds.items():
        if name not in lp.variables:
            raise ValueError(
                f"column_bounds: {name!r} is not a variable block; expected one of {sorted(lp.variables)}"
            )
        block = lp.variables[name]
        lo = np.broadcast_to(np.asarray(lower, dtype=float), block.shape).ravel()
        hi = np.broadcast_to(np.asarray(upper, dtype=float), block.shape).ravel()
        new_lower = np.where(np.isnan(lo), block.lower, np.clip(lo, block.lower, block.upper))
        block.upper = np.where(np.isnan(hi), block.upper, np.clip(hi, new_lower, block.upper))
        block.lower = new_lower
