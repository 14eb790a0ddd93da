"""Checking the audit chain, and the hash of a lot's record.

The chain (see :mod:`inspector.records.schema`): entry ``seq`` names a content
row ``table.id = seq``; its ``content_hash`` is the hash of that row's
canonical content, and its ``hash`` covers its place, table, lot, content hash
and the previous entry's hash.

:func:`verify_chain` re-reads everything and recomputes every hash. It catches

* a content row edited, or deleted, or moved to another lot;
* a row added to a content table without an entry;
* an entry edited, deleted (a gap in the numbers or a broken link) or cut off
  the end (SQLite's AUTOINCREMENT counter remembers the highest number issued);
* a guard trigger dropped or replaced.

What a hash chain without a secret key cannot catch is someone who rewrites a
row *and* recomputes every later hash with this very code. Against that, the
head hash (and each signature's record hash) printed on a signed sheet is the
outside anchor: a rewritten store no longer reproduces it.
"""

from __future__ import annotations

import re
import sqlite3
from typing import Iterator

from inspector.records.canonical import GENESIS, content_hash, entry_hash, sha256_hex, canonical_json
from inspector.records.models import BrokenEntry, ChainReport
from inspector.records.schema import CONTENT_TABLES, expected_guards

# The tables whose entries make up a lot's record for signing. Signatures,
# failed attempts and the event log are about the record, not part of it: a
# second signature must not make the first one look out of date.
RECORD_TABLES = ("lots", "plans", "draws", "substitutes", "results", "decisions", "dispositions")

_MAX_PROBLEMS = 100


def _normalise_sql(sql: str | None) -> str:
    return re.sub(r"\s+", " ", sql or "").strip().rstrip(";").strip()


def _rows(conn: sqlite3.Connection, sql: str, params=()) -> Iterator[dict]:
    cursor = conn.execute(sql, params)
    names = [d[0] for d in cursor.description]
    for values in cursor:
        yield dict(zip(names, values))


def _columns(conn: sqlite3.Connection, table: str) -> list[str]:
    return [row[1] for row in conn.execute(f"PRAGMA table_info({table})")]


class _Cursor:
    """A peekable iterator over one table's rows in id order."""

    def __init__(self, rows: Iterator[dict]) -> None:
        self._rows = rows
        self.head: dict | None = next(rows, None)

    def advance(self) -> dict | None:
        current = self.head
        self.head = next(self._rows, None)
        return current


def missing_guards(conn: sqlite3.Connection) -> tuple[str, ...]:
    """Guard triggers that are absent or differ from the schema's text."""
    present = {name: sql for name, sql in conn.execute("SELECT name, sql FROM sqlite_master WHERE type = 'trigger'")}
    out = []
    for name, sql in expected_guards().items():
        if name not in present:
            out.append(f"{name} (missing)")
        elif _normalise_sql(present[name]) != _normalise_sql(sql):
            out.append(f"{name} (altered)")
    return tuple(out)


def verify_chain(conn: sqlite3.Connection, lot_id: str | None = None) -> ChainReport:
    """Recompute every hash (of one lot's entries, if ``lot_id``) and return a
    report naming the first broken entry in chain order.

    With ``lot_id`` the lot's entries are checked in full and each is checked
    against its predecessor's stored hash; other lots' content is not read.
    Run it inside one read transaction so that it sees one snapshot.
    """
    existing = {name for (name,) in conn.execute("SELECT name FROM sqlite_master WHERE type = 'table'")}
    tables = [t for t in CONTENT_TABLES if t in existing]
    problems: list[BrokenEntry] = []

    def problem(seq: int, table: str, row_id: int | None, what: str) -> None:
        if len(problems) < _MAX_PROBLEMS:
            problems.append(BrokenEntry(seq=seq, table=table, row_id=row_id, problem=what))

    cursors: dict[str, _Cursor] = {}
    for table in tables:
        if lot_id is None:
            rows = _rows(conn, f"SELECT * FROM {table} ORDER BY id")
        elif "lot_id" in _columns(conn, table):
            rows = _rows(conn, f"SELECT * FROM {table} WHERE lot_id = ? ORDER BY id", (lot_id,))
        else:
            continue  # people, suppliers, products belong to no lot
        cursors[table] = _Cursor(rows)

    if lot_id is None:
        entries = _rows(conn, "SELECT seq, tbl, lot_id, content_hash, prev_hash, hash FROM entries ORDER BY seq")
    else:
        entries = _rows(
            conn,
            "SELECT seq, tbl, lot_id, content_hash, prev_hash, hash FROM entries WHERE lot_id = ? ORDER BY seq",
            (lot_id,),
        )

    checked = 0
    expected_seq = 1
    prev_hash = GENESIS
    head = None
    for entry in entries:
        seq, table = entry["seq"], entry["tbl"]
        checked += 1
        head = entry["hash"]
        if lot_id is None:
            if seq != expected_seq:
                problem(expected_seq, "entries", None,
                        f"entries {expected_seq}..{seq - 1} are missing (deleted outside the tool)")
            link_ok = entry["prev_hash"] == prev_hash
        else:
            before = conn.execute("SELECT seq, hash FROM entries WHERE seq < ? ORDER BY seq DESC LIMIT 1",
                                  (seq,)).fetchone()
            want_seq, want_hash = (before if before else (0, GENESIS))
            if want_seq != seq - 1:
                problem(seq, table, seq, f"the entry before it (entry {seq - 1}) is missing")
            link_ok = entry["prev_hash"] == want_hash
        if not link_ok:
            problem(seq, table, seq, "its link to the previous entry does not match (an entry was changed or removed)")
        recomputed = entry_hash(seq=seq, table=table, lot_id=entry["lot_id"], content=entry["content_hash"],
                                prev=entry["prev_hash"])
        if recomputed != entry["hash"]:
            problem(seq, table, seq, "the entry itself was changed (its hash does not match)")
        expected_seq = seq + 1
        prev_hash = entry["hash"]

        cursor = cursors.get(table)
        if cursor is None:
            if table not in tables:
                problem(seq, table, seq, f"names an unknown table {table!r}")
            continue
        while cursor.head is not None and cursor.head["id"] < seq:
            orphan = cursor.advance()
            problem(orphan["id"], table, orphan["id"], "row has no chain entry (added outside the tool)")
        if cursor.head is None or cursor.head["id"] != seq:
            where = "deleted or moved to another lot" if lot_id is not None else "deleted outside the tool"
            problem(seq, table, seq, f"row is missing ({where})")
            continue
        row = cursor.advance()
        if content_hash(table, row) != entry["content_hash"]:
            problem(seq, table, seq, "row content was changed (its hash does not match the chain)")
        elif row.get("lot_id") != entry["lot_id"]:
            problem(seq, table, seq, "row and entry name different lots")

    for table, cursor in cursors.items():
        while cursor.head is not None:
            orphan = cursor.advance()
            problem(orphan["id"], table, orphan["id"], "row has no chain entry (added outside the tool)")

    if lot_id is None:
        issued = conn.execute("SELECT seq FROM sqlite_sequence WHERE name = 'entries'").fetchone()
        if issued and issued[0] >= expected_seq:
            problem(expected_seq, "entries", None,
                    f"entries {expected_seq}..{issued[0]} are missing (the end of the chain was cut)")

    problems.sort(key=lambda p: p.seq)  # stable: discovery order within one entry
    guards = missing_guards(conn)
    return ChainReport(
        ok=not problems and not guards,
        lot_id=lot_id,
        checked=checked,
        head=head,
        broken=problems[0] if problems else None,
        problems=tuple(problems),
        missing_guards=guards,
    )


def record_hash(conn: sqlite3.Connection, lot_id: str) -> str:
    """Hash of the lot's current full record.

    Covers, in chain order, the recomputed content hash of every entry of the
    lot in :data:`RECORD_TABLES` (registration, plans, draw, substitutes,
    results and corrections, decisions, dispositions). Any later entry there --
    a correction, say -- gives a different hash, which is how a signature
    shows "changed since signed".
    """
    parts = []
    for table in RECORD_TABLES:
        for row in _rows(conn, f"SELECT * FROM {table} WHERE lot_id = ? ORDER BY id", (lot_id,)):
            parts.append([row["id"], table, content_hash(table, row)])
    parts.sort()
    return sha256_hex(canonical_json({"lot": lot_id, "entries": parts}))
