"""People: who inspects and who approves. Add a person (name, role and
secret, masked); choose who is at the bench, i.e. whose name the results
are recorded under while the app runs."""

from __future__ import annotations

from textual import work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal
from textual.message import Message
from textual.screen import Screen
from textual.widgets import DataTable, Input, Label, Select

from inspector.tui.screens.base import Notice, TopBar, one_line
from inspector.tui.widgets import KeyStrip


class PersonAdded(Message):
    def __init__(self, person: dict | None, error: str | None = None, field: str | None = None) -> None:
        super().__init__()
        self.person = person
        self.error = error
        self.field = field


class PeopleScreen(Screen):
    """The people in the store."""

    CSS_PATH = "people.tcss"
    BINDINGS = [
        Binding("ctrl+s", "add", "add person", priority=True),
        Binding("ctrl+t", "bench", "put at the bench", priority=True),
        Binding("escape", "back", "back"),
    ]

    def compose(self) -> ComposeResult:
        yield TopBar("people")
        yield DataTable(id="people", cursor_type="row")
        with Horizontal(classes="field-row"):
            yield Label("name", classes="field-label")
            yield Input("", placeholder="printed name", id="name")
        with Horizontal(classes="field-row"):
            yield Label("role", classes="field-label")
            yield Select([("inspector", "inspector"), ("approver", "approver")], value="inspector",
                         allow_blank=False, compact=True, id="role")
        with Horizontal(classes="field-row"):
            yield Label("secret", classes="field-label")
            yield Input("", password=True, placeholder="at least 8 characters (not shown)", id="secret")
        yield Notice("", id="notice", classes="notice")
        yield KeyStrip()

    def on_mount(self) -> None:
        table = self.query_one("#people", DataTable)
        table.add_column("name", key="name", width=30)
        table.add_column("role", key="role", width=10)
        table.add_column("", key="bench", width=16)
        self.fill()
        self.query_one("#name", Input).focus()

    def fill(self) -> None:
        table = self.query_one("#people", DataTable)
        table.clear()
        at_bench = self.app.current_inspector()
        for p in self.app.workflow.people():
            table.add_row(p["name"], p["role"], "◆ at the bench" if p["name"] == at_bench else "", key=p["name"])

    def action_back(self) -> None:
        self.app.pop_screen()

    def action_bench(self) -> None:
        table = self.query_one("#people", DataTable)
        if table.row_count == 0:
            return
        name = table.coordinate_to_cell_key(table.cursor_coordinate).row_key.value
        self.app.bench_person = name
        self.fill()
        self.query_one(Notice).say("info", f"results are now recorded as entered by {name}")

    def on_input_submitted(self, event: Input.Submitted) -> None:
        if event.input.id == "name":
            self.query_one("#role", Select).focus()
        else:
            self.action_add()

    def action_add(self) -> None:
        name = self.query_one("#name", Input).value
        role = self.query_one("#role", Select).value
        secret = self.query_one("#secret", Input).value
        self.query_one(Notice).say("info", "saving …")
        self._add(name, role, secret)

    @work(thread=True, exclusive=True, group="person")
    def _add(self, name: str, role: str, secret: str) -> None:
        from inspector.workflow import WorkflowError

        try:
            with self.app.write_lock:
                person = self.app.workflow.add_person(name=name, role=role, secret=secret)
        except WorkflowError as exc:
            self.post_message(PersonAdded(None, one_line(exc), exc.field))
        except Exception as exc:  # noqa: BLE001
            self.post_message(PersonAdded(None, one_line(exc)))
        else:
            self.post_message(PersonAdded(person))

    def on_person_added(self, message: PersonAdded) -> None:
        if message.error:
            self.query_one(Notice).say("error", message.error)
            if message.field in ("name", "secret"):
                self.query_one(f"#{message.field}", Input).focus()
            return
        p = message.person
        self.query_one(Notice).say("saved", f"saved: {p['name']} ({p['role']}), entry {p['entry']}")
        for field in ("name", "secret"):
            self.query_one(f"#{field}", Input).value = ""
        self.fill()
        self.query_one("#name", Input).focus()
