"""Re-optimization per sample: the best design if each sample were the truth, and the regret of the top designs.

For each sample the design space is the one ``towercost optimize`` searches
(every candidate, tray count, least rate meeting every spec and the rate
levels above it, least standard shell and the larger ones), evaluated
exactly under that sample's K-values, efficiencies, prices and index. The
samples are evaluated together: one case holds a replica of every candidate
for every sample (``fixed.sampled_case``), the flowsheet enumerates and
prices all of their alternatives in chunks, each point is re-priced under
its own sample's economics (``pricing.annualize_points``), the limits are
checked again (an installed-cost cap follows the sampled index), and each
sample keeps its best by the tie key of the optimizer (cost, fewer trays,
lower rate, smaller shell, candidate order). A Murphree column holds one
Murphree efficiency, so its samples are evaluated one at a time.

The regret of a top design in a sample is its annualized cost there minus
that sample's best. It is given twice: as designed (the rate fixed), over
the samples in which it meets every spec; and as operated (the tower built,
the rate re-set to the sample's least rate meeting every spec), over the
samples in which its tower can meet them within the plant's limits. A design
that misses the spec has no meaningful regret; how often each holds is
reported beside.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from towercost.design import cascade
from towercost.design.case import Case
from towercost.design.column import CHUNK, SingleColumn
from towercost.design.limits import limit_table, limits_met
from towercost.scenario.schema import Scenario
from towercost.study.fixed import Decisions, meets_each_spec, plant_limits_met, price_samples, sample_factors, \
    sampled_case
from towercost.study.sampling import Draws

#: Fields kept for each sample's best design, in the order of the tie key after the cost.
KEPT = ("cost", "trays", "rate", "diameter", "agent", "ratio")


@dataclass
class Winner:
    """A design family (candidate, trays, shell) and how often it is the best of a sample."""

    agent: int
    trays: int
    diameter: float
    count: int
    share: float
    ratio_median: float        # L/Lmin (G/Gmin) of the sample's own minimum, median over its wins
    cost_median: float         # [USD/yr]


@dataclass
class Regret:
    """A top design under the re-optimized samples: built as designed, then with its rate re-set."""

    design: Decisions
    label: str
    meets: float               # fraction of samples in which, as designed, it meets every spec and limit
    regret_when_met: float     # [USD/yr] mean of its cost minus the sample's best, over those samples
    operable: float            # fraction of samples in which its tower meets every spec and limit at some rate
    regret_operated: float     # [USD/yr] mean extra cost over the sample's best with the rate re-set to the
                               # sample's least rate meeting every spec, over the operable samples
    wins: float                # fraction of samples whose best is this design's family (candidate, trays, shell)


@dataclass
class Reoptimized:
    """Per-sample optima and the regret table."""

    samples: int
    best: dict[str, np.ndarray]     # KEPT -> (R,) the best of each sample (cost inf: no design qualifies)
    winners: list[Winner]           # most frequent first
    regrets: list[Regret]
    alternatives: int               # evaluated in all
    seconds: float

    def candidate_shares(self) -> dict[int, float]:
        """Fraction of the samples whose best design uses each candidate (by index), most frequent first."""
        shares: dict[int, float] = {}
        for w in self.winners:
            shares[w.agent] = shares.get(w.agent, 0.0) + w.share
        return dict(sorted(shares.items(), key=lambda item: -item[1]))


def _best_per_sample(sample, record: dict[str, np.ndarray], samples: int) -> dict[str, np.ndarray]:
    """For each sample, the entry of ``record`` first in tie order; cost inf where a sample has none."""
    out = {name: np.full(samples, np.inf if name == "cost" else np.nan) for name in KEPT}
    if sample.size == 0:
        return out
    order = np.lexsort((record["agent"], record["diameter"], record["rate"], record["trays"], record["cost"], sample))
    first = order[np.unique(sample[order], return_index=True)[1]]
    for name in KEPT:
        out[name][sample[first]] = record[name][first]
    return out


def _merge(a: dict[str, np.ndarray], b: dict[str, np.ndarray]) -> dict[str, np.ndarray]:
    samples = a["cost"].size
    index = np.concatenate([np.arange(samples), np.arange(samples)])
    joined = {name: np.concatenate([a[name], b[name]]) for name in KEPT}
    keep = np.isfinite(joined["cost"])
    return _best_per_sample(index[keep], {n: v[keep] for n, v in joined.items()}, samples)


def _block(scenario: Scenario, case: Case, draws: Draws, rows: np.ndarray, chunk: int,
           progress: Callable[[int], None] | None) -> tuple[dict[str, np.ndarray], int]:
    """The best design of each sample in ``rows`` (one block evaluated together), and the alternatives seen."""
    n_agents = len(case.agents)
    agents = np.tile(np.arange(n_agents), rows.size)
    sample_rows = np.repeat(rows, n_agents)
    replica = sampled_case(scenario, case, agents, draws, sample_rows)
    flowsheet = SingleColumn(replica)
    best = _best_per_sample(np.zeros(0, int), {}, rows.size)
    seen = 0
    for batch in flowsheet.alternatives(chunk=chunk):
        separated = flowsheet.separate(batch.agent, batch.trays.astype(float), batch.rate)
        # Each size's designs are re-priced in place under their own sample's economics before the
        # diameter search reads their cost, so every replica searches its shells as its sample's own case would.
        for _, designs in flowsheet.shells(separated):
            price_samples(designs, case, sample_factors(draws, agents[designs.agent], sample_rows[designs.agent]))
            ok = limits_met(limit_table(replica, designs), len(designs))
            ok &= designs.annualized <= best["cost"][designs.agent // n_agents]   # can rank first (ties kept)
            local = designs.agent[ok] // n_agents
            record = {"cost": designs.annualized[ok], "trays": designs.trays[ok].astype(float),
                      "rate": designs.rate[ok], "diameter": designs.diameter[ok],
                      "agent": (designs.agent[ok] % n_agents).astype(float), "ratio": designs.ratio[ok]}
            best = _merge(best, _best_per_sample(local, record, rows.size))
            seen += len(designs)
        if progress is not None:
            progress(len(batch.rate))
    return best, seen


def reoptimize(scenario: Scenario, case: Case, draws: Draws, designs: list[Decisions], labels: list[str], *,
               chunk: int = CHUNK, progress: Callable[[int, int], None] | None = None) -> Reoptimized:
    """Every sample of ``draws`` re-optimized; the regret of each of ``designs`` against the samples' best."""
    import time

    start = time.perf_counter()
    count = draws.samples
    blocks = [np.arange(count)] if case.murphree is None else [np.array([s]) for s in range(count)]
    flowsheet = SingleColumn(case)
    total = count * flowsheet.estimate() // flowsheet.diameters_per_rate()
    done = [0]

    def step(n):
        done[0] += n
        if progress is not None:
            progress(done[0], max(total, done[0]))

    best = None
    seen = 0
    for rows in blocks:
        part, n = _block(scenario, case, draws, rows, chunk, step)
        seen += n
        if best is None:
            best = {name: np.full(count, np.inf if name == "cost" else np.nan) for name in KEPT}
        for name in KEPT:
            best[name][rows] = part[name]
    if progress is not None:
        progress(max(total, done[0]), max(total, done[0]))
    return Reoptimized(samples=count, best=best, winners=_winners(best), regrets=_regrets(
        scenario, case, draws, designs, labels, best), alternatives=seen, seconds=time.perf_counter() - start)


def _winners(best: dict[str, np.ndarray]) -> list[Winner]:
    found = np.isfinite(best["cost"])
    keys = np.stack([best["agent"][found], best["trays"][found], best["diameter"][found]], axis=1)
    if keys.shape[0] == 0:
        return []
    unique, inverse, counts = np.unique(keys, axis=0, return_inverse=True, return_counts=True)
    inverse = inverse.ravel()
    ratio, cost = best["ratio"][found], best["cost"][found]
    out = [Winner(int(u[0]), int(u[1]), float(u[2]), int(c), c / best["cost"].size,
                  float(np.median(ratio[inverse == j])), float(np.median(cost[inverse == j])))
           for j, (u, c) in enumerate(zip(unique, counts))]
    return sorted(out, key=lambda w: (-w.count, w.agent, w.trays, w.diameter))


def _evaluate(scenario, case, draws, agents, rows, trays, rate, shell):
    """Points (candidate, trays, rate, shell) each under its sample: cost and every spec and plant limit met."""
    replica = sampled_case(scenario, case, agents, draws, rows)
    points = SingleColumn(replica).evaluate(np.arange(agents.size), trays, rate, shell)
    price_samples(points, case, sample_factors(draws, agents, rows))
    ok = np.all(meets_each_spec(case, points.outlet), axis=-1) & plant_limits_met(replica, points)
    return points.annualized, ok, replica


def _regrets(scenario, case, draws, designs, labels, best) -> list[Regret]:
    if not designs:
        return []
    count, k = draws.samples, len(designs)
    agents = np.repeat([d.agent for d in designs], count)
    rows = np.tile(np.arange(count), k)
    trays = np.repeat([d.trays for d in designs], count)
    shells = np.repeat([d.diameter for d in designs], count)
    cost, ok, replica = _evaluate(scenario, case, draws, agents, rows, trays,
                                  np.repeat([d.rate for d in designs], count), shells)
    # the same towers with the rate re-set to each sample's least rate meeting every spec
    least = cascade.least_rate(replica, np.arange(agents.size), trays)
    reachable = np.isfinite(least)
    operated, operated_ok, _ = _evaluate(scenario, case, draws, agents, rows, trays,
                                         np.where(reachable, least, 1.0), shells)
    operated_ok &= reachable
    found = np.isfinite(best["cost"])
    floor = np.tile(np.where(found, best["cost"], np.nan), k)
    out = []
    for j, (design, label) in enumerate(zip(designs, labels)):
        part = slice(j * count, (j + 1) * count)
        met = ok[part] & found
        run = operated_ok[part] & found
        same = found & (best["agent"] == design.agent) & (best["trays"] == design.trays) & \
            np.isclose(best["diameter"], design.diameter)
        out.append(Regret(design, label, float(np.mean(ok[part])),
                          float(np.mean((cost[part] - floor[part])[met])) if met.any() else np.nan,
                          float(np.mean(operated_ok[part])),
                          float(np.mean((operated[part] - floor[part])[run])) if run.any() else np.nan,
                          float(np.mean(same))))
    return out
