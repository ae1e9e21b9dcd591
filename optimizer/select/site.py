"""Several towers chosen together: a site's units under shared limits and linking rules.

Each unit's scenario is evaluated into its own space (``build_space``); the
alternatives that break the unit's own limits are dropped in numpy, and the
rest are reduced exactly per candidate (``select.reduction.undominated`` on
cost and the shared resources). The selection model (``select.model``) then
holds one design per unit, the shared limits as sums, and the linking rules
as rows:

    one solvent per group g:   sum_s same[g, s] = 1,
                               sum_(d of solvent s) pick[u, d] <= same[g, s]   for u in g
    exclusive choices:         sum_(d in the choices) pick[u, d] <= 1
    required choice:           sum_(d of the candidate) pick[u, d] = 1

The k best joint choices come from no-good cuts on the joint choice. For the
best, each shared limit's shadow value is the dual of its row in the LP of
the fixed choice (each unit kept to its chosen candidate and trays, binaries
relaxed); a limit binds when lifting it alone (the rest kept) would allow a
cheaper joint choice; the stand-alone bests are reported beside it with the
limits and rules they break together.
"""

from __future__ import annotations

import dataclasses
import time
from dataclasses import dataclass, field

import numpy as np

from towercost.design.case import prepare
from towercost.design.designs import Designs
from towercost.design.reasons import check_case, infeasible_reason
from towercost.design.space import LOOP_LOADS, Space, build_space
from towercost.errors import InfeasibleSpec, ScenarioError
from towercost.scenario.site import SiteSpec
from towercost.select import model, shared_regenerator
from towercost.select.reduction import undominated

#: Shared limit -> (figure of a design it sums, unit of the figure, words).
SHARED = {
    "capital_budget": ("installed", "USD", "installed cost"),
    "electric_power": ("electric_power", "W", "electric power"),
    "steam": ("steam_rate", "kg/s", "steam"),
    "cooling_water": ("cooling_rate", "m3/s", "cooling water"),
}


@dataclass
class Portfolio:
    """One joint choice: a design per unit, re-evaluated exactly, with its totals."""

    designs: list[Designs]                   # one design (length 1) per unit, in site order
    annualized: float                        # [USD/yr] in all
    totals: dict[str, float]                 # shared-limit name -> the choice's total use
    regenerators: list[dict] = field(default_factory=list)   # shared regenerator columns taken, checked


@dataclass
class SiteResult:
    """What ``optimize_site`` hands to the report."""

    spec: SiteSpec
    units: list[str]
    spaces: list[Space] = field(repr=False)
    portfolios: list[Portfolio]              # best first
    limits: dict[str, tuple[float, str, str]]    # name -> (bound, unit, words)
    binding: dict[str, bool]                 # lifting the limit alone would allow a cheaper joint choice
    shadow: dict[str, float]                 # [USD/yr per unit of the limit], best portfolio's LP
    stand_alone: Portfolio                   # each unit's own best, together
    stand_alone_breaks: list[str]            # the shared limits and rules the stand-alone bests break together
    solver: dict


#: How the joint choices listed differ: the design groups the model excludes after each pick.
LISTINGS = ("trays", "variant", "candidate")


def _groups(space: Space, index: np.ndarray, listing: str) -> np.ndarray:
    """The listing's group of each alternative: its candidate and trays, its candidate, or itself."""
    if listing == "trays":
        return space.group[index]
    if listing == "candidate":
        return space.agent[index].astype(int)
    return np.arange(index.size)


def _unit(name: str, space: Space, keep: int, resources: list[str], listing: str) -> model.Unit:
    """The unit as the model sees it: feasible alternatives, reduced exactly for the listing.

    Listing every variant, an alternative with ``keep`` dominators of the same
    candidate is dropped; listing groups (candidate and trays, or candidate),
    only the group's undominated alternatives are kept, since a joint choice
    of groups is priced at its best variants.
    """
    feasible = np.flatnonzero(space.feasible)
    if feasible.size == 0:
        raise InfeasibleSpec(f"unit {name!r}: {infeasible_reason(space)}")
    order = space.tie_order(feasible)
    rank = np.empty(len(space), int)
    rank[order] = np.arange(order.size)
    within = space.agent[order] if listing == "variant" else _groups(space, order, listing)
    depth = keep if listing == "variant" else 1
    kept = []
    for label in np.unique(within):
        members = order[within == label]
        usage = {r: space.usage[r][members] for r in resources}
        kept.append(members[undominated(space.cost[members], rank[members], usage, depth)])
    kept = space.tie_order(np.concatenate(kept))
    return model.Unit(name, cost=space.cost[kept], rank=np.arange(kept.size),
                      usage={r: space.usage[r][kept] for r in resources}, label=kept,
                      group=space.agent[kept].astype(int))


def _links(spec: SiteSpec, units: list[model.Unit], spaces: list[Space]) -> tuple[list[model.Option], list]:
    """The linking rules as options and rows of the selection model."""
    index = {name: u for u, (name, _) in enumerate(spec.units)}
    options: list[model.Option] = []
    rows: list[model.LinkRow] = []

    def candidate_of(u: int) -> np.ndarray:
        return np.asarray(spaces[u].case.agents, dtype=object)[units[u].group]

    for group in spec.solvent_groups:
        members = [index[n] for n in group.units]
        common = sorted(set.intersection(*(set(spaces[u].case.agents) for u in members)))
        first = len(options)
        options += [model.Option(f"{group.name}: {s}") for s in common]
        rows.append(model.LinkRow(f"{group.name}: one solvent", (), tuple((first + k, 1.0) for k in range(len(common))),
                                  "==", 1.0))
        for u in members:
            names = candidate_of(u)
            for k, solvent in enumerate(common):
                mine = np.flatnonzero(names == solvent)
                rows.append(model.LinkRow(f"{group.name}: {spec.units[u][0]} uses {solvent} only if the group does",
                                          ((u, mine, np.ones(mine.size)),), ((first + k, -1.0),), "<=", 0.0))
            others = np.flatnonzero(~np.isin(names, common))
            if others.size:   # a candidate the other units do not have cannot serve the group
                rows.append(model.LinkRow(f"{group.name}: {spec.units[u][0]} outside the group's solvents",
                                          ((u, others, np.ones(others.size)),), (), "<=", 0.0))
    for e, exclusive in enumerate(spec.exclusive):
        picks = []
        for choice in exclusive.choices:
            u = index[choice.unit]
            mine = np.flatnonzero(candidate_of(u) == choice.candidate)
            picks.append((u, mine, np.ones(mine.size)))
        rows.append(model.LinkRow(f"exclusive choices #{e + 1}", tuple(picks), (), "<=", 1.0))
    for choice in spec.require:
        u = index[choice.unit]
        mine = np.flatnonzero(candidate_of(u) == choice.candidate)
        rows.append(model.LinkRow(f"{choice.unit} uses {choice.candidate}", ((u, mine, np.ones(mine.size)),), (),
                                  "==", 1.0))
    return options, rows


def _portfolio(spaces: list[Space], picks: list[int], limits: dict, columns: dict | None = None,
               taken=()) -> Portfolio:
    """A joint choice re-evaluated exactly, with the shared regenerator columns it takes (option indices)."""
    designs = [space.designs(np.array([i])) for space, i in zip(spaces, picks)]
    totals = {name: float(sum(getattr(d, SHARED[name][0])[0] for d in designs)) for name in limits}
    annualized = float(sum(d.annualized[0] for d in designs))
    checked = []
    for o in taken:
        if columns and o in columns:
            column, members = columns[o]
            liquid = float(sum(designs[u].regenerator_liquid_mass[0] for u in members))
            vapour = float(sum(designs[u].regenerator_vapour_mass[0] for u in members))
            checked.append(shared_regenerator.check(spaces[members[0]], column, liquid, vapour))
            annualized += column.annualized
            if "capital_budget" in totals:
                totals["capital_budget"] += column.installed
    return Portfolio(designs, annualized, totals, checked)


def _alone_columns(assembly, picks: list[int]) -> list[int]:
    """For the stand-alone bests: per shared group, the cheapest column carrying their summed loads."""
    taken = []
    by_group: dict[str, list[int]] = {}
    for o, (column, _) in assembly.columns.items():
        by_group.setdefault(column.group, []).append(o)
    for options in by_group.values():
        members = assembly.columns[options[0]][1]
        liquid = sum(float(assembly.spaces[u].usage["regenerator_liquid_mass"][picks[u]]) for u in members)
        vapour = sum(float(assembly.spaces[u].usage["regenerator_vapour_mass"][picks[u]]) for u in members)
        if vapour <= 0:
            continue
        fits = [o for o in options if assembly.columns[o][0].vapour >= vapour and assembly.columns[o][0].liquid >= liquid]
        if fits:
            taken.append(min(fits, key=lambda o: assembly.columns[o][0].annualized))
    return taken


@dataclass
class Assembly:
    """A site ready for the selection model: its spaces, units, shared limits, options and link rows."""

    spaces: list[Space]
    units: list[model.Unit]
    shared: list[model.SharedLimit]
    options: list[model.Option]
    rows: list[model.LinkRow]
    limits: dict[str, tuple[float, str, str]]    # name -> (bound, unit, words)
    evaluate_seconds: float
    columns: dict[int, tuple] = field(default_factory=dict)   # option index -> (SharedColumn, member units)


def _checked(name: str, scenario, shared_trays: int | None = None):
    """One unit's case, with the checks every entry point makes (``reasons.check_case``); a refusal names the unit.

    ``shared_trays``: the unit's loops send their rich solvent to a shared regenerator of that many trays.
    """
    case = prepare(scenario)
    if shared_trays is not None:
        case = dataclasses.replace(case, loop=dataclasses.replace(case.loop, shared_trays=int(shared_trays)))
    try:
        check_case(case)
    except ScenarioError as exc:
        raise type(exc)(f"unit {name!r}: {exc}") from None
    return case


def assemble(spec: SiteSpec, keep: int, listing: str = "variant") -> Assembly:
    """Evaluate every unit's space and reduce it exactly for the ``keep`` best joint choices of the listing."""
    start = time.perf_counter()
    limits = {name: (float(getattr(spec.shared, name)), SHARED[name][1], SHARED[name][2])
              for name in SHARED if getattr(spec.shared, name) is not None}
    resources = [SHARED[name][0] for name in limits]
    trays_of = {n: g.regenerator_trays for g in spec.solvent_groups if g.shared_regenerator for n in g.units}
    loads = list(LOOP_LOADS)
    spaces = [build_space(_checked(name, scenario, trays_of.get(name)),
                          keep=tuple(resources + (loads if name in trays_of else [])))
              for name, scenario in spec.units]
    evaluated = time.perf_counter() - start
    # a unit on a shared regenerator keeps its designs undominated in the column's loads too (exact)
    units = [_unit(name, space, keep, resources + (loads if name in trays_of else []), listing)
             for (name, _), space in zip(spec.units, spaces)]
    shared = [model.SharedLimit(name, SHARED[name][0], bound, words) for name, (bound, _, words) in limits.items()]
    options, rows = _links(spec, units, spaces)
    columns = {}
    index = {name: u for u, (name, _) in enumerate(spec.units)}
    for group in spec.solvent_groups:
        if not group.shared_regenerator:
            continue
        members = [index[n] for n in group.units]
        offered = shared_regenerator.options(group, spaces, units, members)
        more, link = shared_regenerator.rows(group, offered, len(options), units, spaces, members,
                                             "capital_budget" in limits)
        columns.update({len(options) + k: (c, members) for k, c in enumerate(offered)})
        options, rows = options + more, rows + link
    return Assembly(spaces, units, shared, options, rows, limits, evaluated, columns)


def chosen_groups(assembly: Assembly, choice: tuple[int, ...]) -> list[np.ndarray]:
    """Per unit, the alternatives of the chosen design's candidate and trays (the LP of the fixed choice)."""
    groups = []
    for unit, d, space in zip(assembly.units, choice, assembly.spaces):
        i = unit.label
        groups.append(np.flatnonzero((space.agent[i] == space.agent[i[d]]) & (space.trays[i] == space.trays[i[d]])))
    return groups


def optimize_site(spec: SiteSpec, *, top: int = 5, distinct: str = "trays") -> SiteResult:
    """The ``top`` best joint choices of one design per unit, under the site's shared limits and rules.

    ``distinct`` says how listed choices differ: "trays" (default) in at
    least one unit's candidate or tray count, "candidate" in at least one
    unit's candidate, "variant" in any design at all.
    """
    if distinct not in LISTINGS:
        raise ValueError(f"distinct must be one of {', '.join(LISTINGS)}, got {distinct!r}")
    start = time.perf_counter()
    site = assemble(spec, top, distinct)
    spaces, units, limits = site.spaces, site.units, site.limits
    selection_model = model.SelectionModel(units, site.shared, site.options, site.rows)
    groups_of = [_groups(space, unit.label, distinct) for space, unit in zip(spaces, units)]
    try:
        selection = selection_model.best(top, distinct=groups_of)
    except model.Infeasible:
        raise InfeasibleSpec(_why_not(spec, spaces, limits)) from None
    portfolios = [_portfolio(spaces, [int(u.label[d]) for u, d in zip(units, choice)], limits, site.columns,
                             selection.options[k] if k < len(selection.options) else ())
                  for k, choice in enumerate(selection.choices)]
    groups = chosen_groups(site, selection.choices[0])
    shadow = selection_model.fixed_choice_lp(groups)[1] if site.shared else {}
    cheaper = {name: selection_model.best_without(name) for name in limits}
    binding = {name: cheaper[name] < portfolios[0].annualized * (1 - 1e-12) for name in limits}
    alone_picks = [int(u.label[int(np.argmin(u.cost))]) for u in units]
    alone = _portfolio(spaces, alone_picks, limits, site.columns, _alone_columns(site, alone_picks))
    breaks = [limits[name][2] for name, (bound, _, _) in limits.items() if alone.totals[name] > bound]
    breaks += _rules_broken(spec, spaces, alone)
    done = time.perf_counter()
    solver = {"alternatives_evaluated": int(sum(len(s) for s in spaces)),
              "binaries": selection_model.binaries, "solves": selection.solves,
              "evaluate_seconds": site.evaluate_seconds, "build_seconds": selection_model.build_seconds,
              "solve_seconds": selection_model.solve_seconds, "total_seconds": done - start,
              "objective": selection.objective[0], "exact": portfolios[0].annualized,
              "solver": "HiGHS (highspy) on the Pyomo model's matrix, MIP gaps 0"}
    return SiteResult(spec, [n for n, _ in spec.units], spaces, portfolios, limits, binding, shadow, alone, breaks,
                      solver)


def _rules_broken(spec: SiteSpec, spaces: list[Space], portfolio: Portfolio) -> list[str]:
    """The site's rules a joint choice breaks, in words."""
    chosen = {name: space.case.agents[int(d.agent[0])]
              for (name, _), space, d in zip(spec.units, spaces, portfolio.designs)}
    broken = []
    for group in spec.solvent_groups:
        if len({chosen[u] for u in group.units}) > 1:
            broken.append(f"one solvent for {group.name!r}")
    for e, exclusive in enumerate(spec.exclusive):
        if sum(chosen[c.unit] == c.candidate for c in exclusive.choices) > 1:
            broken.append(f"exclusive choices #{e + 1}")
    for choice in spec.require:
        if chosen[choice.unit] != choice.candidate:
            broken.append(f"{choice.unit!r} uses {choice.candidate!r}")
    return broken


def _why_not(spec: SiteSpec, spaces: list[Space], limits: dict) -> str:
    """No joint choice qualifies: which shared limit the least use of all units together already breaks."""
    reasons = []
    for name, (bound, unit, words) in limits.items():
        figure = SHARED[name][0]
        least = sum(float(np.min(s.usage[figure][s.feasible])) for s in spaces)
        if least > bound:
            reasons.append(f"the units' least {words} together is {least:.4g} {unit}, above the site's "
                           f"{bound:.4g} {unit}")
    if not reasons:
        reasons.append("no joint choice meets every shared limit and rule at once (each alone can be met)")
    return f"site {spec.name!r}: no choice of one design per unit qualifies: " + "; ".join(reasons)
