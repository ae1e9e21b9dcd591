"""Reading a scenario: a TOML file or a dict, validated into a ``Scenario`` or one line of ``ScenarioError``."""

from __future__ import annotations

import tomllib
from pathlib import Path

from pydantic import ValidationError

from towercost.errors import ScenarioError
from towercost.scenario.messages import one_line, relevance
from towercost.scenario.schema import Scenario

def parse_scenario(data: dict, path: str = "scenario") -> Scenario:
    """Validate a scenario already read into a dict; raise ScenarioError with one line."""
    try:
        return Scenario.model_validate(data)
    except ValidationError as exc:
        # One line: the most telling error (a union reports one per member).
        best = max(exc.errors(), key=lambda e: relevance(e, data))
        raise ScenarioError(one_line(path, best, data)) from None


def load_scenario(path: str | Path) -> Scenario:
    """Read and validate a scenario file.

    Raises
    ------
    ScenarioError
        The file is missing, is not TOML, or holds a value that cannot be
        accepted; the message names the file, the field and the value.
    """
    path = Path(path)
    try:
        text = path.read_text(encoding="utf-8")
    except FileNotFoundError:
        raise ScenarioError(f"{path}: no such file") from None
    except OSError as exc:
        raise ScenarioError(f"{path}: cannot be read ({exc.strerror})") from None
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise ScenarioError(f"{path}: not valid TOML ({exc})") from None
    return parse_scenario(data, str(path))
