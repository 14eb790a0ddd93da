"""What a reader finds on the printed sheets (text extracted with pypdf)."""

from __future__ import annotations

import re
from dataclasses import replace

import pytest

from inspector.sheets import fmt
from inspector.sheets.demo import demo_sheet_data
from inspector.sheets.model import SheetSignature
from inspector.sheets.render import ADVISORY_TEXT
from sheets_support import normal, page_texts, render_bytes

SHEET_KINDS = ("pick", "labels", "bench", "release")


@pytest.fixture(scope="module")
def critical():
    return demo_sheet_data(critical=True)


@pytest.fixture(scope="module")
def plain():
    return demo_sheet_data(lot_id="HP-2611-08", critical=False, seed=77)


@pytest.fixture(scope="module")
def rendered(critical, plain):
    out = {}
    for name, data in (("critical", critical), ("plain", plain)):
        for sheet in SHEET_KINDS:
            pdf, pages = render_bytes(sheet, data)
            out[name, sheet] = (pdf, pages, page_texts(pdf))
    return out


@pytest.mark.parametrize("sheet", SHEET_KINDS)
@pytest.mark.parametrize("which", ["critical", "plain"])
def test_every_page_says_lot_and_page_x_of_y_matching_the_page_count(rendered, critical, plain, sheet, which):
    data = critical if which == "critical" else plain
    pdf, pages, texts = rendered[which, sheet]
    assert len(texts) == pages >= 1
    for number, text in enumerate(texts, start=1):
        assert f"Page {number} of {pages}" in text
        assert data.lot.lot_id in text
        found = re.findall(r"Page (\d+) of (\d+)", text)
        assert found == [(str(number), str(pages))]


@pytest.mark.parametrize("sheet", SHEET_KINDS)
def test_critical_lot_carries_the_advisory_caution_on_every_page(rendered, sheet):
    _, _, texts = rendered["critical", sheet]
    for text in texts:
        assert "advisory" in text.lower()


@pytest.mark.parametrize("sheet", SHEET_KINDS)
def test_ordinary_lot_carries_no_advisory_caution(rendered, sheet):
    _, _, texts = rendered["plain", sheet]
    assert all("advisory" not in t.lower() for t in texts)


def test_release_sheet_of_a_critical_lot_prints_the_whole_caution(rendered):
    text = normal(" ".join(rendered["critical", "release"][2]))
    assert normal(ADVISORY_TEXT) in text


def test_release_sheet_holds_lot_sample_seed_decision_and_hash(rendered, critical):
    text = normal(" ".join(rendered["critical", "release"][2]))
    d = critical.draw
    assert critical.lot.lot_id in text
    assert f"{fmt.number(d.sample_size)} of {fmt.units(d.lot_size)}" in text
    assert d.seed in text
    assert critical.decision.decision == "accept"
    assert "Accept" in text
    assert critical.lot.record_hash in text
    # the command that re-derives the draw, as one string
    assert d.command in text


def test_release_sheet_lists_every_nonconforming_unit_between_its_headings(rendered, critical):
    text = normal(" ".join(rendered["critical", "release"][2]))
    section = text.split("Nonconforming units", 1)[1].split("Corrections", 1)[0]
    bad = [r for r in critical.results if r.nonconforming]
    assert bad, "the demo lot has nonconforming units"
    for r in bad:
        assert re.search(rf"(?<![\d]){r.unit}(?![\d])", section), r.unit
    # and it is not simply every unit: conforming units are not listed there
    listed = {u.unit for u in critical.units if re.search(rf"(?<![\d]){u.unit}(?![\d])", section)}
    assert {r.unit for r in bad} <= listed
    assert len(listed) < len(critical.units) // 2


def test_release_sheet_prints_corrections_with_their_reasons(rendered, critical):
    text = normal(" ".join(rendered["critical", "release"][2]))
    for k in critical.corrections:
        assert normal(k.reason) in text


def test_release_sheet_prints_the_exact_estimate_bounds(rendered, critical):
    text = normal(" ".join(rendered["critical", "release"][2]))
    for e in critical.estimates:
        assert f"{fmt.number(e.lower)} to {fmt.units(e.upper)}" in text
        assert f"at most {fmt.units(e.upper_bound)}" in text


@pytest.mark.parametrize("sheet", ["pick", "bench", "release"])
def test_sample_size_and_seed_are_printed(rendered, critical, sheet):
    text = normal(" ".join(rendered["critical", sheet][2]))
    if sheet != "bench":
        assert critical.draw.seed in text
    assert fmt.number(critical.draw.sample_size) in text


def test_pick_list_lists_every_unit_with_its_container_count(rendered, critical):
    text = normal(" ".join(rendered["critical", "pick"][2]))
    for stop in critical.stops:
        assert stop.container in text
    for u in critical.units:
        assert re.search(rf"(?<![\d]){u.unit}(?![\d])", text), u.unit
    assert f"{fmt.units(critical.stops[0].count)} here" in text


def test_free_text_is_printed_literally_not_read_as_markup(rendered, critical):
    text = normal(" ".join(rendered["critical", "release"][2]))
    assert "seals intact <ok>." in text
    assert "kept aside <tag 4> & sealed" in text


def test_accented_and_non_latin_names_survive_extraction():
    data = demo_sheet_data(supplier="Zoë Ødegård Konserven", found={"major": 1})
    results = tuple(replace(r, by="山田 花子") if r.nonconforming else r for r in data.results)
    data = replace(
        data,
        results=results,
        signatures=(SheetSignature(printed_name="Łukasz Wróbel", meaning="Released by",
                                   at="2025-06-03T16:02:00+01:00"),),
    )
    for sheet in ("pick", "release"):
        pdf, _ = render_bytes(sheet, data)
        text = " ".join(page_texts(pdf))
        assert "Zoë Ødegård" in text
        if sheet == "release":
            assert "Łukasz Wróbel" in text
            assert "山田 花子" in text


def test_pick_list_of_an_undrawn_lot_says_so():
    data = demo_sheet_data()
    data = replace(data, stops=(), draw=None)
    pdf, pages = render_bytes("pick", data)
    text = " ".join(page_texts(pdf))
    assert "Not drawn yet" in text and "No units drawn yet" in text
    assert pages == 1


def test_release_sheet_of_an_open_lot_says_not_yet_decided():
    data = demo_sheet_data()
    from inspector.sheets.model import SheetDecision

    data = replace(data, decision=SheetDecision(), signatures=())
    text = " ".join(page_texts(render_bytes("release", data)[0]))
    assert "Not yet decided" in text
    assert "Accept" not in text.split("Decision and disposition", 1)[1]
