"""A second, plain-Python implementation of the frame's random stream.

It follows the published descriptions, not numpy's code paths:
SeedSequence's entropy pool and state generation (M. E. O'Neill's seed_seq
design as adopted by numpy, documented in numpy's ``bit_generator.pyx``:
hashmix/mix constants, pool size 4) and PCG64, the PCG XSL-RR 128/64
generator (O'Neill, "PCG: A Family of Simple Fast Space-Efficient
Statistically Good Algorithms for Random Number Generation", 2014, and the
pcg-cpp reference: 128-bit LCG multiplier 0x2360ED051FC65DA44385DF649FCCF645,
output xor of the halves rotated right by the top 6 bits).

Agreement with ``numpy.random.PCG64(SeedSequence(...)).random_raw`` shows
that the frame's draws are defined by these published algorithms, so they
can be re-derived without numpy if ever needed.
"""

from __future__ import annotations

MASK32 = 0xFFFFFFFF
MASK64 = (1 << 64) - 1
MASK128 = (1 << 128) - 1
INIT_A = 0x43B0D7E5
MULT_A = 0x931E8875
INIT_B = 0x8B51F9DD
MULT_B = 0x58F38DED
MIX_MULT_L = 0xCA01F9DD
MIX_MULT_R = 0x4973F715
XSHIFT = 16
POOL_SIZE = 4
PCG_MULT = 0x2360ED051FC65DA44385DF649FCCF645


def _words32(value: int) -> list[int]:
    out = []
    while True:
        out.append(value & MASK32)
        value >>= 32
        if value == 0:
            return out


def _assembled_entropy(entropy: int, spawn_key: tuple[int, ...]) -> list[int]:
    words = _words32(entropy)
    if spawn_key and len(words) < POOL_SIZE:
        # the entropy is padded to the pool size before the spawn key is appended
        words += [0] * (POOL_SIZE - len(words))
    for key in spawn_key:
        words += _words32(key)
    return words


def seed_pool(entropy: int, spawn_key: tuple[int, ...] = ()) -> list[int]:
    entropy_words = _assembled_entropy(entropy, spawn_key)
    hash_const = [INIT_A]

    def hashmix(value: int) -> int:
        value ^= hash_const[0]
        hash_const[0] = (hash_const[0] * MULT_A) & MASK32
        value = (value * hash_const[0]) & MASK32
        return value ^ (value >> XSHIFT)

    def mix(x: int, y: int) -> int:
        result = (MIX_MULT_L * x - MIX_MULT_R * y) & MASK32
        return result ^ (result >> XSHIFT)

    pool = [hashmix(entropy_words[i] if i < len(entropy_words) else 0) for i in range(POOL_SIZE)]
    for src in range(POOL_SIZE):
        for dst in range(POOL_SIZE):
            if src != dst:
                pool[dst] = mix(pool[dst], hashmix(pool[src]))
    for src in range(POOL_SIZE, len(entropy_words)):
        for dst in range(POOL_SIZE):
            pool[dst] = mix(pool[dst], hashmix(entropy_words[src]))
    return pool


def generate_state64(pool: list[int], count: int) -> list[int]:
    hash_const = INIT_B
    words = []
    for i in range(2 * count):
        value = pool[i % POOL_SIZE] ^ hash_const
        hash_const = (hash_const * MULT_B) & MASK32
        value = (value * hash_const) & MASK32
        words.append(value ^ (value >> XSHIFT))
    return [words[2 * i] | (words[2 * i + 1] << 32) for i in range(count)]


def pcg64_words(entropy: int, spawn_key: tuple[int, ...], count: int) -> list[int]:
    """The first ``count`` raw 64-bit outputs of PCG64 seeded by SeedSequence."""
    v = generate_state64(seed_pool(entropy, spawn_key), 4)
    initstate = (v[0] << 64) | v[1]
    inc = ((((v[2] << 64) | v[3]) << 1) | 1) & MASK128
    state = 0
    state = (state * PCG_MULT + inc) & MASK128
    state = (state + initstate) & MASK128
    state = (state * PCG_MULT + inc) & MASK128
    out = []
    for _ in range(count):
        state = (state * PCG_MULT + inc) & MASK128
        rot = state >> 122
        x = ((state >> 64) ^ state) & MASK64
        out.append(((x >> rot) | (x << ((64 - rot) & 63))) & MASK64)
    return out


def below(words, m: int) -> int:
    """The frame's bounded-integer step, written independently."""
    threshold = (1 << 64) % m
    for w in words:
        if w >= threshold:
            return w % m
    raise RuntimeError("ran out of words")


def reference_simple_sample(seed: int, lot_size: int, n: int) -> list[int]:
    """srswor-v1 from the plain-Python stream: first n distinct units."""
    words = iter(pcg64_words(seed, (0,), 50 * n + 100))
    chosen: list[int] = []
    while len(chosen) < n:
        unit = below(words, lot_size) + 1
        if unit not in chosen:
            chosen.append(unit)
    return sorted(chosen)
