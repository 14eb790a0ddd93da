"""`inspector plan design|oc|zero` and `inspector estimate` from the command line."""

from __future__ import annotations

import json
import subprocess
import sys

import pytest
from scipy import stats as sps

from inspector.cli import main


def run_json(capsys, *argv):
    code = main([*argv, "--json"])
    out, err = capsys.readouterr()
    assert code == 0, err
    lines = out.strip().splitlines()
    assert len(lines) == 1  # exactly one JSON object
    return json.loads(lines[0])


def test_plan_design_prints_the_contract_keys(capsys):
    data = run_json(capsys, "plan", "design", "--lot-size", "2000", "--aql", "1.5", "--rql", "10")
    for key in ("sample_size", "acceptance_number", "rejection_number", "full_inspection",
                "pa_at_aql", "pa_at_rql", "aoql", "model"):
        assert key in data
    assert data["model"] == "lot"
    assert data["rejection_number"] == data["acceptance_number"] + 1
    assert data["full_inspection"] is False
    # Pa at the quality levels, checked against scipy.stats.hypergeom
    n, c = data["sample_size"], data["acceptance_number"]
    assert data["pa_at_aql"] == pytest.approx(sps.hypergeom.cdf(c, 2000, 30, n), rel=1e-10)
    assert data["pa_at_rql"] == pytest.approx(sps.hypergeom.cdf(c, 2000, 200, n), rel=1e-10)
    assert 0 <= data["aoql"] <= 1


def test_plan_design_full_inspection_when_no_smaller_plan_exists(capsys):
    data = run_json(capsys, "plan", "design", "--lot-size", "10", "--aql", "10", "--rql", "20")
    assert data["full_inspection"] is True and data["sample_size"] == 10


def test_plan_design_process_model(capsys):
    data = run_json(capsys, "plan", "design", "--lot-size", "10000", "--aql", "1.5", "--rql", "10", "--model", "process")
    assert (data["sample_size"], data["acceptance_number"], data["model"]) == (52, 2, "process")


def test_plan_oc_single_points(capsys):
    data = run_json(capsys, "plan", "oc", "--lot-size", "2000", "--sample", "50", "--accept", "2",
                    "--defectives", "0,40,160")
    assert [p["defectives"] for p in data["points"]] == [0, 40, 160]
    p160 = data["points"][2]
    assert set(p160) >= {"defectives", "fraction", "pa", "aoq", "ati"}
    assert p160["fraction"] == 0.08
    # micquality.com: about 23 %; exact lot model 0.22235 (computed)
    assert p160["pa"] == pytest.approx(0.222348, abs=1e-6)
    assert data["points"][0]["pa"] == 1.0
    assert "aoql" in data


def test_plan_oc_double_adds_asn(capsys):
    data = run_json(capsys, "plan", "oc", "--lot-size", "2000", "--sample", "50", "--accept", "2",
                    "--reject", "5", "--sample2", "100", "--accept2", "6", "--defectives", "0,60,120")
    assert all("asn" in p for p in data["points"])
    assert data["points"][0]["asn"] == 50.0


def test_plan_zero(capsys):
    # reference-values.md §4 (computed, exact lot model): N = 1000 -> 57
    assert run_json(capsys, "plan", "zero", "--lot-size", "1000", "--rql", "5", "--confidence", "0.95")["sample_size"] == 57


def test_estimate_contract_keys_and_reference_interval(capsys):
    # reference-values.md §3: N = 10,000, n = 200, x = 5 -> [83, 570] (computed)
    data = run_json(capsys, "estimate", "--lot-size", "10000", "--sample", "200", "--found", "5",
                    "--aql", "1", "--rql", "5")
    assert (data["lower_defectives"], data["upper_defectives"]) == (83, 570)
    assert data["point_defectives"] == 250
    for key in ("upper_bound_defectives", "lower_fraction", "upper_fraction", "upper_bound_fraction",
                "p_value_at_aql", "p_value_at_rql"):
        assert key in data
    assert data["upper_fraction"] == 0.057
    assert 0 <= data["p_value_at_aql"] <= 1 and 0 <= data["p_value_at_rql"] <= 1


def test_text_output_is_a_readable_table(capsys):
    assert main(["plan", "design", "--lot-size", "2000", "--aql", "1.5", "--rql", "10"]) == 0
    out = capsys.readouterr().out
    assert "sample size n" in out and "52" in out


@pytest.mark.parametrize(
    "argv, names",
    [
        (["plan", "design", "--lot-size", "100", "--aql", "5", "--rql", "2"], "--aql"),
        (["plan", "design", "--lot-size", "abc", "--aql", "1", "--rql", "2"], "--lot-size"),
        (["plan", "design", "--lot-size", "0", "--aql", "1", "--rql", "2"], "--lot-size"),
        (["plan", "design", "--lot-size", "-5", "--aql", "1", "--rql", "2"], "--lot-size"),
        (["plan", "design", "--lot-size", "100", "--aql", "1", "--rql", "2", "--consumer-risk", "1"], "--consumer-risk"),
        (["plan", "design", "--lot-size", "100", "--aql", "1", "--rql", "2", "--producer-risk", "0"], "--producer-risk"),
        (["plan", "design", "--lot-size", "100", "--aql", "x", "--rql", "2"], "--aql"),
        (["plan", "oc", "--lot-size", "100", "--sample", "200", "--accept", "1"], "--sample"),
        (["plan", "oc", "--lot-size", "100", "--sample", "20", "--accept", "20"], "--accept"),
        (["plan", "oc", "--lot-size", "100", "--sample", "20", "--accept", "1", "--defectives", "5,101"], "--defectives"),
        (["plan", "oc", "--lot-size", "100", "--sample", "20", "--accept", "1", "--reject", "3"], "--sample2"),
        (["plan", "zero", "--lot-size", "100", "--rql", "150"], "--rql"),
        (["estimate", "--lot-size", "100", "--sample", "500", "--found", "1"], "--sample"),
        (["estimate", "--lot-size", "100", "--sample", "50", "--found", "51"], "--found"),
        (["estimate", "--lot-size", "100", "--sample", "50", "--found", "1", "--aql", "1"], "--rql"),
        (["plan", "design", "--lot-size", "100", "--aql", "1", "--rql", "2", "--frobnicate"], "--frobnicate"),
    ],
)
def test_bad_input_is_one_line_naming_the_argument_and_exit_2(capsys, argv, names):
    assert main(argv) == 2
    out, err = capsys.readouterr()
    assert out == ""
    lines = err.strip().splitlines()
    assert len(lines) == 1 and names in lines[0] and "Traceback" not in err


def test_main_is_cheap_to_call_repeatedly(capsys):
    for _ in range(20):
        assert main(["estimate", "--lot-size", "500", "--sample", "50", "--found", "1", "--json"]) == 0
    assert len(capsys.readouterr().out.strip().splitlines()) == 20


def test_console_command_runs_in_a_real_process():
    proc = subprocess.run(
        [sys.executable, "-m", "inspector", "plan", "design", "--lot-size", "5000", "--aql", "1", "--rql", "5", "--json"],
        capture_output=True, text=True, timeout=60,
    )
    assert proc.returncode == 0, proc.stderr
    data = json.loads(proc.stdout)
    assert data["sample_size"] > 0
    bad = subprocess.run([sys.executable, "-m", "inspector", "plan", "design", "--lot-size", "x"],
                         capture_output=True, text=True, timeout=60)
    assert bad.returncode == 2 and "Traceback" not in bad.stderr and bad.stderr.count("\n") == 1
