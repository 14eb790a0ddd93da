"""The lot's nonconforming count: exact interval and bounds."""

from __future__ import annotations

from fractions import Fraction

import pytest
from hypothesis import given, settings, strategies as st

import exact
from inspector.stats.estimate import estimate_defectives, evidence


@pytest.mark.parametrize(
    "N, n, x, lower, upper",
    [
        # reference-values.md §3, exact arithmetic (computed)
        (100, 50, 0, 0, 5),
        (100, 50, 1, 1, 8),
        (100, 50, 5, 5, 18),
        (10_000, 200, 0, 0, 180),
        (10_000, 200, 1, 2, 273),
        (10_000, 200, 5, 83, 570),
        (1_000_000, 50, 5, 33_277, 218_132),  # 50-digit check in the reference file
    ],
)
def test_reference_intervals(N, n, x, lower, upper):
    e = estimate_defectives(lot_size=N, sample_size=n, found=x, confidence="0.95")
    assert (e.lower_defectives, e.upper_defectives) == (lower, upper)


@pytest.mark.parametrize("N, n", [(12, 4), (25, 10), (40, 7), (60, 30)])
def test_bounds_match_a_scan_of_every_d_in_exact_arithmetic(N, n):
    for x in range(0, n + 1):
        for conf in ("0.9", "0.95"):
            e = estimate_defectives(lot_size=N, sample_size=n, found=x, confidence=conf)
            lo, up, ub = exact.bounds(N, n, x, Fraction(conf))
            assert (e.lower_defectives, e.upper_defectives, e.upper_bound_defectives) == (lo, up, ub)


@pytest.mark.parametrize("N, n", [(15, 5), (30, 8), (40, 20)])
def test_coverage_is_at_least_nominal_for_every_lot(N, n):
    # For each true D, the chance that the interval [L, U] covers D is at least C.
    conf = Fraction(9, 10)
    intervals = {}
    for x in range(n + 1):
        e = estimate_defectives(lot_size=N, sample_size=n, found=x, confidence=conf)
        intervals[x] = (e.lower_defectives, e.upper_defectives, e.upper_bound_defectives)
    for D in range(N + 1):
        cover = sum(exact.pmf(x, N, D, n) for x in range(n + 1) if intervals[x][0] <= D <= intervals[x][1])
        cover_one = sum(exact.pmf(x, N, D, n) for x in range(n + 1) if D <= intervals[x][2])
        assert cover >= conf and cover_one >= conf


@settings(max_examples=80)
@given(N=st.integers(1, 10**9), data=st.data())
def test_interval_contains_the_point_estimate_and_stays_in_range(N, data):
    n = data.draw(st.integers(1, min(N, 5000)))
    x = data.draw(st.integers(0, n))
    e = estimate_defectives(lot_size=N, sample_size=n, found=x)
    assert x <= e.lower_defectives <= e.point_defectives <= e.upper_defectives <= N - (n - x) or (
        e.lower_defectives == 0 and x == 0
    )
    assert e.lower_defectives <= e.point_defectives <= e.upper_defectives
    assert e.upper_bound_defectives <= e.upper_defectives
    assert 0 <= e.lower_fraction <= e.upper_fraction <= 1


def test_whole_lot_inspected_gives_the_exact_count():
    e = estimate_defectives(lot_size=40, sample_size=40, found=3)
    assert e.lower_defectives == e.upper_defectives == e.upper_bound_defectives == 3


def test_evidence_against_the_quality_levels():
    ev = evidence(lot_size=1500, sample_size=80, found=3, aql=1, rql=8)
    assert (ev.defectives_at_aql, ev.defectives_at_rql) == (15, 120)
    # P(X >= 3 | D1 = 15) and P(X <= 3 | D2 = 120), exact arithmetic
    assert abs(ev.p_value_at_aql - float(1 - exact.cdf(2, 1500, 15, 80))) < 1e-13
    assert abs(ev.p_value_at_rql - float(exact.cdf(3, 1500, 120, 80))) < 1e-13
    assert "AQL" in ev.reading


@pytest.mark.parametrize(
    "kwargs, word",
    [
        (dict(lot_size=10, sample_size=11, found=0), "sample_size"),
        (dict(lot_size=10, sample_size=5, found=6), "found"),
        (dict(lot_size=10, sample_size=5, found=1, confidence="1"), "confidence"),
    ],
)
def test_bad_estimate_arguments_name_the_argument(kwargs, word):
    with pytest.raises(ValueError, match=word):
        estimate_defectives(**kwargs)


def test_bounds_at_a_billion_units_are_exact_where_scipy_drifts():
    # At N = 10^9 scipy's cdf drifts by ~1e-7 and moves the bound by a few units;
    # the exact check here uses mpmath at 50 digits (a second implementation).
    import mpmath as mp

    mp.mp.dps = 50
    N, n, x = 10**9, 50, 5

    def cdf(D):
        return sum(mp.binomial(D, k) * mp.binomial(N - D, n - k) for k in range(x + 1)) / mp.binomial(N, n)

    e = estimate_defectives(lot_size=N, sample_size=n, found=x, confidence="0.95")
    a = mp.mpf("0.025")
    assert cdf(e.upper_defectives) > a >= cdf(e.upper_defectives + 1)
    sf = lambda D: 1 - sum(mp.binomial(D, k) * mp.binomial(N - D, n - k) for k in range(x)) / mp.binomial(N, n)
    assert sf(e.lower_defectives) > a >= sf(e.lower_defectives - 1)
    assert cdf(e.upper_bound_defectives) > 2 * a >= cdf(e.upper_bound_defectives + 1)


@pytest.mark.parametrize("found", [0, 1, 3, 9])
def test_evidence_reading_writes_chances_as_plain_percentages(found):
    ev = evidence(lot_size=1000, sample_size=50, found=found, aql=0, rql=5)
    assert "e+" not in ev.reading and "e-" not in ev.reading
    assert "%" in ev.reading
