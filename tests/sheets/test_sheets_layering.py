"""The sheets' pure parts load no renderer, so the terminal UI can read a
scanned code or a form without reportlab."""

from __future__ import annotations

import subprocess
import sys

import pytest


@pytest.mark.parametrize(
    "module",
    ["inspector.sheets", "inspector.sheets.codes", "inspector.sheets.model", "inspector.sheets.forms",
     "inspector.sheets.build"],
)
def test_pure_sheet_modules_load_no_reportlab_or_store(module):
    code = f"import sys, importlib; importlib.import_module({module!r}); print('\\n'.join(sys.modules))"
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=60)
    assert out.returncode == 0, out.stderr
    loaded = set(out.stdout.split())
    for banned in ("reportlab", "sqlite3", "textual", "inspector.workflow", "inspector.cli"):
        assert not any(m == banned or m.startswith(banned + ".") for m in loaded), banned
