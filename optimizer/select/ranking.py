"""From a scenario to ranked designs: the plain Python API behind the CLI.

``optimize`` builds the space, lets the selection model (or the exhaustive
scan) pick the best distinct designs, re-evaluates each pick exactly with
``towercost.models``, and adds the per-candidate best and the near-optimal
band. ``evaluate_design`` prices one design the user names. ``cost_curve``
tabulates cost against the ratio and against trays for one candidate.
"""

from __future__ import annotations

import time
from collections.abc import Callable
from dataclasses import dataclass, field

import numpy as np

from towercost.design import cascade, packed
from towercost.design.case import Case, agent_index, prepare
from towercost.design.column import MAX_WIDER, SAME_RATE
from towercost.design.loop import candidate_name, flowsheet_for
from towercost.design.limits import RATIO_TOLERANCE, SPEC_TOLERANCE
from towercost.models import hydraulics
from towercost.design.designs import Designs
from towercost.design.internals import FIRST_PACKING
from towercost.design.cascade import dilute_checks
from towercost.design.reasons import check_case, infeasible_reason
from towercost.design.space import Space, build_space
from towercost.errors import InfeasibleSpec, ScenarioError
from towercost.scenario.schema import Scenario
from towercost.select.scan import first_distinct, first_in_order, first_per_agent, scan

METHODS = ("model", "scan")

#: How the ranking lists designs: one row per (candidate, internals, trays) group at its best rate and
#: diameter (the default), every rate and diameter variant, or one row per candidate.
DISTINCT = ("trays", "variant", "candidate")


def listing_groups(space: Space, distinct: str) -> np.ndarray | None:
    """The group label of every alternative for a listing (``DISTINCT``); None: each its own group."""
    if distinct not in DISTINCT:
        raise ValueError(f"distinct must be one of {', '.join(DISTINCT)}, got {distinct!r}")
    if distinct == "trays":
        return space.group                      # (candidate, internals family, trays or a bed's stages)
    if distinct == "candidate":
        return space.agent.astype(np.int64)
    return None


@dataclass
class BandRange:
    """One candidate's designs within the margin of the best (per internals where the case has packings)."""

    agent: str
    count: int
    trays: tuple[int, int]
    ratio: tuple[float, float]
    diameter: tuple[float, float]      # [m]
    cost: tuple[float, float]          # annualized [USD/yr]
    internals: str = "trays"           # "trays", or the packing's name


@dataclass
class Band:
    """Designs within ``margin`` of the best annualized cost."""

    margin: float
    count: int
    trays: tuple[int, int]
    ratio: tuple[float, float]
    agents: list[str]
    by_agent: list[BandRange] = field(default_factory=list)   # the same, per candidate, in scenario order


@dataclass
class BoundFlag:
    """A best design that lies on a bound of the search, with the words to widen it."""

    design: str        # "the best design", or "the best design of 'candidate'"
    bound: str         # trays_high, trays_low, ratio_high, ratio_low or diameter
    message: str


@dataclass
class Result:
    """What ``optimize`` hands to the report: exact figures only."""

    case: Case
    method: str
    designs: Designs                 # the ranked designs, re-evaluated exactly, best first
    per_agent: Designs               # best design of each candidate (and of its internals) that has one, re-evaluated
    band: Band
    unmet: dict[str, str]            # candidate name -> why it has no design
    warnings: list[str]
    solver: dict                     # method, sizes, times, objective and its difference from exact
    space_size: int
    distinct: str = "trays"          # how the ranking lists designs (``DISTINCT``)
    per_agent_rank: list[int] = field(default_factory=list)   # rank of each per-candidate best in the listing
    scenario: Scenario | None = field(default=None, repr=False)   # the inputs as read (SI)
    bounds: list[BoundFlag] = field(default_factory=list)   # best designs on a bound of the search
    ranked_bounds: list[list[str]] = field(default_factory=list)   # per ranked design, the bounds it lies on

    @property
    def best(self) -> Designs:
        return self.designs.take(np.array([0]))

    def to_frame(self):
        """The ranked designs as a pandas table, best first."""
        frame = self.designs.to_frame(self.case)
        frame.insert(0, "rank", np.arange(1, len(self.designs) + 1))
        return frame


def search_bounds(space: Space, i: int, regenerator: dict | None = None) -> list[tuple[str, str]]:
    """The bounds of the search alternative ``i`` lies on: (bound, how to widen it), in the user's words.

    * trays at either end of ``[column] trays`` (the low end only above 1 tray);
    * the ratio at the floor of ``[column] ratio`` (the least rate was raised to it: with these
      trays less agent still meets the spec), or at its ceiling, or at the least rate of its
      trays where one tray fewer cannot meet the spec within the ceiling;
    * the shell the widest tried for its rate, where the sizes were cut by ``larger_diameters``,
      ``max_diameter`` or the search's cap rather than by a rise in cost or the trays weeping.
    """
    case = space.case
    word = case.service.ratio_word
    bed = int(space.internals[i]) >= FIRST_PACKING
    (t_lo, t_hi), (r_lo, r_hi) = (case.stages_range if bed else case.trays_range), case.ratio_range
    what, key = ("theoretical stages in a packed bed", "stages") if bed else ("trays", "trays")
    trays, ratio, agent = int(space.trays[i]), float(space.ratio[i]), int(space.agent[i])
    out = []
    if trays == t_hi:
        out.append(("trays_high", f"uses {trays} {what}, the most searched ([column] {key} = [{t_lo}, {t_hi}]): "
                                  f"raise the upper end to see whether more {key} pay"))
    if trays == t_lo and t_lo > 1:
        out.append(("trays_low", f"uses {trays} {what}, the fewest searched ([column] {key} = [{t_lo}, {t_hi}]): "
                                 f"lower the first value to see whether fewer {key} pay"))
    if ratio <= r_lo * (1 + 1e-9):
        out.append(("ratio_low", f"runs at {word} {ratio:.4g}, the floor of the searched range ([column] ratio = "
                                 f"[{r_lo:g}, {r_hi:g}]), where these {key} would meet the spec with less: lower "
                                 "the first value (it must stay above 1)"))
    ceiling = ratio >= r_hi * (1 - 1e-9)
    if not ceiling and space.least[i] and trays > t_lo:
        least = packed.stage_least_rates if bed else cascade.least_rate
        fewer = float(least(case, np.array([agent]), np.array([trays - 1]))[0])
        ceiling = not fewer <= r_hi * float(space.flowsheet.rate_min[agent]) * (1 + RATIO_TOLERANCE)
    if ceiling:
        out.append(("ratio_high", f"runs at {word} {ratio:.4g}, at the ceiling of the searched range ([column] ratio"
                                  f" = [{r_lo:g}, {r_hi:g}]) for its {key}: fewer {key} would need more than "
                                  f"{r_hi:g} x the minimum; raise the upper value to see whether they pay"))
    if case.shell_diameter is None:
        same = ((space.agent == agent) & (space.trays == trays) & (space.rate == space.rate[i])
                & (space.family == space.family[i]))
        tried = space.diameter[same]
        if space.diameter[i] >= tried.max():
            wider = float(hydraulics.standard_diameter(space.diameter[i] + hydraulics.STANDARD_DIAMETER_STEP))
            if case.larger_diameters is not None:
                why = (f"[column] larger_diameters = {case.larger_diameters} stops the sizes there: raise it, or leave "
                       "it out to search until the cost rises")
            elif wider > case.max_diameter * (1 + SPEC_TOLERANCE):
                why = (f"the next size ({wider:.3f} m) is above [column] max_diameter = {case.max_diameter:.4g} m: "
                       "raise it to try wider shells")
            elif tried.size >= 1 + MAX_WIDER:
                why = f"the diameter search stops {MAX_WIDER} sizes above the least shell"
            else:
                why = ""
            if why:
                out.append(("diameter", f"runs in a {space.diameter[i]:.3f} m shell, the widest tried for its rate; "
                                        + why))
    if case.loop is not None and case.loop.looped[agent]:
        out += _loop_bounds(space, i, agent, regenerator)
    return out


def regenerator_trays(space: Space, index) -> dict[int, int]:
    """The regenerator trays of the loop designs at ``index``, from one re-evaluation of them all."""
    loop = space.case.loop
    index = np.unique(np.asarray(index, dtype=int))
    if loop is None or index.size == 0:
        return {}
    index = index[loop.looped[space.agent[index]]]
    if index.size == 0:
        return {}
    trays = space.designs(index).regenerator_trays
    return {int(i): int(t) for i, t in zip(index, trays)}


def _loop_bounds(space: Space, i: int, agent: int, regenerator: dict | None = None) -> list[tuple[str, str]]:
    """A loop design's lean level or regenerator trays at an end of their search."""
    loop = space.case.loop
    family = np.flatnonzero(loop.looped & (loop.parent == loop.parent[agent]))
    level, levels = float(loop.level[agent]), loop.level[family]
    data = loop.regenerator(agent)
    span = f"[solvent.regenerator] lean_range = [{levels.min():.3g}, {levels.max():.3g}]"
    out = []
    # each lean level is a candidate of its own: its level is at an end only for the parent's best design
    mine = space.feasible & np.isin(space.agent, family)
    if not (mine.any() and space.cost[i] <= space.cost[mine].min()):
        levels = levels[:1]
    if levels.size > 1 and level >= levels.max():
        out.append(("lean_high", f"runs at lean level {level:.3g}, the richest searched ({span}): raise the upper "
                                 "value (below 1) to see whether a richer lean solvent pays"))
    if levels.size > 1 and level <= levels.min():
        out.append(("lean_low", f"runs at lean level {level:.3g}, the leanest searched ({span}): lower the first "
                                "value to see whether a leaner solvent pays"))
    trays = regenerator[i] if regenerator and i in regenerator else int(space.designs([i]).regenerator_trays[0])
    lo, hi = data.trays_range
    if trays >= hi:
        out.append(("regenerator_high", f"has a regenerator of {trays} trays, the most searched ([solvent.regenerator]"
                                        f" trays = [{lo}, {hi}]): raise the upper end to see whether more pay"))
    if trays <= lo and lo > 1:
        out.append(("regenerator_low", f"has a regenerator of {trays} trays, the fewest searched ([solvent.regenerator]"
                                       f" trays = [{lo}, {hi}]): lower the first value to see whether fewer pay"))
    return out


def bound_flags(space: Space, order: list[int], best_of: dict[int, int]) -> tuple[list[BoundFlag], list[list[str]]]:
    """Flags for the best design and each candidate's best, and the bounds of every ranked design."""
    flags, seen = [], set()
    picks = [("the best design", order[0])] + [(f"the best design of {kind_label(space, a)}", i)
                                               for a, i in sorted(best_of.items())]
    regenerator = regenerator_trays(space, [i for _, i in picks] + list(order))   # loops: one re-evaluation
    for label, i in picks:
        if i in seen:
            continue
        seen.add(i)
        flags += [BoundFlag(label, bound, f"{label} {words}") for bound, words in search_bounds(space, i, regenerator)]
    return flags, [[bound for bound, _ in search_bounds(space, i, regenerator)] for i in order]


def kind_label(space: Space, kind: int) -> str:
    """'candidate' in quotes, with its internals where the case has packings."""
    agent, family = space.kind_of(kind)
    name = repr(candidate_name(space.case, agent))
    if not space.case.packings:
        return name
    return f"{name} with {internals_word(space.case, family)}"


def internals_word(case: Case, family: int) -> str:
    """'trays', or the name of the packing of internals family ``family`` (1 + its index)."""
    return "trays" if family == 0 else case.packings[family - 1].name


def kind_reason(space: Space, kind: int) -> str:
    """Why no design of one candidate with one internals family qualifies: the limits its designs cannot meet."""
    d = space.designs(np.flatnonzero(space.kind == kind))
    meets = np.ones(len(d), bool)
    for limit in d.limits:
        if limit.is_spec:
            meets &= limit.met
    if not meets.any():
        return "no design meets the spec within the searched counts and ratio range"
    parts = []
    for limit in d.limits:
        there = meets & limit.applies
        if limit.is_spec or limit.name.startswith("ratio") or not there.any():
            continue
        least = float(np.min(limit.values[there]))
        if least > limit.bound and limit.name == "packing_material":
            parts.append(f"the packing's material is not allowed ({limit.label.split(' (')[0]})")
        elif least > limit.bound:
            parts.append(f"the least {limit.label.split(' at most')[0]} of any design meeting the spec is "
                         f"{least:.4g} {limit.unit}".rstrip() + f", above the limit ({limit.label})")
    return "no design meets the spec within the limits: " + ("; ".join(parts) if parts else
                                                             "no single design meets every limit at once")


def near_optimal_band(space: Space, best_cost: float, margin: float) -> Band:
    """The trays and ratio spanned by designs whose cost is within ``margin`` of the best, overall and per candidate."""
    inside = space.feasible & (space.cost <= best_cost + margin * abs(best_cost))
    ratio = space.ratio
    agents = [space.case.agents[a] for a in np.unique(space.agent[inside])]
    by_agent = []
    for kind in np.unique(space.kind[inside]):
        mine = inside & (space.kind == kind)
        a, family = space.kind_of(kind)
        by_agent.append(BandRange(
            agent=candidate_name(space.case, a), count=int(mine.sum()),
            trays=(int(space.trays[mine].min()), int(space.trays[mine].max())),
            ratio=(float(ratio[mine].min()), float(ratio[mine].max())),
            diameter=(float(space.diameter[mine].min()), float(space.diameter[mine].max())),
            cost=(float(space.cost[mine].min()), float(space.cost[mine].max())),
            internals=internals_word(space.case, family)))
    return Band(margin=margin, count=int(inside.sum()),
                trays=(int(space.trays[inside].min()), int(space.trays[inside].max())),
                ratio=(float(ratio[inside].min()), float(ratio[inside].max())), agents=agents, by_agent=by_agent)


def rank_in_listing(space: Space, index: int, group: np.ndarray | None) -> int:
    """Rank (1 = best) the alternative ``index`` holds in the listing: 1 + the groups led by earlier ones.

    Earlier means before it in the tie order among the alternatives that
    meet every limit (``index`` is one of them); with ``group`` None every
    alternative counts as its own group.
    """
    cost, c = space.cost, space.cost[index]
    earlier = space.feasible & (cost < c)
    tied = space.tie_order(np.flatnonzero(space.feasible & (cost == c)))
    earlier[tied[:int(np.flatnonzero(tied == index)[0])]] = True
    if group is None:
        return int(earlier.sum()) + 1
    return int(np.unique(group[earlier]).size) + 1


def select_by_model(space: Space, top: int, distinct: np.ndarray | None = None) -> tuple[list[int], dict[int, int], dict]:
    """The model's ``top`` best and each candidate's best, as indices into ``space``, with solver figures.

    Every alternative the model sees meets every limit (a one-unit scenario
    has only per-design limits); of those it sees, per candidate, the first
    ``top`` in tie order and, with ``distinct`` groups, the leaders of the
    first ``top`` groups (per kind: candidate, and internals family where the
    case has packings). The model excludes a pick's whole group. The set is
    exact: the top ``top`` groups overall are among the kinds' first
    ``top`` groups, whose leaders it holds; every other alternative it holds
    comes after its own group's leader, which it also holds (a leader comes
    first in its group, so it is among a candidate's first ``top`` whenever a
    member is); and each candidate's best is its first.
    """
    from towercost.select import model

    feasible = np.flatnonzero(space.feasible)
    if feasible.size == 0:
        raise InfeasibleSpec(infeasible_reason(space))
    parts = []
    kinds = space.kind[feasible]
    for a in np.unique(kinds):
        mine = feasible[kinds == a]
        parts.append(first_in_order(space, mine, top))
        if distinct is not None:
            parts.append(first_distinct(space, mine, top, distinct))
    kept = space.tie_order(np.unique(np.concatenate(parts)))
    unit = model.Unit("column", cost=space.cost[kept], rank=np.arange(kept.size), label=kept)
    selection = model.SelectionModel([unit])
    groups = None if distinct is None else [distinct[kept]]
    order = [int(kept[c[0]]) for c in selection.best(top, distinct=groups).choices]
    best_of = {}
    kind_of = space.kind[kept]
    for a in np.unique(kind_of):
        best_of[int(a)] = int(kept[selection.best(1, restrict=[kind_of == a]).choices[0][0]])
    figures = {"binaries": selection.binaries, "build_seconds": selection.build_seconds,
               "solve_seconds": selection.solve_seconds, "solves": selection.solves,
               "solver": "HiGHS (highspy) on the Pyomo model's matrix, MIP gaps 0"}
    return order, best_of, figures


def checked_case(scenario: Scenario, agent: str | None = None) -> Case:
    """The scenario in SI, refused (one ``ScenarioError`` line) if a candidate is beyond the relations or too large.

    Every entry point of the API starts here, so that a scenario built in a
    notebook meets the same checks (``reasons.check_case``) as one run from
    the command line. ``agent`` limits the checks to that candidate.
    """
    case = prepare(scenario)
    check_case(case, None if agent is None else [agent_index(case, agent)])
    return case


def optimize(scenario: Scenario, *, top: int = 10, method: str = "model", distinct: str = "trays",
             progress: Callable[[int, int], None] | None = None) -> Result:
    """Rank the ``top`` best distinct designs of the scenario by total annualized cost.

    ``method`` is "model" (Pyomo, solved by HiGHS) or "scan" (every
    alternative evaluated and sorted). ``distinct`` says what counts as a
    distinct design (``DISTINCT``): "trays", one row per candidate and tray
    count at its best rate and diameter; "variant", every rate and diameter
    variant; "candidate", one row per candidate. Raises InfeasibleSpec when
    no design meets the spec within the limits.
    """
    if method not in METHODS:
        raise ValueError(f"method must be 'model' or 'scan', got {method!r}")
    if distinct not in DISTINCT:
        raise ValueError(f"distinct must be one of {', '.join(DISTINCT)}, got {distinct!r}")
    if top < 1:
        raise ValueError(f"top must be at least 1, got {top}")
    t0 = time.perf_counter()
    case = checked_case(scenario)
    space = build_space(case, progress=progress)
    t1 = time.perf_counter()
    solver: dict = {"method": method, "alternatives_evaluated": len(space), "evaluate_seconds": t1 - t0}
    groups = listing_groups(space, distinct)
    if method == "model":
        order, best_of, figures = select_by_model(space, top, groups)
        solver.update(figures)
    else:
        order, best_of = scan(space, top, groups)
    ranked = space.designs(order)
    exact = ranked.annualized
    objective = space.cost[order]
    solver["objective"] = float(objective[0])
    solver["exact"] = float(exact[0])
    solver["difference"] = float(np.max(np.abs(objective - exact)))
    agents_with = sorted(best_of)
    per_agent = space.designs([best_of[a] for a in agents_with])
    unmet = {}
    have = {space.kind_of(k)[0] for k in best_of}
    representative = getattr(space.flowsheet, "representative", np.arange(len(case.agents)))
    for a in np.unique(representative):
        if int(a) not in have:
            members = np.flatnonzero(representative == a)   # a loop: every lean level of the solvent
            unmet[candidate_name(case, int(a))] = infeasible_reason(build_space(case, agents=members))
    for kind in np.unique(space.kind):          # a candidate with designs, but none with some internals
        agent, family = space.kind_of(kind)
        if int(kind) not in best_of and agent in have:
            unmet[f"{candidate_name(case, agent)} with {internals_word(case, family)}"] = kind_reason(space, int(kind))
    flags, ranked_bounds = bound_flags(space, order, best_of)
    reported = space.designs(np.unique(np.array(order + [best_of[a] for a in agents_with])))   # one set of messages
    warnings = list(dict.fromkeys([f.message for f in flags] + reported.warnings
                                  + dilute_checks(case, ranked.take(np.array([0])))))
    ranks = [rank_in_listing(space, best_of[a], groups) for a in agents_with]
    solver["total_seconds"] = time.perf_counter() - t0
    return Result(case=case, method=method, designs=ranked, per_agent=per_agent,
                  band=near_optimal_band(space, float(exact[0]), case.margin), unmet=unmet,
                  warnings=warnings, solver=solver, space_size=len(space), distinct=distinct,
                  per_agent_rank=ranks, scenario=scenario, bounds=flags, ranked_bounds=ranked_bounds)


def internals_index(case: Case, internals: str | None) -> int | None:
    """The internals index of a packing named (its [[packing]] name or its row key); None: the trays."""
    if internals is None:
        return None
    for p, choice in enumerate(case.packings):
        if internals in (choice.name, choice.key):
            return FIRST_PACKING + p
    known = ", ".join(repr(c.name) for c in case.packings) or "none"
    raise ScenarioError(f"no [[packing]] named {internals!r}; the scenario's packings: {known}")


def evaluate_design(scenario: Scenario, agent: str, trays: int | None, *, ratio: float | None = None,
                    rate: float | None = None, diameter: float | None = None,
                    internals: str | None = None) -> tuple[Case, Designs, list[str]]:
    """Evaluate one design the user names: candidate, real trays, a ratio to the minimum or a rate [mol/s].

    The design is priced whether or not it meets the spec; ``meets_spec``
    and the outlets say which. ``diameter`` [m] gives the shell; without it,
    the least standard size (or the scenario's existing shell). ``internals``
    names a [[packing]] (its name or row key): the design is then that packed
    bed, whose height (and stage count) follows from the rate, and ``trays``
    is not used.
    """
    case = checked_case(scenario, agent)
    a = agent_index(case, agent)
    kind = internals_index(case, internals)
    if kind is None and not case.offer_trays:
        raise ScenarioError("[column] offer_trays = false: name one of the scenario's packings")
    if kind is None and trays is None:
        raise ValueError("give the trays of a tray design")
    if (ratio is None) == (rate is None):
        raise ValueError("give exactly one of ratio and rate")
    if rate is None:
        rate_min = float(cascade.minimum_rate(case, np.array([a]))[0])
        if not np.isfinite(rate_min):
            raise InfeasibleSpec(infeasible_reason(build_space(case, agents=[a])))
        rate = ratio * rate_min
    d = flowsheet_for(case).evaluate(np.array([a]), np.array([0 if kind is not None else trays]), np.array([rate]),
                                    None if diameter is None else np.array([diameter]),
                                    None if kind is None else np.array([kind]))
    return case, d, list(dict.fromkeys(d.warnings + dilute_checks(case, d)))


@dataclass
class Curve:
    """Annualized cost of one candidate against trays and against the ratio to the minimum."""

    case: Case = field(repr=False)
    agent: str
    by_trays: Designs = field(repr=False)     # for each tray count (a bed's stages), its best design
    by_ratio: Designs = field(repr=False)     # for each ratio level, the best design at that rate
    warnings: list[str] = field(default_factory=list)   # range messages of the designs shown
    internals: str = "trays"                  # "trays", or the packing's name


def _cheapest_per(labels: np.ndarray, order: np.ndarray) -> np.ndarray:
    """For each distinct label, the first of ``order`` (indices in tie order) carrying it, in label order."""
    _, first = np.unique(labels[order], return_index=True)
    return order[first]


def cost_curve(scenario: Scenario, agent: str, internals: str | None = None) -> Curve:
    """Cost against trays (best rate at each) and against the ratio (best trays at each level).

    ``internals`` names a [[packing]]: its curve against theoretical stages;
    without it, the trays' (or, with trays not offered, the first packing's).
    """
    case = checked_case(scenario, agent)
    a = agent_index(case, agent)
    kind = internals_index(case, internals)
    if kind is None and not case.offer_trays:
        kind = FIRST_PACKING
    space = build_space(case, agents=[a])
    family = 0 if kind is None else kind - FIRST_PACKING + 1
    feasible = np.flatnonzero(space.feasible & (space.family == family))
    if feasible.size == 0:
        raise InfeasibleSpec(infeasible_reason(space))
    order = space.tie_order(feasible)
    # the grid levels: every alternative that is not a least-rate point sits on one of them
    levels = space.flowsheet.rate_grid()
    ratio = space.ratio
    level = np.clip(np.searchsorted(levels, ratio * (1 - SAME_RATE)), 0, levels.size - 1)
    on_grid = ~space.least & np.isclose(ratio, levels[level], rtol=SAME_RATE)
    by_trays = _cheapest_per(space.trays, order)
    by_ratio = _cheapest_per(level, order[on_grid[order]])
    shown = space.designs(np.unique(np.concatenate([by_trays, by_ratio])))   # one set of messages for both tables
    return Curve(case=case, agent=agent, by_trays=space.designs(by_trays), by_ratio=space.designs(by_ratio),
                 warnings=shown.warnings, internals=internals_word(case, family))
