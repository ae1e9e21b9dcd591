"""The regenerated loop in the case: each lean level of a regenerated solvent becomes a candidate of its own.

A solvent with a ``[solvent.regenerator]`` table is circulated through a
designed regenerator. Its lean loading is a decision, searched on a grid
of the lean level of its key solute,

    level = K x_lean / y_out   in (0, 1),

where K is the absorber's K of the key solute and y_out its spec. With the
level fixed, the absorption factor the spec needs depends only on the
absorber's stages and the level (Kremser), so every absorber relation of
``towercost.design.column`` applies to the candidate unchanged.
``expand_loops`` therefore turns each regenerated solvent into one
candidate per lean level (named "solvent, lean 0.25"), and, where the
scenario allows it, one once-through candidate of the same solvent; each
keeps its parent's properties. The other solutes' lean loadings are the
regenerator's outlets, found per design in ``towercost.design.loop``.

Shapes: per expanded candidate ``(n_agents,)``; per solute ``(n_solutes,)``.
"""

from __future__ import annotations

import dataclasses
import functools
from dataclasses import dataclass

import numpy as np

from towercost.errors import ScenarioError
from towercost.models import efficiency
from towercost.models.properties import ideal_gas_density

#: Least temperature difference kept between the lean solvent and the cooling water [K]: common practice.
COOLER_APPROACH = 5.0

#: Per-candidate arrays of ``Case`` (leading axis: the candidates), taken per expanded candidate.
PER_AGENT = ("k_value", "lean", "efficiency", "liquid_molar_mass", "liquid_density", "liquid_viscosity",
             "surface_tension", "gas_molar_mass", "gas_density", "price", "disposal", "regenerated", "loss",
             "steam_ratio", "cooling_ratio", "gas_viscosity", "gas_diffusivity", "liquid_diffusivity")


@dataclass(frozen=True)
class RegeneratorData:
    """A regenerated solvent's regenerator in SI: conditions, equilibrium, search and exchangers."""

    temperature: float              # [K]
    pressure: float                 # [Pa]
    stripping: str                  # "steam" (live steam) or "reboiled"
    k_value: np.ndarray             # (n_solutes,) K = y/x at the regenerator
    efficiency: np.ndarray          # (n_solutes,) overall tray efficiency
    trays_range: tuple[int, int]
    key: int                        # the solute whose lean level is the decision
    heat_capacity: float            # [J/(kg K)] of the solvent
    latent_heat: float | None       # [J/kg] of the solvent (reboiled)
    approach: float                 # [K] cross exchanger hot-end approach
    u_cross: float                  # [W/(m2 K)]
    u_cooler: float
    u_heater: float
    vapour_pressure: float          # [Pa] solvent at the absorber
    vapour_pressure_hot: float      # [Pa] solvent at the regenerator
    vapour_molar_mass: float        # [kg/mol] of the stripping vapour: water, or the solvent's own
    vapour_density: float           # [kg/m3] at the regenerator


@dataclass(frozen=True)
class LoopData:
    """Which expanded candidates circulate through a regenerator, at which lean level, of which parent."""

    parent: np.ndarray              # (n_agents,) index into the scenario's candidates
    level: np.ndarray               # (n_agents,) K x_lean / y_out of the key solute; NaN: not a loop candidate
    looped: np.ndarray              # (n_agents,) bool
    regenerators: tuple             # per scenario candidate: RegeneratorData or None
    parents: tuple[str, ...]        # the scenario's candidate names
    shared_trays: int | None = None  # a site's shared regenerator: its trays; the column is priced by the site

    def regenerator(self, agent: int) -> RegeneratorData:
        return self.regenerators[int(self.parent[agent])]


@functools.cache
def water_molar_mass() -> float:
    """Molar mass of water [kg/mol], from the standard atomic weights in ``chemicals.elements``.

    >>> round(water_molar_mass() * 1000, 5)
    18.01528
    """
    from chemicals.elements import molecular_weight

    return molecular_weight({"H": 2, "O": 1}) / 1000.0


def loop_name(name: str, level: float) -> str:
    """The candidate name of one lean level: "light wash oil, lean 0.25"."""
    return f"{name}, lean {level:.3g}"


def once_through_name(name: str) -> str:
    return f"{name}, once through"


def _expanded(scenario):
    """Each candidate of the case: (scenario candidate index, name, lean level or NaN, looped, once through)."""
    for a, agent in enumerate(scenario.agents):
        reg = agent.regenerator
        if reg is None:
            yield a, agent.name, np.nan, False, False
            continue
        for level in lean_levels(reg.lean_range[0], reg.lean_range[1], reg.lean_levels):
            yield a, loop_name(agent.name, level), float(level), True, False
        if reg.once_through:
            yield a, once_through_name(agent.name), np.nan, False, True


def candidate_names(scenario) -> list[str]:
    """The case's candidate names (each lean level and once-through service its own), without preparing the case."""
    return [name for _, name, _, _, _ in _expanded(scenario)]


def lean_levels(low: float, high: float, count: int) -> np.ndarray:
    """The lean levels searched: geometric between the bounds (one level: the lower bound)."""
    return np.array([low]) if count == 1 or low == high else np.geomspace(low, high, count)


def _regenerator_k(scenario, agent, reg, notes) -> np.ndarray:
    """K at the regenerator per solute: given, or the absorber's Henry's-law data moved to its T and P."""
    from towercost.design.case import k_from_source

    out = []
    for solute in scenario.solutes:
        source = reg.k.get(solute)
        if source is None:
            source = agent.k[solute]
            if isinstance(source, float) or hasattr(source, "vapour_pressure"):
                raise ScenarioError(f"[{scenario.agent_word}.regenerator] {agent.name!r}: no K for {solute!r} at the "
                                    f"regenerator; give k.{solute} there (a K or vapour pressure at the regenerator's "
                                    "temperature), or Henry's-law data with a slope in the absorber's k table")
        out.append(k_from_source(source, reg.temperature, reg.pressure, agent.molar_mass, agent.density, notes))
    return np.array(out)


def _regenerator_data(scenario, case, a, agent, notes) -> RegeneratorData:
    reg = agent.regenerator
    word = scenario.agent_word
    solutes = scenario.solutes
    if reg.key is not None:
        if reg.key not in solutes:
            raise ScenarioError(f"[{word}.regenerator] {agent.name!r}: key {reg.key!r} is not in [feed.composition] "
                                f"({', '.join(solutes)})")
        key = solutes.index(reg.key)
    else:
        specs = np.flatnonzero(np.isfinite(case.target))
        key = int(specs[0])
    if not np.isfinite(case.target[key]):
        raise ScenarioError(f"[{word}.regenerator] {agent.name!r}: key {solutes[key]!r} has no [[spec]]; the lean "
                            "level K x_lean / y_out needs the key's outlet spec")
    k = _regenerator_k(scenario, agent, reg, notes)
    if reg.efficiency is not None:
        eff = np.full(len(solutes), reg.efficiency)
    else:
        mu = reg.viscosity if reg.viscosity is not None else agent.viscosity
        eff = np.asarray(efficiency.oconnell_absorber(k, agent.molar_mass, mu, agent.density, warnings=notes),
                         dtype=float).reshape(len(solutes))
    vapour_m = water_molar_mass() if reg.stripping == "steam" else agent.molar_mass
    return RegeneratorData(
        temperature=reg.temperature, pressure=reg.pressure, stripping=reg.stripping, k_value=k, efficiency=eff,
        trays_range=tuple(reg.trays), key=key, heat_capacity=reg.heat_capacity, latent_heat=reg.latent_heat,
        approach=reg.approach, u_cross=reg.u_cross, u_cooler=reg.u_cooler, u_heater=reg.u_heater,
        vapour_pressure=reg.vapour_pressure, vapour_pressure_hot=reg.vapour_pressure_hot,
        vapour_molar_mass=vapour_m,
        vapour_density=float(ideal_gas_density(reg.pressure, reg.temperature, vapour_m)))


def expand_loops(case, scenario, notes: list[str]):
    """The case with each regenerated solvent's lean levels (and its once-through service) as candidates.

    Returns the case unchanged when no candidate has a regenerator.
    """
    agents = scenario.agents
    if not any(a.regenerator is not None for a in agents):
        return case
    if case.mode != "absorb":
        raise ScenarioError("[stripping_gas.regenerator]: a designed regenerator applies to solvents "
                            "(mode = 'absorb') only")
    from towercost.models import defaults

    coldest = defaults.COOLING_WATER_IN + COOLER_APPROACH
    if case.temperature < coldest:
        raise ScenarioError(f"[feed] temperature {case.temperature - 273.15:.4g} degC: a regenerated loop cools its "
                            f"lean solvent to the absorber temperature on cooling water supplied at "
                            f"{defaults.COOLING_WATER_IN - 273.15:.4g} degC; allowed from {coldest - 273.15:.4g} degC "
                            "(a refrigerated absorber is outside this flowsheet)")
    regenerators = []
    for a, agent in enumerate(agents):
        if agent.regenerator is None:
            regenerators.append(None)
            continue
        data = _regenerator_data(scenario, case, a, agent, notes)
        if data.temperature - case.temperature <= data.approach:
            raise ScenarioError(f"[solvent.regenerator] {agent.name!r} temperature {data.temperature - 273.15:.4g} degC: "
                                f"must exceed the absorber's {case.temperature - 273.15:.4g} degC by more than the "
                                f"approach {data.approach:g} K")
        if data.temperature >= defaults.STEAM_TEMPERATURE:
            raise ScenarioError(f"[solvent.regenerator] {agent.name!r} temperature {data.temperature - 273.15:.4g} degC: "
                                f"must be below the heating steam's {defaults.STEAM_TEMPERATURE - 273.15:.4g} degC")
        regenerators.append(data)
    rows, names, levels, looped, once_through = zip(*_expanded(scenario))
    regenerated = [bool(lp) or (not once and bool(case.regenerated[r]))
                   for r, lp, once in zip(rows, looped, once_through)]
    rows = np.array(rows)
    levels = np.array(levels)
    looped = np.array(looped)
    fields = {name: (None if getattr(case, name) is None else np.asarray(getattr(case, name))[rows].copy())
              for name in PER_AGENT}
    fields["regenerated"] = np.array(regenerated)
    once = ~looped & ~fields["regenerated"]
    fields["loss"] = np.where(once, 0.0, fields["loss"])    # once through: the whole flow is bought
    lean = fields["lean"]
    for i in np.flatnonzero(looped):
        data = regenerators[rows[i]]
        lean[i, :] = 0.0     # the other solutes' lean loadings are the regenerator's outlets, per design
        lean[i, data.key] = levels[i] * case.target[data.key] / fields["k_value"][i, data.key]
    supply = np.array([regenerators[r].pressure if looped[i] else case.supply_pressure for i, r in enumerate(rows)])
    loop = LoopData(parent=rows, level=levels, looped=looped, regenerators=tuple(regenerators),
                    parents=tuple(a.name for a in agents))
    shown = case.concentrations
    if shown is not None:   # each expanded candidate shows concentrations as its parent does
        shown = dataclasses.replace(shown, agent_units=tuple(shown.agent_units[r] for r in rows),
                                    agent_liquids=tuple(shown.agent_liquids[r] for r in rows))
    return dataclasses.replace(case, agents=tuple(names), loop=loop, agent_supply=supply, concentrations=shown,
                               **fields)
