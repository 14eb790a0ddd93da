"""The lot lifecycle through the workflow service, on a real store."""

from __future__ import annotations

import pytest

from inspector.workflow import TRANSITIONS, WorkflowError
from workflow_fixtures import (
    APPROVER,
    INSPECTOR,
    LOT,
    PRODUCT,
    SECOND_INSPECTOR,
    SECRETS,
    SEED,
    SIZE,
    SUPPLIER,
    drawn_lot,
    entry_count,
    refused,
    register,
)


def _record_all(wf, units, outcome="pass", by=INSPECTOR):
    last = None
    for unit in units:
        last = wf.record(LOT, unit, outcome=outcome, by=by)
    return last


# --- the whole way ------------------------------------------------------------------------


def test_a_lot_goes_from_registration_to_a_signed_release(wf, services):
    register(wf)
    plan = wf.plan(LOT, aql="1.0", rql="8")
    assert plan["chosen_by"] == "risk" and plan["aql"] == "1.0" and plan["rql"] == "8"
    # The design itself is the stats package's; here only that it meets the risks as asked.
    assert plan["details"]["pa_at_aql"] >= 0.95 and plan["details"]["pa_at_rql"] <= 0.10
    drawn = wf.draw(LOT, seed=SEED)
    assert len(drawn["units"]) == plan["sample_size"] and drawn["seed"] == str(SEED)
    _record_all(wf, drawn["units"][:-1])
    assert wf.show(LOT)["state"] == "inspecting"
    last = wf.record(LOT, drawn["units"][-1], outcome="fail", defect="label smudged", by=SECOND_INSPECTOR)
    assert last.decision is None  # one nonconforming unit, within Ac
    decided = wf.decide(LOT)
    assert decided["decision"] == ("accept" if plan["accept"] >= 1 else "reject")
    assert decided["curtailed"] is False
    released = wf.release(LOT, by=APPROVER, meaning="released by", secret=SECRETS[APPROVER])
    shown = wf.show(LOT)
    assert shown["state"] == "released"
    assert shown["signatures"][0]["printed_name"] == APPROVER
    assert shown["signatures"][0]["meaning"] == "released by"
    assert shown["signatures"][0]["record_hash"] == services.store.record_hash(LOT) == shown["record_hash"]
    assert shown["signatures"][0]["at"].endswith("+01:00")
    assert not shown["changed_since_signed"]
    assert released["signature"]["changed_since_signed"] is False
    states = [(e["from"], e["to"]) for e in shown["events"] if e["kind"] == "state"]
    assert [to for _, to in states] == ["registered", "planned", "drawn", "inspecting", "decided", "released"]
    for old, new in states:
        assert new in TRANSITIONS[old]
    assert services.store.verify_chain().ok


def test_show_holds_what_an_auditor_asks_for(wf):
    units = drawn_lot(wf, sample=5, accept=0)
    wf.record(LOT, units[0], outcome="pass", by=INSPECTOR, note="seal torque fine")
    shown = wf.show(LOT)
    assert shown["sample_units"] == sorted(units)
    assert shown["supplier"] == SUPPLIER and shown["product"] == PRODUCT and shown["size"] == SIZE
    result = shown["results"][0]
    assert result["unit"] == units[0] and result["outcome"] == "pass" and result["class"] == "major"
    assert result["by"] == INSPECTOR and result["at"].endswith("+01:00") and result["note"] == "seal torque fine"
    assert shown["decision"] is None
    assert shown["classes"]["major"]["open"] == 4
    assert shown["draw"]["rederived"] is True
    assert any("advisory" in caution for caution in shown["cautions"])  # a critical (food) lot


# --- states and transitions ----------------------------------------------------------------------


def test_a_draw_needs_a_plan(wf, db):
    register(wf)
    with refused(db, "no plan yet"):
        wf.draw(LOT, seed=SEED)


def test_plans_are_set_before_the_draw(wf, db):
    drawn_lot(wf)
    with refused(db, "plans are set before the draw"):
        wf.plan(LOT, sample=20, accept=1)
    with refused(db, "drawn already"):
        wf.draw(LOT, seed=SEED)


def test_a_class_can_be_planned_again_before_the_draw_and_the_first_plan_stays(wf, services):
    register(wf)
    first = wf.plan(LOT, sample=20, accept=1)
    second = wf.plan(LOT, sample=32, accept=1)
    shown = wf.show(LOT)
    assert shown["plans"]["major"]["entry"] == second["entry"]
    with services.store.reading() as r:
        assert [p.id for p in r.plans(LOT)] == [first["entry"], second["entry"]]


def test_results_need_a_drawn_sample(wf, db):
    register(wf)
    wf.plan(LOT, sample=5, accept=0)
    with refused(db, "draw the sample first"):
        wf.record(LOT, 1, outcome="pass", by=INSPECTOR)


def test_release_and_hold_need_a_decision(wf, db):
    units = drawn_lot(wf)
    wf.record(LOT, units[0], outcome="pass", by=INSPECTOR)
    with refused(db, "only a decided or held lot can be released"):
        wf.release(LOT, by=APPROVER, meaning="released by", secret=SECRETS[APPROVER])
    with refused(db, "only a decided lot can be put on hold"):
        wf.hold(LOT, reason="waiting for the lab", by=APPROVER)


def test_an_unknown_lot_is_named(wf, db):
    with refused(db, "no lot 'HP-0000-00'"):
        wf.record("HP-0000-00", 1, outcome="pass", by=INSPECTOR)


# --- results -----------------------------------------------------------------------------------


def test_a_unit_outside_the_sample_is_refused(wf, db):
    units = drawn_lot(wf)
    outside = next(u for u in range(1, SIZE + 1) if u not in units)
    with refused(db, f"unit: {outside} is not in the sample of lot {LOT}"):
        wf.record(LOT, outside, outcome="pass", by=INSPECTOR)
    with refused(db, "outside this lot's units"):
        wf.record(LOT, SIZE + 1, outcome="pass", by=INSPECTOR)


def test_a_unit_can_be_given_by_its_address(wf, services):
    from inspector import frame

    units = drawn_lot(wf)
    structure = frame.parse_structure("pallet=18,layer=4,carton=9,jar=24")
    address = str(structure.address_of(units[2]))  # e.g. "pallet 3 / layer 1 / carton 3 / jar 4"
    short = "/".join(label for _, label in structure.address_of(units[3]).path)
    a = wf.record(LOT, address, outcome="pass", by=INSPECTOR)
    b = wf.record(LOT, short, outcome="pass", by=INSPECTOR)
    assert (a.unit, b.unit) == (units[2], units[3])
    results = wf.show(LOT)["results"]
    assert [r["unit"] for r in results] == [units[2], units[3]]
    assert results[0]["entered_as"] == address


def test_a_serial_from_a_manifest_finds_its_unit(wf, db):
    rows = ["serial,container"] + [f"SN-{k:05d},P-{1 + k // 10:02d}" for k in range(40)]
    wf.register_lot(lot_id="HP-SER-01", supplier=SUPPLIER, product="jam gift box", size=40,
                    manifest_text="\n".join(rows) + "\n", manifest_name="boxes.csv")
    wf.plan("HP-SER-01", sample=6, accept=0)
    units = wf.draw("HP-SER-01", seed=5)["units"]
    serial = f"SN-{units[0] - 1:05d}"  # units are numbered in row order here
    outcome = wf.record("HP-SER-01", serial, outcome="pass", by=INSPECTOR)
    assert outcome.unit == units[0]
    assert wf.show("HP-SER-01")["results"][0]["entered_as"] == serial
    with refused(db, "unit"):
        wf.record("HP-SER-01", "SN-99999", outcome="pass", by=INSPECTOR)


def test_a_unit_gets_one_result_per_class_and_a_second_is_refused(wf, db):
    units = drawn_lot(wf)
    wf.record(LOT, units[0], outcome="pass", by=INSPECTOR)
    with refused(db, "already has a major result .* use lot correct"):
        wf.record(LOT, units[0], outcome="fail", by=SECOND_INSPECTOR)


def test_results_name_a_registered_person(wf, db):
    units = drawn_lot(wf)
    with refused(db, "by: no person called 'Jo Bloggs'"):
        wf.record(LOT, units[0], outcome="pass", by="Jo Bloggs")


# --- the decision ---------------------------------------------------------------------------------


def test_deciding_with_units_still_open_is_refused(wf, db):
    units = drawn_lot(wf, sample=13, accept=1)
    _record_all(wf, units[:5])
    with refused(db, "still has 8 open units"):
        wf.decide(LOT)


def test_a_complete_sample_within_ac_is_accepted(wf):
    units = drawn_lot(wf, sample=13, accept=1)
    _record_all(wf, units[:-1])
    wf.record(LOT, units[-1], outcome="fail", by=INSPECTOR, defect="dented lid")
    assert wf.decide(LOT)["decision"] == "accept"


def test_reaching_the_rejection_number_decides_the_lot_early(wf, db, services):
    units = drawn_lot(wf, sample=13, accept=1)
    _record_all(wf, units[:3])
    first = wf.record(LOT, units[3], outcome="fail", by=INSPECTOR, defect="underfilled: 351 g")
    assert first.decision is None and first.state == "inspecting"
    second = wf.record(LOT, units[4], outcome="fail", by=INSPECTOR, defect="lid not sealed")
    assert second.state == "decided"
    assert second.decision["decision"] == "reject" and second.decision["curtailed"] is True
    estimate = second.decision["evidence"]["estimates"]["major"]
    assert estimate["curtailed"] is True and "curtailed sample" in estimate["label"]
    assert estimate["sample_size"] == 5 and estimate["found"] == 2
    with refused(db, "is decided \\(reject, early\\); no more results"):
        wf.record(LOT, units[5], outcome="pass", by=INSPECTOR)
    before = entry_count(db)
    again = wf.decide(LOT)  # prints the decision, writes nothing
    assert again["decision"] == "reject" and again["curtailed"] and again["already"]
    assert entry_count(db) == before
    shown = wf.show(LOT)
    assert shown["decision"] == "reject" and shown["decision_detail"]["curtailed"]
    assert "curtailed" in shown["estimate"]["major"]["label"]


# --- release, hold, reject ---------------------------------------------------------------------------


def _accepted(wf, sample=5):
    units = drawn_lot(wf, sample=sample, accept=0)
    _record_all(wf, units)
    wf.decide(LOT)
    return units


def test_a_wrong_secret_refuses_the_release_and_is_recorded(wf, db, services):
    _accepted(wf)
    with refused(db, "wrong secret for Tomasz Quayle; the failed attempt is recorded", written=1):
        wf.release(LOT, by=APPROVER, meaning="released by", secret="not-the-secret")
    with refused(db, "Ines Marlowe is an inspector, not an approver", written=1):
        wf.release(LOT, by=INSPECTOR, meaning="released by", secret=SECRETS[INSPECTOR])
    with refused(db, "no person called 'Tomas Quayle'", written=1):
        wf.release(LOT, by="Tomas Quayle", meaning="released by", secret=SECRETS[APPROVER])
    shown = wf.show(LOT)
    assert shown["state"] == "decided" and shown["signatures"] == []
    assert [f["problem"] for f in shown["failed_attempts"]] == [
        "wrong secret for Tomasz Quayle", "Ines Marlowe is an inspector, not an approver",
        "no person called 'Tomas Quayle' is registered"]
    wf.release(LOT, by=APPROVER, meaning="released by", secret=SECRETS[APPROVER])
    assert wf.show(LOT)["state"] == "released"


def test_a_rejected_lot_is_released_only_on_a_documented_disposition(wf, db):
    units = drawn_lot(wf, sample=5, accept=0)
    wf.record(LOT, units[0], outcome="fail", by=INSPECTOR, defect="foreign body: glass chip")
    with refused(db, "was rejected .* documented disposition"):  # and no failed attempt: refused before the secret
        wf.release(LOT, by=APPROVER, meaning="released by", secret=SECRETS[APPROVER])
    wf.hold(LOT, reason="buyer agreed 100 % screening by X-ray; concession C-118", by=APPROVER)
    released = wf.release(LOT, by=APPROVER, meaning="released after screening", secret=SECRETS[APPROVER])
    shown = wf.show(LOT)
    assert shown["state"] == "released" and shown["decision"] == "reject"
    assert [d["disposition"] for d in shown["dispositions"]] == ["hold", "release"]
    assert "documented disposition" in shown["dispositions"][1]["reason"]
    assert released["signature"]["meaning"] == "released after screening"


def test_a_lot_can_be_rejected_from_hold_and_then_nothing_more(wf, db):
    units = drawn_lot(wf, sample=5, accept=0)
    wf.record(LOT, units[0], outcome="fail", by=INSPECTOR)
    wf.hold(LOT, reason="awaiting supplier's answer", by=APPROVER)
    wf.reject(LOT, reason="returned to supplier", by=APPROVER)
    assert wf.show(LOT)["state"] == "rejected"
    with refused(db, "only a decided or held lot can be released"):
        wf.release(LOT, by=APPROVER, meaning="released by", secret=SECRETS[APPROVER])
    with refused(db, "only a decided or held lot can be rejected"):
        wf.reject(LOT, reason="again", by=APPROVER)


# --- corrections ---------------------------------------------------------------------------------------


def test_a_correction_is_a_new_entry_and_the_original_stays(wf):
    units = drawn_lot(wf)
    first = wf.record(LOT, units[0], outcome="fail", by=INSPECTOR, defect="low fill")
    fixed = wf.correct(LOT, units[0], outcome="pass", reason="scale was not tared; 372 g", by=SECOND_INSPECTOR)
    results = wf.show(LOT)["results"]
    assert [r["entry"] for r in results] == [first.entries[0], fixed.entries[0]]
    original, correction = results
    assert original["outcome"] == "fail" and original["current"] is False and "corrects" not in original
    assert correction["corrects"] == original["entry"] and correction["reason"] == "scale was not tared; 372 g"
    assert correction["by"] == SECOND_INSPECTOR and correction["current"] is True
    assert wf.show(LOT)["classes"]["major"]["nonconforming"] == 0


def test_a_correction_that_changes_nothing_or_has_nothing_to_correct_is_refused(wf, db):
    units = drawn_lot(wf)
    wf.record(LOT, units[0], outcome="pass", by=INSPECTOR)
    with refused(db, "would change nothing"):
        wf.correct(LOT, units[0], outcome="pass", reason="just because", by=INSPECTOR)
    with refused(db, "has no result in lot"):
        wf.correct(LOT, units[1], outcome="fail", reason="typo", by=INSPECTOR)
    with refused(db, "reason: expected text"):
        wf.correct(LOT, units[0], outcome="fail", reason="  ", by=INSPECTOR)


def test_a_correction_after_signing_shows_changed_since_signed(wf):
    units = _accepted(wf)
    wf.release(LOT, by=APPROVER, meaning="released by", secret=SECRETS[APPROVER])
    outcome = wf.correct(LOT, units[1], outcome="fail", defect="cracked jar", reason="found at repacking",
                         by=INSPECTOR)
    assert "changed since it was signed" in outcome.note
    shown = wf.show(LOT)
    assert shown["changed_since_signed"] is True
    assert shown["signatures"][0]["changed_since_signed"] is True
    assert shown["decision_detail"]["matches_results"] is False  # accepted, now one fail with Ac 0
    assert shown["state"] == "released"  # the record tells the truth; it does not rewrite history


def test_results_corrected_after_the_decision_block_release_until_decided_again(wf, db):
    units = drawn_lot(wf, sample=5, accept=0)
    _record_all(wf, units[:-1])
    wf.record(LOT, units[-1], outcome="fail", by=INSPECTOR, defect="misread label")
    assert wf.show(LOT)["decision"] == "reject"
    wf.correct(LOT, units[-1], outcome="pass", reason="label read again: it is fine", by=INSPECTOR)
    with refused(db, "corrected after the decision"):
        wf.release(LOT, by=APPROVER, meaning="released by", secret=SECRETS[APPROVER])
    redecided = wf.decide(LOT)
    assert redecided["decision"] == "accept" and redecided["redecided"]
    wf.release(LOT, by=APPROVER, meaning="released by", secret=SECRETS[APPROVER])
    shown = wf.show(LOT)
    assert shown["state"] == "released" and shown["decision"] == "accept"


def test_a_correction_that_withdraws_an_early_rejection_reopens_inspection(wf):
    units = drawn_lot(wf, sample=13, accept=0)
    rejected = wf.record(LOT, units[0], outcome="fail", by=INSPECTOR, defect="chipped rim")
    assert rejected.decision["curtailed"]
    reopened = wf.correct(LOT, units[0], outcome="pass", reason="chip was on the outer carton, not the jar",
                          by=INSPECTOR)
    assert reopened.state == "inspecting" and "withdrew the early rejection" in reopened.note
    _record_all(wf, units[1:])
    assert wf.decide(LOT)["decision"] == "accept"


# --- substitutes --------------------------------------------------------------------------------------------


def test_a_unit_that_cannot_be_inspected_is_substituted_with_its_reason(wf, db):
    units = drawn_lot(wf, sample=5, accept=0)
    done = wf.substitute(LOT, units[1], reason="jar broken in transit", by=INSPECTOR)
    assert done["substitute"] not in units
    with refused(db, f"was replaced by substitute {done['substitute']}"):
        wf.record(LOT, units[1], outcome="pass", by=INSPECTOR)
    wf.record(LOT, done["substitute"], outcome="pass", by=INSPECTOR)
    shown = wf.show(LOT)
    assert done["substitute"] in shown["sample_units"] and units[1] not in shown["sample_units"]
    assert shown["draw"]["substitutes"][0]["reason"] == "jar broken in transit"
    assert shown["draw"]["rederived"] is True  # the substitute is the frame's next one
    with refused(db, "already has a result"):
        wf.substitute(LOT, done["substitute"], reason="dropped", by=INSPECTOR)


# --- several defect classes ------------------------------------------------------------------------------


def test_classes_share_one_draw_and_a_smaller_plan_inspects_a_subsample(wf, db, tmp_path):
    register(wf)
    wf.plan(LOT, sample=20, accept=1)
    wf.plan(LOT, defect_class="critical", sample=8, accept=0)
    drawn = wf.draw(LOT, seed=SEED)
    major = drawn["class_samples"]["major"]["units"]
    critical = drawn["class_samples"]["critical"]["units"]
    assert sorted(major) == sorted(drawn["units"]) and len(major) == 20
    assert len(critical) == 8 and set(critical) <= set(major)
    only_major = next(u for u in major if u not in critical)
    both = critical[0]
    with refused(db, "say which class"):
        wf.record(LOT, both, outcome="fail", by=INSPECTOR)
    with refused(db, "not in the critical sample"):
        wf.record(LOT, only_major, outcome="pass", defect_class="critical", by=INSPECTOR)
    outcome = wf.record(LOT, both, outcome="pass", by=INSPECTOR)  # a pass counts in every class holding it
    assert sorted(outcome.classes) == ["critical", "major"] and len(outcome.entries) == 2
    assert wf.show(LOT)["plans"]["critical"]["details"]["caution"].startswith("Critical defects")


def test_the_subsample_is_fixed_by_the_seed(tmp_path):
    from workflow_fixtures import add_people, make_services

    picks = []
    for name in ("a", "b"):
        with make_services(tmp_path / f"{name}.db") as s:
            add_people(s.workflow)
            register(s.workflow)
            s.workflow.plan(LOT, sample=20, accept=1)
            s.workflow.plan(LOT, defect_class="critical", sample=8, accept=0)
            picks.append(s.workflow.draw(LOT, seed=SEED)["class_samples"])
    assert picks[0] == picks[1]


# --- bad input ---------------------------------------------------------------------------------------------


@pytest.mark.parametrize("kwargs, match", [
    (dict(name="Ines Marlowe", role="inspector", secret="long-enough-1"), "already registered"),
    (dict(name="Ada Thorne", role="boss", secret="long-enough-1"), "role: expected inspector or approver"),
    (dict(name="Ada Thorne", role="inspector", secret="short"), "secret: expected at least 8 characters"),
    (dict(name="  ", role="inspector", secret="long-enough-1"), "name: expected text"),
])
def test_bad_people_are_refused(wf, db, kwargs, match):
    with refused(db, match):
        wf.add_person(**kwargs)


@pytest.mark.parametrize("kwargs, match", [
    (dict(size=15000), "15552"),  # the structure holds 15552 units, not the declared 15000
    (dict(lot_id=""), "id: expected text"),
    (dict(supplier="Harrowgate\x07Preserves"), "supplier: control characters"),
    (dict(structure="pallet=18,layer=four"), "structure"),
])
def test_bad_lots_are_refused(wf, db, kwargs, match):
    args = dict(lot_id=LOT, supplier=SUPPLIER, product=PRODUCT, size=SIZE, structure="pallet=18,layer=4,carton=9,jar=24")
    args.update(kwargs)
    with refused(db, match):
        wf.register_lot(**args)


def test_a_lot_id_is_registered_once(wf, db):
    register(wf)
    with refused(db, "already registered"):
        register(wf)


@pytest.mark.parametrize("kwargs, match", [
    (dict(aql="8", rql="1"), "aql: 8 must be below rql 1"),
    (dict(aql="1"), "go together"),
    (dict(sample=20000, accept=1), "sample: 20000 is more than the lot's 15552 units"),
    (dict(sample=5, accept=5), "accept: 5 must be below the sample size 5"),
    (dict(sample=5, accept=0, defect_class="cosmetic"), "class: expected critical, major or minor"),
    (dict(sample=5, accept=0, aql="1"), "either"),
])
def test_bad_plans_are_refused(wf, db, kwargs, match):
    register(wf)
    with refused(db, match):
        wf.plan(LOT, **kwargs)


def test_with_replacement_is_not_offered_for_a_lot_decision(wf, db):
    register(wf)
    wf.plan(LOT, sample=5, accept=0)
    with refused(db, "method: expected one of simple, stratified, two-stage"):
        wf.draw(LOT, method="with-replacement", seed=1)


def test_lots_are_listed_by_state_and_supplier(wf):
    drawn_lot(wf)
    wf.register_lot(lot_id="QT-0042", supplier="Quayside Tins", product="peach halves 410 g tin", size=2400)
    assert [lot["id"] for lot in wf.lots()] == [LOT, "QT-0042"]
    assert [lot["id"] for lot in wf.lots(state="drawn")] == [LOT]
    assert [lot["id"] for lot in wf.lots(supplier="Quayside Tins")] == ["QT-0042"]
    with pytest.raises(WorkflowError, match="state: expected one of"):
        wf.lots(state="lost")


# --- draws by container, attribution, dates ---------------------------------------------------------------


def test_stratified_and_two_stage_draws_come_from_the_frame(wf, db):
    register(wf)
    wf.plan(LOT, sample=36, accept=1)
    with refused(db, "level: 'crate' is not a container level"):
        wf.draw(LOT, method="stratified", level="crate", seed=SEED)
    with refused(db, "containers"):
        wf.draw(LOT, method="two-stage", seed=SEED)  # k is needed
    drawn = wf.draw(LOT, method="two-stage", level="carton", containers=6, seed=SEED)
    assert drawn["algorithm"] == "two-stage-pps-v1" and "less precise" in drawn["note"]
    shown = wf.show(LOT)
    assert shown["draw"]["rederived"] is True and shown["draw"]["note"] == drawn["note"]


def test_who_registered_planned_drew_and_decided_is_recorded_when_named(wf):
    register(wf, by=INSPECTOR)
    wf.plan(LOT, sample=3, accept=0, by=INSPECTOR)
    units = wf.draw(LOT, seed=SEED, by=SECOND_INSPECTOR)["units"]
    _record_all(wf, units)
    wf.decide(LOT, by=APPROVER)
    history = wf.export(LOT)["history"]
    by_kind = {item["kind"]: item["by"] for item in history if item["kind"] != "event"}
    assert by_kind["lot"] == INSPECTOR and by_kind["plan"] == INSPECTOR
    assert by_kind["draw"] == SECOND_INSPECTOR and by_kind["decision"] == APPROVER


def test_received_date_is_checked(wf, db):
    with refused(db, "received_on: expected a date as YYYY-MM-DD, got '04/03/2025'"):
        register(wf, received_on="04/03/2025")
    register(wf, received_on="2025-03-03")
    assert wf.show(LOT)["received_on"] == "2025-03-03"


def test_a_held_lot_decided_again_can_still_be_released_or_rejected(wf, db):
    units = drawn_lot(wf, sample=3, accept=0)
    _record_all(wf, units)
    wf.decide(LOT)  # accept
    wf.hold(LOT, reason="label artwork query with the buyer", by=APPROVER)
    wf.correct(LOT, units[0], outcome="fail", defect="wrong best-before date", reason="artwork checked",
               by=INSPECTOR)
    assert wf.decide(LOT)["decision"] == "reject"  # re-decided while on hold
    assert wf.show(LOT)["state"] == "on hold"
    released = wf.release(LOT, by=APPROVER, meaning="released after relabelling", secret=SECRETS[APPROVER])
    assert released["state"] == "released"


def test_a_plan_can_come_from_the_code_letter_tables(wf, db):
    wf.register_lot(lot_id="QT-5000", supplier="Quayside Tins", product="peach halves 410 g tin", size=5000)
    plan = wf.plan("QT-5000", aql="1.5", level="II")
    # Lot 5000 at general level II -> code letter L, n = 200, AQL 1.5 -> Ac 7 / Re 8:
    # MIL-STD-105E Table I and II-A, as worked in the cgfinspections.com and
    # apparelscience.com lookups (docs: ../shared/reference-values.md, 5a/5c).
    assert (plan["details"]["code_letter"], plan["sample_size"], plan["accept"], plan["reject"]) == ("L", 200, 7, 8)
    assert plan["chosen_by"] == "table" and plan["severity"] == "normal"
    assert wf.show("QT-5000")["plans"]["major"]["level"] == "II"
    with refused(db, "aql: AQL 1.3 is not a column of the table"):
        wf.plan("QT-5000", aql="1.3", level="II")
    with refused(db, "no --rql"):
        wf.plan("QT-5000", aql="1.5", rql="8", level="II")
