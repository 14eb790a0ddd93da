"""Timing of the printed sheets for a large lot, against a plain version.

Targets (issue 6): the release sheet of a lot with a 1,250-unit sample in
at most 2 s; the pick list of 1,250 units with a scannable code each in at
most 3 s. Each task is timed from the view model to the finished PDF bytes
(forms read, fonts embedded, OC curve computed, pages numbered).

Beside each, a straightforward implementation of the same content runs in
the same process: plain canvas drawString lines, no tables, no barcodes,
no forms, the page count known in advance. The ratio says what the layout,
the codes and the forms cost over the bare minimum. The machine is shared
and noisy: read the ratios, and re-run before drawing conclusions. Not a
test.

    python benchmarks/bench_sheets.py
"""

from __future__ import annotations

import io
import statistics
import time
from datetime import datetime, timedelta, timezone

import numpy as np

from inspector.sheets.demo import large_demo_sheet_data
from inspector.sheets.render import render_sheet

CLOCK = lambda: datetime(2025, 6, 3, 16, 30, tzinfo=timezone(timedelta(hours=1)))  # noqa: E731
TARGETS = {"release": 2.0, "pick": 3.0}


def median_time(fn, repeat: int) -> tuple[float, object]:
    result = fn()  # warm up (font files parsed, modules imported)
    samples = []
    for _ in range(repeat):
        t = time.perf_counter()
        result = fn()
        samples.append(time.perf_counter() - t)
    return statistics.median(samples), result


# --- straightforward versions ------------------------------------------------------


def plain_pick(data) -> bytes:
    """Every unit as one drawString line, 60 lines a page, Helvetica."""
    from reportlab.lib.pagesizes import A4
    from reportlab.pdfgen.canvas import Canvas

    buf = io.BytesIO()
    c = Canvas(buf, pagesize=A4, invariant=1)
    units = data.units
    per_page = 60
    pages = -(-len(units) // per_page)
    for p in range(pages):
        c.setFont("Helvetica-Bold", 11)
        c.drawString(40, 800, f"Pick list  Lot {data.lot.lot_id}  Page {p + 1} of {pages}")
        c.setFont("Helvetica", 8)
        y = 780
        for u in units[p * per_page : (p + 1) * per_page]:
            c.drawString(40, y, f"[ ]  {u.unit:>7}  {u.address}  {data.lot.lot_id}:{u.unit}")
            y -= 12
        c.showPage()
    c.save()
    return buf.getvalue()


def plain_release(data) -> bytes:
    """The release facts as drawString lines and the OC curve as a polyline."""
    from reportlab.lib.pagesizes import A4
    from reportlab.pdfgen.canvas import Canvas

    from inspector.stats import plans

    buf = io.BytesIO()
    c = Canvas(buf, pagesize=A4, invariant=1)
    lines = [f"Lot release  Lot {data.lot.lot_id}", f"{data.lot.supplier}  {data.lot.product}"]
    for p in data.plans:
        lines.append(f"{p.defect_class}: n={p.sample_size} Ac={p.acceptance} Re={p.rejection} "
                     f"Pa(AQL)={p.pa_at_aql:.3f} Pa(RQL)={p.pa_at_rql:.3f} AOQL={p.aoql:.4f}")
    d = data.draw
    lines += [f"draw {d.method} seed {d.seed} {d.algorithm}", d.command]
    for r in data.results:
        if r.nonconforming:
            lines.append(f"{r.defect_class} unit {r.unit} {r.address} {r.defect} {r.by}")
    for k in data.corrections:
        lines.append(f"correction unit {k.unit}: {k.was} -> {k.now}: {k.reason}")
    for e in data.estimates:
        lines.append(f"{e.defect_class}: {e.found} in {e.sample_size}, {e.lower}..{e.upper}, at most {e.upper_bound}")
    lines.append(f"decision {data.decision.decision}  record {data.lot.record_hash}")
    y = 800
    c.setFont("Helvetica", 8)
    for line in lines:
        c.drawString(40, y, line)
        y -= 11
        if y < 300:
            break
    for p in data.plans:
        D = np.unique(np.linspace(0, p.rql_defectives * 1.5, 161).round().astype(np.int64))
        oc = plans.oc_single(p.lot_size, p.sample_size, p.acceptance, D)
        pts = [(40 + 500 * i / (len(D) - 1), 100 + 150 * float(pa)) for i, pa in enumerate(oc.pa)]
        path = c.beginPath()
        path.moveTo(*pts[0])
        for pt in pts[1:]:
            path.lineTo(*pt)
        c.drawPath(path)
    c.drawString(40, 60, "Page 1 of 1")
    c.showPage()
    c.save()
    return buf.getvalue()


def ours(sheet, data):
    def run():
        buf = io.BytesIO()
        pages = render_sheet(sheet, data, buf, clock=CLOCK)
        return pages, len(buf.getvalue())

    return run


def main() -> None:
    t = time.perf_counter()
    data = large_demo_sheet_data(sample=1250)
    build = time.perf_counter() - t
    n_units = len(data.units)
    nonconforming = sum(r.nonconforming for r in data.results)
    print(f"Large demo lot {data.lot.lot_id}: {data.lot.quantity} units, sample {data.draw.sample_size} "
          f"({n_units} on the pick list), {len(data.plans)} plans, {nonconforming} nonconforming results")
    print(f"(view model with draw, plan risks and estimates built in {build:.2f} s, not counted below)\n")
    print(f"{'task':<34} {'ours (median)':>14} {'plain (median)':>15} {'ratio':>7} {'target':>8} {'pages':>6}")
    for sheet, label, plain in (
        ("release", "release sheet, 1,250-unit sample", plain_release),
        ("pick", "pick list, 1,250 units with codes", plain_pick),
    ):
        ours_t, (pages, size) = median_time(ours(sheet, data), repeat=5)
        plain_t, _ = median_time(lambda: plain(data), repeat=5)
        verdict = "ok" if ours_t <= TARGETS[sheet] else "OVER"
        print(f"{label:<34} {ours_t:>12.3f} s {plain_t:>13.3f} s {ours_t / plain_t:>7.1f} "
              f"{'<= ' + format(TARGETS[sheet], 'g') + ' s':>8} {pages:>6}  {verdict}")
    for sheet, label in (("labels", "labels, 1,250 units with codes"), ("bench", "bench log, 1,250 units")):
        t_, (pages, _) = median_time(ours(sheet, data), repeat=3)
        print(f"{label:<34} {t_:>12.3f} s {'':>15} {'':>7} {'':>8} {pages:>6}")


if __name__ == "__main__":
    main()
