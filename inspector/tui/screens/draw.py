"""Draw and pick: draw the sample (simple, stratified by a level, or two-stage
with the number of containers to open) from a seed that is shown and
recorded; then the pick list in walking order, where units are marked as
pulled and a unit that cannot be inspected is replaced by a substitute with
a reason."""

from __future__ import annotations

from rich.markup import escape
from textual import on, work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.message import Message
from textual.widgets import DataTable, Input, Label, Select, Static

from inspector.tui.screens.base import LotScreen, Notice, TopBar, one_line
from inspector.tui.widgets import KeyStrip

METHODS = (("simple random", "simple"), ("stratified by a level", "stratified"),
           ("two-stage (open k containers)", "two-stage"))


class SampleDrawn(Message):
    def __init__(self, result: dict) -> None:
        super().__init__()
        self.result = result


class PickListRead(Message):
    def __init__(self, picks: dict, pulled: set[int]) -> None:
        super().__init__()
        self.picks = picks
        self.pulled = pulled


class PulledMarked(Message):
    """A pulled mark (or its taking back) was committed to the store."""

    def __init__(self, result: dict) -> None:
        super().__init__()
        self.result = result


class UnitSubstituted(Message):
    def __init__(self, result: dict) -> None:
        super().__init__()
        self.result = result


class DrawRefused(Message):
    def __init__(self, field: str | None, error: str) -> None:
        super().__init__()
        self.field = field
        self.error = error


class DrawScreen(LotScreen):
    """Draw the sample; pick it."""

    NAME = "draw"
    TITLE_WORDS = "draw and pick"
    CSS_PATH = "draw.tcss"
    BINDINGS = [
        Binding("ctrl+s", "draw", "draw sample", priority=True),
        Binding("space", "pulled", "mark pulled"),
        Binding("x", "substitute", "substitute unit"),
    ]

    def __init__(self, lot_id: str, **kwargs) -> None:
        super().__init__(lot_id, **kwargs)
        self.levels: tuple[str, ...] = ()
        self.picks: dict | None = None
        self.pulled: set[int] = set()  # as recorded: read from the store, updated once a mark is saved
        self.busy = False

    def compose(self) -> ComposeResult:
        yield TopBar(f"draw and pick · lot {self.lot_id}")
        with Vertical(id="drawform"):
            yield Static("", id="tosample")
            with Horizontal(classes="inputs"):
                yield Label("method")
                yield Select(METHODS, value="simple", allow_blank=False, compact=True, id="method")
                yield Label("by level")
                yield Select([], allow_blank=True, compact=True, id="by", prompt="outermost")
            with Horizontal(classes="inputs"):
                yield Label("containers to open")
                yield Input("", placeholder="two-stage only", id="containers", classes="num")
                yield Label("seed")
                yield Input("", placeholder="empty: drawn from OS entropy, recorded", id="seed")
            yield Static("", id="formnote")
        yield Static("", id="drawn")
        yield Static("", id="pulled")
        table = DataTable(id="picks", cursor_type="row", zebra_stripes=True)
        yield table
        yield Notice("", id="notice", classes="notice")
        yield KeyStrip()

    def on_mount(self) -> None:
        table = self.query_one("#picks", DataTable)
        for label, key, width in (("pulled", "pulled", 6), ("unit", "unit", 6), ("address", "address", 38),
                                  ("for", "for", 8), ("note", "note", 18)):
            table.add_column(label, key=key, width=width)
        self.query_one("#drawform").display = False
        self.query_one("#picks").display = False
        self.reload()

    def check_action(self, action: str, parameters) -> bool | None:
        drawn = bool(self.report and self.report.get("draw"))
        if action == "draw":
            return (not drawn) and bool(self.report and self.report["state"] == "planned")
        if action in ("pulled", "substitute"):
            return drawn
        return super().check_action(action, parameters)

    def populate(self, report: dict) -> None:
        draw = report.get("draw")
        form = self.query_one("#drawform")
        if draw is None:
            form.display = True
            self.query_one("#picks").display = False
            plans = report.get("plans") or {}
            if not plans:
                self.query_one("#tosample", Static).update("no plan yet: F2 sets the plan of a defect class first")
            else:
                n = max(p["sample_size"] for p in plans.values())
                parts = ", ".join(f"{k} {p['sample_size']}" for k, p in plans.items())
                self.query_one("#tosample", Static).update(escape(
                    f"sample to draw: {n} of {report['size']:,} units ({parts}); smaller classes inspect a "
                    "random subsample of the drawn units"))
            self._levels()
            self.query_one("#method", Select).focus()
        else:
            form.display = False
            table = self.query_one("#picks", DataTable)
            table.display = True
            table.focus()
            lines = [f"drawn {draw['sample_size']} units · {draw['method']} · seed {draw['seed']} · "
                     f"algorithm {draw['algorithm']} · entry {draw['entry']}"]
            if draw.get("note"):
                lines.append(draw["note"])
            self.query_one("#drawn", Static).update(escape("\n".join(lines)))
            self._pick_list()
        self.refresh_bindings()

    @on(Select.Changed, "#method")
    def _method_changed(self, event: Select.Changed) -> None:
        notes = {
            "simple": "every unit has the same chance; the pick list may visit every container",
            "stratified": "each container at the level gets its share of the sample: the whole load is covered",
            "two-stage": "opens only the given number of containers (chosen by size), the same number of units "
                         "in each; faults clustered in containers make this less precise than simple",
        }
        self.query_one("#formnote", Static).update(notes.get(event.value, ""))

    # --- reading --------------------------------------------------------------------------------------

    @work(thread=True, exclusive=True, group="levels")
    def _levels(self) -> None:
        from inspector.tui.lookup import lot_structure

        try:
            levels = tuple(lot_structure(self.workflow, self.lot_id).container_levels)
        except Exception:  # noqa: BLE001 - without levels only the simple draw is offered
            levels = ()
        self.app.call_from_thread(self._set_levels, levels)

    def _set_levels(self, levels: tuple[str, ...]) -> None:
        self.levels = levels
        self.query_one("#by", Select).set_options([(name, name) for name in levels])

    @work(thread=True, exclusive=True, group="picks")
    def _pick_list(self) -> None:
        try:
            picks = self.workflow.pick_list(self.lot_id)
            pulled = set(self.workflow.pulled_marks(self.lot_id)["pulled"])
        except Exception as exc:  # noqa: BLE001
            self.post_message(DrawRefused(None, one_line(exc)))
        else:
            self.post_message(PickListRead(picks, pulled))

    def on_pick_list_read(self, message: PickListRead) -> None:
        self.picks = message.picks
        self.pulled = message.pulled
        self.fill_picks()

    def fill_picks(self) -> None:
        table = self.query_one("#picks", DataTable)
        pulled = self.pulled
        row = table.cursor_row
        table.clear()
        total = 0
        for stop in self.picks["stops"]:
            for line in stop["units"]:
                total += 1
                note = ""
                if line.get("replaces"):
                    note = f"replaces {line['replaces']}: {line.get('reason') or ''}"
                elif line.get("serial"):
                    note = f"serial {line['serial']}"
                table.add_row("[✓]" if line["unit"] in pulled else "[ ]", str(line["unit"]), line["address"],
                              self.classes_of(line["unit"]), note, key=str(line["unit"]))
        if row is not None and total:
            table.call_after_refresh(table.move_cursor, row=min(row, total - 1))
        self.total = total
        self.show_pulled()

    def classes_of(self, unit: int) -> str:
        """Which classes inspect this unit, in short: crit, maj, min."""
        classes = (self.report or {}).get("classes") or {}
        short = {"critical": "crit", "major": "maj", "minor": "min"}
        done = {(r["unit"], r["class"]) for r in (self.report or {}).get("results", [])}
        return " ".join(short[c] for c, t in classes.items()
                        if unit in t.get("open_units", ()) or (unit, c) in done)

    def show_pulled(self) -> None:
        if self.picks is None:
            return
        count = sum(1 for s in self.picks["stops"] for line in s["units"] if line["unit"] in self.pulled)
        self.query_one("#pulled", Static).update(
            f"pulled {count} of {self.total} (marks recorded with the lot) · walk the list top to bottom")

    # --- actions --------------------------------------------------------------------------------------

    def selected_unit(self) -> int | None:
        table = self.query_one("#picks", DataTable)
        if table.row_count == 0:
            return None
        return int(table.coordinate_to_cell_key(table.cursor_coordinate).row_key.value)

    def action_pulled(self) -> None:
        unit = self.selected_unit()
        if unit is None:
            return
        pulled = unit not in self.pulled
        table = self.query_one("#picks", DataTable)
        # the box changes only once the store has the mark; "…" until then
        table.update_cell(str(unit), "pulled", "[…]")
        if table.cursor_row < table.row_count - 1:
            table.move_cursor(row=table.cursor_row + 1)
        self._mark_pulled(unit, pulled, self.app.current_inspector())

    @work(thread=True, group="pulled")
    def _mark_pulled(self, unit: int, pulled: bool, who: str | None) -> None:
        try:
            with self.app.write_lock:
                result = self.workflow.mark_pulled(self.lot_id, unit, by=who, pulled=pulled)
        except Exception as exc:  # noqa: BLE001
            self.post_message(DrawRefused(None, one_line(exc)))
            self.app.call_from_thread(self._show_mark, unit)
        else:
            self.post_message(PulledMarked(result))

    def _show_mark(self, unit: int) -> None:
        try:
            self.query_one("#picks", DataTable).update_cell(str(unit), "pulled",
                                                            "[✓]" if unit in self.pulled else "[ ]")
        except Exception:  # noqa: BLE001 - the row left the list (a substitution)
            pass
        self.show_pulled()

    def on_pulled_marked(self, message: PulledMarked) -> None:
        r = message.result
        (self.pulled.add if r["pulled"] else self.pulled.discard)(r["unit"])
        # the box itself is the confirmation: it shows a mark only once the store has it
        self._show_mark(r["unit"])

    def action_draw(self) -> None:
        if self.busy:
            return
        method = self.query_one("#method", Select).value
        by = self.query_one("#by", Select).value
        by = None if by is Select.NULL or by is Select.BLANK or by in (None, "") else by
        kwargs: dict = {"method": method, "level": by, "by": self.app.current_inspector()}
        containers_text = self.query_one("#containers", Input).value.strip()
        seed_text = self.query_one("#seed", Input).value.strip()
        try:
            if containers_text:
                kwargs["containers"] = int(containers_text)
            if seed_text:
                kwargs["seed"] = int(seed_text.replace("_", ""))
                kwargs["seed_text"] = seed_text
        except ValueError:
            field = "containers" if containers_text and not containers_text.isdigit() else "seed"
            value = containers_text if field == "containers" else seed_text
            self.notice().say("error", f"{field}: expected a whole number, got {value!r}")
            self.query_one(f"#{field}", Input).focus()
            return
        if method == "two-stage" and "containers" not in kwargs:
            self.notice().say("error", "containers: a two-stage draw needs the number of containers to open")
            self.query_one("#containers", Input).focus()
            return
        self.busy = True
        self.notice().say("info", "drawing …")
        self._draw(kwargs)

    @work(thread=True, exclusive=True, group="draw")
    def _draw(self, kwargs: dict) -> None:
        from inspector.workflow import WorkflowError

        try:
            with self.app.write_lock:
                result = self.workflow.draw(self.lot_id, **kwargs)
        except WorkflowError as exc:
            self.post_message(DrawRefused(exc.field, one_line(exc)))
        except Exception as exc:  # noqa: BLE001
            self.post_message(DrawRefused(None, one_line(exc)))
        else:
            self.post_message(SampleDrawn(result))

    def on_sample_drawn(self, message: SampleDrawn) -> None:
        self.busy = False
        r = message.result
        self.reload()
        self.notice().say("saved", f"saved: {len(r['units'])} units drawn, seed {r['seed']} (entry {r['entry']}); "
                                   "F4 opens the bench")

    def on_draw_refused(self, message: DrawRefused) -> None:
        self.busy = False
        self.notice().say("error", message.error)
        if message.field in ("containers", "seed"):
            self.query_one(f"#{message.field}", Input).focus()

    def action_substitute(self) -> None:
        unit = self.selected_unit()
        if unit is None:
            return
        from inspector.tui.screens.dialogs import ReasonDialog

        who = self.app.current_inspector()
        if who is None:
            self.notice().say("error", "by: nobody is registered to record the substitution (lots screen, u)")
            return

        def answered(reason: str | None) -> None:
            if reason:
                self.notice().say("info", f"replacing unit {unit} …")
                self._substitute(unit, reason, who)

        self.app.push_screen(ReasonDialog(
            f"replace unit {unit} with a substitute", placeholder="reason (missing, broken in transit, …)",
            detail="the next unit of the draw's substitute sequence takes its place; both stay in the record"),
            answered)

    @work(thread=True, exclusive=True, group="substitute")
    def _substitute(self, unit: int, reason: str, who: str) -> None:
        try:
            with self.app.write_lock:
                result = self.workflow.substitute(self.lot_id, unit, reason=reason, by=who)
        except Exception as exc:  # noqa: BLE001
            self.post_message(DrawRefused(None, one_line(exc)))
        else:
            self.post_message(UnitSubstituted(result))

    def on_unit_substituted(self, message: UnitSubstituted) -> None:
        r = message.result
        self.notice().say("saved", f"saved: unit {r['unit']} replaced by {r['substitute']} ({r['address']}), "
                                   f"entry {r['entry']}")
        self.reload()  # the sample changed: the pick list and each unit's classes
