"""Speed of exact design evaluation (optimizer/space.py) and of the one-design CLI commands.

* ``evaluate`` on 10**5 design points of the demo absorber in one vectorized
  call: points drawn over the scenario's candidates, tray range and ratio
  range (uniform trays, log-uniform L/Lmin), best of REPEATS calls.
* Wall time of ``towercost evaluate`` and ``towercost rate`` run as a user
  runs them: a fresh process of the virtual environment's ``towercost``,
  output to a pipe, best of CLI_REPEATS. This includes interpreter start-up
  and imports.

Run: .venv/bin/python benchmarks/bench_evaluate.py
"""

from __future__ import annotations

import os
import subprocess
import sys
import time
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))  # run from a checkout without installing

from towercost import space as sp  # noqa: E402
from towercost.scenario import load_scenario  # noqa: E402

DEMO = ROOT / "scenarios" / "demo_absorber.toml"
POINTS = 10**5
REPEATS = 5
CLI_REPEATS = 3


def best_seconds(function, *args, repeats: int = REPEATS, **kwargs) -> tuple[float, object]:
    """Seconds of the fastest of ``repeats`` calls, and the last call's result."""
    best, result = float("inf"), None
    for _ in range(repeats):
        start = time.perf_counter()
        result = function(*args, **kwargs)
        best = min(best, time.perf_counter() - start)
    return best, result


def towercost_command() -> str:
    """The ``towercost`` script of the interpreter running this file (the venv's), else the checkout's."""
    here = Path(sys.executable).parent / "towercost"
    return str(here if here.exists() else ROOT / ".venv" / "bin" / "towercost")


def cli_seconds(arguments: list[str], repeats: int = CLI_REPEATS) -> float:
    """Wall seconds of the fastest of ``repeats`` runs of ``towercost arguments`` (output to a pipe)."""
    command = [towercost_command(), *arguments]
    env = dict(os.environ, COLUMNS="120")

    def once():
        done = subprocess.run(command, cwd=ROOT, stdout=subprocess.PIPE, stderr=subprocess.PIPE, env=env)
        if done.returncode != 0:
            raise RuntimeError(f"{' '.join(command)} exited {done.returncode}: {done.stderr.decode()[-500:]}")
        return done

    return best_seconds(once, repeats=repeats)[0]


def random_designs(case: sp.Case, points: int, seed: int = 20240602):
    """Agent index, real trays and agent rate [mol/s] of ``points`` designs over the case's ranges."""
    rng = np.random.default_rng(seed)
    agent = rng.integers(0, len(case.agents), points)
    trays = rng.integers(case.trays_range[0], case.trays_range[1] + 1, points)
    lo, hi = case.ratio_range
    ratio = np.exp(rng.uniform(np.log(lo), np.log(hi), points))
    rate = ratio * sp.minimum_rate(case, np.arange(len(case.agents)))[agent]
    return agent, trays, rate


def main() -> list[tuple[str, float, str]]:
    case = sp.prepare(load_scenario(DEMO))
    agent, trays, rate = random_designs(case, POINTS)
    seconds, designs = best_seconds(sp.evaluate, case, agent, trays, rate)
    assert len(designs) == POINTS and np.all(np.isfinite(designs.annualized))

    rows = [
        (f"evaluate, {POINTS:.0e} designs, one call (demo)", seconds, "s"),
        ("evaluate throughput (demo)", POINTS / seconds, "designs/s"),
        ("CLI evaluate (demo, 16 trays, 1.5 Lmin), wall",
         cli_seconds(["evaluate", str(DEMO.relative_to(ROOT)), "--solvent", "light wash oil",
                      "--trays", "16", "--ratio", "1.5"]), "s"),
        ("CLI rate --stages 8 --factor 1.4, wall", cli_seconds(["rate", "--stages", "8", "--factor", "1.4"]), "s"),
        ("CLI --help, wall (start-up baseline)", cli_seconds(["--help"]), "s"),
    ]
    for name, value, unit in rows:
        print(f"{name:52s} {value:12.4g} {unit}")
    return rows


if __name__ == "__main__":
    main()
