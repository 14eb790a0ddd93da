"""The plan screen: recomputes in a worker as the inputs change, keeps a
plan for comparison, and adopts a code-letter table plan through the
workflow."""

from __future__ import annotations

import asyncio

from tui_support import make_app, screen_text, settle

from inspector.tui import demo
from inspector.tui.screens import open_lot_screen


def test_the_plan_follows_the_inputs_and_a_table_plan_is_adopted(empty_services):
    wf = empty_services.workflow
    demo.load_demo(wf)
    lot = demo.DEMO_LOT

    async def go():
        app = make_app(empty_services)
        async with app.run_test(size=(80, 24)) as pilot:
            await settle(pilot)
            open_lot_screen(app, "plan", lot)
            await settle(pilot)
            await pilot.pause(0.3)
            await settle(pilot)
            screen = app.screen
            first = screen.on_view
            # inspector.stats.design for N=15552, AQL 1 %, RQL 5 %, risks 5 %/10 %
            assert (first.sample_size, first.accept) == (132, 3)
            assert "Pa at AQL       0.957" in screen_text(app)
            await pilot.press("f8")  # keep it, then tighten the RQL
            screen.query_one("#rql").value = "3"
            await pilot.pause(0.3)
            await settle(pilot)
            assert screen.kept is first and screen.on_view.sample_size > first.sample_size
            assert "kept ·" in screen_text(app)
            screen.query_one("#rql").value = "x"
            await pilot.pause(0.3)
            await settle(pilot)
            assert "RQL: expected a number, got 'x'" in screen_text(app)
            await pilot.press("ctrl+s")  # nothing on view: nothing adopted
            await settle(pilot)
            assert wf.show(lot)["plans"] == {}
            await pilot.press("ctrl+t")  # the code-letter tables, level II, AQL 1.0
            await pilot.pause(0.3)
            await settle(pilot)
            assert "route: table, normal in force" in screen_text(app)
            await pilot.press("ctrl+s")
            await settle(pilot)
            assert "saved: major plan n=315 Ac=7 Re=8" in screen_text(app)
        plan = wf.show(lot)["plans"]["major"]
        # MIL-STD-105E Table I: 15,552 units at level II is code letter M (315 units);
        # Table II-A, M at AQL 1.0: Ac 7, Re 8 (as inspector.stats.tables records it)
        assert (plan["chosen_by"], plan["sample_size"], plan["accept"]) == ("table", 315, 7)

    asyncio.run(go())
