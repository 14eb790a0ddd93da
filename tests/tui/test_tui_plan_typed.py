"""The plan screen's third route: a plan typed as n and Ac (as a contract
states it), with its own quality levels and risks at this lot size; bad n or
Ac is shown beside the fields and nothing is adopted."""

from __future__ import annotations

import asyncio

from scipy.stats import hypergeom
from tui_support import make_app, screen_text, settle

from inspector.tui import demo
from inspector.tui.screens import open_lot_screen


async def _typed(pilot, n: str, c: str) -> None:
    screen = pilot.app.screen
    screen.query_one("#typed_n").value = n
    screen.query_one("#typed_c").value = c
    await pilot.pause(0.3)  # past the pause in typing the screen waits for before recomputing
    await settle(pilot)


def _typed_error(app) -> str:
    return str(app.screen.query_one("#typed-error").render())


def test_a_typed_plan_shows_its_own_levels_and_is_adopted(empty_services):
    wf = empty_services.workflow
    demo.load_demo(wf)
    lot = demo.DEMO_LOT
    N = wf.show(lot)["size"]

    async def go():
        app = make_app(empty_services)
        async with app.run_test(size=(80, 24)) as pilot:
            await settle(pilot)
            open_lot_screen(app, "plan", lot)
            await settle(pilot)
            text = screen_text(app)
            assert "^t  risk/table/typed" in text and "drop compared" in text  # the whole key strip at 80x24
            await pilot.press("ctrl+t", "ctrl+t")  # design -> tables -> typed
            await settle(pilot)
            assert "route: n and Ac as typed" in screen_text(app)
            screen = app.screen

            # bad n, then bad Ac: shown beside the fields, nothing on view, nothing adopted
            await _typed(pilot, "8O", "2")
            assert _typed_error(app).startswith("n: expected a whole number from 1 to 15,552")
            assert "'8O'" in _typed_error(app) and screen.on_view is None
            await pilot.press("ctrl+s")
            await settle(pilot)
            assert wf.show(lot)["plans"] == {}
            await _typed(pilot, "80", "80")
            assert _typed_error(app) == "Ac: expected a whole number from 0 to 79 (below n = 80), got '80'"
            await pilot.press("ctrl+s")
            await settle(pilot)
            assert wf.show(lot)["plans"] == {}

            await _typed(pilot, "80", "2")
            f = screen.on_view
            assert _typed_error(app) == ""
            assert (f.route, f.sample_size, f.accept, f.reject) == ("typed", 80, 2, 3)
            d_aql, d_rql = round(f.aql * N), round(f.rql * N)
            # the plan's own levels, checked against scipy.stats.hypergeom (reference library):
            # the largest D with Pa >= 0.95 and the smallest D with Pa <= 0.10
            pa = lambda d: hypergeom(N, d, 80).cdf(2)  # noqa: E731
            assert pa(d_aql) >= 0.95 > pa(d_aql + 1)
            assert pa(d_rql) <= 0.10 < pa(d_rql - 1)
            assert abs(f.pa_at_aql - pa(d_aql)) < 1e-9 and abs(f.pa_at_rql - pa(d_rql)) < 1e-9
            # ATI = n + (N - n)(1 - Pa) (common practice: the definition of average total inspection)
            assert abs(f.ati_at_aql - (80 + (N - 80) * (1 - pa(d_aql)))) < 1e-6
            assert f.aoql > 0
            text = screen_text(app)
            assert "typed" in text and "Pa at AQL" in text and "AOQL" in text
            for name, level in (("AQL mark", f.aql), ("RQL mark", f.rql)):
                assert f"{name:<11}{f'{level * 100:.2f} %':>10}" in text

            await pilot.press("ctrl+s")
            await settle(pilot)
            assert "saved: major plan n=80 Ac=2 Re=3" in screen_text(app)
        plan = wf.show(lot)["plans"]["major"]
        assert (plan["chosen_by"], plan["sample_size"], plan["accept"]) == ("typed", 80, 2)
        # the screen's levels are the ones the workflow records with the typed plan
        assert (plan["details"]["defectives_accepted_95"], plan["details"]["defectives_rejected_90"]) \
            == (d_aql, d_rql)

    asyncio.run(go())
