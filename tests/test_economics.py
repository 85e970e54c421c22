"""Capital recovery factor against compound-interest factor tables and an independent library."""

import numpy_financial
import pytest

from pathcast.economics import capital_recovery_factor, discount_factors

# (A/P, i, n) capital recovery factors to 5 decimals, as printed in the compound-interest factor tables of
# engineering-economy textbooks (Newnan, Eschenbach & Lavelle, Engineering Economic Analysis, Appendix B;
# Blank & Tarquin, Engineering Economy, factor tables). Values as listed in shared/references.md ("computed" there
# from the published formula; the tables print the same 5-decimal values).
PUBLISHED_AP = [(0.07, 25, 0.08581), (0.10, 30, 0.10608), (0.05, 20, 0.08024)]


@pytest.mark.parametrize(("rate", "years", "factor"), PUBLISHED_AP)
def test_crf_matches_compound_interest_tables(rate, years, factor):
    assert round(capital_recovery_factor(rate, years), 5) == factor


@pytest.mark.parametrize("rate", [0.0001, 0.03, 0.06, 0.08, 0.12])
@pytest.mark.parametrize("years", [1, 10, 25, 40])
def test_crf_matches_numpy_financial_payment(rate, years):
    # independent reference: CRF = -pmt(i, n, 1) (numpy-financial, PyPI)
    assert capital_recovery_factor(rate, years) == pytest.approx(
        -numpy_financial.pmt(rate, years, 1), rel=1e-12
    )


def test_crf_zero_rate_is_straight_line():
    assert capital_recovery_factor(0.0, 20) == pytest.approx(1 / 20)


def test_discount_factors():
    assert discount_factors(0.05, [0, 1, 2]).tolist() == pytest.approx([1.0, 1 / 1.05, 1 / 1.05**2])
