"""The SQLite record store.

One :class:`Store` wraps one connection. Every connection is configured the
same way and the settings are read back (a store that silently ran without
WAL or with ``synchronous=NORMAL`` could lose an acknowledged result in a
power cut):

* ``journal_mode=WAL`` -- readers never block the bench, and a commit is one
  append to the log;
* ``synchronous=FULL`` -- in WAL mode the log is synced on every commit, so an
  acknowledged result survives power loss, not only a crashed process;
* ``foreign_keys=ON`` -- off by default in SQLite, per connection;
* ``busy_timeout`` -- SQLite itself waits for a lock before answering "busy".

Each user action is one explicit write transaction (``BEGIN IMMEDIATE`` ...
``COMMIT``) through :meth:`Store.transaction`. ``IMMEDIATE`` takes the write
lock at the start, so a transaction never has to upgrade a read lock -- the
case in which SQLite reports "database is locked" without waiting. On top of
SQLite's own timeout, taking the lock is retried with a randomised back-off
until ``wait_seconds`` have passed; only then does the caller see
:class:`StoreBusy`, with a message that says nothing was recorded.
"""

from __future__ import annotations

import json
import random
import sqlite3
import threading
import time
from contextlib import contextmanager
from decimal import Decimal
from fractions import Fraction
from pathlib import Path
from typing import Any, Iterator, Mapping, Sequence

from inspector.records import chain as _chain
from inspector.records import secret_hash
from inspector.records.canonical import GENESIS, content_hash, entry_hash
from inspector.records.clock import Clock, default_clock, timestamp
from inspector.records.errors import (
    DuplicateEntry,
    PragmaNotInForce,
    SchemaTooNew,
    StoreBusy,
    StoreError,
)
from inspector.records.models import (
    ChainReport,
    CorrectiveAction,
    Decision,
    Disposition,
    Draw,
    Event,
    FailedAttempt,
    Lot,
    Person,
    Plan,
    Product,
    Result,
    Signature,
    Substitute,
    Supplier,
)
from inspector.records.schema import CONTENT_TABLES, MIGRATIONS, SCHEMA_VERSION, UNIQUE_COLUMNS

DEFAULT_BUSY_TIMEOUT_MS = 5_000
DEFAULT_WAIT_SECONDS = 60.0

_SQLITE_BUSY = 5
_SQLITE_LOCKED = 6


def _is_busy(exc: BaseException) -> bool:
    if not isinstance(exc, sqlite3.OperationalError):
        return False
    code = getattr(exc, "sqlite_errorcode", None)
    if code is not None:
        return (code & 0xFF) in (_SQLITE_BUSY, _SQLITE_LOCKED)
    text = str(exc).lower()
    return "locked" in text or "busy" in text


def to_json(value: Any) -> str:
    """JSON text for a JSON column: sorted keys, exact decimals as text."""

    def default(obj: Any) -> Any:
        if isinstance(obj, Decimal):
            return str(obj)
        if isinstance(obj, Fraction):
            return float(obj)
        if isinstance(obj, (set, frozenset, tuple)):
            return list(obj)
        if hasattr(obj, "item") and callable(obj.item):  # numpy scalars
            return obj.item()
        raise TypeError(f"cannot record a {type(obj).__name__} as JSON")

    return json.dumps(value, sort_keys=True, separators=(",", ":"), ensure_ascii=False,
                      allow_nan=False, default=default)


def _from_json(text: str | None) -> Any:
    return None if text is None else json.loads(text)


class Store:
    """An open record store. Use :func:`open_store` or ``Store(path)``.

    ``clock`` is called once per write transaction; every entry of that
    transaction carries the same time.
    """

    def __init__(
        self,
        path: str | Path,
        *,
        clock: Clock | None = None,
        busy_timeout_ms: int = DEFAULT_BUSY_TIMEOUT_MS,
        wait_seconds: float = DEFAULT_WAIT_SECONDS,
        create_dirs: bool = False,
    ) -> None:
        self.path = Path(path)
        self.clock: Clock = clock or default_clock()
        self.busy_timeout_ms = int(busy_timeout_ms)
        self.wait_seconds = float(wait_seconds)
        self._lock = threading.RLock()
        parent = self.path.parent
        if not parent.is_dir():
            if create_dirs:
                parent.mkdir(parents=True, exist_ok=True)
            else:
                raise StoreError(f"store path: directory {str(parent)!r} does not exist")
        if self.path.exists() and self.path.is_dir():
            raise StoreError(f"store path: {str(self.path)!r} is a directory, expected a file")
        try:
            self._conn = sqlite3.connect(
                str(self.path),
                timeout=self.busy_timeout_ms / 1000,
                isolation_level=None,  # we issue BEGIN/COMMIT ourselves
                check_same_thread=False,  # guarded by self._lock instead
            )
        except sqlite3.Error as exc:
            raise StoreError(f"store path: cannot open {str(self.path)!r}: {exc}") from None
        try:
            self._retrying(self._configure)
            self._retrying(self._migrate)
        except sqlite3.DatabaseError as exc:
            self._conn.close()
            raise StoreError(f"store path: {str(self.path)!r} is not a usable record store: {exc}") from None
        except BaseException:
            self._conn.close()
            raise

    # --- connection set-up -------------------------------------------------

    def _configure(self) -> None:
        conn = self._conn
        conn.execute(f"PRAGMA busy_timeout = {self.busy_timeout_ms}")
        mode = conn.execute("PRAGMA journal_mode = WAL").fetchone()[0]
        conn.execute("PRAGMA synchronous = FULL")
        conn.execute("PRAGMA foreign_keys = ON")
        self.pragmas()  # read back; raises when a setting did not take
        del mode

    def pragmas(self) -> dict[str, Any]:
        """Read the durability settings back from the connection.

        Raises :class:`PragmaNotInForce` naming the first one that is off.
        """
        conn = self._conn
        found = {
            "journal_mode": str(conn.execute("PRAGMA journal_mode").fetchone()[0]).lower(),
            "synchronous": int(conn.execute("PRAGMA synchronous").fetchone()[0]),
            "foreign_keys": int(conn.execute("PRAGMA foreign_keys").fetchone()[0]),
            "busy_timeout": int(conn.execute("PRAGMA busy_timeout").fetchone()[0]),
        }
        expected = {"journal_mode": "wal", "synchronous": 2, "foreign_keys": 1,
                    "busy_timeout": self.busy_timeout_ms}
        for name, want in expected.items():
            if found[name] != want:
                raise PragmaNotInForce(
                    f"store {str(self.path)!r}: PRAGMA {name} is {found[name]!r}, expected {want!r}"
                )
        return found

    def _migrate(self) -> None:
        conn = self._conn
        version = conn.execute("PRAGMA user_version").fetchone()[0]
        if version > SCHEMA_VERSION:
            raise SchemaTooNew(
                f"store {str(self.path)!r}: schema version {version} is newer than this "
                f"version of inspector knows ({SCHEMA_VERSION}); use a newer inspector"
            )
        if version == SCHEMA_VERSION:
            return
        migrate(conn, SCHEMA_VERSION)

    @property
    def schema_version(self) -> int:
        return int(self._conn.execute("PRAGMA user_version").fetchone()[0])

    # --- retry ---------------------------------------------------------------

    def _retrying(self, step):
        """Run ``step`` until it does not fail with busy, up to ``wait_seconds``."""
        deadline = time.monotonic() + self.wait_seconds
        delay = 0.005
        while True:
            try:
                return step()
            except sqlite3.OperationalError as exc:
                if not _is_busy(exc):
                    raise
                if self._conn.in_transaction:
                    self._conn.execute("ROLLBACK")
                if time.monotonic() >= deadline:
                    raise StoreBusy(
                        f"store {str(self.path)!r} stayed busy for {self.wait_seconds:g} s "
                        "(another process is writing); nothing was recorded, try again"
                    ) from None
                # Randomised so that two waiting processes do not retry in step.
                time.sleep(delay * (0.5 + random.random()))
                delay = min(delay * 2, 0.05)

    # --- transactions ---------------------------------------------------------

    @contextmanager
    def transaction(self) -> Iterator["Transaction"]:
        """One write transaction: ``BEGIN IMMEDIATE`` ... ``COMMIT``.

        Everything appended inside is committed together or not at all; an
        exception inside rolls it all back and propagates.
        """
        with self._lock:
            if self._conn.in_transaction:
                raise StoreError("store: a transaction is already open on this connection")
            self._retrying(lambda: self._conn.execute("BEGIN IMMEDIATE"))
            tx = None
            try:
                tx = Transaction(self._conn, now=timestamp(self.clock))
                yield tx
            except BaseException as exc:
                if self._conn.in_transaction:
                    self._conn.execute("ROLLBACK")
                if isinstance(exc, sqlite3.Error):  # disk full, I/O error ...: one line, not a traceback
                    raise StoreError(f"store {str(self.path)!r}: {exc}; nothing was recorded") from exc
                raise
            else:
                try:
                    self._retrying_commit()
                except BaseException as exc:
                    if self._conn.in_transaction:
                        self._conn.execute("ROLLBACK")
                    if isinstance(exc, sqlite3.Error):
                        raise StoreError(f"store {str(self.path)!r}: {exc}; nothing was recorded") from exc
                    raise
            finally:
                if tx is not None:
                    tx._closed = True

    def _retrying_commit(self) -> None:
        deadline = time.monotonic() + self.wait_seconds
        while True:
            try:
                self._conn.execute("COMMIT")
                return
            except sqlite3.OperationalError as exc:
                # A busy COMMIT leaves the transaction open: try again.
                if not _is_busy(exc) or time.monotonic() >= deadline:
                    raise
                time.sleep(0.01)

    @contextmanager
    def reading(self) -> Iterator["Reader"]:
        """A consistent read snapshot (a deferred read transaction).

        Inside an open write transaction on this store it simply reads through
        that transaction.
        """
        with self._lock:
            if self._conn.in_transaction:
                yield Reader(self._conn)
                return
            def begin():
                self._conn.execute("BEGIN DEFERRED")
                # The first read takes the snapshot; once it has, later reads in
                # this transaction never wait, so "busy" can only happen here.
                self._conn.execute("SELECT 1 FROM sqlite_master LIMIT 1").fetchall()

            self._retrying(begin)
            try:
                yield Reader(self._conn)
            except sqlite3.Error as exc:
                raise StoreError(f"store {str(self.path)!r}: {exc}") from exc
            finally:
                if self._conn.in_transaction:
                    self._conn.execute("COMMIT")

    # --- whole-store checks -----------------------------------------------------

    def verify_chain(self, lot_id: str | None = None) -> ChainReport:
        """Re-read every entry (of one lot, if given) and check the chain."""
        with self.reading() as reader:
            return reader.verify_chain(lot_id)

    def record_hash(self, lot_id: str) -> str:
        """Hash of the lot's current full record (see :func:`chain.record_hash`)."""
        with self.reading() as reader:
            return reader.record_hash(lot_id)

    def integrity_check(self) -> str:
        """SQLite's own ``PRAGMA integrity_check`` ('ok' when the file is sound)."""
        with self._lock:
            rows = self._conn.execute("PRAGMA integrity_check").fetchall()
        return "; ".join(str(row[0]) for row in rows)

    def close(self) -> None:
        with self._lock:
            self._conn.close()

    def __enter__(self) -> "Store":
        return self

    def __exit__(self, *exc) -> None:
        self.close()


def open_store(path: str | Path, *, clock: Clock | None = None, **options: Any) -> Store:
    """Open (creating and upgrading as needed) the store at ``path``."""
    return Store(path, clock=clock, **options)


def _statements(script: str) -> Iterator[str]:
    """Split a migration script into statements (trigger bodies kept whole)."""
    buffer = ""
    for line in script.splitlines(keepends=True):
        buffer += line
        if sqlite3.complete_statement(buffer):
            yield buffer.strip()
            buffer = ""
    if buffer.strip() and any(
        part.strip() and not part.strip().startswith("--") for part in buffer.splitlines()
    ):
        raise ValueError(f"migration: incomplete statement {buffer.strip()[:60]!r}")


def migrate(conn: sqlite3.Connection, target: int = SCHEMA_VERSION) -> int:
    """Apply migrations up to ``target`` in one write transaction.

    The version is read again after the write lock is taken, so two processes
    opening a new file at the same moment do not both migrate it. Returns the
    version reached. Tests use ``target`` to build files of an older version.
    """
    if not 0 <= target <= SCHEMA_VERSION:
        raise ValueError(f"target: expected 0..{SCHEMA_VERSION}, got {target}")
    conn.execute("BEGIN IMMEDIATE")
    try:
        version = conn.execute("PRAGMA user_version").fetchone()[0]
        for step in range(version, target):
            for statement in _statements(MIGRATIONS[step]):
                conn.execute(statement)
            conn.execute(f"PRAGMA user_version = {step + 1}")
        conn.execute("COMMIT")
    except BaseException:
        if conn.in_transaction:
            conn.execute("ROLLBACK")
        raise
    return max(version, target)


# --- reading --------------------------------------------------------------------

_PERSON_NAME = "(SELECT name FROM people WHERE people.id = {alias}.by_person)"


class Reader:
    """Read access to the store inside one snapshot."""

    def __init__(self, conn: sqlite3.Connection) -> None:
        self._conn = conn
        self._closed = False

    def _rows(self, sql: str, params: Sequence[Any] = ()) -> list[dict]:
        if self._closed:
            raise StoreError("store: this transaction is already finished")
        cursor = self._conn.execute(sql, params)
        names = [d[0] for d in cursor.description]
        return [dict(zip(names, row)) for row in cursor.fetchall()]

    def _one(self, sql: str, params: Sequence[Any] = ()) -> dict | None:
        rows = self._rows(sql, params)
        return rows[0] if rows else None

    # people, suppliers, products

    def person(self, name: str) -> Person | None:
        row = self._one("SELECT id, name, role, recorded_at FROM people WHERE name = ?", (name,))
        return Person(**row) if row else None

    def person_by_id(self, person_id: int) -> Person | None:
        row = self._one("SELECT id, name, role, recorded_at FROM people WHERE id = ?", (person_id,))
        return Person(**row) if row else None

    def people(self) -> list[Person]:
        return [Person(**r) for r in self._rows("SELECT id, name, role, recorded_at FROM people ORDER BY id")]

    def authenticate(self, name: str, secret: str) -> tuple[Person | None, bool]:
        """``(person, True)`` when ``secret`` is the person's; ``(person, False)``
        for a wrong secret; ``(None, False)`` for an unknown name (which takes
        as long as a wrong secret, so timing does not tell names apart)."""
        row = self._one("SELECT id, name, role, recorded_at, secret_kdf, secret_hash FROM people WHERE name = ?",
                        (name,))
        if row is None:
            secret_hash.burn_time()
            return None, False
        ok = secret_hash.check_secret(secret, row.pop("secret_kdf"), row.pop("secret_hash"))
        return Person(**row), ok

    def supplier(self, name: str) -> Supplier | None:
        row = self._one("SELECT id, name, recorded_at FROM suppliers WHERE name = ?", (name,))
        return Supplier(**row) if row else None

    def suppliers(self) -> list[Supplier]:
        return [Supplier(**r) for r in self._rows("SELECT id, name, recorded_at FROM suppliers ORDER BY id")]

    def product(self, name: str) -> Product | None:
        row = self._one("SELECT id, name, recorded_at FROM products WHERE name = ?", (name,))
        return Product(**row) if row else None

    # lots

    _LOT_SQL = f"""
        SELECT l.id, l.lot_id, s.name AS supplier, p.name AS product, l.reference,
               l.quantity, l.received_on, l.structure_spec, l.structure, l.critical,
               l.notes, l.resubmission_of, {_PERSON_NAME.format(alias='l')} AS [by],
               l.recorded_at,
               (SELECT e.to_state FROM events e
                 WHERE e.lot_id = l.lot_id AND e.to_state IS NOT NULL
                 ORDER BY e.id DESC LIMIT 1) AS state
          FROM lots l
          JOIN suppliers s ON s.id = l.supplier_id
          JOIN products p ON p.id = l.product_id
    """

    @staticmethod
    def _lot(row: dict) -> Lot:
        row["structure"] = _from_json(row["structure"])
        row["critical"] = bool(row["critical"])
        return Lot(**row)

    def lot(self, lot_id: str) -> Lot | None:
        row = self._one(self._LOT_SQL + " WHERE l.lot_id = ?", (lot_id,))
        return self._lot(row) if row else None

    def lots(self, *, state: str | None = None, supplier: str | None = None) -> list[Lot]:
        """All lots in the order registered, optionally of one state/supplier."""
        lots = [self._lot(r) for r in self._rows(self._LOT_SQL + " ORDER BY l.id")]
        if state is not None:
            lots = [lot for lot in lots if lot.state == state]
        if supplier is not None:
            lots = [lot for lot in lots if lot.supplier == supplier]
        return lots

    def lot_state(self, lot_id: str) -> str | None:
        row = self._one(
            "SELECT to_state FROM events WHERE lot_id = ? AND to_state IS NOT NULL ORDER BY id DESC LIMIT 1",
            (lot_id,),
        )
        return row["to_state"] if row else None

    # what was recorded about a lot, each in the order recorded

    def plans(self, lot_id: str) -> list[Plan]:
        rows = self._rows(
            f"SELECT p.*, {_PERSON_NAME.format(alias='p')} AS [by] FROM plans p WHERE lot_id = ? ORDER BY id",
            (lot_id,),
        )
        out = []
        for r in rows:
            r.pop("by_person")
            r["details"] = _from_json(r["details"])
            out.append(Plan(**r))
        return out

    def draws(self, lot_id: str) -> list[Draw]:
        rows = self._rows(
            f"SELECT d.*, {_PERSON_NAME.format(alias='d')} AS [by] FROM draws d WHERE lot_id = ? ORDER BY id",
            (lot_id,),
        )
        out = []
        for r in rows:
            r.pop("by_person")
            r["units"] = tuple(_from_json(r["units"]))
            r["details"] = _from_json(r["details"])
            out.append(Draw(**r))
        return out

    def substitutes(self, lot_id: str) -> list[Substitute]:
        rows = self._rows(
            f"SELECT s.*, {_PERSON_NAME.format(alias='s')} AS [by] FROM substitutes s WHERE lot_id = ? ORDER BY id",
            (lot_id,),
        )
        for r in rows:
            r.pop("by_person")
        return [Substitute(**r) for r in rows]

    def results(self, lot_id: str, *, after: int = 0) -> list[Result]:
        """The lot's result entries in entry order; with ``after``, only those
        with a larger entry number (entries are append-only and numbered in
        commit order, so a reader may keep what it read and ask for the rest)."""
        rows = self._rows(
            f"SELECT r.*, {_PERSON_NAME.format(alias='r')} AS [by] FROM results r WHERE lot_id = ? AND id > ? "
            "ORDER BY id",
            (lot_id, after),
        )
        for r in rows:
            r.pop("by_person")
        return [Result(**r) for r in rows]

    def result(self, result_id: int) -> Result | None:
        row = self._one(
            f"SELECT r.*, {_PERSON_NAME.format(alias='r')} AS [by] FROM results r WHERE id = ?", (result_id,)
        )
        if row is None:
            return None
        row.pop("by_person")
        return Result(**row)

    def decisions(self, lot_id: str) -> list[Decision]:
        rows = self._rows(
            f"SELECT d.*, {_PERSON_NAME.format(alias='d')} AS [by] FROM decisions d WHERE lot_id = ? ORDER BY id",
            (lot_id,),
        )
        out = []
        for r in rows:
            r.pop("by_person")
            r["curtailed"] = bool(r["curtailed"])
            r["evidence"] = _from_json(r["evidence"])
            out.append(Decision(**r))
        return out

    def dispositions(self, lot_id: str) -> list[Disposition]:
        rows = self._rows(
            f"SELECT d.*, {_PERSON_NAME.format(alias='d')} AS [by] FROM dispositions d WHERE lot_id = ? ORDER BY id",
            (lot_id,),
        )
        for r in rows:
            r.pop("by_person")
        return [Disposition(**r) for r in rows]

    def signatures(self, lot_id: str) -> list[Signature]:
        return [Signature(**r) for r in self._rows("SELECT * FROM signatures WHERE lot_id = ? ORDER BY id", (lot_id,))]

    def failed_attempts(self, lot_id: str | None = None) -> list[FailedAttempt]:
        if lot_id is None:
            rows = self._rows("SELECT * FROM failed_attempts ORDER BY id")
        else:
            rows = self._rows("SELECT * FROM failed_attempts WHERE lot_id = ? ORDER BY id", (lot_id,))
        return [FailedAttempt(**r) for r in rows]

    def events(self, lot_id: str | None = None) -> list[Event]:
        sql = f"SELECT e.*, {_PERSON_NAME.format(alias='e')} AS [by] FROM events e"
        rows = self._rows(sql + (" WHERE lot_id = ?" if lot_id is not None else "") + " ORDER BY id",
                          (lot_id,) if lot_id is not None else ())
        out = []
        for r in rows:
            r.pop("by_person")
            r["detail"] = _from_json(r["detail"])
            out.append(Event(**r))
        return out

    def corrective_actions(self, supplier: str | None = None) -> list[CorrectiveAction]:
        sql = f"""SELECT c.id, s.name AS supplier, c.lot_id, c.description,
                         {_PERSON_NAME.format(alias='c')} AS [by], c.recorded_at
                    FROM corrective_actions c JOIN suppliers s ON s.id = c.supplier_id"""
        if supplier is None:
            rows = self._rows(sql + " ORDER BY c.id")
        else:
            rows = self._rows(sql + " WHERE s.name = ? ORDER BY c.id", (supplier,))
        return [CorrectiveAction(**r) for r in rows]

    def entries(self, lot_id: str | None = None) -> list[dict]:
        """The chain entries (seq, table, lot, hashes), of one lot if given."""
        sql = "SELECT seq, tbl AS [table], lot_id, content_hash, prev_hash, hash FROM entries"
        if lot_id is None:
            return self._rows(sql + " ORDER BY seq")
        return self._rows(sql + " WHERE lot_id = ? ORDER BY seq", (lot_id,))

    def head(self) -> str:
        """Hash of the last entry (the genesis value for an empty store)."""
        row = self._one("SELECT hash FROM entries ORDER BY seq DESC LIMIT 1")
        return row["hash"] if row else GENESIS

    # checks

    def verify_chain(self, lot_id: str | None = None) -> ChainReport:
        return _chain.verify_chain(self._conn, lot_id)

    def record_hash(self, lot_id: str) -> str:
        return _chain.record_hash(self._conn, lot_id)


# --- writing ----------------------------------------------------------------------


class Transaction(Reader):
    """Appends entries inside one write transaction (see :meth:`Store.transaction`).

    ``now`` is the transaction's time, read once from the store's clock.
    """

    def __init__(self, conn: sqlite3.Connection, *, now: str) -> None:
        super().__init__(conn)
        self.now = now

    def append(self, table: str, **values: Any) -> int:
        """Append one content row and its chain entry; return the entry number.

        Values must be text, whole numbers, booleans (kept as 0/1) or None.
        The row is read back and hashed again: a value that SQLite would store
        differently from what was hashed (say the text '12' in a whole-number
        column) is refused instead of leaving an entry that can never verify.
        """
        if self._closed:
            raise StoreError("store: this transaction is already finished")
        if table not in CONTENT_TABLES:
            raise StoreError(f"table: expected one of {', '.join(CONTENT_TABLES)}, got {table!r}")
        row: dict[str, Any] = {}
        for key, value in values.items():
            if key in ("id", "recorded_at"):
                raise StoreError(f"{table}.{key}: set by the store, not by the caller")
            if isinstance(value, bool):
                value = int(value)
            if value is not None and not isinstance(value, (int, str)):
                raise StoreError(f"{table}.{key}: expected text, a whole number or nothing, got {value!r}")
            row[key] = value
        conn = self._conn
        tail = conn.execute("SELECT seq, hash FROM entries ORDER BY seq DESC LIMIT 1").fetchone()
        issued = conn.execute("SELECT seq FROM sqlite_sequence WHERE name = 'entries'").fetchone()
        # Continue after the highest number ever issued: if the end of the chain
        # was cut behind our back, the gap stays visible to verify_chain.
        seq = max(tail[0] if tail else 0, issued[0] if issued else 0) + 1
        prev = tail[1] if tail else GENESIS
        row["id"] = seq
        row["recorded_at"] = self.now
        lot_id = row.get("lot_id")
        chash = content_hash(table, row)
        ehash = entry_hash(seq=seq, table=table, lot_id=lot_id, content=chash, prev=prev)
        columns = list(row)
        try:
            conn.execute(
                "INSERT INTO entries (seq, tbl, lot_id, content_hash, prev_hash, hash) VALUES (?, ?, ?, ?, ?, ?)",
                (seq, table, lot_id, chash, prev, ehash),
            )
            conn.execute(
                f"INSERT INTO {table} ({', '.join(columns)}) VALUES ({', '.join('?' for _ in columns)})",
                [row[c] for c in columns],
            )
        except sqlite3.IntegrityError as exc:
            text = str(exc)
            if text.startswith("UNIQUE constraint failed") or "never replaced" in text:
                unique = [c for c in UNIQUE_COLUMNS.get(table, ()) if c in row]
                what = ", ".join(f"{c} {row[c]!r}" for c in unique) or f"id {seq}"
                raise DuplicateEntry(f"{table}: {what} is already recorded") from None
            raise StoreError(f"{table}: refused by the store ({text})") from None
        stored = self._one(f"SELECT * FROM {table} WHERE id = ?", (seq,))
        if stored is None or content_hash(table, stored) != chash:
            changed = sorted(k for k in row if stored is None or stored.get(k) != row[k]
                             or type(stored.get(k)) is not type(row[k]))
            raise StoreError(f"{table}: value(s) {', '.join(changed)} would be stored differently from what was given")
        return seq

    # --- typed appends: what is kept --------------------------------------------

    def add_supplier(self, name: str) -> int:
        return self.append("suppliers", name=name)

    def ensure_supplier(self, name: str) -> int:
        found = self.supplier(name)
        return found.id if found else self.add_supplier(name)

    def add_product(self, name: str) -> int:
        return self.append("products", name=name)

    def ensure_product(self, name: str) -> int:
        found = self.product(name)
        return found.id if found else self.add_product(name)

    def add_person(self, name: str, role: str, secret: str) -> int:
        """Record a person; only a salted slow hash of ``secret`` is kept."""
        try:
            kdf, digest = secret_hash.hash_secret(secret)
        except ValueError as exc:
            raise StoreError(str(exc)) from None
        return self.append("people", name=name, role=role, secret_kdf=kdf, secret_hash=digest)

    def add_lot(
        self,
        *,
        lot_id: str,
        supplier_id: int,
        product_id: int,
        quantity: int,
        received_on: str,
        reference: str | None = None,
        structure_spec: str | None = None,
        structure: Any = None,
        critical: bool = False,
        notes: str | None = None,
        resubmission_of: str | None = None,
        by_person: int | None = None,
    ) -> int:
        return self.append(
            "lots", lot_id=lot_id, supplier_id=supplier_id, product_id=product_id, quantity=quantity,
            received_on=received_on, reference=reference, structure_spec=structure_spec,
            structure=None if structure is None else to_json(structure), critical=bool(critical),
            notes=notes, resubmission_of=resubmission_of, by_person=by_person,
        )

    def add_plan(
        self,
        *,
        lot_id: str,
        defect_class: str,
        chosen_by: str,
        sample_size: int,
        accept: int,
        reject: int,
        details: Mapping[str, Any],
        aql: str | None = None,
        rql: str | None = None,
        producer_risk: str | None = None,
        consumer_risk: str | None = None,
        level: str | None = None,
        severity: str | None = None,
        by_person: int | None = None,
    ) -> int:
        return self.append(
            "plans", lot_id=lot_id, defect_class=defect_class, chosen_by=chosen_by,
            sample_size=sample_size, accept=accept, reject=reject, aql=aql, rql=rql,
            producer_risk=producer_risk, consumer_risk=consumer_risk, level=level,
            severity=severity, details=to_json(dict(details)), by_person=by_person,
        )

    def add_draw(
        self,
        *,
        lot_id: str,
        method: str,
        seed: str,
        algorithm: str,
        units: Sequence[int],
        details: Mapping[str, Any],
        by_person: int | None = None,
    ) -> int:
        units = [int(u) for u in units]
        return self.append(
            "draws", lot_id=lot_id, method=method, seed=str(seed), algorithm=algorithm,
            sample_size=len(units), units=to_json(units), details=to_json(dict(details)),
            by_person=by_person,
        )

    def add_substitute(self, *, lot_id: str, draw_id: int, unit: int, substitute: int, reason: str,
                       by_person: int | None = None) -> int:
        return self.append("substitutes", lot_id=lot_id, draw_id=draw_id, unit=unit,
                           substitute=substitute, reason=reason, by_person=by_person)

    def add_result(
        self,
        *,
        lot_id: str,
        unit: int,
        defect_class: str,
        outcome: str,
        by_person: int,
        defect: str | None = None,
        note: str | None = None,
        entered_as: str | None = None,
        corrects: int | None = None,
        reason: str | None = None,
    ) -> int:
        """A unit's result in one defect class; with ``corrects``, a correction
        of that earlier result (the original stays)."""
        return self.append(
            "results", lot_id=lot_id, unit=unit, defect_class=defect_class, outcome=outcome,
            defect=defect, note=note, entered_as=entered_as, by_person=by_person,
            corrects=corrects, reason=reason,
        )

    def add_decision(self, *, lot_id: str, decision: str, curtailed: bool, evidence: Mapping[str, Any],
                     by_person: int | None = None) -> int:
        return self.append("decisions", lot_id=lot_id, decision=decision, curtailed=bool(curtailed),
                           evidence=to_json(dict(evidence)), by_person=by_person)

    def add_disposition(self, *, lot_id: str, disposition: str, reason: str | None,
                        by_person: int | None = None) -> int:
        return self.append("dispositions", lot_id=lot_id, disposition=disposition, reason=reason,
                           by_person=by_person)

    def add_signature(self, *, lot_id: str, person_id: int, printed_name: str, meaning: str,
                      record_hash: str) -> int:
        return self.append("signatures", lot_id=lot_id, person_id=person_id, printed_name=printed_name,
                           meaning=meaning, record_hash=record_hash)

    def add_failed_attempt(self, *, lot_id: str | None, action: str, name_given: str,
                           person_id: int | None, problem: str) -> int:
        return self.append("failed_attempts", lot_id=lot_id, action=action, name_given=name_given,
                           person_id=person_id, problem=problem)

    def add_event(self, *, lot_id: str | None, kind: str, from_state: str | None = None,
                  to_state: str | None = None, detail: Any = None, by_person: int | None = None) -> int:
        return self.append("events", lot_id=lot_id, kind=kind, from_state=from_state, to_state=to_state,
                           detail=None if detail is None else to_json(detail), by_person=by_person)

    def add_corrective_action(self, *, supplier_id: int, description: str, lot_id: str | None = None,
                              by_person: int | None = None) -> int:
        return self.append("corrective_actions", supplier_id=supplier_id, lot_id=lot_id,
                           description=description, by_person=by_person)
