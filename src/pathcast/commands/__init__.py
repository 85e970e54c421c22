"""One module per command: ``add_arguments(parser)`` and ``execute(args) -> int``."""

from __future__ import annotations

import sys
import time
from collections.abc import Callable

__all__ = ["progress_printer"]


def progress_printer(quiet: bool = False) -> Callable[[str], None]:
    """A progress callback that prints ``[elapsed s] message`` to standard error (nothing when ``quiet``)."""
    started = time.perf_counter()

    def progress(message: str) -> None:
        if not quiet:
            print(f"[{time.perf_counter() - started:6.1f} s] {message}", file=sys.stderr, flush=True)

    return progress
