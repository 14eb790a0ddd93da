"""inspector.records: the SQLite record store and its audit chain.

Knows nothing of screens, sheets or workflow rules; it keeps what the workflow
records, append-only, each entry hashed into one chain.

    from inspector.records import open_store, resolve_db_path
    store = open_store(resolve_db_path(args.db, os.environ), clock=clock)
    with store.transaction() as tx:      # BEGIN IMMEDIATE ... COMMIT
        tx.add_result(lot_id="HP-2611-07", unit=412, defect_class="major",
                      outcome="pass", by_person=person_id)
    report = store.verify_chain()
"""

from inspector.records.chain import RECORD_TABLES, missing_guards, record_hash, verify_chain
from inspector.records.clock import Clock, default_clock, system_clock, timestamp
from inspector.records.errors import (
    DuplicateEntry,
    PragmaNotInForce,
    SchemaTooNew,
    StoreBusy,
    StoreError,
)
from inspector.records.models import BrokenEntry, ChainReport
from inspector.records.paths import ENV_VAR, default_db_path, resolve_db_path
from inspector.records.schema import CONTENT_TABLES, SCHEMA_VERSION
from inspector.records.store import Reader, Store, Transaction, migrate, open_store

__all__ = [
    "BrokenEntry",
    "CONTENT_TABLES",
    "ChainReport",
    "Clock",
    "DuplicateEntry",
    "ENV_VAR",
    "PragmaNotInForce",
    "RECORD_TABLES",
    "Reader",
    "SCHEMA_VERSION",
    "SchemaTooNew",
    "Store",
    "StoreBusy",
    "StoreError",
    "Transaction",
    "default_clock",
    "default_db_path",
    "migrate",
    "missing_guards",
    "open_store",
    "record_hash",
    "resolve_db_path",
    "system_clock",
    "timestamp",
    "verify_chain",
]
