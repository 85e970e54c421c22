"""Every number HiGHS will see is finite and within a plausibility bound, checked on :class:`ModelInputs` before any
linear program is built.

A NaN (say an empty cell read from a CSV table), an overflow (a growth rate compounding to infinity) or an absurd
magnitude (a demand of 1e30) otherwise reaches HiGHS, which treats values beyond 1e20 as infinite and may stop with
an unhelpful status ("model empty"). Each array of :class:`~pathcast.scenario.inputs.ModelInputs` is mapped back to
the scenario field that produced it, so the error names the file that set the field, the field path, the value in
the field's own unit and the allowed range.

The bounds are wide on purpose: they keep any national study valid with a margin of ten or more and only refuse
values that no energy system has. They are common practice, no source (the world figures quoted beside them are
from memory). Internal units are those of :mod:`pathcast.scenario.inputs`; each bound is also shown in the unit the
scenario file uses.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING, Any

import numpy as np
from pydantic import BaseModel

from ..errors import located_error
from .inputs import ModelInputs, TechnologyInputs

if TYPE_CHECKING:
    from .loader import LoadedScenario
    from .schema import Scenario

__all__ = [
    "Bound",
    "check_inputs",
    "MONEY_LIMIT",
    "ELECTRICITY_LIMIT_TWH",
    "FUEL_LIMIT_PJ",
    "POWER_LIMIT_GW",
    "STORAGE_ENERGY_LIMIT_GWH",
    "EMISSION_FACTOR_LIMIT",
    "BUDGET_LIMIT_MT",
    "CAP_LIMIT_MT",
    "DURATION_LIMIT_H",
    "EFFICIENCY_LIMIT",
]

# Plausibility bounds (common practice, no source), in internal units:
MONEY_LIMIT = (
    1e12  # [million currency per GW, per GWh of storage, per PJ, per MtCO2] = [currency per kW, kWh, GJ,
)
# tCO2]; 1e9 million per GWh of electricity = 1e12 currency/MWh. 20 000 USD/kW in a currency of 1e6 units per USD
# is 2e10.
ELECTRICITY_LIMIT_TWH = 1e6  # [TWh/yr] world electricity demand is about 3e4 TWh/yr
FUEL_LIMIT_PJ = 1e7  # [PJ/yr] world final energy use is about 4.4e5 PJ/yr
POWER_LIMIT_GW = 1e5  # [GW] = 1e8 MW; world installed capacity is about 9e3 GW
STORAGE_ENERGY_LIMIT_GWH = 1e7  # [GWh] = 1e10 MWh
EMISSION_FACTOR_LIMIT = 1.0  # [MtCO2/PJ] = [tCO2/GJ]; coal is about 0.1
BUDGET_LIMIT_MT = 1e7  # [MtCO2] the remaining world budget for 1.5 degC is about 5e5 MtCO2
CAP_LIMIT_MT = 1e6  # [MtCO2/yr] world emissions are about 4e4 MtCO2/yr
DURATION_LIMIT_H = 1e5  # [h] about eleven years of storage
EFFICIENCY_LIMIT = 5.0  # [-] the converters' schema limit (heat pumps and the like)


@dataclass(frozen=True)
class Bound:
    """Allowed values of one quantity, in internal units; ``scale`` turns internal into the scenario's unit ``unit``.

    ``unlimited``: +inf is allowed and means "no limit"; ``missing``: NaN is allowed and means "no target";
    ``above_low``: the low end itself is not allowed."""

    low: float
    high: float
    unit: str
    scale: float = 1.0
    unlimited: bool = False
    missing: bool = False
    above_low: bool = False

    def bad(self, values: np.ndarray) -> np.ndarray:
        """Mask of the values [internal units] this bound refuses."""
        v = np.asarray(values, dtype=float)
        allowed_nan = np.isnan(v) & self.missing
        allowed_inf = np.isposinf(v) & self.unlimited
        finite = np.isfinite(v)
        with np.errstate(invalid="ignore"):
            out_of_range = finite & ((v <= self.low if self.above_low else v < self.low) | (v > self.high))
        return (~finite & ~allowed_nan & ~allowed_inf) | out_of_range

    def expected(self, year: int | None = None) -> str:
        """What the bound allows, in the scenario's unit (``year``: the model year of the refused value)."""
        low, high = self.low * self.scale, self.high * self.scale
        unit = f" {self.unit}" if self.unit else ""
        if self.above_low:
            text = f"a finite value above {low:g} and at most {high:g}{unit}"
        else:
            text = f"a finite value from {low:g} to {high:g}{unit}"
        if year is not None:
            text += f" in {year}"
        text += " (plausibility bound"
        if self.unlimited:
            text += "; leave the field out for no limit"
        return text + ")"


def _money(unit: str, scale: float = 1.0, above_low: bool = False) -> Bound:
    return Bound(0.0, MONEY_LIMIT / scale, unit, scale, above_low=above_low)


_POWER = Bound(0.0, POWER_LIMIT_GW, "MW", 1000.0)
_POWER_LIMIT = Bound(0.0, POWER_LIMIT_GW, "MW", 1000.0, unlimited=True)
_BUILD = Bound(0.0, POWER_LIMIT_GW, "MW/yr", 1000.0)
_BUILD_LIMIT = Bound(0.0, POWER_LIMIT_GW, "MW/yr", 1000.0, unlimited=True)
_SHARE = Bound(0.0, 1.0, "")
_SECTION = {"generator": "generators", "storage": "storage", "converter": "converters"}


def _show(value: float) -> float:
    value = float(value)
    return float(f"{value:.6g}") if math.isfinite(value) else value


def _scenario_value(scenario: Scenario | None, path: tuple) -> Any:
    node: Any = scenario
    for part in path:
        if node is None:
            return None
        if isinstance(node, BaseModel):
            node = getattr(node, str(part), None)
        elif isinstance(node, dict):
            node = node.get(part)
        elif isinstance(node, list | tuple) and isinstance(part, int) and part < len(node):
            node = node[part]
        else:
            return None
    return node


class _Checker:
    def __init__(self, inputs: ModelInputs, loaded: LoadedScenario | None):
        self.inputs = inputs
        self.scenario = loaded.scenario if loaded is not None else None
        self.file_of: Callable[[tuple], Path | str] = (
            loaded.file_of if loaded is not None else (lambda _path: f"scenario {inputs.name!r}")
        )
        self.years = [int(y) for y in inputs.years]

    def fail(self, path: tuple, value: Any, expected: str):
        raise located_error(self.file_of(path), path, value, expected)

    def array(self, path: tuple, values, bound: Bound, year_axis: int | None = None) -> None:
        """Check ``values`` [internal units]; a bad value is reported at ``path`` (or at the year key of a
        {year: value} path), in the scenario's unit."""
        values = np.asarray(values, dtype=float)
        bad = bound.bad(values)
        if not bad.any():
            return
        index = np.unravel_index(int(np.flatnonzero(bad.ravel())[0]), values.shape) if values.shape else ()
        shown = _show(values[index] * bound.scale) if values.shape else _show(float(values) * bound.scale)
        year = self.years[index[year_axis]] if year_axis is not None and values.shape else None
        raw = _scenario_value(self.scenario, path)
        if isinstance(raw, dict) and raw and all(isinstance(k, int) for k in raw):
            # a {year: value} path: name the first given year whose value is refused
            for key in sorted(raw):
                if bound.bad(np.array([_number(raw[key]) / bound.scale])).any():
                    self.fail((*path, key), raw[key], bound.expected())
        self.fail(path, shown, bound.expected(year))

    def value(self, path: tuple, value, bound: Bound) -> None:
        self.array(path, np.array(float(value) if value is not None else math.nan), bound)

    # --------------------------------------------------------------------------------------------- by section
    def check(self) -> None:
        i = self.inputs
        self.value(("metadata", "discount_rate"), i.discount_rate, Bound(0.0, 0.5, "1/yr"))
        self.value(
            ("metadata", "value_of_lost_load"),
            i.value_of_lost_load,
            _money("currency/MWh", 1000.0, above_low=True),
        )
        self.value(
            ("metadata", "value_of_unserved_fuel"),
            i.value_of_unserved_fuel,
            _money("currency/GJ", above_low=True),
        )
        for d, weight in enumerate(i.day_weights):
            self.value(
                ("time", "representative_days", d, "weight_days"),
                weight,
                Bound(0.0, 365.0, "days/yr", above_low=True),
            )
        self.electricity_demand()
        for name, factor in i.emission_factor.items():
            self.value(
                ("commodities", name, "emission_factor"), factor, Bound(0.0, EMISSION_FACTOR_LIMIT, "tCO2/GJ")
            )
        for t in i.technologies:
            self.technology(t)
        for s in i.supplies:
            base = ("technologies", "supplies", s.name)
            self.array((*base, "price"), s.price, _money("currency/GJ"), year_axis=0)
            self.array(
                (*base, "potential_pj"), s.potential_pj, Bound(0.0, FUEL_LIMIT_PJ, "PJ/yr", unlimited=True), 0
            )
        for fd in i.fuel_demands:
            self.fuel_demand(fd)
        self.policy()
        # what the model derives from the above (a NaN or overflow here has a cause checked above, or is a bug)
        for path, values in (
            (("metadata", "discount_rate"), i.discount_factor),
            (("demand", "electricity"), i.electricity_demand_gw),
            (("demand", "electricity"), i.peak_demand_gw),
            *(
                (("technologies", _SECTION[t.kind], t.name, "cost_of_capital"), np.array([t.crf]))
                for t in i.technologies
            ),
        ):
            values = np.asarray(values, dtype=float)
            if not np.isfinite(values).all():
                self.fail(
                    path,
                    _show(values[~np.isfinite(values)].ravel()[0]),
                    "inputs that give finite model values",
                )

    def electricity_demand(self) -> None:
        i = self.inputs
        bound = Bound(0.0, ELECTRICITY_LIMIT_TWH, "TWh/yr")
        el = ("demand", "electricity")
        days = _scenario_value(self.scenario, ("time", "representative_days")) or []
        for d, day in enumerate(days):
            shape = np.asarray(day.demand_shape, dtype=float)
            bad = ~np.isfinite(shape) | (shape < 0)
            if bad.any():
                h = int(np.flatnonzero(bad)[0])
                self.fail(
                    ("time", "representative_days", d, "demand_shape", h),
                    _show(shape[h]),
                    f"a finite demand value of at least 0 (day {day.name!r}, hour {h})",
                )
        if not bound.bad(i.electricity_demand_twh).any():
            if not np.isfinite(
                i.electricity_demand_gw
            ).all():  # a NaN in the hourly shape (without a scenario to name it)
                self.fail(("time", "representative_days"), "nan", "finite hourly demand values")
            return
        scenario_el = _scenario_value(self.scenario, el)
        if scenario_el is None:
            self.array(el, i.electricity_demand_twh, bound, year_axis=0)
            return
        if scenario_el.yearly_twh is not None:
            self.array((*el, "yearly_twh"), i.electricity_demand_twh, bound, year_axis=0)
            return
        self.value((*el, "base_year_twh"), scenario_el.base_year_twh, bound)
        self._growth(
            (*el, "growth"), scenario_el.growth, i.electricity_demand_twh, bound, "electricity demand"
        )

    def fuel_demand(self, fd) -> None:
        bound = Bound(0.0, FUEL_LIMIT_PJ, "PJ/yr")
        base = ("demand", "fuels", fd.name)
        if not bound.bad(fd.demand_pj).any():
            return
        given = _scenario_value(self.scenario, base)
        if given is None:
            self.array(base, fd.demand_pj, bound, year_axis=0)
            return
        if given.yearly_pj is not None:
            self.array((*base, "yearly_pj"), fd.demand_pj, bound, year_axis=0)
            return
        self.value((*base, "base_year_pj"), given.base_year_pj, bound)
        self._growth((*base, "growth"), given.growth, fd.demand_pj, bound, f"the demand {fd.name!r}")

    def _growth(self, path: tuple, growth, values: np.ndarray, bound: Bound, what: str) -> None:
        """Blame a growth rate for a demand path that leaves ``bound`` (the base-year value being fine)."""
        bad = bound.bad(values)
        y = int(np.flatnonzero(bad)[0])
        year = self.years[y]
        rate = growth
        if isinstance(growth, dict):
            starts = sorted(growth)
            key = max([s for s in starts if s <= year], default=starts[0])
            path, rate = (*path, key), growth[key]
        self.fail(
            path,
            rate,
            f"a finite growth rate [1/yr] above -1 that keeps {what} within {bound.low:g} to {bound.high:g} "
            f"{bound.unit} (it gives {_show(values[y])} {bound.unit} in {year})",
        )

    def capex(self, path: tuple, values: np.ndarray, bound: Bound) -> None:
        """A capex path [internal units by year]: the table entry, base or floor that is refused, else the path."""
        if not bound.bad(values).any():
            return
        given = _scenario_value(self.scenario, path)
        if given is not None and getattr(given, "table", None) is not None:
            self.array((*path, "table"), values, bound, year_axis=0)
        for name in ("base", "floor"):
            number = getattr(given, name, None)
            if number is not None and bound.bad(np.array([number / bound.scale])).any():
                self.fail((*path, name), number, bound.expected())
        self.array(path, values, bound, year_axis=0)

    def existing(self, base: tuple, attribute: str, values: np.ndarray, bound: Bound) -> None:
        """The fleet in service by year [internal units]: the entry of ``existing`` that is refused, else the list."""
        if not bound.bad(values).any():
            return
        for k, entry in enumerate(_scenario_value(self.scenario, (*base, "existing")) or []):
            number = getattr(entry, attribute)
            if bound.bad(np.array([number / bound.scale])).any():
                self.fail((*base, "existing", k, attribute), number, bound.expected())
        self.array((*base, "existing"), values, bound, year_axis=0)

    def technology(self, t: TechnologyInputs) -> None:
        base = ("technologies", _SECTION[t.kind], t.name)
        self.capex((*base, "capex"), t.capex, _money("currency/kW"))
        self.value((*base, "fixed_om"), t.fixed_om, _money("currency/kW/yr"))
        self.value((*base, "variable_om"), t.variable_om, _money("currency/MWh", 1000.0))
        self.value((*base, "lifetime"), t.lifetime, Bound(1.0, 100.0, "yr"))
        self.existing(base, "capacity_mw", t.existing_gw, _POWER)
        self.array((*base, "min_build_mw_per_year"), t.min_build_gw, _BUILD, year_axis=0)
        self.array((*base, "max_build_mw_per_year"), t.max_build_gw, _BUILD_LIMIT, year_axis=0)
        self.array((*base, "max_total_mw"), t.max_total_gw, _POWER_LIMIT, year_axis=0)
        for k, project in enumerate(_scenario_value(self.scenario, (*base, "committed")) or []):
            self.value((*base, "committed", k, "capacity_mw"), project.capacity_mw / 1000.0, _POWER)
            self.value(
                (*base, "committed", k, "energy_mwh"),
                project.energy_mwh / 1000.0,
                Bound(0.0, STORAGE_ENERGY_LIMIT_GWH, "MWh", 1000.0),
            )
        if t.committed_gw is not None:
            self.array((*base, "committed"), t.committed_gw, _BUILD, year_axis=0)
        self.value((*base, "max_build_growth", "seed_mw"), t.build_growth_seed_gw, _BUILD)
        self.value((*base, "max_early_retirement_mw_per_year"), t.max_early_retirement_gw, _BUILD_LIMIT)
        credit = Bound(0.0, 1.0, "")
        self.value((*base, "capacity_credit"), t.capacity_credit, credit)
        efficiency_field = "efficiency"
        if t.kind == "generator" and _scenario_value(self.scenario, (*base, "heat_rate")) is not None:
            efficiency_field = "heat_rate"
        if efficiency_field == "heat_rate":
            self.value(
                (*base, "heat_rate"),
                t.efficiency,
                Bound(0.0, EFFICIENCY_LIMIT, "(3.6 / heat rate)", above_low=True),
            )
        else:
            self.value((*base, "efficiency"), t.efficiency, Bound(0.0, EFFICIENCY_LIMIT, "", above_low=True))
        if t.availability is not None:
            profile = _scenario_value(self.scenario, (*base, "availability"))
            if isinstance(profile, str):
                bad = _SHARE.bad(t.availability)
                if bad.any():
                    d, h = (int(k) for k in np.argwhere(bad)[0])
                    self.fail(
                        ("time", "representative_days", d, "availability", profile, h),
                        _show(t.availability[d, h]),
                        _SHARE.expected(),
                    )
            self.array((*base, "availability"), t.availability, _SHARE)
        if t.kind == "storage":
            # prepare_inputs gives every storage technology its energy arrays
            assert t.energy_capex is not None and t.existing_energy_gwh is not None
            self.capex((*base, "energy_capex"), t.energy_capex, _money("currency/kWh"))
            self.value((*base, "energy_fixed_om"), t.energy_fixed_om, _money("currency/kWh/yr"))
            self.existing(
                base, "energy_mwh", t.existing_energy_gwh, Bound(0.0, STORAGE_ENERGY_LIMIT_GWH, "MWh", 1000.0)
            )
            one_way = Bound(0.0, 1.0, "(square root of the round-trip efficiency)", above_low=True)
            self.value((*base, "round_trip_efficiency"), t.charge_efficiency, one_way)
            self.value((*base, "round_trip_efficiency"), t.discharge_efficiency, one_way)
            self.value((*base, "min_duration_hours"), t.min_duration_h, Bound(0.0, DURATION_LIMIT_H, "h"))
            self.value(
                (*base, "max_duration_hours"),
                t.max_duration_h,
                Bound(0.0, DURATION_LIMIT_H, "h", unlimited=True, above_low=True),
            )
        if t.kind == "converter":
            self.value((*base, "availability"), t.converter_availability, _SHARE)
            self.value(
                (*base, "process_emission_factor"),
                t.process_emission_factor,
                Bound(0.0, EMISSION_FACTOR_LIMIT, "tCO2/GJ"),
            )

    def policy(self) -> None:
        i = self.inputs
        pol = ("policy",)
        if i.reserve_margin is not None:
            self.value((*pol, "reserve_margin"), i.reserve_margin, Bound(0.0, 2.0, ""))
        if i.budget_mt is not None:
            self.value((*pol, "carbon_budget", "total_mt"), i.budget_mt, Bound(0.0, BUDGET_LIMIT_MT, "MtCO2"))
        for year, cap in i.emission_caps_mt.items():
            self.value((*pol, "emission_caps_mt", year), cap, Bound(0.0, CAP_LIMIT_MT, "MtCO2/yr"))
        self.array((*pol, "carbon_price"), i.carbon_price, _money("currency/tCO2"), year_axis=0)
        if i.clean_share is not None:
            self.array(
                (*pol, "clean_electricity_share"),
                i.clean_share,
                Bound(0.0, 1.0, "", missing=True),
                year_axis=0,
            )
        if i.budget_overshoot_price is not None:
            self.value(("--allow-overshoot",), i.budget_overshoot_price, _money("currency/tCO2"))


def _number(value: Any) -> float:
    try:
        return float(value)
    except (TypeError, ValueError):
        return math.nan


def check_inputs(inputs: ModelInputs, loaded: LoadedScenario | None = None) -> None:
    """Raise ScenarioError (exit 2) for the first value of ``inputs`` that is not finite or is outside its
    plausibility bound, naming the file that set the field (from ``loaded``; the scenario's name without it), the
    field path, the value in the field's unit and the allowed range."""
    _Checker(inputs, loaded).check()
