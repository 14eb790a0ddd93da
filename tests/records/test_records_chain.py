"""The audit chain: it verifies when intact, and names the first broken entry
when anything recorded was changed behind the tool's back.

To simulate such a change the tests open the file with plain sqlite3 and drop
the guard trigger first -- exactly what someone editing by hand would do."""

from __future__ import annotations

import pytest

from inspector.records import open_store
from records_fixtures import LOT, OTHER_LOT, raw

# One edit per content table, each the kind of change that would matter.
EDITS = {
    "suppliers": ("name", "Harrowgate Preserves Ltd"),
    "products": ("name", "apricot jam 340 g jar"),
    "people": ("role", "approver"),  # an inspector made approver
    "lots": ("quantity", 15000),
    "plans": ("sample_size", 3),
    "draws": ("seed", "12345"),
    "substitutes": ("reason", "could not reach it"),
    "results": ("outcome", "pass"),  # wait -- the first result already passes
    "decisions": ("decision", "accept"),
    "dispositions": ("reason", "buyer agreed"),
    "signatures": ("meaning", "inspected by"),
    "failed_attempts": ("problem", "none"),
    "events": ("to_state", "released"),
    "corrective_actions": ("description", "none needed"),
}
EDITS["results"] = ("defect", "scratched label")  # the original row has no defect: add one


def _tamper(path, table, row_id, column, value):
    conn = raw(path)
    conn.execute(f"DROP TRIGGER {table}_no_update")
    conn.execute(f"UPDATE {table} SET {column} = ? WHERE id = ?", (value, row_id))
    assert conn.total_changes == 1
    conn.close()


def test_an_intact_store_verifies(populated):
    path, _ = populated
    s = open_store(path)
    report = s.verify_chain()
    assert report.ok and report.broken is None and report.missing_guards == ()
    assert report.checked == raw(path).execute("SELECT count(*) FROM entries").fetchone()[0]
    assert report.head is not None and len(report.head) == 64
    lot_report = s.verify_chain(LOT)
    assert lot_report.ok and 0 < lot_report.checked < report.checked
    s.close()


def test_every_content_table_has_an_edit_case(populated):
    from inspector.records import CONTENT_TABLES

    assert set(EDITS) == set(CONTENT_TABLES)


@pytest.mark.parametrize("table", sorted(EDITS))
def test_a_hand_edited_row_is_caught_and_named(populated, table):
    path, ids = populated
    column, value = EDITS[table]
    _tamper(path, table, ids[table], column, value)
    s = open_store(path)
    report = s.verify_chain()
    assert not report.ok
    assert report.broken.table == table
    assert report.broken.row_id == ids[table] == report.broken.seq
    assert "changed" in report.broken.problem
    assert f"entry {ids[table]} ({table} row {ids[table]})" in report.broken.describe()
    assert f"{table}_no_update (missing)" in report.missing_guards
    s.close()


def test_the_first_of_two_broken_entries_is_named(populated):
    path, ids = populated
    _tamper(path, "decisions", ids["decisions"], "decision", "accept")
    _tamper(path, "results", ids["results"], "outcome", "fail")
    s = open_store(path)
    report = s.verify_chain()
    assert ids["results"] < ids["decisions"]
    assert (report.broken.table, report.broken.row_id) == ("results", ids["results"])
    assert [(p.table, p.row_id) for p in report.problems] == [
        ("results", ids["results"]), ("decisions", ids["decisions"])]
    s.close()


def test_an_edit_in_one_lot_is_caught_by_that_lots_check_only(populated):
    path, ids = populated
    _tamper(path, "results", ids["results"], "outcome", "fail")
    s = open_store(path)
    lot_report = s.verify_chain(LOT)
    assert not lot_report.ok and lot_report.broken.row_id == ids["results"]
    other = s.verify_chain(OTHER_LOT)
    assert other.broken is None  # its own entries are intact (only the guard is missing)
    s.close()


def test_an_edited_entry_is_caught(populated):
    path, ids = populated
    conn = raw(path)
    conn.execute("DROP TRIGGER entries_no_update")
    conn.execute("UPDATE entries SET content_hash = ? WHERE seq = ?", ("f" * 64, ids["plans"]))
    conn.close()
    s = open_store(path)
    report = s.verify_chain()
    assert report.broken.seq == ids["plans"]
    assert "entry itself was changed" in report.broken.problem
    s.close()


def test_an_edited_row_with_its_entry_rehashed_breaks_the_next_link(populated):
    # Someone edits a result and recomputes that entry's hashes, but not the rest.
    from inspector.records.canonical import content_hash, entry_hash

    path, ids = populated
    rid = ids["results"]
    conn = raw(path)
    for trigger in ("results_no_update", "entries_no_update"):
        conn.execute(f"DROP TRIGGER {trigger}")
    conn.execute("UPDATE results SET outcome = 'fail' WHERE id = ?", (rid,))
    cursor = conn.execute("SELECT * FROM results WHERE id = ?", (rid,))
    row = dict(zip([d[0] for d in cursor.description], cursor.fetchone()))
    seq, tbl, lot, _, prev, _ = conn.execute("SELECT * FROM entries WHERE seq = ?", (rid,)).fetchone()
    new_content = content_hash("results", row)
    new_hash = entry_hash(seq=seq, table=tbl, lot_id=lot, content=new_content, prev=prev)
    conn.execute("UPDATE entries SET content_hash = ?, hash = ? WHERE seq = ?", (new_content, new_hash, rid))
    conn.close()
    s = open_store(path)
    report = s.verify_chain()
    assert report.broken.seq == rid + 1
    assert "link to the previous entry" in report.broken.problem
    s.close()


def test_a_deleted_row_is_caught(populated):
    path, ids = populated
    conn = raw(path)
    conn.execute("DROP TRIGGER results_no_delete")
    conn.execute("DELETE FROM results WHERE id = ?", (ids["results"],))
    conn.close()
    s = open_store(path)
    report = s.verify_chain()
    assert (report.broken.table, report.broken.row_id) == ("results", ids["results"])
    assert "missing" in report.broken.problem
    s.close()


def test_a_deleted_entry_in_the_middle_is_caught(populated):
    path, ids = populated
    conn = raw(path)
    conn.execute("PRAGMA foreign_keys = OFF")
    conn.execute("DROP TRIGGER entries_no_delete")
    conn.execute("DELETE FROM entries WHERE seq = ?", (ids["draws"],))
    conn.close()
    s = open_store(path)
    report = s.verify_chain()
    assert report.broken.seq == ids["draws"]
    assert report.broken.table == "entries"
    assert f"entries {ids['draws']}..{ids['draws']} are missing" in report.broken.problem
    s.close()


def test_a_cut_off_end_of_the_chain_is_caught(populated):
    path, _ = populated
    conn = raw(path)
    last = conn.execute("SELECT max(seq) FROM entries").fetchone()[0]
    (table,) = conn.execute("SELECT tbl FROM entries WHERE seq = ?", (last,)).fetchone()
    for trigger in ("entries_no_delete", f"{table}_no_delete"):
        conn.execute(f"DROP TRIGGER {trigger}")
    conn.execute(f"DELETE FROM {table} WHERE id = ?", (last,))
    conn.execute("DELETE FROM entries WHERE seq = ?", (last,))
    conn.close()
    s = open_store(path)
    report = s.verify_chain()
    assert not report.ok and report.broken.seq == last
    assert "end of the chain was cut" in report.broken.problem
    s.close()


def test_a_row_slipped_in_without_an_entry_is_caught(populated):
    path, ids = populated
    conn = raw(path)
    conn.execute("DROP TRIGGER results_in_chain")
    conn.execute(
        "INSERT INTO results (id, lot_id, unit, defect_class, outcome, by_person, recorded_at) "
        "VALUES (9000, ?, 99, 'major', 'pass', ?, '2025-03-04T10:00:00.000+01:00')",
        (LOT, ids["people"]),
    )
    conn.close()
    s = open_store(path)
    report = s.verify_chain()
    assert (report.broken.table, report.broken.row_id) == ("results", 9000)
    assert "no chain entry" in report.broken.problem
    assert not s.verify_chain(LOT).ok
    s.close()


def test_a_replaced_guard_is_reported(populated):
    path, _ = populated
    conn = raw(path)
    conn.execute("DROP TRIGGER results_no_update")
    conn.execute("CREATE TRIGGER results_no_update BEFORE UPDATE ON results BEGIN SELECT 1; END")
    conn.close()
    s = open_store(path)
    report = s.verify_chain()
    assert report.broken is None and not report.ok
    assert report.missing_guards == ("results_no_update (altered)",)
    s.close()


# --- the record hash behind signatures ---------------------------------------------------


def test_record_hash_changes_with_a_correction_but_not_with_a_signature(populated):
    path, ids = populated
    s = open_store(path)
    signed = s.record_hash(LOT)
    with s.reading() as r:
        # the fixture's signature was taken after the decision and disposition:
        # nothing in the record changed since
        assert r.signatures(LOT)[0].record_hash == signed
    with s.transaction() as tx:
        tx.add_signature(lot_id=LOT, person_id=ids["people"], printed_name="Ines Marlowe",
                         meaning="inspected by", record_hash=tx.record_hash(LOT))
        tx.add_event(lot_id=LOT, kind="note", detail={"text": "sheet printed"})
    assert s.record_hash(LOT) == signed
    with s.transaction() as tx:
        tx.add_result(lot_id=LOT, unit=777, defect_class="major", outcome="fail", by_person=ids["people"],
                      corrects=ids["results"] + 1, reason="dent cut the seal after all")
    assert s.record_hash(LOT) != signed
    assert s.record_hash(OTHER_LOT) != s.record_hash(LOT)
    s.close()
