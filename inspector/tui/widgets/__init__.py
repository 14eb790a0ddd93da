"""Widgets of the terminal UI: key strip, OC plot, scanner entry field, tally."""

from inspector.tui.widgets.keystrip import KeyStrip
from inspector.tui.widgets.ocplot import Curve, OCPlot
from inspector.tui.widgets.scanfield import ScanField
from inspector.tui.widgets.tally import Tally, verdict_words

__all__ = ["Curve", "KeyStrip", "OCPlot", "ScanField", "Tally", "verdict_words"]
