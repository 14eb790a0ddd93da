"""Small dialogs: ask for a reason; ask for an approver's signature.

They only collect text; the caller hands it to the workflow and shows what
the workflow said. Escape cancels (returns None)."""

from __future__ import annotations

from rich.markup import escape
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.screen import ModalScreen
from textual.widgets import Input, Label, Static

from inspector.tui.widgets import KeyStrip


class ReasonDialog(ModalScreen[str | None]):
    """One line of text with a question above it; Enter answers."""

    CSS_PATH = "dialogs.tcss"
    # Enter reaches the field first (it submits); the binding is here so the
    # key strip names it.
    BINDINGS = [
        Binding("enter", "answer", "confirm"),
        Binding("escape", "cancel", "cancel"),
    ]

    def __init__(self, question: str, *, detail: str = "", placeholder: str = "reason",
                 value: str = "") -> None:
        super().__init__()
        self.question = question
        self.detail = detail
        self.placeholder = placeholder
        self.initial = value

    def compose(self) -> ComposeResult:
        with Vertical(id="dialog"):
            yield Label(escape(self.question), id="question")
            if self.detail:
                yield Static(escape(self.detail), id="detail")
            yield Input(self.initial, placeholder=self.placeholder, id="answer")
            yield Static("", id="problem")
        yield KeyStrip()

    def on_mount(self) -> None:
        self.query_one("#answer", Input).focus()

    def on_input_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        self.action_answer()

    def action_answer(self) -> None:
        text = self.query_one("#answer", Input).value.strip()
        if not text:
            self.query_one("#problem", Static).update(f"✘ {self.placeholder}: expected text, got nothing")
            return
        self.dismiss(text)

    def action_cancel(self) -> None:
        self.dismiss(None)


class SignDialog(ModalScreen[dict | None]):
    """An approver's printed name, the meaning of the signature and the
    secret (masked). Returns ``{"by", "meaning", "secret"}``."""

    CSS_PATH = "dialogs.tcss"
    BINDINGS = [
        Binding("ctrl+s", "answer", "sign", priority=True),
        Binding("escape", "cancel", "cancel"),
    ]

    def __init__(self, *, lot_id: str, name: str = "", meaning: str = "released by",
                 caution: str = "") -> None:
        super().__init__()
        self.lot_id = lot_id
        self.name_value = name
        self.meaning = meaning
        self.caution = caution

    def compose(self) -> ComposeResult:
        with Vertical(id="dialog"):
            yield Label(escape(f"release lot {self.lot_id}: approver's signature"), id="question")
            if self.caution:
                yield Static(escape(self.caution), id="detail", classes="caution")
            yield Label("approver", classes="field-label")
            yield Input(self.name_value, placeholder="printed name", id="by")
            yield Label("meaning", classes="field-label")
            yield Input(self.meaning, id="meaning")
            yield Label("secret", classes="field-label")
            yield Input("", password=True, placeholder="approver's secret (not shown)", id="secret")
            yield Static("Enter moves on; ctrl+s signs", id="problem")
        yield KeyStrip()

    def on_mount(self) -> None:
        self.query_one("#by" if not self.name_value else "#secret", Input).focus()

    def on_input_submitted(self, event: Input.Submitted) -> None:
        order = ["by", "meaning", "secret"]
        at = order.index(event.input.id)
        if at == len(order) - 1:
            self.action_answer()
        else:
            self.query_one(f"#{order[at + 1]}", Input).focus()

    def action_answer(self) -> None:
        values = {k: self.query_one(f"#{k}", Input).value for k in ("by", "meaning", "secret")}
        for k in ("by", "meaning", "secret"):
            if not values[k].strip():
                self.query_one("#problem", Static).update(f"✘ {k}: expected text, got nothing")
                self.query_one(f"#{k}", Input).focus()
                return
        self.dismiss(values)

    def action_cancel(self) -> None:
        self.dismiss(None)
