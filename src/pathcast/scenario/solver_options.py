"""Check a scenario's HiGHS settings against HiGHS's own option list before anything is built or solved.

``solver.options`` is passed to HiGHS by name, and ``solver.threads`` and ``solver.time_limit_s`` become the HiGHS
options ``threads`` and ``time_limit``. Each name is looked up with HiGHS's ``getOptionType`` and each value is set
on a scratch ``highspy.Highs`` instance, so the names, value types and ranges are exactly the ones the installed
HiGHS accepts; the expected types, ranges and descriptions quoted in messages come from HiGHS's ``writeOptions``
listing. Every bad entry is reported at once, one sentence each.

highspy is imported only when there is a HiGHS setting to check (``pathcast check`` of a scenario without solver
settings stays free of it).

YAML 1.1 reads an unquoted ``off`` or ``on`` as a boolean; for a HiGHS option of string type (``presolve: off``)
a boolean is therefore passed as the string ``"off"`` or ``"on"`` (:func:`highs_value`).
"""

from __future__ import annotations

import math
import os
import re
import sys
import tempfile
from collections.abc import Callable, Mapping
from dataclasses import dataclass
from functools import lru_cache
from pathlib import Path
from typing import Any

from ..errors import ScenarioError

__all__ = [
    "HighsOptionInfo",
    "highs_option_table",
    "highs_value",
    "quiet_highs",
    "solver_setting_problems",
    "check_solver_settings",
    "SETTING_OPTIONS",
]

# scenario field under ``solver`` -> the HiGHS option it sets
SETTING_OPTIONS = {"threads": "threads", "time_limit_s": "time_limit"}


@dataclass(frozen=True)
class HighsOptionInfo:
    """One HiGHS option as HiGHS lists it: type ('bool', 'integer', 'double' or 'string'), range text as HiGHS writes
    it ('{0, 2147483647}', '[0, inf]'; empty for bool and string) and its one-line description."""

    name: str
    type: str
    range: str = ""
    description: str = ""

    def expected(self) -> str:
        """What a value of this option must be, in words."""
        if self.type == "bool":
            return "true or false"
        if self.type == "integer":
            return f"a whole number in {self.range}" if self.range else "a whole number"
        if self.type == "double":
            return f"a number in {self.range}" if self.range else "a number"
        described = f": {self.description}" if self.description else ""
        return f"a string as HiGHS describes it{described}"


def quiet_highs(log: bool = False):
    """A ``highspy.Highs`` instance with its start-up banner (printed from C++ to standard output) kept off the
    screen and its output off, unless ``log`` is asked for."""
    import highspy

    if log:
        return highspy.Highs()
    sys.stdout.flush()
    saved = os.dup(1)
    try:
        with open(os.devnull, "w") as null:
            os.dup2(null.fileno(), 1)
            h = highspy.Highs()
            h.setOptionValue("output_flag", False)
    finally:
        os.dup2(saved, 1)
        os.close(saved)
    return h


_TYPE_NAMES = {"kBool": "bool", "kInt": "integer", "kDouble": "double", "kString": "string"}
_RECORD = re.compile(
    r"^# (?P<description>.*)\n# \[type: (?P<type>\w+), advanced: \w+(?:, range: (?P<range>\{[^}]*\}|\[[^\]]*\]))?, default: [^\n]*\]\n"
    r"(?P<name>\w+) = ",
    re.MULTILINE,
)


@lru_cache(maxsize=1)
def highs_option_table() -> dict[str, HighsOptionInfo]:
    """Every HiGHS option by name: those HiGHS writes with ``writeOptions`` (type, range, description) and the
    advanced ones the Python binding exposes on ``HighsOptions`` (type only, from ``getOptionType``)."""
    h = quiet_highs()
    table: dict[str, HighsOptionInfo] = {}
    with tempfile.TemporaryDirectory() as folder:
        listing = Path(folder) / "options.txt"
        h.writeOptions(str(listing))
        text = listing.read_text(encoding="utf-8") if listing.is_file() else ""
    for match in _RECORD.finditer(text):
        table[match["name"]] = HighsOptionInfo(
            name=match["name"],
            type=match["type"],
            range=(match["range"] or "").strip(),
            description=match["description"].strip(),
        )
    for name in dir(h.getOptions()):
        if name.startswith("_") or name in table:
            continue
        kind = _option_type(h, name)
        if kind is not None:
            table[name] = HighsOptionInfo(name=name, type=kind)
    return table


def _option_type(h, name: str) -> str | None:
    """HiGHS's type of option ``name`` ('bool', 'integer', 'double', 'string'), or None when HiGHS has no such option."""
    import highspy

    status, kind = h.getOptionType(name)
    if status != highspy.HighsStatus.kOk:
        return None
    return _TYPE_NAMES.get(getattr(kind, "name", str(kind)), str(kind))


def highs_value(h, name: str, value: Any) -> Any:
    """``value`` as passed to HiGHS for option ``name``: a boolean given to a string option becomes "on" or "off"
    (YAML 1.1 reads an unquoted on/off as a boolean); anything else is passed as it is."""
    if isinstance(value, bool) and _option_type(h, name) == "string":
        return "on" if value else "off"
    return value


def _refused(h, name: str, value: Any) -> bool:
    """Whether HiGHS refuses ``value`` for its option ``name`` (set on the scratch instance ``h``)."""
    import highspy

    if isinstance(value, float) and math.isnan(value):
        return (
            True  # HiGHS stores NaN for a double option without complaint; it is never a meaningful setting
        )
    try:
        status = h.setOptionValue(name, highs_value(h, name, value))
    except (
        TypeError,
        ValueError,
        RuntimeError,
    ):  # a list, a mapping, ...: no overload of setOptionValue fits
        return True
    return status == highspy.HighsStatus.kError


def _field(path: tuple) -> str:
    return ".".join(str(p) for p in path)


def solver_setting_problems(
    settings: Mapping[str, Any], file_of: Callable[[tuple], Path | str], prefix: tuple = ("solver",)
) -> list[ScenarioError]:
    """One ScenarioError per bad HiGHS setting in ``settings`` (the ``solver`` section: ``options``, ``threads``,
    ``time_limit_s``): unknown option names (one error for all of them per file, with did-you-mean) and values of
    the wrong type or out of HiGHS's range. ``file_of`` gives the file that set a field path. Empty when all is well
    or nothing needs HiGHS."""
    from ..errors import did_you_mean

    options = dict(settings.get("options") or {})
    given = {key: settings.get(key) for key in SETTING_OPTIONS if settings.get(key) is not None}
    if not options and not given:
        return []
    table = highs_option_table()
    h = quiet_highs()
    problems: list[ScenarioError] = []
    unknown: dict[str, list[str]] = {}
    for name in options:
        if _option_type(h, str(name)) is None:
            unknown.setdefault(str(file_of((*prefix, "options", name))), []).append(str(name))
    for file, names in unknown.items():
        hints = [
            (name, did_you_mean(name, table).removeprefix(" (did you mean ").removesuffix("?)"))
            for name in names
        ]
        hints = [(name, hint) for name, hint in hints if hint]
        if len(hints) == 1 and len(names) == 1:
            hint = f" (did you mean {hints[0][1]}?)"
        elif hints:
            hint = " (did you mean " + ", ".join(f"{close} for {name!r}" for name, close in hints) + "?)"
        else:
            hint = ""
        where = _field((*prefix, "options"))
        got = ", ".join(repr(n) for n in names)
        problems.append(
            ScenarioError(
                f"{file}: {where}: got {got}; expected HiGHS option names{hint}.", file=file, field=where
            )
        )
    checks = [((*prefix, key), SETTING_OPTIONS[key], value) for key, value in given.items()]
    checks += [((*prefix, "options", name), str(name), value) for name, value in options.items()]
    for path, option, value in checks:
        if _option_type(h, option) is None or not _refused(h, option, value):
            continue
        info = table.get(option) or HighsOptionInfo(name=option, type=_option_type(h, option) or "")
        file = str(file_of(path))
        where = _field(path)
        problems.append(
            ScenarioError(
                f"{file}: {where}: got {value!r}; expected {info.expected()} (HiGHS option {option!r}).",
                file=file,
                field=where,
            )
        )
    return problems


def check_solver_settings(
    settings: Mapping[str, Any], file_of: Callable[[tuple], Path | str], prefix: tuple = ("solver",)
) -> None:
    """Raise one ScenarioError (exit 2) listing every bad HiGHS setting (:func:`solver_setting_problems`), its
    sentences joined; nothing when all is well."""
    problems = solver_setting_problems(settings, file_of, prefix)
    if problems:
        first = problems[0]
        raise ScenarioError(" ".join(str(p) for p in problems), file=first.file, field=first.field)
