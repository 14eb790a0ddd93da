"""Units marked as pulled from the load are recorded as append-only entries:
the latest mark of a unit is its current one, taking a mark back is a new
entry, and bad input is refused naming the field, with nothing written."""

from __future__ import annotations

import pytest

from inspector.workflow import WorkflowError

from workflow_fixtures import INSPECTOR, LOT, drawn_lot, entry_count, refused, register


def test_marks_are_recorded_and_the_latest_mark_of_a_unit_wins(wf, db):
    units = drawn_lot(wf)
    before = entry_count(db)
    first = wf.mark_pulled(LOT, units[0], by=INSPECTOR)
    assert (first["unit"], first["pulled"], first["by"]) == (units[0], True, INSPECTOR)
    wf.mark_pulled(LOT, units[1])  # nobody named: still recorded
    assert wf.pulled_marks(LOT)["pulled"] == sorted(units[:2])

    wf.mark_pulled(LOT, units[0], by=INSPECTOR, pulled=False)  # taking a mark back is a new entry
    marks = wf.pulled_marks(LOT)
    assert marks["pulled"] == [units[1]]
    assert {m["unit"]: m["pulled"] for m in marks["marks"]} == {units[0]: False, units[1]: True}
    assert entry_count(db) == before + 3  # every mark stays in the record

    # marked by address names the same unit
    address = wf.resolve_unit(LOT, units[2]).address
    assert wf.mark_pulled(LOT, address)["unit"] == units[2]
    assert units[2] in wf.pulled_marks(LOT)["pulled"]
    assert "pulled mark" in {e["kind"] for e in wf.show(LOT)["events"]}
    assert wf.verify(LOT).ok


def test_marks_stay_in_a_fresh_workflow_on_the_same_store(wf, db):
    from workflow_fixtures import make_services

    units = drawn_lot(wf)
    wf.mark_pulled(LOT, units[3], by=INSPECTOR)
    with make_services(db) as other:
        assert other.workflow.pulled_marks(LOT)["pulled"] == [units[3]]


@pytest.mark.parametrize("kwargs, match", [
    ({"unit": "not-a-unit"}, r"^unit: "),
    ({"unit": 10**9}, r"unit"),
    ({"by": "Nobody Known"}, r"^by: no person called 'Nobody Known'"),
    ({"pulled": "yes"}, r"^pulled: expected true or false, got 'yes'"),
])
def test_bad_input_is_refused_naming_the_field_and_nothing_is_written(wf, db, kwargs, match):
    units = drawn_lot(wf)
    args = {"unit": units[0], **kwargs}
    unit = args.pop("unit")
    with refused(db, match):
        wf.mark_pulled(LOT, unit, **args)
    assert wf.pulled_marks(LOT)["pulled"] == []


def test_only_drawn_units_of_a_drawn_or_inspecting_lot(wf, db):
    register(wf)
    with refused(db, r"^mark pulled: lot HP-2611-07 is registered; units are marked as pulled after the draw"):
        wf.mark_pulled(LOT, 1)
    wf.plan(LOT, sample=13, accept=1)
    units = wf.draw(LOT, seed=7)["units"]
    not_drawn = next(u for u in range(1, 200) if u not in units)
    with refused(db, rf"^unit: {not_drawn} is not among the units to inspect"):
        wf.mark_pulled(LOT, not_drawn)
    with refused(db, r"^mark pulled: no lot 'HP-0000-00' is registered"):
        wf.mark_pulled("HP-0000-00", units[0])
    with refused(db, r"^pulled marks: no lot 'HP-0000-00' is registered"):
        wf.pulled_marks("HP-0000-00")
    # inspecting: still allowed; decided: refused
    wf.record(LOT, units[0], outcome="pass", by=INSPECTOR)
    assert wf.mark_pulled(LOT, units[0])["pulled"] is True
    for u in units[1:]:
        wf.record(LOT, u, outcome="pass", by=INSPECTOR)
    wf.decide(LOT, by=INSPECTOR)
    state = wf.show(LOT)["state"]
    assert state not in ("drawn", "inspecting")
    with refused(db, rf"^mark pulled: lot {LOT} is "):
        wf.mark_pulled(LOT, units[1])
    with pytest.raises(WorkflowError) as caught:
        wf.mark_pulled(LOT, units[1])
    assert caught.value.field == "lot"
