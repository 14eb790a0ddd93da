"""The store's schema, as an ordered list of forward migrations.

``PRAGMA user_version`` holds the number of migrations applied. Opening a
store applies the missing ones inside one write transaction (SQLite DDL is
transactional, so a crash leaves the old version whole).

Design
------
Every recorded fact is one row of a *content table* (suppliers, people, lots,
plans, results, ...) plus one row of ``entries``, the spine of the audit
chain. A content row's ``id`` is the ``seq`` of its entry, so "entry 17" names
both. ``entries`` holds, per entry, the table, the lot it belongs to (if
any), the hash of the row's canonical content, the previous entry's hash and
its own hash.

Nothing is ever updated or deleted: triggers on every table abort UPDATE and
DELETE, and a content row can only be inserted after its entry. The lot's
state, the current plan of a class and the effective result of a unit are
all derived from the latest entries, never stored in a mutable column.

One global chain (not one per lot): a single total order of everything
recorded costs nothing extra because SQLite serialises writers anyway, it
covers people, suppliers and products that belong to no lot, and a per-lot
check is still possible because each entry names its lot and its predecessor.
"""

from __future__ import annotations

# Tables that hold recorded content, in the order they were introduced.
CONTENT_TABLES_V1 = (
    "suppliers",
    "products",
    "people",
    "lots",
    "plans",
    "draws",
    "substitutes",
    "results",
    "decisions",
    "dispositions",
    "signatures",
    "failed_attempts",
    "events",
)
CONTENT_TABLES_V2 = ("corrective_actions",)
CONTENT_TABLES = CONTENT_TABLES_V1 + CONTENT_TABLES_V2
# Tables protected against UPDATE/DELETE: the content tables and the spine.
GUARDED_TABLES = ("entries",) + CONTENT_TABLES

CLASSES = "('critical','major','minor')"


# Columns that are UNIQUE besides the id: INSERT OR REPLACE on them would
# silently delete the old row (SQLite fires no delete trigger for REPLACE
# unless recursive triggers are on), so the no_replace guard checks them too.
UNIQUE_COLUMNS = {
    "entries": ("hash",),
    "suppliers": ("name",),
    "products": ("name",),
    "people": ("name",),
    "lots": ("lot_id",),
}


def guard_triggers(table: str, *, content: bool = True) -> dict[str, str]:
    """The triggers that make ``table`` append-only, by name.

    ``no_update``/``no_delete`` refuse changes and removals; ``no_replace``
    refuses an insert that would replace an existing row; for content tables
    ``in_chain`` refuses a row that has no chain entry.
    """
    key = "seq" if table == "entries" else "id"
    clash = " OR ".join(
        f"EXISTS (SELECT 1 FROM {table} WHERE {column} = NEW.{column})"
        for column in (key,) + UNIQUE_COLUMNS.get(table, ())
    )
    triggers = {
        f"{table}_no_update": (
            f"CREATE TRIGGER {table}_no_update BEFORE UPDATE ON {table}\n"
            f"BEGIN SELECT RAISE(ABORT, '{table} is append-only: recorded entries are never changed'); END;"
        ),
        f"{table}_no_delete": (
            f"CREATE TRIGGER {table}_no_delete BEFORE DELETE ON {table}\n"
            f"BEGIN SELECT RAISE(ABORT, '{table} is append-only: recorded entries are never deleted'); END;"
        ),
        f"{table}_no_replace": (
            f"CREATE TRIGGER {table}_no_replace BEFORE INSERT ON {table}\n"
            f"WHEN {clash}\n"
            f"BEGIN SELECT RAISE(ABORT, '{table} is append-only: recorded entries are never replaced'); END;"
        ),
    }
    if content:
        triggers[f"{table}_in_chain"] = (
            f"CREATE TRIGGER {table}_in_chain BEFORE INSERT ON {table}\n"
            f"WHEN NOT EXISTS (SELECT 1 FROM entries WHERE seq = NEW.id AND tbl = '{table}')\n"
            f"BEGIN SELECT RAISE(ABORT, '{table}: a row needs its chain entry first'); END;"
        )
    return triggers


def _guards(table: str, *, content: bool = True) -> str:
    return "\n" + "\n".join(guard_triggers(table, content=content).values()) + "\n"


def expected_guards() -> dict[str, str]:
    """Every trigger the current schema defines, name -> CREATE statement."""
    out = dict(guard_triggers("entries", content=False))
    for table in CONTENT_TABLES:
        out.update(guard_triggers(table))
    return out


# Columns every content table has: id (= entry seq) and recorded_at (ISO 8601
# with UTC offset, from the injected clock). by_person, where present, is the
# person who did it (NULL where the command names nobody).
_V1 = """
CREATE TABLE entries (
    seq          INTEGER PRIMARY KEY AUTOINCREMENT,
    tbl          TEXT NOT NULL,
    lot_id       TEXT,
    content_hash TEXT NOT NULL CHECK (length(content_hash) = 64),
    prev_hash    TEXT NOT NULL CHECK (length(prev_hash) = 64),
    hash         TEXT NOT NULL UNIQUE CHECK (length(hash) = 64)
);
CREATE INDEX entries_by_lot ON entries (lot_id, seq);

CREATE TABLE suppliers (
    id          INTEGER PRIMARY KEY REFERENCES entries (seq),
    name        TEXT NOT NULL UNIQUE CHECK (length(trim(name)) > 0),
    recorded_at TEXT NOT NULL
);

CREATE TABLE products (
    id          INTEGER PRIMARY KEY REFERENCES entries (seq),
    name        TEXT NOT NULL UNIQUE CHECK (length(trim(name)) > 0),
    recorded_at TEXT NOT NULL
);

-- secret_kdf: JSON with the algorithm, its parameters and the salt;
-- secret_hash: hex digest. The secret itself is never stored.
CREATE TABLE people (
    id          INTEGER PRIMARY KEY REFERENCES entries (seq),
    name        TEXT NOT NULL UNIQUE CHECK (length(trim(name)) > 0),
    role        TEXT NOT NULL CHECK (role IN ('inspector', 'approver')),
    secret_kdf  TEXT NOT NULL,
    secret_hash TEXT NOT NULL,
    recorded_at TEXT NOT NULL
);

-- structure: JSON description of the physical lot (the frame);
-- structure_spec: the structure as typed, or the manifest file name.
CREATE TABLE lots (
    id              INTEGER PRIMARY KEY REFERENCES entries (seq),
    lot_id          TEXT NOT NULL UNIQUE CHECK (length(trim(lot_id)) > 0),
    supplier_id     INTEGER NOT NULL REFERENCES suppliers (id),
    product_id      INTEGER NOT NULL REFERENCES products (id),
    reference       TEXT,
    quantity        INTEGER NOT NULL CHECK (typeof(quantity) = 'integer' AND quantity >= 1),
    received_on     TEXT NOT NULL,
    structure_spec  TEXT,
    structure       TEXT,
    critical        INTEGER NOT NULL CHECK (critical IN (0, 1)),
    notes           TEXT,
    resubmission_of TEXT REFERENCES lots (lot_id),
    by_person       INTEGER REFERENCES people (id),
    recorded_at     TEXT NOT NULL
);

-- chosen_by: 'risk' (designed from AQL/RQL and risks), 'typed' (n and c
-- given), 'table' (code-letter table with level and severity).
-- Percentages and risks are kept as decimal text exactly as typed.
-- details: JSON with the computed risks at the actual lot size.
CREATE TABLE plans (
    id            INTEGER PRIMARY KEY REFERENCES entries (seq),
    lot_id        TEXT NOT NULL REFERENCES lots (lot_id),
    defect_class  TEXT NOT NULL CHECK (defect_class IN """ + CLASSES + """),
    chosen_by     TEXT NOT NULL CHECK (chosen_by IN ('risk', 'typed', 'table')),
    sample_size   INTEGER NOT NULL CHECK (typeof(sample_size) = 'integer' AND sample_size >= 1),
    accept        INTEGER NOT NULL CHECK (typeof(accept) = 'integer' AND accept >= 0),
    reject        INTEGER NOT NULL CHECK (typeof(reject) = 'integer' AND reject > accept),
    aql           TEXT,
    rql           TEXT,
    producer_risk TEXT,
    consumer_risk TEXT,
    level         TEXT,
    severity      TEXT,
    details       TEXT NOT NULL,
    by_person     INTEGER REFERENCES people (id),
    recorded_at   TEXT NOT NULL
);

-- seed: text, so any seed survives exactly; units: JSON list of unit
-- numbers in draw order; details: JSON (frame description, pick list ...).
CREATE TABLE draws (
    id          INTEGER PRIMARY KEY REFERENCES entries (seq),
    lot_id      TEXT NOT NULL REFERENCES lots (lot_id),
    method      TEXT NOT NULL,
    seed        TEXT NOT NULL,
    algorithm   TEXT NOT NULL,
    sample_size INTEGER NOT NULL CHECK (typeof(sample_size) = 'integer' AND sample_size >= 1),
    units       TEXT NOT NULL,
    details     TEXT NOT NULL,
    by_person   INTEGER REFERENCES people (id),
    recorded_at TEXT NOT NULL
);

CREATE TABLE substitutes (
    id          INTEGER PRIMARY KEY REFERENCES entries (seq),
    lot_id      TEXT NOT NULL REFERENCES lots (lot_id),
    draw_id     INTEGER NOT NULL REFERENCES draws (id),
    unit        INTEGER NOT NULL CHECK (typeof(unit) = 'integer'),
    substitute  INTEGER NOT NULL CHECK (typeof(substitute) = 'integer'),
    reason      TEXT NOT NULL CHECK (length(trim(reason)) > 0),
    by_person   INTEGER REFERENCES people (id),
    recorded_at TEXT NOT NULL
);

-- A correction is a new row whose `corrects` points at the row it
-- corrects, with a reason; the original stays. entered_as: what was typed or
-- scanned (unit number, address or serial).
CREATE TABLE results (
    id           INTEGER PRIMARY KEY REFERENCES entries (seq),
    lot_id       TEXT NOT NULL REFERENCES lots (lot_id),
    unit         INTEGER NOT NULL CHECK (typeof(unit) = 'integer' AND unit >= 1),
    defect_class TEXT NOT NULL CHECK (defect_class IN """ + CLASSES + """),
    outcome      TEXT NOT NULL CHECK (outcome IN ('pass', 'fail')),
    defect       TEXT,
    note         TEXT,
    entered_as   TEXT,
    by_person    INTEGER NOT NULL REFERENCES people (id),
    corrects     INTEGER REFERENCES results (id),
    reason       TEXT,
    recorded_at  TEXT NOT NULL,
    CHECK ((corrects IS NULL AND reason IS NULL)
           OR (corrects IS NOT NULL AND length(trim(reason)) > 0))
);

-- evidence: JSON (per-class tallies against Ac/Re, the result entries
-- counted, the estimate and whether the sample was curtailed).
CREATE TABLE decisions (
    id          INTEGER PRIMARY KEY REFERENCES entries (seq),
    lot_id      TEXT NOT NULL REFERENCES lots (lot_id),
    decision    TEXT NOT NULL CHECK (decision IN ('accept', 'reject')),
    curtailed   INTEGER NOT NULL CHECK (curtailed IN (0, 1)),
    evidence    TEXT NOT NULL,
    by_person   INTEGER REFERENCES people (id),
    recorded_at TEXT NOT NULL
);

CREATE TABLE dispositions (
    id          INTEGER PRIMARY KEY REFERENCES entries (seq),
    lot_id      TEXT NOT NULL REFERENCES lots (lot_id),
    disposition TEXT NOT NULL CHECK (disposition IN ('release', 'reject', 'hold')),
    reason      TEXT,
    by_person   INTEGER REFERENCES people (id),
    recorded_at TEXT NOT NULL
);

-- record_hash: the lot record's hash at the moment of signing.
CREATE TABLE signatures (
    id           INTEGER PRIMARY KEY REFERENCES entries (seq),
    lot_id       TEXT NOT NULL REFERENCES lots (lot_id),
    person_id    INTEGER NOT NULL REFERENCES people (id),
    printed_name TEXT NOT NULL,
    meaning      TEXT NOT NULL CHECK (length(trim(meaning)) > 0),
    record_hash  TEXT NOT NULL CHECK (length(record_hash) = 64),
    recorded_at  TEXT NOT NULL
);

-- name_given: the name as typed; person_id when it named a known person.
CREATE TABLE failed_attempts (
    id          INTEGER PRIMARY KEY REFERENCES entries (seq),
    lot_id      TEXT REFERENCES lots (lot_id),
    action      TEXT NOT NULL,
    name_given  TEXT NOT NULL,
    person_id   INTEGER REFERENCES people (id),
    problem     TEXT NOT NULL,
    recorded_at TEXT NOT NULL
);

-- The event log: state changes of a lot (from_state -> to_state) and other
-- happenings worth a line in the history.
CREATE TABLE events (
    id          INTEGER PRIMARY KEY REFERENCES entries (seq),
    lot_id      TEXT REFERENCES lots (lot_id),
    kind        TEXT NOT NULL,
    from_state  TEXT,
    to_state    TEXT,
    detail      TEXT,
    by_person   INTEGER REFERENCES people (id),
    recorded_at TEXT NOT NULL
);
""" + _guards("entries", content=False) + "".join(_guards(t) for t in CONTENT_TABLES_V1)

_V2 = """
CREATE TABLE corrective_actions (
    id          INTEGER PRIMARY KEY REFERENCES entries (seq),
    supplier_id INTEGER NOT NULL REFERENCES suppliers (id),
    lot_id      TEXT REFERENCES lots (lot_id),
    description TEXT NOT NULL CHECK (length(trim(description)) > 0),
    by_person   INTEGER REFERENCES people (id),
    recorded_at TEXT NOT NULL
);
CREATE INDEX results_by_lot ON results (lot_id, unit, defect_class);
CREATE INDEX plans_by_lot ON plans (lot_id);
CREATE INDEX draws_by_lot ON draws (lot_id);
CREATE INDEX events_by_lot ON events (lot_id);
CREATE INDEX decisions_by_lot ON decisions (lot_id);
CREATE INDEX signatures_by_lot ON signatures (lot_id);
""" + "".join(_guards(t) for t in CONTENT_TABLES_V2)

# MIGRATIONS[k] takes a store from version k to k + 1. Append only: a
# released migration is never edited, because files in the field ran it.
MIGRATIONS: tuple[str, ...] = (
    _V1,  # 0 -> 1: the chain, the content tables and their guards
    _V2,  # 1 -> 2: supplier corrective actions; lookup indexes
)
SCHEMA_VERSION = len(MIGRATIONS)
