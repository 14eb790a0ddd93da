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
* :func:`supplier_history` -- a supplier's lots with their results, the
  nonconforming rate per lot and the switching severity
  (``inspector.stats.switching``).
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


@dataclass(frozen=True, kw_only=True)
class HistoryRow:
    lot_id: str
    received_on: str
    product: str
    size: int
    state: str
    decision: str | None
    inspected: int
    nonconforming: int
    severity: str | None  # switching severity in effect for this lot (decided lots only)

    @property
    def rate(self) -> float | None:
        return None if self.inspected == 0 else self.nonconforming / self.inspected


@dataclass(frozen=True, kw_only=True)
class History:
    supplier: str
    rows: tuple[HistoryRow, ...]
    severity: str
    reason: str
    reduced_eligible: bool


def supplier_history(workflow, supplier: str) -> History:
    """A supplier's lots in the order received, with the units inspected and
    found nonconforming (in any class; the latest entry per unit and class
    counts, so corrections are applied), and the switching severity."""
    from inspector.stats.switching import LotOutcome, switching_state

    lots = workflow.lots(supplier=supplier)
    reports = [workflow.show(item["id"]) for item in lots]
    reports.sort(key=lambda rep: (rep["received_on"] or "", rep["registered_at"] or ""))
    outcomes = [LotOutcome(lot_id=rep["id"], accepted=rep["decision"] == "accept",
                           resubmitted=rep.get("resubmission_of") is not None)
                for rep in reports if rep["decision"] in ("accept", "reject")]
    switching = switching_state(outcomes)
    severity_of = {step.lot_id: step.severity for step in switching.lots}
    rows = []
    for rep in reports:
        current = [r for r in rep["results"] if r.get("current")]
        inspected = {r["unit"] for r in current}
        failed = {r["unit"] for r in current if r["outcome"] == "fail"}
        rows.append(HistoryRow(lot_id=rep["id"], received_on=rep["received_on"] or "", product=rep["product"],
                               size=rep["size"], state=rep["state"], decision=rep["decision"],
                               inspected=len(inspected), nonconforming=len(failed),
                               severity=severity_of.get(rep["id"])))
    return History(supplier=supplier, rows=tuple(rows), severity=switching.severity, reason=switching.reason,
                   reduced_eligible=switching.reduced_eligible)
