"""The fonts the sheets embed, and text split into runs each font can print.

Every sheet embeds TrueType fonts shipped inside the package (see
``fonts/SOURCES.txt``), so a name like "Zoë Ødegård", "Łukasz" or "山田"
prints and copies out of the PDF the same on any machine. DejaVu Sans prints
everything it covers; characters it lacks (Chinese, Japanese, Korean) switch
to Droid Sans Fallback run by run. reportlab embeds only the glyphs used.

Known limit: reportlab lays text out left to right without shaping, so
Arabic or Hebrew text prints with its letters unjoined and in logical order.
"""

from __future__ import annotations

from functools import lru_cache
from pathlib import Path
from xml.sax.saxutils import escape

FONT_DIR = Path(__file__).resolve().parent / "fonts"

REGULAR = "InspectorSans"
BOLD = "InspectorSans-Bold"
MONO = "InspectorMono"
WIDE = "InspectorWide"  # the fallback for characters DejaVu lacks

_FILES = {
    REGULAR: "DejaVuSans.ttf",
    BOLD: "DejaVuSans-Bold.ttf",
    MONO: "DejaVuSansMono.ttf",
    WIDE: "DroidSansFallback.ttf",
}


class FontMissing(RuntimeError):
    """A font file that should ship with the package is not there."""


def _register(name: str) -> None:
    from reportlab.pdfbase import pdfmetrics
    from reportlab.pdfbase.ttfonts import TTFont

    if name in pdfmetrics.getRegisteredFontNames():
        return
    path = FONT_DIR / _FILES[name]
    if not path.is_file():
        raise FontMissing(f"font file missing from the package: {path}")
    pdfmetrics.registerFont(TTFont(name, str(path)))


@lru_cache(maxsize=None)
def register_fonts() -> None:
    """Register the sheet fonts with reportlab (once per process).

    The fallback font is 3 MB and needed only for some names, so it is
    registered on first use by :func:`runs`.
    """
    from reportlab.lib.fonts import addMapping

    for name in (REGULAR, BOLD, MONO):
        _register(name)
    # Paragraph markup <b> must find the bold face of the family.
    addMapping(REGULAR, 0, 0, REGULAR)
    addMapping(REGULAR, 1, 0, BOLD)
    addMapping(REGULAR, 0, 1, REGULAR)
    addMapping(REGULAR, 1, 1, BOLD)


@lru_cache(maxsize=None)
def _charset(name: str) -> frozenset[int]:
    from reportlab.pdfbase import pdfmetrics

    if name == WIDE:
        _register(WIDE)
    else:
        register_fonts()
    return frozenset(pdfmetrics.getFont(name).face.charToGlyph)


def _needs_fallback(text: str, base: str) -> bool:
    # Fast path for the usual case: plain ASCII prints in every face.
    if text.isascii():
        return False
    covered = _charset(base)
    return any(ord(ch) not in covered for ch in text if ch not in "\n\t")


def runs(text: str, base: str = REGULAR) -> list[tuple[str, str]]:
    """``text`` as (font name, piece) runs: ``base`` where it has the glyph,
    else the fallback font (registered on first need)."""
    if not _needs_fallback(text, base):
        return [(base, text)]
    covered = _charset(base)
    out: list[tuple[str, str]] = []
    for ch in text:
        font = base if (ord(ch) in covered or ch.isspace()) else WIDE
        if out and out[-1][0] == font:
            out[-1] = (font, out[-1][1] + ch)
        else:
            out.append((font, ch))
    if any(font == WIDE for font, _ in out):
        _charset(WIDE)  # registers it
    return out


def markup(text: object, base: str = REGULAR) -> str:
    """Free text as Paragraph markup: escaped (&, <, >), with runs the base
    font lacks wrapped in the fallback font. ``None`` gives ''."""
    if text is None:
        return ""
    text = str(text)
    if not _needs_fallback(text, base):
        return escape(text)
    return "".join(
        escape(piece) if font == base else f'<font name="{font}">{escape(piece)}</font>'
        for font, piece in runs(text, base)
    )


def string_width(text: str, size: float, base: str = REGULAR) -> float:
    """Width in points of ``text`` drawn by :func:`draw_string`."""
    from reportlab.pdfbase.pdfmetrics import stringWidth

    return sum(stringWidth(piece, font, size) for font, piece in runs(text, base))


def draw_string(canvas, x: float, y: float, text: str, size: float, base: str = REGULAR, *, align: str = "left") -> float:
    """Draw one line on a canvas with fallback runs; returns its width.

    ``align`` is ``left``, ``right`` (x is the right edge) or ``centre``.
    """
    pieces = runs(text, base)
    from reportlab.pdfbase.pdfmetrics import stringWidth

    width = sum(stringWidth(piece, font, size) for font, piece in pieces)
    if align == "right":
        x -= width
    elif align == "centre":
        x -= width / 2
    for font, piece in pieces:
        canvas.setFont(font, size)
        canvas.drawString(x, y, piece)
        x += stringWidth(piece, font, size)
    return width


def fit_text(text: str, size: float, width: float, base: str = REGULAR) -> str:
    """``text`` shortened with an ellipsis so that it fits ``width`` points."""
    if string_width(text, size, base) <= width:
        return text
    ell = "…"
    low, high = 0, len(text)
    while low < high:
        mid = (low + high + 1) // 2
        if string_width(text[:mid] + ell, size, base) <= width:
            low = mid
        else:
            high = mid - 1
    return text[:low] + ell
