"""The carbon price that the budget implies (``carbon_price.from_budget_per_tco2`` = -dual / DF): Hotelling growth,
price-quantity agreement, and agreement with the shadow prices of yearly caps at the same pathway.

Fixture: tests/data/tiny.yaml (budget 25 MtCO2 over 2025-2029, no caps, no carbon price path: only the budget is an
emission policy). Inputs are varied with dataclasses.replace and solved with pathcast.pipeline.solve_inputs.

Tolerances: HiGHS's default primal and dual feasibility tolerances are 1e-7; caps and prices set from one solve's
values carry that noise into the next, and prices are divided by discount factors down to 1.07^-4. A relative 1e-4
is far above that noise and far below what a wrong sign or a wrong discount factor would give (7 % a year), or the
gaps between one-sided marginal costs that the LP's kinks open (10-40 % on this fixture).
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np
import pytest

from pathcast.pipeline import solve_inputs

DELTA = 1e-3  # [MtCO2] step of the finite differences (0.02 % of a year's emissions; inside one linear piece here)
REL = 1e-4


def _no_budget(inputs, **changes):
    return replace(inputs, budget_mt=None, budget_years=None, **changes)


def test_hotelling_budget_price_grows_at_the_discount_rate_and_is_the_marginal_cost(tiny_run):
    # Hotelling (1931), The Economics of Exhaustible Resources, J. Political Economy 39(2) (from memory for pages);
    # for carbon budgets: Gollier, The cost-efficiency carbon pricing puzzle, TSE Working Paper 18-952 (confirmed):
    # with only the budget binding, p(t+1)/p(t) = 1 + discount rate.
    inputs = tiny_run.model.inputs
    price = tiny_run.result.carbon_price["from_budget_per_tco2"].to_numpy()
    assert (price > 0).all()
    np.testing.assert_allclose(price[1:] / price[:-1], 1.0 + inputs.discount_rate, rtol=1e-9)
    # the dual is the marginal cost of the budget: re-solve with the budget 1e-3 MtCO2 tighter and looser; the base-year
    # price (DF = 1) [currency/tCO2 = million/MtCO2] must lie between the one-sided cost changes (here they agree)
    cost = tiny_run.solution.objective
    tighter = solve_inputs(replace(inputs, budget_mt=inputs.budget_mt - DELTA)).solution.objective
    looser = solve_inputs(replace(inputs, budget_mt=inputs.budget_mt + DELTA)).solution.objective
    upper, lower = (tighter - cost) / DELTA, (cost - looser) / DELTA
    assert lower * (1 - REL) <= price[0] <= upper * (1 + REL)
    assert price[0] == pytest.approx(upper, rel=REL) and price[0] == pytest.approx(lower, rel=REL)


def test_price_and_quantity_agree(tiny_run):
    # duality of a cumulative limit and a price path (Hotelling 1931; Gollier, TSE WP 18-952): charging 2 % more than
    # the budget's own price path, without the budget, emits no more than the budget; 2 % less, no less.
    inputs = tiny_run.model.inputs
    price = tiny_run.result.carbon_price["from_budget_per_tco2"].to_numpy()
    budget = inputs.budget_mt
    above = solve_inputs(_no_budget(inputs, carbon_price=1.02 * price)).result
    below = solve_inputs(_no_budget(inputs, carbon_price=0.98 * price)).result
    assert above.emissions_total["emissions_mtco2"].sum() <= budget * (1 + 1e-6)
    assert below.emissions_total["emissions_mtco2"].sum() >= budget * (1 - 1e-6)
    # and the price path does work: 2 % around it straddles the budget rather than sitting far from it
    assert below.emissions_total["emissions_mtco2"].sum() > above.emissions_total["emissions_mtco2"].sum()


def test_caps_at_the_budget_pathway_price_like_the_budget(tiny_run):
    # computed (LP duality, /work/shared/notes/formulation.md "Hotelling"): with yearly caps equal to the budget
    # pathway's own emissions and no budget, the budget pathway is still optimal and lambda / DF_t is a valid shadow
    # price for every cap. An LP's cap duals need not be unique, though: at a kink of a year's abatement cost the
    # valid prices form an interval [cost of loosening, cost of tightening]. So the test is: (a) the budget's price lies
    # in every binding cap's interval (measured by re-solving with the cap 1e-3 MtCO2 looser and tighter), (b) so does
    # the cap dual HiGHS returns, and (c) where the interval is a single point the cap dual equals the budget's price
    # (relative 1e-4). On this fixture (c) applies to 2028; the other years sit at kinks.
    inputs = tiny_run.model.inputs
    emissions = tiny_run.result.emissions_total["emissions_mtco2"].to_numpy()
    budget_price = tiny_run.result.carbon_price["from_budget_per_tco2"].to_numpy()
    caps = {int(y): float(e) for y, e in zip(inputs.years, emissions, strict=True)}
    capped = solve_inputs(_no_budget(inputs, emission_caps_mt=caps))
    np.testing.assert_allclose(
        capped.result.emissions_total["emissions_mtco2"], emissions, rtol=1e-6, atol=1e-6
    )
    assert capped.solution.objective == pytest.approx(tiny_run.solution.objective, rel=1e-9)
    cap_price = capped.result.carbon_price["from_cap_per_tco2"].to_numpy()
    df = inputs.discount_factor
    unique_years = 0
    for i, year in enumerate(inputs.years):
        if cap_price[i] <= 0:
            continue  # the cap does not bind
        tight = solve_inputs(
            _no_budget(inputs, emission_caps_mt={**caps, int(year): caps[int(year)] - DELTA})
        )
        loose = solve_inputs(
            _no_budget(inputs, emission_caps_mt={**caps, int(year): caps[int(year)] + DELTA})
        )
        upper = (tight.solution.objective - capped.solution.objective) / DELTA / df[i]
        lower = (capped.solution.objective - loose.solution.objective) / DELTA / df[i]
        assert lower * (1 - REL) <= budget_price[i] <= upper * (1 + REL), year
        assert lower * (1 - REL) <= cap_price[i] <= upper * (1 + REL), year
        if upper - lower <= REL * upper:
            unique_years += 1
            assert cap_price[i] == pytest.approx(budget_price[i], rel=REL), year
    assert unique_years >= 1
