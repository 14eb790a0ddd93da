"""How numbers, times and words are written on the sheets."""

from __future__ import annotations

from decimal import Decimal, localcontext
from fractions import Fraction

DASH = "–"


def sig(value: float, digits: int = 3) -> str:
    """``value`` with ``digits`` significant digits, plain notation."""
    if value == 0:
        return "0"
    text = f"{value:.{digits}g}"
    if "e" in text:  # tiny or huge: write it out
        d = Decimal(repr(value))
        with localcontext() as ctx:
            ctx.prec = digits
            text = format(+d, "f")
    return text


def percent(value: Fraction | float | None) -> str:
    """A percentage as the trade writes it: exact decimals stay exact
    (``Fraction(3, 2)`` -> ``1.5 %``), others get 3 significant digits."""
    if value is None:
        return DASH
    if isinstance(value, Fraction):
        den = value.denominator
        while den % 2 == 0:
            den //= 2
        while den % 5 == 0:
            den //= 5
        if den == 1:
            with localcontext() as ctx:
                ctx.prec = 40
                d = Decimal(value.numerator) / Decimal(value.denominator)
            return f"{format(d.normalize(), 'f')} %"
        value = float(value)
    return f"{sig(value, 3)} %"


def share(units: float, total: int) -> str:
    """``units`` of ``total`` as a percentage, 3 significant digits."""
    return percent(100.0 * units / total)


def prob(p: float | None) -> str:
    """A probability to 3 decimals, never rounded to a false 0 or 1."""
    if p is None:
        return DASH
    if 0 < p < 0.0005:
        return "< 0.001"
    if 0.9995 <= p < 1:
        return "> 0.999"
    return f"{p:.3f}"


def when(stamp: str | None) -> str:
    """An ISO 8601 time as ``2025-06-03 14:05 +01:00`` (minutes kept,
    offset kept: a time without its offset cannot be compared across sites)."""
    if not stamp:
        return DASH
    text = str(stamp)
    if "T" not in text:
        return text
    date, _, rest = text.partition("T")
    clock = rest[:5]
    offset = ""
    for sign in ("+", "-"):
        if sign in rest:
            offset = " " + sign + rest.rsplit(sign, 1)[1]
            break
    if rest.endswith("Z"):
        offset = " UTC"
    return f"{date} {clock}{offset}"


def units(count: int) -> str:
    return f"{count:,} unit{'s' if count != 1 else ''}".replace(",", " ")


def number(count: int) -> str:
    """Whole numbers with a thin space every three digits (no comma/point ambiguity)."""
    return f"{count:,}".replace(",", " ")


CLASS_NAMES = {"critical": "Critical", "major": "Major", "minor": "Minor"}
RESULT_WORDS = {"accept": "Accept", "reject": "Reject", "open": "Open", None: "Not yet decided"}
