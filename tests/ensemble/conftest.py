from __future__ import annotations

from pathlib import Path

import pytest

DATA = Path(__file__).resolve().parents[1] / "data"


@pytest.fixture
def data_dir() -> Path:
    return DATA


@pytest.fixture
def write_ensemble(tmp_path):
    """Write an ensemble file (YAML text) into tmp_path whose base is tests/data/tiny.yaml."""

    def write(text: str, name: str = "ensemble.yaml") -> Path:
        path = tmp_path / name
        path.write_text(text.replace("BASE", str(DATA / "tiny.yaml")), encoding="utf-8")
        return path

    return write
