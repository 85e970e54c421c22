"""Capex paths: a yearly table, a constant annual decline, or Wright's law (learning by cumulative deployment)."""

from __future__ import annotations

import math

import numpy as np

from .schema import CapexPath
from .time_paths import path_values

__all__ = ["capex_path", "learning_exponent", "wright_cost"]


def learning_exponent(learning_rate: float) -> float:
    """Wright's-law exponent b = -log2(1 - LR): cost falls by LR at each doubling of cumulative deployment."""
    return -math.log2(1.0 - learning_rate)


def wright_cost(
    base_cost: float, cumulative: np.ndarray, base_cumulative: float, learning_rate: float
) -> np.ndarray:
    """C(X) = C0 (X / X0)^-b [same unit as ``base_cost``]."""
    return base_cost * (np.asarray(cumulative, dtype=float) / base_cumulative) ** (
        -learning_exponent(learning_rate)
    )


def capex_path(path: CapexPath, years: np.ndarray) -> np.ndarray:
    """Capex by year [currency/kW] (or [currency/kWh] for storage energy), never below ``path.floor``."""
    years = np.asarray(years)
    if path.table is not None:
        return np.maximum(path_values(path.table, years), path.floor)
    # CapexPath's validator: exactly one way, and 'base' with annual_decline or learning_rate
    assert path.base is not None
    if path.annual_decline is not None:
        values = path.base * (1.0 - path.annual_decline) ** (years - years[0])
    else:
        assert path.learning_rate is not None
        cumulative = path_values(path.cumulative_deployment, years)
        values = wright_cost(path.base, cumulative, float(cumulative[0]), path.learning_rate)
    return np.maximum(values, path.floor)
