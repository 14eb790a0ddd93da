"""Two inspectors recording on one lot at the same time, in two processes:
nothing lost, nothing duplicated, no "database is locked"."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

from workflow_fixtures import INSPECTOR, LOT, SECOND_INSPECTOR, drawn_lot

BENCH = Path(__file__).with_name("bench.py")


def test_two_benches_on_one_lot_lose_and_duplicate_nothing(wf, db, tmp_path, services):
    units = sorted(drawn_lot(wf, sample=80, accept=5))
    # Both walk the whole sample from opposite ends, so every unit is tried by
    # both: exactly one must win each unit and the other be refused cleanly.
    orders = {INSPECTOR: units, SECOND_INSPECTOR: list(reversed(units))}
    go = tmp_path / "go"
    procs = {
        name: subprocess.Popen(
            [sys.executable, str(BENCH), str(db), LOT, name, ",".join(map(str, order)), str(go)],
            stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
        for name, order in orders.items()
    }
    for proc in procs.values():
        assert proc.stdout.readline() == "ready\n"
    go.touch()
    won: dict[int, str] = {}
    for name, proc in procs.items():
        stdout, stderr = proc.communicate(timeout=120)
        assert proc.returncode == 0, stderr
        assert "locked" not in (stdout + stderr).lower() and stderr == ""
        for line in stdout.splitlines():
            kind, unit, rest = line.split(" ", 2)
            if kind == "ok":
                assert int(unit) not in won, f"unit {unit} recorded by both"
                won[int(unit)] = name
            else:
                assert kind == "refused" and "already has a major result" in rest, line
    assert sorted(won) == units
    assert len(set(won.values())) == 2, "the two benches did not really overlap"
    shown = wf.show(LOT)
    assert sorted(r["unit"] for r in shown["results"]) == units  # one entry per unit
    assert {r["unit"]: r["by"] for r in shown["results"]} == won
    assert shown["classes"]["major"]["open"] == 0
    assert services.store.verify_chain().ok
