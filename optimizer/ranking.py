"""From a scenario to ranked designs: the plain Python API behind the CLI.

``optimize`` builds the space, lets the model (or the exhaustive scan) pick
the best distinct designs, re-evaluates each pick exactly with ``models/``,
and adds the per-agent best and the near-optimal band. ``evaluate_design``
prices one design the user names. ``cost_curve`` tabulates cost against the
ratio and against trays for one agent.
"""

from __future__ import annotations

import time
from dataclasses import dataclass, field

import numpy as np

from towercost import space as sp
from towercost.scenario import Scenario, ScenarioError
from towercost.space import Case, Designs, InfeasibleSpec


@dataclass
class Band:
    """Designs within ``margin`` of the best annualized cost."""

    margin: float
    count: int
    trays: tuple[int, int]
    ratio: tuple[float, float]
    agents: list[str]


@dataclass
class Result:
    """What ``optimize`` hands to the report: exact figures only."""

    case: Case
    method: str
    designs: Designs                 # the ranked designs, re-evaluated exactly, best first
    per_agent: Designs               # best design of each agent that has one, re-evaluated
    band: Band
    unmet: dict[str, str]            # agent name -> why it has no design
    warnings: list[str]
    solver: dict                     # method, sizes, times, objective and its difference from exact
    space_size: int

    @property
    def best(self) -> Designs:
        return self.designs.take(np.array([0]))


def _reevaluate(case: Case, d: Designs, index) -> Designs:
    """Evaluate the chosen alternatives again, from models/, at their exact decisions."""
    index = np.asarray(index, dtype=int)
    return sp.evaluate(case, d.agent[index], d.trays[index], d.rate[index], d.diameter[index])


def scan(space: sp.Space, top: int) -> tuple[list[int], dict[int, int]]:
    """Exhaustive exact ranking: the ``top`` cheapest alternatives meeting every limit, and each agent's best."""
    cost = np.where(space.feasible, space.designs.annualized, np.inf)
    order = np.argsort(cost, kind="stable")
    order = [int(i) for i in order[:top] if np.isfinite(cost[i])]
    if not order:
        raise InfeasibleSpec(sp.infeasible_reason(space))
    best_of = {}
    for a in np.unique(space.designs.agent):
        mine = np.where(space.designs.agent == a, cost, np.inf)
        i = int(np.argmin(mine))
        if np.isfinite(mine[i]):
            best_of[int(a)] = i
    return order, best_of


def near_optimal_band(space: sp.Space, best_cost: float, margin: float) -> Band:
    """The trays and ratio spanned by designs whose cost is within ``margin`` of the best."""
    d = space.designs
    inside = space.feasible & (d.annualized <= best_cost + margin * abs(best_cost))
    agents = [space.case.agents[a] for a in np.unique(d.agent[inside])]
    return Band(
        margin=margin, count=int(inside.sum()),
        trays=(int(d.trays[inside].min()), int(d.trays[inside].max())),
        ratio=(float(d.ratio[inside].min()), float(d.ratio[inside].max())),
        agents=agents,
    )


def optimize(scenario: Scenario, *, top: int = 10, method: str = "model") -> Result:
    """Rank the ``top`` best distinct designs of the scenario by total annualized cost.

    ``method`` is "model" (Pyomo, solved by HiGHS) or "scan" (every
    alternative evaluated and sorted). Raises InfeasibleSpec when no design
    meets the spec within the limits.
    """
    if method not in ("model", "scan"):
        raise ValueError(f"method must be 'model' or 'scan', got {method!r}")
    if top < 1:
        raise ValueError(f"top must be at least 1, got {top}")
    t0 = time.perf_counter()
    case = sp.prepare(scenario)
    space = sp.build_space(case)
    t1 = time.perf_counter()
    solver: dict = {"method": method, "alternatives_evaluated": len(space.designs),
                    "evaluate_seconds": t1 - t0}
    if method == "model":
        from towercost import model

        run = model.solve(space, top=top)
        order, best_of, objective = run.order, run.per_agent, run.objective
        solver.update(binaries=run.alternatives, build_seconds=run.build_seconds,
                      solve_seconds=run.solve_seconds, solves=run.solves, solver="HiGHS (appsi), MIP gaps 0")
    else:
        order, best_of = scan(space, top)
        objective = [float(space.designs.annualized[i]) for i in order]
    ranked = _reevaluate(case, space.designs, order)
    exact = ranked.annualized
    solver["objective"] = objective[0]
    solver["exact"] = float(exact[0])
    solver["difference"] = float(np.max(np.abs(np.asarray(objective) - exact)))
    agents_with = sorted(best_of)
    per_agent = _reevaluate(case, space.designs, [best_of[a] for a in agents_with])
    unmet = {}
    for a, name in enumerate(case.agents):
        if a not in best_of:
            unmet[name] = sp.infeasible_reason(sp.build_space(case, agents=[a]))
    warnings = list(dict.fromkeys(ranked.warnings + sp.dilute_checks(case, ranked.take(np.array([0])))))
    solver["total_seconds"] = time.perf_counter() - t0
    return Result(case=case, method=method, designs=ranked, per_agent=per_agent,
                  band=near_optimal_band(space, float(exact[0]), case.margin), unmet=unmet,
                  warnings=warnings, solver=solver, space_size=len(space.designs))


def agent_index(case: Case, name: str) -> int:
    """The index of the candidate called ``name``; ScenarioError listing the names if none."""
    if name not in case.agents:
        raise ScenarioError(f"no candidate named {name!r}; the scenario has {', '.join(map(repr, case.agents))}")
    return case.agents.index(name)


def evaluate_design(scenario: Scenario, agent: str, trays: int, *, ratio: float | None = None,
                    rate: float | None = None) -> tuple[Case, Designs, list[str]]:
    """Evaluate one design the user names: agent, real trays and a ratio to the minimum or a rate [mol/s].

    The design is priced whether or not it meets the spec; ``meets_spec``
    and the outlets say which.
    """
    case = sp.prepare(scenario)
    a = agent_index(case, agent)
    if (ratio is None) == (rate is None):
        raise ValueError("give exactly one of ratio and rate")
    if rate is None:
        rate_min = float(sp.minimum_rate(case, np.array([a]))[0])
        if not np.isfinite(rate_min):
            raise InfeasibleSpec(sp.infeasible_reason(sp.build_space(case, agents=[a])))
        rate = ratio * rate_min
    d = sp.evaluate(case, np.array([a]), np.array([trays]), np.array([rate]))
    return case, d, list(dict.fromkeys(d.warnings + sp.dilute_checks(case, d)))


@dataclass
class Curve:
    """Annualized cost of one agent against trays and against the ratio to the minimum."""

    case: Case = field(repr=False)
    agent: str
    by_trays: Designs = field(repr=False)     # for each tray count, its best design
    by_ratio: Designs = field(repr=False)     # for each ratio level, the best design at that rate


def _cheapest_per(labels: np.ndarray, cost: np.ndarray) -> np.ndarray:
    """Index of the cheapest finite-cost entry for each distinct label, in label order."""
    order = np.lexsort((cost, labels))
    order = order[np.isfinite(cost[order])]
    _, first = np.unique(labels[order], return_index=True)
    return order[first]


def cost_curve(scenario: Scenario, agent: str) -> Curve:
    """Cost against trays (best rate at each) and against the ratio (best trays at each level)."""
    case = sp.prepare(scenario)
    a = agent_index(case, agent)
    space = sp.build_space(case, agents=[a])
    d = space.designs
    cost = np.where(space.feasible, d.annualized, np.inf)
    if not np.any(np.isfinite(cost)):
        raise InfeasibleSpec(sp.infeasible_reason(space))
    # the grid levels: every alternative that is not a least-rate point sits on one of them
    levels = sp.rate_grid(case)
    level = np.clip(np.searchsorted(levels, d.ratio * (1 - 1e-9)), 0, levels.size - 1)
    on_grid = ~space.least & np.isclose(d.ratio, levels[level], rtol=1e-9)
    by_ratio = _cheapest_per(level, np.where(on_grid, cost, np.inf))
    return Curve(case=case, agent=agent, by_trays=d.take(_cheapest_per(d.trays, cost)), by_ratio=d.take(by_ratio))
