"""The scannable code printed for each drawn unit, and reading it back.

Format (version 1)::

    <lot>:<unit>

``<lot>`` is the lot ID with every character outside ``A-Z a-z 0-9 - . _ ~ /``
written as ``%XX`` per UTF-8 byte (upper-case hex), so the code is plain
printable ASCII -- which Code 128 carries -- and holds exactly one ``:``.
``<unit>`` is the unit's number in the lot's frame (1..N) in decimal without
leading zeros. Examples: lot ``HP-2611-07`` unit 412 -> ``HP-2611-07:412``;
lot ``Zoë 7`` unit 3 -> ``Zo%C3%AB%207:3``.

Scanners type the code like a keyboard, so :func:`parse_unit_code` takes
the typed text, trims surrounding whitespace and refuses anything that is
not exactly this format (a jar's retail barcode, a half-read code), naming
what it got. Pure: no reportlab, safe to import from the terminal UI.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

_SAFE = frozenset("ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789-._~/")
_CODE = re.compile(r"^((?:[A-Za-z0-9\-._~/]|%[0-9A-F]{2})+):([1-9][0-9]*)$")


class UnitCodeError(ValueError):
    """Text that is not a unit code; the message says what came."""


@dataclass(frozen=True, kw_only=True)
class UnitCode:
    """One unit's identity as read from its code."""

    lot_id: str
    unit: int


def _quote(lot_id: str) -> str:
    out = []
    for ch in lot_id:
        if ch in _SAFE:
            out.append(ch)
        else:
            out.extend(f"%{b:02X}" for b in ch.encode("utf-8"))
    return "".join(out)


def unit_code(lot_id: str, unit: int) -> str:
    """The code printed for unit ``unit`` of lot ``lot_id`` (see module doc)."""
    if not isinstance(lot_id, str) or not lot_id.strip():
        raise UnitCodeError(f"lot_id: expected a non-empty lot ID, got {lot_id!r}")
    if isinstance(unit, bool) or not isinstance(unit, int) or unit < 1:
        raise UnitCodeError(f"unit: expected a unit number of at least 1, got {unit!r}")
    return f"{_quote(lot_id)}:{unit}"


def parse_unit_code(text: str) -> UnitCode:
    """Read a scanned or typed unit code back into (lot ID, unit number).

    Raises UnitCodeError naming the text when it is not a unit code.
    """
    if not isinstance(text, str):
        raise UnitCodeError(f"unit code: expected text, got {type(text).__name__}")
    stripped = text.strip()
    match = _CODE.match(stripped)
    if match is None:
        raise UnitCodeError(
            f"unit code: expected LOT:UNIT as printed on the pick list or label, got {text!r}"
        )
    quoted, number = match.groups()
    raw = bytearray()
    i = 0
    while i < len(quoted):
        if quoted[i] == "%":
            raw.append(int(quoted[i + 1 : i + 3], 16))
            i += 3
        else:
            raw.append(ord(quoted[i]))
            i += 1
    try:
        lot_id = raw.decode("utf-8")
    except UnicodeDecodeError:
        raise UnitCodeError(f"unit code: the lot part of {text!r} is not valid UTF-8") from None
    # Only the canonical spelling is a code we printed: a lot ID that was
    # escaped differently would otherwise read as the same lot.
    if _quote(lot_id) != quoted:
        raise UnitCodeError(f"unit code: {text!r} is not written the way the sheets print codes")
    return UnitCode(lot_id=lot_id, unit=int(number))
