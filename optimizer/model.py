"""The selection model: pick the design of least total annualized cost.

Formulation (one tower, discrete alternatives from ``optimizer.space``):

    sets         D                       alternatives (agent, real trays, rate, diameter)
                 C                       limits of the scenario (``space.limit_table``)
    parameters   cost[d]                 total annualized cost [USD/yr], exact, from models/
                 value[c, d], bound[c]   the limited quantity of d and its bound
    variables    pick[d] in {0, 1}       1 for the chosen design (solved as its LP
                                         relaxation first; exact when that is integral)
    constraints  one_design:  sum_d pick[d] = 1
                 limit[c]:    sum_d value[c, d] pick[d] <= bound[c]      for c in C
    objective    minimize     sum_d cost[d] pick[d]

The Kremser relation enters as data: every alternative's rate, factor and
stages come from the exact relation, so the model is exact at every
alternative. Limits are sums over the picked designs so that limits which
couple several units (a shared budget or utility) fit the same form.
The LP relaxation of this model is integral (one equality over binaries);
HiGHS is run with both MIP gaps at zero all the same, since near-optimal
designs often lie within 1e-4 of each other.

The k best distinct designs come from the model itself: after each solve the
chosen design is excluded (its upper bound set to 0, the no-good cut of a
one-hot choice) and the persistent solver solves again. A pick is checked
against the exact limits (numpy, as the scan does); one that meets a limit
only within the solver's feasibility tolerance is excluded the same way and
not reported.

Pyomo objects never leave this module; ``pyomo.environ`` is imported inside
the functions that need it (it costs about 0.4 s).
"""

from __future__ import annotations

import time
from dataclasses import dataclass, field

import numpy as np

from towercost.space import InfeasibleSpec, Space, infeasible_reason, limit_table


@dataclass
class ModelRun:
    """What the model found, as plain data: indices into ``space.designs``."""

    order: list[int]                 # chosen designs, best first
    objective: list[float]           # model objective at each, [USD/yr]
    alternatives: int                # binaries in the model
    alternatives_total: int          # alternatives in the space before reduction
    build_seconds: float
    solve_seconds: float
    solves: int
    per_agent: dict[int, int] = field(default_factory=dict)   # agent index -> best design index


def build_model(space: Space, index: np.ndarray):
    """The Pyomo model over the alternatives ``index`` of ``space``."""
    import pyomo.environ as pyo
    from pyomo.core.expr.numeric_expr import LinearExpression

    d = space.designs.take(index)
    cost = d.annualized.tolist()
    m = pyo.ConcreteModel("annualized cost")
    m.DESIGNS = pyo.RangeSet(0, len(index) - 1)                 # one entry per alternative
    m.pick = pyo.Var(m.DESIGNS, within=pyo.UnitInterval)         # 1 for the chosen design (binary; see _solve_once)
    m.is_mip = False                                             # True once the binaries are restored
    picks = [m.pick[i] for i in range(len(index))]
    m.one_design = pyo.Constraint(expr=LinearExpression(constant=0.0, linear_coefs=[1.0] * len(picks),
                                                        linear_vars=picks) == 1)
    limits = limit_table(space.case, d)
    m.LIMITS = pyo.Set(initialize=[c.name for c in limits])     # limits the scenario sets
    by_name = {c.name: c for c in limits}

    def limit_rule(model, name):                                 # sum_d value[c, d] pick[d] <= bound[c]
        # Each row is divided by |bound|: an outlet spec of 1e-9 would otherwise sit far
        # below HiGHS's feasibility tolerance (1e-7) and be met by any design.
        c = by_name[name]
        scale = 1.0 / abs(c.bound) if c.bound != 0 else 1.0 / max(float(np.max(np.abs(c.values))), 1e-300)
        return (LinearExpression(constant=0.0, linear_coefs=(c.values * scale).tolist(), linear_vars=picks)
                <= c.bound * scale)

    m.limit = pyo.Constraint(m.LIMITS, rule=limit_rule)
    m.annualized_cost = pyo.Objective(                           # total annualized cost [USD/yr]
        expr=LinearExpression(constant=0.0, linear_coefs=cost, linear_vars=picks), sense=pyo.minimize
    )
    return m


def _solver():
    from pyomo.contrib.appsi.solvers import Highs

    opt = Highs()
    opt.config.load_solution = False
    # Presolve off: on this one-row-per-limit model it costs more than it saves
    # (measured: 113 ms per solve with it, 31 ms without, 1590 binaries).
    opt.highs_options = {"mip_rel_gap": 0.0, "mip_abs_gap": 0.0, "output_flag": False, "threads": 1,
                         "presolve": "off"}
    # Changes are pushed by hand (update_variables), so the solver need not rescan the model.
    uc = opt.update_config
    for flag in ("check_for_new_or_removed_constraints", "check_for_new_or_removed_vars",
                 "check_for_new_or_removed_params", "check_for_new_objective", "update_constraints",
                 "update_vars", "update_params", "update_named_expressions", "update_objective"):
        setattr(uc, flag, False)
    return opt


def _solve_once(opt, m):
    """Solve; return the chosen position and the objective, or None if infeasible.

    The relaxation (0 <= pick <= 1) is solved first: it is an LP, and when
    its optimum is integral, as it is unless a limit binds between two
    designs, that optimum is the MIP optimum as well. Otherwise the binaries
    are restored and HiGHS solves the MIP with both gaps at zero; the model
    stays a MIP from then on.
    """
    from pyomo.contrib.appsi.base import TerminationCondition

    while True:
        result = opt.solve(m)
        condition = result.termination_condition
        if condition in (TerminationCondition.infeasible, TerminationCondition.infeasibleOrUnbounded):
            return None
        if condition != TerminationCondition.optimal:
            if not m.is_mip:  # let the MIP settle what the relaxation could not
                _restore_binaries(opt, m)
                continue
            raise RuntimeError(f"HiGHS stopped with {condition.name}")
        result.solution_loader.load_vars()
        values = np.array([v.value or 0.0 for v in m.pick.values()])
        integral = np.all((values < 1e-9) | (values > 1 - 1e-9))
        if integral or m.is_mip:
            return int(np.argmax(values)), float(result.best_feasible_objective)
        _restore_binaries(opt, m)


def _restore_binaries(opt, m) -> None:
    import pyomo.environ as pyo

    m.is_mip = True
    picks = list(m.pick.values())
    for v in picks:
        v.domain = pyo.Binary
    opt.update_variables(picks)


def solve(space: Space, top: int = 1, *, per_agent: bool = True, reduce: bool = True) -> ModelRun:
    """Solve for the ``top`` best distinct designs (and the best of each agent).

    Raises InfeasibleSpec, with the reason in the user's terms, when no
    alternative meets the spec and every limit.
    """
    import pyomo.environ  # noqa: F401  - loaded before the clock starts: import is not build time

    start = time.perf_counter()
    index = space.undominated(max(top, 1)) if reduce else np.arange(len(space.designs))
    if index.size == 0:
        raise InfeasibleSpec(infeasible_reason(space))
    m = build_model(space, index)
    opt = _solver()
    opt.set_instance(m)
    built = time.perf_counter()
    order, objective, solves = [], [], 0
    picks = list(m.pick.values())
    while len(order) < top:
        found = _solve_once(opt, m)
        solves += 1
        if found is None:
            break
        position, value = found
        picks[position].setub(0)                       # no-good cut for a one-hot choice
        opt.update_variables([picks[position]])
        if not space.feasible[index[position]]:
            continue  # met a limit only within the solver's tolerance: excluded, solve again
        order.append(int(index[position]))
        objective.append(value)
    if not order:
        raise InfeasibleSpec(infeasible_reason(space))
    best_of: dict[int, int] = {}
    if per_agent:
        # The best of each agent needs only the best alternative of each group: a smaller model.
        small = space.undominated(1)
        m1 = build_model(space, small)
        opt1 = _solver()
        opt1.set_instance(m1)
        picks1 = list(m1.pick.values())
        agent_of = space.designs.agent[small]
        for a in np.unique(agent_of):
            others = [p for p, ag in zip(picks1, agent_of) if ag != a]
            for p in others:
                p.setub(0)
            opt1.update_variables(others)
            excluded = []
            while True:
                found = _solve_once(opt1, m1)
                solves += 1
                if found is None or space.feasible[small[found[0]]]:
                    break
                excluded.append(picks1[found[0]])  # within tolerance only: exclude, solve again
                excluded[-1].setub(0)
                opt1.update_variables(excluded[-1:])
            if found is not None:
                best_of[int(a)] = int(small[found[0]])
            for p in others + excluded:
                p.setub(1)
            opt1.update_variables(others + excluded)
    done = time.perf_counter()
    return ModelRun(order=order, objective=objective, alternatives=int(index.size),
                    alternatives_total=len(space.designs), build_seconds=built - start,
                    solve_seconds=done - built, solves=solves, per_agent=best_of)
