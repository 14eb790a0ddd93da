"""Timing of the terminal UI (a script, not a test: the machine is shared).

1. Cold start: a fresh interpreter opens the UI on a store with one lot
   and shows the lots screen with the lot listed (headless, 80x24).
   Target: at most 1.5 s. Baseline in the same run: a fresh interpreter that
   only starts and exits.
2. Key to "saved": at the bench of a lot that already holds 2,000 results,
   the time from the verdict key to the refresh that shows the entry saved
   (the store has committed before the message that draws "saved" is sent).
   Target: at most 50 ms. Baseline in the same process: the same store write
   through the workflow without the UI.

    .venv/bin/python benchmarks/bench_tui.py [--results 2000] [--repeats 15]

The store with 2,000 results is built once through the workflow (about a
minute) and kept under the system's temporary folder for later runs.
"""

from __future__ import annotations

import argparse
import asyncio
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
from datetime import datetime, timedelta, timezone
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

LOT = "HP-2611-07"
PERSON = "Ines Marlowe"

CHILD = r"""
import sys, time, asyncio
t0 = float(sys.argv[2])
from inspector.services import build_services
from inspector.tui.app import InspectorApp

async def main():
    services = build_services(sys.argv[1])
    app = InspectorApp(services)
    async with app.run_test(size=(80, 24)) as pilot:
        from inspector.tui.screens.lots import LotsScreen
        while True:
            screen = app.screen
            if isinstance(screen, LotsScreen) and screen.loaded and screen.lots:
                break
            await pilot.pause(0.005)
        await pilot.pause()  # the frame that shows it
        print(time.time() - t0, flush=True)
    services.close()

asyncio.run(main())
"""


def clock():
    return datetime(2026, 11, 7, 9, 30, tzinfo=timezone(timedelta(hours=1)))


def cold_start(db: Path, repeats: int) -> tuple[list[float], list[float]]:
    ui, bare = [], []
    for _ in range(repeats):
        t0 = time.time()
        out = subprocess.run([sys.executable, "-c", CHILD, str(db), repr(t0)], capture_output=True, text=True,
                             cwd=ROOT, check=True)
        ui.append(float(out.stdout.strip().splitlines()[-1]))
        t0 = time.perf_counter()
        subprocess.run([sys.executable, "-c", "pass"], check=True)
        bare.append(time.perf_counter() - t0)
    return ui, bare


def build_store(path: Path, results: int, extra: int) -> None:
    from inspector.services import build_services

    services = build_services(str(path), clock=clock)
    wf = services.workflow
    wf.add_person(name=PERSON, role="inspector", secret="bench-apricot-07")
    wf.register_lot(lot_id=LOT, supplier="Harrowgate Preserves", product="apricot jam 370 g jar",
                    size=18 * 4 * 9 * 24, structure="pallet=18,layer=4,carton=9,jar=24")
    # A large typed plan so that 2,000 passes leave the lot open.
    wf.plan(LOT, defect_class="major", sample=results + extra, accept=results // 2)
    units = wf.draw(LOT, seed=20261107)["units"]
    for unit in units[:results]:
        wf.record(LOT, unit, outcome="pass", by=PERSON)
    services.close()


def store_with_results(results: int, extra: int) -> Path:
    cache = Path(tempfile.gettempdir()) / f"inspector-bench-tui-{results}-{extra}.db"
    if not cache.exists():
        print(f"building a store with {results} results (once) ...", flush=True)
        tmp = cache.with_suffix(".partial")
        for suffix in ("", "-wal", "-shm"):
            Path(str(tmp) + suffix).unlink(missing_ok=True)
        build_store(tmp, results, extra)
        tmp.rename(cache)
    return cache


def open_units(db: Path) -> list:
    from inspector.services import build_services

    services = build_services(str(db), clock=clock)
    try:
        return list(services.workflow.show(LOT)["classes"]["major"]["open_units"])
    finally:
        services.close()


async def ui_latencies(db: Path, units: list) -> list[float]:
    from inspector.services import build_services
    from inspector.tui.app import InspectorApp
    from inspector.tui.screens import open_lot_screen

    services = build_services(str(db), clock=clock)
    app = InspectorApp(services, bench_person=PERSON)
    out = []
    async with app.run_test(size=(80, 24)) as pilot:
        async def settle():
            for _ in range(3):
                await app.workers.wait_for_complete()
                await pilot.pause()

        await settle()
        open_lot_screen(app, "bench", LOT)
        await settle()
        bench = app.screen
        for unit in units:
            bench.query_one("#entry").value = str(unit)
            await pilot.press("enter")
            await settle()
            await pilot.press("space")  # the pass key that acts at once (letters wait 30 ms for a scan)
            await settle()
            if bench.last_latency is None or "saved" not in bench.notice().kind:
                raise SystemExit(f"unit {unit} was not shown saved: {bench.notice().render()}")
            out.append(bench.last_latency)
            bench.last_latency = None
    services.close()
    return out


def direct_latencies(db: Path, units: list) -> list[float]:
    from inspector.services import build_services

    services = build_services(str(db), clock=clock)
    out = []
    for unit in units:
        t0 = time.perf_counter()
        services.workflow.record(LOT, unit, outcome="pass", by=PERSON)
        out.append(time.perf_counter() - t0)
    services.close()
    return out


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--results", type=int, default=2000)
    parser.add_argument("--repeats", type=int, default=15)
    args = parser.parse_args()

    work = Path(tempfile.mkdtemp(prefix="inspector-bench-tui-"))
    try:
        small = work / "small.db"
        from inspector.services import build_services

        services = build_services(str(small), clock=clock)
        services.workflow.register_lot(lot_id=LOT, supplier="Harrowgate Preserves", product="apricot jam 370 g jar",
                                       size=15552, structure="pallet=18,layer=4,carton=9,jar=24")
        services.close()
        ui, bare = cold_start(small, max(5, args.repeats // 3))
        m_ui, m_bare = statistics.median(ui), statistics.median(bare)
        print(f"cold start to the lots screen: median {m_ui * 1000:.0f} ms over {len(ui)} runs "
              f"(target <= 1500 ms: {'met' if m_ui <= 1.5 else 'NOT met'}); bare interpreter "
              f"{m_bare * 1000:.0f} ms; ratio {m_ui / m_bare:.1f}x")

        cached = store_with_results(args.results, extra=2 * args.repeats + 10)
        units = open_units(cached)[: 2 * args.repeats]
        ui_db, direct_db = work / "ui.db", work / "direct.db"
        shutil.copyfile(cached, ui_db)
        shutil.copyfile(cached, direct_db)
        ui_lat = asyncio.run(ui_latencies(ui_db, units[: args.repeats]))
        direct = direct_latencies(direct_db, units[: args.repeats])
        m_key, m_direct = statistics.median(ui_lat), statistics.median(direct)
        print(f"key to 'saved' on screen with {args.results} results in the lot: median {m_key * 1000:.1f} ms "
              f"over {len(ui_lat)} entries (target <= 50 ms: {'met' if m_key <= 0.05 else 'NOT met'}); "
              f"max {max(ui_lat) * 1000:.1f} ms")
        print(f"the same store write without the UI (workflow.record): median {m_direct * 1000:.1f} ms; "
              f"ratio UI/direct {m_key / m_direct:.2f}x")
    finally:
        shutil.rmtree(work, ignore_errors=True)
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
