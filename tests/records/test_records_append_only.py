"""The database itself refuses to change or remove anything recorded."""

from __future__ import annotations

import sqlite3

import pytest

from inspector.records import CONTENT_TABLES, open_store
from records_fixtures import raw

GUARDED = ("entries",) + CONTENT_TABLES


@pytest.mark.parametrize("table", GUARDED)
def test_update_is_refused_by_the_database(populated, table):
    path, _ = populated
    conn = raw(path)
    before = conn.execute(f"SELECT * FROM {table} ORDER BY rowid").fetchall()
    assert before, f"the populated store has no {table} rows to protect"
    column = "tbl" if table == "entries" else "recorded_at"
    with pytest.raises(sqlite3.DatabaseError, match=f"{table} is append-only"):
        conn.execute(f"UPDATE {table} SET {column} = 'x'")
    assert conn.execute(f"SELECT * FROM {table} ORDER BY rowid").fetchall() == before
    conn.close()


@pytest.mark.parametrize("table", GUARDED)
def test_delete_is_refused_by_the_database(populated, table):
    path, _ = populated
    conn = raw(path)
    before = conn.execute(f"SELECT count(*) FROM {table}").fetchone()[0]
    with pytest.raises(sqlite3.DatabaseError, match=f"{table} is append-only"):
        conn.execute(f"DELETE FROM {table}")
    assert conn.execute(f"SELECT count(*) FROM {table}").fetchone()[0] == before
    conn.close()


def test_a_content_row_without_its_chain_entry_is_refused(populated):
    path, ids = populated
    conn = raw(path)
    with pytest.raises(sqlite3.DatabaseError, match="needs its chain entry"):
        conn.execute("INSERT INTO suppliers (id, name, recorded_at) VALUES (9999, 'Bogus Ltd', 'now')")
    conn.close()


def test_a_replace_is_refused_too(populated):
    # INSERT OR REPLACE deletes the old row without firing delete triggers
    # (SQLite: only with recursive_triggers on); the no_replace guard stops it.
    path, ids = populated
    conn = raw(path)
    with pytest.raises(sqlite3.DatabaseError, match="never replaced"):
        conn.execute(
            "INSERT OR REPLACE INTO suppliers (id, name, recorded_at) "
            "SELECT id, 'Renamed Ltd', recorded_at FROM suppliers WHERE id = ?",
            (ids["suppliers"],),
        )
    # a new id with its own (forged) entry, but the same unique name
    forged = conn.execute("SELECT max(seq) + 1 FROM entries").fetchone()[0]
    conn.execute("INSERT INTO entries (seq, tbl, content_hash, prev_hash, hash) VALUES (?, 'suppliers', ?, ?, ?)",
                 (forged, "a" * 64, "b" * 64, "c" * 64))
    with pytest.raises(sqlite3.DatabaseError, match="never replaced"):
        conn.execute(
            "INSERT OR REPLACE INTO suppliers (id, name, recorded_at) VALUES (?, 'Harrowgate Preserves', 'x')",
            (forged,),
        )
    with pytest.raises(sqlite3.DatabaseError, match="never replaced"):
        conn.execute("INSERT OR REPLACE INTO entries SELECT * FROM entries WHERE seq = 1")
    conn.close()
    s = open_store(path)
    report = s.verify_chain()
    # the forged entry is the only thing that got in, and the check names it
    assert report.broken.seq == forged and report.broken.table == "suppliers"
    assert {p.seq for p in report.problems} == {forged}
    s.close()
