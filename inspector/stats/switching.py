"""Switching between normal and tightened inspection over a supplier's lots.

The rules are those of MIL-STD-105E paragraphs 4.7-4.8 and ANSI/ASQ Z1.4
paragraphs 8.3-8.5 (paraphrased; text reproduced at altius-chinaservices.cn
and text-id.123dok.com, see ``../shared/reference-values.md`` 5f):

* normal -> tightened: 2 lots rejected on original inspection within 5 or
  fewer consecutive lots;
* tightened -> normal: 5 consecutive lots accepted on original inspection;
* discontinue: the count of lots not accepted on original tightened
  inspection reaches 5 in the current stretch on tightened; inspection
  resumes, on tightened, only after corrective action is recorded;
* normal -> reduced needs the preceding 10 lots on normal all accepted
  *and* conditions this module cannot see (limit numbers of Table VIII,
  steady production, approval by the responsible authority). It is shown
  here as eligibility only; reduced inspection starts only when a
  responsible person enters it, and no reduced table is reproduced.

Resubmitted lots are not original inspections and never count.

The input is a plain sequence of events in the order they happened, so the
workflow can feed it straight from stored lots: :class:`LotOutcome` (or a
mapping ``{"kind": "lot", "lot_id": ..., "accepted": bool,
"resubmitted": bool}``) and :class:`CorrectiveAction` (or ``{"kind":
"corrective_action", "note": ..., "by": ...}``). The result says the
severity now, whether the supplier is eligible for reduced inspection, a
plain reason, and the severity in effect when each lot was inspected.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Iterable, Mapping, Union

__all__ = [
    "NORMAL",
    "TIGHTENED",
    "DISCONTINUED",
    "CITATION",
    "SwitchingError",
    "LotOutcome",
    "CorrectiveAction",
    "LotStep",
    "SwitchingResult",
    "switching_state",
]

NORMAL = "normal"
TIGHTENED = "tightened"
DISCONTINUED = "discontinued"

CITATION = "MIL-STD-105E ¶4.7–4.8; ANSI/ASQ Z1.4 ¶8.3–8.5"

# The numbers in the rules, named so the reasons and the tests read alike.
REJECTIONS_TO_TIGHTEN = 2
WINDOW_ON_NORMAL = 5
ACCEPTANCES_TO_RELAX = 5
REJECTIONS_TO_DISCONTINUE = 5
ACCEPTANCES_FOR_REDUCED = 10


class SwitchingError(ValueError):
    """A malformed event: names the field, what was expected and what came."""

    def __init__(self, field: str, value, message: str):
        super().__init__(message)
        self.field = field
        self.value = value


@dataclass(frozen=True, kw_only=True)
class LotOutcome:
    """A lot's recorded outcome. ``resubmitted`` lots are skipped by the rules."""

    lot_id: str
    accepted: bool
    resubmitted: bool = False


@dataclass(frozen=True, kw_only=True)
class CorrectiveAction:
    """Corrective action recorded for the supplier and product."""

    note: str = ""
    by: str = ""


@dataclass(frozen=True, kw_only=True)
class LotStep:
    """One lot as the rules saw it.

    ``severity`` is the severity in effect when the lot was inspected;
    ``counted`` is False for resubmitted lots and for lots recorded while
    inspection was discontinued; ``note`` says what the lot changed, if
    anything.
    """

    lot_id: str
    accepted: bool
    resubmitted: bool
    severity: str
    counted: bool
    note: str


@dataclass(frozen=True, kw_only=True)
class SwitchingResult:
    """The switching state after a sequence of events."""

    severity: str
    reduced_eligible: bool
    reason: str
    lots: tuple[LotStep, ...]


Event = Union[LotOutcome, CorrectiveAction, Mapping]


def _coerce(event: Event, index: int) -> Union[LotOutcome, CorrectiveAction]:
    if isinstance(event, (LotOutcome, CorrectiveAction)):
        item = event
    elif isinstance(event, Mapping):
        kind = event.get("kind", "lot")
        if kind == "lot":
            for key in ("lot_id", "accepted"):
                if key not in event:
                    raise SwitchingError(key, None, f"event {index}: a lot event needs {key!r}")
            item = LotOutcome(
                lot_id=event["lot_id"],
                accepted=event["accepted"],
                resubmitted=event.get("resubmitted", False),
            )
        elif kind == "corrective_action":
            item = CorrectiveAction(note=event.get("note", ""), by=event.get("by", ""))
        else:
            raise SwitchingError(
                "kind", kind, f"event {index}: kind must be 'lot' or 'corrective_action', got {kind!r}"
            )
    else:
        raise SwitchingError(
            "event", event,
            f"event {index}: expected a LotOutcome, a CorrectiveAction or a mapping, got {type(event).__name__}",
        )
    if isinstance(item, LotOutcome):
        for key in ("accepted", "resubmitted"):
            value = getattr(item, key)
            if not isinstance(value, bool):
                raise SwitchingError(key, value, f"event {index}: {key} must be true or false, got {value!r}")
    return item


def _names(ids: list[str]) -> str:
    ids = [str(i) for i in ids]  # stored lot ids may be numbers
    if len(ids) == 1:
        return ids[0]
    return ", ".join(ids[:-1]) + " and " + ids[-1]


def switching_state(events: Iterable[Event], *, start: str = NORMAL) -> SwitchingResult:
    """Apply the switching rules to a supplier's events, oldest first.

    ``start`` is the severity before the first event (normal, as the
    standard begins, unless the responsible authority said otherwise).
    Raises SwitchingError for a malformed event or an unknown ``start``.

    Notes
    -----
    "2 of 5 or fewer consecutive lots" is read as: two rejections among
    the last five lots inspected on normal since normal began (so lots
    inspected on tightened before a return to normal do not count towards
    tightening again). Discontinuation counts the lots not accepted since
    tightened inspection began (or resumed after corrective action); it
    resets on return to normal. Lots recorded while inspection is
    discontinued do not change the state. Corrective action recorded while
    inspection is not discontinued changes nothing.
    """
    if start not in (NORMAL, TIGHTENED):
        raise SwitchingError("start", start, f"start must be 'normal' or 'tightened', got {start!r}")

    severity = start
    # Since the current severity began: outcomes on normal (lot id, accepted);
    # on tightened, the run of acceptances and the lots not accepted.
    normal_run: list[tuple[str, bool]] = []
    tight_accept_run = 0
    tight_rejected: list[str] = []
    reason = (
        f"Normal inspection: no lots recorded yet; inspection starts on normal ({CITATION})."
        if start == NORMAL
        else f"Tightened inspection, as set at the start; no lots recorded yet ({CITATION})."
    )
    steps: list[LotStep] = []
    # Why tightened inspection is in effect, kept for the reason while on it.
    tight_cause = "set at the start" if start == TIGHTENED else ""
    normal_cause = ""

    for index, raw in enumerate(events):
        event = _coerce(raw, index)
        if isinstance(event, CorrectiveAction):
            if severity == DISCONTINUED:
                severity = TIGHTENED
                tight_accept_run = 0
                tight_rejected = []
                who = f" by {event.by}" if event.by else ""
                tight_cause = f"resumed after corrective action recorded{who}, following discontinuation"
                reason = _tightened_reason(tight_cause, tight_accept_run, tight_rejected)
            continue

        lot = event
        if lot.resubmitted:
            steps.append(LotStep(
                lot_id=lot.lot_id, accepted=lot.accepted, resubmitted=True, severity=severity,
                counted=False, note="resubmitted lot: not an original inspection, not counted",
            ))
            continue
        if severity == DISCONTINUED:
            steps.append(LotStep(
                lot_id=lot.lot_id, accepted=lot.accepted, resubmitted=False, severity=severity,
                counted=False, note="recorded while inspection was discontinued: not counted",
            ))
            continue

        at = severity
        note = ""
        if severity == NORMAL:
            normal_run.append((lot.lot_id, lot.accepted))
            window = normal_run[-WINDOW_ON_NORMAL:]
            rejected = [lot_id for lot_id, ok in window if not ok]
            if not lot.accepted and len(rejected) >= REJECTIONS_TO_TIGHTEN:
                # The two rejections that triggered it: this lot and the previous
                # rejection inside the window; span counts the lots from one to the other.
                where = [i for i, (_, ok) in enumerate(window) if not ok]
                pair = rejected[-REJECTIONS_TO_TIGHTEN:]
                span = len(window) - where[-REJECTIONS_TO_TIGHTEN]
                severity = TIGHTENED
                normal_run = []
                tight_accept_run = 0
                tight_rejected = []
                note = "switched to tightened after this lot"
                tight_cause = (
                    f"since lot {lot.lot_id}, because lots {_names(pair)} were rejected on original "
                    f"inspection within {span} consecutive lots on normal inspection"
                )
                reason = _tightened_reason(tight_cause, tight_accept_run, tight_rejected)
            else:
                accepted_run = 0
                for _, ok in reversed(normal_run):
                    if not ok:
                        break
                    accepted_run += 1
                reason = (
                    f"Normal inspection{normal_cause}: {len(normal_run)} lot{'s' if len(normal_run) != 1 else ''} on normal, "
                    f"no 2 rejected within 5 consecutive lots; the last {accepted_run} accepted in a row ({CITATION})."
                )
        else:  # tightened
            if lot.accepted:
                tight_accept_run += 1
                if tight_accept_run >= ACCEPTANCES_TO_RELAX:
                    severity = NORMAL
                    normal_run = []
                    note = "switched to normal after this lot"
                    normal_cause = (
                        f" since lot {lot.lot_id}, after {ACCEPTANCES_TO_RELAX} consecutive acceptances on tightened"
                    )
                    reason = (
                        f"Normal inspection since lot {lot.lot_id}: {ACCEPTANCES_TO_RELAX} consecutive lots were "
                        f"accepted on tightened inspection ({CITATION})."
                    )
                else:
                    reason = _tightened_reason(tight_cause, tight_accept_run, tight_rejected)
            else:
                tight_accept_run = 0
                tight_rejected.append(lot.lot_id)
                if len(tight_rejected) >= REJECTIONS_TO_DISCONTINUE:
                    severity = DISCONTINUED
                    note = "inspection discontinued after this lot"
                    reason = (
                        f"Inspection discontinued after lot {lot.lot_id}: {len(tight_rejected)} lots were not "
                        f"accepted on tightened inspection ({_names(tight_rejected)}). Acceptance inspection "
                        f"under the standard stays discontinued until corrective action is recorded; it "
                        f"then resumes on tightened ({CITATION})."
                    )
                else:
                    reason = _tightened_reason(tight_cause, tight_accept_run, tight_rejected)
        steps.append(LotStep(
            lot_id=lot.lot_id, accepted=lot.accepted, resubmitted=False, severity=at,
            counted=True, note=note,
        ))

    eligible = False
    if severity == NORMAL:
        run = 0
        for _, ok in reversed(normal_run):
            if not ok:
                break
            run += 1
        if run >= ACCEPTANCES_FOR_REDUCED:
            eligible = True
            reason += (
                f" The last {run} lots on normal inspection were all accepted: eligible for reduced "
                "inspection, provided the limit numbers (where used), steady production and the "
                "responsible authority's approval also hold; reduced inspection is used only when a "
                "responsible person enters it."
            )
    return SwitchingResult(severity=severity, reduced_eligible=eligible, reason=reason, lots=tuple(steps))


def _tightened_reason(cause: str, accept_run: int, rejected: list[str]) -> str:
    parts = [
        f"Tightened inspection {cause}",
        f"{accept_run} of the {ACCEPTANCES_TO_RELAX} consecutive acceptances that return it to normal so far",
    ]
    if rejected:
        parts.append(
            f"{len(rejected)} of {REJECTIONS_TO_DISCONTINUE} lots not accepted on tightened so far "
            f"({_names(rejected)}); at {REJECTIONS_TO_DISCONTINUE} inspection is discontinued"
        )
    return "; ".join(parts) + f" ({CITATION})."
