"""Time paths of scenario values by model year: a constant, a {year: value} mapping interpolated between its years,
or compound growth from a base-year value. Shared by the capex paths (:mod:`.learning`) and the model inputs
(:mod:`.inputs`); the values keep the unit of the scenario field they come from."""

from __future__ import annotations

import numpy as np

__all__ = ["path_values", "growth_path"]


def path_values(path: float | dict[int, float] | None, years: np.ndarray, default: float = 0.0) -> np.ndarray:
    """Values of a time path in each year: a number is constant; a {year: value} mapping is linear between its years
    and flat before the first and after the last."""
    if path is None:
        return np.full(len(years), float(default))
    if isinstance(path, dict):
        known = sorted(path)
        return np.interp(years, known, [path[y] for y in known]).astype(float)
    return np.full(len(years), float(path))


def growth_path(base: float, growth: float | dict[int, float] | None, years: np.ndarray) -> np.ndarray:
    """Compound growth from ``base`` in the first year; ``growth`` is one rate [1/yr] or {first year of period: rate}.
    The rate of a year applies to the step into that year; years before the first period use the first rate."""
    if growth is None:
        rates = np.zeros(len(years))
    elif isinstance(growth, dict):
        starts = sorted(growth)
        rates = np.array(
            [growth[max([s for s in starts if s <= y], default=starts[0])] for y in years], dtype=float
        )
    else:
        rates = np.full(len(years), float(growth))
    factors = np.concatenate([[1.0], np.cumprod(1.0 + rates[1:])])
    return base * factors
