"""Factors on the nominal inputs, drawn from the scenario's ``[uncertainty]`` spreads.

Each input has its own ``numpy.random.Generator``, spawned from the study's
seed (``numpy.random.SeedSequence``) in a fixed order (K, efficiency, agent
price, disposal, electricity, steam, cooling water, credit, cost index,
interest), and draws one array over all samples: the same seed gives the
same factors, and changing one input's spread leaves the others' draws.

K-values and efficiencies are lognormal with median factor 1: a candidate's
factor for solute j is exp(sigma_j z) with

    z = sqrt(rho) z_shared + sqrt(1 - rho) z_own,

z_shared common to what ``shared`` names (a candidate's solutes, a solute in
every candidate, or everything), z_own one per candidate and solute, both
standard normal, rho the ``correlation``. Prices and the index are drawn as
one factor per sample (the agent price and disposal one per candidate, or
one for all with ``shared = "all"``); a normal factor is cut at 0.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from towercost.scenario.schema import Spread, Uncertainty

#: Inputs drawn as one factor per sample, in drawing order after K and efficiency.
PER_SAMPLE = ("electricity", "steam", "cooling_water", "credit", "cost_index", "interest")

#: Inputs drawn per candidate and sample.
PER_AGENT = ("agent_price", "disposal")

#: Every input a Monte Carlo study draws, in order.
DRAWN = ("k", "efficiency") + PER_AGENT + PER_SAMPLE


@dataclass(frozen=True)
class Draws:
    """Factors on the nominal inputs: one row per sample."""

    seed: int
    k: np.ndarray              # (S, agents, solutes)
    efficiency: np.ndarray     # (S, agents, solutes)
    agent: dict[str, np.ndarray]    # PER_AGENT name -> (S, agents)
    sample: dict[str, np.ndarray]   # PER_SAMPLE name -> (S,)
    spreads: dict[str, Spread] = field(repr=False, default_factory=dict)
    cut: dict[str, int] = field(default_factory=dict)   # normal factors cut at 0, per input

    @property
    def samples(self) -> int:
        return int(self.k.shape[0])

    def take(self, index) -> "Draws":
        """The draws of the samples at ``index``."""
        return Draws(self.seed, self.k[index], self.efficiency[index],
                     {n: v[index] for n, v in self.agent.items()}, {n: v[index] for n, v in self.sample.items()},
                     self.spreads, self.cut)

    def varies(self, name: str) -> bool:
        """Whether the input's spread is not degenerate (some factor differs from 1)."""
        values = getattr(self, name) if name in ("k", "efficiency") else {**self.agent, **self.sample}[name]
        return bool(np.any(values != 1.0))


def _lognormal(rng: np.random.Generator, spread: Spread, samples: int, agents: int,
               solutes: tuple[str, ...]) -> np.ndarray:
    """Correlated lognormal factors, (S, agents, solutes); exactly 1 where the spread is fixed or zero."""
    shape = (samples, agents, len(solutes))
    shared_shape = {"candidate": (samples, agents, 1), "solute": (samples, 1, len(solutes)),
                    "all": (samples, 1, 1), "none": shape}[spread.shared]
    z_shared = rng.standard_normal(shared_shape)
    z_own = rng.standard_normal(shape)
    if spread.distribution == "fixed":
        return np.ones(shape)
    rho = spread.correlation if spread.shared != "none" else 0.0
    z = np.sqrt(rho) * z_shared + np.sqrt(1.0 - rho) * z_own
    sigma = np.array([spread.by_solute.get(s, spread.log_sd) for s in solutes])
    return np.exp(sigma * z)


def _factor(rng: np.random.Generator, spread: Spread, shape) -> tuple[np.ndarray, int]:
    """Factors of one spread over ``shape``, and how many normal draws were cut at 0."""
    kind = spread.distribution
    if kind == "fixed":
        return np.ones(shape), 0
    if kind == "lognormal":
        return np.exp(spread.log_sd * rng.standard_normal(shape)), 0
    if kind == "normal":
        raw = 1.0 + spread.sd * rng.standard_normal(shape)
        return np.maximum(raw, 0.0), int(np.count_nonzero(raw < 0))
    if spread.high == spread.low:
        return np.full(shape, spread.mode), 0
    return rng.triangular(spread.low, spread.mode, spread.high, shape), 0


def draw(uncertainty: Uncertainty, agents: int, solutes: tuple[str, ...], samples: int | None = None,
         seed: int | None = None) -> Draws:
    """Every factor of a Monte Carlo study, from the scenario's spreads (samples and seed may be overridden)."""
    samples = uncertainty.samples if samples is None else int(samples)
    seed = uncertainty.seed if seed is None else int(seed)
    if samples < 1:
        raise ValueError(f"samples must be at least 1, got {samples}")
    # One generator per input, spawned from the seed: an input's factors do not move when another's spread does.
    rng = dict(zip(DRAWN, (np.random.default_rng(child) for child in np.random.SeedSequence(seed).spawn(len(DRAWN)))))
    spreads = {name: getattr(uncertainty, name) for name in DRAWN}
    k = _lognormal(rng["k"], spreads["k"], samples, agents, solutes)
    eff = _lognormal(rng["efficiency"], spreads["efficiency"], samples, agents, solutes)
    cut: dict[str, int] = {}
    per_agent = {}
    for name in PER_AGENT:
        spread = spreads[name]
        shape = (samples, 1) if spread.shared == "all" else (samples, agents)
        values, cut[name] = _factor(rng[name], spread, shape)
        per_agent[name] = np.broadcast_to(values, (samples, agents)).copy()
    per_sample = {}
    for name in PER_SAMPLE:
        per_sample[name], cut[name] = _factor(rng[name], spreads[name], (samples,))
    return Draws(seed, k, eff, per_agent, per_sample, spreads, {n: c for n, c in cut.items() if c})
