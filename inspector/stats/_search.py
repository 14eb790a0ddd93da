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


def smallest_true(
    probe: Callable[[int], object], lo: int, hi: int, guess: int, step: int | None = None
) -> int:
    """Smallest k in [lo, hi] where ``probe`` says True; it is False then True.

    ``probe(k)`` returns a bool, or ``(bool, score)`` with a float score
    that falls through 0 where the answer flips (for example
    log Pa - log beta); with scores the bracket is narrowed by
    interpolation (regula falsi, Illinois variant) instead of halving.
    The probe at ``hi`` must be True. The search starts at ``guess`` and
    gallops outward in doubling steps until the answer is bracketed, so a
    good guess costs only a handful of probes even for hi ~ 10^9. ``step``
    is the first galloping step (default: 1/64 of the guess); pass a smaller
    one when the guess is known to be close.
    """
    if lo >= hi:
        return hi
    cache: dict[int, tuple[bool, float | None]] = {}

    def ask(k: int) -> bool:
        if k not in cache:
            r = probe(k)
            cache[k] = (bool(r[0]), float(r[1])) if isinstance(r, tuple) else (bool(r), None)
        return cache[k][0]

    g = min(max(guess, lo), hi)
    step = max(1, g >> 6 if step is None else step)
    if ask(g):
        b = g
        a = g - step
        while a >= lo and ask(a):
            b = a
            step *= 2
            a = b - step
        if a < lo:
            a = lo - 1
    else:
        a = g
        b = g + step
        while b < hi and not ask(b):
            a = b
            step *= 2
            b = a + step
        b = min(b, hi)
        ask(b)
    # now the answer lies in (a, b]: probe(a) False (or a == lo - 1), probe(b) True
    sa = cache.get(a, (False, None))[1]
    sb = cache[b][1]
    kept = 0  # +1 when a was kept twice, -1 when b was (Illinois halving)
    while b - a > 1:
        mid = (a + b) // 2
        if sa is not None and sb is not None and math.isfinite(sa) and math.isfinite(sb) and sa > sb:
            t = sa / (sa - sb)
            mid = min(max(a + int(round(t * (b - a))), a + 1), b - 1)
        if ask(mid):
            b, sb = mid, cache[mid][1]
            if kept == -1 and sa is not None:
                sa *= 0.5
            kept = -1
        else:
            a, sa = mid, cache[mid][1]
            if kept == 1 and sb is not None:
                sb *= 0.5
            kept = 1
    return b


def largest_true(
    probe: Callable[[int], object], lo: int, hi: int, guess: int, step: int | None = None
) -> int:
    """Largest k in [lo, hi] where ``probe`` says True; it is True then False.

    ``probe`` as in ``smallest_true`` but with the sense reversed: a score,
    if given, falls through 0 where the answer turns False. ``probe(lo)``
    must be True.
    """

    def flipped(k: int):
        if k > hi:
            return True, -math.inf
        r = probe(k)
        if isinstance(r, tuple):
            return (not r[0]), r[1]
        return not r

    return smallest_true(flipped, lo + 1, hi + 1, guess + 1, step) - 1
