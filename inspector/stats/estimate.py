"""Estimating how many nonconforming units a lot holds, from its sample.

x nonconforming were found in a sample of n drawn without replacement from
a lot of N units. The lot holds D nonconforming units, unknown.

* Point estimate D_hat = N x / n (unbiased under simple random sampling).
* Exact two-sided interval at confidence C (Clopper-Pearson style,
  inverting the hypergeometric; see T. Wright (1991), Exact Confidence
  Bounds when Sampling from Small Finite Universes, and the usual
  Clopper-Pearson convention): with a = (1 - C) / 2,

      D_U = largest D with P(X <= x | D) > a,
      D_L = smallest D with P(X >= x | D) > a.

* One-sided upper bound at confidence C: the largest D with
  P(X <= x | D) > 1 - C.

Both tails are monotone in D, so each bound is found by a bracketed search
on integers (galloping from a binomial starting value, then regula falsi on
the log tail probability); comparisons at the threshold are exact. Every
bound lies in [x, N - (n - x)]: the lot holds at least the x found and at
least the n - x good units seen.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from fractions import Fraction

from inspector.stats import _search
from inspector.stats import hypergeom as hg
from inspector.stats.design import as_fraction, defectives_at

__all__ = ["Estimate", "Evidence", "estimate_defectives", "evidence"]


@dataclass(frozen=True, kw_only=True)
class Estimate:
    """The lot's nonconforming count: point, exact interval, one-sided bound."""

    lot_size: int
    sample_size: int
    found: int
    confidence: float
    point_defectives: float
    lower_defectives: int
    upper_defectives: int
    upper_bound_defectives: int

    @property
    def point_fraction(self) -> float:
        return self.point_defectives / self.lot_size

    @property
    def lower_fraction(self) -> float:
        return self.lower_defectives / self.lot_size

    @property
    def upper_fraction(self) -> float:
        return self.upper_defectives / self.lot_size

    @property
    def upper_bound_fraction(self) -> float:
        return self.upper_bound_defectives / self.lot_size

    def bounds(self) -> dict:
        """The confidence, the counts and their fractions of the lot, JSON-ready
        (the keys the CLI and the lot record use)."""
        return {
            "confidence": self.confidence,
            "point_defectives": self.point_defectives,
            "lower_defectives": self.lower_defectives,
            "upper_defectives": self.upper_defectives,
            "upper_bound_defectives": self.upper_bound_defectives,
            "point_fraction": self.point_fraction,
            "lower_fraction": self.lower_fraction,
            "upper_fraction": self.upper_fraction,
            "upper_bound_fraction": self.upper_bound_fraction,
        }


@dataclass(frozen=True, kw_only=True)
class Evidence:
    """How surprising a sample result is for lots at the AQL and at the RQL."""

    defectives_at_aql: int
    defectives_at_rql: int
    p_value_at_aql: float  # P(X >= x | D1)
    p_value_at_rql: float  # P(X <= x | D2)
    reading: str


def _check(lot_size, sample_size, found):
    for name, v in (("lot_size", lot_size), ("sample_size", sample_size), ("found", found)):
        if isinstance(v, bool) or not isinstance(v, int):
            raise TypeError(f"{name} must be a whole number, got {v!r}")
    if lot_size < 1:
        raise ValueError(f"lot_size must be at least 1, got {lot_size}")
    if not 1 <= sample_size <= lot_size:
        raise ValueError(f"sample_size must lie in 1..lot_size ({lot_size}), got {sample_size}")
    if not 0 <= found <= sample_size:
        raise ValueError(f"found must lie in 0..sample_size ({sample_size}), got {found}")


def estimate_defectives(*, lot_size: int, sample_size: int, found: int, confidence=Fraction(95, 100)) -> Estimate:
    """Point estimate, exact two-sided interval and one-sided upper bound.

    ``confidence`` is exact as typed (str, Decimal, Fraction; floats read as
    their shortest decimal), strictly between 0 and 1. See the module doc.
    """
    _check(lot_size, sample_size, found)
    conf = as_fraction(confidence, "confidence")
    if not 0 < conf < 1:
        raise ValueError(f"confidence must lie strictly between 0 and 1, got {float(conf):g}")
    N, n, x = lot_size, sample_size, found
    a2 = (1 - conf) / 2
    upper = _upper(N, n, x, a2)
    lower = _lower(N, n, x, a2)
    upper_bound = _upper(N, n, x, 1 - conf)
    return Estimate(
        lot_size=N,
        sample_size=n,
        found=x,
        confidence=float(conf),
        point_defectives=N * x / n,
        lower_defectives=lower,
        upper_defectives=upper,
        upper_bound_defectives=upper_bound,
    )


def _start(N: int, n: int, x: int, tail: float, upper: bool) -> tuple[int, int]:
    """A starting D near the bound and a first search step.

    The binomial (Clopper-Pearson) bound from the regularised incomplete
    beta inverse, pulled toward the sample fraction by the finite-lot factor
    sqrt((N - n) / (N - 1)); for n much smaller than N it is within a small
    fraction of a percent of the exact bound.
    """
    from scipy.special import betaincinv

    p_hat = x / n
    if upper:
        p = 1.0 if x >= n else float(betaincinv(x + 1, n - x, 1.0 - tail))
    else:
        p = 0.0 if x <= 0 else float(betaincinv(x, n - x + 1, tail))
    shrink = math.sqrt((N - n) / (N - 1)) if N > 1 else 0.0
    guess = int(N * min(1.0, max(0.0, p_hat + (p - p_hat) * shrink)))
    # the guess is close when the lot is large next to the sample
    step = max(1, guess >> 10) if n * 20 < N else None
    return guess, step


def _upper(N: int, n: int, x: int, a: Fraction) -> int:
    """Largest D in [x, N - (n - x)] with P(X <= x | D) > a."""
    top = N - (n - x)
    af = float(a)

    def above(D: int):
        value = hg.tails_scalar(x, N, D, n)[0]
        ok = _search.compare(value, a, lambda: _search.exact_lot_cdf(x, N, D, n)) > 0
        return ok, (math.log(value / af) if value > 0 else -math.inf)

    guess, step = _start(N, n, x, af, upper=True)
    return _search.largest_true(above, x, top, guess, step)


def _lower(N: int, n: int, x: int, a: Fraction) -> int:
    """Smallest D in [x, N - (n - x)] with P(X >= x | D) > a (0 when x = 0)."""
    if x == 0:
        return 0
    top = N - (n - x)
    af = float(a)

    def above(D: int):
        value = hg.tails_scalar(x - 1, N, D, n)[1]  # P(X > x - 1) = P(X >= x)
        ok = _search.compare(value, a, lambda: _search.exact_lot_sf(x - 1, N, D, n)) > 0
        return ok, (math.log(af / value) if value > 0 else math.inf)

    guess, step = _start(N, n, x, af, upper=False)
    return _search.smallest_true(above, x, top, guess, step)


def evidence(*, lot_size: int, sample_size: int, found: int, aql, rql) -> Evidence:
    """P(X >= x | D1) and P(X <= x | D2) with a plain-words reading.

    D1 = floor(N AQL / 100), D2 = ceil(N RQL / 100) as in plan design. A
    small first value says the result would be unusual for a lot at the AQL
    (evidence the lot is worse); a small second value says it would be
    unusual for a lot at the RQL (evidence the lot is better).
    """
    _check(lot_size, sample_size, found)
    aql = as_fraction(aql, "aql")
    rql = as_fraction(rql, "rql")
    if not 0 <= aql < rql <= 100:
        raise ValueError(f"need 0 <= aql < rql <= 100, got aql {float(aql):g}, rql {float(rql):g}")
    N, n, x = lot_size, sample_size, found
    D1 = defectives_at(N, aql, round_up=False)
    D2 = defectives_at(N, rql, round_up=True)
    p_aql = hg.tails_scalar(x - 1, N, D1, n)[1] if x > 0 else 1.0
    p_rql = hg.tails_scalar(x, N, D2, n)[0]
    return Evidence(
        defectives_at_aql=D1,
        defectives_at_rql=D2,
        p_value_at_aql=p_aql,
        p_value_at_rql=p_rql,
        reading=_reading(x, n, p_aql, p_rql, float(aql), float(rql)),
    )


def _reading(x: int, n: int, p_aql: float, p_rql: float, aql: float, rql: float) -> str:
    found = f"{x} nonconforming in {n}"
    if p_aql < 0.05 and p_rql >= 0.05:
        return (
            f"{found} would be unusual for a lot at the AQL ({aql:g} %): "
            f"chance {_pct(p_aql)}. The result points to a lot worse than the AQL."
        )
    if p_rql < 0.05 and p_aql >= 0.05:
        return (
            f"{found} would be unusual for a lot at the RQL ({rql:g} %): "
            f"chance {_pct(p_rql)}. The result points to a lot better than the RQL."
        )
    if p_aql < 0.05 and p_rql < 0.05:
        return (
            f"{found} would be unusual both at the AQL and at the RQL: "
            f"the lot likely lies between them."
        )
    return (
        f"{found} is not unusual at the AQL (chance {_pct(p_aql)}) nor at the RQL "
        f"(chance {_pct(p_rql)}): this sample cannot tell the two apart."
    )


def _pct(p: float) -> str:
    """A chance in percent for a sentence: two significant digits, no exponent."""
    if p < 0.0001:
        return "under 0.01 %"
    if p > 0.9999:
        return "over 99.99 %" if p < 1.0 else "100 %"
    pct = 100 * p
    digits = max(0, 1 - math.floor(math.log10(pct)))
    return f"{pct:.{digits}f} %"
