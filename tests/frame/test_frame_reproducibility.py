"""Stored draws must re-derive forever; the stream is the published one."""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest

from frame_pcg_reference import pcg64_words, reference_simple_sample
from inspector import frame
from inspector.frame.stream import SAMPLE, SUBSTITUTES, WordStream

FIXTURE = json.loads((Path(__file__).parent / "fixtures" / "frame_draws.json").read_text())
CASES = FIXTURE["cases"]


@pytest.mark.parametrize("case", CASES, ids=[c["id"] for c in CASES])
def test_stored_draw_is_re_derived_exactly(case):
    structure = frame.structure_from_text(FIXTURE["structures"][case["structure"]])
    d = frame.draw(
        structure,
        case["n"],
        method=case["method"],
        seed=case["seed"],
        by=case["by"],
        containers=case["containers"],
        algorithm=case["algorithm"],
    )
    expected = case["expected"]
    assert list(d.units) == expected["units"]
    assert list(d.containers) == expected["containers"]
    assert d.frame == expected["frame"]
    assert list(frame.substitutes(structure, d, case["substitutes"])) == expected["substitutes"]


def test_every_algorithm_id_has_stored_cases_and_every_stored_id_still_works():
    stored = {c["algorithm"] for c in CASES}
    assert stored == set(frame.ALGORITHMS)
    assert set(frame.CURRENT_ALGORITHM.values()) <= stored


def test_a_draw_uses_the_current_algorithm_and_records_it():
    lot = frame.flat_lot(100)
    for method, algorithm in frame.CURRENT_ALGORITHM.items():
        if method in ("stratified", "two-stage"):
            continue
        assert frame.draw(lot, 3, method=method, seed=1).algorithm == algorithm


@pytest.mark.parametrize(
    "seed, purpose",
    [(0, SAMPLE), (1, SUBSTITUTES), (20240611, SAMPLE), (2**53 - 1, SAMPLE), (2**127 + 99, SUBSTITUTES)],
)
def test_stream_is_pcg64_seeded_by_seedsequence_as_published(seed, purpose):
    # Second implementation in plain Python (tests/frame/frame_pcg_reference.py,
    # after O'Neill's PCG paper and the seed_seq design numpy documents).
    stream = WordStream(seed, purpose)
    ours = [stream.word() for _ in range(200)]
    assert ours == pcg64_words(seed, (purpose,), 200)


def test_stream_words_do_not_depend_on_how_many_are_fetched_at_once():
    stream = WordStream(5, SAMPLE)
    words = [stream.word() for _ in range(5000)]  # crosses several buffer refills
    raw = np.random.PCG64(np.random.SeedSequence(5, spawn_key=(0,))).random_raw(5000).tolist()
    assert words == raw


@pytest.mark.parametrize("seed", [0, 7, 99991])
def test_simple_draw_matches_the_plain_python_reference(seed):
    assert list(frame.draw(frame.flat_lot(15552), 40, seed=seed).units) == reference_simple_sample(seed, 15552, 40)


class _Words(WordStream):
    """A stream that serves scripted words."""

    def __init__(self, words):
        self._words = list(words)
        self.used = 0

    def word(self):
        self.used += 1
        return self._words.pop(0)


def test_bounded_step_skips_exactly_the_words_below_two_to_the_64_mod_m():
    m = 3  # 2**64 mod 3 == 1: word 0 is the only one skipped
    assert (1 << 64) % m == 1
    s = _Words([0, 0, 1, 2**64 - 1])
    assert s.below(m) == 1 % 3 and s.used == 3
    assert s.below(m) == (2**64 - 1) % 3
    m = 10**9  # 2**64 mod 10**9 == 709551616
    s = _Words([709551615, 709551616])
    assert s.below(m) == 709551616 % m and s.used == 2
    s = _Words([0])  # a power of two skips nothing
    assert s.below(1024) == 0


def test_distinct_skips_repeats_and_excluded_values_in_order():
    big = 10**6  # words below 2**64 mod 10 == 6 would be skipped; stay above
    s = _Words([big + 5, big + 5, big + 2, big + 7, big + 5, big + 9, big + 1])
    assert s.distinct(10, 3, skip=lambda v: v == 7) == [5, 2, 9]
    assert s.used == 6
