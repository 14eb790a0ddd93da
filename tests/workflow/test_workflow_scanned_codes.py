"""A unit code scanned from the lot's labels names a unit like its number,
address or serial; a code from another lot is refused and nothing is written."""

from __future__ import annotations

import pytest

from inspector.services import build_services
from inspector.sheets.codes import unit_code
from inspector.workflow import WorkflowError


@pytest.fixture
def lot(tmp_path):
    with build_services(str(tmp_path / "codes.db"), environ={}) as s:
        wf = s.workflow
        wf.add_person(name="Ines Marlowe", role="inspector", secret="kestrel-0417")
        wf.register_lot(lot_id="HP-2612-11", supplier="Harrowgate Preserves", product="apricot jam 370 g jar",
                        size=864, structure="pallet=2,carton=18,jar=24")
        wf.plan("HP-2612-11", sample=13, accept=1)
        units = wf.draw("HP-2612-11", seed=3)["units"]
        yield wf, units


def test_a_scanned_code_records_that_unit_and_keeps_what_was_scanned(lot):
    wf, units = lot
    code = unit_code("HP-2612-11", units[0])
    found = wf.resolve_unit("HP-2612-11", code)
    assert (found.unit, found.how) == (units[0], "code")
    out = wf.record("HP-2612-11", code, outcome="pass", by="Ines Marlowe")
    assert out.unit == units[0]
    (entry,) = wf.show("HP-2612-11")["results"]
    assert entry["unit"] == units[0] and entry["entered_as"] == code


def test_numbers_addresses_and_codes_name_the_same_unit(lot):
    wf, units = lot
    address = wf.resolve_unit("HP-2612-11", units[1]).address
    assert wf.resolve_unit("HP-2612-11", address).unit == units[1]
    assert wf.resolve_unit("HP-2612-11", unit_code("HP-2612-11", units[1])).how == "code"


def test_a_code_from_another_lot_is_refused_and_nothing_is_written(lot):
    wf, units = lot
    foreign = unit_code("HP-2612-12", units[0])
    with pytest.raises(WorkflowError, match="belongs to lot HP-2612-12"):
        wf.record("HP-2612-11", foreign, outcome="pass", by="Ines Marlowe")
    with pytest.raises(WorkflowError, match="unit"):
        wf.resolve_unit("HP-2612-11", "HP-2612-11:99999")
    assert wf.show("HP-2612-11")["results"] == []
