"""Timing of the sampling engine against straightforward scipy versions.

Prints, for each task, the median time of our implementation, the median of
a straightforward scipy implementation of the same task measured in the same
run, their ratio, and the target. The machine is shared and noisy: read the
ratios, and re-run before drawing conclusions. Not a test.

    python benchmarks/bench_stats.py
"""

from __future__ import annotations

import statistics
import time
from fractions import Fraction

import numpy as np
from scipy import stats as sps

from inspector.stats import plans
from inspector.stats.design import defectives_at, design_plan
from inspector.stats.estimate import estimate_defectives


def median_time(fn, repeat: int, number: int = 1) -> float:
    fn()  # warm up
    samples = []
    for _ in range(repeat):
        t = time.perf_counter()
        for _ in range(number):
            fn()
        samples.append((time.perf_counter() - t) / number)
    return statistics.median(samples)


# --- straightforward scipy versions ------------------------------------------


def scipy_design(N, aql, rql, alpha=0.05, beta=0.10):
    """Bisection on n for each c over scipy's cdf (same rule as ours)."""
    D1 = defectives_at(N, Fraction(aql), round_up=False)
    D2 = defectives_at(N, Fraction(rql), round_up=True)
    for c in range(0, D2):
        lo, hi = c, N  # Pa(lo) > beta, Pa(hi) <= beta
        while hi - lo > 1:
            mid = (lo + hi) // 2
            if sps.hypergeom.cdf(c, N, D2, mid) <= beta:
                hi = mid
            else:
                lo = mid
        if hi >= N:
            return N, None
        if sps.hypergeom.cdf(c, N, D1, hi) >= 1 - alpha:
            return hi, c
    return N, None


def scipy_estimate(N, n, x, conf=0.95):
    """Bisection on D over scipy's cdf and sf for the three bounds."""
    a = (1 - conf) / 2

    def largest(pred):  # pred True then False on [x, N - (n - x)]
        lo, hi = x, N - (n - x) + 1
        while hi - lo > 1:
            mid = (lo + hi) // 2
            if pred(mid):
                lo = mid
            else:
                hi = mid
        return lo

    upper = largest(lambda D: sps.hypergeom.cdf(x, N, D, n) > a)
    upper_bound = largest(lambda D: sps.hypergeom.cdf(x, N, D, n) > 1 - conf)
    lower = 0 if x == 0 else largest(lambda D: not sps.hypergeom.sf(x - 1, N, D, n) > a) + 1
    return lower, upper, upper_bound


def scipy_oc(N, n, c, D):
    pa = sps.hypergeom.cdf(c, N, D, n)
    xs = np.arange(c + 1)[:, None]
    aoq = (sps.hypergeom.pmf(xs, N, D[None, :], n) * (D[None, :] - xs)).sum(axis=0) / N
    ati = n + (1 - pa) * (N - n)
    return pa, aoq, ati


def row(task, ours, base, target, note=""):
    ratio = base / ours
    flag = "ok" if ours <= target else "OVER TARGET"
    print(f"{task:44s} {ours * 1e3:9.3f} ms {base * 1e3:10.3f} ms {ratio:8.1f}x   <= {target * 1e3:.1f} ms  {flag} {note}")


def main() -> None:
    print(f"{'task':44s} {'ours':>12s} {'scipy':>13s} {'speed-up':>9s}   target")
    # plan cases from ../shared/reference-values.md (AQL/RQL pairs), lot sizes up to 10^6
    design_cases = [
        (2000, "1.5", "10"),
        (4000, "0.65", "2.65"),
        (10**5, "1.5", "10"),
        (10**6, "1.5", "10"),
        (10**6, "0.65", "2.65"),
        (10**6, "1", "5"),
    ]
    for N, aql, rql in design_cases:
        ours = median_time(lambda: design_plan(lot_size=N, aql=aql, rql=rql), 31)
        base = median_time(lambda: scipy_design(N, aql, rql), 3)
        d = design_plan(lot_size=N, aql=aql, rql=rql)
        same = scipy_design(N, aql, rql) == (d.sample_size, d.acceptance_number)
        row(f"design N={N} AQL {aql} RQL {rql}", ours, base, 0.5e-3,
            f"n={d.sample_size} c={d.acceptance_number} scipy agrees={same}")
    ours = median_time(lambda: design_plan(lot_size=10**6, aql="1.5", rql="10", model="process"), 31)
    row("design process model AQL 1.5 RQL 10", ours, ours, 0.5e-3, "(no scipy baseline)")

    for N, n, x in [(10**9, 50, 5), (10**9, 1250, 3), (10**9, 200, 0)]:
        ours = median_time(lambda: estimate_defectives(lot_size=N, sample_size=n, found=x), 31)
        base = median_time(lambda: scipy_estimate(N, n, x), 3)
        e = estimate_defectives(lot_size=N, sample_size=n, found=x)
        ref = scipy_estimate(N, n, x)
        got = (e.lower_defectives, e.upper_defectives, e.upper_bound_defectives)
        row(f"estimate N=10^9 n={n} x={x}", ours, base, 0.3e-3, f"bounds {got} scipy {ref}")

    for N, n, c in [(2000, 50, 2), (10**6, 315, 7), (10**9, 1250, 21)]:
        top = plans.rql_lot(N, n, c, Fraction(1, 1000))
        D = np.unique(np.linspace(0, top, 200).round()).astype(np.int64)
        ours = median_time(lambda: plans.oc_single(N, n, c, D), 31)
        base = median_time(lambda: scipy_oc(N, n, c, D), 7)
        curve = plans.oc_single(N, n, c, D)
        pa, aoq, _ = scipy_oc(N, n, c, D)
        mask = pa > 1e-300
        diff = float(np.max(np.abs(curve.pa[mask] - pa[mask]) / pa[mask]))
        row(f"OC curve {len(D)} points N={N} n={n} c={c}", ours, base, 1e-3, f"max rel diff vs scipy {diff:.1e}")


if __name__ == "__main__":
    main()
