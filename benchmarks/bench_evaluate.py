"""Speed of exact design evaluation and of the one-design CLI commands.

* ``SingleColumn.evaluate`` on 10**5 design points of the demo absorber in
  one vectorized call: points drawn over the scenario's candidates, tray
  range and ratio range, best of REPEATS calls;
* ``build_space`` of the six-solvent benchmark widened to 2000 ratio levels
  (about 2.4 million alternatives), evaluated in chunks: alternatives per
  second and the peak memory of the process;
* wall time of ``towercost evaluate`` and ``towercost rate`` run as a user
  runs them (a fresh process, output to a pipe, median of CLI_REPEATS after
  a warm-up), which includes interpreter start-up and imports.

Run: .venv/bin/python benchmarks/bench_evaluate.py
"""

from __future__ import annotations

import resource
import sys
import tomllib
from pathlib import Path

import numpy as np

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))

from common import ROOT, best_seconds, cli_seconds  # noqa: E402

import towercost  # noqa: E402
from towercost.design.case import prepare  # noqa: E402
from towercost.design.column import SingleColumn  # noqa: E402
from towercost.design.space import build_space  # noqa: E402

DEMO = ROOT / "scenarios" / "demo_absorber.toml"
SIX = ROOT / "benchmarks" / "scenarios" / "six_solvents.toml"
POINTS = 10**5


def main() -> list[tuple[str, float, str]]:
    case = prepare(towercost.load(DEMO))
    flowsheet = SingleColumn(case)
    rng = np.random.default_rng(20240602)
    agent = rng.integers(0, len(case.agents), POINTS)
    trays = rng.integers(case.trays_range[0], case.trays_range[1] + 1, POINTS)
    lo, hi = case.ratio_range
    ratio = np.exp(rng.uniform(np.log(lo), np.log(hi), POINTS))
    rate = ratio * flowsheet.rate_min[agent]
    seconds, designs = best_seconds(flowsheet.evaluate, agent, trays, rate)
    assert len(designs) == POINTS and np.all(np.isfinite(designs.annualized))

    raw = tomllib.loads(SIX.read_text(encoding="utf-8"))
    raw["column"]["ratio_levels"] = 2000
    big = prepare(towercost.from_dict(raw))
    space_seconds, space = best_seconds(build_space, big, repeats=2)
    peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0

    rows = [
        ("evaluate 10^5 designs, one call", seconds, "s"),
        ("evaluate throughput", POINTS / seconds, "designs/s"),
        ("build_space six solvents x 80 trays x 2000 levels", space_seconds, "s"),
        ("  alternatives", len(space), "designs"),
        ("  throughput", len(space) / space_seconds, "designs/s"),
        ("  peak memory of this process", peak, "MiB"),
        ("CLI evaluate, wall", cli_seconds(["evaluate", str(DEMO.relative_to(ROOT)), "--solvent", "light wash oil",
                                            "--trays", "16", "--ratio", "1.5"]), "s"),
        ("CLI rate, wall", cli_seconds(["rate", "--stages", "8", "--factor", "1.4"]), "s"),
    ]
    for name, value, unit in rows:
        text = f"{value:,}" if isinstance(value, int) else f"{value:.4g}"
        print(f"{name:52s} {text:>12s} {unit}")
    return rows


if __name__ == "__main__":
    main()
