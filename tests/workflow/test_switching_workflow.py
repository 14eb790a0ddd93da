"""Switching per supplier and product, table plans at the severity in force,
resubmissions, corrective action and per-class decisions, through the workflow.

Rules: MIL-STD-105E ¶4.7–4.8 / ANSI/ASQ Z1.4 ¶8.3–8.5 as paraphrased in
../shared/reference-values.md 5f. Plans: lots of 80 jars at general level II
take code letter E (n = 13; Table I, reference-values.md 5a/5b, confirmed);
at AQL 6.5 Table II-A gives Ac 2 / Re 3 and Table II-B Ac 1 / Re 2; at AQL
1.0 Table II-A gives Ac 0 / Re 1 (nibs.org AC-TABLE.ASC Tables 1-A/1-B,
reference-values.md 5c/5d, "yes (derived)").

Invented scenario: Harrowgate Preserves, apricot jam in 370 g jars, lots
HP-2612-01 ...; a second product, quince jelly 250 g jar.
"""

from __future__ import annotations

import pytest

from workflow_fixtures import INSPECTOR, refused

SUPPLIER = "Harrowgate Preserves"
JAM = "apricot jam 370 g jar"
JELLY = "quince jelly 250 g jar"
SIZE = 80
# Table II-A / II-B at code letter E, AQL 6.5 (sources in the module docstring).
NORMAL_E_65 = (13, 2, 3)
TIGHTENED_E_65 = (13, 1, 2)


def lot_id(k: int) -> str:
    return f"HP-2612-{k:02d}"


def decided(wf, lid, outcome, *, resubmits=None, product=JAM, aql="6.5"):
    """Register a lot of 80 jars, plan it from the tables at the severity the
    rules give, draw, and decide it: "A" passes every sampled jar, "R" fails
    jars until the rejection number is reached. Returns the plan."""
    wf.register_lot(lot_id=lid, supplier=SUPPLIER, product=product, size=SIZE, resubmission_of=resubmits,
                    received_on="2026-12-01")
    plan = wf.plan(lid, aql=aql, table=True)
    units = wf.draw(lid, seed=20261201)["units"]
    if outcome == "A":
        for unit in units:
            wf.record(lid, unit, outcome="pass", by=INSPECTOR)
        assert wf.decide(lid)["decision"] == "accept"
    else:
        for unit in units[: plan["reject"]]:
            result = wf.record(lid, unit, outcome="fail", by=INSPECTOR, defect="lid not sealed")
        assert result.decision["decision"] == "reject"
    return plan


def run(wf, pattern: str, start: int = 1, product=JAM) -> list[dict]:
    """'ARAAR' -> lots decided accept/reject in that order; returns their plans."""
    return [decided(wf, lot_id(start + i), ch, product=product) for i, ch in enumerate(pattern)]


def n_ac_re(plan) -> tuple[int, int, int]:
    return plan["sample_size"], plan["accept"], plan["reject"]


# --- tightening and the table used --------------------------------------------------------


def test_two_rejections_in_five_lots_tighten_and_the_next_table_plan_comes_from_table_II_B(wf):
    plans = run(wf, "ARAAR")
    assert all(n_ac_re(p) == NORMAL_E_65 and p["severity"] == "normal" for p in plans)
    history = wf.supplier_history(SUPPLIER)
    assert history["severity"] == "tightened" and not history["reduced_eligible"]
    assert "HP-2612-02 and HP-2612-05 were rejected" in history["reason"]
    # each lot keeps the severity in force when it was planned
    assert [lot["planned_severity"] for lot in history["lots"]] == ["normal"] * 5
    assert [lot["severity"] for lot in history["lots"]] == ["normal"] * 5

    wf.register_lot(lot_id=lot_id(6), supplier=SUPPLIER, product=JAM, size=SIZE)
    assert wf.switching_for_lot(lot_id(6))["severity"] == "tightened"
    plan = wf.plan(lot_id(6), aql="6.5", table=True)
    assert n_ac_re(plan) == TIGHTENED_E_65 and plan["severity"] == "tightened"
    details = plan["details"]
    assert details["table"] == "Table II-B (tightened)" and details["code_letter"] == "E"
    assert details["severity_source"] == "switching rules" and details["severity_by_rules"] == "tightened"
    assert details["switching"]["severity"] == "tightened" and details["switching"]["lots_counted"] == 5
    for key in ("pa_at_aql_lot", "pa_at_aql_process", "rql_at_consumer_risk_lot", "rql_at_consumer_risk_process"):
        assert 0 <= details[key] <= 1
    stored = wf.show(lot_id(6))["plans"]["major"]
    assert stored["severity"] == "tightened" and stored["level"] == "II" and stored["details"]["provenance"]


def test_rejections_six_lots_apart_keep_normal_inspection(wf):
    run(wf, "RAAAAR")
    assert wf.supplier_history(SUPPLIER)["severity"] == "normal"


def test_five_acceptances_on_tightened_return_to_normal(wf):
    plans = run(wf, "RR" + "AAAA")
    assert [p["severity"] for p in plans] == ["normal"] * 2 + ["tightened"] * 4
    assert wf.supplier_history(SUPPLIER)["severity"] == "tightened"  # four are not enough
    decided(wf, lot_id(7), "A")
    history = wf.supplier_history(SUPPLIER)
    assert history["severity"] == "normal"
    assert history["lots"][-1]["note"] == "switched to normal after this lot"
    wf.register_lot(lot_id=lot_id(8), supplier=SUPPLIER, product=JAM, size=SIZE)
    assert n_ac_re(wf.plan(lot_id(8), aql="6.5", table=True)) == NORMAL_E_65


def test_a_severity_entered_by_hand_is_recorded_as_entered(wf):
    run(wf, "RR")
    wf.register_lot(lot_id=lot_id(3), supplier=SUPPLIER, product=JAM, size=SIZE)
    plan = wf.plan(lot_id(3), aql="6.5", severity="normal")
    assert plan["severity"] == "normal" and n_ac_re(plan) == NORMAL_E_65
    assert plan["details"]["severity_source"] == "entered"
    assert plan["details"]["severity_by_rules"] == "tightened"
    assert "entered by hand" in plan["details"]["notes"][0]


# --- resubmissions ------------------------------------------------------------------------


def test_resubmitted_lots_do_not_count(wf):
    decided(wf, lot_id(1), "R")
    decided(wf, lot_id(2), "R", resubmits=lot_id(1))  # rejected again on resubmission
    decided(wf, lot_id(3), "R", resubmits=lot_id(2))
    history = wf.supplier_history(SUPPLIER)
    assert history["severity"] == "normal"
    resubmitted = history["lots"][1]
    assert resubmitted["resubmission"] and resubmitted["resubmission_of"] == lot_id(1)
    assert not resubmitted["counted"] and "resubmitted" in resubmitted["note"]
    # a second rejection on original inspection still tightens
    decided(wf, lot_id(4), "R")
    assert wf.supplier_history(SUPPLIER)["severity"] == "tightened"


def test_a_resubmission_must_name_a_rejected_lot_of_the_same_supplier_and_product(wf, db):
    decided(wf, lot_id(1), "A")
    decided(wf, lot_id(2), "R")
    with refused(db, r"resubmission_of: no lot 'HP-2612-99' is registered"):
        wf.register_lot(lot_id=lot_id(3), supplier=SUPPLIER, product=JAM, size=SIZE, resubmission_of="HP-2612-99")
    with refused(db, r"resubmission_of: lot HP-2612-01 was accepted; only a rejected lot"):
        wf.register_lot(lot_id=lot_id(3), supplier=SUPPLIER, product=JAM, size=SIZE, resubmission_of=lot_id(1))
    with refused(db, r"resubmission_of: lot HP-2612-02 is apricot jam 370 g jar from Harrowgate Preserves, not "):
        wf.register_lot(lot_id=lot_id(3), supplier=SUPPLIER, product=JELLY, size=SIZE, resubmission_of=lot_id(2))
    shown = wf.register_lot(lot_id=lot_id(3), supplier=SUPPLIER, product=JAM, size=SIZE, resubmission_of=lot_id(2))
    assert shown["resubmission_of"] == lot_id(2)
    with refused(db, r"resubmission_of: lot HP-2612-03 has no decision \(it is registered\)"):
        wf.register_lot(lot_id=lot_id(4), supplier=SUPPLIER, product=JAM, size=SIZE, resubmission_of=lot_id(3))


# --- discontinuation and corrective action -----------------------------------------------


def test_five_rejections_on_tightened_discontinue_and_table_planning_is_refused(wf, db):
    run(wf, "RR" + "RRRR")
    assert wf.supplier_history(SUPPLIER)["severity"] == "tightened"  # four on tightened so far
    decided(wf, lot_id(7), "R")
    history = wf.supplier_history(SUPPLIER)
    assert history["severity"] == "discontinued"
    assert history["lots"][-1]["note"] == "inspection discontinued after this lot"
    wf.register_lot(lot_id=lot_id(8), supplier=SUPPLIER, product=JAM, size=SIZE)
    message = "discontinued after 5 lots not accepted on tightened, the last lot HP-2612-07; record corrective " \
              "action with `inspector supplier action`"
    with refused(db, message):
        wf.plan(lot_id(8), aql="6.5", table=True)
    with refused(db, "discontinued after 5 lots"):  # entering a severity by hand does not get round it
        wf.plan(lot_id(8), aql="6.5", severity="tightened")
    assert wf.show(lot_id(8))["state"] == "registered"


def test_corrective_action_resumes_inspection_on_tightened(wf, db):
    run(wf, "RR" + "RRRRR")
    wf.register_lot(lot_id=lot_id(8), supplier=SUPPLIER, product=JAM, size=SIZE)
    done = wf.record_corrective_action(SUPPLIER, product=JAM, note="filling line 2 retrained", by=INSPECTOR)
    assert done["severity_before"] == "discontinued" and done["severity"] == "tightened" and done["lifted"]
    assert done["lot"] == lot_id(7) and done["by"] == INSPECTOR
    plan = wf.plan(lot_id(8), aql="6.5", table=True)
    assert n_ac_re(plan) == TIGHTENED_E_65
    history = wf.supplier_history(SUPPLIER)
    assert history["severity"] == "tightened"
    assert history["corrective_actions"][0]["after_lot"] == lot_id(7)
    assert "corrective action recorded by Ines Marlowe" in history["reason"]
    # the action is in the audit trail of the lot it is tied to
    kinds = [item["kind"] for item in wf.export(lot_id(7))["history"]]
    assert "corrective action" in kinds


def test_corrective_action_while_not_discontinued_is_kept_and_changes_nothing(wf):
    run(wf, "RR")
    done = wf.record_corrective_action(SUPPLIER, note="new lid supplier", by=INSPECTOR)  # one product: implied
    assert done["product"] == JAM and not done["lifted"] and done["severity"] == "tightened"
    # a later discontinuation still needs an action of its own
    run(wf, "RRRRR", start=3)
    assert wf.supplier_history(SUPPLIER)["severity"] == "discontinued"


def test_bad_corrective_action_input_is_refused_and_writes_nothing(wf, db):
    run(wf, "R")
    run(wf, "A", start=2, product=JELLY)
    with refused(db, "by: no person called 'Nobody' is registered"):
        wf.record_corrective_action(SUPPLIER, product=JAM, note="retrained", by="Nobody")
    with refused(db, "supplier: no supplier called 'Harrogate Preserves' is registered"):
        wf.record_corrective_action("Harrogate Preserves", product=JAM, note="retrained", by=INSPECTOR)
    with refused(db, "product: Harrowgate Preserves has no lots of 'apricot jam 450 g jar'"):
        wf.record_corrective_action(SUPPLIER, product="apricot jam 450 g jar", note="retrained", by=INSPECTOR)
    with refused(db, "product: Harrowgate Preserves ships several products"):
        wf.record_corrective_action(SUPPLIER, note="retrained", by=INSPECTOR)
    with refused(db, "note: expected text"):
        wf.record_corrective_action(SUPPLIER, product=JAM, note="   ", by=INSPECTOR)


# --- reduced eligibility, products, order --------------------------------------------------


def test_ten_acceptances_on_normal_make_the_supplier_eligible_for_reduced_inspection(wf):
    run(wf, "A" * 9)
    assert not wf.supplier_history(SUPPLIER)["reduced_eligible"]
    decided(wf, lot_id(10), "A")
    history = wf.supplier_history(SUPPLIER)
    assert history["reduced_eligible"] and history["severity"] == "normal"
    assert "eligible for reduced inspection" in history["reason"]
    # shown only: the next table plan is still the normal one, with a note saying so
    wf.register_lot(lot_id=lot_id(11), supplier=SUPPLIER, product=JAM, size=SIZE)
    plan = wf.plan(lot_id(11), aql="6.5", table=True)
    assert n_ac_re(plan) == NORMAL_E_65
    assert any("eligible for reduced inspection" in note for note in plan["details"]["notes"])


def test_switching_is_kept_per_product(wf):
    run(wf, "RR", product=JELLY)
    run(wf, "A", start=3)
    assert wf.supplier_history(SUPPLIER, product=JAM)["severity"] == "normal"
    assert wf.supplier_history(SUPPLIER, product=JELLY)["severity"] == "tightened"
    both = wf.supplier_history(SUPPLIER)
    assert both["product"] is None and [s["product"] for s in both["products"]] == [JELLY, JAM]
    assert both["severity"] == "tightened"  # the strictest of the two
    assert len(both["lots"]) == 3
    wf.register_lot(lot_id=lot_id(4), supplier=SUPPLIER, product=JAM, size=SIZE)
    assert wf.plan(lot_id(4), aql="6.5", table=True)["severity"] == "normal"


def test_lots_count_in_the_order_they_were_decided(wf):
    for k in (1, 2):
        wf.register_lot(lot_id=lot_id(k), supplier=SUPPLIER, product=JAM, size=SIZE)
        wf.plan(lot_id(k), aql="6.5", table=True)
        wf.draw(lot_id(k), seed=k)
    units = wf.show(lot_id(2))["sample_units"]
    for unit in units[:3]:
        wf.record(lot_id(2), unit, outcome="fail", by=INSPECTOR)  # lot 2 rejected first
    history = wf.supplier_history(SUPPLIER)
    assert [(lot["lot_id"], lot["decision"], lot["counted"]) for lot in history["lots"]] == [
        (lot_id(2), "reject", True), (lot_id(1), None, False)]
    for unit in wf.show(lot_id(1))["sample_units"]:
        wf.record(lot_id(1), unit, outcome="pass", by=INSPECTOR)
    wf.decide(lot_id(1))
    assert [lot["lot_id"] for lot in wf.supplier_history(SUPPLIER)["lots"]] == [lot_id(2), lot_id(1)]


def test_history_of_an_unknown_supplier_is_refused(wf, db):
    with refused(db, "supplier: no supplier called 'Harrowgate Foods' is registered"):
        wf.supplier_history("Harrowgate Foods")


# --- defect classes ------------------------------------------------------------------------


@pytest.fixture
def two_classes(wf):
    """Lot HP-2612-01: critical at AQL 1.0 (Table II-A E/1.0: n 13, Ac 0) and
    major at AQL 6.5 (E/6.5: n 13, Ac 2, Re 3), one draw of 13 jars."""
    wf.register_lot(lot_id=lot_id(1), supplier=SUPPLIER, product=JAM, size=SIZE, critical=True)
    critical = wf.plan(lot_id(1), defect_class="critical", aql="1.0", table=True)
    major = wf.plan(lot_id(1), defect_class="major", aql="6.5", table=True)
    assert n_ac_re(critical) == (13, 0, 1) and n_ac_re(major) == NORMAL_E_65
    return wf.draw(lot_id(1), seed=20261201)["units"]


def test_a_critical_nonconforming_unit_rejects_the_lot_even_when_major_accepts(wf, two_classes):
    for unit in two_classes:
        wf.record(lot_id(1), unit, outcome="pass", by=INSPECTOR, defect_class="major")
    outcome = wf.record(lot_id(1), two_classes[0], outcome="fail", by=INSPECTOR, defect_class="critical",
                        defect="glass fragment in jar")
    assert outcome.decision["decision"] == "reject"
    shown = wf.show(lot_id(1))
    assert shown["classes"]["major"]["verdict"] == "accept"
    assert shown["classes"]["critical"]["verdict"] == "reject"
    assert shown["decision"] == "reject"
    assert wf.supplier_history(SUPPLIER)["lots"][0]["decision"] == "reject"


def test_a_lot_is_accepted_when_every_class_accepts(wf, two_classes):
    for unit in two_classes:
        wf.record(lot_id(1), unit, outcome="pass", by=INSPECTOR)  # a pass in every class
    assert wf.decide(lot_id(1))["decision"] == "accept"


def test_a_class_with_no_sampling_allowance_is_shown_as_such(wf, two_classes):
    plans = wf.show(lot_id(1))["plans"]
    assert plans["critical"]["no_allowance"] is True
    assert plans["critical"]["allowance"] == "critical: Ac 0 — any nonconforming unit rejects the lot"
    assert plans["major"]["no_allowance"] is False
    assert plans["major"]["allowance"].startswith("major: Ac 2, Re 3")
