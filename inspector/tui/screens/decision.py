"""Decision: accept or reject per defect class and overall, the estimate of
nonconforming units left in the lot with its exact interval and upper
bound, the evidence in plain words, the cautions; then the disposition:
release with an approver's signature, hold with a reason, or reject.

The decision is the workflow's (computed from the results, never typed);
this screen shows it and passes on what the user chose."""

from __future__ import annotations

from rich.markup import escape
from rich.text import Text
from textual import work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import VerticalScroll
from textual.message import Message
from textual.widgets import Static

from inspector.tui.screens.base import LotScreen, Notice, TopBar, one_line
from inspector.tui.widgets import KeyStrip, verdict_words


class DispositionSaved(Message):
    def __init__(self, words: str) -> None:
        super().__init__()
        self.words = words


class DispositionRefused(Message):
    def __init__(self, error: str) -> None:
        super().__init__()
        self.error = error


def _pct(x: float | None) -> str:
    return "—" if x is None else f"{x * 100:.2f} %"


def class_lines(report: dict) -> Text:
    """The per-class table: verdict, then the estimate with its bounds."""
    text = Text(no_wrap=True, overflow="ellipsis")
    text.append(f"{'class':<9}{'n':>5}{'found':>6}{'Ac/Re':>7}  {'verdict':<10}{'est.':>7}"
                f"{'95% interval':>15}{'≤ upper':>9}\n", style="bold")
    estimates = report.get("estimate") or {}
    for cls, t in (report.get("classes") or {}).items():
        e = estimates.get(cls)
        if e:
            est = f"{e['point_defectives']:,.0f}"
            interval = f"{e['lower_defectives']:,}–{e['upper_defectives']:,}"
            upper = f"{e['upper_bound_defectives']:,}"
        else:
            est = interval = upper = "—"
        text.append(f"{cls:<9}{t['inspected']:>5}{t['nonconforming']:>6}{str(t['accept']) + '/' + str(t['reject']):>7}"
                    f"  {verdict_words(t['verdict']):<10}{est:>7}{interval:>15}{upper:>9}\n")
    return text


def evidence_words(report: dict) -> str:
    """The evidence in plain sentences, one per class."""
    lines = []
    N = report["size"]
    for cls, e in (report.get("estimate") or {}).items():
        if not e:
            lines.append(f"{cls}: no unit inspected yet.")
            continue
        conf = round(e["confidence"] * 100)
        line = (f"{cls}: {e['found']} nonconforming in {e['sample_size']} inspected. With {conf} % confidence "
                f"at most {e['upper_bound_defectives']:,} of the {N:,} units ({_pct(e['upper_bound_fraction'])}) "
                f"are nonconforming in this class; the exact {conf} % interval is "
                f"{e['lower_defectives']:,} to {e['upper_defectives']:,} units.")
        reading = (e.get("evidence") or {}).get("reading")
        if reading:
            line += f" {reading}"
        if e.get("curtailed"):
            line += f" Estimate {e.get('label') or 'from a curtailed sample'}."
        lines.append(line)
    return "\n".join(lines)


class DecisionScreen(LotScreen):
    """What was found, what it means, and what happens to the lot."""

    NAME = "decision"
    TITLE_WORDS = "decision"
    CSS_PATH = "decision.tcss"
    BINDINGS = [
        Binding("d", "decide", "take decision"),
        Binding("r", "release", "release (sign)"),
        Binding("h", "hold", "hold"),
        Binding("x", "reject", "reject lot"),
    ]

    def compose(self) -> ComposeResult:
        yield TopBar(f"decision · lot {self.lot_id}")
        with VerticalScroll(id="body"):
            yield Static("", id="advisory", classes="caution")
            yield Static("", id="overall")
            yield Static("", id="classes")
            yield Static("", id="evidence")
            yield Static("", id="record")
            yield Static("", id="cautions")
        yield Notice("", id="notice", classes="notice")
        yield KeyStrip()

    def on_mount(self) -> None:
        self.query_one("#body").focus()
        self.reload()

    def check_action(self, action: str, parameters) -> bool | None:
        rep = self.report
        state = rep["state"] if rep else None
        if action == "decide":
            return state in ("drawn", "inspecting", "decided", "on hold")
        if action == "release":
            return state in ("decided", "on hold")
        if action == "hold":
            return state == "decided"
        if action == "reject":
            return state in ("decided", "on hold")
        return super().check_action(action, parameters)

    def populate(self, report: dict) -> None:
        from inspector.workflow import ADVISORY, SAMPLING_CAUTION

        advisory = self.query_one("#advisory", Static)
        advisory.update(escape(f"⚠ {ADVISORY}") if report.get("critical") else "")
        advisory.display = bool(report.get("critical"))
        decision = report.get("decision")
        detail = report.get("decision_detail") or {}
        if decision:
            early = " EARLY (curtailed sample)" if detail.get("curtailed") else ""
            overall = f"OVERALL: {verdict_words(decision).upper()}{early} · decision entry {detail.get('entry')}"
            if detail and not detail.get("matches_results", True):
                overall += " · ⚠ results corrected since: take the decision again (d)"
        else:
            computed = report.get("computed_decision")
            open_units = sum(t.get("open", 0) for t in (report.get("classes") or {}).values())
            overall = (f"OVERALL: not decided · {open_units} unit checks open" if computed is None
                       else f"OVERALL: ready — {verdict_words(computed)} · press d to record the decision")
        overall += f" · state {report['state']}"
        self.query_one("#overall", Static).update(escape(overall))
        self.query_one("#classes", Static).update(class_lines(report))
        self.query_one("#evidence", Static).update(escape(evidence_words(report)))
        rec = []
        for d in report.get("dispositions", []):
            rec.append(f"{d['disposition']} by {d['by']} at {d['at'][:16].replace('T', ' ')}"
                       + (f": {d['reason']}" if d.get("reason") else "") + f" (entry {d['entry']})")
        for s in report.get("signatures", []):
            changed = " · ⚠ CHANGED SINCE SIGNED" if s.get("changed_since_signed") else ""
            rec.append(f"signed: {s['printed_name']}, “{s['meaning']}”, {s['at'][:16].replace('T', ' ')}"
                       f" (entry {s['entry']}){changed}")
        if report.get("failed_attempts"):
            rec.append(f"{len(report['failed_attempts'])} refused signature attempt(s) on record")
        self.query_one("#record", Static).update(escape("\n".join(rec)))
        cautions = [c for c in report.get("cautions", []) if c != ADVISORY] or [SAMPLING_CAUTION]
        self.query_one("#cautions", Static).update(escape("\n".join(cautions)))
        if getattr(self, "_show_record", False):
            # After a release, hold or rejection, bring the record of it into view.
            self._show_record = False
            body = self.query_one("#body")
            body.call_after_refresh(body.scroll_to_widget, self.query_one("#record"), animate=False, top=True)
        self.refresh_bindings()

    # --- actions -----------------------------------------------------------------------------------

    def action_decide(self) -> None:
        self._run("decide", lambda wf: wf.decide(self.lot_id, by=self.app.current_inspector()),
                  lambda r: f"saved: decision {verdict_words(r['decision'])} (entry {r['entry']})"
                  + (" — already recorded" if r.get("already") else ""))

    def action_hold(self) -> None:
        from inspector.tui.screens.dialogs import ReasonDialog

        def answered(reason: str | None) -> None:
            if reason:
                self._run("hold", lambda wf: wf.hold(self.lot_id, reason=reason, by=self.app.current_inspector()),
                          lambda r: f"saved: lot on hold — {r['reason']} (entry {r['entry']})")

        self.app.push_screen(ReasonDialog(f"put lot {self.lot_id} on hold: why?",
                                          placeholder="reason (awaiting lab result, supplier contacted, …)"),
                             answered)

    def action_reject(self) -> None:
        from inspector.tui.screens.dialogs import ReasonDialog

        def answered(reason: str | None) -> None:
            if reason:
                self._run("reject", lambda wf: wf.reject(self.lot_id, reason=reason, by=self.app.current_inspector()),
                          lambda r: f"saved: lot rejected — {r['reason']} (entry {r['entry']})")

        self.app.push_screen(ReasonDialog(f"reject lot {self.lot_id}: what happens to it?",
                                          placeholder="reason (return to supplier, scrap, …)"), answered)

    def action_release(self) -> None:
        from inspector.tui.screens.dialogs import SignDialog
        from inspector.workflow import ADVISORY

        approvers = self.app.people("approver")
        caution = ADVISORY if self.report and self.report.get("critical") else ""

        def answered(values: dict | None) -> None:
            if values:
                self._run("release", lambda wf: wf.release(self.lot_id, by=values["by"], meaning=values["meaning"],
                                                           secret=values["secret"]),
                          lambda r: f"saved: lot released, signed by {r['signature']['printed_name']} "
                                    f"(entry {r['signature']['entry']})")

        self.app.push_screen(SignDialog(lot_id=self.lot_id, name=approvers[0] if len(approvers) == 1 else "",
                                        caution=caution), answered)

    def _run(self, what: str, call, words) -> None:
        self.notice().say("info", f"{what}: saving …")
        self._write(call, words)

    @work(thread=True, exclusive=True, group="disposition")
    def _write(self, call, words) -> None:
        try:
            with self.app.write_lock:
                result = call(self.workflow)
        except Exception as exc:  # noqa: BLE001 - workflow refusal or store error, one line
            self.post_message(DispositionRefused(one_line(exc)))
        else:
            self.post_message(DispositionSaved(words(result)))

    def on_disposition_saved(self, message: DispositionSaved) -> None:
        self.notice().say("saved", message.words)
        self._show_record = True
        self.reload()

    def on_disposition_refused(self, message: DispositionRefused) -> None:
        self.notice().say("error", message.error)
        self.reload()
