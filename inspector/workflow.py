"""The lot lifecycle as a service: the one place the rules live.

States and the only transitions allowed::

    registered -> planned -> drawn -> inspecting -> decided -> released
                  (planned: re-plan or                       -> rejected
                   add a class)                              -> on hold -> released | rejected
    drawn -> decided            (every sampled unit... see decide)
    decided -> inspecting       (only when a correction withdraws an early rejection)

Rules
-----
* A plan per defect class (critical, major, minor). All classes share one
  draw of the largest sample size; a class with a smaller plan inspects a
  simple random subsample of the drawn units (see :meth:`Workflow.draw`).
* Results only for drawn units (after substitutions), by unit number,
  address or serial, one result per unit and class; a second one is a
  correction, which points at the entry it corrects and keeps it.
* The decision is computed from the results, never typed. When the
  nonconforming count of a class reaches its rejection number, the lot is
  decided (rejected) at once -- early, if units are still open -- and any
  estimate from that curtailed sample is labelled as such.
* Release needs an accepted decision, or, for a rejected lot, a documented
  disposition (the lot put on hold with its reason), and an approver's
  signature with their secret. A wrong secret refuses the release and is
  recorded as a failed attempt.
* Every other refusal raises :class:`WorkflowError` before anything is
  written: all checks run inside the action's write transaction.
"""

from __future__ import annotations

import dataclasses

import hashlib
import secrets as _entropy
from dataclasses import dataclass
from datetime import date
from decimal import Decimal, localcontext
from fractions import Fraction
from typing import Any, Callable, Sequence

from inspector.records import Clock, Store, StoreError
from inspector.records.store import Reader, Transaction

STATES = ("registered", "planned", "drawn", "inspecting", "decided", "released", "rejected", "on hold")
TERMINAL = ("released", "rejected")
TRANSITIONS: dict[str | None, tuple[str, ...]] = {
    None: ("registered",),
    "registered": ("planned",),
    "planned": ("planned", "drawn"),
    "drawn": ("inspecting", "decided"),
    "inspecting": ("decided",),
    "decided": ("released", "rejected", "on hold", "inspecting"),
    "on hold": ("released", "rejected"),
    "released": (),
    "rejected": (),
}
CLASSES = ("critical", "major", "minor")
# States in which a lot's latest decision stands (it counts for switching).
_DECIDED_STATES = ("decided", "on hold", "released", "rejected")
# States in which a rejected lot can be resubmitted (decided, not released).
_RESUBMITTABLE_STATES = ("decided", "on hold", "rejected")
ROLES = ("inspector", "approver")
DRAW_METHODS = ("simple", "stratified", "two-stage")

ADVISORY = (
    "Food or safety-critical lot: these results are advisory. The applicable regulation, "
    "the buyer's specification and qualified inspectors decide."
)
SAMPLING_CAUTION = "Sampling gives evidence about a lot, never proof that every unit is good."
CRITICAL_CAUTION = (
    "Critical defects that could hurt someone warrant 100 % inspection or stopping the lot, "
    "whatever a sampling plan says."
)
CURTAILED_LABEL = (
    "from a curtailed sample: inspection stopped when the rejection number was reached, "
    "so the estimate is biased (stopping early tends to overstate the nonconforming fraction)"
)
SUBSAMPLE_NOTE = (
    "Classes with a smaller sample inspect a simple random subsample of the drawn units "
    "(subsample seed derived from the draw seed and the class name), so every unit of the "
    "lot keeps the same chance n/N of being inspected for that class."
)
# Generated seeds stay below 2**53 so every JSON reader keeps them exact
# (the same choice as `inspector draw`).
_SEED_BITS = 53
_MAX_TEXT = 2000


class WorkflowError(Exception):
    """A step the workflow refused; ``field`` names the argument at fault (or
    ``"lot"`` for a rule of the lifecycle). The message is one line."""

    def __init__(self, field: str, message: str) -> None:
        super().__init__(message)
        self.field = field


# --- value objects returned to front ends ----------------------------------------------


@dataclass(frozen=True, kw_only=True)
class ClassTally:
    """Where one defect class stands: its plan, sample and results so far."""

    defect_class: str
    plan_id: int
    sample_size: int
    accept: int
    reject: int
    sample_units: tuple[int, ...]
    inspected: int
    nonconforming: int
    open_units: tuple[int, ...]
    result_ids: tuple[int, ...]

    @property
    def complete(self) -> bool:
        return not self.open_units

    @property
    def verdict(self) -> str | None:
        """``"reject"`` once Re is reached, ``"accept"`` when complete within
        Ac, else None (still open)."""
        if self.nonconforming >= self.reject:
            return "reject"
        if self.complete:
            return "accept"
        return None

    def to_dict(self) -> dict:
        return {
            "plan_entry": self.plan_id,
            "sample_size": self.sample_size,
            "accept": self.accept,
            "reject": self.reject,
            "inspected": self.inspected,
            "nonconforming": self.nonconforming,
            "open": len(self.open_units),
            "open_units": list(self.open_units),
            "verdict": self.verdict,
        }


@dataclass(frozen=True, kw_only=True)
class RecordOutcome:
    """What ``record``/``correct`` did: the entries written, and the decision
    if the lot was decided by this result."""

    lot_id: str
    unit: int
    entries: tuple[int, ...]
    classes: tuple[str, ...]
    outcome: str
    state: str
    tallies: dict[str, ClassTally]
    decision: dict | None = None
    note: str | None = None


@dataclass(frozen=True, kw_only=True)
class ResolvedUnit:
    """A unit named by typed or scanned text (see ``Workflow.resolve_unit``)."""

    unit: int
    address: str
    serial: str | None
    typed: str
    how: str  # "number", "address", "serial" or "code"


@dataclass(frozen=True, kw_only=True)
class _LotData:
    lot: Any
    state: str | None
    plans: dict  # class -> current Plan
    draw: Any
    substitutes: list
    results: list
    decisions: list
    dispositions: list
    signatures: list


@dataclass(frozen=True, kw_only=True)
class _SupplierLots:
    """One supplier and product as the switching rules see it: ``timeline``
    holds (entry, "lot", lot, latest decision) and (entry, "action",
    corrective action, None) in recording order; ``undecided`` the lots that do
    not count (yet)."""

    supplier: str
    product: str
    timeline: tuple
    undecided: tuple
    result: Any  # inspector.stats.switching.SwitchingResult


# --- helpers -------------------------------------------------------------------------------


def _text(value: Any, field: str, *, required: bool = True, limit: int = _MAX_TEXT) -> str | None:
    """Clean one text input: stripped, no control characters, bounded."""
    if value is None:
        if required:
            raise WorkflowError(field, f"{field}: expected text, got nothing")
        return None
    if not isinstance(value, str):
        raise WorkflowError(field, f"{field}: expected text, got {value!r}")
    text = value.strip()
    if not text:
        if required:
            raise WorkflowError(field, f"{field}: expected text, got {value!r}")
        return None
    if any(ord(ch) < 32 and ch not in "\t" or ord(ch) == 127 for ch in text):
        raise WorkflowError(field, f"{field}: control characters are not allowed, got {value!r}")
    if len(text) > limit:
        raise WorkflowError(field, f"{field}: at most {limit} characters, got {len(text)}")
    return text


def _decimal_text(value: Any) -> str:
    """An exact decimal as text: a string is kept as typed ('1.0'), a
    Fraction, Decimal or int is written out ('1.5')."""
    if isinstance(value, str):
        Decimal(value.strip())  # validated by the caller; raises if not a number
        return value.strip()
    if isinstance(value, Fraction):
        with localcontext() as ctx:
            ctx.prec = 60
            value = Decimal(value.numerator) / Decimal(value.denominator)
    text = format(Decimal(value).normalize(), "f")
    return text


def _fraction(value: Any, field: str) -> Fraction:
    try:
        if isinstance(value, str):
            return Fraction(Decimal(value.strip()))
        if isinstance(value, float):
            return Fraction(repr(value))
        return Fraction(value)
    except (ValueError, ArithmeticError, TypeError):
        raise WorkflowError(field, f"{field}: expected a number, got {value!r}") from None


def _subsample_seed(seed: int, defect_class: str) -> int:
    """A 128-bit seed for a class's subsample, derived from the draw seed.

    Derived by hashing so it is fixed by the record (re-derivable) yet its
    stream is unrelated to the draw's own stream.
    """
    digest = hashlib.sha256(f"inspector subsample|{seed}|{defect_class}".encode()).digest()
    return int.from_bytes(digest[:16], "big")


def _frame_refusal(exc, rename: dict[str, str]) -> WorkflowError:
    """A frame error as a workflow refusal, its field named in our terms."""
    field_name = rename.get(exc.field, exc.field)
    message = str(exc)
    if message.startswith(exc.field + ":"):
        message = field_name + message[len(exc.field):]
    return WorkflowError(field_name, message)


def _allowance(defect_class: str, accept: int, reject: int) -> str:
    """What a class's plan allows, in words: Ac 0 is shown as no allowance."""
    if accept == 0:
        return f"{defect_class}: Ac 0 — any nonconforming unit rejects the lot"
    return (f"{defect_class}: Ac {accept}, Re {reject} — the lot is accepted with up to {accept} nonconforming "
            f"unit{'s' if accept != 1 else ''} in the sample and rejected at {reject}")


def _what(state: str | None) -> str:
    return state or "not registered"


class Workflow:
    """The lot lifecycle on one store. Build it with
    :func:`inspector.services.build_services`.

    ``entropy`` returns a fresh seed when a draw is asked without one (OS
    entropy by default); tests pass a fixed one.
    """

    def __init__(self, *, store: Store, clock: Clock | None = None,
                 entropy: Callable[[], int] | None = None) -> None:
        self.store = store
        self.clock = clock or store.clock
        self._entropy = entropy or (lambda: _entropy.randbits(_SEED_BITS))
        # Result entries already read, per lot. Results are append-only and
        # numbered in commit order, so later reads fetch only newer entries:
        # recording at a bench with thousands of results stays fast.
        self._results_seen: dict[str, tuple] = {}
        self._structures: dict[tuple[str, int], Any] = {}

    def _structure_of(self, lot) -> Any:
        """The lot's frame structure, built once per lot: a registered lot's
        structure never changes, and rebuilding a large manifest (200,000
        serials) on every entry at the bench would cost tens of ms."""
        from inspector import frame

        key = (lot.lot_id, lot.id)
        structure = self._structures.get(key)
        if structure is None:
            structure = self._structures[key] = frame.structure_from_dict(lot.structure)
        return structure

    def _results(self, reader: Reader, lot_id: str) -> list:
        seen = self._results_seen.get(lot_id, ())
        new = reader.results(lot_id, after=seen[-1].id if seen else 0)
        if new:
            seen = seen + tuple(new)
            self._results_seen[lot_id] = seen
        return list(seen)

    # --- people --------------------------------------------------------------------------

    def add_person(self, *, name: str, role: str, secret: str) -> dict:
        """Register a person; the secret is kept only as a salted slow hash."""
        name = _text(name, "name", limit=200)
        if role not in ROLES:
            raise WorkflowError("role", f"role: expected inspector or approver, got {role!r}")
        from inspector.records.secret_hash import validate_secret

        try:
            validate_secret(secret)
        except ValueError as exc:
            raise WorkflowError("secret", str(exc)) from None
        with self.store.transaction() as tx:
            if tx.person(name) is not None:
                raise WorkflowError("name", f"name: a person called {name!r} is already registered")
            entry = tx.add_person(name, role, secret)
            tx.add_event(lot_id=None, kind="person added", detail={"person": name, "role": role})
            person = tx.person_by_id(entry)
        return {"entry": person.id, "name": person.name, "role": person.role, "at": person.recorded_at}

    def people(self) -> list[dict]:
        with self.store.reading() as r:
            return [{"entry": p.id, "name": p.name, "role": p.role, "at": p.recorded_at} for p in r.people()]

    def _person(self, reader: Reader, name: Any, field: str = "by"):
        name = _text(name, field, limit=200)
        person = reader.person(name)
        if person is None:
            raise WorkflowError(field, f"{field}: no person called {name!r} is registered (see inspector person add)")
        return person

    # --- lots ------------------------------------------------------------------------------

    def register_lot(
        self,
        *,
        lot_id: str,
        supplier: str,
        product: str,
        size: int,
        structure: str | None = None,
        manifest_text: str | None = None,
        manifest_name: str | None = None,
        reference: str | None = None,
        critical: bool = False,
        notes: str | None = None,
        resubmission_of: str | None = None,
        received_on: str | None = None,
        by: str | None = None,
    ) -> dict:
        """Register a lot with its physical structure (a spec, a manifest, or
        just its size). Returns the lot as :meth:`show` would."""
        from inspector import frame

        lot_id = _text(lot_id, "id", limit=100)
        supplier = _text(supplier, "supplier", limit=200)
        product = _text(product, "product", limit=200)
        resubmission_of = _text(resubmission_of, "resubmission_of", required=False, limit=100)
        reference = _text(reference, "reference", required=False, limit=200)
        notes = _text(notes, "notes", required=False)
        if isinstance(size, bool) or not isinstance(size, int) or size < 1:
            raise WorkflowError("size", f"size: expected a whole number of at least 1, got {size!r}")
        if structure is not None and manifest_text is not None:
            raise WorkflowError("manifest", "manifest: give either a structure or a manifest, not both")
        try:
            if manifest_text is not None:
                lot_structure = frame.manifest_from_csv_text(manifest_text, lot_size=size)
                spec = f"manifest {manifest_name}" if manifest_name else "manifest"
            elif structure is not None:
                lot_structure = frame.parse_structure(structure, lot_size=size)
                spec = lot_structure.to_text()
            else:
                lot_structure = frame.flat_lot(size)
                spec = None
        except frame.FrameError as exc:
            raise _frame_refusal(exc, {"lot_size": "size"}) from None
        if received_on is None:
            received_on = self.clock().date().isoformat()
        else:
            try:
                received_on = date.fromisoformat(str(received_on).strip()).isoformat()
            except ValueError:
                raise WorkflowError("received_on", f"received_on: expected a date as YYYY-MM-DD, "
                                                   f"got {received_on!r}") from None
        with self.store.transaction() as tx:
            person = self._person(tx, by) if by is not None else None
            if tx.lot(lot_id) is not None:
                raise WorkflowError("id", f"id: lot {lot_id!r} is already registered")
            if resubmission_of is not None:
                self._check_resubmission(tx, resubmission_of, supplier=supplier, product=product)
            supplier_id = tx.ensure_supplier(supplier)
            product_id = tx.ensure_product(product)
            tx.add_lot(
                lot_id=lot_id, supplier_id=supplier_id, product_id=product_id, quantity=size,
                received_on=received_on, reference=reference, structure_spec=spec,
                structure=lot_structure.to_dict(), critical=critical, notes=notes,
                resubmission_of=resubmission_of, by_person=person.id if person else None,
            )
            self._transition(tx, lot_id, None, "registered", detail={"size": size},
                             by_person=person.id if person else None)
        return self.show(lot_id)

    def lots(self, *, state: str | None = None, supplier: str | None = None) -> list[dict]:
        """Registered lots, optionally of one state and/or supplier.

        Each lot carries its progress at the bench: ``sample_size`` (units
        drawn), ``inspected`` (drawn units with a current result) and
        ``nonconforming`` (units whose current result fails in some class),
        all None before a draw with a plan. They come from the plans, the
        draw and the result entries only (no estimate, no re-derivation, no
        record hash), so an overview of many lots stays cheap.
        """
        if state is not None and state not in STATES:
            raise WorkflowError("state", f"state: expected one of {', '.join(STATES)}, got {state!r}")
        with self.store.reading() as r:
            out = []
            for lot in r.lots(state=state, supplier=supplier):
                decisions = r.decisions(lot.lot_id)
                out.append({
                    "id": lot.lot_id,
                    "state": lot.state,
                    "supplier": lot.supplier,
                    "product": lot.product,
                    "size": lot.quantity,
                    "reference": lot.reference,
                    "received_on": lot.received_on,
                    "critical": lot.critical,
                    "decision": decisions[-1].decision if decisions else None,
                    **self._progress(r, lot.lot_id),
                })
            return out

    def _progress(self, reader: Reader, lot_id: str) -> dict:
        """Drawn, inspected and nonconforming units of one lot (None before a
        draw with a plan). A unit with a result is never substituted, and
        substitutes replace units one for one, so the draw's size is the
        number of units to inspect and every unit with a result is one of them."""
        none = {"sample_size": None, "inspected": None, "nonconforming": None}
        if not reader.plans(lot_id):
            return none
        draws = reader.draws(lot_id)
        if not draws:
            return none
        effective = self._effective(self._results(reader, lot_id))
        inspected = {unit for unit, _cls in effective}
        failed = {unit for (unit, _cls), res in effective.items() if res.outcome == "fail"}
        return {"sample_size": len(draws[-1].units), "inspected": len(inspected), "nonconforming": len(failed)}

    # --- suppliers and switching --------------------------------------------------------------
    #
    # The switching rules (inspector.stats.switching) run over the lots of one
    # supplier and product. The sequence is the lots' decisions in the order
    # they were recorded (a lot takes its place at its first decision, with the
    # outcome of its latest decision, so a re-decision after a correction
    # replaces the outcome without reordering), with the corrective actions
    # recorded for that supplier and product in between. Lots not decided yet
    # (or back to inspecting after a correction withdrew an early rejection) do
    # not count. Resubmitted lots are passed on marked as such; the rules skip
    # them.

    @staticmethod
    def _check_resubmission(reader: Reader, earlier_id: str, *, supplier: str, product: str) -> None:
        """A resubmission names a rejected lot of the same supplier and product.

        Resubmitted lots do not count in the switching rules, so marking a lot
        as one must not be a way to keep it out of them: the earlier lot must
        exist, come from the same supplier and product, and have been rejected.
        """
        earlier = reader.lot(earlier_id)
        if earlier is None:
            raise WorkflowError("resubmission_of", f"resubmission_of: no lot {earlier_id!r} is registered")
        if earlier.supplier != supplier or earlier.product != product:
            raise WorkflowError("resubmission_of", f"resubmission_of: lot {earlier_id} is {earlier.product} from "
                                                   f"{earlier.supplier}, not {product} from {supplier}")
        decisions = reader.decisions(earlier_id)
        if not decisions:
            problem = f"has no decision (it is {_what(earlier.state)})"
        elif decisions[-1].decision != "reject":
            problem = "was accepted"
        elif earlier.state not in _RESUBMITTABLE_STATES:
            problem = f"is {_what(earlier.state)}"
        else:
            return
        raise WorkflowError("resubmission_of", f"resubmission_of: lot {earlier_id} {problem}; only a rejected lot "
                                               "that was not released can be resubmitted")

    @staticmethod
    def _products_of(reader: Reader, supplier: str) -> list[str]:
        """The supplier's products, in the order of their first lot."""
        out: list[str] = []
        for lot in reader.lots(supplier=supplier):
            if lot.product not in out:
                out.append(lot.product)
        return out

    def _supplier_and_product(self, reader: Reader, supplier: Any, product: Any, action: str,
                              *, need_one: bool) -> tuple[str, list[str]]:
        """Check the supplier (and product) named; return the supplier and the
        products meant: the one named, else every product of the supplier (or,
        with ``need_one``, its only product)."""
        supplier = _text(supplier, "supplier", limit=200)
        product = _text(product, "product", required=False, limit=200)
        if reader.supplier(supplier) is None:
            known = [s.name for s in reader.suppliers()]
            hint = f" (registered: {', '.join(known[:6])}{' ...' if len(known) > 6 else ''})" if known else ""
            raise WorkflowError("supplier", f"supplier: no supplier called {supplier!r} is registered{hint}")
        products = self._products_of(reader, supplier)
        if product is not None:
            if product not in products:
                listing = f" (its products: {'; '.join(products)})" if products else ""
                raise WorkflowError("product", f"product: {supplier} has no lots of {product!r}{listing}")
            return supplier, [product]
        if need_one and len(products) != 1:
            if not products:
                raise WorkflowError("supplier", f"supplier: {supplier} has no lots recorded; {action} needs one")
            raise WorkflowError("product", f"product: {supplier} ships several products ({'; '.join(products)}); "
                                           f"say which one {action} is for")
        return supplier, products

    def _supplier_lots(self, reader: Reader, supplier: str, product: str) -> "_SupplierLots":
        """The switching state of one supplier and product from the record."""
        from inspector.stats.switching import CorrectiveAction, LotOutcome, switching_state

        every = reader.lots(supplier=supplier)
        product_of = {lot.lot_id: lot.product for lot in every}
        timeline: list[tuple[int, str, Any, Any]] = []
        undecided = []
        for lot in every:
            if lot.product != product:
                continue
            decisions = reader.decisions(lot.lot_id)
            if decisions and lot.state in _DECIDED_STATES:
                timeline.append((decisions[0].id, "lot", lot, decisions[-1]))
            else:
                undecided.append(lot)
        for action in reader.corrective_actions(supplier):
            # An action tied to no lot was recorded for the supplier as a whole.
            if action.lot_id is None or product_of.get(action.lot_id) == product:
                timeline.append((action.id, "action", action, None))
        timeline.sort(key=lambda item: item[0])
        events = []
        for _, kind, item, last in timeline:
            if kind == "lot":
                events.append(LotOutcome(lot_id=item.lot_id, accepted=last.decision == "accept",
                                         resubmitted=item.resubmission_of is not None))
            else:
                events.append(CorrectiveAction(note=item.description, by=item.by or ""))
        result = switching_state(events)
        return _SupplierLots(supplier=supplier, product=product, timeline=tuple(timeline),
                             undecided=tuple(undecided), result=result)

    @staticmethod
    def _switching_record(state: "_SupplierLots") -> dict:
        """The switching state as stored with a plan: the severity in force when
        the lot was planned, and why."""
        result = state.result
        return {
            "supplier": state.supplier,
            "product": state.product,
            "severity": result.severity,
            "reduced_eligible": result.reduced_eligible,
            "reason": result.reason,
            "lots_counted": sum(1 for step in result.lots if step.counted),
        }

    @staticmethod
    def _discontinued_refusal(state: "_SupplierLots") -> WorkflowError:
        from inspector.stats.switching import REJECTIONS_TO_DISCONTINUE

        last = [step.lot_id for step in state.result.lots if step.note.startswith("inspection discontinued")]
        after = f", the last lot {last[-1]}" if last else ""
        return WorkflowError(
            "lot",
            f"lot plan: inspection of {state.product} from {state.supplier} is discontinued after "
            f"{REJECTIONS_TO_DISCONTINUE} lots not accepted on tightened{after}; record corrective action with "
            "`inspector supplier action` (inspection then resumes on tightened)")

    def switching_for_lot(self, lot_id: str) -> dict:
        """The switching state of the lot's supplier and product as it stands
        now: the severity a table plan for this lot would use, and why."""
        with self.store.reading() as r:
            data = self._load(r, lot_id, "switching")
            state = self._supplier_lots(r, data.lot.supplier, data.lot.product)
        return self._switching_record(state)

    def supplier_history(self, supplier: str, *, product: str | None = None) -> dict:
        """A supplier's lots (of one product, or of each), each with its outcome
        and the severity in force for it, and the severity now with the reason.

        ``products`` holds each product's own state (severity,
        reduced_eligible, reason); with several products and none named, the
        top-level ``severity`` is the strictest of them, ``reduced_eligible``
        holds only when it holds for every product, and ``lots`` and
        ``corrective_actions`` list those of every product (each names its
        product).
        """
        with self.store.reading() as r:
            supplier, products = self._supplier_and_product(r, supplier, product, "history", need_one=False)
            sections = [self._history_section(r, supplier, name) for name in products]
        if not sections:
            from inspector.stats.switching import switching_state

            empty = switching_state([])
            return {"supplier": supplier, "product": None, "severity": empty.severity, "reduced_eligible": False,
                    "reason": empty.reason, "lots": [], "corrective_actions": [], "products": [], "cautions": []}
        order = ("normal", "tightened", "discontinued")
        strictest = max(sections, key=lambda sec: order.index(sec["severity"]))
        one = len(sections) == 1
        lots = [lot for sec in sections for lot in sec["lots"]]
        cautions = [ADVISORY] if any(lot["critical"] for lot in lots) else []
        return {
            "supplier": supplier,
            "product": sections[0]["product"] if one else None,
            "severity": strictest["severity"],
            "reduced_eligible": all(sec["reduced_eligible"] for sec in sections),
            "reason": sections[0]["reason"] if one else " ".join(
                f"{sec['product']}: {sec['reason']}" for sec in sections),
            "lots": lots,
            "corrective_actions": [a for sec in sections for a in sec["corrective_actions"]],
            "products": [{k: sec[k] for k in ("product", "severity", "reduced_eligible", "reason")}
                         for sec in sections],
            "cautions": cautions,
        }

    def _history_section(self, reader: Reader, supplier: str, product: str) -> dict:
        state = self._supplier_lots(reader, supplier, product)
        steps = iter(state.result.lots)  # one step per lot event, in the same order
        lots: list[dict] = []
        actions: list[dict] = []
        for _, kind, item, last in state.timeline:
            if kind == "lot":
                lots.append(self._history_lot(reader, item, last, next(steps)))
            else:
                actions.append({"entry": item.id, "product": product, "note": item.description, "by": item.by,
                                "at": item.recorded_at, "lot": item.lot_id,
                                "after_lot": lots[-1]["lot_id"] if lots else None})
        for lot in state.undecided:
            lots.append(self._history_lot(reader, lot, None, None))
        result = state.result
        return {"supplier": supplier, "product": product, "severity": result.severity,
                "reduced_eligible": result.reduced_eligible, "reason": result.reason, "lots": lots,
                "corrective_actions": actions}

    def _history_lot(self, reader: Reader, lot, last, step) -> dict:
        data = self._load(reader, lot.lot_id, "history")
        tallies = self._tallies(data)
        effective = [res for (unit, cls), res in self._effective(data.results).items() if cls in data.plans]
        planned = None
        classes = {}
        for cls, plan in data.plans.items():
            recorded = (plan.details or {}).get("switching") or {}
            if recorded.get("severity") is not None:
                planned = recorded["severity"]  # the latest plan's, in class order
            t = tallies[cls]
            classes[cls] = {"chosen_by": plan.chosen_by, "severity": plan.severity, "aql": plan.aql,
                            "sample_size": plan.sample_size, "accept": plan.accept, "reject": plan.reject,
                            "inspected": t.inspected, "nonconforming": t.nonconforming, "verdict": t.verdict}
        if data.draw is not None:
            sample_size = data.draw.sample_size
        elif data.plans:
            sample_size = max(p.sample_size for p in data.plans.values())
        else:
            sample_size = None
        return {
            "lot_id": lot.lot_id,
            "product": lot.product,
            "received_on": lot.received_on,
            "state": lot.state,
            "critical": lot.critical,
            "decision": None if last is None else last.decision,
            "decision_entry": None if last is None else last.id,
            "resubmission": lot.resubmission_of is not None,
            "resubmission_of": lot.resubmission_of,
            "severity": None if step is None else step.severity,
            "planned_severity": planned,
            "counted": False if step is None else step.counted,
            "note": "not decided: not counted" if step is None else step.note,
            "nonconforming": len({res.unit for res in effective if res.outcome == "fail"}),
            "inspected": len({res.unit for res in effective}),
            "sample_size": sample_size,
            "classes": classes,
        }

    def record_corrective_action(self, supplier: str, *, note: str, by: str, product: str | None = None) -> dict:
        """Record corrective action for a supplier and product (the product may
        be left out when the supplier has lots of one product only).

        When inspection of that supplier and product is discontinued, the
        action lets it resume on tightened; otherwise it is kept on record and
        changes nothing in the switching state. The entry is tied to the lot
        that discontinued inspection (else the latest decided, else the latest
        registered lot of that product), which is how its product is known.
        """
        note = _text(note, "note")
        with self.store.transaction() as tx:
            supplier_name, (product_name,) = self._supplier_and_product(
                tx, supplier, product, "the corrective action", need_one=True)
            person = self._person(tx, by)
            before = self._supplier_lots(tx, supplier_name, product_name)
            decided = [item for _, kind, item, _ in before.timeline if kind == "lot"]
            stopping = [step.lot_id for step in before.result.lots if step.note.startswith("inspection discontinued")]
            if before.result.severity == "discontinued" and stopping:
                link = stopping[-1]
            elif decided:
                link = decided[-1].lot_id
            else:
                link = before.undecided[-1].lot_id
            entry = tx.add_corrective_action(supplier_id=tx.supplier(supplier_name).id, description=note,
                                             lot_id=link, by_person=person.id)
            recorded = [c for c in tx.corrective_actions(supplier_name) if c.id == entry][0]
            after = self._supplier_lots(tx, supplier_name, product_name)
        return {
            "entry": entry,
            "supplier": supplier_name,
            "product": product_name,
            "lot": link,
            "note": note,
            "by": person.name,
            "at": recorded.recorded_at,
            "severity_before": before.result.severity,
            "severity": after.result.severity,
            "lifted": before.result.severity == "discontinued" and after.result.severity != "discontinued",
            "reduced_eligible": after.result.reduced_eligible,
            "reason": after.result.reason,
        }

    # --- internal: load and tally -------------------------------------------------------------

    def _load(self, reader: Reader, lot_id: Any, action: str) -> _LotData:
        lot_id = _text(lot_id, "id", limit=100)
        lot = reader.lot(lot_id)
        if lot is None:
            raise WorkflowError("id", f"{action}: no lot {lot_id!r} is registered")
        plans: dict = {}
        for plan in reader.plans(lot_id):
            plans[plan.defect_class] = plan  # the latest plan of a class is the current one
        draws = reader.draws(lot_id)
        return _LotData(
            lot=lot,
            state=lot.state,
            plans={k: plans[k] for k in CLASSES if k in plans},
            draw=draws[-1] if draws else None,
            substitutes=reader.substitutes(lot_id),
            results=self._results(reader, lot.lot_id),
            decisions=reader.decisions(lot_id),
            dispositions=reader.dispositions(lot_id),
            signatures=reader.signatures(lot_id),
        )

    @staticmethod
    def _class_samples(data: _LotData) -> dict[str, list[int]]:
        """Each class's sample, substitutions applied in the order recorded."""
        if data.draw is None:
            return {}
        samples = {k: list(v["units"]) for k, v in data.draw.details["class_samples"].items()}
        for sub in data.substitutes:
            for units in samples.values():
                units[:] = [sub.substitute if u == sub.unit else u for u in units]
        return {k: sorted(v) for k, v in samples.items()}

    @staticmethod
    def _effective(results: Sequence) -> dict[tuple[int, str], Any]:
        """The latest entry per (unit, class): corrections supersede."""
        out: dict[tuple[int, str], Any] = {}
        for result in results:  # in entry order
            out[(result.unit, result.defect_class)] = result
        return out

    def _tallies(self, data: _LotData) -> dict[str, ClassTally]:
        samples = self._class_samples(data)
        effective = self._effective(data.results)
        out = {}
        for cls, plan in data.plans.items():
            units = samples.get(cls, [])
            inspected = [effective[(u, cls)] for u in units if (u, cls) in effective]
            seen = {r.unit for r in inspected}
            out[cls] = ClassTally(
                defect_class=cls,
                plan_id=plan.id,
                sample_size=plan.sample_size,
                accept=plan.accept,
                reject=plan.reject,
                sample_units=tuple(units),
                inspected=len(inspected),
                nonconforming=sum(1 for r in inspected if r.outcome == "fail"),
                open_units=tuple(u for u in units if u not in seen),
                result_ids=tuple(sorted(r.id for r in inspected)),
            )
        return out

    @staticmethod
    def _computed_decision(tallies: dict[str, ClassTally]) -> str | None:
        verdicts = [t.verdict for t in tallies.values()]
        if not verdicts:
            return None
        if "reject" in verdicts:
            return "reject"
        if all(v == "accept" for v in verdicts):
            return "accept"
        return None

    def _estimates(self, data: _LotData, tallies: dict[str, ClassTally], curtailed: bool) -> dict:
        from inspector.stats.estimate import estimate_defectives, evidence

        out = {}
        N = data.lot.quantity
        for cls, t in tallies.items():
            if t.inspected == 0:
                out[cls] = None
                continue
            e = estimate_defectives(lot_size=N, sample_size=t.inspected, found=t.nonconforming)
            item = {
                "sample_size": t.inspected,
                "found": t.nonconforming,
                **e.bounds(),
                "curtailed": curtailed and not t.complete,
                "label": CURTAILED_LABEL if curtailed and not t.complete else None,
            }
            plan = data.plans[cls]
            if plan.aql is not None and plan.rql is not None:
                ev = evidence(lot_size=N, sample_size=t.inspected, found=t.nonconforming,
                              aql=Fraction(Decimal(plan.aql)), rql=Fraction(Decimal(plan.rql)))
                item["evidence"] = {"p_value_at_aql": ev.p_value_at_aql, "p_value_at_rql": ev.p_value_at_rql,
                                    "reading": ev.reading}
            out[cls] = item
        return out

    def _decide_in(self, tx: Transaction, data: _LotData, tallies: dict[str, ClassTally], *,
                   by_person: int | None, why: str) -> dict:
        """Record the computed decision (and the state change) in ``tx``."""
        decision = self._computed_decision(tallies)
        assert decision is not None
        curtailed = decision == "reject" and any(not t.complete for t in tallies.values())
        evidence = {
            "rule": "reject when a class reaches its rejection number; accept when every class's "
                    "sample is complete within its acceptance number",
            "why": why,
            "classes": {k: t.to_dict() for k, t in tallies.items()},
            "result_entries": sorted({i for t in tallies.values() for i in t.result_ids}),
            "curtailed": curtailed,
            "estimates": self._estimates(data, tallies, curtailed),
        }
        entry = tx.add_decision(lot_id=data.lot.lot_id, decision=decision, curtailed=curtailed,
                                evidence=evidence, by_person=by_person)
        if data.state in ("drawn", "inspecting"):
            self._transition(tx, data.lot.lot_id, data.state, "decided", by_person=by_person,
                             detail={"decision": decision, "curtailed": curtailed, "decision_entry": entry})
        return {"entry": entry, "decision": decision, "curtailed": curtailed, "evidence": evidence}

    def _transition(self, tx: Transaction, lot_id: str, old: str | None, new: str, *,
                    by_person: int | None = None, detail: Any = None) -> int:
        if new not in TRANSITIONS.get(old, ()):
            raise WorkflowError("lot", f"lot {lot_id}: cannot go from {_what(old)} to {new}")
        return tx.add_event(lot_id=lot_id, kind="state", from_state=old, to_state=new, detail=detail,
                            by_person=by_person)

    # --- plan -----------------------------------------------------------------------------------

    def plan(
        self,
        lot_id: str,
        *,
        defect_class: str = "major",
        aql: Any = None,
        rql: Any = None,
        producer_risk: Any = "0.05",
        consumer_risk: Any = "0.10",
        sample: int | None = None,
        accept: int | None = None,
        level: str | None = None,
        severity: str | None = None,
        by: str | None = None,
        table: bool = False,
    ) -> dict:
        """Set the plan of one defect class: designed from AQL/RQL and the risks
        at the actual lot size; typed as n and c (its risks are computed); or
        looked up in the code-letter tables (``table=True``, or ``level`` or
        ``severity`` given) from the AQL and ``level`` (default II), with its
        exact risks at this lot size beside it.

        A table plan uses the severity the switching rules give for the lot's
        supplier and product now (see :meth:`supplier_history`); ``severity``
        enters one by hand instead, and the plan records it as entered, beside
        the severity the rules give. While inspection of that supplier and
        product is discontinued, table plans are refused until corrective
        action is recorded (:meth:`record_corrective_action`). Every plan
        records the switching state in force when it was set.

        Allowed while the lot is registered or planned (before the draw); a new
        plan for a class replaces the earlier one, which stays in the record.
        """
        from inspector.stats import plans as stats_plans
        from inspector.stats.design import design_plan

        if defect_class not in CLASSES:
            raise WorkflowError("class", f"class: expected critical, major or minor, got {defect_class!r}")
        if not isinstance(table, bool):
            raise WorkflowError("table", f"table: expected true or false, got {table!r}")
        table_route = table or level is not None or severity is not None
        if table_route:
            if rql is not None or sample is not None or accept is not None:
                raise WorkflowError("level", "level: a table plan takes --aql with --level/--severity only "
                                             "(no --rql, --sample or --accept)")
            if aql is None:
                raise WorkflowError("aql", "aql: a table plan needs the AQL")
        risk_route = not table_route and (aql is not None or rql is not None)
        typed_route = sample is not None or accept is not None
        if not table_route and risk_route == typed_route:
            raise WorkflowError("plan", "plan: give either --aql and --rql, or --sample and --accept")
        with self.store.reading() as r:
            data = self._load(r, lot_id, "lot plan")
            switching = self._supplier_lots(r, data.lot.supplier, data.lot.product) if table_route else None
        N = data.lot.quantity
        if data.state not in ("registered", "planned"):
            raise WorkflowError("lot", f"lot plan: lot {data.lot.lot_id} is {data.state}; plans are set before the draw")
        if table_route:
            from inspector.stats.table_risks import table_plan_risks
            from inspector.stats.tables import TableError, lookup_plan

            by_rules = switching.result.severity
            if by_rules == "discontinued":
                raise self._discontinued_refusal(switching)
            used = by_rules if severity is None else severity
            try:
                tp = lookup_plan(lot_size=N, aql=aql, level=level or "II", severity=used)
                risks = table_plan_risks(tp)
            except TableError as exc:
                raise WorkflowError(exc.field, str(exc) if str(exc).startswith(exc.field)
                                    else f"{exc.field}: {exc}") from None
            except ValueError as exc:
                raise WorkflowError("aql", f"aql: {exc}") from None
            n, c = tp.sample_size, tp.acceptance_number
            if tp.rejection_number != c + 1:  # single plans of Tables II-A/II-B have Re = Ac + 1
                raise WorkflowError("level", f"level: the table gives Ac {c}, Re {tp.rejection_number}; only "
                                             "plans with Re = Ac + 1 are supported")
            if severity is None:
                how = (f"Severity {tp.severity} from the switching rules over the recorded lots of "
                       f"{data.lot.product} from {data.lot.supplier}.")
            else:
                how = (f"Severity {tp.severity} entered by hand; the switching rules give {by_rules} for "
                       f"{data.lot.product} from {data.lot.supplier}.")
            severity_notes = [how]
            if switching.result.reduced_eligible:
                severity_notes.append(
                    "The supplier is eligible for reduced inspection; no reduced table is given here, so the "
                    "normal plan is used (a reduced plan is used only when a responsible person enters it).")
            details = {
                "model": "code-letter table (MIL-STD-105E Tables I, II-A/II-B); exact risks at the lot size beside it",
                "lot_size": N,
                "full_inspection": tp.full_inspection,
                "table": "Table II-A (normal)" if tp.severity == "normal" else "Table II-B (tightened)",
                "severity_source": "switching rules" if severity is None else "entered",
                "severity_by_rules": by_rules,
                "code_letter": tp.code_letter,
                "plan_letter": tp.plan_letter,
                "table_sample_size": tp.table_sample_size,
                "provenance": tp.provenance,
                "sources": list(tp.sources),
                "notes": severity_notes + list(tp.notes) + list(risks.notes),
                "pa_at_aql_lot": risks.pa_at_aql_lot,
                "pa_at_aql_process": risks.pa_at_aql_process,
                "rql_at_consumer_risk_lot": risks.rql_at_consumer_risk_lot,
                "rql_at_consumer_risk_process": risks.rql_at_consumer_risk_process,
                "differ_materially": risks.differ_materially,
            }
            chosen_by = "table"
            stored = {"aql": tp.aql, "level": tp.level, "severity": tp.severity}
        elif risk_route:
            if aql is None or rql is None:
                raise WorkflowError("aql" if aql is None else "rql", "plan: --aql and --rql go together")
            a, r_, alpha, beta = (_fraction(aql, "aql"), _fraction(rql, "rql"),
                                  _fraction(producer_risk, "producer_risk"), _fraction(consumer_risk, "consumer_risk"))
            if not 0 <= a < 100:
                raise WorkflowError("aql", f"aql: expected a percentage from 0 to below 100, got {_decimal_text(a)}")
            if not 0 < r_ <= 100:
                raise WorkflowError("rql", f"rql: expected a percentage above 0 up to 100, got {_decimal_text(r_)}")
            if a >= r_:
                raise WorkflowError("aql", f"aql: {_decimal_text(a)} must be below rql {_decimal_text(r_)}")
            for name, v in (("producer_risk", alpha), ("consumer_risk", beta)):
                if not 0 < v < 1:
                    raise WorkflowError(name, f"{name}: expected a number strictly between 0 and 1, got {_decimal_text(v)}")
            try:
                d = design_plan(lot_size=N, aql=a, rql=r_, producer_risk=alpha, consumer_risk=beta, model="lot")
            except ValueError as exc:
                raise WorkflowError("plan", f"plan: {exc}") from None
            n, c = d.sample_size, d.acceptance_number
            details = {
                "model": "lot (hypergeometric, exact at the actual lot size)",
                "lot_size": N,
                "full_inspection": d.full_inspection,
                "defectives_at_aql": d.defectives_at_aql,
                "defectives_at_rql": d.defectives_at_rql,
                "pa_at_aql": d.pa_at_aql,
                "pa_at_rql": d.pa_at_rql,
                "producer_risk_actual": 1 - d.pa_at_aql,
                "consumer_risk_actual": d.pa_at_rql,
                "aoql": d.aoql,
                "aoql_at_defectives": int(d.aoql_at),
                "ati_at_aql": d.ati_at_aql,
                "ati_at_rql": d.ati_at_rql,
            }
            chosen_by = "risk"
            stored = {name: _decimal_text(typed if isinstance(typed, str) else exact)
                      for name, typed, exact in (("aql", aql, a), ("rql", rql, r_),
                                                 ("producer_risk", producer_risk, alpha),
                                                 ("consumer_risk", consumer_risk, beta))}
        else:
            if sample is None or accept is None:
                raise WorkflowError("sample" if sample is None else "accept", "plan: --sample and --accept go together")
            for name, v, low in (("sample", sample, 1), ("accept", accept, 0)):
                if isinstance(v, bool) or not isinstance(v, int) or v < low:
                    raise WorkflowError(name, f"{name}: expected a whole number of at least {low}, got {v!r}")
            if sample > N:
                raise WorkflowError("sample", f"sample: {sample} is more than the lot's {N} units")
            if accept >= sample:
                raise WorkflowError("accept", f"accept: {accept} must be below the sample size {sample}")
            n, c = sample, accept
            own_aql = stats_plans.aql_lot(N, n, c, Fraction(95, 100))
            own_rql = stats_plans.rql_lot(N, n, c, Fraction(10, 100))
            aoql, aoql_at = stats_plans.aoql_lot(N, n, c)
            details = {
                "model": "lot (hypergeometric, exact at the actual lot size)",
                "lot_size": N,
                "full_inspection": n == N,
                "defectives_accepted_95": own_aql,
                "fraction_accepted_95": own_aql / N,
                "defectives_rejected_90": own_rql,
                "fraction_rejected_90": None if own_rql is None else own_rql / N,
                "aoql": aoql,
                "aoql_at_defectives": int(aoql_at),
                "reading": (
                    f"accepts a lot with up to {own_aql} nonconforming units at least 95 % of the time"
                    + (f"; accepts a lot with {own_rql} or more at most 10 % of the time" if own_rql is not None else "")
                ),
            }
            chosen_by = "typed"
            stored = {}
        if defect_class == "critical":
            details["caution"] = CRITICAL_CAUTION
        with self.store.transaction() as tx:
            data = self._load(tx, lot_id, "lot plan")
            person_id = self._person(tx, by).id if by is not None else None
            if data.state not in ("registered", "planned"):
                raise WorkflowError("lot", f"lot plan: lot {data.lot.lot_id} is {data.state}; plans are set before the draw")
            now = self._supplier_lots(tx, data.lot.supplier, data.lot.product)
            if table_route and now.result.severity != switching.result.severity:
                if now.result.severity == "discontinued":
                    raise self._discontinued_refusal(now)
                raise WorkflowError("lot", f"lot plan: the switching state of {data.lot.product} from "
                                           f"{data.lot.supplier} changed meanwhile ({switching.result.severity} -> "
                                           f"{now.result.severity}); plan again")
            # The severity in force when the lot was planned, kept with the plan.
            details["switching"] = self._switching_record(now)
            entry = tx.add_plan(lot_id=data.lot.lot_id, defect_class=defect_class, chosen_by=chosen_by,
                                sample_size=n, accept=c, reject=c + 1, details=details, by_person=person_id,
                                **stored)
            self._transition(tx, data.lot.lot_id, data.state, "planned", by_person=person_id,
                             detail={"class": defect_class, "plan_entry": entry})
        return {"entry": entry, "lot": data.lot.lot_id, "class": defect_class, "chosen_by": chosen_by,
                "sample_size": n, "accept": c, "reject": c + 1, **stored, "details": details}

    # --- draw --------------------------------------------------------------------------------------

    def draw(self, lot_id: str, *, method: str = "simple", seed: int | None = None, seed_text: str | None = None,
             level: str | None = None, containers: int | None = None, by: str | None = None) -> dict:
        """Draw the sample: the largest sample size over the planned classes,
        from ``seed`` (generated from OS entropy when None, and recorded).

        A class with a smaller plan inspects a simple random subsample of the
        drawn units (see :data:`SUBSAMPLE_NOTE`); with-replacement draws are
        not offered for a lot decision (a unit would need several results).
        """
        from inspector import frame

        if method not in DRAW_METHODS:
            raise WorkflowError("method", f"method: expected one of {', '.join(DRAW_METHODS)}, got {method!r}")
        generated = seed is None
        if generated:
            seed = self._entropy()
        if isinstance(seed, bool) or not isinstance(seed, int) or seed < 0:
            raise WorkflowError("seed", f"seed: expected a whole number of at least 0, got {seed!r}")
        seed_record = seed_text.strip() if seed_text is not None else str(seed)
        with self.store.reading() as r:
            data = self._load(r, lot_id, "lot draw")
        self._check_drawable(data)
        structure = self._structure_of(data.lot)
        n = max(p.sample_size for p in data.plans.values())
        try:
            result = frame.draw(structure, n, method=method, seed=seed, by=level, containers=containers)
        except frame.FrameError as exc:
            raise _frame_refusal(exc, {"by": "level", "n": "sample"}) from None
        class_samples = {}
        for cls, plan in data.plans.items():
            if plan.sample_size == n:
                class_samples[cls] = {"sample_size": n, "units": list(result.units)}
                continue
            sub_seed = _subsample_seed(seed, cls)
            sub = frame.draw(frame.flat_lot(n), plan.sample_size, method="simple", seed=sub_seed)
            class_samples[cls] = {
                "sample_size": plan.sample_size,
                "units": sorted(result.units[pos - 1] for pos in sub.units),
                "subsample_seed": str(sub_seed),
                "subsample_algorithm": sub.algorithm,
            }
        details = {
            "frame_draw": result.to_dict(),
            "seed_generated": generated,
            "title": result.title,
            "note": result.note,
            "class_samples": class_samples,
            "subsample_note": SUBSAMPLE_NOTE if any("subsample_seed" in v for v in class_samples.values()) else None,
        }
        with self.store.transaction() as tx:
            data = self._load(tx, lot_id, "lot draw")
            person_id = self._person(tx, by).id if by is not None else None
            self._check_drawable(data)
            if max(p.sample_size for p in data.plans.values()) != n:
                raise WorkflowError("lot", f"lot draw: the plans of lot {data.lot.lot_id} changed meanwhile; draw again")
            entry = tx.add_draw(lot_id=data.lot.lot_id, method=method, seed=seed_record,
                                algorithm=result.algorithm, units=result.units, details=details,
                                by_person=person_id)
            self._transition(tx, data.lot.lot_id, data.state, "drawn", detail={"draw_entry": entry},
                             by_person=person_id)
        return {"entry": entry, "lot": data.lot.lot_id, "method": method, "seed": seed_record,
                "seed_generated": generated, "algorithm": result.algorithm, "units": list(result.units),
                "class_samples": class_samples, "note": result.note}

    @staticmethod
    def _check_drawable(data: _LotData) -> None:
        if data.state == "registered":
            raise WorkflowError("lot", f"lot draw: lot {data.lot.lot_id} has no plan yet (see lot plan)")
        if data.state != "planned":
            raise WorkflowError("lot", f"lot draw: lot {data.lot.lot_id} is {data.state}; it was drawn already")

    def pick_list(self, lot_id: str) -> dict:
        """The units to pull, in walking order, with their addresses."""
        from inspector import frame

        with self.store.reading() as r:
            data = self._load(r, lot_id, "pick list")
        if data.draw is None:
            raise WorkflowError("lot", f"pick list: lot {data.lot.lot_id} is not drawn yet")
        structure = self._structure_of(data.lot)
        picks = frame.pick_list(structure, self._frame_draw(data))
        return {
            "lot": data.lot.lot_id,
            "stops": [
                {"container": stop.container,
                 "units": [{"unit": line.unit, "address": str(line.address), "serial": line.address.serial,
                            "replaces": line.replaces, "reason": line.reason} for line in stop.lines]}
                for stop in picks.stops
            ],
            "note": picks.note,
        }

    @staticmethod
    def _frame_draw(data: _LotData):
        from dataclasses import replace

        from inspector import frame

        recorded = frame.draw_from_dict(data.draw.details["frame_draw"])
        subs = tuple(frame.Substitution(replaced=s.unit, substitute=s.substitute, reason=s.reason)
                     for s in data.substitutes)
        return replace(recorded, substitutions=subs)

    # --- substitutes -------------------------------------------------------------------------------

    def substitute(self, lot_id: str, unit: Any, *, reason: str, by: str) -> dict:
        """Replace a drawn unit that cannot be inspected by the next unit of
        the draw's substitute sequence, recording the reason."""
        from inspector import frame

        reason = _text(reason, "reason")
        with self.store.transaction() as tx:
            data = self._load(tx, lot_id, "lot substitute")
            person = self._person(tx, by)
            if data.state not in ("drawn", "inspecting"):
                raise WorkflowError("lot", f"lot substitute: lot {data.lot.lot_id} is {_what(data.state)}; "
                                           "units are substituted after the draw and before the decision")
            structure = self._structure_of(data.lot)
            number, _typed = self._resolve_unit(structure, unit, data.lot.lot_id)
            samples = self._class_samples(data)
            if not any(number in units for units in samples.values()):
                shown = f"{number}" if _typed == str(number) else f"{_typed} (unit {number})"
                raise WorkflowError("unit", f"unit: {shown} is not among the units to inspect")
            done = [r for r in data.results if r.unit == number]
            if done:
                raise WorkflowError("unit", f"unit: {number} already has a result (entry {done[0].id}); "
                                            "a unit with a result cannot be substituted")
            try:
                updated = frame.substitute(structure, self._frame_draw(data), number, reason)
            except frame.FrameError as exc:
                raise WorkflowError(exc.field, str(exc)) from None
            new = updated.substitutions[-1]
            entry = tx.add_substitute(lot_id=data.lot.lot_id, draw_id=data.draw.id, unit=number,
                                      substitute=new.substitute, reason=reason, by_person=person.id)
        return {"entry": entry, "lot": data.lot.lot_id, "unit": number, "substitute": new.substitute,
                "address": str(structure.address_of(new.substitute)), "reason": reason}

    # --- pulled marks ---------------------------------------------------------------------------
    #
    # While the sample is pulled from the load, each drawn unit is marked as
    # pulled (or the mark taken back). A mark is an event entry like any other:
    # append-only, so taking a mark back is a new entry and the latest entry
    # for a unit is its current mark.

    _PULLED_KIND = "pulled mark"

    def mark_pulled(self, lot_id: str, unit: Any, *, by: str | None = None, pulled: bool = True) -> dict:
        """Record that a drawn unit was pulled from the load (``pulled=False``
        takes the mark back). Only units to inspect of a drawn or inspecting
        lot; ``by`` names a registered person when given."""
        if not isinstance(pulled, bool):
            raise WorkflowError("pulled", f"pulled: expected true or false, got {pulled!r}")
        with self.store.transaction() as tx:
            data = self._load(tx, lot_id, "mark pulled")
            person = self._person(tx, by) if by is not None else None
            if data.state not in ("drawn", "inspecting"):
                raise WorkflowError("lot", f"mark pulled: lot {data.lot.lot_id} is {_what(data.state)}; "
                                           "units are marked as pulled after the draw and before the decision")
            structure = self._structure_of(data.lot)
            number, typed = self._resolve_unit(structure, unit, data.lot.lot_id)
            if not any(number in units for units in self._class_samples(data).values()):
                shown = f"{number}" if typed == str(number) else f"{typed} (unit {number})"
                raise WorkflowError("unit", f"unit: {shown} is not among the units to inspect")
            entry = tx.add_event(lot_id=data.lot.lot_id, kind=self._PULLED_KIND,
                                 detail={"unit": number, "pulled": pulled},
                                 by_person=person.id if person is not None else None)
        return {"entry": entry, "lot": data.lot.lot_id, "unit": number, "pulled": pulled,
                "address": str(structure.address_of(number)), "by": person.name if person is not None else None}

    def pulled_marks(self, lot_id: str) -> dict:
        """The current pulled marks of a lot: the latest mark entry per unit
        wins. ``pulled`` lists the units marked as pulled now (in unit order),
        ``marks`` the current mark of every unit ever marked."""
        with self.store.reading() as r:
            lot_id = _text(lot_id, "id", limit=100)
            if r.lot(lot_id) is None:
                raise WorkflowError("id", f"pulled marks: no lot {lot_id!r} is registered")
            events = [e for e in r.events(lot_id) if e.kind == self._PULLED_KIND]
        latest: dict[int, Any] = {}
        for event in events:  # in entry order: a later mark replaces an earlier one
            latest[event.detail["unit"]] = event
        marks = [{"unit": u, "pulled": e.detail["pulled"], "entry": e.id, "by": e.by, "at": e.recorded_at}
                 for u, e in sorted(latest.items())]
        return {"lot": lot_id, "pulled": [m["unit"] for m in marks if m["pulled"]], "marks": marks}

    # --- results -----------------------------------------------------------------------------------

    @staticmethod
    def _resolve_unit(structure, unit: Any, lot_id: str | None = None) -> tuple[int, str]:
        """(unit number, the text as entered) for a unit number, an address, a
        manifest serial, or -- with ``lot_id`` -- a unit code scanned from this
        lot's labels (``LOT:UNIT``, see ``inspector.sheets.codes``)."""
        from inspector import frame

        typed = str(unit).strip() if unit is not None else ""
        if not typed:
            raise WorkflowError("unit", f"unit: expected a unit number, address or serial, got {unit!r}")
        try:
            return structure.unit_at(unit if isinstance(unit, int) else typed), typed
        except frame.FrameError as exc:
            message = str(exc)
            if not message.startswith("unit"):
                message = f"unit: {message}"
            first = message
        if lot_id is not None and ":" in typed:
            from inspector.sheets.codes import UnitCodeError, parse_unit_code

            try:
                code = parse_unit_code(typed)
            except UnitCodeError:
                raise WorkflowError("unit", f"unit: {typed!r} is neither a unit of this lot nor a unit code "
                                            "as printed on the labels") from None
            if code.lot_id != lot_id:
                raise WorkflowError("unit", f"unit code: {typed!r} belongs to lot {code.lot_id}, "
                                            f"not to lot {lot_id}")
            try:
                return structure.check_unit(code.unit), typed
            except frame.FrameError as exc:
                raise WorkflowError("unit", f"unit code: {typed!r}: {exc}") from None
        raise WorkflowError("unit", first)

    def structure(self, lot_id: str):
        """The lot's frame structure (levels, addresses), read from its record."""
        with self.store.reading() as r:
            lot = r.lot(_text(lot_id, "id", limit=100))
        if lot is None:
            raise WorkflowError("id", f"no lot {lot_id!r} is registered")
        return self._structure_of(lot)

    def resolve_unit(self, lot_id: str, text: Any) -> ResolvedUnit:
        """Which unit of the lot ``text`` names, without recording anything:
        a unit number, an address, a manifest serial or a scanned unit code.
        Raises WorkflowError naming the text when it is no unit of this lot.
        (Whether the unit is in the sample is checked when it is recorded.)"""
        return self.resolve_in(self.structure(lot_id), lot_id, text)

    @classmethod
    def resolve_in(cls, structure, lot_id: str, text: Any) -> ResolvedUnit:
        """``resolve_unit`` on a structure already read (no store access), for
        a bench that resolves every scan as it arrives."""
        number, typed = cls._resolve_unit(structure, text, _text(lot_id, "id", limit=100))
        address = structure.address_of(number)
        if typed.isdigit():
            how = "number"
        elif address.serial is not None and address.serial == typed:
            how = "serial"
        elif ":" in typed and not typed.replace(" ", "").count("/"):
            how = "code"
        else:
            how = "address"
        return ResolvedUnit(unit=number, address=str(address), serial=address.serial, typed=typed, how=how)

    def record(self, lot_id: str, unit: Any, *, outcome: str, by: str, defect_class: str | None = None,
               defect: str | None = None, note: str | None = None) -> RecordOutcome:
        """Record one unit's result (pass or fail) in one class, or -- a pass
        without a class -- in every class whose sample holds the unit.

        When this result brings a class to its rejection number the lot is
        decided (rejected) in the same transaction.
        """
        if outcome not in ("pass", "fail"):
            raise WorkflowError("outcome", f"outcome: expected pass or fail, got {outcome!r}")
        if defect_class is not None and defect_class not in CLASSES:
            raise WorkflowError("class", f"class: expected critical, major or minor, got {defect_class!r}")
        defect = _text(defect, "defect", required=False)
        note = _text(note, "note", required=False)
        with self.store.transaction() as tx:
            data = self._load(tx, lot_id, "lot record")
            lid = data.lot.lot_id
            person = self._person(tx, by)
            if data.state in ("registered", "planned"):
                raise WorkflowError("lot", f"lot record: lot {lid} is {data.state}; draw the sample first")
            if data.state not in ("drawn", "inspecting"):
                last = data.decisions[-1] if data.decisions else None
                how = f" ({last.decision}{', early' if last and last.curtailed else ''})" if last else ""
                raise WorkflowError("lot", f"lot record: lot {lid} is {data.state}{how}; no more results can be "
                                           "added (a wrong entry is corrected with lot correct)")
            structure = self._structure_of(data.lot)
            number, typed = self._resolve_unit(structure, unit, data.lot.lot_id)
            samples = self._class_samples(data)
            holding = [k for k in data.plans if number in samples.get(k, ())]
            if not holding:
                replaced = [s for s in data.substitutes if s.unit == number]
                if replaced:
                    raise WorkflowError("unit", f"unit: {number} was replaced by substitute {replaced[-1].substitute} "
                                                f"({replaced[-1].reason}); record the substitute")
                shown = f"{number}" if typed == str(number) else f"{typed} (unit {number})"
                raise WorkflowError("unit", f"unit: {shown} is not in the sample of lot {lid}")
            if defect_class is not None:
                if defect_class not in data.plans:
                    raise WorkflowError("class", f"class: lot {lid} has no plan for {defect_class} "
                                                 f"(plans: {', '.join(data.plans)})")
                if defect_class not in holding:
                    raise WorkflowError("unit", f"unit: {number} is not in the {defect_class} sample of lot {lid}")
                classes = [defect_class]
            elif len(data.plans) == 1:
                classes = holding
            elif outcome == "pass":
                classes = holding
            else:
                raise WorkflowError("class", f"class: lot {lid} has plans for {', '.join(data.plans)}; "
                                             "say which class the failure is in (--class)")
            effective = self._effective(data.results)
            for cls in classes:
                earlier = effective.get((number, cls))
                if earlier is not None:
                    raise WorkflowError("unit", f"unit: {number} already has a {cls} result (entry {earlier.id}, "
                                                f"{earlier.outcome} by {earlier.by}); use lot correct to change it")
            entries = []
            for cls in classes:
                entries.append(tx.add_result(lot_id=lid, unit=number, defect_class=cls, outcome=outcome,
                                             by_person=person.id, defect=defect, note=note,
                                             entered_as=typed if typed != str(number) else None))
            state = data.state
            if state == "drawn":
                self._transition(tx, lid, "drawn", "inspecting", by_person=person.id)
                state = "inspecting"
            # The lot as it stands now: what was loaded plus the new entries
            # (read back by id; reloading every result would cost O(results)).
            fresh = dataclasses.replace(data, state=state,
                                        results=data.results + [tx.result(e) for e in entries])
            tallies = self._tallies(fresh)
            decision = None
            if self._computed_decision(tallies) == "reject":
                decision = self._decide_in(tx, fresh, tallies, by_person=person.id,
                                           why=f"rejection number reached with entry {entries[-1]}")
                state = "decided"
        return RecordOutcome(lot_id=lid, unit=number, entries=tuple(entries), classes=tuple(classes),
                             outcome=outcome, state=state, tallies=tallies, decision=decision)

    def correct(self, lot_id: str, unit: Any, *, outcome: str, reason: str, by: str,
                defect_class: str | None = None, defect: str | None = None, note: str | None = None) -> RecordOutcome:
        """Correct a unit's result: a new entry pointing at the one it corrects,
        with the reason. The original stays in the record.

        A correction never changes the recorded decision silently: if the lot
        was decided, :meth:`show` flags that the results changed, release is
        refused until the decision is taken again, and a signature shows
        "changed since signed". A correction that withdraws an early
        rejection returns the lot to inspecting.
        """
        if outcome not in ("pass", "fail"):
            raise WorkflowError("outcome", f"outcome: expected pass or fail, got {outcome!r}")
        if defect_class is not None and defect_class not in CLASSES:
            raise WorkflowError("class", f"class: expected critical, major or minor, got {defect_class!r}")
        reason = _text(reason, "reason")
        defect = _text(defect, "defect", required=False)
        note = _text(note, "note", required=False)
        with self.store.transaction() as tx:
            data = self._load(tx, lot_id, "lot correct")
            lid = data.lot.lot_id
            person = self._person(tx, by)
            structure = self._structure_of(data.lot)
            number, typed = self._resolve_unit(structure, unit, data.lot.lot_id)
            effective = self._effective(data.results)
            mine = {cls: r for (u, cls), r in effective.items() if u == number}
            if not mine:
                raise WorkflowError("unit", f"unit: {number} has no result in lot {lid} to correct")
            if defect_class is None:
                if len(mine) > 1:
                    raise WorkflowError("class", f"class: unit {number} has results in {', '.join(sorted(mine))}; "
                                                 "say which one to correct (--class)")
                (defect_class,) = mine
            current = mine.get(defect_class)
            if current is None:
                raise WorkflowError("class", f"class: unit {number} has no {defect_class} result to correct")
            if current.outcome == outcome and defect is None and note is None:
                raise WorkflowError("outcome", f"outcome: unit {number} is already recorded as {outcome} "
                                               f"(entry {current.id}); the correction would change nothing")
            entry = tx.add_result(lot_id=lid, unit=number, defect_class=defect_class, outcome=outcome,
                                  by_person=person.id, defect=defect, note=note, corrects=current.id,
                                  reason=reason, entered_as=typed if typed != str(number) else None)
            fresh = dataclasses.replace(data, results=data.results + [tx.result(entry)])
            tallies = self._tallies(fresh)
            computed = self._computed_decision(tallies)
            state, decision, note_out = data.state, None, None
            last = data.decisions[-1] if data.decisions else None
            if state == "inspecting" and computed == "reject":
                decision = self._decide_in(tx, fresh, tallies, by_person=person.id,
                                           why=f"rejection number reached with correction entry {entry}")
                state = "decided"
            elif state == "decided" and last is not None and last.curtailed and computed is None:
                self._transition(tx, lid, "decided", "inspecting", by_person=person.id,
                                 detail={"why": f"correction entry {entry} withdrew the early rejection "
                                                f"(decision entry {last.id})"})
                state = "inspecting"
                note_out = "the correction withdrew the early rejection: the lot is inspecting again"
            elif last is not None and computed != last.decision:
                note_out = (f"the recorded decision ({last.decision}, entry {last.id}) no longer matches the "
                            "corrected results; take the decision again with lot decide")
            if fresh.signatures:
                extra = "the lot's record changed since it was signed"
                note_out = f"{note_out}; {extra}" if note_out else extra
        return RecordOutcome(lot_id=lid, unit=number, entries=(entry,), classes=(defect_class,), outcome=outcome,
                             state=state, tallies=tallies, decision=decision, note=note_out)

    # --- decision ------------------------------------------------------------------------------------

    def decide(self, lot_id: str, *, by: str | None = None) -> dict:
        """Decide the lot from its results.

        Refused while units are open (unless a class already reached its
        rejection number, in which case the lot was decided early). On a lot
        already decided it returns the recorded decision -- unless results
        were corrected since and the computed decision differs, in which case
        the new decision is recorded (before release only).
        """
        with self.store.transaction() as tx:
            data = self._load(tx, lot_id, "lot decide")
            person_id = self._person(tx, by).id if by is not None else None
            lid = data.lot.lot_id
            tallies = self._tallies(data)
            computed = self._computed_decision(tallies)
            last = data.decisions[-1] if data.decisions else None
            if data.state in ("registered", "planned"):
                raise WorkflowError("lot", f"lot decide: lot {lid} is {data.state}; nothing is drawn yet")
            if data.state in ("drawn", "inspecting"):
                if computed is None:
                    open_units = {k: t.open_units for k, t in tallies.items() if t.open_units}
                    count = sum(len(v) for v in open_units.values())
                    listing = "; ".join(f"{k}: {', '.join(map(str, v[:8]))}{' ...' if len(v) > 8 else ''}"
                                        for k, v in open_units.items())
                    raise WorkflowError("lot", f"lot decide: lot {lid} still has {count} open unit"
                                               f"{'s' if count != 1 else ''} ({listing})")
                return self._decide_in(tx, data, tallies, by_person=person_id, why="every sampled unit inspected")
            # decided, on hold, released, rejected
            if last is not None and (computed == last.decision or computed is None
                                     or data.state in TERMINAL):
                return {"entry": last.id, "decision": last.decision, "curtailed": last.curtailed,
                        "evidence": last.evidence, "already": True,
                        "matches_results": computed == last.decision}
            return {**self._decide_in(tx, data, tallies, by_person=person_id,
                                      why=f"results corrected after decision entry {last.id if last else '-'}"),
                    "redecided": True}

    # --- dispositions and release -----------------------------------------------------------------------

    def hold(self, lot_id: str, *, reason: str, by: str) -> dict:
        """Put a decided lot on hold, with the reason (this is also the
        documented disposition a rejected lot needs before it can be released)."""
        reason = _text(reason, "reason")
        with self.store.transaction() as tx:
            data = self._load(tx, lot_id, "lot hold")
            person = self._person(tx, by)
            if data.state != "decided":
                raise WorkflowError("lot", f"lot hold: lot {data.lot.lot_id} is {_what(data.state)}; "
                                           "only a decided lot can be put on hold")
            entry = tx.add_disposition(lot_id=data.lot.lot_id, disposition="hold", reason=reason, by_person=person.id)
            self._transition(tx, data.lot.lot_id, "decided", "on hold", by_person=person.id,
                             detail={"disposition_entry": entry})
        return {"entry": entry, "lot": data.lot.lot_id, "state": "on hold", "reason": reason, "by": person.name}

    def reject(self, lot_id: str, *, reason: str, by: str) -> dict:
        """Reject a decided or held lot (return to supplier, scrap ...), with the reason."""
        reason = _text(reason, "reason")
        with self.store.transaction() as tx:
            data = self._load(tx, lot_id, "lot reject")
            person = self._person(tx, by)
            if data.state not in ("decided", "on hold"):
                raise WorkflowError("lot", f"lot reject: lot {data.lot.lot_id} is {_what(data.state)}; "
                                           "only a decided or held lot can be rejected")
            entry = tx.add_disposition(lot_id=data.lot.lot_id, disposition="reject", reason=reason,
                                       by_person=person.id)
            self._transition(tx, data.lot.lot_id, data.state, "rejected", by_person=person.id,
                             detail={"disposition_entry": entry})
        return {"entry": entry, "lot": data.lot.lot_id, "state": "rejected", "reason": reason, "by": person.name}

    def _release_blocker(self, data: _LotData) -> str | None:
        lid = data.lot.lot_id
        if data.state not in ("decided", "on hold"):
            return f"lot release: lot {lid} is {_what(data.state)}; only a decided or held lot can be released"
        last = data.decisions[-1] if data.decisions else None
        if last is None:
            return f"lot release: lot {lid} has no decision"
        computed = self._computed_decision(self._tallies(data))
        if computed != last.decision:
            return (f"lot release: results of lot {lid} were corrected after the decision (entry {last.id}); "
                    "take the decision again with lot decide")
        if last.decision == "reject":
            holds = [d for d in data.dispositions if d.disposition == "hold"]
            if data.state != "on hold" or not holds:
                return (f"lot release: lot {lid} was rejected (decision entry {last.id}); releasing it needs a "
                        "documented disposition first (lot hold with the reason)")
        return None

    def release(self, lot_id: str, *, by: str, meaning: str, secret: str) -> dict:
        """Release the lot with an approver's signature.

        Checks first (nothing written when refused): the state, an accepted
        decision that still matches the results or a documented disposition of
        a rejected lot, and the meaning. Then the approver's secret: an unknown
        name, a person who is not an approver, or a wrong secret refuses the
        release and is recorded as a failed attempt.
        """
        meaning = _text(meaning, "meaning", limit=200)
        name = _text(by, "by", limit=200)
        with self.store.reading() as r:
            data = self._load(r, lot_id, "lot release")
            blocker = self._release_blocker(data)
            if blocker:
                raise WorkflowError("lot", blocker)
            # The slow hash runs outside the write lock: people are never changed,
            # so the answer cannot go stale.
            person, secret_ok = r.authenticate(name, secret if isinstance(secret, str) else "")
        problem = None
        if person is None:
            problem = f"no person called {name!r} is registered"
        elif person.role != "approver":
            problem = f"{person.name} is an {person.role}, not an approver"
        elif not secret_ok:
            problem = f"wrong secret for {person.name}"
        lid = data.lot.lot_id
        if problem is not None:
            with self.store.transaction() as tx:
                tx.add_failed_attempt(lot_id=lid, action="release", name_given=name,
                                      person_id=person.id if person else None, problem=problem)
            raise WorkflowError("by", f"lot release: refused, {problem}; the failed attempt is recorded")
        with self.store.transaction() as tx:
            data = self._load(tx, lid, "lot release")
            blocker = self._release_blocker(data)
            if blocker:
                raise WorkflowError("lot", blocker)
            last = data.decisions[-1]
            reason = None if last.decision == "accept" else (
                f"rejected lot released on the documented disposition (hold entry "
                f"{[d for d in data.dispositions if d.disposition == 'hold'][-1].id})")
            disposition = tx.add_disposition(lot_id=lid, disposition="release", reason=reason, by_person=person.id)
            record_hash = tx.record_hash(lid)
            signature = tx.add_signature(lot_id=lid, person_id=person.id, printed_name=person.name,
                                         meaning=meaning, record_hash=record_hash)
            self._transition(tx, lid, data.state, "released", by_person=person.id,
                             detail={"signature_entry": signature, "disposition_entry": disposition})
            signed = tx.signatures(lid)[-1]
        return {"lot": lid, "state": "released", "signature": self._signature_dict(signed, record_hash),
                "disposition_entry": disposition}

    @staticmethod
    def _signature_dict(sig, current_hash: str) -> dict:
        return {"entry": sig.id, "printed_name": sig.printed_name, "meaning": sig.meaning, "at": sig.recorded_at,
                "record_hash": sig.record_hash, "changed_since_signed": sig.record_hash != current_hash}

    # --- reading the record -------------------------------------------------------------------------------

    def show(self, lot_id: str) -> dict:
        """Everything about the lot, JSON-ready: identity, state, plans, the
        draw, every result entry (corrections included), the tally against
        Ac/Re per class, the decision, the estimate, dispositions and
        signatures (with "changed since signed")."""
        from inspector import frame

        with self.store.reading() as r:
            data = self._load(r, lot_id, "lot show")
            record_hash = r.record_hash(data.lot.lot_id)
            failed = r.failed_attempts(data.lot.lot_id)
            events = r.events(data.lot.lot_id)
        lot = data.lot
        structure = self._structure_of(lot)
        tallies = self._tallies(data)
        samples = self._class_samples(data)
        sample_units = sorted({u for units in samples.values() for u in units})
        last = data.decisions[-1] if data.decisions else None
        computed = self._computed_decision(tallies)
        curtailed = bool(last and last.curtailed)
        estimates = self._estimates(data, tallies, curtailed) if data.draw is not None and data.results else {}
        draw = None
        if data.draw is not None:
            verification = frame.verify(structure, self._frame_draw(data))
            frame_draw = data.draw.details.get("frame_draw") or {}
            draw = {
                "entry": data.draw.id,
                "method": data.draw.method,
                "seed": data.draw.seed,
                "algorithm": data.draw.algorithm,
                "sample_size": data.draw.sample_size,
                "units": list(data.draw.units),
                "at": data.draw.recorded_at,
                "note": data.draw.details.get("note"),
                "subsample_note": data.draw.details.get("subsample_note"),
                "title": data.draw.details.get("title"),
                # what a re-derivation needs beyond method, n and seed
                "level": frame_draw.get("level"),
                "container_count": frame_draw.get("container_count"),
                "per_container": frame_draw.get("per_container"),
                "containers": frame_draw.get("containers"),
                "frame": frame_draw.get("frame"),
                "class_samples": data.draw.details.get("class_samples"),
                "rederived": verification.ok,
                "substitutes": [{"entry": s.id, "unit": s.unit, "substitute": s.substitute, "reason": s.reason,
                                 "by": s.by, "at": s.recorded_at} for s in data.substitutes],
            }
        effective_ids = {r.id for r in self._effective(data.results).values()}
        results = []
        for res in data.results:
            item = {
                "entry": res.id,
                "unit": res.unit,
                "address": str(structure.address_of(res.unit)),
                "outcome": res.outcome,
                "class": res.defect_class,
                "defect": res.defect,
                "note": res.note,
                "entered_as": res.entered_as,
                "by": res.by,
                "at": res.recorded_at,
                "current": res.id in effective_ids,
            }
            if res.corrects is not None:
                item["corrects"] = res.corrects
                item["reason"] = res.reason
            results.append(item)
        signatures = [self._signature_dict(s, record_hash) for s in data.signatures]
        plans = {
            k: {"entry": p.id, "chosen_by": p.chosen_by, "sample_size": p.sample_size, "accept": p.accept,
                "reject": p.reject, "aql": p.aql, "rql": p.rql, "producer_risk": p.producer_risk,
                "consumer_risk": p.consumer_risk, "level": p.level, "severity": p.severity,
                "details": p.details, "at": p.recorded_at,
                "no_allowance": p.accept == 0,
                "allowance": _allowance(k, p.accept, p.reject)}
            for k, p in data.plans.items()
        }
        cautions = [SAMPLING_CAUTION]
        if lot.critical:
            cautions.insert(0, ADVISORY)
        return {
            "id": lot.lot_id,
            "entry": lot.id,
            "state": data.state,
            "supplier": lot.supplier,
            "product": lot.product,
            "reference": lot.reference,
            "size": lot.quantity,
            "received_on": lot.received_on,
            "critical": lot.critical,
            "notes": lot.notes,
            "resubmission_of": lot.resubmission_of,
            "structure": structure.describe(),
            "structure_spec": lot.structure_spec,
            "registered_at": lot.recorded_at,
            "plans": plans,
            "draw": draw,
            "sample_units": sample_units,
            "results": results,
            "classes": {k: t.to_dict() for k, t in tallies.items()},
            "decision": last.decision if last else None,
            "decision_detail": None if last is None else {
                "entry": last.id, "at": last.recorded_at, "curtailed": last.curtailed,
                "matches_results": computed == last.decision,
                "why": last.evidence.get("why"),
            },
            "computed_decision": computed,
            "estimate": estimates,
            "dispositions": [{"entry": d.id, "disposition": d.disposition, "reason": d.reason, "by": d.by,
                              "at": d.recorded_at} for d in data.dispositions],
            "signatures": signatures,
            "changed_since_signed": any(s["changed_since_signed"] for s in signatures),
            "failed_attempts": [{"entry": f.id, "action": f.action, "name_given": f.name_given,
                                 "problem": f.problem, "at": f.recorded_at} for f in failed],
            "events": [{"entry": e.id, "kind": e.kind, "from": e.from_state, "to": e.to_state, "by": e.by,
                        "at": e.recorded_at, "detail": e.detail} for e in events],
            "record_hash": record_hash,
            "cautions": cautions,
        }

    def export(self, lot_id: str) -> dict:
        """A complete copy of the lot: everything :meth:`show` gives, plus the
        whole history -- every entry of the lot in chain order, superseded
        plans and corrected results included -- with each entry's chain hash
        and the outcome of checking the lot's chain."""
        report = self.show(lot_id)
        lid = report["id"]
        with self.store.reading() as r:
            hashes = {e["seq"]: e["hash"] for e in r.entries(lid)}
            history = self._history(r, lid)
            check = r.verify_chain(lid)
        for item in history:
            item["hash"] = hashes.get(item["entry"])
        report["history"] = history
        report["chain"] = {
            "verified": check.ok,
            "checked": check.checked,
            "first_broken": None if check.broken is None else check.broken.describe(),
        }
        return report

    def _history(self, r: Reader, lid: str) -> list[dict]:
        lot = r.lot(lid)
        structure = self._structure_of(lot)
        items: list[dict] = [{
            "entry": lot.id, "kind": "lot", "at": lot.recorded_at, "by": lot.by,
            "summary": f"{lot.lot_id}: {lot.product} from {lot.supplier}, {lot.quantity} units",
            "data": {"supplier": lot.supplier, "product": lot.product, "reference": lot.reference,
                     "size": lot.quantity, "received_on": lot.received_on, "structure": lot.structure_spec,
                     "critical": lot.critical, "notes": lot.notes, "resubmission_of": lot.resubmission_of},
        }]
        for p in r.plans(lid):
            items.append({"entry": p.id, "kind": "plan", "at": p.recorded_at, "by": p.by, "class": p.defect_class,
                          "summary": f"n={p.sample_size} Ac={p.accept} Re={p.reject} ({p.chosen_by})",
                          "data": {"chosen_by": p.chosen_by, "sample_size": p.sample_size, "accept": p.accept,
                                   "reject": p.reject, "aql": p.aql, "rql": p.rql, "producer_risk": p.producer_risk,
                                   "consumer_risk": p.consumer_risk, "details": p.details}})
        for d in r.draws(lid):
            items.append({"entry": d.id, "kind": "draw", "at": d.recorded_at, "by": d.by,
                          "summary": f"{d.method}, seed {d.seed}, {d.algorithm}, {d.sample_size} units",
                          "data": {"method": d.method, "seed": d.seed, "algorithm": d.algorithm,
                                   "units": list(d.units), "class_samples": d.details.get("class_samples")}})
        for s in r.substitutes(lid):
            items.append({"entry": s.id, "kind": "substitute", "at": s.recorded_at, "by": s.by, "unit": s.unit,
                          "address": str(structure.address_of(s.unit)), "reason": s.reason,
                          "summary": f"unit {s.unit} replaced by unit {s.substitute}",
                          "data": {"substitute": s.substitute}})
        for x in r.results(lid):
            items.append({"entry": x.id, "kind": "correction" if x.corrects else "result", "at": x.recorded_at,
                          "by": x.by, "unit": x.unit, "address": str(structure.address_of(x.unit)),
                          "entered_as": x.entered_as, "class": x.defect_class, "outcome": x.outcome,
                          "defect": x.defect, "note": x.note, "corrects": x.corrects, "reason": x.reason})
        for d in r.decisions(lid):
            items.append({"entry": d.id, "kind": "decision", "at": d.recorded_at, "by": d.by, "outcome": d.decision,
                          "summary": ("decided early (curtailed sample)" if d.curtailed else "decided")
                                     + f": {d.evidence.get('why', '')}",
                          "data": d.evidence})
        for d in r.dispositions(lid):
            items.append({"entry": d.id, "kind": "disposition", "at": d.recorded_at, "by": d.by,
                          "outcome": d.disposition, "reason": d.reason})
        current = r.record_hash(lid)
        for s in r.signatures(lid):
            items.append({"entry": s.id, "kind": "signature", "at": s.recorded_at, "by": s.printed_name,
                          "summary": f"{s.meaning}: {s.printed_name}"
                                     + (" (changed since signed)" if s.record_hash != current else ""),
                          "data": {"meaning": s.meaning, "record_hash": s.record_hash,
                                   "changed_since_signed": s.record_hash != current}})
        for f in r.failed_attempts(lid):
            items.append({"entry": f.id, "kind": "failed attempt", "at": f.recorded_at, "by": f.name_given,
                          "summary": f"{f.action} refused: {f.problem}"})
        for e in r.events(lid):
            items.append({"entry": e.id, "kind": "event", "at": e.recorded_at, "by": e.by, "outcome": e.to_state,
                          "summary": f"{e.kind}: {_what(e.from_state)} -> {e.to_state}" if e.kind == "state"
                                     else e.kind, "data": e.detail})
        for c in r.corrective_actions():
            if c.lot_id == lid:
                items.append({"entry": c.id, "kind": "corrective action", "at": c.recorded_at, "by": c.by,
                              "summary": c.description})
        items.sort(key=lambda item: item["entry"])
        return items

    def verify(self, lot_id: str | None = None):
        """Re-read the store (or one lot) and check the audit chain."""
        if lot_id is not None:
            with self.store.reading() as r:
                if r.lot(lot_id) is None:
                    raise WorkflowError("lot", f"audit verify: no lot {lot_id!r} is registered")
        return self.store.verify_chain(lot_id)


__all__ = [
    "ADVISORY",
    "CLASSES",
    "ClassTally",
    "RecordOutcome",
    "STATES",
    "TRANSITIONS",
    "Workflow",
    "WorkflowError",
    "StoreError",
]
