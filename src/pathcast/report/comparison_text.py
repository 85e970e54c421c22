"""The comparison table of ``pathcast compare`` as text for the terminal. Apart from :mod:`pathcast.report.console`
because it rounds with the memo's :func:`pathcast.report.memo.format_value`, and the memo imports the console's
caution."""

from __future__ import annotations

from pathlib import Path
from typing import TYPE_CHECKING

from .console import CAUTION

if TYPE_CHECKING:  # the heavy modules are imported where they are used
    import pandas as pd

__all__ = ["render_comparison"]


def render_comparison(table: pd.DataFrame, folder: Path | None = None) -> str:
    """The comparison table of ``pathcast compare`` (rounded; comparison.csv holds exact values), then, when
    ``folder`` is given, the caution and where it was written."""
    from ..results.compare import metric_label
    from .memo import format_value

    labels = [metric_label(str(m)) for m in table.index]
    cells = [
        [format_value(v, str(m)) for v in row]
        for m, row in zip(table.index, table.itertuples(index=False), strict=True)
    ]
    first = max(len(label) for label in labels)
    widths = [max(len(str(c)), *(len(r[i]) for r in cells)) for i, c in enumerate(table.columns)]
    lines = [
        " " * first + "  " + "  ".join(str(c).rjust(w) for c, w in zip(table.columns, widths, strict=True))
    ]
    for label, row in zip(labels, cells, strict=True):
        lines.append(
            label.ljust(first) + "  " + "  ".join(c.rjust(w) for c, w in zip(row, widths, strict=True))
        )
    if folder is not None:
        lines += ["", CAUTION, f"Comparison written to {folder}/"]
    return "\n".join(lines)
