"""Hypergeometric and binomial probabilities, exact to about 1e-13 relative.

A lot of ``N`` units holds ``D`` nonconforming; a sample of ``n`` is drawn
without replacement and holds ``X`` nonconforming::

    P(X = x) = C(D, x) C(N - D, n - x) / C(N, n)

Argument order everywhere in this package is ``(x, N, D, n)``: count found,
lot size, nonconforming in the lot, sample size. (scipy's
``hypergeom(M, n, N)`` calls the same three M = lot, n = D, N = sample.)

Method
------
The probability mass is written as a ratio of three binomial masses taken at
the same ``p = n / N`` (Loader 2000)::

    P(X = x) = b(x; D, p) b(n - x; N - D, p) / b(n; N, p)

and each binomial mass in the saddle-point form

    log b(x; m, p) = stirlerr(m) - stirlerr(x) - stirlerr(m - x)
                     - bd0(x, m p) - bd0(m - x, m q) - log(2 pi x (m - x) / m) / 2

where ``stirlerr`` is the error of Stirling's formula and ``bd0`` the
deviance term ``x log(x / mp) + mp - x``, evaluated by a series when ``x`` is
near ``mp``. Unlike differences of ``lgamma`` (which lose about 1e-8 at
N = 10^7 because each term is ~10^8 in size) every term stays small, so the
result keeps about 1e-13 relative accuracy for lots up to 10^9 units.

Tails are summed from the short side (the lower tail when x + 1/2 lies at
or below the mean, else the upper tail; the half keeps a lot with a tiny
mean, where P(X <= 0) is nearly 1, on the upper side) with the ratio recurrence
``P(x - 1) / P(x) = x (N - D - n + x) / ((D - x + 1)(n - x + 1))``, so the
cdf and the sf are each accurate where they are small. C(N, n) is never
formed. Results too small for a double (below about 1e-308) are returned as
0 without a warning.

Reference: C. Loader (2000), "Fast and Accurate Computation of Binomial
Probabilities". The tail summation follows the usual short-side scheme
(e.g. R's ``phyper``).

Two implementations of the same formulas live here: scalar functions on
Python floats (``*_scalar``), which plan design and the bound searches call
hundreds of times with one argument each (numpy's per-call overhead would
dominate there), and numpy-vectorised functions for OC curves. The tests
check that both agree with each other and with exact arithmetic.
"""

from __future__ import annotations

import math

import numpy as np

__all__ = [
    "logpmf",
    "pmf",
    "cdf",
    "sf",
    "logpmf_scalar",
    "pmf_scalar",
    "tails_scalar",
    "binom_logpmf_scalar",
    "binom_tails_scalar",
    "binom_cdf",
    "tails",
]

_LN_2PI = 1.8378770664093454835606594728112
_EPS = 2.220446049250313e-16

# stirlerr(n) = log(n!) - log(sqrt(2 pi n) (n/e)^n) for n = 0..15, computed
# with mpmath at 40 digits (stirlerr(0) is never used; set to 0).
_SFERR = (
    0.0,
    0.08106146679532725822,
    0.041340695955409294094,
    0.027677925684998339149,
    0.020790672103765093112,
    0.016644691189821192163,
    0.013876128823070747999,
    0.011896709945891770095,
    0.010411265261972096497,
    0.0092554621827127329177,
    0.0083305634333628712565,
    0.007573675487951840795,
    0.0069428401072095298657,
    0.0064089941880042070684,
    0.0059513701127588477356,
    0.005554733551962801371,
)
_SFERR_ARRAY = np.array(_SFERR)
# Coefficients of the asymptotic series of stirlerr: 1/12, 1/360, 1/1260,
# 1/1680, 1/1188. Past n = 15 five terms leave an error below 2e-16, and the
# cut points 35/80/500 drop terms once they fall below 1e-17.
_S0 = 1.0 / 12.0
_S1 = 1.0 / 360.0
_S2 = 1.0 / 1260.0
_S3 = 1.0 / 1680.0
_S4 = 1.0 / 1188.0


# --------------------------------------------------------------------------
# scalar kernel


def _stirlerr(n: float) -> float:
    if n <= 15:
        return _SFERR[int(n)]
    nn = n * n
    if n > 500:
        return (_S0 - _S1 / nn) / n
    if n > 80:
        return (_S0 - (_S1 - _S2 / nn) / nn) / n
    if n > 35:
        return (_S0 - (_S1 - (_S2 - _S3 / nn) / nn) / nn) / n
    return (_S0 - (_S1 - (_S2 - (_S3 - _S4 / nn) / nn) / nn) / nn) / n


def _bd0(x: float, m: float) -> float:
    """x log(x / m) + m - x without cancellation when x is near m."""
    d = x - m
    if abs(d) < 0.1 * (x + m):
        v = d / (x + m)
        s = d * v
        ej = 2.0 * x * v
        v2 = v * v
        j = 1
        while True:
            ej *= v2
            s1 = s + ej / (2 * j + 1)
            if s1 == s:
                return s1
            s = s1
            j += 1
    return x * math.log(x / m) + m - x


def binom_logpmf_scalar(x: float, m: float, p: float, q: float) -> float:
    """log of C(m, x) p^x q^(m - x); ``q`` is passed separately as 1 - p."""
    if p == 0.0:
        return 0.0 if x == 0 else -math.inf
    if q == 0.0:
        return 0.0 if x == m else -math.inf
    if x < 0 or x > m:
        return -math.inf
    if x == 0:
        if m == 0:
            return 0.0
        return -_bd0(m, m * q) - m * p if p < 0.1 else m * math.log(q)
    if x == m:
        return -_bd0(m, m * p) - m * q if q < 0.1 else m * math.log(p)
    lc = (
        _stirlerr(m)
        - _stirlerr(x)
        - _stirlerr(m - x)
        - _bd0(x, m * p)
        - _bd0(m - x, m * q)
    )
    lf = _LN_2PI + math.log(x) + math.log1p(-x / m)
    return lc - 0.5 * lf


def logpmf_scalar(x: int, N: int, D: int, n: int) -> float:
    """log P(X = x) for one set of integer arguments (-inf outside the support)."""
    if x < 0 or x > n or x > D or n - x > N - D:
        return -math.inf
    if n == 0:
        return 0.0
    p = n / N
    q = (N - n) / N
    return (
        binom_logpmf_scalar(x, D, p, q)
        + binom_logpmf_scalar(n - x, N - D, p, q)
        - binom_logpmf_scalar(n, N, p, q)
    )


def pmf_scalar(x: int, N: int, D: int, n: int) -> float:
    """P(X = x) for one set of integer arguments."""
    return math.exp(logpmf_scalar(x, N, D, n))


def tails_scalar(x: int, N: int, D: int, n: int) -> tuple[float, float]:
    """``(P(X <= x), P(X > x))`` for one set of integer arguments.

    The tail on the short side of the mean is summed term by term from its
    inner end (where terms are largest); the other is one minus it. Each is
    therefore accurate to about 1e-13 relative where it is the small one.
    """
    lo = max(0, n - (N - D))
    hi = min(n, D)
    if x < lo:
        return 0.0, 1.0
    if x >= hi:
        return 1.0, 0.0
    if (2 * x + 1) * N <= 2 * n * D:  # x + 1/2 at or below the mean: lower tail
        log_anchor = logpmf_scalar(x, N, D, n)
        total = 1.0
        term = 1.0
        k = x
        b = N - D - n
        while k > lo:
            term *= k * (b + k) / ((n + 1 - k) * (D + 1 - k))
            total += term
            if term < _EPS * total:
                break
            k -= 1
        low = math.exp(log_anchor + math.log(total))
        return low, 1.0 - low
    # above the mean: sum the upper tail upward from x + 1
    k = x + 1
    log_anchor = logpmf_scalar(k, N, D, n)
    total = 1.0
    term = 1.0
    b = N - D - n
    while k < hi:
        term *= (D - k) * (n - k) / ((k + 1) * (b + k + 1))
        total += term
        if term < _EPS * total:
            break
        k += 1
    up = math.exp(log_anchor + math.log(total))
    return 1.0 - up, up


def binom_tails_scalar(x: int, m: int, p: float) -> tuple[float, float]:
    """``(P(Y <= x), P(Y > x))`` for Y ~ Binomial(m, p), short side summed."""
    if x < 0:
        return 0.0, 1.0
    if x >= m or p == 0.0:
        return 1.0, 0.0
    if p >= 1.0:
        return 0.0, 1.0
    q = 1.0 - p
    if x + 0.5 <= m * p:
        log_anchor = binom_logpmf_scalar(x, m, p, q)
        total = term = 1.0
        k = x
        r = q / p
        while k > 0:
            term *= k * r / (m - k + 1)
            total += term
            if term < _EPS * total:
                break
            k -= 1
        low = math.exp(log_anchor + math.log(total))
        return low, 1.0 - low
    k = x + 1
    log_anchor = binom_logpmf_scalar(k, m, p, q)
    total = term = 1.0
    r = p / q
    while k < m:
        term *= (m - k) * r / (k + 1)
        total += term
        if term < _EPS * total:
            break
        k += 1
    up = math.exp(log_anchor + math.log(total))
    return 1.0 - up, up


# --------------------------------------------------------------------------
# vectorised kernel (same formulas on arrays)
#
# numpy's cost here is per call, not per element, so the kernel is written
# to issue few calls: all stirlerr arguments of a mass go through one call,
# all bd0 arguments through another, and edge cases are picked with where.


def _stirlerr_v(n: np.ndarray) -> np.ndarray:
    small = n <= 15
    ns = np.where(small, 16.0, n)
    nn = ns * ns
    # The five-term series is exact to 2e-16 for every n > 15; extra terms at
    # large n are below rounding, so one formula serves all n > 15.
    series = (_S0 - (_S1 - (_S2 - (_S3 - _S4 / nn) / nn) / nn) / nn) / ns
    table = _SFERR_ARRAY[np.clip(n, 0.0, 15.0).astype(np.int64)]
    return np.where(small, table, series)


# Horner coefficients 1/3, 1/5, ..., 1/19 of the bd0 series (|v| < 0.1, so
# nine terms reach 1e-18 relative).
_BD0_COEF = tuple(1.0 / (2 * j + 1) for j in range(9, 0, -1))


def _bd0_v(x: np.ndarray, m: np.ndarray) -> np.ndarray:
    d = x - m
    total = x + m
    v = d / np.where(total > 0, total, 1.0)
    v2 = v * v
    h = _BD0_COEF[0]
    for coef in _BD0_COEF[1:]:
        h = coef + v2 * h
    series = d * v + 2.0 * x * v * v2 * h
    with np.errstate(divide="ignore", invalid="ignore"):
        direct = x * np.log(x / m) + m - x
    return np.where(np.abs(d) < 0.1 * total, series, direct)


def _binom_logpmf_v(x, m, p, q) -> np.ndarray:
    """Vectorised ``binom_logpmf_scalar``; equal-shape float arrays."""
    y = m - x
    xs = np.maximum(x, 1.0)
    ys = np.maximum(y, 1.0)
    k = x.shape[0]
    st = _stirlerr_v(np.concatenate((m, xs, ys)))
    mp, mq = m * p, m * q
    bd = _bd0_v(np.concatenate((xs, ys, m, m)), np.concatenate((mp, mq, mq, mp)))
    lc = st[:k] - st[k : 2 * k] - st[2 * k :] - bd[:k] - bd[k : 2 * k]
    lf = _LN_2PI + np.log(xs) + np.log(ys / m)
    out = lc - 0.5 * lf
    # Edge cases are rare on a curve; each where is paid only when present.
    at0 = x == 0
    if at0.any():
        out = np.where(at0, np.where(p < 0.1, -bd[2 * k : 3 * k] - mp, m * np.log(q)), out)
    atm = (y == 0) & ~at0
    if atm.any():
        out = np.where(atm, np.where(q < 0.1, -bd[3 * k :] - mq, m * np.log(p)), out)
    zero_m = m == 0
    if zero_m.any():
        out = np.where(zero_m, 0.0, out)
    # degenerate p = 0 or q = 0: all mass at x = 0 or x = m
    degenerate = (p == 0) | (q == 0)
    if degenerate.any():
        out = np.where(p == 0, np.where(x == 0, 0.0, -np.inf), out)
        out = np.where(q == 0, np.where(y == 0, 0.0, -np.inf), out)
    outside = (x < 0) | (y < 0)
    if outside.any():
        out = np.where(outside, -np.inf, out)
    return out


def _check_args(x, N, D, n):
    arrays = np.broadcast_arrays(*(np.asarray(a) for a in (x, N, D, n)))
    for name, a in zip(("x", "N", "D", "n"), arrays):
        if a.dtype.kind not in "iuf":
            raise TypeError(f"{name} must be numeric, got dtype {a.dtype}")
    x, N, D, n = (np.asarray(a, dtype=float) for a in arrays)
    if np.any(N < 1):
        raise ValueError(f"N (lot size) must be at least 1, got {N.min():g}")
    if np.any((D < 0) | (D > N)):
        raise ValueError("D (nonconforming in the lot) must lie in 0..N")
    if np.any((n < 0) | (n > N)):
        raise ValueError("n (sample size) must lie in 0..N")
    for name, a in (("N", N), ("D", D), ("n", n)):
        if np.any(a != np.floor(a)):
            raise ValueError(f"{name} must be a whole number")
    return np.floor(x), N, D, n


def _logpmf_core(x, N, D, n):
    """log P(X = x) on broadcastable float arrays (no argument checks)."""
    x, N, D, n = np.broadcast_arrays(x, N, D, n)
    shape = x.shape
    x, N, D, n = (np.ravel(a).astype(float) for a in (x, N, D, n))
    with np.errstate(divide="ignore", invalid="ignore", over="ignore", under="ignore"):
        p = n / N
        q = (N - n) / N
        logs = _binom_logpmf_v(
            np.concatenate((x, n - x, n)),
            np.concatenate((D, N - D, N)),
            np.concatenate((p, p, p)),
            np.concatenate((q, q, q)),
        )
        k = x.shape[0]
        out = logs[:k] + logs[k : 2 * k] - logs[2 * k :]
    inside = (x >= 0) & (x <= n) & (x <= D) & (n - x <= N - D)
    out = np.where(inside, np.where(n == 0, 0.0, out), -np.inf)
    return out.reshape(shape)


def logpmf(x, N, D, n):
    """log P(X = x), vectorised (arguments broadcast); -inf outside the support."""
    x, N, D, n = _check_args(x, N, D, n)
    return _scalar_or_array(_logpmf_core(x, N, D, n))


def pmf(x, N, D, n):
    """P(X = x), vectorised (arguments broadcast)."""
    x, N, D, n = _check_args(x, N, D, n)
    return _scalar_or_array(np.exp(_logpmf_core(x, N, D, n)))


def _tails_v(x, N, D, n):
    """(P(X <= x), P(X > x)) on broadcast float arrays."""
    x, N, D, n = np.broadcast_arrays(x, N, D, n)
    shape = x.shape
    x, N, D, n = (np.ravel(a).astype(float) for a in (x, N, D, n))
    lo = np.maximum(0.0, n - (N - D))
    hi = np.minimum(n, D)
    below = x < lo
    above = x >= hi
    # short side: at or below the mean sum the lower tail from x downward,
    # above it the upper tail from x + 1 upward
    lower = (x + 0.5) * N <= n * D
    anchor = np.where(lower, x, x + 1.0)
    stop = np.where(lower, lo, hi)
    log_anchor = _logpmf_core(np.where(below | above, lo, anchor), N, D, n)
    total = _series(anchor, stop, lower, N - D - n, n, D)
    with np.errstate(divide="ignore", under="ignore"):
        short = np.exp(log_anchor + np.log(total))
    low = np.where(lower, short, 1.0 - short)
    low = np.where(below, 0.0, np.where(above, 1.0, low))
    up = np.where(lower, 1.0 - short, short)
    up = np.where(below, 1.0, np.where(above, 0.0, up))
    return low.reshape(shape), up.reshape(shape)


_CHUNK = 32


def _series(start, stop, down, b, n, D):
    """Sum of P(k) / P(start) for k walking from ``start`` toward ``stop``.

    Downward the ratio is P(k-1)/P(k) = k (b + k) / ((n+1-k)(D+1-k));
    upward it is P(k+1)/P(k) = (D - k)(n - k) / ((k + 1)(b + k + 1)), with
    b = N - D - n. Elements walking down and up are handled apart, each with
    its own ratio (no per-element selection between the two formulas).
    """
    total = np.ones(start.shape)
    for step, mask in ((-1.0, down), (1.0, ~down)):
        idx = np.nonzero(mask)[0]
        if idx.size:
            total[idx] = _walk(start[idx], stop[idx], step, b[idx], n[idx], D[idx])
    return total


def _walk(k0, stop, step, b, n, D):
    """``_series`` for elements all walking in one direction.

    Terms are formed a chunk of steps at a time by a cumulative product (one
    numpy call per chunk, not per step); an element's walk ends once its
    terms fall below machine epsilon times its running total, or at the end
    of its support (past it the ratio is set to 0).
    """
    total = np.ones(k0.shape)
    term = np.ones(k0.shape)
    k0 = k0.copy()
    active = np.nonzero((k0 - stop) * step < 0)[0]
    while active.size:
        ka0, sa = k0[active], stop[active]
        rows = int(min(_CHUNK, np.max(np.abs(sa - ka0))))
        ka = ka0 + (step * np.arange(rows, dtype=float))[:, None]  # k at which each ratio is taken
        ba, na, Da = b[active], n[active], D[active]
        with np.errstate(divide="ignore", invalid="ignore"):
            if step < 0:
                r = ka * (ba + ka) / ((na + 1.0 - ka) * (Da + 1.0 - ka))
                r[ka <= sa] = 0.0
            else:
                r = (Da - ka) * (na - ka) / ((ka + 1.0) * (ba + ka + 1.0))
                r[ka >= sa] = 0.0
        terms = np.cumprod(r, axis=0)
        terms *= term[active]
        s = total[active] + terms.sum(axis=0)
        total[active] = s
        last = terms[-1]
        term[active] = last
        k_next = ka0 + step * rows
        k0[active] = k_next
        keep = (last >= _EPS * s) & ((k_next - sa) * step < 0)
        active = active[keep]
    return total


def cdf(x, N, D, n):
    """P(X <= x), vectorised (arguments broadcast)."""
    x, N, D, n = _check_args(x, N, D, n)
    return _scalar_or_array(_tails_v(x, N, D, n)[0])


def sf(x, N, D, n):
    """P(X > x), vectorised (arguments broadcast)."""
    x, N, D, n = _check_args(x, N, D, n)
    return _scalar_or_array(_tails_v(x, N, D, n)[1])


def tails(x, N, D, n):
    """``(cdf, sf)`` together, vectorised; each accurate where it is small."""
    x, N, D, n = _check_args(x, N, D, n)
    low, up = _tails_v(x, N, D, n)
    return _scalar_or_array(low), _scalar_or_array(up)


def binom_cdf(x, m, p):
    """P(Y <= x) for Y ~ Binomial(m, p), vectorised over ``p`` (x, m scalar ints)."""
    ps = np.atleast_1d(np.asarray(p, dtype=float))
    out = np.array([binom_tails_scalar(int(x), int(m), float(v))[0] for v in ps.ravel()])
    out = out.reshape(ps.shape)
    return float(out[0]) if np.ndim(p) == 0 else out


def _scalar_or_array(a):
    a = np.asarray(a)
    return float(a) if a.ndim == 0 else a
