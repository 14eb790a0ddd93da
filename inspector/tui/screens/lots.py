"""Lots: every registered lot with its state, supplier, product, size,
progress at the bench and decision; a filter; open a lot.

On an empty store it offers the demo lot."""

from __future__ import annotations

from rich.markup import escape
from textual import on, work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.message import Message
from textual.screen import Screen
from textual.widgets import DataTable, Input, Static

from inspector.tui.app import decision_words, state_words
from inspector.tui.screens.base import Notice, TopBar, one_line
from inspector.tui.widgets import KeyStrip


class LotsListed(Message):
    def __init__(self, lots: list[dict]) -> None:
        super().__init__()
        self.lots = lots


class DemoLoaded(Message):
    def __init__(self, lot_id: str | None, error: str | None = None) -> None:
        super().__init__()
        self.lot_id = lot_id
        self.error = error


def progress_words(lot: dict) -> str:
    """Inspected of drawn, e.g. ``12/132``; ``—`` before the draw. Reads the
    progress fields of :meth:`Workflow.lots`, so the overview needs no full
    report per lot."""
    if lot.get("sample_size") is None:
        return "—"
    return f"{lot['inspected']}/{lot['sample_size']}"


class LotsScreen(Screen):
    """All lots, newest first."""

    CSS_PATH = "lots.tcss"
    BINDINGS = [
        Binding("enter", "open", "open lot", priority=True),
        Binding("n", "register", "new lot"),
        Binding("slash", "filter", "filter", key_display="/"),
        Binding("h", "history", "supplier history"),
        Binding("u", "people", "people"),
        Binding("d", "demo", "demo lot"),
    ]

    def __init__(self) -> None:
        super().__init__()
        self.lots: list[dict] = []
        self.loaded = False

    def compose(self) -> ComposeResult:
        yield TopBar("lots")
        yield Input(placeholder="filter: lot, supplier, product, state or decision (press / )", id="filter")
        yield Static("", id="offer")
        table = DataTable(id="lots", cursor_type="row", zebra_stripes=True)
        yield table
        yield Notice("", id="notice", classes="notice")
        yield KeyStrip()

    def on_mount(self) -> None:
        table = self.query_one("#lots", DataTable)
        for label, key, width in (("lot", "lot", 10), ("state", "state", 12), ("supplier", "supplier", 11),
                                  ("product", "product", 11), ("size", "size", 6), ("done", "done", 7),
                                  ("decision", "decision", 8)):
            table.add_column(label, key=key, width=width)
        table.focus()
        self.refresh_lots()

    def on_screen_resume(self) -> None:
        if self.loaded:
            self.refresh_lots()

    def check_action(self, action: str, parameters) -> bool | None:
        if action == "demo":
            return self.loaded and not self.lots
        if action in ("open", "history"):
            return bool(self.lots) or None
        return True

    # --- loading ------------------------------------------------------------------------------------

    def refresh_lots(self) -> None:
        self._list_lots()

    @work(thread=True, exclusive=True, group="lots")
    def _list_lots(self) -> None:
        wf = self.app.workflow
        try:
            lots = wf.lots()
        except Exception as exc:  # noqa: BLE001
            self.app.call_from_thread(self.query_one(Notice).say, "error", one_line(exc))
            return
        self.post_message(LotsListed(lots))

    def on_lots_listed(self, message: LotsListed) -> None:
        self.lots = list(reversed(message.lots))
        self.loaded = True
        self.query_one("#offer", Static).display = not self.lots
        if not self.lots:
            from inspector.tui.demo import DEMO_OFFER

            self.query_one("#offer", Static).update(DEMO_OFFER)
        person = self.app.current_inspector()
        self.query_one(TopBar).update(escape(
            f"lots · {len(self.lots)} registered · at the bench: {person or 'nobody yet (press u)'}"))
        self.fill_table()
        self.refresh_bindings()

    def fill_table(self) -> None:
        table = self.query_one("#lots", DataTable)
        words = self.query_one("#filter", Input).value.strip().lower()
        table.clear()
        for lot in self.lots:
            cells = [lot["id"], state_words(lot["state"]), lot["supplier"], lot["product"], str(lot["size"]),
                     progress_words(lot), decision_words(lot["decision"])]
            if words and not any(words in str(c).lower() for c in cells):
                continue
            table.add_row(*cells, key=lot["id"])

    @on(Input.Changed, "#filter")
    def _filter_changed(self) -> None:
        self.fill_table()

    # --- actions ------------------------------------------------------------------------------------

    def selected_lot(self) -> dict | None:
        table = self.query_one("#lots", DataTable)
        if table.row_count == 0:
            return None
        key = table.coordinate_to_cell_key(table.cursor_coordinate).row_key.value
        return next((lot for lot in self.lots if lot["id"] == key), None)

    def action_open(self) -> None:
        from inspector.tui.screens import open_lot_screen, screen_for_state

        lot = self.selected_lot()
        if lot is None:
            self.query_one(Notice).say("warning", "no lot to open")
            return
        open_lot_screen(self.app, screen_for_state(lot["state"]), lot["id"])

    def action_register(self) -> None:
        from inspector.tui.screens.register import RegisterScreen

        self.app.push_screen(RegisterScreen())

    def action_filter(self) -> None:
        self.query_one("#filter", Input).focus()

    def action_history(self) -> None:
        from inspector.tui.screens.history import HistoryScreen

        lot = self.selected_lot()
        if lot is not None:
            self.app.push_screen(HistoryScreen(lot["id"]))

    def action_people(self) -> None:
        from inspector.tui.screens.people import PeopleScreen

        self.app.push_screen(PeopleScreen())

    def action_demo(self) -> None:
        self.query_one(Notice).say("info", "loading the demo lot …")
        self._load_demo()

    @work(thread=True, exclusive=True, group="demo")
    def _load_demo(self) -> None:
        from inspector.tui.demo import DEMO_LOT, add_demo_people

        try:
            with self.app.write_lock:
                add_demo_people(self.app.workflow)
        except Exception as exc:  # noqa: BLE001
            self.post_message(DemoLoaded(None, one_line(exc)))
        else:
            self.post_message(DemoLoaded(DEMO_LOT))

    def on_demo_loaded(self, message: DemoLoaded) -> None:
        from inspector.tui.demo import demo_lot_fields
        from inspector.tui.screens.register import RegisterScreen

        if message.error:
            self.query_one(Notice).say("error", message.error)
            return
        self.query_one(Notice).clear()
        self.app.bench_person = None  # the demo inspector is now the first inspector
        self.app.push_screen(RegisterScreen(prefill=demo_lot_fields(message.lot_id)))
