"""A solved pathway LP read back into plain labelled arrays, family by family: what ``pathcast.results`` receives.

Each constraint family reads its own blocks back (``read_capacity``, ``read_dispatch``, ...), so the knowledge of
which block holds what, and how its duals become prices, stays beside the rows that create them; results code never
sees LP columns, rows or block names.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

from ..scenario.inputs import ModelInputs
from .adequacy import FirmCapacityValues, read_firm_capacity
from .build import PathwayModel
from .capacity import CapacityValues, read_capacity
from .cost_recovery import CapacityValueValues, read_capacity_value
from .dispatch import DispatchValues, read_dispatch
from .emissions import EmissionsValues, read_emissions
from .extension import read_extension_rows
from .flexibility import FlexibilityValues, read_flexibility
from .fuels import FuelValues, read_fuels
from .policy import PolicyValues, read_policy
from .storage import StorageValues, read_storage

if TYPE_CHECKING:
    from ..solve import Solution

__all__ = ["SolutionValues", "read_solution"]


@dataclass(frozen=True)
class SolutionValues:
    """Every family's values of one solved run, with the inputs it was built from (labels, prices, parameters)."""

    inputs: ModelInputs
    objective_million: (
        float  # the LP objective: total discounted system cost [million currency of the price year]
    )
    capacity: CapacityValues
    dispatch: DispatchValues
    storage: StorageValues
    fuels: FuelValues
    emissions: EmissionsValues
    policy: PolicyValues
    firm: FirmCapacityValues  # firm capacity counted toward the reserve margin, by technology and year
    capacity_value: CapacityValueValues  # marginal value of capacity in service (installed rows' duals)
    # one record per row an extension added (pathcast.model.extension.read_extension_rows); empty without extensions
    extension_rows: tuple[dict, ...] = ()
    # operating flexibility (online capacity, operating reserve); None for values built without it
    flexibility: FlexibilityValues | None = None


def read_solution(model: PathwayModel, solution: Solution) -> SolutionValues:
    """Read the primal values and row duals of ``solution`` back through every family of ``model``."""
    ctx, x, row_dual = model.context, solution.x, solution.row_dual
    return SolutionValues(
        inputs=model.inputs,
        objective_million=float(solution.objective),
        capacity=read_capacity(ctx, x),
        dispatch=read_dispatch(ctx, x, row_dual),
        storage=read_storage(ctx, x),
        fuels=read_fuels(ctx, x, row_dual),
        emissions=read_emissions(ctx, x),
        policy=read_policy(ctx, x, row_dual),
        firm=read_firm_capacity(ctx, x, row_dual),
        capacity_value=read_capacity_value(ctx, row_dual),
        extension_rows=tuple(read_extension_rows(model, x, row_dual)) if ctx.extension_rows else (),
        flexibility=read_flexibility(ctx, x, row_dual),
    )
