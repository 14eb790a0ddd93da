"""The key strip at the foot of every screen: every key the screen answers
to, with its description, wrapped over as many lines as it needs.

Textual's own footer keeps to one line and scrolls sideways; at 80 columns
that would hide keys, and the rule here is that every action's key is on
view. So this strip wraps instead.
"""

from __future__ import annotations

from rich.text import Text
from textual.dom import NoScreen
from textual.widgets import Static


class KeyStrip(Static):
    """Lists the active, shown bindings of the screen: ``key description``."""

    DEFAULT_CSS = """
    KeyStrip {
        dock: bottom;
        height: auto;
        max-height: 3;
        background: $panel;
        color: $foreground;
        padding: 0 1;
    }
    """

    def on_mount(self) -> None:
        self.screen.bindings_updated_signal.subscribe(self, self._bindings_changed)
        self._show_keys()

    def _bindings_changed(self, screen) -> None:
        if self.is_attached and screen is self.screen:
            self.call_after_refresh(self._show_keys)

    def describe(self) -> list[tuple[str, str, bool]]:
        """(key as shown, description, enabled) for each shown binding, in order."""
        seen_actions: set[str] = set()
        out = []
        for _namespace, binding, enabled, _tooltip in self.screen.active_bindings.values():
            if not binding.show or binding.action in seen_actions:
                continue
            seen_actions.add(binding.action)
            out.append((binding.key_display or self.app.get_key_display(binding), binding.description, enabled))
        return out

    def _show_keys(self) -> None:
        if not self.is_attached:
            return
        try:
            self.screen
        except NoScreen:  # the screen was closed before this ran
            return
        text = Text(no_wrap=False, overflow="fold")
        for i, (key, description, enabled) in enumerate(self.describe()):
            if i:
                text.append("  ")
            key_style = "bold reverse" if enabled else "dim"
            text.append(f" {key} ", style=key_style)
            text.append(f" {description}", style="" if enabled else "dim")
        if text.plain == getattr(self, "_shown_plain", None) and str(text.spans) == getattr(self, "_shown_spans", None):
            return  # unchanged: skip the redraw
        width = max(self.size.width - 2, 20)
        lines = len(text.wrap(self.app.console, width))
        # A new layout only when the strip's height changes.
        self.update(text, layout=lines != getattr(self, "_shown_lines", None))
        self._shown_plain, self._shown_spans, self._shown_lines = text.plain, str(text.spans), lines
