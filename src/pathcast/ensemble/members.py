"""Make a member's scenario: apply its samples to the merged raw mapping of the base scenario, and hash the result."""

from __future__ import annotations

import copy
import hashlib
import json
from typing import Any

from .spec import NUMBER_WITH_UNIT, EnsembleSpec, is_year_mapping

__all__ = ["Override", "overrides_for", "apply_overrides", "member_mapping", "scenario_hash", "scale_value"]

# (real keys into the raw mapping, "multiplier" | "absolute", value)
Override = tuple[tuple, str, Any]


def scale_value(value: Any, factor: float) -> Any:
    """``value`` times ``factor``: a number, a number with a unit (the unit is kept), or every value of a
    {year: value} path."""
    if is_year_mapping(value):
        return {year: scale_value(item, factor) for year, item in value.items()}
    if isinstance(value, str):
        match = NUMBER_WITH_UNIT.match(value)
        assert match is not None, value  # load_ensemble let through only strings that scalable() accepts
        number, unit = float(match.group(1)) * factor, match.group(2)
        return f"{number!r} {unit}".strip()
    return float(value) * factor


def overrides_for(spec: EnsembleSpec, samples: dict[str, Any]) -> tuple[Override, ...]:
    return tuple(
        (spec.paths[label], spec.file.inputs[label].apply, value) for label, value in samples.items()
    )


def apply_overrides(raw: dict[str, Any], overrides: tuple[Override, ...]) -> dict[str, Any]:
    """Change ``raw`` in place (pass a copy) and return it."""
    for keys, mode, value in overrides:
        node = raw
        for key in keys[:-1]:
            node = node[key]
        last = keys[-1]
        node[last] = scale_value(node[last], float(value)) if mode == "multiplier" else copy.deepcopy(value)
    return raw


def member_mapping(spec: EnsembleSpec, samples: dict[str, Any]) -> dict[str, Any]:
    """The fully resolved raw mapping of a member (a deep copy of the base with its samples applied)."""
    return apply_overrides(copy.deepcopy(spec.base_raw), overrides_for(spec, samples))


def scenario_hash(raw: dict[str, Any]) -> str:
    """SHA-256 of a fully resolved scenario mapping; the same as ``LoadedScenario.input_hash`` of it."""
    text = json.dumps(raw, sort_keys=True, default=str)
    return hashlib.sha256(text.encode()).hexdigest()
