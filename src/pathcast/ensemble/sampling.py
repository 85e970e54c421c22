"""Sampling designs: Latin hypercube (scipy.stats.qmc.LatinHypercube mapped through each input's inverse CDF), full
grid, and one-at-a-time around the base (low / base / high, for a tornado)."""

from __future__ import annotations

import inspect
import itertools
from dataclasses import dataclass, field
from typing import Any

import numpy as np
from scipy import stats
from scipy.stats import qmc

from .spec import Choice, EnsembleSpec, Levels, Lognormal, Normal, Triangular, Uniform, member_count

__all__ = ["Member", "design_members", "frozen_distribution", "inverse_cdf", "unit_hypercube"]


@dataclass(frozen=True)
class Member:
    """One member of the design: its position, its role and the sampled value of each input it changes (inputs it
    leaves at the base value are absent)."""

    index: int
    role: str  # "sample" (latin_hypercube, grid); "base", "<label>:low", "<label>:high" (one_at_a_time)
    samples: dict[str, Any] = field(default_factory=dict)


def frozen_distribution(item) -> Any | None:
    """The scipy.stats frozen distribution of a continuous input; None for choices and value lists."""
    if isinstance(item, Uniform):
        return stats.uniform(loc=item.low, scale=item.high - item.low)
    if isinstance(item, Triangular):
        return stats.triang(
            c=(item.mode - item.low) / (item.high - item.low), loc=item.low, scale=item.high - item.low
        )
    if isinstance(item, Normal):
        if item.low is None and item.high is None:
            return stats.norm(loc=item.mean, scale=item.sd)
        a = -np.inf if item.low is None else (item.low - item.mean) / item.sd
        b = np.inf if item.high is None else (item.high - item.mean) / item.sd
        return stats.truncnorm(a, b, loc=item.mean, scale=item.sd)
    if isinstance(item, Lognormal):
        return stats.lognorm(s=item.sigma, scale=item.median)
    return None


def _discrete(item) -> tuple[list, np.ndarray]:
    values = list(item.values)
    weights = (
        np.asarray(item.probabilities, dtype=float)
        if isinstance(item, Choice) and item.probabilities
        else np.full(len(values), 1.0 / len(values))
    )
    return values, weights


def inverse_cdf(item, u: np.ndarray) -> list:
    """Values of the input at the probabilities ``u`` in [0, 1)."""
    u = np.asarray(u, dtype=float)
    dist = frozen_distribution(item)
    if dist is not None:
        with np.errstate(
            over="ignore", under="ignore"
        ):  # a very wide lognormal gives inf: refused by validity
            return [float(v) for v in dist.ppf(u)]
    values, weights = _discrete(item)
    index = np.minimum(np.searchsorted(np.cumsum(weights), u, side="right"), len(values) - 1)
    return [values[i] for i in index]


def unit_hypercube(members: int, dimensions: int, seed: int) -> np.ndarray:
    """A Latin hypercube sample of ``members`` points in [0, 1)^dimensions (scrambled, so each point lies at random
    inside its stratum)."""
    generator = np.random.default_rng(seed)
    if "rng" in inspect.signature(qmc.LatinHypercube).parameters:  # SciPy 1.15 and later
        sampler = qmc.LatinHypercube(d=dimensions, rng=generator)
    else:  # earlier SciPy calls it seed
        sampler = qmc.LatinHypercube(d=dimensions, seed=generator)
    return sampler.random(members)


def _levels(item, count: int) -> list:
    if isinstance(item, Levels | Choice):
        return list(item.values)
    return inverse_cdf(item, (np.arange(count) + 0.5) / count)


def _low_high(item, quantiles: tuple[float, float]) -> tuple[Any, Any]:
    if isinstance(item, Levels | Choice):
        return item.values[0], item.values[-1]
    low, high = inverse_cdf(item, np.asarray(quantiles))
    return low, high


def design_members(spec: EnsembleSpec) -> list[Member]:
    """Every member of the ensemble's design, in a fixed order (the same seed gives the same members)."""
    f = spec.file
    labels = list(f.inputs)
    if f.design == "latin_hypercube":
        count = member_count(spec)
        assert f.seed is not None  # EnsembleFile's validator requires a seed with latin_hypercube
        u = unit_hypercube(count, len(labels), int(f.seed))
        columns = {label: inverse_cdf(f.inputs[label], u[:, j]) for j, label in enumerate(labels)}
        return [Member(i, "sample", {label: columns[label][i] for label in labels}) for i in range(count)]
    if f.design == "grid":
        levels = [_levels(f.inputs[label], f.grid_levels) for label in labels]
        return [
            Member(i, "sample", dict(zip(labels, combo, strict=True)))
            for i, combo in enumerate(itertools.product(*levels))
        ]
    members = [Member(0, "base", {})]
    for label in labels:
        low, high = _low_high(f.inputs[label], f.tornado_quantiles)
        members.append(Member(len(members), f"{label}:low", {label: low}))
        members.append(Member(len(members), f"{label}:high", {label: high}))
    return members
