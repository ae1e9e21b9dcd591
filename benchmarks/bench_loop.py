"""Speed of the regenerated solvent loop at scale: six regenerated solvents, 40 lean levels, 40 regenerator counts.

The scenario is the bundled loop demo (scenarios/demo_solvent_loop.toml)
with its wash oil copied into SOLVENTS regenerated solvents, each its own
price and its K-values (absorber and regenerator alike) scaled by its own
factor; the once-through gas oil and the wash oil's once-through service are
left out, so every candidate is a lean level of a loop. Absorber trays
[1, 60] (60 counts), regenerator trays [1, 40] (40 counts), 40 lean levels,
RATIO_LEVELS ratio levels. Each solvent is expanded into one candidate per
lean level (6 x 40 = 240 candidates) and every (candidate, trays, rate) point
of the absorber carries the numpy minimum over the 40 regenerator counts
(``SolventLoop.separate``): the figures name how many absorber points that is
and how many regenerator evaluations they carry.

Measured (issue 10, "Benchmarks"):

* ``build_space``: exact evaluation of every alternative (best of REPEATS);
* the selection model for the ten best and each candidate's best: build and
  solve seconds as the model reports them, its binaries and solves;
* the ten best re-evaluated exactly (``Space.designs``), and the search-bound
  flags of the best and of each candidate's best (``bound_flags``);
* the exhaustive scan for the same (best of REPEATS);
* ``optimize(method="model")`` against ``optimize(method="scan")`` in one
  process, alternating, the median ratio of the pairs;
* ``towercost optimize FILE`` against ``towercost optimize FILE --method
  scan`` on the scenario written to a temporary file, whole processes,
  alternating, the median ratio of the pairs (targets: the model's wall under
  2 s, within 1.5 x of the scan).

Before any figure is reported the run is checked: the model's ten best and
each candidate's best are the scan's, index for index, and the in-process
and command-line rankings agree with them.

Run: .venv/bin/python benchmarks/bench_loop.py
"""

from __future__ import annotations

import re
import sys
import tempfile
from pathlib import Path

import numpy as np

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))

from common import ROOT, best_seconds, paired, run_once, timed  # noqa: E402

import towercost  # noqa: E402
from towercost.design.loop import flowsheet_for  # noqa: E402
from towercost.design.space import build_space  # noqa: E402
from towercost.select import ranking  # noqa: E402
from towercost.select.scan import scan  # noqa: E402

DEMO = ROOT / "scenarios" / "demo_solvent_loop.toml"

#: (price [USD/kg], factor on every activity coefficient) of each regenerated solvent: invented.
SOLVENTS = ((0.95, 1.00), (1.05, 0.92), (0.85, 1.08), (1.00, 0.96), (0.90, 1.04), (1.10, 0.88))
ABSORBER_TRAYS = (1, 60)
REGENERATOR_TRAYS = (1, 40)
LEAN_LEVELS = 40
RATIO_LEVELS = 2
REPEATS = 3
PAIRS = 3


def _replace(pattern: str, new, text: str, count: int = 1) -> str:
    """``text`` with exactly ``count`` matches of ``pattern`` replaced (an edit of the demo that no longer fits fails)."""
    out, made = re.subn(pattern, new, text, flags=re.MULTILINE)
    if made != count:
        raise RuntimeError(f"{DEMO.name}: expected {count} match(es) of {pattern!r}, found {made}")
    return out


def loop_text() -> str:
    """The benchmark scenario as TOML: the demo's text, its wash oil block copied once per entry of SOLVENTS."""
    text = DEMO.read_text(encoding="utf-8")
    head, wash_oil, gas_oil = text.split("[[solvent]]")
    gas_oil_rest = gas_oil[gas_oil.index("[column]"):]
    blocks = []
    for k, (price, factor) in enumerate(SOLVENTS):
        block = _replace(r'^name = "wash oil"', f'name = "wash oil {k + 1}"', wash_oil)
        block = _replace(r'^price = "[^"]*"', f'price = "{price:.2f} USD/kg"', block)
        block = _replace(r"^activity_coefficient = ([0-9.]+)",
                         lambda m: f"activity_coefficient = {float(m.group(1)) * factor:.4f}", block, count=6)
        block = _replace(r"^trays = \[\d+, \d+\]", f"trays = [{REGENERATOR_TRAYS[0]}, {REGENERATOR_TRAYS[1]}]", block)
        block = _replace(r"^lean_levels = \d+", f"lean_levels = {LEAN_LEVELS}", block)
        block = _replace(r"^once_through = true", "once_through = false", block)
        blocks.append(block)
    rest = _replace(r"^trays = \[\d+, \d+\]", f"trays = [{ABSORBER_TRAYS[0]}, {ABSORBER_TRAYS[1]}]", gas_oil_rest)
    rest = _replace(r"^ratio_levels = \d+", f"ratio_levels = {RATIO_LEVELS}", rest)
    head = _replace(r'^name = "[^"]*"', 'name = "Loop benchmark: six regenerated wash oils"', head)
    return head + "".join("[[solvent]]" + b for b in blocks) + rest


def absorber_points(case) -> tuple[int, int]:
    """(absorber design points separated, (candidate, trays) groups reached): what carries a regenerator minimum."""
    flowsheet = flowsheet_for(case)
    points, groups = 0, set()
    for batch in flowsheet.alternatives():
        points += batch.rate.size
        groups.update(zip(batch.agent.tolist(), batch.trays.tolist()))
    return points, len(groups)


def main() -> list[tuple[str, float, str]]:
    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / "loop_bench.toml"
        path.write_text(loop_text(), encoding="utf-8")
        rows = bench(path)
    for name, value, unit in rows:
        text = f"{value:,}" if isinstance(value, int) else f"{value:.4g}"
        print(f"{name:66s} {text:>12s} {unit}")
    return rows


def bench(path: Path) -> list[tuple[str, float, str]]:
    scenario = towercost.load(path)
    case = ranking.checked_case(scenario)
    looped = int(case.loop.looped.sum())
    assert looped == len(case.agents) == len(SOLVENTS) * LEAN_LEVELS, "every candidate should be a lean level"
    points, groups = absorber_points(case)
    counts = REGENERATOR_TRAYS[1] - REGENERATOR_TRAYS[0] + 1

    build, space = best_seconds(build_space, case, repeats=REPEATS)
    groups_listed = ranking.listing_groups(space, "trays")
    scan_seconds, (scan_order, scan_best_of) = best_seconds(scan, space, 10, groups_listed, repeats=REPEATS)
    model_seconds, (order, best_of, figures) = best_seconds(ranking.select_by_model, space, 10, groups_listed,
                                                            repeats=REPEATS)
    assert order == scan_order, "loop: the model's ten best differ from the scan's"
    assert best_of == scan_best_of, "loop: the model's per-candidate bests differ from the scan's"
    top_seconds, top = best_seconds(space.designs, order, repeats=REPEATS)
    assert np.allclose(top.annualized, space.cost[order], rtol=1e-12, atol=0.0), "the ten best re-evaluate differently"
    flags_seconds, _ = best_seconds(ranking.bound_flags, space, order, best_of, repeats=1)

    model_call, scan_call, in_process = paired(timed(ranking.optimize, scenario, method="model"),
                                               timed(ranking.optimize, scenario, method="scan"), pairs=PAIRS)
    result = ranking.optimize(scenario, method="model")
    assert np.array_equal(result.designs.annualized, top.annualized), "optimize ranks differently from the space"
    cli_model, cli_scan, cli_ratio = paired(lambda: run_once(["optimize", str(path)]),
                                            lambda: run_once(["optimize", str(path), "--method", "scan"]),
                                            pairs=PAIRS)
    return [
        ("loop: candidates (6 solvents x 40 lean levels)", len(case.agents), "candidates"),
        ("loop: absorber (candidate, trays) groups reached", groups, "groups"),
        ("loop: absorber design points, each with a regenerator minimum", points, "points"),
        (f"loop: regenerator evaluations ({counts} counts per point)", points * counts, "evaluations"),
        ("loop: alternatives in the space (with shell sizes)", len(space), "designs"),
        ("loop: build_space (evaluate the space)", build, "s"),
        ("loop: build_space throughput", len(space) / build, "designs/s"),
        ("loop: model top 10 + per candidate, reduction + build + solve", model_seconds, "s"),
        ("loop:   of which build (Pyomo model and its matrix to HiGHS)", figures["build_seconds"], "s"),
        (f"loop:   of which solve ({figures['solves']} solves)", figures["solve_seconds"], "s"),
        ("loop:   binaries after reduction", figures["binaries"], "binaries"),
        ("loop: the ten best re-evaluated exactly", top_seconds, "s"),
        ("loop: search-bound flags of the best and each candidate's best", flags_seconds, "s"),
        ("loop: scan top 10 + per candidate", scan_seconds, "s"),
        ("loop: optimize in-process, model (median)", model_call, "s"),
        ("loop: optimize in-process, scan (median)", scan_call, "s"),
        ("loop: optimize in-process, model / scan (median of pairs)", in_process, "x"),
        ("loop: towercost optimize, wall (median)", cli_model, "s"),
        ("loop: towercost optimize --method scan, wall (median)", cli_scan, "s"),
        ("loop: towercost optimize model / scan, wall (median of pairs)", cli_ratio, "x"),
    ]


if __name__ == "__main__":
    main()
