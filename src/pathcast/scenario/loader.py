"""Read a scenario file: YAML, ``extends`` merging, CSV tables beside it, then schema validation.

Every error is raised as :class:`~pathcast.errors.ScenarioError` with one sentence naming the file that set the
offending field, the field path, the value and what was expected.
"""

from __future__ import annotations

import csv
import hashlib
import io
import json
import math
from collections.abc import Mapping
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import yaml
from pydantic import BaseModel, ValidationError

from ..errors import ScenarioError, did_you_mean, located_error
from .schema import Scenario
from .validation import check_scenario

__all__ = [
    "load_scenario",
    "LoadedScenario",
    "located_error",
    "read_yaml_with_extends",
    "value_at",
    "read_yaml_document",
    "read_scenario_mapping",
    "load_scenario_mapping",
    "expected_text",
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


def file_for(provenance: Provenance, path: tuple, default: Path) -> Path:
    for cut in range(len(path), -1, -1):
        if path[:cut] in provenance:
            return provenance[path[:cut]]
    return default


# Bounds on the work a file can ask for (README, "Scenario files"): a scenario or ensemble YAML file of at most
# 16 MiB, a CSV table of at most 256 MiB (30 weather years of hourly data with a dozen profiles need about 40 MiB),
# at most 100 YAML aliases per file and at most 2 million values once aliases are expanded. Common practice, no source.
MAX_YAML_BYTES = 16 * 1024 * 1024
MAX_CSV_BYTES = 256 * 1024 * 1024
MAX_YAML_ALIASES = 100
MAX_YAML_NODES = 2_000_000


def read_text_file(path: Path, kind: str, limit: int) -> str:
    """The text of ``path`` decoded as UTF-8 (a byte-order mark is allowed); a file that is too large or not UTF-8 is
    a one-sentence ScenarioError naming the line and column of the first byte that is not UTF-8."""
    path = Path(path)
    size = path.stat().st_size
    if size > limit:
        raise ScenarioError(
            f"{path}: (file): got {size:,} bytes; expected a {kind} file of at most {limit:,} bytes.",
            file=str(path),
        )
    data = path.read_bytes()
    try:
        return data.decode("utf-8-sig")
    except UnicodeDecodeError as error:
        before = data[: error.start]
        line = before.count(b"\n") + 1
        column = error.start - (before.rfind(b"\n") + 1) + 1
        raise ScenarioError(
            f"{path}: line {line}, column {column}: got the byte {data[error.start]:#04x}, which is not UTF-8; "
            f"expected a {kind} file saved as UTF-8 text (re-save it as UTF-8 in your editor).",
            file=str(path),
        ) from None


class _BoundedLoader(yaml.SafeLoader):
    """PyYAML's safe loader that refuses a key given twice in one mapping and bounds what aliases may expand to."""

    def __init__(self, stream: str, path: Path):
        super().__init__(stream)
        self.path = path
        self.aliases = 0

    def compose_node(self, parent: yaml.Node | None, index: int) -> yaml.Node | None:
        if self.check_event(yaml.AliasEvent):
            self.aliases += 1
            if self.aliases > MAX_YAML_ALIASES:
                mark = self.peek_event().start_mark
                raise ScenarioError(
                    f"{self.path}: line {mark.line + 1}: got more than {MAX_YAML_ALIASES} YAML aliases (*name); "
                    f"expected at most {MAX_YAML_ALIASES} in one file.",
                    file=str(self.path),
                )
        return super().compose_node(parent, index)

    def compose_document(self) -> yaml.Node | None:
        node = super().compose_document()
        if node is not None:
            _check_composed(node, self.path)
        return node


def _key_text(node: yaml.Node) -> str:
    return str(node.value) if isinstance(node, yaml.ScalarNode) else f"<{node.tag}>"


def _check_composed(root: yaml.Node, path: Path) -> None:
    """Refuse a key given twice in one mapping (naming the line, the key and the field path) and a document that
    expands to more than MAX_YAML_NODES values through aliases. Each distinct node is visited once."""
    sizes: dict[int, int] = {}
    seen: set[int] = set()
    stack: list[tuple[yaml.Node, tuple]] = [(root, ())]
    while stack:
        node, where = stack.pop()
        if id(node) in seen:
            continue
        seen.add(id(node))
        if isinstance(node, yaml.MappingNode):
            first: dict[str, yaml.Node] = {}
            for key, value in node.value:
                text = _key_text(key)
                if text in first and text != "<<":
                    field_path = ".".join(str(p) for p in (*where, text))
                    raise ScenarioError(
                        f"{path}: line {key.start_mark.line + 1}: got the key {text!r} ({field_path}) a second time "
                        f"in one mapping (first at line {first[text].start_mark.line + 1}); expected each key once.",
                        file=str(path),
                        field=field_path,
                    )
                first[text] = key
                stack.append((value, (*where, text)))
        elif isinstance(node, yaml.SequenceNode):
            stack.extend((item, (*where, i)) for i, item in enumerate(node.value))

    def children(node: yaml.Node) -> list[yaml.Node]:
        if isinstance(node, yaml.MappingNode):
            return [v for pair in node.value for v in pair]
        if isinstance(node, yaml.SequenceNode):
            return list(node.value)
        return []

    def size(
        root: yaml.Node,
    ) -> int:  # expanded size, memoised per distinct node, post-order without recursion
        stack: list[tuple[yaml.Node, bool]] = [(root, False)]
        open_nodes: set[int] = set()
        while stack:
            node, done = stack.pop()
            if id(node) in sizes:
                continue
            if done:
                sizes[id(node)] = 1 + sum(sizes[id(c)] for c in children(node))
                open_nodes.discard(id(node))
                continue
            if id(node) in open_nodes:  # an alias to a node that contains it
                mark = node.start_mark
                raise ScenarioError(
                    f"{path}: line {mark.line + 1}: got a YAML alias that refers to a node containing it; "
                    "expected no recursive aliases.",
                    file=str(path),
                )
            open_nodes.add(id(node))
            stack.append((node, True))
            stack.extend((c, False) for c in children(node) if id(c) not in sizes)
        return sizes[id(root)]

    total = size(root)
    if total > MAX_YAML_NODES:
        raise ScenarioError(
            f"{path}: (file): got YAML that expands to {total:,} values through its aliases; expected at most "
            f"{MAX_YAML_NODES:,}.",
            file=str(path),
        )


def read_yaml_document(path: Path, kind: str = "scenario") -> Any:
    """The parsed YAML of ``path``; a missing, oversized or non-UTF-8 file, a syntax error, a key given twice and a
    document that aliases expand beyond the bounds above are each a one-sentence ScenarioError."""
    path = Path(path)
    if not path.is_file():
        raise ScenarioError(f"{path}: no such {kind} file.", file=str(path))
    text = read_text_file(path, kind, MAX_YAML_BYTES)
    loader = _BoundedLoader(text, path)
    try:
        return loader.get_single_data()
    except yaml.YAMLError as error:
        mark = getattr(error, "problem_mark", None)
        where = f" at line {mark.line + 1}, column {mark.column + 1}" if mark else ""
        raise ScenarioError(
            f"{path}: not valid YAML{where}: {getattr(error, 'problem', error)}.", file=str(path)
        ) from None
    except RecursionError:
        raise ScenarioError(
            f"{path}: (file): got YAML nested too deeply to read; expected a scenario nested a few levels deep.",
            file=str(path),
        ) from None
    finally:
        loader.dispose()


def _read_yaml(path: Path, referrer: tuple[Path, str] | None) -> dict[str, Any]:
    if referrer and not path.is_file():
        raise located_error(referrer[0], referrer[1], str(path), "an existing scenario file")
    data = read_yaml_document(path, "scenario")
    if data is None:
        raise located_error(
            path, "(top level)", "an empty file", "a mapping of sections (metadata, time, ...)"
        )
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
            year = int(row["year"])
        except ValueError:
            raise located_error(path, f"line {number}.year", row["year"], "a whole year") from None
        if year in out:
            raise located_error(path, f"line {number}.year", year, "each year once")
        out[year] = _finite(path, number, "value", row["value"])
    return out


def _finite(path: Path, line: int, column: str, text: str) -> float:
    """The number in a CSV cell; an empty cell, text, inf or NaN is a located error."""
    try:
        value = float(text)
    except ValueError:
        raise located_error(path, f"line {line}.{column}", text, "a number") from None
    if not math.isfinite(value):
        raise located_error(path, f"line {line}.{column}", text, "a finite number")
    return value


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
            weight = _finite(path, number, "weight_days", row["weight_days"])
            day = days.setdefault(
                name,
                {
                    "name": name,
                    "weight_days": weight,
                    "demand_shape": [],
                    "availability": {p: [] for p in profiles},
                },
            )
            if weight != day["weight_days"]:
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
            demand = _finite(path, number, "demand", row["demand"])
            if demand < 0:
                raise located_error(
                    path, f"line {number}.demand", row["demand"], "a demand value of at least 0"
                )
            day["demand_shape"].append(demand)
            for p in profiles:
                factor = _finite(path, number, p, row[p])
                if not 0 <= factor <= 1:
                    raise located_error(
                        path, f"line {number}.{p}", row[p], "an availability factor from 0 to 1"
                    )
                day["availability"][p].append(factor)
        except ValueError as error:
            if isinstance(error, ScenarioError):
                raise
            raise located_error(
                path, f"line {number}", dict(row), "numbers in every column but 'day'"
            ) from None
    return list(days.values())


def _read_csv(path: Path) -> list[dict[str, str]]:
    """Rows of a UTF-8 CSV file as {column: text}; a column named twice or a row with more cells than the header is
    a located error."""
    text = read_text_file(path, "CSV", MAX_CSV_BYTES)
    reader = csv.reader(io.StringIO(text, newline=""))
    try:
        header = [name.strip() for name in next(reader)]
    except StopIteration:
        return []
    except csv.Error as error:
        raise located_error(path, "line 1", str(error), "a CSV header line") from None
    twice = sorted({name for name in header if header.count(name) > 1})
    if twice:
        raise located_error(path, "line 1", twice, "each column named once")
    rows = []
    try:
        for number, cells in enumerate(reader, start=2):
            if not cells:
                continue
            if len(cells) > len(header):
                raise located_error(
                    path, f"line {number}", cells, f"at most {len(header)} cells, as in the header"
                )
            rows.append({name: (cells[i].strip() if i < len(cells) else "") for i, name in enumerate(header)})
    except csv.Error as error:
        raise located_error(path, f"line {reader.line_num}", str(error), "a well-formed CSV line") from None
    return rows


def _currency_of(raw: dict[str, Any]) -> str:
    """metadata.currency for converting unit strings; the schema reports a currency that is not a code."""
    meta = raw.get("metadata")
    currency = meta.get("currency", "USD") if isinstance(meta, dict) else "USD"
    return currency if isinstance(currency, str) else "USD"


def load_scenario(path: str | Path) -> LoadedScenario:
    """Read, merge and validate a scenario; raise ScenarioError with a located one-sentence message."""
    path = Path(path)
    raw, provenance, files = read_yaml_with_extends(path)
    raw = _resolve_csv(raw, (), provenance, path.resolve())
    currency = _currency_of(raw)
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
    # a field the validators made from the user's value (capex: 900 -> capex.table) is reported where it was written
    while len(loc) > 1 and not _exists(raw, loc):
        loc = loc[:-1]
    value = value_at(raw, loc)
    return located_error(file, loc or "(top level)", value, expected_text(first))


# pydantic's error types whose own text reads like program output, in the words of a scenario file
_EXPECTED_BY_KIND = {
    "int_parsing": "a whole number",
    "int_parsing_size": "a whole number of ordinary size",
    "int_from_float": "a whole number",
    "int_type": "a whole number",
    "float_parsing": "a number",
    "float_type": "a number",
    "dict_type": "a mapping of fields",
    "model_type": "a mapping of fields",
    "model_attributes_type": "a mapping of fields",
    "list_type": "a list",
    "string_type": "text",
}


def expected_text(error: Mapping[str, Any]) -> str:
    """What a field expected, in words, from one pydantic error (its type and message)."""
    kind = error["type"]
    if kind in _EXPECTED_BY_KIND:
        return _EXPECTED_BY_KIND[kind]
    message = error["msg"]
    for prefix in ("Value error, ", "Assertion failed, "):
        message = message.removeprefix(prefix)
    if kind == "literal_error":
        return message.replace("Input should be ", "one of ")
    if kind == "string_pattern_mismatch":
        return "text of letters, digits, '_', '-' and '.' (starting with a letter or digit)"
    message = message[0].lower() + message[1:] if message else "a valid value"
    return message.replace("input should be ", "")


def _exists(raw: Any, loc: tuple) -> bool:
    node = raw
    for part in loc:
        try:
            node = node[part]
        except (KeyError, IndexError, TypeError):
            return False
    return True


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
    path = Path(path).resolve()
    provenance = provenance or {}
    currency = _currency_of(raw)
    try:
        scenario = Scenario.model_validate(raw, context={"currency": currency})
    except ValidationError as error:
        raise _explain(error, raw, provenance, path) from None
    loaded = LoadedScenario(
        scenario=scenario, path=path, files=files or (path,), raw=raw, provenance=provenance
    )
    check_scenario(loaded)
    return loaded
