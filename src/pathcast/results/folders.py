"""Output folders that are safe by construction.

Rules (README, "Outputs"):

* pathcast writes a folder aside (``.<name>.tmp-<pid>-<random>`` beside the target) and swaps it in only when it is
  complete, so an interrupted write never leaves a half-written folder under the target's name.
* Every folder pathcast writes holds a marker file, :data:`OWNER_MARKER` (``.pathcast-output.json``: what wrote it and
  when). pathcast replaces an existing folder only when it holds that marker (or is empty). A folder with anything
  else in it, a file in the folder's place, the current working folder or one of its parents, the filesystem root and
  the home folder are refused with one sentence saying why and what to do; nothing is deleted.
* Leftovers of interrupted writes to the same place (temporary folders whose process is gone, the ``.<name>.old``
  of a swap that was cut short) are removed at the start of the next write there.

A result folder name is never taken from a scenario verbatim unless it passes :func:`check_folder_name`, which
``pathcast check`` applies to ``metadata.name``.
"""

from __future__ import annotations

import json
import os
import re
import shutil
import time
import uuid
from collections.abc import Callable
from pathlib import Path
from types import TracebackType
from typing import Literal

from ..errors import ScenarioError

__all__ = [
    "atomic_folder",
    "OWNER_MARKER",
    "FOLDER_NAME_RULE",
    "check_folder_name",
    "safe_folder_name",
    "is_pathcast_folder",
    "refuse_unsafe_target",
    "process_alive",
]

OWNER_MARKER = ".pathcast-output.json"
FOLDER_NAME_MAX = 64
_FOLDER_NAME = re.compile(rf"^[A-Za-z0-9_][A-Za-z0-9_.-]{{0,{FOLDER_NAME_MAX - 1}}}$")
FOLDER_NAME_RULE = (
    f"a folder name of 1 to {FOLDER_NAME_MAX} characters: letters A-Z and a-z, digits, '_', '-' and '.', "
    "starting with a letter, digit or '_'"
)
# names that Windows reserves for devices; a result folder of that name cannot be opened there (common practice)
_RESERVED = (
    {"con", "prn", "aux", "nul"} | {f"com{i}" for i in range(1, 10)} | {f"lpt{i}" for i in range(1, 10)}
)
_TEMPORARY = re.compile(r"^\.(?P<name>.+)\.tmp-(?P<pid>\d+)-[0-9a-f]{8}$")


def check_folder_name(name: object) -> str | None:
    """None when ``name`` may name a result folder, else what is wrong (the rule, for an error message)."""
    if not isinstance(name, str) or not _FOLDER_NAME.match(name):
        return FOLDER_NAME_RULE
    if name.split(".")[0].lower() in _RESERVED:
        return f"{FOLDER_NAME_RULE}, and not a name reserved for devices ({sorted(_RESERVED)[:4]} ...)"
    return None


def safe_folder_name(name: str) -> str:
    """A suggestion that passes :func:`check_folder_name`: other characters become '_', cut to the maximum length."""
    text = re.sub(r"[^A-Za-z0-9_.-]+", "_", str(name)).strip("._-") or "scenario"
    text = text[:FOLDER_NAME_MAX]
    return f"{text}_" if check_folder_name(text) else text


def is_pathcast_folder(folder: Path) -> bool:
    """True when ``folder`` holds pathcast's marker file (so pathcast wrote it), or is a result folder of an earlier
    pathcast version (its manifest.json names pathcast among the package versions)."""
    folder = Path(folder)
    if (folder / OWNER_MARKER).is_file():
        return True
    manifest = folder / "manifest.json"
    if not manifest.is_file():
        return False
    try:
        versions = json.loads(manifest.read_text(encoding="utf-8")).get("versions", {})
    except (OSError, ValueError, AttributeError):
        return False
    return isinstance(versions, dict) and "pathcast" in versions


def refuse_unsafe_target(
    target: Path | str,
    *,
    what: str = "output folder",
    purpose: str = "pathcast's output",
    example: str = "results/my_study",
    written_by: str = "pathcast",
    advice: str = "choose another output folder",
    recognised: Callable[[Path], bool] | None = None,
    ignored: Callable[[str], bool] | None = None,
) -> None:
    """Raise ScenarioError when writing ``target`` would replace something pathcast did not write: the current
    folder, one of its parents, the home folder or the root; a file in the folder's place; a folder that is neither
    ``recognised`` as pathcast's (default: :func:`is_pathcast_folder`) nor empty (entries ``ignored`` by name do not
    count). The wording names ``what`` is written, by whom, and what to do instead (``advice``)."""
    shown = str(target)
    resolved = Path(os.path.abspath(target))
    here = Path.cwd().resolve()
    protected = {Path(resolved.anchor), Path.home().resolve()}
    if resolved in protected or resolved == here or resolved in here.parents:
        raise ScenarioError(
            f"{shown}: {what}: got the current folder, one of its parents, the home folder or the "
            f"filesystem root; expected a folder of its own for {purpose} (e.g. {example}).",
            file=shown,
        )
    if resolved.exists() and not resolved.is_dir():
        raise ScenarioError(
            f"{shown}: {what}: got a file; expected a folder (pathcast never replaces a file it did not "
            f"write): {advice}.",
            file=shown,
        )
    if resolved.is_dir() and not (recognised or is_pathcast_folder)(resolved):
        others = sorted(p.name for p in resolved.iterdir() if not (ignored and ignored(p.name)))
        if others:
            listed = ", ".join(repr(n) for n in others[:3]) + (" ..." if len(others) > 3 else "")
            move = ", or move its files away yourself" if what == "output folder" else ""
            raise ScenarioError(
                f"{shown}: {what}: got a folder that pathcast did not write (it holds {listed}); expected "
                f"a new or empty folder, or one written by {written_by}: {advice}{move}.",
                file=shown,
            )


def process_alive(pid: int) -> bool:
    """Is process ``pid`` still running (so its temporary files are still being written)? Another user's process,
    or a platform that cannot tell, counts as running: its files are kept."""
    if pid == os.getpid():
        return True
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except OSError:  # PermissionError included
        return True
    return True


def _remove_leftovers(target: Path) -> None:
    """Remove what interrupted writes to ``target`` left beside it (only folders pathcast names and marks)."""
    parent = target.parent
    if not parent.is_dir():
        return
    for entry in parent.iterdir():
        match = _TEMPORARY.match(entry.name)
        if match and match["name"] == target.name and entry.is_dir() and not process_alive(int(match["pid"])):
            shutil.rmtree(entry, ignore_errors=True)
    old = parent / f".{target.name}.old"
    if old.is_dir() and (is_pathcast_folder(old) or not any(old.iterdir())):
        shutil.rmtree(old, ignore_errors=True)


class atomic_folder:
    """Context manager: yields a temporary folder beside ``target``; on success it replaces ``target`` as a whole.

    ``kind`` is recorded in the marker file (``result``, ``memo``, ``comparison``, ...). The target is checked by
    :func:`refuse_unsafe_target` before anything is written.
    """

    def __init__(self, target: Path | str, kind: str = "output"):
        self.target = Path(target)
        self.kind = kind

    def __enter__(self) -> Path:
        refuse_unsafe_target(self.target)
        self.target = Path(os.path.abspath(self.target))
        self.target.parent.mkdir(parents=True, exist_ok=True)
        _remove_leftovers(self.target)
        name = f".{self.target.name}.tmp-{os.getpid()}-{uuid.uuid4().hex[:8]}"
        self.tmp = self.target.parent / name
        self.tmp.mkdir()  # follows the umask like any other program's output
        marker = {
            "written_by": "pathcast",
            "kind": self.kind,
            "written_at": time.strftime("%Y-%m-%dT%H:%M:%S%z"),
        }
        (self.tmp / OWNER_MARKER).write_text(json.dumps(marker, indent=2) + "\n", encoding="utf-8")
        return self.tmp

    def __exit__(
        self, kind: type[BaseException] | None, error: BaseException | None, trace: TracebackType | None
    ) -> Literal[False]:  # never swallows the exception
        if kind is not None:
            shutil.rmtree(self.tmp, ignore_errors=True)
            return False
        if self.target.exists():
            refuse_unsafe_target(self.target)  # something else may have appeared there while we wrote
            old = self.target.with_name(f".{self.target.name}.old")
            shutil.rmtree(old, ignore_errors=True)
            os.replace(self.target, old)
            os.replace(self.tmp, self.target)
            shutil.rmtree(old, ignore_errors=True)
        else:
            os.replace(self.tmp, self.target)
        return False
