"""The bench from the keyboard: scanner submit keys, label codes, refused
entries, duplicate scans, corrections, early decision, store failures and
quitting right after an entry. Each test checks the screen and the store."""

from __future__ import annotations

import asyncio
import threading

from tui_support import burst, make_app, screen_text, settle

from inspector.tui import demo
from inspector.tui.screens import open_lot_screen

LOT = demo.DEMO_LOT


async def scan(pilot, text: str, end="enter") -> None:
    """Type like a keyboard-wedge scanner: a burst of characters, then the end key."""
    await burst(pilot, text, end)


async def open_bench(pilot):
    await settle(pilot)
    open_lot_screen(pilot.app, "bench", LOT)
    await settle(pilot)
    return pilot.app.screen


def run(coro):
    asyncio.run(coro)


def results_of(wf) -> list[dict]:
    return wf.show(LOT)["results"]


def test_enter_tab_and_line_feed_each_submit_the_entry(seeded_services):
    wf = seeded_services.workflow
    open_units = wf.show(LOT)["classes"]["major"]["open_units"]

    async def go():
        app = make_app(seeded_services)
        async with app.run_test(size=(80, 24)) as pilot:
            bench = await open_bench(pilot)
            # A scanner ends with Enter, Tab, a line feed (ctrl+j), or CR LF (two submit keys).
            for unit, end in zip(open_units, ("enter", "tab", "ctrl+j", ("enter", "ctrl+j"))):
                await scan(pilot, str(unit), end)
                assert f"▶ unit {unit}" in screen_text(app)
                assert bench.notice().kind != "error"
                assert bench.query_one("#pad").has_focus
                await pilot.press("p")
                await settle(pilot)
                assert f"saved: unit {unit} pass" in screen_text(app)
                assert bench.query_one("#entry").has_focus
        recorded = {(r["unit"], r["outcome"]) for r in results_of(wf)}
        assert {(u, "pass") for u in open_units[:4]} <= recorded

    run(go())


def test_a_scanned_label_code_and_an_address_name_the_unit(seeded_services):
    wf = seeded_services.workflow
    report = wf.show(LOT)
    first, second = report["classes"]["major"]["open_units"][:2]

    async def go():
        app = make_app(seeded_services)
        async with app.run_test(size=(80, 24)) as pilot:
            await open_bench(pilot)
            await scan(pilot, f"{LOT}:{first}")  # as printed on the labels (inspector.sheets.codes)
            assert f"▶ unit {first}" in screen_text(app)
            await pilot.press("p")
            await settle(pilot)
            address = app.screen.structure.address_of(second)
            await scan(pilot, str(address))
            assert f"▶ unit {second}" in screen_text(app)
            await pilot.press("p")
            await settle(pilot)
        by_unit = {r["unit"]: r for r in results_of(wf)}
        assert by_unit[first]["outcome"] == "pass"
        assert by_unit[second]["entered_as"] == str(address)

    run(go())


def test_a_bad_entry_keeps_the_text_and_records_nothing(seeded_services):
    wf = seeded_services.workflow
    report = wf.show(LOT)
    before = len(report["results"])
    outside_sample = next(u for u in range(1, report["size"] + 1) if u not in set(report["sample_units"]))
    bad = {
        "99999": "outside this lot's units",
        "HX-0001:5": "belongs to lot HX-0001",
        str(outside_sample): "not in the sample",
        "pallet 3 / layer 9 / carton 1 / jar 1": "layer must be a number from 1 to 4",
        "4006381333931": "outside this lot's units",  # a retail barcode scanned by mistake
    }

    async def go():
        app = make_app(seeded_services)
        async with app.run_test(size=(80, 24)) as pilot:
            bench = await open_bench(pilot)
            for text, why in bad.items():
                await scan(pilot, text)
                entry = bench.query_one("#entry")
                assert entry.value == text
                shown = screen_text(app)
                assert why in " ".join(shown.split()), shown
                assert "nothing recorded" in shown
                assert "no unit on the bench" in shown
                await pilot.press("p")  # goes into the field, not into a result
                await settle(pilot)
                assert entry.value == "p"  # the kept text was selected, so the next key replaced it
                entry.value = ""
        assert len(results_of(wf)) == before

    run(go())


def test_a_duplicate_scan_warns_and_records_nothing(seeded_services):
    wf = seeded_services.workflow
    done = results_of(wf)[0]
    before = len(results_of(wf))

    async def go():
        app = make_app(seeded_services)
        async with app.run_test(size=(80, 24)) as pilot:
            await open_bench(pilot)
            await scan(pilot, str(done["unit"]))
            shown = " ".join(screen_text(app).split())
            assert f"duplicate scan: unit {done['unit']} already recorded" in shown
            assert f"entry {done['entry']}" in shown
            await pilot.press("p", "1", "2")  # no verdict key acts on a recorded unit
            await settle(pilot)
        assert len(results_of(wf)) == before

    run(go())


def test_a_correction_asks_for_a_reason_and_keeps_the_original(seeded_services):
    wf = seeded_services.workflow
    original = next(r for r in results_of(wf) if r["class"] == "major" and r["outcome"] == "pass")

    async def go():
        app = make_app(seeded_services)
        async with app.run_test(size=(100, 30)) as pilot:
            await open_bench(pilot)
            await scan(pilot, str(original["unit"]))
            await pilot.press("c")
            await settle(pilot)
            assert "correct unit" in screen_text(app)
            await pilot.press("enter")  # no reason: refused by the dialog
            await settle(pilot)
            assert "expected text, got nothing" in screen_text(app)
            await burst(pilot, "cap was loose", "enter")
            await settle(pilot)
            await pilot.press("2")
            await settle(pilot)
            shown = screen_text(app)
            assert f"corrects {original['entry']} (was pass): cap was loose" in shown
            assert "corrected by" in shown
        results = results_of(wf)
        assert any(r["entry"] == original["entry"] and r["outcome"] == "pass" and not r["current"] for r in results)
        fix = results[-1]
        assert (fix["corrects"], fix["reason"], fix["outcome"]) == (original["entry"], "cap was loose", "fail")

    run(go())


def test_a_critical_failure_decides_the_lot_early_and_says_so(seeded_services):
    wf = seeded_services.workflow
    unit = wf.show(LOT)["classes"]["critical"]["open_units"][0]

    async def go():
        app = make_app(seeded_services)
        async with app.run_test(size=(80, 24)) as pilot:
            await open_bench(pilot)
            await scan(pilot, str(unit))
            await pilot.press("1")
            await settle(pilot)
            shown = " ".join(screen_text(app).split())
            assert "LOT DECIDED EARLY — REJECT ✘" in shown
        report = wf.show(LOT)
        assert report["decision"] == "reject" and report["decision_detail"]["curtailed"] is True
        assert report["state"] == "decided"

    run(go())


def test_saved_appears_only_after_the_store_committed(seeded_services):
    wf = seeded_services.workflow
    unit = wf.show(LOT)["classes"]["major"]["open_units"][0]
    release = threading.Event()
    real_record = wf.record

    def slow_record(*args, **kwargs):
        release.wait(5)
        return real_record(*args, **kwargs)

    wf.record = slow_record

    async def go():
        app = make_app(seeded_services)
        async with app.run_test(size=(80, 24)) as pilot:
            await open_bench(pilot)
            await scan(pilot, str(unit))
            await pilot.press("p")
            await pilot.pause(0.1)
            shown = screen_text(app)
            assert "saving …" in shown and "saved:" not in shown
            assert all(r["unit"] != unit for r in results_of(wf))
            release.set()
            await settle(pilot)
            assert f"saved: unit {unit} pass" in screen_text(app)
        assert any(r["unit"] == unit for r in results_of(wf))

    run(go())


def test_a_store_error_stays_on_screen_and_keeps_the_typed_value(seeded_services):
    from inspector.records import StoreError

    wf = seeded_services.workflow
    unit = wf.show(LOT)["classes"]["major"]["open_units"][0]
    before = len(results_of(wf))

    def failing_record(*args, **kwargs):
        raise StoreError("database or disk is full")

    real_record, wf.record = wf.record, failing_record

    async def go():
        app = make_app(seeded_services)
        async with app.run_test(size=(80, 24)) as pilot:
            bench = await open_bench(pilot)
            await scan(pilot, str(unit))
            await pilot.press("p")
            await settle(pilot)
            await pilot.pause(0.3)
            shown = " ".join(screen_text(app).split())
            assert "NOT SAVED — store error: database or disk is full" in shown
            assert bench.query_one("#entry").value == str(unit)
            assert bench.notice().kind == "error"
            wf.record = real_record  # the disk has room again: the same unit can be entered
            await pilot.press("enter")
            await settle(pilot)
            await pilot.press("p")
            await settle(pilot)
            assert f"saved: unit {unit} pass" in screen_text(app)
        assert len(results_of(wf)) == before + 1

    run(go())


def test_quitting_right_after_an_entry_loses_nothing(seeded_services):
    wf = seeded_services.workflow
    unit = wf.show(LOT)["classes"]["major"]["open_units"][0]
    real_record = wf.record

    def slow_record(*args, **kwargs):
        import time

        time.sleep(0.2)  # a slow disk: the quit key arrives before the commit
        return real_record(*args, **kwargs)

    wf.record = slow_record

    async def go():
        app = make_app(seeded_services)
        async with app.run_test(size=(80, 24)) as pilot:
            await open_bench(pilot)
            await scan(pilot, str(unit))
            await pilot.press("p", "ctrl+q")
        assert app.return_code in (0, None)

    run(go())
    assert any(r["unit"] == unit for r in results_of(wf))


def test_a_scan_that_begins_with_a_verdict_key_goes_to_the_entry(seeded_services):
    """A unit waits for its verdict and the next unit is scanned: the scan's
    first character is a verdict key ("1" = fail critical), but it arrives in
    a burst, so it is read as the start of the scan and records nothing."""
    wf = seeded_services.workflow
    report = wf.show(LOT)
    waiting = report["classes"]["critical"]["open_units"][0]
    nxt = next(u for u in report["classes"]["major"]["open_units"]
               if str(u)[0] in "123" and u != waiting)
    before = len(report["results"])

    async def go():
        app = make_app(seeded_services)
        async with app.run_test(size=(80, 24)) as pilot:
            await open_bench(pilot)
            await scan(pilot, str(waiting))
            assert f"▶ unit {waiting}" in screen_text(app)
            await scan(pilot, str(nxt))  # the pad has the focus: the burst lands there
            await pilot.pause(0.1)
            await settle(pilot)
            shown = " ".join(screen_text(app).split())
            assert f"▶ unit {nxt}" in shown
            assert f"unit {waiting} was left without a verdict" in shown
        assert len(results_of(wf)) == before
        assert wf.show(LOT)["state"] == "inspecting"

    run(go())
