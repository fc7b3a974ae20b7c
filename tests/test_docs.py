"""The docs keep up with the code: every setting and every CLI command is documented.

A setting nobody can find is a setting nobody can use; a command missing from the docs
is a command a keeper at a hilltop will not know to type.
"""

from __future__ import annotations

from pathlib import Path

import pytest
import typer.main

from mastwatch.cli import app
from mastwatch.settings import Settings

ROOT = Path(__file__).resolve().parents[1]
DOCS = (ROOT / "README.md").read_text() + (ROOT / "DEVELOPERS.md").read_text()


def _command_paths(command: object, prefix: str) -> list[str]:
    # typer vendors its own click: test for a group by its sub-commands, not by class
    commands = getattr(command, "commands", None)
    if commands:
        paths = []
        for name, sub in commands.items():
            paths += _command_paths(sub, f"{prefix} {name}")
        return paths
    return [prefix]


@pytest.mark.parametrize("name", sorted(Settings.model_fields))
def test_every_setting_is_documented(name: str) -> None:
    env = f"MASTWATCH_{name.upper()}"
    assert env in DOCS, f"{env} is not in README.md or DEVELOPERS.md"


@pytest.mark.parametrize("path", _command_paths(typer.main.get_command(app), "mastwatch"))
def test_every_command_is_documented(path: str) -> None:
    assert path in DOCS, f"`{path}` is not in README.md or DEVELOPERS.md"


def test_readme_first_paragraph_states_the_job() -> None:
    readme = (ROOT / "README.md").read_text()
    first = readme.split("\n\n")[1]
    for word in ("antenna", "sweep", "club"):
        assert word in first
    assert "make demo" in readme and "make test" in readme
