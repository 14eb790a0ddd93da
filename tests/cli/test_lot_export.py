"""Exports of a lot's record, and `audit verify` catching a hand edit.

CSV cells a spreadsheet would run as formulas (= + - @, tab, carriage return
at the start) must be neutralised -- OWASP's "CSV Injection" guidance, common
practice -- while codes such as 000123 are written exactly as typed.
"""

from __future__ import annotations

import csv
import json
import sqlite3

import pytest


LOT = "000123"  # a lot code with leading zeros, as some suppliers number them
SECRETS = {"Ines Marlowe": "kestrel-marmalade-0417", "Tomasz Quayle": "quince-ledger-9931"}
# What an inspector might type; leading tabs and returns never reach the
# record (text input is trimmed), so those two are checked on the cell
# function directly below.
DANGEROUS = ["=SUM(A1:A9)", "+44 1632 960123", "-3 g underfill", "@HYPERLINK(\"http://x\")"]


@pytest.fixture
def cli(cli_on):
    return cli_on("inspector.db", no_traceback=True)


def ok(result):
    code, out, err = result
    assert code == 0, err
    return json.loads(out) if out.startswith("{") else out


@pytest.fixture
def released(cli):
    """A released lot whose record holds every kind of awkward text, then a
    correction after the signature."""
    for name, role in (("Ines Marlowe", "inspector"), ("Tomasz Quayle", "approver")):
        ok(cli("person", "add", name, "--role", role, "--secret-stdin", "--json", stdin=SECRETS[name] + "\n"))
    ok(cli("lot", "add", "--id", LOT, "--supplier", "=Harrowgate Preserves", "--product", "apricot jam 370 g jar",
           "--size", "864", "--structure", "carton=36,jar=24", "--reference", "0042", "--critical", "--json"))
    ok(cli("lot", "plan", LOT, "--sample", str(len(DANGEROUS) + 2), "--accept", str(len(DANGEROUS)), "--json"))
    units = ok(cli("lot", "draw", LOT, "--seed", "99", "--json"))["units"]
    for unit, text in zip(units, DANGEROUS):
        ok(cli("lot", "record", LOT, str(unit), "--fail", "--defect", text, "--note", text, "--by", "Ines Marlowe",
               "--json"))
    for unit in units[len(DANGEROUS):]:
        ok(cli("lot", "record", LOT, str(unit), "--pass", "--by", "Ines Marlowe", "--json"))
    ok(cli("lot", "decide", LOT, "--json"))
    ok(cli("lot", "release", LOT, "--by", "Tomasz Quayle", "--meaning", "released by", "--secret-stdin", "--json",
           stdin=SECRETS["Tomasz Quayle"] + "\n"))
    ok(cli("lot", "correct", LOT, str(units[0]), "--pass", "--reason", "=formula in a reason", "--by",
           "Ines Marlowe", "--json"))
    return units


def _rows(path):
    with open(path, encoding="utf-8-sig", newline="") as fh:
        return list(csv.reader(fh))


def test_csv_cells_that_would_run_as_formulas_are_neutralised(cli, released, tmp_path):
    path = tmp_path / "lot.csv"
    summary = ok(cli("lot", "export", LOT, "--format", "csv", "-o", str(path), "--json"))
    assert summary["chain_verified"] is True
    rows = _rows(path)
    cells = [cell for row in rows for cell in row]
    for cell in cells:
        assert not cell.startswith(("=", "+", "-", "@", "\t", "\r")), cell
    for text in DANGEROUS:
        assert "'" + text in cells, text  # kept, with a leading apostrophe
    assert "'=Harrowgate Preserves" in cells
    assert "'=formula in a reason" in cells
    assert not any(cell.startswith("=\"") for cell in cells)  # never a ="000123" formula


@pytest.mark.parametrize("text", ["=1+1", "+1", "-1", "@x", "\tx", "\rx"])
def test_the_cell_function_neutralises_every_formula_start(text):
    from inspector.cli.lot import neutralise

    assert neutralise(text) == "'" + text


@pytest.mark.parametrize("value, cell", [("000123", "000123"), (42, "42"), (None, ""), (True, "true"),
                                         ("jam = fine", "jam = fine"), ("'quoted", "'quoted")])
def test_the_cell_function_leaves_everything_else_as_it_is(value, cell):
    from inspector.cli.lot import neutralise

    assert neutralise(value) == cell


def test_csv_writes_codes_exactly_as_typed(cli, released, tmp_path):
    path = tmp_path / "lot.csv"
    ok(cli("lot", "export", LOT, "--format", "csv", "-o", str(path)))
    rows = _rows(path)
    header = {row[0]: row[1] for row in rows[:12] if len(row) == 2}
    assert header["lot"] == "000123" and header["reference"] == "0042"
    assert header["changed_since_signed"] == "true"


def test_csv_holds_the_whole_history_corrections_included(cli, released, tmp_path):
    path = tmp_path / "lot.csv"
    ok(cli("lot", "export", LOT, "--format", "csv", "-o", str(path)))
    rows = _rows(path)
    start = next(i for i, row in enumerate(rows) if row[:2] == ["entry", "kind"])
    header, body = rows[start], [dict(zip(rows[start], row)) for row in rows[start + 1:]]
    kinds = [row["kind"] for row in body]
    for kind in ("lot", "plan", "draw", "result", "correction", "decision", "disposition", "signature", "event"):
        assert kind in kinds, kind
    correction = next(row for row in body if row["kind"] == "correction")
    original = next(row for row in body if row["entry"] == correction["corrects"])
    assert original["outcome"] == "fail" and correction["outcome"] == "pass"
    assert all(len(row["hash"]) == 64 for row in body)
    assert [int(row["entry"]) for row in body] == sorted(int(row["entry"]) for row in body)
    assert "hash" in header


def test_json_export_is_a_complete_copy(cli, released, tmp_path):
    path = tmp_path / "lot.json"
    ok(cli("lot", "export", LOT, "--format", "json", "-o", str(path)))
    data = json.loads(path.read_text(encoding="utf-8"))
    assert data["id"] == "000123" and data["supplier"] == "=Harrowgate Preserves"  # JSON keeps text as is
    assert data["changed_since_signed"] is True and data["chain"]["verified"] is True
    assert len([r for r in data["results"]]) == len(released) + 1
    kinds = {item["kind"] for item in data["history"]}
    assert {"lot", "plan", "draw", "result", "correction", "decision", "disposition", "signature"} <= kinds
    text = path.read_text(encoding="utf-8")
    for secret in SECRETS.values():
        assert secret not in text


def test_export_refuses_a_missing_directory_and_writes_nothing(cli, released, tmp_path):
    code, out, err = cli("lot", "export", LOT, "--format", "csv", "-o", str(tmp_path / "nope" / "x.csv"))
    assert code == 2 and "--output: directory" in err and err.count("\n") == 1
    assert not (tmp_path / "nope").exists()


def test_no_secret_in_the_store_files(cli, released):
    data = b""
    for suffix in ("", "-wal", "-shm"):
        part = cli.db.with_name(cli.db.name + suffix)
        if part.exists():
            data += part.read_bytes()
    assert b"Tomasz Quayle" in data
    for secret in SECRETS.values():
        assert secret.encode() not in data


def test_audit_verify_catches_a_hand_edited_result(cli, released):
    assert ok(cli("audit", "verify", "--json"))["ok"] is True
    conn = sqlite3.connect(cli.db)
    target = conn.execute("SELECT id FROM results WHERE outcome = 'fail' ORDER BY id LIMIT 1 OFFSET 1").fetchone()[0]
    conn.execute("DROP TRIGGER results_no_update")  # what someone editing behind the tool's back would do
    conn.execute("UPDATE results SET outcome = 'pass' WHERE id = ?", (target,))
    conn.commit()
    conn.close()
    code, out, err = cli("audit", "verify")
    assert code == 1
    assert f"entry {target} (results row {target})" in out and "changed" in out
    report = json.loads(cli("audit", "verify", "--lot", LOT, "--json")[1])
    assert report["ok"] is False and report["first_broken"]["entry"] == target
    assert report["first_broken"]["table"] == "results"
    assert "results_no_update (missing)" in report["missing_guards"]
