"""What every constraint family needs: the inputs, the linear program being filled, and the index lists."""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..scenario.inputs import ModelInputs, TechnologyInputs
from ..scenario.schema import ELECTRICITY
from .linear_program import LinearProgram, VariableBlock

__all__ = ["BuildContext"]


@dataclass
class BuildContext:
    inputs: ModelInputs
    lp: LinearProgram = field(default_factory=LinearProgram)
    blocks: dict[str, VariableBlock] = field(default_factory=dict)

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
        # by all of them has the same optimum as one output variable and limit row per generator.
        pooled = bool(self.inputs.solver.get("pooled_curtailment", True))
        is_pooled = [pooled and t.fuel is None and t.variable_om == 0.0 and t.clean for t in self.generators]
        self.pooled_generators = [t for t, p in zip(self.generators, is_pooled, strict=True) if p]
        self.dispatched_generators = [t for t, p in zip(self.generators, is_pooled, strict=True) if not p]
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
        capacity = self.blocks["capacity"]
        rows = np.array([self.position[t.name] for t in techs], dtype=int)
        return capacity.all()[rows] if len(rows) else np.zeros((0, self.Y), dtype=int)
