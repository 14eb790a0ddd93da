"""Integer searches over monotone functions, and exact tie-breaking.

Plan design and the confidence bounds all ask "the smallest (or largest)
integer where a monotone probability crosses a threshold". A float
probability accurate to ~1e-13 decides every comparison except a near tie;
there the comparison is redone in exact rational arithmetic, so a boundary
such as Pa = 0.10 exactly (N = 50, one nonconforming unit at the RQL,
n = 45) is decided the same way every time.
"""

from __future__ import annotations

import math
from fractions import Fraction
from typing import Callable

# A float probability from the kernels is within ~1e-13 relative of the
# exact value, so anything closer than this to the threshold is re-checked.
_TIE_BAND = 1e-9

# Exact checks use big integers of about min(n, N - n) * log2(N) bits; past
# this many bits (a few MB) we trust the float. Ties that close at such sizes
# would need Pa to equal a short decimal to 1e-9, which the discreteness of
# the lot model makes practically impossible; the guard only bounds time.
_EXACT_BIT_BUDGET = 20_000_000


def compare(value: float, threshold: Fraction, exact: Callable[[], Fraction | None]) -> int:
    """Sign of ``value - threshold``, exact when the two are within the tie band.

    ``exact`` returns the exact value as a Fraction (or None when too costly).
    """
    t = float(threshold)
    if abs(value - t) > _TIE_BAND * max(abs(t), 1e-300):
        return 1 if value > t else -1
    ex = exact()
    if ex is None:
        return (value > t) - (value < t)
    return (ex > threshold) - (ex < threshold)


def exact_lot_cdf(x: int, N: int, D: int, n: int) -> Fraction | None:
    """P(X <= x) for the hypergeometric as an exact Fraction, or None if too big."""
    if min(n, N - n) * max(1.0, math.log2(N)) > _EXACT_BIT_BUDGET:
        return None
    lo = max(0, n - (N - D))
    hi = min(x, n, D)
    if hi < lo:
        return Fraction(0)
    total = sum(math.comb(D, k) * math.comb(N - D, n - k) for k in range(lo, hi + 1))
    return Fraction(total, math.comb(N, n))


def exact_lot_sf(x: int, N: int, D: int, n: int) -> Fraction | None:
    """P(X > x) exactly, or None if too big."""
    low = exact_lot_cdf(x, N, D, n)
    return None if low is None else 1 - low


def exact_binom_cdf(x: int, m: int, p: Fraction) -> Fraction | None:
    """P(Y <= x) for Y ~ Binomial(m, p) exactly, or None if too big."""
    if p.denominator.bit_length() * m > _EXACT_BIT_BUDGET // 4:
        return None
    q = 1 - p
    return sum(
        (math.comb(m, k) * p**k * q ** (m - k) for k in range(0, min(x, m) + 1)),
        Fraction(0),
    )


def smallest_true(pred: Callable[[int], bool], lo: int, hi: int, guess: int) -> int:
    """Smallest k in [lo, hi] with ``pred(k)``; ``pred`` is False then True.

    ``pred(hi)`` must be True. Starts at ``guess`` and gallops outward in
    doubling steps until the answer is bracketed, then bisects, so a good
    guess costs only a handful of evaluations even for hi ~ 10^9.
    """
    if lo >= hi:
        return hi
    g = min(max(guess, lo), hi)
    step = max(1, g >> 7)
    if pred(g):
        b = g
        a = g - step
        while a >= lo and pred(a):
            b = a
            step *= 2
            a = b - step
        a = max(a, lo - 1)
    else:
        a = g
        b = g + step
        while b < hi and not pred(b):
            a = b
            step *= 2
            b = a + step
        b = min(b, hi)
    # now pred(a) is False (or a == lo - 1) and pred(b) is True
    while b - a > 1:
        mid = (a + b) // 2
        if pred(mid):
            b = mid
        else:
            a = mid
    return b


def largest_true(pred: Callable[[int], bool], lo: int, hi: int, guess: int) -> int:
    """Largest k in [lo, hi] with ``pred(k)``; ``pred`` is True then False.

    ``pred(lo)`` must be True.
    """
    # the smallest k with "not pred" in [lo + 1, hi + 1], minus one
    return smallest_true(lambda k: k > hi or not pred(k), lo + 1, hi + 1, guess + 1) - 1
