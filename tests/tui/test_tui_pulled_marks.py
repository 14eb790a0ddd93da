"""Pulled marks on the pick list are recorded with the lot: they are in the
store once the box shows them, a new run of the app shows them again, and
taking a mark back is a new entry."""

from __future__ import annotations

import asyncio

from tui_support import make_app, open_services, screen_text, settle

from inspector.tui import demo
from inspector.tui.screens import open_lot_screen

LOT = demo.DEMO_LOT


async def _open_draw(pilot) -> None:
    await settle(pilot)
    open_lot_screen(pilot.app, "draw", LOT)
    await settle(pilot)


def _first_row_unit(app) -> int:
    from textual.widgets import DataTable

    table = app.screen.query_one("#picks", DataTable)
    return int(table.coordinate_to_cell_key((0, 0)).row_key.value)


def _box(app, unit: int) -> str:
    from textual.widgets import DataTable

    return app.screen.query_one("#picks", DataTable).get_cell(str(unit), "pulled")


def test_a_mark_is_recorded_survives_a_restart_and_is_taken_back_as_a_new_entry(seeded_db):
    asyncio.run(_marks(seeded_db))


async def _marks(db):
    services = open_services(db)
    try:
        wf = services.workflow
        assert wf.pulled_marks(LOT)["pulled"] == []
        app = make_app(services)
        async with app.run_test(size=(80, 24)) as pilot:
            await _open_draw(pilot)
            unit = _first_row_unit(app)
            assert "pulled 0 of 132 (marks recorded with the lot)" in screen_text(app)
            await pilot.press("space")
            await settle(pilot)
            assert wf.pulled_marks(LOT)["pulled"] == [unit]
            assert "pulled 1 of 132 (marks recorded with the lot)" in screen_text(app)
            assert _box(app, unit) == "[✓]"
    finally:
        services.close()

    # a new run of the app on the same store shows the mark again
    services = open_services(db)
    try:
        wf = services.workflow
        app = make_app(services)
        async with app.run_test(size=(80, 24)) as pilot:
            await _open_draw(pilot)
            assert "pulled 1 of 132" in screen_text(app)
            assert _box(app, unit) == "[✓]"
            await pilot.press("space")  # the cursor is on the first row: take the mark back
            await settle(pilot)
            assert "pulled 0 of 132" in screen_text(app)
            assert _box(app, unit) == "[ ]"
        marks = wf.pulled_marks(LOT)
        assert marks["pulled"] == []
        # both entries stay in the record: the mark and its taking back
        events = [e for e in wf.show(LOT)["events"] if e["kind"] == "pulled mark"]
        assert len(events) == 2
    finally:
        services.close()
