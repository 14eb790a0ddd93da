"""Every unit has the same chance: chi-square over many seeds, per method.

Goodness of fit by ``scipy.stats.chisquare`` (Pearson's test). Units of one
draw are not independent (a two-stage draw takes them in clusters), so the
test uses one unit per draw, chosen uniformly among the n drawn by a
separate, fixed generator: if every unit's inclusion probability is n/N,
that unit is uniform on 1..N (probability (n/N)*(1/n) = 1/N), and the R
draws give R independent observations -- an exact multinomial setting for
the test. With replacement every drawn unit is already an independent
uniform observation, so all are used. Seeds are fixed, so the outcome is
deterministic; the last tests show that a real bias fails the same check.
"""

from __future__ import annotations

from collections import Counter

import numpy as np
import pytest
from scipy.stats import chisquare

from inspector import frame

# 8 irregular containers of 3..12 jars: shares n*N_h/N are fractions, and
# container sizes differ by a factor of 4 (where a wrong PPS would show).
IRREGULAR = frame.manifest_from_csv_text(
    "container,units\nHP-A,3\nHP-B,7\nHP-C,12\nHP-D,5\nHP-E,9\nHP-F,4\nHP-G,10\nHP-H,6\n"
)
NESTED = frame.parse_structure("pallet=3,layer=2,carton=2,unit=5")
DRAWS = 6000


def _uniformity_p(lot, samples, *, all_units=False) -> float:
    picker = np.random.default_rng(20240611)  # independent of the frame's streams
    counts = Counter()
    for units in samples:
        if all_units:
            counts.update(units)
        else:
            counts[units[int(picker.integers(len(units)))]] += 1
    observed = [counts[u] for u in range(1, lot.size + 1)]
    assert sum(observed) == sum(counts.values())  # nothing fell outside 1..N
    return chisquare(observed).pvalue


CONFIGS = [
    ("irregular-simple", IRREGULAR, 7, "simple", {}),
    ("irregular-stratified", IRREGULAR, 7, "stratified", {}),
    ("irregular-two-stage", IRREGULAR, 6, "two-stage", {"containers": 2}),
    ("nested-simple", NESTED, 8, "simple", {}),
    ("nested-stratified-by-layer", NESTED, 8, "stratified", {"by": "layer"}),
    ("nested-stratified-by-pallet", NESTED, 4, "stratified", {"by": "pallet"}),
    ("nested-two-stage-by-carton", NESTED, 6, "two-stage", {"containers": 3}),
]


@pytest.mark.parametrize("name, lot, n, method, kwargs", CONFIGS, ids=[c[0] for c in CONFIGS])
def test_every_unit_is_equally_likely(name, lot, n, method, kwargs):
    first = 1_000_000 * CONFIGS.index(next(c for c in CONFIGS if c[0] == name))
    samples = (
        frame.draw(lot, n, method=method, seed=first + i, **kwargs).units for i in range(DRAWS)
    )
    assert _uniformity_p(lot, samples) > 0.001


def test_with_replacement_draws_are_uniform():
    samples = (frame.draw(IRREGULAR, 7, method="with-replacement", seed=9_000_000 + i).units for i in range(2000))
    assert _uniformity_p(IRREGULAR, samples, all_units=True) > 0.001


# --- the check has power: plausible wrong designs fail it ---------------------------------


def _naive_two_stage(lot, n, k, rng):
    """Containers with EQUAL probability (not by size), then m in each."""
    m = n // k
    ends = np.cumsum(lot.counts)
    chosen = rng.choice(len(lot.counts), size=k, replace=False)
    units = []
    for h in chosen:
        start = ends[h] - lot.counts[h]
        units += [int(start + v + 1) for v in rng.choice(lot.counts[h], size=m, replace=False)]
    return tuple(units)


def _largest_remainder_stratified(lot, n, rng):
    """Extra units to the strata with the largest fractional shares: a fixed
    allocation, so units of strata with small fractions are under-drawn."""
    N = lot.size
    base = [(n * s) // N for s in lot.counts]
    order = sorted(range(len(lot.counts)), key=lambda h: -((n * lot.counts[h]) % N))
    for h in order[: n - sum(base)]:
        base[h] += 1
    ends = np.cumsum(lot.counts)
    units = []
    for h, nh in enumerate(base):
        start = ends[h] - lot.counts[h]
        units += [int(start + v + 1) for v in rng.choice(lot.counts[h], size=nh, replace=False)]
    return tuple(units)


def test_equal_probability_container_choice_fails_the_check():
    rng = np.random.default_rng(1)
    samples = (_naive_two_stage(IRREGULAR, 6, 2, rng) for _ in range(DRAWS))
    assert _uniformity_p(IRREGULAR, samples) < 1e-6


def test_largest_remainder_allocation_fails_the_check():
    rng = np.random.default_rng(2)
    samples = (_largest_remainder_stratified(IRREGULAR, 7, rng) for _ in range(DRAWS))
    assert _uniformity_p(IRREGULAR, samples) < 1e-6
