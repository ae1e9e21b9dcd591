"""Golden outputs: the CLI's answers on every bundled scenario stay what they were.

The records in ``tests/golden`` were written by ``tests/golden/harness.py
--refresh``. A change that moves a number on purpose refreshes them in the
same commit and says why in its message (see DEVELOPERS.md).

What counts as the same:
- JSON: every key of the record is still there with the same value; numbers
  to a relative 1e-9 (floating-point re-association, not engineering); keys
  the record does not hold (new item rows, new fields) may be added; timing
  fields (``*_seconds``) and solver diagnostics are never compared.
- Text (the ``curve`` tables): identical.
"""

from __future__ import annotations

import json
import math
import sys
from pathlib import Path

import pytest

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE / "golden"))
import harness  # noqa: E402

GOLDEN = sorted((HERE / "golden").glob("*.golden.json"))


def _same(old, new, where="") -> list[str]:
    """Differences between a golden value and a new one, as readable lines."""
    if isinstance(old, dict):
        if not isinstance(new, dict):
            return [f"{where}: was an object, now {type(new).__name__}"]
        out = []
        for key, value in old.items():
            if key not in new:
                out.append(f"{where}.{key}: missing")
            else:
                out += _same(value, new[key], f"{where}.{key}")
        return out
    if isinstance(old, list):
        if not isinstance(new, list) or len(old) != len(new):
            return [f"{where}: list of {len(old)} became {len(new) if isinstance(new, list) else type(new).__name__}"]
        out = []
        for i, (a, b) in enumerate(zip(old, new)):
            out += _same(a, b, f"{where}[{i}]")
        return out
    if isinstance(old, float) or isinstance(new, float):
        if not isinstance(new, (int, float)) or isinstance(new, bool) or not isinstance(old, (int, float)):
            return [f"{where}: {old!r} became {new!r}"]
        if not math.isclose(old, new, rel_tol=1e-9, abs_tol=1e-300):
            return [f"{where}: {old!r} became {new!r}"]
        return []
    return [] if old == new else [f"{where}: {old!r} became {new!r}"]


@pytest.fixture(scope="module")
def outputs():
    return harness.run_all()


def test_every_golden_run_still_exists(outputs):
    assert sorted(outputs) == sorted(p.name.removesuffix(".golden.json") for p in GOLDEN)


@pytest.mark.parametrize("path", GOLDEN, ids=lambda p: p.name.removesuffix(".golden.json"))
def test_golden_output_unchanged(outputs, path):
    golden = json.loads(path.read_text())
    new = outputs[path.name.removesuffix(".golden.json")]
    assert new["exit"] == golden["exit"]
    if "json" in golden:
        differences = _same(harness._strip_timing(golden["json"]), new["json"])
        assert not differences, "\n".join(differences[:20])
    else:
        assert new["text"] == golden["text"]
