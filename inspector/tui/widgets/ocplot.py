"""An OC curve drawn with text: Braille dots for the plan on view, middle
dots for the plan it is compared with, dashed upright lines at AQL and RQL.

The widget draws whatever arrays it is given (probability of acceptance
against the fraction nonconforming); it computes nothing about plans.
Readable without colour: the two curves use different glyphs and the marks
are labelled ``AQL`` and ``RQL`` under the axis.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from rich.text import Text
from textual.widget import Widget

# Braille cell: dot (column, row) -> bit. Columns 0..1, rows 0..3.
_BRAILLE_BITS = ((0x01, 0x08), (0x02, 0x10), (0x04, 0x20), (0x40, 0x80))
_Y_AXIS = 5  # characters of the left axis: "1.0 ┤"


@dataclass(frozen=True, kw_only=True)
class Curve:
    """Points of one OC curve: ``fraction`` ascending in [0, 1], ``pa`` in [0, 1]."""

    fraction: np.ndarray
    pa: np.ndarray
    label: str = ""


def _pct(p: float) -> str:
    value = p * 100
    if value == 0:
        return "0%"
    if value >= 10:
        return f"{value:.0f}%"
    return f"{value:.2g}%"


class OCPlot(Widget):
    """Plot of Pa against the fraction nonconforming with AQL and RQL marked."""

    COMPONENT_CLASSES = {"ocplot--curve", "ocplot--compare", "ocplot--mark", "ocplot--axis"}

    DEFAULT_CSS = """
    OCPlot { width: 1fr; height: 1fr; min-height: 8; }
    OCPlot > .ocplot--curve { color: $primary; text-style: bold; }
    OCPlot > .ocplot--compare { color: $secondary; }
    OCPlot > .ocplot--mark { color: $warning; }
    OCPlot > .ocplot--axis { color: $foreground-muted; }
    """

    def __init__(self, *, id: str | None = None, classes: str | None = None) -> None:
        super().__init__(id=id, classes=classes)
        self._main: Curve | None = None
        self._compare: Curve | None = None
        self._aql: float | None = None
        self._rql: float | None = None
        self._x_max = 0.1

    def show(self, main: Curve | None, *, compare: Curve | None = None, aql: float | None = None,
             rql: float | None = None, x_max: float | None = None) -> None:
        """Draw ``main`` (and ``compare``) with AQL/RQL marks (fractions)."""
        self._main, self._compare, self._aql, self._rql = main, compare, aql, rql
        if x_max is None:
            x_max = max([v for v in (aql, rql) if v] + [0.01]) * 1.6
        self._x_max = float(min(max(x_max, 1e-6), 1.0))
        self.refresh()

    # --- drawing --------------------------------------------------------------------------------

    def _columns(self, curve: Curve, count: int) -> np.ndarray:
        xs = np.linspace(0.0, self._x_max, count)
        return np.interp(xs, curve.fraction.astype(float), curve.pa.astype(float))

    def render(self) -> Text:
        width, height = self.size.width, self.size.height
        plot_w = max(width - _Y_AXIS - 1, 4)
        plot_h = max(height - 2, 2)
        axis = self.get_component_rich_style("ocplot--axis")
        curve_style = self.get_component_rich_style("ocplot--curve")
        compare_style = self.get_component_rich_style("ocplot--compare")
        mark_style = self.get_component_rich_style("ocplot--mark")

        cells: list[list[int]] = [[0] * plot_w for _ in range(plot_h)]
        glyphs: list[list[tuple[str, object] | None]] = [[None] * plot_w for _ in range(plot_h)]

        def col_of(p: float) -> int | None:
            if p is None or not 0 <= p <= self._x_max:
                return None
            return min(int(round(p / self._x_max * (plot_w - 1))), plot_w - 1)

        for p in (self._aql, self._rql):
            c = col_of(p) if p is not None else None
            if c is not None:
                for r in range(plot_h):
                    glyphs[r][c] = ("┆", mark_style)

        if self._compare is not None:
            pa = self._columns(self._compare, plot_w)
            for c, v in enumerate(pa):
                r = min(int(round((1.0 - v) * (plot_h - 1))), plot_h - 1)
                glyphs[r][c] = ("·", compare_style)

        if self._main is not None:
            dots_w, dots_h = plot_w * 2, plot_h * 4
            pa = self._columns(self._main, dots_w)
            ys = np.minimum(np.rint((1.0 - pa) * (dots_h - 1)).astype(int), dots_h - 1)
            previous = None
            for x, y in enumerate(ys):
                low, high = (y, y) if previous is None else (min(previous, y), max(previous, y))
                for yy in range(low, high + 1):  # join steep steps so the line stays unbroken
                    cells[yy // 4][x // 2] |= _BRAILLE_BITS[yy % 4][x % 2]
                previous = y

        text = Text(no_wrap=True, overflow="crop")
        for r in range(plot_h):
            if r == 0:
                label = "1.0 ┤"
            elif r == plot_h - 1:
                label = "  0 ┤"
            elif r == (plot_h - 1) // 2:
                label = "0.5 ┤"
            else:
                label = "    │"
            text.append(label, style=axis)
            for c in range(plot_w):
                if cells[r][c]:
                    text.append(chr(0x2800 + cells[r][c]), style=curve_style)
                elif glyphs[r][c] is not None:
                    ch, st = glyphs[r][c]
                    text.append(ch, style=st)
                else:
                    text.append(" ")
            text.append("\n")
        text.append("    └" + "─" * plot_w + "\n", style=axis)
        # Bottom line: 0 %, the marks' names under their columns, the axis end.
        bottom = [" "] * (plot_w + _Y_AXIS)
        bottom[_Y_AXIS - 1] = "0"

        def put(at: int, word: str) -> None:
            at = max(0, min(at, len(bottom) - len(word)))
            if all(ch == " " for ch in bottom[at:at + len(word)]):
                bottom[at:at + len(word)] = list(word)

        end = _pct(self._x_max)
        put(len(bottom) - len(end), end)
        for p, word in ((self._aql, "AQL"), (self._rql, "RQL")):
            c = col_of(p) if p is not None else None
            if c is not None:
                put(_Y_AXIS + c - 1, word)
        text.append("".join(bottom), style=axis)
        return text
