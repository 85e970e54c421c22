"""Turn a validated scenario into numeric arrays by year, day and hour, in the model's internal units.

Internal units keep the LP well scaled: power GW, energy GWh (electricity) and PJ (fuels), emissions MtCO2, money
million currency units (so currency/kW equals million currency per GW, currency/GJ equals million per PJ and
currency/tCO2 equals million per MtCO2).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from ..economics import capital_recovery_factor, discount_factors
from .extensions import ExtensionSpec
from .learning import capex_path
from .schema import ELECTRICITY, CapexPath, Scenario
from .time_paths import growth_path, path_values

__all__ = [
    "ModelInputs",
    "TechnologyInputs",
    "SupplyInputs",
    "FuelDemandInputs",
    "prepare_inputs",
    "PJ_PER_GWH",
    "PJ_PER_GW_YEAR",
]

PJ_PER_GWH = 0.0036  # 1 GWh = 3.6 TJ (1 kWh = 3.6 MJ exactly, SI)
HOURS_PER_YEAR = 8760.0
PJ_PER_GW_YEAR = PJ_PER_GWH * HOURS_PER_YEAR  # 31.536 PJ from 1 GW running all year


@dataclass(frozen=True)
class TechnologyInputs:
    """One generator, storage or converter; arrays run over the model years."""

    name: str
    kind: str  # "generator" | "storage" | "converter"
    capex: np.ndarray  # [million currency / GW] = [currency/kW], by build year
    fixed_om: float  # [million currency / GW / yr]
    variable_om: float  # [million currency / GWh]
    lifetime: int  # [yr]
    crf: float  # capital recovery factor [1/yr]
    existing_gw: np.ndarray  # existing fleet in service by year [GW]
    min_build_gw: np.ndarray  # [GW/yr]
    max_build_gw: np.ndarray  # [GW/yr], inf for none
    max_total_gw: np.ndarray  # [GW], inf for none; 0 from the phase-out year
    capacity_credit: float = 0.0
    first_build_year: int | None = None  # no new builds before this year (max_build_gw is 0 there)
    phase_out_year: int | None = None  # nothing in service from this year on (max_total_gw is 0 there)
    # generator
    fuel: str | None = None
    efficiency: float = 1.0
    availability: np.ndarray | None = None  # [D, H] for generators and electricity-input converters
    clean: bool = False
    # storage
    energy_capex: np.ndarray | None = None  # [million currency / GWh] = [currency/kWh]
    energy_fixed_om: float = 0.0
    existing_energy_gwh: np.ndarray | None = None
    charge_efficiency: float = 1.0
    discharge_efficiency: float = 1.0
    min_duration_h: float = 0.0
    max_duration_h: float = math.inf
    # converter
    input: str | None = None
    output: str | None = None
    process_emission_factor: float = 0.0  # [MtCO2/PJ output] = [tCO2/GJ]
    converter_availability: float = 1.0


@dataclass(frozen=True)
class SupplyInputs:
    name: str
    output: str
    origin: str
    price: np.ndarray  # [million currency / PJ] = [currency/GJ]
    potential_pj: np.ndarray  # [PJ/yr], inf for none; 0 from the phase-out year
    phase_out_year: int | None = None  # no supply from this year on


@dataclass(frozen=True)
class FuelDemandInputs:
    name: str
    served_by: tuple[str, ...]
    demand_pj: np.ndarray  # [PJ/yr]


@dataclass(frozen=True)
class ModelInputs:
    """Everything the model needs, as arrays; built once per scenario."""

    name: str
    currency: str
    price_year: int
    years: np.ndarray  # [Y]
    discount_rate: float
    discount_factor: np.ndarray  # [Y], 1 in the base year
    day_names: tuple[str, ...]
    day_weights: np.ndarray  # [D] days/yr
    electricity_demand_gw: np.ndarray  # [Y, D, H]
    electricity_demand_twh: np.ndarray  # [Y]
    peak_demand_gw: np.ndarray  # [Y]
    fuels: tuple[str, ...]
    emission_factor: dict[str, float]  # [MtCO2/PJ] = [tCO2/GJ]
    technologies: tuple[TechnologyInputs, ...]
    supplies: tuple[SupplyInputs, ...]
    fuel_demands: tuple[FuelDemandInputs, ...]
    value_of_lost_load: float  # [million currency / GWh]
    value_of_unserved_fuel: float  # [million currency / PJ]
    reserve_margin: float
    budget_mt: float | None
    budget_years: tuple[int, int] | None
    emission_caps_mt: dict[int, float]
    carbon_price: np.ndarray  # [currency/tCO2] by year
    clean_share: np.ndarray | None  # [-] by year, NaN where no target
    solver: dict = field(default_factory=dict)
    # Analysis overrides, empty by default (set with dataclasses.replace by pathcast.analysis, never by a scenario file):
    # column_bounds: {variable block name: (lower, upper)}, arrays shaped like the block in its own units, NaN where the
    # model's own bound stays; applied by model.build after every family, clipped into the model's own bounds. Used to fix
    # builds and emissions of years already past (delayed action) and to cap unserved energy (achievability diagnosis).
    column_bounds: dict[str, tuple[np.ndarray, np.ndarray]] = field(default_factory=dict)
    # budget_overshoot_price [currency/tCO2]: when set, the carbon budget row gets a priced overshoot column (policy).
    budget_overshoot_price: float | None = None
    # extensions: users' rules (pathcast.model.extension), applied to every LP built from these inputs, so that
    # analyses and ensemble members that re-solve a variant keep them; set by pathcast.pipeline.run_scenario.
    extensions: tuple[ExtensionSpec, ...] = ()

    @property
    def hours(self) -> int:
        return self.electricity_demand_gw.shape[2]

    def by_kind(self, kind: str) -> list[TechnologyInputs]:
        return [t for t in self.technologies if t.kind == kind]


def _capex_array(path: CapexPath, years: np.ndarray) -> np.ndarray:
    return capex_path(path, years)


def _limits(t, years: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    min_build = np.full(len(years), t.min_build_mw_per_year / 1000.0)
    max_build = np.full(
        len(years), math.inf if t.max_build_mw_per_year is None else t.max_build_mw_per_year / 1000.0
    )
    max_total = np.full(len(years), math.inf if t.max_total_mw is None else t.max_total_mw / 1000.0)
    if t.first_build_year is not None:
        early = years < t.first_build_year
        min_build[early] = 0.0
        max_build[early] = 0.0
    if t.phase_out_year is not None:
        late = years >= t.phase_out_year
        min_build[late] = 0.0
        max_build[late] = 0.0
        max_total[late] = 0.0
    return min_build, max_build, max_total


def _existing(t, years: np.ndarray, attribute: str, scale: float) -> np.ndarray:
    out = np.zeros(len(years))
    for e in t.existing:
        out += np.where(years < e.retirement_year, getattr(e, attribute) * scale, 0.0)
    return out


def _common(t, years: np.ndarray, rate: float) -> dict:
    """The fields every generator, storage and converter shares, in internal units."""
    min_b, max_b, max_t = _limits(t, years)
    return dict(
        capex=_capex_array(t.capex, years),
        fixed_om=t.fixed_om,
        variable_om=t.variable_om / 1000.0,
        lifetime=t.lifetime,
        crf=capital_recovery_factor(t.cost_of_capital if t.cost_of_capital is not None else rate, t.lifetime),
        existing_gw=_existing(t, years, "capacity_mw", 1e-3),
        min_build_gw=min_b,
        max_build_gw=max_b,
        max_total_gw=max_t,
        first_build_year=t.first_build_year,
        phase_out_year=t.phase_out_year,
    )


def prepare_inputs(s: Scenario) -> ModelInputs:
    """Resolve paths, growth, learning curves and profiles into arrays (no model objects are built here)."""
    meta = s.metadata
    years = np.arange(meta.base_year, meta.final_year + 1)
    rate = meta.discount_rate
    days = s.time.representative_days
    weights = np.array([d.weight_days for d in days], dtype=float)
    shape = np.array([d.demand_shape for d in days], dtype=float)  # [D, H]
    hours = shape.shape[1]
    # normalise the shape so that sum_d w_d sum_h shape = 1 (share of the year's energy in each hour)
    shape = shape / float((weights[:, None] * shape).sum())
    el = s.demand.electricity
    if el.yearly_twh is not None:
        demand_twh = path_values(el.yearly_twh, years)
    else:
        demand_twh = growth_path(el.base_year_twh, el.growth, years)
    demand_gw = (
        demand_twh[:, None, None] * 1000.0 * shape[None, :, :]
    )  # GWh in the year x share per hour -> GW
    profiles = {
        name: np.array([d.availability[name] for d in days], dtype=float) for name in days[0].availability
    }

    fuels = tuple(s.commodities)
    ef = {name: c.emission_factor for name, c in s.commodities.items()}

    techs: list[TechnologyInputs] = []
    for name, g in s.technologies.generators.items():
        if isinstance(g.availability, str) and g.availability in profiles:
            availability = profiles[g.availability]
            profile_driven = True
        else:
            availability = np.full((len(days), hours), float(g.availability))
            profile_driven = False
        efficiency = g.efficiency if g.efficiency is not None else (3.6 / g.heat_rate if g.heat_rate else 1.0)
        credit = g.capacity_credit
        if credit is None:
            credit = 0.0 if profile_driven else float(availability.mean())
        clean = g.clean if g.clean is not None else (g.fuel is None or ef.get(g.fuel, 0.0) == 0.0)
        techs.append(
            TechnologyInputs(
                name=name,
                kind="generator",
                **_common(g, years, rate),
                capacity_credit=credit,
                fuel=g.fuel,
                efficiency=efficiency,
                availability=availability,
                clean=clean,
            )
        )
    for name, st in s.technologies.storage.items():
        one_way = math.sqrt(st.round_trip_efficiency)
        techs.append(
            TechnologyInputs(
                name=name,
                kind="storage",
                **_common(st, years, rate),
                capacity_credit=st.capacity_credit,
                energy_capex=_capex_array(st.energy_capex, years),
                energy_fixed_om=st.energy_fixed_om,
                existing_energy_gwh=_existing(st, years, "energy_mwh", 1e-3),
                charge_efficiency=one_way,
                discharge_efficiency=one_way,
                min_duration_h=st.min_duration_hours,
                max_duration_h=st.max_duration_hours if st.max_duration_hours is not None else math.inf,
                clean=True,
            )
        )
    for name, c in s.technologies.converters.items():
        techs.append(
            TechnologyInputs(
                name=name,
                kind="converter",
                **_common(c, years, rate),
                input=c.input,
                output=c.output,
                efficiency=c.efficiency,
                availability=np.full((len(days), hours), c.availability) if c.input == ELECTRICITY else None,
                converter_availability=c.availability,
                process_emission_factor=c.process_emission_factor,
            )
        )

    supplies = []
    for name, sup in s.technologies.supplies.items():
        potential = path_values(sup.potential_pj, years, default=math.inf)
        if sup.phase_out_year is not None:
            potential = np.where(years >= sup.phase_out_year, 0.0, potential)
        supplies.append(
            SupplyInputs(
                name=name,
                output=sup.output,
                origin=sup.origin,
                price=path_values(sup.price, years),
                potential_pj=potential,
                phase_out_year=sup.phase_out_year,
            )
        )

    fuel_demands = []
    for name, fd in s.demand.fuels.items():
        if fd.yearly_pj is not None:
            pj = path_values(fd.yearly_pj, years)
        else:
            pj = growth_path(fd.base_year_pj, fd.growth, years)
        fuel_demands.append(FuelDemandInputs(name=name, served_by=tuple(fd.served_by), demand_pj=pj))

    pol = s.policy
    budget_years = None
    if pol.carbon_budget is not None:
        budget_years = (
            pol.carbon_budget.first_year or meta.base_year,
            pol.carbon_budget.last_year or meta.final_year,
        )
    clean_share = None
    if pol.clean_electricity_share is not None:
        clean_share = path_values(pol.clean_electricity_share, years)
        if isinstance(pol.clean_electricity_share, dict):
            clean_share = np.where(years < min(pol.clean_electricity_share), np.nan, clean_share)

    solver = s.solver.model_dump()
    return ModelInputs(
        name=meta.name,
        currency=meta.currency,
        price_year=meta.price_year,
        years=years,
        discount_rate=rate,
        discount_factor=discount_factors(rate, years - years[0]),
        day_names=tuple(d.name for d in days),
        day_weights=weights,
        electricity_demand_gw=demand_gw,
        electricity_demand_twh=demand_twh,
        peak_demand_gw=demand_gw.max(axis=(1, 2)),
        fuels=fuels,
        emission_factor=ef,
        technologies=tuple(techs),
        supplies=tuple(supplies),
        fuel_demands=tuple(fuel_demands),
        value_of_lost_load=meta.value_of_lost_load / 1000.0,
        value_of_unserved_fuel=meta.value_of_unserved_fuel,
        reserve_margin=pol.reserve_margin,
        budget_mt=pol.carbon_budget.total_mt if pol.carbon_budget else None,
        budget_years=budget_years,
        emission_caps_mt=dict(pol.emission_caps_mt),
        carbon_price=path_values(pol.carbon_price, years),
        clean_share=clean_share,
        solver=solver,
    )
