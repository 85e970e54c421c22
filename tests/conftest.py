"""Shared fixtures: scenarios written under tmp_path from small mappings, and one solved tiny run."""

from __future__ import annotations

import copy
from pathlib import Path

import pytest
import yaml

DATA = Path(__file__).parent / "data"


def tiny_mapping() -> dict:
    """The tiny test system (tests/data/tiny.yaml) as a mapping to modify."""
    return copy.deepcopy(yaml.safe_load((DATA / "tiny.yaml").read_text()))


def write_scenario(folder: Path, mapping: dict, name: str = "scenario.yaml") -> Path:
    path = Path(folder) / name
    path.write_text(yaml.safe_dump(mapping, sort_keys=False))
    return path


@pytest.fixture(scope="session")
def tiny_run():
    from pathcast.pipeline import run_scenario

    return run_scenario(DATA / "tiny.yaml")
