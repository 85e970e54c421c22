"""Read a scenario file: YAML, ``extends`` merging, CSV tables beside it, then schema validation.

Every error is raised as :class:`~pathcast.errors.ScenarioError` with one sentence naming the file that set the
offending field, the field path, the value and what was expected.
"""

from __future__ import annotations

import csv
import hashlib
import json
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import yaml
from pydantic import BaseModel, ValidationError

from ..errors import ScenarioError, did_you_mean
from .schema import Scenario

__all__ = [
    "load_scenario",
    "LoadedScenario",
    "located_error",
    "read_yaml_with_extends",
    "value_at",
    "read_yaml_document",
    "read_scenario_mapping",
    "load_scenario_mapping",
]

Provenance = dict[tuple, Path]


@dataclass(frozen=True)
class LoadedScenario:
    """A validated scenario with the files it came from."""

    scenario: Scenario
    path: Path
    files: tuple[Path, ...]
    raw: dict[str, Any] = field(repr=False)
    provenance: Provenance = field(repr=False)

    @property
    def input_hash(self) -> str:
        """SHA-256 of the fully resolved scenario (after merging and CSV reading)."""
        text = json.dumps(self.raw, sort_keys=True, default=str)
        return hashlib.sha256(text.encode()).hexdigest()

    def file_of(self, path: tuple) -> Path:
        return file_for(self.provenance, path, self.path)


def located_error(file: Path | str, path: tuple | str, value: Any, expected: str) -> ScenarioError:
    """Build the one-sentence error: ``file: field.path: got value; expected ...``."""
    where = path if isinstance(path, str) else ".".join(str(p) for p in path)
    shown = _show_value(value)
    return ScenarioError(f"{file}: {where}: got {shown}; expected {expected}.", file=str(file), field=where)


def _show_value(value: Any) -> str:
    text = repr(value)
    return text if len(text) <= 80 else text[:77] + "..."


def file_for(provenance: Provenance, path: tuple, default: Path) -> Path:
    for cut in range(len(path), -1, -1):
        if path[:cut] in provenance:
            return provenance[path[:cut]]
    return default


def read_yaml_document(path: Path, kind: str = "scenario") -> Any:
    """The parsed YAML of ``path``; a missing file or a syntax error is a one-sentence ScenarioError."""
    path = Path(path)
    if not path.is_file():
        raise ScenarioError(f"{path}: no such {kind} file.", file=str(path))
    try:
        return yaml.safe_load(path.read_text(encoding="utf-8"))
    except yaml.YAMLError as error:
        mark = getattr(error, "problem_mark", None)
        where = f" at line {mark.line + 1}, column {mark.column + 1}" if mark else ""
        raise ScenarioError(
            f"{path}: not valid YAML{where}: {getattr(error, 'problem', error)}.", file=str(path)
        ) from None


def _read_yaml(path: Path, referrer: tuple[Path, str] | None) -> dict[str, Any]:
    if referrer and not path.is_file():
        raise located_error(referrer[0], referrer[1], str(path), "an existing scenario file")
    data = read_yaml_document(path, "scenario")
    if data is None:
        data = {}
    if not isinstance(data, dict):
        raise located_error(
            path, "(top level)", type(data).__name__, "a mapping of sections (metadata, time, ...)"
        )
    return data


def _record(provenance: Provenance, data: Any, prefix: tuple, file: Path) -> None:
    provenance[prefix] = file
    if isinstance(data, dict):
        for key, value in data.items():
            _record(provenance, value, prefix + (key,), file)


def _merge(base: dict, override: dict, provenance: Provenance, prefix: tuple, file: Path) -> dict:
    out = dict(base)
    for key, value in override.items():
        if isinstance(value, dict) and isinstance(out.get(key), dict) and not _replaces_whole(key, value):
            out[key] = _merge(out[key], value, provenance, prefix + (key,), file)
        else:
            out[key] = value
            _record(provenance, value, prefix + (key,), file)
    return out


def _replaces_whole(key: str, value: dict) -> bool:
    """A capex path or a {year: value} path given in a variant replaces the parent's instead of mixing with it."""
    if key in {"capex", "energy_capex"}:
        return True
    return bool(value) and all(isinstance(k, int) for k in value)


def read_yaml_with_extends(
    path: Path, _chain: tuple[Path, ...] = (), _referrer=None
) -> tuple[dict, Provenance, tuple]:
    """Return the merged raw mapping, the file that set each field, and the chain of files (parents first)."""
    path = path.resolve()
    if path in _chain:
        loop = " -> ".join(p.name for p in (*_chain, path))
        raise located_error(_chain[-1], "extends", str(path.name), f"no loop of extends ({loop})")
    data = _read_yaml(path, _referrer)
    parent_name = data.pop("extends", None)
    provenance: Provenance = {}
    if parent_name is None:
        _record(provenance, data, (), path)
        return data, provenance, (path,)
    if not isinstance(parent_name, str):
        raise located_error(path, "extends", parent_name, "the file name of the scenario this one builds on")
    parent_path = (path.parent / parent_name).resolve()
    base, provenance, files = read_yaml_with_extends(parent_path, (*_chain, path), (path, "extends"))
    merged = _merge(base, data, provenance, (), path)
    return merged, provenance, (*files, path)


def _resolve_csv(data: Any, prefix: tuple, provenance: Provenance, default: Path) -> Any:
    if isinstance(data, dict):
        return {k: _resolve_csv(v, prefix + (k,), provenance, default) for k, v in data.items()}
    if isinstance(data, list):
        return [_resolve_csv(v, prefix + (i,), provenance, default) for i, v in enumerate(data)]
    if isinstance(data, str) and data.lower().endswith(".csv"):
        owner = file_for(provenance, prefix, default)
        csv_path = (owner.parent / data).resolve()
        if not csv_path.is_file():
            raise located_error(owner, prefix, data, "an existing CSV file next to the scenario")
        if prefix == ("time", "representative_days"):
            return _read_days_csv(csv_path)
        return _read_year_table(csv_path)
    return data


def _read_year_table(path: Path) -> dict[int, Any]:
    rows = _read_csv(path)
    if not rows or set(rows[0]) != {"year", "value"}:
        found = sorted(rows[0]) if rows else []
        raise located_error(path, "(columns)", found, "exactly the columns 'year' and 'value'")
    out: dict[int, Any] = {}
    for number, row in enumerate(rows, start=2):
        try:
            out[int(row["year"])] = float(row["value"])
        except ValueError:
            raise located_error(path, f"line {number}", row, "a whole year and a number") from None
    return out


DAY_COLUMNS = ("day", "weight_days", "hour", "demand")


def _read_days_csv(path: Path) -> list[dict[str, Any]]:
    """Long table: one row per day and hour with columns day, weight_days, hour, demand, then one column per profile."""
    rows = _read_csv(path)
    if not rows:
        raise located_error(path, "(rows)", 0, "one row per representative day and hour")
    missing = [c for c in DAY_COLUMNS if c not in rows[0]]
    if missing:
        raise located_error(
            path, "(columns)", sorted(rows[0]), f"the columns {list(DAY_COLUMNS)} and one per profile"
        )
    profiles = [c for c in rows[0] if c not in DAY_COLUMNS]
    days: dict[str, dict[str, Any]] = {}
    for number, row in enumerate(rows, start=2):
        try:
            name = row["day"]
            day = days.setdefault(
                name,
                {
                    "name": name,
                    "weight_days": float(row["weight_days"]),
                    "demand_shape": [],
                    "availability": {p: [] for p in profiles},
                },
            )
            if float(row["weight_days"]) != day["weight_days"]:
                raise located_error(
                    path,
                    f"line {number}.weight_days",
                    row["weight_days"],
                    f"the same weight on every hour of day {name!r}",
                )
            if int(row["hour"]) != len(day["demand_shape"]):
                raise located_error(
                    path,
                    f"line {number}.hour",
                    row["hour"],
                    f"hour {len(day['demand_shape'])} (hours 0-23 in order)",
                )
            day["demand_shape"].append(float(row["demand"]))
            for p in profiles:
                day["availability"][p].append(float(row[p]))
        except ValueError as error:
            if isinstance(error, ScenarioError):
                raise
            raise located_error(
                path, f"line {number}", dict(row), "numbers in every column but 'day'"
            ) from None
    return list(days.values())


def _read_csv(path: Path) -> list[dict[str, str]]:
    with path.open(newline="", encoding="utf-8") as handle:
        return [
            {k.strip(): (v or "").strip() for k, v in row.items() if k is not None}
            for row in csv.DictReader(handle)
        ]


def load_scenario(path: str | Path) -> LoadedScenario:
    """Read, merge and validate a scenario; raise ScenarioError with a located one-sentence message."""
    from .validation import check_scenario

    path = Path(path)
    raw, provenance, files = read_yaml_with_extends(path)
    raw = _resolve_csv(raw, (), provenance, path.resolve())
    currency = (
        raw.get("metadata", {}).get("currency", "USD") if isinstance(raw.get("metadata"), dict) else "USD"
    )
    try:
        scenario = Scenario.model_validate(raw, context={"currency": currency})
    except ValidationError as error:
        raise _explain(error, raw, provenance, path.resolve()) from None
    loaded = LoadedScenario(
        scenario=scenario, path=path.resolve(), files=files, raw=raw, provenance=provenance
    )
    check_scenario(loaded)
    return loaded


def _explain(error: ValidationError, raw: dict, provenance: Provenance, default: Path) -> ScenarioError:
    errors = error.errors(include_url=False)
    # a misspelt field shows up both as unknown and as a missing required one: report the misspelling
    first = next((e for e in errors if e["type"] == "extra_forbidden"), errors[0])
    loc = tuple(first["loc"])
    # pydantic adds the union member or validator names to locations ('function-before[...]', 'float', ...)
    loc = tuple(
        p
        for p in loc
        if not (
            isinstance(p, str)
            and ("[" in p or p in {"float", "int", "str", "dict[int,float]", "list[float]"})
        )
    )
    file = file_for(provenance, loc, default)
    kind = first["type"]
    if kind == "extra_forbidden":
        parent_model = _model_at(Scenario, loc[:-1])
        choices = sorted(parent_model.model_fields) if parent_model else []
        name = loc[-1]
        hint = did_you_mean(str(name), choices)
        return located_error(file, loc, name, f"one of the fields {choices}{hint}")
    if kind == "missing":
        return located_error(file, loc[:-1] or "(top level)", "nothing", f"the required field {loc[-1]!r}")
    value = value_at(raw, loc)
    message = first["msg"]
    for prefix in ("Value error, ", "Assertion failed, "):
        message = message.removeprefix(prefix)
    if kind == "literal_error":
        message = message.replace("Input should be ", "one of ")
    else:
        message = message[0].lower() + message[1:] if message else "a valid value"
        message = message.replace("input should be ", "")
    return located_error(file, loc or "(top level)", value, message)


def value_at(raw: Any, loc: tuple) -> Any:
    """The value at a field path of a raw mapping, or None where the path does not exist."""
    node = raw
    for part in loc:
        try:
            node = node[part]
        except (KeyError, IndexError, TypeError):
            return None
    return node


def _model_at(model: type[BaseModel], loc: tuple) -> type[BaseModel] | None:
    import typing

    current: Any = model
    for part in loc:
        if isinstance(current, type) and issubclass(current, BaseModel):
            info = current.model_fields.get(str(part))
            if info is None:
                return None
            current = info.annotation
        else:
            current = _inner(current)
            if current is None:
                return None
        while True:
            origin = typing.get_origin(current)
            if origin is typing.Annotated:
                current = typing.get_args(current)[0]
            elif origin in (typing.Union, getattr(__import__("types"), "UnionType", None)):
                models = [a for a in typing.get_args(current) if a is not type(None)]
                current = (
                    models[0]
                    if len(models) == 1
                    else next(
                        (m for m in models if isinstance(m, type) and issubclass(m, BaseModel)), models[0]
                    )
                )
            else:
                break
    if isinstance(current, type) and issubclass(current, BaseModel):
        return current
    inner = _inner(current)
    return inner if isinstance(inner, type) and issubclass(inner, BaseModel) else None


def _inner(annotation: Any) -> Any:
    import typing

    origin = typing.get_origin(annotation)
    args = typing.get_args(annotation)
    if origin is dict and len(args) == 2:
        return args[1]
    if origin is list and args:
        return args[0]
    return None


# ---------------------------------------------------------------------------------------------------------------
# Raw-mapping helpers for callers that change a scenario's fields before validating it (the ensemble runner):
# the same reading and validation steps as load_scenario, split in two.


def read_scenario_mapping(path: str | Path) -> tuple[dict[str, Any], Provenance, tuple[Path, ...]]:
    """The merged raw mapping of a scenario file (``extends`` applied, CSV tables read), the file that set each field
    and the chain of files; nothing validated yet."""
    path = Path(path)
    raw, provenance, files = read_yaml_with_extends(path)
    return _resolve_csv(raw, (), provenance, path.resolve()), provenance, files


def load_scenario_mapping(
    raw: dict[str, Any],
    path: str | Path,
    *,
    provenance: Provenance | None = None,
    files: tuple[Path, ...] = (),
) -> LoadedScenario:
    """Validate a merged, CSV-resolved raw mapping as :func:`load_scenario` does; ``path`` is the file named in errors
    (and, with ``provenance``, the default owner of fields the provenance does not know)."""
    from .validation import check_scenario

    path = Path(path).resolve()
    provenance = provenance or {}
    currency = (
        raw.get("metadata", {}).get("currency", "USD") if isinstance(raw.get("metadata"), dict) else "USD"
    )
    try:
        scenario = Scenario.model_validate(raw, context={"currency": currency})
    except ValidationError as error:
        raise _explain(error, raw, provenance, path) from None
    loaded = LoadedScenario(
        scenario=scenario, path=path, files=files or (path,), raw=raw, provenance=provenance
    )
    check_scenario(loaded)
    return loaded
