"""One input at a time: how the best design's cost and spec, and the best design itself, move.

Each input of ``INPUTS`` is changed down and up by a fraction of its
nominal value (default +-20 %, ``[uncertainty] change``; per input
``[uncertainty.changes]``, a number c for +-c or a pair [low, high]), all
others held (``variation.varied_case``). For each change:

* the fixed design (the nominal best: candidate, trays, rate in mol/s and
  shell) is evaluated exactly: its annualized cost, whether it still meets
  every spec and every limit of the plant;
* the case is re-optimized (the whole space evaluated and scanned, as
  ``towercost optimize --method scan``): the new best design and its cost,
  or why no design qualifies.

Inputs whose nominal value is zero (a price the scenario does not charge)
are not varied and are listed as such. Rows are ordered by their largest
swing in annualized cost, fixed or re-optimized: the tornado.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, field

import numpy as np

from towercost.design.case import Case, prepare
from towercost.design.column import SingleColumn
from towercost.design.designs import Designs
from towercost.design.space import build_space
from towercost.errors import InfeasibleSpec
from towercost.scenario.schema import Scenario
from towercost.select.scan import scan
from towercost.study.fixed import Decisions, meets_each_spec, plant_limits_met
from towercost.study.variation import varied_case

#: Inputs before the per-solute K rows: name -> what it is.
LEADING = {"agent_price": "agent price", "disposal": "disposal price", "electricity": "electricity price",
           "steam": "steam price", "cooling_water": "cooling-water price", "credit": "credit for recovered solute",
           "cost_index": "cost index", "interest": "interest rate"}

#: Inputs after the per-solute K rows.
TRAILING = {"efficiency": "tray efficiency", "feed_flow": "feed flow", "inlet": "inlet concentrations"}


@dataclass
class Fixed:
    """The nominal best design under one change."""

    annualized: float
    change: float            # relative to the nominal best's cost
    meets_spec: bool
    within_limits: bool


@dataclass
class Best:
    """The re-optimized best under one change (``designs`` None where no design qualifies)."""

    designs: Designs | None
    change: float | None     # its cost relative to the nominal best's
    reason: str = ""


@dataclass
class Row:
    """One input changed down and up."""

    name: str
    label: str
    changes: tuple[float, float]
    fixed: tuple[Fixed, Fixed]
    best: tuple[Best, Best]

    @property
    def swing(self) -> float:
        values = [abs(f.change) for f in self.fixed] + [abs(b.change) for b in self.best if b.change is not None]
        return max(values)


@dataclass
class Sensitivity:
    """The tornado of a scenario around its best design."""

    case: Case
    nominal: Designs                 # the nominal best, one row
    rows: list[Row]                  # largest swing first
    unvaried: list[str]              # inputs left alone (nominal zero)
    notes: list[str] = field(default_factory=list)


def inputs(case: Case) -> tuple[dict[str, str], list[str]]:
    """The inputs to vary (name -> label, in table order) and those left alone because they are zero."""
    eco = case.economics
    nominal = {"agent_price": np.any(case.price > 0), "disposal": np.any(case.disposal > 0),
               "electricity": eco.electricity > 0, "steam": eco.steam > 0 and np.any(case.steam_ratio > 0),
               "cooling_water": eco.cooling_water > 0 and np.any(case.cooling_ratio > 0),
               "credit": np.any(case.credit > 0), "cost_index": True, "interest": eco.interest > 0}
    chosen = {name: label for name, label in LEADING.items() if nominal[name]}
    chosen.update({f"k[{s}]": f"K of {s}" for s in case.solutes})
    chosen.update(TRAILING)
    left = [label for name, label in LEADING.items() if not nominal[name]]
    return chosen, left


def change_of(scenario: Scenario, name: str, default: float | None = None) -> tuple[float, float]:
    """The (down, up) fractional changes of an input: its own, then K's for a K row, then the default."""
    table = scenario.uncertainty.changes
    for key in (name, "k" if name.startswith("k[") else None):
        if key is not None and key in table:
            value = table[key]
            return (-value, value) if isinstance(value, float) else (float(value[0]), float(value[1]))
    c = scenario.uncertainty.change if default is None else default
    return -c, c


def _fixed(case: Case, design: Decisions, base: float) -> Fixed:
    d = SingleColumn(case).evaluate(np.array([design.agent]), np.array([design.trays]), np.array([design.rate]),
                                    np.array([design.diameter]))
    cost = float(d.annualized[0])
    return Fixed(cost, (cost - base) / abs(base), bool(np.all(meets_each_spec(case, d.outlet[0]))),
                 bool(plant_limits_met(case, d)[0]))


def best_design(case: Case) -> Designs:
    """The best design of a case, by the exhaustive scan; InfeasibleSpec where none qualifies."""
    space = build_space(case)
    order, _ = scan(space, 1)
    return space.designs(order)


def _best(case: Case, base: float) -> Best:
    try:
        d = best_design(case)
    except InfeasibleSpec as exc:
        return Best(None, None, str(exc))
    return Best(d, (float(d.annualized[0]) - base) / abs(base))


def refuse_loops(case: Case, study: str) -> None:
    """The studies vary one-column designs only: a case with a designed regenerator is refused, saying so."""
    if case.loop is not None:
        from towercost.errors import ScenarioError

        names = ", ".join(repr(n) for n, r in zip(case.loop.parents, case.loop.regenerators) if r is not None)
        raise ScenarioError(f"[solvent.regenerator] of {names}: the {study} study does not cover a designed "
                            "regenerator yet; study a copy of the scenario without that table (its steam and cooling "
                            "water per kg circulated as regeneration_steam and regeneration_cooling)")


def sensitivity(scenario: Scenario, *, change: float | None = None,
                progress: Callable[[int, int], None] | None = None) -> Sensitivity:
    """Every input of the scenario changed down and up, one at a time (see the module notes)."""
    from towercost.study.variation import trays_only

    scenario = trays_only(scenario)      # tray columns only: a packed bed's spreads are not modelled yet
    case = prepare(scenario)
    refuse_loops(case, "sensitivity")
    nominal = best_design(case)
    design = Decisions.of(nominal)
    base = float(nominal.annualized[0])
    chosen, unvaried = inputs(case)
    notes: list[str] = []
    rows = []
    for k, (name, label) in enumerate(chosen.items()):
        down, up = change_of(scenario, name, change)
        cases = [varied_case(scenario, {name: 1.0 + c}, notes=notes) for c in (down, up)]
        rows.append(Row(name, label, (down, up), tuple(_fixed(c, design, base) for c in cases),
                        tuple(_best(c, base) for c in cases)))
        if progress is not None:
            progress(k + 1, len(chosen))
    rows.sort(key=lambda r: -r.swing)
    return Sensitivity(case, nominal, rows, unvaried, list(dict.fromkeys(notes)))
