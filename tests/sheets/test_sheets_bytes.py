"""Same data, same forms, same clock: the same bytes."""

from __future__ import annotations

import hashlib
import subprocess
import sys
from datetime import datetime, timedelta, timezone
from pathlib import Path

import pytest

from inspector.sheets.demo import demo_sheet_data
from sheets_support import render_bytes


@pytest.fixture(scope="module")
def data():
    return demo_sheet_data()


@pytest.mark.parametrize("sheet", ["pick", "labels", "bench", "release"])
def test_rendering_twice_gives_identical_bytes(data, sheet):
    first, _ = render_bytes(sheet, data)
    second, _ = render_bytes(sheet, data)
    assert first == second


def test_another_process_gives_identical_bytes(data):
    # Font registration order and caches differ in a fresh interpreter.
    here, _ = render_bytes("release", data)
    code = (
        "import hashlib, io, sys\n"
        f"sys.path.insert(0, {str(Path(__file__).resolve().parent)!r})\n"
        "from sheets_support import render_bytes\n"
        "from inspector.sheets.demo import demo_sheet_data\n"
        "pdf, _ = render_bytes('release', demo_sheet_data())\n"
        "print(hashlib.sha256(pdf).hexdigest())\n"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=120,
                         cwd=Path(__file__).resolve().parents[2])
    assert out.returncode == 0, out.stderr
    assert out.stdout.strip() == hashlib.sha256(here).hexdigest()


def test_the_printed_time_comes_from_the_clock(data):
    a, _ = render_bytes("pick", data)
    later = datetime(2025, 6, 4, 9, 0, tzinfo=timezone(timedelta(hours=1)))
    b, _ = render_bytes("pick", data, clock=lambda: later)
    assert a != b
    from sheets_support import page_texts

    assert "Printed 2025-06-04 09:00 +01:00" in page_texts(b)[0]


def test_a_clock_without_utc_offset_is_refused(data):
    with pytest.raises(ValueError, match="clock"):
        render_bytes("pick", data, clock=lambda: datetime(2025, 6, 3, 12, 0))
