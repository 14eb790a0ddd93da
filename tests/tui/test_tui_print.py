"""The print screen writes the chosen sheets through the sheet renderer and
refuses a folder that does not exist."""

from __future__ import annotations

import asyncio

from tui_support import make_app, screen_text, settle

from inspector.tui.screens import open_lot_screen


def test_the_release_sheet_is_written_where_asked(seeded_services, tmp_path):
    lot = "HP-2610-03"
    out = tmp_path / "sheets"
    out.mkdir()

    async def go():
        app = make_app(seeded_services)
        async with app.run_test(size=(80, 24)) as pilot:
            await settle(pilot)
            open_lot_screen(app, "print", lot)
            await settle(pilot)
            folder = app.screen.query_one("#folder")
            folder.value = str(out / "missing")
            await pilot.press("ctrl+s")
            await settle(pilot)
            assert "output folder: no such folder" in screen_text(app)
            folder.value = str(out)
            await pilot.press("ctrl+s")
            await settle(pilot)
            shown = screen_text(app)
            assert "wrote 1 sheet" in shown
            assert "✔ release:" in shown

    asyncio.run(go())
    written = list(out.iterdir())
    assert [p.name for p in written] == [f"{lot}-release.pdf"]
    assert written[0].read_bytes().startswith(b"%PDF")
