"""The random stream behind every draw, defined down to the bit.

A draw's randomness comes only from its seed, through steps that are fixed
by published algorithms rather than by any library's sampling routines:

1. ``numpy.random.SeedSequence(entropy=seed, spawn_key=(purpose,))`` turns
   the seed (a whole number 0 <= seed < 2**128) into generator state;
   ``purpose`` is 0 for the sample and 1 for its substitute sequence, so the
   two are independent streams of the same seed.
2. ``numpy.random.PCG64`` (PCG XSL-RR 128/64) seeded from it gives 64-bit
   words, read with ``random_raw`` -- raw generator output, untouched by any
   of numpy's distribution code, so it cannot change when numpy changes how
   it samples integers. ``tests/frame/pcg_reference.py`` re-implements both
   steps in plain Python and the tests check they agree.
3. A whole number uniform on ``0..m-1`` is taken from the next word ``w``
   that satisfies ``w >= 2**64 mod m``, as ``w mod m``; the words below that
   threshold are skipped (exact rejection: the accepted range holds a whole
   multiple of m words).

Words are consumed strictly one after another, so the result never depends
on how many words are fetched at a time.
"""

from __future__ import annotations

from inspector.frame.errors import FrameError

#: Seeds are whole numbers 0 <= seed < SEED_LIMIT.
SEED_LIMIT = 2**128

SAMPLE = 0
SUBSTITUTES = 1

_TWO64 = 1 << 64


def check_seed(seed: int) -> int:
    """``seed`` when it is a valid seed, else FrameError naming it."""
    if isinstance(seed, bool) or not isinstance(seed, int):
        raise FrameError("seed", f"seed: expected a whole number, got {seed!r}")
    if not 0 <= seed < SEED_LIMIT:
        raise FrameError("seed", f"seed: expected a whole number from 0 to 2**128-1, got {seed}")
    return seed


class WordStream:
    """Sequential 64-bit words of one (seed, purpose) stream."""

    def __init__(self, seed: int, purpose: int):
        import numpy as np

        seq = np.random.SeedSequence(entropy=check_seed(seed), spawn_key=(purpose,))
        self._bits = np.random.PCG64(seq)
        self._buffer: list[int] = []
        self._next = 0
        self._chunk = 64  # grows: small draws stay cheap, big ones fetch in bulk
        self.used = 0  # words consumed so far (for tests and curiosity)

    def word(self) -> int:
        if self._next == len(self._buffer):
            self._buffer = self._bits.random_raw(self._chunk).tolist()
            self._next = 0
            self._chunk = min(self._chunk * 2, 1 << 16)
        w = self._buffer[self._next]
        self._next += 1
        self.used += 1
        return w

    def below(self, m: int) -> int:
        """A whole number uniform on 0..m-1 (step 3 above)."""
        threshold = _TWO64 % m
        while True:
            w = self.word()
            if w >= threshold:
                return w % m

    def distinct(self, m: int, count: int, skip=None) -> list[int]:
        """The first ``count`` distinct values of ``below(m)``, in draw order,
        leaving out values for which ``skip(value)`` is true.

        Taking the first distinct values of a sequence of independent uniform
        draws gives a simple random sample without replacement (every ordered
        set of ``count`` values is equally likely). The caller guarantees that
        enough values remain.
        """
        threshold = _TWO64 % m
        word = self.word
        seen: set[int] = set()
        out: list[int] = []
        while len(out) < count:
            w = word()
            if w < threshold:  # the bounded step, inlined: same words, same values
                continue
            v = w % m
            if v in seen or (skip is not None and skip(v)):
                continue
            seen.add(v)
            out.append(v)
        return out
