"""What every constraint family needs: the inputs, the linear program being filled, and the index lists."""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..scenario.inputs import ModelInputs, TechnologyInputs
from ..scenario.schema import ELECTRICITY
from .linear_program import LinearProgram, VariableBlock
from .names import CAPACITY

__all__ = ["BuildContext", "read_only"]


@dataclass
class BuildContext:
    """Shared state of one build. The families fill ``blocks`` (variable blocks by name, see
    :mod:`pathcast.model.names`) and the index lists below; read-back functions use the same fields."""

    inputs: ModelInputs
    lp: LinearProgram = field(default_factory=LinearProgram)
    blocks: dict[str, VariableBlock] = field(default_factory=dict)
    # rows that extensions added (pathcast.model.extension), in LP order
    extension_rows: list = field(default_factory=list)
    # set by fuels: (fuel demand position, fuel position) of every column of the delivery block, in block order
    delivery_pairs: list[tuple[int, int]] = field(default_factory=list)
    # set by policy: the years with a yearly emission cap, in the order of the emission_cap rows
    cap_years: list[int] = field(default_factory=list)
    # set by adequacy: storage credited by duration (names, in storage_firm block order) and the credit tranches
    # ((generator name, tranche number) in credit_tranche block order)
    storage_firm: list[str] = field(default_factory=list)
    credit_tranches: list[tuple[str, int]] = field(default_factory=list)

    def __post_init__(self) -> None:
        techs = self.inputs.technologies
        self.capacity_techs: list[TechnologyInputs] = list(techs)
        self.generators = [t for t in techs if t.kind == "generator"]
        self.storage = [t for t in techs if t.kind == "storage"]
        self.converters = [t for t in techs if t.kind == "converter"]
        self.electric_converters = [t for t in self.converters if t.input == ELECTRICITY]
        self.fuel_converters = [t for t in self.converters if t.input != ELECTRICITY]
        self.fuel_generators = [t for t in self.generators if t.fuel is not None]
        # Generators that burn no fuel, cost nothing per MWh and count as clean: their output only enters the
        # electricity balance (and the clean share), so availability x capacity less one curtailment per hour shared
        # by all of them has the same optimum as one output variable and limit row per generator. A generator with
        # operating limits (minimum stable output, ramp rate, reserve) is never pooled: it needs its own output.
        pooled = bool(self.inputs.solver.get("pooled_curtailment", True))
        is_pooled = [
            pooled and t.fuel is None and t.variable_om == 0.0 and t.clean and not t.operating_limits
            for t in self.generators
        ]
        self.pooled_generators = [t for t, p in zip(self.generators, is_pooled, strict=True) if p]
        self.dispatched_generators = [t for t, p in zip(self.generators, is_pooled, strict=True) if not p]
        # operating flexibility (model.flexibility): generators with an online capacity per hour, and the reserve
        # holders when the scenario asks for an operating reserve
        self.online_generators = [t for t in self.dispatched_generators if t.operating_limits]
        reserve = self.inputs.operating_reserve is not None
        self.reserve_generators = [t for t in self.online_generators if reserve and t.provides_reserve]
        self.reserve_storage = [t for t in self.storage if reserve and t.provides_reserve]
        self.position = {t.name: i for i, t in enumerate(self.capacity_techs)}
        self.Y = len(self.inputs.years)
        self.D = len(self.inputs.day_names)
        self.H = self.inputs.hours
        df = self.inputs.discount_factor
        w = self.inputs.day_weights
        # each representative hour stands for w_d hours of the year: energy [GWh] = power [GW] x w_d
        self.hour_weight = np.broadcast_to(w[None, :, None], (self.Y, self.D, self.H))
        self.hour_cost_weight = df[:, None, None] * w[None, :, None]  # [Y, D, H] discounted hours
        self.discount = df

    def capacity_columns(self, techs: list[TechnologyInputs]) -> np.ndarray:
        """Columns of capacity in service [len(techs), Y] for the given technologies."""
        capacity = self.blocks[CAPACITY]
        rows = np.array([self.position[t.name] for t in techs], dtype=int)
        return capacity.all()[rows] if len(rows) else np.zeros((0, self.Y), dtype=int)

    def column_values(self, name: str, x: np.ndarray) -> np.ndarray:
        """Primal values of variable block ``name``, shaped like the block (a copy), from the primal values ``x``
        (LP column order); the unit is the block's."""
        return x[self.blocks[name].all()]

    def row_values(self, name: str, values: np.ndarray) -> np.ndarray:
        """The entries of row block ``name``, shaped like the block, from a vector in LP row order (``row_dual``);
        a row dual is in million currency of the price year (discounted) per unit of the row."""
        block = self.lp.row_blocks[name]
        start = self.lp.row_offsets()[name]
        return values[start : start + block.size].reshape(block.shape)


def read_only(values: np.ndarray) -> np.ndarray:
    """A read-only view of ``values`` (which stays as it was), for the arrays of each family's frozen read-back
    values."""
    view = np.asarray(values).view()
    view.flags.writeable = False
    return view
