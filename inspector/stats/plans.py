"""Operating characteristics of single and double sampling plans.

Two models:

* ``lot`` (type A): the exact finite-lot model. A lot of N units holds D
  nonconforming; samples are drawn without replacement (hypergeometric).
* ``process`` (type B): units come from a process with fraction
  nonconforming p (binomial); the lot size enters only through the share of
  the lot left uninspected, (N - n) / N.

Rectifying inspection (rejected lots are screened 100 % and every
nonconforming unit found is replaced) gives the average outgoing quality
AOQ and the average total inspection ATI.

Exact finite-lot AOQ
--------------------
With X the count found in the sample,
``AOQ(D) = sum_{x <= c} P(X = x) (D - x) / N``. Since
``(D - x) C(D, x) = D C(D - 1, x)`` and ``C(N, n) = N / (N - n) C(N - 1, n)``,
the sum is

    AOQ(D) = (D / N) ((N - n) / N) P(X' <= c),   X' ~ H(N - 1, D - 1, n),

a positive product with no cancellation, evaluated by the same kernel. (The
textbook approximation is Pa p (N - n) / N.)
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from fractions import Fraction
from statistics import NormalDist

import numpy as np

from inspector.stats import _search
from inspector.stats import hypergeom as hg

__all__ = [
    "SinglePlan",
    "DoublePlan",
    "OCCurve",
    "pa_lot",
    "pa_process",
    "oc_single",
    "oc_double",
    "aoql_lot",
    "aoql_process",
    "aoql_double",
    "rql_lot",
    "rql_process",
    "aql_lot",
    "aql_process",
    "check_single",
    "check_double",
]


@dataclass(frozen=True, kw_only=True)
class SinglePlan:
    """Inspect ``sample_size`` units; accept with at most ``acceptance_number``
    nonconforming, reject from ``acceptance_number + 1``."""

    sample_size: int
    acceptance_number: int

    @property
    def rejection_number(self) -> int:
        return self.acceptance_number + 1


@dataclass(frozen=True, kw_only=True)
class DoublePlan:
    """Double sampling plan (n1, c1, r1; n2, c2).

    First sample n1: accept if X1 <= c1, reject if X1 >= r1, otherwise draw
    n2 more from the units left and accept if X1 + X2 <= c2.
    """

    n1: int
    c1: int
    r1: int
    n2: int
    c2: int


@dataclass(frozen=True, kw_only=True)
class OCCurve:
    """OC curve points; arrays of equal length, one entry per value of D."""

    defectives: np.ndarray
    fraction: np.ndarray
    pa: np.ndarray
    aoq: np.ndarray
    ati: np.ndarray
    asn: np.ndarray | None = None


# --------------------------------------------------------------------------
# argument checks (errors name the argument and the value received)


def _whole(name: str, value, minimum: int = 0) -> int:
    if isinstance(value, bool) or not isinstance(value, (int, np.integer)):
        raise TypeError(f"{name} must be a whole number, got {value!r}")
    if value < minimum:
        raise ValueError(f"{name} must be at least {minimum}, got {value}")
    return int(value)


def check_single(N: int, n: int, c: int) -> tuple[int, int, int]:
    """Validate a single plan on a lot of N units; return the ints."""
    N = _whole("N (lot size)", N, 1)
    n = _whole("n (sample size)", n, 1)
    c = _whole("c (acceptance number)", c, 0)
    if n > N:
        raise ValueError(f"n (sample size) {n} exceeds N (lot size) {N}")
    if c >= n:
        raise ValueError(f"c (acceptance number) {c} must be below n (sample size) {n}")
    return N, n, c


def check_double(N: int, plan: DoublePlan) -> DoublePlan:
    """Validate a double plan on a lot of N units."""
    N = _whole("N (lot size)", N, 1)
    n1 = _whole("n1 (first sample size)", plan.n1, 1)
    n2 = _whole("n2 (second sample size)", plan.n2, 1)
    c1 = _whole("c1 (first acceptance number)", plan.c1, 0)
    r1 = _whole("r1 (first rejection number)", plan.r1, 1)
    c2 = _whole("c2 (second acceptance number)", plan.c2, 0)
    if n1 + n2 > N:
        raise ValueError(f"n1 + n2 = {n1 + n2} exceeds N (lot size) {N}")
    if not c1 < r1:
        raise ValueError(f"r1 (first rejection number) {r1} must exceed c1 {c1}")
    if not r1 <= c2 + 1:
        raise ValueError(f"r1 (first rejection number) {r1} must be at most c2 + 1 = {c2 + 1}")
    if not c1 <= c2:
        raise ValueError(f"c2 (second acceptance number) {c2} must be at least c1 {c1}")
    if c1 >= n1:
        raise ValueError(f"c1 {c1} must be below n1 {n1}")
    return plan


def _defectives(N: int, D) -> np.ndarray:
    d = np.asarray(D)
    if d.dtype.kind not in "iuf" or np.any(d != np.floor(d)) or np.any((d < 0) | (d > N)):
        raise ValueError(f"D (nonconforming in the lot) must be whole numbers in 0..{N}, got {D!r}")
    return d.astype(float)


# --------------------------------------------------------------------------
# probability of acceptance


def pa_lot(N: int, n: int, c: int, D):
    """Pa(D) = P(X <= c | N, D, n), exact finite-lot model; vectorised over D."""
    N, n, c = check_single(N, n, c)
    if np.ndim(D) == 0 and isinstance(D, (int, np.integer)) and 0 <= D <= N:
        return hg.tails_scalar(c, N, int(D), n)[0]
    return hg._scalar_or_array(hg._tails_v(float(c), float(N), _defectives(N, D), float(n))[0])


def pa_process(n: int, c: int, p):
    """Pa(p) = P(Y <= c), Y ~ Binomial(n, p); vectorised over p."""
    n = _whole("n (sample size)", n, 1)
    c = _whole("c (acceptance number)", c, 0)
    ps = np.asarray(p, dtype=float)
    if np.any((ps < 0) | (ps > 1)) or np.any(np.isnan(ps)):
        raise ValueError(f"p (fraction nonconforming) must lie in [0, 1], got {p!r}")
    return hg.binom_cdf(c, n, p)


def oc_single(N: int, n: int, c: int, D) -> OCCurve:
    """Pa, exact AOQ and ATI of the single plan (n, c) at each D (lot model)."""
    N, n, c = check_single(N, n, c)
    d = np.atleast_1d(_defectives(N, D))
    k = d.shape[0]
    # Pa at (N, D) and the AOQ's cdf at (N - 1, D - 1) go through the kernel
    # in one stacked call: numpy's cost is per call, not per element.
    if n < N:
        pos = d > 0
        lots = np.concatenate((np.full(k, float(N)), np.full(k, float(N - 1))))
        defs = np.concatenate((d, np.where(pos, d - 1.0, 0.0)))
        low, up = hg._tails_v(float(c), lots, defs, float(n))
        pa, rej = low[:k], up[:k]
        aoq = np.where(pos, (d / N) * ((N - n) / N) * low[k:], 0.0)
    else:
        pa, rej = hg._tails_v(float(c), float(N), d, float(n))
        aoq = np.zeros(k)
    ati = n + rej * (N - n)
    return OCCurve(defectives=d.astype(np.int64), fraction=d / N, pa=pa, aoq=aoq, ati=ati)


def _aoq_single(N: int, n: int, c: int, d: np.ndarray) -> np.ndarray:
    # AOQ(D) = (D/N)((N-n)/N) P(X' <= c), X' ~ H(N-1, D-1, n): see module doc.
    out = np.zeros(d.shape)
    if n >= N:
        return out
    pos = d > 0
    if pos.any():
        dd = d[pos]
        low, _ = hg._tails_v(np.full(dd.shape, float(c)), float(N - 1), dd - 1.0, float(n))
        out[pos] = (dd / N) * ((N - n) / N) * low
    return out


def aoq_lot_scalar(N: int, n: int, c: int, D: int) -> float:
    """Exact finite-lot AOQ of the single plan at one D (no argument checks)."""
    if D <= 0 or n >= N:
        return 0.0
    return (D / N) * ((N - n) / N) * hg.tails_scalar(c, N - 1, D - 1, n)[0]


def aoql_lot(N: int, n: int, c: int) -> tuple[float, int]:
    """(AOQL, D where it occurs) for the single plan, exact finite-lot model.

    AOQ(D) = D g(D) with g a hypergeometric cdf that is log-concave in D, so
    AOQ is unimodal and its peak is the first D where AOQ(D + 1) <= AOQ(D);
    that crossing is found by a galloping bisection from the Poisson-model
    peak. (The tests check the result against a scan of every D.)
    """
    N, n, c = check_single(N, n, c)
    if n >= N:
        return 0.0, 0
    cache: dict[int, float] = {}

    def aoq(D: int) -> float:
        if D not in cache:
            cache[D] = aoq_lot_scalar(N, n, c, D)
        return cache[D]

    def falling(D: int):
        here, after = aoq(D), aoq(D + 1)
        score = math.log(after / here) if here > 0 and after > 0 else -math.inf
        return after <= here, score

    guess = int(poisson_peak(c) * N / n)
    peak = _search.smallest_true(falling, 1, N - 1, guess)
    best = max(range(max(1, peak - 1), min(N, peak + 1) + 1), key=aoq)
    return aoq(best), best


def poisson_peak(c: int) -> float:
    """lambda maximising lambda P(Y <= c; lambda) for Poisson Y, by Newton.

    The maximum solves F(c; lambda) = lambda f(c; lambda) (F the cdf, f the
    mass at c): lambda = 1 for c = 0, 1.618 for c = 1, growing about like c.
    """
    lam = c + 1.0 - 0.6 * math.sqrt(c + 1.0) if c else 1.0
    for _ in range(20):
        term = math.exp(-lam)
        F = term
        for k in range(1, c + 1):
            term *= lam / k
            F += term
        f = term  # P(Y = c)
        g = F - lam * f  # derivative of lambda F; its own derivative below
        dg = -2.0 * f + lam * f * (1.0 - c / lam) if lam > 0 else -1.0
        if dg == 0:
            break
        step = g / dg
        lam = max(lam - step, 1e-6)
        if abs(step) < 1e-10 * lam:
            break
    return lam


def aoql_process(N: int, n: int, c: int) -> tuple[float, float]:
    """(AOQL, p where it occurs), process model: max of p Pa(p) (N - n)/N.

    p Pa(p) is unimodal on [0, 1]; golden-section search to 1e-12 in p.
    """
    n = _whole("n (sample size)", n, 1)
    c = _whole("c (acceptance number)", c, 0)
    factor = max(N - n, 0) / N
    if factor == 0 or c >= n:
        return (factor * 1.0 if c >= n else 0.0), (1.0 if c >= n else 0.0)

    def g(p: float) -> float:
        return p * hg.binom_tails_scalar(c, n, p)[0]

    a, b = 0.0, min(1.0, (c + 1 + 12 * math.sqrt(c + 1) + 10) / n)
    invphi = (math.sqrt(5) - 1) / 2
    x1, x2 = b - invphi * (b - a), a + invphi * (b - a)
    f1, f2 = g(x1), g(x2)
    # The peak is flat: an error e in p changes the value by O(e^2), so
    # locating p to 1e-8 relative gives the AOQL to ~1e-15.
    while b - a > 1e-8 * b:
        if f1 < f2:
            a, x1, f1 = x1, x2, f2
            x2 = a + invphi * (b - a)
            f2 = g(x2)
        else:
            b, x2, f2 = x2, x1, f1
            x1 = b - invphi * (b - a)
            f1 = g(x1)
    p = (a + b) / 2
    return factor * g(p), p


def oc_double(N: int, plan: DoublePlan, D) -> OCCurve:
    """Exact Pa, ASN, AOQ and ATI of a double plan at each D (lot model).

    Pa = P(X1 <= c1) + sum_{x1 = c1+1}^{r1-1} P(X1 = x1) P(X2 <= c2 - x1),
    X2 ~ H(N - n1, D - x1, n2), the second sample drawn from the units left.
    ASN = n1 + n2 P(c1 < X1 < r1). Under rectifying inspection the
    uninspected units are N - n1 after a first-sample acceptance and
    N - n1 - n2 after a second-sample one; ATI counts N for a rejected lot.
    """
    check_double(N, plan)
    n1, c1, r1, n2, c2 = plan.n1, plan.c1, plan.r1, plan.n2, plan.c2
    d = np.atleast_1d(_defectives(N, D))
    shape = d.shape
    pa1, _ = hg._tails_v(np.full(shape, float(c1)), float(N), d, float(n1))
    aoq = _aoq_single(N, n1, c1, d) if n1 < N else np.zeros(shape)
    pa2 = np.zeros(shape)
    p_second = np.zeros(shape)
    N2 = N - n1
    for x1 in range(c1 + 1, r1):
        w = np.exp(hg._logpmf_core(np.full(shape, float(x1)), float(N), d, float(n1)))
        p_second += w
        ok = d >= x1
        if not ok.any():
            continue
        rest = np.where(ok, d - x1, 0.0)
        low, _ = hg._tails_v(np.full(shape, float(c2 - x1)), float(N2), rest, float(n2))
        pa2 += np.where(ok, w * low, 0.0)
        # outgoing nonconforming after a second-sample acceptance:
        # E[(D - x1 - X2) 1{X2 <= k}] = rest ((N2 - n2)/N2) P(X2' <= k), as above
        if N2 > n2:
            pos = ok & (rest > 0)
            low2, _ = hg._tails_v(
                np.full(shape, float(c2 - x1)), float(N2 - 1), np.where(pos, rest - 1, 0.0), float(n2)
            )
            aoq += np.where(pos, w * rest * ((N2 - n2) / N2) * low2 / N, 0.0)
    pa = pa1 + pa2
    asn = n1 + n2 * p_second
    ati = n1 * pa1 + (n1 + n2) * pa2 + N * (1.0 - pa)
    return OCCurve(
        defectives=d.astype(np.int64), fraction=d / N, pa=pa, aoq=aoq, ati=ati, asn=asn
    )


def aoql_double(N: int, plan: DoublePlan) -> tuple[float, int]:
    """(AOQL, D where it occurs) for a double plan, exact finite-lot model.

    AOQ is evaluated on a grid of 129 values of D, then on a finer grid
    between the best point's neighbours, until the grid step is one unit.
    """
    check_double(N, plan)
    top = rql_lot(N, plan.n1, plan.c2, Fraction(1, 10**6)) or N
    a, b = 0, min(N, max(top, plan.c2 + 2))
    while True:
        grid = np.unique(np.linspace(a, b, 129).round().astype(np.int64))
        aoq = oc_double(N, plan, grid).aoq
        k = int(np.argmax(aoq))
        if len(grid) == b - a + 1:  # every D in [a, b] evaluated
            return float(aoq[k]), int(grid[k])
        a, b = int(grid[max(k - 1, 0)]), int(grid[min(k + 1, len(grid) - 1)])


# --------------------------------------------------------------------------
# the plan's own quality levels


def rql_lot(N: int, n: int, c: int, beta) -> int | None:
    """Smallest D with Pa(D) <= beta (the plan's RQL in units), or None.

    None when no such D exists (c >= n accepts every lot). ``beta`` may be
    a Fraction for exact tie-breaking.
    """
    N, n, c = check_single(N, n, c)
    beta = Fraction(beta)

    beta_f = float(beta)

    def le(D: int):
        value = hg.tails_scalar(c, N, D, n)[0]
        ok = _search.compare(value, beta, lambda: _search.exact_lot_cdf(c, N, D, n)) <= 0
        return ok, (math.log(value / beta_f) if value > 0 else -math.inf)

    if not le(N)[0]:
        return None
    guess = _guess_fraction(n, c, float(beta), upper=True) * N
    return _search.smallest_true(le, c + 1, N, int(guess))


def aql_lot(N: int, n: int, c: int, pa) -> int:
    """Largest D with Pa(D) >= pa (e.g. 0.95): the plan's AQL in units."""
    N, n, c = check_single(N, n, c)
    pa = Fraction(pa)

    pa_f = float(pa)

    def ge(D: int):
        value = hg.tails_scalar(c, N, D, n)[0]
        ok = _search.compare(value, pa, lambda: _search.exact_lot_cdf(c, N, D, n)) >= 0
        return ok, (math.log(value / pa_f) if value > 0 else -math.inf)

    guess = _guess_fraction(n, c, float(pa), upper=True) * N
    return _search.largest_true(ge, min(c, N), N, int(guess))


def rql_process(n: int, c: int, beta) -> float | None:
    """The p with Pa(p) = beta under the binomial model (None if c >= n)."""
    n = _whole("n (sample size)", n, 1)
    c = _whole("c (acceptance number)", c, 0)
    return _solve_binom_p(n, c, float(beta))


def aql_process(n: int, c: int, pa) -> float | None:
    """The p with Pa(p) = pa (e.g. 0.95) under the binomial model."""
    n = _whole("n (sample size)", n, 1)
    c = _whole("c (acceptance number)", c, 0)
    return _solve_binom_p(n, c, float(pa))


def _solve_binom_p(n: int, c: int, target: float) -> float | None:
    if c >= n:
        return None
    # Pa(p) falls from 1 to 0 on [0, 1]: bisection on p in log-odds space
    # would be overkill; plain bisection to 1e-15 takes ~50 cheap steps.
    a, b = 0.0, 1.0
    for _ in range(200):
        mid = 0.5 * (a + b)
        if mid in (a, b):
            break
        if hg.binom_tails_scalar(c, n, mid)[0] > target:
            a = mid
        else:
            b = mid
        if b - a < 1e-15 * b:
            break
    return 0.5 * (a + b)


def poisson_mean_for(c: int, pa: float) -> float:
    """Rough lambda with Poisson P(Y <= c; lambda) = pa, a search's start.

    P(Y <= c) = P(Gamma(c + 1) > lambda), so lambda is the gamma quantile at
    1 - pa, here by the Wilson-Hilferty approximation.
    """
    k = c + 1
    z = NormalDist().inv_cdf(min(max(1.0 - pa, 1e-12), 1 - 1e-12))
    return max(k * (1.0 - 1.0 / (9.0 * k) + z * math.sqrt(1.0 / (9.0 * k))) ** 3, 1e-3)


def _guess_fraction(n: int, c: int, pa: float, upper: bool = True) -> float:
    """Rough p with Pa(p) = pa for the plan (n, c), a search's start."""
    return min(1.0, poisson_mean_for(c, pa) / n)
