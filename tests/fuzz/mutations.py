"""Seeded one-change mutations of the demo scenario and the demo ensemble file, and the judging of what pathcast says.

A case is made from a target ("scenario": scenarios/demo/budget.yaml, reference.yaml which it extends, and the
representative_days.csv it reads; "ensemble": scenarios/demo/ensemble.yaml and its base) and a seed. The seed
picks the kind of mutation from :func:`menu` (``seed % len(menu(target))``, so every consecutive run of that many
seeds covers every kind once) and, with ``random.Random(seed)``, the field and value. The mutated file is written
by hand (:func:`emit`, block YAML with known line numbers) so a key can appear twice, a leaf can be raw YAML and a
file can be re-encoded as Latin-1.

:func:`problems` turns what a check did (:class:`Outcome`: exit code, an escaped exception, warnings; and the
output) into the list of broken promises: exit code 0 or 2; no traceback, exception or warning; a rejected input
named by its one-line message (the file and the field path, or its parent path plus the key name; for damage to
the file the line); and mutations that must be rejected (:func:`_must_reject`, :func:`_out_of_range`,
:func:`_csv_must_reject`: NaN, text or a list for a number, numbers out of plain physical range, a missing file,
a name that is no commodity, a scenario name that would leave results/, a duplicate key, a file not in UTF-8, ...).
"""

from __future__ import annotations

import csv
import functools
import io
import math
import random
import re
import sys
import traceback
import warnings
from collections.abc import Callable
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import yaml

__all__ = [
    "DEMO",
    "ENTRY",
    "MENU",
    "menu",
    "NUMBER_VALUES",
    "STRING_VALUES",
    "Case",
    "Catalogue",
    "catalogue",
    "Written",
    "emit",
    "make_case",
    "write_case",
    "check_ensemble",
    "checks",
    "guarded",
    "Outcome",
    "problems",
]

DEMO = Path(__file__).resolve().parents[2] / "scenarios" / "demo"
# the file each target checks, and the files whose fields it mutates (the merged mapping: later files win)
ENTRY = {"scenario": "budget.yaml", "ensemble": "ensemble.yaml"}
SOURCES = {"scenario": ("reference.yaml", "budget.yaml"), "ensemble": ("ensemble.yaml",)}

HUGE_INT = 10**40
NUMBER_VALUES: tuple[Any, ...] = (
    math.inf,
    -math.inf,
    math.nan,
    -1,
    -1e30,
    1e30,
    1e300,
    1000.0,  # large, yet inside any magnitude bound: too large for a fraction, a spread or a rate
    1e10,
    0,
    -0.5,
    -1.5,
    "twelve",
    [1, 2],
    None,
    HUGE_INT,
)
# text in place of a number, beside 'twelve': a quantity of another dimension, NaN and infinity spelt as text
NUMBER_TEXTS: tuple[str, ...] = ("5 GW", "nan", "-inf", "1e999 USD/kW", "0x1F")
NON_ASCII = "Ærøskøbing – 東京"
STRING_VALUES: tuple[Any, ...] = ("", ".", "..", "../../x", "/abs", "=HYPERLINK(1)", 42, NON_ASCII)
PATH_LIKE = ("", ".", "..", "../../x", "/abs")
LATIN1_TEXT = " Ærø café"  # every character is in Latin-1 and none is ASCII

# cells of the representative-days CSV (text as written in the file)
DAYS_CSV = "representative_days.csv"
CSV_NUMBER_TEXTS: tuple[str, ...] = (
    "inf",
    "-inf",
    "nan",
    "-1",
    "-1e30",
    "1e30",
    "1e300",
    "0",
    "-0.5",
    "-1.5",
    "twelve",
    "",
    "1e400",
    str(HUGE_INT),
)
CSV_DAY_TEXTS: tuple[str, ...] = ("", "..", "=HYPERLINK(1)", "42", NON_ASCII)

# a mapping or list of the file replaced by a scalar, a list, null or an empty container
MAPPING_VALUES: tuple[Any, ...] = (5, "text", [1, 2], None, {}, [])
# the whole text of one file replaced (the byte-order mark keeps the file valid)
BOM = "byte-order mark + the file"
WHOLE_FILES: tuple[str, ...] = ("", "[1, 2]\n", "just text\n", "key: [unclosed\n", "\t- tab\n", BOM)
# a leaf written as YAML that safe_load reads as something else than a number or a string, with whether it must be
# rejected wherever it stands
YAML_TEXTS: tuple[tuple[str, str], ...] = (
    ("!!python/object/apply:os.system ['true']", "a Python object tag"),
    ("!!binary aGVsbG8=", "bytes are no scenario value"),
    ("2025-01-01", ""),  # a date
    ("!!set {a: null}", "a set is no scenario value"),
    ("*nowhere", "an alias to no anchor"),
    ("&kept 5", ""),  # an anchor on a number: the number
    ("!!timestamp 2025-01-01 10:00:00", ""),
    ("{a: 1, a: 2}", "a key written twice in one mapping"),
)
# mappings whose keys are names the user chooses (renaming one is not a misspelt field)
USER_NAMED = {
    "scenario": {
        ("demand", "fuels"),
        ("commodities",),
        ("technologies", "generators"),
        ("technologies", "storage"),
        ("technologies", "converters"),
        ("technologies", "supplies"),
    },
    "ensemble": {("inputs",)},
}

# (kind, pool): the seed picks the entry, random.Random(seed) the field and, for a pool of several, the value
MENU: tuple[tuple[str, tuple[Any, ...]], ...] = (
    *(("replace_number", (v,)) for v in NUMBER_VALUES),
    ("replace_number", NUMBER_TEXTS),
    *(("replace_string", (v,)) for v in STRING_VALUES),
    ("delete", (None,)),
    ("duplicate_key", (None,)),
    ("latin1", (None,)),
    ("replace_mapping", MAPPING_VALUES),
    ("rename_key", (None,)),
    ("whole_file", WHOLE_FILES),
    ("yaml_text", YAML_TEXTS),
    ("csv_cell", CSV_NUMBER_TEXTS),
    ("latin1_csv", (None,)),
)

# ensemble only: an input pointed at another field of the base scenario (reference.yaml), with what sampling into
# it must give: (path, reason to reject with 'as: multiplier', reason to reject with 'as: absolute')
ENSEMBLE_PATHS: tuple[tuple[str, str, str], ...] = (
    ("metadata.name", "a multiplier on text", "a number for the scenario name"),
    ("technologies.generators.solar_pv.availability", "a multiplier on a profile name", ""),
    (
        "technologies.generators.coal_steam.existing",
        "a multiplier on a list of mappings",
        "a number for a list",
    ),
    ("metadata.illustrative", "a multiplier on a yes/no field", "a sampled number for a yes/no field"),
    ("time.representative_days", "a multiplier on the representative days", "a number for the days"),
    ("technologies.generators.solar_pv.capex", "", ""),
    ("metadata.base_year", "a multiplier on a year", "a sampled fraction for a year"),
    ("technologies.generators.nuclear.capex", "names no field", "names no field"),
    ("policy.carbon_budget.total_mt", "names no field of reference.yaml", "names no field of reference.yaml"),
    ("demand.electricity.growth.2025", "", ""),
    ("technologies.generators.coal_steam.existing.0.capacity_mw", "", ""),
    ("metadata.discount_rate", "", ""),
)
ENSEMBLE_MENU: tuple[tuple[str, tuple[Any, ...]], ...] = (("ensemble_path", ENSEMBLE_PATHS),)


def menu(target: str) -> tuple[tuple[str, tuple[Any, ...]], ...]:
    """The kinds of mutation of a target, each with its pool of values."""
    return MENU + ENSEMBLE_MENU if target == "ensemble" else MENU


LOCATED = re.compile(r": [^:\s][^:]*: got ")  # 'FILE: field.path: got ...'
QUANTITY = re.compile(r"^-?[0-9][0-9_.]*(e[-+]?[0-9]+)?\s+\S+$")


# ---------------------------------------------------------------------------------------------------- writing YAML


@dataclass(frozen=True)
class Raw:
    """YAML text written as it is (a tag, an alias, a date ...)."""

    text: str


def scalar_text(value: Any) -> str:
    """One YAML flow node (scalar, list or mapping) on one line, as PyYAML would read it back."""
    if isinstance(value, Raw):
        return value.text
    text = yaml.safe_dump(value, default_flow_style=True, allow_unicode=True, width=2**30, sort_keys=False)
    if text.endswith("\n...\n"):
        text = text[: -len("\n...\n")]
    return text.rstrip("\n")


@dataclass
class Emitted:
    """Block YAML lines of a mapping; ``line_of`` (0-based) for every path, ``block`` (start, end) per block key."""

    lines: list[str] = field(default_factory=list)
    line_of: dict[tuple, int] = field(default_factory=dict)
    block: dict[tuple, tuple[int, int]] = field(default_factory=dict)

    @property
    def text(self) -> str:
        return "\n".join(self.lines) + "\n"


def _record_flow(value: Any, path: tuple, line: int, out: Emitted) -> None:
    out.line_of[path] = line
    if isinstance(value, dict):
        for key, item in value.items():
            _record_flow(item, path + (key,), line, out)
    elif isinstance(value, list):
        for index, item in enumerate(value):
            _record_flow(item, path + (index,), line, out)


def _emit_mapping(mapping: dict, indent: int, prefix: tuple, out: Emitted) -> None:
    pad = " " * indent
    for key, value in mapping.items():
        path = prefix + (key,)
        start = len(out.lines)
        out.line_of[path] = start
        head = f"{pad}{scalar_text(key)}:"
        if isinstance(value, dict) and value:
            out.lines.append(head)
            _emit_mapping(value, indent + 2, path, out)
        elif isinstance(value, list) and value:
            out.lines.append(head)
            for index, item in enumerate(value):
                _record_flow(item, path + (index,), len(out.lines), out)
                out.lines.append(f"{pad}  - {scalar_text(item)}")
        else:
            out.lines.append(f"{head} {scalar_text(value)}")
        out.block[path] = (start, len(out.lines))


def emit(mapping: dict) -> Emitted:
    """Write ``mapping`` as block YAML by hand (flow style only for list items that are lists or mappings)."""
    out = Emitted()
    _emit_mapping(mapping, 0, (), out)
    return out


# ---------------------------------------------------------------------------------------------------- the cases


def _leaves(node: Any, prefix: tuple = ()):
    """(path, value) of every scalar, and of every empty mapping or list."""
    if isinstance(node, dict) and node:
        for key, value in node.items():
            yield from _leaves(value, prefix + (key,))
    elif isinstance(node, list) and node:
        for index, value in enumerate(node):
            yield from _leaves(value, prefix + (index,))
    else:
        yield prefix, node


def _keys(node: Any, prefix: tuple = ()):
    """Every path that ends in a mapping key (leaf or not), outside lists."""
    if isinstance(node, dict):
        for key, value in node.items():
            yield prefix + (key,)
            yield from _keys(value, prefix + (key,))


def _read(folder: Path, name: str) -> dict:
    return yaml.safe_load((folder / name).read_text(encoding="utf-8"))


@dataclass(frozen=True)
class Leaf:
    file: str
    path: tuple
    value: Any


def merged_leaves(target: str, folder: Path = DEMO) -> list[Leaf]:
    """The leaves of the merged mapping, each with the file that sets it (a later file shadows an earlier one)."""
    chosen: dict[tuple, Leaf] = {}
    for name in SOURCES[target]:
        for path, value in _leaves(_read(folder, name)):
            for other in [p for p in chosen if p[: len(path)] == path or path[: len(p)] == p]:
                del chosen[other]
            chosen[path] = Leaf(name, path, value)
    return list(chosen.values())


def _is_number(value: Any) -> bool:
    """A number or a boolean (bool is an int in Python): replaced from NUMBER_VALUES."""
    return isinstance(value, (int, float))


def dotted(path: tuple) -> str:
    return ".".join(str(p) for p in path) if path else "(top level)"


@dataclass(frozen=True)
class Case:
    """One mutation: ``kind`` is one of the kinds of :data:`MENU`. For the CSV kinds ``path`` is (data row, column),
    the data row counted from 0 (file line = row + 2)."""

    target: str
    seed: int
    kind: str
    file: str
    path: tuple
    old: Any = None
    new: Any = None
    must_reject: str = ""  # why the mutated input is invalid ("" when it may be valid)
    lines: tuple[int, ...] = ()  # CSV kinds: the 1-based lines a message may name
    label: str = ""  # a case written by hand: its id

    @property
    def id(self) -> str:
        return self.label or f"{self.target}-{self.seed:03d}"

    @property
    def entry(self) -> int:
        return self.seed % len(menu(self.target))

    @property
    def emptied(self) -> bool:
        """A mapping or list emptied, nulled or deleted as a whole."""
        if self.kind == "replace_mapping":
            return self.new in ({}, [], None)
        return self.kind == "delete" and self.old in ("{...}", "[...]")

    @property
    def file_level(self) -> bool:
        return self.kind in ("duplicate_key", "latin1", "latin1_csv", "whole_file")

    def describe(self) -> str:
        if self.kind in ("csv_cell", "latin1_csv"):
            where = f"{self.file}: line {self.path[0] + 2}, column {self.path[1]}"
        else:
            where = f"{self.file}: {dotted(self.path)}"
        if self.kind.startswith("replace") or self.kind in ("csv_cell", "ensemble_path", "yaml_text"):
            what = f"{where}: {self.old!r} -> {self.new!r}"
        elif self.kind == "delete":
            what = f"{where}: key deleted"
        elif self.kind == "duplicate_key":
            what = f"{where}: key written twice"
        elif self.kind == "rename_key":
            what = f"{where}: key renamed {self.new!r}"
        elif self.kind == "whole_file":
            what = f"{self.file}: the whole file replaced by {self.new!r}"
        else:
            what = f"{where}: {LATIN1_TEXT.strip()!r} added and the file re-encoded as Latin-1"
        reject = f" (must be rejected: {self.must_reject})" if self.must_reject else ""
        return f"{self.id} [{self.kind}] {what}{reject}"


# What the numbers of the demo files stand for (plain physics and bookkeeping; common practice, no source):
# a value outside these ranges cannot be meant and must be rejected. Keyed by the field name (the last name in
# the path; a {year: value} path counts as its field).
YEAR_FIELDS = {
    "base_year",
    "final_year",
    "price_year",
    "retirement_year",
    "first_build_year",
    "phase_out_year",
    "first_year",
    "last_year",
}
NON_NEGATIVE_FIELDS = {
    "capex",
    "energy_capex",
    "base",
    "floor",
    "cumulative_deployment",
    "fixed_om",
    "variable_om",
    "capacity_mw",
    "max_build_mw_per_year",
    "min_build_mw_per_year",
    "max_total_mw",
    "base_year_twh",
    "base_year_pj",
    "price",
    "potential_pj",
    "total_mt",
    "emission_factor",
    "process_emission_factor",
    "min_duration_hours",
    "max_duration_hours",
    "reference_budget_mt",
}
POSITIVE_FIELDS = {"lifetime", "efficiency", "round_trip_efficiency", "median", "sigma"}
FRACTION_FIELDS = {
    "availability",
    "capacity_credit",
    "round_trip_efficiency",
    "learning_rate",
    "annual_decline",
    "reserve_margin",
    "discount_rate",
}


def field_name(path: tuple) -> str:
    """The name of the field a leaf belongs to: the last name in the path (list indices and years skipped)."""
    return next((str(p) for p in reversed(path) if isinstance(p, str)), "")


def _as_number(value: Any) -> float | None:
    if isinstance(value, bool):
        return None
    if isinstance(value, (int, float)):
        return float(value)
    if isinstance(value, str) and value.strip().lstrip("+-").lower() in ("inf", "nan"):
        return float(value)
    return None


def _out_of_range(target: str, path: tuple, new: Any) -> str:
    value = _as_number(new)
    if value is None:
        return ""
    name = field_name(path)
    whole = math.isfinite(value) and value == int(value)
    if name in YEAR_FIELDS and not (whole and 1000 <= value <= 9999):
        return f"{name} is not a plausible year"
    if target == "ensemble":
        if path == ("members",) and not (whole and 1 <= value <= 100_000):
            return "members is a count from 1 to 100000"
        if path == ("seed",) and not (whole and value >= 0):
            return "seed is a whole number >= 0"
    if name in POSITIVE_FIELDS and value <= 0:
        return f"{name} must be above 0"
    if name in NON_NEGATIVE_FIELDS and value < 0:
        return f"a negative {name}"
    if name in FRACTION_FIELDS and not 0 <= value <= 1:
        return f"{name} is a fraction in [0, 1]"
    if name == "efficiency":
        limit = 1 if "generators" in path else 5
        if value > limit:
            return f"an efficiency above {limit}"
    if name == "growth" and value <= -1:
        return "a growth rate of -100 % or less makes demand vanish or turn negative"
    return ""


def _must_reject(target: str, path: tuple, old: Any, new: Any) -> str:
    last = path[-1] if path else None
    if _is_number(old):
        if (isinstance(new, float) and math.isnan(new)) or new == "nan":
            return "NaN is never a valid number"
        if new == "twelve":
            return "text where a number is expected"
        if isinstance(new, list):
            return "a list where a number is expected"
        return "" if isinstance(old, bool) else _out_of_range(target, path, new)
    if not isinstance(old, str):
        return ""
    if target == "scenario":
        if path in (("extends",), ("time", "representative_days")):
            return "names no existing file"
        if path == ("metadata", "name") and new in PATH_LIKE:
            return "the scenario name becomes the folder results/<name>"
        if last in ("fuel", "input", "output") or (len(path) >= 2 and path[-2] == "served_by"):
            return "names no commodity"
        if last == "availability":
            return "names no hourly profile"
        if last == "origin":
            return "not one of the supply origins"
        if QUANTITY.match(old) and not isinstance(new, (int, float)):
            return "not a quantity"
        return ""
    if path == ("base",):
        return "names no existing file"
    if path == ("name",) and new in PATH_LIKE:
        return "the ensemble name becomes the folder results/<name>"
    if len(path) == 3 and path[0] == "inputs" and last == "path":
        return "names no field of the base scenario"
    if path == ("design",) or (len(path) == 3 and path[0] == "inputs" and last in ("as", "distribution")):
        return "not one of the choices"
    return ""


def _number(text: str) -> float | None:
    try:
        return float(text)
    except ValueError:
        return None


def _csv_must_reject(column: str, old: str, new: str) -> str:
    if new == old:
        return ""
    value = _number(new)
    if column == "day":
        return "one row renamed breaks the 24 hours of its day"
    if column == "hour":
        return "hours run 0-23 in order"
    if column == "weight_days":
        return "a day has one weight on all of its hours" if value != _number(old) else ""
    if value is None or not math.isfinite(value):
        return "not a finite number"
    if column == "demand":
        return "a negative demand" if value < 0 else ""
    return "an availability factor outside [0, 1]" if not 0 <= value <= 1 else ""


def _value(data: Any, path: tuple) -> Any:
    for part in path:
        data = data[part]
    return data


def _typo(rng: random.Random, name: str) -> str:
    """The name with two neighbouring letters swapped, or one letter dropped when that changes nothing."""
    for _ in range(20):
        i = rng.randrange(len(name) - 1)
        swapped = name[:i] + name[i + 1] + name[i] + name[i + 2 :]
        if swapped != name:
            return swapped
    return name[:-1]


def _read_rows(folder: Path, name: str) -> list[list[str]]:
    return list(csv.reader(io.StringIO((folder / name).read_text(encoding="utf-8"), newline="")))


@dataclass(frozen=True)
class Catalogue:
    """What a target's files offer to mutate (read once per target and folder)."""

    numbers: tuple[Leaf, ...]  # number and boolean leaves of the merged mapping
    strings: tuple[Leaf, ...]  # string leaves of the merged mapping
    deletable: tuple[tuple[str, tuple], ...]  # (file, path) of every key of the merged mapping
    containers: tuple[
        tuple[str, tuple], ...
    ]  # the keys among them whose value is a non-empty mapping or list
    blocks: dict[str, tuple[tuple, ...]]  # per file: the keys written in block style
    file_strings: dict[str, tuple[tuple[tuple, str], ...]]  # per file: (path, value) of every string leaf
    csv_rows: tuple[tuple[str, ...], ...]  # the representative-days CSV, header first


@functools.cache
def catalogue(target: str, folder: Path = DEMO) -> Catalogue:
    leaves = merged_leaves(target, folder)
    owner = {leaf.path: leaf.file for leaf in leaves}
    deletable = []
    data = {name: _read(folder, name) for name in SOURCES[target]}
    for name in SOURCES[target]:
        for path in _keys(data[name]):
            # a key of the merged mapping: set by this file and not shadowed by a later one
            if any(file == name and p[: len(path)] == path for p, file in owner.items()):
                deletable.append((name, path))
    return Catalogue(
        numbers=tuple(leaf for leaf in leaves if _is_number(leaf.value)),
        strings=tuple(leaf for leaf in leaves if isinstance(leaf.value, str)),
        deletable=tuple(deletable),
        containers=tuple(
            (name, path)
            for name, path in deletable
            if isinstance(value := _value(data[name], path), (dict, list)) and value
        ),
        blocks={name: tuple(emit(data[name]).block) for name in SOURCES[target]},
        file_strings={
            name: tuple((p, v) for p, v in _leaves(data[name]) if isinstance(v, str))
            for name in SOURCES[target]
        },
        csv_rows=tuple(tuple(row) for row in _read_rows(folder, DAYS_CSV)),
    )


def make_case(target: str, seed: int, folder: Path = DEMO) -> Case:
    """The mutation of ``seed`` (deterministic: the menu entry by seed, the field and value by random.Random(seed))."""
    rng = random.Random(seed)
    kind, pool = menu(target)[seed % len(menu(target))]
    new = pool[0] if len(pool) == 1 else rng.choice(pool)
    found = catalogue(target, folder)
    if kind in ("replace_number", "replace_string"):
        leaf = rng.choice(found.numbers if kind == "replace_number" else found.strings)
        reason = _must_reject(target, leaf.path, leaf.value, new)
        return Case(target, seed, kind, leaf.file, leaf.path, leaf.value, new, reason)
    if kind == "delete":
        name, path = rng.choice(found.deletable)
        value = _value(_read(folder, name), path)
        old = "{...}" if isinstance(value, dict) else "[...]" if isinstance(value, list) else value
        return Case(target, seed, kind, name, path, old)
    if kind == "ensemble_path":
        data = _read(folder, "ensemble.yaml")
        label = rng.choice(list(data["inputs"]))
        field_path, on_multiplier, on_absolute = new
        apply = data["inputs"][label]["as"]
        reason = on_multiplier if apply == "multiplier" else on_absolute
        old = data["inputs"][label]["path"]
        return Case(target, seed, kind, "ensemble.yaml", ("inputs", label, "path"), old, field_path, reason)
    if kind == "yaml_text":
        text, reason = new
        leaf = rng.choice(found.numbers + found.strings)
        if not reason and _is_number(leaf.value) and text.startswith(("2025-", "!!timestamp")):
            reason = "a date where a number is expected"
        return Case(target, seed, kind, leaf.file, leaf.path, leaf.value, text, reason)
    if kind == "replace_mapping":
        name, path = rng.choice(found.containers)
        old = "{...}" if isinstance(_value(_read(folder, name), path), dict) else "[...]"
        return Case(target, seed, kind, name, path, old, new)
    if kind == "rename_key":
        name, path = rng.choice(
            [(n, p) for n, p in found.deletable if isinstance(p[-1], str) and len(p[-1]) > 2]
        )
        misspelt = _typo(rng, path[-1])
        user_named = path[:-1] in USER_NAMED[target]
        reason = "" if user_named else "a misspelt field name"
        return Case(target, seed, kind, name, path, path[-1], misspelt, reason)
    if kind == "whole_file":
        name = rng.choice(SOURCES[target])
        reason = "" if new == BOM else "not a mapping of fields"
        return Case(target, seed, kind, name, (), None, new, reason)
    if kind in ("csv_cell", "latin1_csv"):
        rows = found.csv_rows
        row = rng.randrange(len(rows) - 1)
        column = rng.randrange(len(rows[0])) if kind == "csv_cell" else rows[0].index("day")
        name, old = rows[0][column], rows[row + 1][column]
        line = row + 2
        if kind == "latin1_csv":
            reason = "the file is not UTF-8"
            return Case(target, seed, kind, DAYS_CSV, (row, name), old, old + LATIN1_TEXT, reason, (line,))
        if name == "day":
            new = rng.choice(CSV_DAY_TEXTS)
        lines = (line, line + 1) if name in ("day", "weight_days") else (line,)
        reason = _csv_must_reject(name, old, new)
        return Case(target, seed, kind, DAYS_CSV, (row, name), old, new, reason, lines)
    name = rng.choice(SOURCES[target])
    if kind == "duplicate_key":
        path = rng.choice(found.blocks[name])
        return Case(target, seed, kind, name, path, must_reject="a key written twice in one mapping")
    path, value = rng.choice(found.file_strings[name])
    return Case(target, seed, kind, name, path, value, must_reject="the file is not UTF-8")


# ---------------------------------------------------------------------------------------------------- applying


@dataclass(frozen=True)
class Written:
    entry: Path  # the file to check
    mutated: Path  # the file that was changed
    lines: tuple[int, ...] = ()  # 1-based lines a file-level message may name


def _parent(data: Any, path: tuple) -> Any:
    node = data
    for part in path[:-1]:
        node = node[part]
    return node


def write_case(case: Case, folder: Path) -> Written:
    """Apply ``case`` to the copy of the demo folder in ``folder`` and write the mutated file by hand."""
    target = folder / case.file
    data = _read(folder, case.file)
    lines: tuple[int, ...] = ()
    if case.kind.startswith("replace") or case.kind == "ensemble_path":
        _parent(data, case.path)[case.path[-1]] = case.new
        target.write_text(emit(data).text, encoding="utf-8")
    elif case.kind == "delete":
        del _parent(data, case.path)[case.path[-1]]
        target.write_text(emit(data).text, encoding="utf-8")
    elif case.kind == "rename_key":
        parent = _parent(data, case.path)
        renamed = {case.new if key == case.old else key: value for key, value in parent.items()}
        parent.clear()
        parent.update(renamed)
        target.write_text(emit(data).text, encoding="utf-8")
    elif case.kind == "yaml_text":
        _parent(data, case.path)[case.path[-1]] = Raw(case.new)
        emitted = emit(data)
        target.write_text(emitted.text, encoding="utf-8")
        lines = (emitted.line_of[case.path] + 1,)
    elif case.kind == "whole_file":
        target.write_text("\ufeff" + emit(data).text if case.new == BOM else case.new, encoding="utf-8")
    elif case.kind in ("csv_cell", "latin1_csv"):
        rows = _read_rows(folder, case.file)
        row, column = case.path
        rows[row + 1][rows[0].index(column)] = case.new
        buffer = io.StringIO()
        csv.writer(buffer, lineterminator="\n").writerows(rows)
        target.write_bytes(buffer.getvalue().encode("latin-1" if case.kind == "latin1_csv" else "utf-8"))
        lines = case.lines
    elif case.kind == "duplicate_key":
        emitted = emit(data)
        start, end = emitted.block[case.path]
        text_lines = emitted.lines[:end] + emitted.lines[start:end] + emitted.lines[end:]
        target.write_text("\n".join(text_lines) + "\n", encoding="utf-8")
        lines = (start + 1, end + 1)
    else:
        _parent(data, case.path)[case.path[-1]] = case.old + LATIN1_TEXT
        text = emit(data).text
        first = next(n for n, line in enumerate(text.splitlines(), start=1) if not line.isascii())
        target.write_bytes(text.encode("latin-1"))
        lines = (first,)
    return Written(folder / ENTRY[case.target], target, lines)


def check_ensemble(path: Path) -> int:
    """What ``pathcast ensemble`` validates before it solves anything (the ensemble file, its base scenario and
    every member's overrides), with cli.main's contract: a PathcastError becomes its exit code and one line
    ``pathcast: <message>`` on stderr."""
    from pathcast.ensemble.runner import plan_members
    from pathcast.ensemble.spec import load_ensemble
    from pathcast.errors import PathcastError

    try:
        plan_members(load_ensemble(path))
    except PathcastError as error:
        print(f"pathcast: {error}", file=sys.stderr)
        return error.exit_code
    return 0


def checks(case: Case, written: Written) -> list[tuple[str, Callable[[], Any]]]:
    """The in-process checks of a case, each with a label: ``pathcast check FILE`` (a scenario or an ensemble
    file), and for an ensemble file also the member plan that ``pathcast ensemble`` makes before solving."""
    from pathcast.cli import main

    found: list[tuple[str, Callable[[], Any]]] = [
        ("pathcast check", lambda: main(["check", str(written.entry)]))
    ]
    if case.target == "ensemble":
        found.append(("member plan", lambda: check_ensemble(written.entry)))
    return found


# categories Python's default warning filters do not print (outside __main__)
HIDDEN_WARNINGS = (DeprecationWarning, PendingDeprecationWarning, ImportWarning, ResourceWarning)


@dataclass(frozen=True)
class Outcome:
    code: Any  # the exit code (None when an exception escaped)
    crash: str = ""  # a one-line account of an exception that escaped the check
    warned: tuple[str, ...] = ()  # warnings that the command line would print on stderr


def guarded(check: Callable[[], Any]) -> Outcome:
    """Run one check, recording every warning it raises (the command line prints them on stderr)."""
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        try:
            code, crash = check(), ""
        except SystemExit as stop:
            code, crash = stop.code, ""
        except Exception as error:  # noqa: BLE001 - any escaped exception is the finding
            frame = traceback.extract_tb(error.__traceback__)[-1]
            text = str(error).splitlines()[0] if str(error) else ""
            shown = text if len(text) <= 160 else text[:157] + "..."
            code, crash = (
                None,
                f"{type(error).__name__}: {shown} (at {Path(frame.filename).name}:{frame.lineno})",
            )
    warned = tuple(
        dict.fromkeys(
            f"{w.category.__name__}: {w.message} (at {Path(w.filename).name}:{w.lineno})"
            for w in caught
            if not issubclass(w.category, HIDDEN_WARNINGS)
        )
    )
    return Outcome(code, crash, warned)


# ---------------------------------------------------------------------------------------------------- judging


def path_forms(path: tuple) -> set[str]:
    """The dotted spellings of a field path: list items as ``.0`` or ``[0]``."""
    dots = ".".join(str(p) for p in path)
    brackets = "".join(
        f"[{p}]" if isinstance(p, int) and i else f".{p}" if i else str(p) for i, p in enumerate(path)
    )
    return {dots, brackets}


def _word(text: str, word: str) -> bool:
    return re.search(rf"(?<![\w]){re.escape(word)}(?![\w])", text) is not None


def names_field(message: str, path: tuple) -> bool:
    """The message names ``path``, or its parent path and the key name."""
    if any(_word(message, form) for form in path_forms(path)):
        return True
    parent, key = path[:-1], str(path[-1])
    if not _word(message, key) and not _word(message, repr(key)):
        return False
    return not parent or any(_word(message, form) for form in path_forms(parent))


def names_line(message: str, file: Path, lines: tuple[int, ...]) -> bool:
    return any(
        re.search(rf"\bline {n}\b", message) or re.search(rf"{re.escape(file.name)}:{n}\b", message)
        for n in lines
    )


def problems(case: Case, written: Written, outcome: Outcome, out: str, err: str) -> list[str]:
    """What went wrong, one phrase each (empty: the case passes)."""
    code = outcome.code
    if outcome.crash:
        return [f"uncaught exception: {outcome.crash}"]
    found = [f"a warning printed on stderr: {w}" for w in outcome.warned]
    if "Traceback" in out or "Traceback" in err:
        found.append("a traceback in the output")
    if code not in (0, 2):
        found.append(f"exit code {code!r} (expected 0 or 2)")
    message = err.strip()
    if code == 0:
        if case.must_reject:
            found.append(f"exit 0: accepted, but {case.must_reject}")
        return found
    if code != 2:
        return found
    if not message:
        return [*found, "exit 2 with nothing on stderr"]
    if "\n" in message:
        found.append(f"a message of {message.count(chr(10)) + 1} lines (expected one)")
    first = message.splitlines()[0]
    if written.mutated.name not in first:
        found.append(f"the message does not name the file {written.mutated.name}")
    if case.kind == "csv_cell":
        if not names_line(first, written.mutated, written.lines) and not _word(first, case.path[1]):
            found.append(
                f"the message names neither line {' or '.join(map(str, written.lines))} nor {case.path[1]}"
            )
    elif case.kind == "whole_file":
        pass  # the file name is enough
    elif case.kind == "yaml_text":
        if not names_field(first, case.path) and not names_line(first, written.mutated, written.lines):
            found.append(f"the message names neither {dotted(case.path)} nor line {written.lines[0]}")
    elif case.kind == "ensemble_path":
        if not names_field(first, case.path[:2]):
            found.append(f"the message does not name the input {dotted(case.path[:2])}")
    elif case.emptied and LOCATED.search(first):
        pass  # a section emptied or removed: what it leaves missing may be reported where it is needed
    elif case.kind == "rename_key":
        if not names_field(first, case.path) and not names_field(first, case.path[:-1] + (case.new,)):
            found.append(
                f"the message names neither {dotted(case.path)} nor {dotted(case.path[:-1] + (case.new,))}"
            )
    elif case.file_level:
        if not names_line(first, written.mutated, written.lines):
            found.append(f"the message names no line {' or '.join(map(str, written.lines))}")
    elif not names_field(first, case.path):
        found.append(f"the message does not name {dotted(case.path)}")
    return found
