"""The hypergeometric kernel against exact arithmetic, scipy and published values."""

from __future__ import annotations

import math
import warnings
from fractions import Fraction

import mpmath as mp
import numpy as np
import pytest
from hypothesis import given, strategies as st
from scipy import stats as sps

from inspector.stats import hypergeom as hg
from reference.values import HYPERGEOM

RTOL = 1e-12


def close(got: float, expected: str | float, rtol: float = RTOL) -> bool:
    exp = float(mp.mpf(expected)) if isinstance(expected, str) else expected
    if exp == 0.0:
        return got == 0.0
    return abs(got - exp) <= rtol * abs(exp)


# --- exact arithmetic (mpmath, 60 digits; tests/reference/generate.py) -------


@pytest.mark.parametrize("case", HYPERGEOM, ids=lambda c: f"x{c[0]}-N{c[1]}-D{c[2]}-n{c[3]}")
def test_scalar_kernel_matches_exact_arithmetic(case):
    x, N, D, n, pmf, cdf, sf = case
    low, up = hg.tails_scalar(x, N, D, n)
    assert close(hg.pmf_scalar(x, N, D, n), pmf)
    # each tail is accurate where it is small; the other is 1 - it
    assert close(low, cdf) or abs(low - float(mp.mpf(cdf))) < 1e-15
    assert close(up, sf) or abs(up - float(mp.mpf(sf))) < 1e-15
    if float(mp.mpf(cdf)) <= 0.5:
        assert close(low, cdf)
    if float(mp.mpf(sf)) <= 0.5:
        assert close(up, sf)


def test_vector_kernel_matches_exact_arithmetic_in_one_call():
    x, N, D, n = (np.array([c[i] for c in HYPERGEOM], dtype=float) for i in range(4))
    low, up = hg.tails(x, N, D, n)
    pmf = hg.pmf(x, N, D, n)
    for i, (_, _, _, _, epmf, ecdf, esf) in enumerate(HYPERGEOM):
        assert close(pmf[i], epmf), HYPERGEOM[i]
        if float(mp.mpf(ecdf)) <= 0.5:
            assert close(low[i], ecdf), HYPERGEOM[i]
        if float(mp.mpf(esf)) <= 0.5:
            assert close(up[i], esf), HYPERGEOM[i]


def test_exact_small_case():
    # cdf(3; N=10, D=4, n=5) = 1 - C(4,4)C(6,1)/C(10,5) = 1 - 6/252 (exact arithmetic)
    assert close(hg.cdf(3, 10, 4, 5), float(1 - Fraction(6, 252)))
    assert close(hg.tails_scalar(3, 10, 4, 5)[1], float(Fraction(6, 252)))


def test_plain_lgamma_differences_are_not_good_enough_but_the_kernel_is():
    # Why the saddle-point form: at N = 10^7 lgamma differences lose ~1e-8.
    x, N, D, n = 1479, 10_000_000, 7_081_780, 1918
    exact = mp.binomial(D, x) * mp.binomial(N - D, n - x) / mp.binomial(N, n)
    lg = math.exp(
        math.lgamma(D + 1) - math.lgamma(x + 1) - math.lgamma(D - x + 1)
        + math.lgamma(N - D + 1) - math.lgamma(n - x + 1) - math.lgamma(N - D - n + x + 1)
        - math.lgamma(N + 1) + math.lgamma(n + 1) + math.lgamma(N - n + 1)
    )
    assert abs(lg / float(exact) - 1) > 1e-11
    assert close(hg.pmf_scalar(x, N, D, n), float(exact))


# --- scipy's documented conventions and its test-suite values ----------------


def test_scipy_docs_example_pmf():
    # scipy.stats.hypergeom docs: [M, n, N] = [20, 7, 12] (lot 20, 7 nonconforming,
    # sample 12); pmf values are scipy's own, compared at 1e-12.
    k = np.arange(0, 8)
    assert np.allclose(hg.pmf(k, 20, 7, 12), sps.hypergeom.pmf(k, 20, 7, 12), rtol=1e-12, atol=0)
    # the docs' printed table, to its six decimals
    printed = [0.000103, 0.004334, 0.047678, 0.198658, 0.357585, 0.286068, 0.095356, 0.010217]
    assert np.allclose(hg.pmf(k, 20, 7, 12), printed, atol=5e-7)
    assert math.isclose(float(np.sum(k * hg.pmf(k, 20, 7, 12))), 4.2, rel_tol=1e-13)


def test_scipy_high_precision_pmf():
    # scipy test_distributions.py TestHypergeom.test_precision (value from mpmath)
    assert close(hg.pmf(2, 2500, 50, 500), 0.0010114963068932233, rtol=1e-13)


def test_scipy_edge_cases_gh2325():
    # scipy test suite, gh-2325: pmf(0, 2, 1, 0) = 1; pmf(1, 2, 1, 0) = 0; pmf(0, 2, 0, 2) = 1
    assert hg.pmf(0, 2, 1, 0) == 1.0
    assert hg.pmf(1, 2, 1, 0) == 0.0
    assert hg.pmf(0, 2, 0, 2) == 1.0


@pytest.mark.parametrize(
    "sample, expected",
    [
        (30_000, 0.0),
        (38_000, 1.904153e-114),
        (39_000, 2.752693e-66),
        (40_000, 4.931217e-32),
        (41_000, 8.265601e-11),
        (42_000, 0.1237904),
        (50_000, 1.0),
    ],
)
def test_scipy_large_sf_values(sample, expected):
    # scipy test suite test_precision2: sf(20000, 209000, 99000, N), rtol 5e-7 vs R
    got = hg.sf(20000, 209000, 99000, sample)
    if expected == 0.0:
        assert got < 1e-300
    else:
        assert math.isclose(got, expected, rel_tol=5e-7)


def test_scipy_bound_gh2238():
    # scipy test suite gh-2238: 0 <= cdf(30, 13397950, 4363, 12390) <= 1
    assert 0.0 <= hg.cdf(30, 13397950, 4363, 12390) <= 1.0


@given(
    N=st.integers(2, 300),
    data=st.data(),
)
def test_symmetries_from_scipy_test_suite(N, data):
    # scipy test_discrete_distns.py: f(k;N,K,n) = f(n-k;N,N-K,n) = f(K-k;N,K,N-n) = f(k;N,n,K)
    K = data.draw(st.integers(0, N))
    n = data.draw(st.integers(0, N))
    k = data.draw(st.integers(max(0, n - (N - K)), min(n, K)))
    f = hg.pmf_scalar(k, N, K, n)
    for other in (hg.pmf_scalar(n - k, N, N - K, n), hg.pmf_scalar(K - k, N, K, N - n), hg.pmf_scalar(k, N, n, K)):
        assert math.isclose(f, other, rel_tol=1e-12)


# --- invariants ----------------------------------------------------------------


@given(N=st.integers(1, 400), data=st.data())
def test_masses_sum_to_one_and_tails_agree(N, data):
    D = data.draw(st.integers(0, N))
    n = data.draw(st.integers(0, N))
    ks = np.arange(0, n + 1, dtype=float)
    p = hg.pmf(ks, N, D, n)
    assert np.all((p >= 0) & (p <= 1))
    assert math.isclose(float(p.sum()), 1.0, rel_tol=1e-12)
    low, up = hg.tails(ks, N, D, n)
    assert np.allclose(low + up, 1.0, atol=1e-15)
    assert np.allclose(low, np.cumsum(p), rtol=1e-11, atol=1e-15)
    assert np.all(np.diff(low) >= -1e-15)


@given(N=st.integers(1, 10**9), data=st.data())
def test_scalar_and_vector_kernels_agree(N, data):
    D = data.draw(st.integers(0, N))
    n = data.draw(st.integers(0, min(N, 3000)))
    x = data.draw(st.integers(-1, n + 1))
    low_s, up_s = hg.tails_scalar(x, N, D, n)
    low_v, up_v = hg.tails(x, N, D, n)
    for a, b in ((low_s, low_v), (up_s, up_v)):
        assert a == b or math.isclose(a, b, rel_tol=1e-12, abs_tol=1e-300)


def test_underflow_is_zero_without_warnings_and_never_nan():
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        assert hg.cdf(0, 10**9, 5 * 10**8, 10**5) == 0.0
        assert hg.tails_scalar(0, 10**9, 5 * 10**8, 10**5) == (0.0, 1.0)
        v = hg.pmf(np.arange(0, 50), 10**9, 10**8, 10**6)
        assert not np.any(np.isnan(v)) and np.all(v == 0.0)
        assert hg.logpmf(0, 10**9, 5 * 10**8, 10**5) < -10**4


def test_bad_arguments_are_named():
    with pytest.raises(ValueError, match="sample size"):
        hg.pmf(0, 10, 3, 11)
    with pytest.raises(ValueError, match="nonconforming"):
        hg.cdf(0, 10, 11, 3)
    with pytest.raises(ValueError, match="lot size"):
        hg.sf(0, 0, 0, 0)
