"""A fixed design over the samples: its outlets, whether it meets each spec and limit, and its cost.

A design is its decisions: candidate, real trays, agent rate [mol/s] and
shell diameter [m]; under a sample the tower and the rate stay, and the
sampled K-values, efficiencies, prices and index act on them. The samples
are evaluated as design points of one case whose candidates are replicas of
the design's candidate, each with its sampled K and efficiency
(``variation.replicate``): ``SingleColumn.evaluate`` separates, sizes and
prices all of them in one call, and ``pricing.annualize_points`` gives each
its sampled economics.
"""

from __future__ import annotations

import dataclasses
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from towercost.design.case import Case
from towercost.design.column import SingleColumn
from towercost.design.designs import Designs
from towercost.design.limits import SPEC_TOLERANCE, limit_table
from towercost.scenario.schema import Scenario
from towercost.study.pricing import annualize_points, price_factors
from towercost.study.sampling import Draws
from towercost.study.variation import oconnell_agents, replicate, with_separation


@dataclass(frozen=True)
class Decisions:
    """The decisions of one design."""

    agent: int
    trays: int
    rate: float        # [mol/s]
    diameter: float    # [m]

    @classmethod
    def of(cls, designs: Designs, i: int = 0) -> "Decisions":
        return cls(int(designs.agent[i]), int(designs.trays[i]), float(designs.rate[i]), float(designs.diameter[i]))


#: Samples evaluated per call: bounds memory to that of about this many design points.
SAMPLE_CHUNK = 1 << 15


def sample_chunks(count: int, size: int = SAMPLE_CHUNK):
    """Consecutive index ranges of at most ``size`` samples covering ``count``."""
    for start in range(0, count, size):
        yield np.arange(start, min(count, start + size))


@dataclass
class Sampled:
    """One design under S samples: every array has S entries first."""

    outlet: np.ndarray          # (S, solutes) treated-stream outlet mole fraction
    meets_each: np.ndarray      # (S, solutes) the solute's outlet meets its spec (True where it has none)
    meets_spec: np.ndarray      # (S,) every spec met
    within_limits: np.ndarray   # (S,) every limit of the plant met (the searched ratio range is not one)
    annualized: np.ndarray      # (S,) [USD/yr] under each sample's prices and index
    installed: np.ndarray       # (S,) [USD]

    @classmethod
    def concatenate(cls, parts: list["Sampled"]) -> "Sampled":
        return cls(*(np.concatenate([getattr(p, f.name) for p in parts]) for f in dataclasses.fields(cls)))


def sampled_case(scenario: Scenario, case: Case, agents, draws: Draws, rows=None, *,
                 notes: list[str] | None = None) -> Case:
    """A case of replicas: candidate i is ``case``'s candidate ``agents[i]`` with the K and efficiency of sample ``rows[i]``.

    ``rows`` defaults to ``arange(len(agents)) % samples`` (one replica per
    sample). A Murphree efficiency belongs to the column, not to a candidate:
    each sample's factor on it is that of its first candidate and solute.
    """
    agents = np.asarray(agents, dtype=int)
    rows = np.arange(agents.size) % draws.samples if rows is None else np.asarray(rows, dtype=int)
    replica = replicate(case, agents)
    efficiency = draws.efficiency[rows, agents]
    if case.murphree is not None:
        efficiency = np.broadcast_to(draws.efficiency[rows, 0, :1], efficiency.shape)
    return with_separation(replica, oconnell_agents(scenario)[agents], k=draws.k[rows, agents],
                           efficiency=efficiency, follows_k=scenario.uncertainty.efficiency_follows_k, notes=notes)


def sample_factors(draws: Draws, agents, rows=None) -> dict[str, np.ndarray]:
    """The price factors of each point (sample ``rows[i]``, candidate ``agents[i]``), by study input name."""
    agents = np.asarray(agents, dtype=int)
    rows = np.arange(agents.size) % draws.samples if rows is None else np.asarray(rows, dtype=int)
    out = {name: values[rows, agents] for name, values in draws.agent.items()}
    out.update({name: values[rows] for name, values in draws.sample.items()})
    return out


def price_samples(designs: Designs, case: Case, factors: dict[str, np.ndarray]) -> Designs:
    """Re-price evaluated points under their sampled prices, index and interest; figures updated in place."""
    n = len(designs)
    annual = annualize_points(designs, case.economics, index=factors["cost_index"], interest=factors["interest"],
                              price_factor=price_factors(designs.uses, factors, n))
    designs.figures.update(bare_module=annual.bare_module, total_module=annual.total_module,
                           installed=annual.installed, operating=annual.operating, credit=annual.credit,
                           capital_charge=annual.capital_charge, annualized=annual.annualized)
    designs.use_cost_rows = annual.use_cost
    return designs


def plant_limits_met(case: Case, designs: Designs) -> np.ndarray:
    """Every limit of the scenario met, other than the specs and the searched ratio range."""
    ok = np.ones(len(designs), bool)
    for limit in limit_table(case, designs):
        if not (limit.is_spec or limit.name.startswith("ratio")):
            ok &= limit.met
    return ok


def meets_each_spec(case: Case, outlet) -> np.ndarray:
    """(..., solutes): each solute's outlet within its spec (``SPEC_TOLERANCE``); True where it has none."""
    return outlet <= case.target * (1.0 + SPEC_TOLERANCE)


def sample_design(scenario: Scenario, case: Case, design: Decisions, draws: Draws, *,
                  notes: list[str] | None = None, progress: Callable[[int, int], None] | None = None) -> Sampled:
    """The design under every sample of ``draws``, evaluated ``SAMPLE_CHUNK`` samples per call."""
    parts = []
    count = draws.samples
    for rows in sample_chunks(count):
        part = draws.take(rows)
        agents = np.full(rows.size, design.agent)
        replica = sampled_case(scenario, case, agents, part, notes=notes)
        designs = SingleColumn(replica).evaluate(np.arange(rows.size), design.trays, design.rate, design.diameter)
        price_samples(designs, case, sample_factors(part, agents))
        each = meets_each_spec(case, designs.outlet)
        parts.append(Sampled(designs.outlet, each, np.all(each, axis=-1), plant_limits_met(replica, designs),
                             designs.annualized, designs.installed))
        if progress is not None:
            progress(int(rows[-1]) + 1, count)
    return Sampled.concatenate(parts)
