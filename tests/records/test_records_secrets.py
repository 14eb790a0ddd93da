"""Secrets are kept only as salted slow hashes."""

from __future__ import annotations

import json

import pytest

from inspector.records import StoreError, open_store
from records_fixtures import INES_SECRET, TOMASZ_SECRET, raw


def _all_bytes(path):
    """The store as it sits on disk: main file, write-ahead log, shared memory."""
    data = b""
    for suffix in ("", "-wal", "-shm"):
        part = path.with_name(path.name + suffix)
        if part.exists():
            data += part.read_bytes()
    return data


def test_the_secret_is_nowhere_in_the_files(tmp_path, clock):
    path = tmp_path / "inspector.db"
    s = open_store(path, clock=clock)
    with s.transaction() as tx:
        tx.add_person("Ines Marlowe", "inspector", INES_SECRET)
        tx.add_person("Tomasz Quayle", "approver", TOMASZ_SECRET)
    # checked while the log still holds the rows, and again after checkpoint
    for _ in range(2):
        data = _all_bytes(path)
        assert b"Ines Marlowe" in data  # the test reads the right files
        for secret in (INES_SECRET, TOMASZ_SECRET):
            assert secret.encode() not in data
            assert secret.encode("utf-16-le") not in data
        s.close()
        conn = raw(path)
        conn.execute("PRAGMA wal_checkpoint(TRUNCATE)")
        conn.close()
        s = open_store(path, clock=clock)
    s.close()


def test_the_hash_is_salted_and_its_parameters_are_kept(store):
    with store.transaction() as tx:
        tx.add_person("Ines Marlowe", "inspector", "same-secret-for-both")
        tx.add_person("Tomasz Quayle", "approver", "same-secret-for-both")
    conn = raw(store.path)
    rows = conn.execute("SELECT secret_kdf, secret_hash FROM people ORDER BY id").fetchall()
    conn.close()
    kdfs = [json.loads(kdf) for kdf, _ in rows]
    assert kdfs[0]["algorithm"] == "scrypt" and kdfs[0]["n"] >= 2**14
    assert kdfs[0]["salt"] != kdfs[1]["salt"]
    assert rows[0][1] != rows[1][1]


def test_authentication_tells_right_from_wrong(store):
    with store.transaction() as tx:
        tx.add_person("Tomasz Quayle", "approver", TOMASZ_SECRET)
    with store.reading() as r:
        person, ok = r.authenticate("Tomasz Quayle", TOMASZ_SECRET)
        assert ok and person.role == "approver"
        person, ok = r.authenticate("Tomasz Quayle", TOMASZ_SECRET.upper())
        assert not ok and person.name == "Tomasz Quayle"
        assert r.authenticate("Nobody Here", TOMASZ_SECRET) == (None, False)


def test_a_short_secret_is_refused_and_nothing_recorded(store):
    with pytest.raises(StoreError, match="secret: expected at least 8 characters, got 4"):
        with store.transaction() as tx:
            tx.add_person("Ines Marlowe", "inspector", "jam!")
    with store.reading() as r:
        assert r.people() == []


def test_a_person_repr_carries_no_secret_material(store):
    with store.transaction() as tx:
        tx.add_person("Ines Marlowe", "inspector", INES_SECRET)
    with store.reading() as r:
        text = repr(r.person("Ines Marlowe"))
    assert "salt" not in text and "hash" not in text
