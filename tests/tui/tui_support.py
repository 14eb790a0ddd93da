"""Fixtures for the terminal UI tests: real services on a temporary store,
a fixed clock, and a seeded store built once per test run and copied per
test (so each test starts from the same record and may change it)."""

from __future__ import annotations

import shutil
from datetime import datetime, timedelta, timezone
from pathlib import Path

import pytest

from inspector.services import build_services
from inspector.tui import demo

FIXED = datetime(2026, 11, 7, 9, 30, tzinfo=timezone(timedelta(hours=1)))
DEMO_SEED = 20261107


def fixed_clock() -> datetime:
    return FIXED


def open_services(path: Path):
    return build_services(str(path), clock=fixed_clock)


def _decided_lot(wf, lot_id: str, *, received: str, fails: int, critical: bool) -> None:
    """A small earlier lot of the demo supplier, inspected and decided."""
    wf.register_lot(lot_id=lot_id, supplier=demo.DEMO_SUPPLIER, product=demo.DEMO_PRODUCT, size=480,
                    structure="carton=20,jar=24", critical=critical, received_on=received)
    wf.plan(lot_id, defect_class="major", sample=20, accept=1)
    units = wf.draw(lot_id, seed=7 + fails)["units"]
    for i, unit in enumerate(units):
        outcome = "fail" if i < fails else "pass"
        result = wf.record(lot_id, unit, outcome=outcome, by=demo.DEMO_INSPECTOR, defect_class="major",
                           defect="lid not sealed" if outcome == "fail" else None)
        if result.decision is not None:
            return
    wf.decide(lot_id)


@pytest.fixture(scope="session")
def seeded_template(tmp_path_factory) -> Path:
    """A store with the demo lot half inspected and two earlier lots of the
    same supplier (one accepted, one rejected early)."""
    path = tmp_path_factory.mktemp("tui-seed") / "seeded.db"
    services = open_services(path)
    wf = services.workflow
    try:
        demo.load_demo(wf)
        _decided_lot(wf, "HP-2610-03", received="2026-10-03", fails=0, critical=True)
        _decided_lot(wf, "HP-2610-19", received="2026-10-19", fails=2, critical=True)
        lot = demo.DEMO_LOT
        wf.plan(lot, defect_class="major", aql="1.0", rql="5")
        wf.plan(lot, defect_class="critical", sample=20, accept=0)
        wf.draw(lot, seed=DEMO_SEED)
        report = wf.show(lot)
        major = report["classes"]["major"]["open_units"]
        for i, unit in enumerate(major[:12]):
            if i == 3:
                wf.record(lot, unit, outcome="fail", by=demo.DEMO_INSPECTOR, defect_class="major",
                          defect="label skewed", note="photo on file")
            else:
                wf.record(lot, unit, outcome="pass", by=demo.DEMO_INSPECTOR)
    finally:
        services.close()
    return path


@pytest.fixture
def seeded_db(seeded_template, tmp_path) -> Path:
    target = tmp_path / "store.db"
    shutil.copyfile(seeded_template, target)
    return target


@pytest.fixture
def seeded_services(seeded_db):
    services = open_services(seeded_db)
    yield services
    services.close()


@pytest.fixture
def empty_services(tmp_path):
    services = open_services(tmp_path / "empty.db")
    yield services
    services.close()


def make_app(services):
    from inspector.tui.app import InspectorApp

    # A fixed folder keeps the print screen's proposal the same on every machine.
    return InspectorApp(services, output_folder="/srv/sheets")


async def settle(pilot) -> None:
    """Let workers finish and their messages be handled (a worker's message
    may start another worker, hence the rounds)."""
    app = pilot.app
    for _ in range(2):
        await app.workers.wait_for_complete()
        await pilot.pause()


async def wait_for_screen(pilot, name: str, timeout: float = 3.0) -> None:
    """Wait until the screen on view is the one called ``name``."""
    import time

    end = time.monotonic() + timeout
    while type(pilot.app.screen).__name__ != name and time.monotonic() < end:
        await pilot.pause(0.02)
    await settle(pilot)


def screen_text(app) -> str:
    """What the terminal shows, as plain text lines."""
    strips = app.screen._compositor.render_strips()
    return "\n".join("".join(seg.text for seg in strip).rstrip() for strip in strips)


_KEY_NAMES = {"-": "minus", ":": "colon", "/": "slash", " ": "space", ".": "full_stop", ",": "comma",
              "=": "equals_sign", "_": "underscore"}


async def burst(pilot, text: str, end: str | tuple[str, ...] | None = "enter") -> None:
    """Send ``text`` and then ``end`` the way a keyboard-wedge scanner does:
    every key at once, without waiting for the screen between keys."""
    from textual import events

    driver = pilot.app._driver
    for ch in text:
        driver.send_message(events.Key(_KEY_NAMES.get(ch, ch), ch))
    for key in (end,) if isinstance(end, str) else (end or ()):
        driver.send_message(events.Key(key, {"enter": "\r", "tab": "\t", "ctrl+j": "\n"}.get(key)))
    await settle(pilot)
