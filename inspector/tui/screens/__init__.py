"""The screens: one per file, each with its stylesheet beside it."""

from __future__ import annotations


def lot_screen_class(name: str):
    """The screen class for one of a lot's screens, by its short name."""
    if name == "plan":
        from inspector.tui.screens.plan import PlanScreen as cls
    elif name == "draw":
        from inspector.tui.screens.draw import DrawScreen as cls
    elif name == "bench":
        from inspector.tui.screens.bench import BenchScreen as cls
    elif name == "decision":
        from inspector.tui.screens.decision import DecisionScreen as cls
    elif name == "print":
        from inspector.tui.screens.printing import PrintScreen as cls
    elif name == "history":
        from inspector.tui.screens.history import HistoryScreen as cls
    else:
        raise ValueError(f"screen: expected one of plan, draw, bench, decision, print, history, got {name!r}")
    return cls


def screen_for_state(state: str | None) -> str:
    """Where opening a lot lands: the next thing to do in its state."""
    return {
        "registered": "plan",
        "planned": "draw",
        "drawn": "draw",
        "inspecting": "bench",
    }.get(state, "decision")


def open_lot_screen(app, name: str, lot_id: str, *, replace: bool = False) -> None:
    """Show one of a lot's screens; ``replace`` swaps it for the lot screen on view."""
    screen = lot_screen_class(name)(lot_id)
    if replace:
        app.switch_screen(screen)
    else:
        app.push_screen(screen)
