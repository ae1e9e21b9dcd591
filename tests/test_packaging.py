"""The distribution: one import name, every package listed, the data and templates shipped.

Checked against the source tree itself (every folder of Python files under
optimizer/ and models/ must be a listed package) and against the standard
library's TOML reader; no build is run.
"""

from __future__ import annotations

import tomllib
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
CONFIG = tomllib.loads((ROOT / "pyproject.toml").read_text(encoding="utf-8"))["tool"]["setuptools"]


def _packages_on_disk() -> set[str]:
    found = set()
    for top, name in (("optimizer", "towercost"), ("models", "towercost.models")):
        for folder in [ROOT / top, *(p for p in (ROOT / top).rglob("*") if p.is_dir())]:
            if "__pycache__" in folder.parts:
                continue
            if any(folder.glob("*.py")) or any(folder.glob("*.j2")) or any(folder.glob("*.toml")):
                relative = folder.relative_to(ROOT / top).parts
                found.add(".".join((name, *relative)))
    return found


def test_one_import_name_and_no_generic_top_level_names():
    assert all(p == "towercost" or p.startswith("towercost.") for p in CONFIG["packages"])
    assert CONFIG["package-dir"] == {"towercost": "optimizer", "towercost.models": "models"}


def test_every_folder_of_code_or_data_is_a_listed_package():
    assert _packages_on_disk() <= set(CONFIG["packages"]), _packages_on_disk() - set(CONFIG["packages"])


def test_data_files_are_shipped():
    data = CONFIG["package-data"]
    assert "*.toml" in data["towercost.models.data"] and "*.csv" in data["towercost.models.data"]
