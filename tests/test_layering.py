"""The layering rule: the pure core loads no front end, renderer or store."""

from __future__ import annotations

import subprocess
import sys

import pytest

PURE = ["inspector.stats", "inspector.stats.hypergeom", "inspector.stats.plans",
        "inspector.stats.design", "inspector.stats.estimate", "inspector.stats.tables",
        "inspector.stats.switching", "inspector.frame"]
BELOW_WORKFLOW = ["inspector.records"]
FRONT_ENDS = ("textual", "reportlab", "inspector.cli", "inspector.tui")


def loaded_after_import(module: str) -> set[str]:
    code = f"import sys, importlib; importlib.import_module({module!r}); print('\\n'.join(sys.modules))"
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=60)
    assert out.returncode == 0, out.stderr
    return set(out.stdout.split())


@pytest.mark.parametrize("module", PURE)
def test_pure_core_imports_no_front_end_renderer_or_store(module):
    loaded = loaded_after_import(module)
    for banned in FRONT_ENDS + ("sqlite3", "inspector.records", "inspector.workflow", "inspector.sheets"):
        assert not any(m == banned or m.startswith(banned + ".") for m in loaded), (module, banned)


@pytest.mark.parametrize("module", BELOW_WORKFLOW)
def test_records_import_no_front_end_or_renderer(module):
    loaded = loaded_after_import(module)
    for banned in FRONT_ENDS + ("inspector.sheets",):
        assert not any(m == banned or m.startswith(banned + ".") for m in loaded), (module, banned)


def test_cli_parser_is_built_without_numpy():
    # main() must stay cheap: building the parser imports no numerics
    code = ("import sys; from inspector.cli import _parser; _parser(); "
            "print('numpy' in sys.modules, 'scipy' in sys.modules)")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=60)
    assert out.returncode == 0, out.stderr
    assert out.stdout.split() == ["False", "False"]
