"""The design space of a case, evaluated exactly, kept compact.

``build_space`` enumerates the flowsheet's alternatives in chunks, evaluates
each chunk exactly (``SingleColumn.evaluate``) and keeps only what selection
and ranking need: the decisions, the total annualized cost, whether every
limit is met, whether the point is the least rate of its group, and the
columns of any shared resources asked for. Peak memory stays near one
chunk's full evaluation plus 35 bytes per alternative.

A ``Space`` re-evaluates any subset of its alternatives in full on demand
(``designs``); the figures reported are always such re-evaluations.

Ties in cost are ordered by one key everywhere (``TIE_KEY``): cost, then
fewer trays (a packed bed: fewer theoretical stages), then lower rate, then
smaller diameter, then candidate order, then internals order (the tray types,
then the packings in the scenario's order): the internals come last, so
that a scenario without packings keeps the order it always had.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, field

import numpy as np

from towercost.design.case import Case
from towercost.design.column import CHUNK, SingleColumn
from towercost.design.loop import flowsheet_for
from towercost.design.designs import Designs
from towercost.design.internals import FIRST_PACKING
from towercost.design.limits import limit_table

#: The order of alternatives of equal cost, first key first.
TIE_KEY = ("annualized cost", "fewer trays", "lower rate", "smaller diameter", "candidate order", "internals order")

#: Shared resources a space can keep a column of (figure names of ``Designs``).
RESOURCES = ("installed", "electric_power", "steam_rate", "cooling_rate")

#: The loads a shared regenerator sums (figures of a loop case's designs; 0 for a design without a loop).
LOOP_LOADS = ("regenerator_liquid_mass", "regenerator_vapour_mass")


@dataclass
class LimitFloor:
    """The least value any spec-meeting design reached for one limit: why no design qualifies, in figures."""

    label: str
    unit: str
    bound: float
    least: float = np.inf


@dataclass
class Space:
    """Every alternative of a case, evaluated: the one input of the selection model and of the scan."""

    case: Case
    flowsheet: SingleColumn
    agent: np.ndarray            # candidate index
    trays: np.ndarray            # real trays
    rate: np.ndarray             # agent rate [mol/s]
    diameter: np.ndarray         # shell diameter [m]
    internals: np.ndarray        # internals (index into flowsheet.internals.names: tray types, then packings)
    cost: np.ndarray             # total annualized cost [USD/yr]
    feasible: np.ndarray         # meets every spec and every limit
    least: np.ndarray            # the least rate of its (agent, trays) group
    usage: dict[str, np.ndarray] = field(default_factory=dict)   # shared-resource columns kept
    floors: dict[str, LimitFloor] = field(default_factory=dict)  # per limit, over spec-meeting designs
    spec_met: int = 0            # alternatives that meet every spec
    agents: np.ndarray = field(default_factory=lambda: np.zeros(0, int))   # candidates covered

    def __len__(self) -> int:
        return int(self.agent.shape[0])

    @property
    def ratio(self) -> np.ndarray:
        """Agent rate over its minimum (L/Lmin or G/Gmin)."""
        with np.errstate(divide="ignore", invalid="ignore"):
            return self.rate / self.flowsheet.rate_min[self.agent]

    @property
    def family(self) -> np.ndarray:
        """0 for trays (either type), 1 + p for the p-th packing: what the listings tell apart."""
        return np.maximum(self.internals.astype(np.int64) - FIRST_PACKING + 1, 0)

    @property
    def candidate(self) -> np.ndarray:
        """The candidate each alternative counts under in the listings: its agent, or for a regenerated loop the
        first lean level of its solvent (every lean level of one solvent is one candidate there)."""
        representative = getattr(self.flowsheet, "representative", None)
        agent = self.agent.astype(np.int64)
        return agent if representative is None else representative[agent]

    @property
    def kind(self) -> np.ndarray:
        """The candidate and internals family of each alternative, as one integer (the candidate alone without packings).

        Each kind's best design is reported ("the best of each candidate", and
        of each of its internals where the case offers packings).
        """
        return self.candidate * (1 + len(self.case.packings)) + self.family

    def kind_of(self, kind: int) -> tuple[int, int]:
        """(candidate index, internals family) of a ``kind``."""
        return divmod(int(kind), 1 + len(self.case.packings))

    @property
    def group(self) -> np.ndarray:
        """The (agent, internals family, count) group of each alternative, as one integer.

        The count is real trays, or a packed bed's theoretical stages; a case
        without packings keeps the (agent, trays) numbering.
        """
        case = self.case
        lo = min(case.trays_range[0], case.stages_range[0]) if case.packings else case.trays_range[0]
        hi = max(case.trays_range[1], case.stages_range[1]) if case.packings else case.trays_range[1]
        families = 1 + len(case.packings)
        return (self.agent.astype(np.int64) * families + self.family) * (hi - lo + 1) + (self.trays - lo)

    def tie_order(self, index=None) -> np.ndarray:
        """``index`` (default: all) sorted by ``TIE_KEY``."""
        index = np.arange(len(self)) if index is None else np.asarray(index, dtype=int)
        order = np.lexsort((self.internals[index], self.agent[index], self.diameter[index], self.rate[index],
                            self.trays[index], self.cost[index]))
        return index[order]

    def designs(self, index) -> Designs:
        """The alternatives at ``index``, re-evaluated in full (one call), in the order given."""
        index = np.asarray(index, dtype=int)
        return self.flowsheet.evaluate(self.agent[index], self.trays[index], self.rate[index], self.diameter[index],
                                       self.internals[index])

    def full(self) -> Designs:
        """Every alternative in full (for small spaces: tests, curves)."""
        return self.designs(np.arange(len(self)))

    def to_frame(self):
        """The compact table as pandas: decisions, cost, feasibility, least-rate flag, kept resources."""
        import pandas as pd

        frame = pd.DataFrame({"agent": np.asarray(self.case.agents, dtype=object)[self.agent], "trays": self.trays,
                              "rate": self.rate, "ratio": self.ratio, "diameter": self.diameter,
                              "internals": np.asarray(self.flowsheet.internals.names, dtype=object)[self.internals],
                              "annualized": self.cost, "feasible": self.feasible, "least": self.least})
        for name, values in self.usage.items():
            frame[name] = values
        return frame


class _Columns:
    """Columns filled in place, chunk by chunk, grown in place (``ndarray.resize``: no second copy).

    Large arrays are reallocated by the C library in place (``mremap``), so
    growing touches no more memory than the rows written.
    """

    def __init__(self, dtypes: dict, capacity: int, limit: int):
        self.capacity = max(1, min(capacity, limit))
        self.limit = limit
        self.columns = {name: np.empty(self.capacity, dtype) for name, dtype in dtypes.items()}
        self.size = 0

    def append(self, values: dict, n: int) -> None:
        end = self.size + n
        if end > self.limit:   # not expected: the estimate is an upper bound
            raise RuntimeError(f"the space outgrew its estimate of {self.limit:,} alternatives")
        if end > self.capacity:
            self.capacity = min(self.limit, max(end, int(self.capacity * 1.5)))
            for column in self.columns.values():
                column.resize(self.capacity, refcheck=False)
        for name, column in self.columns.items():
            column[self.size:end] = values[name]
        self.size = end

    def finish(self) -> dict[str, np.ndarray]:
        for column in self.columns.values():
            column.resize(self.size, refcheck=False)
        return self.columns


def build_space(case: Case, agents=None, *, keep: tuple[str, ...] = (), chunk: int = CHUNK,
                progress: Callable[[int, int], None] | None = None) -> Space:
    """Evaluate every alternative of the case (or of the candidates ``agents``).

    ``keep`` names shared-resource figures (from ``RESOURCES``) to keep a
    column of; ``progress(done, expected)`` is called after each chunk, with
    ``expected`` projected from the share of (agent, trays) groups done.
    """
    flowsheet = flowsheet_for(case)
    chosen = np.arange(len(case.agents)) if agents is None else np.asarray(agents, dtype=int)
    share = chosen.size / max(len(case.agents), 1)
    estimate = int(flowsheet.estimate() * share)
    dtypes = {"agent": np.int32, "trays": np.int32, "rate": float, "diameter": float, "internals": np.int8,
              "cost": float, "feasible": bool, "least": bool, **{name: float for name in keep}}
    store = _Columns(dtypes, int(flowsheet.typical() * share), estimate)
    floors: dict[str, LimitFloor] = {}
    spec_met = 0
    for batch in flowsheet.alternatives(chosen, chunk):
        separated = flowsheet.separate(batch.agent, batch.trays.astype(float), batch.rate, batch.internals)
        # the same separation in each shell offered: only sizing and cost change
        for index, designs in flowsheet.shells(separated):
            values = {"agent": designs.agent, "trays": designs.trays, "rate": designs.rate,
                      "diameter": designs.diameter, "internals": designs.internals, "cost": designs.annualized,
                      "feasible": designs.within_limits, "least": batch.least[index],
                      **{name: getattr(designs, name) for name in keep}}
            store.append(values, len(designs))
            spec_met += _gather_floors(case, designs, floors)
        if progress is not None:
            done_groups, all_groups = batch.progress
            expected = store.size * all_groups // max(done_groups, 1)
            progress(store.size, max(expected, store.size))
    if progress is not None:
        progress(store.size, store.size)
    columns = store.finish()
    usage = {name: columns.pop(name) for name in keep}
    return Space(case=case, flowsheet=flowsheet, usage=usage, floors=floors, spec_met=spec_met, agents=chosen,
                 **columns)


def _gather_floors(case: Case, designs: Designs, floors: dict[str, LimitFloor]) -> int:
    """Update, per limit, the least value among spec-meeting designs; return how many met the spec."""
    limits = designs.limits or limit_table(case, designs)
    meets = np.ones(len(designs), bool)
    for limit in limits:
        if limit.is_spec:
            meets &= limit.met
    for limit in limits:
        if limit.is_spec or limit.name.startswith("ratio"):
            continue
        floor = floors.setdefault(limit.name, LimitFloor(limit.label, limit.unit, limit.bound))
        there = meets & limit.applies          # a limit of other internals does not count here
        if there.any():
            floor.least = min(floor.least, float(np.min(limit.values[there])))
    return int(meets.sum())
