"""Fixtures for the workflow tests: real services on a temporary store."""

from __future__ import annotations

import pytest

from workflow_fixtures import add_people, make_services


@pytest.fixture
def db(tmp_path):
    return tmp_path / "inspector.db"


@pytest.fixture
def services(db):
    s = make_services(db)
    yield s
    s.close()


@pytest.fixture
def wf(services):
    add_people(services.workflow)
    return services.workflow
