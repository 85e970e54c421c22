"""Numbers of an ensemble file that make sense, and sampled values the scenario accepts.

Checked by :func:`pathcast.ensemble.spec.load_ensemble` (so by ``pathcast check`` and ``pathcast ensemble`` before
anything is solved or written), each failure one located sentence naming the ensemble file, the input and the value:

1. :func:`check_numbers` -- before the schema: every number of the file is finite (no ``.inf``, ``.nan``, ``inf``),
   also the number at the start of a quantity such as ``"900 USD/kW"``; every number under ``inputs`` and
   ``reference_budget_mt`` has a magnitude of at most :data:`PLAUSIBLE_LIMIT` (1e12) in the unit it is written in. A
   larger value is a slip (1e300 for a cost), not a study: common practice, no source.
2. :func:`check_ranges` -- after the schema, for every input, the values it can take:

   * bounded distributions by their bounds -- uniform and triangular ``low`` and ``high``, a normal's truncation
     ``low`` / ``high`` when given -- and every listed value of ``values`` or a ``choice``;
   * unbounded ones (normal without truncation on a side, lognormal) by the smallest and largest value the design
     actually samples (Latin hypercube, grid levels or tornado quantiles), which depend on the seed and the design.

   For each such value: a multiplier must be >= 0 (a negative one would flip the sign of a quantity; give negative
   values with ``as: absolute``); the field's value it makes (the base value times the multiplier, or the value
   itself) must be finite and of magnitude at most :data:`PLAUSIBLE_LIMIT`, as written and in the field's own unit
   once validated; and the base scenario with that one value must pass the scenario's own validation
   (:func:`pathcast.scenario.loader.load_scenario_mapping`, then the plausibility bounds of
   :func:`pathcast.scenario.plausibility.check_inputs` that ``pathcast run`` applies), whose rule the sentence
   quotes. The base scenario itself is checked the same way first, so its own faults name its file. The field rules are
   ranges, so checking the extremes covers every member's value of that input.

   Decision: a value outside the range fails the whole run at check time (exit 2, nothing solved or written), rather
   than marking members failed: a distribution that reaches outside its field's range would otherwise be cut off
   silently by the members left out of the statistics. Truncate a normal with ``low`` / ``high``, or choose bounds
   inside the range.
3. :func:`member_error` -- combinations of inputs that break a rule between fields (each value valid alone) are only
   found when a member is validated before its solve, in the worker. That member is marked failed (the others go on)
   with one located sentence naming the ensemble file, the input labels, the sampled values and the scenario's rule.
"""

from __future__ import annotations

import copy
import math
import re
from collections.abc import Iterable
from pathlib import Path
from typing import Any

from ..errors import ScenarioError
from ..scenario.inputs import prepare_inputs
from ..scenario.loader import load_scenario_mapping, value_at
from ..scenario.plausibility import check_inputs

__all__ = [
    "PLAUSIBLE_LIMIT",
    "check_numbers",
    "check_ranges",
    "member_error",
    "scenario_rule",
    "leading_number",
]

PLAUSIBLE_LIMIT = 1e12  # largest magnitude of any number of an ensemble file or a member's field; no source
_LEADING = re.compile(
    r"^\s*([-+]?(?:inf(?:inity)?|nan|(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?))(?![A-Za-z0-9_.])", re.IGNORECASE
)
_NON_NUMERIC_KEYS = {"path", "as", "distribution"}  # strings under inputs.<label> that are not values


def leading_number(value: Any) -> float | None:
    """The number a value holds: itself (int or float, not bool), the number at the start of a string such as
    '900 USD/kW', 'inf' or '1e300'; None for anything else."""
    if isinstance(value, bool):
        return None
    if isinstance(value, int | float):
        return float(value) if not isinstance(value, int) or abs(value) < 1e308 else math.inf
    if isinstance(value, str):
        match = _LEADING.match(value)
        if match:
            return float(match.group(1))
    return None


def _shown(value: Any) -> str:
    text = repr(value)
    return text if len(text) <= 80 else text[:77] + "..."


def _where(loc: Iterable) -> str:
    return ".".join(str(p) for p in loc)


def _number_problem(number: float) -> str | None:
    if not math.isfinite(number):
        return "a finite number"
    if abs(number) > PLAUSIBLE_LIMIT:
        return (
            f"a number of magnitude at most {PLAUSIBLE_LIMIT:g} (the plausibility bound on every value of an "
            "ensemble file, in the unit it is written in)"
        )
    return None


def check_numbers(data: Any, path: Path) -> None:
    """Refuse a number of the ensemble file that is not finite, or, under ``inputs`` and ``reference_budget_mt``,
    larger in magnitude than :data:`PLAUSIBLE_LIMIT`."""

    def walk(node: Any, loc: tuple, bounded: bool, text_counts: bool) -> None:
        if isinstance(node, dict):
            for key, value in node.items():
                inner_text = text_counts and not (len(loc) == 2 and key in _NON_NUMERIC_KEYS)
                walk(value, loc + (key,), bounded, inner_text)
            return
        if isinstance(node, list):
            for i, value in enumerate(node):
                walk(value, loc + (i,), bounded, text_counts)
            return
        if isinstance(node, str) and not text_counts:
            return
        number = leading_number(node)
        if number is None:
            return
        problem = (
            "a finite number" if not math.isfinite(number) else (_number_problem(number) if bounded else None)
        )
        if problem:
            raise ScenarioError(
                f"{path}: {_where(loc)}: got {_shown(node)}; expected {problem}.",
                file=str(path),
                field=_where(loc),
            )

    if not isinstance(data, dict):
        return
    for key, value in data.items():
        under_inputs = key == "inputs"
        walk(value, (key,), bounded=under_inputs or key == "reference_budget_mt", text_counts=under_inputs)


def scenario_rule(error: ScenarioError) -> str:
    """What a scenario error says is expected ('a value of at least 0', ...), without its file and value."""
    message = str(error).rstrip(".")
    if "; expected " in message:
        return message.split("; expected ", 1)[1]
    return message


def _numbers_in(value: Any) -> list[float]:
    if isinstance(value, dict):
        return [n for item in value.values() for n in _numbers_in(item)]
    if isinstance(value, list):
        return [n for item in value for n in _numbers_in(item)]
    number = leading_number(value)
    return [] if number is None else [number]


def _candidates(spec, label: str, sampled: list[tuple[int, Any]]) -> list[tuple[str, Any, str]]:
    """(location in the ensemble file, value, where the value comes from) of each value to check for an input;
    ``sampled`` holds (member index, sampled value) of the members that set the input."""
    from .sampling import frozen_distribution

    item = spec.file.inputs[label]
    base = f"inputs.{label}"
    listed = getattr(item, "values", None)
    if listed is not None:
        return [(f"{base}.values.{i}", value, "a listed value") for i, value in enumerate(listed)]
    out: list[tuple[str, Any, str]] = []
    for name in ("low", "high"):
        value = getattr(item, name, None)
        if value is not None:
            out.append((f"{base}.{name}", value, f"the distribution's {name} end"))
    if frozen_distribution(item) is not None and sampled:
        smallest = min(sampled, key=lambda pair: float(pair[1]))
        largest = max(sampled, key=lambda pair: float(pair[1]))
        for (index, value), what in ((smallest, "smallest"), (largest, "largest")):
            out.append((base, float(value), f"the {what} value the design samples, member {index}"))
    return out


def _field_path(spec, label: str) -> str:
    return ".".join(str(k) for k in spec.paths[label])


def check_ranges(spec, members: list | None = None) -> None:
    """Refuse an input whose values (the bounds of a bounded distribution, every listed value, the extremes the
    design samples otherwise) fall outside its scenario field's rule (see the module's description)."""
    from .members import apply_overrides, scale_value
    from .sampling import design_members

    if members is None:
        members = design_members(spec)
    path = spec.path
    provenance, files = dict(spec.base.provenance), tuple(spec.base.files)
    for label, item in spec.file.inputs.items():
        field = _field_path(spec, label)
        sampled = [(m.index, m.samples[label]) for m in members if label in m.samples]
        checked: set[str] = set()
        for where, value, origin in _candidates(spec, label, sampled):
            if repr(value) in checked:
                continue
            checked.add(repr(value))

            hint = ""
            if where == f"inputs.{label}":  # a sampled extreme of an unbounded distribution
                hint = (
                    "; truncate the normal with 'low' and 'high'"
                    if getattr(item, "distribution", "") == "normal"
                    else "; a smaller sigma, or a bounded distribution, keeps the samples inside"
                )

            def refuse(
                expected: str, _where=where, _value=value, _origin=origin, _hint=hint
            ) -> ScenarioError:
                return ScenarioError(
                    f"{path}: {_where}: got {_shown(_value)} ({_origin}); expected {expected}{_hint}.",
                    file=str(path),
                    field=_where,
                )

            if item.apply == "multiplier":
                number = leading_number(value)
                if number is not None and not math.isfinite(number) and not math.isnan(number) and number > 0:
                    raise refuse(f"a finite multiplier (it scales {field})")
                if number is None or not math.isfinite(number) or number < 0:
                    raise refuse(
                        f"a multiplier of at least 0 (it scales {field}; a negative one would flip its sign: give "
                        "negative values with 'as: absolute')"
                    )
                field_value = scale_value(spec.base_values[label], float(number))
            else:
                field_value = value
            for number in _numbers_in(field_value):
                problem = _number_problem(number)
                if problem:
                    raise refuse(f"a value that makes {field} {problem}, not {_shown(field_value)}")
            raw = apply_overrides(copy.deepcopy(spec.base_raw), ((spec.paths[label], item.apply, value),))
            try:
                loaded = load_scenario_mapping(raw, spec.base_path, provenance=provenance, files=files)
                check_inputs(prepare_inputs(loaded.scenario), loaded)
            except ScenarioError as error:
                raise refuse(_rule_text(spec, field, error)) from None
            for number in _numbers_in(_validated_value(loaded, spec.paths[label])):
                problem = _number_problem(number)
                if problem:
                    raise refuse(
                        f"a value that makes {field} {problem}, not {number:g} in the field's own unit"
                    )


def _validated_value(loaded, keys: tuple) -> Any:
    """The field's value in the validated scenario (in the field's own unit), or None when it cannot be found."""
    try:
        dumped = loaded.scenario.model_dump(by_alias=True)
        return value_at(dumped, keys)
    except (
        Exception
    ):  # a field the schema stores elsewhere (converted into a table, renamed): checked as written
        return None


def _rule_text(spec, field: str, error: ScenarioError) -> str:
    rule = scenario_rule(error)
    where = getattr(error, "field", None) or ""
    if where and (where == field or where.startswith(field + ".") or field.startswith(where + ".")):
        return f"a value the scenario field {field} accepts: {rule}"
    shown = f"{where}: " if where else ""
    return f"a value with which the base scenario {Path(spec.base_path).name} is valid ({shown}{rule})"


def member_error(
    ensemble_file: str, input_paths: dict[str, str], samples: dict[str, Any], error: ScenarioError
) -> ScenarioError:
    """The sentence for a member whose scenario fails validation in the worker: which inputs, which sampled values,
    which rule of the scenario."""
    rule = scenario_rule(error)
    where = getattr(error, "field", None) or ""
    varied = [label for label in samples if where and input_paths.get(label) is not None]
    own = [
        label
        for label in varied
        if where == input_paths[label]
        or where.startswith(input_paths[label] + ".")
        or input_paths[label].startswith(where + ".")
    ]
    labels = own or list(samples)
    shown = " and ".join(f"inputs.{label} = {_shown(samples[label])}" for label in labels)
    target = f"field {where}" if where else "content"
    together = "" if own or len(samples) < 2 else " (a rule between fields that these values break together)"
    return ScenarioError(
        f"{ensemble_file}: the member with {shown}: got a scenario whose {target} breaks the scenario's rule; "
        f"expected {rule}{together}.",
        file=ensemble_file,
        field=where or None,
    )
