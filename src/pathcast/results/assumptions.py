"""The assumptions behind a run, as one long table for memos: demand growth, technology costs and learning, fuel
prices, emission factors with their sources, the discount rate and the policy settings.

Built from the loaded scenario when it is run (:func:`assumptions_table`, by :func:`pathcast.pipeline.run_scenario`):
the run's result carries it as its table ``assumptions`` (:data:`ASSUMPTIONS_TABLE`), written to the result folder as
assumptions.csv and read back with it, so a memo of the folder needs no scenario file. :func:`result_assumptions`
gives a result's table; for a result folder of an earlier pathcast, which has no assumptions.csv, it falls back to the
scenario file when that file is unchanged since the run (same input hash), and otherwise to the few assumptions the
run's metadata and summary record (:func:`metadata_assumptions`), with a note saying so.

Columns: section, subject, item, value (display text), unit, source. ``source`` names the scenario file that set the
value, the citation the scenario gives (emission factors), or says that pathcast's default was used.
"""

from __future__ import annotations

from collections.abc import Mapping
from pathlib import Path
from typing import TYPE_CHECKING, Any

import numpy as np
import pandas as pd

from ..scenario.learning import capex_path
from ..scenario.loader import LoadedScenario
from ..scenario.schema import CapexPath, Converter, Generator, Metadata, Policy, Storage

if TYPE_CHECKING:
    from pydantic import BaseModel

    from .run_result import RunResult

__all__ = [
    "assumptions_table",
    "metadata_assumptions",
    "result_assumptions",
    "ASSUMPTION_COLUMNS",
    "ASSUMPTIONS_TABLE",
    "SECTIONS",
]

ASSUMPTION_COLUMNS = ("section", "subject", "item", "value", "unit", "source")
ASSUMPTIONS_TABLE = (
    "assumptions"  # the name of the table in RunResult.tables and of its file (assumptions.csv)
)
SECTIONS = ("general", "demand", "technologies", "fuel prices", "emission factors")


def _number(value: float) -> str:
    """Display a number: thousands separators above 1,000, three significant digits below."""
    value = float(value)
    if value == 0:
        return "0"
    if abs(value) >= 1000:
        return f"{value:,.0f}"
    if abs(value) >= 100:
        return f"{value:,.1f}".rstrip("0").rstrip(".")
    return f"{value:.3g}"


def _percent(rate: float) -> str:
    return f"{100 * float(rate):.3g} %"


def _path(path: float | dict[int, float] | None, scale: float = 1.0) -> str:
    """A time path: '8' for a constant, '9 (2025), 8 (2035), 8.5 (2060)' for a {year: value} mapping."""
    if path is None:
        return "none"
    if isinstance(path, dict):
        return ", ".join(f"{_number(path[year] * scale)} ({year})" for year in sorted(path))
    return _number(path * scale)


def _growth(growth: float | dict[int, float] | None) -> str:
    if growth is None:
        return "0 %/yr"
    if isinstance(growth, dict):
        return "; ".join(f"{_percent(growth[year])}/yr from {year}" for year in sorted(growth))
    return f"{_percent(growth)}/yr"


def _raw_at(raw: Mapping, path: tuple) -> Any:
    node: Any = raw
    for part in path:
        if not isinstance(node, Mapping) or part not in node:
            return None
        node = node[part]
    return node


def _default_note(model: type[BaseModel], field: str) -> str:
    description = model.model_fields[field].description or ""
    cited = [
        part.strip()
        for part in description.split(".")
        if "source" in part.lower() or "common practice" in part.lower()
    ]
    return "pathcast default" + (f" ({cited[0]})" if cited else "")


class _Rows:
    def __init__(self, loaded: LoadedScenario):
        self.loaded = loaded
        self.rows: list[tuple[str, str, str, str, str, str]] = []

    def source(
        self, path: tuple, default_model: type[BaseModel] | None = None, field: str | None = None
    ) -> str:
        if _raw_at(self.loaded.raw, path) is None and default_model is not None and field is not None:
            return _default_note(default_model, field)
        return Path(self.loaded.file_of(path)).name

    def add(self, section: str, subject: str, item: str, value: str, unit: str, source: str) -> None:
        self.rows.append((section, subject, item, value, unit, source))


def _capex_rows(
    rows: _Rows, where: tuple, name: str, item: str, path: CapexPath, unit: str, years: np.ndarray
) -> None:
    values = capex_path(path, years)
    source = rows.source(where + (item,))
    if len(years) > 1 and not np.isclose(values[0], values[-1]):
        text = f"{_number(values[0])} ({years[0]}) to {_number(values[-1])} ({years[-1]})"
    else:
        text = _number(values[0])
    rows.add("technologies", name, item.replace("_", " "), text, unit, source)
    if path.learning_rate is not None:
        deployment = path.cumulative_deployment
        span = ""
        if isinstance(deployment, dict):
            first, last = min(deployment), max(deployment)
            span = f" (cumulative deployment {_number(deployment[first])} GW in {first} to {_number(deployment[last])} GW in {last})"
        rows.add(
            "technologies",
            name,
            f"{item.replace('_', ' ')} learning rate",
            f"{_percent(path.learning_rate)} per doubling{span}",
            "-",
            source,
        )
    elif path.annual_decline is not None:
        rows.add(
            "technologies",
            name,
            f"{item.replace('_', ' ')} decline",
            f"{_percent(path.annual_decline)}/yr",
            "-",
            source,
        )
    if path.floor:
        rows.add("technologies", name, f"{item.replace('_', ' ')} floor", _number(path.floor), unit, source)


def assumptions_table(loaded: LoadedScenario) -> pd.DataFrame:
    """The assumptions of a loaded scenario (see the module docstring for the columns)."""
    scenario = loaded.scenario
    meta = scenario.metadata
    currency = meta.currency
    years = np.arange(meta.base_year, meta.final_year + 1)
    rows = _Rows(loaded)

    # --- general -------------------------------------------------------------------------------------------------
    rows.add(
        "general",
        "",
        "horizon",
        f"{meta.base_year}-{meta.final_year}",
        "year",
        rows.source(("metadata", "base_year")),
    )
    rows.add(
        "general",
        "",
        "money",
        f"{currency} of {meta.price_year} (real terms)",
        "-",
        rows.source(("metadata", "price_year")),
    )
    rows.add(
        "general",
        "",
        "discount rate",
        _percent(meta.discount_rate),
        "1/yr",
        rows.source(("metadata", "discount_rate")),
    )
    rows.add(
        "general",
        "",
        "value of lost load",
        _number(meta.value_of_lost_load),
        f"{currency}/MWh",
        rows.source(("metadata", "value_of_lost_load"), Metadata, "value_of_lost_load"),
    )
    rows.add(
        "general",
        "",
        "value of unserved fuel",
        _number(meta.value_of_unserved_fuel),
        f"{currency}/GJ",
        rows.source(("metadata", "value_of_unserved_fuel"), Metadata, "value_of_unserved_fuel"),
    )
    policy = scenario.policy
    rows.add(
        "general",
        "",
        "reserve margin",
        "none (no reserve-margin row)" if policy.reserve_margin is None else _percent(policy.reserve_margin),
        "-",
        rows.source(("policy", "reserve_margin"), Policy, "reserve_margin"),
    )
    budget = policy.carbon_budget
    if budget is not None:
        first = budget.first_year or meta.base_year
        last = budget.last_year or meta.final_year
        rows.add(
            "general",
            "",
            "carbon budget",
            f"{_number(budget.total_mt)} over {first}-{last}",
            "MtCO2",
            rows.source(("policy", "carbon_budget")),
        )
    else:
        rows.add("general", "", "carbon budget", "none", "MtCO2", "not set in the scenario")
    if policy.emission_caps_mt:
        rows.add(
            "general",
            "",
            "emission caps",
            _path(dict(policy.emission_caps_mt)),
            "MtCO2/yr",
            rows.source(("policy", "emission_caps_mt")),
        )
    if policy.carbon_price is not None:
        rows.add(
            "general",
            "",
            "carbon price path",
            _path(policy.carbon_price),
            f"{currency}/tCO2",
            rows.source(("policy", "carbon_price")),
        )
    if policy.clean_electricity_share is not None:
        share = policy.clean_electricity_share
        text = (
            ", ".join(f"{_percent(share[y])} ({y})" for y in sorted(share))
            if isinstance(share, dict)
            else _percent(share)
        )
        rows.add(
            "general",
            "",
            "clean electricity share",
            text,
            "-",
            rows.source(("policy", "clean_electricity_share")),
        )

    # --- demand --------------------------------------------------------------------------------------------------
    el = scenario.demand.electricity
    where: tuple[str, ...] = ("demand", "electricity")
    if el.yearly_twh is not None:
        rows.add(
            "demand",
            "electricity",
            "final demand",
            _path(el.yearly_twh),
            "TWh/yr",
            rows.source(where + ("yearly_twh",)),
        )
    else:
        rows.add(
            "demand",
            "electricity",
            "final demand in the base year",
            _number(el.base_year_twh),  # type: ignore[arg-type]  # set when yearly_twh is not (schema validator)
            "TWh/yr",
            rows.source(where + ("base_year_twh",)),
        )
        rows.add("demand", "electricity", "growth", _growth(el.growth), "-", rows.source(where + ("growth",)))
    for name, fuel in scenario.demand.fuels.items():
        where = ("demand", "fuels", name)
        served = ", ".join(fuel.served_by)
        if fuel.yearly_pj is not None:
            rows.add(
                "demand",
                name,
                f"final demand (served by {served})",
                _path(fuel.yearly_pj),
                "PJ/yr",
                rows.source(where + ("yearly_pj",)),
            )
        else:
            rows.add(
                "demand",
                name,
                f"final demand in the base year (served by {served})",
                _number(fuel.base_year_pj),  # type: ignore[arg-type]  # set when yearly_pj is not (schema validator)
                "PJ/yr",
                rows.source(where + ("base_year_pj",)),
            )
            rows.add("demand", name, "growth", _growth(fuel.growth), "-", rows.source(where + ("growth",)))

    # --- technologies --------------------------------------------------------------------------------------------
    groups = scenario.technologies
    for group, techs in (
        ("generators", groups.generators),
        ("storage", groups.storage),
        ("converters", groups.converters),
    ):
        for name, tech in techs.items():
            where = ("technologies", group, name)
            per = "kW of input" if group == "converters" else "kW"
            _capex_rows(rows, where, name, "capex", tech.capex, f"{currency}/{per}", years)
            if isinstance(tech, Storage):
                _capex_rows(rows, where, name, "energy_capex", tech.energy_capex, f"{currency}/kWh", years)
            rows.add(
                "technologies",
                name,
                "fixed O&M",
                _number(tech.fixed_om),
                f"{currency}/{per}/yr",
                rows.source(where + ("fixed_om",)),
            )
            if tech.variable_om:
                rows.add(
                    "technologies",
                    name,
                    "variable O&M",
                    _number(tech.variable_om),
                    f"{currency}/MWh",
                    rows.source(where + ("variable_om",)),
                )
            if isinstance(tech, Generator) and (tech.efficiency is not None or tech.heat_rate is not None):
                efficiency = tech.efficiency if tech.efficiency is not None else 3.6 / tech.heat_rate  # type: ignore[operator]  # set when efficiency is not
                rows.add(
                    "technologies",
                    name,
                    "efficiency",
                    _percent(efficiency) + f" ({tech.fuel})",
                    "-",
                    rows.source(where + ("efficiency" if tech.efficiency is not None else "heat_rate",)),
                )
            elif isinstance(tech, Converter):
                rows.add(
                    "technologies",
                    name,
                    "efficiency",
                    _percent(tech.efficiency) + f" ({tech.input} to {tech.output})",
                    "-",
                    rows.source(where + ("efficiency",)),
                )
            elif isinstance(tech, Storage):
                rows.add(
                    "technologies",
                    name,
                    "efficiency",
                    _percent(tech.round_trip_efficiency) + " (round trip)",
                    "-",
                    rows.source(where + ("round_trip_efficiency",)),
                )
            rows.add(
                "technologies", name, "lifetime", str(tech.lifetime), "yr", rows.source(where + ("lifetime",))
            )
            for field, item, unit in (
                ("first_build_year", "first build year", "year"),
                ("phase_out_year", "phase-out year", "year"),
                ("max_build_mw_per_year", "build limit", "MW/yr"),
                ("max_total_mw", "capacity limit", "MW"),
            ):
                limit = getattr(tech, field)
                if limit is not None:
                    rows.add(
                        "technologies",
                        name,
                        item,
                        str(limit) if unit == "year" else _number(limit),
                        unit,
                        rows.source(where + (field,)),
                    )
            if tech.cost_of_capital is not None:
                rows.add(
                    "technologies",
                    name,
                    "cost of capital",
                    _percent(tech.cost_of_capital),
                    "1/yr",
                    rows.source(where + ("cost_of_capital",)),
                )

    # --- fuel prices and emission factors ------------------------------------------------------------------------
    for name, supply in groups.supplies.items():
        where = ("technologies", "supplies", name)
        rows.add(
            "fuel prices",
            name,
            f"price ({supply.output}, {supply.origin})",
            _path(supply.price),
            f"{currency}/GJ",
            rows.source(where + ("price",)),
        )
        if supply.potential_pj is not None:
            rows.add(
                "fuel prices",
                name,
                "potential",
                _path(supply.potential_pj),
                "PJ/yr",
                rows.source(where + ("potential_pj",)),
            )
        if supply.phase_out_year is not None:
            rows.add(
                "fuel prices",
                name,
                "phase-out year",
                str(supply.phase_out_year),
                "year",
                rows.source(where + ("phase_out_year",)),
            )
    for name, commodity in scenario.commodities.items():
        where = ("commodities", name)
        cited = commodity.source or "no source given in the scenario"
        rows.add(
            "emission factors",
            name,
            "emission factor",
            _number(commodity.emission_factor * 1000.0),
            "kgCO2/GJ",
            f"{cited} ({rows.source(where)})",
        )
    return pd.DataFrame(rows.rows, columns=list(ASSUMPTION_COLUMNS))


def metadata_assumptions(metadata: Mapping[str, Any], summary: Mapping[str, Any]) -> pd.DataFrame:
    """The few assumptions a result folder records by itself (metadata.json and summary.json): horizon, money,
    discount rate, values of lost load and unserved fuel, and the carbon budget."""
    source = "metadata.json of the result folder"
    currency = metadata.get("currency") or summary.get("currency") or ""
    rows = []
    if summary.get("base_year") is not None:
        rows.append(
            (
                "general",
                "",
                "horizon",
                f"{summary['base_year']}-{summary['final_year']}",
                "year",
                "summary.json of the result folder",
            )
        )
    if metadata.get("price_year") is not None or summary.get("price_year") is not None:
        rows.append(
            (
                "general",
                "",
                "money",
                f"{currency} of {metadata.get('price_year', summary.get('price_year'))} (real terms)",
                "-",
                source,
            )
        )
    for key, item, unit in (
        ("discount_rate", "discount rate", "1/yr"),
        ("value_of_lost_load", "value of lost load", f"{currency}/MWh"),
        ("value_of_unserved_fuel", "value of unserved fuel", f"{currency}/GJ"),
    ):
        if metadata.get(key) is not None:
            value = _percent(metadata[key]) if key == "discount_rate" else _number(metadata[key])
            rows.append(("general", "", item, value, unit, source))
    budget = summary.get("carbon_budget_mtco2")
    rows.append(
        (
            "general",
            "",
            "carbon budget",
            "none"
            if budget is None
            else f"{_number(budget)} over {summary.get('budget_first_year')}-{summary.get('budget_last_year')}",
            "MtCO2",
            "summary.json of the result folder",
        )
    )
    return pd.DataFrame(rows, columns=list(ASSUMPTION_COLUMNS))


def result_assumptions(result: RunResult, folder: Path | str | None = None) -> tuple[pd.DataFrame, str]:
    """(assumptions table, note) of a run's result; the note is empty when the table is complete.

    The table the result carries (every run of this pathcast, and its result folder) is returned as it is. A result
    folder of an earlier pathcast (``folder``, without assumptions.csv) has none: then its scenario file is read
    when it is unchanged since the run (the input hash in manifest.json), and otherwise the assumptions the folder
    records itself are returned with a note naming the reason."""
    from ..errors import ScenarioError
    from ..scenario.loader import load_scenario

    carried = result.tables.get(ASSUMPTIONS_TABLE)
    if carried is not None:
        return carried, ""
    scenario_file = result.manifest.get("source")
    if scenario_file and Path(scenario_file).is_file():
        try:
            loaded = load_scenario(scenario_file)
        except ScenarioError:
            loaded = None
        if loaded is not None and loaded.input_hash == result.manifest.get("input_hash"):
            return assumptions_table(loaded), ""
        reason = f"its scenario file {scenario_file} has changed since the run"
    else:
        reason = f"its scenario file {scenario_file or '(not recorded)'} cannot be found"
    where = f"the result folder {folder}" if folder is not None else "the run's metadata"
    note = (
        f"The assumptions of {result.scenario_name} are incomplete: {reason}, so only the assumptions recorded in "
        f"{where} are shown."
    )
    return metadata_assumptions(result.metadata, result.summary), note
