"""Synthetic scenarios of a chosen size for the benchmarks: years x representative hours x technologies.

The structure follows the project's scenario files (tests/data/tiny.yaml): generators with fuels or hourly profiles,
storage, an electrolyser and a fuel synthesis step, fuel supplies, final fuel demands, a binding carbon budget and a
reserve margin. All numbers are invented and illustrative (common practice, no source); only the size matters here.

Representative hours come in whole days of 24 hours (``hours`` must be a multiple of 24).
"""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import yaml

__all__ = ["TECHNOLOGY_ORDER", "parse_size", "scenario_dict", "write_scenario"]

# (name, kind, settings); the first six are always present, larger sizes add the next ones in order.
TECHNOLOGY_ORDER: list[tuple[str, str, dict]] = [
    (
        "gas_combined_cycle",
        "generators",
        {
            "fuel": "natural_gas",
            "efficiency": 0.55,
            "capex": 1000,
            "fixed_om": 25,
            "variable_om": 3,
            "lifetime": 30,
            "availability": 0.9,
            "existing": [{"capacity_mw": 4000, "retirement_year": 2045}],
        },
    ),
    (
        "solar_pv_utility",
        "generators",
        {
            "capex": {"base": 800, "annual_decline": 0.03},
            "fixed_om": 15,
            "lifetime": 25,
            "availability": "solar",
            "max_build_mw_per_year": 3000,
        },
    ),
    (
        "wind_onshore",
        "generators",
        {
            "capex": 1300,
            "fixed_om": 35,
            "lifetime": 25,
            "availability": "wind",
            "capacity_credit": 0.1,
            "max_build_mw_per_year": 2500,
        },
    ),
    (
        "battery_short",
        "storage",
        {
            "capex": 300,
            "energy_capex": 250,
            "fixed_om": 8,
            "lifetime": 15,
            "round_trip_efficiency": 0.86,
            "capacity_credit": 0.5,
            "max_duration_hours": 8,
        },
    ),
    (
        "electrolyser",
        "converters",
        {
            "input": "electricity",
            "output": "hydrogen",
            "efficiency": 0.68,
            "capex": 1200,
            "fixed_om": 30,
            "lifetime": 20,
        },
    ),
    (
        "fuel_synthesis",
        "converters",
        {
            "input": "hydrogen",
            "output": "synthetic_diesel",
            "efficiency": 0.7,
            "capex": 1500,
            "fixed_om": 40,
            "lifetime": 25,
        },
    ),
    (
        "coal_steam",
        "generators",
        {
            "fuel": "coal",
            "efficiency": 0.38,
            "capex": 2000,
            "fixed_om": 45,
            "variable_om": 4,
            "lifetime": 40,
            "availability": 0.85,
            "existing": [{"capacity_mw": 3000, "retirement_year": 2036}],
        },
    ),
    (
        "gas_open_cycle",
        "generators",
        {
            "fuel": "natural_gas",
            "efficiency": 0.36,
            "capex": 600,
            "fixed_om": 12,
            "variable_om": 6,
            "lifetime": 30,
            "availability": 0.95,
        },
    ),
    (
        "wind_offshore",
        "generators",
        {
            "capex": 2600,
            "fixed_om": 70,
            "lifetime": 25,
            "availability": "wind_offshore",
            "capacity_credit": 0.15,
            "max_build_mw_per_year": 1500,
            "first_build_year": 2028,
        },
    ),
    (
        "nuclear",
        "generators",
        {
            "capex": 6500,
            "fixed_om": 110,
            "variable_om": 10,
            "lifetime": 60,
            "availability": 0.9,
            "first_build_year": 2035,
            "max_build_mw_per_year": 1200,
        },
    ),
    (
        "hydro_run_of_river",
        "generators",
        {
            "capex": 3000,
            "fixed_om": 40,
            "lifetime": 60,
            "availability": "run_of_river",
            "capacity_credit": 0.3,
            "max_total_mw": 2500,
            "existing": [{"capacity_mw": 1200, "retirement_year": 2080}],
        },
    ),
    (
        "pumped_hydro",
        "storage",
        {
            "capex": 1800,
            "energy_capex": 60,
            "fixed_om": 15,
            "lifetime": 60,
            "round_trip_efficiency": 0.78,
            "capacity_credit": 0.8,
            "min_duration_hours": 6,
            "max_total_mw": 3000,
        },
    ),
    (
        "solar_pv_rooftop",
        "generators",
        {
            "capex": {"base": 1200, "annual_decline": 0.025},
            "fixed_om": 20,
            "lifetime": 25,
            "availability": "solar_rooftop",
            "max_build_mw_per_year": 800,
        },
    ),
    (
        "biomass_steam",
        "generators",
        {
            "fuel": "biomass",
            "efficiency": 0.32,
            "capex": 3000,
            "fixed_om": 90,
            "variable_om": 5,
            "lifetime": 30,
            "availability": 0.85,
        },
    ),
    (
        "oil_engine",
        "generators",
        {
            "fuel": "diesel",
            "efficiency": 0.4,
            "capex": 700,
            "fixed_om": 15,
            "variable_om": 8,
            "lifetime": 25,
            "availability": 0.9,
            "existing": [{"capacity_mw": 500, "retirement_year": 2032}],
        },
    ),
    (
        "geothermal",
        "generators",
        {"capex": 4000, "fixed_om": 100, "lifetime": 40, "availability": 0.9, "max_total_mw": 800},
    ),
    (
        "battery_long",
        "storage",
        {
            "capex": 500,
            "energy_capex": 150,
            "fixed_om": 10,
            "lifetime": 20,
            "round_trip_efficiency": 0.8,
            "capacity_credit": 0.7,
            "min_duration_hours": 8,
            "max_duration_hours": 24,
        },
    ),
    (
        "hydrogen_turbine",
        "generators",
        {
            "fuel": "hydrogen",
            "efficiency": 0.4,
            "capex": 800,
            "fixed_om": 15,
            "variable_om": 5,
            "lifetime": 30,
            "availability": 0.95,
        },
    ),
    (
        "wind_onshore_low",
        "generators",
        {
            "capex": 1500,
            "fixed_om": 38,
            "lifetime": 25,
            "availability": "wind_low",
            "capacity_credit": 0.08,
            "max_build_mw_per_year": 1500,
        },
    ),
    (
        "solar_thermal",
        "generators",
        {
            "capex": 3500,
            "fixed_om": 60,
            "lifetime": 30,
            "availability": "solar_thermal",
            "max_total_mw": 1500,
        },
    ),
]


def parse_size(text: str) -> tuple[int, int, int]:
    """``"36x288x20"`` -> (years, representative hours, technologies)."""
    try:
        years, hours, techs = (int(part) for part in text.lower().split("x"))
    except ValueError:
        raise ValueError(f"size {text!r}: expected YEARSxHOURSxTECHNOLOGIES, e.g. '36x288x20'") from None
    if hours % 24 or hours <= 0:
        raise ValueError(f"size {text!r}: representative hours must be a positive multiple of 24")
    if not 6 <= techs <= len(TECHNOLOGY_ORDER):
        raise ValueError(f"size {text!r}: technologies must be between 6 and {len(TECHNOLOGY_ORDER)}")
    if years < 2:
        raise ValueError(f"size {text!r}: at least 2 years")
    return years, hours, techs


def _profiles(days: int, seed: int) -> tuple[np.ndarray, dict[str, np.ndarray]]:
    """Demand shape and availability profiles [days, 24] (invented, smooth, reproducible)."""
    rng = np.random.default_rng(seed)
    hour = np.arange(24)
    season = np.cos(2 * math.pi * (np.arange(days) + 0.5) / days)[:, None]  # +1 winter, -1 summer
    daily = 0.85 + 0.25 * np.exp(-((hour - 18.5) ** 2) / 8.0) + 0.15 * np.exp(-((hour - 9) ** 2) / 10.0)
    demand = daily[None, :] * (1.0 + 0.12 * season) + 0.02 * rng.standard_normal((days, 24))
    daylight = 12 - 3 * season  # hours of daylight
    sun = np.clip(np.cos(math.pi * (hour[None, :] - 12.5) / daylight), 0, None) ** 1.3
    clouds = 0.75 + 0.25 * rng.random((days, 1))
    solar = np.round(np.clip(0.9 * sun * clouds, 0, 1), 4)

    def wind(level: float, spread: float) -> np.ndarray:
        base = level + spread * (0.5 * season + rng.standard_normal((days, 1)) * 0.6)
        swing = 0.08 * np.sin(2 * math.pi * (hour[None, :] + rng.integers(0, 24, (days, 1))) / 24)
        return np.round(np.clip(base + swing, 0.02, 0.95), 4)

    profiles = {
        "solar": solar,
        "solar_rooftop": np.round(solar * 0.85, 4),
        "solar_thermal": np.round(np.clip(solar * 1.05, 0, 1), 4),
        "wind": wind(0.32, 0.12),
        "wind_offshore": wind(0.45, 0.15),
        "wind_low": wind(0.24, 0.1),
        "run_of_river": np.round(np.clip(np.repeat(0.55 + 0.25 * season, 24, axis=1), 0, 1), 4),
    }
    return np.round(demand, 4), profiles


def scenario_dict(years: int, hours: int, techs: int, seed: int = 7) -> dict:
    """A scenario file's contents (as a mapping) of the given size."""
    days = hours // 24
    base_year = 2025
    demand, profiles = _profiles(days, seed)
    chosen = TECHNOLOGY_ORDER[:techs]
    used_profiles = {s["availability"] for _, _, s in chosen if isinstance(s.get("availability"), str)}
    # weights that sum to exactly 365 days: equal shares rounded, the remainder on the last day
    weights = [round(365.0 / days, 4)] * days
    weights[-1] = round(365.0 - sum(weights[:-1]), 4)
    representative_days = []
    for d in range(days):
        representative_days.append(
            {
                "name": f"day_{d + 1:02d}",
                "weight_days": weights[d],
                "demand_shape": demand[d].tolist(),
                "availability": {name: profiles[name][d].tolist() for name in sorted(used_profiles)},
            }
        )
    technologies: dict[str, dict] = {"generators": {}, "storage": {}, "converters": {}}
    for name, kind, settings in chosen:
        technologies[kind][name] = settings
    technologies["supplies"] = {
        "gas_import": {"output": "natural_gas", "price": {base_year: 8, base_year + 20: 10}},
        "coal_import": {"output": "coal", "price": 3.5},
        "diesel_import": {"output": "diesel", "price": {base_year: 15, base_year + 20: 18}},
        "biomass_domestic": {"output": "biomass", "origin": "biomass", "price": 6, "potential_pj": 40},
    }
    return {
        "metadata": {
            "name": f"bench_{years}x{hours}x{techs}",
            "description": "Synthetic benchmark system (illustrative numbers).",
            "country": "Benchland",
            "base_year": base_year,
            "final_year": base_year + years - 1,
            "currency": "USD",
            "price_year": 2024,
            "discount_rate": 0.06,
            "illustrative": True,
            # a greenfield system: its base year is optimised like the others, so the LP stays the one the
            # benchmarks have measured (no calibrated starting year)
            "new_builds_in_base_year": True,
        },
        "time": {"representative_days": representative_days},
        "demand": {
            "electricity": {"base_year_twh": 60, "growth": 0.025},
            "fuels": {
                "transport": {
                    "served_by": ["diesel", "synthetic_diesel"],
                    "base_year_pj": 200,
                    "growth": 0.01,
                },
                "industry_hydrogen": {"served_by": ["hydrogen"], "base_year_pj": 5, "growth": 0.05},
            },
        },
        "commodities": {
            "natural_gas": {"emission_factor": 0.0561, "source": "IPCC 2006 Vol.2 Ch.1 Table 1.4"},
            "coal": {
                "emission_factor": 0.0946,
                "source": "IPCC 2006 Vol.2 Ch.1 Table 1.4 (other bituminous coal)",
            },
            "diesel": {
                "emission_factor": 0.0741,
                "source": "IPCC 2006 Vol.2 Ch.1 Table 1.4 (gas/diesel oil)",
            },
            "biomass": {"emission_factor": 0.0, "source": "counted as zero at combustion (common practice)"},
            "hydrogen": {},
            "synthetic_diesel": {},
        },
        "technologies": technologies,
        # about 40 % of the emissions of a pathway without a budget: binding, so the carbon price is positive
        "policy": {"carbon_budget": {"total_mt": round(16.0 * years, 1)}, "reserve_margin": 0.15},
    }


def write_scenario(folder: Path, size: str, seed: int = 7, per_generator: bool = False) -> Path:
    """Write the scenario of ``size``; ``per_generator`` builds one output variable and limit row per generator
    instead of pooling the curtailment of free generators (``solver.pooled_curtailment: false``)."""
    years, hours, techs = parse_size(size)
    folder.mkdir(parents=True, exist_ok=True)
    data = scenario_dict(years, hours, techs, seed)
    suffix = ""
    if per_generator:
        data["solver"] = {"pooled_curtailment": False}
        suffix = ".per_generator"
    path = folder / f"bench_{years}x{hours}x{techs}{suffix}.yaml"
    path.write_text(yaml.safe_dump(data, sort_keys=False, width=120))
    return path
