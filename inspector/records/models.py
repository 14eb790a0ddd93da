"""Frozen value objects for what the store returns.

Times are ISO 8601 text with a UTC offset, exactly as recorded. ``id`` is the
entry's place in the audit chain. JSON columns come back decoded.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any


@dataclass(frozen=True, kw_only=True)
class Person:
    id: int
    name: str
    role: str
    recorded_at: str

    def __repr__(self) -> str:  # the KDF fields are not carried: nothing to leak
        return f"Person(id={self.id}, name={self.name!r}, role={self.role!r})"


@dataclass(frozen=True, kw_only=True)
class Supplier:
    id: int
    name: str
    recorded_at: str


@dataclass(frozen=True, kw_only=True)
class Product:
    id: int
    name: str
    recorded_at: str


@dataclass(frozen=True, kw_only=True)
class Lot:
    id: int
    lot_id: str
    supplier: str
    product: str
    reference: str | None
    quantity: int
    received_on: str
    structure_spec: str | None
    structure: Any
    critical: bool
    notes: str | None
    resubmission_of: str | None
    by: str | None
    recorded_at: str
    state: str | None = None


@dataclass(frozen=True, kw_only=True)
class Plan:
    id: int
    lot_id: str
    defect_class: str
    chosen_by: str
    sample_size: int
    accept: int
    reject: int
    aql: str | None
    rql: str | None
    producer_risk: str | None
    consumer_risk: str | None
    level: str | None
    severity: str | None
    details: dict = field(default_factory=dict)
    by: str | None = None
    recorded_at: str = ""


@dataclass(frozen=True, kw_only=True)
class Draw:
    id: int
    lot_id: str
    method: str
    seed: str
    algorithm: str
    sample_size: int
    units: tuple[int, ...]
    details: dict
    by: str | None
    recorded_at: str


@dataclass(frozen=True, kw_only=True)
class Substitute:
    id: int
    lot_id: str
    draw_id: int
    unit: int
    substitute: int
    reason: str
    by: str | None
    recorded_at: str


@dataclass(frozen=True, kw_only=True)
class Result:
    id: int
    lot_id: str
    unit: int
    defect_class: str
    outcome: str
    defect: str | None
    note: str | None
    entered_as: str | None
    by: str
    corrects: int | None
    reason: str | None
    recorded_at: str


@dataclass(frozen=True, kw_only=True)
class Decision:
    id: int
    lot_id: str
    decision: str
    curtailed: bool
    evidence: dict
    by: str | None
    recorded_at: str


@dataclass(frozen=True, kw_only=True)
class Disposition:
    id: int
    lot_id: str
    disposition: str
    reason: str | None
    by: str | None
    recorded_at: str


@dataclass(frozen=True, kw_only=True)
class Signature:
    id: int
    lot_id: str
    person_id: int
    printed_name: str
    meaning: str
    record_hash: str
    recorded_at: str


@dataclass(frozen=True, kw_only=True)
class FailedAttempt:
    id: int
    lot_id: str | None
    action: str
    name_given: str
    person_id: int | None
    problem: str
    recorded_at: str


@dataclass(frozen=True, kw_only=True)
class Event:
    id: int
    lot_id: str | None
    kind: str
    from_state: str | None
    to_state: str | None
    detail: Any
    by: str | None
    recorded_at: str


@dataclass(frozen=True, kw_only=True)
class CorrectiveAction:
    id: int
    supplier: str
    lot_id: str | None
    description: str
    by: str | None
    recorded_at: str


@dataclass(frozen=True, kw_only=True)
class BrokenEntry:
    """The first place where the chain and the stored rows disagree."""

    seq: int
    table: str
    row_id: int | None
    problem: str

    def describe(self) -> str:
        row = f" row {self.row_id}" if self.row_id is not None else ""
        return f"entry {self.seq} ({self.table}{row}): {self.problem}"


@dataclass(frozen=True, kw_only=True)
class ChainReport:
    """Outcome of :func:`verify_chain`.

    ``ok`` is true only when no entry is broken and every guard trigger is in
    place. ``head`` is the hash of the last entry checked: written on a
    release sheet, it lets a later check show that nothing was rewritten.
    """

    ok: bool
    lot_id: str | None
    checked: int
    head: str | None
    broken: BrokenEntry | None
    problems: tuple[BrokenEntry, ...] = ()
    missing_guards: tuple[str, ...] = ()
