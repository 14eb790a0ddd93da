"""Single and double plans: OC curve, AOQ, ATI, AOQL."""

from __future__ import annotations

import math
from fractions import Fraction

import numpy as np
import pytest
from hypothesis import given, strategies as st
from scipy import stats as sps

import exact
from inspector.stats import plans


# --- published worked examples -------------------------------------------------


def test_oc_glossary_example_lot_2000_n50_c2_at_8_percent():
    # micquality.com OC-curve glossary: N = 2000, n = 50, c = 2, 8 % nonconforming
    # -> Pa "about 23 %" (binomial 0.22597). Exact lot model D = 160: 0.22235
    # (reference-values.md, computed); checked here against scipy.
    pa = plans.pa_lot(2000, 50, 2, 160)
    assert round(pa, 2) in (0.22, 0.23)
    assert math.isclose(pa, sps.hypergeom.cdf(2, 2000, 160, 50), rel_tol=1e-12)
    assert math.isclose(plans.pa_process(50, 2, 0.08), 0.22597, abs_tol=5e-6)


def test_single_sampling_plan_n300_c4_on_lot_4000():
    # skedbooks.com "Single Sampling Plan": N = 4000, n = 300, c = 4 has AQL about
    # 0.7 % (alpha .05) and LTPD about 2.6 % (beta .10). Lot-model values
    # Pa(D=28) = 0.9459 and Pa(D=104) = 0.0995 are computed (reference-values.md).
    pa = plans.pa_lot(4000, 300, 4, np.array([28, 104]))
    assert abs(pa[0] - 0.9459) < 5e-5 and abs(pa[1] - 0.0995) < 5e-5
    assert abs(plans.aql_process(300, 4, 0.95) - 0.00659) < 5e-6  # binomial exact 0.659 %
    assert abs(plans.rql_process(300, 4, 0.10) - 0.02647) < 5e-6  # binomial exact 2.647 %
    assert round(100 * plans.aql_process(300, 4, 0.95), 1) == 0.7
    assert round(100 * plans.rql_process(300, 4, 0.10), 1) == 2.6


def test_hypergeometric_lesson_example_at_least_one_found():
    # math.growingswe.com hypergeometric lesson: lot 100 with 5 nonconforming,
    # sample 10 -> P(at least one found) = 41.6 % (exact 0.416248)
    p = 1 - plans.pa_lot(100, 10, 0, 5)
    assert round(100 * p, 1) == 41.6
    assert math.isclose(p, float(1 - exact.cdf(0, 100, 5, 10)), rel_tol=1e-12)


def test_double_plan_nist_asn_example_in_a_large_lot():
    # NIST/SEMATECH e-Handbook 6.2.4: n1 = 50, c1 = 2, n2 = 100, c2 = 6, p = .06:
    # P(accept on first) = .416, P(reject on first) = .029 (from memory; they agree
    # with the binomial computed here by scipy). A lot of 10^8 units is
    # effectively a process, so the lot model must agree to about 1e-4.
    N = 10**8
    D = 6 * 10**6
    plan = plans.DoublePlan(n1=50, c1=2, r1=7, n2=100, c2=6)
    curve = plans.oc_double(N, plan, [D])
    p_acc1 = sps.binom.cdf(2, 50, 0.06)
    p_rej1 = sps.binom.sf(6, 50, 0.06)
    assert abs(p_acc1 - 0.416) < 5e-4 and abs(p_rej1 - 0.029) < 5e-4
    assert math.isclose(curve.asn[0], 50 + 100 * (1 - p_acc1 - p_rej1), rel_tol=1e-4)
    assert math.isclose(curve.pa[0], plans.pa_lot(N, 50, 2, D) + float(curve.pa[0] - plans.pa_lot(N, 50, 2, D)))


# --- exact arithmetic ------------------------------------------------------------


@pytest.mark.parametrize("N, n, c", [(20, 5, 0), (37, 12, 2), (50, 45, 0), (60, 20, 3), (100, 30, 1)])
def test_oc_aoq_ati_match_exact_fractions(N, n, c):
    D = np.arange(0, N + 1)
    curve = plans.oc_single(N, n, c, D)
    for d in range(N + 1):
        pa = exact.cdf(c, N, d, n)
        assert math.isclose(curve.pa[d], float(pa), rel_tol=1e-12, abs_tol=1e-300)
        aoq = exact.aoq(N, n, c, d)
        assert math.isclose(curve.aoq[d], float(aoq), rel_tol=1e-12, abs_tol=1e-300)
        ati = n + (1 - pa) * (N - n)
        assert math.isclose(curve.ati[d], float(ati), rel_tol=1e-12)


@pytest.mark.parametrize("N, n, c", [(20, 5, 0), (37, 12, 2), (60, 20, 3), (100, 30, 1), (250, 13, 0), (400, 80, 5)])
def test_aoql_is_the_maximum_over_every_lot(N, n, c):
    aoq = [exact.aoq(N, n, c, d) for d in range(N + 1)]
    best = max(aoq)
    value, at = plans.aoql_lot(N, n, c)
    assert math.isclose(value, float(best), rel_tol=1e-12)
    assert aoq[at] == best


def test_aoql_in_a_large_lot_approaches_the_process_value():
    # For N -> infinity the exact AOQ tends to p Pa(p) (textbook approximation)
    v_lot, _ = plans.aoql_lot(10**9, 50, 2)
    v_proc, _ = plans.aoql_process(10**9, 50, 2)
    assert math.isclose(v_lot, v_proc, rel_tol=1e-6)


def test_aoql_matches_a_scan_at_large_lot():
    N, n, c = 10**6, 125, 3
    value, at = plans.aoql_lot(N, n, c)
    around = np.arange(at - 500, at + 501)
    scan = plans.oc_single(N, n, c, around).aoq
    assert value >= scan.max() * (1 - 1e-13)


@pytest.mark.parametrize("plan", [(10, 1, 3, 10, 3), (8, 0, 2, 12, 2), (15, 1, 4, 15, 4)])
def test_double_plan_pa_matches_exact_fractions(plan):
    N = 45
    n1, c1, r1, n2, c2 = plan
    p = plans.DoublePlan(n1=n1, c1=c1, r1=r1, n2=n2, c2=c2)
    curve = plans.oc_double(N, p, np.arange(N + 1))
    for d in range(N + 1):
        pa = exact.double_pa(N, n1, c1, r1, n2, c2, d)
        assert math.isclose(curve.pa[d], float(pa), rel_tol=1e-12, abs_tol=1e-300)
        p_second = sum(exact.pmf(x, N, d, n1) for x in range(c1 + 1, r1))
        assert math.isclose(curve.asn[d], float(n1 + n2 * p_second), rel_tol=1e-12)


def test_double_plan_aoql_is_at_least_every_curve_point():
    N = 2000
    plan = plans.DoublePlan(n1=50, c1=2, r1=5, n2=100, c2=6)
    value, at = plans.aoql_double(N, plan)
    all_aoq = plans.oc_double(N, plan, np.arange(N + 1)).aoq
    assert value == pytest.approx(all_aoq.max(), rel=1e-13)
    assert all_aoq[at] == pytest.approx(value, rel=1e-13)


# --- invariants ------------------------------------------------------------------


@given(N=st.integers(2, 10**9), data=st.data())
def test_oc_is_non_increasing_in_d_and_non_decreasing_in_c(N, data):
    n = data.draw(st.integers(1, min(N, 2000)))
    c = data.draw(st.integers(0, n - 1))
    D = np.unique(np.array(data.draw(st.lists(st.integers(0, N), min_size=2, max_size=30))))
    pa = plans.oc_single(N, n, c, D).pa
    assert np.all((pa >= 0) & (pa <= 1))
    assert np.all(np.diff(pa) <= 1e-15)
    if c + 1 < n:
        assert np.all(plans.oc_single(N, n, c + 1, D).pa >= pa - 1e-15)


@given(N=st.integers(5, 10**7), data=st.data())
def test_double_plan_is_bounded_by_its_single_plans(N, data):
    n1 = data.draw(st.integers(1, max(1, N // 3)))
    n2 = data.draw(st.integers(1, max(1, N // 3)))
    c1 = data.draw(st.integers(0, min(n1 - 1, 5)))
    c2 = data.draw(st.integers(c1, c1 + 6))
    r1 = data.draw(st.integers(c1 + 1, c2 + 1))
    plan = plans.DoublePlan(n1=n1, c1=c1, r1=r1, n2=n2, c2=c2)
    D = np.unique(np.linspace(0, N, 15).round())
    curve = plans.oc_double(N, plan, D)
    assert np.all((curve.pa >= -1e-15) & (curve.pa <= 1 + 1e-15))
    assert np.all((curve.asn >= n1) & (curve.asn <= n1 + n2 + 1e-9))
    # accepting needs X1 <= c2, and accepting on the first sample is enough
    if c2 < n1:
        assert np.all(curve.pa <= plans.oc_single(N, n1, c2, D).pa + 1e-12)
    assert np.all(curve.pa >= plans.oc_single(N, n1, c1, D).pa - 1e-12)


def test_quality_levels_of_a_plan_bracket_the_risk_points():
    N, n, c = 5000, 80, 2
    d95 = plans.aql_lot(N, n, c, Fraction(95, 100))
    d10 = plans.rql_lot(N, n, c, Fraction(10, 100))
    assert plans.pa_lot(N, n, c, d95) >= 0.95 > plans.pa_lot(N, n, c, d95 + 1)
    assert plans.pa_lot(N, n, c, d10) <= 0.10 < plans.pa_lot(N, n, c, d10 - 1)


def test_bad_plan_arguments_name_the_argument():
    with pytest.raises(ValueError, match="exceeds N"):
        plans.pa_lot(10, 11, 0, 1)
    with pytest.raises(ValueError, match="acceptance number"):
        plans.pa_lot(10, 5, 5, 1)
    with pytest.raises(ValueError, match="nonconforming"):
        plans.oc_single(10, 5, 1, [11])
    with pytest.raises(ValueError, match="r1"):
        plans.check_double(100, plans.DoublePlan(n1=10, c1=2, r1=2, n2=10, c2=3))
