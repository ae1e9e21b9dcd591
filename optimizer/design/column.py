"""The one-column flowsheet: one absorber or stripper with its pump, its gas mover and their motors.

A design is a candidate agent, its internals (trays, or one of the case's
packings), a count (real trays; a packed bed's theoretical stages, which
follow from its rate), an agent rate and a shell diameter.
``SingleColumn.evaluate`` prices any set of design points exactly, all in
one call (numpy broadcasting):

    cascade (towercost.design.cascade)  ->  outlets, factors, stages
    internals (towercost.design.internals)  ->  diameter, height, pressure drop
                                            (a packed bed: its height, stages and outlets too)
    vessel (towercost.models.vessel)  ->  design pressure, shell and head walls, weights
    machines (towercost.models.economics)  ->  pump and blower power, priced with their motors
    cost lines (towercost.design.costlines)  ->  capital, operating, annualized
    limits (towercost.design.limits)  ->  within_limits

``SingleColumn.alternatives`` enumerates the design space in chunks: for each
agent and tray count, the least rate meeting every spec (exact Kremser
inverse) and the ratio levels above it; for each agent and packing, the
least rate of each count of theoretical stages and the levels above the
least of them (``towercost.design.packed``). ``SingleColumn.shells`` prices
each rate at the least standard diameter and the wider ones the diameter
search offers (until the cost has risen for two sizes in a row).

A regenerated agent's regenerator enters only through the scenario's steam
and cooling water per kg circulated; its equipment is not modelled here.
"""

from __future__ import annotations

import math
from collections.abc import Iterator
from dataclasses import dataclass, field

import numpy as np

from towercost.design import cascade, packed
from towercost.design.case import Case, supply_pressure_of
from towercost.design.costlines import (AGENT, COOLING, DISPOSAL, ELECTRICITY, STEAM, Equipment, ItemSpec, Uses,
                                        annualize, credit_spec, price_gas_mover, price_item)
from towercost.design.designs import Designs, Figures
from towercost.design.column_internals import ColumnInternals
from towercost.design.internals import FIRST_PACKING, LeastCache, Loads
from towercost.design.limits import RATIO_TOLERANCE, SPEC_TOLERANCE, limit_table, limits_met
from towercost.models import defaults, economics, hydraulics, vessel
from towercost.models.constants import GRAVITY, STANDARD_ATMOSPHERE
from towercost.models.properties import ideal_gas_density

#: Plate for the shell in each column material (models/data/materials.toml).
PLATE = {"carbon_steel": "SA-516-70", "ss304": "SA-240-304", "ss316": "SA-240-316"}

SHELL = ItemSpec("tower_shell", "T-101", "tower shell", "vessel_vertical")
PUMP = ItemSpec("pump", "P-101", "liquid feed pump", "pump_centrifugal")
#: The gas mover: a radial fan within the fan row's pressure range, a blower priced by fluid power above it.
FAN = ItemSpec("blower", "K-101", "gas fan (radial, priced by inlet flow)", "blower_centrifugal")
BLOWER = ItemSpec("blower", "K-101", "gas blower (centrifugal, priced by fluid power)", "blower_centrifugal_power")

#: Cost-table row of an electric motor drive, by enclosure ([column] drive_enclosure).
DRIVE_ROWS = {"totally_enclosed": "drive_electric_enclosed", "explosion_proof": "drive_electric_explosion_proof",
              "open_drip_proof": "drive_electric_open"}


def drive_specs(enclosure: str) -> tuple[ItemSpec, ItemSpec]:
    """The motors of the pump and of the gas mover, priced on the shaft power they deliver."""
    words = enclosure.replace("_", " ").replace("open drip proof", "open/drip-proof")
    row = DRIVE_ROWS[enclosure]
    return (ItemSpec("pump_drive", "PM-101", f"pump motor ({words})", row),
            ItemSpec("blower_drive", "KM-101", f"gas mover motor ({words})", row))


def shell_spec(case: Case) -> ItemSpec:
    """The tower shell row: a new shell, or an existing one charged only its modification allowance."""
    if case.shell_diameter is None:
        return SHELL
    return ItemSpec(SHELL.key, SHELL.tag, f"tower shell, existing (modifications at {100 * case.shell_modification:g} % "
                    "of a new shell)", SHELL.correlation)

#: Figures an ``Extra`` adds to the column's own rather than replacing.
ADDED_UP = ("steam_rate", "cooling_rate")

#: Rate grid points closer than this (relative) to the least rate are not offered again.
SAME_RATE = 1e-9

#: Alternatives evaluated per call when the space is enumerated in chunks.
CHUNK = 1 << 17

#: Diameter search: standard sizes above the least one that may be tried (a cap: 30 x 6 in = 4.6 m),
#: and how many sizes in a row the cost must rise before the search stops.
MAX_WIDER = 30
RISES = 2

#: Shell sizes per rate a searched space holds on the demo cases (3 to 5): sizes its batches.
TYPICAL_SIZES = 4


@dataclass(frozen=True)
class Separation:
    """Design points separated but not yet sized: decisions, cascade figures and column loads."""

    agent: np.ndarray
    trays: np.ndarray        # real trays (float)
    rate: np.ndarray
    figures: dict[str, np.ndarray]
    loads: Loads
    cache: LeastCache = field(default=None)   # least shells per tray type, found once for every size tried
    fixed: list = field(default_factory=list)  # the Fixed part, once found (priced without messages)
    internals: np.ndarray = field(default=None)   # per point: -1 the tray rule, 0/1 a tray type, >= 2 a packing
    extra: "Extra | None" = None    # equipment and uses beyond this column that its diameter does not change

    def __post_init__(self):
        if self.cache is None:
            object.__setattr__(self, "cache", LeastCache(self.rate.shape[0]))
        if self.internals is None:
            object.__setattr__(self, "internals", np.full(self.rate.shape[0], -1, dtype=np.int8))

    def take(self, index) -> "Separation":
        return Separation(self.agent[index], self.trays[index], self.rate[index],
                          Figures(source=self.figures, index=index), self.loads.take(index),
                          self.cache.take(index), [f.take(index) for f in self.fixed], self.internals[index],
                          None if self.extra is None else self.extra.take(index))


@dataclass(frozen=True)
class Extra:
    """Equipment, power and uses a flowsheet adds beside the column (a regenerated loop's), per design point."""

    items: tuple                    # ItemCost rows
    electric: np.ndarray            # [W] drawn beside the column's pump and gas mover
    uses: tuple                     # (UseSpec, rate, unit price) rows
    figures: dict                   # figures added, or replacing the column's (steam_rate, cooling_rate, ...)
    notes: tuple = ()               # range messages of the added items

    def take(self, index) -> "Extra":
        def part(value):
            return value[index] if np.ndim(value) else value
        return Extra(tuple(item.take(index) for item in self.items), part(self.electric),
                     tuple((spec, part(rate), part(price)) for spec, rate, price in self.uses),
                     {k: part(v) for k, v in self.figures.items()}, self.notes)


@dataclass(frozen=True)
class Fixed:
    """What the shell's diameter does not change beyond the separation: the pump, the gas flow, the uses."""

    q_liquid: np.ndarray            # [m3/s] pumped
    pump_rise: np.ndarray           # [Pa]
    pump_shaft: np.ndarray          # [W]
    q_gas: np.ndarray               # [m3/s] at the gas mover's inlet
    items: tuple                    # the pump and its motor (ItemCost rows)
    uses: tuple                     # (UseSpec, rate, unit price) rows other than electricity
    figures: dict                   # purge, steam and cooling rates

    def take(self, index) -> "Fixed":
        def part(value):
            return value[index] if np.ndim(value) else value
        return Fixed(self.q_liquid[index], self.pump_rise[index], self.pump_shaft[index], self.q_gas[index],
                     tuple(item.take(index) for item in self.items),
                     tuple((spec, part(rate), part(price)) for spec, rate, price in self.uses),
                     {k: v[index] for k, v in self.figures.items()})


@dataclass(frozen=True)
class Chunk:
    """A batch of alternatives: decisions plus where each came from."""

    agent: np.ndarray
    trays: np.ndarray
    rate: np.ndarray
    diameter: np.ndarray     # NaN: the least standard size
    least: np.ndarray        # the least rate of its (agent, trays) group
    progress: tuple[int, int] = (0, 0)   # (agent, trays) groups enumerated so far, and in all
    internals: np.ndarray | None = None  # per point: -1 the tray rule, >= FIRST_PACKING a packing (None: trays)


class SingleColumn:
    """One column, its pump and its blower, for one case."""

    def __init__(self, case: Case):
        self.case = case
        self.service = case.service
        self.internals = ColumnInternals(case)
        self.shell = shell_spec(case)
        self.pump_drive, self.blower_drive = drive_specs(case.drive_enclosure)
        #: least rate of each agent with unlimited stages [mol/s]: a property of the agent alone
        self.rate_min = cascade.minimum_rate(case, np.arange(len(case.agents)))

    # ----------------------------------------------------------------- enumeration

    def rate_grid(self) -> np.ndarray:
        """The ratio levels (geometric between the scenario's bounds), (ratio_levels,)."""
        lo, hi = self.case.ratio_range
        return np.geomspace(lo, hi, self.case.ratio_levels)

    def groups(self, agents=None) -> tuple[np.ndarray, np.ndarray]:
        """Every (agent, trays) pair searched, as two flat arrays."""
        case = self.case
        chosen = np.arange(len(case.agents)) if agents is None else np.asarray(agents, dtype=int)
        trays = np.arange(case.trays_range[0], case.trays_range[1] + 1)
        grid_agent, grid_trays = np.meshgrid(chosen, trays, indexing="ij")
        return grid_agent.ravel(), grid_trays.ravel()

    def diameters_per_rate(self) -> int:
        """The most shell sizes one separated design point is priced at."""
        case = self.case
        if case.shell_diameter is not None:
            return 1
        return 1 + (MAX_WIDER if case.larger_diameters is None else case.larger_diameters)

    def _rates_bound(self) -> int:
        """The most rates the enumeration separates: per tray group the least and the levels, per packed pair theirs."""
        case = self.case
        trays = len(case.agents) * (case.trays_range[1] - case.trays_range[0] + 1) if case.offer_trays else 0
        trays *= 2 if case.compete_tray_types else 1
        stages = case.stages_range[1] - case.stages_range[0] + 1
        beds = len(case.agents) * len(case.packings)
        return trays * (case.ratio_levels + 1) + beds * (stages + case.ratio_levels)

    def estimate(self) -> int:
        """An upper bound on the alternatives ``alternatives`` yields, without evaluating anything."""
        return self._rates_bound() * self.diameters_per_rate()

    def typical(self) -> int:
        """About how many alternatives the space holds: ``estimate`` with a few sizes per rate when searched."""
        case = self.case
        per_rate = self.diameters_per_rate() if case.larger_diameters is not None else TYPICAL_SIZES
        return self._rates_bound() * min(per_rate, self.diameters_per_rate())

    def alternatives(self, agents=None, chunk: int = CHUNK) -> Iterator[Chunk]:
        """The design space in batches of about ``chunk`` alternatives: the trays' groups, then the packed beds'."""
        case = self.case
        chosen = np.arange(len(case.agents)) if agents is None else np.asarray(agents, dtype=int)
        beds = len(case.packings) * chosen.size
        per_rate = self.diameters_per_rate() if case.larger_diameters is not None else TYPICAL_SIZES
        per_rate = min(per_rate, self.diameters_per_rate())
        tray_groups = 0
        if case.offer_trays:
            grid_agent, grid_trays = self.groups(chosen)
            rate_min = self.rate_min[grid_agent]
            lo, hi = case.ratio_range
            least = np.maximum(cascade.least_rate(case, grid_agent, grid_trays), lo * rate_min)
            levels = self.rate_grid()
            reach = np.isfinite(least) & (least <= hi * rate_min * (1 + RATIO_TOLERANCE))
            groups = np.flatnonzero(reach)
            tray_groups = groups.size
            per_group = (1 + levels.size) * per_rate
            step = max(1, chunk // per_group)
            # the tray rule (-1), or each tray type as its own alternative where they compete
            kinds = (0, 1) if case.compete_tray_types else (-1,)
            for start in range(0, groups.size, step):
                g = groups[start:start + step]
                grid_rates = rate_min[g, None] * levels[None, :]
                above = grid_rates > least[g, None] * (1 + SAME_RATE)
                g_idx, l_idx = np.nonzero(above)
                group = np.concatenate([g, g[g_idx]])
                rate = np.concatenate([least[g], grid_rates[g_idx, l_idx]])
                is_least = np.concatenate([np.ones(g.size, bool), np.zeros(g_idx.size, bool)])
                for kind in kinds:
                    yield Chunk(grid_agent[group], grid_trays[group], rate, np.full(rate.shape, np.nan), is_least,
                                (min(start + step, groups.size), groups.size + beds),
                                np.full(rate.shape, kind, dtype=np.int8))
        done = 0
        for bed in self.internals.beds:
            agent, rate, is_least = self.packed_rates(chosen)
            step = max(1, chunk // per_rate)
            for start in range(0, rate.size, step):
                part = slice(start, start + step)
                n = rate[part].size
                yield Chunk(agent[part], np.zeros(n, int), rate[part], np.full(n, np.nan), is_least[part],
                            (tray_groups + done + chosen.size, tray_groups + beds),
                            np.full(n, bed.index, dtype=np.int8))
            done += chosen.size

    def packed_rates(self, agents) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """The rates a packed bed is offered at, per candidate: (agent, rate [mol/s], least-rate flag).

        For each count of theoretical stages in ``[column] stages`` the least
        rate meeting every spec (exact Kremser inverse, raised to the ratio
        floor), and every ratio level above the least of them, within the
        ratio range. The same for every packing: the height follows.
        """
        case = self.case
        lo_s, hi_s = case.stages_range
        stages = np.arange(lo_s, hi_s + 1)
        lo, hi = case.ratio_range
        levels = self.rate_grid()
        out_agent, out_rate, out_least = [], [], []
        for a in np.asarray(agents, dtype=int):       # a loop over candidates, not design points
            rate_min = self.rate_min[a]
            least = np.maximum(packed.stage_least_rates(case, np.full(stages.size, a), stages), lo * rate_min)
            least = np.unique(least[np.isfinite(least) & (least <= hi * rate_min * (1 + RATIO_TOLERANCE))])
            if least.size == 0:
                continue
            grid = rate_min * levels
            above = grid[grid > least[0] * (1 + SAME_RATE)]
            above = above[np.min(np.abs(above[:, None] / least[None, :] - 1.0), axis=1) > SAME_RATE] \
                if above.size else above
            out_agent.append(np.full(least.size + above.size, a))
            out_rate.append(np.concatenate([least, above]))
            out_least.append(np.concatenate([np.ones(least.size, bool), np.zeros(above.size, bool)]))
        if not out_rate:
            return np.zeros(0, int), np.zeros(0), np.zeros(0, bool)
        return np.concatenate(out_agent), np.concatenate(out_rate), np.concatenate(out_least)

    def shells(self, separation: Separation) -> Iterator[tuple[np.ndarray, Designs]]:
        """The separated points priced at each shell size offered: the least first, then wider ones.

        Yields (positions in ``separation``, their designs at one more size).
        The sizes offered for each point:

        * an existing shell: that one only;
        * ``[column] larger_diameters`` given: the least size and that many above it;
        * otherwise the least size and each next standard size (6 in) until
          the cost has risen for ``RISES`` sizes in a row, the trays weep at
          the turndown loads (a wider shell only weeps more: the operating
          range ends; a packing falls below its minimum wetting rate), the
          next size exceeds ``max_diameter``, or ``MAX_WIDER``
          sizes have been tried. Where valve trays take the place of sieve
          trays that weep, the wider shells of that design take them at once. The cheapest size of a point is then never
          the widest tried, unless one of the last two ends it.
        """
        case = self.case
        n = separation.rate.shape[0]
        start = np.full(n, np.nan if case.shell_diameter is None else case.shell_diameter)
        base = self.price(separation, start, messages=False)
        everyone = np.arange(n)
        yield everyone, base
        if case.shell_diameter is not None:
            return
        if case.larger_diameters is not None:
            for wider in self.internals.trays.kinds[0].larger(base.diameter,
                                                              np.arange(1, case.larger_diameters + 1)).T:
                yield everyone, self.price(separation, wider, messages=False)
            return
        cost, diameter = base.annualized.copy(), base.diameter.copy()
        rises = np.zeros(n, dtype=np.int8)
        # -1: the tray rule; once the scenario's trays weep and valve trays take their place, the wider
        # shells of that design take valve trays at once (a wider shell only weeps more); a packed bed
        # keeps its packing. A wider shell only weeps more, or wets a packing less: the search ends there.
        tray = self._kept(base.internals)
        active = everyone[base.can_widen]
        limit = case.max_diameter * (1.0 + SPEC_TOLERANCE)
        for _ in range(MAX_WIDER):
            wider = hydraulics.standard_diameter(diameter[active] + hydraulics.STANDARD_DIAMETER_STEP)
            inside = wider <= limit
            active, wider = active[inside], wider[inside]
            if active.size == 0:
                return
            designs = self.price(separation.take(active), wider, tray[active], messages=False)
            yield active, designs
            rose = designs.annualized > cost[active]
            rises[active] = np.where(rose, rises[active] + 1, 0)
            cost[active], diameter[active] = designs.annualized, wider
            tray[active] = self._kept(designs.internals)
            active = active[(rises[active] < RISES) & designs.can_widen]

    def _kept(self, internals) -> np.ndarray:
        """The internals a wider shell of each design takes: valve trays once they replaced sieve trays, a
        packing always; else the tray rule (-1)."""
        if self.case.compete_tray_types:     # every tray type is its own alternative: each keeps its type
            return np.asarray(internals, dtype=np.int8).copy()
        keep = (internals == self.internals.fallback) | (internals >= FIRST_PACKING)
        return np.where(keep, internals, -1).astype(np.int8)

    # ----------------------------------------------------------------- evaluation

    def evaluate(self, agent, trays, rate, diameter=None, internals=None) -> Designs:
        """Evaluate design points exactly.

        Arrays of agent index, real trays, agent rate [mol/s] and, optionally,
        the shell diameter [m] (NaN or None: the least standard size that
        flooding and the downcomers (or a packing's flood and pressure-drop
        limits) allow, or the scenario's existing shell) and the internals
        (index into ``internals.names``: 0, 1 a tray type, 2... a packing,
        whose count of stages follows from its rate; -1 or None: the
        scenario's trays, valve trays where those fall outside their range).
        """
        case = self.case
        if diameter is None:
            diameter = np.nan if case.shell_diameter is None else case.shell_diameter
        agent, trays, rate, diameter = (a.ravel() for a in np.broadcast_arrays(
            np.asarray(agent, dtype=int), np.asarray(trays, dtype=float), np.asarray(rate, dtype=float),
            np.asarray(diameter, dtype=float)))
        internals = self.internals.resolved(internals, agent.size)
        return self.price(self.separate(agent, trays, rate, internals), diameter)

    def separate(self, agent, trays, rate, internals=None) -> Separation:
        """What a design's diameter does not change: the cascade, the flows and the column loads.

        A packed point's count becomes the stages its rate needs (rounded up);
        its stages and outlets come with its height, in ``price``.
        """
        case, service = self.case, self.service
        internals = self.internals.resolved(internals, np.shape(agent)[0])
        out, agent_out, factor, stages = cascade.outlet(case, agent, trays, rate)
        rate_min = self.rate_min[agent]
        with np.errstate(divide="ignore", invalid="ignore"):
            ratio = np.where(rate_min > 0, rate / rate_min, np.inf)
        liquid, gas = service.flows(rate, case.feed_flow)
        liquid_mass = liquid * case.liquid_molar_mass[agent]
        gas_mass = gas * case.gas_molar_mass[agent]
        loads = Loads(gas_mass, liquid_mass, case.gas_density[agent], case.liquid_density[agent],
                      case.surface_tension[agent])
        with np.errstate(divide="ignore", invalid="ignore"):
            share = np.where(np.isfinite(case.target), out / case.target, 0.0)   # outlet over its spec
        figures = dict(rate_min=rate_min, ratio=ratio, factor=factor, stages=stages,
                       efficiency=stages / np.maximum(trays, 1.0)[:, None], controlling=np.argmax(share, axis=-1),
                       outlet=out, agent_outlet=agent_out, meets_spec=cascade.meets_spec(case, out), liquid_flow=liquid,
                       gas_flow=gas, liquid_mass_flow=liquid_mass, gas_mass_flow=gas_mass)
        if case.packings:
            needed = packed.stages_needed(case, agent, factor)
            figures["stages_needed"] = needed
            beds = internals >= FIRST_PACKING
            if beds.any():
                trays = np.where(beds, packed.stage_count(needed), trays).astype(float)
        return Separation(agent, trays, rate, figures, loads, internals=internals)

    def price(self, separation: Separation, diameter, internals=None, *, messages: bool = True) -> Designs:
        """Size, price and check the separated design points at shell ``diameter`` [m] (NaN: the least size).

        ``internals``: of each point (None: the separation's; -1 the scenario's
        tray rule). With ``messages`` False no range message is gathered (the
        space's pass: only re-evaluated designs are reported).
        """
        case, service = self.case, self.service
        agent, trays, rate = separation.agent, separation.trays, separation.rate
        notes: list[str] | None = list(case.notes) if messages else None
        internals = separation.internals if internals is None else internals
        sizing = self.internals.size(separation, diameter, internals, warnings=notes)
        diameter, height = sizing.diameter, sizing.height
        trays_only = bool(np.all(sizing.is_tray))

        # Vessel: estimating figures only, not a mechanical design. A design pressure or
        # temperature the scenario gives replaces the margin rule.
        plate = PLATE[case.material]
        if case.design_pressure is None:
            p_design = vessel.design_pressure(case.pressure, warnings=notes)
        else:
            p_design = case.design_pressure
        if case.design_temperature is None:
            t_design = vessel.design_temperature(case.temperature)
        else:
            t_design = case.design_temperature
        stress = vessel.allowable_stress(plate, t_design, warnings=notes)
        wall = vessel.wall_thickness(p_design, diameter, stress, warnings=notes)
        head = vessel.head_wall_thickness(p_design, diameter, stress, warnings=notes)
        density = vessel.metal_density(plate)
        shell_kg = vessel.cylinder_weight(diameter, height, wall, density)
        heads_kg = 2.0 * vessel.head_weight(diameter, head, density)
        trays_kg = sizing.figures.pop("tray_weight")
        area = math.pi / 4.0 * diameter**2
        volume = area * height

        # Pump for the liquid fed to the top; gas mover for the gas fed to the bottom. A packed bed's
        # height and outlets follow its shell: its pump and credits are priced at each size.
        if separation.fixed and not messages and trays_only:
            fixed = separation.fixed[0]
        else:
            fixed = self._fixed(separation, height, notes, sizing.figures.get("outlet"))
            if not messages and trays_only:
                separation.fixed.append(fixed)
        pump_shaft, q_gas = fixed.pump_shaft, fixed.q_gas
        gas_supply = service.gas_supply_pressure(case.pressure)
        blower_rise = sizing.pressure_drop + defaults.BLOWER_ALLOWANCE + max(case.pressure - gas_supply, 0.0)
        if case.gas_mover:
            blower_shaft = economics.blower_power(q_gas, gas_supply, blower_rise, case.blower_efficiency)
        else:     # steam from its header: no gas mover
            blower_rise, blower_shaft = np.zeros(rate.shape), np.zeros(rate.shape)
        electric = (economics.electric_power(pump_shaft, case.motor_efficiency)
                    + economics.electric_power(blower_shaft, case.motor_efficiency))
        extra = separation.extra
        if extra is not None:
            electric = electric + extra.electric
            if notes is not None:
                notes.extend(extra.notes)

        # Equipment rows, each at its correlation's cost basis.
        p_gauge = np.maximum(p_design, 0.0)
        shell = price_item(SHELL, volume, material=case.material, pressure_gauge=p_gauge, diameter=diameter,
                           warnings=notes)
        if case.shell_diameter is not None:   # reused: only the modification allowance is charged
            shell = shell.scaled(case.shell_modification, self.shell)
        items = [shell]
        items += self.internals.items(sizing, trays, warnings=notes)
        items += fixed.items
        if case.gas_mover:
            items += [price_gas_mover(FAN, BLOWER, q_gas, blower_rise, warnings=notes),
                      price_item(self.blower_drive, blower_shaft / 1000.0, warnings=notes)]
        if extra is not None:
            items += extra.items
        equipment = Equipment.stack(items)

        # Consumption rows.
        eco = case.economics
        rows = [(ELECTRICITY, electric, eco.electricity), *fixed.uses]
        if extra is not None:   # a use the column already has (steam, cooling water) takes the extra's rate too
            keys = [spec.key for spec, _, _ in rows]
            for spec, use_rate, unit_price in extra.uses:
                if spec.key in keys:
                    j = keys.index(spec.key)
                    rows[j] = (spec, rows[j][1] + use_rate, rows[j][2])
                else:
                    rows.append((spec, use_rate, unit_price))
        uses = Uses.stack(rows)
        fixed_figures = fixed.figures
        if extra is not None:   # the loop's steam and cooling water add to the column's own
            fixed_figures = dict(fixed.figures)
            for key, value in extra.figures.items():
                fixed_figures[key] = fixed_figures[key] + value if key in ADDED_UP and key in fixed_figures else value
        annual = annualize(equipment, uses, eco)

        figures = Figures(dict(
            **sizing.figures,
            design_pressure=np.broadcast_to(p_design, rate.shape).astype(float),
            design_temperature=np.broadcast_to(t_design, rate.shape).astype(float),
            wall_thickness=wall, head_thickness=np.broadcast_to(head, rate.shape).astype(float), shell_weight=shell_kg,
            head_weight=heads_kg, vessel_weight=shell_kg + heads_kg, tray_weight=trays_kg, volume=volume,
            cross_section=area, liquid_volumetric_flow=fixed.q_liquid, pump_head=fixed.pump_rise,
            pump_shaft_power=pump_shaft, gas_inlet_flow=q_gas, blower_rise=blower_rise, blower_shaft_power=blower_shaft,
            electric_power=electric, **fixed_figures,
            bare_module=annual.bare_module, total_module=annual.total_module, installed=annual.installed,
            operating=annual.operating, credit=annual.credit, capital_charge=annual.capital_charge,
            annualized=annual.annualized,
            escalation=np.broadcast_to(annual.escalation, rate.shape + annual.escalation.shape[-1:]),
        ), separation.figures)
        designs = Designs(agent, trays.astype(int), rate, diameter, figures, equipment, uses, notes or [],
                          use_cost_rows=annual.use_cost)
        designs.limits = limit_table(case, designs)
        designs.figures["within_limits"] = limits_met(designs.limits, len(designs))
        return designs

    def _fixed(self, separation: Separation, height, notes, outlet=None) -> Fixed:
        """The pump and its motor, the gas flow and the uses other than electricity: no diameter in them.

        ``outlet``: the treated stream's outlets where the internals set them (packed beds).
        """
        case, service = self.case, self.service
        agent, loads = separation.agent, separation.loads
        liquid_mass, gas_mass, rho_l = loads.liquid_mass_flow, loads.gas_mass_flow, loads.liquid_density
        q_liquid = liquid_mass / rho_l
        supply = supply_pressure_of(case, agent)
        pump_rise = (np.maximum(case.pressure - supply, 0.0) + rho_l * GRAVITY * height
                     + defaults.PUMP_ALLOWANCE)
        pump_shaft = economics.pump_power(q_liquid, pump_rise, case.pump_efficiency)
        gas_supply = service.gas_supply_pressure(case.pressure)
        q_gas = gas_mass / ideal_gas_density(gas_supply, case.temperature, case.gas_molar_mass[agent])
        pump_discharge = supply + pump_rise - STANDARD_ATMOSPHERE
        items = (price_item(PUMP, pump_shaft / 1000.0, material=case.material, pressure_gauge=pump_discharge,
                            warnings=notes),
                 price_item(self.pump_drive, pump_shaft / 1000.0, warnings=notes))
        agent_mass = liquid_mass if service.agent_is_liquid else gas_mass
        regen = case.regenerated[agent]
        purge = np.where(regen, case.loss[agent] * agent_mass, agent_mass)
        steam_rate = np.where(regen, case.steam_ratio[agent] * agent_mass, 0.0)
        cooling_rate = np.where(regen, case.cooling_ratio[agent] * agent_mass, 0.0)
        eco = case.economics
        rows = [(AGENT, purge, case.price[agent]), (DISPOSAL, purge, case.disposal[agent]),
                (STEAM, steam_rate, eco.steam), (COOLING, cooling_rate, eco.cooling_water)]
        removed = case.feed_in - (separation.figures["outlet"] if outlet is None else outlet)  # per mol treated
        for s, solute in enumerate(case.solutes):
            if case.credit[s] > 0:
                rows.append((credit_spec(solute), np.where(regen, case.feed_flow * removed[:, s], 0.0),
                             case.credit[s]))
        return Fixed(q_liquid, pump_rise, pump_shaft, q_gas, items, tuple(rows),
                     dict(steam_rate=steam_rate, cooling_rate=cooling_rate, makeup_rate=purge))
