"""Read-only lookups the screens need that the workflow does not offer (yet).

Kept apart on purpose: nothing here writes, and nothing here decides a lot.
Each function only reads the record or calls the pure core (frame, sheets'
code reader, stats' switching rules), so the workflow stays the one place
rules live. When the workflow grows the same lookups, the screens should
call those and this module should shrink.

* :func:`resolve_entry` -- what the bench's entry field holds, as a unit
  number: a unit number, an address or a manifest serial (resolved by the
  frame's ``unit_at``), or a scanned unit code (read by
  ``inspector.sheets.codes.parse_unit_code``). The workflow's ``record``
  resolves the first three itself but not scanned codes, and the bench must
  show which unit is on it before a verdict key is pressed.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any


class EntryError(ValueError):
    """What was typed is not a unit of this lot; the message says why, in one line."""


@dataclass(frozen=True, kw_only=True)
class Resolved:
    """A unit found from typed or scanned text."""

    unit: int
    address: str
    serial: str | None
    typed: str
    # What to hand to the workflow's record(): the typed text when the
    # workflow can resolve it itself (so it records what was entered), the
    # unit number for a scanned code, which it cannot read.
    for_workflow: Any
    how: str  # "number", "address", "serial" or "code"


def lot_structure(store, lot_id: str):
    """The frame structure of a registered lot (read from the record)."""
    from inspector import frame

    with store.reading() as r:
        lot = r.lot(lot_id)
    if lot is None:
        raise EntryError(f"lot: no lot {lot_id!r} is registered")
    return frame.structure_from_dict(lot.structure)


def resolve_entry(structure, lot_id: str, text: str) -> Resolved:
    """The unit that ``text`` names in lot ``lot_id`` (see module doc).

    Raises EntryError naming the text when it is no unit of this lot.
    """
    from inspector import frame

    typed = (text or "").strip()
    if not typed:
        raise EntryError("unit: expected a unit number, address, serial or scanned code, got nothing")
    try:
        unit = structure.unit_at(typed)
    except frame.FrameError as exc:
        first_error = str(exc)
    else:
        address = structure.address_of(unit)
        how = "number" if typed.isdigit() else ("serial" if address.serial and address.serial == typed else "address")
        return Resolved(unit=unit, address=str(address), serial=address.serial, typed=typed,
                        for_workflow=typed, how=how)
    try:
        from inspector.sheets.codes import UnitCodeError, parse_unit_code
    except ImportError:  # pragma: no cover - the code reader ships with the sheets
        raise EntryError(first_error if first_error.startswith("unit") else f"unit: {first_error}") from None
    try:
        code = parse_unit_code(typed)
    except UnitCodeError:
        message = first_error if first_error.startswith("unit") else f"unit: {first_error}"
        if ":" in typed:
            message = f"unit: {typed!r} is neither a unit of this lot nor a unit code as printed on the labels"
        raise EntryError(message) from None
    if code.lot_id != lot_id:
        raise EntryError(f"unit code: {typed!r} belongs to lot {code.lot_id}, not to lot {lot_id}")
    try:
        unit = structure.check_unit(code.unit)
    except frame.FrameError as exc:
        raise EntryError(f"unit code: {typed!r}: {exc}") from None
    address = structure.address_of(unit)
    return Resolved(unit=unit, address=str(address), serial=address.serial, typed=typed,
                    for_workflow=unit, how="code")
