"""Labels of the LP's variable families: which technology, year, day, hour, supply, demand or commodity each axis of a
block stands for. The one place that knows which list of technologies each block runs over.

``block_labels(ctx)`` gives, for every variable block, one list of labels per axis (``dims``), so that
``model.capacity["solar_pv", 2040]`` in an extension and the ``(technology, year)`` columns of a table name the same
column of the LP. The ``delivery`` block's ``pair`` axis becomes two axes, ``demand`` and ``commodity``.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from . import names
from .context import BuildContext
from .linear_program import VariableBlock

__all__ = ["BlockLabels", "block_labels", "TECHNOLOGY_LISTS"]

# block name -> the BuildContext list of technologies its "technology" axis runs over
TECHNOLOGY_LISTS: dict[str, str] = {
    names.NEW: "capacity_techs",
    names.CAPACITY: "capacity_techs",
    names.ENERGY_NEW: "storage",
    names.ENERGY_CAPACITY: "storage",
    names.GENERATION: "dispatched_generators",
    names.CHARGE: "storage",
    names.DISCHARGE: "storage",
    names.STATE_OF_CHARGE: "storage",
    names.FUEL_USE: "fuel_generators",
    names.CONVERTER_POWER: "electric_converters",
    names.CONVERTER_INPUT: "fuel_converters",
    names.ONLINE_CAPACITY: "online_generators",
    names.RESERVE: "reserve_generators",
    names.STORAGE_RESERVE: "reserve_storage",
}


@dataclass(frozen=True)
class BlockLabels:
    """One variable block with its axes named and labelled; ``column(key)`` is the LP column of one entry.

    The ``delivery`` block's ``pair`` axis is shown as two axes, ``demand`` and ``commodity``; ``pairs`` lists the
    (demand, commodity) pairs in the block's order."""

    block: VariableBlock
    dims: tuple[str, ...]
    labels: tuple[tuple, ...]  # one tuple of labels per axis of ``dims``
    pairs: tuple[tuple[str, str], ...] = ()
    pair_axis: int | None = None  # axis of the block that ``dims`` shows as (demand, commodity)

    def positions(self) -> list[dict]:
        """Per axis of ``dims``: label -> position."""
        return [{label: i for i, label in enumerate(axis)} for axis in self.labels]

    def column(self, key: tuple, positions: list[dict] | None = None) -> int:
        """The LP column of the entry with labels ``key`` (one label per axis of ``dims``)."""
        if self.pair_axis is not None:
            a = self.pair_axis
            pair = self.pairs.index((key[a], key[a + 1]))
            rest = key[:a] + key[a + 2 :]
            axes = [lab for i, lab in enumerate(self.labels) if i not in (a, a + 1)]
            where = [axes[i].index(label) for i, label in enumerate(rest)]
            where.insert(a, pair)
        else:
            positions = positions or self.positions()
            where = [positions[axis][label] for axis, label in enumerate(key)]
        return int(self.block.offset + np.ravel_multi_index(tuple(where), self.block.shape))


def _axis_labels(ctx: BuildContext, name: str, dim: str) -> tuple:
    inputs = ctx.inputs
    if name == names.STORAGE_FIRM and dim == "technology":
        return tuple(ctx.storage_firm)
    if dim == "tranche":  # "<generator>.<tranche number>"
        return tuple(f"{generator}.{i}" for generator, i in ctx.credit_tranches)
    if dim == "technology":
        return tuple(t.name for t in getattr(ctx, TECHNOLOGY_LISTS[name]))
    if dim == "year":
        return tuple(int(y) for y in inputs.years)
    if dim == "day":
        return tuple(inputs.day_names)
    if dim == "hour":
        return tuple(range(ctx.H))
    if dim == "supply":
        return tuple(s.name for s in inputs.supplies)
    if dim == "demand":
        return tuple(d.name for d in inputs.fuel_demands)
    if dim == "budget":
        return ("carbon_budget",)
    raise KeyError(f"no labels for axis {dim!r} of block {name!r}")


def block_labels(ctx: BuildContext) -> dict[str, BlockLabels]:
    """Labels of every variable block of the built LP, by block name."""
    out: dict[str, BlockLabels] = {}
    fuels = list(ctx.inputs.fuels)
    for name, block in ctx.lp.variables.items():
        if "pair" not in block.dims:
            out[name] = BlockLabels(block, block.dims, tuple(_axis_labels(ctx, name, d) for d in block.dims))
            continue
        a = block.dims.index("pair")
        pairs = tuple((ctx.inputs.fuel_demands[d].name, fuels[c]) for d, c in ctx.delivery_pairs)
        demands = tuple(dict.fromkeys(p[0] for p in pairs))
        commodities = tuple(dict.fromkeys(p[1] for p in pairs))
        rest = [_axis_labels(ctx, name, d) for d in block.dims if d != "pair"]
        labels = (*rest[:a], demands, commodities, *rest[a:])
        dims = (*block.dims[:a], "demand", "commodity", *block.dims[a + 1 :])
        out[name] = BlockLabels(block, dims, tuple(labels), pairs=pairs, pair_axis=a)
    return out
