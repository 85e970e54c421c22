"""Published climate constants used by the budget accounting, each with its source beside it.

IPCC (2021): Summary for Policymakers. In: Climate Change 2021: The Physical Science Basis. Contribution of Working
Group I to the Sixth Assessment Report of the Intergovernmental Panel on Climate Change. doi:10.1017/9781009157896.001
(cited below as "AR6 WG1 SPM").

Units: warming in degrees Celsius [C], CO2 in GtCO2 (1 GtCO2 = 1000 MtCO2).
"""

from __future__ import annotations

from types import MappingProxyType

from ..errors import ScenarioError

__all__ = [
    "TCRE_BEST_C_PER_1000_GTCO2",
    "TCRE_LOW_C_PER_1000_GTCO2",
    "TCRE_HIGH_C_PER_1000_GTCO2",
    "TCRE_SOURCE",
    "REMAINING_BUDGETS_2020_GTCO2",
    "REMAINING_BUDGETS_SOURCE",
    "MT_PER_GT",
    "remaining_budget_gtco2",
    "warming_from_cumulative_co2",
]

MT_PER_GT = 1000.0

# Transient climate response to cumulative CO2 emissions (TCRE): AR6 WG1 SPM D.1.1, "each 1000 GtCO2 of cumulative CO2
# emissions is assessed to likely cause a 0.27 C to 0.63 C increase in global surface temperature with a best estimate
# of 0.45 C".
TCRE_BEST_C_PER_1000_GTCO2 = 0.45
TCRE_LOW_C_PER_1000_GTCO2 = 0.27  # lower end of the likely range
TCRE_HIGH_C_PER_1000_GTCO2 = 0.63  # upper end of the likely range
TCRE_SOURCE = "IPCC (2021), AR6 WG1 SPM D.1.1: TCRE 0.45 C per 1000 GtCO2, likely range 0.27-0.63 C"

# Remaining carbon budgets from 1 January 2020 [GtCO2]: AR6 WG1 SPM Table SPM.2, by warming limit [C] (relative to
# 1850-1900) and likelihood of limiting warming to it (0.50, 0.67, 0.83).
REMAINING_BUDGETS_2020_GTCO2 = MappingProxyType(
    {
        1.5: MappingProxyType({0.50: 500.0, 0.67: 400.0, 0.83: 300.0}),
        1.7: MappingProxyType({0.50: 850.0, 0.67: 700.0, 0.83: 550.0}),
        2.0: MappingProxyType({0.50: 1350.0, 0.67: 1150.0, 0.83: 900.0}),
    }
)
REMAINING_BUDGETS_SOURCE = (
    "IPCC (2021), AR6 WG1 SPM Table SPM.2: remaining carbon budgets from 1 January 2020"
)


def remaining_budget_gtco2(warming_c: float, likelihood: float = 0.5) -> float:
    """Global remaining CO2 budget from 1 January 2020 [GtCO2] for a warming limit [C] (1.5, 1.7 or 2.0) and a
    likelihood (0.50, 0.67 or 0.83), from AR6 WG1 SPM Table SPM.2."""
    by_limit = REMAINING_BUDGETS_2020_GTCO2.get(float(warming_c))
    if by_limit is None:
        raise ScenarioError(
            f"warming limit {warming_c!r} C has no AR6 remaining budget; expected one of "
            f"{sorted(REMAINING_BUDGETS_2020_GTCO2)}."
        )
    value = by_limit.get(round(float(likelihood), 2))
    if value is None:
        raise ScenarioError(
            f"likelihood {likelihood!r} has no AR6 remaining budget; expected one of {sorted(by_limit)}."
        )
    return value


def warming_from_cumulative_co2(cumulative_mtco2: float) -> dict[str, float]:
    """Warming contribution [C] of cumulative CO2 [MtCO2] by TCRE (AR6 WG1 SPM D.1.1): best estimate and likely range.

    Linear in cumulative CO2 (the TCRE relation); it covers CO2 only and no other greenhouse gas.
    """
    gt = float(cumulative_mtco2) / MT_PER_GT
    return {
        "warming_best_c": gt * TCRE_BEST_C_PER_1000_GTCO2 / 1000.0,
        "warming_low_c": gt * TCRE_LOW_C_PER_1000_GTCO2 / 1000.0,
        "warming_high_c": gt * TCRE_HIGH_C_PER_1000_GTCO2 / 1000.0,
    }
