"""Variants of one scenario's inputs that the budget analytics solve (all by ``dataclasses.replace``; the scenario's
own inputs are never changed): without the budget, the reference without any carbon policy, history fixed to a
solved pathway before a start year, unserved energy capped, and the emissions-only objective."""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from ..pipeline import Run
from ..scenario.inputs import ModelInputs

__all__ = [
    "without_budget",
    "reference_inputs",
    "fix_history",
    "cap_unserved",
    "emissions_only",
    "merge_column_bounds",
    "HISTORY_BLOCKS",
    "UNSERVED_BLOCKS",
]

# variable blocks [technology, year] (or [year]) fixed to a solved pathway before the start year of a delayed action
HISTORY_BLOCKS = ("new", "capacity", "energy_new", "energy_capacity", "emissions")
UNSERVED_BLOCKS = ("unserved", "unserved_fuel")
NEGLIGIBLE_COST = 1e-9  # [million currency per GWh or PJ]


def without_budget(inputs: ModelInputs) -> ModelInputs:
    """The same scenario without its cumulative carbon budget (caps, carbon price and other limits kept)."""
    return replace(inputs, budget_mt=None, budget_years=None, budget_overshoot_price=None)


def reference_inputs(inputs: ModelInputs) -> ModelInputs:
    """The reference: no budget, no yearly caps, no carbon price (build limits, potentials, phase-outs, reserve margin
    and clean-electricity share kept)."""
    return replace(without_budget(inputs), emission_caps_mt={}, carbon_price=np.zeros(len(inputs.years)))


def merge_column_bounds(inputs: ModelInputs, extra: dict[str, tuple[np.ndarray, np.ndarray]]) -> ModelInputs:
    """``inputs`` with further column bounds; where both give a value the tighter one wins."""
    merged = dict(inputs.column_bounds)
    for name, (lower, upper) in extra.items():
        if name in merged:
            old_lower, old_upper = merged[name]
            lower = np.fmax(np.asarray(old_lower, dtype=float), np.asarray(lower, dtype=float))
            upper = np.fmin(np.asarray(old_upper, dtype=float), np.asarray(upper, dtype=float))
        merged[name] = (np.asarray(lower, dtype=float), np.asarray(upper, dtype=float))
    return replace(inputs, column_bounds=merged)


def fix_history(inputs: ModelInputs, pathway: Run, start_year: int) -> ModelInputs:
    """``inputs`` with the years before ``start_year`` fixed to ``pathway`` (a solved run of the same horizon and
    technologies): builds and capacity in service of power and storage energy, and yearly emissions (so dispatch
    emits what the pathway emitted). Yearly caps before the start year are dropped and the carbon price path is zero
    there: those years are history."""
    years = inputs.years
    before = years < start_year
    x = pathway.solution.x
    bounds = {}
    for name in HISTORY_BLOCKS:
        block = pathway.model.lp.variables.get(name)
        if block is None:
            continue
        values = x[block.all()].astype(float)
        fixed = np.where(np.broadcast_to(before, values.shape), values, np.nan)
        bounds[name] = (fixed, fixed)
    caps = {y: v for y, v in inputs.emission_caps_mt.items() if y >= start_year}
    price = np.where(before, 0.0, inputs.carbon_price)
    return merge_column_bounds(replace(inputs, emission_caps_mt=caps, carbon_price=price), bounds)


def cap_unserved(inputs: ModelInputs, pathway: Run, slack: float = 1e-9) -> ModelInputs:
    """``inputs`` with unserved electricity [GW] and unserved fuel [PJ/yr] capped at ``pathway``'s values (plus
    ``slack``) in every hour and year: no more shedding than that pathway needs."""
    x = pathway.solution.x
    bounds = {}
    for name in UNSERVED_BLOCKS:
        block = pathway.model.lp.variables.get(name)
        if block is None or block.size == 0:
            continue
        values = x[block.all()].astype(float)
        bounds[name] = (np.full(values.shape, np.nan), np.maximum(values, 0.0) + slack)
    return merge_column_bounds(inputs, bounds)


def emissions_only(inputs: ModelInputs) -> ModelInputs:
    """The same limits with a pure emissions objective: every cost is zero and the budget row is dropped; the
    objective is the sum of emissions over the budget period's years [MtCO2] (a 'carbon price' of 1/DF_y in those
    years, so each tonne counts once undiscounted). Unserved energy must be capped (:func:`cap_unserved`) first or
    the minimum is reached by shedding demand."""
    first, last = inputs.budget_years or (int(inputs.years[0]), int(inputs.years[-1]))
    inside = (inputs.years >= first) & (inputs.years <= last)
    techs = tuple(
        replace(
            t,
            capex=np.zeros_like(t.capex),
            fixed_om=0.0,
            variable_om=0.0,
            energy_capex=None if t.energy_capex is None else np.zeros_like(t.energy_capex),
            energy_fixed_om=0.0,
        )
        for t in inputs.technologies
    )
    supplies = tuple(replace(s, price=np.zeros_like(s.price)) for s in inputs.supplies)
    # the values of lost load stay positive but negligible (1e-9 million per GWh or PJ), so the run summary can still
    # turn their cost back into energy; unserved energy is capped anyway
    return replace(
        without_budget(inputs),
        technologies=techs,
        supplies=supplies,
        value_of_lost_load=NEGLIGIBLE_COST,
        value_of_unserved_fuel=NEGLIGIBLE_COST,
        carbon_price=np.where(inside, 1.0 / inputs.discount_factor, 0.0),
    )
