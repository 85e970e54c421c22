"""The result of one run: frozen, tidy pandas tables with units in their column names, plus headline figures.

Reports, analytics and writers read only this object (never the model). Tables:

========================  ============================================================================================
table                     columns
========================  ============================================================================================
capacity                  technology, kind, year, capacity_mw, new_mw, retired_mw, early_retired_mw, committed_mw
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
base_year_calibration     quantity, subject, unit, statistic, model, difference, relative_difference, source (only
                          with base_year_statistics in the scenario)
online_capacity           year, day, hour, technology, online_mw, generation_mw, min_output_mw (generators with
                          operating limits only)
operating_reserve         year, day, hour, requirement_mw, provided_mw, shortfall_mw, price_per_mw_hour (with
                          policy.operating_reserve only)
reserve_provision         year, day, hour, technology, reserve_mw (with policy.operating_reserve only)
assumptions               section, subject, item, value, unit, source (display text: the inputs of a run of a scenario
                          file, with their sources; results.assumptions)
========================  ============================================================================================
"""

from __future__ import annotations

from dataclasses import dataclass, field
from types import MappingProxyType
from typing import Any

import pandas as pd

__all__ = ["RunResult", "TABLES", "OPTIONAL_TABLES", "TEXT_TABLES"]

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
# tables a run has only when it uses them: the rows of users' extensions (README, Extensions), and the assumptions of a
# run of a scenario file (absent from analysis variants and from result folders of earlier versions)
# and the operating-flexibility tables (a run with operating limits or an operating reserve; README, the optimisation)
# (the adequacy tables: capacity price, cost recovery and its vintages, are missing only in folders of earlier versions)
OPTIONAL_TABLES = (
    "capacity_price",
    "cost_recovery",
    "cost_recovery_vintages",
    "extension_constraints",
    "assumptions",
    "online_capacity",
    "operating_reserve",
    "reserve_provision",
    "base_year_calibration",
)
TEXT_TABLES = ("assumptions",)  # tables of display text: read back as text, empty cells as ""


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
