"""Fixtures for the terminal UI tests (defined in tui_support.py, which the
test modules also import their helpers from: a module named "conftest" is
ambiguous when several test folders have one)."""

from tui_support import empty_services, seeded_db, seeded_services, seeded_template  # noqa: F401
