"""Snapshots of every screen at 80x24 and 120x40, from a seeded store with a
fixed clock. Regenerate (after a reviewed change of the screens, or with a
Textual bump) with ``pytest tests/tui --snapshot-update``."""

from __future__ import annotations

import pytest
from tui_support import burst, make_app, settle

from inspector.tui import demo
from inspector.tui.screens import open_lot_screen

SIZES = [pytest.param((80, 24), id="80x24"), pytest.param((120, 40), id="120x40")]


def lot_screen(name: str, lot: str = demo.DEMO_LOT, then=None):
    async def run_before(pilot):
        await settle(pilot)
        open_lot_screen(pilot.app, name, lot)
        await settle(pilot)
        if then is not None:
            await then(pilot)
            await settle(pilot)

    return run_before


def other_screen(make, then=None):
    async def run_before(pilot):
        await settle(pilot)
        pilot.app.push_screen(make())
        await settle(pilot)
        if then is not None:
            await then(pilot)
            await settle(pilot)

    return run_before


async def _until_recomputed(pilot, done) -> None:
    """Wait until the plan screen has recomputed for what is on view and no
    recompute is waiting for a pause in typing (at most 10 s). On a busy
    machine the pause can outlast any fixed sleep."""
    screen = pilot.app.screen
    for _ in range(200):
        await pilot.pause(0.05)
        await settle(pilot)
        if screen._timer is None and screen.on_view is not None and done(screen.on_view):
            return
    raise AssertionError("the plan screen did not recompute")


async def _compare_two_plans(pilot):
    await _until_recomputed(pilot, lambda figures: True)  # the designed plan is on view
    await pilot.press("f8")  # keep the designed plan, then look at a tighter RQL beside it
    pilot.app.screen.query_one("#rql").value = "3"
    await _until_recomputed(pilot, lambda figures: figures.rql == pytest.approx(0.03))


async def _mark_two_pulled(pilot):
    await pilot.press("space", "space")


async def _unit_on_bench(pilot):
    unit = pilot.app.screen.report["classes"]["critical"]["open_units"][0]
    await burst(pilot, str(unit))


async def _empty_form_saved(pilot):
    await pilot.press("ctrl+s")


async def _settled(pilot):
    await settle(pilot)


def _register():
    from inspector.tui.screens.register import RegisterScreen

    return RegisterScreen()


def _people():
    from inspector.tui.screens.people import PeopleScreen

    return PeopleScreen()


CASES = {
    "lots": (None, None),
    "register": (other_screen(_register, _empty_form_saved), None),
    "plan": (lot_screen("plan", then=_compare_two_plans), None),
    "draw": (lot_screen("draw", then=_mark_two_pulled), None),
    "bench": (lot_screen("bench", then=_unit_on_bench), None),
    "decision": (lot_screen("decision", lot="HP-2610-19"), None),
    "print": (lot_screen("print", lot="HP-2610-03"), None),
    "history": (lot_screen("history"), None),
    "people": (other_screen(_people), None),
}


@pytest.mark.parametrize("size", SIZES)
@pytest.mark.parametrize("screen", list(CASES))
def test_screen_snapshot(screen, size, seeded_services, snap_compare):
    run_before, _ = CASES[screen]
    app = make_app(seeded_services)
    assert snap_compare(app, terminal_size=size, run_before=run_before or _settled)


@pytest.mark.parametrize("size", SIZES)
def test_empty_store_offers_the_demo_lot_snapshot(size, empty_services, snap_compare):
    app = make_app(empty_services)
    assert snap_compare(app, terminal_size=size, run_before=_settled)
