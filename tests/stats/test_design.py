"""Plan design: smallest n, then smallest c, meeting both risks exactly."""

from __future__ import annotations

import math
from fractions import Fraction

import pytest
from hypothesis import given, settings, strategies as st

import exact
from inspector.stats import plans
from inspector.stats.design import design_plan, zero_acceptance_sample_size


def test_process_model_plan_for_aql_1_5_rql_10():
    # reference-values.md §2: AQL 1.5 % (alpha .05), LTPD 10 % (beta .10), process
    # model -> n = 52, c = 2 with Pa 0.9567 and 0.0966 (computed by binomial search;
    # not a published value).
    d = design_plan(lot_size=10**6, aql="1.5", rql="10", model="process")
    assert (d.sample_size, d.acceptance_number) == (52, 2)
    assert round(d.pa_at_aql, 4) == 0.9567 and round(d.pa_at_rql, 4) == 0.0966


def test_skedbooks_plan_is_reproduced_by_the_process_model():
    # skedbooks.com "Single Sampling Plan": N = 4000, n = 300, c = 4 has AQL about
    # 0.7 % and LTPD about 2.6 % (binomial exact 0.659 % / 2.647 %). Designing for
    # AQL 0.65 % / RQL 2.65 % with the process model gives that very plan; the
    # exact lot model needs a few units fewer for the same lot (computed).
    proc = design_plan(lot_size=4000, aql="0.65", rql="2.65", model="process")
    assert (proc.sample_size, proc.acceptance_number) == (300, 4)
    lot = design_plan(lot_size=4000, aql="0.65", rql="2.65")
    assert lot.acceptance_number == 4 and lot.sample_size < 300


@pytest.mark.parametrize(
    "N, rql, n",
    [(50, "2", 45), (60, "1.6", 54)],
)
def test_ties_at_the_consumer_risk_are_decided_exactly(N, rql, n):
    # One nonconforming unit at the RQL: Pa(n) = (N - n)/N, which equals 0.10
    # exactly at n = 0.9 N. "Pa <= beta" is inclusive, so that n is the answer
    # (exact arithmetic: (50-45)/50 = 1/10, (60-54)/60 = 1/10).
    d = design_plan(lot_size=N, aql="0", rql=rql)
    assert (d.sample_size, d.acceptance_number) == (n, 0)
    assert exact.cdf(0, N, 1, n) == Fraction(1, 10)


@settings(max_examples=25)
@given(
    N=st.integers(2, 45),
    aql=st.sampled_from(["0", "1", "2.5", "4", "6.5"]),
    gap=st.sampled_from(["3", "5", "10", "20", "35"]),
    alpha=st.sampled_from(["0.05", "0.1", "0.2"]),
    beta=st.sampled_from(["0.05", "0.1", "0.2"]),
)
def test_lot_design_is_the_smallest_plan_found_by_exhaustive_search(N, aql, gap, alpha, beta):
    rql = Fraction(aql) + Fraction(gap)
    d = design_plan(lot_size=N, aql=aql, rql=rql, producer_risk=alpha, consumer_risk=beta)
    D1 = math.floor(N * Fraction(aql) / 100)
    D2 = math.ceil(N * rql / 100)
    best = exact.design_lot(N, D1, D2, Fraction(alpha), Fraction(beta))
    if best is None:
        assert d.full_inspection and d.sample_size == N
    else:
        assert not d.full_inspection
        assert (d.sample_size, d.acceptance_number) == best


@pytest.mark.parametrize(
    "N, aql, rql",
    [(500, "1", "8"), (2000, "1.5", "10"), (10**5, "0.65", "4"), (10**6, "1", "5"), (10**9, "0.4", "2.5")],
)
def test_designed_plan_meets_both_risks_and_one_less_unit_does_not(N, aql, rql):
    d = design_plan(lot_size=N, aql=aql, rql=rql)
    n, c = d.sample_size, d.acceptance_number
    D1, D2 = d.defectives_at_aql, d.defectives_at_rql
    assert plans.pa_lot(N, n, c, D1) >= 0.95 and plans.pa_lot(N, n, c, D2) <= 0.10
    # no plan with n - 1 units meets both: every c fails one of the risks
    for cc in range(0, n - 1):
        assert not (plans.pa_lot(N, n - 1, cc, D1) >= 0.95 and plans.pa_lot(N, n - 1, cc, D2) <= 0.10)


def test_percentages_are_taken_exactly_as_typed():
    # N * AQL / 100 with AQL = 0.29 and N = 1000 is exactly 2.9 -> D1 = 2, while
    # N * RQL = 1000 * 0.07 / 100 in binary floating point is 0.7000000000000001.
    d = design_plan(lot_size=1000, aql="0.29", rql="0.7")
    assert d.defectives_at_aql == 2
    assert d.defectives_at_rql == 7
    assert design_plan(lot_size=100, aql="0", rql="7").defectives_at_rql == 7  # not 8


def test_no_plan_smaller_than_the_lot_means_full_inspection():
    d = design_plan(lot_size=10, aql="10", rql="20")
    assert d.full_inspection and d.sample_size == 10
    assert d.acceptance_number == 1  # accept exactly the lots with at most D1 = 1


def test_process_model_may_ask_for_more_units_than_the_lot_holds():
    d = design_plan(lot_size=20, aql="1", rql="3", model="process")
    assert d.sample_size > 20 and d.full_inspection


@pytest.mark.parametrize(
    "kwargs, word",
    [
        (dict(lot_size=100, aql="5", rql="2"), "aql"),
        (dict(lot_size=100, aql="1", rql="2", producer_risk="1"), "producer_risk"),
        (dict(lot_size=100, aql="1", rql="2", consumer_risk="0"), "consumer_risk"),
        (dict(lot_size=0, aql="1", rql="2"), "lot_size"),
        (dict(lot_size=100, aql="1", rql="2", model="poisson"), "model"),
    ],
)
def test_bad_design_arguments_name_the_argument(kwargs, word):
    with pytest.raises(ValueError, match=word):
        design_plan(**kwargs)


# --- zero acceptance ------------------------------------------------------------


def test_success_run_sample_sizes_for_an_unbounded_lot():
    # n = ceil(ln(1 - C) / ln(1 - p)): 59 units support "under 5 % with 95 %
    # confidence" (common practice); 299 support "under 1 %" (formula gives
    # 298.07; crlstatistics.net "Failure-Free Testing" prints 298, a rounding-down
    # error noted in reference-values.md).
    assert zero_acceptance_sample_size(lot_size=10**9, rql=5, confidence="0.95", model="process") == 59
    assert zero_acceptance_sample_size(lot_size=10**9, rql=1, confidence="0.95", model="process") == 299


def test_failure_free_testing_reliability_example():
    # crlstatistics.net "Failure-Free Testing": 30 tested, 0 failures, 90 %
    # confidence -> reliability at least 92.6 % (0.1 ** (1/30)); so n = 30 is the
    # smallest zero-failure sample for p = 7.4 % at 90 %.
    assert round(0.1 ** (1 / 30), 3) == 0.926
    assert zero_acceptance_sample_size(lot_size=10**9, rql="7.4", confidence="0.9", model="process") == 30


@pytest.mark.parametrize("N, n", [(100, 45), (1000, 57), (10_000, 59), (10**6, 59)])
def test_finite_lot_zero_acceptance_sizes(N, n):
    # reference-values.md §4, exact lot model (computed): 95 %, D = ceil(N x 5 %)
    assert zero_acceptance_sample_size(lot_size=N, rql=5, confidence="0.95") == n
    D = math.ceil(N * 5 / 100)
    if N <= 1000:  # confirm by exact arithmetic
        assert exact.cdf(0, N, D, n) <= Fraction(5, 100) < exact.cdf(0, N, D, n - 1)
