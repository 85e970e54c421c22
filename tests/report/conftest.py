"""Fixtures for the report tests: the tiny system with its carbon budget (tiny_run from tests/conftest.py) and the same
system without a budget (a reference case), each solved once per session and also written as a result folder."""

from __future__ import annotations

import pytest

from tests.conftest import tiny_mapping, write_scenario


@pytest.fixture(scope="session")
def reference_file(tmp_path_factory):
    """tests/data/tiny.yaml without its carbon budget, named tiny_reference."""
    mapping = tiny_mapping()
    mapping["metadata"]["name"] = "tiny_reference"
    mapping["policy"].pop("carbon_budget")
    return write_scenario(tmp_path_factory.mktemp("reference"), mapping, "tiny_reference.yaml")


@pytest.fixture(scope="session")
def reference_run(reference_file):
    from pathcast.pipeline import run_scenario

    return run_scenario(reference_file)


@pytest.fixture(scope="session")
def tiny_folder(tiny_run, tmp_path_factory):
    """The tiny run written by write_result (CSV only), as 'pathcast run' writes it."""
    from pathcast.results.writers import write_result

    return write_result(
        tiny_run.result, tmp_path_factory.mktemp("results") / "tiny", parquet=False, excel=False
    )


@pytest.fixture(scope="session")
def reference_folder(reference_run, tmp_path_factory):
    from pathcast.results.writers import write_result

    return write_result(
        reference_run.result,
        tmp_path_factory.mktemp("results") / "tiny_reference",
        parquet=False,
        excel=False,
    )
