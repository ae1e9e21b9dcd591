"""The Monte Carlo study of a scenario: a fixed design, its margin designs, and re-optimization per sample.

``monte_carlo`` draws the factors once (``sampling.draw``, seeded), ranks
the nominal designs (the exhaustive scan), and runs on the same draws:

1. the fixed design (a rank of the nominal ranking, or decisions given):
   probability of meeting every spec with its standard error and closed
   form, outlets and annualized cost at the 5th, 50th and 95th percentiles;
2. its margin designs for the scenario's confidence (``margin``): more
   trays, more agent, and the cheapest design of the space at that
   confidence;
3. the first ``reoptimize`` samples re-optimized (``reoptimize``): how often
   each design family is best, and the regret of the top nominal designs.
"""

from __future__ import annotations

import time
from collections.abc import Callable
from dataclasses import dataclass, field

import numpy as np

from towercost.design.case import Case, agent_index, prepare
from towercost.design.column import SingleColumn
from towercost.design.designs import Designs
from towercost.errors import ScenarioError
from towercost.scenario.schema import Scenario
from towercost.select.ranking import optimize
from towercost.study.fixed import Decisions
from towercost.study.margin import Margin, cheapest_margin, rate_margin, trays_margin
from towercost.study.reoptimize import Reoptimized, reoptimize
from towercost.study.sampling import Draws, draw
from towercost.study.uncertainty import FixedStudy, study_design

#: Nominal designs whose regret is tabulated (with the studied design, if it is not among them).
REGRET_DESIGNS = 5

#: The deepest rank of the nominal ranking a study may pick (as ``optimize --top``).
MAX_RANK = 200


@dataclass
class Chosen:
    """Which design to study: a rank of the nominal ranking, or decisions of one's own."""

    rank: int | None = 1
    agent: str | None = None
    trays: int | None = None
    ratio: float | None = None      # to the nominal minimum rate
    rate: float | None = None       # [mol/s]
    diameter: float | None = None   # [m]; None: the least standard size


@dataclass
class MonteCarlo:
    """Everything the ``uncertainty`` command reports."""

    case: Case
    draws: Draws
    label: str                       # how the studied design was chosen
    nominal: Designs                 # the studied design at the nominal inputs, one row
    ranked: Designs                  # the nominal ranking (best first)
    fixed: FixedStudy
    margins: list[Margin]
    confidence: float
    reoptimized: Reoptimized | None
    follows_k: bool                  # O'Connell efficiencies re-evaluated at each sampled K
    seconds: dict[str, float] = field(default_factory=dict)
    warnings: list[str] = field(default_factory=list)


def _label(case: Case, designs: Designs, i: int = 0) -> str:
    return (f"{case.agents[int(designs.agent[i])]}, {int(designs.trays[i])} trays, {case.service.ratio_word} "
            f"{float(designs.ratio[i]):.3f}, D {float(designs.diameter[i]):.3f} m")


def _chosen(case: Case, ranked: Designs, chosen: Chosen) -> tuple[Designs, str]:
    if chosen.agent is None:
        rank = 1 if chosen.rank is None else int(chosen.rank)
        if not 1 <= rank <= len(ranked):
            raise ScenarioError(f"--design {rank}: the ranking has designs 1 to {len(ranked)}")
        return ranked.take(np.array([rank - 1])), f"rank {rank} of the nominal ranking"
    a = agent_index(case, chosen.agent)
    if chosen.trays is None or (chosen.ratio is None) == (chosen.rate is None):
        raise ScenarioError("a design of one's own needs the candidate, the trays and one of ratio and rate")
    flowsheet = SingleColumn(case)
    rate = chosen.rate if chosen.rate is not None else chosen.ratio * float(flowsheet.rate_min[a])
    if not np.isfinite(rate):
        raise ScenarioError(f"{chosen.agent!r} has no finite minimum rate: give the design's rate, not a ratio")
    shell = np.nan if chosen.diameter is None else chosen.diameter
    d = flowsheet.evaluate(np.array([a]), np.array([chosen.trays]), np.array([rate]), np.array([shell]))
    return d, "the design given"


def monte_carlo(scenario: Scenario, chosen: Chosen | None = None, *, samples: int | None = None,
                seed: int | None = None, confidence: float | None = None, reoptimize_samples: int | None = None,
                progress: Callable[[str, int, int], None] | None = None) -> MonteCarlo:
    """The whole study (see the module notes); ``progress(phase, done, total)`` is called as it goes."""
    from towercost.study.variation import trays_only

    scenario = trays_only(scenario)      # tray columns only: a packed bed's spreads are not modelled yet
    chosen = Chosen() if chosen is None else chosen
    if chosen.agent is None and not 1 <= (chosen.rank or 1) <= MAX_RANK:
        raise ScenarioError(f"--design must be a rank from 1 to {MAX_RANK}, got {chosen.rank}")
    u = scenario.uncertainty
    confidence = u.confidence if confidence is None else float(confidence)
    if not 0.0 < confidence < 1.0:
        raise ScenarioError(f"--confidence must lie strictly between 0 and 1, got {confidence:g}")
    reopt = u.reoptimize if reoptimize_samples is None else int(reoptimize_samples)
    clock = {}
    t0 = time.perf_counter()
    case = prepare(scenario)
    from towercost.study.sensitivity import refuse_loops

    refuse_loops(case, "uncertainty")
    top = max(REGRET_DESIGNS, chosen.rank or 1) if chosen.agent is None else REGRET_DESIGNS
    result = optimize(scenario, top=top, method="scan")
    ranked = result.designs
    nominal, label = _chosen(case, ranked, chosen)
    design = Decisions.of(nominal)
    draws = draw(u, len(case.agents), case.solutes, samples, seed)
    clock["nominal"] = time.perf_counter() - t0

    def phase(name):
        return None if progress is None else (lambda done, total: progress(name, done, total))

    t = time.perf_counter()
    fixed = study_design(scenario, case, design, draws, nominal_meets=bool(nominal.meets_spec[0]),
                         progress=phase("sampling the design"))
    clock["fixed"] = time.perf_counter() - t
    t = time.perf_counter()
    base = float(nominal.annualized[0])
    margins = [trays_margin(scenario, case, design, draws, confidence, base, progress=phase("margin in trays")),
               rate_margin(scenario, case, design, draws, confidence, base, progress=phase("margin in rate")),
               cheapest_margin(scenario, case, draws, confidence, base, progress=phase("cheapest margin design"))]
    clock["margin"] = time.perf_counter() - t
    reoptimized = None
    if reopt > 0:
        t = time.perf_counter()
        count = min(reopt, draws.samples)
        designs = [Decisions.of(ranked, i) for i in range(min(REGRET_DESIGNS, len(ranked)))]
        labels = [f"rank {i + 1}: {_label(case, ranked, i)}" for i in range(len(designs))]
        if design not in designs:
            designs.append(design)
            labels.append(f"studied: {_label(case, nominal)}")
        reoptimized = reoptimize(scenario, case, draws.take(np.arange(count)), designs, labels,
                                 progress=phase("re-optimizing samples"))
        clock["reoptimize"] = time.perf_counter() - t
    clock["total"] = time.perf_counter() - t0
    warnings = list(dict.fromkeys(list(result.warnings) + fixed.notes))
    return MonteCarlo(case=case, draws=draws, label=f"{label}: {_label(case, nominal)}", nominal=nominal,
                      ranked=ranked, fixed=fixed, margins=margins, confidence=confidence, reoptimized=reoptimized,
                      follows_k=u.efficiency_follows_k, seconds=clock, warnings=warnings)
