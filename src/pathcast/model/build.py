"""Assemble the pathway LP from its constraint families, then (optionally) as a Pyomo model."""

from __future__ import annotations

from dataclasses import dataclass

from ..scenario.inputs import ModelInputs
from .capacity import add_capacity
from .context import BuildContext
from .dispatch import add_dispatch, add_electricity_balance
from .emissions import add_emissions
from .fuels import add_fuels
from .linear_program import LinearProgram
from .policy import add_policy
from .storage import add_storage

__all__ = ["PathwayModel", "build_linear_program"]


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
    """Fill the linear program family by family (capacity, dispatch, storage, fuels, emissions, policy)."""
    ctx = BuildContext(inputs)
    add_capacity(ctx)
    add_dispatch(ctx)
    add_storage(ctx)
    add_fuels(ctx)
    add_electricity_balance(ctx)
    add_emissions(ctx)
    add_policy(ctx)
    return PathwayModel(ctx)
