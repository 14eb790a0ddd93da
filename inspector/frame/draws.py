"""Reproducible draws: (frame, method, n, seed, algorithm) -> units.

Every algorithm id names one fixed procedure; once released it never
changes. A better procedure gets a new id, and the old ids stay in
:data:`ALGORITHMS` so recorded draws keep re-deriving. The procedures are
described in the package docstring (``inspector.frame``).
"""

from __future__ import annotations

from bisect import bisect_right
from collections import Counter
from dataclasses import dataclass, replace
from itertools import accumulate
from typing import Mapping, Sequence

from inspector.frame.errors import FrameError
from inspector.frame.stream import SAMPLE, SUBSTITUTES, WordStream, check_seed
from inspector.frame.structure import LotStructure, blocks_of

METHODS = ("simple", "stratified", "two-stage", "with-replacement")

#: algorithm id -> method. Every id ever released stays here.
ALGORITHMS: dict[str, str] = {
    "srswor-v1": "simple",
    "stratified-v1": "stratified",
    "two-stage-pps-v1": "two-stage",
    "srswr-v1": "with-replacement",
}

#: The algorithm a new draw of each method uses.
CURRENT_ALGORITHM: dict[str, str] = {
    "simple": "srswor-v1",
    "stratified": "stratified-v1",
    "two-stage": "two-stage-pps-v1",
    "with-replacement": "srswr-v1",
}

#: Sample sizes beyond this are 100 % inspection in all but name.
MAX_SAMPLE_SIZE = 1_000_000

METHOD_TITLES = {
    "simple": "simple random sample without replacement",
    "stratified": "stratified sample, proportional allocation",
    "two-stage": "two-stage sample, containers by size then equal units in each",
    "with-replacement": "simple random sample WITH replacement, for non-destructive re-checks only",
}

WITH_REPLACEMENT_NOTE = (
    "With replacement: for non-destructive re-checks only. A unit may come up "
    "more than once and is then checked that many times."
)
TWO_STAGE_NOTE = (
    "Two-stage: only the listed containers are opened. Faults that cluster in "
    "containers make this less precise than a simple random sample of the same size."
)


@dataclass(frozen=True, kw_only=True)
class Substitution:
    """A drawn unit that could not be inspected, the unit that replaced it
    (the next one of the substitute sequence) and why."""

    replaced: int
    substitute: int
    reason: str


@dataclass(frozen=True, kw_only=True)
class Draw:
    """One recorded draw: enough to re-derive it from the same frame.

    ``units`` are ascending (with repeats for ``with-replacement``);
    ``level`` is the container level of a stratified or two-stage draw;
    ``containers`` are the 1-based numbers, at that level, of the containers
    a two-stage draw opens, with ``per_container`` units from each;
    ``frame`` is the fingerprint of the structure drawn from.
    """

    method: str
    algorithm: str
    seed: int
    lot_size: int
    sample_size: int
    units: tuple[int, ...]
    frame: str
    level: str | None = None
    container_count: int | None = None
    per_container: int | None = None
    containers: tuple[int, ...] = ()
    substitutions: tuple[Substitution, ...] = ()

    @property
    def with_replacement(self) -> bool:
        return self.method == "with-replacement"

    @property
    def title(self) -> str:
        return METHOD_TITLES[self.method]

    @property
    def note(self) -> str | None:
        """The caution that must accompany this draw wherever it is shown."""
        if self.method == "with-replacement":
            return WITH_REPLACEMENT_NOTE
        if self.method == "two-stage":
            return TWO_STAGE_NOTE
        return None

    @property
    def final_units(self) -> tuple[int, ...]:
        """The units to inspect: ``units`` with the substitutions applied."""
        counts = Counter(self.units)
        for s in self.substitutions:
            counts[s.replaced] -= 1
            counts[s.substitute] += 1
        return tuple(sorted(counts.elements()))

    def to_dict(self) -> dict:
        """A JSON-ready record; :func:`draw_from_dict` reads it back."""
        out = {
            "method": self.method,
            "algorithm": self.algorithm,
            "seed": self.seed,
            "lot_size": self.lot_size,
            "sample_size": self.sample_size,
            "units": list(self.units),
            "frame": self.frame,
            "level": self.level,
            "container_count": self.container_count,
            "per_container": self.per_container,
            "containers": list(self.containers),
            "substitutions": [
                {"replaced": s.replaced, "substitute": s.substitute, "reason": s.reason}
                for s in self.substitutions
            ],
        }
        return out


def draw_from_dict(data: Mapping) -> Draw:
    """Read back :meth:`Draw.to_dict` (shape only; :func:`verify` checks it)."""
    try:
        return Draw(
            method=str(data["method"]),
            algorithm=str(data["algorithm"]),
            seed=int(data["seed"]),
            lot_size=int(data["lot_size"]),
            sample_size=int(data["sample_size"]),
            units=tuple(int(u) for u in data["units"]),
            frame=str(data["frame"]),
            level=data.get("level"),
            container_count=data.get("container_count"),
            per_container=data.get("per_container"),
            containers=tuple(int(c) for c in data.get("containers", ())),
            substitutions=tuple(
                Substitution(replaced=int(s["replaced"]), substitute=int(s["substitute"]), reason=str(s["reason"]))
                for s in data.get("substitutions", ())
            ),
        )
    except (KeyError, TypeError, ValueError) as exc:
        raise FrameError("draw", f"draw: malformed record ({exc!r})") from None


# --- the draw -----------------------------------------------------------------


def _check_int(value, field: str, low: int = 1) -> int:
    if isinstance(value, bool) or not isinstance(value, int) or value < low:
        raise FrameError(field, f"{field}: expected a whole number of at least {low}, got {value!r}")
    return value


def draw(
    structure: LotStructure,
    n: int,
    *,
    method: str = "simple",
    seed: int,
    by: str | None = None,
    containers: int | None = None,
    algorithm: str | None = None,
) -> Draw:
    """Draw ``n`` units of ``structure`` by ``method`` from ``seed``.

    ``method``: ``simple``, ``stratified`` (by level ``by``, default the
    outermost container level), ``two-stage`` (``containers`` = k containers
    at level ``by``, default the level just above the units, then n/k units
    in each) or ``with-replacement`` (non-destructive re-checks only).
    ``algorithm`` defaults to the method's current id; pass a recorded id to
    re-derive an old draw. The seed is a whole number in 0..2**128-1; the
    caller picks it (from OS entropy when none is given) and records it.

    Raises FrameError (``field`` names the offending argument) when the
    request is impossible, e.g. a two-stage design where n is not divisible
    by k, a container holds fewer than n/k units, or a container's selection
    probability k*size/N would exceed 1.
    """
    if not isinstance(structure, LotStructure):
        raise FrameError("structure", f"structure: expected a lot structure, got {type(structure).__name__}")
    if method not in METHODS:
        raise FrameError("method", f"method: expected one of {', '.join(METHODS)}, got {method!r}")
    if algorithm is None:
        algorithm = CURRENT_ALGORITHM[method]
    if algorithm not in ALGORITHMS:
        raise FrameError(
            "algorithm", f"algorithm: unknown id {algorithm!r} (known: {', '.join(sorted(ALGORITHMS))})"
        )
    if ALGORITHMS[algorithm] != method:
        raise FrameError(
            "algorithm", f"algorithm: {algorithm!r} draws by method {ALGORITHMS[algorithm]!r}, not {method!r}"
        )
    seed = check_seed(seed)
    N = structure.size
    _check_int(n, "n")
    if n > MAX_SAMPLE_SIZE:
        raise FrameError("n", f"n: at most {MAX_SAMPLE_SIZE} units per draw, got {n}")
    if method != "with-replacement" and n > N:
        raise FrameError("n", f"n: a sample of {n} is more than the lot's {N} units")
    if by is not None and method not in ("stratified", "two-stage"):
        raise FrameError("by", f"by: only used by the stratified and two-stage methods, not {method!r}")
    if containers is not None and method != "two-stage":
        raise FrameError("containers", f"containers: only used by the two-stage method, not {method!r}")
    if method in ("stratified", "two-stage") and not structure.container_levels:
        raise FrameError(
            "method",
            f"method: a {method} draw needs containers, but this lot is a flat count; "
            "give its structure or manifest",
        )

    stream = WordStream(seed, SAMPLE)
    extra: dict = {}
    if method == "simple":
        units = [v + 1 for v in stream.distinct(N, n)]
    elif method == "with-replacement":
        units = [stream.below(N) + 1 for _ in range(n)]
    elif method == "stratified":
        level = structure.resolve_level(by, default="outer")
        units = _stratified(structure, level, n, stream)
        extra = {"level": level}
    else:
        level = structure.resolve_level(by, default="inner")
        if containers is None:
            raise FrameError(
                "containers", "containers: a two-stage draw needs the number of containers to open (k)"
            )
        k = _check_int(containers, "containers")
        chosen, units = _two_stage(structure, level, n, k, stream)
        extra = {
            "level": level,
            "container_count": k,
            "per_container": n // k,
            "containers": tuple(h + 1 for h in chosen),
        }
    return Draw(
        method=method,
        algorithm=algorithm,
        seed=seed,
        lot_size=N,
        sample_size=n,
        units=tuple(sorted(units)),
        frame=structure.fingerprint,
        **extra,
    )


def _random_order(count: int, stream: WordStream) -> list[int]:
    """A random order of 0..count-1 (Durstenfeld's Fisher-Yates: for i from
    count-1 down to 1, swap position i with position below(i+1))."""
    order = list(range(count))
    for i in range(count - 1, 0, -1):
        j = stream.below(i + 1)
        order[i], order[j] = order[j], order[i]
    return order


def _systematic(weights: list[int], total: int, picks: int, stream: WordStream) -> list[int]:
    """Systematic selection of ``picks`` items in a random order, exact in
    integers: item i gets probability weights[i] / total, each weight <= total
    and sum(weights) == picks * total. Returns the chosen items, ascending.

    The items are first put in a random order, then laid end to end on an
    integer axis; U = below(total) and the item holding each point
    U + j*total (j = 0..picks-1) is chosen. The random order matters on a
    physical load: in numbering order the points would fall at the same
    place in every pallet, so a damaged corner or bottom layer would be
    always or never in the sample.
    """
    order = _random_order(len(weights), stream)
    cumulative = list(accumulate(weights[i] for i in order))
    start_point = stream.below(total)
    return sorted(order[bisect_right(cumulative, start_point + j * total)] for j in range(picks))


def _stratified(structure: LotStructure, level: str, n: int, stream: WordStream) -> list[int]:
    """stratified-v1: proportional allocation, fractional shares settled by
    systematic selection with a random start (see the package docstring)."""
    b = blocks_of(structure, level)
    N = structure.size
    if b.equal is not None or len(set(b.sizes())) == 1:
        # Equal strata have equal fractional shares r/H: the r strata that
        # get one unit more are a simple random sample of the H strata, which
        # is what systematic selection over a random order gives, and needs
        # no list of 10^8 strata.
        H = b.count
        base, r = divmod(n, H)
        extras = stream.distinct(H, r) if r else []
        if base:
            extra_set = set(extras)
            allocation = [(h, base + (h in extra_set)) for h in range(H)]
        else:
            allocation = [(h, 1) for h in sorted(extras)]
    else:
        sizes = b.sizes()
        base_h = [(n * s) // N for s in sizes]
        remainders = [(n * s) % N for s in sizes]  # fractional share * N, exact
        r = n - sum(base_h)
        if r:
            for h in _systematic(remainders, N, r, stream):
                base_h[h] += 1
        allocation = [(h, nh) for h, nh in enumerate(base_h) if nh]
    units: list[int] = []
    for h, nh in allocation:
        first = b.start(h) + 1
        units.extend(first + v for v in stream.distinct(b.size(h), nh))
    return units


def _two_stage(structure: LotStructure, level: str, n: int, k: int, stream: WordStream):
    """two-stage-pps-v1: PPS of k containers (systematic over a random
    order), then SRSWOR of n/k units in each (see the package docstring)."""
    b = blocks_of(structure, level)
    N = structure.size
    if k > b.count:
        raise FrameError(
            "containers", f"containers: the lot has only {b.count} containers at level {level!r}, asked to open {k}"
        )
    if n % k:
        raise FrameError(
            "containers",
            f"containers: a sample of {n} cannot be split evenly over {k} containers "
            "(choose a number of containers that divides the sample size)",
        )
    m = n // k
    if b.equal is not None:
        sizes = None
        smallest = largest = b.equal
        small_at = large_at = 0
    else:
        sizes = b.sizes()
        small_at = min(range(len(sizes)), key=sizes.__getitem__)
        large_at = max(range(len(sizes)), key=sizes.__getitem__)
        smallest, largest = sizes[small_at], sizes[large_at]
    if smallest < m:
        raise FrameError(
            "containers",
            f"containers: {structure.container_label(level, small_at)} holds {smallest} units, fewer than "
            f"the {m} to take from each of {k} opened containers (open more containers)",
        )
    if k * largest > N:
        raise FrameError(
            "containers",
            f"containers: {structure.container_label(level, large_at)} holds {largest} of {N} units, so "
            f"with {k} containers its selection probability {k}*{largest}/{N} would exceed 1 "
            f"(open at most {N // largest}, or draw by a smaller level)",
        )
    if smallest == largest:
        # Equal sizes: PPS is equal probability k/H, and a simple random
        # sample of k containers gives exactly that without listing them.
        chosen = sorted(stream.distinct(b.count, k))
    else:
        # Container h has weight k*N_h against a step of N, so it is chosen
        # with probability k*N_h/N (at most 1, checked above).
        chosen = _systematic([k * s for s in sizes], N, k, stream)
    units: list[int] = []
    for h in chosen:
        first = b.start(h) + 1
        units.extend(first + v for v in stream.distinct(b.size(h), m))
    return chosen, units


# --- substitutes ---------------------------------------------------------------


def _check_frame(structure: LotStructure, recorded: Draw) -> None:
    if structure.fingerprint != recorded.frame:
        raise FrameError(
            "structure",
            "structure: this is not the lot structure the draw was made on "
            f"(fingerprint {structure.fingerprint[:19]}..., draw has {recorded.frame[:19]}...)",
        )


def substitutes(structure: LotStructure, recorded: Draw, count: int) -> tuple[int, ...]:
    """The first ``count`` units of the draw's substitute sequence.

    The sequence is a simple random sample without replacement, in draw
    order, from the units not drawn -- for a two-stage draw only from the
    containers it opens, so no further container needs opening. It comes
    from the seed's second stream (purpose 1), so it never changes the sample
    itself.
    """
    _check_frame(structure, recorded)
    _check_int(count, "count", low=0)
    drawn = set(recorded.units)
    if recorded.method == "two-stage":
        b = blocks_of(structure, recorded.level)
        opened = [h - 1 for h in recorded.containers]
        ends = list(accumulate(b.size(h) for h in opened))
        starts = [b.start(h) for h in opened]

        def unit_of(v: int) -> int:
            i = bisect_right(ends, v)
            return starts[i] + v - (ends[i - 1] if i else 0) + 1

        scope = ends[-1]
        where = f"the {len(opened)} opened containers"
    else:

        def unit_of(v: int) -> int:
            return v + 1

        scope = structure.size
        where = "the lot"
    available = scope - len(drawn)
    if count > available:
        raise FrameError(
            "count", f"count: only {available} units of {where} are not drawn, asked for {count} substitutes"
        )
    stream = WordStream(recorded.seed, SUBSTITUTES)
    return tuple(unit_of(v) for v in stream.distinct(scope, count, skip=lambda v: unit_of(v) in drawn))


def substitute(structure: LotStructure, recorded: Draw, unit: int, reason: str) -> Draw:
    """The draw with ``unit`` replaced by the next substitute, ``reason`` kept.

    ``unit`` must be one of the units still to inspect (a substitute can be
    replaced in turn). Substitutes are consumed strictly in sequence order.
    """
    if not isinstance(reason, str) or not reason.strip():
        raise FrameError("reason", f"reason: expected a reason why the unit cannot be inspected, got {reason!r}")
    if unit not in recorded.final_units:
        raise FrameError("unit", f"unit: {unit!r} is not among the units to inspect")
    nxt = substitutes(structure, recorded, len(recorded.substitutions) + 1)[-1]
    return replace(
        recorded,
        substitutions=recorded.substitutions
        + (Substitution(replaced=unit, substitute=nxt, reason=reason.strip()),),
    )


# --- verification -----------------------------------------------------------------


@dataclass(frozen=True, kw_only=True)
class Verification:
    """Result of re-deriving a draw: ``ok`` when everything matched.

    ``missing`` are re-derived units absent from the list, ``unexpected``
    listed units the re-derived draw does not hold (each with repeats for a
    with-replacement draw); ``problems`` lists every mismatch in words.
    """

    ok: bool
    expected: tuple[int, ...]
    listed: tuple[int, ...]
    missing: tuple[int, ...] = ()
    unexpected: tuple[int, ...] = ()
    problems: tuple[str, ...] = ()

    def describe(self) -> str:
        if self.ok:
            return f"the {len(self.listed)} listed units match the re-derived draw"
        return "; ".join(self.problems)


def compare_units(expected: Sequence[int], listed: Sequence[int]) -> Verification:
    """Compare a listed set of units with a re-derived one (order ignored)."""
    want, have = Counter(expected), Counter(listed)
    missing = tuple(sorted((want - have).elements()))
    unexpected = tuple(sorted((have - want).elements()))
    problems = []
    if unexpected:
        problems.append("listed but not in the re-derived draw: " + ", ".join(map(str, unexpected)))
    if missing:
        problems.append("in the re-derived draw but not listed: " + ", ".join(map(str, missing)))
    return Verification(
        ok=not problems,
        expected=tuple(sorted(expected)),
        listed=tuple(sorted(listed)),
        missing=missing,
        unexpected=unexpected,
        problems=tuple(problems),
    )


def rederive(structure: LotStructure, recorded: Draw) -> Draw:
    """Run the recorded draw again with its own algorithm id."""
    return draw(
        structure,
        recorded.sample_size,
        method=recorded.method,
        seed=recorded.seed,
        by=recorded.level if recorded.method in ("stratified", "two-stage") else None,
        containers=recorded.container_count,
        algorithm=recorded.algorithm,
    )


def verify(structure: LotStructure, recorded: Draw) -> Verification:
    """Re-derive a recorded draw and report every mismatch: the frame, the
    units, the opened containers and each substitute."""
    listed = recorded.units
    try:
        _check_frame(structure, recorded)
        again = rederive(structure, recorded)
    except FrameError as exc:
        return Verification(ok=False, expected=(), listed=tuple(sorted(listed)), problems=(str(exc),))
    result = compare_units(again.units, listed)
    problems = list(result.problems)
    if again.lot_size != recorded.lot_size:
        problems.append(f"lot size recorded as {recorded.lot_size}, the frame holds {again.lot_size}")
    if again.containers != recorded.containers:
        problems.append(
            f"opened containers recorded as {list(recorded.containers)}, re-derived {list(again.containers)}"
        )
    if recorded.substitutions:
        try:
            sequence = substitutes(structure, again, len(recorded.substitutions))
        except FrameError as exc:
            problems.append(str(exc))
        else:
            for i, (s, want) in enumerate(zip(recorded.substitutions, sequence), start=1):
                if s.substitute != want:
                    problems.append(f"substitute {i} recorded as unit {s.substitute}, the sequence gives {want}")
    return replace(result, ok=not problems, problems=tuple(problems))


def verify_units(
    structure: LotStructure,
    units: Sequence[int],
    *,
    n: int,
    seed: int,
    method: str = "simple",
    by: str | None = None,
    containers: int | None = None,
    algorithm: str | None = None,
) -> Verification:
    """Re-derive the draw from its parameters and compare it with ``units``."""
    for u in units:
        structure.check_unit(u, field="units")
    again = draw(structure, n, method=method, seed=seed, by=by, containers=containers, algorithm=algorithm)
    return compare_units(again.units, units)
