"""The lots overview carries each lot's progress at the bench, read from the
plans, the draw and the result entries, and agrees with the full lot report."""

from __future__ import annotations

from workflow_fixtures import INSPECTOR, LOT, SEED, register

OLD_KEYS = {"id", "state", "supplier", "product", "size", "reference", "received_on", "critical", "decision"}


def progress_from_show(wf, lot_id):
    """The same figures computed the long way, from the whole lot report."""
    report = wf.show(lot_id)
    current = [r for r in report["results"] if r["current"]]
    return {"sample_size": len(report["sample_units"]),
            "inspected": len({r["unit"] for r in current}),
            "nonconforming": len({r["unit"] for r in current if r["outcome"] == "fail"})}


def by_id(wf):
    return {lot["id"]: lot for lot in wf.lots()}


def test_progress_before_and_after_the_draw_matches_the_lot_report(wf, monkeypatch):
    register(wf)
    register(wf, lot_id="HP-2611-08")
    wf.plan("HP-2611-08", sample=13, accept=1)
    first = by_id(wf)
    # registered only, and planned but not drawn: no progress yet; the old keys are all still there
    for lot_id in (LOT, "HP-2611-08"):
        assert OLD_KEYS <= set(first[lot_id])
        assert (first[lot_id]["sample_size"], first[lot_id]["inspected"], first[lot_id]["nonconforming"]) \
            == (None, None, None)

    wf.plan(LOT, sample=13, accept=1, defect_class="major")
    wf.plan(LOT, sample=8, accept=1, defect_class="minor")
    units = wf.draw(LOT, seed=SEED)["units"]
    minor_units = wf.show(LOT)["classes"]["minor"]["open_units"]
    assert by_id(wf)[LOT]["sample_size"] == 13 and by_id(wf)[LOT]["inspected"] == 0

    # one unit passes in both classes (one unit, not two), one fails major and is then corrected to pass,
    # one fails minor, and one not yet inspected is substituted
    both = minor_units[0]
    wf.record(LOT, both, outcome="pass", by=INSPECTOR, defect_class="major")
    wf.record(LOT, both, outcome="pass", by=INSPECTOR, defect_class="minor")
    corrected = next(u for u in units if u != both)
    wf.record(LOT, corrected, outcome="fail", by=INSPECTOR, defect_class="major")
    assert by_id(wf)[LOT]["nonconforming"] == 1
    wf.correct(LOT, corrected, outcome="pass", reason="re-checked: the lid was sealed", by=INSPECTOR,
               defect_class="major")
    failing = minor_units[1]
    wf.record(LOT, failing, outcome="fail", by=INSPECTOR, defect_class="minor")
    spare = next(u for u in units if u not in (both, corrected, failing))
    wf.substitute(LOT, spare, reason="jar broken in handling", by=INSPECTOR)

    expected = progress_from_show(wf, LOT)
    assert expected == {"sample_size": 13, "inspected": 3, "nonconforming": 1}

    # the overview must not need the full report of each lot
    def no_show(*args, **kwargs):
        raise AssertionError("lots() called show()")

    monkeypatch.setattr(type(wf), "show", no_show)
    overview = by_id(wf)
    assert {k: overview[LOT][k] for k in expected} == expected
    assert overview["HP-2611-08"]["inspected"] is None
    assert set(overview[LOT]) == OLD_KEYS | {"sample_size", "inspected", "nonconforming"}
