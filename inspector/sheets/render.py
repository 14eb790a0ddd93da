"""Rendering the four sheets to PDF with reportlab, laid out by the forms.

    from inspector.sheets.render import render_sheet
    pages = render_sheet("pick", data, "pick.pdf", forms_dir=None, clock=clock)

Every page carries the site header, the sheet's form number and revision,
the lot ID and "Page X of Y" (the page furniture is drawn when the document
is saved, once the page count is known). Fonts are the TrueType files
shipped in ``fonts/``; free text is escaped before it reaches Paragraph
markup. Documents are written with reportlab's ``invariant`` setting and
the printed time comes from ``clock``, so the same data, forms and clock
give the same bytes.

For a food or safety-critical lot (``SheetLot.critical``) every sheet
carries the advisory caution, whether or not the form places a caution
section: without one it goes first, and every page footer says so too.
"""

from __future__ import annotations

import io
import os
from datetime import datetime
from functools import partial
from typing import BinaryIO, Callable

from reportlab.lib import colors
from reportlab.lib.enums import TA_CENTER, TA_LEFT, TA_RIGHT
from reportlab.lib.pagesizes import A4, landscape, letter
from reportlab.lib.styles import ParagraphStyle
from reportlab.lib.units import mm
from reportlab.pdfgen.canvas import Canvas
from reportlab.platypus import (
    BaseDocTemplate,
    CondPageBreak,
    Flowable,
    Frame,
    KeepTogether,
    PageTemplate,
    Paragraph,
    Spacer,
    Table,
    TableStyle,
)

from inspector.sheets import fmt
from inspector.sheets.codes import unit_code
from inspector.sheets.fonts import BOLD, MONO, REGULAR, draw_string, fit_text, markup, register_fonts, string_width
from inspector.sheets.forms import SHEETS, Form, Section, load_form
from inspector.sheets.model import SheetData, SheetPlan, SheetUnit

__all__ = [
    "ADVISORY_TEXT",
    "SAMPLING_TEXT",
    "render_sheet",
    "render_pick",
    "render_labels",
    "render_bench",
    "render_release",
    "unit_barcode",
    "unit_qr",
]

ADVISORY_TEXT = (
    "Food or safety-critical lot: the results on this sheet are advisory. The applicable "
    "regulation, the buyer's specification and qualified inspectors decide. Microbiological "
    "and contaminant testing follow their own plans and laboratory methods, and a critical "
    "defect that could hurt someone calls for 100 % inspection or stopping the lot, whatever "
    "the sampling plan says."
)
ADVISORY_SHORT = "Advisory result: food or safety-critical lot; regulation, buyer's specification and qualified inspectors decide."
SAMPLING_TEXT = "Sampling gives evidence about a lot, never proof that every unit is good."

GREY = colors.Color(0.4, 0.4, 0.4)
LIGHT = colors.Color(0.9, 0.9, 0.9)
RULE = colors.Color(0.55, 0.55, 0.55)

Clock = Callable[[], datetime]


def _system_clock() -> datetime:
    return datetime.now().astimezone()


# --- styles ------------------------------------------------------------------------


def _styles() -> dict[str, ParagraphStyle]:
    base = dict(fontName=REGULAR, fontSize=8.5, leading=10.5)
    return {
        "body": ParagraphStyle("body", **base),
        "small": ParagraphStyle("small", fontName=REGULAR, fontSize=7.5, leading=9),
        "cell": ParagraphStyle("cell", fontName=REGULAR, fontSize=8, leading=9.5),
        "cell_right": ParagraphStyle("cell_right", fontName=REGULAR, fontSize=8, leading=9.5, alignment=TA_RIGHT),
        "cell_centre": ParagraphStyle("cell_centre", fontName=REGULAR, fontSize=8, leading=9.5, alignment=TA_CENTER),
        "head": ParagraphStyle("head", fontName=BOLD, fontSize=7.5, leading=9),
        "head_right": ParagraphStyle("head_right", fontName=BOLD, fontSize=7.5, leading=9, alignment=TA_RIGHT),
        "head_centre": ParagraphStyle("head_centre", fontName=BOLD, fontSize=7.5, leading=9, alignment=TA_CENTER),
        "caption": ParagraphStyle("caption", fontName=REGULAR, fontSize=7.5, leading=9.5, textColor=GREY),
        "value": ParagraphStyle("value", fontName=REGULAR, fontSize=8.5, leading=10.5),
        "mono": ParagraphStyle("mono", fontName=MONO, fontSize=7.5, leading=9.5),
        "heading": ParagraphStyle(
            "heading", fontName=BOLD, fontSize=10, leading=12, spaceBefore=7, spaceAfter=3, alignment=TA_LEFT
        ),
        "caution": ParagraphStyle("caution", fontName=REGULAR, fontSize=8.5, leading=11),
        "big": ParagraphStyle("big", fontName=BOLD, fontSize=12, leading=14),
    }


# --- small flowables ---------------------------------------------------------------


class _Box(Flowable):
    """An empty check box."""

    def __init__(self, size: float = 4 * mm):
        super().__init__()
        self.size = size

    def wrap(self, aw, ah):
        return self.size, self.size

    def draw(self):
        self.canv.setLineWidth(0.8)
        self.canv.rect(0, 0, self.size, self.size, stroke=1, fill=0)


class _Choices(Flowable):
    """Boxes with words beside them, for ticking one: ``[] pass  [] fail``."""

    def __init__(self, words: tuple[str, ...], size: float = 3.4 * mm, font_size: float = 7.5):
        super().__init__()
        self.words, self.size, self.font_size = words, size, font_size
        self._width = sum(size + 1.5 * mm + string_width(w, font_size) + 3 * mm for w in words)

    def wrap(self, aw, ah):
        return self._width, self.size

    def draw(self):
        c = self.canv
        x = 0.0
        c.setLineWidth(0.7)
        for word in self.words:
            c.rect(x, 0, self.size, self.size, stroke=1, fill=0)
            x += self.size + 1.5 * mm
            x += draw_string(c, x, 0.8, word, self.font_size) + 3 * mm


def unit_barcode(value: str, *, bar_width: float, height: float):
    """The Code 128 symbol carrying ``value`` (one unit's code). The sheets
    make every symbol through this function."""
    from reportlab.graphics.barcode.code128 import Code128

    return Code128(value, barWidth=bar_width, barHeight=height, humanReadable=False, quiet=1, lquiet=10 * bar_width,
                   rquiet=10 * bar_width)


def unit_qr(value: str):
    """The QR symbol carrying ``value``, for a code too long for Code 128 in
    the space given (a long or non-ASCII lot ID). Same text, same format."""
    from reportlab.graphics.barcode.qr import QrCodeWidget

    return QrCodeWidget(value, barLevel="M")


#: Narrowest Code 128 bar the sheets print; handheld scanners read 0.15 mm
#: at close range. A code that would need narrower bars becomes a QR symbol.
MIN_BAR = 0.15 * mm


class _UnitCode(Flowable):
    """A unit's code: the symbol, and the same text beneath for typing by hand.

    Code 128 at the form's bar width, narrower (down to 0.15 mm) when the
    space is short, and a QR symbol of the same text when even that does
    not fit. ``kind`` says which."""

    TEXT = 6.5

    def __init__(self, value: str, *, bar_width: float, height: float, max_width: float | None = None):
        super().__init__()
        self.value = value
        self.kind = "code128"
        symbol = unit_barcode(value, bar_width=bar_width, height=height)
        width = symbol.width
        if max_width is not None and width > max_width:
            narrower = bar_width * max_width / width
            if narrower >= MIN_BAR:
                symbol = unit_barcode(value, bar_width=narrower, height=height)
                width = symbol.width
            else:
                self.kind = "qr"
                symbol = unit_qr(value)
                width = min(max(height + 5 * mm, 12 * mm), max_width)
        self.symbol = symbol
        self.code_height = width if self.kind == "qr" else height
        text_width = string_width(value, self.TEXT, MONO)
        self.width = max(width, min(text_width, max_width or text_width))
        self.symbol_width = width
        self.height = self.code_height + self.TEXT + 1.5

    def wrap(self, aw, ah):
        return self.width, self.height

    def draw(self):
        x = (self.width - self.symbol_width) / 2
        if self.kind == "qr":
            draw_qr(self.canv, self.symbol, x, self.TEXT + 1.5, self.symbol_width)
        else:
            draw_bars(self.canv, self.symbol, x, self.TEXT + 1.5)
        self.canv.setFont(MONO, self.TEXT)
        self.canv.drawCentredString(self.width / 2, 0.5, self.value)


def draw_qr(canv, widget, x: float, y: float, size: float) -> None:
    """Draw a reportlab QR widget's modules as one filled path, ``size``
    points square including the 4-module quiet zone.

    reportlab encodes (``widget.qr.make()``: version, error correction,
    mask); the widget's own drawing makes one shape per run of modules and
    encodes a second time, which is what made long pick lists slow."""
    qr = widget.qr
    if getattr(qr, "modules", None) is None:
        qr.make()
    count = qr.getModuleCount()
    border = 4
    ops = []
    for r, row in enumerate(qr.modules):
        c = 0
        while c < count:
            if row[c]:
                start = c
                while c < count and row[c]:
                    c += 1
                # rows run top down; PDF y runs bottom up
                ops.append(f"{start + border} {count - 1 - r + border} {c - start} 1 re")
            else:
                c += 1
    canv.saveState()
    canv.setFillColor(colors.black)
    canv.translate(x, y)
    scale = size / (count + 2 * border)
    canv.scale(scale, scale)
    canv.addLiteral(" ".join(ops) + " f")
    canv.restoreState()


def draw_bars(canv, symbol, x: float, y: float) -> None:
    """Draw a reportlab Code 128 symbol's bars as one filled path.

    reportlab encodes the value (``symbol.decomposed``: upper-case letters
    are bars, lower-case spaces, the letter's rank their width in modules);
    drawing the bars in module units as a single path is several times
    faster than the symbol's own bar-by-bar drawing on a 1,250-unit list,
    and the marks are the same.
    """
    if not hasattr(symbol, "decomposed"):
        symbol.width  # computes the encoding
    ops = []
    pos = 0
    for ch in symbol.decomposed:
        if "a" <= ch <= "z":
            pos += ord(ch) - 96
        elif "A" <= ch <= "Z":
            w = ord(ch) - 64
            ops.append(f"{pos} 0 {w} 1 re")
            pos += w
    left = symbol.lquiet if symbol.quiet else 0
    canv.saveState()
    canv.setFillColor(colors.black)
    canv.translate(x + left, y)
    canv.scale(symbol.barWidth, symbol.barHeight)
    canv.addLiteral(" ".join(ops) + " f")
    canv.restoreState()


# --- page furniture ---------------------------------------------------------------


class _PagedCanvas(Canvas):
    """Holds the pages back until save, then draws the header and footer on
    each with the total known ("Page X of Y")."""

    def __init__(self, *args, furniture=None, **kwargs):
        super().__init__(*args, **kwargs)
        self._held: list[dict] = []
        self._furniture = furniture

    def showPage(self):
        self._held.append(dict(self.__dict__))
        self._startPage()

    def save(self):
        total = len(self._held)
        for number, state in enumerate(self._held, start=1):
            self.__dict__.update(state)
            if self._furniture is not None:
                self._furniture(self, number, total)
            Canvas.showPage(self)
        Canvas.save(self)


class _Furniture:
    """Header and footer of one document."""

    def __init__(self, form: Form, data: SheetData, printed: str, pagesize, margin: float, *, compact: bool = False):
        self.form, self.data, self.printed = form, data, printed
        self.width, self.height = pagesize
        self.margin = margin
        self.compact = compact

    HEADER = 48  # points reserved at the top of the body frame
    FOOTER = 20

    def __call__(self, c: Canvas, page: int, total: int) -> None:
        c.saveState()
        if self.compact:
            self._compact_header(c)
        else:
            self._header(c)
        self._footer(c, page, total)
        c.restoreState()

    def _header(self, c: Canvas) -> None:
        f, lot = self.form, self.data.lot
        m, W, H = self.margin, self.width, self.height
        top = H - m
        c.setFillColor(colors.black)
        right_w = max(string_width(f.title, 15, BOLD), string_width(self._form_line(), 7.5)) + 6
        left_w = W - 2 * m - right_w
        draw_string(c, m, top - 11, fit_text(f.site.organisation, 11.5, left_w, BOLD), 11.5, BOLD)
        second = " · ".join(x for x in ((f.site.department,) + f.site.address) if x)
        c.setFillColor(GREY)
        draw_string(c, m, top - 21, fit_text(second, 7.5, left_w), 7.5)
        c.setFillColor(colors.black)
        draw_string(c, W - m, top - 12, f.title, 15, BOLD, align="right")
        c.setFillColor(GREY)
        draw_string(c, W - m, top - 21, self._form_line(), 7.5, align="right")
        c.setStrokeColor(colors.black)
        c.setLineWidth(0.9)
        c.line(m, top - 26, W - m, top - 26)
        c.setFillColor(colors.black)
        label = f"Lot {lot.lot_id}"
        lw = draw_string(c, m, top - 39, fit_text(label, 11, (W - 2 * m) * 0.55, BOLD), 11, BOLD)
        goods = f"{lot.supplier} · {lot.product}"
        draw_string(c, W - m, top - 39, fit_text(goods, 8.5, W - 2 * m - lw - 12), 8.5, align="right")

    def _compact_header(self, c: Canvas) -> None:
        f, lot = self.form, self.data.lot
        m, W, H = 6 * mm, self.width, self.height
        line = f"{f.site.organisation} · {f.title} · Lot {lot.lot_id}"
        draw_string(c, m, H - 6 * mm, fit_text(line, 7.5, (W - 2 * m) * 0.62, BOLD), 7.5, BOLD)
        c.setFillColor(GREY)
        draw_string(c, W - m, H - 6 * mm, self._form_line(), 7, align="right")
        if self.data.lot.critical:
            c.setFillColor(colors.black)
            draw_string(c, m, H - 10 * mm, fit_text(ADVISORY_SHORT, 7, W - 2 * m), 7, BOLD)

    def _form_line(self) -> str:
        f = self.form
        parts = [f"Form {f.number}", f"revision {f.revision}"]
        if f.issued:
            parts.append(f"issued {f.issued}")
        return " · ".join(parts)

    def _footer(self, c: Canvas, page: int, total: int) -> None:
        lot = self.data.lot
        m = 6 * mm if self.compact else self.margin
        W = self.width
        base = (5 * mm) if self.compact else self.margin
        if not self.compact:
            c.setStrokeColor(RULE)
            c.setLineWidth(0.5)
            c.line(m, base + 10, W - m, base + 10)
        c.setFillColor(colors.black)
        left = f"Lot {lot.lot_id} · {self.form.title}"
        page_text = f"Page {page} of {total}"
        pw = draw_string(c, W - m, base, page_text, 8, BOLD, align="right")
        middle = f"Printed {self.printed}"
        if lot.critical and not self.compact:
            middle = "ADVISORY · " + middle
        mw = string_width(middle, 7)
        space = W - 2 * m - pw - mw - 24
        draw_string(c, m, base, fit_text(left, 8, max(space, 40)), 8)
        c.setFillColor(GREY)
        draw_string(c, W - m - pw - 12, base, middle, 7, align="right")


def _measure(rows: list[list], widths: list[float], padding: float = 4.0) -> list[float]:
    """Each row's height, measured once.

    Giving reportlab the heights up front spares it from re-measuring every
    remaining row each time a long table is split across pages.
    """
    out = []
    for row in rows:
        h = 9.5
        for cell, w in zip(row, widths):
            if isinstance(cell, Flowable):
                h = max(h, cell.wrap(w - 6, 1e6)[1])
            elif isinstance(cell, str) and "\n" in cell:
                h = max(h, 9.5 * (cell.count("\n") + 1))
        out.append(h + padding)
    return out


# --- the document -------------------------------------------------------------------


def _pagesize(form: Form):
    size = A4 if form.page.size == "A4" else letter
    return landscape(size) if form.page.orientation == "landscape" else size


class _Builder:
    """Builds the story of one sheet from its form's sections."""

    def __init__(self, form: Form, data: SheetData, width: float):
        self.form, self.data, self.W = form, data, width
        self.st = _styles()

    # helpers ---------------------------------------------------------------

    def p(self, text, style="cell") -> Paragraph:
        return Paragraph(markup(text), self.st[style])

    def t(self, text, width: float):
        """A cell's text: a plain string when the base font prints it on one
        line (much cheaper to lay out), else an escaped Paragraph."""
        text = "" if text is None else str(text)
        if text.isascii() and "\n" not in text and string_width(text, 8) <= width - 7:
            return text
        return self.p(text)

    def heading(self, section: Section) -> list:
        if not section.caption:
            return []
        return [CondPageBreak(30 * mm), Paragraph(markup(section.caption), self.st["heading"])]

    def facts(self, pairs: list[tuple[str, object]], per_row: int = 2) -> Table:
        """Caption/value pairs in a grid; values are Paragraphs or flowables."""
        rows, row = [], []
        for caption, value in pairs:
            row += [Paragraph(markup(caption), self.st["caption"]), value]
            if len(row) == 2 * per_row:
                rows.append(row)
                row = []
        if row:
            row += [""] * (2 * per_row - len(row))
            rows.append(row)
        cap = 0.15 if per_row == 2 else 0.17
        widths = ([cap, 0.5 - cap] * per_row) if per_row == 2 else [cap, 1 - cap]
        t = Table(rows, colWidths=[w * self.W for w in widths], hAlign="LEFT")
        t.setStyle(
            TableStyle(
                [
                    ("VALIGN", (0, 0), (-1, -1), "TOP"),
                    ("LEFTPADDING", (0, 0), (-1, -1), 2),
                    ("RIGHTPADDING", (0, 0), (-1, -1), 4),
                    ("TOPPADDING", (0, 0), (-1, -1), 1.5),
                    ("BOTTOMPADDING", (0, 0), (-1, -1), 1.5),
                    ("LINEBELOW", (0, 0), (-1, -1), 0.25, LIGHT),
                ]
            )
        )
        return t

    def grid(self, section: Section, rows: list[list], *, row_heights=None, extra_style=(), repeat=True) -> Table:
        """A table with the section's columns and a header row."""
        cols = section.columns
        total = sum(c.width for c in cols)
        widths = [self.W * c.width / total for c in cols]
        head_style = {"left": "head", "right": "head_right", "centre": "head_centre"}
        header = [Paragraph(markup(c.caption), self.st[head_style[c.align]]) for c in cols]
        if row_heights is None:
            row_heights = _measure(rows, widths)
        heights = [None] + list(row_heights)
        t = Table([header] + rows, colWidths=widths, rowHeights=heights, repeatRows=1 if repeat else 0, hAlign="LEFT")
        style = [
            ("FONT", (0, 0), (-1, -1), REGULAR, 8),
            ("VALIGN", (0, 0), (-1, -1), "MIDDLE"),
            ("BACKGROUND", (0, 0), (-1, 0), LIGHT),
            ("LINEBELOW", (0, 0), (-1, 0), 0.8, colors.black),
            ("INNERGRID", (0, 1), (-1, -1), 0.3, RULE),
            ("BOX", (0, 0), (-1, -1), 0.6, colors.black),
            ("LEFTPADDING", (0, 0), (-1, -1), 3),
            ("RIGHTPADDING", (0, 0), (-1, -1), 3),
            ("TOPPADDING", (0, 0), (-1, -1), 2),
            ("BOTTOMPADDING", (0, 0), (-1, -1), 2),
        ]
        for i, c in enumerate(cols):
            if c.field == "check":
                style.append(("ALIGN", (i, 1), (i, -1), "CENTER"))
            elif c.align == "right":
                style.append(("ALIGN", (i, 1), (i, -1), "RIGHT"))
            elif c.align == "centre":
                style.append(("ALIGN", (i, 1), (i, -1), "CENTER"))
        t.setStyle(TableStyle(style + list(extra_style)))
        return t

    def _widths(self, section: Section) -> dict[str, float]:
        key = id(section)
        cache = self.__dict__.setdefault("_width_cache", {})
        if key not in cache:
            total = sum(c.width for c in section.columns)
            cache[key] = {c.field: self.W * c.width / total for c in section.columns}
        return cache[key]

    def _fields(self, section: Section) -> tuple[str, ...]:
        return tuple(c.field for c in section.columns)

    def col_width(self, section: Section, field: str) -> float:
        total = sum(c.width for c in section.columns)
        return next(self.W * c.width / total for c in section.columns if c.field == field)

    def cell_style(self, section: Section, field: str) -> str:
        align = next((c.align for c in section.columns if c.field == field), "left")
        return {"left": "cell", "right": "cell_right", "centre": "cell_centre"}[align]

    # the story ----------------------------------------------------------------

    def story(self) -> list:
        sections = list(self.form.sections)
        if self.data.lot.critical and not any(s.kind == "caution" for s in sections):
            sections.insert(0, Section(kind="caution", caption="Advisory"))
        out: list = []
        for section in sections:
            out += getattr(self, f"sec_{section.kind}")(section)
        return out

    # sections shared by several sheets ----------------------------------------------

    def sec_caution(self, section: Section) -> list:
        if not self.data.lot.critical:
            return []
        title = section.caption or "Advisory"
        body = [
            Paragraph(f"<b>{markup(title)}</b>", self.st["caution"]),
            Paragraph(markup(ADVISORY_TEXT), self.st["caution"]),
        ]
        t = Table([[body]], colWidths=[self.W], hAlign="LEFT")
        t.setStyle(
            TableStyle(
                [
                    ("BOX", (0, 0), (-1, -1), 1.6, colors.black),
                    ("LEFTPADDING", (0, 0), (-1, -1), 6),
                    ("RIGHTPADDING", (0, 0), (-1, -1), 6),
                    ("TOPPADDING", (0, 0), (-1, -1), 4),
                    ("BOTTOMPADDING", (0, 0), (-1, -1), 5),
                ]
            )
        )
        return [Spacer(1, 3), t, Spacer(1, 4)]

    def sec_lot(self, section: Section) -> list:
        lot = self.data.lot
        values = {
            "lot_id": Paragraph(f"<b>{markup(lot.lot_id)}</b>", self.st["value"]),
            "supplier": self.p(lot.supplier, "value"),
            "product": self.p(lot.product, "value"),
            "reference": self.p(lot.reference or fmt.DASH, "value"),
            "quantity": self.p(fmt.units(lot.quantity), "value"),
            "received_on": self.p(fmt.when(lot.received_on), "value"),
            "structure": self.p(lot.structure or fmt.DASH, "value"),
            "state": self.p(lot.state or fmt.DASH, "value"),
            "notes": self.p(lot.notes or fmt.DASH, "value"),
            "registered_by": self.p(lot.registered_by or fmt.DASH, "value"),
        }
        pairs = [(f.caption, values[f.field]) for f in section.fields]
        return self.heading(section) + [self.facts(pairs, per_row=2)]

    def sec_draw(self, section: Section) -> list:
        d = self.data.draw
        if d is None:
            return self.heading(section) + [self.p("Not drawn yet.", "body")]
        containers = None
        if d.containers:
            opened = ", ".join(d.containers)
            containers = f"{len(d.containers)} opened, {d.per_container} units from each: {opened}"
        elif d.level:
            containers = f"stratified by {d.level}"
        if d.substitutions:
            subs = "<br/>".join(
                markup(
                    f"unit {s.replaced} → unit {s.substitute}: {s.reason}"
                    + (f" ({s.by}, {fmt.when(s.at)})" if s.by or s.at else "")
                )
                for s in d.substitutions
            )
        else:
            subs = "none"
        drawn = None
        if d.at or d.by:
            drawn = ", ".join(x for x in (fmt.when(d.at) if d.at else None, d.by) if x)
        values = {
            "method": self.p(f"{d.method_title} ({d.method})", "value"),
            "algorithm": Paragraph(markup(d.algorithm, MONO), self.st["mono"]),
            "seed": Paragraph(markup(d.seed, MONO), self.st["mono"]),
            "sample_size": self.p(f"{fmt.number(d.sample_size)} of {fmt.units(d.lot_size)}", "value"),
            "lot_size": self.p(fmt.units(d.lot_size), "value"),
            "level": self.p(d.level, "value") if d.level else None,
            "containers": self.p(containers, "value") if containers else None,
            "frame": Paragraph(markup(d.frame, MONO), self.st["mono"]) if d.frame else None,
            "drawn": self.p(drawn, "value") if drawn else None,
            "note": self.p(d.note, "value") if d.note else None,
            "command": Paragraph(markup(d.command, MONO), self.st["mono"]),
            "substitutions": Paragraph(subs, self.st["value"]),
        }
        pairs = [(f.caption, values[f.field]) for f in section.fields if values[f.field] is not None]
        return self.heading(section) + [self.facts(pairs, per_row=1)]

    def sec_text(self, section: Section) -> list:
        return self.heading(section) + [Paragraph(markup(section.body), self.st["body"]), Spacer(1, 3)]

    def sec_signoff(self, section: Section) -> list:
        return self.heading(section) + [self._sign_lines(section.lines)]

    def _sign_lines(self, meanings) -> Table:
        head = [Paragraph(markup(x), self.st["head"]) for x in ("", "Printed name", "Signature", "Date and time")]
        rows = [[Paragraph(f"<b>{markup(m)}</b>", self.st["cell"]), "", "", ""] for m in meanings]
        t = Table([head] + rows, colWidths=[self.W * w for w in (0.22, 0.3, 0.28, 0.2)],
                  rowHeights=[None] + [11 * mm] * len(rows), hAlign="LEFT")
        t.setStyle(
            TableStyle(
                [
                    ("VALIGN", (0, 0), (-1, -1), "MIDDLE"),
                    ("LINEBELOW", (1, 1), (-1, -1), 0.6, colors.black),
                    ("LEFTPADDING", (0, 0), (-1, -1), 3),
                    ("RIGHTPADDING", (0, 0), (-1, -1), 8),
                ]
            )
        )
        return KeepTogether([t])

    # pick list -----------------------------------------------------------------------

    def _unit_cells(self, section: Section, u: SheetUnit, *, bench: bool = False) -> list:
        f = self.form
        widths = self._widths(section)
        out = []
        for col in section.columns:
            name = col.field
            if name == "check":
                out.append(_Box())
            elif name == "unit":
                out.append(str(u.unit))
            elif name == "container":
                out.append(self.t(u.address.rsplit(" / ", 1)[0] if " / " in u.address else "", widths[name]))
            elif name == "position":
                fields = self._fields(section)
                text = u.position
                if u.serial and "serial" not in fields:
                    text += f" · serial {u.serial}"  # serialised goods: the serial is what is read
                out.append(self.t(text, widths[name]))
            elif name == "address" and u.replaces is None and u.times == 1:
                out.append(self.t(u.address, widths[name]))
            elif name == "address":
                text = markup(u.address)
                if u.replaces is not None:
                    text += "<br/>" + markup(f"substitute for unit {u.replaces}: {u.reason or ''}".rstrip(": "))
                if u.times > 1:
                    text += "<br/>" + markup(f"check {u.times} times")
                out.append(Paragraph(text, self.st["cell"]))
            elif name == "serial":
                out.append(self.t(u.serial or "", widths[name]))
            elif name == "code":
                out.append(
                    _UnitCode(
                        unit_code(self.data.lot.lot_id, u.unit),
                        bar_width=f.code.bar_width_mm * mm,
                        height=f.code.height_mm * mm,
                        max_width=self.col_width(section, "code") - 6,
                    )
                )
            elif name == "times":
                out.append(f"×{u.times}" if u.times > 1 else "")
            elif name == "outcome":
                out.append(_Choices(("pass", "fail")))
            elif name == "class":
                classes = u.classes or tuple(p.defect_class for p in self.data.plans)
                # non-breaking spaces: room to circle one without touching the next
                out.append(Paragraph(markup("\u00a0\u00a0\u00a0 ".join(classes)), self.st["small"]))
            else:  # defect, note, initials, time: left blank for the pen
                out.append("")
        return out

    def _stop_cell(self, stop, width: float):
        here = f"{fmt.units(stop.count)} here"
        if stop.container.isascii() and string_width(stop.container, 8) <= width - 7:
            return f"{stop.container}\n{here}"  # plain two-line text: cheap on long lists
        return Paragraph(f"<b>{markup(stop.container)}</b><br/>{markup(here)}", self.st["cell"])

    def sec_walk(self, section: Section) -> list:
        # One row per unit. The container and its count stand on the first
        # row of each stop, under a heavier rule, so the picker sees where a
        # new container starts without a row of its own.
        rows, style = [], []
        fields = [c.field for c in section.columns]
        for stop in self.data.stops:
            first = len(rows) + 1
            for k, u in enumerate(stop.units):
                cells = self._unit_cells(section, u)
                if "container" in fields:
                    i = fields.index("container")
                    cells[i] = self._stop_cell(stop, self._widths(section)["container"]) if k == 0 else ""
                rows.append(cells)
            if first > 1:
                style.append(("LINEABOVE", (0, first), (-1, first), 1.1, colors.black))
        if not rows:
            return self.heading(section) + [self.p("No units drawn yet.", "body")]
        if "unit" in fields:
            i = fields.index("unit")
            style.append(("FONT", (i, 1), (i, -1), BOLD, 9.5))
        return self.heading(section) + [self.grid(section, rows, extra_style=style)]

    def sec_containers(self, section: Section) -> list:
        rows = []
        for stop in self.data.stops:
            row = []
            for col in section.columns:
                if col.field == "container":
                    row.append(self.p(stop.container))
                elif col.field == "count":
                    row.append(fmt.number(stop.count))
                else:
                    row.append(_Box())
            rows.append(row)
        total = []
        for col in section.columns:
            if col.field == "container":
                total.append(Paragraph(f"<b>Total: {len(self.data.stops)} containers</b>", self.st["cell"]))
            elif col.field == "count":
                total.append(fmt.number(sum(s.count for s in self.data.stops)))
            else:
                total.append("")
        rows.append(total)
        style = [("FONT", (0, len(rows)), (-1, len(rows)), BOLD, 8), ("LINEABOVE", (0, len(rows)), (-1, len(rows)), 0.8, colors.black)]
        return self.heading(section) + [self.grid(section, rows, extra_style=style)]

    # bench log --------------------------------------------------------------------------

    def sec_bench(self, section: Section) -> list:
        rows = [self._unit_cells(section, u, bench=True) for u in self.data.units]
        if not rows:
            return self.heading(section) + [self.p("No units drawn yet.", "body")]
        unit_col = next((i for i, c in enumerate(section.columns) if c.field == "unit"), None)
        style = [("FONT", (unit_col, 1), (unit_col, -1), BOLD, 9.5)] if unit_col is not None else []
        return self.heading(section) + [self.grid(section, rows, row_heights=[9 * mm] * len(rows), extra_style=style)]

    def _plan_value(self, plan: SheetPlan, name: str, style: str):
        if name == "class":
            return Paragraph(f"<b>{markup(fmt.CLASS_NAMES[plan.defect_class])}</b>", self.st["cell"])
        if name == "source":
            return self.p(plan.source_text)
        if name == "sample_size":
            return fmt.number(plan.sample_size)
        if name == "acceptance":
            return str(plan.acceptance)
        if name == "rejection":
            return str(plan.rejection)
        if name in ("aql", "rql"):
            pct = plan.aql_percent if name == "aql" else plan.rql_percent
            units = plan.aql_defectives if name == "aql" else plan.rql_defectives
            if pct is None:
                return fmt.DASH
            text = fmt.percent(pct)
            if units is not None:
                text += f" ({fmt.units(units)})"
            if plan.own_levels or (name == "rql" and plan.rql_own):
                text += "*"
            return Paragraph(markup(text), self.st[style])
        if name == "pa_at_aql":
            return fmt.prob(plan.pa_at_aql)
        if name == "pa_at_rql":
            return fmt.prob(plan.pa_at_rql)
        if name == "aoql":
            if plan.aoql is None:
                return fmt.DASH
            return fmt.percent(100 * plan.aoql)
        raise KeyError(name)

    def sec_plans(self, section: Section) -> list:
        rows = [
            [self._plan_value(plan, c.field, self.cell_style(section, c.field)) for c in section.columns]
            for plan in self.data.plans
        ]
        if not rows:
            return self.heading(section) + [self.p("No plan set yet.", "body")]
        out = self.heading(section) + [self.grid(section, rows)]
        notes = []
        fields = {c.field for c in section.columns}
        if fields & {"pa_at_aql", "pa_at_rql", "aoql"}:
            N = self.data.plans[0].lot_size
            notes.append(
                f"Exact finite-lot (hypergeometric) figures at the actual lot size N = {fmt.number(N)}. "
                "Pa: probability of acceptance. AOQL: the worst average outgoing quality when rejected "
                "lots are screened 100 %."
            )
        if any(p.own_levels for p in self.data.plans) and fields & {"aql", "rql"}:
            notes.append(
                "* Plan typed as n and c: AQL and RQL are the plan's own quality levels, "
                "where its Pa is 0.95 and 0.10."
            )
        if any(p.rql_own for p in self.data.plans) and "rql" in fields:
            notes.append("* Table plan: the RQL shown is the plan's own, where its Pa falls to 0.10 at this lot size.")
        if notes:
            out += [Spacer(1, 2)] + [Paragraph(markup(n), self.st["small"]) for n in notes]
        return out

    def sec_tally(self, section: Section) -> list:
        rows = []
        for plan in self.data.plans:
            row = []
            for c in section.columns:
                if c.field == "found":
                    row.append("")
                elif c.field == "result":
                    row.append(_Choices(("accept", "reject")))
                else:
                    row.append(self._plan_value(plan, c.field, self.cell_style(section, c.field)))
            rows.append(row)
        if not rows:
            return []
        return self.heading(section) + [self.grid(section, rows, row_heights=[9 * mm] * len(rows))]

    # release sheet ------------------------------------------------------------------------

    def sec_oc_chart(self, section: Section) -> list:
        from inspector.sheets.chart import oc_chart

        plans = self.data.plans
        if not plans:
            return []
        estimates = {e.defect_class: e for e in self.data.estimates}
        height = (section.height_mm or 70.0) * mm
        per_row = 1 if len(plans) == 1 else 2
        width = self.W * (0.78 if per_row == 1 else 0.5)
        charts = [oc_chart(p, estimates.get(p.defect_class), width=width - 4, height=height) for p in plans]
        rows = [charts[i : i + per_row] for i in range(0, len(charts), per_row)]
        if len(rows[-1]) < per_row:
            rows[-1] = rows[-1] + [""] * (per_row - len(rows[-1]))
        t = Table(rows, colWidths=[width] * per_row, hAlign="CENTER" if per_row == 1 else "LEFT")
        t.setStyle(TableStyle([("LEFTPADDING", (0, 0), (-1, -1), 0), ("RIGHTPADDING", (0, 0), (-1, -1), 0)]))
        legend = (
            "Curve: exact probability of accepting a lot of this size against its share of nonconforming "
            "units. Dashed lines: AQL and RQL. Solid line and dot: this lot's estimate; grey band: its "
            "exact two-sided interval."
        )
        return self.heading(section) + [t, Paragraph(markup(legend), self.st["small"])]

    def sec_outcomes(self, section: Section) -> list:
        rows = []
        for o in self.data.outcomes:
            row = []
            for c in section.columns:
                v = {
                    "class": Paragraph(f"<b>{markup(fmt.CLASS_NAMES[o.defect_class])}</b>", self.st["cell"]),
                    "inspected": fmt.number(o.inspected),
                    "nonconforming": fmt.number(o.nonconforming),
                    "acceptance": str(o.acceptance),
                    "rejection": str(o.rejection),
                    "result": Paragraph(f"<b>{markup(fmt.RESULT_WORDS[o.result])}</b>", self.st["cell"]),
                }[c.field]
                row.append(v)
            rows.append(row)
        if not rows:
            return self.heading(section) + [self.p("No results yet.", "body")]
        return self.heading(section) + [self.grid(section, rows)]

    def sec_nonconforming(self, section: Section) -> list:
        rows = []
        order = {k: i for i, k in enumerate(("critical", "major", "minor"))}
        bad = sorted((r for r in self.data.results if r.nonconforming), key=lambda r: (order[r.defect_class], r.unit))
        for r in bad:
            row = []
            for c in section.columns:
                v = {
                    "class": self.p(fmt.CLASS_NAMES[r.defect_class]),
                    "unit": str(r.unit),
                    "address": self.p(r.address or fmt.DASH),
                    "defect": self.p(r.defect or fmt.DASH),
                    "note": self.p(r.note or ""),
                    "by": self.p(r.by or fmt.DASH),
                    "at": self.p(fmt.when(r.at)),
                }[c.field]
                row.append(v)
            rows.append(row)
        if not rows:
            return self.heading(section) + [self.p("No nonconforming units were found.", "body")]
        return self.heading(section) + [self.grid(section, rows)]

    def sec_corrections(self, section: Section) -> list:
        rows = []
        for k in self.data.corrections:
            row = []
            for c in section.columns:
                v = {
                    "unit": str(k.unit),
                    "class": self.p(fmt.CLASS_NAMES.get(k.defect_class, k.defect_class)),
                    "was": self.p(k.was),
                    "now": self.p(k.now),
                    "reason": self.p(k.reason),
                    "by": self.p(k.by or fmt.DASH),
                    "at": self.p(fmt.when(k.at)),
                }[c.field]
                row.append(v)
            rows.append(row)
        if not rows:
            return self.heading(section) + [self.p("No results were corrected.", "body")]
        return self.heading(section) + [self.grid(section, rows)]

    def sec_estimate(self, section: Section) -> list:
        rows = []
        curtailed = False
        for e in self.data.estimates:
            N = e.lot_size
            conf = fmt.percent(100 * e.confidence)
            curtailed |= e.curtailed
            row = []
            for c in section.columns:
                v = {
                    "class": self.p(fmt.CLASS_NAMES[e.defect_class]),
                    "found": self.p(f"{e.found} in {fmt.number(e.sample_size)}"),
                    "point": self.p(f"{fmt.sig(e.point, 4)} units ({fmt.share(e.point, N)})"),
                    "interval": self.p(
                        f"{conf}: {fmt.number(e.lower)} to {fmt.units(e.upper)} "
                        f"({fmt.share(e.lower, N)} to {fmt.share(e.upper, N)})"
                    ),
                    "upper_bound": self.p(
                        f"{conf}: at most {fmt.units(e.upper_bound)} ({fmt.share(e.upper_bound, N)})"
                    ),
                }[c.field]
                row.append(v)
            rows.append(row)
        if not rows:
            return self.heading(section) + [self.p("No estimate yet: no unit inspected.", "body")]
        notes = [SAMPLING_TEXT]
        if curtailed:
            notes.insert(
                0,
                "Inspection stopped when a class reached its rejection number: estimates from this "
                "curtailed sample are biased (stopping early tends to overstate the nonconforming share).",
            )
        return self.heading(section) + [self.grid(section, rows)] + [
            Paragraph(markup(n), self.st["small"]) for n in notes
        ]

    def sec_decision(self, section: Section) -> list:
        d = self.data.decision
        decided = ", ".join(x for x in (fmt.when(d.decided_at) if d.decided_at else None, d.decided_by) if x)
        disposed = ", ".join(x for x in (d.disposition_by, fmt.when(d.disposition_at) if d.disposition_at else None) if x)
        values = {
            "decision": Paragraph(markup(fmt.RESULT_WORDS.get(d.decision, str(d.decision))), self.st["big"]),
            "curtailed": self.p(
                "yes: stopped when a class reached its rejection number" if d.curtailed else "no", "value"
            ),
            "decided": self.p(decided or fmt.DASH, "value"),
            "disposition": Paragraph(f"<b>{markup(d.disposition or 'none yet')}</b>", self.st["value"]),
            "disposition_reason": self.p(d.disposition_reason or fmt.DASH, "value"),
            "disposition_by": self.p(disposed or fmt.DASH, "value"),
        }
        pairs = [(f.caption, values[f.field]) for f in section.fields]
        return self.heading(section) + [self.facts(pairs, per_row=1)]

    def sec_signatures(self, section: Section) -> list:
        rows = []
        signed = set()
        for s in self.data.signatures:
            signed.add(s.meaning.strip().lower())
            row = []
            for c in section.columns:
                if c.field == "name":
                    row.append(Paragraph(f"<b>{markup(s.printed_name)}</b>", self.st["cell"]))
                elif c.field == "meaning":
                    row.append(self.p(s.meaning))
                else:
                    text = fmt.when(s.at)
                    if s.changed_since_signed:
                        text += " (record changed since signed)"
                    row.append(self.p(text))
            rows.append(row)
        out = self.heading(section)
        if rows:
            out.append(self.grid(section, rows))
            out.append(Paragraph("Signed in the record with the signer's own secret.", self.st["small"]))
        blank = [m for m in section.blank if m.strip().lower() not in signed]
        if blank:
            out += [Spacer(1, 4), self._sign_lines(blank)]
        if not rows and not blank:
            out.append(self.p("No signatures yet.", "body"))
        return out

    def sec_record(self, section: Section) -> list:
        h = self.data.lot.record_hash
        value = Paragraph(markup(h, MONO), self.st["mono"]) if h else self.p("not available", "value")
        pairs = [(f.caption, value) for f in section.fields]
        note = Paragraph(
            markup(
                "SHA-256 over every entry of this lot's record. Any later entry, a correction say, "
                "gives a different hash."
            ),
            self.st["small"],
        )
        return self.heading(section) + [self.facts(pairs, per_row=1), note]


# --- labels --------------------------------------------------------------------------


def _draw_labels(c: Canvas, form: Form, data: SheetData) -> None:
    spec = form.labels
    W, H = c._pagesize
    per_page = spec.columns * spec.rows
    units = [u for u in data.units]
    if not units:
        draw_string(c, 20 * mm, H / 2, "No units drawn yet.", 10)
        c.showPage()
        return
    pad = 2.5 * mm
    for i, u in enumerate(units):
        slot = i % per_page
        if i and slot == 0:
            c.showPage()
        row, col = divmod(slot, spec.columns)
        x = (spec.left_mm + col * (spec.label_width_mm + spec.column_gap_mm)) * mm
        top = H - (spec.top_mm + row * (spec.label_height_mm + spec.row_gap_mm)) * mm
        w, h = spec.label_width_mm * mm, spec.label_height_mm * mm
        _draw_label(c, form, data, u, x, top - h, w, h, pad, spec)
    c.showPage()


def _draw_label(c: Canvas, form: Form, data: SheetData, u: SheetUnit, x, y, w, h, pad, spec) -> None:
    if spec.outline:
        c.setStrokeColor(RULE)
        c.setLineWidth(0.4)
        c.roundRect(x, y, w, h, 2 * mm, stroke=1, fill=0)
    c.setFillColor(colors.black)
    inner = w - 2 * pad
    cursor = y + h - pad
    code = None
    if "code" in spec.lines:
        code = _UnitCode(
            unit_code(data.lot.lot_id, u.unit),
            bar_width=form.code.bar_width_mm * mm,
            height=form.code.height_mm * mm,
            max_width=inner,
        )
    floor = y + pad + (code.height + 1 if code is not None else 0)
    for line in spec.lines:
        if line == "code":
            continue
        if line == "unit":
            size, font, text = 11, BOLD, f"Unit {u.unit}"
        elif line == "lot_id":
            size, font, text = 7.5, BOLD, f"Lot {data.lot.lot_id}"
        elif line == "address":
            size, font, text = 6.5, REGULAR, u.address
        elif line == "position":
            size, font, text = 6.5, REGULAR, u.position
        elif line == "serial":
            if not u.serial:
                continue
            size, font, text = 6.5, REGULAR, f"serial {u.serial}"
        elif line == "product":
            size, font, text = 6.5, REGULAR, data.lot.product
        elif line == "supplier":
            size, font, text = 6.5, REGULAR, data.lot.supplier
        elif line == "times":
            if u.times <= 1:
                continue
            size, font, text = 6.5, BOLD, f"check {u.times} times"
        else:  # pragma: no cover - forms are checked on load
            continue
        if cursor - size < floor:
            break  # the label is full: the code matters more than one more line
        cursor -= size + 1
        draw_string(c, x + pad, cursor, fit_text(text, size, inner, font), size, font)
    if u.replaces is not None and cursor - 7.5 >= floor:
        cursor -= 7.5
        draw_string(c, x + pad, cursor, fit_text(f"substitute for unit {u.replaces}", 6.5, inner), 6.5)
    if code is not None:
        code.drawOn(c, x + (w - code.width) / 2, y + pad)


# --- entry points -----------------------------------------------------------------------


def render_sheet(
    sheet: str,
    data: SheetData,
    out: str | os.PathLike | BinaryIO,
    *,
    forms_dir: str | os.PathLike | None = None,
    clock: Clock | None = None,
) -> int:
    """Render one sheet (``pick``, ``labels``, ``bench`` or ``release``) of
    ``data`` to ``out`` (a path or a binary file) and return its page count.

    ``forms_dir`` is a folder of forms (default: the ones shipped with the
    package); ``clock`` gives the printed time (default: now, local). Raises
    :class:`inspector.sheets.forms.FormError` for a broken form file.
    """
    if sheet not in SHEETS:
        raise ValueError(f"sheet: expected one of {', '.join(SHEETS)}, got {sheet!r}")
    if not isinstance(data, SheetData):
        raise TypeError(f"data: expected SheetData, got {type(data).__name__}")
    form = load_form(sheet, forms_dir)
    register_fonts()
    now = (clock or _system_clock)()
    if now.tzinfo is None:
        raise ValueError(f"clock: expected a time with a UTC offset, got naive {now.isoformat()!r}")
    printed = fmt.when(now.isoformat(timespec="minutes"))
    pagesize = _pagesize(form)
    target = out if hasattr(out, "write") else os.fspath(out)
    meta = dict(
        title=f"{form.title}: lot {data.lot.lot_id}",
        author=form.site.organisation,
        subject=f"Form {form.number} revision {form.revision}",
        creator="inspector",
    )
    if sheet == "labels":
        furniture = _Furniture(form, data, printed, pagesize, 0, compact=True)
        buffer = io.BytesIO()
        c = _PagedCanvas(buffer, pagesize=pagesize, invariant=1, furniture=furniture)
        c.setTitle(meta["title"])
        c.setAuthor(meta["author"])
        c.setSubject(meta["subject"])
        c.setCreator(meta["creator"])
        _draw_labels(c, form, data)
        pages = len(c._held)
        c.save()
        _write(target, buffer.getvalue())
        return pages

    margin = form.page.margin_mm * mm
    furniture = _Furniture(form, data, printed, pagesize, margin)
    W, H = pagesize
    frame = Frame(
        margin,
        margin + furniture.FOOTER,
        W - 2 * margin,
        H - 2 * margin - furniture.FOOTER - furniture.HEADER,
        leftPadding=0,
        rightPadding=0,
        topPadding=0,
        bottomPadding=0,
        id="body",
    )
    buffer = io.BytesIO()
    doc = BaseDocTemplate(
        buffer,
        pagesize=pagesize,
        leftMargin=margin,
        rightMargin=margin,
        topMargin=margin,
        bottomMargin=margin,
        invariant=1,
        **meta,
    )
    doc.addPageTemplates([PageTemplate(id="sheet", frames=[frame])])
    story = _Builder(form, data, frame._width).story()
    doc.build(story, canvasmaker=partial(_PagedCanvas, furniture=furniture))
    _write(target, buffer.getvalue())
    return doc.page


def _write(target, payload: bytes) -> None:
    if hasattr(target, "write"):
        target.write(payload)
        return
    # Write next to the target and rename, so a failure never leaves half a PDF.
    tmp = f"{target}.part"
    with open(tmp, "wb") as fh:
        fh.write(payload)
    os.replace(tmp, target)


def render_pick(data: SheetData, out, **kwargs) -> int:
    """The pick list; see :func:`render_sheet`."""
    return render_sheet("pick", data, out, **kwargs)


def render_labels(data: SheetData, out, **kwargs) -> int:
    """The sample labels; see :func:`render_sheet`."""
    return render_sheet("labels", data, out, **kwargs)


def render_bench(data: SheetData, out, **kwargs) -> int:
    """The bench log; see :func:`render_sheet`."""
    return render_sheet("bench", data, out, **kwargs)


def render_release(data: SheetData, out, **kwargs) -> int:
    """The lot release sheet; see :func:`render_sheet`."""
    return render_sheet("release", data, out, **kwargs)
