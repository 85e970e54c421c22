"""Engineering-economy factors used throughout: discounting and the capital recovery factor."""

from __future__ import annotations

import numpy as np

__all__ = ["capital_recovery_factor", "discount_factors"]


def capital_recovery_factor(rate: float, lifetime_years: int) -> float:
    """Capital recovery factor (A/P, i, n) = i (1+i)^n / ((1+i)^n - 1) [1/yr]; 1/n when i = 0.

    Turns an overnight investment into the equal yearly payment that repays it with interest over n years.
    """
    if lifetime_years <= 0:
        raise ValueError(f"lifetime_years must be positive, got {lifetime_years!r}")
    if rate == 0:
        return 1.0 / lifetime_years
    growth = (1.0 + rate) ** lifetime_years
    return rate * growth / (growth - 1.0)


def discount_factors(rate: float, years_from_base: np.ndarray) -> np.ndarray:
    """Present-value factors (1 + r)^-(t) for t years after the base year [-]."""
    return (1.0 + rate) ** (-np.asarray(years_from_base, dtype=float))
