"""Switching rules over a supplier's lots.

Rules: MIL-STD-105E ¶4.7–4.8 and ANSI/ASQ Z1.4 ¶8.3–8.5, as paraphrased in
../shared/reference-values.md 5f (105E text via altius-chinaservices.cn, Z1.4
text via text-id.123dok.com). Lot IDs belong to an invented supplier,
Harrowgate Preserves (jars of apricot jam).
"""

from __future__ import annotations

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from inspector.stats.switching import (
    DISCONTINUED,
    NORMAL,
    TIGHTENED,
    CorrectiveAction,
    LotOutcome,
    SwitchingError,
    switching_state,
)


def lots(pattern: str, prefix: str = "HP", start: int = 1):
    """'AARA' -> accepted, accepted, rejected, accepted; 'r'/'a' are resubmissions."""
    out = []
    for i, ch in enumerate(pattern):
        out.append(LotOutcome(
            lot_id=f"{prefix}-{start + i:03d}", accepted=ch in "Aa", resubmitted=ch in "ar",
        ))
    return out


def test_starts_on_normal():
    result = switching_state([])
    assert result.severity == NORMAL and not result.reduced_eligible and result.lots == ()


@pytest.mark.parametrize("pattern", ["RR", "RAR", "RAAR", "RAAAR", "AARAAAR"])
def test_two_rejections_within_five_consecutive_lots_tighten(pattern):
    # 105E ¶4.7 / Z1.4 ¶8.3: 2 of 2, 3, 4 or 5 consecutive lots rejected.
    result = switching_state(lots(pattern))
    assert result.severity == TIGHTENED
    assert result.lots[-1].severity == NORMAL  # the lot that triggered it was inspected on normal
    assert result.lots[-1].note == "switched to tightened after this lot"
    assert "¶4.7–4.8" in result.reason and "¶8.3–8.5" in result.reason


@pytest.mark.parametrize("pattern", ["R", "RAAAAR", "RAAAAAR", "ARAAAARAAAAR"])
def test_rejections_six_or_more_lots_apart_do_not_tighten(pattern):
    result = switching_state(lots(pattern))
    assert result.severity == NORMAL


def test_resubmitted_lots_are_ignored():
    # A rejected lot resubmitted and rejected again is still one rejection on
    # original inspection: rejected resubmissions must not tighten.
    result = switching_state(lots("RrrAA"))
    assert result.severity == NORMAL
    assert [s.counted for s in result.lots] == [True, False, False, True, True]
    # Accepted resubmissions do not count towards relaxing either.
    result = switching_state(lots("RR" + "aaaaaaa"))
    assert result.severity == TIGHTENED
    assert all(step.severity == TIGHTENED for step in result.lots[2:])


def test_resubmissions_do_not_stretch_the_window():
    # R, 3 accepted, 1 resubmission, R: the rejections are 5 original lots apart.
    result = switching_state(lots("RAAAaR"))
    assert result.severity == TIGHTENED


def test_per_lot_severity_is_the_one_in_effect_when_inspected():
    result = switching_state(lots("RR" + "AAAAA" + "A"))
    assert [s.severity for s in result.lots] == [NORMAL, NORMAL] + [TIGHTENED] * 5 + [NORMAL]
    assert result.severity == NORMAL
    assert "5 consecutive" in result.reason


def test_return_to_normal_needs_five_consecutive_acceptances():
    assert switching_state(lots("RR" + "AAAA")).severity == TIGHTENED
    assert switching_state(lots("RR" + "AAAARAAAA")).severity == TIGHTENED
    assert switching_state(lots("RR" + "AAAARAAAAA")).severity == NORMAL


def test_discontinue_after_five_rejections_on_tightened():
    # 105E ¶4.7–4.8 / Z1.4 ¶8.3–8.5 (as paraphrased in reference-values 5f):
    # the cumulative count of lots not accepted on tightened reaches 5; they
    # need not be consecutive (no 5 acceptances in a row in between).
    result = switching_state(lots("RR" + "RARARARAR"))
    assert result.severity == DISCONTINUED
    assert "corrective action" in result.reason
    result = switching_state(lots("RR" + "RARARAR"))
    assert result.severity == TIGHTENED
    assert "4 of 5" in result.reason


def test_discontinued_lots_do_not_count_until_corrective_action():
    events = lots("RR" + "RRRRR") + lots("AAAAAA", prefix="HPX")
    result = switching_state(events)
    assert result.severity == DISCONTINUED
    assert [s.counted for s in result.lots[-6:]] == [False] * 6
    assert all(s.severity == DISCONTINUED for s in result.lots[-6:])


def test_corrective_action_lifts_discontinuation_back_to_tightened():
    events = lots("RR" + "RRRRR") + [CorrectiveAction(note="new seal supplier", by="I. Marsh")]
    result = switching_state(events)
    assert result.severity == TIGHTENED
    assert "corrective action" in result.reason and "I. Marsh" in result.reason
    # The count of rejections starts again: 4 more rejections do not discontinue.
    assert switching_state(events + lots("RRRR", start=50)).severity == TIGHTENED
    assert switching_state(events + lots("RRRRR", start=50)).severity == DISCONTINUED
    # And 5 acceptances return it to normal.
    assert switching_state(events + lots("AAAAA", start=50)).severity == NORMAL


def test_corrective_action_while_not_discontinued_changes_nothing():
    assert switching_state([CorrectiveAction()] + lots("A")).severity == NORMAL
    assert switching_state(lots("RR") + [CorrectiveAction()]).severity == TIGHTENED


def test_rejection_count_on_tightened_resets_on_return_to_normal():
    events = lots("RR" + "RRAAAAA" + "RR" + "RRR")
    result = switching_state(events)
    # 2 rejections on the first stretch of tightened, then normal, then
    # tightened again with 3 rejections: 3 < 5, not discontinued.
    assert result.severity == TIGHTENED


def test_reduced_eligibility_after_ten_acceptances_on_normal():
    assert not switching_state(lots("A" * 9)).reduced_eligible
    result = switching_state(lots("A" * 10))
    assert result.reduced_eligible and result.severity == NORMAL
    assert "responsible" in result.reason
    # A rejection resets the run.
    assert not switching_state(lots("A" * 10 + "R")).reduced_eligible
    assert switching_state(lots("A" * 10 + "R" + "A" * 10)).reduced_eligible


def test_lots_on_tightened_do_not_count_towards_reduced():
    # 5 acceptances on tightened return to normal; then only 9 on normal.
    assert not switching_state(lots("RR" + "A" * 14)).reduced_eligible
    assert switching_state(lots("RR" + "A" * 15)).reduced_eligible


def test_plain_mapping_events_as_stored():
    events = [
        {"kind": "lot", "lot_id": "HP-101", "accepted": False},
        {"kind": "lot", "lot_id": "HP-101R", "accepted": True, "resubmitted": True},
        {"lot_id": "HP-102", "accepted": False},
        {"kind": "corrective_action", "note": "retrained filling line", "by": "I. Marsh"},
    ]
    result = switching_state(events)
    assert result.severity == TIGHTENED
    assert [s.lot_id for s in result.lots] == ["HP-101", "HP-101R", "HP-102"]


@pytest.mark.parametrize(
    "event,field",
    [
        ({"kind": "lot", "accepted": True}, "lot_id"),
        ({"kind": "lot", "lot_id": "HP-1"}, "accepted"),
        ({"kind": "lot", "lot_id": "HP-1", "accepted": "yes"}, "accepted"),
        ({"kind": "lot", "lot_id": "HP-1", "accepted": True, "resubmitted": 1}, "resubmitted"),
        ({"kind": "audit"}, "kind"),
        (42, "event"),
    ],
)
def test_malformed_events_name_the_field(event, field):
    with pytest.raises(SwitchingError) as info:
        switching_state([event])
    assert info.value.field == field


def test_unknown_start_is_refused():
    with pytest.raises(SwitchingError):
        switching_state([], start="reduced")


def test_start_on_tightened():
    assert switching_state(lots("AAAA"), start=TIGHTENED).severity == TIGHTENED
    assert switching_state(lots("AAAAA"), start=TIGHTENED).severity == NORMAL


# --- a second, deliberately plain implementation of the same rules ----------


def _reference_state(pattern: str) -> str:
    """Scan the string with windows, no state machine (common practice reading)."""
    severity, history = NORMAL, []  # history: outcomes since the current severity began
    for ch in pattern:
        if ch in "ar":
            continue
        ok = ch == "A"
        history.append(ok)
        if severity == NORMAL and not ok and history[-5:].count(False) >= 2:
            severity, history = TIGHTENED, []
        elif severity == TIGHTENED and history.count(False) >= 5:
            severity, history = DISCONTINUED, []
        elif severity == TIGHTENED and len(history) >= 5 and all(history[-5:]):
            severity, history = NORMAL, []
        elif severity == DISCONTINUED:
            history = []
    return severity


@settings(max_examples=150, deadline=None)
@given(st.text(alphabet="AAAARar", max_size=40))
def test_agrees_with_a_plain_window_reading(pattern):
    assert switching_state(lots(pattern)).severity == _reference_state(pattern)
