"""What every lot screen shares: the top bar, the key strip, the keys that
move between a lot's screens, loading the lot in a worker, and one-line
notices (an error stays until the next success)."""

from __future__ import annotations

from typing import Any

from rich.markup import escape
from textual import work
from textual.binding import Binding
from textual.message import Message
from textual.screen import Screen
from textual.widgets import Static

from inspector.tui.app import state_words

LOT_SCREENS = ("plan", "draw", "bench", "decision", "print", "history")


def fixed_height(widget) -> bool:
    """True when the widget's height does not follow its content, so an
    update needs no new layout of the screen (a layout pass costs tens of
    milliseconds on a busy screen; the bench cannot afford it per entry)."""
    height = widget.styles.height
    return height is not None and not height.is_auto


class TopBar(Static):
    """One line: where you are, which lot, its state."""

    def update(self, content="", *, layout: bool = False) -> None:
        super().update(content, layout=layout)


class Notice(Static):
    """A one-line message with a kind: error, warning, saved, info.

    Errors are persistent: they stay until replaced, so a store failure is
    not missed while a scanner keeps typing.
    """

    kind = ""

    def say(self, kind: str, text: str) -> None:
        for k in ("error", "warning", "saved", "info"):
            self.set_class(k == kind, f"-{k}")
        marks = {"error": "✘ ", "warning": "⚠ ", "saved": "✔ ", "info": ""}
        self.update(escape(marks.get(kind, "") + text) if text else "", layout=not fixed_height(self))
        self.kind = kind if text else ""

    def clear(self) -> None:
        self.say("info", "")


def one_line(exc: BaseException) -> str:
    """An error as one line (workflow and store errors already are)."""
    text = str(exc).strip() or type(exc).__name__
    return " ".join(text.split())


class LotLoaded(Message):
    """The lot's full record was read (``report`` is ``Workflow.show``)."""

    def __init__(self, report: dict) -> None:
        super().__init__()
        self.report = report


class LotLoadFailed(Message):
    def __init__(self, error: str) -> None:
        super().__init__()
        self.error = error


class LotScreen(Screen):
    """Base of the screens of one lot."""

    NAME = ""
    TITLE_WORDS = ""

    BINDINGS = [
        Binding("f2", "goto('plan')", "plan"),
        Binding("f3", "goto('draw')", "draw"),
        Binding("f4", "goto('bench')", "bench"),
        Binding("f5", "goto('decision')", "decision"),
        Binding("f6", "goto('print')", "print"),
        Binding("f7", "goto('history')", "history"),
        Binding("escape", "back", "lots"),
    ]

    def __init__(self, lot_id: str, *, notice: tuple[str, str] | None = None) -> None:
        super().__init__()
        self.lot_id = lot_id
        self.report: dict | None = None
        self._first_notice = notice  # (kind, text) to show once the screen is up

    @property
    def workflow(self):
        return self.app.workflow

    def check_action(self, action: str, parameters: tuple[Any, ...]) -> bool | None:
        if action == "goto" and parameters and parameters[0] == self.NAME:
            return False  # no key to go where you are
        return True

    def action_goto(self, name: str) -> None:
        from inspector.tui.screens import open_lot_screen

        open_lot_screen(self.app, name, self.lot_id, replace=True)

    def action_back(self) -> None:
        self.app.pop_screen()

    # --- loading ------------------------------------------------------------------------------------

    def reload(self) -> None:
        if self._first_notice is not None:
            self.notice().say(*self._first_notice)
            self._first_notice = None
        self._load()

    @work(thread=True, exclusive=True, group="load")
    def _load(self) -> None:
        try:
            report = self.workflow.show(self.lot_id)
        except Exception as exc:  # noqa: BLE001 - shown on screen, never a traceback
            self.post_message(LotLoadFailed(one_line(exc)))
        else:
            self.post_message(LotLoaded(report))

    def on_lot_loaded(self, message: LotLoaded) -> None:
        self.report = message.report
        self.update_top_bar()
        self.populate(message.report)

    def on_lot_load_failed(self, message: LotLoadFailed) -> None:
        self.notice().say("error", message.error)

    def populate(self, report: dict) -> None:  # pragma: no cover - each screen fills itself
        raise NotImplementedError

    def notice(self) -> Notice:
        return self.query_one("#notice", Notice)

    def update_top_bar(self) -> None:
        rep = self.report
        bar = self.query_one(TopBar)
        if rep is None:
            bar.update(escape(f"{self.TITLE_WORDS} · lot {self.lot_id}"))
            return
        flag = " · ⚠ food/safety-critical" if rep.get("critical") else ""
        bar.update(escape(f"{self.TITLE_WORDS} · {rep['id']} · {state_words(rep['state'])}{flag} · {rep['product']}"))
