"""The discrete design space and its exact, vectorized evaluation.

A design is a candidate agent (solvent or stripping gas), a count of real
trays and an agent rate. For each (agent, trays) group the space holds

* the least rate that meets every solute's spec (from the exact Kremser
  inverse), raised to the bottom of the scenario's ratio range if it falls
  below it, and
* the rate levels of the ratio grid above that least rate.

Every other alternative is evaluated from the same relations in ``models/``,
all design points in one call (numpy broadcasting, no loop over designs).

A larger rate at the same trays never costs less: solvent (or gas) cost,
pump and blower power, and the diameter the hydraulics ask for all grow with
the rate, and every limit the scenario may set (diameter, budget, power,
steam) grows with them too. So the least rate is the best design of its
group and the grid levels above it matter only for ranking runners-up.
``Space.monotone_in_rate`` checks this on the evaluated numbers; the model
builder relies on it only where it holds.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, fields

import numpy as np

from towercost.models import costing, economics, efficiency, equilibrium, hydraulics, kremser, vessel
from towercost.errors import InfeasibleSpec, ScenarioError
from towercost.scenario import Scenario, gas_density
from towercost.units import STANDARD_ATMOSPHERE, mole_fraction_text

#: Standard acceleration of gravity [m/s2] (CGPM 1901 conventional value).
GRAVITY = 9.80665

#: Allowance for piping, control valve and exchangers on the pumped liquid [Pa].
#: Common practice: 0.7 bar on top of static head and column pressure.
PUMP_ALLOWANCE = 70_000.0

#: Allowance for ducts, inlet distributor and demister on the blown gas [Pa].
#: Common practice: 1.5 kPa on top of the tray pressure drop.
BLOWER_ALLOWANCE = 1_500.0

#: Plate for the shell in each column material (models/data/materials.toml).
PLATE = {"carbon_steel": "SA-516-70", "ss304": "SA-240-304", "ss316": "SA-240-316"}

#: Rate grid points closer than this (relative) to the least rate are dropped.
_SAME_RATE = 1e-9


@dataclass(frozen=True)
class Case:
    """A scenario reduced to plain SI arrays: the one input of ``evaluate``.

    Shapes: ``n_agents`` candidates by ``n_solutes`` solutes where two axes
    are shown.
    """

    name: str                       # the case name from the scenario
    mode: str                       # "absorb" or "strip"
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
    # phases: liquid and gas properties per agent (absorb: liquid = agent; strip: gas = agent)
    liquid_molar_mass: np.ndarray   # (n_agents,) [kg/mol]
    liquid_density: np.ndarray      # (n_agents,) [kg/m3]
    liquid_viscosity: np.ndarray    # (n_agents,) [Pa s]
    surface_tension: np.ndarray     # (n_agents,) [N/m]
    gas_molar_mass: np.ndarray      # (n_agents,) [kg/mol]
    gas_density: np.ndarray         # (n_agents,) [kg/m3]
    # agent economics
    price: np.ndarray               # (n_agents,) [USD/kg] fresh agent
    disposal: np.ndarray            # (n_agents,) [USD/kg] spent agent
    regenerated: np.ndarray         # (n_agents,) bool
    loss: np.ndarray                # (n_agents,) fraction lost per pass
    steam_ratio: np.ndarray         # (n_agents,) [kg/kg] regeneration steam
    cooling_ratio: np.ndarray       # (n_agents,) [m3/kg] regeneration cooling water
    credit: np.ndarray              # (n_solutes,) [USD/mol] of recovered solute
    # column
    tray: str
    tray_spacing: float
    flood_fraction: float
    material: str
    trays_range: tuple[int, int]
    ratio_range: tuple[float, float]
    ratio_levels: int
    max_height: float
    max_diameter: float
    shell_diameter: float | None
    shell_max_trays: int | None
    supply_pressure: float
    max_dilute: float
    max_flow_change: float
    larger_diameters: int           # standard sizes above the least one also offered
    # economics
    capital_recovery: float         # [1/yr]
    seconds: float                  # [s/yr] of operation
    electricity: float              # [USD/J]
    steam: float                    # [USD/kg]
    cooling_water: float            # [USD/m3]
    index_to: float                 # cost index of the estimate
    index_year: int | None
    contingency: float
    fee: float
    auxiliary: float
    pump_efficiency: float
    blower_efficiency: float
    motor_efficiency: float
    capital_budget: float | None
    max_power: float | None
    max_steam: float | None
    margin: float
    notes: tuple[str, ...] = ()     # warnings raised while preparing the case

    @property
    def liquid_is_agent(self) -> bool:
        return self.mode == "absorb"


def _k_values(scenario: Scenario, notes: list[str]) -> np.ndarray:
    """K = y/x at column conditions for every agent and solute."""
    feed, solutes = scenario.feed, scenario.solutes
    table = np.empty((len(scenario.agents), len(solutes)))
    for a, agent in enumerate(scenario.agents):
        liquid_m = agent.molar_mass if scenario.case.mode == "absorb" else feed.molar_mass
        liquid_rho = agent.density if scenario.case.mode == "absorb" else feed.density
        for s, solute in enumerate(solutes):
            source = agent.k[solute]
            if isinstance(source, float):
                table[a, s] = source
            elif hasattr(source, "vapour_pressure"):
                table[a, s] = equilibrium.k_from_vapour_pressure(
                    source.vapour_pressure, feed.pressure, source.activity_coefficient
                )
            else:
                table[a, s] = equilibrium.k_at_conditions(
                    source.henry, source.scale, source.temperature, source.slope,
                    feed.temperature, feed.pressure,
                    liquid_molar_density=liquid_rho / liquid_m, liquid_molar_mass=liquid_m,
                    warnings=notes,
                )
    return table


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


def prepare(scenario: Scenario) -> Case:
    """Reduce a validated scenario to the plain arrays the evaluation needs."""
    notes: list[str] = []
    feed, col, eco, mode = scenario.feed, scenario.column, scenario.economics, scenario.case.mode
    agents, solutes = scenario.agents, scenario.solutes
    n_agents = len(agents)
    k_value = _k_values(scenario, notes)
    lean = np.array([[a.lean.get(s, 0.0) for s in solutes] for a in agents])

    def per_agent(attr, fallback=None):
        return np.array([getattr(a, attr) if getattr(a, attr) is not None else fallback for a in agents], dtype=float)

    if mode == "absorb":
        liquid_m, liquid_rho = per_agent("molar_mass"), per_agent("density")
        liquid_mu, sigma = per_agent("viscosity"), per_agent("surface_tension")
        gas_m = np.full(n_agents, feed.molar_mass)
    else:
        liquid_m, liquid_rho = np.full(n_agents, feed.molar_mass), np.full(n_agents, feed.density)
        liquid_mu, sigma = np.full(n_agents, feed.viscosity), np.full(n_agents, feed.surface_tension)
        gas_m = per_agent("molar_mass")
    rho_gas = gas_density(feed.pressure, feed.temperature, gas_m)

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
    for a, agent in enumerate(agents):
        if agent.efficiency is not None:
            eff[a, :] = agent.efficiency

    credit = np.zeros(len(solutes))
    for s, solute in enumerate(solutes):
        if solute in eco.credit:
            credit[s] = eco.credit[solute] * eco.solute_molar_mass[solute]

    if eco.cost_index is not None:
        index_to, index_year = eco.cost_index, None
    else:
        index_year = eco.cost_year if eco.cost_year is not None else costing.latest_cost_year()
        try:
            index_to = float(costing.cost_index(index_year))
        except ValueError as exc:
            raise ScenarioError(f"[economics] cost_year: {exc}") from None

    target = _targets(scenario)
    feed_in = np.array([feed.composition[s] for s in solutes])
    if np.all(target >= feed_in):
        shown = ", ".join(f"{s} {mole_fraction_text(x)} in, {mole_fraction_text(t)} allowed"
                          for s, x, t in zip(solutes, feed_in, target) if np.isfinite(t))
        raise ScenarioError(f"[[spec]]: the feed already meets every spec ({shown}); no column is needed")
    shell = col.existing_shell
    return Case(
        name=scenario.case.name, mode=mode, agents=tuple(a.name for a in agents), solutes=tuple(solutes),
        feed_flow=feed.flow, temperature=feed.temperature, pressure=feed.pressure,
        feed_in=feed_in, target=target,
        k_value=k_value, lean=lean, efficiency=eff, murphree=murphree,
        liquid_molar_mass=liquid_m, liquid_density=liquid_rho, liquid_viscosity=liquid_mu,
        surface_tension=sigma, gas_molar_mass=gas_m, gas_density=np.asarray(rho_gas, dtype=float),
        price=per_agent("price"), disposal=per_agent("disposal"),
        regenerated=np.array([a.regenerated for a in agents]), loss=per_agent("loss"),
        steam_ratio=per_agent("regeneration_steam"), cooling_ratio=per_agent("regeneration_cooling"),
        credit=credit,
        tray=col.tray, tray_spacing=col.tray_spacing, flood_fraction=col.flood_fraction,
        material=col.material, trays_range=tuple(col.trays), ratio_range=tuple(col.ratio),
        ratio_levels=col.ratio_levels, max_height=col.max_height, max_diameter=col.max_diameter,
        shell_diameter=shell.diameter if shell else None, shell_max_trays=shell.max_trays if shell else None,
        supply_pressure=col.supply_pressure, larger_diameters=col.larger_diameters, max_dilute=col.max_dilute, max_flow_change=col.max_flow_change,
        capital_recovery=float(economics.capital_recovery_factor(eco.interest, eco.life)),
        seconds=eco.hours * 3600.0, electricity=eco.electricity, steam=eco.steam,
        cooling_water=eco.cooling_water, index_to=index_to, index_year=index_year,
        contingency=eco.contingency, fee=eco.fee, auxiliary=eco.auxiliary,
        pump_efficiency=eco.pump_efficiency, blower_efficiency=eco.blower_efficiency,
        motor_efficiency=eco.motor_efficiency, capital_budget=eco.capital_budget,
        max_power=eco.max_power, max_steam=eco.max_steam, margin=eco.margin, notes=tuple(notes),
    )


# --------------------------------------------------------------------------- separation


def _equilibrium_inlet(case: Case, agent):
    """The treated-stream composition in equilibrium with the entering agent, (..., n_solutes)."""
    k, lean = case.k_value[agent], case.lean[agent]
    return k * lean if case.mode == "absorb" else lean / k


def target_fraction(case: Case, agent):
    """Driving-force fraction phi each solute must reach, (..., n_solutes); >= 1 means no spec.

    NaN-free: a spec below what the entering agent allows gives phi <= 0.
    """
    eq = _equilibrium_inlet(case, agent)
    with np.errstate(divide="ignore", invalid="ignore"):
        phi = np.where(np.isinf(case.target), np.inf, (case.target - eq) / (case.feed_in - eq))
    return np.where(case.feed_in > eq, phi, np.inf)


def _factor(case: Case, agent, rate):
    """Absorption factor A = L/(K V) or stripping factor S = K V/L, (..., n_solutes)."""
    k = case.k_value[agent]
    rate = np.asarray(rate, dtype=float)[..., None]
    if case.mode == "absorb":
        return rate / (k * case.feed_flow)
    return k * rate / case.feed_flow


def _rate_for_factor(case: Case, agent, factor):
    """Agent rate [mol/s] giving ``factor`` for each solute, (..., n_solutes)."""
    k = case.k_value[agent]
    if case.mode == "absorb":
        return factor * k * case.feed_flow
    return factor * case.feed_flow / k


def _stages(case: Case, agent, trays, factor):
    """Theoretical stages per solute, (..., n_solutes): trays x overall efficiency."""
    trays = np.asarray(trays, dtype=float)[..., None]
    if case.murphree is None:
        return trays * case.efficiency[agent]
    # Lewis: lambda = K V / L, the reciprocal of A for an absorber, S itself for a stripper.
    slope_ratio = 1.0 / factor if case.mode == "absorb" else factor
    return trays * efficiency.overall_from_murphree(case.murphree, slope_ratio)


def minimum_rate(case: Case, agent):
    """Least agent rate with unlimited stages [mol/s], (...,): the pinch limit over the specified solutes."""
    phi = target_fraction(case, agent)
    need = np.isfinite(phi) & (phi < 1.0)
    factor_min = np.where(need, kremser.minimum_factor(np.clip(phi, 1e-300, 1.0)), 0.0)
    factor_min = np.where(need & (phi <= 0), np.inf, factor_min)
    return np.max(_rate_for_factor(case, agent, factor_min), axis=-1)


def least_rate(case: Case, agent, trays):
    """Least agent rate [mol/s] meeting every spec with ``trays`` real trays, (...,); inf if none."""
    agent = np.asarray(agent)
    trays = np.asarray(trays, dtype=float)
    phi = target_fraction(case, agent)
    need = np.isfinite(phi) & (phi < 1.0)
    if case.murphree is None:
        stages = trays[..., None] * case.efficiency[agent]
        ok = need & (phi > 0)
        factor = kremser.factor_for_fraction(np.where(ok, phi, 0.5), np.where(ok, stages, 1.0), strict=False)
        factor = np.where(need, np.where(ok, factor, np.inf), 0.0)
        return np.max(_rate_for_factor(case, agent, factor), axis=-1)
    # Murphree: efficiency depends on the rate; bisect ln(rate) between the pinch and a wide bound.
    low = minimum_rate(case, agent)
    shape = np.broadcast_shapes(np.shape(low), trays.shape)
    low = np.broadcast_to(low, shape).astype(float)
    high = low * 1e6
    reachable = np.isfinite(low) & (low > 0)
    lo, hi = np.log(np.where(reachable, low, 1.0)), np.log(np.where(reachable, high, 1.0))
    meets_hi = _meets(case, agent, trays, np.exp(hi))
    for _ in range(80):
        mid = 0.5 * (lo + hi)
        ok = _meets(case, agent, trays, np.exp(mid))
        hi = np.where(ok, mid, hi)
        lo = np.where(ok, lo, mid)
    rate = np.exp(hi)
    zero_need = np.broadcast_to(low == 0, shape)
    return np.where(zero_need, 0.0, np.where(reachable & meets_hi, rate, np.inf))


def outlet(case: Case, agent, trays, rate):
    """Treated-stream outlet mole fraction of each solute, (..., n_solutes), with the factor and stages."""
    factor = _factor(case, agent, rate)
    stages = _stages(case, agent, trays, factor)
    with np.errstate(divide="ignore"):
        safe = np.where(factor > 0, factor, 1.0)
    phi = np.where(factor > 0, kremser.fraction_remaining(safe, stages), 1.0)
    eq = _equilibrium_inlet(case, agent)
    return eq + phi * (case.feed_in - eq), factor, stages


def _meets(case: Case, agent, trays, rate):
    out, _, _ = outlet(case, agent, trays, rate)
    return np.all(out <= case.target * (1.0 + 1e-9), axis=-1)


# --------------------------------------------------------------------------- evaluation


@dataclass
class Designs:
    """Every figure of a set of design points; each array has one entry per point.

    Flows in mol/s or kg/s, lengths in m, pressures in Pa, power in W, money
    in USD (capital) or USD/yr (operating, annualized).
    """

    agent: np.ndarray
    trays: np.ndarray
    rate: np.ndarray                 # agent rate [mol/s]
    rate_min: np.ndarray             # least rate with unlimited stages [mol/s]
    ratio: np.ndarray                # rate / rate_min (L/Lmin or G/Gmin)
    factor: np.ndarray               # (n, n_solutes) A or S
    stages: np.ndarray               # (n, n_solutes) theoretical stages
    outlet: np.ndarray               # (n, n_solutes) treated-stream mole fraction
    agent_outlet: np.ndarray         # (n, n_solutes) agent leaving, mole fraction
    meets_spec: np.ndarray
    liquid_flow: np.ndarray          # [mol/s]
    gas_flow: np.ndarray             # [mol/s]
    liquid_mass_flow: np.ndarray     # [kg/s]
    gas_mass_flow: np.ndarray        # [kg/s]
    flow_parameter: np.ndarray
    flooding_velocity: np.ndarray    # [m/s]
    diameter_required: np.ndarray    # [m]
    diameter: np.ndarray             # [m] standard (or existing shell)
    fraction_of_flood: np.ndarray
    height: np.ndarray               # [m] tangent to tangent
    pressure_drop_per_tray: np.ndarray  # [Pa]
    pressure_drop: np.ndarray        # [Pa]
    design_pressure: np.ndarray      # [Pa gauge]
    design_temperature: np.ndarray   # [K]
    wall_thickness: np.ndarray       # [m]
    head_thickness: np.ndarray       # [m]
    shell_weight: np.ndarray         # [kg]
    tray_weight: np.ndarray          # [kg]
    volume: np.ndarray               # [m3]
    pump_shaft_power: np.ndarray     # [W]
    blower_shaft_power: np.ndarray   # [W]
    electric_power: np.ndarray       # [W]
    steam_rate: np.ndarray           # [kg/s]
    purchased_vessel: np.ndarray
    purchased_trays: np.ndarray
    purchased_pump: np.ndarray
    purchased_blower: np.ndarray
    bare_module_vessel: np.ndarray
    bare_module_trays: np.ndarray
    bare_module_pump: np.ndarray
    bare_module_blower: np.ndarray
    bare_module: np.ndarray
    total_module: np.ndarray
    installed: np.ndarray            # grassroots capital [USD]
    cost_electricity: np.ndarray     # [USD/yr]
    cost_agent: np.ndarray           # fresh agent or make-up [USD/yr]
    cost_disposal: np.ndarray        # [USD/yr]
    cost_steam: np.ndarray           # [USD/yr]
    cost_cooling: np.ndarray         # [USD/yr]
    operating: np.ndarray            # [USD/yr]
    credit: np.ndarray               # recovered solute [USD/yr]
    capital_charge: np.ndarray       # capital recovery x installed [USD/yr]
    annualized: np.ndarray           # [USD/yr]
    within_limits: np.ndarray        # every scenario limit met
    warnings: list[str] = field(default_factory=list)

    def __len__(self) -> int:
        return int(self.agent.shape[0])

    def take(self, index) -> "Designs":
        """The designs at ``index`` (an integer array or mask)."""
        picked = {f.name: getattr(self, f.name)[index] for f in fields(self) if f.name != "warnings"}
        return Designs(**picked, warnings=list(self.warnings))


def evaluate(case: Case, agent, trays, rate, diameter=None) -> Designs:
    """Evaluate design points exactly.

    Arrays of agent index, real trays, agent rate [mol/s] and, optionally,
    the shell diameter [m]; without it the diameter is the least standard
    size the flooding limit allows (or the existing shell of the scenario).
    """
    if diameter is None:
        diameter = np.nan if case.shell_diameter is None else case.shell_diameter
    agent, trays, rate, diameter = np.broadcast_arrays(
        np.asarray(agent, dtype=int), np.asarray(trays, dtype=float), np.asarray(rate, dtype=float),
        np.asarray(diameter, dtype=float),
    )
    agent, trays, rate, diameter = agent.ravel(), trays.ravel(), rate.ravel(), diameter.ravel()
    notes: list[str] = list(case.notes)
    absorb = case.mode == "absorb"

    out, factor, stages = outlet(case, agent, trays, rate)
    meets = np.all(out <= case.target * (1.0 + 1e-9), axis=-1)
    rate_min = minimum_rate(case, agent)
    with np.errstate(divide="ignore", invalid="ignore"):
        ratio = np.where(rate_min > 0, rate / rate_min, np.inf)

    liquid = rate if absorb else np.full_like(rate, case.feed_flow)
    gas = np.full_like(rate, case.feed_flow) if absorb else rate
    removed = case.feed_in - out  # per mol of treated stream
    with np.errstate(divide="ignore", invalid="ignore"):
        agent_out = case.lean[agent] + removed * (case.feed_flow / rate)[:, None]
    liquid_mass = liquid * case.liquid_molar_mass[agent]
    gas_mass = gas * case.gas_molar_mass[agent]
    rho_l, rho_g = case.liquid_density[agent], case.gas_density[agent]
    sigma = case.surface_tension[agent]

    sizing = dict(tray_spacing=case.tray_spacing, flood_fraction=case.flood_fraction, tray_type=case.tray)
    missing = np.isnan(diameter)
    if np.all(missing):  # a new shell of the least standard size
        size = hydraulics.size_column(gas_mass, liquid_mass, rho_g, rho_l, sigma, trays, **sizing, warnings=notes)
    else:  # shells given (an existing one, or sizes above the least): fill any gaps with the least size
        if np.any(missing):
            least = hydraulics.size_column(gas_mass, liquid_mass, rho_g, rho_l, sigma, trays, **sizing).diameter
            diameter = np.where(missing, least, diameter)
        size = hydraulics.size_column(gas_mass, liquid_mass, rho_g, rho_l, sigma, trays, **sizing,
                                      diameter=diameter, warnings=notes)
    diameter, height = size.diameter, size.height

    # Vessel: estimating figures only, not a mechanical design.
    plate = PLATE[case.material]
    p_design = vessel.design_pressure(case.pressure, warnings=notes)
    t_design = vessel.design_temperature(case.temperature)
    stress = vessel.allowable_stress(plate, t_design, warnings=notes)
    wall = vessel.wall_thickness(p_design, diameter, stress, warnings=notes)
    head = vessel.round_up_to_plate(vessel.head_thickness(p_design, diameter, stress))
    shell_kg = vessel.shell_weight(diameter, height, wall, vessel.metal_density(plate))
    trays_kg = vessel.tray_weight(diameter, trays)
    volume = math.pi / 4.0 * diameter**2 * height
    area = math.pi / 4.0 * diameter**2

    # Pump for the liquid fed to the top; blower for the gas fed to the bottom.
    q_liquid = liquid_mass / rho_l
    pump_rise = np.maximum(case.pressure - case.supply_pressure, 0.0) + rho_l * GRAVITY * height + PUMP_ALLOWANCE
    pump_shaft = economics.pump_power(q_liquid, pump_rise, case.pump_efficiency)
    gas_inlet_pressure = case.pressure if absorb else STANDARD_ATMOSPHERE
    blower_rise = size.pressure_drop + BLOWER_ALLOWANCE + (0.0 if absorb else max(case.pressure - STANDARD_ATMOSPHERE, 0.0))
    q_gas = gas_mass / gas_density(gas_inlet_pressure, case.temperature, case.gas_molar_mass[agent])
    blower_shaft = economics.blower_power(q_gas, gas_inlet_pressure, blower_rise, case.blower_efficiency)
    electric = (economics.electric_power(pump_shaft, case.motor_efficiency)
                + economics.electric_power(blower_shaft, case.motor_efficiency))

    # Capital at the source's cost basis, escalated to the estimate's index.
    p_gauge = np.maximum(p_design, 0.0)
    cp_vessel = costing.purchased_cost("vessel_vertical", volume, warnings=notes)
    tray_item = f"tray_{case.tray}"
    cp_trays = costing.purchased_cost(tray_item, area, warnings=notes) * trays
    cp_pump = costing.purchased_cost("pump_centrifugal", pump_shaft / 1000.0, warnings=notes)
    cp_blower = costing.purchased_cost("blower_centrifugal", q_gas, warnings=notes)
    bm_vessel = costing.bare_module_cost("vessel_vertical", volume, material=case.material,
                                         pressure_gauge=p_gauge, diameter=diameter)
    bm_trays = costing.bare_module_cost(tray_item, area, material=case.material, trays=trays)
    pump_discharge = case.supply_pressure + pump_rise - STANDARD_ATMOSPHERE
    bm_pump = costing.bare_module_cost("pump_centrifugal", pump_shaft / 1000.0, material=case.material,
                                       pressure_gauge=pump_discharge)
    bm_blower = costing.bare_module_cost("blower_centrifugal", q_gas, pressure_gauge=blower_rise)
    bm0 = (costing.bare_module_cost("vessel_vertical", volume, diameter=diameter)
           + costing.bare_module_cost(tray_item, area, trays=trays)
           + costing.bare_module_cost("pump_centrifugal", pump_shaft / 1000.0)
           + costing.bare_module_cost("blower_centrifugal", q_gas))
    basis = costing.load_cost_table()["vessel_vertical"]["index_basis"]

    def now(cost):
        return costing.escalate(cost, basis, case.index_to)

    bm_vessel, bm_trays, bm_pump, bm_blower = now(bm_vessel), now(bm_trays), now(bm_pump), now(bm_blower)
    bare = bm_vessel + bm_trays + bm_pump + bm_blower
    capital = costing.installed_cost(bare, contingency=case.contingency, fee=case.fee,
                                     auxiliary=case.auxiliary, bare_module_base=now(bm0))

    # Operating cost per year.
    agent_mass = rate * (case.liquid_molar_mass[agent] if absorb else case.gas_molar_mass[agent])
    regen = case.regenerated[agent]
    purge = np.where(regen, case.loss[agent] * agent_mass, agent_mass)
    steam_rate = np.where(regen, case.steam_ratio[agent] * agent_mass, 0.0)
    cooling_rate = np.where(regen, case.cooling_ratio[agent] * agent_mass, 0.0)
    yearly = case.seconds
    cost_electricity = electric * case.electricity * yearly
    cost_agent = purge * case.price[agent] * yearly
    cost_disposal = purge * case.disposal[agent] * yearly
    cost_steam = steam_rate * case.steam * yearly
    cost_cooling = cooling_rate * case.cooling_water * yearly
    operating = cost_electricity + cost_agent + cost_disposal + cost_steam + cost_cooling
    credit = np.where(regen, case.feed_flow * (removed * case.credit).sum(axis=-1) * yearly, 0.0)
    charge = case.capital_recovery * capital.grassroots
    annualized = economics.annualized_cost(capital.grassroots, case.capital_recovery, operating, credit)

    designs = Designs(
        agent=agent, trays=trays.astype(int), rate=rate, rate_min=rate_min, ratio=ratio,
        factor=factor, stages=stages, outlet=out, agent_outlet=agent_out, meets_spec=meets,
        liquid_flow=liquid, gas_flow=gas, liquid_mass_flow=liquid_mass, gas_mass_flow=gas_mass,
        flow_parameter=size.flow_parameter, flooding_velocity=size.flooding_velocity,
        diameter_required=size.diameter_required, diameter=diameter,
        fraction_of_flood=size.fraction_of_flood_at_standard_diameter, height=height,
        pressure_drop_per_tray=size.pressure_drop_per_tray, pressure_drop=size.pressure_drop,
        design_pressure=np.broadcast_to(p_design, rate.shape).astype(float),
        design_temperature=np.broadcast_to(t_design, rate.shape).astype(float),
        wall_thickness=wall, head_thickness=head, shell_weight=shell_kg, tray_weight=trays_kg,
        volume=volume, pump_shaft_power=pump_shaft, blower_shaft_power=blower_shaft,
        electric_power=electric, steam_rate=steam_rate,
        purchased_vessel=now(cp_vessel), purchased_trays=now(cp_trays), purchased_pump=now(cp_pump),
        purchased_blower=now(cp_blower), bare_module_vessel=bm_vessel, bare_module_trays=bm_trays,
        bare_module_pump=bm_pump, bare_module_blower=bm_blower, bare_module=bare,
        total_module=capital.total_module, installed=capital.grassroots,
        cost_electricity=cost_electricity, cost_agent=cost_agent, cost_disposal=cost_disposal,
        cost_steam=cost_steam, cost_cooling=cost_cooling, operating=operating, credit=credit,
        capital_charge=charge, annualized=annualized, within_limits=np.ones(rate.shape, bool), warnings=notes,
    )
    designs.within_limits = limits_met(case, designs)
    return designs


@dataclass(frozen=True)
class Limit:
    """One limit of the scenario, stated point by point as ``values <= bound``.

    The scan applies it with numpy and the model states it as one
    constraint ``sum_d pick[d] values[d] <= bound``: one place for each.
    """

    name: str             # short key, used as the constraint name
    label: str            # what the user set, in words
    values: np.ndarray    # one per design point
    bound: float
    unit: str = ""        # of values and bound, for messages


def limit_table(case: Case, d) -> list[Limit]:
    """Every limit the scenario sets, over the design points ``d`` (a Designs)."""
    lo, hi = case.ratio_range
    word = "L/Lmin" if case.mode == "absorb" else "G/Gmin"
    table = []
    for s, solute in enumerate(case.solutes):
        if np.isfinite(case.target[s]):
            table.append(Limit(f"spec_{s}", f"{solute} outlet spec", d.outlet[:, s],
                               float(case.target[s] * (1 + 1e-9))))
    table.append(Limit("ratio_low", f"{word} at least {lo:g}", -d.ratio, -lo * (1 - 1e-12)))
    table.append(Limit("ratio_high", f"{word} at most {hi:g}", d.ratio, hi * (1 + 1e-12)))
    table.append(Limit("flood", f"fraction of flood at most {case.flood_fraction:g}",
                       d.fraction_of_flood, case.flood_fraction * (1 + 1e-9)))
    optional = [
        ("max_height", "height", d.height, case.max_height, "m"),
        ("max_diameter", "diameter", d.diameter, case.max_diameter, "m"),
        ("shell_trays", "trays in the existing shell", d.trays.astype(float), case.shell_max_trays, ""),
        ("capital_budget", "installed cost", d.installed, case.capital_budget, "USD"),
        ("max_power", "electric power", d.electric_power, case.max_power, "W"),
        ("max_steam", "steam", d.steam_rate, case.max_steam, "kg/s"),
    ]
    for name, what, values, bound, unit in optional:
        if bound is not None and np.isfinite(bound):
            # the same relative slack of 1e-9 as the spec and flood limits: rounding, not engineering
            table.append(Limit(name, f"{what} at most {bound:.4g} {unit}".strip(), values,
                               float(bound) * (1 + 1e-9), unit))
    return table


def limits_met(case: Case, d) -> np.ndarray:
    """True where a design point meets every limit of ``limit_table``."""
    ok = np.ones(len(d), dtype=bool)
    for limit in limit_table(case, d):
        ok &= limit.values <= limit.bound
    return ok


def dilute_checks(case: Case, designs: Designs) -> list[str]:
    """Dilute-validity warnings for each design point given (use on a few chosen designs)."""
    messages: list[str] = []
    absorb = case.mode == "absorb"
    for i in range(len(designs)):
        lean = case.lean[designs.agent[i]]
        treated_in, treated_out = case.feed_in, designs.outlet[i]
        agent_in, agent_out = lean, designs.agent_outlet[i]
        gas_in, gas_out = (treated_in, treated_out) if absorb else (agent_out, agent_in)
        liq_in, liq_out = (agent_in, agent_out) if absorb else (treated_in, treated_out)
        for m in equilibrium.dilute_warnings(
            gas_in, gas_out, liq_in, liq_out,
            max_mole_fraction=case.max_dilute, max_flow_change=case.max_flow_change,
        ):
            if m not in messages:
                messages.append(m)
    return messages


# --------------------------------------------------------------------------- the space


@dataclass
class Space:
    """All alternatives of a case, evaluated: the one input of the model and of the scan."""

    case: Case
    designs: Designs
    group: np.ndarray            # (agent, trays) group index of each alternative
    least: np.ndarray            # True for the least-rate alternative of its group
    feasible: np.ndarray         # meets spec and every limit
    agents: np.ndarray           # the candidates (indices into case.agents) this space covers

    def undominated(self, keep: int) -> np.ndarray:
        """Indices of the alternatives that can be among the ``keep`` best; the rest are dropped.

        Alternative p is dropped when at least ``keep`` others of its group
        (same agent and trays) cost no more and meet every limit p meets:
        whatever the limits allow, those come before p. Exact for the top
        ``keep`` under any combination of the limits in ``limit_table``.
        """
        d, n = self.designs, len(self.designs)
        mask = np.zeros(n, dtype=np.int64)
        for bit, limit in enumerate(limit_table(self.case, d)):
            mask |= (limit.values <= limit.bound).astype(np.int64) << bit
        order = np.lexsort((np.arange(n), d.annualized, self.group))
        grp, msk = self.group[order], mask[order]
        starts = np.r_[0, np.flatnonzero(grp[1:] != grp[:-1]) + 1]
        first = np.repeat(starts, np.diff(np.r_[starts, n]))
        dominators = np.zeros(n, dtype=np.int64)
        for value in np.unique(msk):
            covers = ((msk & value) == value).astype(np.int64)
            running = np.cumsum(covers)
            before = running - covers - (running[first] - covers[first])
            dominators = np.where(msk == value, before, dominators)
        return np.sort(order[dominators < keep])


def rate_grid(case: Case) -> np.ndarray:
    """The ratio levels (geometric between the scenario's bounds), (ratio_levels,)."""
    lo, hi = case.ratio_range
    return np.geomspace(lo, hi, case.ratio_levels)


def build_space(case: Case, agents=None) -> Space:
    """Evaluate every alternative of the case.

    For each agent and tray count: the least rate meeting the spec and the
    grid levels above it; for each of those rates the least standard diameter
    and ``larger_diameters`` standard sizes above it (a wider shell costs more
    but lowers the tray pressure drop and so the blower power). With an
    existing shell, only its diameter.
    """
    chosen = np.arange(len(case.agents)) if agents is None else np.asarray(agents, dtype=int)
    trays = np.arange(case.trays_range[0], case.trays_range[1] + 1)
    grid_agent, grid_trays = np.meshgrid(chosen, trays, indexing="ij")
    grid_agent, grid_trays = grid_agent.ravel(), grid_trays.ravel()
    rate_min = minimum_rate(case, grid_agent)
    lo, hi = case.ratio_range
    least = np.maximum(least_rate(case, grid_agent, grid_trays), lo * rate_min)
    grid_rates = rate_min[:, None] * rate_grid(case)[None, :]
    reach = np.isfinite(least) & (least <= hi * rate_min * (1 + 1e-12))
    above = (grid_rates > least[:, None] * (1 + _SAME_RATE)) & reach[:, None]
    g_idx, l_idx = np.nonzero(above)
    group = np.concatenate([np.nonzero(reach)[0], g_idx])
    rate = np.concatenate([least[reach], grid_rates[g_idx, l_idx]])
    is_least = np.concatenate([np.ones(int(reach.sum()), bool), np.zeros(g_idx.size, bool)])
    base = evaluate(case, grid_agent[group], grid_trays[group], rate)
    if case.shell_diameter is None and case.larger_diameters > 0:
        steps = np.arange(1, case.larger_diameters + 1)
        wider = hydraulics.standard_diameter(
            base.diameter[:, None] + steps[None, :] * hydraulics.STANDARD_DIAMETER_STEP).ravel()
        repeat = np.repeat(np.arange(len(base)), steps.size)
        extra = evaluate(case, base.agent[repeat], base.trays[repeat], base.rate[repeat], wider)
        designs = concatenate([base, extra])
        group = np.concatenate([group, group[repeat]])
        is_least = np.concatenate([is_least, is_least[repeat]])
    else:
        designs = base
    feasible = designs.within_limits
    return Space(case=case, designs=designs, group=group, least=is_least, feasible=feasible, agents=chosen)


def concatenate(parts: list[Designs]) -> Designs:
    """One Designs from several, in order; warnings merged without repeats."""
    merged: list[str] = []
    for part in parts:
        merged += [w for w in part.warnings if w not in merged]
    values = {f.name: np.concatenate([getattr(p, f.name) for p in parts])
              for f in fields(Designs) if f.name != "warnings"}
    return Designs(**values, warnings=merged)


def infeasible_reason(space: Space) -> str:
    """Why no alternative of ``space`` qualifies, with the best reachable figures, in one line."""
    case = space.case
    word = "L/Lmin" if case.mode == "absorb" else "G/Gmin"
    n_max, (_, hi) = case.trays_range[1], case.ratio_range
    if case.shell_max_trays is not None:
        n_max = min(n_max, case.shell_max_trays)
    d = space.designs
    if len(d) == 0 or not np.any(space.least):
        parts = []
        agents = np.asarray(space.agents, dtype=int)
        rate = hi * minimum_rate(case, agents)
        # An agent whose lean loading already exceeds a spec has no finite minimum rate; its
        # outlet is not needed (the message names the lean loading), so evaluate it at any rate.
        out, _, _ = outlet(case, agents, np.full(agents.shape, n_max), np.where(np.isfinite(rate), rate, 1.0))
        for row, a in enumerate(agents):
            name = case.agents[a]
            if not np.isfinite(rate[row]):
                lean = [case.solutes[s] for s in range(len(case.solutes))
                        if np.isfinite(case.target[s]) and _equilibrium_inlet(case, a)[s] >= case.target[s]]
                parts.append(f"{name!r}: its lean loading alone holds {', '.join(lean)} above the spec")
                continue
            misses = [
                f"{case.solutes[s]} {mole_fraction_text(out[row, s])} (spec {mole_fraction_text(case.target[s])})"
                for s in range(len(case.solutes)) if out[row, s] > case.target[s] * (1 + 1e-9)
            ]
            reached = ", ".join(misses) if misses else "the spec only with a rate outside the ratio range"
            parts.append(f"{name!r} reaches {reached} even at {n_max} trays and {hi:g} x {word.split('/')[1]}")
        return ("no design meets the spec: " + "; ".join(parts)
                + "; allow more trays, a wider ratio range, a leaner solvent or another candidate")
    meets = np.ones(len(d), bool)
    limits = limit_table(case, d)
    for limit in limits:
        if limit.name.startswith("spec_"):
            meets &= limit.values <= limit.bound
    reasons = []
    for limit in limits:
        if limit.name.startswith("spec_") or limit.name.startswith("ratio"):
            continue
        values = limit.values[meets]
        if values.size and np.min(values) > limit.bound:
            reasons.append(f"the least {limit.label.split(' at most')[0]} of any design meeting the spec is "
                           f"{np.min(values):.4g} {limit.unit}".rstrip() + f", above the limit ({limit.label})")
    if not reasons:
        reasons.append("no single design meets every limit at once (" + "; ".join(c.label for c in limits) + ")")
    return "no design meets the spec within the limits: " + "; ".join(reasons)
