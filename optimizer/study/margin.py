"""Design margin: the fewest trays, or the least agent rate, that meet every spec with a chosen probability.

Both use the samples of the fixed-design study (the same draws):

* Trays: with the design's candidate, rate and shell, the fraction of
  samples meeting every spec at each tray count of the scenario's range
  (the forward cascade over samples x tray counts in one call); the margin
  design is the fewest trays whose fraction reaches the confidence and whose
  nominal design meets every limit (height, ...).
* Rate: with the design's trays, each sample's least rate meeting every
  spec (the exact inverse, ``towercost.design.cascade.least_rate``, over the
  samples in one call); a rate meets the spec in exactly the samples whose
  least rate lies at or below it, so the least rate reaching the confidence
  is the order statistic ceil(confidence x S) of those least rates. Its
  shell is the least standard size at that rate, never below the design's.

* Cheapest: both free. For every candidate and tray count of the space,
  the least rate meeting every spec in at least the confidence (the same
  order statistic, over all groups at once), at the least standard shell
  and the scenario's larger ones; the margin design is the cheapest of
  these at the nominal inputs that meets every limit of the plant and the
  searched ratio range.

Each margin design is then evaluated exactly at the nominal inputs (its
extra cost over the design studied) and under the samples (its fraction
meeting every spec, which must reach the confidence).
"""

from __future__ import annotations

import dataclasses
import math
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from towercost.design import cascade
from towercost.design.case import Case
from towercost.design.column import SingleColumn
from towercost.design.designs import Designs
from towercost.design.limits import RATIO_TOLERANCE
from towercost.scenario.schema import Scenario
from towercost.study.fixed import (SAMPLE_CHUNK, Decisions, meets_each_spec, plant_limits_met, sample_chunks,
                                   sample_design, sampled_case)
from towercost.study.sampling import Draws
from towercost.study.uncertainty import Estimate


@dataclass
class Margin:
    """A design that meets every spec with at least the chosen probability, or why none does."""

    kind: str                      # "trays" or "rate"
    confidence: float
    design: Decisions | None       # None: not reachable
    nominal: Designs | None        # the margin design evaluated at the nominal inputs
    meets: Estimate | None         # its fraction of samples meeting every spec
    extra_cost: float | None       # [USD/yr] nominal annualized cost above the design studied
    reason: str = ""               # why no margin design, or what bounded it
    curve: tuple[np.ndarray, np.ndarray] | None = None   # trays and the fraction meeting every spec (trays margin)


def _nominal(case: Case, design: Decisions) -> Designs:
    return SingleColumn(case).evaluate(np.array([design.agent]), np.array([design.trays]),
                                       np.array([design.rate]), np.array([design.diameter]))


def _finish(kind, scenario, case, design, base_cost, draws, confidence, reason="") -> Margin:
    nominal = _nominal(case, design)
    meets = Estimate.of(sample_design(scenario, case, design, draws).meets_spec)
    return Margin(kind, confidence, design, nominal, meets, float(nominal.annualized[0]) - base_cost, reason)


def trays_margin(scenario: Scenario, case: Case, design: Decisions, draws: Draws, confidence: float,
                 base_cost: float, progress: Callable[[int, int], None] | None = None) -> Margin:
    """The fewest trays, at the design's candidate, rate and shell, meeting every spec with ``confidence``."""
    lo, hi = case.trays_range
    trays = np.arange(lo, hi + 1)
    hits = np.zeros(trays.size)
    for rows in sample_chunks(draws.samples, max(1, SAMPLE_CHUNK // trays.size)):
        part = draws.take(rows)
        replica = sampled_case(scenario, case, np.full(rows.size, design.agent), part)
        if isinstance(replica.murphree, np.ndarray):   # (S, 1): one more axis for the tray counts
            replica = dataclasses.replace(replica, murphree=replica.murphree[:, None, :])
        outlet = cascade.outlet(replica, np.arange(rows.size)[:, None], trays[None, :], design.rate)[0]
        hits += np.count_nonzero(np.all(meets_each_spec(case, outlet), axis=-1), axis=0)
        if progress is not None:
            progress(int(rows[-1]) + 1, draws.samples)
    fraction = hits / draws.samples   # (trays,)
    shells = SingleColumn(case).evaluate(np.full(trays.size, design.agent), trays, design.rate, design.diameter)
    allowed = plant_limits_met(case, shells)
    good = np.flatnonzero((fraction >= confidence) & allowed)
    if good.size == 0:
        best = int(np.argmax(np.where(allowed, fraction, -1.0)))
        why = (f"no tray count from {lo} to {hi} within the limits reaches {confidence:.0%}: the most is "
               f"{fraction[best]:.1%} at {trays[best]} trays")
        return Margin("trays", confidence, None, None, None, None, why, curve=(trays, fraction))
    chosen = dataclasses.replace(design, trays=int(trays[good[0]]))
    margin = _finish("trays", scenario, case, chosen, base_cost, draws, confidence)
    margin.curve = (trays, fraction)
    return margin


def rate_margin(scenario: Scenario, case: Case, design: Decisions, draws: Draws, confidence: float,
                base_cost: float, progress: Callable[[int, int], None] | None = None) -> Margin:
    """The least agent rate, at the design's candidate and trays, meeting every spec with ``confidence``."""
    count = draws.samples
    least = []
    for rows in sample_chunks(count):
        replica = sampled_case(scenario, case, np.full(rows.size, design.agent), draws.take(rows))
        least.append(cascade.least_rate(replica, np.arange(rows.size), np.full(rows.size, design.trays)))
        if progress is not None:
            progress(int(rows[-1]) + 1, count)
    least = np.sort(np.concatenate(least))
    rank = min(count, max(1, math.ceil(confidence * count - 1e-9)))
    rate = float(least[rank - 1])
    if not np.isfinite(rate):
        reached = float(np.mean(np.isfinite(least)))
        why = (f"with {design.trays} trays no rate meets every spec in more than {reached:.1%} of the samples "
               "(the entering agent alone holds the outlet above the spec in the others)")
        return Margin("rate", confidence, None, None, None, None, why)
    flowsheet = SingleColumn(case)
    least_shell = float(flowsheet.evaluate(np.array([design.agent]), np.array([design.trays]),
                                           np.array([rate]))
                        .diameter[0])
    chosen = dataclasses.replace(design, rate=rate, diameter=max(least_shell, design.diameter))
    lo, hi = case.ratio_range
    ratio = rate / float(flowsheet.rate_min[design.agent])
    note = "" if ratio <= hi else f"{case.service.ratio_word} {ratio:.3f} lies above the searched range ({hi:g})"
    return _finish("rate", scenario, case, chosen, base_cost, draws, confidence, note)


def _quantile_least_rates(scenario, case, draws, confidence, groups, progress) -> np.ndarray:
    """For each (candidate, trays) group, the least rate meeting every spec in ``confidence`` of the samples."""
    grid_agent, grid_trays = groups
    count = draws.samples
    rank = min(count, max(1, math.ceil(confidence * count - 1e-9)))
    keep = count - rank + 1                 # the largest ``keep`` least rates hold the rank-th smallest
    top = np.empty((0, grid_agent.size))
    per_chunk = max(1, SAMPLE_CHUNK // grid_agent.size)
    for rows in sample_chunks(count, per_chunk):
        part = draws.take(rows)
        agents = np.tile(grid_agent, rows.size)
        replica = sampled_case(scenario, case, agents, part, np.repeat(np.arange(rows.size), grid_agent.size))
        least = cascade.least_rate(replica, np.arange(agents.size), np.tile(grid_trays, rows.size))
        joined = np.concatenate([top, least.reshape(rows.size, grid_agent.size)])
        top = -np.partition(-joined, keep - 1, axis=0)[:keep] if joined.shape[0] > keep else joined
        if progress is not None:
            progress(int(rows[-1]) + 1, count)
    return np.min(top, axis=0)


def cheapest_margin(scenario: Scenario, case: Case, draws: Draws, confidence: float, base_cost: float,
                    progress: Callable[[int, int], None] | None = None) -> Margin:
    """The cheapest design of the space whose rate meets every spec with ``confidence`` (see the module notes)."""
    flowsheet = SingleColumn(case)
    groups = flowsheet.groups()
    rate = _quantile_least_rates(scenario, case, draws, confidence, groups, progress)
    lo, hi = case.ratio_range
    rate_min = flowsheet.rate_min[groups[0]]
    rate = np.maximum(rate, lo * rate_min)
    inside = np.isfinite(rate) & (rate <= hi * rate_min * (1 + RATIO_TOLERANCE))
    if not inside.any():
        return Margin("cheapest", confidence, None, None, None, None,
                      f"no candidate and tray count meets every spec in {confidence:.0%} of the samples within "
                      f"{case.service.ratio_word} {hi:g}")
    agent, trays, rate = groups[0][inside], groups[1][inside], rate[inside]
    separated = flowsheet.separate(agent, trays.astype(float), rate)
    options = Designs.concatenate([designs for _, designs in flowsheet.shells(separated)])
    allowed = np.flatnonzero(plant_limits_met(case, options))
    if allowed.size == 0:
        return Margin("cheapest", confidence, None, None, None, None,
                      "every design meeting the confidence exceeds a limit of the plant")
    order = np.lexsort((options.agent[allowed], options.diameter[allowed], options.rate[allowed],
                        options.trays[allowed], options.annualized[allowed]))
    chosen = Decisions.of(options, int(allowed[order[0]]))
    return _finish("cheapest", scenario, case, chosen, base_cost, draws, confidence)
