"""The whole workflow driven from the keyboard with Textual's Pilot, on a
temporary store: people, registration, plan, draw, every unit at the
bench, decision and a signed release. Each step checks what the screen
shows and what the store holds."""

from __future__ import annotations

import asyncio

from tui_support import burst, make_app, screen_text, settle, wait_for_screen

LOT = "HP-2611-09"


def _fill(app, selector: str, text: str) -> None:
    """Put text in the input on view (typing itself is tested with the scanner field)."""
    app.screen.query_one(selector).value = text


def test_a_lot_goes_from_registration_to_signed_release(empty_services):
    asyncio.run(_registration_to_release(empty_services))


async def _registration_to_release(services):
    wf = services.workflow
    app = make_app(services)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        assert "The store is empty" in screen_text(app)

        # people: an inspector and an approver
        await pilot.press("u")
        await settle(pilot)
        _fill(app, "#name", "Ines Marlowe")
        _fill(app, "#secret", "bench-apricot-07")
        await pilot.press("ctrl+s")
        await settle(pilot)
        assert "saved: Ines Marlowe (inspector)" in screen_text(app)
        _fill(app, "#name", "Tomasz Quayle")
        await pilot.press("enter", "enter", "down", "enter")  # Enter moves to the role; choose approver
        _fill(app, "#secret", "release-apricot-07")
        await pilot.press("ctrl+s")
        await settle(pilot)
        assert {(p["name"], p["role"]) for p in wf.people()} == {("Ines Marlowe", "inspector"),
                                                                  ("Tomasz Quayle", "approver")}
        await pilot.press("escape")
        await settle(pilot)

        # register: a first try with a bad size shows the error beside the field and saves nothing
        await pilot.press("n")
        await settle(pilot)
        for field, value in (("id", LOT), ("supplier", "Harrowgate Preserves"),
                             ("product", "apricot jam 370 g jar"), ("size", "24O")):
            _fill(app, f"#f-{field}", value)
        await pilot.press("ctrl+s")
        await settle(pilot)
        assert "size: expected a whole number of at least 1, got '24O'" in screen_text(app)
        assert wf.lots() == []
        _fill(app, "#f-size", "240")
        _fill(app, "#f-structure", "carton=10,jar=24")
        await pilot.press("ctrl+f", "ctrl+s")
        await wait_for_screen(pilot, "PlanScreen")
        assert type(app.screen).__name__ == "PlanScreen", screen_text(app)
        assert f"saved: lot {LOT} registered" in screen_text(app)
        lot = wf.show(LOT)
        assert (lot["size"], lot["critical"], lot["structure_spec"]) == (240, True, "carton=10,jar=24")

        # plan: AQL 2.5 %, RQL 40 % at the default risks gives n=9, c=1 for 240 units
        # (the smallest plan meeting both, as inspector.stats.design computes it)
        _fill(app, "#aql", "2.5")
        _fill(app, "#rql", "40")
        await pilot.pause(0.25)  # the plan is recomputed after a pause in typing
        await settle(pilot)
        assert "Ac / Re         1 / 2" in screen_text(app)
        await pilot.press("ctrl+s")
        await settle(pilot)
        assert "saved: major plan n=9 Ac=1 Re=2" in screen_text(app)
        assert wf.show(LOT)["plans"]["major"]["sample_size"] == 9

        # draw with a typed seed; the seed is on screen and in the record
        await pilot.press("f3")
        await settle(pilot)
        _fill(app, "#seed", "4242")
        await pilot.press("ctrl+s")
        await settle(pilot)
        assert "seed 4242" in screen_text(app)
        drawn = wf.show(LOT)["draw"]
        assert drawn["seed"] == "4242" and len(drawn["units"]) == 9

        # bench: every unit passes, entered by number
        await pilot.press("f4")
        await settle(pilot)
        for unit in drawn["units"]:
            await burst(pilot, str(unit), "enter")
            await burst(pilot, " ", None)  # space: pass
        text = screen_text(app)
        assert f"saved: unit {drawn['units'][-1]} pass in major" in text
        assert "ACCEPT ✔" in text
        stored = wf.show(LOT)
        assert [r["outcome"] for r in stored["results"]] == ["pass"] * 9
        assert {r["by"] for r in stored["results"]} == {"Ines Marlowe"}

        # decision, with the caution for a food lot, then the signed release
        await pilot.press("f5")
        await settle(pilot)
        assert "results are advisory" in screen_text(app)
        await pilot.press("d")
        await settle(pilot)
        assert "OVERALL: ACCEPT ✔" in screen_text(app)
        await pilot.press("r")
        await settle(pilot)
        _fill(app, "#secret", "wrong-secret-1")
        await pilot.press("ctrl+s")
        await settle(pilot)
        assert "refused, wrong secret for Tomasz Quayle" in screen_text(app)
        assert wf.show(LOT)["state"] == "decided"
        await pilot.press("r")
        await settle(pilot)
        _fill(app, "#secret", "release-apricot-07")
        await pilot.press("enter")
        await settle(pilot)
        text = screen_text(app)
        assert "lot released, signed by Tomasz Quayle" in text
        assert "✔ released" in text
        final = wf.show(LOT)
        assert final["state"] == "released"
        assert final["decision"] == "accept"
        assert [(s["printed_name"], s["meaning"]) for s in final["signatures"]] == [("Tomasz Quayle", "released by")]
        assert len(final["failed_attempts"]) == 1


def test_the_demo_offer_registers_people_and_fills_the_new_lot_form(empty_services):
    from inspector.tui import demo

    wf = empty_services.workflow

    async def go():
        app = make_app(empty_services)
        async with app.run_test(size=(80, 24)) as pilot:
            await settle(pilot)
            await pilot.press("d")
            await wait_for_screen(pilot, "RegisterScreen")
            assert app.screen.query_one("#f-id").value == demo.DEMO_LOT
            assert "food or safety-critical: YES" in screen_text(app)
            assert wf.lots() == []  # nothing registered until the user says so
            await pilot.press("ctrl+s")
            await wait_for_screen(pilot, "PlanScreen")
        lot = wf.show(demo.DEMO_LOT)
        assert (lot["size"], lot["critical"], lot["supplier"]) == (15552, True, "Harrowgate Preserves")
        assert {p["name"] for p in wf.people()} == {demo.DEMO_INSPECTOR, demo.DEMO_APPROVER}

    asyncio.run(go())
