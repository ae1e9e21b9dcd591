"""Speed of the uncertainty and sensitivity studies on the demo absorber.

* a fixed design (the demo's best) over 10**4, 10**5 and 10**6 samples of
  the scenario's default spreads: drawing, sampled evaluation, probability,
  percentiles (best of REPEATS calls; the aim is under 1 s at 10**4);
* its three margin designs at 10**4 samples;
* re-optimization per sample: every sample's whole design space (about
  20,000 alternatives) evaluated exactly, R samples together (the aim is
  under 10 s); and, paired, 50 samples together against the same samples one
  case at a time through ``build_space`` and the scan;
* the one-at-a-time sensitivity study (24 spaces re-optimized);
* ``towercost uncertainty`` and ``towercost sensitivity`` as a user runs
  them (a fresh process, median of CLI_REPEATS after a warm-up).

Before reporting, the sampled probability of a one-solute design is held to
its closed form (three standard errors) and two re-optimized samples to the
exhaustive scan of their own cases.

Run: .venv/bin/python benchmarks/bench_uncertainty.py
"""

from __future__ import annotations

import sys
import time
import tomllib
from pathlib import Path

import numpy as np

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))

from common import ROOT, best_seconds, cli_seconds, paired, timed  # noqa: E402

import towercost  # noqa: E402
from towercost.design.case import prepare  # noqa: E402
from towercost.design.column import SingleColumn  # noqa: E402
from towercost.design.space import build_space  # noqa: E402
from towercost.select.scan import scan  # noqa: E402
from towercost.study.fixed import Decisions, sampled_case  # noqa: E402
from towercost.study.margin import cheapest_margin, rate_margin, trays_margin  # noqa: E402
from towercost.study.reoptimize import reoptimize  # noqa: E402
from towercost.study.sampling import draw  # noqa: E402
from towercost.study.sensitivity import sensitivity  # noqa: E402
from towercost.study.uncertainty import study_design, three_standard_errors  # noqa: E402
from towercost.study.variation import with_economics  # noqa: E402

DEMO = ROOT / "scenarios" / "demo_absorber.toml"
REOPTIMIZED = (100, 500)
PAIRED = 50


def _fixed(scenario, case, design, samples):
    draws = draw(scenario.uncertainty, len(case.agents), case.solutes, samples, 1)
    return study_design(scenario, case, design, draws, nominal_meets=True)


def _check_closed_form() -> None:
    raw = tomllib.loads(DEMO.read_text(encoding="utf-8"))
    raw["feed"]["composition"] = {"toluene": "500 ppmv"}
    raw["feed"]["diffusivity"] = {"toluene": raw["feed"]["diffusivity"]["toluene"]}
    raw["solute"] = {"toluene": raw["solute"]["toluene"]}
    raw["spec"] = raw["spec"][:1]
    glycol = raw["solvent"][2]
    raw["solvent"] = [dict(glycol, k={"toluene": 0.12}, diffusivity={"toluene": glycol["diffusivity"]["toluene"]})]
    raw["column"]["efficiency"] = 0.5
    raw["uncertainty"] = {"efficiency": {"distribution": "fixed"}}
    scenario = towercost.from_dict(raw)
    case = prepare(scenario)
    flowsheet = SingleColumn(case)
    design = Decisions.of(flowsheet.evaluate(np.array([0]), np.array([12]), 1.6 * flowsheet.rate_min))
    study = _fixed(scenario, case, design, 10**4)
    assert study.closed_form.available and three_standard_errors(study.every_spec, study.closed_form.probability)


def _scan_of_own_case(scenario, case, draws, i) -> float:
    one = draws.take(np.array([i]))
    agents = np.arange(len(case.agents))
    own = sampled_case(scenario, case, agents, one, np.zeros(agents.size, int))
    factors = {name: float(v[0]) for name, v in one.sample.items()}
    factors.update({name: v[0] for name, v in one.agent.items()})
    space = build_space(with_economics(own, factors))
    order, _ = scan(space, 1)
    return float(space.cost[order[0]])


def main() -> list[tuple[str, float, str]]:
    _check_closed_form()
    scenario = towercost.load(DEMO)
    case = prepare(scenario)
    result = towercost.optimize(scenario, top=5, method="scan")
    design = Decisions.of(result.designs)
    rows = []
    for samples, repeats in ((10**4, 5), (10**5, 3), (10**6, 1)):
        seconds, study = best_seconds(_fixed, scenario, case, design, samples, repeats=repeats)
        assert 0.0 < study.every_spec.probability < 1.0
        rows.append((f"fixed design, {samples:,} samples", seconds, "s"))
        if samples == 10**4:
            probability, error = study.every_spec.probability, study.every_spec.standard_error
    rows.append(("  demo best meets every spec (10^4 samples, seed 1)", probability, "-"))
    rows.append(("  its standard error", error, "-"))
    draws = draw(scenario.uncertainty, len(case.agents), case.solutes, 10**4, 1)
    base = float(result.designs.annualized[0])
    seconds, _ = best_seconds(trays_margin, scenario, case, design, draws, 0.9, base, repeats=3)
    rows.append(("trays margin, 10^4 samples x the tray range", seconds, "s"))
    seconds, _ = best_seconds(rate_margin, scenario, case, design, draws, 0.9, base, repeats=3)
    rows.append(("rate margin, 10^4 samples", seconds, "s"))
    seconds, _ = best_seconds(cheapest_margin, scenario, case, draws, 0.9, base, repeats=3)
    rows.append(("cheapest margin design, 10^4 samples x every candidate and tray count", seconds, "s"))

    designs = [Decisions.of(result.designs, i) for i in range(5)]
    labels = [str(i + 1) for i in range(5)]
    for count in REOPTIMIZED:
        part = draws.take(np.arange(count))
        start = time.perf_counter()
        ro = reoptimize(scenario, case, part, designs, labels)
        seconds = time.perf_counter() - start
        for i in (0, count - 1):
            assert abs(ro.best["cost"][i] - _scan_of_own_case(scenario, case, part, i)) <= 1e-9 * ro.best["cost"][i]
        rows.append((f"re-optimized per sample, {count} samples", seconds, "s"))
        rows.append(("  alternatives evaluated", ro.alternatives, "designs"))
        rows.append(("  throughput", ro.alternatives / seconds, "designs/s"))
        rows.append(("  samples per second", count / seconds, "1/s"))
    part = draws.take(np.arange(PAIRED))

    def one_at_a_time():
        for i in range(PAIRED):
            _scan_of_own_case(scenario, case, part, i)

    together, alone, ratio = paired(timed(reoptimize, scenario, case, part, [], []), timed(one_at_a_time), pairs=3)
    rows.append((f"  {PAIRED} samples together / one case at a time (build_space + scan), paired", ratio, "x"))
    seconds, study = best_seconds(sensitivity, scenario, repeats=3)
    rows.append((f"sensitivity, {len(study.rows)} inputs x 2 changes, each re-optimized", seconds, "s"))
    demo = str(DEMO.relative_to(ROOT))
    rows.append(("CLI uncertainty (10^4 samples, 200 re-optimized), wall", cli_seconds(["uncertainty", demo],
                                                                                        repeats=3), "s"))
    rows.append(("CLI uncertainty --reoptimize 0, wall", cli_seconds(["uncertainty", demo, "--reoptimize", "0"],
                                                                     repeats=3), "s"))
    rows.append(("CLI sensitivity, wall", cli_seconds(["sensitivity", demo], repeats=3), "s"))
    for name, value, unit in rows:
        text = f"{value:,}" if isinstance(value, int) else f"{value:.4g}"
        print(f"{name:72s} {text:>12s} {unit}")
    return rows


if __name__ == "__main__":
    main()
