"""What the printed sheets show, as plain frozen values.

The renderer reads only these objects: it never opens the store and never
decides anything. Whoever builds a :class:`SheetData` (from a stored lot,
see ``inspector.sheets.build``, or directly in a test) supplies facts that
are already decided: the effective results after corrections, each class's
outcome, the lot's decision, the estimate. The one thing the renderer
computes itself is the OC chart, from ``inspector.stats.plans.oc_single``,
the same function the lot's risks come from.

Times are text as recorded (ISO 8601 with a UTC offset); the sheets print
them shortened to minutes. Percentages are exact ``Fraction`` values as the
trade writes them (``Fraction(3, 2)`` is 1.5 %); probabilities are floats
in [0, 1]; counts of units are ints.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from fractions import Fraction

DEFECT_CLASSES = ("critical", "major", "minor")


def _text(obj, name: str, value, *, optional: bool = False) -> None:
    if value is None and optional:
        return
    if not isinstance(value, str) or (not optional and not value.strip()):
        raise ValueError(f"{type(obj).__name__}.{name}: expected non-empty text, got {value!r}")


def _count(obj, name: str, value, low: int = 0, *, optional: bool = False) -> None:
    if value is None and optional:
        return
    if isinstance(value, bool) or not isinstance(value, int) or value < low:
        raise ValueError(f"{type(obj).__name__}.{name}: expected a whole number of at least {low}, got {value!r}")


def _probability(obj, name: str, value, *, optional: bool = True) -> None:
    if value is None and optional:
        return
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not 0 <= value <= 1:
        raise ValueError(f"{type(obj).__name__}.{name}: expected a probability in [0, 1], got {value!r}")


@dataclass(frozen=True, kw_only=True)
class SheetLot:
    """The lot's identity. ``critical`` marks food or safety-critical goods:
    every sheet of such a lot carries the advisory caution.
    ``record_hash`` is the audit chain's hash over the lot's record (hex)."""

    lot_id: str
    supplier: str
    product: str
    quantity: int
    received_on: str
    reference: str | None = None
    structure: str | None = None
    critical: bool = False
    notes: str | None = None
    state: str | None = None
    registered_by: str | None = None
    record_hash: str | None = None

    def __post_init__(self):
        _text(self, "lot_id", self.lot_id)
        _text(self, "supplier", self.supplier)
        _text(self, "product", self.product)
        _count(self, "quantity", self.quantity, 1)
        _text(self, "received_on", self.received_on)
        if self.record_hash is not None:
            h = self.record_hash
            if not isinstance(h, str) or len(h) < 12 or any(c not in "0123456789abcdefABCDEF" for c in h):
                raise ValueError(f"SheetLot.record_hash: expected at least 12 hex digits, got {h!r}")


@dataclass(frozen=True, kw_only=True)
class SheetUnit:
    """One drawn unit as the picker finds it.

    ``address`` is the full address (``pallet 3 / layer 2 / carton 7 /
    unit 14``), ``position`` its last part (``unit 14``); ``times`` > 1 only
    in a with-replacement draw; ``replaces``/``reason`` when the unit is a
    substitute for one that could not be inspected; ``classes`` are the
    defect classes whose sample holds the unit (empty: every planned class)."""

    unit: int
    address: str
    position: str
    serial: str | None = None
    times: int = 1
    replaces: int | None = None
    reason: str | None = None
    classes: tuple[str, ...] = ()

    def __post_init__(self):
        _count(self, "unit", self.unit, 1)
        _count(self, "times", self.times, 1)
        _count(self, "replaces", self.replaces, 1, optional=True)


@dataclass(frozen=True, kw_only=True)
class SheetStop:
    """One container to visit in walking order (``lot`` for a flat lot)."""

    container: str
    units: tuple[SheetUnit, ...]

    @property
    def count(self) -> int:
        """Units to pull here (a repeated unit counts each time it is checked)."""
        return sum(u.times for u in self.units)


@dataclass(frozen=True, kw_only=True)
class SheetSubstitution:
    replaced: int
    substitute: int
    reason: str
    by: str | None = None
    at: str | None = None


@dataclass(frozen=True, kw_only=True)
class SheetDraw:
    """How the sample was drawn, and the command that re-derives it.

    ``seed`` is text exactly as recorded (seeds may exceed 2**64);
    ``containers`` are the opened containers' labels of a two-stage draw."""

    method: str
    method_title: str
    algorithm: str
    seed: str
    lot_size: int
    sample_size: int
    command: str
    level: str | None = None
    containers: tuple[str, ...] = ()
    per_container: int | None = None
    note: str | None = None
    frame: str | None = None
    substitutions: tuple[SheetSubstitution, ...] = ()
    by: str | None = None
    at: str | None = None

    def __post_init__(self):
        for name in ("method", "method_title", "algorithm", "seed", "command"):
            _text(self, name, getattr(self, name))
        _count(self, "lot_size", self.lot_size, 1)
        _count(self, "sample_size", self.sample_size, 1)


@dataclass(frozen=True, kw_only=True)
class SheetPlan:
    """One defect class's single sampling plan and its exact risks at the
    actual lot size (finite-lot model).

    ``source`` is ``design`` (designed from AQL and RQL), ``table`` (a
    code-letter table) or ``typed`` (n and c typed in). For a typed plan
    ``aql_percent``/``rql_percent`` are the plan's own quality levels, where
    Pa is 0.95 and 0.10, and ``own_levels`` is true. A plan with an AQL but
    no RQL (a code-letter table plan) gets the plan's own RQL, where Pa is
    0.10, with ``rql_own`` true.
    ``aql_defectives``/``rql_defectives`` are those levels in units of this
    lot; ``aoql`` is a fraction of the lot, peaking at ``aoql_defectives``."""

    defect_class: str
    source: str
    source_text: str
    lot_size: int
    sample_size: int
    acceptance: int
    rejection: int
    aql_percent: Fraction | None = None
    rql_percent: Fraction | None = None
    aql_defectives: int | None = None
    rql_defectives: int | None = None
    pa_at_aql: float | None = None
    pa_at_rql: float | None = None
    aoql: float | None = None
    aoql_defectives: int | None = None
    producer_risk: Fraction | None = None
    consumer_risk: Fraction | None = None
    own_levels: bool = False
    rql_own: bool = False

    def __post_init__(self):
        if self.defect_class not in DEFECT_CLASSES:
            raise ValueError(
                f"SheetPlan.defect_class: expected one of {', '.join(DEFECT_CLASSES)}, got {self.defect_class!r}"
            )
        if self.source not in ("design", "table", "typed"):
            raise ValueError(f"SheetPlan.source: expected design, table or typed, got {self.source!r}")
        _count(self, "lot_size", self.lot_size, 1)
        _count(self, "sample_size", self.sample_size, 1)
        _count(self, "acceptance", self.acceptance, 0)
        _count(self, "rejection", self.rejection, 1)
        if self.sample_size > self.lot_size:
            raise ValueError(
                f"SheetPlan.sample_size: {self.sample_size} exceeds the lot size {self.lot_size}"
            )
        _probability(self, "pa_at_aql", self.pa_at_aql)
        _probability(self, "pa_at_rql", self.pa_at_rql)
        _probability(self, "aoql", self.aoql)


@dataclass(frozen=True, kw_only=True)
class SheetResult:
    """The effective result of one unit in one class (after corrections)."""

    unit: int
    defect_class: str
    outcome: str  # "pass" or "fail"
    address: str | None = None
    defect: str | None = None
    note: str | None = None
    by: str | None = None
    at: str | None = None

    def __post_init__(self):
        _count(self, "unit", self.unit, 1)
        if self.outcome not in ("pass", "fail"):
            raise ValueError(f"SheetResult.outcome: expected pass or fail, got {self.outcome!r}")

    @property
    def nonconforming(self) -> bool:
        return self.outcome == "fail"


@dataclass(frozen=True, kw_only=True)
class SheetClassOutcome:
    """One class's tally against its plan, as the workflow decided it:
    ``result`` is ``accept``, ``reject`` or ``open`` (not yet decided)."""

    defect_class: str
    inspected: int
    nonconforming: int
    acceptance: int
    rejection: int
    result: str

    def __post_init__(self):
        _count(self, "inspected", self.inspected)
        _count(self, "nonconforming", self.nonconforming)
        if self.result not in ("accept", "reject", "open"):
            raise ValueError(f"SheetClassOutcome.result: expected accept, reject or open, got {self.result!r}")


@dataclass(frozen=True, kw_only=True)
class SheetCorrection:
    """A result corrected by a later entry; the original is never overwritten."""

    unit: int
    defect_class: str
    was: str
    now: str
    reason: str
    by: str | None = None
    at: str | None = None

    def __post_init__(self):
        _text(self, "reason", self.reason)


@dataclass(frozen=True, kw_only=True)
class SheetDecision:
    """The lot's decision and disposition (either may still be open)."""

    decision: str | None = None  # "accept" / "reject"
    curtailed: bool = False
    decided_by: str | None = None
    decided_at: str | None = None
    disposition: str | None = None  # e.g. "release", "reject", "hold", "screen 100 %"
    disposition_reason: str | None = None
    disposition_by: str | None = None
    disposition_at: str | None = None


@dataclass(frozen=True, kw_only=True)
class SheetEstimate:
    """Nonconforming units the lot holds in one class, from its sample:
    point estimate, exact two-sided interval and one-sided upper bound at
    ``confidence`` (units; the sheets also print them as percentages)."""

    defect_class: str
    lot_size: int
    sample_size: int
    found: int
    confidence: Fraction
    point: float
    lower: int
    upper: int
    upper_bound: int
    curtailed: bool = False

    def __post_init__(self):
        _count(self, "lot_size", self.lot_size, 1)
        _count(self, "sample_size", self.sample_size, 1)
        _count(self, "found", self.found, 0)
        for name in ("lower", "upper", "upper_bound"):
            _count(self, name, getattr(self, name), 0)
        if not self.lower <= self.upper:
            raise ValueError(f"SheetEstimate: lower bound {self.lower} exceeds upper bound {self.upper}")


@dataclass(frozen=True, kw_only=True)
class SheetSignature:
    """A recorded signature: printed name, what the signature means, when;
    ``changed_since_signed`` when the record changed after signing."""

    printed_name: str
    meaning: str
    at: str
    changed_since_signed: bool = False

    def __post_init__(self):
        _text(self, "printed_name", self.printed_name)
        _text(self, "meaning", self.meaning)
        _text(self, "at", self.at)


@dataclass(frozen=True, kw_only=True)
class SheetData:
    """Everything the four sheets print for one lot. Sheets use what they
    need: the pick list, labels and bench log only ``lot``, ``draw``,
    ``stops`` and ``plans``; the release sheet all of it."""

    lot: SheetLot
    draw: SheetDraw | None = None
    stops: tuple[SheetStop, ...] = ()
    plans: tuple[SheetPlan, ...] = ()
    outcomes: tuple[SheetClassOutcome, ...] = ()
    results: tuple[SheetResult, ...] = ()
    corrections: tuple[SheetCorrection, ...] = ()
    decision: SheetDecision = field(default_factory=SheetDecision)
    estimates: tuple[SheetEstimate, ...] = ()
    signatures: tuple[SheetSignature, ...] = ()

    @property
    def units(self) -> tuple[SheetUnit, ...]:
        """The drawn units in walking order."""
        return tuple(u for stop in self.stops for u in stop.units)

    def nonconforming(self, defect_class: str) -> tuple[SheetResult, ...]:
        """Nonconforming results of one class, by unit number."""
        return tuple(
            sorted(
                (r for r in self.results if r.defect_class == defect_class and r.nonconforming),
                key=lambda r: r.unit,
            )
        )
