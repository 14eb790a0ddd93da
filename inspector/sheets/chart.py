"""The OC curve chart of the release sheet.

The curve's points come from :func:`inspector.stats.plans.oc_single`, the
same exact finite-lot function the plan's risks and the lot's decision rest
on; the marker of the lot's own result from :func:`plans.pa_lot`. The
module looks both up on ``inspector.stats.plans`` at call time, so what the
chart draws is always what that module computes.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction

import numpy as np

from inspector.sheets import fmt
from inspector.sheets.fonts import BOLD, REGULAR, register_fonts, runs
from inspector.sheets.model import SheetEstimate, SheetPlan

#: Points along the curve (more would not show at print resolution).
CURVE_POINTS = 161


@dataclass(frozen=True)
class OCPoints:
    """The plotted curve: D values and their Pa, as returned by oc_single."""

    defectives: tuple[int, ...]
    pa: tuple[float, ...]


def curve_points(plan: SheetPlan, estimate: SheetEstimate | None = None) -> OCPoints:
    """The curve to plot for ``plan``, from ``plans.oc_single``.

    The horizontal range runs from 0 to a little past the D where Pa falls
    to 1 %, wide enough to show the AQL, the RQL and the lot's estimate.
    """
    from inspector.stats import plans

    N, n, c = plan.lot_size, plan.sample_size, plan.acceptance
    end = plans.rql_lot(N, n, c, Fraction(1, 100)) or N
    want = [end]
    for d in (plan.rql_defectives, plan.aql_defectives):
        if d is not None:
            want.append(d)
    if estimate is not None:
        want.append(estimate.upper)
    top = min(N, max(max(want) * 115 // 100, c + 2, 4))
    grid = np.unique(np.linspace(0, top, CURVE_POINTS).round().astype(np.int64))
    oc = plans.oc_single(N, n, c, grid)
    return OCPoints(
        defectives=tuple(int(d) for d in np.asarray(oc.defectives)),
        pa=tuple(float(p) for p in np.asarray(oc.pa)),
    )


def _label(drawing, x, y, text, size=7, bold=False, anchor="start", fill=None):
    from reportlab.graphics.shapes import String
    from reportlab.lib import colors
    from reportlab.pdfbase.pdfmetrics import stringWidth

    pieces = runs(text, BOLD if bold else REGULAR)
    total = sum(stringWidth(p, f, size) for f, p in pieces)
    if anchor == "end":
        x -= total
    elif anchor == "middle":
        x -= total / 2
    for font, piece in pieces:
        drawing.add(String(x, y, piece, fontName=font, fontSize=size, fillColor=fill or colors.black))
        x += stringWidth(piece, font, size)


def oc_chart(plan: SheetPlan, estimate: SheetEstimate | None, *, width: float, height: float):
    """A reportlab Drawing: Pa against the lot's percent nonconforming, with
    the AQL, the RQL and this lot's estimate (and its exact interval) marked.

    ``drawing.oc_points`` keeps the plotted :class:`OCPoints`.
    """
    from reportlab.graphics.charts.lineplots import LinePlot
    from reportlab.graphics.shapes import Circle, Drawing, Line, Rect
    from reportlab.lib import colors

    register_fonts()
    points = curve_points(plan, estimate)
    N = plan.lot_size
    xs = [100.0 * d / N for d in points.defectives]
    data = list(zip(xs, points.pa))

    d = Drawing(width, height)
    left, bottom, right, top = 34, 26, 8, 16
    lp = LinePlot()
    lp.x, lp.y = left, bottom
    lp.width, lp.height = width - left - right, height - bottom - top
    lp.data = [data]
    lp.joinedLines = 1
    lp.lines[0].strokeColor = colors.black
    lp.lines[0].strokeWidth = 1.3
    lp.xValueAxis.valueMin = 0
    lp.xValueAxis.valueMax = max(xs[-1], 1e-9)
    lp.yValueAxis.valueMin = 0
    lp.yValueAxis.valueMax = 1
    lp.yValueAxis.valueSteps = [0, 0.2, 0.4, 0.6, 0.8, 1.0]
    lp.yValueAxis.labelTextFormat = "%.1f"
    span = xs[-1] or 1.0
    step = _nice_step(span / 6)
    lp.xValueAxis.valueSteps = [round(i * step, 10) for i in range(int(span / step) + 1)]
    lp.xValueAxis.labelTextFormat = lambda v: fmt.sig(v, 3)
    for axis in (lp.xValueAxis, lp.yValueAxis):
        axis.labels.fontName = REGULAR
        axis.labels.fontSize = 7
        axis.strokeWidth = 0.6
    lp.yValueAxis.visibleGrid = 1
    lp.yValueAxis.gridStrokeColor = colors.Color(0.85, 0.85, 0.85)
    lp.yValueAxis.gridStrokeWidth = 0.4
    lp_x = lp.xValueAxis
    # The axes are only scaled once the plot is drawn; build them now so
    # markers can be placed in data coordinates.
    lp.xValueAxis.setPosition(lp.x, lp.y, lp.width)
    lp.xValueAxis.configure(lp.data)
    lp.yValueAxis.setPosition(lp.x, lp.y, lp.height)
    lp.yValueAxis.configure([[(0, v) for _, v in data]])

    def X(pct):
        return lp_x.scale(min(max(pct, 0.0), xs[-1]))

    def Y(pa):
        return lp.yValueAxis.scale(pa)

    y0, y1 = Y(0), Y(1)
    grey = colors.Color(0.45, 0.45, 0.45)

    if estimate is not None:
        lo, hi = 100.0 * estimate.lower / N, 100.0 * estimate.upper / N
        d.add(Rect(X(lo), y0, max(X(hi) - X(lo), 0.8), y1 - y0, fillColor=colors.Color(0.91, 0.91, 0.91),
                   strokeColor=None))
    d.add(lp)  # after the band, so the curve is drawn over it

    legend: list[tuple[str, bool]] = []

    def marker(pct, pa, tag, dash, side):
        # Short tags at the lines (AQL left of its line, RQL right of its
        # line, so close levels never collide); the values go in the legend.
        x = X(pct)
        line = Line(x, y0, x, y1, strokeColor=grey, strokeWidth=0.7)
        line.strokeDashArray = dash
        d.add(line)
        if pa is not None:
            d.add(Circle(x, Y(pa), 2.2, fillColor=colors.white, strokeColor=colors.black, strokeWidth=0.8))
        from reportlab.pdfbase.pdfmetrics import stringWidth

        if side == "left" and x - 2 - stringWidth(tag, REGULAR, 6.5) > lp.x + 2:
            _label(d, x - 2, y0 + 3, tag, size=6.5, anchor="end", fill=grey)
        else:
            _label(d, x + 2, y0 + 3, tag, size=6.5, anchor="start", fill=grey)

    if plan.aql_percent is not None:
        name = "AQL (where Pa = 0.95)" if plan.own_levels else "AQL"
        marker(float(plan.aql_percent), plan.pa_at_aql, "AQL", [2, 2], "left")
        legend.append((f"- - {name} {fmt.percent(plan.aql_percent)}: Pa {fmt.prob(plan.pa_at_aql)}", False))
    if plan.rql_percent is not None:
        name = "RQL (where Pa = 0.10)" if plan.own_levels or plan.rql_own else "RQL"
        marker(float(plan.rql_percent), plan.pa_at_rql, "RQL", [4, 2], "right")
        legend.append((f"- - {name} {fmt.percent(plan.rql_percent)}: Pa {fmt.prob(plan.pa_at_rql)}", False))
    if estimate is not None:
        from inspector.stats import plans

        point_pct = 100.0 * estimate.point / N
        pa_here = float(plans.pa_lot(N, plan.sample_size, plan.acceptance, int(round(estimate.point))))
        x = X(point_pct)
        d.add(Line(x, y0, x, y1, strokeColor=colors.black, strokeWidth=1.0))
        d.add(Circle(x, Y(pa_here), 2.6, fillColor=colors.black, strokeColor=colors.black))
        legend.append(
            (f"● this lot: {estimate.found} in {fmt.number(estimate.sample_size)}, "
             f"estimate {fmt.share(estimate.point, N)}", True)
        )
    # The legend sits top right, where an OC curve never goes (Pa is high
    # only for a nearly clean lot, at the left).
    if legend:
        from reportlab.pdfbase.pdfmetrics import stringWidth

        wide = max(sum(stringWidth(p, f, 6.5) for f, p in runs(t, BOLD if b else REGULAR)) for t, b in legend)
        d.add(Rect(lp.x + lp.width - wide - 5, y1 - 12 - 8.5 * (len(legend) - 1), wide + 5, 8.5 * len(legend) + 1,
                   fillColor=colors.white, strokeColor=None))
    for i, (text, bold) in enumerate(legend):
        _label(d, lp.x + lp.width - 2, y1 - 9 - 8.5 * i, text, size=6.5, bold=bold, anchor="end")

    title = f"{fmt.CLASS_NAMES[plan.defect_class]}: n = {plan.sample_size}, Ac = {plan.acceptance}, N = {fmt.number(N)}"
    _label(d, lp.x, height - 10, title, size=7.5, bold=True)
    _label(d, lp.x + lp.width / 2, 4, "nonconforming in the lot (%)", size=7, anchor="middle")
    from reportlab.graphics.shapes import Group, String

    g = Group(String(0, 0, "probability of acceptance", fontName=REGULAR, fontSize=7, textAnchor="middle"))
    g.translate(9, lp.y + lp.height / 2)
    g.rotate(90)
    d.add(g)
    d.__dict__["oc_points"] = points  # Drawing refuses unknown attributes via setattr
    return d


def _nice_step(raw: float) -> float:
    """1, 2 or 5 times a power of ten, at least ``raw``."""
    import math

    if raw <= 0:
        return 1.0
    power = 10 ** math.floor(math.log10(raw))
    for m in (1, 2, 5, 10):
        if m * power >= raw:
            return m * power
    return 10 * power
