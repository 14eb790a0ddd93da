"""`inspector draw`: the command-line contract."""

from __future__ import annotations

import ast
import json
import subprocess
import sys
from pathlib import Path

import pytest

from inspector import frame
from inspector.cli import main

NESTED = "pallet=18,layer=4,carton=9,unit=24"
CONTAINERS_CSV = "container,units\nHP-P01,240\nHP-P02,216\nHP-P03,96\nHP-P04,240\nHP-P05,180\nHP-P06,60\n"
SERIALS_CSV = "serial,container\n" + "".join(f"AJ-{i:04d},HP-C{1 + i % 3}\n" for i in range(1, 61))


def run_json(capsys, *argv):
    status = main(["draw", *argv, "--json"])
    out, err = capsys.readouterr()
    lines = out.strip().splitlines()
    assert len(lines) == 1, out  # exactly one JSON object
    return status, json.loads(lines[0]), err


@pytest.fixture
def manifests(tmp_path):
    (tmp_path / "containers.csv").write_text(CONTAINERS_CSV)
    (tmp_path / "serials.csv").write_text(SERIALS_CSV)
    return tmp_path


def test_flat_lot_draw_as_json(capsys):
    status, out, err = run_json(capsys, "--lot-size", "2000", "--sample", "32", "--seed", "20240611")
    assert status == 0 and err == ""
    assert out["units"] == sorted(out["units"]) and len(set(out["units"])) == 32
    assert out["addresses"] == [f"unit {u}" for u in out["units"]]
    assert out["seed"] == 20240611 and out["seed_generated"] is False
    assert out["method"] == "simple" and out["algorithm"] == "srswor-v1"
    assert out["lot_size"] == 2000 and out["sample_size"] == 32
    assert list(frame.draw(frame.flat_lot(2000), 32, seed=20240611).units) == out["units"]


def test_structured_lot_gives_addresses_and_walking_order(capsys):
    status, out, _ = run_json(capsys, "--structure", NESTED, "--sample", "50", "--seed", "3")
    lot = frame.parse_structure(NESTED)
    assert status == 0
    assert out["addresses"] == [str(lot.address_of(u)) for u in out["units"]]
    walked = [u for stop in out["walking_order"] for u in stop["units"]]
    assert walked == out["units"]
    assert sum(stop["count"] for stop in out["walking_order"]) == 50
    assert out["structure"] == NESTED


def test_seed_is_echoed_exactly_as_typed(capsys):
    _, out, _ = run_json(capsys, "--lot-size", "500", "--sample", "5", "--seed", "007")
    assert out["seed"] == "007"
    _, again, _ = run_json(capsys, "--lot-size", "500", "--sample", "5", "--seed", "7")
    assert again["seed"] == 7 and again["units"] == out["units"]


def test_a_generated_seed_is_reported_and_re_derives_the_draw(capsys):
    _, out, _ = run_json(capsys, "--structure", NESTED, "--sample", "20")
    assert out["seed_generated"] is True and isinstance(out["seed"], int)
    _, again, _ = run_json(capsys, "--structure", NESTED, "--sample", "20", "--seed", str(out["seed"]))
    assert again["units"] == out["units"]


def test_two_stage_lists_the_containers_to_open(capsys, manifests):
    status, out, _ = run_json(
        capsys, "--manifest", str(manifests / "containers.csv"), "--sample", "30",
        "--method", "two-stage", "--containers", "3", "--seed", "11",
    )
    assert status == 0 and out["per_container"] == 10 and len(out["containers"]) == 3
    opened = {c["container"] for c in out["containers"]}
    assert {a.rsplit(" / ", 1)[0] for a in out["addresses"]} == opened
    assert "less precise" in out["note"]


def test_with_replacement_is_labelled_in_json_and_text(capsys):
    _, out, _ = run_json(capsys, "--lot-size", "5", "--sample", "9", "--method", "with-replacement", "--seed", "2")
    assert "non-destructive re-checks only" in out["note"]
    assert "non-destructive re-checks only" in out["method_title"]
    assert len(out["units"]) == 9 and out["units"] == sorted(out["units"])
    assert main(["draw", "--lot-size", "5", "--sample", "9", "--method", "with-replacement", "--seed", "2"]) == 0
    assert capsys.readouterr().out.count("non-destructive re-checks only") >= 2


def test_serial_manifest_reports_serials(capsys, manifests):
    _, out, _ = run_json(capsys, "--manifest", str(manifests / "serials.csv"), "--sample", "6", "--seed", "5",
                         "--method", "stratified")
    lot = frame.manifest_from_csv_text(SERIALS_CSV)
    assert out["serials"] == [lot.address_of(u).serial for u in out["units"]]
    assert out["level"] == "container"


def test_text_output_is_a_pick_list(capsys):
    assert main(["draw", "--structure", NESTED, "--sample", "4", "--seed", "42"]) == 0
    out = capsys.readouterr().out
    assert "Pick list in walking order" in out and "seed 42" in out
    assert "pallet " in out and "srswor-v1" in out


def test_verify_exits_0_when_the_list_matches(capsys):
    _, out, _ = run_json(capsys, "--lot-size", "2000", "--sample", "5", "--seed", "7")
    listed = ",".join(str(u) for u in reversed(out["units"]))
    status, checked, _ = run_json(capsys, "--lot-size", "2000", "--sample", "5", "--seed", "7", "--verify", listed)
    assert status == 0 and checked["verify"]["matches"] is True
    assert main(["draw", "--lot-size", "2000", "--sample", "5", "--seed", "7", "--verify", listed]) == 0
    assert "match the re-derived draw" in capsys.readouterr().out


def test_verify_exits_1_with_the_difference(capsys):
    _, out, _ = run_json(capsys, "--lot-size", "2000", "--sample", "3", "--seed", "7")
    wrong = [out["units"][0], out["units"][1], 1 if out["units"][2] != 1 else 2]
    status, checked, err = run_json(
        capsys, "--lot-size", "2000", "--sample", "3", "--seed", "7", "--verify", ",".join(map(str, wrong))
    )
    assert status == 1 and err == ""
    assert checked["verify"]["matches"] is False
    assert checked["verify"]["listed_not_drawn"] == [wrong[2]]
    assert checked["verify"]["drawn_not_listed"] == [out["units"][2]]
    assert main(["draw", "--lot-size", "2000", "--sample", "3", "--seed", "7", "--verify", "3,8,10"]) == 1
    text = capsys.readouterr().out
    assert "DIFFERENT" in text and "3, 8, 10" in text


@pytest.mark.parametrize(
    "argv, needles",
    [
        (["--sample", "5"], ["--lot-size/--structure/--manifest"]),
        (["--lot-size", "100"], ["--sample"]),
        (["--lot-size", "0", "--sample", "5"], ["--lot-size", "'0'"]),
        (["--lot-size", "abc", "--sample", "5"], ["--lot-size", "'abc'"]),
        (["--lot-size", "10", "--sample", "50"], ["--sample", "50", "10 units"]),
        (["--lot-size", "10", "--sample", "-1"], ["--sample", "'-1'"]),
        (["--structure", "pallet=0,unit=4", "--sample", "1"], ["--structure", "'pallet'", "got 0"]),
        (["--structure", "pallet=two,unit=4", "--sample", "1"], ["--structure", "'pallet=two'"]),
        (["--structure", "pallet=2,unit=4", "--lot-size", "9", "--sample", "1"], ["--lot-size", "9"]),
        (["--structure", NESTED, "--sample", "5", "--method", "stratified", "--by", "crate"], ["--by", "'crate'"]),
        (["--structure", NESTED, "--sample", "5", "--by", "pallet"], ["--by", "stratified"]),
        (["--structure", NESTED, "--sample", "5", "--containers", "2"], ["--containers", "two-stage"]),
        (["--structure", NESTED, "--sample", "5", "--method", "two-stage"], ["--containers", "number of containers"]),
        (["--structure", NESTED, "--sample", "7", "--method", "two-stage", "--containers", "2"], ["--containers", "7"]),
        (["--structure", NESTED, "--sample", "50", "--method", "two-stage", "--containers", "2"],
         ["--containers", "fewer than the 25"]),
        (["--lot-size", "100", "--sample", "5", "--method", "stratified"], ["--method", "flat count"]),
        (["--lot-size", "100", "--sample", "5", "--method", "lottery"], ["--method", "'lottery'"]),
        (["--lot-size", "100", "--sample", "5", "--seed", "x1"], ["--seed", "'x1'"]),
        (["--lot-size", "100", "--sample", "5", "--seed", "-4"], ["--seed", "'-4'"]),
        (["--lot-size", "100", "--sample", "5", "--seed", str(2**128)], ["--seed"]),
        (["--lot-size", "100", "--sample", "5", "--verify", "3,8"], ["--verify", "--seed"]),
        (["--lot-size", "100", "--sample", "5", "--seed", "1", "--verify", "3,x"], ["--verify", "'3,x'"]),
        (["--lot-size", "100", "--sample", "2", "--seed", "1", "--verify", "3,101"], ["--verify", "101"]),
        (["--manifest", "no-such-file.csv", "--sample", "2"], ["--manifest", "'no-such-file.csv'"]),
    ],
)
def test_bad_input_gives_one_line_naming_the_argument_and_exit_2(capsys, argv, needles):
    status = main(["draw", *argv])
    out, err = capsys.readouterr()
    assert status == 2
    assert out == ""
    lines = err.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("inspector: ")
    for needle in needles:
        assert needle in lines[0]
    assert "Traceback" not in err


@pytest.mark.parametrize(
    "content, needles",
    [
        ("", ["--manifest", "empty"]),
        ("container,units\nHP-P01,240\nHP-P01,10\n", ["--manifest", "line 3", "'HP-P01'"]),
        ("container,units\nHP-P01,many\n", ["--manifest", "line 2", "'many'"]),
        ("serial,container\nAJ-1,HP-C1\nAJ-1,HP-C2\n", ["--manifest", "'AJ-1'"]),
        (b"container,units\n\xff\xfe,3\n", ["--manifest", "not UTF-8"]),
    ],
)
def test_bad_manifest_files_give_one_line_and_exit_2(capsys, tmp_path, content, needles):
    path = tmp_path / "lot.csv"
    path.write_bytes(content if isinstance(content, bytes) else content.encode())
    status = main(["draw", "--manifest", str(path), "--sample", "2"])
    out, err = capsys.readouterr()
    assert status == 2 and out == "" and len(err.strip().splitlines()) == 1
    for needle in needles:
        assert needle in err


def test_manifest_with_a_wrong_declared_lot_size_is_refused(capsys, manifests):
    status = main(["draw", "--manifest", str(manifests / "containers.csv"), "--lot-size", "1000", "--sample", "2"])
    assert status == 2
    assert "--lot-size: the manifest structure holds 1032 units but the declared lot size is 1000" in capsys.readouterr().err


def test_console_command_runs_in_a_real_process():
    exe = Path(sys.executable).with_name("inspector")
    assert exe.exists(), "the console script is installed with the package"
    done = subprocess.run(
        [str(exe), "draw", "--structure", NESTED, "--sample", "12", "--method", "stratified", "--seed", "99", "--json"],
        capture_output=True, text=True, timeout=60,
    )
    assert done.returncode == 0, done.stderr
    out = json.loads(done.stdout)
    expected = frame.draw(frame.parse_structure(NESTED), 12, method="stratified", seed=99)
    assert out["units"] == list(expected.units) and out["algorithm"] == "stratified-v1"
    bad = subprocess.run([str(exe), "draw", "--lot-size", "10", "--sample", "11"], capture_output=True, text=True,
                         timeout=60)
    assert bad.returncode == 2 and bad.stderr.count("\n") == 1 and "--sample" in bad.stderr


def test_the_command_module_is_cheap_to_import():
    code = "import sys, inspector.cli.draw; print('numpy' in sys.modules, 'inspector.frame' in sys.modules)"
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=60)
    assert done.stdout.split() == ["False", "False"]


# --- the frame stays pure -----------------------------------------------------------------

ALLOWED_IMPORTS = {
    "__future__", "bisect", "collections", "csv", "dataclasses", "functools", "hashlib", "io",
    "itertools", "json", "re", "typing", "numpy", "inspector.frame", "inspector.stats",
}


def test_frame_imports_nothing_that_does_io_or_reads_the_clock():
    package = Path(frame.__file__).parent
    for source in package.glob("*.py"):
        tree = ast.parse(source.read_text())
        for node in ast.walk(tree):
            if isinstance(node, ast.Call) and getattr(node.func, "id", None) in ("open", "input", "print"):
                pytest.fail(f"{source.name} calls {node.func.id}()")
            if isinstance(node, ast.Import):
                names = [alias.name for alias in node.names]
            elif isinstance(node, ast.ImportFrom):
                names = [node.module or ""]
            else:
                continue
            for name in names:
                assert any(name == ok or name.startswith(ok + ".") for ok in ALLOWED_IMPORTS), (source.name, name)


def test_importing_the_frame_loads_no_store_or_screen_library():
    code = (
        "import sys, inspector.frame; "
        "print(sorted(m for m in ('sqlite3', 'textual', 'reportlab', 'secrets') if m in sys.modules))"
    )
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=60)
    assert done.stdout.strip() == "[]", done.stderr
