"""The result of one run: frozen, tidy pandas tables with units in their column names, plus headline figures.

Reports, analytics and writers read only this object (never the model). Tables:

========================  ============================================================================================
table                     columns
========================  ============================================================================================
capacity                  technology, kind, year, capacity_mw, new_mw, retired_mw, early_retired_mw
storage_energy            technology, year, energy_capacity_mwh, new_mwh
electricity               technology, kind, year, generation_twh, consumption_twh, capacity_factor, curtailed_twh
electricity_hourly        year, day, hour, weight_days, technology, power_mw (supply > 0, consumption < 0;
                          rows 'final_demand' and 'unserved' included)
fuel_flows                year, commodity, technology, role, energy_pj (role: supply, conversion_output,
                          power_input, conversion_input, final_use)
fuel_supply               year, supply, commodity, origin, supply_pj, price_per_gj
fuel_demand               year, demand, commodity, delivered_pj, unserved_pj
emissions                 year, source, sector, emissions_mtco2
emissions_total           year, emissions_mtco2, cumulative_mtco2, budget_mtco2, remaining_mtco2
costs                     year, component, cost_million, discounted_million   (million currency of the price year)
electricity_price         year, day, hour, price_per_mwh        (from the hourly balance duals, undiscounted)
fuel_price                year, commodity, price_per_gj         (from the yearly fuel balance duals)
carbon_price              year, carbon_price_per_tco2, from_budget_per_tco2, from_cap_per_tco2, from_path_per_tco2
lcoe                      technology, year, lcoe_per_mwh, capacity_factor
========================  ============================================================================================
"""

from __future__ import annotations

from dataclasses import dataclass, field
from types import MappingProxyType
from typing import Any

import pandas as pd

__all__ = ["RunResult", "TABLES", "OPTIONAL_TABLES"]

TABLES = (
    "capacity",
    "storage_energy",
    "electricity",
    "electricity_hourly",
    "fuel_flows",
    "fuel_supply",
    "fuel_demand",
    "emissions",
    "emissions_total",
    "costs",
    "electricity_price",
    "fuel_price",
    "carbon_price",
    "lcoe",
)
# tables a run has only when it uses them: the rows of users' extensions (README, Extensions)
OPTIONAL_TABLES = ("extension_constraints",)


@dataclass(frozen=True)
class RunResult:
    """Everything a run produced. ``summary`` holds the headline figures written to summary.json; ``manifest`` the
    provenance (input hash, versions, solver status and stage times); ``metadata`` the scenario's own metadata."""

    scenario_name: str
    tables: MappingProxyType
    summary: MappingProxyType
    manifest: MappingProxyType
    metadata: MappingProxyType = field(default_factory=lambda: MappingProxyType({}))

    def __getattr__(self, name: str) -> pd.DataFrame:
        tables = object.__getattribute__(self, "tables")
        if name in tables:
            return tables[name]
        raise AttributeError(name)

    @property
    def currency(self) -> str:
        return str(self.metadata.get("currency", ""))

    @staticmethod
    def create(
        scenario_name: str,
        tables: dict[str, pd.DataFrame],
        summary: dict[str, Any],
        manifest: dict[str, Any],
        metadata: dict[str, Any],
    ) -> RunResult:
        for frame in tables.values():
            frame.flags.allows_duplicate_labels = True
        return RunResult(
            scenario_name,
            MappingProxyType(dict(tables)),
            MappingProxyType(dict(summary)),
            MappingProxyType(dict(manifest)),
            MappingProxyType(dict(metadata)),
        )
