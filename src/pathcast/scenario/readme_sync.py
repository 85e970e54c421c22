"""Keep the README's scenario-field reference equal to the schema: ``python -m pathcast.scenario.readme_sync``
rewrites the block between the markers; the test suite fails when they differ."""

from __future__ import annotations

import sys
from pathlib import Path

from .reference import scenario_reference

START, END = "<!-- scenario-reference:start -->", "<!-- scenario-reference:end -->"

__all__ = ["synced_readme", "START", "END"]


def synced_readme(text: str) -> str:
    head, rest = text.split(START, 1)
    _, tail = rest.split(END, 1)
    return f"{head}{START}\n{scenario_reference()}{END}{tail}"


if __name__ == "__main__":  # pragma: no cover
    path = Path(sys.argv[1] if len(sys.argv) > 1 else "README.md")
    path.write_text(synced_readme(path.read_text()))
