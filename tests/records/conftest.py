"""Fixtures for the record store: real SQLite files under tmp_path."""

from __future__ import annotations

import shutil
import sqlite3

import pytest

from inspector.records import open_store
from records_fixtures import SteppingClock, populate


@pytest.fixture
def clock() -> SteppingClock:
    return SteppingClock()


@pytest.fixture
def store(tmp_path, clock):
    s = open_store(tmp_path / "inspector.db", clock=clock)
    yield s
    s.close()


@pytest.fixture(scope="session")
def populated_template(tmp_path_factory):
    """A populated store file, built once and copied per test."""
    directory = tmp_path_factory.mktemp("template")
    path = directory / "inspector.db"
    s = open_store(path, clock=SteppingClock())
    ids = populate(s)
    s.close()
    # Fold the log into the main file so that one file is a complete copy.
    conn = sqlite3.connect(path)
    conn.execute("PRAGMA wal_checkpoint(TRUNCATE)")
    conn.close()
    return path, ids


@pytest.fixture
def populated(tmp_path, populated_template):
    """(path, ids) of a fresh copy of the populated store."""
    source, ids = populated_template
    path = tmp_path / "inspector.db"
    shutil.copyfile(source, path)
    return path, dict(ids)
