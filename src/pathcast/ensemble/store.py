"""Member results on disk: DIR/members/<sha256 of the member's fully resolved scenario>.json, each written atomically
(temporary file in the same folder, then ``os.replace``) the moment the member finishes, so an interrupted run leaves
only whole files and a re-run skips what is done.

Temporary files and folders are named ``.<name>.tmp-<process id>-<random>`` (:func:`temporary_name`), so that
:func:`remove_leftovers` can delete, at the start of the next write to the same folder, what a killed process left
behind -- and only that: an entry whose process still runs is left alone."""

from __future__ import annotations

import json
import os
import re
import shutil
import tempfile
from pathlib import Path
from typing import Any

import numpy as np

from ..results.folders import process_alive

__all__ = [
    "MemberStore",
    "write_json_atomic",
    "write_atomic",
    "temporary_prefix",
    "is_temporary",
    "remove_leftovers",
]

_TEMPORARY = re.compile(r"^\.(?P<name>.+)\.tmp-(?P<pid>\d+)-[A-Za-z0-9_]+$")


def temporary_prefix(name: str) -> str:
    """The start of a temporary entry's name for ``name`` (``tempfile`` adds the random end)."""
    return f".{name}.tmp-{os.getpid()}-"


def is_temporary(name: str) -> bool:
    """Is ``name`` that of a temporary file or folder of :func:`write_atomic` or the outputs' staging folder?"""
    return _TEMPORARY.match(name) is not None


def remove_leftovers(folder: Path) -> list[Path]:
    """Delete the temporary files and folders in ``folder`` that a process no longer running left behind; return
    what was removed."""
    folder = Path(folder)
    removed: list[Path] = []
    if not folder.is_dir():
        return removed
    for entry in folder.iterdir():
        match = _TEMPORARY.match(entry.name)
        if match is None or process_alive(int(match["pid"])):
            continue
        if entry.is_dir() and not entry.is_symlink():
            shutil.rmtree(entry, ignore_errors=True)
        else:
            entry.unlink(missing_ok=True)
        removed.append(entry)
    return removed


def _default(value: Any) -> Any:
    if isinstance(value, np.ndarray):
        return value.tolist()
    if hasattr(value, "item"):
        return value.item()
    return str(value)


def write_atomic(path: Path, write) -> Path:
    """Call ``write(temporary_path)`` for a temporary file beside ``path``, then ``os.replace`` it into place (atomic
    on POSIX); the temporary file is removed on failure."""
    path = Path(path)
    path.parent.mkdir(parents=True, exist_ok=True)
    handle, tmp = tempfile.mkstemp(prefix=temporary_prefix(path.name), dir=path.parent)
    os.close(handle)
    try:
        write(tmp)
        os.chmod(tmp, 0o644)  # mkstemp makes it private; results are for reading
        os.replace(tmp, path)
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise
    return path


def write_json_atomic(path: Path, data: Any) -> Path:
    """Write JSON to ``path`` through a temporary file in the same folder and ``os.replace`` (atomic on POSIX)."""

    def write(tmp: str) -> None:
        with open(tmp, "w", encoding="utf-8") as out:
            json.dump(data, out, indent=1, default=_default)
            out.flush()
            os.fsync(out.fileno())

    return write_atomic(path, write)


class MemberStore:
    """DIR/members/<hash>.json and DIR/basis/<hash>.npz. Reading never writes; :meth:`remove_leftovers` clears what
    interrupted writes left (called by the runner once it is about to write)."""

    def __init__(self, folder: Path):
        self.folder = Path(folder) / "members"

    def remove_leftovers(self) -> list[Path]:
        return remove_leftovers(self.folder) + remove_leftovers(self.folder.parent / "basis")

    def path(self, digest: str) -> Path:
        return self.folder / f"{digest}.json"

    def get(self, digest: str) -> dict | None:
        path = self.path(digest)
        if not path.is_file():
            return None
        try:
            return json.loads(path.read_text(encoding="utf-8"))
        except (json.JSONDecodeError, OSError):
            return None  # unreadable: treat as not done (it is solved again)

    def done(self, digest: str, *, retry_failed: bool = False) -> bool:
        """True when the member need not be solved again: solved, or failed for a reason that would recur (a
        PathcastError: invalid member, infeasible, solver status) unless ``retry_failed``."""
        record = self.get(digest)
        if record is None:
            return False
        if record.get("status") == "solved":
            return True
        return not retry_failed and bool(record.get("error", {}).get("deterministic"))

    def put(self, record: dict) -> Path:
        return write_json_atomic(self.path(record["hash"]), record)

    def save_basis(self, digest: str, basis: tuple[np.ndarray, np.ndarray]) -> Path:
        target = Path(self.folder).parent / "basis" / f"{digest}.npz"
        target.parent.mkdir(parents=True, exist_ok=True)
        handle, tmp = tempfile.mkstemp(prefix=temporary_prefix(target.name), dir=target.parent)
        try:
            with os.fdopen(handle, "wb") as out:
                np.savez(out, col_status=basis[0], row_status=basis[1])
            os.replace(tmp, target)
        except BaseException:
            Path(tmp).unlink(missing_ok=True)
            raise
        return target

    def load_basis(self, digest: str) -> tuple[np.ndarray, np.ndarray] | None:
        target = Path(self.folder).parent / "basis" / f"{digest}.npz"
        if not target.is_file():
            return None
        try:
            with np.load(target) as data:
                return data["col_status"].astype(np.int8), data["row_status"].astype(np.int8)
        except (OSError, ValueError, KeyError):
            return None
