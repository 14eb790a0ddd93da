"""Supplier history: the supplier's lots in the order received, each with
what was inspected and found, the nonconforming rate drawn as a bar (so
the trend reads down the column), the decision, and the switching severity
(normal / tightened / discontinued) in force for it -- all from the
workflow's ``supplier_history``."""

from __future__ import annotations

from rich.markup import escape
from textual import work
from textual.app import ComposeResult
from textual.message import Message
from textual.widgets import DataTable, Static

from inspector.tui.app import decision_words, state_words
from inspector.tui.screens.base import LotScreen, Notice, TopBar, one_line
from inspector.tui.widgets import KeyStrip

_BAR = 8


class HistoryRead(Message):
    def __init__(self, history) -> None:
        super().__init__()
        self.history = history


def rate_bar(rate: float | None, top: float) -> str:
    """The rate as a percentage and a bar of eighths scaled to ``top``."""
    if rate is None:
        return "—"
    cells = 0 if top <= 0 else rate / top * _BAR
    full = int(cells)
    eighths = int(round((cells - full) * 8))
    bar = "█" * full + ("" if eighths == 0 else " ▏▎▍▌▋▊▉"[eighths])
    return f"{rate * 100:5.2f} % {bar}"


class HistoryScreen(LotScreen):
    """A supplier's record, from one of its lots."""

    NAME = "history"
    TITLE_WORDS = "supplier history"
    CSS_PATH = "history.tcss"

    def compose(self) -> ComposeResult:
        yield TopBar(f"supplier history · lot {self.lot_id}")
        yield Static("", id="summary")
        yield DataTable(id="history", cursor_type="row", zebra_stripes=True)
        yield Notice("", id="notice", classes="notice")
        yield KeyStrip()

    def on_mount(self) -> None:
        table = self.query_one("#history", DataTable)
        for label, key, width in (("received", "received", 10), ("lot", "lot", 10), ("insp.", "insp", 5),
                                  ("found", "found", 5), ("nc rate", "rate", 16),
                                  ("decision", "decision", 9), ("severity", "severity", 9)):
            table.add_column(label, key=key, width=width)
        table.focus()
        self.reload()

    def populate(self, report: dict) -> None:
        self.query_one("#summary", Static).update(escape(f"{report['supplier']} · reading the record …"))
        self._history(report["supplier"])

    @work(thread=True, exclusive=True, group="history")
    def _history(self, supplier: str) -> None:
        try:
            history = self.workflow.supplier_history(supplier)
        except Exception as exc:  # noqa: BLE001
            self.app.call_from_thread(self.notice().say, "error", one_line(exc))
            return
        self.post_message(HistoryRead(history))

    def on_history_read(self, message: HistoryRead) -> None:
        h = message.history  # Workflow.supplier_history
        lots = h["lots"]
        decided = [lot for lot in lots if lot["decision"]]
        accepted = sum(1 for lot in decided if lot["decision"] == "accept")
        reduced = " · eligible for reduced inspection (needs approval)" if h["reduced_eligible"] else ""
        actions = h.get("corrective_actions") or []
        acted = f" · {len(actions)} corrective action{'s' if len(actions) != 1 else ''}" if actions else ""
        lines = [f"{h['supplier']} · {len(lots)} lot{'s' if len(lots) != 1 else ''}, {len(decided)} decided, "
                 f"{accepted} accepted{acted} · severity now: {h['severity'].upper()}{reduced}", h["reason"]]
        lines += [f"⚠ {c}" for c in h.get("cautions") or []]
        self.query_one("#summary", Static).update(escape("\n".join(lines)))
        table = self.query_one("#history", DataTable)
        table.clear()

        def rate(lot: dict) -> float | None:
            return lot["nonconforming"] / lot["inspected"] if lot["inspected"] else None

        top = max([rate(lot) for lot in lots if rate(lot) is not None] + [0.0])
        for lot in lots:
            decision = decision_words(lot["decision"]) if lot["decision"] else state_words(lot["state"])
            severity = lot["severity"] or "—"
            if lot.get("resubmission"):
                severity += " (resub.)"
            table.add_row(lot["received_on"] or "", lot["lot_id"], str(lot["inspected"]), str(lot["nonconforming"]),
                          rate_bar(rate(lot), top), decision, severity, key=lot["lot_id"])
