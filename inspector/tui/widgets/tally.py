"""The live tally: each defect class against its acceptance and rejection
numbers, in words and symbols so it reads the same without colour."""

from __future__ import annotations

from typing import Mapping

from rich.text import Text
from textual.widgets import Static

VERDICT_WORDS = {"accept": "ACCEPT ✔", "reject": "REJECT ✘", None: "open …"}


def verdict_words(verdict: str | None) -> str:
    """The verdict as the screens print it (word and symbol)."""
    return VERDICT_WORDS.get(verdict, str(verdict))


class Tally(Static):
    """Renders ``{class: tally}`` where each tally has the keys of
    ``ClassTally.to_dict()`` (sample_size, inspected, open, nonconforming,
    accept, reject, verdict)."""

    COMPONENT_CLASSES = {"tally--accept", "tally--reject", "tally--head"}

    DEFAULT_CSS = """
    Tally { height: auto; text-wrap: nowrap; text-overflow: ellipsis; }
    Tally > .tally--accept { color: $success; text-style: bold; }
    Tally > .tally--reject { color: $error; text-style: bold; }
    Tally > .tally--head { color: $foreground-muted; }
    """

    def show_tallies(self, tallies: Mapping[str, Mapping]) -> None:
        head = self.get_component_rich_style("tally--head")
        text = Text(no_wrap=True, overflow="ellipsis")
        text.append(f"{'class':<9}{'sample':>7}{'done':>6}{'open':>6}{'found':>7}{'Ac':>4}{'Re':>4}  status\n",
                    style=head)
        for i, (cls, t) in enumerate(tallies.items()):
            verdict = t.get("verdict")
            text.append(f"{cls:<9}{t['sample_size']:>7}{t['inspected']:>6}{t['open']:>6}"
                        f"{t['nonconforming']:>7}{t['accept']:>4}{t['reject']:>4}  ")
            style = {"accept": "tally--accept", "reject": "tally--reject"}.get(verdict)
            words = verdict_words(verdict)
            if verdict is None:
                left = t["reject"] - t["nonconforming"]
                words += f" {left} more fail{'s' if left != 1 else ''} rejects"
            text.append(words, style=self.get_component_rich_style(style) if style else "")
            if i < len(tallies) - 1:
                text.append("\n")
        if not tallies:
            text.append("no plan yet", style=head)
        height = self.styles.height
        self.update(text, layout=height is None or height.is_auto)
