"""Names of the LP's variable blocks and row blocks, in one place.

The constraint families (capacity, dispatch, storage, fuels, emissions, policy) create their blocks under these names
and their read-back functions find them again by the same constants; analysis studies, the infeasibility report,
labelled variables for extensions and tests refer to the same strings. The values are part of the interface (they
appear in ``ModelInputs.column_bounds``, in extension variable names and in diagnostics): never change one.
"""

from __future__ import annotations

__all__ = [
    # variable blocks
    "NEW",
    "CAPACITY",
    "ENERGY_NEW",
    "ENERGY_CAPACITY",
    "GENERATION",
    "UNSERVED",
    "CURTAILMENT",
    "CHARGE",
    "DISCHARGE",
    "STATE_OF_CHARGE",
    "FUEL_USE",
    "CONVERTER_POWER",
    "CONVERTER_INPUT",
    "SUPPLY",
    "DELIVERY",
    "UNSERVED_FUEL",
    "EMISSIONS",
    "BUDGET_OVERSHOOT",
    "STORAGE_FIRM",
    "CREDIT_TRANCHE",
    "ONLINE_CAPACITY",
    "RESERVE",
    "STORAGE_RESERVE",
    "RESERVE_SHORTFALL",
    "VARIABLE_BLOCKS",
    # row blocks
    "CAPACITY_INSTALLED",
    "CAPACITY_NO_RETURN",
    "ENERGY_CAPACITY_INSTALLED",
    "ENERGY_CAPACITY_NO_RETURN",
    "STORAGE_DURATION_MAX",
    "STORAGE_DURATION_MIN",
    "BUILD_GROWTH_LIMIT",
    "EARLY_RETIREMENT_LIMIT",
    "BASE_YEAR_FLEET",
    "GENERATION_LIMIT",
    "CURTAILMENT_LIMIT",
    "ELECTRICITY_BALANCE",
    "CHARGE_LIMIT",
    "DISCHARGE_LIMIT",
    "STATE_OF_CHARGE_LIMIT",
    "STATE_OF_CHARGE_BALANCE",
    "FUEL_USE_DEFINITION",
    "CONVERTER_POWER_LIMIT",
    "CONVERTER_INPUT_LIMIT",
    "FUEL_DEMAND",
    "FUEL_BALANCE",
    "EMISSIONS_DEFINITION",
    "CARBON_BUDGET",
    "EMISSION_CAP",
    "RESERVE_MARGIN",
    "CLEAN_ELECTRICITY_SHARE",
    "STORAGE_FIRM_LIMIT",
    "CREDIT_TRANCHE_SUM",
    "ONLINE_CAPACITY_LIMIT",
    "ONLINE_OUTPUT_LIMIT",
    "MIN_STABLE_OUTPUT",
    "RAMP_UP",
    "RAMP_DOWN",
    "RESERVE_RAMP_LIMIT",
    "STORAGE_RESERVE_POWER_LIMIT",
    "STORAGE_RESERVE_ENERGY_LIMIT",
    "OPERATING_RESERVE",
    "ROW_BLOCKS",
]

# --- variable blocks, by the family that creates them ------------------------------------------------------------
# capacity: builds [GW/yr] and capacity in service [GW] of every technology; storage energy fleet [GWh/yr, GWh]
NEW = "new"
CAPACITY = "capacity"
ENERGY_NEW = "energy_new"
ENERGY_CAPACITY = "energy_capacity"
# dispatch: output of dispatched generators, unserved electricity, pooled curtailment [GW]
GENERATION = "generation"
UNSERVED = "unserved"
CURTAILMENT = "curtailment"
# storage: charge and discharge [GW], state of charge [GWh]
CHARGE = "charge"
DISCHARGE = "discharge"
STATE_OF_CHARGE = "state_of_charge"
# fuels: fuel burned [PJ/yr], electric converter draw [GW], fuel converter input, supply, delivery, unserved [PJ/yr]
FUEL_USE = "fuel_use"
CONVERTER_POWER = "converter_power"
CONVERTER_INPUT = "converter_input"
SUPPLY = "supply"
DELIVERY = "delivery"
UNSERVED_FUEL = "unserved_fuel"
# emissions [MtCO2/yr]
EMISSIONS = "emissions"
# policy: priced overshoot of the carbon budget [MtCO2] (analysis runs only)
BUDGET_OVERSHOOT = "budget_overshoot"
# adequacy: firm contribution of storage credited by duration [GW]; capacity in each credit tranche [GW]
STORAGE_FIRM = "storage_firm"
CREDIT_TRANCHE = "credit_tranche"
# flexibility: online (committed) capacity of generators with operating limits, upward reserve held by generators and
# storage, and reserve not held [GW]
ONLINE_CAPACITY = "online_capacity"
RESERVE = "reserve"
STORAGE_RESERVE = "storage_reserve"
RESERVE_SHORTFALL = "reserve_shortfall"

VARIABLE_BLOCKS: tuple[str, ...] = (
    NEW,
    CAPACITY,
    ENERGY_NEW,
    ENERGY_CAPACITY,
    GENERATION,
    UNSERVED,
    CURTAILMENT,
    CHARGE,
    DISCHARGE,
    STATE_OF_CHARGE,
    FUEL_USE,
    CONVERTER_POWER,
    CONVERTER_INPUT,
    SUPPLY,
    DELIVERY,
    UNSERVED_FUEL,
    EMISSIONS,
    BUDGET_OVERSHOOT,
    STORAGE_FIRM,
    CREDIT_TRANCHE,
    ONLINE_CAPACITY,
    RESERVE,
    STORAGE_RESERVE,
    RESERVE_SHORTFALL,
)

# --- row blocks, by the family that creates them -----------------------------------------------------------------
# capacity
CAPACITY_INSTALLED = "capacity_installed"
CAPACITY_NO_RETURN = "capacity_no_return"
ENERGY_CAPACITY_INSTALLED = "energy_capacity_installed"
ENERGY_CAPACITY_NO_RETURN = "energy_capacity_no_return"
STORAGE_DURATION_MAX = "storage_duration_max"
STORAGE_DURATION_MIN = "storage_duration_min"
# builds of a year at most a seed + a factor x the previous year's (plus committed projects) [GW/yr]
BUILD_GROWTH_LIMIT = "build_growth_limit"
# capacity retired early (installed less in service) grows by at most a limit a year [GW/yr]
EARLY_RETIREMENT_LIMIT = "early_retirement_limit"
# the base year's power fleet all in service: capacity in service >= existing + committed (within the potential) [GW]
BASE_YEAR_FLEET = "base_year_fleet"
# dispatch
GENERATION_LIMIT = "generation_limit"
CURTAILMENT_LIMIT = "curtailment_limit"
ELECTRICITY_BALANCE = "electricity_balance"
# storage
CHARGE_LIMIT = "charge_limit"
DISCHARGE_LIMIT = "discharge_limit"
STATE_OF_CHARGE_LIMIT = "state_of_charge_limit"
STATE_OF_CHARGE_BALANCE = "state_of_charge_balance"
# fuels
FUEL_USE_DEFINITION = "fuel_use_definition"
CONVERTER_POWER_LIMIT = "converter_power_limit"
CONVERTER_INPUT_LIMIT = "converter_input_limit"
FUEL_DEMAND = "fuel_demand"
FUEL_BALANCE = "fuel_balance"
# emissions
EMISSIONS_DEFINITION = "emissions_definition"
# policy
CARBON_BUDGET = "carbon_budget"
EMISSION_CAP = "emission_cap"
RESERVE_MARGIN = "reserve_margin"
CLEAN_ELECTRICITY_SHARE = "clean_electricity_share"
# adequacy
STORAGE_FIRM_LIMIT = "storage_firm_limit"
CREDIT_TRANCHE_SUM = "credit_tranche_sum"
# flexibility
ONLINE_CAPACITY_LIMIT = "online_capacity_limit"
ONLINE_OUTPUT_LIMIT = "online_output_limit"
MIN_STABLE_OUTPUT = "min_stable_output"
RAMP_UP = "ramp_up"
RAMP_DOWN = "ramp_down"
RESERVE_RAMP_LIMIT = "reserve_ramp_limit"
STORAGE_RESERVE_POWER_LIMIT = "storage_reserve_power_limit"
STORAGE_RESERVE_ENERGY_LIMIT = "storage_reserve_energy_limit"
OPERATING_RESERVE = "operating_reserve"

ROW_BLOCKS: tuple[str, ...] = (
    CAPACITY_INSTALLED,
    CAPACITY_NO_RETURN,
    ENERGY_CAPACITY_INSTALLED,
    ENERGY_CAPACITY_NO_RETURN,
    STORAGE_DURATION_MAX,
    STORAGE_DURATION_MIN,
    BUILD_GROWTH_LIMIT,
    EARLY_RETIREMENT_LIMIT,
    BASE_YEAR_FLEET,
    GENERATION_LIMIT,
    CURTAILMENT_LIMIT,
    ELECTRICITY_BALANCE,
    CHARGE_LIMIT,
    DISCHARGE_LIMIT,
    STATE_OF_CHARGE_LIMIT,
    STATE_OF_CHARGE_BALANCE,
    FUEL_USE_DEFINITION,
    CONVERTER_POWER_LIMIT,
    CONVERTER_INPUT_LIMIT,
    FUEL_DEMAND,
    FUEL_BALANCE,
    EMISSIONS_DEFINITION,
    CARBON_BUDGET,
    EMISSION_CAP,
    RESERVE_MARGIN,
    CLEAN_ELECTRICITY_SHARE,
    STORAGE_FIRM_LIMIT,
    CREDIT_TRANCHE_SUM,
    ONLINE_CAPACITY_LIMIT,
    ONLINE_OUTPUT_LIMIT,
    MIN_STABLE_OUTPUT,
    RAMP_UP,
    RAMP_DOWN,
    RESERVE_RAMP_LIMIT,
    STORAGE_RESERVE_POWER_LIMIT,
    STORAGE_RESERVE_ENERGY_LIMIT,
    OPERATING_RESERVE,
)
