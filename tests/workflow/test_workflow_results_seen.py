"""The workflow keeps the result entries it has read and fetches only newer
ones; two workflows on one store (two benches) still see each other's work."""

from __future__ import annotations

import pytest

from inspector.services import build_services
from inspector.workflow import WorkflowError


def test_two_benches_see_each_others_results_and_duplicates_are_refused(tmp_path):
    db = tmp_path / "two.db"
    with build_services(str(db), environ={}) as a, build_services(str(db), environ={}) as b:
        a.workflow.add_person(name="Ines Marlowe", role="inspector", secret="kestrel-0417")
        a.workflow.register_lot(lot_id="HP-2612-09", supplier="Harrowgate Preserves",
                                product="apricot jam 370 g jar", size=2000)
        a.workflow.plan("HP-2612-09", sample=20, accept=1)
        units = a.workflow.draw("HP-2612-09", seed=11)["units"]
        a.workflow.record("HP-2612-09", units[0], outcome="pass", by="Ines Marlowe")
        b.workflow.record("HP-2612-09", units[1], outcome="fail", by="Ines Marlowe")
        a.workflow.record("HP-2612-09", units[2], outcome="pass", by="Ines Marlowe")
        # a's view holds b's entry although a had read the lot before it
        seen_by_a = [(r["unit"], r["outcome"]) for r in a.workflow.show("HP-2612-09")["results"]]
        assert seen_by_a == [(units[0], "pass"), (units[1], "fail"), (units[2], "pass")]
        with pytest.raises(WorkflowError, match="already has a major result"):
            a.workflow.record("HP-2612-09", units[1], outcome="pass", by="Ines Marlowe")
        # b's correction reaches a's tally
        b.workflow.correct("HP-2612-09", units[1], outcome="pass", reason="re-weighed", by="Ines Marlowe")
        assert a.workflow.show("HP-2612-09")["classes"]["major"]["nonconforming"] == 0


def test_a_refused_record_leaves_nothing_behind_in_what_was_read(tmp_path):
    with build_services(str(tmp_path / "r.db"), environ={}) as s:
        wf = s.workflow
        wf.add_person(name="Ines Marlowe", role="inspector", secret="kestrel-0417")
        wf.register_lot(lot_id="HP-2612-10", supplier="Harrowgate Preserves",
                        product="apricot jam 370 g jar", size=500)
        wf.plan("HP-2612-10", sample=10, accept=0)
        units = wf.draw("HP-2612-10", seed=5)["units"]
        wf.record("HP-2612-10", units[0], outcome="pass", by="Ines Marlowe")
        with pytest.raises(WorkflowError):
            wf.record("HP-2612-10", units[1], outcome="pass", by="Nobody Known")
        assert [r["unit"] for r in wf.show("HP-2612-10")["results"]] == [units[0]]
        wf.record("HP-2612-10", units[1], outcome="pass", by="Ines Marlowe")
        assert [r["unit"] for r in wf.show("HP-2612-10")["results"]] == units[:2]
