"""Shared fixture for CLI tests: run `inspector` in-process on a temporary
store, with stdin given per call, never touching the user's real store."""

from __future__ import annotations

import io
import sys

import pytest

from inspector.cli import main


@pytest.fixture
def cli_on(tmp_path, monkeypatch, capsys):
    """``cli_on(name)`` -> ``run(*args, stdin="") -> (code, out, err)`` on the
    store ``tmp_path / name`` (``run.db``); with ``no_traceback=True`` every
    call also checks that no traceback reached stderr."""
    monkeypatch.setenv("XDG_DATA_HOME", str(tmp_path / "xdg"))
    monkeypatch.delenv("INSPECTOR_DB", raising=False)

    def make(name: str = "inspector.db", *, no_traceback: bool = False):
        db = tmp_path / name

        def run(*args, stdin=""):
            monkeypatch.setattr(sys, "stdin", io.StringIO(stdin))
            code = main(["--db", str(db), *args])
            captured = capsys.readouterr()
            if no_traceback:
                assert "Traceback" not in captured.err
            return code, captured.out, captured.err

        run.db = db
        return run

    return make
