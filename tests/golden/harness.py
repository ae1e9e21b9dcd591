"""The golden-output harness: the CLI runs whose outputs are kept as a regression record.

``cases()`` lists every run (optimize --json in the default listing and in
the finer one of every rate and diameter variant, evaluate --json, curve and
rate --json on every bundled scenario and test file; site --json on every
bundled site file); ``run_case`` runs one
in-process through typer's CliRunner and returns its exit code and output,
normalised so that only what a change of behaviour would alter remains.

Refresh (after a change that moves a number on purpose, said in the commit
message):

    .venv/bin/python tests/golden/harness.py --refresh

Timing fields (any key ending in ``_seconds``) and the solver's diagnostics
(``solver.binaries``, ``solver.solves``, ``solver.solver``: how an answer was
found, not what it is) are dropped before comparison.
"""

from __future__ import annotations

import json
import os
import re
import sys
from pathlib import Path

HERE = Path(__file__).resolve().parent
ROOT = HERE.parents[1]
SCENARIOS = sorted((ROOT / "scenarios").glob("*.toml")) + sorted((ROOT / "tests" / "data").glob("*.toml"))

RATE_RUNS = {
    "rate-absorb-forward": ["rate", "--mode", "absorb", "--stages", "6", "--factor", "1.4", "--json"],
    "rate-absorb-dirty-solvent": ["rate", "--mode", "absorb", "--stages", "4.5", "--factor", "1.2", "--k-value", "0.8",
                                  "--gas-in", "0.002", "--liquid-in", "1e-4", "--json"],
    "rate-absorb-stages-needed": ["rate", "--mode", "absorb", "--factor", "1.5", "--target-remaining", "0.02", "--json"],
    "rate-absorb-factor-needed": ["rate", "--mode", "absorb", "--stages", "8", "--target-remaining", "0.01", "--json"],
    "rate-strip-flows": ["rate", "--mode", "strip", "--stages", "5", "--liquid", "100", "--gas", "3", "--k-value",
                         "60", "--json"],
    "rate-strip-factor-needed": ["rate", "--mode", "strip", "--stages", "10", "--target-remaining", "0.001", "--json"],
    "rate-factor-one": ["rate", "--mode", "absorb", "--stages", "9", "--factor", "1", "--json"],
}


def _app():
    try:
        from towercost.cli import app
    except ImportError:  # before the package mapping
        from towercost.cli import app
    return app


def invoke(args: list[str]) -> tuple[int, str]:
    from typer.testing import CliRunner

    os.environ["COLUMNS"] = "132"
    result = CliRunner().invoke(_app(), [str(a) for a in args], env={"COLUMNS": "132"})
    if result.exception is not None and not isinstance(result.exception, SystemExit):
        raise result.exception
    return result.exit_code, result.stdout


#: Solver diagnostics: how an answer was found, not what it is (compared as little as timing is).
DIAGNOSTICS = ("binaries", "solves", "solver")


def _strip_timing(value, parent=""):
    if isinstance(value, dict):
        return {k: _strip_timing(v, k) for k, v in value.items()
                if not k.endswith("_seconds") and not (parent == "solver" and k in DIAGNOSTICS)}
    if isinstance(value, list):
        return [_strip_timing(v, parent) for v in value]
    return value


def cases() -> dict[str, list[str]]:
    """Every golden run: name -> CLI arguments (evaluate runs need the optimize output first)."""
    runs = {}
    for path in SCENARIOS:
        rel = path.relative_to(ROOT)
        if "[site]" in path.read_text(encoding="utf-8"):
            runs[f"{path.stem}-site"] = ["site", str(rel), "--json"]
            continue
        runs[f"{path.stem}-optimize"] = ["optimize", str(rel), "--json"]
        runs[f"{path.stem}-optimize-variant"] = ["optimize", str(rel), "--distinct", "variant", "--json"]
    runs.update(RATE_RUNS)
    return runs


def evaluate_cases(name: str, optimize_record: dict, scenario: str) -> dict[str, list[str]]:
    """evaluate --json of the best design of each candidate (and of each of its packed beds), and curve of each
    candidate (its trays)."""
    runs = {}
    stem = name.removesuffix("-optimize")
    for rec in optimize_record["per_agent_best"]:
        agent = rec["agent"]
        tag = re.sub(r"[^A-Za-z0-9]+", "_", agent).strip("_")
        packed = rec["column"].get("packed")
        if packed:
            tag += "-" + re.sub(r"[^A-Za-z0-9]+", "_", packed["row"]).strip("_")
        # by its design ID: the exact rate and shell (a ratio typed back may miss the spec by rounding)
        runs[f"{stem}-evaluate-{tag}"] = ["evaluate", scenario, "--design", rec["design_id"], "--json"]
        if not packed:
            runs[f"{stem}-curve-{tag}"] = ["curve", scenario, "--solvent", agent]
    return runs


def run_all() -> dict[str, dict]:
    """Run every case from the repository root; name -> {"exit": code, "json" or "text": output}."""
    cwd = os.getcwd()
    os.chdir(ROOT)
    try:
        out: dict[str, dict] = {}
        for name, args in cases().items():
            code, text = invoke(args)
            record = json.loads(text) if "--json" in args and code == 0 else None
            out[name] = {"args": args, "exit": code, **({"json": _strip_timing(record)} if record else {"text": text})}
            if name.endswith("-optimize") and record:
                for sub, sub_args in evaluate_cases(name, record, args[1]).items():
                    code2, text2 = invoke(sub_args)
                    rec2 = json.loads(text2) if "--json" in sub_args and code2 == 0 else None
                    out[sub] = {"args": sub_args, "exit": code2,
                                **({"json": _strip_timing(rec2)} if rec2 else {"text": text2})}
        return out
    finally:
        os.chdir(cwd)


def refresh() -> None:
    for old in HERE.glob("*.golden.json"):
        old.unlink()
    for name, record in run_all().items():
        (HERE / f"{name}.golden.json").write_text(json.dumps(record, indent=1, sort_keys=True) + "\n")
    print(f"wrote {len(list(HERE.glob('*.golden.json')))} golden files to {HERE}")


if __name__ == "__main__":
    if "--refresh" in sys.argv:
        refresh()
    else:
        print(__doc__)
