"""The draw command printed on the sheets re-derives draws by any method,
including a chosen level and a two-stage draw (level and containers)."""

from __future__ import annotations

import json
import shlex

import pytest

from inspector.cli import main
from inspector.services import build_services
from inspector.sheets.build import sheet_model_for_lot


@pytest.mark.parametrize(
    "method, options",
    [
        ("stratified", {"level": "layer"}),
        ("two-stage", {"containers": 4}),
        ("two-stage", {"containers": 2, "level": "pallet"}),
    ],
)
def test_printed_command_re_derives_the_recorded_units(tmp_path, capsys, method, options):
    db = tmp_path / "r.db"
    with build_services(str(db), environ={}) as s:
        wf = s.workflow
        wf.register_lot(lot_id="HP-2612-03", supplier="Harrowgate Preserves", product="apricot jam 370 g jar",
                        size=15552, structure="pallet=18,layer=4,carton=9,jar=24")
        wf.plan("HP-2612-03", sample=24, accept=1)
        units = wf.draw("HP-2612-03", method=method, seed=90210, **options)["units"]
        data = sheet_model_for_lot(wf, "HP-2612-03")
    argv = shlex.split(data.draw.command)
    assert argv[:2] == ["inspector", "draw"]
    assert main([*argv[1:], "--json"]) == 0
    out = json.loads(capsys.readouterr().out)
    assert out["units"] == sorted(units)
