"""Plan: what a sampling plan really risks at this lot's size.

Three routes: design from AQL, RQL and the two risks (smallest plan meeting
both, exact hypergeometric at the actual lot size), the code-letter tables
(inspection level + AQL -> plan) with that plan's exact risks, or n and Ac
typed as a contract states them, with the plan's own quality levels (where
Pa is 0.95 and 0.10) and its risks at this lot size. The OC
curve is drawn in the terminal with AQL and RQL marked; Pa at both, AOQL and
ATI are shown. F8 keeps the plan on view for comparison, so two plans sit
side by side. Every change of an input recomputes in a worker, which posts
``PlanDesigned`` (or ``PlanFailed``). ``ctrl+s`` adopts the plan on view for
the chosen defect class through the workflow.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Any

import numpy as np
from rich.markup import escape
from rich.text import Text
from textual import on, work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal
from textual.message import Message
from textual.widgets import Input, Label, Select, Static

from inspector.tui.screens.base import LotScreen, Notice, TopBar, one_line
from inspector.tui.widgets import Curve, KeyStrip, OCPlot

CLASSES = ("critical", "major", "minor")
LEVELS = ("S-1", "S-2", "S-3", "S-4", "I", "II", "III")
SEVERITIES = ("normal", "tightened")


@dataclass(frozen=True, kw_only=True)
class PlanFigures:
    """One plan and what it risks at the lot size (probabilities as fractions)."""

    route: str  # "risk", "table" or "typed"
    label: str
    lot_size: int
    sample_size: int
    accept: int
    reject: int
    aql: float  # fraction
    rql: float | None  # fraction (table route: where Pa falls to the consumer's risk)
    pa_at_aql: float | None
    pa_at_rql: float | None
    aoql: float
    aoql_at: int
    ati_at_aql: float | None
    ati_at_rql: float | None
    curve: Curve
    inputs: dict
    notes: tuple[str, ...] = ()


class PlanDesigned(Message):
    """A plan was computed for the inputs on view."""

    def __init__(self, figures: PlanFigures, generation: int) -> None:
        super().__init__()
        self.figures = figures
        self.generation = generation


class PlanFailed(Message):
    def __init__(self, field: str, error: str, generation: int) -> None:
        super().__init__()
        self.field = field
        self.error = error
        self.generation = generation


class PlanAdopted(Message):
    def __init__(self, result: dict) -> None:
        super().__init__()
        self.result = result


class PlanRefused(Message):
    def __init__(self, error: str) -> None:
        super().__init__()
        self.error = error


def _decimal(text: str, field: str) -> Fraction:
    from decimal import Decimal, InvalidOperation

    try:
        value = Decimal(text.strip())
    except InvalidOperation:
        raise ValueError(f"{field}: expected a number, got {text!r}") from None
    if not value.is_finite():
        raise ValueError(f"{field}: expected a finite number, got {text!r}")
    return Fraction(value)


def _curve(N: int, n: int, c: int, x_max: float) -> tuple[Curve, Any]:
    from inspector.stats.plans import oc_single

    top = max(int(np.ceil(x_max * N)), 1)
    d = np.unique(np.rint(np.linspace(0, min(top, N), 241)).astype(np.int64))
    oc = oc_single(N, n, c, d)
    return Curve(fraction=np.asarray(oc.fraction, float), pa=np.asarray(oc.pa, float)), oc


def _whole(text: str, field: str, low: int, high: int, what: str) -> int:
    """A whole number from ``low`` to ``high`` typed in ``field``."""
    words = text.strip().replace("_", "").replace(",", "")
    if not words.isdigit() or not low <= int(words) <= high:
        raise ValueError(f"{field}: expected a whole number from {low} to {high:,} ({what}), got {text!r}")
    return int(words)


# Where a typed plan's own quality levels sit: the largest lot quality
# accepted at least 95 % of the time and the smallest accepted at most 10 %
# of the time (the same levels the workflow records with a typed plan).
TYPED_PA_HIGH = Fraction(95, 100)
TYPED_PA_LOW = Fraction(10, 100)


def compute_typed(inputs: dict) -> PlanFigures:
    """The figures of a plan typed as n and Ac (pure: called in a worker).

    Raises ValueError naming ``n`` or ``Ac``.
    """
    from inspector.stats.plans import aoql_lot, aql_lot, oc_single, rql_lot

    N = inputs["lot_size"]
    n = _whole(inputs["typed_n"], "n", 1, N, "at most the lot size")
    c = _whole(inputs["typed_c"], "Ac", 0, n - 1, f"below n = {n}")
    d_aql = aql_lot(N, n, c, TYPED_PA_HIGH)
    d_rql = rql_lot(N, n, c, TYPED_PA_LOW)
    at = [d_aql] + ([d_rql] if d_rql is not None else [])
    oc = oc_single(N, n, c, np.asarray(at, np.int64))
    aql = d_aql / N
    rql = None if d_rql is None else d_rql / N
    aoql, aoql_at = aoql_lot(N, n, c)
    x_max = min(1.0, max(rql or 0, aql * 4, 0.01) * 1.8)
    curve, _oc = _curve(N, n, c, x_max)
    levels = f"Pa >= 0.95 up to {d_aql:,} nonconforming ({aql * 100:.2f} %)"
    if d_rql is not None:
        levels += f", Pa <= 0.10 from {d_rql:,} ({rql * 100:.2f} %)"
    return PlanFigures(
        route="typed", label=f"typed n={n} Ac={c}", lot_size=N, sample_size=n, accept=c, reject=c + 1,
        aql=aql, rql=rql, pa_at_aql=float(oc.pa[0]), pa_at_rql=float(oc.pa[1]) if d_rql is not None else None,
        aoql=aoql, aoql_at=int(aoql_at), ati_at_aql=float(oc.ati[0]),
        ati_at_rql=float(oc.ati[1]) if d_rql is not None else None, curve=curve, inputs=dict(inputs),
        notes=(f"the plan's own levels: {levels}",),
    )


def compute_plan(inputs: dict) -> PlanFigures:
    """Compute the plan for the inputs on view (pure: called in a worker).

    Raises ValueError naming the input at fault.
    """
    from inspector.stats.design import defectives_at, design_plan
    from inspector.stats.plans import aoql_lot, oc_single

    if inputs["route"] == "typed":
        return compute_typed(inputs)
    N = inputs["lot_size"]
    beta = _decimal(inputs["consumer_risk"], "consumer risk")
    if inputs["route"] == "risk":
        aql = _decimal(inputs["aql"], "AQL")
        rql = _decimal(inputs["rql"], "RQL")
        alpha = _decimal(inputs["producer_risk"], "producer risk")
        d = design_plan(lot_size=N, aql=aql, rql=rql, producer_risk=alpha, consumer_risk=beta, model="lot")
        x_max = min(1.0, float(rql) / 100 * 1.8)
        curve, _oc = _curve(N, d.sample_size, d.acceptance_number, x_max)
        return PlanFigures(
            route="risk", label=f"design AQL {inputs['aql']} RQL {inputs['rql']}", lot_size=N,
            sample_size=d.sample_size, accept=d.acceptance_number, reject=d.acceptance_number + 1,
            aql=float(aql) / 100, rql=float(rql) / 100, pa_at_aql=d.pa_at_aql, pa_at_rql=d.pa_at_rql,
            aoql=d.aoql, aoql_at=int(d.aoql_at), ati_at_aql=d.ati_at_aql, ati_at_rql=d.ati_at_rql, curve=curve,
            inputs=dict(inputs),
            notes=("every unit is inspected: no smaller plan meets both risks",) if d.full_inspection else (),
        )
    from inspector.stats.table_risks import table_plan_risks
    from inspector.stats.tables import TableError, lookup_plan

    try:
        tp = lookup_plan(lot_size=N, aql=inputs["table_aql"], level=inputs["level"], severity=inputs["severity"])
    except TableError as exc:
        raise ValueError(str(exc)) from None
    risks = table_plan_risks(tp, consumer_risk=beta)
    n, c = tp.sample_size, tp.acceptance_number
    rql_mark = risks.rql_at_consumer_risk_lot
    aql_fraction = float(_decimal(tp.aql, "AQL")) / 100
    x_max = min(1.0, max(rql_mark or 0, aql_fraction * 4, 0.01) * 1.8)
    curve, _oc = _curve(N, n, c, x_max)
    at = [v for v in (risks.aql_defectives, risks.rql_defectives) if v is not None]
    ati = dict(zip(at, oc_single(N, n, c, np.asarray(at, np.int64)).ati)) if at else {}
    aoql, aoql_at = aoql_lot(N, n, c)
    pa_at_rql = None
    if risks.rql_defectives is not None:
        pa_at_rql = float(oc_single(N, n, c, np.asarray([risks.rql_defectives])).pa[0])
    notes = tuple(tp.notes) + tuple(risks.notes)
    del defectives_at  # the D at AQL/RQL come from table_plan_risks
    return PlanFigures(
        route="table", label=f"table {tp.level} {tp.severity} letter {tp.plan_letter}", lot_size=N,
        sample_size=n, accept=c, reject=tp.rejection_number, aql=aql_fraction, rql=rql_mark,
        pa_at_aql=risks.pa_at_aql_lot, pa_at_rql=pa_at_rql, aoql=aoql, aoql_at=int(aoql_at),
        ati_at_aql=ati.get(risks.aql_defectives), ati_at_rql=ati.get(risks.rql_defectives), curve=curve,
        inputs=dict(inputs), notes=notes,
    )


def _p(v: float | None) -> str:
    return "—" if v is None else f"{v:.3f}"


def _pct(v: float | None) -> str:
    return "—" if v is None else f"{v * 100:.2f} %"


def _units(v: float | None) -> str:
    return "—" if v is None else f"{v:,.0f}"


def figures_table(on_view: PlanFigures | None, kept: PlanFigures | None) -> Text:
    """The numbers of the plan on view and, beside it, the kept one."""
    rows = [
        ("route", lambda f: f.route),
        ("n", lambda f: f"{f.sample_size:,}"),
        ("Ac / Re", lambda f: f"{f.accept} / {f.reject}"),
        ("Pa at AQL", lambda f: _p(f.pa_at_aql)),
        ("Pa at RQL", lambda f: _p(f.pa_at_rql)),
        ("AOQL", lambda f: _pct(f.aoql)),
        ("ATI at AQL", lambda f: _units(f.ati_at_aql)),
        ("ATI at RQL", lambda f: _units(f.ati_at_rql)),
        ("RQL mark", lambda f: _pct(f.rql)),
    ]
    if any(f is not None and f.route == "typed" for f in (on_view, kept)):
        # a typed plan's AQL is not an input: show where its Pa is 0.95
        rows.insert(-1, ("AQL mark", lambda f: _pct(f.aql)))
    text = Text(no_wrap=True, overflow="ellipsis")
    text.append(f"{'':<11}{'on view ⠿':>10}{'kept ·':>10}\n" if kept else f"{'':<11}{'on view ⠿':>10}\n",
                style="bold")
    for name, get in rows:
        a = get(on_view) if on_view else "…"
        line = f"{name:<11}{a:>10}"
        if kept:
            line += f"{get(kept):>10}"
        text.append(line + "\n")
    return text


class PlanScreen(LotScreen):
    """Design or look up the plan of each defect class, see its risks."""

    NAME = "plan"
    TITLE_WORDS = "plan"
    CSS_PATH = "plan.tcss"
    BINDINGS = [
        Binding("ctrl+s", "adopt", "adopt for class", priority=True),
        Binding("ctrl+k", "next_class", "class", priority=True),
        Binding("ctrl+t", "route", "risk/table/typed", priority=True),
        Binding("f8", "keep", "keep to compare", priority=True),
        Binding("f9", "unkeep", "drop compared", priority=True),
    ]

    def __init__(self, lot_id: str, **kwargs) -> None:
        super().__init__(lot_id, **kwargs)
        self.route = "risk"
        self.generation = 0
        self.on_view: PlanFigures | None = None
        self.kept: PlanFigures | None = None
        self._timer = None
        self.severity_in_force = "normal"
        self.switching_words = ""

    def compose(self) -> ComposeResult:
        yield TopBar(f"plan · lot {self.lot_id}")
        with Horizontal(id="row-class", classes="inputs"):
            yield Label("class")
            yield Select([(c, c) for c in CLASSES], value="major", allow_blank=False, compact=True, id="cls")
            yield Static("", id="route-words")
        with Horizontal(id="row-risk", classes="inputs"):
            yield Label("AQL %")
            yield Input("1.0", id="aql", classes="num")
            yield Label("RQL %")
            yield Input("5", id="rql", classes="num")
            yield Label("α")
            yield Input("0.05", id="producer_risk", classes="num")
            yield Label("β")
            yield Input("0.10", id="consumer_risk", classes="num")
        with Horizontal(id="row-table", classes="inputs"):
            yield Label("level")
            yield Select([(v, v) for v in LEVELS], value="II", allow_blank=False, compact=True, id="level")
            yield Label("AQL %")
            yield Input("1.0", id="table_aql", classes="num")
            yield Select([(v, v) for v in SEVERITIES], value="normal", allow_blank=False, compact=True,
                         id="severity")
        with Horizontal(id="row-typed", classes="inputs"):
            yield Label("n")
            yield Input("50", id="typed_n", classes="num")
            yield Label("Ac")
            yield Input("1", id="typed_c", classes="num")
            yield Static("", id="typed-error")
        with Horizontal(id="body"):
            yield OCPlot(id="oc")
            yield Static("", id="figures")
        yield Static("", id="adopted")
        yield Notice("", id="notice", classes="notice")
        yield KeyStrip()

    def on_mount(self) -> None:
        self.show_route()
        self.query_one("#aql", Input).focus()
        self.reload()

    def action_next_class(self) -> None:
        select = self.query_one("#cls", Select)
        select.value = CLASSES[(CLASSES.index(select.value) + 1) % len(CLASSES)]

    def populate(self, report: dict) -> None:
        self._switching()
        plans = report.get("plans") or {}
        if plans:
            parts = [f"{k} n={p['sample_size']} Ac={p['accept']} ({p['chosen_by']})" for k, p in plans.items()]
            words = "plans of this lot: " + " · ".join(parts)
        else:
            words = "no plan adopted yet: choose a class, set the inputs, ctrl+s"
        if report["state"] not in ("registered", "planned"):
            words += "  (drawn: plans are fixed)"
        self.query_one("#adopted", Static).update(escape(words))
        self.recompute()

    @work(thread=True, exclusive=True, group="switching")
    def _switching(self) -> None:
        try:
            state = self.workflow.switching_for_lot(self.lot_id)
        except Exception:  # noqa: BLE001 - the tables then start from normal, as the standard does
            return
        self.app.call_from_thread(self._set_switching, state)

    def _set_switching(self, state: dict) -> None:
        severity = state.get("severity") or "normal"
        self.switching_words = f"switching: {severity} — {state.get('reason', '')}"
        if severity in SEVERITIES and severity != self.severity_in_force:
            self.severity_in_force = severity
            self.query_one("#severity", Select).value = severity
        elif severity not in SEVERITIES:
            self.severity_in_force = severity  # discontinued: the workflow refuses table plans
        self.show_route()

    # --- inputs ---------------------------------------------------------------------------------------

    def show_route(self) -> None:
        self.query_one("#row-risk").display = self.route != "typed"
        self.query_one("#row-table").display = self.route == "table"
        self.query_one("#row-typed").display = self.route == "typed"
        self.query_one("#route-words", Static).update({
            "risk": "route: design from AQL/RQL (ctrl+t: tables)",
            "table": f"route: table, {self.severity_in_force} in force (ctrl+t: typed n, Ac)",
            "typed": "route: n and Ac as typed (ctrl+t: design)",
        }[self.route])

    def inputs(self) -> dict:
        def val(i: str) -> str:
            return self.query_one(f"#{i}", Input).value

        return {
            "route": self.route,
            "lot_size": self.report["size"] if self.report else None,
            "aql": val("aql"), "rql": val("rql"), "producer_risk": val("producer_risk"),
            "consumer_risk": val("consumer_risk"), "table_aql": val("table_aql"),
            "typed_n": val("typed_n"), "typed_c": val("typed_c"),
            "level": self.query_one("#level", Select).value,
            "severity": self.query_one("#severity", Select).value,
        }

    @on(Input.Changed)
    @on(Select.Changed)
    def _changed(self, event) -> None:
        if (self.notice().kind == "saved" and self.on_view is not None
                and getattr(event.control, "has_focus", False)):
            self.notice().clear()  # the user moved on from what was saved
        if self._timer is not None:
            self._timer.stop()
        # Wait for a pause in typing before recomputing.
        self._timer = self.set_timer(0.2, self.recompute)

    def recompute(self) -> None:
        if self._timer is not None:  # a recompute asked now replaces the one waiting
            self._timer.stop()
            self._timer = None
        if self.report is None:
            return
        self.generation += 1
        self._design(self.inputs(), self.generation)

    @work(thread=True, exclusive=True, group="design")
    def _design(self, inputs: dict, generation: int) -> None:
        try:
            figures = compute_plan(inputs)
        except (ValueError, ArithmeticError) as exc:
            text = one_line(exc)
            field = text.split(":", 1)[0] if ":" in text else "plan"
            self.post_message(PlanFailed(field, text, generation))
        else:
            self.post_message(PlanDesigned(figures, generation))

    def on_plan_designed(self, message: PlanDesigned) -> None:
        if message.generation != self.generation:
            return  # inputs changed since; a newer result is on its way
        self.on_view = message.figures
        self.query_one("#typed-error", Static).update("")
        self.draw_figures()
        notes = "; ".join(message.figures.notes[:1])
        if self.notice().kind not in ("saved", "warning"):  # a "saved" stays until the next action
            self.notice().say("info", notes)

    def on_plan_failed(self, message: PlanFailed) -> None:
        if message.generation != self.generation:
            return
        self.on_view = None
        self.draw_figures()
        # a bad n or Ac is shown beside the two fields as well as in the notice
        self.query_one("#typed-error", Static).update(
            escape(message.error) if self.route == "typed" and message.field in ("n", "Ac") else "")
        self.notice().say("error", message.error)

    def draw_figures(self) -> None:
        f, k = self.on_view, self.kept
        plot = self.query_one(OCPlot)
        if f is None:
            plot.show(None, compare=k.curve if k else None)
        else:
            x_max = float(f.curve.fraction[-1]) if len(f.curve.fraction) else None
            plot.show(f.curve, compare=k.curve if k else None, aql=f.aql, rql=f.rql, x_max=x_max)
        self.query_one("#figures", Static).update(figures_table(f, k))

    # --- actions --------------------------------------------------------------------------------------

    def action_route(self) -> None:
        self.notice().clear()
        self.route = {"risk": "table", "table": "typed", "typed": "risk"}[self.route]
        self.show_route()
        self.recompute()

    def action_keep(self) -> None:
        if self.on_view is None:
            self.notice().say("warning", "no plan on view to keep")
            return
        self.kept = self.on_view
        self.draw_figures()
        self.notice().say("info", f"kept for comparison: n={self.kept.sample_size} Ac={self.kept.accept} "
                                  f"({self.kept.route}); change the inputs to compare")

    def action_unkeep(self) -> None:
        self.kept = None
        self.draw_figures()

    def action_adopt(self) -> None:
        f = self.on_view
        if f is None:
            self.notice().say("warning", "no plan on view to adopt")
            return
        cls = self.query_one("#cls", Select).value
        if f.route == "risk":
            kwargs = dict(defect_class=cls, aql=f.inputs["aql"], rql=f.inputs["rql"],
                          producer_risk=f.inputs["producer_risk"], consumer_risk=f.inputs["consumer_risk"])
        elif f.route == "typed":
            kwargs = dict(defect_class=cls, sample=f.sample_size, accept=f.accept)
        else:
            kwargs = dict(defect_class=cls, table=True, aql=f.inputs["table_aql"], level=f.inputs["level"])
            if f.inputs["severity"] != self.severity_in_force:
                kwargs["severity"] = f.inputs["severity"]  # entered by hand; the record keeps both
        kwargs["by"] = self.app.current_inspector()
        self.notice().say("info", f"saving the {cls} plan …")
        self._adopt(kwargs)

    @work(thread=True, exclusive=True, group="adopt")
    def _adopt(self, kwargs: dict) -> None:
        try:
            with self.app.write_lock:
                result = self.workflow.plan(self.lot_id, **kwargs)
        except Exception as exc:  # noqa: BLE001 - workflow refusal or store error, shown in one line
            self.post_message(PlanRefused(one_line(exc)))
        else:
            self.post_message(PlanAdopted(result))

    def on_plan_adopted(self, message: PlanAdopted) -> None:
        r = message.result
        self.notice().say("saved", f"saved: {r['class']} plan n={r['sample_size']} Ac={r['accept']} "
                                   f"Re={r['reject']} (entry {r['entry']}); F3 draws the sample")
        self.reload()

    def on_plan_refused(self, message: PlanRefused) -> None:
        self.notice().say("error", message.error)
