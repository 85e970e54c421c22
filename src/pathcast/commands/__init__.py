"""One module per command: ``add_arguments(parser)`` and ``execute(args) -> int``.

A command parses its arguments, calls one compute function and renders what it returns
(:mod:`pathcast.report.console`, :mod:`pathcast.report.json_output`, files); it imports the heavy modules inside
``execute`` only, so ``pathcast --help`` and ``<command> --help`` stay light. The helpers here are light too."""

from __future__ import annotations

import sys
import time
from collections.abc import Callable
from pathlib import Path

from ..errors import ScenarioError

__all__ = ["progress_printer", "check_output_folder"]


def progress_printer(quiet: bool = False) -> Callable[[str], None]:
    """A progress callback that prints ``[elapsed s] message`` to standard error (nothing when ``quiet``)."""
    started = time.perf_counter()

    def progress(message: str) -> None:
        if not quiet:
            print(f"[{time.perf_counter() - started:6.1f} s] {message}", file=sys.stderr, flush=True)

    return progress


def check_output_folder(folder: Path, marker: str, command: str) -> None:
    """Refuse (ScenarioError) to replace a folder that holds anything but an earlier output of ``command``
    (recognised by ``marker``), or a file in the folder's place."""
    folder = Path(folder)
    if not folder.exists():
        return
    if not folder.is_dir():
        raise ScenarioError(
            f"--out: got {str(folder)!r}, which is a file; expected a folder for the {command} output."
        )
    if any(folder.iterdir()) and not (folder / marker).is_file():
        raise ScenarioError(
            f"--out: got {str(folder)!r}, a folder with other files and no {marker}; expected a new or "
            f"empty folder or one written by 'pathcast {command}', because it is replaced as a whole."
        )
