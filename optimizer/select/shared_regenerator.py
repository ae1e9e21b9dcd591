"""One regenerator column for a site group's regenerated loops: options by capacity, linear rows.

A ``[[solvent_group]]`` with ``shared_regenerator = true`` sends every unit's
rich solvent to one regenerator. Each unit's loop designs are then priced
without a column of their own (``LoopData.shared_trays``: the group's
regenerator trays, from which each design's stripping vapour follows; its
exchangers, pumps, steam and make-up stay the unit's), and the site chooses
one shared column among the standard diameters D_k it may need.

Capacity of D_k: the largest vapour mass V_k such that the column at the
group's largest liquid/vapour mass ratio r (over every feasible design of
the group's units) and vapour V_k needs no more than D_k (flooding and downcomers, the
regenerator's own ``SingleColumn.price``). The least diameter rises with the
liquid at fixed vapour and with the vapour at fixed liquid, so every summed
load with V <= V_k and L <= r V_k fits D_k, and the rows

    sum_u sum_d v_ud pick_ud - sum_k V_k z_k     <= 0
    sum_u sum_d l_ud pick_ud - sum_k r V_k z_k   <= 0
    sum_k z_k                                    <= 1

are linear and never admit a choice the column cannot carry (conservative
by the vapour grid's step, ``GRID_STEP``). Option k costs the column's
annualized capital (shell and trays at D_k) and adds its installed cost to
the site's capital budget. The chosen column is checked again at the summed
loads of the chosen designs (``check``).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from towercost.design.costlines import ELECTRICITY, Equipment, Uses, annualize
from towercost.select import model

#: Vapour loads tried when finding each diameter's capacity: this many, geometric (step about 1.7 %).
GRID = 600


@dataclass(frozen=True)
class SharedColumn:
    """One capacity option of a group's shared regenerator column."""

    group: str
    diameter: float         # [m]
    trays: int
    vapour: float           # [kg/s] capacity V_k
    liquid: float           # [kg/s] capacity r V_k
    annualized: float       # [USD/yr] capital charge of shell and trays
    installed: float        # [USD]


def _loop_of(space):
    """The shared loop's regenerator (data, column flowsheet) and the candidate whose properties it takes."""
    flowsheet = space.flowsheet
    agent = int(np.flatnonzero(space.case.loop.looped)[0])
    parent = int(space.case.loop.parent[agent])
    data, column = flowsheet.regenerators[parent]
    return flowsheet, data, column, agent


def _price(space, liquid_mass, vapour_mass, diameter=None):
    """The shared column at mass loads [kg/s] (and a diameter, else the least standard size)."""
    flowsheet, data, column, agent = _loop_of(space)
    case = space.case
    trays = np.full(liquid_mass.shape, float(case.loop.shared_trays))
    return flowsheet._column(data, column, np.array([agent]), liquid_mass / case.liquid_molar_mass[agent],
                             vapour_mass / data.vapour_molar_mass, trays, diameter)


def options(group, spaces, units, members: list[int]) -> list[SharedColumn]:
    """The shared column's capacity options for the group's units (empty if no design of theirs has a loop)."""
    liquid, vapour = [], []
    for u in members:    # every feasible alternative (not the model's reduced set): the options do not depend on it
        feasible = spaces[u].feasible
        liquid.append(spaces[u].usage["regenerator_liquid_mass"][feasible])
        vapour.append(spaces[u].usage["regenerator_vapour_mass"][feasible])
    v_all, l_all = np.concatenate(vapour), np.concatenate(liquid)
    looped = v_all > 0
    if not looped.any():
        return []
    ratio = float(np.max(l_all[looped] / v_all[looped]))
    top = float(sum(np.max(v) for v in vapour)) * 1.02
    low = float(np.min(v_all[looped])) * 0.5
    grid = np.geomspace(low, top, GRID)
    space = spaces[members[0]]
    least = _price(space, ratio * grid, grid).diameter
    out = []
    eco = space.case.economics
    for size in np.unique(least):
        below = least <= size         # the capacity: the largest load with every lighter one fitting too
        first_over = int(np.argmin(below)) if not below.all() else grid.size
        if first_over == 0:
            continue
        cap = float(grid[first_over - 1])
        at = _price(space, np.array([ratio * cap]), np.array([cap]), np.array([size]))
        items = at.equipment.items[:2]          # shell and trays; each unit keeps its own pumps
        annual = annualize(Equipment(items), Uses.stack([(ELECTRICITY, np.zeros(1), eco.electricity)]), eco)
        out.append(SharedColumn(group.name, float(size), int(space.case.loop.shared_trays), cap, ratio * cap,
                                float(annual.annualized[0]), float(annual.installed[0])))
    return out


def rows(group, columns: list[SharedColumn], first: int, units, spaces, members: list[int],
         budget: bool) -> tuple[list[model.Option], list[model.LinkRow]]:
    """The options and link rows of one group's shared column."""
    opts = [model.Option(f"{group.name}: shared regenerator D {c.diameter:.3f} m, {c.trays} trays", c.annualized,
                         {"installed": c.installed} if budget else {}) for c in columns]
    vapour = tuple((u, np.arange(len(units[u])), spaces[u].usage["regenerator_vapour_mass"][units[u].label])
                   for u in members)
    liquid = tuple((u, np.arange(len(units[u])), spaces[u].usage["regenerator_liquid_mass"][units[u].label])
                   for u in members)
    link = [model.LinkRow(f"{group.name}: vapour within the shared regenerator's capacity", vapour,
                          tuple((first + k, -c.vapour) for k, c in enumerate(columns)), "<=", 0.0),
            model.LinkRow(f"{group.name}: liquid within the shared regenerator's capacity", liquid,
                          tuple((first + k, -c.liquid) for k, c in enumerate(columns)), "<=", 0.0),
            model.LinkRow(f"{group.name}: one shared regenerator", (), tuple((first + k, 1.0)
                                                                             for k in range(len(columns))), "<=", 1.0)]
    return opts, link


def check(space, column: SharedColumn, liquid: float, vapour: float) -> dict:
    """The chosen shared column at the chosen designs' summed loads: its figures, exactly."""
    d = _price(space, np.array([liquid]), np.array([vapour]), np.array([column.diameter]))
    return {"group": column.group, "diameter_m": column.diameter, "trays": column.trays,
            "height_m": float(d.height[0]), "liquid_kg_s": liquid, "vapour_kg_s": vapour,
            "capacity_vapour_kg_s": column.vapour, "capacity_liquid_kg_s": column.liquid,
            "fraction_of_flood": float(d.fraction_of_flood[0]), "within_its_limits": bool(d.within_limits[0]),
            "installed_USD": column.installed, "annualized_USD_per_yr": column.annualized}
