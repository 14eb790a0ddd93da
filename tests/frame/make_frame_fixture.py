"""Write the stored reproducibility fixture for the frame's draws.

Run once per new algorithm id:

    .venv/bin/python tests/frame/make_frame_fixture.py

Cases already in ``fixtures/frame_draws.json`` are never rewritten: if the
code now gives a different result for a stored case the script stops with
an error (that is a broken release, not a fixture to refresh). New cases
are appended. The data are an invented scenario (Harrowgate Preserves,
jars of apricot jam).
"""

from __future__ import annotations

import json
import sys
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE.parents[1]))

from inspector import frame  # noqa: E402

FIXTURE = HERE / "fixtures" / "frame_draws.json"

NESTED = "pallet=18,layer=4,carton=9,unit=24"
HUGE = "pallet=1000,layer=10,carton=100,unit=1000"  # 10^9 jars
CONTAINERS_CSV = "container,units\nHP-P01,240\nHP-P02,216\nHP-P03,96\nHP-P04,240\nHP-P05,180\nHP-P06,60\n"
# unit rows, containers interleaved on purpose: numbering groups them
SERIALS_CSV = "serial,container\n" + "".join(
    f"AJ-{i:05d},{('HP-C1', 'HP-C2', 'HP-C3')[i % 3] if i <= 42 else 'HP-C1'}\n" for i in range(1, 49)
)


def structures() -> dict[str, str]:
    """Structure name -> text form (what a record would store)."""
    return {
        "flat-2000": frame.flat_lot(2000).to_text(),
        "nested-15552": frame.parse_structure(NESTED).to_text(),
        "nested-1e9": frame.parse_structure(HUGE).to_text(),
        "manifest-containers": frame.manifest_from_csv_text(CONTAINERS_CSV).to_text(),
        "manifest-serials": frame.manifest_from_csv_text(SERIALS_CSV).to_text(),
    }


def cases() -> list[dict]:
    """Inputs for every method and algorithm id, a few seeds each."""
    out = []

    def add(structure, algorithm, n, seed, by=None, containers=None, substitutes=5):
        method = frame.ALGORITHMS[algorithm]
        case_id = f"{algorithm}/{structure}/n{n}/seed{seed}" + (f"/by-{by}" if by else "") + (
            f"/k{containers}" if containers else ""
        )
        out.append(
            dict(
                id=case_id,
                structure=structure,
                algorithm=algorithm,
                method=method,
                n=n,
                seed=seed,
                by=by,
                containers=containers,
                substitutes=substitutes,
            )
        )

    for seed in (1, 20240611, 2**100 + 12345):
        add("flat-2000", "srswor-v1", 32, seed)
        add("nested-15552", "srswor-v1", 125, seed)
        add("nested-1e9", "srswor-v1", 200, seed)
        add("manifest-containers", "srswor-v1", 50, seed)
        add("manifest-serials", "srswor-v1", 8, seed)
        add("flat-2000", "srswr-v1", 32, seed)
        add("manifest-serials", "srswr-v1", 20, seed)
        add("nested-15552", "stratified-v1", 125, seed)
        add("nested-15552", "stratified-v1", 50, seed, by="layer")
        add("nested-1e9", "stratified-v1", 200, seed, by="carton")
        add("manifest-containers", "stratified-v1", 50, seed)
        add("manifest-serials", "stratified-v1", 7, seed)
        add("nested-15552", "two-stage-pps-v1", 20, seed, containers=5)
        add("nested-15552", "two-stage-pps-v1", 24, seed, by="pallet", containers=3)
        add("nested-1e9", "two-stage-pps-v1", 200, seed, containers=25)
        add("manifest-containers", "two-stage-pps-v1", 30, seed, containers=3)
        add("manifest-serials", "two-stage-pps-v1", 6, seed, containers=2)
    return out


def run_case(case: dict, texts: dict[str, str]) -> dict:
    structure = frame.structure_from_text(texts[case["structure"]])
    d = frame.draw(
        structure,
        case["n"],
        method=case["method"],
        seed=case["seed"],
        by=case["by"],
        containers=case["containers"],
        algorithm=case["algorithm"],
    )
    return {
        "units": list(d.units),
        "containers": list(d.containers),
        "substitutes": list(frame.substitutes(structure, d, case["substitutes"])),
        "frame": d.frame,
    }


def _dump(stored: dict) -> str:
    """One line per structure and per case: readable diffs, small file."""
    line = lambda value: json.dumps(value, sort_keys=True, separators=(",", ":"))  # noqa: E731
    structures = ",\n".join(f"  {json.dumps(k)}: {line(v)}" for k, v in stored["structures"].items())
    cases = ",\n".join(f"  {line(case)}" for case in stored["cases"])
    return '{\n "structures": {\n' + structures + '\n },\n "cases": [\n' + cases + "\n ]\n}\n"


def main() -> int:
    texts = structures()
    stored = json.loads(FIXTURE.read_text()) if FIXTURE.exists() else {"structures": {}, "cases": []}
    for name, text in texts.items():
        if stored["structures"].setdefault(name, text) != text:
            print(f"structure {name!r} changed its text form; refusing to rewrite", file=sys.stderr)
            return 1
    known = {case["id"]: case for case in stored["cases"]}
    added = 0
    for case in cases():
        result = run_case(case, stored["structures"])
        if case["id"] in known:
            if known[case["id"]]["expected"] != result:
                print(f"case {case['id']} no longer reproduces; refusing to rewrite", file=sys.stderr)
                return 1
            continue
        stored["cases"].append({**case, "expected": result})
        added += 1
    FIXTURE.parent.mkdir(exist_ok=True)
    FIXTURE.write_text(_dump(stored))
    print(f"{len(stored['cases'])} cases ({added} new) in {FIXTURE}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
