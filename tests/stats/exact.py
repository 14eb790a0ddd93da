"""Brute-force exact arithmetic (fractions.Fraction) used as a second
implementation in the stats tests. Slow, obviously right, small lots only."""

from __future__ import annotations

from fractions import Fraction
from math import comb


def pmf(x: int, N: int, D: int, n: int) -> Fraction:
    if x < 0 or x > n or x > D or n - x > N - D:
        return Fraction(0)
    return Fraction(comb(D, x) * comb(N - D, n - x), comb(N, n))


def cdf(x: int, N: int, D: int, n: int) -> Fraction:
    return sum((pmf(k, N, D, n) for k in range(0, x + 1)), Fraction(0))


def aoq(N: int, n: int, c: int, D: int) -> Fraction:
    # the definition: sum_{x <= c} P(X = x) (D - x) / N
    return sum((pmf(x, N, D, n) * (D - x) for x in range(0, c + 1)), Fraction(0)) / N


def double_pa(N: int, n1: int, c1: int, r1: int, n2: int, c2: int, D: int) -> Fraction:
    total = cdf(c1, N, D, n1)
    for x1 in range(c1 + 1, r1):
        total += pmf(x1, N, D, n1) * cdf(c2 - x1, N - n1, D - x1, n2) if D >= x1 else 0
    return total


def binom_cdf(x: int, n: int, p: Fraction) -> Fraction:
    return sum((comb(n, k) * p**k * (1 - p) ** (n - k) for k in range(0, min(x, n) + 1)), Fraction(0))


def design_lot(N: int, D1: int, D2: int, alpha: Fraction, beta: Fraction):
    """Smallest n, then smallest c, by scanning every (n, c); None if n < N fails."""
    for n in range(1, N):
        for c in range(0, n):
            if cdf(c, N, D2, n) <= beta and cdf(c, N, D1, n) >= 1 - alpha:
                return n, c
    return None


def bounds(N: int, n: int, x: int, conf: Fraction):
    """Two-sided interval and one-sided upper bound by scanning every D."""
    a = (1 - conf) / 2
    Ds = range(0, N + 1)
    upper = max(D for D in Ds if cdf(x, N, D, n) > a)
    lower = min(D for D in Ds if 1 - cdf(x - 1, N, D, n) > a) if x > 0 else 0
    upper_bound = max(D for D in Ds if cdf(x, N, D, n) > 1 - conf)
    return lower, upper, upper_bound
