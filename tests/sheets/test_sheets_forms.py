"""Forms as data: the shipped forms load, a site folder replaces them, and a
broken form file is reported naming the file and the key."""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest

from inspector.sheets.demo import demo_sheet_data
from inspector.sheets.forms import DEFAULT_FORMS_DIR, SHEETS, FormError, load_form
from sheets_support import page_texts, render_bytes

REPO_FORMS = Path(__file__).resolve().parents[2] / "forms"


def test_the_shipped_forms_are_the_repository_forms_folder():
    import inspector

    if Path(inspector.__file__).resolve().is_relative_to(REPO_FORMS.parent.resolve()):
        # a checkout: inspector/sheets/forms is a link to the top-level folder
        assert DEFAULT_FORMS_DIR.resolve() == REPO_FORMS.resolve()
    else:  # an installed copy: the same files
        for path in REPO_FORMS.glob("*.toml"):
            assert (DEFAULT_FORMS_DIR / path.name).read_bytes() == path.read_bytes(), path.name


@pytest.mark.parametrize("sheet", SHEETS)
def test_every_shipped_form_loads_with_a_header(sheet):
    form = load_form(sheet)
    assert form.title and form.number and form.revision
    assert form.site.organisation
    if sheet == "labels":
        assert form.labels is not None and "code" in form.labels.lines
    else:
        assert form.sections


@pytest.fixture
def site(tmp_path):
    folder = tmp_path / "forms"
    shutil.copytree(REPO_FORMS, folder)
    return folder


def edit(path: Path, old: str, new: str) -> None:
    text = path.read_text(encoding="utf-8")
    assert old in text, f"{old!r} not in {path.name}"
    path.write_text(text.replace(old, new, 1), encoding="utf-8")


def test_a_site_folder_changes_header_caption_and_form_number(site):
    edit(site / "site.toml", 'organisation = "Ravensholt Cold Store"', 'organisation = "Quarrybank Dairy Hub"')
    edit(site / "pick.toml", 'number = "RCS-QF-21"', 'number = "QDH-7"')
    edit(site / "pick.toml", 'caption = "Units to pull, in walking order"', 'caption = "Walk list"')
    pdf, _ = render_bytes("pick", demo_sheet_data(), forms_dir=site)
    text = " ".join(page_texts(pdf))
    assert "Quarrybank Dairy Hub" in text and "Form QDH-7" in text and "Walk list" in text
    assert "Ravensholt Cold Store" not in text


def test_a_sheet_may_override_the_site_header(site):
    with open(site / "bench.toml", "a", encoding="utf-8") as fh:
        fh.write('\n[site]\norganisation = "Bench annex"\n')
    assert load_form("bench", site).site.organisation == "Bench annex"
    assert load_form("pick", site).site.organisation == "Ravensholt Cold Store"


def test_sections_print_in_the_order_of_the_file(site):
    text = (site / "release.toml").read_text(encoding="utf-8")
    record = text[text.index('[[section]]\nkind = "record"'):]
    text = text.replace(record, "")
    text = text.replace('[[section]]\nkind = "caution"', record.rstrip() + '\n\n[[section]]\nkind = "caution"', 1)
    (site / "release.toml").write_text(text, encoding="utf-8")
    assert [s.kind for s in load_form("release", site).sections][:2] == ["record", "caution"]


@pytest.mark.parametrize(
    "sheet, old, new, key",
    [
        ("pick", '{ field = "unit", caption = "Unit no."', '{ field = "unt", caption = "Unit no."',
         "section[5].columns[2].field"),
        ("release", 'revision = "D"', 'revison = "D"', "form.revision"),
        ("release", 'number = "RCS-QF-24"\n', "", "form.number"),
        ("bench", 'kind = "tally"', 'kind = "totals"', "section[5].kind"),
        ("labels", "columns = 3", "columns = 0", "labels.columns"),
        ("labels", "columns = 3", 'columns = "three"', "labels.columns"),
        ("pick", "margin_mm = 14", "margin_mm = 2", "page.margin_mm"),
        ("release", 'height_mm = 62', 'height_mm = "tall"', "section[4].height_mm"),
        ("bench", 'lines = ["Inspected by", "Checked by"]', "lines = []", "section[6].lines"),
        ("pick", '{ field = "lot_id", caption = "Lot" },', '{ field = "lot_id" },', "section[1].fields[1].caption"),
    ],
)
def test_a_broken_form_names_the_file_and_the_key(site, sheet, old, new, key):
    edit(site / f"{sheet}.toml", old, new)
    with pytest.raises(FormError) as err:
        load_form(sheet, site)
    message = str(err.value)
    assert str(site / f"{sheet}.toml") in message
    assert f": {key}:" in message
    assert "\n" not in message


def test_a_misspelt_key_is_pointed_out(site):
    edit(site / "release.toml", 'revision = "D"', 'revison = "D"')
    with pytest.raises(FormError, match="form.revision: missing.*'revison'"):
        load_form("release", site)
    edit(site / "release.toml", 'revison = "D"', 'revision = "D"\ncolour = "red"')
    with pytest.raises(FormError, match="form.colour: unknown key"):
        load_form("release", site)


def test_a_file_that_is_not_toml_names_the_file_and_the_line(site):
    (site / "pick.toml").write_text('[form]\ntitle = "Pick list\n', encoding="utf-8")
    with pytest.raises(FormError) as err:
        load_form("pick", site)
    assert str(site / "pick.toml") in str(err.value) and "not valid TOML" in str(err.value)
    assert "line 2" in str(err.value)


def test_a_missing_site_header_names_the_file(site):
    (site / "site.toml").unlink()
    with pytest.raises(FormError) as err:
        load_form("release", site)
    assert str(site / "site.toml") in str(err.value)


def test_a_release_form_must_keep_the_decision_and_record(site):
    text = (site / "release.toml").read_text(encoding="utf-8")
    start = text.index('[[section]]\nkind = "record"')
    (site / "release.toml").write_text(text[:start], encoding="utf-8")
    with pytest.raises(FormError, match="needs a section of kind 'record'"):
        load_form("release", site)


def test_a_form_without_a_caution_section_still_prints_the_caution_for_a_critical_lot(site):
    text = (site / "pick.toml").read_text(encoding="utf-8")
    text = text.replace('[[section]]\nkind = "caution"\ncaption = "Advisory"\n', "")
    (site / "pick.toml").write_text(text, encoding="utf-8")
    assert all(s.kind != "caution" for s in load_form("pick", site).sections)
    pdf, _ = render_bytes("pick", demo_sheet_data(critical=True), forms_dir=site)
    assert "the results on this sheet are advisory" in " ".join(page_texts(pdf)).replace("\n", " ")


def test_rendering_with_a_broken_form_raises_before_writing(site, tmp_path):
    edit(site / "bench.toml", 'kind = "bench"', 'kind = "bnch"')
    out = tmp_path / "bench.pdf"
    from inspector.sheets.render import render_sheet

    with pytest.raises(FormError):
        render_sheet("bench", demo_sheet_data(), out, forms_dir=site)
    assert not out.exists()
