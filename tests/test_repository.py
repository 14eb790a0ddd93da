"""The repository's promises: layout, README quick start, CI script."""

from __future__ import annotations

import re
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


def test_top_level_layout():
    for name in ("README.md", "DEVELOPERS.md", "pyproject.toml", "inspector", "tests", "forms", ".ci/run"):
        assert (ROOT / name).exists(), name


def quick_start_commands() -> list[str]:
    text = (ROOT / "README.md").read_text()
    section = text.split("## Quick start", 1)[1].split("\n## ", 1)[0]
    block = re.search(r"```sh\n(.*?)```", section, re.S).group(1)
    return [line for line in block.splitlines() if line.strip()]


def test_readme_quick_start_has_exactly_two_commands():
    commands = quick_start_commands()
    assert len(commands) == 2
    assert commands[0].endswith("inspector") and "pip install ." in commands[0]
    assert "'.[test]'" in commands[1] and "pytest" in commands[1]


def test_ci_runs_the_readme_test_command_verbatim():
    ci = (ROOT / ".ci" / "run").read_text()
    assert quick_start_commands()[1] in ci.splitlines()


def test_readme_carries_the_cautions():
    text = (ROOT / "README.md").read_text().lower()
    assert "advisory" in text and "qualified inspectors" in text and "never proof" in text
