"""Speed of the whole selection: space, model, scan and the optimize command, on two scenarios.

For the demo absorber (scenarios/demo_absorber.toml) and the invented
six-solvent benchmark (benchmarks/scenarios/six_solvents.toml):

* build_space: exact evaluation of every alternative (best of REPEATS), and
  the number of alternatives;
* the selection model (optimizer/model.py) for the best design (top=1, no
  per-agent solves) and for the ten best with the best of each agent
  (top=10, per_agent=True), build and solve seconds as ModelRun reports
  them, best of MODEL_REPEATS; binaries left after the dominance reduction;
* the exhaustive scan (optimizer/ranking.scan, top 10), best of REPEATS;
* wall time of ``towercost optimize <scenario>``, a fresh process, output to
  a pipe, best of CLI_REPEATS;
* a plain Python loop written as one would without this tool: for each
  candidate, tray count and ratio level, evaluate ONE design and keep the
  cheapest feasible. It is timed on LOOP_SAMPLE designs drawn at random from
  that loop and extrapolated to the size of the space build_space evaluates.

Before any figure is reported the run is checked: the model's best, its top
ten and each agent's best have the scan's costs (exact ties may swap
indices), and the loop's best is no cheaper than the space's best (its
designs are a subset of the space's).

Also: the import of pyomo.environ in a fresh interpreter (best of
CLI_REPEATS), which every ``towercost optimize`` pays.

Run: .venv/bin/python benchmarks/bench_optimizer.py
"""

from __future__ import annotations

import subprocess
import sys
import time
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))  # run from a checkout without installing
sys.path.insert(0, str(Path(__file__).resolve().parent))

from bench_evaluate import CLI_REPEATS, best_seconds, cli_seconds  # noqa: E402
from towercost import model, ranking  # noqa: E402
from towercost import space as sp  # noqa: E402
from towercost.scenario import load_scenario  # noqa: E402

SCENARIOS = {
    "demo": ROOT / "scenarios" / "demo_absorber.toml",
    "six": ROOT / "benchmarks" / "scenarios" / "six_solvents.toml",
}
REPEATS = 5
MODEL_REPEATS = 3
LOOP_SAMPLE = 2000
RELATIVE = 1e-12  # costs compared to this relative tolerance (the same numbers, re-ordered sums at most)


def pyomo_import_seconds() -> float:
    """Seconds to import pyomo.environ in a fresh interpreter, best of CLI_REPEATS (clock inside the child)."""
    code = "import time; t = time.perf_counter(); import pyomo.environ; print(time.perf_counter() - t)"
    times = []
    for _ in range(CLI_REPEATS):
        done = subprocess.run([sys.executable, "-c", code], cwd=ROOT, capture_output=True, text=True, check=True)
        times.append(float(done.stdout.strip()))
    return min(times)


def plain_loop(case: sp.Case, triples) -> tuple[float, tuple | None]:
    """The cheapest feasible design over (agent, trays, ratio level) triples, one evaluate call per design.

    Written as a user would without the vectorized space: the least rate of
    each agent from a one-agent call, then one design at a time.
    """
    rate_min = {}
    best_cost, best = np.inf, None
    for agent, trays, level in triples:
        if agent not in rate_min:
            rate_min[agent] = float(sp.minimum_rate(case, np.array([agent]))[0])
        rate = level * rate_min[agent]
        d = sp.evaluate(case, np.array([agent]), np.array([trays]), np.array([rate]))
        if d.within_limits[0] and d.annualized[0] < best_cost:
            best_cost, best = float(d.annualized[0]), (agent, trays, level)
    return best_cost, best


def loop_triples(case: sp.Case) -> list[tuple[int, int, float]]:
    """Every (candidate, tray count, ratio level) of the scenario, in loop order."""
    levels = sp.rate_grid(case)
    trays = range(case.trays_range[0], case.trays_range[1] + 1)
    return [(a, n, float(r)) for a in range(len(case.agents)) for n in trays for r in levels]


def _same_cost(a: float, b: float) -> bool:
    return abs(a - b) <= RELATIVE * max(abs(a), abs(b))


def _best_run(space: sp.Space, **options) -> tuple[model.ModelRun, float, float]:
    """The last of MODEL_REPEATS model runs, with the least build and the least solve seconds among them."""
    runs = [model.solve(space, **options) for _ in range(MODEL_REPEATS)]
    return runs[-1], min(r.build_seconds for r in runs), min(r.solve_seconds for r in runs)


def _check(space: sp.Space, top1: model.ModelRun, top10: model.ModelRun, scan_order, scan_best_of) -> None:
    """The model agrees with the exhaustive scan; raises AssertionError otherwise."""
    cost = space.designs.annualized
    assert _same_cost(cost[top1.order[0]], cost[scan_order[0]]), (
        f"model best {cost[top1.order[0]]:.6f} != scan best {cost[scan_order[0]]:.6f} USD/yr")
    assert _same_cost(top1.objective[0], cost[scan_order[0]]), "model objective differs from the exact cost"
    assert len(top10.order) == len(scan_order), "model and scan rank different numbers of designs"
    for i, j in zip(top10.order, scan_order):
        assert _same_cost(cost[i], cost[j]), f"top-10 differ: model {cost[i]:.6f}, scan {cost[j]:.6f} USD/yr"
    assert sorted(top10.per_agent) == sorted(scan_best_of), "model and scan find best designs for different agents"
    for a, i in top10.per_agent.items():
        assert _same_cost(cost[i], cost[scan_best_of[a]]), f"agent {a}: model and scan bests differ"


def bench_scenario(key: str, path: Path, rng: np.random.Generator) -> list[tuple[str, float, str]]:
    start = time.perf_counter()
    case = sp.prepare(load_scenario(path))
    prepare_seconds = time.perf_counter() - start
    build, space = best_seconds(sp.build_space, case)
    n = len(space.designs)
    scan_seconds, (scan_order, scan_best_of) = best_seconds(ranking.scan, space, 10)
    top1, build1, solve1 = _best_run(space, top=1, per_agent=False)
    top10, build10, solve10 = _best_run(space, top=10, per_agent=True)
    _check(space, top1, top10, scan_order, scan_best_of)

    triples = loop_triples(case)
    sample = [triples[i] for i in np.sort(rng.choice(len(triples), size=min(LOOP_SAMPLE, len(triples)),
                                                     replace=False))]
    loop_start = time.perf_counter()
    loop_cost, _ = plain_loop(case, sample)
    loop_seconds = time.perf_counter() - loop_start
    best_cost = float(space.designs.annualized[scan_order[0]])
    assert not np.isfinite(loop_cost) or loop_cost >= best_cost * (1 - RELATIVE), (
        f"the plain loop found {loop_cost:.6f} USD/yr, cheaper than the space's best {best_cost:.6f}")
    per_design = loop_seconds / len(sample)
    loop_whole = per_design * n

    cli = cli_seconds(["optimize", str(path.relative_to(ROOT))])
    rows = [
        (f"{key}: load + prepare scenario (first call)", prepare_seconds, "s"),
        (f"{key}: build_space (evaluate the space)", build, "s"),
        (f"{key}: alternatives in the space", n, "designs"),
        (f"{key}: alternatives meeting spec and limits", int(space.feasible.sum()), "designs"),
        (f"{key}: build_space throughput", n / build, "designs/s"),
        (f"{key}: model top=1 build", build1, "s"),
        (f"{key}: model top=1 solve ({top1.solves} solve)", solve1, "s"),
        (f"{key}: model top=1 binaries after reduction", top1.alternatives, "binaries"),
        (f"{key}: model top=10+per-agent build", build10, "s"),
        (f"{key}: model top=10+per-agent solve ({top10.solves} solves)", solve10, "s"),
        (f"{key}: model top=10 binaries after reduction", top10.alternatives, "binaries"),
        (f"{key}: scan top 10", scan_seconds, "s"),
        (f"{key}: CLI optimize, wall", cli, "s"),
        (f"{key}: plain loop, per design (timed on {len(sample)})", per_design, "s"),
        (f"{key}: plain loop extrapolated to {n} designs", loop_whole, "s"),
        (f"{key}: plain loop (extrapolated) / build_space", loop_whole / build, "x"),
        (f"{key}: plain loop (extrapolated) / (build_space + scan)", loop_whole / (build + scan_seconds), "x"),
        (f"{key}: plain loop (extrapolated) / (build_space + model top=1)",
         loop_whole / (build + build1 + solve1), "x"),
    ]
    return rows


def main() -> list[tuple[str, float, str]]:
    rng = np.random.default_rng(20240603)
    rows = [("pyomo.environ import, fresh process", pyomo_import_seconds(), "s")]
    for key, path in SCENARIOS.items():
        rows += bench_scenario(key, path, rng)
    for name, value, unit in rows:
        text = f"{value:,}" if isinstance(value, int) else f"{value:.4g}"
        print(f"{name:62s} {text:>12s} {unit}")
    return rows


if __name__ == "__main__":
    main()
