"""The OC chart draws what inspector.stats.plans computes for the plan."""

from __future__ import annotations

from dataclasses import replace

import numpy as np
import pytest
from reportlab.graphics.charts.lineplots import LinePlot

from inspector.sheets import chart
from inspector.sheets.demo import demo_sheet_data
from inspector.stats import plans
from sheets_support import render_bytes


@pytest.fixture(scope="module")
def data():
    return demo_sheet_data()


def _plotted(drawing) -> list[tuple[float, float]]:
    (plot,) = [x for x in drawing.contents if isinstance(x, LinePlot)]
    return list(plot.data[0])


def test_chart_points_are_oc_single_of_the_plan(data):
    plan = data.plans[1]
    est = data.estimates[1]
    drawing = chart.oc_chart(plan, est, width=300, height=180)
    pts = drawing.oc_points
    ref = plans.oc_single(plan.lot_size, plan.sample_size, plan.acceptance, np.array(pts.defectives))
    assert list(pts.pa) == [float(p) for p in ref.pa]  # the same function, so exactly equal
    assert [y for _, y in _plotted(drawing)] == list(pts.pa)
    assert [x for x, _ in _plotted(drawing)] == [100.0 * d / plan.lot_size for d in pts.defectives]


def test_chart_uses_whatever_oc_single_returns(data, monkeypatch):
    # A recognisable curve: Pa steps down 0.9, 0.7, 0.5, ... whatever D is.
    calls = []
    real = plans.oc_single

    def fake(N, n, c, D):
        calls.append((N, n, c))
        curve = real(N, n, c, D)
        k = len(curve.pa)
        return replace(curve, pa=np.array([0.9 - 0.2 * (i % 5) for i in range(k)]))

    monkeypatch.setattr(plans, "oc_single", fake)
    plan = data.plans[0]
    drawing = chart.oc_chart(plan, data.estimates[0], width=300, height=180)
    ys = [y for _, y in _plotted(drawing)]
    assert ys == [pytest.approx(0.9 - 0.2 * (i % 5)) for i in range(len(ys))]
    assert calls == [(plan.lot_size, plan.sample_size, plan.acceptance)]


def test_release_sheet_asks_oc_single_for_each_class_plan(data, monkeypatch):
    calls = []
    real = plans.oc_single

    def spy(N, n, c, D):
        calls.append((N, n, c))
        return real(N, n, c, D)

    monkeypatch.setattr(plans, "oc_single", spy)
    render_bytes("release", data)
    assert calls == [(p.lot_size, p.sample_size, p.acceptance) for p in data.plans]


def test_risk_figures_come_from_the_exact_lot_functions(data):
    for p in data.plans:
        N, n, c = p.lot_size, p.sample_size, p.acceptance
        assert p.pa_at_aql == float(plans.pa_lot(N, n, c, p.aql_defectives))
        if p.rql_defectives is not None:
            assert p.pa_at_rql == float(plans.pa_lot(N, n, c, p.rql_defectives))
        assert p.aoql == plans.aoql_lot(N, n, c)[0]
        if p.own_levels:
            # the plan's own quality levels: Pa 0.95 and 0.10 points
            assert p.aql_defectives == plans.aql_lot(N, n, c, 0.95)
            assert p.pa_at_aql >= 0.95 > plans.pa_lot(N, n, c, p.aql_defectives + 1)
            assert p.pa_at_rql <= 0.10 < plans.pa_lot(N, n, c, p.rql_defectives - 1)


def test_chart_range_reaches_past_the_rql_and_the_lot_estimate(data):
    for p, e in zip(data.plans, data.estimates):
        pts = chart.curve_points(p, e)
        assert pts.defectives[0] == 0
        assert pts.defectives[-1] >= max(p.rql_defectives or 0, e.upper)
        assert list(pts.defectives) == sorted(set(pts.defectives))
