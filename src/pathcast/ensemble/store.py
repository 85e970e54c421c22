"""Member results on disk: DIR/members/<sha256 of the member's fully resolved scenario>.json, each written atomically
(temporary file in the same folder, then ``os.replace``) the moment the member finishes, so an interrupted run leaves
only whole files and a re-run skips what is done."""

from __future__ import annotations

import json
import os
import tempfile
from pathlib import Path
from typing import Any

import numpy as np

__all__ = ["MemberStore", "write_json_atomic"]


def _default(value: Any) -> Any:
    if isinstance(value, np.ndarray):
        return value.tolist()
    if hasattr(value, "item"):
        return value.item()
    return str(value)


def write_atomic(path: Path, write, suffix: str = ".tmp") -> Path:
    """Call ``write(temporary_path)`` for a temporary file beside ``path``, then ``os.replace`` it into place (atomic
    on POSIX); the temporary file is removed on failure."""
    path = Path(path)
    path.parent.mkdir(parents=True, exist_ok=True)
    handle, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=suffix, dir=path.parent)
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
    def __init__(self, folder: Path):
        self.folder = Path(folder) / "members"

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
        handle, tmp = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".tmp", dir=target.parent)
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
