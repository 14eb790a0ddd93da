"""Durability and concurrency on real files with real processes.

A bench process records results and acknowledges each only after its commit;
we kill it with SIGKILL at random moments, many times. Afterwards every
acknowledged result must be there, SQLite's integrity check must pass, no
action may be half-written, and the chain must verify.
"""

from __future__ import annotations

import os
import random
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from inspector.records import open_store
from records_fixtures import INES_SECRET, LOT, LOT_SIZE, SteppingClock

RECORDER = Path(__file__).with_name("recorder.py")
KILLS = 15

pytestmark = pytest.mark.skipif(not hasattr(signal, "SIGKILL"), reason="needs SIGKILL (POSIX)")


def _prepare(path: Path) -> int:
    s = open_store(path, clock=SteppingClock())
    with s.transaction() as tx:
        supplier = tx.add_supplier("Harrowgate Preserves")
        product = tx.add_product("apricot jam 370 g jar")
        ines = tx.add_person("Ines Marlowe", "inspector", INES_SECRET)
        tx.add_lot(lot_id=LOT, supplier_id=supplier, product_id=product, quantity=LOT_SIZE,
                   received_on="2025-03-04")
    s.close()
    return ines


def _spawn(path: Path, person: int, first: int, count: int, *extra: str) -> subprocess.Popen:
    return subprocess.Popen(
        [sys.executable, str(RECORDER), str(path), LOT, str(person), str(first), str(count), *extra],
        stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True,
    )


def _acks(stdout: str) -> list[tuple[int, int]]:
    """Acknowledged (result id, unit) pairs: complete lines only."""
    out = []
    for line in stdout.splitlines(keepends=True):
        if line.startswith("ack ") and line.endswith("\n"):
            _, result, unit = line.split()
            out.append((int(result), int(unit)))
    return out


def _check_whole(path: Path, acknowledged: list[tuple[int, int]]) -> list:
    s = open_store(path)
    try:
        assert s.integrity_check() == "ok"
        report = s.verify_chain()
        assert report.ok, report.broken and report.broken.describe()
        with s.reading() as r:
            results = r.results(LOT)
            events = [e for e in r.events(LOT) if e.kind == "result"]
        by_id = {x.id: x for x in results}
        for result_id, unit in acknowledged:
            assert result_id in by_id, f"acknowledged result {result_id} (unit {unit}) is lost"
            assert by_id[result_id].unit == unit
        # no half-written action: each result has exactly its event, and back
        pointed = sorted(e.detail["result"] for e in events)
        assert pointed == sorted(by_id), "a result without its event, or an event without its result"
        units = [x.unit for x in results]
        assert len(units) == len(set(units)), "a unit was recorded twice"
        return results
    finally:
        s.close()


def test_acknowledged_results_survive_sigkill_at_random_moments(tmp_path):
    path = tmp_path / "inspector.db"
    person = _prepare(path)
    seed = int.from_bytes(os.urandom(4), "big")
    rng = random.Random(seed)
    acknowledged: list[tuple[int, int]] = []
    killed_while_recording = 0
    started = time.monotonic()
    for run in range(KILLS):
        proc = _spawn(path, person, first=run * 100_000 + 1, count=50_000)
        seen = ""
        if rng.random() < 0.2:
            time.sleep(rng.uniform(0, 0.08))  # maybe still starting up or opening the store
        else:
            assert proc.stdout.readline() == "ready\n"
            seen = proc.stdout.readline()  # the first commit is through: now in the stream of commits
            assert seen.startswith("ack "), seen
            time.sleep(rng.uniform(0, 0.1))
        proc.send_signal(signal.SIGKILL)
        stdout, stderr = proc.communicate(timeout=30)
        stdout = seen + stdout
        assert proc.returncode == -signal.SIGKILL or proc.returncode == 0, stderr
        assert "Traceback" not in stderr, stderr
        run_acks = _acks(stdout)
        killed_while_recording += bool(run_acks)
        acknowledged += run_acks
    elapsed = time.monotonic() - started
    # the test means something only if kills landed amid recording
    assert killed_while_recording >= KILLS // 2, f"seed {seed}: too few runs got to record"
    results = _check_whole(path, acknowledged)
    assert len(results) >= len(acknowledged)
    assert elapsed < 60, f"seed {seed}: {KILLS} kill runs took {elapsed:.1f} s"


@pytest.mark.parametrize("busy_ms", [5000, 1], ids=["sqlite-waits", "store-retries"])
def test_two_benches_recording_on_one_lot_lose_and_duplicate_nothing(tmp_path, busy_ms):
    path = tmp_path / "inspector.db"
    person = _prepare(path)
    go = tmp_path / "go"
    count = 60
    PACE = ("--pause-ms", "1", "--hold-ms", "1")
    procs = [
        _spawn(path, person, 1, count, "--busy-ms", str(busy_ms), "--go", str(go), *PACE),
        _spawn(path, person, 1001, count, "--busy-ms", str(busy_ms), "--go", str(go), *PACE),
    ]
    for proc in procs:
        assert proc.stdout.readline() == "ready\n"
    go.touch()  # both start recording at the same moment
    outputs = [proc.communicate(timeout=120) for proc in procs]
    acknowledged = []
    for proc, (stdout, stderr) in zip(procs, outputs):
        assert "locked" not in stderr.lower() and "busy" not in stderr.lower(), stderr
        assert proc.returncode == 0, stderr
        assert stderr == ""
        acks = _acks(stdout)
        assert len(acks) == count
        acknowledged += acks
    results = _check_whole(path, acknowledged)
    assert sorted(x.unit for x in results) == list(range(1, 1 + count)) + list(range(1001, 1001 + count))
    # the two streams really interleaved (otherwise this tested nothing)
    ids_first = [rid for rid, unit in acknowledged if unit < 1000]
    ids_second = [rid for rid, unit in acknowledged if unit > 1000]
    assert min(ids_second) < max(ids_first) and min(ids_first) < max(ids_second)


def test_two_processes_creating_a_new_store_together_both_succeed(tmp_path):
    path = tmp_path / "fresh.db"
    go = tmp_path / "go"
    code = (
        "import os, sys, time\n"
        "go = sys.argv[2]\n"
        "while not os.path.exists(go): time.sleep(0.001)\n"
        "from inspector.records import open_store\n"
        "s = open_store(sys.argv[1])\n"
        "with s.transaction() as tx: tx.add_supplier(sys.argv[3])\n"
        "print(s.schema_version)\n"
    )
    procs = [subprocess.Popen([sys.executable, "-c", code, str(path), str(go), name],
                              stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
             for name in ("Harrowgate Preserves", "Quayside Tins")]
    time.sleep(0.3)
    go.touch()
    for proc in procs:
        stdout, stderr = proc.communicate(timeout=60)
        assert proc.returncode == 0, stderr
        assert stdout.strip() == "2"
    s = open_store(path)
    with s.reading() as r:
        assert sorted(x.name for x in r.suppliers()) == ["Harrowgate Preserves", "Quayside Tins"]
    assert s.verify_chain().ok
    s.close()
