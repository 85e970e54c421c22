"""The scenario-file reference, generated from the schema so that the README never drifts from the code.

``python -m pathcast.scenario.reference`` prints the Markdown tables that the README's scenario reference holds.
"""

from __future__ import annotations

import typing

from pydantic import BaseModel
from pydantic_core import PydanticUndefined

from . import schema

__all__ = ["scenario_reference"]

SECTIONS: tuple[tuple[str, type[BaseModel]], ...] = (
    ("metadata", schema.Metadata),
    ("time.representative_days[]", schema.RepresentativeDay),
    ("demand.electricity", schema.ElectricityDemand),
    ("demand.fuels.<name>", schema.FuelDemand),
    ("commodities.<name>", schema.Commodity),
    ("technologies.generators.<name>", schema.Generator),
    ("technologies.storage.<name>", schema.Storage),
    ("technologies.converters.<name>", schema.Converter),
    ("technologies.supplies.<name>", schema.Supply),
    ("technologies.*.existing[]", schema.ExistingCapacity),
    ("technologies.*.committed[]", schema.CommittedProject),
    ("technologies.*.max_build_growth", schema.BuildGrowth),
    ("capex paths (capex, energy_capex)", schema.CapexPath),
    ("policy", schema.Policy),
    ("policy.carbon_budget", schema.CarbonBudget),
    ("policy.operating_reserve", schema.OperatingReserve),
    ("solver", schema.SolverSettings),
    ("extensions[]", schema.Extension),
    ("base_year_statistics", schema.BaseYearStatistics),
)


def _type_name(annotation) -> str:
    origin = typing.get_origin(annotation)
    if origin is typing.Annotated:
        return _type_name(typing.get_args(annotation)[0])
    if origin in (typing.Union, __import__("types").UnionType):
        return " or ".join(_type_name(a) for a in typing.get_args(annotation) if a is not type(None))
    if origin is dict:
        return "{year: value}" if typing.get_args(annotation)[0] is int else "mapping"
    if origin is list:
        return "list"
    if origin is typing.Literal:
        return " / ".join(repr(a) for a in typing.get_args(annotation))
    if isinstance(annotation, type):
        if annotation is schema.CapexPath:
            return "number or capex path"
        if issubclass(annotation, BaseModel):
            return "section"
        return {"float": "number", "int": "integer", "str": "text", "bool": "true/false"}.get(
            annotation.__name__, annotation.__name__
        )
    return str(annotation)


def _default(info) -> str:
    if info.is_required():
        return "required"
    if info.default_factory is not None:
        return "empty"
    value = info.default
    if value is None or value is PydanticUndefined:
        return "none"
    return f"`{value!r}`"


def scenario_reference() -> str:
    lines = []
    for title, model in SECTIONS:
        lines.append(f"**`{title}`**")
        lines.append("")
        lines.append("| field | type | default | meaning [unit] |")
        lines.append("|---|---|---|---|")
        for name, info in model.model_fields.items():
            description = (info.description or "").replace("|", "/")
            lines.append(f"| `{name}` | {_type_name(info.annotation)} | {_default(info)} | {description} |")
        lines.append("")
    return "\n".join(lines)


if __name__ == "__main__":  # pragma: no cover
    print(scenario_reference())
