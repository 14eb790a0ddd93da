"""Print: choose the lot's sheets and the folder to write them to.

Uses the sheet renderer (``inspector.sheets``) exactly as ``inspector
sheet`` does: the sheet model is built from the workflow's record of the
lot, then each chosen sheet is rendered to ``<folder>/<lot>-<sheet>.pdf``."""

from __future__ import annotations

import re
from pathlib import Path

from rich.markup import escape
from textual import work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal
from textual.message import Message
from textual.widgets import Input, Label, OptionList, Static
from textual.widgets.option_list import Option

from inspector.tui.screens.base import LotScreen, Notice, TopBar, one_line
from inspector.tui.widgets import KeyStrip

SHEETS = (
    ("pick", "pick list — units in walking order, with codes"),
    ("labels", "sample labels — one scannable code per unit"),
    ("bench", "bench log — for recording on paper"),
    ("release", "release sheet — decision, estimate, signatures"),
)
NEEDS_DRAW = ("pick", "labels", "bench")


class SheetsWritten(Message):
    def __init__(self, lines: list[str], failed: bool) -> None:
        super().__init__()
        self.lines = lines
        self.failed = failed


def sheet_path(folder: str, lot_id: str, sheet: str) -> Path:
    """Where a sheet goes: the lot ID made safe for a file name."""
    safe = re.sub(r"[^A-Za-z0-9._-]+", "_", lot_id).strip("._") or "lot"
    return Path(folder).expanduser() / f"{safe}-{sheet}.pdf"


class PrintScreen(LotScreen):
    """Choose sheets, write PDFs."""

    NAME = "print"
    TITLE_WORDS = "print"
    CSS_PATH = "printing.tcss"
    BINDINGS = [
        Binding("ctrl+s", "write", "write sheets", priority=True),
        Binding("ctrl+o", "folder", "output folder", priority=True),
        Binding("space", "tick", "tick sheet"),
    ]

    def __init__(self, lot_id: str, **kwargs) -> None:
        super().__init__(lot_id, **kwargs)
        self.busy = False
        self.ticked: set[str] = set()

    def compose(self) -> ComposeResult:
        yield TopBar(f"print · lot {self.lot_id}")
        yield Static("sheets (space ticks, arrows move):", classes="section")
        yield OptionList(*[Option(f"[ ] {words}", id=key) for key, words in SHEETS], id="sheets")
        with Horizontal(id="folder-row"):
            yield Label("output folder")
            yield Input(self.app.output_folder, id="folder")
        yield Static("", id="paths")
        yield Static("", id="written")
        yield Notice("", id="notice", classes="notice")
        yield KeyStrip()

    def on_mount(self) -> None:
        self.query_one("#sheets", OptionList).focus()
        self.reload()

    def populate(self, report: dict) -> None:
        drawn = bool(report.get("draw"))
        if report["state"] in ("decided", "released", "rejected", "on hold"):
            self.ticked = {"release"}
        elif drawn:
            self.ticked = {"pick", "labels"}
        else:
            self.ticked = set()
        self.show_ticks()

    def show_ticks(self) -> None:
        chooser = self.query_one("#sheets", OptionList)
        for key, words in SHEETS:
            chooser.replace_option_prompt(key, f"[{'✓' if key in self.ticked else ' '}] {words}")
        self.show_paths()

    def action_tick(self) -> None:
        chooser = self.query_one("#sheets", OptionList)
        option = chooser.highlighted_option
        if option is None or not chooser.has_focus:
            return
        self.ticked.symmetric_difference_update({option.id})
        self.show_ticks()

    def on_option_list_option_selected(self, event: OptionList.OptionSelected) -> None:
        self.ticked.symmetric_difference_update({event.option.id})
        self.show_ticks()

    def on_input_changed(self, _event) -> None:
        self.show_paths()

    def chosen(self) -> list[str]:
        return [key for key, _words in SHEETS if key in self.ticked]

    def show_paths(self) -> None:
        folder = self.query_one("#folder", Input).value
        lines = [f"{sheet:<8} → {sheet_path(folder, self.lot_id, sheet)}" for sheet in self.chosen()]
        if self.report and not self.report.get("draw"):
            lines.append("no sample drawn yet: only the release sheet has something to show")
        self.query_one("#paths", Static).update(escape("\n".join(lines) or "no sheet chosen"))

    def action_folder(self) -> None:
        self.query_one("#folder", Input).focus()

    def action_write(self) -> None:
        if self.busy:
            return
        sheets = self.chosen()
        folder = self.query_one("#folder", Input).value.strip()
        if not sheets:
            self.notice().say("error", "sheets: choose at least one sheet (space ticks it)")
            return
        if not folder or not Path(folder).expanduser().is_dir():
            self.notice().say("error", f"output folder: no such folder {folder!r}")
            self.query_one("#folder", Input).focus()
            return
        if self.report and not self.report.get("draw"):
            blocked = [s for s in sheets if s in NEEDS_DRAW]
            if blocked:
                self.notice().say("error", f"sheets: lot {self.lot_id} has no sample drawn yet, so there is no "
                                           f"{', '.join(blocked)} sheet")
                return
        self.busy = True
        self.notice().say("info", "writing …")
        self._write(sheets, folder)

    @work(thread=True, exclusive=True, group="print")
    def _write(self, sheets: list[str], folder: str) -> None:
        services = self.app.services
        writer = services.sheets  # the services' sheet writer, when this build has one
        lines: list[str] = []
        failed = False
        try:
            if writer is not None:
                data = writer.model(self.lot_id)

                def write(sheet: str, path: Path) -> int:
                    return writer.write(sheet, self.lot_id, path, data=data)
            else:
                from inspector.sheets.build import sheet_model_for_lot
                from inspector.sheets.render import render_sheet

                data = sheet_model_for_lot(self.workflow, self.lot_id)

                def write(sheet: str, path: Path) -> int:
                    return render_sheet(sheet, data, path, forms_dir=services.forms_dir, clock=services.store.clock)
        except Exception as exc:  # noqa: BLE001
            self.post_message(SheetsWritten([f"✘ {one_line(exc)}"], True))
            return
        for sheet in sheets:
            path = sheet_path(folder, self.lot_id, sheet)
            try:
                pages = write(sheet, path)
            except OSError as exc:
                failed = True
                lines.append(f"✘ {sheet}: cannot write {str(path)!r} ({exc.strerror or exc})")
            except Exception as exc:  # noqa: BLE001 - a form or data problem, one line
                failed = True
                lines.append(f"✘ {sheet}: {one_line(exc)}")
            else:
                lines.append(f"✔ {sheet}: {path} ({pages} page{'s' if pages != 1 else ''})")
        self.post_message(SheetsWritten(lines, failed))

    def on_sheets_written(self, message: SheetsWritten) -> None:
        self.busy = False
        self.query_one("#written", Static).update(escape("\n".join(message.lines)))
        if message.failed:
            self.notice().say("error", "some sheets were not written (see above)")
        else:
            self.notice().say("saved", f"wrote {len(message.lines)} sheet{'s' if len(message.lines) != 1 else ''}")
