"""Scanning the printed pages with a real barcode reader (zbar), where the
machine has one: the rendered page, rasterised at 300 dpi as a printer
would, must read back to exactly the units listed. Skipped where zbarimg
or pdftoppm is missing (Debian packages zbar-tools and poppler-utils); the
module-width decoding in test_sheets_codes.py runs everywhere."""

from __future__ import annotations

import shutil
import subprocess

import pytest

from inspector.sheets.codes import unit_code
from inspector.sheets.demo import demo_sheet_data
from sheets_support import render_bytes

pytestmark = pytest.mark.skipif(
    not (shutil.which("zbarimg") and shutil.which("pdftoppm")), reason="zbarimg or pdftoppm not installed"
)


def scan_first_page(pdf: bytes, tmp_path) -> list[str]:
    (tmp_path / "sheet.pdf").write_bytes(pdf)
    subprocess.run(["pdftoppm", "-png", "-r", "300", "-f", "1", "-l", "1", str(tmp_path / "sheet.pdf"),
                    str(tmp_path / "page")], check=True, timeout=120)
    (png,) = tmp_path.glob("page*.png")
    out = subprocess.run(["zbarimg", "-q", "--raw", str(png)], capture_output=True, text=True, timeout=120)
    return [line for line in out.stdout.splitlines() if line]


def test_code128_on_the_pick_list_scans_to_its_units(tmp_path):
    data = demo_sheet_data()
    pdf, _ = render_bytes("pick", data)
    read = scan_first_page(pdf, tmp_path)
    wanted = {unit_code(data.lot.lot_id, u.unit) for u in data.units}
    assert read and set(read) <= wanted
    assert len(read) == len(set(read)) >= 8  # every symbol on the first page


def test_qr_labels_of_a_non_latin_lot_scan_to_their_units(tmp_path):
    data = demo_sheet_data(lot_id="Łódź/山田-1", found={"major": 1})
    pdf, _ = render_bytes("labels", data)
    read = scan_first_page(pdf, tmp_path)
    first_page = [unit_code(data.lot.lot_id, u.unit) for u in data.units[:24]]
    assert sorted(read) == sorted(first_page)
