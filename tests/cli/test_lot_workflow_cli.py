"""The lot workflow from the command line, on a temporary store (--db).

Invented scenario: Harrowgate Preserves, apricot jam in 370 g jars, lot
HP-2611-07 of 18 pallets x 4 layers x 9 cartons x 24 jars; inspectors Ines
Marlowe and Oskar Penhallow, approver Tomasz Quayle.
"""

from __future__ import annotations

import json
import sqlite3

import pytest

from inspector.cli import main

LOT = "HP-2611-07"
SECRETS = {"Ines Marlowe": "kestrel-marmalade-0417", "Oskar Penhallow": "harbour-lantern-2210",
           "Tomasz Quayle": "quince-ledger-9931"}


@pytest.fixture
def cli(cli_on):
    return cli_on("inspector.db")


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


def refused(cli, *args, match, stdin="", written=0):
    """The command must exit 2 with one line naming the problem and write nothing."""
    before = entries(cli.db) if cli.db.exists() else 0
    code, out, err = cli(*args, stdin=stdin)
    assert code == 2, (code, out, err)
    assert err.count("\n") == 1 and err.startswith("inspector: "), err
    assert "Traceback" not in err
    assert match in err, err
    assert out == ""
    assert (entries(cli.db) if cli.db.exists() else 0) == before + written
    return err


def people(cli):
    for name, role in (("Ines Marlowe", "inspector"), ("Oskar Penhallow", "inspector"),
                       ("Tomasz Quayle", "approver")):
        ok_json(cli("person", "add", name, "--role", role, "--secret-stdin", "--json", stdin=SECRETS[name] + "\n"))


def registered(cli, *extra):
    people(cli)
    ok_json(cli("lot", "add", "--id", LOT, "--supplier", "Harrowgate Preserves", "--product",
                "apricot jam 370 g jar", "--size", "15552", "--structure", "pallet=18,layer=4,carton=9,jar=24",
                "--reference", "PO 55120", "--critical", "--json", *extra))


def drawn(cli, sample="13", accept="1"):
    registered(cli)
    ok_json(cli("lot", "plan", LOT, "--sample", sample, "--accept", accept, "--json"))
    return ok_json(cli("lot", "draw", LOT, "--seed", "20250304", "--json"))["units"]


# --- the whole way ----------------------------------------------------------------------------------


def test_the_whole_workflow_runs_from_the_cli_to_a_signed_release(cli):
    registered(cli)
    plan = ok_json(cli("lot", "plan", LOT, "--aql", "1.0", "--rql", "8", "--json"))
    assert plan["sample_size"] >= 1 and plan["reject"] == plan["accept"] + 1 and plan["aql"] == "1.0"
    draw = ok_json(cli("lot", "draw", LOT, "--seed", "007", "--json"))
    assert draw["seed"] == "007" and len(draw["units"]) == plan["sample_size"]
    units = draw["units"]
    addresses = {line["unit"]: line["address"] for stop in draw["walking_order"] for line in stop["units"]}
    for k, unit in enumerate(units):
        where = addresses[unit] if k % 3 == 0 else str(unit)  # some scanned as addresses
        who = "Ines Marlowe" if k % 2 else "Oskar Penhallow"
        recorded = ok_json(cli("lot", "record", LOT, where, "--pass", "--by", who, "--json"))
        assert recorded["unit"] == unit
    decided = ok_json(cli("lot", "decide", LOT, "--json"))
    assert decided["decision"] == "accept" and not decided["curtailed"]
    released = ok_json(cli("lot", "release", LOT, "--by", "Tomasz Quayle", "--meaning", "released by",
                           "--secret-stdin", "--json", stdin=SECRETS["Tomasz Quayle"] + "\n"))
    assert released["state"] == "released"
    shown = ok_json(cli("lot", "show", LOT, "--json"))
    assert shown["state"] == "released"
    assert shown["sample_units"] == sorted(units)
    assert shown["decision"] == "accept" and shown["classes"]["major"]["inspected"] == len(units)
    assert {r["unit"] for r in shown["results"]} == set(units)
    assert all(set(r) >= {"unit", "outcome", "class", "by", "at"} for r in shown["results"])
    assert all(isinstance(r["unit"], int) for r in shown["results"])
    sig = shown["signatures"][0]
    assert (sig["printed_name"], sig["meaning"], sig["changed_since_signed"]) == ("Tomasz Quayle", "released by", False)
    assert ok_json(cli("lots", "--state", "released", "--json"))["lots"][0]["id"] == LOT
    assert ok_json(cli("lots", "--supplier", "Nobody Ltd", "--json"))["lots"] == []
    assert ok_json(cli("audit", "verify", "--json"))["ok"] is True
    assert ok_json(cli("audit", "verify", "--lot", LOT, "--json"))["ok"] is True
    # the text forms run too
    for args in (("lot", "show", LOT), ("lots",), ("audit", "verify"), ("person", "list")):
        code, out, err = cli(*args)
        assert code == 0 and err == "" and out.strip()
    assert "advisory" in cli("lot", "show", LOT)[1]


def test_a_rejected_lot_is_decided_early_and_released_only_after_a_hold(cli):
    units = drawn(cli, sample="13", accept="0")
    ok_json(cli("lot", "record", LOT, str(units[0]), "--pass", "--by", "Ines Marlowe", "--json"))
    failed = ok_json(cli("lot", "record", LOT, str(units[1]), "--fail", "--defect", "glass chip in jam",
                         "--by", "Ines Marlowe", "--json"))
    assert failed["state"] == "decided"
    assert failed["decision"] == {"entry": failed["decision"]["entry"], "decision": "reject", "curtailed": True}
    again = ok_json(cli("lot", "decide", LOT, "--json"))  # already decided: prints it, exit 0
    assert again["decision"] == "reject" and again["already_decided"] and again["curtailed"]
    shown = ok_json(cli("lot", "show", LOT, "--json"))
    assert "curtailed" in shown["estimate"]["major"]["label"]
    refused(cli, "lot", "release", LOT, "--by", "Tomasz Quayle", "--meaning", "released by", "--secret-stdin",
            stdin=SECRETS["Tomasz Quayle"] + "\n", match="documented disposition")
    ok_json(cli("lot", "hold", LOT, "--reason", "buyer's concession C-118 after 100 % X-ray", "--by",
                "Tomasz Quayle", "--json"))
    ok_json(cli("lot", "release", LOT, "--by", "Tomasz Quayle", "--meaning", "released on concession",
                "--secret-stdin", "--json", stdin=SECRETS["Tomasz Quayle"] + "\n"))
    assert ok_json(cli("lot", "show", LOT, "--json"))["state"] == "released"


# --- refusals: one line, exit 2, nothing written ----------------------------------------------------------


def test_deciding_with_units_still_open_is_refused(cli):
    units = drawn(cli)
    ok_json(cli("lot", "record", LOT, str(units[0]), "--pass", "--by", "Ines Marlowe", "--json"))
    refused(cli, "lot", "decide", LOT, match="still has 12 open units")


def test_a_result_outside_the_sample_is_refused(cli):
    units = drawn(cli)
    outside = next(u for u in range(1, 100) if u not in units)
    refused(cli, "lot", "record", LOT, str(outside), "--pass", "--by", "Ines Marlowe",
            match=f"UNIT: {outside} is not in the sample")
    refused(cli, "lot", "record", LOT, "pallet 19 / layer 1 / carton 1 / jar 1", "--pass", "--by", "Ines Marlowe",
            match="UNIT: pallet must be a number from 1 to 18")


def test_a_result_on_a_decided_lot_is_refused(cli):
    units = drawn(cli, sample="8", accept="0")
    ok_json(cli("lot", "record", LOT, str(units[0]), "--fail", "--by", "Ines Marlowe", "--json"))
    refused(cli, "lot", "record", LOT, str(units[1]), "--pass", "--by", "Ines Marlowe",
            match="is decided (reject, early); no more results")


def test_a_release_before_the_decision_is_refused(cli):
    drawn(cli)
    refused(cli, "lot", "release", LOT, "--by", "Tomasz Quayle", "--meaning", "released by", "--secret-stdin",
            stdin=SECRETS["Tomasz Quayle"] + "\n", match="only a decided or held lot can be released")


def test_a_wrong_secret_refuses_the_release_and_is_recorded(cli):
    units = drawn(cli, sample="3", accept="0")
    for unit in units:
        ok_json(cli("lot", "record", LOT, str(unit), "--pass", "--by", "Ines Marlowe", "--json"))
    ok_json(cli("lot", "decide", LOT, "--json"))
    err = refused(cli, "lot", "release", LOT, "--by", "Tomasz Quayle", "--meaning", "released by",
                  "--secret-stdin", stdin="apricot-guess-1\n", match="wrong secret for Tomasz Quayle", written=1)
    assert "apricot-guess-1" not in err
    shown = ok_json(cli("lot", "show", LOT, "--json"))
    assert shown["state"] == "decided" and len(shown["failed_attempts"]) == 1


def test_no_secret_on_the_command_line(cli):
    refused(cli, "person", "add", "Ada Thorne", "--role", "inspector", "--secret", "hunter22-hunter22",
            match="unrecognized arguments")
    refused(cli, "person", "add", "Ada Thorne", "--role", "inspector",
            match="no terminal to ask on; pass it on standard input with --secret-stdin")
    refused(cli, "person", "add", "Ada Thorne", "--role", "inspector", "--secret-stdin", stdin="short\n",
            match="secret: expected at least 8 characters")


@pytest.mark.parametrize("args, match", [
    (("lot", "add", "--id", "X-1", "--supplier", "S", "--product", "P", "--size", "0"), "--size"),
    (("lot", "add", "--id", "X-1", "--supplier", "S", "--product", "P", "--size", "100",
      "--structure", "pallet=3,case=30"), "--size: the nested structure holds 90 units"),
    (("lot", "add", "--id", "X-1", "--supplier", "S", "--product", "P", "--size", "90",
      "--structure", "pallet=3,case=thirty"), "--structure"),
    (("lot", "add", "--id", "X-1", "--supplier", "S", "--product", "P", "--size", "10", "--manifest",
      "/no/such/file.csv"), "--manifest: cannot read"),
    (("lot", "plan", LOT, "--aql", "abc", "--rql", "8"), "--aql"),
    (("lot", "plan", LOT, "--aql", "1", "--rql", "8", "--sample", "5", "--accept", "0"), "not both"),
    (("lot", "plan", LOT, "--sample", "5"), "--accept: --sample and --accept go together"),
    (("lot", "plan", LOT, "--sample", "5", "--accept", "0", "--class", "cosmetic"), "--class"),
    (("lot", "plan", "NO-SUCH-LOT", "--sample", "5", "--accept", "0"), "no lot 'NO-SUCH-LOT'"),
    (("lot", "record", LOT, "1", "--pass", "--fail", "--by", "Ines Marlowe"), "--fail"),
    (("lot", "record", LOT, "1", "--by", "Ines Marlowe"), "--pass --fail"),
    (("lot", "draw", LOT, "--seed", "-4"), "--seed"),
    (("lot", "hold", LOT, "--reason", " ", "--by", "Ines Marlowe"), "--reason"),
    (("lots", "--state", "lost"), "--state"),
])
def test_bad_input_is_named_in_one_line(cli, args, match):
    registered(cli)
    refused(cli, *args, match=match)


def test_a_store_path_in_a_missing_directory_is_named(tmp_path, capsys):
    code = main(["--db", str(tmp_path / "nowhere" / "x.db"), "lots"])
    err = capsys.readouterr().err
    assert code == 2 and err.startswith("inspector: --db:") and err.count("\n") == 1
    assert not (tmp_path / "nowhere").exists()


# --- corrections -------------------------------------------------------------------------------------------


def test_a_correction_after_release_shows_changed_since_signed(cli):
    units = drawn(cli, sample="3", accept="0")
    for unit in units:
        ok_json(cli("lot", "record", LOT, str(unit), "--pass", "--by", "Ines Marlowe", "--json"))
    ok_json(cli("lot", "decide", LOT, "--json"))
    ok_json(cli("lot", "release", LOT, "--by", "Tomasz Quayle", "--meaning", "released by", "--secret-stdin",
                "--json", stdin=SECRETS["Tomasz Quayle"] + "\n"))
    corrected = ok_json(cli("lot", "correct", LOT, str(units[2]), "--fail", "--defect", "seal lifted",
                            "--reason", "found on re-check at dispatch", "--by", "Oskar Penhallow", "--json"))
    assert "changed since it was signed" in corrected["note"]
    shown = ok_json(cli("lot", "show", LOT, "--json"))
    assert shown["changed_since_signed"] is True and shown["signatures"][0]["changed_since_signed"] is True
    original = next(r for r in shown["results"] if r["unit"] == units[2] and "corrects" not in r)
    correction = next(r for r in shown["results"] if r.get("corrects") == original["entry"])
    assert original["outcome"] == "pass" and correction["outcome"] == "fail"
    assert correction["reason"] == "found on re-check at dispatch" and correction["by"] == "Oskar Penhallow"
    assert "CHANGED SINCE SIGNED" in cli("lot", "show", LOT)[1]


def test_draw_and_registration_options_are_named_in_refusals(cli):
    registered(cli)
    ok_json(cli("lot", "plan", LOT, "--sample", "36", "--accept", "1", "--json"))
    refused(cli, "lot", "draw", LOT, "--method", "stratified", "--level", "crate",
            match="--level: 'crate' is not a container level")
    refused(cli, "lot", "add", "--id", "HP-2611-09", "--supplier", "Harrowgate Preserves", "--product", "jam",
            "--size", "10", "--received", "2025-13-01", match="--received: expected a date as YYYY-MM-DD")
    refused(cli, "lot", "draw", LOT, "--by", "Nobody Here", match="--by: no person called 'Nobody Here'")
    drawn = ok_json(cli("lot", "draw", LOT, "--method", "stratified", "--level", "pallet", "--by", "Ines Marlowe",
                        "--json"))
    assert drawn["method"] == "stratified" and drawn["seed_generated"] is True and len(drawn["units"]) == 36
    shown = ok_json(cli("lot", "show", LOT, "--json"))
    assert shown["draw"]["seed"] == drawn["seed"] and shown["draw"]["rederived"] is True


def test_a_table_plan_from_the_cli(cli):
    registered(cli)
    plan = ok_json(cli("lot", "plan", LOT, "--aql", "1.0", "--level", "ii", "--json"))
    assert plan["chosen_by"] == "table" and plan["level"] == "II"
    # 15552 jars at level II -> code letter M (10001-35000), n = 315: MIL-STD-105E Table I,
    # confirmed in ../shared/reference-values.md 5a/5b.
    assert plan["details"]["code_letter"] == "M" and plan["sample_size"] == 315
    refused(cli, "lot", "plan", LOT, "--aql", "1.0", "--level", "IV", match="--level: expected one of")
    refused(cli, "lot", "plan", LOT, "--aql", "1.0", "--rql", "8", "--severity", "tightened", match="--aql only")
