"""`inspector sheet`: the four sheets of a lot kept by the workflow, printed
from the command line; bad input is one line and exit status 2."""

from __future__ import annotations

import json
import re
import shutil
from datetime import datetime, timedelta, timezone
from pathlib import Path

import pytest

from inspector.cli import main
from inspector.services import build_services
from inspector.sheets import fmt
from inspector.sheets.codes import parse_unit_code
from sheets_support import decode128, normal, page_texts, symbols_in

REPO_FORMS = Path(__file__).resolve().parents[2] / "forms"
STAMP = datetime(2025, 6, 3, 9, 0, tzinfo=timezone(timedelta(hours=1)))
SECRET = "apricot-quay-5521"


class Clock:
    def __init__(self):
        self.now = STAMP

    def __call__(self):
        self.now += timedelta(seconds=1)
        return self.now


@pytest.fixture(scope="module")
def store(tmp_path_factory):
    """Two decided lots of invented Harrowgate Preserves jam: HP-2611-07
    (critical, released) and HP-2611-08 (not critical, rejected early);
    HP-2611-09 is registered and planned but not drawn."""
    db = tmp_path_factory.mktemp("sheets") / "inspector.db"
    with build_services(str(db), environ={}, clock=Clock()) as s:
        wf = s.workflow
        wf.add_person(name="Zoë Ødegård", role="inspector", secret=SECRET)
        wf.add_person(name="山田 花子", role="approver", secret=SECRET)
        for lot, critical in (("HP-2611-07", True), ("HP-2611-08", False), ("HP-2611-09", False)):
            wf.register_lot(lot_id=lot, supplier="Harrowgate Preserves", product="apricot jam 370 g jar",
                            size=15552, structure="pallet=18,layer=4,carton=9,jar=24", critical=critical,
                            reference="PO 77-1043")
            wf.plan(lot, sample=20, accept=1)
        for lot, fails in (("HP-2611-07", 1), ("HP-2611-08", 2)):
            units = wf.draw(lot, method="stratified", seed=4242)["units"]
            for i, u in enumerate(units):
                if i < fails:
                    wf.record(lot, u, outcome="fail", defect="chipped rim", by="Zoë Ødegård")
                    if wf.show(lot)["state"] == "decided":
                        break
                else:
                    wf.record(lot, u, outcome="pass", by="Zoë Ødegård")
        first_fail = next(r for r in wf.show("HP-2611-07")["results"] if r["outcome"] == "fail")
        wf.correct("HP-2611-07", first_fail["unit"], outcome="fail", defect="chipped rim, 2 mm chip at the seam",
                   reason="measured under the bench lamp", by="Zoë Ødegård")
        wf.decide("HP-2611-07")
        wf.release("HP-2611-07", by="山田 花子", meaning="released by", secret=SECRET)
        record = wf.show("HP-2611-07")
    return db, record


def run(capsys, *argv):
    code = main([str(a) for a in argv])
    out = capsys.readouterr()
    return code, out.out, out.err


@pytest.mark.parametrize("sheet", ["pick", "labels", "bench", "release"])
def test_each_sheet_prints_for_a_recorded_lot(store, tmp_path, capsys, sheet):
    db, record = store
    out = tmp_path / f"{sheet}.pdf"
    code, stdout, err = run(capsys, "--db", db, "sheet", sheet, "HP-2611-07", "-o", out)
    assert code == 0, err
    assert str(out) in stdout
    texts = page_texts(out.read_bytes())
    for i, text in enumerate(texts, start=1):
        assert "HP-2611-07" in text and f"Page {i} of {len(texts)}" in text
        assert "advisory" in text.lower()


def test_release_sheet_from_the_record(store, tmp_path, capsys):
    db, record = store
    out = tmp_path / "release.pdf"
    assert run(capsys, "--db", db, "sheet", "release", "HP-2611-07", "-o", out)[0] == 0
    text = normal(" ".join(page_texts(out.read_bytes())))
    assert record["draw"]["seed"] in text
    assert f"20 of {fmt.units(15552)}" in text
    assert "Accept" in text and "release" in text
    assert record["record_hash"] in text
    assert "山田 花子" in text and "Zoë Ødegård" in text
    bad = [r for r in record["results"] if r["outcome"] == "fail" and r["current"]]
    section = text.split("Nonconforming units", 1)[1].split("Corrections", 1)[0]
    for r in bad:
        assert re.search(rf"(?<![\d]){r['unit']}(?![\d])", section)
    # the stratification level is named, so the line re-derives the draw as printed
    assert "inspector draw --structure pallet=18,layer=4,carton=9,jar=24 --lot-size 15552 --sample 20 " \
           "--method stratified --by pallet --seed 4242" in text


def test_pick_list_codes_are_the_drawn_units(store, tmp_path, capsys):
    db, record = store
    out = tmp_path / "pick.pdf"
    assert run(capsys, "--db", db, "sheet", "pick", "HP-2611-07", "-o", out)[0] == 0
    codes = [parse_unit_code(decode128(w)) for page in symbols_in(out.read_bytes()) for w in page]
    assert {c.lot_id for c in codes} == {"HP-2611-07"}
    assert sorted(c.unit for c in codes) == record["sample_units"]


def test_a_lot_that_is_not_critical_has_no_caution(store, tmp_path, capsys):
    db, _ = store
    out = tmp_path / "release.pdf"
    assert run(capsys, "--db", db, "sheet", "release", "HP-2611-08", "-o", out)[0] == 0
    text = " ".join(page_texts(out.read_bytes()))
    assert "advisory" not in text.lower()
    assert "Reject" in text


def test_json_reports_file_and_pages(store, tmp_path, capsys):
    db, _ = store
    out = tmp_path / "bench.pdf"
    code, stdout, _ = run(capsys, "--db", db, "sheet", "bench", "HP-2611-07", "-o", out, "--json")
    assert code == 0
    payload = json.loads(stdout)
    assert payload["lot"] == "HP-2611-07" and payload["file"] == str(out)
    assert payload["pages"] == len(page_texts(out.read_bytes()))


def test_a_site_forms_folder_is_used(store, tmp_path, capsys):
    db, _ = store
    forms = tmp_path / "forms"
    shutil.copytree(REPO_FORMS, forms)
    text = (forms / "site.toml").read_text(encoding="utf-8")
    (forms / "site.toml").write_text(text.replace("Ravensholt Cold Store", "Quarrybank Dairy Hub"), encoding="utf-8")
    out = tmp_path / "pick.pdf"
    assert run(capsys, "--db", db, "sheet", "pick", "HP-2611-07", "-o", out, "--forms", forms)[0] == 0
    assert "Quarrybank Dairy Hub" in page_texts(out.read_bytes())[0]


def one_line_error(capsys, *argv) -> str:
    code, stdout, err = run(capsys, *argv)
    assert code == 2
    assert stdout == ""
    assert err.count("\n") == 1 and err.startswith("inspector: ") and "Traceback" not in err
    return err


def test_a_broken_form_is_one_line_naming_file_and_key_and_writes_nothing(store, tmp_path, capsys):
    db, _ = store
    forms = tmp_path / "forms"
    shutil.copytree(REPO_FORMS, forms)
    path = forms / "release.toml"
    path.write_text(path.read_text(encoding="utf-8").replace('field = "pa_at_aql"', 'field = "pa_aql"'),
                    encoding="utf-8")
    out = tmp_path / "release.pdf"
    err = one_line_error(capsys, "--db", db, "sheet", "release", "HP-2611-07", "-o", out, "--forms", forms)
    assert str(path) in err and "section[3].columns[7].field" in err and "'pa_aql'" in err
    assert not out.exists()


def test_an_unknown_lot_is_one_line(store, tmp_path, capsys):
    db, _ = store
    out = tmp_path / "x.pdf"
    err = one_line_error(capsys, "--db", db, "sheet", "pick", "HP-0000-00", "-o", out)
    assert "HP-0000-00" in err
    assert not out.exists()


def test_a_lot_without_a_draw_has_no_pick_list(store, tmp_path, capsys):
    db, _ = store
    out = tmp_path / "x.pdf"
    err = one_line_error(capsys, "--db", db, "sheet", "labels", "HP-2611-09", "-o", out)
    assert "no sample drawn yet" in err
    assert not out.exists()


@pytest.mark.parametrize(
    "args, needle",
    [
        (["--forms", "/nonexistent/forms"], "--forms: no such folder"),
        (["-o", "/nonexistent/dir/x.pdf"], "--output: the folder"),
    ],
)
def test_bad_paths_are_one_line(store, tmp_path, capsys, args, needle):
    db, _ = store
    argv = ["--db", db, "sheet", "pick", "HP-2611-07"]
    if "-o" not in args:
        argv += ["-o", tmp_path / "x.pdf"]
    err = one_line_error(capsys, *argv, *args)
    assert needle in err


def test_an_unknown_sheet_is_one_line(store, tmp_path, capsys):
    db, _ = store
    err = one_line_error(capsys, "--db", db, "sheet", "invoice", "HP-2611-07", "-o", tmp_path / "x.pdf")
    assert "invoice" in err


def test_the_printed_draw_command_re_derives_the_drawn_units(store, capsys):
    import shlex

    from inspector.sheets.build import sheet_model_for_lot

    db, record = store
    with build_services(str(db), environ={}) as s:
        data = sheet_model_for_lot(s.workflow, "HP-2611-07")
    argv = shlex.split(data.draw.command)
    assert argv[:2] == ["inspector", "draw"]
    code, stdout, err = run(capsys, *argv[1:], "--json")
    assert code == 0, err
    assert json.loads(stdout)["units"] == record["draw"]["units"]


def test_corrections_come_from_the_record_with_was_now_and_reason(store, tmp_path, capsys):
    from inspector.sheets.build import sheet_model_for_lot

    db, record = store
    with build_services(str(db), environ={}) as s:
        data = sheet_model_for_lot(s.workflow, "HP-2611-07")
    (k,) = data.corrections
    assert (k.was, k.now) == ("fail (chipped rim)", "fail (chipped rim, 2 mm chip at the seam)")
    assert k.reason == "measured under the bench lamp" and k.by == "Zoë Ødegård"
    out = tmp_path / "release.pdf"
    assert run(capsys, "--db", db, "sheet", "release", "HP-2611-07", "-o", out)[0] == 0
    text = normal(" ".join(page_texts(out.read_bytes())))
    assert "measured under the bench lamp" in text.split("Corrections", 1)[1]
    # the model holds the effective results only: the corrected entry is not listed twice
    assert sum(1 for r in data.results if r.unit == k.unit) == 1


def test_a_table_plan_shows_its_source_and_its_own_rql(tmp_path, capsys):
    from inspector.sheets.build import sheet_model_for_lot
    from inspector.stats import plans

    db = tmp_path / "t.db"
    with build_services(str(db), environ={}, clock=Clock()) as s:
        s.workflow.register_lot(lot_id="HP-2611-10", supplier="Harrowgate Preserves",
                                product="apricot jam 370 g jar", size=2000)
        s.workflow.plan("HP-2611-10", aql="1.0", level="II")
        data = sheet_model_for_lot(s.workflow, "HP-2611-10")
    (p,) = data.plans
    assert p.source == "table" and "code letter" in p.source_text and "level II" in p.source_text
    assert p.rql_own and p.rql_defectives == plans.rql_lot(2000, p.sample_size, p.acceptance, 0.10)
    assert [o.result for o in data.outcomes] == ["open"]  # nothing drawn, nothing decided
    out = tmp_path / "release.pdf"
    assert run(capsys, "--db", db, "sheet", "release", "HP-2611-10", "-o", out)[0] == 0
    text = normal(" ".join(page_texts(out.read_bytes())))
    assert "code letter" in text and "the RQL shown is the plan's own" in text
