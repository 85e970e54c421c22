"""The scenario file, field by field (pydantic models).

Every quantity is stored here in its documented unit (the unit is in each field's description and in the README's
scenario reference). A quantity may be written as a bare number in that unit or as a string with a unit, e.g.
``capex: "0.9 USD/W"``; conversion happens while validating, with the scenario's currency taken from
``metadata.currency`` (passed in the validation context).

Time paths (prices, potentials, caps, ...) are written as a single number (constant), a mapping ``{year: value}``
(linear between the given years, flat outside them) or the name of a CSV file with columns ``year,value``; the loader
has already replaced CSV names by mappings when these models see them.
"""

from __future__ import annotations

import math
from typing import Annotated, Any, Literal

from pydantic import (
    BaseModel,
    BeforeValidator,
    ConfigDict,
    Field,
    ValidationInfo,
    field_validator,
    model_validator,
)

from ..results.folders import check_folder_name, safe_folder_name
from .units import UnitError, to_unit

__all__ = [
    "Scenario",
    "Metadata",
    "TimeStructure",
    "RepresentativeDay",
    "Demand",
    "ElectricityDemand",
    "FuelDemand",
    "Commodity",
    "Technologies",
    "Generator",
    "Storage",
    "Converter",
    "Supply",
    "ExistingCapacity",
    "CommittedProject",
    "BuildGrowth",
    "BaseYearStatistics",
    "CapexPath",
    "Policy",
    "CarbonBudget",
    "OperatingReserve",
    "SolverSettings",
    "Extension",
    "ELECTRICITY",
]

ELECTRICITY = "electricity"


def _quantity(unit: str):
    def convert(value: Any, info: ValidationInfo) -> Any:
        currency = (info.context or {}).get("currency", "USD")
        try:
            return to_unit(value, unit, currency)
        except UnitError as error:
            raise ValueError(str(error)) from None

    return BeforeValidator(convert)


def _path(unit: str, minimum: float | None = 0.0, above: float | None = None, maximum: float | None = None):
    """A time path in ``unit``: number, ``{year: value}`` mapping, converted value by value. Every value must be
    finite, at least ``minimum`` (``None``: any sign), strictly above ``above`` and at most ``maximum`` when given."""

    def check(item: float, year: int | None, currency: str) -> float:
        where = f" for {year}" if year is not None else ""
        shown = "" if unit == "dimensionless" else " " + unit.replace("currency", str(currency))
        if not math.isfinite(item):
            raise ValueError(f"a finite number{where}, not {item!r}")
        if minimum is not None and item < minimum:
            raise ValueError(f"a value of at least {minimum:g}{shown}{where}, not {item!r}")
        if above is not None and item <= above:
            raise ValueError(f"a value above {above:g}{shown}{where}, not {item!r}")
        if maximum is not None and item > maximum:
            raise ValueError(f"a value of at most {maximum:g}{shown}{where}, not {item!r}")
        return item

    def convert(value: Any, info: ValidationInfo) -> Any:
        currency = (info.context or {}).get("currency", "USD")
        try:
            if isinstance(value, dict):
                out = {}
                for year, item in value.items():
                    if isinstance(year, bool):
                        raise ValueError(f"years as keys of the mapping, not {year!r}")
                    try:
                        year_int = int(year)
                    except (TypeError, ValueError):
                        raise ValueError(f"years as keys of the mapping, not {year!r}") from None
                    out[year_int] = check(to_unit(item, unit, currency), year_int, currency)
                if not out:
                    raise ValueError("at least one {year: value} entry")
                return out
            return check(to_unit(value, unit, currency), None, currency)
        except UnitError as error:
            raise ValueError(str(error)) from None

    return BeforeValidator(convert)


Money_per_kW = Annotated[float, _quantity("currency/kW"), Field(ge=0)]
Money_per_kWh = Annotated[float, _quantity("currency/kWh"), Field(ge=0)]
Money_per_kW_year = Annotated[float, _quantity("currency/kW/year"), Field(ge=0)]
Money_per_MWh = Annotated[float, _quantity("currency/MWh"), Field(ge=0)]
Megawatts = Annotated[float, _quantity("MW"), Field(ge=0)]
MegawattHours = Annotated[float, _quantity("MWh"), Field(ge=0)]
Fraction = Annotated[float, Field(ge=0, le=1)]


def _whole(kind: str, low: int, high: int):
    """A whole number (a float such as 2030.0 is accepted; 2030.5, 1e30, inf and true/false are not); the range
    ``low``-``high`` is checked by the field's own bounds."""

    def convert(value: Any) -> Any:
        if isinstance(value, bool):
            raise ValueError(f"a whole {kind} from {low} to {high}, not a true/false value")
        if isinstance(value, float):
            if not math.isfinite(value) or not value.is_integer() or abs(value) > 1e9:
                raise ValueError(f"a whole {kind} from {low} to {high}")
            return int(value)
        return value

    return BeforeValidator(convert)


# Calendar years of a planning study: 1900-2200 (wide enough for any history and horizon; common practice, no source)
Year = Annotated[int, _whole("year", 1900, 2200), Field(ge=1900, le=2200)]
Lifetime = Annotated[int, _whole("number of years", 1, 100), Field(ge=1, le=100)]
YearPath = dict[int, float] | float

# Growth rates: above -100 %/yr (demand cannot fall below zero) and at most +100 %/yr (a doubling every year; faster
# growth is better written as yearly_twh / yearly_pj). Common practice, no source.
GrowthPath = Annotated[YearPath, _path("dimensionless", minimum=None, above=-1.0, maximum=1.0)]


class _Strict(BaseModel):
    # every number must be finite: inf and NaN are refused in every field (YAML .inf/.nan, "inf" strings, CSV cells)
    model_config = ConfigDict(extra="forbid", frozen=True, allow_inf_nan=False)


class Metadata(_Strict):
    name: str = Field(
        description="Short scenario name; the result folder results/<name> is named after it: 1 to 64 letters, "
        "digits, '_', '-' and '.', starting with a letter, digit or '_'."
    )
    description: str = Field("", description="Free text.")
    country: str = Field("", description="Country or region studied.")
    base_year: Year = Field(description="First modelled year.")
    final_year: Year = Field(description="Last modelled year (inclusive).")
    currency: str = Field("USD", pattern=r"^[A-Z]{3}$", description="ISO 4217 code of every money amount.")
    price_year: Year = Field(description="Year whose money all amounts are in (real terms).")
    discount_rate: Annotated[float, Field(ge=0, le=0.5)] = Field(
        description="Social discount rate [1/yr] for the present value of system cost; also the default cost of capital."
    )
    value_of_lost_load: Annotated[float, _quantity("currency/MWh"), Field(gt=0)] = Field(
        10000.0,
        description="Cost of unserved electricity [currency/MWh]. Default 10 000 USD/MWh: common practice, no source.",
    )
    value_of_unserved_fuel: Annotated[float, _quantity("currency/GJ"), Field(gt=0)] = Field(
        1000.0,
        description="Cost of unserved fuel demand [currency/GJ]; a penalty that makes shortfalls visible. Common practice, no source.",
    )
    illustrative: bool = Field(
        False, description="True when the numbers are invented (the demo); memos say so."
    )
    new_builds_in_base_year: bool = Field(
        False,
        description="False: the base year is the country as it is, its existing fleet and committed projects "
        "only; true: the base year is optimised like the others (greenfield and screening studies).",
    )

    @field_validator("name")
    @classmethod
    def _folder_name(cls, value: str) -> str:
        problem = check_folder_name(value)
        if problem:
            raise ValueError(f"{problem} (it names the result folder), e.g. {safe_folder_name(value)!r}")
        return value

    @model_validator(mode="after")
    def _years(self) -> Metadata:
        if self.final_year < self.base_year:
            raise ValueError(
                f"final_year {self.final_year!r} must not be before base_year {self.base_year!r}"
            )
        return self


class RepresentativeDay(_Strict):
    name: str = Field(description="Label of the day, unique.")
    weight_days: Annotated[float, Field(gt=0)] = Field(
        description="Days of the year this day stands for [days/yr]."
    )
    demand_shape: list[float] = Field(
        description="24 hourly values of electricity demand, any scale (normalised so the year's demand is met)."
    )
    availability: dict[str, list[float]] = Field(
        default_factory=dict,
        description="24 hourly availability factors [0-1] per variable resource, e.g. solar, wind, run_of_river.",
    )


class TimeStructure(_Strict):
    representative_days: list[RepresentativeDay] = Field(min_length=1)


class ElectricityDemand(_Strict):
    base_year_twh: Annotated[float, _quantity("TWh"), Field(gt=0)] | None = Field(
        None, description="Final electricity demand in the base year [TWh/yr]."
    )
    growth: GrowthPath | None = Field(
        None,
        description="Growth rate [1/yr], above -1 and at most 1: one number, or {first year of period: rate} for "
        "periods.",
    )
    yearly_twh: Annotated[YearPath, _path("TWh")] | None = Field(
        None, description="Explicit demand by year [TWh/yr]; replaces base_year_twh and growth."
    )

    @model_validator(mode="after")
    def _one_way(self) -> ElectricityDemand:
        if self.yearly_twh is None and self.base_year_twh is None:
            raise ValueError("either base_year_twh (with growth) or yearly_twh")
        return self


class FuelDemand(_Strict):
    served_by: list[str] = Field(
        min_length=1,
        description="Commodities that can meet this demand (e.g. diesel, biodiesel, synthetic_diesel).",
    )
    base_year_pj: Annotated[float, _quantity("PJ"), Field(ge=0)] | None = Field(None, description="[PJ/yr]")
    growth: GrowthPath | None = Field(None, description="Growth rate [1/yr], as for electricity.")
    yearly_pj: Annotated[YearPath, _path("PJ")] | None = Field(
        None, description="Explicit demand by year [PJ/yr]."
    )

    @model_validator(mode="after")
    def _one_way(self) -> FuelDemand:
        if self.yearly_pj is None and self.base_year_pj is None:
            raise ValueError("either base_year_pj (with growth) or yearly_pj")
        return self


class Demand(_Strict):
    electricity: ElectricityDemand
    fuels: dict[str, FuelDemand] = Field(default_factory=dict)


class Commodity(_Strict):
    emission_factor: Annotated[float, _quantity("tCO2/GJ"), Field(ge=0)] = Field(
        0.0, description="CO2 released when 1 GJ is burned [tCO2/GJ] (net calorific basis)."
    )
    source: str = Field("", description="Where the emission factor comes from.")
    description: str = Field("", description="Free text.")


class CapexPath(_Strict):
    """A capex path [currency/kW]: exactly one of ``table``, ``annual_decline`` or ``learning_rate``."""

    base: Annotated[float, _quantity("currency/kW"), Field(ge=0)] | None = Field(
        None, description="Capex in the base year [currency/kW] (for annual_decline and learning_rate)."
    )
    table: Annotated[YearPath, _path("currency/kW")] | None = Field(
        None, description="{year: capex} [currency/kW]."
    )
    annual_decline: Annotated[float, Field(gt=-0.5, lt=1)] | None = Field(
        None, description="Constant fractional decline per year [1/yr]."
    )
    learning_rate: Annotated[float, Field(ge=0, lt=1)] | None = Field(
        None, description="Fractional cost fall per doubling of cumulative deployment (Wright's law)."
    )
    cumulative_deployment: Annotated[YearPath, _path("GW")] | None = Field(
        None,
        description="Projected cumulative (usually global) deployment by year [GW] that drives learning.",
    )
    floor: Annotated[float, _quantity("currency/kW"), Field(ge=0)] = Field(
        0.0, description="Capex never falls below this [currency/kW]."
    )

    @model_validator(mode="after")
    def _one_way(self) -> CapexPath:
        ways = [self.table is not None, self.annual_decline is not None, self.learning_rate is not None]
        if sum(ways) != 1:
            raise ValueError("exactly one of 'table', 'annual_decline' or 'learning_rate'")
        if (self.annual_decline is not None or self.learning_rate is not None) and self.base is None:
            raise ValueError("'base' (capex in the base year) with annual_decline or learning_rate")
        if self.learning_rate is not None and self.cumulative_deployment is None:
            raise ValueError("'cumulative_deployment' {year: GW} with learning_rate")
        return self


def _capex(value: Any, info: ValidationInfo) -> Any:
    if isinstance(value, dict):
        return value
    currency = (info.context or {}).get("currency", "USD")
    try:
        return {"table": to_unit(value, "currency/kW", currency)}
    except UnitError as error:
        raise ValueError(str(error)) from None


Capex = Annotated[CapexPath, BeforeValidator(_capex)]


class ExistingCapacity(_Strict):
    capacity_mw: Megawatts = Field(description="Capacity in service in the base year [MW].")
    retirement_year: Year = Field(description="First year the capacity is no longer in service.")
    energy_mwh: MegawattHours = Field(0.0, description="Storage only: energy capacity [MWh].")


class CommittedProject(_Strict):
    """A project already decided (financed, under construction): it comes into service in ``in_service_year``
    whatever the optimisation finds, and counts as a build of that year (its investment is in the costs)."""

    capacity_mw: Megawatts = Field(description="Capacity the project adds [MW].")
    in_service_year: Year = Field(
        description="First year the project is in service, from metadata.base_year to metadata.final_year."
    )
    energy_mwh: MegawattHours = Field(
        0.0,
        description="Storage only: energy capacity the project adds [MWh], within the technology's shortest and "
        "longest duration.",
    )
    description: str = Field("", description="Free text (project name, source).")


class BuildGrowth(_Strict):
    """How fast the yearly builds of a technology can grow: new[y] <= seed_mw + factor x new[y-1] (committed
    projects come on top)."""

    factor: Annotated[float, Field(ge=1, le=10)] = Field(
        description="Largest ratio of one year's builds to the previous year's [-], at least 1."
    )
    seed_mw: Megawatts = Field(
        description="Builds possible in any year whatever was built the year before [MW/yr]: the size of the "
        "industry that a technology starts from."
    )


class CreditTranche(_Strict):
    """One tranche of a generator's capacity with its own capacity credit: capacity up to ``up_to_share_of_peak`` x
    the year's peak demand (counted from the previous tranche's end) earns ``credit``."""

    up_to_share_of_peak: Annotated[float, Field(gt=0, le=10)] | None = Field(
        None,
        description="Where the tranche ends, as a share of the year's peak demand [-]; none for the last tranche, "
        "which takes all capacity beyond the others.",
    )
    credit: Fraction = Field(description="Capacity credit of the capacity in this tranche [-].")


class _Technology(_Strict):
    description: str = Field("", description="Free text.")
    capex: Capex = Field(description="Overnight investment [currency/kW] or a capex path.")
    fixed_om: Money_per_kW_year = Field(0.0, description="Fixed O&M [currency/kW/yr] on capacity in service.")
    variable_om: Money_per_MWh = Field(
        0.0, description="Variable O&M [currency/MWh] of output (converters: of input)."
    )
    lifetime: Lifetime = Field(description="Economic and technical lifetime [yr].")
    cost_of_capital: Annotated[float, Field(ge=0, le=0.5)] | None = Field(
        None,
        description="Technology's own discount rate for annualising capex [1/yr]; default metadata.discount_rate.",
    )
    existing: list[ExistingCapacity] = Field(default_factory=list)
    min_build_mw_per_year: Megawatts = Field(0.0, description="[MW/yr] built every year at least.")
    max_build_mw_per_year: Megawatts | None = Field(None, description="[MW/yr]; none means unlimited.")
    max_total_mw: Megawatts | None = Field(
        None, description="Resource or siting potential [MW] in service at most."
    )
    first_build_year: Year | None = Field(None, description="No new builds before this year.")
    phase_out_year: Year | None = Field(
        None, description="No capacity in service from this year on (existing included)."
    )
    committed: list[CommittedProject] = Field(
        default_factory=list,
        description="Projects already decided, each with its capacity [MW] and in-service year; the only new "
        "capacity of the base year.",
    )
    lead_time_years: Annotated[int, _whole("number of years", 0, 100), Field(ge=0, le=100)] | None = Field(
        None,
        description="Years from a decision taken in the base year to service [yr]: builds other than committed "
        "projects from metadata.base_year + lead_time_years on (and never in the base year itself); at most the "
        "horizon. Default: from the year after the base year.",
    )
    max_build_growth: BuildGrowth | None = Field(
        None,
        description="Limit on how fast the yearly builds can grow: {factor, seed_mw} (README, the optimisation).",
    )
    max_early_retirement_mw_per_year: Megawatts | None = Field(
        None,
        description="Capacity retired before the end of its life (existing fleet or builds) grows by at most this "
        "much a year [MW/yr]; none means unlimited.",
    )


class Generator(_Technology):
    fuel: str | None = Field(
        None, description="Commodity burned; none for wind, solar, hydro, nuclear fuel in O&M."
    )
    efficiency: Fraction | None = Field(
        None, description="Electricity out / fuel in, net calorific basis [-]."
    )
    heat_rate: Annotated[float, _quantity("GJ/MWh"), Field(gt=0)] | None = Field(
        None,
        description="Fuel in per electricity out [GJ/MWh]; alternative to efficiency (efficiency = 3.6 / heat rate).",
    )
    availability: float | str = Field(
        1.0,
        description="Constant availability [0-1], or the name of an hourly profile in the representative days.",
    )
    capacity_credit: Fraction | None = Field(
        None,
        description="Share of capacity counted toward the reserve margin [-]; default: the constant availability for "
        "dispatchable plants, 0 for profile-driven ones (common practice, no source).",
    )
    capacity_credit_tranches: list[CreditTranche] | None = Field(
        None,
        description="Capacity credit that falls as more is built: tranches of capacity, each up to a share of the "
        "year's peak demand, with credits that do not rise from one tranche to the next; replaces capacity_credit "
        "(README, reserve margin).",
    )
    clean: bool | None = Field(
        None, description="Counts toward the clean-electricity share; default: burns no fossil carbon."
    )
    min_stable_output: Fraction | None = Field(
        None,
        description="Lowest output of the online (committed) capacity [share of online capacity, 0-1]: the "
        "generator gets an online capacity in every hour, between 0 and availability x capacity in service, and "
        "produces between this share of it and all of it (README, operating flexibility).",
    )
    ramp_rate: Fraction | None = Field(
        None,
        description="Largest change of output from one hour to the next [share of online capacity per hour, 0-1]; "
        "gives the generator an online capacity like min_stable_output (README, operating flexibility).",
    )
    provides_reserve: bool | None = Field(
        None,
        description="Headroom of its online capacity counts toward policy.operating_reserve; default: true for a "
        "generator with min_stable_output or ramp_rate, false otherwise (true gives it an online capacity).",
    )

    @model_validator(mode="after")
    def _fuel(self) -> Generator:
        if self.fuel is not None and self.efficiency is None and self.heat_rate is None:
            raise ValueError("'efficiency' or 'heat_rate' for a generator that burns a fuel")
        if self.efficiency is not None and self.heat_rate is not None:
            raise ValueError("only one of 'efficiency' and 'heat_rate'")
        if isinstance(self.availability, float) and not 0 <= self.availability <= 1:
            raise ValueError(f"availability between 0 and 1, not {self.availability!r}")
        if self.efficiency is not None and self.efficiency <= 0:
            raise ValueError("an efficiency above 0")
        return self


class Storage(_Technology):
    energy_capex: Capex = Field(
        description="Investment in energy capacity [currency/kWh] (capex is per kW of power)."
    )
    energy_fixed_om: Annotated[float, _quantity("currency/kWh/year"), Field(ge=0)] = 0.0
    round_trip_efficiency: Annotated[float, Field(gt=0, le=1)] = Field(
        description="Energy out / energy in [-]."
    )
    capacity_credit: Fraction | None = Field(
        None,
        description="A fixed share of power capacity counted toward the reserve margin, whatever the energy "
        "duration [-]; default: the credit follows the duration (credit_by_duration).",
    )
    credit_by_duration: dict[Annotated[float, Field(gt=0, le=1000)], Fraction] | None = Field(
        None,
        description="Capacity credit by hours of energy duration {hours: credit}, linear between the points, from "
        "0 at 0 h, flat after the last; credits must rise ever more slowly. Default {4: 1.0}: full credit at 4 h of "
        "duration, pro rata below (the 4-hour rule of resource-adequacy practice; from memory).",
    )
    min_duration_hours: Annotated[float, Field(ge=0)] = Field(0.0, description="Energy / power at least [h].")
    max_duration_hours: Annotated[float, Field(gt=0)] | None = Field(
        None, description="Energy / power at most [h]."
    )
    provides_reserve: bool = Field(
        True,
        description="Headroom of its power (and energy to sustain it) counts toward policy.operating_reserve.",
    )


class Converter(_Technology):
    input: str = Field(description="Commodity consumed (electricity for an electrolyser).")
    output: str = Field(description="Commodity produced.")
    efficiency: Annotated[float, Field(gt=0, le=5)] = Field(
        description="Energy out / energy in [-] (LHV basis)."
    )
    availability: Fraction = Field(1.0, description="Share of the year the converter can run [-].")
    process_emission_factor: Annotated[float, _quantity("tCO2/GJ"), Field(ge=0)] = Field(
        0.0,
        description="CO2 released by the conversion itself per GJ of output [tCO2/GJ] (e.g. refinery own use).",
    )


class Supply(_Strict):
    description: str = Field("", description="Free text.")
    output: str = Field(description="Commodity supplied.")
    origin: Literal["import", "domestic", "biomass"] = "import"
    price: Annotated[YearPath, _path("currency/GJ")] = Field(description="Price path [currency/GJ].")
    potential_pj: Annotated[YearPath, _path("PJ")] | None = Field(
        None, description="Yearly supply limit [PJ/yr]."
    )
    phase_out_year: Year | None = Field(None, description="No supply from this year on.")


class Technologies(_Strict):
    generators: dict[str, Generator] = Field(default_factory=dict)
    storage: dict[str, Storage] = Field(default_factory=dict)
    converters: dict[str, Converter] = Field(default_factory=dict)
    supplies: dict[str, Supply] = Field(default_factory=dict)


class CarbonBudget(_Strict):
    total_mt: Annotated[float, _quantity("MtCO2"), Field(ge=0)] = Field(
        description="Cumulative CO2 allowed [MtCO2]."
    )
    first_year: Year | None = Field(None, description="First year counted; default metadata.base_year.")
    last_year: Year | None = Field(None, description="Last year counted; default metadata.final_year.")


class OperatingReserve(_Strict):
    """Upward operating reserve held in every representative hour: headroom of online generators that provide
    reserve and of storage (README, operating flexibility)."""

    demand_share: Fraction = Field(
        0.0, description="Reserve per unit of the hour's electricity demand [share of demand, 0-1]."
    )
    variable_renewable_share: Fraction = Field(
        0.0,
        description="Reserve per unit of the hour's available output of generators with an hourly availability "
        "profile (wind, solar, run-of-river) [share of available output, 0-1].",
    )
    duration_hours: Annotated[float, Field(gt=0, le=24)] = Field(
        1.0,
        description="Hours storage must be able to sustain the reserve it holds, from its state of charge [h]. "
        "Default 1 h: common practice, no source.",
    )


class Policy(_Strict):
    carbon_budget: CarbonBudget | None = None
    emission_caps_mt: dict[int, Annotated[float, _quantity("MtCO2"), Field(ge=0)]] = Field(
        default_factory=dict, description="Yearly caps [MtCO2/yr], only in the years listed."
    )
    carbon_price: Annotated[YearPath, _path("currency/tCO2")] | None = Field(
        None, description="Carbon price path [currency/tCO2] paid on every tonne emitted."
    )
    clean_electricity_share: Annotated[YearPath, _path("dimensionless", maximum=1.0)] | None = Field(
        None,
        description="Minimum share of electricity demand met by clean generators, path from its first year [-].",
    )
    reserve_margin: Annotated[float, Field(ge=0, le=2)] | None = Field(
        0.15,
        description="Firm capacity above the year's peak demand [-]; null for no reserve-margin row at all (0 keeps "
        "the row: firm capacity of at least the peak). Default 15 %: common practice, no source.",
    )
    operating_reserve: OperatingReserve | None = Field(
        None,
        description="Hourly upward operating reserve {demand_share, variable_renewable_share, duration_hours}; none "
        "for no reserve rows (README, operating flexibility).",
    )


class SolverSettings(_Strict):
    method: Literal["auto", "simplex", "ipm", "ipm-crossover", "pdlp"] = Field(
        "auto", description="HiGHS algorithm; auto picks by problem size (see README, performance)."
    )
    time_limit_s: Annotated[float, Field(gt=0)] | None = None
    threads: Annotated[int, Field(ge=0)] | None = None
    options: dict[str, Any] = Field(
        default_factory=dict, description="Any further HiGHS option, by its HiGHS name."
    )
    pooled_curtailment: bool = Field(
        True,
        description="Generators with no fuel and no variable cost offer availability x capacity every hour, "
        "less one shared curtailment per hour, instead of one output variable and limit row each: the same optimum "
        "with fewer rows (see README, performance); false builds one per generator.",
    )


class Extension(_Strict):
    file: str = Field(
        description="Python file, relative to the scenario file, whose function adds rules to the model (README, "
        "Extensions)."
    )
    function: str = Field(
        "extend",
        pattern=r"^[A-Za-z_][A-Za-z0-9_]*$",
        description="Name of the function in that file; it receives (model, inputs).",
    )


class BaseYearStatistics(_Strict):
    """Published figures of the base year (energy balance, inventory) to compare with the model's base-year
    dispatch: the run reports each difference in the table base_year_calibration."""

    source: str = Field("", description="Where the statistics come from (publication, table, year).")
    generation_twh: dict[str, Annotated[float, _quantity("TWh"), Field(ge=0)]] = Field(
        default_factory=dict, description="Electricity generated by each generator in the base year [TWh/yr]."
    )
    fuel_use_pj: dict[str, Annotated[float, _quantity("PJ"), Field(ge=0)]] = Field(
        default_factory=dict,
        description="Use of each fuel in the base year: burned in power plants, converted and delivered to final "
        "demand [PJ/yr].",
    )
    emissions_mtco2: Annotated[float, _quantity("MtCO2"), Field(ge=0)] | None = Field(
        None, description="CO2 emitted in the base year, all sources [MtCO2/yr]."
    )


class Scenario(_Strict):
    metadata: Metadata
    time: TimeStructure
    demand: Demand
    commodities: dict[str, Commodity] = Field(default_factory=dict)
    technologies: Technologies
    policy: Policy = Field(default_factory=Policy)
    solver: SolverSettings = Field(default_factory=SolverSettings)
    extensions: list[Extension] = Field(
        default_factory=list, description="Users' own rules in Pyomo, applied in order (README, Extensions)."
    )
    base_year_statistics: BaseYearStatistics | None = Field(
        None,
        description="Published base-year figures to compare with the model's base year (table "
        "base_year_calibration).",
    )
