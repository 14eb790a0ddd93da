"""The unit code printed on pick lists and labels, and what the sheets draw."""

from __future__ import annotations

import pytest
from hypothesis import given
from hypothesis import strategies as st

from inspector.sheets import render
from inspector.sheets.codes import UnitCodeError, parse_unit_code, unit_code
from inspector.sheets.demo import demo_sheet_data
from sheets_support import decode128, page_texts, render_bytes, symbols_in


def test_code_of_a_plain_lot_id_is_lot_colon_unit():
    assert unit_code("HP-2611-07", 412) == "HP-2611-07:412"
    got = parse_unit_code("HP-2611-07:412")
    assert (got.lot_id, got.unit) == ("HP-2611-07", 412)


def test_other_characters_are_escaped_as_utf8_bytes():
    assert unit_code("Zoë 7", 3) == "Zo%C3%AB%207:3"
    assert unit_code("A:B", 1) == "A%3AB:1"
    assert parse_unit_code("Zo%C3%AB%207:3").lot_id == "Zoë 7"


def test_a_scanner_s_trailing_newline_is_ignored():
    assert parse_unit_code("  HP-2611-07:9\r\n").unit == 9


@pytest.mark.parametrize(
    "text",
    [
        "5012345678900",  # a retail barcode on the jar, not ours
        "HP-2611-07",  # no unit
        "HP-2611-07:",  # empty unit
        "HP-2611-07:0",  # units count from 1
        "HP-2611-07:007",  # not the canonical spelling
        "HP-2611-07:12:3",  # two separators
        ":12",  # no lot
        "Zo%c3%ab:1",  # lower-case hex is not how codes are printed
        "Zo%C3:1",  # not UTF-8
        "HP 2611:1",  # a raw space would have been escaped
        "",
    ],
)
def test_text_that_is_not_a_unit_code_is_refused_naming_it(text):
    with pytest.raises(UnitCodeError) as err:
        parse_unit_code(text)
    assert "unit code" in str(err.value)


@pytest.mark.parametrize("lot, unit", [("", 1), ("  ", 1), ("HP", 0), ("HP", -3), ("HP", True), ("HP", 1.0)])
def test_a_code_needs_a_lot_and_a_unit_number(lot, unit):
    with pytest.raises(UnitCodeError):
        unit_code(lot, unit)


@given(
    lot=st.text(min_size=1, max_size=30).filter(lambda s: s.strip() and "\x00" not in s),
    unit=st.integers(min_value=1, max_value=10**12),
)
def test_every_code_reads_back_to_its_lot_and_unit(lot, unit):
    code = unit_code(lot, unit)
    assert code.isascii() and code.isprintable() and code.count(":") == 1
    back = parse_unit_code(code)
    assert (back.lot_id, back.unit) == (lot, unit)


# --- what the sheets actually print ------------------------------------------------------


@pytest.fixture(scope="module")
def data():
    return demo_sheet_data()


@pytest.mark.parametrize("sheet", ["pick", "labels"])
def test_each_printed_symbol_decodes_to_exactly_its_unit(data, sheet):
    pdf, pages = render_bytes(sheet, data)
    walking = [u.unit for u in data.units]
    decoded = [decode128(widths) for page in symbols_in(pdf) for widths in page]
    # One symbol per unit, in walking order, each carrying that unit's code.
    assert decoded == [unit_code(data.lot.lot_id, u) for u in walking]
    assert [parse_unit_code(c).unit for c in decoded] == walking
    assert {parse_unit_code(c).lot_id for c in decoded} == {data.lot.lot_id}


def test_the_typed_text_under_each_symbol_is_the_same_code(data):
    pdf, _ = render_bytes("pick", data)
    text = " ".join(page_texts(pdf))
    for u in data.units:
        assert unit_code(data.lot.lot_id, u.unit) in text


def test_symbols_are_made_for_each_unit_row_from_its_own_number(data, monkeypatch):
    made = []
    original = render.unit_barcode

    def spy(value, **kwargs):
        made.append(value)
        return original(value, **kwargs)

    monkeypatch.setattr(render, "unit_barcode", spy)
    render_bytes("pick", data)
    assert made == [unit_code(data.lot.lot_id, u.unit) for u in data.units]


@pytest.mark.parametrize("lot_id", ["Łódź-7 ö", "Łódź/山田-1"])
@pytest.mark.parametrize("sheet", ["pick", "labels"])
def test_a_long_or_accented_lot_id_still_prints_one_readable_symbol_per_unit(lot_id, sheet, monkeypatch):
    # Escaped, such an ID may be too long for Code 128 in the space given;
    # the sheet then prints a QR symbol of the same text.
    qr = []
    original = render.unit_qr

    def spy(value):
        qr.append(value)
        return original(value)

    monkeypatch.setattr(render, "unit_qr", spy)
    data = demo_sheet_data(lot_id=lot_id, found={"major": 1})
    pdf, _ = render_bytes(sheet, data)
    bars = [decode128(w) for page in symbols_in(pdf) for w in page]
    wanted = [unit_code(lot_id, u.unit) for u in data.units]
    assert sorted(bars + qr) == sorted(wanted)
    assert len(bars) + len(qr) == len(wanted)
    assert [parse_unit_code(c).lot_id for c in bars + qr] == [lot_id] * len(wanted)
    text = " ".join(page_texts(pdf))
    assert all(code in text for code in wanted)  # the typed form under each symbol

