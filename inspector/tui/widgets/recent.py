"""The bench's list of the latest entries, newest at the bottom.

It draws only the rows that fit, as plain text, so adding an entry costs
the same with 20 results in the lot as with 2,000 (a full table widget
re-laid out the screen on every entry). A correction is one row that names
the entry it corrects and what that entry said, so the original stays on
view next to its correction; the corrected row, while still on view, is
marked with the entry that superseded it.
"""

from __future__ import annotations

from dataclasses import dataclass

from rich.text import Text
from textual.widget import Widget


@dataclass
class EntryRow:
    entry: int
    unit: int
    defect_class: str
    outcome: str
    text: str
    by: str
    at: str
    superseded_by: int | None = None


class RecentEntries(Widget):
    """The tail of the result entries."""

    COMPONENT_CLASSES = {"recent--head", "recent--fail", "recent--old"}

    DEFAULT_CSS = """
    RecentEntries { height: 1fr; padding: 0 1; text-wrap: nowrap; text-overflow: ellipsis; }
    RecentEntries > .recent--head { color: $foreground-muted; text-style: bold; }
    RecentEntries > .recent--fail { color: $text-error; }
    RecentEntries > .recent--old { color: $foreground-muted; text-style: strike; }
    """

    def __init__(self, *, id: str | None = None) -> None:
        super().__init__(id=id)
        self.rows: list[EntryRow] = []
        self._index: dict[int, int] = {}

    def set_rows(self, rows: list[EntryRow]) -> None:
        self.rows = list(rows)
        self._index = {row.entry: i for i, row in enumerate(self.rows)}
        self.refresh()

    def add(self, row: EntryRow) -> None:
        self._index[row.entry] = len(self.rows)
        self.rows.append(row)
        self.refresh()

    def mark_superseded(self, entry: int, by_entry: int) -> None:
        at = self._index.get(entry)
        if at is not None:
            self.rows[at].superseded_by = by_entry
            self.refresh()

    def render(self) -> Text:
        head = self.get_component_rich_style("recent--head")
        fail = self.get_component_rich_style("recent--fail")
        old = self.get_component_rich_style("recent--old")
        text = Text(no_wrap=True, overflow="ellipsis")
        text.append(f"{'entry':>6} {'unit':>7} {'class':<9}{'result':<8}{'by':<14}{'at':<6}defect · note", style=head)
        room = max(self.size.height - 1, 0)
        for row in self.rows[-room:] if room else []:
            text.append("\n")
            line = f"{row.entry:>6} {row.unit:>7} {row.defect_class:<9}{row.outcome:<8}{row.by[:13]:<14}{row.at:<6}"
            style = old if row.superseded_by else (fail if row.outcome == "fail" else "")
            text.append(line, style=style)
            note = row.text
            if row.superseded_by:
                note = f"corrected by {row.superseded_by}" + (f" · {note}" if note else "")
            text.append(note, style=fail if row.outcome == "fail" and not row.superseded_by else "")
        if not self.rows:
            text.append("\n  no result yet", style=head)
        return text
