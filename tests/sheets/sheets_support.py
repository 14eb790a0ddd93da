"""Helpers for the sheet tests: a fixed clock, rendering to bytes, page text
and reading back the Code 128 symbols printed in a PDF."""

from __future__ import annotations

import io
import re
from datetime import datetime, timedelta, timezone

import pypdf

from inspector.sheets.render import render_sheet

FIXED = datetime(2025, 6, 3, 16, 30, tzinfo=timezone(timedelta(hours=1)))


def fixed_clock() -> datetime:
    return FIXED


def render_bytes(sheet, data, **kwargs) -> tuple[bytes, int]:
    buf = io.BytesIO()
    kwargs.setdefault("clock", fixed_clock)
    pages = render_sheet(sheet, data, buf, **kwargs)
    return buf.getvalue(), pages


def page_texts(pdf: bytes) -> list[str]:
    reader = pypdf.PdfReader(io.BytesIO(pdf))
    return [page.extract_text() or "" for page in reader.pages]


def normal(text: str) -> str:
    """Whitespace folded to single spaces (extraction splits lines freely)."""
    return re.sub(r"\s+", " ", text)


# --- Code 128 read back from the page content ----------------------------------------
#
# The sheets draw each symbol as one filled path in module units:
# "x 0 w 1 re" per bar, then "f". Reading those widths back and decoding
# them checks what is printed, not what was meant to be printed.
#
# Module widths (bar, space, bar, space, bar, space) of each symbol value.
# Values 0..102 and the start codes come from reportlab's table; the start
# and stop patterns below are checked against the published symbology
# (ISO/IEC 15417 Code 128: Start B 211214, Start C 211232, Stop 2331112;
# from memory, and they agree with reportlab's table).
START_B, START_C, STOP = "211214", "211232", "2331112"


def _pattern_table() -> dict[str, int]:
    from reportlab.graphics.barcode.code128 import _patterns

    out = {}
    for value, letters in _patterns.items():
        widths = "".join(str(ord(ch.upper()) - 64) for ch in letters)
        out[widths] = value
    return out


_RUN = re.compile(rb"((?:\d+ 0 \d+ 1 re )+)f")


def symbols_in(pdf: bytes) -> list[list[str]]:
    """Per page, the module-width strings of every barcode drawn."""
    reader = pypdf.PdfReader(io.BytesIO(pdf))
    out = []
    for page in reader.pages:
        data = page.get_contents().get_data()
        found = []
        for match in _RUN.finditer(data):
            nums = [int(v) for pair in re.findall(rb"(\d+) 0 (\d+) 1 re", match.group(1)) for v in pair]
            bars = list(zip(nums[0::2], nums[1::2]))
            widths = []
            for i, (x, w) in enumerate(bars):
                widths.append(w)
                if i + 1 < len(bars):
                    widths.append(bars[i + 1][0] - (x + w))
            found.append("".join(str(w) for w in widths))
        out.append(found)
    return out


def decode128(widths: str) -> str:
    """Decode one Code 128 symbol given as module widths, checking the
    start code, the check symbol and the stop pattern."""
    table = _pattern_table()
    assert widths.endswith(STOP), "no stop pattern"
    body = widths[: -len(STOP)]
    assert len(body) % 6 == 0, "symbol length is not whole characters"
    values = [table[body[i : i + 6]] for i in range(0, len(body), 6)]
    assert body[:6] in (START_B, START_C), f"unexpected start {body[:6]}"
    start, data, check = values[0], values[1:-1], values[-1]
    # Check symbol: (start + sum of position * value) mod 103 (Code 128 rule).
    assert (start + sum(i * v for i, v in enumerate(data, start=1))) % 103 == check, "check symbol mismatch"
    mode = "B" if start == 104 else "C"
    text = []
    for v in data:
        if mode == "B":
            if v == 99:
                mode = "C"
            else:
                assert v < 95, f"set B value {v} is not a printable character"
                text.append(chr(v + 32))
        else:
            if v == 100:
                mode = "B"
            else:
                assert v < 100, f"set C value {v} is not a digit pair"
                text.append(f"{v:02d}")
    return "".join(text)
