"""The case: a validated scenario reduced to plain SI numbers and arrays, the one input of the design.

``prepare(scenario)`` computes what every alternative shares: K-values at
column conditions, tray efficiencies, the outlet targets, the phases'
properties per candidate and the economic inputs. Nothing here depends on a
design decision.

Shapes: ``(n_agents, n_solutes)`` where two axes are shown.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass

import numpy as np

from towercost.errors import ScenarioError
from towercost.models import costing, defaults, economics, efficiency, equilibrium
from towercost.models import packing as packing_models
from towercost.models.constants import STANDARD_ATMOSPHERE
from towercost.models.properties import ideal_gas_density
from towercost.design.service import Service, service_for
from towercost.scenario.concentration import Display
from towercost.scenario.schema import Scenario


@dataclass(frozen=True)
class Economics:
    """The economic inputs of the annualized cost.

    Every field may be a number or an array with a leading sample axis (the
    uncertainty study samples them); ``towercost.design.costlines.annualize``
    broadcasts over it.
    """

    interest: float                 # [1/yr]
    life: float                     # [yr]
    capital_recovery: float         # [1/yr], from interest and life
    hours: float                    # [h/yr] on stream
    electricity: float              # [USD/J]
    steam: float                    # [USD/kg]
    cooling_water: float            # [USD/m3]
    index_to: float                 # cost index of the estimate
    index_year: int | None          # its year, when taken from the table
    contingency: float              # fraction of the bare-module cost
    fee: float                      # fraction of the bare-module cost
    auxiliary: float                # fraction of the base bare-module cost


@dataclass(frozen=True)
class PackingChoice:
    """A ``[[packing]]`` entry in SI: the packing's data row and the design options of its beds."""

    name: str                       # label, as the ranking shows it
    key: str                        # row of models/data/packings.toml
    data: dict                      # that row (SI values and sources), ``towercost.models.packing.packing_data``
    flood_fraction: float           # design fraction of flood [-]
    pressure_drop_per_m: float      # design limit [Pa/m]
    max_bed_height: float           # [m]
    price_per_m3: float             # [USD/m3] at ``price_index_basis``
    price_index_basis: float        # cost index of the price
    price_given: bool = False       # the scenario gave the price (else the table's, value from memory)
    max_pressure_drop: float | None = None   # [Pa] across the beds, a limit
    max_height: float | None = None          # [m] column height, a limit
    h_og: float | None = None                # [m] given heights (at most one)
    h_ol: float | None = None
    hetp: float | None = None

    @property
    def constants_checked(self) -> bool:
        """The Stichlmair constants were read from a source (not estimated)."""
        return bool(self.data.get("stichlmair_checked", False))


@dataclass(frozen=True)
class Case:
    """A scenario in SI: the one input of the evaluation (``towercost.design.column``)."""

    name: str
    service: Service
    agents: tuple[str, ...]
    solutes: tuple[str, ...]
    feed_flow: float                # [mol/s] of the stream to treat
    temperature: float              # [K]
    pressure: float                 # [Pa] at the column
    feed_in: np.ndarray             # (n_solutes,) mole fraction entering with the feed
    target: np.ndarray              # (n_solutes,) allowed outlet mole fraction; inf: no spec
    k_value: np.ndarray             # (n_agents, n_solutes) K = y/x at column conditions
    lean: np.ndarray                # (n_agents, n_solutes) solute mole fraction in the entering agent
    efficiency: np.ndarray          # (n_agents, n_solutes) overall efficiency; NaN where Murphree applies
    murphree: float | None          # Murphree vapour efficiency when the column uses it
    # phases, per agent (absorb: the liquid is the agent; strip: the gas is)
    liquid_molar_mass: np.ndarray   # (n_agents,) [kg/mol]
    liquid_density: np.ndarray      # (n_agents,) [kg/m3]
    liquid_viscosity: np.ndarray    # (n_agents,) [Pa s]
    surface_tension: np.ndarray     # (n_agents,) [N/m]
    gas_molar_mass: np.ndarray      # (n_agents,) [kg/mol]
    gas_density: np.ndarray         # (n_agents,) [kg/m3] at column conditions
    # agents' economics
    price: np.ndarray               # (n_agents,) [USD/kg] fresh agent
    disposal: np.ndarray            # (n_agents,) [USD/kg] spent agent
    regenerated: np.ndarray         # (n_agents,) bool
    loss: np.ndarray                # (n_agents,) fraction of the circulation lost per pass
    steam_ratio: np.ndarray         # (n_agents,) [kg/kg] regeneration steam per kg circulated
    cooling_ratio: np.ndarray       # (n_agents,) [m3/kg] regeneration cooling water per kg circulated
    credit: np.ndarray              # (n_solutes,) [USD/mol] of recovered solute
    # column
    tray: str
    tray_spacing: float             # [m]
    flood_fraction: float
    material: str
    supply_pressure: float          # [Pa] the liquid is pumped from
    pump_efficiency: float
    blower_efficiency: float
    motor_efficiency: float
    # the space searched
    trays_range: tuple[int, int]
    ratio_range: tuple[float, float]
    ratio_levels: int
    larger_diameters: int | None    # standard sizes above the least one also offered; None: searched
    # per-design limits
    max_height: float               # [m]
    max_diameter: float             # [m]
    shell_diameter: float | None    # [m] of an existing shell
    shell_max_trays: int | None
    capital_budget: float | None    # [USD]
    max_power: float | None         # [W]
    max_steam: float | None         # [kg/s]
    # dilute-validity thresholds
    max_dilute: float
    max_flow_change: float
    economics: Economics
    margin: float                   # near-optimal band
    notes: tuple[str, ...] = ()     # warnings raised while preparing the case
    # vessel, machines and trays
    design_pressure: float | None = None      # [Pa gauge] given by the scenario; None: the margin rule
    design_temperature: float | None = None   # [K] given by the scenario; None: operating plus the margin
    drive_enclosure: str = "totally_enclosed"  # electric motors of the pump and the gas mover
    turndown: float = defaults.TURNDOWN       # lowest loads / design loads for the weep check
    valve_fallback: bool = True               # valve trays where sieve trays fall outside their range
    shell_modification: float = 0.0           # existing shell: allowance as a fraction of a new shell's C_BM
    concentrations: Display | None = None   # the unit each phase's concentrations are shown in
    # packed beds offered beside the trays (internals 2, 3, ... after the tray types)
    packings: tuple[PackingChoice, ...] = ()
    offer_trays: bool = True                  # trays are offered (else only the packings)
    compete_tray_types: bool = False          # sieve and valve trays both offered, competing
    stages_range: tuple[int, int] = (1, 80)   # theoretical stages searched in packed beds
    max_pressure_drop: float | None = None    # [Pa] gas pressure drop of the column, a limit
    packing_materials: tuple[str, ...] | None = None   # packing materials allowed; None: any
    gas_viscosity: np.ndarray | None = None   # (n_agents,) [Pa s]; NaN where not given
    gas_diffusivity: np.ndarray | None = None     # (n_agents, n_solutes) [m2/s] of each solute in the gas; NaN
    liquid_diffusivity: np.ndarray | None = None  # (n_agents, n_solutes) [m2/s] in the liquid; NaN
    # the regenerated loop (towercost.design.loop_case): None without a designed regenerator
    loop: object | None = None                # LoopData: each expanded candidate's parent and lean level
    agent_supply: np.ndarray | None = None    # (n_agents,) [Pa] each candidate's pump takes suction at; None: supply_pressure
    gas_mover: bool = True                    # the gas is moved by a fan or blower (False: steam from its header)

    @property
    def mode(self) -> str:
        return self.service.mode


def _k_values(scenario: Scenario, notes: list[str]) -> np.ndarray:
    """K = y/x at column conditions for every agent and solute."""
    feed, solutes = scenario.feed, scenario.solutes
    absorb = scenario.case.mode == "absorb"
    table = np.empty((len(scenario.agents), len(solutes)))
    for a, agent in enumerate(scenario.agents):
        liquid_m = agent.molar_mass if absorb else feed.molar_mass
        liquid_rho = agent.density if absorb else feed.density
        for s, solute in enumerate(solutes):
            table[a, s] = k_from_source(agent.k[solute], feed.temperature, feed.pressure, liquid_m, liquid_rho, notes)
    return table


def k_from_source(source, temperature, pressure, liquid_molar_mass, liquid_density, notes) -> float:
    """K = y/x at (T, P) from one scenario K entry: a number, vapour-pressure data, or Henry's-law data."""
    if isinstance(source, float):
        return source
    if hasattr(source, "vapour_pressure"):
        return float(equilibrium.k_from_vapour_pressure(source.vapour_pressure, pressure,
                                                        source.activity_coefficient))
    return float(equilibrium.k_at_conditions(
        source.henry, source.scale, source.temperature, source.slope, temperature, pressure,
        liquid_molar_density=liquid_density / liquid_molar_mass, liquid_molar_mass=liquid_molar_mass,
        warnings=notes))


def _targets(scenario: Scenario) -> np.ndarray:
    """Allowed outlet mole fraction of each solute in the treated stream (inf: no spec)."""
    feed = scenario.feed
    target = np.full(len(scenario.solutes), np.inf)
    for spec in scenario.spec:
        s = scenario.solutes.index(spec.solute)
        if spec.outlet is not None:
            target[s] = spec.outlet
        elif spec.removal is not None:
            target[s] = (1.0 - spec.removal) * feed.composition[spec.solute]
        else:
            target[s] = spec.outlet_mass_rate / spec.solute_molar_mass / feed.flow
    return target


def _economics(scenario: Scenario) -> Economics:
    eco = scenario.economics
    if eco.cost_index is not None:
        index_to, index_year = eco.cost_index, None
    else:
        index_year = eco.cost_year if eco.cost_year is not None else costing.latest_cost_year()
        try:
            index_to = float(costing.cost_index(index_year))
        except ValueError as exc:
            raise ScenarioError(f"[economics] cost_year: {exc}") from None
    return Economics(
        interest=eco.interest, life=eco.life,
        capital_recovery=float(economics.capital_recovery_factor(eco.interest, eco.life)),
        hours=eco.hours, electricity=eco.electricity, steam=eco.steam, cooling_water=eco.cooling_water,
        index_to=index_to, index_year=index_year, contingency=eco.contingency, fee=eco.fee,
        auxiliary=eco.auxiliary,
    )


def _efficiencies(scenario: Scenario, k_value, liquid_m, liquid_mu, liquid_rho, notes):
    """Overall tray efficiency per agent and solute, and the Murphree efficiency where the column gives one."""
    col = scenario.column
    murphree = None
    if col.efficiency == "oconnell":
        eff = efficiency.oconnell_absorber(
            k_value, liquid_m[:, None], liquid_mu[:, None], liquid_rho[:, None], warnings=notes
        )
    elif isinstance(col.efficiency, float):
        eff = np.full(k_value.shape, col.efficiency)
    else:
        murphree = col.efficiency.murphree
        eff = np.full(k_value.shape, np.nan)
    eff = np.array(eff, dtype=float)
    for a, agent in enumerate(scenario.agents):
        if agent.efficiency is not None:
            eff[a, :] = agent.efficiency
    return eff, murphree


def _packings(scenario: Scenario, index_to: float) -> tuple[PackingChoice, ...]:
    """The scenario's ``[[packing]]`` entries in SI.

    Prices are moved to one cost index (the first row's basis; escalation is
    linear, so this changes no escalated figure): a price the scenario gives
    is at the estimate's index.
    """
    out = []
    rows = [packing_models.packing_data(entry.packing) for entry in scenario.packing]
    basis = float(rows[0]["price_index_basis"]) if rows else 1.0   # one basis for the packing row's variants
    for entry, row in zip(scenario.packing, rows):
        own = float(row["price_index_basis"])
        price = row["price_per_m3"] * basis / own if entry.price is None else entry.price * basis / index_to
        out.append(PackingChoice(
            name=entry.label, key=entry.packing, data=row, flood_fraction=entry.flood_fraction,
            pressure_drop_per_m=entry.pressure_drop_per_m,
            max_bed_height=entry.max_bed_height if entry.max_bed_height is not None else row["max_bed_height"],
            price_per_m3=float(price), price_index_basis=basis, price_given=entry.price is not None,
            max_pressure_drop=entry.max_pressure_drop, max_height=entry.max_height, h_og=entry.h_og,
            h_ol=entry.h_ol, hetp=entry.hetp))
    return tuple(out)


def _transport(scenario: Scenario, service: Service) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Gas viscosity (n_agents,) and the solutes' gas and liquid diffusivities (n_agents, n_solutes); NaN if not given."""
    feed, agents, solutes = scenario.feed, scenario.agents, scenario.solutes

    def value(x):
        return np.nan if x is None else float(x)

    feed_d = np.array([value(feed.diffusivity.get(s)) for s in solutes])
    agent_d = np.array([[value(a.diffusivity.get(s)) for s in solutes] for a in agents]).reshape(len(agents), -1)
    if service.agent_is_liquid:     # the gas is the feed
        viscosity = np.full(len(agents), value(feed.viscosity))
        return viscosity, np.broadcast_to(feed_d, agent_d.shape).copy(), agent_d
    viscosity = np.array([value(a.viscosity) for a in agents])
    return viscosity, agent_d, np.broadcast_to(feed_d, agent_d.shape).copy()


def prepare(scenario: Scenario) -> Case:
    """Reduce a validated scenario to the plain arrays the evaluation needs."""
    notes: list[str] = list(scenario.warnings)   # values outside their usual range
    feed, col, eco = scenario.feed, scenario.column, scenario.economics
    service = service_for(scenario.case.mode)
    agents, solutes = scenario.agents, scenario.solutes
    n_agents = len(agents)
    k_value = _k_values(scenario, notes)
    lean = np.array([[a.lean.get(s, 0.0) for s in solutes] for a in agents])

    def per_agent(attr, fallback=None):
        return np.array([getattr(a, attr) if getattr(a, attr) is not None else fallback for a in agents], dtype=float)

    if service.agent_is_liquid:
        liquid_m, liquid_rho = per_agent("molar_mass"), per_agent("density")
        liquid_mu, sigma = per_agent("viscosity"), per_agent("surface_tension")
        gas_m = np.full(n_agents, feed.molar_mass)
    else:
        liquid_m, liquid_rho = np.full(n_agents, feed.molar_mass), np.full(n_agents, feed.density)
        liquid_mu, sigma = np.full(n_agents, feed.viscosity), np.full(n_agents, feed.surface_tension)
        gas_m = per_agent("molar_mass")
    rho_gas = np.asarray(ideal_gas_density(feed.pressure, feed.temperature, gas_m), dtype=float)
    eff, murphree = _efficiencies(scenario, k_value, liquid_m, liquid_mu, liquid_rho, notes)

    credit = np.array([eco.credit[s] * eco.solute_molar_mass[s] if s in eco.credit else 0.0 for s in solutes])
    target = _targets(scenario)
    feed_in = np.array([feed.composition[s] for s in solutes])
    if np.all(target >= feed_in):
        show = scenario.concentrations().treated_text
        shown = ", ".join(f"{s} {show(i, x)} in, {show(i, t)} allowed"
                          for i, (s, x, t) in enumerate(zip(solutes, feed_in, target)) if np.isfinite(t))
        raise ScenarioError(f"[[spec]]: the feed already meets every spec ({shown}); no column is needed")
    shell = col.existing_shell
    design_p = None if col.design_pressure is None else col.design_pressure - STANDARD_ATMOSPHERE
    if design_p is not None and design_p < feed.pressure - STANDARD_ATMOSPHERE:
        raise ScenarioError(f"[column] design_pressure {design_p / 1e5:.4g} barg is below the operating pressure "
                            f"{(feed.pressure - STANDARD_ATMOSPHERE) / 1e5:.4g} barg; give at least the operating "
                            "pressure, or leave it out for the margin rule")
    if col.design_temperature is not None and col.design_temperature < feed.temperature:
        raise ScenarioError(f"[column] design_temperature {col.design_temperature - 273.15:.4g} degC is below the "
                            f"operating temperature {feed.temperature - 273.15:.4g} degC; give at least the operating "
                            "temperature, or leave it out for the margin rule")
    economics_inputs = _economics(scenario)
    gas_mu, gas_d, liquid_d = _transport(scenario, service)
    stages = col.stages if col.stages is not None else (1, col.trays[1])
    case = Case(
        name=scenario.case.name, service=service, agents=tuple(a.name for a in agents), solutes=tuple(solutes),
        feed_flow=feed.flow, temperature=feed.temperature, pressure=feed.pressure,
        feed_in=feed_in, target=target, k_value=k_value, lean=lean, efficiency=eff, murphree=murphree,
        liquid_molar_mass=liquid_m, liquid_density=liquid_rho, liquid_viscosity=liquid_mu,
        surface_tension=sigma, gas_molar_mass=gas_m, gas_density=rho_gas,
        price=per_agent("price"), disposal=per_agent("disposal"),
        regenerated=np.array([a.regenerated for a in agents]), loss=per_agent("loss"),
        steam_ratio=per_agent("regeneration_steam"), cooling_ratio=per_agent("regeneration_cooling"),
        credit=credit,
        tray=col.tray, tray_spacing=col.tray_spacing, flood_fraction=col.flood_fraction, material=col.material,
        supply_pressure=col.supply_pressure, pump_efficiency=eco.pump_efficiency,
        blower_efficiency=eco.blower_efficiency, motor_efficiency=eco.motor_efficiency,
        trays_range=tuple(col.trays), ratio_range=tuple(col.ratio), ratio_levels=col.ratio_levels,
        larger_diameters=col.larger_diameters,
        max_height=col.max_height, max_diameter=col.max_diameter,
        shell_diameter=shell.diameter if shell else None, shell_max_trays=shell.max_trays if shell else None,
        capital_budget=eco.capital_budget, max_power=eco.max_power, max_steam=eco.max_steam,
        max_dilute=col.max_dilute, max_flow_change=col.max_flow_change,
        economics=economics_inputs, margin=eco.margin, notes=tuple(notes),
        design_pressure=design_p, design_temperature=col.design_temperature, drive_enclosure=col.drive_enclosure,
        turndown=col.turndown, valve_fallback=col.valve_fallback,
        shell_modification=shell.modification_allowance if shell else 0.0,
        concentrations=scenario.concentrations(),
        packings=_packings(scenario, economics_inputs.index_to), offer_trays=col.offer_trays,
        compete_tray_types=col.compete_tray_types,
        stages_range=tuple(stages), max_pressure_drop=col.max_pressure_drop,
        packing_materials=None if col.packing_materials is None else tuple(col.packing_materials),
        gas_viscosity=gas_mu, gas_diffusivity=gas_d, liquid_diffusivity=liquid_d,
    )
    from towercost.design.loop_case import expand_loops

    expanded = expand_loops(case, scenario, notes)
    return expanded if expanded is case else dataclasses.replace(expanded, notes=tuple(notes))


def supply_pressure_of(case: Case, agent):
    """The pressure each candidate's liquid is pumped from [Pa]: the regenerator's for a loop, else the scenario's."""
    if case.agent_supply is None:
        return case.supply_pressure
    return case.agent_supply[agent]


def agent_index(case: Case, name: str) -> int:
    """The index of the candidate called ``name``; ScenarioError listing the names if none."""
    if name not in case.agents:
        raise ScenarioError(f"no candidate named {name!r}; the scenario has {', '.join(map(repr, case.agents))}")
    return case.agents.index(name)
