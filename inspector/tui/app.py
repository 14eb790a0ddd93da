"""The terminal UI: one app over the same services as the command line.

Screens call the workflow for everything that changes a lot; slow calls
(store writes, plan design, secret checks) run in thread workers and report
back with past-tense messages. The app keeps only what one run of it needs:
who is at the bench (pulled marks are recorded with the lot).
"""

from __future__ import annotations

import asyncio
import os
import threading

from textual.app import App
from textual.binding import Binding
from textual.theme import Theme

# Our own palette: slate ground, teal for the plan on view, ochre for the
# plan it is compared with. Screens use only these through theme variables.
THEME = Theme(
    name="inspector-slate",
    primary="#4FA3A5",
    secondary="#C8A24A",
    accent="#7FA7D1",
    warning="#E3A33B",
    error="#E0605A",
    success="#6DBE6A",
    foreground="#DCE3E6",
    background="#151B1F",
    surface="#1C2428",
    panel="#26323A",
    dark=True,
)

STATE_MARKS = {
    "registered": "○",
    "planned": "◔",
    "drawn": "◑",
    "inspecting": "◕",
    "decided": "●",
    "released": "✔",
    "rejected": "✘",
    "on hold": "‖",
}


def state_words(state: str | None) -> str:
    """A lot's state as a symbol and a word (readable without colour)."""
    if state is None:
        return "? unknown"
    return f"{STATE_MARKS.get(state, '?')} {state}"


def decision_words(decision: str | None) -> str:
    return {"accept": "accept ✔", "reject": "reject ✘"}.get(decision, "—")


class InspectorApp(App):
    """The lot workflow at a terminal: lots, register, plan, draw and pick,
    bench, decision, print, history, people."""

    TITLE = "inspector"
    CSS_PATH = "app.tcss"
    ENABLE_COMMAND_PALETTE = False
    BINDINGS = [Binding("ctrl+q", "quit", "quit", priority=True)]

    def __init__(self, services, *, bench_person: str | None = None, output_folder: str | None = None) -> None:
        super().__init__()
        self.services = services
        # Where the print screen proposes to write sheets (the working folder by default).
        self.output_folder = output_folder if output_folder is not None else os.getcwd()
        self.workflow = services.workflow
        self.bench_person = bench_person
        # Every write holds this lock; quitting waits for it, so an entry
        # that was keyed is committed (or refused) before the app exits.
        self.write_lock = threading.Lock()
        # Writes asked for on the UI thread and not yet finished (counted
        # before their worker starts, so a quit right after a key waits).
        self.pending_writes = 0
        self.register_theme(THEME)
        self.theme = THEME.name

    def on_mount(self) -> None:
        from inspector.tui.screens.lots import LotsScreen

        self.push_screen(LotsScreen())

    def people(self, role: str | None = None) -> list[str]:
        return [p["name"] for p in self.workflow.people() if role is None or p["role"] == role]

    def current_inspector(self) -> str | None:
        """The person recorded as entering results: the chosen one, else the
        first registered inspector."""
        if self.bench_person:
            return self.bench_person
        names = self.people("inspector")
        return names[0] if names else None

    def begin_write(self) -> None:
        """Call on the UI thread before starting a worker that writes."""
        self.pending_writes += 1

    def end_write(self) -> None:
        """Call from the writing worker when it is done (committed or refused)."""
        self.call_from_thread(self._end_write) if threading.current_thread() is not threading.main_thread() \
            else self._end_write()

    def _end_write(self) -> None:
        self.pending_writes -= 1

    async def action_quit(self) -> None:
        # Never exit under a write: an entry keyed just before quitting is
        # committed (or refused) first.
        while self.pending_writes > 0:
            await asyncio.sleep(0.01)
        await asyncio.to_thread(self.write_lock.acquire)
        self.write_lock.release()
        self.exit()
