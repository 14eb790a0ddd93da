"""Opening the store: where it lives, connection settings, migrations,
transactions."""

from __future__ import annotations

from datetime import datetime

import pytest

from inspector.records import (
    SCHEMA_VERSION,
    PragmaNotInForce,
    SchemaTooNew,
    Store,
    StoreError,
    Transaction,
    migrate,
    open_store,
    resolve_db_path,
)
from inspector.services import build_services

from records_fixtures import INES_SECRET, LOT, LOT_SIZE, raw


# --- where the store lives ------------------------------------------------------


def test_db_option_wins_over_environment(tmp_path):
    env = {"INSPECTOR_DB": str(tmp_path / "env.db"), "XDG_DATA_HOME": str(tmp_path / "xdg")}
    assert resolve_db_path(str(tmp_path / "cli.db"), env) == tmp_path / "cli.db"


def test_environment_variable_wins_over_data_directory(tmp_path):
    env = {"INSPECTOR_DB": str(tmp_path / "env.db"), "XDG_DATA_HOME": str(tmp_path / "xdg")}
    assert resolve_db_path(None, env) == tmp_path / "env.db"


def test_default_is_in_the_xdg_data_directory(tmp_path):
    env = {"XDG_DATA_HOME": str(tmp_path / "xdg"), "HOME": str(tmp_path / "home")}
    assert resolve_db_path(None, env) == tmp_path / "xdg" / "inspector" / "inspector.db"


def test_relative_xdg_data_home_is_ignored_as_the_spec_says(tmp_path):
    env = {"XDG_DATA_HOME": "relative/dir", "HOME": str(tmp_path / "home")}
    assert resolve_db_path(None, env) == tmp_path / "home" / ".local" / "share" / "inspector" / "inspector.db"


def test_empty_values_count_as_not_given(tmp_path):
    env = {"INSPECTOR_DB": "", "HOME": str(tmp_path)}
    assert resolve_db_path("", env) == tmp_path / ".local" / "share" / "inspector" / "inspector.db"


def test_build_services_creates_the_default_data_directory(tmp_path, clock):
    env = {"XDG_DATA_HOME": str(tmp_path / "xdg")}
    with build_services(environ=env, clock=clock) as services:
        assert services.store.path == tmp_path / "xdg" / "inspector" / "inspector.db"
        assert services.store.path.exists()
        assert services.workflow.store is services.store


def test_a_named_store_in_a_missing_directory_is_refused(tmp_path, clock):
    with pytest.raises(StoreError, match="does not exist"):
        build_services(str(tmp_path / "nowhere" / "x.db"), environ={}, clock=clock)
    assert not (tmp_path / "nowhere").exists()


def test_a_file_that_is_not_a_store_is_refused_naming_it(tmp_path, clock):
    path = tmp_path / "notes.db"
    path.write_bytes(b"this is a text file, not SQLite" * 100)
    before = path.read_bytes()
    with pytest.raises(StoreError, match="notes.db"):
        open_store(path, clock=clock)
    assert path.read_bytes() == before


# --- connection settings ----------------------------------------------------------


def test_every_connection_reads_back_its_durability_settings(tmp_path, clock):
    for _ in range(2):  # a new file, then the existing one
        s = open_store(tmp_path / "inspector.db", clock=clock, busy_timeout_ms=2500)
        assert s.pragmas() == {"journal_mode": "wal", "synchronous": 2, "foreign_keys": 1, "busy_timeout": 2500}
        s.close()


def test_a_setting_that_did_not_take_is_reported_loudly(tmp_path, clock):
    class WeakStore(Store):
        def _configure(self):
            super()._configure()
            self._conn.execute("PRAGMA synchronous = NORMAL")
            self.pragmas()

    with pytest.raises(PragmaNotInForce, match="synchronous is 1, expected 2"):
        WeakStore(tmp_path / "inspector.db", clock=clock)


def test_an_in_memory_database_cannot_give_wal_and_is_refused(clock):
    with pytest.raises(PragmaNotInForce, match="journal_mode"):
        Store(":memory:", clock=clock)


# --- migrations ----------------------------------------------------------------------


def _version_1_file(path):
    """A store file as version 1 of the schema wrote it, with some records."""
    conn = raw(path)
    conn.execute("PRAGMA journal_mode = WAL")
    assert migrate(conn, 1) == 1
    conn.execute("BEGIN IMMEDIATE")
    tx = Transaction(conn, now="2024-11-02T08:00:00.000+00:00")
    supplier = tx.add_supplier("Harrowgate Preserves")
    product = tx.add_product("apricot jam 370 g jar")
    ines = tx.add_person("Ines Marlowe", "inspector", INES_SECRET)
    tx.add_lot(lot_id=LOT, supplier_id=supplier, product_id=product, quantity=LOT_SIZE, received_on="2024-11-02")
    tx.add_result(lot_id=LOT, unit=12, defect_class="major", outcome="pass", by_person=ines)
    conn.execute("COMMIT")
    conn.close()


def test_an_old_version_file_is_upgraded_on_open(tmp_path, clock):
    path = tmp_path / "old.db"
    _version_1_file(path)
    conn = raw(path)
    assert conn.execute("PRAGMA user_version").fetchone()[0] == 1
    assert conn.execute("SELECT count(*) FROM sqlite_master WHERE name = 'corrective_actions'").fetchone()[0] == 0
    conn.close()

    s = open_store(path, clock=clock)
    assert s.schema_version == SCHEMA_VERSION == 2
    report = s.verify_chain()
    assert report.ok, report
    with s.reading() as r:
        assert [x.unit for x in r.results(LOT)] == [12]
        supplier = r.supplier("Harrowgate Preserves")
    with s.transaction() as tx:  # the table version 2 added is usable
        tx.add_corrective_action(supplier_id=supplier.id, description="tighten seal torque check")
    assert s.verify_chain().ok
    s.close()


def test_a_file_from_a_newer_version_is_refused_and_left_alone(tmp_path, clock):
    path = tmp_path / "future.db"
    conn = raw(path)
    conn.execute("PRAGMA user_version = 99")
    conn.close()
    with pytest.raises(SchemaTooNew, match="99"):
        open_store(path, clock=clock)
    conn = raw(path)
    assert conn.execute("PRAGMA user_version").fetchone()[0] == 99
    assert conn.execute("SELECT count(*) FROM sqlite_master").fetchone()[0] == 0
    conn.close()


def test_a_new_file_gets_the_current_schema(store):
    assert store.schema_version == SCHEMA_VERSION
    assert store.verify_chain().ok


# --- transactions --------------------------------------------------------------------


def test_an_exception_inside_a_transaction_records_nothing(store):
    with pytest.raises(RuntimeError):
        with store.transaction() as tx:
            tx.add_supplier("Harrowgate Preserves")
            raise RuntimeError("power cut simulated in the middle of an action")
    with store.reading() as r:
        assert r.suppliers() == []
        assert r.entries() == []


def test_one_time_per_transaction_with_offset(store):
    with store.transaction() as tx:
        a = tx.add_supplier("Harrowgate Preserves")
        b = tx.add_product("apricot jam 370 g jar")
    with store.transaction() as tx:
        c = tx.add_product("quince jelly 250 g jar")
    with store.reading() as r:
        times = [r.supplier("Harrowgate Preserves").recorded_at, r.product("apricot jam 370 g jar").recorded_at,
                 r.product("quince jelly 250 g jar").recorded_at]
    assert times[0] == times[1] == "2025-03-04T09:15:00.000+01:00"
    assert times[2] == "2025-03-04T09:15:01.000+01:00"
    assert [a, b, c] == [1, 2, 3]
    assert datetime.fromisoformat(times[0]).utcoffset() is not None


def test_a_clock_without_offset_is_refused(tmp_path):
    s = open_store(tmp_path / "inspector.db", clock=lambda: datetime(2025, 3, 4, 9, 15))
    with pytest.raises(ValueError, match="offset"):
        with s.transaction() as tx:
            tx.add_supplier("Harrowgate Preserves")
    with s.reading() as r:
        assert r.suppliers() == []
    s.close()


def test_a_value_sqlite_would_silently_convert_is_refused(populated, clock):
    path, ids = populated
    s = open_store(path, clock=clock)
    before = s.verify_chain()
    with pytest.raises(StoreError, match="unit"):
        with s.transaction() as tx:
            # the text "412" would be stored as the number 412 and never verify
            tx.append("results", lot_id=LOT, unit="412", defect_class="major", outcome="pass",
                      by_person=ids["people"])
    after = s.verify_chain()
    assert after.ok and after.checked == before.checked
    s.close()


def test_a_unique_name_cannot_be_recorded_twice(store):
    from inspector.records import DuplicateEntry

    with store.transaction() as tx:
        tx.add_supplier("Harrowgate Preserves")
    with pytest.raises(DuplicateEntry, match="suppliers: name 'Harrowgate Preserves' is already recorded"):
        with store.transaction() as tx:
            tx.add_supplier("Harrowgate Preserves")
    assert store.verify_chain().ok


def test_nested_transactions_are_refused(store):
    with store.transaction():
        with pytest.raises(StoreError, match="already open"):
            with store.transaction():
                pass


def test_foreign_keys_are_enforced(store):
    with pytest.raises(StoreError, match="FOREIGN KEY"):
        with store.transaction() as tx:
            tx.add_result(lot_id="NO-SUCH-LOT", unit=1, defect_class="major", outcome="pass", by_person=1)


def test_a_database_error_inside_a_transaction_is_one_line_and_records_nothing(store):
    import sqlite3 as _sqlite3

    with pytest.raises(StoreError, match="nothing was recorded") as info:
        with store.transaction() as tx:
            tx.add_supplier("Harrowgate Preserves")
            tx._conn.execute("INSERT INTO no_such_table VALUES (1)")  # stands in for disk full, I/O error
    assert isinstance(info.value.__cause__, _sqlite3.OperationalError)
    assert "\n" not in str(info.value)
    with store.reading() as r:
        assert r.suppliers() == []
