"""Timing and memory of the lot frame against straightforward versions.

Prints, for each task, the median time of our implementation, the median of
a straightforward implementation of the same task measured in the same run,
their ratio, the peak memory traced while our task ran, and the target.
The machine is shared and noisy: read the ratios, and re-run before drawing
conclusions. Not a test.

    .venv/bin/python benchmarks/bench_frame.py

Scenario (invented): Harrowgate Preserves ships apricot jam; a structured
lot of 10^9 jars (1000 pallets x 10 layers x 100 cartons x 1000 jars) and a
serialized manifest of 200,000 jars in 2,000 cartons.
"""

from __future__ import annotations

import io
import resource
import statistics
import time
import tracemalloc

import numpy as np

from inspector import frame

HUGE = "pallet=1000,layer=10,carton=100,unit=1000"
N_SAMPLE = 1250
MANIFEST_ROWS = 200_000
PER_CARTON = 100


def median_time(fn, repeat: int) -> float:
    fn()  # warm up (imports, caches)
    samples = []
    for _ in range(repeat):
        t = time.perf_counter()
        fn()
        samples.append(time.perf_counter() - t)
    return statistics.median(samples)


def peak_mib(fn) -> float:
    """Peak traced allocation while ``fn`` runs (numpy reports its buffers
    to tracemalloc, so arrays count too)."""
    tracemalloc.start()
    tracemalloc.reset_peak()
    fn()
    _, peak = tracemalloc.get_traced_memory()
    tracemalloc.stop()
    return peak / 2**20


def row(task, ours, base, target, mib=None, mib_target=None, note=""):
    ratio = base / ours
    flag = "ok" if ours <= target and (mib_target is None or mib <= mib_target) else "OVER TARGET"
    mem = f"{mib:7.2f} MiB" if mib is not None else " " * 11
    mem_target = f" / {mib_target} MiB" if mib_target is not None else ""
    print(
        f"{task:46s} {ours * 1e3:9.2f} ms {base * 1e3:10.2f} ms {ratio:7.1f}x {mem}"
        f"   <= {target * 1e3:.0f} ms{mem_target}  {flag} {note}"
    )


# --- straightforward versions -------------------------------------------------------


def naive_addresses(levels, units):
    """Address strings by repeated division, the obvious way."""
    out = []
    for u in units:
        rest, parts = int(u) - 1, []
        for name, count in reversed(levels):
            rest, pos = divmod(rest, count)
            parts.append(f"{name} {pos + 1}")
        out.append(" / ".join(reversed(parts)))
    return out


def naive_choice_draw(seed):
    """numpy's own sampler at full size, then the obvious address loop."""
    levels = frame.parse_structure(HUGE).levels
    rng = np.random.default_rng(seed)
    units = np.sort(rng.choice(10**9, N_SAMPLE, replace=False) + 1)
    return naive_addresses(levels, units)


def naive_permutation_draw(seed, N):
    """Number every unit and shuffle: only feasible for a smaller lot."""
    rng = np.random.default_rng(seed)
    units = np.sort(rng.permutation(np.arange(1, N + 1))[:N_SAMPLE])
    return naive_addresses((("unit", N),), units)


def manifest_text() -> str:
    lines = ["serial,container"]
    for i in range(MANIFEST_ROWS):
        lines.append(f"HP-AJ-{i + 1:07d},HP-C{i // PER_CARTON + 1:04d}")
    return "\n".join(lines) + "\n"


def naive_manifest_draw(text, seed):
    """pandas read_csv, a dict of serial -> row, numpy choice, lookups."""
    import pandas as pd

    table = pd.read_csv(io.StringIO(text), dtype=str)
    if table["serial"].duplicated().any():
        raise ValueError("duplicate serials")
    by_serial = dict(zip(table["serial"], range(1, len(table) + 1)))
    rng = np.random.default_rng(seed)
    rows = np.sort(rng.choice(len(table), N_SAMPLE, replace=False))
    picked = table.iloc[rows]
    out = list(zip(picked["container"], picked["serial"]))
    assert by_serial[out[0][1]] == rows[0] + 1
    return out


# --- ours -----------------------------------------------------------------------------


def ours_draw(structure, seed, **kwargs):
    d = frame.draw(structure, N_SAMPLE, seed=seed, **kwargs)
    return [str(a) for a in structure.addresses(d.units)]


def ours_manifest(text, seed):
    lot = frame.manifest_from_csv_text(text)
    d = frame.draw(lot, N_SAMPLE, seed=seed)
    out = [(a.container, a.serial) for a in lot.addresses(d.units)]
    assert lot.unit_at(out[0][1]) == d.units[0]
    return out


def main() -> None:
    print("Draw n = 1250 units and map them to addresses (lot of 10^9 jars unless stated).")
    print("ratio = baseline time / our time (above 1: we are faster)")
    print(f"{'task':46s} {'ours':>12s} {'baseline':>13s} {'ratio':>8s} {'peak mem':>11s}   target")
    huge = frame.parse_structure(HUGE)
    seeds = iter(range(10**6))

    ours = median_time(lambda: ours_draw(huge, next(seeds)), 41)
    mib = peak_mib(lambda: ours_draw(huge, next(seeds)))
    base = median_time(lambda: naive_choice_draw(next(seeds)), 41)
    row("simple", ours, base, 0.020, mib, 50, "(baseline: numpy choice at 10^9)")

    N_small = 10**7
    base = median_time(lambda: naive_permutation_draw(next(seeds), N_small), 5)
    base_mib = peak_mib(lambda: naive_permutation_draw(next(seeds), N_small))
    row(
        "simple", ours, base, 0.020, mib, 50,
        f"(baseline: permute all of a 10^7 lot, {base_mib:.0f} MiB)",
    )

    for label, kwargs in [
        ("stratified by pallet", dict(method="stratified")),
        ("stratified by carton (10^6 strata)", dict(method="stratified", by="carton")),
        ("two-stage 125 cartons x 10", dict(method="two-stage", containers=125)),
        ("with replacement", dict(method="with-replacement")),
    ]:
        t = median_time(lambda: ours_draw(huge, next(seeds), **kwargs), 21)
        m = peak_mib(lambda: ours_draw(huge, next(seeds), **kwargs))
        row(label, t, base, 0.020, m, 50, "(baseline: permute a 10^7 lot)")

    text = manifest_text()
    ours = median_time(lambda: ours_manifest(text, next(seeds)), 7)
    mib = peak_mib(lambda: ours_manifest(text, next(seeds)))
    base = median_time(lambda: naive_manifest_draw(text, next(seeds)), 7)
    row(
        "200,000-row manifest: parse, draw, addresses", ours, base, 1.0, mib, None,
        "(baseline: pandas read_csv + dict)",
    )
    lot = frame.manifest_from_csv_text(text)
    t = median_time(lambda: lot.unit_at(f"HP-AJ-{next(seeds) % MANIFEST_ROWS + 1:07d}"), 1001)
    t2 = median_time(lambda: lot.address_of(next(seeds) % MANIFEST_ROWS + 1), 1001)
    print(f"  manifest lookups: serial -> unit {t * 1e6:.1f} us, unit -> address {t2 * 1e6:.1f} us")
    maxrss = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
    print(f"  whole process peak resident memory (interpreter, numpy, pandas, baselines): {maxrss:.0f} MiB")


if __name__ == "__main__":
    main()
