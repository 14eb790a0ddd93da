"""`lot add --resubmits`, `lot plan --table`, `supplier action` and `history`
on a temporary store (--db), with XDG_DATA_HOME pointed at the temporary
directory so that nothing touches the user's data directory.

Lots are decided quickly through the workflow (test helpers below); the CLI
runs the commands whose contract is under test.

Rules: MIL-STD-105E ¶4.7–4.8 / ANSI/ASQ Z1.4 ¶8.3–8.5 as paraphrased in
../shared/reference-values.md 5f. Plans: a lot of 80 jars at general level II
takes code letter E, n = 13 (Table I, reference-values.md 5a/5b, confirmed);
at AQL 6.5 Table II-A gives Ac 2 / Re 3 and Table II-B Ac 1 / Re 2; at AQL 1.0
Table II-A gives Ac 0 / Re 1 (nibs.org AC-TABLE.ASC Tables 1-A/1-B,
reference-values.md 5c/5d, "yes (derived)").

Invented scenario: Harrowgate Preserves, apricot jam in 370 g jars, lots
HP-2612-01 ...; inspector Ines Marlowe.
"""

from __future__ import annotations

import json
import sqlite3

import pytest

from inspector.services import build_services

SUPPLIER = "Harrowgate Preserves"
JAM = "apricot jam 370 g jar"
INSPECTOR = "Ines Marlowe"
SECRET = "kestrel-marmalade-0417"


def lot_id(k: int) -> str:
    return f"HP-2612-{k:02d}"


@pytest.fixture
def cli(cli_on, tmp_path):
    run = cli_on("x.db")
    ok_json(run("person", "add", INSPECTOR, "--role", "inspector", "--secret-stdin", "--json",
                stdin=SECRET + "\n"))
    yield run
    assert not (tmp_path / "xdg").exists()  # the default data directory was never touched


def entries(db) -> int:
    conn = sqlite3.connect(db)
    try:
        return conn.execute("SELECT count(*) FROM entries").fetchone()[0]
    finally:
        conn.close()


def ok_json(result) -> dict:
    code, out, err = result
    assert code == 0, err
    assert err == ""
    return json.loads(out)


def refused(cli, *args, match):
    """Exit 2, one line naming the problem, nothing on stdout, nothing written."""
    before = entries(cli.db)
    code, out, err = cli(*args)
    assert code == 2, (code, out, err)
    assert err.count("\n") == 1 and err.startswith("inspector: "), err
    assert "Traceback" not in err
    assert match in err, err
    assert out == ""
    assert entries(cli.db) == before
    return err


# --- deciding lots quickly through the workflow ---------------------------------------------


def decide_lots(cli, pattern: str, start: int = 1) -> None:
    """'ARAAR': lots of 80 jars registered, planned from the tables at the
    severity in force, drawn and decided accept/reject in that order;
    lower-case 'a'/'r' resubmit the lot before them."""
    services = build_services(str(cli.db), environ={})
    try:
        wf = services.workflow
        for i, ch in enumerate(pattern):
            lid = lot_id(start + i)
            resubmits = lot_id(start + i - 1) if ch.islower() else None
            wf.register_lot(lot_id=lid, supplier=SUPPLIER, product=JAM, size=80, resubmission_of=resubmits,
                            received_on="2026-12-01")
            plan = wf.plan(lid, aql="6.5", table=True)
            units = wf.draw(lid, seed=20261201 + i)["units"]
            if ch in "Aa":
                for unit in units:
                    wf.record(lid, unit, outcome="pass", by=INSPECTOR)
                wf.decide(lid)
            else:
                for unit in units[: plan["reject"]]:
                    wf.record(lid, unit, outcome="fail", by=INSPECTOR, defect="lid not sealed")
    finally:
        services.close()


def add_lot(cli, k: int, *extra) -> dict:
    return ok_json(cli("lot", "add", "--id", lot_id(k), "--supplier", SUPPLIER, "--product", JAM, "--size", "80",
                       "--json", *extra))


def history(cli, *extra) -> dict:
    return ok_json(cli("history", SUPPLIER, "--json", *extra))


# --- the contract ---------------------------------------------------------------------------


def test_two_rejections_in_five_lots_tighten_and_lot_plan_table_uses_table_II_B(cli):
    decide_lots(cli, "ARAAR")
    report = history(cli)
    assert report["severity"] == "tightened" and report["reduced_eligible"] is False
    add_lot(cli, 6)
    plan = ok_json(cli("lot", "plan", lot_id(6), "--table", "--aql", "6.5", "--json"))
    assert (plan["sample_size"], plan["accept"], plan["reject"]) == (13, 1, 2)  # II-B, E/6.5
    assert plan["chosen_by"] == "table" and plan["severity"] == "tightened" and plan["level"] == "II"
    d = plan["details"]
    assert d["table"] == "Table II-B (tightened)" and d["code_letter"] == "E" and d["provenance"] == "confirmed"
    assert d["severity_source"] == "switching rules" and d["switching"]["severity"] == "tightened"
    for key in ("pa_at_aql_lot", "pa_at_aql_process", "rql_at_consumer_risk_lot", "rql_at_consumer_risk_process"):
        assert 0 <= d[key] <= 1
    code, out, err = cli("lot", "plan", lot_id(6), "--table", "--aql", "6.5")
    assert code == 0 and "Severity: tightened (from the switching rules); Table II-B (tightened)" in out


def test_lot_plan_table_on_a_new_supplier_is_normal_and_a_typed_severity_is_recorded_as_entered(cli):
    add_lot(cli, 1)
    plan = ok_json(cli("lot", "plan", lot_id(1), "--table", "--aql", "6.5", "--level", "II", "--json"))
    assert (plan["sample_size"], plan["accept"], plan["reject"]) == (13, 2, 3)  # II-A, E/6.5
    assert plan["details"]["table"] == "Table II-A (normal)"
    plan = ok_json(cli("lot", "plan", lot_id(1), "--table", "--aql", "6.5", "--severity", "tightened", "--json"))
    assert plan["severity"] == "tightened" and plan["details"]["severity_source"] == "entered"
    assert plan["details"]["severity_by_rules"] == "normal"
    refused(cli, "lot", "plan", lot_id(1), "--table", "--aql", "6.5", "--rql", "20", match="--aql only")
    refused(cli, "lot", "plan", lot_id(1), "--table", match="--aql: a table plan needs --aql")
    refused(cli, "lot", "plan", lot_id(1), "--table", "--aql", "1.3", match="--aql: AQL 1.3 is not a column")


def test_history_lists_each_lot_and_five_acceptances_return_to_normal(cli):
    decide_lots(cli, "RR" + "AAAA")
    report = history(cli)
    assert report["severity"] == "tightened"
    assert [lot["severity"] for lot in report["lots"]] == ["normal"] * 2 + ["tightened"] * 4
    first = report["lots"][0]
    assert first["lot_id"] == lot_id(1) and first["product"] == JAM and first["decision"] == "reject"
    assert first["resubmission"] is False and first["received_on"] == "2026-12-01"
    assert (first["nonconforming"], first["sample_size"]) == (3, 13)
    assert report["lots"][2]["planned_severity"] == "tightened"
    decide_lots(cli, "A", start=7)
    report = history(cli, "--product", JAM)
    assert report["severity"] == "normal" and report["product"] == JAM
    assert "5 consecutive lots were accepted on tightened" in report["reason"]
    code, out, err = cli("history", SUPPLIER)
    assert code == 0 and "Severity now: NORMAL" in out and "HP-2612-07" in out


def test_resubmits_marks_a_resubmitted_lot_and_resubmitted_lots_do_not_count(cli):
    decide_lots(cli, "R")
    shown = add_lot(cli, 2, "--resubmits", lot_id(1))
    assert shown["id"] == lot_id(2)
    assert ok_json(cli("lot", "show", lot_id(2), "--json"))["resubmission_of"] == lot_id(1)
    refused(cli, "lot", "add", "--id", lot_id(3), "--supplier", SUPPLIER, "--product", JAM, "--size", "80",
            "--resubmits", "HP-2612-99", match="--resubmits: no lot 'HP-2612-99' is registered")
    # the earlier option name still works
    refused(cli, "lot", "add", "--id", lot_id(3), "--supplier", SUPPLIER, "--product", JAM, "--size", "80",
            "--resubmission-of", "HP-2612-98", match="--resubmits: no lot 'HP-2612-98'")
    decide_lots(cli, "Rr", start=3)  # HP-2612-04 resubmits HP-2612-03 and is rejected again
    report = history(cli)
    # originals rejected: 01 and 03, two of two consecutive originals; the resubmissions do not count
    assert report["severity"] == "tightened"
    flags = {lot["lot_id"]: (lot["resubmission"], lot["counted"]) for lot in report["lots"]}
    assert flags[lot_id(4)] == (True, False) and flags[lot_id(2)] == (True, False)
    assert flags[lot_id(3)] == (False, True)


def test_resubmitted_rejections_alone_do_not_tighten(cli):
    decide_lots(cli, "Rrr")
    assert history(cli)["severity"] == "normal"


def test_discontinued_inspection_refuses_table_planning_until_corrective_action(cli):
    decide_lots(cli, "RR" + "RRRRR")
    assert history(cli)["severity"] == "discontinued"
    add_lot(cli, 8)
    err = refused(cli, "lot", "plan", lot_id(8), "--table", "--aql", "6.5",
                  match="discontinued after 5 lots not accepted on tightened")
    assert "record corrective action with `inspector supplier action`" in err
    refused(cli, "supplier", "action", SUPPLIER, "--note", "line retrained", "--by", "Nobody",
            match="--by: no person called 'Nobody' is registered")
    refused(cli, "supplier", "action", "Harrowgate Foods", "--note", "line retrained", "--by", INSPECTOR,
            match="SUPPLIER: no supplier called 'Harrowgate Foods' is registered")
    refused(cli, "supplier", "action", SUPPLIER, "--product", "quince jelly", "--note", "line retrained",
            "--by", INSPECTOR, match="--product: Harrowgate Preserves has no lots of 'quince jelly'")
    refused(cli, "supplier", "action", SUPPLIER, "--note", " ", "--by", INSPECTOR, match="--note: expected some text")
    done = ok_json(cli("supplier", "action", SUPPLIER, "--product", JAM, "--note",
                       "filling line 2 retrained; seal torque checked hourly", "--by", INSPECTOR, "--json"))
    assert done["lifted"] is True and done["severity_before"] == "discontinued" and done["severity"] == "tightened"
    report = history(cli)
    assert report["severity"] == "tightened"
    assert report["corrective_actions"][0]["after_lot"] == lot_id(7)
    plan = ok_json(cli("lot", "plan", lot_id(8), "--table", "--aql", "6.5", "--json"))
    assert plan["severity"] == "tightened" and (plan["accept"], plan["reject"]) == (1, 2)


def test_ten_acceptances_on_normal_show_reduced_eligibility(cli):
    decide_lots(cli, "A" * 9)
    assert history(cli)["reduced_eligible"] is False
    decide_lots(cli, "A", start=10)
    report = history(cli)
    assert report["reduced_eligible"] is True and report["severity"] == "normal"
    code, out, err = cli("history", SUPPLIER)
    assert code == 0 and "(eligible for reduced inspection)" in out


def test_history_of_an_unknown_supplier_or_product_is_refused(cli):
    refused(cli, "history", "Harrowgate Foods", match="SUPPLIER: no supplier called 'Harrowgate Foods'")
    decide_lots(cli, "A")
    refused(cli, "history", SUPPLIER, "--product", "quince jelly", match="--product: Harrowgate Preserves has no lots")


def test_a_critical_class_with_ac_0_is_shown_and_rejects_the_lot_even_when_major_accepts(cli):
    add_lot(cli, 1, "--critical")
    critical = ok_json(cli("lot", "plan", lot_id(1), "--table", "--aql", "1.0", "--class", "critical", "--json"))
    assert (critical["sample_size"], critical["accept"], critical["reject"]) == (13, 0, 1)  # II-A, E/1.0
    ok_json(cli("lot", "plan", lot_id(1), "--table", "--aql", "6.5", "--class", "major", "--json"))
    shown = ok_json(cli("lot", "show", lot_id(1), "--json"))
    assert shown["plans"]["critical"]["no_allowance"] is True
    assert shown["plans"]["critical"]["allowance"] == "critical: Ac 0 — any nonconforming unit rejects the lot"
    code, out, err = cli("lot", "show", lot_id(1))
    assert code == 0 and "critical: Ac 0 — any nonconforming unit rejects the lot" in out
    assert "advisory" in out  # a food lot's results are advisory

    services = build_services(str(cli.db), environ={})
    try:
        wf = services.workflow
        units = wf.draw(lot_id(1), seed=20261201)["units"]
        for unit in units:
            wf.record(lot_id(1), unit, outcome="pass", by=INSPECTOR, defect_class="major")
    finally:
        services.close()
    recorded = ok_json(cli("lot", "record", lot_id(1), str(units[0]), "--fail", "--class", "critical",
                           "--defect", "glass fragment", "--by", INSPECTOR, "--json"))
    assert recorded["decision"]["decision"] == "reject"
    shown = ok_json(cli("lot", "show", lot_id(1), "--json"))
    assert shown["classes"]["major"]["verdict"] == "accept" and shown["classes"]["critical"]["verdict"] == "reject"
    assert shown["decision"] == "reject"
    report = history(cli)
    assert report["lots"][0]["decision"] == "reject" and report["cautions"]  # advisory shown for a food lot
