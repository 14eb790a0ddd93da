"""`inspector plan table`: the code-letter route on the command line."""

from __future__ import annotations

import json

import pytest

from inspector.cli import main

REQUIRED_KEYS = {
    "code_letter", "sample_size", "acceptance_number", "rejection_number", "full_inspection",
    "pa_at_aql_lot", "pa_at_aql_process", "rql_at_consumer_risk_lot", "rql_at_consumer_risk_process",
    "notes",
}


def run_json(capsys, *argv):
    status = main(["plan", "table", *argv, "--json"])
    out, err = capsys.readouterr()
    assert status == 0, err
    assert err == ""
    return json.loads(out)


def test_json_has_the_contracted_keys(capsys):
    # Lot of 5000 at level II, AQL 1.5 -> L, n = 200, 7/8: worked lookups on
    # cgfinspections.com and apparelscience.com (reference-values 5c).
    data = run_json(capsys, "--lot-size", "5000", "--aql", "1.5")
    assert REQUIRED_KEYS <= set(data)
    assert (data["code_letter"], data["sample_size"], data["acceptance_number"], data["rejection_number"]) == ("L", 200, 7, 8)
    assert data["full_inspection"] is False
    assert data["level"] == "II" and data["severity"] == "normal" and data["lot_size"] == 5000
    assert data["provenance"] == "confirmed"
    for key in ("pa_at_aql_lot", "pa_at_aql_process", "rql_at_consumer_risk_lot", "rql_at_consumer_risk_process"):
        assert 0 <= data[key] <= 1
    assert isinstance(data["notes"], list) and all(isinstance(n, str) for n in data["notes"])


def test_json_risks_agree_with_scipy(capsys):
    from scipy.stats import binom, hypergeom

    data = run_json(capsys, "--lot-size", "1000", "--aql", "0.65")  # J/0.65 = 1/2, n = 80 (Birolini)
    # scipy.stats.hypergeom / binom as reference; D1 = floor(1000 x 0.65 / 100) = 6.
    assert data["pa_at_aql_lot"] == pytest.approx(hypergeom.cdf(1, 1000, 6, 80), rel=1e-9)
    assert data["pa_at_aql_process"] == pytest.approx(binom.cdf(1, 80, 0.0065), rel=1e-9)


def test_arrow_and_full_inspection_are_noted(capsys):
    data = run_json(capsys, "--lot-size", "5", "--aql", "1")
    assert data["full_inspection"] is True and data["sample_size"] == 5
    assert data["table_sample_size"] == 13 and data["plan_letter"] == "E"
    assert any("arrow" in note for note in data["notes"])
    assert any("100 %" in note for note in data["notes"])
    assert data["pa_at_aql_lot"] == 1.0


def test_tightened_and_level_options(capsys):
    data = run_json(capsys, "--lot-size", "1000", "--aql", "1.0", "--severity", "tightened")
    assert (data["code_letter"], data["acceptance_number"], data["severity"]) == ("J", 1, "tightened")
    data = run_json(capsys, "--lot-size", "1000", "--aql", "1.0", "--level", "s3")
    assert data["level"] == "S-3" and data["code_letter"] == "E"


def test_inferred_cells_are_reported_as_inferred(capsys):
    data = run_json(capsys, "--lot-size", "50000", "--aql", "1.0", "--severity", "tightened")
    assert data["provenance"] == "inferred"
    assert any("inferred" in note for note in data["notes"])


def test_aql_above_ten_gives_null_risks_with_a_note(capsys):
    data = run_json(capsys, "--lot-size", "100", "--aql", "25")
    assert data["pa_at_aql_lot"] is None and data["rql_at_consumer_risk_process"] is None
    assert any("defects per hundred units" in note for note in data["notes"])


def test_text_output_is_a_readable_table(capsys):
    assert main(["plan", "table", "--lot-size", "5000", "--aql", "1.5"]) == 0
    out = capsys.readouterr().out
    assert "code letter" in out and "L" in out
    assert "this lot (exact)" in out and "process" in out
    assert "advisory" in out


@pytest.mark.parametrize(
    "argv,argument,value",
    [
        (["--lot-size", "1", "--aql", "1.0"], "--lot-size", "'1'"),
        (["--lot-size", "abc", "--aql", "1.0"], "--lot-size", "'abc'"),
        (["--lot-size", "100", "--aql", "0.5"], "--aql", "0.5"),
        (["--lot-size", "100", "--aql", "x"], "--aql", "'x'"),
        (["--lot-size", "100", "--aql", "1.0", "--level", "IV"], "--level", "'IV'"),
        (["--lot-size", "100", "--aql", "1.0", "--severity", "reduced"], "--severity", "'reduced'"),
        (["--lot-size", "5", "--aql", "10"], "--aql", "AQL 10"),  # A/10: ^ off the table
        (["--lot-size", "600000", "--aql", "0.015", "--level", "III"], "--aql", "AQL 0.015"),  # R/0.015: v off the table
    ],
)
def test_bad_input_is_one_line_naming_the_argument_with_status_2(capsys, argv, argument, value):
    status = main(["plan", "table", *argv, "--json"])
    out, err = capsys.readouterr()
    assert status == 2
    assert out == ""
    lines = err.strip().splitlines()
    assert len(lines) == 1 and "Traceback" not in err
    assert argument in lines[0] and value in lines[0]
