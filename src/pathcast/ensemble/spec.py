"""The ensemble file: a base scenario, the inputs to vary (by their field path in the scenario) and a sampling design.

Example (paths are relative to the ensemble file)::

    name: tiny_uncertainty
    base: tiny.yaml
    design: latin_hypercube          # latin_hypercube | grid | one_at_a_time
    members: 20                      # latin_hypercube only (grid and one_at_a_time count their own)
    seed: 7                          # latin_hypercube only
    inputs:
      solar_capex:
        path: technologies.generators.solar_pv.capex.base
        as: multiplier
        distribution: triangular
        low: 0.7
        mode: 1.0
        high: 1.2
      budget:
        path: policy.carbon_budget.total_mt
        as: absolute
        values: [20, 25, 30]

Validation is strict (unknown fields, wrong types and paths that do not exist in the merged base scenario are
errors) and every error is one located sentence (:func:`pathcast.scenario.loader.located_error`). The file is read
with the loader's YAML reader (:func:`pathcast.scenario.loader.read_yaml_document`), so its rules for YAML hold here
too. Numbers must be finite and plausible, and every value an input can take must be one its scenario field accepts
(:mod:`pathcast.ensemble.validity`: the rules, and why a value outside the range fails the whole run).
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass, field
from pathlib import Path
from typing import Annotated, Any, Literal

from pydantic import (
    BaseModel,
    ConfigDict,
    Discriminator,
    Field,
    StringConstraints,
    Tag,
    ValidationError,
    model_validator,
)

from ..errors import ScenarioError, did_you_mean
from ..scenario.loader import (
    LoadedScenario,
    expected_text,
    load_scenario_mapping,
    located_error,
    read_scenario_mapping,
    read_yaml_document,
    value_at,
)

__all__ = [
    "EnsembleFile",
    "EnsembleSpec",
    "InputSpec",
    "load_ensemble",
    "parse_path",
    "resolve_path",
    "looks_like_ensemble",
    "ensemble_facts_if_ensemble",
    "member_count",
    "DESIGNS",
    "DISTRIBUTIONS",
    "MAX_MEMBERS",
]

DESIGNS = ("latin_hypercube", "grid", "one_at_a_time")
DISTRIBUTIONS = ("uniform", "triangular", "normal", "lognormal", "choice")
MAX_MEMBERS = 100_000  # a guard against a grid that multiplies out by accident; common practice, no source

Level = (
    int | float | str | dict[int, int | float | str]
)  # values in a list: numbers, quantities, {year: value} paths


class _Strict(BaseModel):
    model_config = ConfigDict(extra="forbid", frozen=True, populate_by_name=True, allow_inf_nan=False)


class _Input(_Strict):
    path: Annotated[str, StringConstraints(min_length=1, pattern=r"^[^.\s]+(\.[^.\s]+)*$")] = Field(
        description="Dotted field path in the merged scenario, e.g. technologies.supplies.gas_import.price."
    )
    apply: Literal["multiplier", "absolute"] = Field(
        alias="as",
        description="'multiplier': scale the base value (every value of a {year: value} path); "
        "'absolute': replace it.",
    )


class Uniform(_Input):
    distribution: Literal["uniform"]
    low: float
    high: float

    @model_validator(mode="after")
    def _order(self) -> Uniform:
        if not self.low < self.high:
            raise ValueError(f"low below high, not low {self.low!r} and high {self.high!r}")
        return self


class Triangular(_Input):
    distribution: Literal["triangular"]
    low: float
    mode: float = Field(description="The most likely value.")
    high: float

    @model_validator(mode="after")
    def _order(self) -> Triangular:
        if not (self.low <= self.mode <= self.high and self.low < self.high):
            raise ValueError(
                f"low <= mode <= high with low below high, not {self.low!r}, {self.mode!r}, {self.high!r}"
            )
        return self


class Normal(_Input):
    distribution: Literal["normal"]
    mean: float
    sd: Annotated[float, Field(gt=0)]
    low: float | None = Field(None, description="Optional truncation below [same unit as the value].")
    high: float | None = Field(None, description="Optional truncation above.")

    @model_validator(mode="after")
    def _order(self) -> Normal:
        if self.low is not None and self.high is not None and not self.low < self.high:
            raise ValueError(f"low below high, not low {self.low!r} and high {self.high!r}")
        return self


class Lognormal(_Input):
    distribution: Literal["lognormal"]
    median: Annotated[float, Field(gt=0)]
    sigma: Annotated[float, Field(gt=0)] = Field(
        description="Standard deviation of the natural logarithm [-]."
    )


class Choice(_Input):
    distribution: Literal["choice"]
    values: list[Level] = Field(min_length=1)
    probabilities: list[Annotated[float, Field(ge=0)]] | None = None

    @model_validator(mode="after")
    def _weights(self) -> Choice:
        if self.probabilities is not None:
            if len(self.probabilities) != len(self.values):
                raise ValueError(
                    f"one probability per value ({len(self.values)}), not {len(self.probabilities)}"
                )
            if not math.isclose(sum(self.probabilities), 1.0, abs_tol=1e-9):
                raise ValueError(f"probabilities that add up to 1, not {sum(self.probabilities)!r}")
        return self


class Levels(_Input):
    values: list[Level] = Field(min_length=1, description="The values (low to high for a tornado).")


def _kind(value: Any) -> str | None:
    if isinstance(value, dict):
        if "distribution" in value:
            return str(value["distribution"])
        return "values" if "values" in value else None
    return getattr(value, "distribution", "values")


InputSpec = Annotated[
    Annotated[Uniform, Tag("uniform")]
    | Annotated[Triangular, Tag("triangular")]
    | Annotated[Normal, Tag("normal")]
    | Annotated[Lognormal, Tag("lognormal")]
    | Annotated[Choice, Tag("choice")]
    | Annotated[Levels, Tag("values")],
    Discriminator(
        _kind,
        custom_error_type="no_distribution",
        custom_error_message="a 'distribution' or a list of 'values'",
    ),
]
_TAG_MODELS: dict[str, type[_Input]] = {
    "uniform": Uniform,
    "triangular": Triangular,
    "normal": Normal,
    "lognormal": Lognormal,
    "choice": Choice,
    "values": Levels,
}

Label = Annotated[str, StringConstraints(pattern=r"^[A-Za-z][A-Za-z0-9_]*$")]


class EnsembleFile(_Strict):
    name: Annotated[str, StringConstraints(pattern=r"^[A-Za-z0-9][A-Za-z0-9_.-]*$")] = Field(
        description="Short name; the default output folder is results/<name>."
    )
    description: str = ""
    base: str = Field(description="Base scenario file, relative to the ensemble file.")
    design: Literal["latin_hypercube", "grid", "one_at_a_time"]
    members: Annotated[int, Field(ge=1, le=MAX_MEMBERS)] | None = Field(
        None, description="Number of members (latin_hypercube); grid and one_at_a_time count their own."
    )
    seed: Annotated[int, Field(ge=0)] | None = Field(
        None, description="Seed of the Latin hypercube (required there)."
    )
    grid_levels: Annotated[int, Field(ge=2, le=21)] = Field(
        3, description="grid: levels taken from each distribution, at the mid-quantiles (k + 0.5) / levels."
    )
    tornado_quantiles: tuple[Annotated[float, Field(gt=0, lt=0.5)], Annotated[float, Field(gt=0.5, lt=1)]] = (
        Field(
            (0.05, 0.95),
            description="one_at_a_time: quantiles of each distribution used as its low and high.",
        )
    )
    warm_start: bool = Field(
        True, description="Start each member's simplex from the base scenario's optimal basis."
    )
    reference_budget_mt: Annotated[float, Field(ge=0)] | None = Field(
        None,
        description="Budget [MtCO2] for the probability of staying within it; default: each member's own "
        "policy.carbon_budget.total_mt.",
    )
    inputs: dict[Label, InputSpec] = Field(min_length=1)

    @model_validator(mode="after")
    def _design(self) -> EnsembleFile:
        if self.design == "latin_hypercube":
            if self.members is None:
                raise ValueError("'members' (how many to sample) with design latin_hypercube")
            if self.seed is None:
                raise ValueError(
                    "'seed' (a whole number, so the samples can be made again) with design latin_hypercube"
                )
        return self


@dataclass(frozen=True)
class EnsembleSpec:
    """A validated ensemble: the file's content, where it is, and the merged base scenario it varies."""

    file: EnsembleFile
    path: Path
    base_path: Path
    base: LoadedScenario = field(repr=False)
    paths: dict[str, tuple] = field(default_factory=dict)  # label -> parsed field path
    base_values: dict[str, Any] = field(default_factory=dict)  # label -> the base scenario's value there

    @property
    def name(self) -> str:
        return self.file.name

    @property
    def base_raw(self) -> dict[str, Any]:
        return self.base.raw

    @property
    def base_hash(self) -> str:
        return self.base.input_hash


def member_count(spec: EnsembleSpec) -> int:
    """How many members the design makes: ``members`` for a Latin hypercube; for a grid, the product of each input's
    level count (its values for a value list or a choice, ``grid_levels`` quantiles for a distribution); for
    one-at-a-time, the base plus a low and a high member per input. Counted without sampling (no SciPy), so
    ``pathcast check`` can state it."""
    f = spec.file
    if f.design == "latin_hypercube":
        assert f.members is not None  # the file's validator requires 'members' for a Latin hypercube
        return int(f.members)
    if f.design == "grid":
        return math.prod(
            len(item.values) if isinstance(item, Levels | Choice) else int(f.grid_levels)
            for item in f.inputs.values()
        )
    return 1 + 2 * len(f.inputs)


# ------------------------------------------------------------------------------------------------- field paths
def parse_path(text: str) -> tuple[str, ...]:
    return tuple(text.split("."))


def resolve_path(raw: Any, parts: tuple, *, on_error) -> tuple[tuple, Any]:
    """Follow ``parts`` through the raw mapping; return the real keys (years as int, list indices as int) and the
    value there. ``on_error(prefix, part, choices)`` builds the error for a part that does not exist."""
    node = raw
    keys: list = []
    for part in parts:
        if isinstance(node, dict):
            if part in node:
                key = part
            elif re.fullmatch(r"-?\d+", part) and int(part) in node:
                key = int(part)
            else:
                raise on_error(tuple(keys), part, [str(k) for k in node])
        elif isinstance(node, list):
            if not (re.fullmatch(r"\d+", part) and int(part) < len(node)):
                raise on_error(tuple(keys), part, [str(i) for i in range(len(node))])
            key = int(part)
        else:
            raise on_error(tuple(keys), part, [])
        keys.append(key)
        node = node[key]
    return tuple(keys), node


def is_year_mapping(value: Any) -> bool:
    return isinstance(value, dict) and bool(value) and all(isinstance(k, int) for k in value)


NUMBER_WITH_UNIT = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*$")


def scalable(value: Any) -> bool:
    """Can a multiplier scale this value: a number, a number with a unit, or a {year: value} path of those."""
    if isinstance(value, bool):
        return False
    if isinstance(value, int | float):
        return True
    if isinstance(value, str):
        return NUMBER_WITH_UNIT.match(value) is not None
    if is_year_mapping(value):
        return all(scalable(v) and not isinstance(v, dict) for v in value.values())
    return False


# ------------------------------------------------------------------------------------------------- reading
def looks_like_ensemble(data: Any) -> bool:
    """Does a parsed YAML document look like an ensemble file (rather than a scenario)? A mapping with 'inputs' or
    'design' and without a scenario's 'metadata'."""
    return isinstance(data, dict) and "metadata" not in data and ("inputs" in data or "design" in data)


def ensemble_facts_if_ensemble(path: str | Path) -> dict | None:
    """For ``pathcast check``: None when ``path`` is not an ensemble file (or cannot be read: the scenario reader
    says why); else validate it (:func:`load_ensemble`, ScenarioError when invalid) and return its facts, with the
    one-sentence outcome under 'sentence'."""
    try:
        data = read_yaml_document(Path(path), "scenario")
    except ScenarioError:
        return None
    if not looks_like_ensemble(data):
        return None
    spec = load_ensemble(path)
    count = member_count(spec)
    facts = {
        "file": str(spec.path),
        "valid": True,
        "kind": "ensemble",
        "ensemble": spec.name,
        "base": str(spec.base_path),
        "design": spec.file.design,
        "members": count,
        "inputs": list(spec.file.inputs),
        "base_hash": spec.base_hash,
        "command": f"pathcast ensemble {path}",
    }
    facts["sentence"] = (
        f"{spec.path}: valid ensemble file {spec.name!r} ({spec.file.design}, {count} members, "
        f"{len(spec.file.inputs)} input{'s' if len(spec.file.inputs) != 1 else ''}) around the base scenario "
        f"{spec.base_path.name}; 'pathcast ensemble {path}' runs it."
    )
    return facts


def check_base(base: LoadedScenario) -> None:
    """The checks ``pathcast run`` makes of a scenario before it solves: solver settings against HiGHS's option list
    and every input finite and plausible (ScenarioError naming the base scenario's file)."""
    from ..scenario.inputs import prepare_inputs
    from ..scenario.plausibility import check_inputs
    from ..scenario.solver_options import check_solver_settings

    check_solver_settings(base.scenario.solver.model_dump(), base.file_of)
    check_inputs(prepare_inputs(base.scenario), base)


def load_ensemble(path: str | Path) -> EnsembleSpec:
    """Read and validate an ensemble file and its base scenario; raise ScenarioError with a located sentence."""
    from .validity import check_numbers, check_ranges

    path = Path(path)
    data = read_yaml_document(path, "ensemble")
    if not isinstance(data, dict):
        raise located_error(
            path, "(top level)", type(data).__name__, "a mapping with name, base, design and inputs"
        )
    check_numbers(data, path)
    try:
        spec = EnsembleFile.model_validate(data)
    except ValidationError as error:
        raise _explain(error, data, path) from None

    base_path = (path.parent / spec.base).resolve()
    if not base_path.is_file():
        raise located_error(path, "base", spec.base, f"an existing scenario file (looked for {base_path})")
    raw, provenance, files = read_scenario_mapping(base_path)
    base = load_scenario_mapping(raw, base_path, provenance=provenance, files=files)
    check_base(base)

    paths: dict[str, tuple] = {}
    base_values: dict[str, Any] = {}
    seen: dict[tuple, str] = {}
    for label, item in spec.inputs.items():
        where = f"inputs.{label}.path"

        def missing(prefix: tuple, part: str, choices: list[str], _where=where, _item=item) -> ScenarioError:
            under = ".".join(str(p) for p in prefix) or "the top level"
            if not choices:
                return located_error(
                    path,
                    _where,
                    _item.path,
                    f"a field path that exists in {base_path.name}; "
                    f"{under} holds a single value, so {part!r} cannot follow it",
                )
            return located_error(
                path,
                _where,
                _item.path,
                f"a field path that exists in {base_path.name}; {part!r} is not one of the keys "
                f"under {under} {sorted(choices)}{did_you_mean(part, choices)}",
            )

        keys, value = resolve_path(raw, parse_path(item.path), on_error=missing)
        if keys in seen:
            raise located_error(
                path, where, item.path, f"a field not varied already (inputs.{seen[keys]} varies it)"
            )
        seen[keys] = label
        for other_keys, other in seen.items():
            if other != label and (other_keys[: len(keys)] == keys or keys[: len(other_keys)] == other_keys):
                raise located_error(
                    path,
                    where,
                    item.path,
                    f"a field that neither contains nor lies inside another varied one (inputs.{other})",
                )
        if item.apply == "multiplier":
            if not scalable(value):
                raise located_error(path, where, item.path, _not_scalable(value))
            levels = getattr(item, "values", None)
            if levels is not None:
                for i, level in enumerate(levels):
                    if isinstance(level, str | dict):
                        raise located_error(
                            path,
                            f"inputs.{label}.values.{i}",
                            level,
                            "a number (a multiplier of the base value)",
                        )
        paths[label] = keys
        base_values[label] = value
    loaded = EnsembleSpec(
        file=spec, path=path.resolve(), base_path=base_path, base=base, paths=paths, base_values=base_values
    )
    count = member_count(loaded)
    if spec.design != "latin_hypercube" and spec.members is not None and spec.members != count:
        raise located_error(
            path,
            "members",
            spec.members,
            f"{count} (the design {spec.design} makes that many) or no 'members' field",
        )
    if count > MAX_MEMBERS:
        raise located_error(
            path, "inputs", f"{count} members", f"a design of at most {MAX_MEMBERS:,} members"
        )
    check_ranges(loaded)
    return loaded


def _not_scalable(value: Any) -> str:
    if isinstance(value, dict):
        keys = sorted(str(k) for k in value)
        return (
            f"a field holding a number, a quantity with a unit or a {{year: value}} path (this one holds a "
            f"mapping with the keys {keys}: point the path at one of them, or use 'as: absolute')"
        )
    return (
        f"a field holding a number, a quantity with a unit or a {{year: value}} path (this one holds "
        f"{value!r}; use 'as: absolute' to replace it)"
    )


def _explain(error: ValidationError, data: dict, path: Path) -> ScenarioError:
    first = error.errors(include_url=False)[0]
    loc = tuple(first["loc"])
    # drop the union tag pydantic puts after the input label: ('inputs', 'solar', 'triangular', 'low')
    if len(loc) >= 3 and loc[0] == "inputs" and loc[2] in _TAG_MODELS:
        tag = loc[2]
        loc = loc[:2] + loc[3:]
    else:
        tag = None
    kind = first["type"]
    if loc and loc[-1] == "[key]":  # a bad input label
        loc = loc[:-1]
        return located_error(
            path, loc, loc[-1], "an input label of letters, digits and underscores, starting with a letter"
        )
    value = value_at(data, loc)
    if kind == "extra_forbidden":
        if tag is not None:
            choices = sorted(_aliases(_TAG_MODELS[tag]))
        elif len(loc) == 1:
            choices = sorted(EnsembleFile.model_fields)
        else:
            choices = []
        name = loc[-1]
        return located_error(
            path, loc, name, f"one of the fields {choices}{did_you_mean(str(name), choices)}"
        )
    if kind == "missing":
        return located_error(path, loc[:-1] or "(top level)", "nothing", f"the required field {loc[-1]!r}")
    if kind == "no_distribution" and isinstance(value, dict) and "distribution" in value:
        kind = "union_tag_invalid"
    if kind == "union_tag_invalid":
        name = value_at(data, loc + ("distribution",))
        choices = list(DISTRIBUTIONS)
        return located_error(
            path, loc + ("distribution",), name, f"one of {choices}{did_you_mean(str(name), choices)}"
        )
    if kind == "no_distribution":
        return located_error(
            path, loc, value, f"a 'distribution' (one of {list(DISTRIBUTIONS)}) or a list of 'values'"
        )
    if kind == "string_pattern_mismatch" and loc[-1] == "path":
        return located_error(
            path, loc, value, "a dotted field path such as technologies.supplies.gas_import.price"
        )
    return located_error(path, loc or "(top level)", value, expected_text(first))


def _aliases(model: type[BaseModel]) -> list[str]:
    return [info.alias or name for name, info in model.model_fields.items()]
