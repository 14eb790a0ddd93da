"""New lot: a form whose errors appear beside the field they concern.

The lot's structure is either a spec (``pallet=18,layer=4,carton=9,jar=24``)
or a manifest file (CSV), or neither (a plain count). The workflow checks
everything; this screen only turns typed text into numbers and file text
and puts each refusal next to its field."""

from __future__ import annotations

from pathlib import Path

from rich.markup import escape
from textual import work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, VerticalScroll
from textual.message import Message
from textual.screen import Screen
from textual.widgets import Checkbox, Input, Label, Static

from inspector.tui.screens.base import Notice, TopBar, one_line
from inspector.tui.widgets import KeyStrip

# (field, label, placeholder); the field names are the workflow's.
FIELDS = (
    ("id", "lot ID", "e.g. HP-2611-07"),
    ("supplier", "supplier", "who shipped it"),
    ("product", "product", "what the units are"),
    ("size", "units in lot", "the declared quantity"),
    ("structure", "structure", "e.g. pallet=18,layer=4,carton=9,jar=24 (or leave empty)"),
    ("manifest", "manifest file", "path of a CSV manifest (instead of a structure)"),
    ("reference", "reference", "purchase order or delivery note (optional)"),
    ("received_on", "received on", "YYYY-MM-DD (empty: today)"),
    ("notes", "notes", "optional"),
)
REQUIRED = ("id", "supplier", "product", "size")


def critical_words(on: bool) -> str:
    """The flag in words, so its state reads without colour."""
    return ("food or safety-critical: YES — results will be advisory" if on
            else "food or safety-critical: no (ctrl+f or space to change)")


class LotRegistered(Message):
    def __init__(self, lot_id: str) -> None:
        super().__init__()
        self.lot_id = lot_id


class RegisterRefused(Message):
    def __init__(self, field: str | None, error: str) -> None:
        super().__init__()
        self.field = field
        self.error = error


class RegisterScreen(Screen):
    """The form for a new lot."""

    CSS_PATH = "register.tcss"
    BINDINGS = [
        Binding("ctrl+s", "save", "register lot", priority=True),
        Binding("ctrl+f", "toggle_critical", "food/safety flag", priority=True),
        Binding("escape", "cancel", "cancel"),
    ]

    def __init__(self, *, prefill: dict | None = None) -> None:
        super().__init__()
        self.saving = False
        self.prefill = dict(prefill or {})

    def compose(self) -> ComposeResult:
        yield TopBar("new lot · fill in, then ctrl+s")
        with VerticalScroll(id="form"):
            for name, label, placeholder in FIELDS:
                with Horizontal(classes="field-row"):
                    yield Label(label, classes="field-label")
                    yield Input(placeholder=placeholder, id=f"f-{name}")
                yield Static("", id=f"e-{name}", classes="field-error")
            with Horizontal(classes="field-row"):
                yield Label("", classes="field-label")
                yield Checkbox(critical_words(False), id="f-critical")
            yield Static("", id="e-critical", classes="field-error")
        yield Notice("", id="notice", classes="notice")
        yield KeyStrip()

    def on_mount(self) -> None:
        for name, _label, _ph in FIELDS:
            self.query_one(f"#e-{name}", Static).display = False
        self.query_one("#e-critical", Static).display = False
        for name, value in self.prefill.items():
            if name == "critical":
                self.query_one("#f-critical", Checkbox).value = bool(value)
            else:
                self.query_one(f"#f-{name}", Input).value = str(value)
        if self.prefill:
            self.query_one(Notice).say("info", "demo lot filled in: check it, then ctrl+s registers it")
        self.query_one("#f-id", Input).focus()

    def value(self, name: str) -> str:
        return self.query_one(f"#f-{name}", Input).value

    def set_error(self, name: str, text: str) -> None:
        box = self.query_one(f"#e-{name}", Static)
        box.update(escape(f"✘ {text}") if text else "")
        box.display = bool(text)

    def clear_errors(self) -> None:
        for name, _label, _ph in FIELDS:
            self.set_error(name, "")

    def on_checkbox_changed(self, event: Checkbox.Changed) -> None:
        event.checkbox.label = critical_words(event.value)

    def action_toggle_critical(self) -> None:
        box = self.query_one("#f-critical", Checkbox)
        box.value = not box.value

    def action_cancel(self) -> None:
        self.app.pop_screen()

    def action_save(self) -> None:
        if self.saving:
            return
        self.clear_errors()
        errors: dict[str, str] = {}
        for name in REQUIRED:
            if not self.value(name).strip():
                errors[name] = f"{name}: expected text, got nothing"
        size = None
        size_text = self.value("size").strip().replace("_", "").replace(",", "")
        if size_text:
            try:
                size = int(size_text)
            except ValueError:
                errors["size"] = f"size: expected a whole number of at least 1, got {self.value('size')!r}"
        manifest_text = manifest_name = None
        manifest_path = self.value("manifest").strip()
        if manifest_path:
            path = Path(manifest_path).expanduser()
            try:
                manifest_text = path.read_text(encoding="utf-8-sig")
                manifest_name = path.name
            except OSError as exc:
                errors["manifest"] = f"manifest: cannot read {manifest_path!r} ({exc.strerror or exc})"
            except UnicodeDecodeError:
                errors["manifest"] = f"manifest: {manifest_path!r} is not UTF-8 text"
        if errors:
            for name, text in errors.items():
                self.set_error(name, text)
            self.query_one(Notice).say("error", f"{len(errors)} field{'s' if len(errors) != 1 else ''} to fix; "
                                                "nothing was registered")
            return

        def optional(name: str) -> str | None:
            text = self.value(name).strip()
            return text or None

        fields = dict(
            lot_id=self.value("id"), supplier=self.value("supplier"), product=self.value("product"), size=size,
            structure=optional("structure"), manifest_text=manifest_text, manifest_name=manifest_name,
            reference=optional("reference"), received_on=optional("received_on"), notes=optional("notes"),
            critical=self.query_one("#f-critical", Checkbox).value,
            by=self.app.current_inspector(),
        )
        self.saving = True
        self.query_one(Notice).say("info", "saving …")
        self._register(fields)

    @work(thread=True, exclusive=True, group="register")
    def _register(self, fields: dict) -> None:
        from inspector.workflow import WorkflowError

        try:
            with self.app.write_lock:
                lot = self.app.workflow.register_lot(**fields)
        except WorkflowError as exc:
            self.post_message(RegisterRefused(exc.field, one_line(exc)))
        except Exception as exc:  # noqa: BLE001 - a store failure: say so, keep the form
            self.post_message(RegisterRefused(None, one_line(exc)))
        else:
            self.post_message(LotRegistered(lot["id"]))

    def on_register_refused(self, message: RegisterRefused) -> None:
        self.saving = False
        names = {name for name, _l, _p in FIELDS}
        field = {"lot_size": "size", "lot": "id", "resubmission_of": "notes"}.get(message.field, message.field)
        if field is not None and field not in names:
            # a frame error names a part of the structure (a level, a row)
            field = "manifest" if self.value("manifest").strip() else "structure"
        if field:
            self.set_error(field, message.error)
            self.query_one(f"#f-{field}", Input).focus()
        self.query_one(Notice).say("error", f"not registered: {message.error}")

    def on_lot_registered(self, message: LotRegistered) -> None:
        from inspector.tui.screens.plan import PlanScreen

        self.saving = False
        self.app.switch_screen(PlanScreen(message.lot_id, notice=(
            "saved", f"saved: lot {message.lot_id} registered; now its plan: set AQL and RQL, ctrl+s adopts")))
