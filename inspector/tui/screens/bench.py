"""Bench: one entry field, then one key per verdict.

Scan or type a unit (number, address, manifest serial or the code on its
label) and submit it with Enter, Tab or ctrl+j. The unit goes "on the
bench" and the verdict keys apply to it: ``p`` or space passes it in every
class still open for it, ``1``/``2``/``3`` fail it in the critical, major
or minor class. ``d`` and ``n`` add a defect description and a note first.

* What cannot be a unit of this lot's sample is refused on the spot: the
  text stays in the field (selected, so the next scan replaces it) and
  nothing is recorded.
* A unit that already has its results is a duplicate scan: a warning shows
  the earlier entry; ``c`` corrects it (asking for a reason); the original
  stays in the list, marked as corrected.
* "saved" appears only after the workflow returned, i.e. after the store
  committed. A store failure shows a message that stays, and the unit and
  the typed text stay on the bench.
* The tally shows each class against Ac/Re; when a class reaches its
  rejection number the lot is decided at once and a notice says so.
"""

from __future__ import annotations

import time
from typing import Any

from rich.markup import escape
from textual import on, work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal
from textual.message import Message
from textual.widgets import Input, Label, Static

from inspector.tui.screens.base import LotScreen, Notice, TopBar, one_line
from inspector.tui.widgets import KeyStrip, ScanField, Tally, verdict_words
from inspector.tui.widgets.recent import EntryRow, RecentEntries

FAIL_KEYS = {"1": "critical", "2": "major", "3": "minor"}


class ResultRecorded(Message):
    """The store committed one or more result entries for a unit."""

    def __init__(self, outcome: Any, rows: list[dict], corrected: int | None = None) -> None:
        super().__init__()
        self.outcome = outcome
        self.rows = rows
        self.corrected = corrected


class RecordRefused(Message):
    """The workflow refused the entry (nothing was written)."""

    def __init__(self, error: str, *, store_failure: bool = False) -> None:
        super().__init__()
        self.error = error
        self.store_failure = store_failure


class BenchReady(Message):
    def __init__(self, structure: Any) -> None:
        super().__init__()
        self.structure = structure


# How long a letter or digit key on the pad waits before it acts. A scanner
# types a whole code in a burst, a few milliseconds per character; if any
# other key follows within this time, the keys were the start of a scan
# (of the next unit) and go to the entry field instead of recording a
# verdict. Space and Escape never start a scan, so they act at once.
HOLD_SECONDS = 0.03

# key -> (action, parameters), for the keys the pad answers.
PAD_KEYS = {
    "space": ("verdict", ("pass",)),
    "p": ("verdict", ("pass",)),
    "1": ("verdict", ("fail", "critical")),
    "2": ("verdict", ("fail", "major")),
    "3": ("verdict", ("fail", "minor")),
    "d": ("extra", ("defect",)),
    "n": ("extra", ("note",)),
    "c": ("correct", ()),
}
SUBMIT_KEYS = ("enter", "tab", "ctrl+j")


class VerdictPad(Static, can_focus=True):
    """The unit on the bench; holds the verdict keys while it has the focus.

    The keys are handled in :meth:`on_key` (so a held key can turn out to
    be the start of a scan); the bindings name them for the key strip and
    say, through ``check_action``, which are usable now.
    """

    BINDINGS = [
        Binding("space", "verdict('pass')", "pass", key_display="space/p"),
        Binding("p", "verdict('pass')", "pass", show=False),
        Binding("1", "verdict('fail', 'critical')", "fail critical"),
        Binding("2", "verdict('fail', 'major')", "fail major"),
        Binding("3", "verdict('fail', 'minor')", "fail minor"),
        Binding("d", "extra('defect')", "defect text"),
        Binding("n", "extra('note')", "note"),
        Binding("c", "correct", "correct"),
        Binding("escape", "leave", "leave unit"),
    ]

    def __init__(self, *args, **kwargs) -> None:
        super().__init__(*args, **kwargs)
        self._held: tuple[str, str] | None = None  # (key, character) waiting for HOLD_SECONDS
        self._hold_timer = None

    def check_action(self, action: str, parameters: tuple) -> bool | None:
        bench = self.screen
        if not isinstance(bench, BenchScreen):
            return True
        return bench.pad_allows(action, parameters)

    def action_verdict(self, outcome: str, defect_class: str | None = None) -> None:
        self.screen.give_verdict(outcome, defect_class)

    def action_extra(self, which: str) -> None:
        self.screen.query_one(f"#{which}", Input).focus()

    def action_correct(self) -> None:
        self.screen.start_correction()

    def action_leave(self) -> None:
        self.screen.leave_unit()

    def _act(self, key: str) -> None:
        action, parameters = PAD_KEYS[key]
        if self.check_action(action, parameters):
            getattr(self, f"action_{action}")(*parameters)

    def _release_held(self) -> None:
        """The held key stood alone: act on it."""
        held, self._held, self._hold_timer = self._held, None, None
        if held is not None and self.has_focus:
            self._act(held[0])

    def on_key(self, event) -> None:
        key, char = event.key, event.character
        bench = self.screen
        if self._held is not None:
            # A second key within the hold: the held key began a scan.
            self._hold_timer.stop()
            held, self._held, self._hold_timer = self._held, None, None
            bench.redirect_to_entry(held[1], key=key, character=char)
        elif key == "space" or key == "escape":
            if key == "escape":
                return  # the binding handles it (and Escape leaves the unit)
            self._act(key)
        elif key in PAD_KEYS:
            self._held = (key, char or key)
            self._hold_timer = self.set_timer(HOLD_SECONDS, self._release_held)
        elif key in SUBMIT_KEYS:
            # The end of a scan that began here submits it; a lone submit
            # key (the second half of a scanner's CR LF) does nothing.
            if bench.in_burst():
                entry = bench.query_one("#entry", ScanField)
                entry.focus()
                bench.stage(entry.value)
        elif event.is_printable and char:
            bench.redirect_to_entry(char)
        else:
            return
        event.stop()
        event.prevent_default()


class BenchScreen(LotScreen):
    """Record results unit by unit."""

    NAME = "bench"
    TITLE_WORDS = "bench"
    CSS_PATH = "bench.tcss"
    BINDINGS = [
        Binding("ctrl+n", "next_inspector", "next inspector", priority=True),
        Binding("ctrl+r", "decide", "decide now", priority=True),
    ]

    def __init__(self, lot_id: str, **kwargs) -> None:
        super().__init__(lot_id, **kwargs)
        self.structure = None
        self.samples: dict[str, set[int]] = {}  # class -> units of its sample
        self.current: dict[tuple[int, str], dict] = {}  # (unit, class) -> latest entry
        self.tallies: dict[str, dict] = {}
        self.staged = None  # lookup.Resolved
        self.correcting: str | None = None  # the reason, while a correction waits for its verdict
        self.pending = False
        self.outcome_of: dict[int, str] = {}
        # Timing of the last entry, from its key to the refresh that showed
        # it saved (read by benchmarks/bench_tui.py).
        self.key_time: float | None = None
        self.last_latency: float | None = None
        self._redirected_at = 0.0

    def compose(self) -> ComposeResult:
        yield TopBar(f"bench · lot {self.lot_id}")
        yield Label("unit number, address, serial or label code — Enter, Tab or ctrl+j submits", id="hint")
        yield ScanField(placeholder="scan or type a unit", id="entry")
        yield Notice("", id="notice", classes="notice")
        yield VerdictPad("", id="pad")
        with Horizontal(id="extras"):
            yield Label("defect")
            yield Input("", placeholder="optional description", id="defect")
            yield Label("note")
            yield Input("", placeholder="optional", id="note")
        yield Tally(id="tally")
        yield Static("", id="early")
        yield RecentEntries(id="recent")
        yield KeyStrip()

    def on_mount(self) -> None:
        self.query_one("#early", Static).display = False
        if self.app.bench_person is None:
            self.app.bench_person = self.app.current_inspector()
        self.show_pad()
        self.query_one("#entry", ScanField).focus()
        self._prepare()
        self.reload()

    @work(thread=True, exclusive=True, group="structure")
    def _prepare(self) -> None:
        from inspector.tui.lookup import lot_structure

        try:
            structure = lot_structure(self.workflow, self.lot_id)
        except Exception as exc:  # noqa: BLE001
            self.post_message(RecordRefused(one_line(exc)))
            return
        self.post_message(BenchReady(structure))

    def on_bench_ready(self, message: BenchReady) -> None:
        self.structure = message.structure

    # --- the record on view ---------------------------------------------------------------------

    def populate(self, report: dict) -> None:
        classes = report.get("classes") or {}
        self.tallies = {k: dict(v) for k, v in classes.items()}
        current = {}
        for r in report.get("results", []):
            if r.get("current"):
                current[(r["unit"], r["class"])] = r
        self.current = current
        samples: dict[str, set[int]] = {}
        for cls, t in classes.items():
            units = set(t.get("open_units", ()))
            units.update(u for (u, c) in current if c == cls)
            samples[cls] = units
        self.samples = samples
        results = report.get("results", [])
        self.outcome_of = {r["entry"]: r["outcome"] for r in results}
        superseded = {r["corrects"]: r["entry"] for r in results if r.get("corrects")}
        self.query_one(RecentEntries).set_rows([self.entry_row(r, superseded.get(r["entry"])) for r in results])
        self.query_one(Tally).show_tallies(self.tallies)
        self.show_state(report)
        self.update_top_bar()

    def update_top_bar(self) -> None:
        who = self.app.current_inspector() or "nobody (register people first)"
        self.query_one(TopBar).update(escape(self._bar_text() + f" · by {who}"))

    def _bar_text(self) -> str:
        rep = self.report
        if rep is None:
            return f"bench · lot {self.lot_id}"
        flag = " · ⚠ food" if rep.get("critical") else ""
        from inspector.tui.app import state_words

        return f"bench · {rep['id']} · {state_words(rep['state'])}{flag}"

    def show_state(self, report: dict) -> None:
        early = self.query_one("#early", Static)
        state = report["state"]
        if state in ("registered", "planned"):
            self.notice().say("warning", f"lot {self.lot_id} is {state}: draw the sample first (F3)")
        decision = report.get("decision")
        if decision and state != "inspecting":
            detail = report.get("decision_detail") or {}
            how = "EARLY " if detail.get("curtailed") else ""
            early.update(escape(f"■ LOT DECIDED {how}— {verdict_words(decision)} · {detail.get('why', '')} · "
                                "F5 shows the decision; corrections are still possible (c)"))
            early.display = True
        else:
            early.display = False

    def entry_row(self, r: dict, superseded_by: int | None = None) -> EntryRow:
        text = " · ".join(t for t in (r.get("defect"), r.get("note")) if t)
        if r.get("corrects"):
            was = self.outcome_of.get(r["corrects"], "?")
            text = f"corrects {r['corrects']} (was {was}): {r.get('reason') or ''}" + (f" · {text}" if text else "")
        return EntryRow(entry=r["entry"], unit=r["unit"], defect_class=r["class"], outcome=r["outcome"], text=text,
                        by=r.get("by") or "", at=(r.get("at") or "")[11:16], superseded_by=superseded_by)

    # --- the unit on the bench ------------------------------------------------------------------------

    def holding(self, unit: int) -> list[str]:
        return [cls for cls, units in self.samples.items() if unit in units]

    def open_classes(self, unit: int) -> list[str]:
        return [cls for cls in self.holding(unit) if (unit, cls) not in self.current]

    def show_pad(self) -> None:
        pad = self.query_one("#pad", VerdictPad)
        s = self.staged
        if s is None:
            pad.update("no unit on the bench", layout=False)
            pad.set_class(False, "-staged")
            self.refresh_bindings()
            return
        pad.set_class(True, "-staged")
        open_ = self.open_classes(s.unit)
        done = [cls for cls in self.holding(s.unit) if (s.unit, cls) in self.current]
        lines = [f"▶ unit {s.unit} · {s.address}" + (f" · serial {s.serial}" if s.serial else "")]
        parts = []
        if open_:
            parts.append("open in: " + ", ".join(open_))
        if done:
            parts.append("recorded: " + ", ".join(f"{c} {self.current[(s.unit, c)]['outcome']} "
                                                  f"(entry {self.current[(s.unit, c)]['entry']})" for c in done))
        lines.append(" · ".join(parts))
        if self.correcting:
            lines.append(f"CORRECTING (reason: {self.correcting}) — press the new verdict")
        elif self.pending:
            lines.append("saving …")
        elif open_:
            lines.append("space/p pass · " + " · ".join(f"{k} fail {c}" for k, c in FAIL_KEYS.items() if c in open_))
        else:
            lines.append("every class recorded: c corrects, Esc leaves")
        pad.update(escape("\n".join(lines)), layout=False)
        self.refresh_bindings()

    def pad_allows(self, action: str, parameters: tuple) -> bool | None:
        s = self.staged
        if action == "verdict":
            if s is None or self.pending:
                return False
            if self.correcting:
                cls = parameters[1] if len(parameters) > 1 else None
                return cls is None or cls in self.holding(s.unit)
            open_ = self.open_classes(s.unit)
            if parameters[0] == "pass":
                return bool(open_)
            return parameters[1] in open_
        if action == "correct":
            return s is not None and not self.pending and any((s.unit, c) in self.current for c in self.holding(s.unit))
        if action in ("extra", "leave"):
            return s is not None
        return True

    @on(Input.Submitted, "#entry")
    def _entry_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        self.stage(event.value)

    @on(Input.Submitted, "#defect")
    @on(Input.Submitted, "#note")
    def _extra_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        self.query_one("#pad", VerdictPad).focus() if self.staged else self.query_one("#entry").focus()

    def stage(self, text: str) -> None:
        from inspector.tui.lookup import EntryError, resolve_entry

        entry = self.query_one("#entry", ScanField)
        if not text.strip():
            # An empty submit does nothing: a scanner that ends with CR LF
            # sends a second submit key right after the first.
            return
        if self.pending:
            self.notice().say("warning", "the last entry is still being saved; submit again in a moment")
            entry.keep_for_retyping()
            return
        if self.structure is None or self.report is None:
            self.notice().say("warning", "the lot is still loading; submit again in a moment")
            entry.keep_for_retyping()
            return
        if not self.report.get("draw"):
            self.notice().say("error", f"lot {self.lot_id} has no sample drawn yet (F3); nothing recorded")
            entry.keep_for_retyping()
            return
        left = self.staged
        try:
            found = resolve_entry(self.structure, self.lot_id, text)
        except EntryError as exc:
            self.notice().say("error", f"nothing recorded — {exc}")
            entry.keep_for_retyping()
            return
        holding = self.holding(found.unit)
        if not holding:
            subs = [s for s in (self.report.get("draw") or {}).get("substitutes", []) if s["unit"] == found.unit]
            why = (f"it was replaced by unit {subs[-1]['substitute']} ({subs[-1]['reason']})" if subs
                   else "it is not in the sample")
            self.notice().say("error", f"nothing recorded — unit {found.unit} ({found.address}): {why}")
            entry.keep_for_retyping()
            return
        self.staged = found
        self.correcting = None
        open_ = self.open_classes(found.unit)
        note = ""
        if left is not None and left.unit != found.unit and self.open_classes(left.unit):
            note = f" (unit {left.unit} was left without a verdict)"
        if not open_:
            earlier = [self.current[(found.unit, c)] for c in holding]
            said = "; ".join(f"{r['class']} {r['outcome']} (entry {r['entry']}, {r.get('by') or '?'} "
                             f"{(r.get('at') or '')[11:16]})" for r in earlier)
            self.notice().say("warning", f"duplicate scan: unit {found.unit} already recorded — {said}; "
                                         f"c corrects, Esc leaves{note}")
        else:
            self.notice().say("info", f"unit {found.unit} on the bench{note}")
        entry.value = ""
        self.show_pad()
        self.query_one("#pad", VerdictPad).focus()

    def in_burst(self, now: float | None = None) -> bool:
        """True while keys of a scan that began on the pad may still arrive."""
        return ((time.perf_counter() if now is None else now) - self._redirected_at) < 0.25

    def redirect_to_entry(self, first: str, *, key: str | None = None, character: str | None = None) -> None:
        """Start a new entry with ``first`` (keys that reached the pad but
        belong to a scan); a following submit key submits it."""
        entry = self.query_one("#entry", ScanField)
        now = time.perf_counter()
        # Characters of one burst that were already routed to the pad are
        # added to the text; a new burst starts it afresh.
        if not self.in_burst(now):
            entry.value = ""
        self._redirected_at = now
        entry.value += first
        if key in SUBMIT_KEYS:
            entry.focus()
            self.stage(entry.value)
            return
        if character and key not in SUBMIT_KEYS and (character.isprintable()):
            entry.value += character
        entry.cursor_position = len(entry.value)
        entry.focus()

    def leave_unit(self) -> None:
        self.staged = None
        self.correcting = None
        self.show_pad()
        self.notice().clear()
        self.query_one("#entry", ScanField).focus()

    # --- recording ------------------------------------------------------------------------------------

    def give_verdict(self, outcome: str, defect_class: str | None) -> None:
        s = self.staged
        if s is None or self.pending:
            return
        who = self.app.current_inspector()
        if who is None:
            self.notice().say("error", "by: nobody is registered as inspector (lots screen, u); nothing recorded")
            return
        defect = self.query_one("#defect", Input).value.strip() or None
        note = self.query_one("#note", Input).value.strip() or None
        self.key_time = time.perf_counter()
        self.pending = True
        self.app.begin_write()
        self.show_pad()
        if self.correcting:
            holding = self.holding(s.unit)
            targets = [defect_class] if defect_class else [c for c in holding if (s.unit, c) in self.current]
            self._correct(s.for_workflow, outcome, targets, self.correcting, who, defect, note)
        else:
            open_ = self.open_classes(s.unit)
            if defect_class is not None:
                classes = [defect_class]
            elif open_ == self.holding(s.unit):
                classes = [None]  # one pass for every class holding the unit
            else:
                classes = open_
            self._record(s.for_workflow, outcome, classes, who, defect, note)

    def _rows(self, outcome) -> list[dict]:
        with self.app.services.store.reading() as r:
            rows = []
            for entry in outcome.entries:
                res = r.result(entry)
                rows.append({"entry": res.id, "unit": res.unit, "class": res.defect_class, "outcome": res.outcome,
                             "defect": res.defect, "note": res.note, "by": res.by, "at": res.recorded_at,
                             "corrects": res.corrects, "reason": res.reason, "current": True})
        return rows

    @work(thread=True, exclusive=True, group="record")
    def _record(self, unit: Any, outcome: str, classes: list, who: str, defect, note) -> None:
        from inspector.workflow import WorkflowError

        last = None
        rows: list[dict] = []
        try:
            with self.app.write_lock:
                for cls in classes:
                    last = self.workflow.record(self.lot_id, unit, outcome=outcome, by=who, defect_class=cls,
                                                defect=defect, note=note)
                    rows.extend(self._rows(last))
        except WorkflowError as exc:
            self.app.end_write()
            if last is not None:  # an earlier class was saved: show it, then the refusal
                self.post_message(ResultRecorded(last, rows))
            self.post_message(RecordRefused(one_line(exc)))
        except Exception as exc:  # noqa: BLE001 - a store failure: persistent, nothing lost on screen
            self.app.end_write()
            if last is not None:
                self.post_message(ResultRecorded(last, rows))
            self.post_message(RecordRefused(one_line(exc), store_failure=True))
        else:
            self.app.end_write()
            self.post_message(ResultRecorded(last, rows))

    @work(thread=True, exclusive=True, group="record")
    def _correct(self, unit: Any, outcome: str, classes: list, reason: str, who: str, defect, note) -> None:
        from inspector.workflow import WorkflowError

        last = None
        rows: list[dict] = []
        try:
            with self.app.write_lock:
                for cls in classes:
                    last = self.workflow.correct(self.lot_id, unit, outcome=outcome, reason=reason, by=who,
                                                 defect_class=cls, defect=defect, note=note)
                    rows.extend(self._rows(last))
        except WorkflowError as exc:
            self.post_message(RecordRefused(one_line(exc)))
        except Exception as exc:  # noqa: BLE001
            self.post_message(RecordRefused(one_line(exc), store_failure=True))
        finally:
            self.app.end_write()
        if last is not None and rows:
            # Posted after any refusal of a later class, so "saved" is what stays on view.
            self.post_message(ResultRecorded(last, rows, corrected=1))

    def on_result_recorded(self, message: ResultRecorded) -> None:
        out = message.outcome
        self.pending = False
        was_correction = bool(message.corrected)
        recent = self.query_one(RecentEntries)
        for row in message.rows:
            if row.get("corrects"):
                recent.mark_superseded(row["corrects"], row["entry"])
            self.current[(row["unit"], row["class"])] = row
            recent.add(self.entry_row(row))
            self.outcome_of[row["entry"]] = row["outcome"]
        for cls, t in out.tallies.items():
            self.tallies[cls] = t.to_dict()
            self.samples[cls] = set(t.sample_units)
        self.query_one(Tally).show_tallies(self.tallies)
        entries = ", ".join(str(r["entry"]) for r in message.rows)
        what = f"corrected to {out.outcome}" if was_correction else out.outcome
        classes = ", ".join(sorted({r["class"] for r in message.rows}))
        text = f"saved: unit {out.unit} {what} in {classes} (entry {entries})"
        if out.note:
            text += f" — {out.note}"
        self.notice().say("saved", text)
        for name in ("defect", "note"):
            self.query_one(f"#{name}", Input).value = ""
        if self.report is not None:
            self.report["state"] = out.state
        if out.decision is not None:
            self.report["decision"] = out.decision["decision"]
            self.report["decision_detail"] = {"curtailed": out.decision["curtailed"],
                                              "why": out.decision["evidence"].get("why", "")}
            self.app.bell()
        self.show_state(self.report)
        self.update_top_bar()
        self.correcting = None
        unit_open = self.staged is not None and self.open_classes(self.staged.unit)
        if not unit_open:
            self.staged = None
            self.query_one("#entry", ScanField).focus()
        self.show_pad()
        self.call_after_refresh(self._shown)

    def _shown(self) -> None:
        if self.key_time is not None:
            self.last_latency = time.perf_counter() - self.key_time
            self.key_time = None

    def on_record_refused(self, message: RecordRefused) -> None:
        self.pending = False
        self.correcting = None
        prefix = "NOT SAVED — store error: " if message.store_failure else "nothing recorded — "
        self.notice().say("error", prefix + message.error)
        self.show_pad()
        if message.store_failure and self.staged is not None:
            # Keep what was typed: put the unit back in the field as it was entered.
            entry = self.query_one("#entry", ScanField)
            entry.value = self.staged.typed
            entry.keep_for_retyping()

    # --- other keys -------------------------------------------------------------------------------------

    def start_correction(self) -> None:
        s = self.staged
        if s is None:
            return
        from inspector.tui.screens.dialogs import ReasonDialog

        earlier = [self.current[(s.unit, c)] for c in self.holding(s.unit) if (s.unit, c) in self.current]
        detail = "; ".join(f"{r['class']}: {r['outcome']} (entry {r['entry']})" for r in earlier)

        def answered(reason: str | None) -> None:
            if reason:
                self.correcting = reason
                self.show_pad()
                self.notice().say("info", f"correcting unit {s.unit}: press the new verdict (space/p, 1, 2, 3)")
            self.query_one("#pad", VerdictPad).focus()

        self.app.push_screen(ReasonDialog(
            f"correct unit {s.unit}: why?", detail=f"recorded now: {detail}. The original entry stays in the "
            "record; the correction points at it.", placeholder="reason for the correction"), answered)

    def action_next_inspector(self) -> None:
        names = self.app.people("inspector")
        if not names:
            self.notice().say("warning", "no inspector registered (lots screen, u)")
            return
        now = self.app.current_inspector()
        self.app.bench_person = names[(names.index(now) + 1) % len(names)] if now in names else names[0]
        self.update_top_bar()
        self.notice().say("info", f"results are now entered by {self.app.bench_person}")

    def action_decide(self) -> None:
        self._decide()

    @work(thread=True, exclusive=True, group="decide")
    def _decide(self) -> None:
        try:
            with self.app.write_lock:
                result = self.workflow.decide(self.lot_id, by=self.app.current_inspector())
        except Exception as exc:  # noqa: BLE001
            self.post_message(RecordRefused(one_line(exc)))
        else:
            self.app.call_from_thread(self._decided, result)

    def _decided(self, result: dict) -> None:
        self.notice().say("saved", f"saved: decision {verdict_words(result['decision'])} (entry {result['entry']}); "
                                   "F5 shows it")
        self.reload()
