r"""The selection model: one design per unit at the least total annualized cost, under shared limits.

Formulation (Pyomo; solved by HiGHS):

    sets         U                     units (towers) to design
                 A = {(u, d)}          alternatives d of unit u (discrete designs, exactly evaluated)
                 O                     options beside the designs (e.g. a shared regenerator's size)
                 R                     shared limits (a site's capital budget, steam or power cap)
                 L                     link rows (one solvent per group, exclusive or must-pick choices)
    parameters   cost[u, d], cost[o]   total annualized cost [USD/yr], from towercost.models
                 use[r, u, d], use[r, o]  what an alternative or option takes of resource r
                 cap[r]                the bound of shared limit r
                 a[l, u, d], a[l, o], b[l]  the coefficients and right-hand side of link row l
    variables    pick[u, d] in {0, 1}  1 for the design chosen for unit u
                 choose[o] in {0, 1}   1 for an option taken
    constraints  one_design[u]:        sum_d pick[u, d] = 1                                   for u in U
                 shared_limit[r]:      sum_(u,d) use pick + sum_o use choose <= cap[r]        for r in R
                 link[l]:              sum_(u,d) a pick + sum_o a choose (<= or =) b[l]       for l in L
    objective    annualized_cost:      minimize sum_(u,d) cost pick + sum_o cost choose

What the model carries and what it does not: every limit that is a property
of one design (outlet specs, flooding, height, diameter, the ratio range, an
existing shell, and, for a single unit, its budget, power and steam caps) is
applied in numpy before the model is built (``towercost.design.limits``), so
every alternative the model sees meets its own unit's limits. The model
carries only what couples choices: one design per unit and the shared limits.
With one unit and no shared limit its LP relaxation is integral.

Solving: the Pyomo model is built from plain data (``Unit``, ``SharedLimit``);
its matrix is read back from the model's constraints and objective and handed
to HiGHS (highspy) once; the k best distinct choices come from repeated solves
in the same HiGHS instance, each adding the no-good cut of the previous choice
(for one unit: that alternative's bound set to 0). The LP relaxation is solved
first; if it is fractional the binaries are restored and HiGHS solves the MIP
with both gaps at zero. Shared-limit rows are divided by their bound so that
small bounds stay above HiGHS's feasibility tolerance.

Distinct choices: a query may name a group for every alternative of a unit
(``distinct``: the same candidate and tray count, say). Each pick then
excludes its whole group, not only itself: for one unit every alternative of
the picked group gets the bound 0; for several units the cut is

    group_cut[k]:  sum_u sum_(d in G_u(k)) pick[u, d] <= |U| - 1

over the groups G_u(k) of the k-th choice, which forbids the same tuple of
groups again. The k best distinct choices are then the k best tuples of
groups, each at its best alternatives.

Ties: after each solve, each unit's pick is replaced by the alternative that
comes first in the tie order among those of no greater cost and no greater use
of any shared resource (so the choice stays feasible and no dearer); the
choice then matches the exhaustive scan's, which sorts by the same key.

Pyomo objects never leave this module; only ``pyomo.core`` is imported (not
``pyomo.environ``), inside the functions that build the model.
"""

from __future__ import annotations

import time
from dataclasses import dataclass, field

import numpy as np

from towercost.design.limits import SPEC_TOLERANCE


@dataclass
class Unit:
    """One unit's alternatives as the model sees them: all meet the unit's own limits."""

    name: str
    cost: np.ndarray                                          # (n,) [USD/yr]
    rank: np.ndarray                                          # (n,) position in the tie order; lower first
    usage: dict[str, np.ndarray] = field(default_factory=dict)   # resource -> (n,)
    label: np.ndarray | None = None                           # (n,) what a caller maps picks back to
    group: np.ndarray | None = None                           # (n,) alternatives ties may swap within

    def __len__(self) -> int:
        return int(self.cost.shape[0])


@dataclass(frozen=True)
class SharedLimit:
    """A limit over the sum of one resource across units."""

    name: str
    resource: str
    bound: float
    label: str = ""


@dataclass(frozen=True)
class Option:
    """A yes/no choice beside the units' designs, with its yearly cost and its use of shared resources."""

    name: str
    cost: float = 0.0                                               # [USD/yr]
    usage: dict[str, float] = field(default_factory=dict)           # resource -> use when taken


@dataclass(frozen=True)
class LinkRow:
    """A linear row over picks and options: sum a pick + sum a choose (<= or ==) rhs."""

    name: str
    picks: tuple[tuple[int, np.ndarray, np.ndarray], ...]   # (unit, alternative indices, coefficients)
    options: tuple[tuple[int, float], ...] = ()             # (option index, coefficient)
    sense: str = "<="                                       # "<=" or "=="
    rhs: float = 0.0


@dataclass
class Selection:
    """What the model chose, as plain data: per solution, one alternative index per unit."""

    choices: list[tuple[int, ...]]     # best first; indices into each unit's arrays
    objective: list[float]             # model objective of each [USD/yr], options included
    options: list[tuple[int, ...]] = field(default_factory=list)   # per choice, the options taken
    binaries: int = 0
    build_seconds: float = 0.0
    solve_seconds: float = 0.0
    solves: int = 0


class Infeasible(Exception):
    """No choice meets the shared limits (or every alternative is excluded)."""


def build_model(units: list[Unit], shared: list[SharedLimit], options: list[Option] = (),
                links: list[LinkRow] = ()):
    """The Pyomo model of the formulation above, from plain data."""
    from pyomo.core import Binary, ConcreteModel, Constraint, Objective, Param, Set, Var, minimize
    from pyomo.core.expr.numeric_expr import LinearExpression

    options, links = list(options), list(links)
    m = ConcreteModel("annualized cost")
    m.UNITS = Set(initialize=range(len(units)), ordered=True)                     # units to design
    alternatives = [(u, d) for u, unit in enumerate(units) for d in range(len(unit))]
    m.ALTERNATIVES = Set(initialize=alternatives, dimen=2, ordered=True)          # (unit, design)
    m.OPTIONS = Set(initialize=range(len(options)), ordered=True)                 # options beside the designs
    m.RESOURCES = Set(initialize=range(len(shared)), ordered=True)                # shared limits
    m.LINKS = Set(initialize=range(len(links)), ordered=True)                     # link rows
    m.cost = Param(m.ALTERNATIVES, initialize={(u, d): float(c) for u, unit in enumerate(units)
                                                for d, c in enumerate(unit.cost)})
    m.option_cost = Param(m.OPTIONS, initialize={o: float(opt.cost) for o, opt in enumerate(options)})
    m.cap = Param(m.RESOURCES, initialize={r: float(s.bound) for r, s in enumerate(shared)})
    m.pick = Var(m.ALTERNATIVES, within=Binary)                                    # 1 for the chosen design
    m.choose = Var(m.OPTIONS, within=Binary)                                       # 1 for an option taken
    by_unit = [[m.pick[u, d] for d in range(len(unit))] for u, unit in enumerate(units)]

    def one_design(model, u):                                                      # sum_d pick[u, d] = 1
        return LinearExpression(linear_coefs=[1.0] * len(by_unit[u]), linear_vars=by_unit[u]) == 1

    def shared_limit(model, r):                                                    # sum use pick <= cap
        # Divided by |cap|: a small bound would otherwise sit below HiGHS's feasibility tolerance.
        limit = shared[r]
        scale = 1.0 / abs(model.cap[r]) if model.cap[r] != 0 else 1.0
        coefs, variables = [], []
        for u, unit in enumerate(units):
            use = unit.usage.get(limit.resource)
            if use is not None:
                nonzero = np.flatnonzero(use)
                coefs += (use[nonzero] * scale).tolist()
                variables += [by_unit[u][d] for d in nonzero]
        for o, opt in enumerate(options):
            if opt.usage.get(limit.resource, 0.0):
                coefs.append(opt.usage[limit.resource] * scale)
                variables.append(model.choose[o])
        return LinearExpression(linear_coefs=coefs, linear_vars=variables) <= model.cap[r] * scale

    def link(model, k):                                                            # sum a pick + a choose ? b
        row = links[k]
        coefs, variables = [], []
        for u, index, values in row.picks:
            coefs += np.asarray(values, dtype=float).tolist()
            variables += [by_unit[u][int(d)] for d in index]
        for o, value in row.options:
            coefs.append(float(value))
            variables.append(model.choose[o])
        body = LinearExpression(linear_coefs=coefs, linear_vars=variables)
        return body == row.rhs if row.sense == "==" else body <= row.rhs

    m.one_design = Constraint(m.UNITS, rule=one_design)
    m.shared_limit = Constraint(m.RESOURCES, rule=shared_limit)
    m.link = Constraint(m.LINKS, rule=link)
    m.annualized_cost = Objective(expr=LinearExpression(                          # [USD/yr]
        linear_coefs=[m.cost[a] for a in m.ALTERNATIVES] + [m.option_cost[o] for o in m.OPTIONS],
        linear_vars=[m.pick[a] for a in m.ALTERNATIVES] + [m.choose[o] for o in m.OPTIONS]),
        sense=minimize)
    return m


def _matrix(m):
    """The model's linear data read back from its components: costs, column-wise matrix, row bounds."""
    from pyomo.core import Constraint, Var

    columns = {id(v): j for j, v in enumerate(m.component_data_objects(Var, descend_into=True))}
    cost = np.zeros(len(columns))
    objective = m.annualized_cost.expr
    for coef, var in zip(objective.linear_coefs, objective.linear_vars):
        cost[columns[id(var)]] += coef
    rows, cols, vals, lower, upper = [], [], [], [], []
    for i, con in enumerate(m.component_data_objects(Constraint, active=True, descend_into=True)):
        body = con.body
        for coef, var in zip(body.linear_coefs, body.linear_vars):
            rows.append(i)
            cols.append(columns[id(var)])
            vals.append(coef)
        lower.append(-np.inf if con.lower is None else float(con.lower))
        upper.append(np.inf if con.upper is None else float(con.upper))
    return cost, np.array(rows, int), np.array(cols, int), np.array(vals, float), np.array(lower), np.array(upper)


def _quiet(make):
    """Call ``make()`` with the process's standard output closed: HiGHS prints a banner as it is created."""
    import os
    import sys

    sys.stdout.flush()
    saved = os.dup(1)
    try:
        with open(os.devnull, "w") as null:
            os.dup2(null.fileno(), 1)
            return make()
    finally:
        os.dup2(saved, 1)
        os.close(saved)


class _Solver:
    """One HiGHS instance holding the model's matrix; what changes between solves lives here, not on the model."""

    def __init__(self, m):
        import highspy

        self.highspy = highspy
        cost, rows, cols, vals, lower, upper = _matrix(m)
        self.n = cost.size
        order = np.lexsort((rows, cols))
        rows, cols, vals = rows[order], cols[order], vals[order]
        lp = highspy.HighsLp()
        lp.num_col_, lp.num_row_ = self.n, lower.size
        lp.col_cost_ = cost
        lp.col_lower_ = np.zeros(self.n)
        lp.col_upper_ = np.ones(self.n)
        lp.row_lower_, lp.row_upper_ = lower, upper
        lp.a_matrix_.format_ = highspy.MatrixFormat.kColwise
        lp.a_matrix_.start_ = np.searchsorted(cols, np.arange(self.n + 1)).astype(np.int32)
        lp.a_matrix_.index_ = rows.astype(np.int32)
        lp.a_matrix_.value_ = vals
        self.h = _quiet(highspy.Highs)
        # Presolve off: on these one-design-per-unit models it costs more than it saves (measured on the
        # demo site, 1,761 binaries, top 5: 4.3 s of solves with it, 1.1 s without).
        for option, value in (("output_flag", False), ("threads", 1), ("mip_rel_gap", 0.0), ("mip_abs_gap", 0.0),
                              ("presolve", "off")):
            self.h.setOptionValue(option, value)
        self.h.passModel(lp)
        self.upper = np.ones(self.n)
        self.is_mip = False

    def set_upper(self, columns, value: float) -> None:
        columns = np.asarray(columns, dtype=np.int32)
        if columns.size:
            self.upper[columns] = value
            self.h.changeColsBounds(columns.size, columns, np.zeros(columns.size), np.full(columns.size, value))

    def add_no_good(self, columns, bound: float | None = None) -> None:
        """Forbid choosing all of ``columns`` together again: their sum at most ``bound`` (default: count - 1)."""
        columns = np.asarray(columns, dtype=np.int32)
        bound = float(columns.size - 1) if bound is None else float(bound)
        self.h.addRow(-np.inf, bound, columns.size, columns, np.ones(columns.size))

    def solve(self) -> tuple[np.ndarray, float] | None:
        """Column values and objective of an optimal choice, or None when none exists."""
        status_type = self.highspy.HighsModelStatus
        while True:
            self.h.run()
            status = self.h.getModelStatus()
            if status in (status_type.kInfeasible, status_type.kUnboundedOrInfeasible):
                return None
            if status != status_type.kOptimal:
                if not self.is_mip:
                    self._restore_binaries()
                    continue
                raise RuntimeError(f"HiGHS stopped with status {self.h.modelStatusToString(status)}")
            values = np.asarray(self.h.getSolution().col_value)
            integral = np.all((values < INTEGRALITY) | (values > 1 - INTEGRALITY))
            if integral or self.is_mip:
                return values, float(self.h.getInfo().objective_function_value)
            self._restore_binaries()

    def relax(self) -> None:
        """Back to the LP relaxation (binaries to continuous [0, 1])."""
        if self.is_mip:
            self.is_mip = False
            self.h.changeColsIntegrality(self.n, np.arange(self.n, dtype=np.int32),
                                         np.full(self.n, self.highspy.HighsVarType.kContinuous))

    def _restore_binaries(self) -> None:
        self.is_mip = True
        self.h.changeColsIntegrality(self.n, np.arange(self.n, dtype=np.int32),
                                     np.full(self.n, self.highspy.HighsVarType.kInteger))


def _polish(units: list[Unit], offsets: np.ndarray, allowed: np.ndarray, choice: list[int]) -> list[int]:
    """Each unit's pick replaced by the first in tie order among allowed ones of its group, no dearer, using no more."""
    polished = []
    for u, (unit, d) in enumerate(zip(units, choice)):
        mask = allowed[offsets[u]:offsets[u + 1]] & (unit.cost <= unit.cost[d])
        if unit.group is not None:
            mask &= unit.group == unit.group[d]
        for values in unit.usage.values():
            mask &= values <= values[d]
        candidates = np.flatnonzero(mask)
        best = candidates[np.lexsort((unit.rank[candidates], unit.cost[candidates]))[0]] if candidates.size else d
        polished.append(int(best))
    return polished


#: A relaxation value this close to 0 or 1 counts as integral.
INTEGRALITY = 1e-9

#: Choices met only within the solver's tolerance that may be cut off before giving up.
MAX_REJECTED = 100


def _slack(value: float, bound: float) -> float:
    """The largest total that still meets ``bound`` (the project's spec tolerance, absolute near zero)."""
    return bound + SPEC_TOLERANCE * max(abs(bound), 1.0)


def _exact(units: list[Unit], shared, options: list[Option], links: list[LinkRow], choice: list[int],
           taken: list[int]) -> bool:
    """The choice meets every shared limit and link row exactly (to the project's spec tolerance)."""
    for limit in shared:
        total = sum(float(unit.usage[limit.resource][d]) for unit, d in zip(units, choice) if limit.resource in unit.usage)
        total += sum(options[o].usage.get(limit.resource, 0.0) for o in taken)
        if total > _slack(total, limit.bound):
            return False
    for row in links:
        total = 0.0
        for u, index, values in row.picks:
            hit = np.flatnonzero(np.asarray(index) == choice[u])
            total += float(np.asarray(values)[hit].sum())
        total += sum(value for o, value in row.options if o in taken)
        if row.sense == "==" and abs(total - row.rhs) > SPEC_TOLERANCE * max(abs(row.rhs), 1.0):
            return False
        if row.sense == "<=" and total > _slack(total, row.rhs):
            return False
    return True


class SelectionModel:
    """The model built once over its units; ``best`` answers one top-k query at a time."""

    def __init__(self, units: list[Unit], shared: list[SharedLimit] = (), options: list[Option] = (),
                 links: list[LinkRow] = ()):
        import highspy  # noqa: F401 - loaded before the clock starts: an import is not build time
        import pyomo.core  # noqa: F401

        start = time.perf_counter()
        self.units, self.shared = list(units), list(shared)
        self.options, self.links = list(options), list(links)
        self.model = build_model(self.units, self.shared, self.options, self.links)
        self.solver = _Solver(self.model)
        self.offsets = np.concatenate([[0], np.cumsum([len(u) for u in self.units])]).astype(int)
        self.build_seconds = time.perf_counter() - start
        self.solve_seconds = 0.0
        self.solves = 0

    @property
    def binaries(self) -> int:
        return self.solver.n

    def _cost(self, choice, taken) -> float:
        return float(sum(self.units[u].cost[d] for u, d in enumerate(choice))
                     + sum(self.options[o].cost for o in taken))

    def best(self, top: int = 1, restrict: list[np.ndarray | None] | None = None,
             distinct: list[np.ndarray | None] | None = None) -> Selection:
        """The ``top`` best distinct choices (one alternative per unit), best first.

        ``restrict`` optionally gives, per unit, a boolean mask of the
        alternatives allowed. ``distinct`` optionally gives, per unit, a group
        label for each alternative: a pick then excludes its whole group (the
        choices differ in at least one unit's group); None keeps each
        alternative its own group. Raises ``Infeasible`` when no choice
        exists. Exclusions and cuts of one query are undone before the next.
        """
        start = time.perf_counter()
        solver, units, offsets = self.solver, self.units, self.offsets
        first_row = solver.h.getNumRow()
        if restrict is not None:
            for u, mask in enumerate(restrict):
                if mask is not None:
                    solver.set_upper(offsets[u] + np.flatnonzero(~np.asarray(mask, bool)), 0.0)
        groups = [np.arange(len(unit)) if distinct is None or distinct[u] is None else np.asarray(distinct[u])
                  for u, unit in enumerate(units)]
        choices: list[tuple[int, ...]] = []
        taken_options: list[tuple[int, ...]] = []
        picked: list[tuple] = []           # the groups of each choice made
        objective: list[float] = []
        single = len(units) == 1 and not self.options and not self.links
        first_option = int(offsets[-1])
        rejected = 0
        solves = 0
        try:
            while len(choices) < top:
                found = solver.solve()
                solves += 1
                if found is None:
                    break
                values, _ = found
                raw = [int(np.argmax(values[offsets[u]:offsets[u + 1]])) for u in range(len(units))]
                taken = [o for o in range(len(self.options)) if values[first_option + o] > 0.5]
                choice = _polish(units, offsets, solver.upper > 0.5, raw)
                if (not single and tuple(groups[u][d] for u, d in enumerate(choice)) in picked) or not _exact(
                        units, self.shared, self.options, self.links, choice, taken):
                    choice = raw
                key = tuple(groups[u][d] for u, d in enumerate(choice))
                within = _exact(units, self.shared, self.options, self.links, choice, taken)
                if within:   # the group cut: every alternative of each picked group
                    columns = np.concatenate([offsets[u] + np.flatnonzero(groups[u] == groups[u][d])
                                              for u, d in enumerate(choice)])
                else:        # only this choice: others of its groups may still meet the limit
                    columns = np.array([offsets[u] + d for u, d in enumerate(choice)])
                if single:
                    solver.set_upper(columns, 0.0)            # the cut of a one-hot choice: bounds to 0
                else:
                    solver.add_no_good(columns, bound=len(units) - 1)
                if not within:
                    # met a shared limit only within the solver's tolerance: cut off, not reported
                    rejected += 1
                    if rejected > MAX_REJECTED:
                        raise RuntimeError(f"HiGHS returned {rejected} choices that break a shared limit; "
                                           "the limits may be badly scaled")
                    continue
                choices.append(tuple(choice))
                taken_options.append(tuple(taken))
                picked.append(key)
                objective.append(self._cost(choice, taken))
        finally:
            solver.set_upper(np.arange(solver.n), 1.0)
            added = solver.h.getNumRow() - first_row
            if added:
                solver.h.deleteRows(added, np.arange(first_row, first_row + added, dtype=np.int32))
        self.solves += solves
        elapsed = time.perf_counter() - start
        self.solve_seconds += elapsed
        if not choices:
            raise Infeasible("no choice of one design per unit meets the shared limits")
        return Selection(choices=choices, objective=objective, options=taken_options, binaries=solver.n,
                         build_seconds=self.build_seconds, solve_seconds=elapsed, solves=solves)

    def best_without(self, limit: str) -> float:
        """The best joint choice's cost with one shared limit lifted (the others kept) [USD/yr]."""
        r = [s.name for s in self.shared].index(limit)
        row = len(self.units) + r                    # rows: one_design per unit, then the shared limits
        bound = self.solver.h.getLp().row_upper_[row]
        self.solver.h.changeRowBounds(row, -np.inf, np.inf)
        saved, self.shared = self.shared, [s for s in self.shared if s.name != limit]
        try:
            return self.best(1).objective[0]
        finally:
            self.shared = saved
            self.solver.h.changeRowBounds(row, -np.inf, bound)

    def fixed_choice_lp(self, groups: list[np.ndarray]) -> tuple[float, dict[str, float]]:
        """The LP of a fixed choice: its optimum [USD/yr] and the shared limits' shadow values.

        The LP keeps each unit's design within its chosen group (``groups``:
        per unit, the alternatives of the chosen candidate and trays) and the
        options free, with every binary relaxed to [0, 1]. A shadow value is
        the yearly cost saved by one more unit of the limit there [USD/yr per
        USD of budget, per W, per kg/s of steam...]: the dual of its row.
        """
        solver, offsets = self.solver, self.offsets
        solver.relax()
        try:
            for u, members in enumerate(groups):
                mask = np.zeros(len(self.units[u]), bool)
                mask[np.asarray(members, dtype=int)] = True
                solver.set_upper(offsets[u] + np.flatnonzero(~mask), 0.0)
            solver.h.run()
            duals = np.asarray(solver.h.getSolution().row_dual)
            objective = float(solver.h.getInfo().objective_function_value)
        finally:
            solver.set_upper(np.arange(solver.n), 1.0)
        first = len(self.units)                      # rows: one_design per unit, then the shared limits
        shadow = {}
        for r, limit in enumerate(self.shared):
            scale = 1.0 / abs(limit.bound) if limit.bound != 0 else 1.0
            shadow[limit.name] = float(-duals[first + r] * scale)
        return objective, shadow


def solve(units: list[Unit], shared: list[SharedLimit] = (), top: int = 1, *, options: list[Option] = (),
          links: list[LinkRow] = (), restrict: list[np.ndarray | None] | None = None,
          distinct: list[np.ndarray | None] | None = None) -> Selection:
    """Build the model over ``units`` and return its ``top`` best distinct choices."""
    return SelectionModel(units, shared, options, links).best(top, restrict, distinct)
