"""Draws: validity, designs, refusals, substitutes, verification, pick list."""

from __future__ import annotations

from collections import Counter
from fractions import Fraction
from itertools import product

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from inspector import frame
from inspector.frame import FrameError
from inspector.frame.draws import _systematic

NESTED = frame.parse_structure("pallet=18,layer=4,carton=9,unit=24")
IRREGULAR = frame.manifest_from_csv_text(
    "container,units\nHP-P01,240\nHP-P02,216\nHP-P03,96\nHP-P04,240\nHP-P05,180\nHP-P06,60\n"
)


def _container_of(lot, level, unit):
    from inspector.frame.structure import blocks_of

    return blocks_of(lot, level).find(unit - 1)


# --- every draw is a valid sample --------------------------------------------------------


@st.composite
def requests(draw):
    """(structure, n, method, kwargs) that the frame must accept."""
    kind = draw(st.sampled_from(["flat", "nested", "manifest"]))
    if kind == "flat":
        lot = frame.flat_lot(draw(st.integers(1, 5000)))
    elif kind == "nested":
        counts = draw(st.lists(st.integers(1, 12), min_size=2, max_size=4))
        names = ["pallet", "layer", "carton", "tray"][: len(counts) - 1] + ["unit"]
        lot = frame.RegularLot(levels=tuple(zip(names, counts)))
    else:
        counts = draw(st.lists(st.integers(1, 40), min_size=1, max_size=15))
        lot = frame.ManifestLot(containers=tuple(f"C{i}" for i in range(len(counts))), counts=tuple(counts))
    methods = ["simple", "with-replacement"]
    if lot.container_levels:
        methods.append("stratified")
    method = draw(st.sampled_from(methods))
    n = draw(st.integers(1, lot.size if method != "with-replacement" else 3 * lot.size))
    kwargs = {}
    if method == "stratified":
        kwargs["by"] = draw(st.sampled_from(lot.container_levels))
    return lot, n, method, kwargs


@settings(max_examples=120, deadline=None)
@given(request=requests(), seed=st.integers(0, 2**128 - 1))
def test_a_draw_holds_n_units_in_range_without_duplicates(request, seed):
    lot, n, method, kwargs = request
    d = frame.draw(lot, n, method=method, seed=seed, **kwargs)
    assert len(d.units) == n
    assert list(d.units) == sorted(d.units)
    assert all(1 <= u <= lot.size for u in d.units)
    if method != "with-replacement":
        assert len(set(d.units)) == n
    assert d.seed == seed and d.lot_size == lot.size and d.sample_size == n
    assert frame.draw(lot, n, method=method, seed=seed, **kwargs) == d  # same inputs, same draw


@settings(max_examples=80, deadline=None)
@given(
    counts=st.lists(st.integers(1, 30), min_size=2, max_size=10),
    seed=st.integers(0, 2**64),
    data=st.data(),
)
def test_two_stage_takes_m_units_from_each_of_k_containers(counts, seed, data):
    lot = frame.ManifestLot(containers=tuple(f"C{i}" for i in range(len(counts))), counts=tuple(counts))
    N = lot.size
    feasible = [
        (k, m)
        for k in range(1, len(counts) + 1)
        for m in range(1, min(counts) + 1)
        if k * max(counts) <= N
    ]
    if not feasible:
        return
    k, m = data.draw(st.sampled_from(feasible))
    d = frame.draw(lot, k * m, method="two-stage", containers=k, seed=seed)
    per = Counter(_container_of(lot, "container", u) for u in d.units)
    assert sorted(per) == [h - 1 for h in d.containers]
    assert set(per.values()) == {m} and len(per) == k
    assert d.per_container == m and d.container_count == k


@settings(max_examples=80, deadline=None)
@given(counts=st.lists(st.integers(1, 30), min_size=1, max_size=12), seed=st.integers(0, 2**64), data=st.data())
def test_stratified_gives_each_stratum_its_share_rounded_down_or_up(counts, seed, data):
    lot = frame.ManifestLot(containers=tuple(f"C{i}" for i in range(len(counts))), counts=tuple(counts))
    n = data.draw(st.integers(1, lot.size))
    d = frame.draw(lot, n, method="stratified", seed=seed)
    per = Counter(_container_of(lot, "container", u) for u in d.units)
    for h, size in enumerate(counts):
        share = Fraction(n * size, lot.size)
        assert per[h] in (share.numerator // share.denominator, -(-share.numerator // share.denominator))


def test_larger_simple_sample_from_the_same_seed_extends_the_smaller():
    small = frame.draw(NESTED, 50, seed=11)
    large = frame.draw(NESTED, 80, seed=11)
    assert set(small.units) < set(large.units)


@pytest.mark.parametrize(
    "method, kwargs",
    [
        ("simple", {}),
        ("stratified", {"by": "container"}),
        ("two-stage", {"containers": 4}),
        ("with-replacement", {}),
    ],
)
def test_equal_containers_in_a_manifest_draw_exactly_like_the_regular_structure(method, kwargs):
    # Two code paths (cumulative counts vs mixed radix) must be one algorithm.
    regular = frame.parse_structure("container=36,unit=24")
    manifest = frame.ManifestLot(containers=tuple(f"P{i}" for i in range(36)), counts=(24,) * 36)
    for seed in (1, 2, 3, 2**90):
        a = frame.draw(regular, 24, method=method, seed=seed, **kwargs)
        b = frame.draw(manifest, 24, method=method, seed=seed, **kwargs)
        assert a.units == b.units and a.containers == b.containers


def test_stratified_by_layer_covers_every_layer_when_n_allows():
    lot = frame.parse_structure("pallet=3,layer=4,unit=10")
    d = frame.draw(lot, 12, method="stratified", by="layer", seed=5)
    assert sorted(Counter(_container_of(lot, "layer", u) for u in d.units).values()) == [1] * 12


def test_stratified_defaults_to_the_outermost_level_and_two_stage_to_the_innermost():
    assert frame.draw(NESTED, 18, method="stratified", seed=1).level == "pallet"
    assert frame.draw(NESTED, 18, method="two-stage", containers=3, seed=1).level == "carton"
    assert frame.draw(NESTED, 18, method="two-stage", containers=3, by="Layer", seed=1).level == "layer"


def test_two_stage_on_a_billion_units_opens_k_cartons():
    lot = frame.parse_structure("pallet=1000,layer=10,carton=100,unit=1000")
    d = frame.draw(lot, 1250, method="two-stage", containers=125, seed=3)
    assert len(d.containers) == 125 and len(set(d.units)) == 1250
    labels = {lot.address_of(u).container for u in d.units}
    assert labels == {lot.container_label("carton", h - 1) for h in d.containers}


# --- exact inclusion probabilities, by enumerating every random outcome -----------------


class _Scripted:
    """Serves a fixed sequence of below(m) results, checking each m."""

    def __init__(self, values, bounds):
        self.values, self.bounds = list(values), list(bounds)

    def below(self, m):
        assert m == self.bounds.pop(0)
        return self.values.pop(0)


def _enumerate_systematic(weights, total, picks):
    """Exact probability that each item is chosen, over every random order
    and every start: all below() outcomes are equally likely."""
    H = len(weights)
    bounds = list(range(H, 1, -1)) + [total]
    outcomes = list(product(*[range(b) for b in bounds]))
    hits = Counter()
    for values in outcomes:
        chosen = _systematic(list(weights), total, picks, _Scripted(values, bounds))
        assert len(set(chosen)) == picks
        hits.update(chosen)
    return [Fraction(hits[i], len(outcomes)) for i in range(H)]


def test_two_stage_opens_each_container_with_probability_k_size_over_n_exactly():
    sizes, k = [3, 7, 12, 5, 9], 2
    N = sum(sizes)
    assert _enumerate_systematic([k * s for s in sizes], N, k) == [Fraction(k * s, N) for s in sizes]


def test_stratified_extra_units_go_to_strata_with_probability_equal_to_the_fraction():
    sizes, n = [3, 7, 12, 5, 9], 7
    N = sum(sizes)
    remainders = [(n * s) % N for s in sizes]
    r = n - sum((n * s) // N for s in sizes)
    got = _enumerate_systematic(remainders, N, r)
    assert got == [Fraction(n * s, N) - (n * s) // N for s in sizes]


# --- refusals --------------------------------------------------------------------------


@pytest.mark.parametrize(
    "lot, n, kwargs, field, needle",
    [
        (IRREGULAR, 31, dict(method="two-stage", containers=3), "containers", "cannot be split evenly over 3"),
        (IRREGULAR, 183, dict(method="two-stage", containers=3), "containers", "HP-P06 holds 60 units, fewer than the 61"),
        (IRREGULAR, 30, dict(method="two-stage", containers=5), "containers", "5*240/1032 would exceed 1"),
        (IRREGULAR, 30, dict(method="two-stage", containers=7), "containers", "only 6 containers"),
        (IRREGULAR, 30, dict(method="two-stage"), "containers", "needs the number of containers"),
        (IRREGULAR, 30, dict(method="stratified", containers=3), "containers", "only used by the two-stage"),
        (IRREGULAR, 30, dict(method="simple", by="container"), "by", "only used by the stratified"),
        (NESTED, 30, dict(method="stratified", by="crate"), "by", "'crate' is not a container level"),
        (NESTED, 30, dict(method="stratified", by="unit"), "by", "is the unit level"),
        (frame.flat_lot(100), 5, dict(method="stratified"), "method", "flat count"),
        (frame.flat_lot(100), 101, {}, "n", "more than the lot's 100 units"),
        (frame.flat_lot(100), 0, {}, "n", "at least 1, got 0"),
        (frame.flat_lot(100), 2.0, {}, "n", "got 2.0"),
        (frame.flat_lot(100), 5, dict(method="systematic"), "method", "got 'systematic'"),
        (frame.flat_lot(100), 5, dict(algorithm="srswor-v9"), "algorithm", "unknown id 'srswor-v9'"),
        (frame.flat_lot(100), 5, dict(algorithm="srswr-v1"), "algorithm", "not 'simple'"),
    ],
)
def test_impossible_draws_are_refused_with_the_reason(lot, n, kwargs, field, needle):
    with pytest.raises(FrameError) as info:
        frame.draw(lot, n, seed=1, **kwargs)
    assert info.value.field == field
    assert needle in str(info.value)


@pytest.mark.parametrize("seed", [-1, 2**128, 1.5, True, "12"])
def test_bad_seeds_are_refused(seed):
    with pytest.raises(FrameError) as info:
        frame.draw(frame.flat_lot(10), 2, seed=seed)
    assert info.value.field == "seed"


def test_with_replacement_may_exceed_the_lot_and_is_labelled_everywhere():
    d = frame.draw(frame.flat_lot(5), 12, method="with-replacement", seed=4)
    assert len(d.units) == 12 and len(set(d.units)) <= 5
    assert "non-destructive re-checks only" in d.note
    assert "non-destructive re-checks only" in d.title
    picks = frame.pick_list(frame.flat_lot(5), d)
    assert picks.note == d.note and picks.total == 12


# --- substitutes ---------------------------------------------------------------------------


def test_substitutes_come_from_undrawn_units_in_a_fixed_order():
    d = frame.draw(NESTED, 40, seed=9)
    subs = frame.substitutes(NESTED, d, 30)
    assert len(set(subs)) == 30 and not set(subs) & set(d.units)
    assert frame.substitutes(NESTED, d, 10) == subs[:10]


def test_two_stage_substitutes_stay_in_the_opened_containers():
    d = frame.draw(IRREGULAR, 30, method="two-stage", containers=3, seed=9)
    opened = {h - 1 for h in d.containers}
    subs = frame.substitutes(IRREGULAR, d, 100)
    assert {_container_of(IRREGULAR, "container", u) for u in subs} <= opened
    assert not set(subs) & set(d.units)


def test_substitution_is_consumed_in_order_and_keeps_its_reason():
    d = frame.draw(NESTED, 10, seed=21)
    seq = frame.substitutes(NESTED, d, 3)
    d1 = frame.substitute(NESTED, d, d.units[0], "jar broken in transit")
    d2 = frame.substitute(NESTED, d1, seq[0], "label missing")  # a substitute can be replaced in turn
    assert d.units == d2.units  # what the seed drew never changes
    assert [(s.replaced, s.substitute, s.reason) for s in d2.substitutions] == [
        (d.units[0], seq[0], "jar broken in transit"),
        (seq[0], seq[1], "label missing"),
    ]
    assert d2.final_units == tuple(sorted(set(d.units) - {d.units[0]} | {seq[1]}))
    assert frame.verify(NESTED, d2).ok
    stops = frame.pick_list(NESTED, d2)
    line = [ln for stop in stops.stops for ln in stop.lines if ln.unit == seq[1]][0]
    assert line.replaces == seq[0] and line.reason == "label missing"


@pytest.mark.parametrize("unit, reason, field", [(99999, "broken", "unit"), (None, "  ", "reason")])
def test_bad_substitutions_are_refused(unit, reason, field):
    d = frame.draw(NESTED, 10, seed=21)
    with pytest.raises(FrameError) as info:
        frame.substitute(NESTED, d, d.units[0] if unit is None else unit, reason)
    assert info.value.field == field


def test_substitutes_run_out_with_a_clear_message():
    lot = frame.flat_lot(10)
    d = frame.draw(lot, 8, seed=1)
    assert len(frame.substitutes(lot, d, 2)) == 2
    with pytest.raises(FrameError, match="only 2 units of the lot are not drawn"):
        frame.substitutes(lot, d, 3)


# --- verification -------------------------------------------------------------------------


@pytest.mark.parametrize(
    "method, kwargs",
    [("simple", {}), ("stratified", {"by": "layer"}), ("two-stage", {"containers": 4}), ("with-replacement", {})],
)
def test_a_recorded_draw_verifies_and_a_tampered_one_does_not(method, kwargs):
    d = frame.draw(NESTED, 20, method=method, seed=77, **kwargs)
    stored = frame.draw_from_dict(d.to_dict())
    assert stored == d
    assert frame.verify(NESTED, stored).ok
    swapped = next(u for u in range(1, NESTED.size) if u not in d.units)
    forged = frame.draw_from_dict({**d.to_dict(), "units": sorted([*d.units[1:], swapped])})
    result = frame.verify(NESTED, forged)
    assert not result.ok
    assert result.unexpected == (swapped,) and result.missing == (d.units[0],)
    assert str(swapped) in result.describe()


def test_verify_reports_a_different_frame_and_a_forged_substitute():
    d = frame.draw(IRREGULAR, 12, seed=3)
    other = frame.manifest_from_csv_text("container,units\nHP-P01,240\nHP-P02,216\n")
    assert "not the lot structure" in frame.verify(other, d).describe()
    d1 = frame.substitute(IRREGULAR, d, d.units[0], "missing")
    forged = frame.draw_from_dict(
        {**d1.to_dict(), "substitutions": [{"replaced": d.units[0], "substitute": 1, "reason": "missing"}]}
    )
    assert "substitute 1 recorded as unit 1" in frame.verify(IRREGULAR, forged).describe()


def test_verify_units_compares_a_listed_sample():
    d = frame.draw(frame.flat_lot(2000), 5, seed=7)
    assert frame.verify_units(frame.flat_lot(2000), list(reversed(d.units)), n=5, seed=7).ok
    bad = frame.verify_units(frame.flat_lot(2000), [3, 8, 10], n=5, seed=7)
    assert not bad.ok and bad.unexpected == (3, 8, 10) and bad.missing == d.units


# --- pick list -------------------------------------------------------------------------------


def test_pick_list_walks_container_by_container_with_counts():
    d = frame.draw(NESTED, 60, method="stratified", seed=8)
    picks = frame.pick_list(NESTED, d)
    assert picks.units == d.units  # ascending numbers = walking order
    containers = [stop.container for stop in picks.stops]
    assert len(containers) == len(set(containers))  # each container visited once
    for stop in picks.stops:
        assert stop.count == len(stop.lines)
        assert all(line.address.container == stop.container for line in stop.lines)
    assert picks.total == 60


def test_pick_list_of_a_flat_lot_is_one_stop():
    picks = frame.pick_list(frame.flat_lot(50), [7, 3, 9])
    assert [stop.container for stop in picks.stops] == ["lot"]
    assert picks.units == (3, 7, 9)
