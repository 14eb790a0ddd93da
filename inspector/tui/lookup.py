"""What the bench's entry field holds, as a unit of the lot.

The resolution itself is the workflow's (``Workflow.resolve_in``: a unit
number, an address, a manifest serial, or a unit code scanned from the
lot's labels); this module only adapts it to the screens: the structure is
read once per lot in a worker, and each scan is resolved against it on the
spot without touching the store.
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
    # What to hand to the workflow's record(): the text as entered, which the
    # workflow resolves again (and keeps as "entered as").
    for_workflow: Any
    how: str  # "number", "address", "serial" or "code"


def lot_structure(workflow, lot_id: str):
    """The frame structure of a registered lot (read from the record)."""
    from inspector.workflow import WorkflowError

    try:
        return workflow.structure(lot_id)
    except WorkflowError as exc:
        raise EntryError(str(exc)) from None


def resolve_entry(structure, lot_id: str, text: str) -> Resolved:
    """The unit that ``text`` names in lot ``lot_id``.

    Raises EntryError naming the text when it is no unit of this lot.
    """
    from inspector.workflow import Workflow, WorkflowError

    typed = (text or "").strip()
    if not typed:
        raise EntryError("unit: expected a unit number, address, serial or scanned code, got nothing")
    try:
        found = Workflow.resolve_in(structure, lot_id, typed)
    except WorkflowError as exc:
        raise EntryError(str(exc)) from None
    return Resolved(unit=found.unit, address=found.address, serial=found.serial, typed=found.typed,
                    for_workflow=found.typed, how=found.how)
