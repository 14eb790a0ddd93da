"""`inspector draw`: number the lot's units and draw the sample.

The frame and numpy are imported inside the handler so that building the
parser stays cheap.
"""

from __future__ import annotations

import argparse
import re

from inspector.cli._common import UsageError, add_json, emit, int_list, positive_int

METHOD_CHOICES = ("simple", "stratified", "two-stage", "with-replacement")

# Which option each frame error field points at.
_OPTION = {
    "n": "--sample",
    "method": "--method",
    "by": "--by",
    "containers": "--containers",
    "seed": "--seed",
    "structure": "--structure",
    "manifest": "--manifest",
    "lot_size": "--lot-size",
    "units": "--verify",
    "algorithm": "--method",
}

# Generated seeds stay below 2**53 so that every JSON reader (including ones
# that hold numbers as doubles) keeps them exact.
_GENERATED_SEED_BITS = 53


class SeedArg:
    """A seed as typed: ``value`` for the generator, ``echo`` for output
    (the typed text itself when it is not written the canonical way, e.g.
    ``007``, so the record shows exactly what was given)."""

    def __init__(self, text: str):
        self.text = text
        self.value = int(text)
        self.echo = self.value if str(self.value) == text else text


def seed_type(text: str) -> SeedArg:
    stripped = text.strip()
    if not re.fullmatch(r"[0-9]+", stripped) or int(stripped) >= 2**128:
        raise argparse.ArgumentTypeError(f"expected a whole number from 0 to 2**128-1, got {text!r}")
    return SeedArg(stripped)


def register(subparsers) -> None:
    p = subparsers.add_parser(
        "draw",
        help="number the lot's units and draw the sample, with a pick list in walking order",
        description=(
            "Number every unit of the lot (1..N, outermost container first), draw the sample "
            "from a recorded seed and list the units in walking order with their addresses. "
            "Give the same arguments and --verify to re-derive a recorded draw."
        ),
    )
    lot = p.add_argument_group("the lot (give --lot-size, --structure or --manifest)")
    lot.add_argument(
        "--lot-size",
        type=positive_int,
        metavar="N",
        help="number of units; with --structure or --manifest, the declared quantity to check against",
    )
    lot.add_argument(
        "--structure",
        metavar="SPEC",
        help="regular containers, outermost first, the last level being the units: "
        "pallet=18,layer=4,carton=9,unit=24",
    )
    lot.add_argument(
        "--manifest",
        metavar="FILE",
        help="CSV with a header container,units (one row per container) or serial,container (one row per unit)",
    )
    p.add_argument("--sample", type=positive_int, required=True, metavar="n", help="number of units to draw")
    p.add_argument(
        "--method",
        choices=METHOD_CHOICES,
        default="simple",
        help="simple (default); stratified by --by; two-stage: --containers k chosen by size, n/k units "
        "in each; with-replacement: for non-destructive re-checks only",
    )
    p.add_argument(
        "--by",
        metavar="LEVEL",
        help="container level for stratified (default: outermost) or two-stage (default: the level just "
        "above the units)",
    )
    p.add_argument("--containers", type=positive_int, metavar="k", help="two-stage: how many containers to open")
    p.add_argument(
        "--seed",
        type=seed_type,
        metavar="S",
        help="whole number seed; without it one is generated from OS entropy and printed (record it)",
    )
    p.add_argument(
        "--verify",
        type=int_list,
        metavar="UNITS",
        help="re-derive the draw given by the other arguments and compare it with these units, e.g. 3,8,10 "
        "(exit 1 when they differ)",
    )
    add_json(p)
    p.set_defaults(handler=run)


def _usage(exc) -> UsageError:
    """A frame error as a one-line message naming our option."""
    option = _OPTION.get(exc.field, exc.field)
    text = str(exc)
    if text.startswith(exc.field):
        text = text[len(exc.field) :].lstrip(": ")
    return UsageError(f"{option}: {text}")


def _read_manifest(path: str) -> str:
    try:
        with open(path, encoding="utf-8-sig", newline="") as fh:
            return fh.read()
    except UnicodeDecodeError:
        raise UsageError(f"--manifest: {path!r} is not UTF-8 text") from None
    except OSError as exc:
        raise UsageError(f"--manifest: cannot read {path!r} ({exc.strerror or exc})") from None


def _structure(args, frame):
    if args.structure is not None and args.manifest is not None:
        raise UsageError("--manifest: give either --structure or --manifest, not both")
    try:
        if args.manifest is not None:
            return frame.manifest_from_csv_text(_read_manifest(args.manifest), lot_size=args.lot_size)
        if args.structure is not None:
            return frame.parse_structure(args.structure, lot_size=args.lot_size)
        if args.lot_size is not None:
            return frame.flat_lot(args.lot_size)
    except frame.FrameError as exc:
        raise _usage(exc) from None
    raise UsageError("--lot-size/--structure/--manifest: give one of them to describe the lot")


def run(args) -> int:
    import secrets

    from inspector import frame

    structure = _structure(args, frame)
    if args.verify is not None and args.seed is None:
        raise UsageError("--verify: needs --seed, the seed of the draw being checked")
    if args.seed is None:
        seed = secrets.randbits(_GENERATED_SEED_BITS)
        echo, generated = seed, True
    else:
        seed, echo, generated = args.seed.value, args.seed.echo, False
    try:
        if args.verify is not None:
            for unit in args.verify:
                structure.check_unit(unit, field="units")
        result = frame.draw(
            structure,
            args.sample,
            method=args.method,
            seed=seed,
            by=args.by,
            containers=args.containers,
        )
    except frame.FrameError as exc:
        raise _usage(exc) from None

    addresses = structure.addresses(result.units)
    picks = frame.pick_list(structure, result)
    payload: dict = {
        "method": result.method,
        "method_title": result.title,
        "algorithm": result.algorithm,
        "seed": echo,
        "seed_generated": generated,
        "lot_size": result.lot_size,
        "sample_size": result.sample_size,
        "structure": structure.to_text() if structure.form != "manifest" else structure.describe(),
        "frame": result.frame,
        "units": list(result.units),
        "addresses": [str(a) for a in addresses],
    }
    if getattr(structure, "serials", None) is not None:
        payload["serials"] = [a.serial for a in addresses]
    if result.level is not None:
        payload["level"] = result.level
    if result.method == "two-stage":
        payload["per_container"] = result.per_container
        payload["containers"] = [
            {
                "number": h,
                "container": structure.container_label(result.level, h - 1),
                "units": result.per_container,
            }
            for h in result.containers
        ]
    payload["walking_order"] = [
        {"container": stop.container, "count": stop.count, "units": [line.unit for line in stop.lines]}
        for stop in picks.stops
    ]
    if result.note:
        payload["note"] = result.note

    status = 0
    check = None
    if args.verify is not None:
        check = frame.compare_units(result.units, args.verify)
        payload["verify"] = {
            "matches": check.ok,
            "listed": list(check.listed),
            "listed_not_drawn": list(check.unexpected),
            "drawn_not_listed": list(check.missing),
            "message": check.describe(),
        }
        status = 0 if check.ok else 1

    emit(args, payload, lambda: _text(structure, result, picks, echo, generated, check))
    return status


def _text(structure, result, picks, echo, generated, check) -> str:
    lines = [
        f"{result.title[0].upper()}{result.title[1:]} ({result.algorithm})",
        f"Lot: {structure.describe()}",
        f"Sample: {result.sample_size} units, seed {echo}"
        + ("  (generated: record it to re-derive this draw)" if generated else ""),
    ]
    if result.note:
        lines.append(f"Note: {result.note}")
    if check is not None:
        if check.ok:
            lines.append(f"Verify: {check.describe()}.")
        else:
            lines.append(f"Verify: DIFFERENT: {check.describe()}.")
        lines.append("Re-derived units: " + ", ".join(map(str, result.units)))
        return "\n".join(lines)
    if result.method == "two-stage":
        opened = ", ".join(structure.container_label(result.level, h - 1) for h in result.containers)
        lines.append(f"Open {len(result.containers)} containers, {result.per_container} units from each: {opened}")
    lines.append(f"Pick list in walking order ({len(picks.stops)} stops):")
    for stop in picks.stops:
        lines.append(f"  {stop.container}: {stop.count} unit{'s' if stop.count != 1 else ''}")
        for line in stop.lines:
            where = line.address.path[-1]
            cell = f"      #{line.unit}  {where[0]} {where[1]}"
            if line.address.serial is not None:
                cell += f"  serial {line.address.serial}"
            if line.times > 1:
                cell += f"  (check {line.times} times)"
            lines.append(cell)
    lines.append("Units: " + ", ".join(map(str, result.units)))
    return "\n".join(lines)
