"""Speed of the whole selection on two scenarios, and the model-against-scan ratios.

For the demo absorber (scenarios/demo_absorber.toml) and the invented
six-solvent benchmark (benchmarks/scenarios/six_solvents.toml):

* ``build_space``: exact evaluation of every alternative (best of REPEATS);
* the selection model for the ten best and the best of each candidate:
  build and solve seconds as the model reports them, and its binaries;
* the exhaustive scan for the same (best of REPEATS);
* ``optimize(method="model")`` against ``optimize(method="scan")`` in one
  process, alternating, the median ratio of the pairs (target: within 2x);
* ``towercost optimize`` against ``towercost optimize --method scan`` as
  whole processes, alternating, the median ratio of the pairs (target on the
  demo: within 1.25x) and the model's median wall (target: under 0.7 s);
* a plain Python loop written as one would without this tool (for each
  candidate, tray count and ratio level, evaluate ONE design, keep the
  cheapest feasible), timed on LOOP_SAMPLE designs drawn from it and
  extrapolated to the size of the space.

Before any figure is reported the run is checked: the model's ten best and
each candidate's best are the scan's, index for index (one tie key), and the
loop's best is no cheaper than the space's best.

Run: .venv/bin/python benchmarks/bench_optimizer.py
"""

from __future__ import annotations

import sys
import time
from pathlib import Path

import numpy as np

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))

from common import ROOT, best_seconds, paired, run_once, timed  # noqa: E402

import towercost  # noqa: E402
from towercost.design.case import prepare  # noqa: E402
from towercost.design.column import SingleColumn  # noqa: E402
from towercost.design.space import build_space  # noqa: E402
from towercost.select import ranking  # noqa: E402
from towercost.select.scan import scan  # noqa: E402

SCENARIOS = {
    "demo": ROOT / "scenarios" / "demo_absorber.toml",
    "six": ROOT / "benchmarks" / "scenarios" / "six_solvents.toml",
}
LOOP_SAMPLE = 2000
RELATIVE = 1e-12


def plain_loop(case, triples) -> float:
    """The cheapest feasible design over (agent, trays, ratio level) triples, one evaluate call per design."""
    flowsheet = SingleColumn(case)
    best_cost = np.inf
    for agent, trays, level in triples:
        rate = level * float(flowsheet.rate_min[agent])
        d = flowsheet.evaluate(np.array([agent]), np.array([trays]), np.array([rate]))
        if d.within_limits[0] and d.annualized[0] < best_cost:
            best_cost = float(d.annualized[0])
    return best_cost


def bench_scenario(key: str, path: Path, rng: np.random.Generator) -> list[tuple[str, float, str]]:
    scenario = towercost.load(path)
    case = prepare(scenario)
    build, space = best_seconds(build_space, case)
    n = len(space)
    scan_seconds, (scan_order, scan_best_of) = best_seconds(scan, space, 10)
    model_seconds, (order, best_of, figures) = best_seconds(ranking.select_by_model, space, 10, repeats=3)
    assert order == scan_order, f"{key}: the model's ten best differ from the scan's"
    assert best_of == scan_best_of, f"{key}: the model's per-candidate bests differ from the scan's"

    model_call, scan_call, in_process = paired(timed(ranking.optimize, scenario, method="model"),
                                               timed(ranking.optimize, scenario, method="scan"))
    relative = str(path.relative_to(ROOT))
    cli_model, cli_scan, cli_ratio = paired(lambda: run_once(["optimize", relative]),
                                            lambda: run_once(["optimize", relative, "--method", "scan"]), pairs=7)

    flowsheet = SingleColumn(case)
    levels = flowsheet.rate_grid()
    trays = np.arange(case.trays_range[0], case.trays_range[1] + 1)
    triples = [(a, int(t), float(r)) for a in range(len(case.agents)) for t in trays for r in levels]
    sample = [triples[i] for i in np.sort(rng.choice(len(triples), size=min(LOOP_SAMPLE, len(triples)),
                                                     replace=False))]
    start = time.perf_counter()
    loop_cost = plain_loop(case, sample)
    per_design = (time.perf_counter() - start) / len(sample)
    best_cost = float(space.cost[scan_order[0]])
    assert not np.isfinite(loop_cost) or loop_cost >= best_cost * (1 - RELATIVE), "the loop beat the space"
    return [
        (f"{key}: alternatives in the space", n, "designs"),
        (f"{key}: build_space (evaluate the space)", build, "s"),
        (f"{key}: build_space throughput", n / build, "designs/s"),
        (f"{key}: model top 10 + per candidate, reduction + build + solve", model_seconds, "s"),
        (f"{key}:   of which build (Pyomo model and its matrix to HiGHS)", figures["build_seconds"], "s"),
        (f"{key}:   of which solve ({figures['solves']} solves)", figures["solve_seconds"], "s"),
        (f"{key}:   binaries after reduction", figures["binaries"], "binaries"),
        (f"{key}: scan top 10 + per candidate", scan_seconds, "s"),
        (f"{key}: optimize in-process, model (median)", model_call, "s"),
        (f"{key}: optimize in-process, scan (median)", scan_call, "s"),
        (f"{key}: optimize in-process, model / scan (median of pairs)", in_process, "x"),
        (f"{key}: towercost optimize, wall (median)", cli_model, "s"),
        (f"{key}: towercost optimize --method scan, wall (median)", cli_scan, "s"),
        (f"{key}: towercost optimize model / scan, wall (median of pairs)", cli_ratio, "x"),
        (f"{key}: plain loop, per design (timed on {len(sample)})", per_design, "s"),
        (f"{key}: plain loop extrapolated / (build_space + model)", per_design * n / (build + model_seconds), "x"),
    ]


def main() -> list[tuple[str, float, str]]:
    rng = np.random.default_rng(20240603)
    rows = []
    for key, path in SCENARIOS.items():
        rows += bench_scenario(key, path, rng)
    for name, value, unit in rows:
        text = f"{value:,}" if isinstance(value, int) else f"{value:.4g}"
        print(f"{name:66s} {text:>12s} {unit}")
    return rows


if __name__ == "__main__":
    main()
