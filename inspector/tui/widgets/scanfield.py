"""The bench's entry field: typed by hand or by a keyboard-wedge scanner.

Scanners end what they type with Enter, Tab or a line feed, and a line feed
reaches the terminal as ctrl+j; each of the three submits. Tab therefore
does not move the focus out of this field (the screen has keys for that).
"""

from __future__ import annotations

from textual.binding import Binding
from textual.widgets import Input


class ScanField(Input):
    """An Input whose Enter, Tab and ctrl+j all post ``Input.Submitted``."""

    # Not priority bindings on purpose: a priority binding acts as soon as
    # the app receives the key, before the characters a scanner sent just
    # ahead of it have reached the field, and would submit a half-read code.
    # As plain bindings of the focused field they act in key order.
    BINDINGS = [
        Binding("tab", "submit", "submit", show=False),
        Binding("ctrl+j", "submit", "submit", show=False),
    ]

    def __init__(self, *, placeholder: str = "", id: str | None = None) -> None:
        super().__init__(placeholder=placeholder, id=id, select_on_focus=False)

    def keep_for_retyping(self) -> None:
        """Keep the text on view and select it, so the next scan replaces it."""
        self.select_all()
