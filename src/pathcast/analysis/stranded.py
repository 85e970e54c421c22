"""Stranded capacity: capacity taken out of service before the end of its lifetime, and the capital not yet recovered.

The LP keeps capacity in service as one number per technology and year, at most what is installed (existing fleet
before its retirement year plus builds inside their lifetime); the gap is ``early_retired_mw`` in the capacity table.
The LP does not say which vintage is retired, so this module assigns early retirement to the vintages that reach the
end of their life soonest (existing blocks by their retirement year, then builds by build year). That order is the
one that keeps retirement irreversible vintage by vintage, and it gives the lowest undepreciated value of the
possible assignments (a conservative estimate).

Undepreciated capex [million currency of the price year] of a model-built vintage retired n years before the end of
its lifetime = the remaining annuity: the outstanding balance of its capital charge, capex x CRF(i, L) x
(1 - (1 + i)^-n) / i, valued in the retirement year (undiscounted), with i the technology's own cost of capital
(recovered from its CRF). It equals the full capex when a vintage is retired in its build year. The existing fleet's
capex was spent before the base year and is not part of the inputs: its early-retired MW are counted, with no value.
Power capacity only (a storage plant's energy capacity is not counted).
"""

from __future__ import annotations

import math

import numpy as np
import pandas as pd
from scipy.optimize import brentq

from ..economics import capital_recovery_factor
from ..results.run_result import RunResult
from ..scenario.inputs import ModelInputs

__all__ = ["stranded_capacity", "rate_from_crf", "remaining_balance_fraction"]

_MIN_GW = 1e-6  # 1 kW: smaller early retirements are solver noise


def rate_from_crf(crf: float, lifetime: int) -> float:
    """The interest rate i [1/yr] with CRF(i, lifetime) = crf (0 when crf = 1/lifetime)."""
    if crf <= 1.0 / lifetime * (1 + 1e-12):
        return 0.0
    return float(brentq(lambda i: capital_recovery_factor(i, lifetime) - crf, 1e-12, 10.0, xtol=1e-14))


def remaining_balance_fraction(rate: float, lifetime: int, remaining_years: float) -> float:
    """Outstanding share of an overnight investment with ``remaining_years`` of its ``lifetime`` annuity payments
    still due: CRF(i, L) x (1 - (1 + i)^-n) / i (n / L when i = 0)."""
    n = max(0.0, min(float(remaining_years), float(lifetime)))
    if rate == 0:
        return n / lifetime
    return capital_recovery_factor(rate, lifetime) * (1.0 - (1.0 + rate) ** -n) / rate


def stranded_capacity(result: RunResult, inputs: ModelInputs) -> pd.DataFrame:
    """Early retirements of a run by technology, vintage and the year they happen.

    Columns: technology, vintage ('existing' or the build year), year (first year out of service), stranded_mw,
    remaining_life_years, undepreciated_capex_million (NaN for the existing fleet). See the module docstring for the
    vintage order and the remaining-annuity value.
    """
    cap = result.tables["capacity"]
    years = inputs.years
    Y = len(years)
    rows = []
    for t in inputs.technologies:
        table = cap[cap["technology"] == t.name].set_index("year").reindex(years)
        if table["early_retired_mw"].isna().all():
            continue
        early = np.nan_to_num(table["early_retired_mw"].to_numpy(dtype=float)) / 1000.0  # [GW]
        if early.max(initial=0.0) <= _MIN_GW:
            continue
        new = np.nan_to_num(table["new_mw"].to_numpy(dtype=float)) / 1000.0
        # vintages: (end index = first year index out of service, size [GW], start index, label, build index or None)
        vintages: list[tuple[float, float, int, str, int | None]] = []
        existing = np.asarray(t.existing_gw, dtype=float)
        steps = np.concatenate([existing[:-1] - existing[1:], [existing[-1]]])
        for k in range(Y):
            if steps[k] > _MIN_GW:
                vintages.append((k + 1 if k < Y - 1 else math.inf, steps[k], 0, "existing", None))
        for b in range(Y):
            if new[b] > _MIN_GW:
                vintages.append((b + t.lifetime, new[b], b, str(int(years[b])), b))
        vintages.sort(key=lambda v: (v[0], v[4] is not None, v[2]))
        rate = rate_from_crf(t.crf, t.lifetime)
        retired_before = np.zeros(len(vintages))
        for y in range(Y):
            left = early[y]
            for v, (end, size, start, label, build) in enumerate(vintages):
                if not start <= y < end:
                    continue
                now = min(size, max(left, 0.0))
                left -= now
                increase = now - retired_before[v]
                retired_before[v] = max(now, retired_before[v])
                if increase <= _MIN_GW:
                    continue
                if build is None:
                    remaining, value = (end - y if math.isfinite(end) else math.nan), math.nan
                else:
                    remaining = build + t.lifetime - y
                    value = (
                        increase * t.capex[build] * remaining_balance_fraction(rate, t.lifetime, remaining)
                    )
                rows.append((t.name, label, int(years[y]), increase * 1000.0, remaining, value))
    return pd.DataFrame(
        rows,
        columns=[
            "technology",
            "vintage",
            "year",
            "stranded_mw",
            "remaining_life_years",
            "undepreciated_capex_million",
        ],
    )
