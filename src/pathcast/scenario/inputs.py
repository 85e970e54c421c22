"""Turn a validated scenario into numeric arrays by year, day and hour, in the model's internal units.

Internal units keep the LP well scaled: power GW, energy GWh (electricity) and PJ (fuels), emissions MtCO2, money
million currency units (so currency/kW equals million currency per GW, currency/GJ equals million per PJ and
currency/tCO2 equals million per MtCO2).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
from typing import TypeVar

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
    "OperatingReserveInputs",
    "BaseYearStatistic",
    "prepare_inputs",
    "present",
    "credit_segments",
    "credit_tranches",
    "DEFAULT_CREDIT_BY_DURATION",
    "PJ_PER_GWH",
    "PJ_PER_GW_YEAR",
]

PJ_PER_GWH = 0.0036  # 1 GWh = 3.6 TJ (1 kWh = 3.6 MJ exactly, SI)
HOURS_PER_YEAR = 8760.0
PJ_PER_GW_YEAR = PJ_PER_GWH * HOURS_PER_YEAR  # 31.536 PJ from 1 GW running all year

T = TypeVar("T")


def present(value: T | None) -> T:
    """``value``, which prepare_inputs always sets where the caller reads it (a burner's ``fuel``, a converter's
    ``input`` and ``output``, a generator's ``availability``, a store's energy arrays, the years of a carbon budget
    that is set): ``X | None`` narrowed to ``X``. None here is a bug in pathcast, not in the scenario."""
    if value is None:
        raise TypeError("a model input that prepare_inputs sets in this case is None")
    return value


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
    capacity_credit: float = 0.0  # fixed share of capacity counted as firm [-]
    # generators: credit tranches ((width [share of the year's peak demand], inf for the last), credit [-]) in order
    credit_tranches: tuple[tuple[float, float], ...] = ()
    # storage: firm contribution F <= a x power [GW] + b x energy [GWh] for every (a [-], b [1/h]) (credit by duration)
    credit_segments: tuple[tuple[float, float], ...] = ()
    first_build_year: int | None = None  # no new builds before this year (max_build_gw is 0 there)
    phase_out_year: int | None = None  # nothing in service from this year on (max_total_gw is 0 there)
    # generator
    fuel: str | None = None
    efficiency: float = 1.0
    availability: np.ndarray | None = None  # [D, H] for generators and electricity-input converters
    clean: bool = False
    variable_renewable: bool = False  # availability from an hourly profile (counts in the operating reserve)
    # generator operating flexibility (model.flexibility): an online (committed) capacity per hour when
    # ``operating_limits``
    operating_limits: bool = False
    min_stable_output: float = 0.0  # [share of online capacity]
    ramp_rate: float | None = None  # [share of online capacity per hour], None for no limit
    provides_reserve: bool = False  # generators: online headroom counts; storage: headroom counts
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
    # the starting year and the speed of change (every kind)
    committed_gw: np.ndarray | None = None  # [Y] committed projects from each year [GW/yr]; None: none
    committed_energy_gwh: np.ndarray | None = None  # [Y] storage: their energy capacity [GWh/yr]
    earliest_new_year: int | None = None  # first year a build that is not committed can be in service
    lead_time_years: int | None = None  # [yr] as given in the scenario
    build_growth_factor: float | None = None  # [-] new[y] <= seed + factor x new[y-1] + committed; None: none
    build_growth_seed_gw: float = 0.0  # [GW/yr]
    max_early_retirement_gw: float = math.inf  # [GW/yr] growth of capacity retired early, inf for none


@dataclass(frozen=True)
class BaseYearStatistic:
    """One published figure of the base year, to compare with the model's base-year dispatch."""

    quantity: str  # "generation" [TWh/yr], "fuel_use" [PJ/yr] or "emissions" [MtCO2/yr]
    subject: str  # the generator, the fuel, or "total"
    unit: str  # "TWh", "PJ" or "MtCO2" (per year)
    value: float
    source: str = ""


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
class OperatingReserveInputs:
    """Hourly upward operating reserve: demand_share x demand + variable_renewable_share x available output of
    profile-driven generators [GW], held by online generators and storage (model.flexibility)."""

    demand_share: float  # [-]
    variable_renewable_share: float  # [-]
    duration_h: float  # [h] storage must sustain the reserve it holds this long from its state of charge


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
    reserve_margin: float | None  # [-] firm capacity above peak demand; None: no reserve-margin row
    budget_mt: float | None
    budget_years: tuple[int, int] | None
    emission_caps_mt: dict[int, float]
    carbon_price: np.ndarray  # [currency/tCO2] by year
    clean_share: np.ndarray | None  # [-] by year, NaN where no target
    operating_reserve: OperatingReserveInputs | None = None  # None: no operating-reserve rows
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
    # the base year: False: existing fleet and committed projects only (metadata.new_builds_in_base_year)
    new_builds_in_base_year: bool = False
    base_year_statistics: tuple[BaseYearStatistic, ...] = ()

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


def _starting_year_and_pace(
    t: TechnologyInputs, spec, years: np.ndarray, builds_in_base_year: bool
) -> TechnologyInputs:
    """``t`` with its committed projects, the years only committed projects can come into service in (the base
    year, unless ``builds_in_base_year``, and the years of its lead time), its build growth and its early-retirement
    limits, from the scenario's technology ``spec``."""
    lead = spec.lead_time_years
    earliest = int(years[0]) + max(lead or 0, 0 if builds_in_base_year else 1)
    early = years < earliest
    committed = np.zeros(len(years))
    energy = np.zeros(len(years))
    for project in spec.committed:
        at = years == project.in_service_year
        committed[at] += project.capacity_mw / 1000.0
        energy[at] += project.energy_mwh / 1000.0
    growth = spec.max_build_growth
    limit = spec.max_early_retirement_mw_per_year
    return replace(
        t,
        min_build_gw=np.where(early, 0.0, t.min_build_gw),
        max_build_gw=np.where(early, 0.0, t.max_build_gw),
        committed_gw=committed,
        committed_energy_gwh=energy if t.kind == "storage" else None,
        earliest_new_year=earliest,
        lead_time_years=lead,
        build_growth_factor=None if growth is None else float(growth.factor),
        build_growth_seed_gw=0.0 if growth is None else growth.seed_mw / 1000.0,
        max_early_retirement_gw=math.inf if limit is None else limit / 1000.0,
    )


def _base_year_statistics(s: Scenario) -> tuple[BaseYearStatistic, ...]:
    stats = s.base_year_statistics
    if stats is None:
        return ()
    source = stats.source
    out = [
        BaseYearStatistic("generation", n, "TWh", float(v), source) for n, v in stats.generation_twh.items()
    ]
    out += [BaseYearStatistic("fuel_use", n, "PJ", float(v), source) for n, v in stats.fuel_use_pj.items()]
    if stats.emissions_mtco2 is not None:
        out.append(BaseYearStatistic("emissions", "total", "MtCO2", float(stats.emissions_mtco2), source))
    return tuple(out)


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


# Storage credit by hours of duration when the scenario gives none: full credit at 4 hours, pro rata below (the
# "4-hour rule" of resource-adequacy practice, from memory); that credit rises with duration and saturates is the
# finding of Sioshansi, Madaeni & Denholm (2014), IEEE Trans. Power Systems 29(1), 395-403 (secondary).
DEFAULT_CREDIT_BY_DURATION: dict[float, float] = {4.0: 1.0}


def credit_segments(table: dict[float, float] | None) -> tuple[tuple[float, float], ...]:
    """The linear pieces of a concave credit-by-duration curve as (a, b): firm <= a x power + b x energy.

    credit(d) runs linearly through (0, 0) and the table's points, flat after the last; P x credit(E/P) is then the
    minimum over pieces of a_j P + b_j E (the perspective of a concave piecewise-linear function), so the firm
    contribution of a store stays linear in its power P [GW] and energy E [GWh]."""
    points = sorted((DEFAULT_CREDIT_BY_DURATION if table is None else table).items())
    if points[0][0] > 0:
        points = [(0.0, 0.0), *points]
    pieces = []
    for (d0, c0), (d1, c1) in zip(points, points[1:], strict=False):
        slope = (c1 - c0) / (d1 - d0)
        pieces.append((c0 - slope * d0, slope))
    pieces.append((points[-1][1], 0.0))  # flat after the last point: firm <= credit x power
    return tuple(pieces)


def credit_tranches(tranches) -> tuple[tuple[float, float], ...]:
    """(width as a share of the year's peak demand, credit) of each tranche; the last tranche's width is inf."""
    out, start = [], 0.0
    for tranche in tranches:
        end = math.inf if tranche.up_to_share_of_peak is None else float(tranche.up_to_share_of_peak)
        out.append((end - start, float(tranche.credit)))
        start = end
    return tuple(out)


def _flexibility(g) -> dict:
    """A generator's operating limits (schema fields min_stable_output, ramp_rate, provides_reserve): any of them
    gives it an online (committed) capacity per hour; it then provides reserve unless it says not to."""
    limits = g.min_stable_output is not None or g.ramp_rate is not None or g.provides_reserve is True
    return dict(
        operating_limits=limits,
        min_stable_output=float(g.min_stable_output or 0.0),
        ramp_rate=None if g.ramp_rate is None else float(g.ramp_rate),
        provides_reserve=limits and g.provides_reserve is not False,
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
        assert el.base_year_twh is not None  # ElectricityDemand's validator: base_year_twh or yearly_twh
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
        tranches: tuple[tuple[float, float], ...] = ()
        if g.capacity_credit_tranches:
            tranches = credit_tranches(g.capacity_credit_tranches)
            credit = 0.0
        elif credit is None:
            credit = 0.0 if profile_driven else float(availability.mean())
        clean = g.clean if g.clean is not None else (g.fuel is None or ef.get(g.fuel, 0.0) == 0.0)
        techs.append(
            TechnologyInputs(
                name=name,
                kind="generator",
                **_common(g, years, rate),
                capacity_credit=credit,
                credit_tranches=tranches,
                fuel=g.fuel,
                efficiency=efficiency,
                availability=availability,
                clean=clean,
                variable_renewable=profile_driven,
                **_flexibility(g),
            )
        )
    for name, st in s.technologies.storage.items():
        one_way = math.sqrt(st.round_trip_efficiency)
        techs.append(
            TechnologyInputs(
                name=name,
                kind="storage",
                **_common(st, years, rate),
                capacity_credit=st.capacity_credit or 0.0,
                credit_segments=()
                if st.capacity_credit is not None
                else credit_segments(st.credit_by_duration),
                energy_capex=_capex_array(st.energy_capex, years),
                energy_fixed_om=st.energy_fixed_om,
                existing_energy_gwh=_existing(st, years, "energy_mwh", 1e-3),
                charge_efficiency=one_way,
                discharge_efficiency=one_way,
                min_duration_h=st.min_duration_hours,
                max_duration_h=st.max_duration_hours if st.max_duration_hours is not None else math.inf,
                clean=True,
                provides_reserve=st.provides_reserve,
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
            assert fd.base_year_pj is not None  # FuelDemand's validator: base_year_pj or yearly_pj
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

    specs = {**s.technologies.generators, **s.technologies.storage, **s.technologies.converters}
    techs = [_starting_year_and_pace(t, specs[t.name], years, meta.new_builds_in_base_year) for t in techs]

    reserve = pol.operating_reserve
    operating_reserve = None
    if reserve is not None:
        operating_reserve = OperatingReserveInputs(
            demand_share=reserve.demand_share,
            variable_renewable_share=reserve.variable_renewable_share,
            duration_h=reserve.duration_hours,
        )

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
        operating_reserve=operating_reserve,
        solver=solver,
        new_builds_in_base_year=meta.new_builds_in_base_year,
        base_year_statistics=_base_year_statistics(s),
    )
