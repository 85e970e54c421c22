"""Wright's law and the other capex paths."""

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from pathcast.scenario.learning import capex_path, learning_exponent, wright_cost
from pathcast.scenario.schema import CapexPath


def test_exponent_for_twenty_percent():
    # b = -log2(1 - 0.2) = 0.3219 (computed; shared/references.md, Wright 1936)
    assert learning_exponent(0.20) == pytest.approx(0.3219, abs=5e-5)


@given(st.floats(0.01, 0.5), st.floats(1.0, 1e5), st.floats(1e-3, 1e4))
def test_one_doubling_cuts_cost_by_exactly_the_learning_rate(rate, base_cost, base_cumulative):
    # Wright (1936): cost falls by the learning rate at each doubling of cumulative production
    cost = wright_cost(
        base_cost,
        np.array([base_cumulative, 2 * base_cumulative, 4 * base_cumulative]),
        base_cumulative,
        rate,
    )
    assert cost[1] == pytest.approx(base_cost * (1 - rate), rel=1e-12)
    assert cost[2] == pytest.approx(base_cost * (1 - rate) ** 2, rel=1e-12)


def test_capex_path_with_learning_follows_the_deployment_path():
    path = CapexPath(base=1000, learning_rate=0.2, cumulative_deployment={2025: 100.0, 2030: 200.0})
    values = capex_path(path, np.arange(2025, 2031))
    assert values[0] == pytest.approx(1000)
    assert values[-1] == pytest.approx(800)  # one doubling between 2025 and 2030


def test_capex_path_decline_table_and_floor():
    years = np.arange(2025, 2028)
    assert capex_path(CapexPath(base=100, annual_decline=0.1), years).tolist() == pytest.approx([100, 90, 81])
    assert capex_path(CapexPath(table={2025: 100, 2027: 80}), years).tolist() == pytest.approx([100, 90, 80])
    assert capex_path(CapexPath(base=100, annual_decline=0.5, floor=30), years).tolist() == pytest.approx(
        [100, 50, 30]
    )
