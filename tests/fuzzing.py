"""What the fuzz tests share: a small TOML writer, hostile values, mutations of the bundled files, and the oracle.

The oracle (``check``) is the issue's definition of a pass: no traceback, no
Python warning printed, an exit code the README documents, a refusal as one
line (naming the file for a scenario refusal), finite numbers in every
accepted output, and no case over ``MAX_SECONDS`` (the commands show a
progress bar only past about a second; the fuzz cases are all small).
"""

from __future__ import annotations

import datetime
import json
import math
import os
import tempfile
import time
from pathlib import Path

from typer.testing import CliRunner

ROOT = Path(__file__).resolve().parents[1]
BUNDLED = sorted((ROOT / "scenarios").glob("*.toml")) + sorted((ROOT / "tests" / "data").glob("*.toml"))

#: No fuzz case may take longer [s].
MAX_SECONDS = 10.0

#: Keys whose value may be null in a JSON record (not a figure, or "not given").
NULLABLE = {"spec_mole_fraction", "spec_concentration", "cost_index_year", "fraction_removed", "k_value",
            "gas_out", "liquid_out", "existing_shell", "spec_note", "binding_spec", "pump_head_m",
            "loop"}   # loop: null for a design without a designed regenerator
#: Keys null by design in one kind of column: the packed-bed block of a tray design, and the tray
#: figures of a packed design.
TRAY_ONLY = {"tray_efficiency", "tray_spacing_m", "tray_type", "operating_range", "pressure_drop_per_tray_Pa"}

#: Cases run so far, per kind (the last test of the module reports them).
COUNTS: dict[str, int] = {}
STARTED = time.perf_counter()


def count(kind: str) -> None:
    COUNTS[kind] = COUNTS.get(kind, 0) + 1


# --------------------------------------------------------------------------- a TOML writer (tests only)


def _key(key) -> str:
    return json.dumps(str(key), ensure_ascii=False)


def _value(value) -> str:
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, int):
        return str(value)
    if isinstance(value, float):
        if math.isnan(value):
            return "nan"
        if math.isinf(value):
            return "inf" if value > 0 else "-inf"
        text = repr(value)
        return text if any(c in text for c in ".en") else text + ".0"
    if isinstance(value, str):
        return json.dumps(value, ensure_ascii=False)
    if isinstance(value, (datetime.datetime, datetime.date, datetime.time)):
        return value.isoformat()
    if isinstance(value, dict):
        return "{" + ", ".join(f"{_key(k)} = {_value(v)}" for k, v in value.items()) + "}"
    if isinstance(value, (list, tuple)):
        return "[" + ", ".join(_value(v) for v in value) + "]"
    return json.dumps(str(value))


def _is_table_list(value) -> bool:
    return isinstance(value, list) and value != [] and all(isinstance(v, dict) for v in value)


def _table(data: dict, prefix: list[str], out: list[str]) -> None:
    scalars = [(k, v) for k, v in data.items() if not isinstance(v, dict) and not _is_table_list(v)]
    for key, value in scalars:
        out.append(f"{_key(key)} = {_value(value)}")
    for key, value in data.items():
        if isinstance(value, dict):
            out.append("")
            out.append("[" + ".".join(_key(k) for k in prefix + [key]) + "]")
            _table(value, prefix + [key], out)
        elif _is_table_list(value):
            for item in value:
                out.append("")
                out.append("[[" + ".".join(_key(k) for k in prefix + [key]) + "]]")
                _table(item, prefix + [key], out)


def dumps(data: dict) -> str:
    """``data`` as TOML text (every key quoted; tables and arrays of tables as sections)."""
    out: list[str] = []
    _table(data, [], out)
    return "\n".join(out) + "\n"


# --------------------------------------------------------------------------- hostile values

HOSTILE_TEXT = [
    "", " ", "lots", "1 (", "1 kmol/0/h", "260 1/0", "1e400 m", "-1e400 m", "nan m", "inf K", "1e-400 g/mol",
    "30 C", "30 F", "1.5 ppm", "2 ppb", "3 ton", "$5/kWh", "5 USD/ton", "1.15 bar", "16 psi", "2 barg", "2 psig",
    "0 K", "-5 K", "-300 degC", "1e300 m", "1e308 USD/kWh", "1e6 K", "1e6 m3/kg", "20000 Nm3/h", "500 scfm",
    "264 gpm", "5 ug/L", "1.5 mg/L", "1.5 ppmw", "500 ppmv", "0.2 %", "100 %", "5 kmol/hx", "9 kg", "3 **", "2 m/",
    "1 e", "5 kmol/h)", "[red]x", "[/bold]", "=cmd|calc", "+1", "@SUM(A1)", "\u001b[31mred", "x\u202ey",
    "\u0000", "ﬀ", "１２ m", "12\u00a0m", "12 m ", " 12 m", "0x10 m", "1_000 m", "1,5 m", "٣ m",
    "x" * 300, "9" * 400, "1" + "0" * 400 + " m", "1e-320 kg/mol", "5e-324 m",
]
HOSTILE_NUMBERS = [0, -1, 1, 2, 0.0, -0.0, 1e-320, 5e-324, 1e308, -1e308, float("nan"), float("inf"),
                   float("-inf"), 2**63, -(2**63), 2**64, 10**30, 4e13, 0.5, 1.5, 1e6, 1e-6, 99999999999999999999]
HOSTILE_OTHER = [True, False, [], {}, [1, 2], ["a"], {"x": 1}, [[[[[[1]]]]]], datetime.date(2024, 1, 1),
                 datetime.time(12, 0)]


def deep(depth: int):
    value: object = 1
    for i in range(depth):
        value = [value] if i % 2 else {"d": value}
    return value


# --------------------------------------------------------------------------- the oracle


def runner() -> CliRunner:
    return CliRunner()


def _finite(node, key="", by_design=frozenset()) -> list[str]:
    """Paths in a JSON record where a number is missing (null) or not finite."""
    bad = []
    if isinstance(node, dict):
        column = node.get("column")
        if isinstance(column, dict) and "packed" in column:  # one design: which of its fields are null by design
            by_design = frozenset(TRAY_ONLY) if column["packed"] is not None else frozenset({"packed"})
        for k, v in node.items():
            if k == "inputs":
                continue  # the scenario as read back: an optional field not given is null there, by design
            bad += _finite(v, str(k), by_design)
    elif isinstance(node, list):
        for v in node:
            bad += _finite(v, key, by_design)
    elif node is None:
        if (key not in NULLABLE and key not in by_design and not key.endswith("_seconds")
                and key not in ("no_design",)):
            bad.append(key)
    elif isinstance(node, float) and not math.isfinite(node):
        bad.append(key)
    return bad


def check(result, seconds: float, *, path: Path | None = None, codes=(0, 2, 3, 4), json_out: bool = False,
          scenario_refusal: bool = False) -> str:
    """The pass criteria for one command run; returns the stderr line (or "")."""
    err = result.stderr
    out = result.stdout
    assert result.exit_code in codes, (result.exit_code, err, out[-400:], result.exception)
    assert result.exception is None or isinstance(result.exception, SystemExit), repr(result.exception)
    assert "Traceback" not in err and "Traceback" not in out, err
    assert "Warning" not in err, err
    assert seconds < MAX_SECONDS, seconds
    lines = err.strip().splitlines()
    if result.exit_code == 0:
        assert lines == [], err
        if json_out:
            record = json.loads(out)
            assert _finite(record) == [], _finite(record)[:5]
        return ""
    assert len(lines) == 1, err
    line = lines[0]
    assert line.startswith("error: "), line
    assert len(line) < 1300, len(line)
    if scenario_refusal and result.exit_code == 2 and path is not None:
        assert line.startswith(f"error: {path}") and len(line) > len(f"error: {path}") + 4, line
    return line


#: Where the fuzz cases run: their files, and the default output folder reports/, are their own.
WORK = Path(tempfile.mkdtemp(prefix="towercost-fuzz-"))


def timed(app, args) -> tuple[object, float]:
    """One command run in-process from ``WORK``, and its time [s]."""
    here = os.getcwd()
    os.chdir(WORK)
    start = time.perf_counter()
    try:
        result = runner().invoke(app, [str(a) for a in args])
    finally:
        os.chdir(here)
    return result, time.perf_counter() - start


def keep(path: Path) -> Path:
    """A copy of a failing case's file, kept for the report (its name goes into the assertion)."""
    kept = WORK / "failures"
    kept.mkdir(exist_ok=True)
    target = kept / f"{len(list(kept.iterdir())):05d}-{path.name}"
    target.write_bytes(path.read_bytes())
    return target


def scale_for(full: int, quick: int) -> int:
    """How many examples a fuzz test runs: ``full`` under ``make fuzz`` (TOWERCOST_FUZZ=full), else ``quick``."""
    return full if os.environ.get("TOWERCOST_FUZZ") == "full" else quick
