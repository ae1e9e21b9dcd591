"""The regenerated loop: absorber, regenerator, cross exchanger, lean cooler, heater or reboiler, pumps.

``SolventLoop`` is the one-column flowsheet of ``towercost.design.column``
over the case's expanded candidates (``towercost.design.loop_case``: one per
lean level of a regenerated solvent). For a loop candidate it adds, per
design, everything its diameter does not change (``SolventLoop.separate``):

1. Loadings. The absorber is a dilute Kremser cascade, affine in its lean
   loading x: y_out = K x + phi_a (y_in - K x) with phi_a =
   ``kremser.fraction_remaining(A, N)``. The key solute's lean loading is the
   decision (its level); each other solute with a spec may enter no leaner
   than x_cap = (y_spec - phi_a y_in) / ((1 - phi_a) K). At x_cap the rich
   loading is x_rich = x_cap + (y_in - y_out) / (A K), so the regenerator
   must leave at most the fraction phi_need = x_cap / x_rich.
2. Regenerator. For each count of real trays searched (stages = trays x
   efficiency, plus the reboiler's stage when reboiled), the least
   stripping factor giving phi_need (``kremser.factor_for_fraction``) sets,
   per solute, a vapour rate V = S L / K_r; the largest governs. Every
   solute's steady lean loading then follows from the closed loop
   (``solvent_loop.kremser_loop_lean_loading``), and with it every outlet.
   The regenerator column is sized and priced as a stripper through the
   same internals and vessel models (``SingleColumn`` on the regenerator's
   case), with its rich-solvent pump.
3. Heat exchange. The lean/rich cross exchanger at the approach given
   (``exchangers.cross_exchanger``, equal heat-capacity rates), the feed
   heater bringing the rich solvent to the regenerator temperature, the
   reboiler (reboiled), and the lean cooler back to the absorber
   temperature on cooling water; areas from Q = U F LMTD with the
   Bowman-Mueller-Nagle factor for the shells needed; each priced with the
   cost table's shell-and-tube and kettle rows.
4. Uses. Live steam and heater or reboiler steam, cooling water, and the
   solvent's make-up: degradation and entrainment (the scenario's
   ``loss``, as for any regenerated solvent) plus what evaporates into the
   treated gas and the regenerator overhead (``solvent_loop.solvent_vapour_loss``).

The regenerator's trays are minimized over in numpy for each absorber
design (the cheapest count meeting its limits): exact for the best design
and for every design listed, each shown with its own best regenerator.
The make-up and purge are taken as solute-free in the loop balance.
"""

from __future__ import annotations

import dataclasses
import functools

import numpy as np

from towercost.design import cascade
from towercost.design.column import Extra, Separation, SingleColumn
from towercost.design.costlines import (COOLING, ELECTRICITY, STEAM, Equipment, ItemCost, ItemSpec,
                                        UseSpec, Uses, annualize, price_item)
from towercost.design.internals import Loads
from towercost.design.loop_case import COOLER_APPROACH
from towercost.design.service import service_for
from towercost.models import defaults, exchangers, kremser, solvent_loop
from towercost.models.constants import STANDARD_ATMOSPHERE

VAPOUR_LOSS = UseSpec("solvent_vapour", "solvent lost as vapour (treated gas, regenerator overhead)", "kg/s",
                      "USD/kg")

CROSS = ItemSpec("cross_exchanger", "E-201", "lean/rich cross exchanger (floating head)",
                 "heat_exchanger_floating_head")
COOLER = ItemSpec("lean_cooler", "E-202", "lean solvent cooler (fixed tube sheet, cooling water)",
                  "heat_exchanger_fixed_tube")
HEATER = ItemSpec("feed_heater", "E-203", "rich solvent heater (fixed tube sheet, steam)", "heat_exchanger_fixed_tube")
REBOILER = ItemSpec("reboiler", "E-204", "regenerator reboiler (kettle, steam)", "reboiler_kettle")

#: Tags of the regenerator column's own rows (the one-column flowsheet's tags -> the regenerator's).
REGENERATOR_TAGS = {"T-101": "T-201", "P-101": "P-201", "PM-101": "PM-201"}



@functools.cache
def _water_density() -> float:
    """Cooling water density at its supply temperature and 1 atm [kg/m3] (IAPWS-95 in ``chemicals``)."""
    from chemicals.iapws import iapws95_rho

    return float(iapws95_rho(defaults.COOLING_WATER_IN, STANDARD_ATMOSPHERE))


def regenerator_case(case, data, agent: int):
    """The regenerator as a stripper case: the rich solvent is the liquid treated, the vapour the agent."""
    n_s = len(case.solutes)
    one = lambda value: np.array([value])   # noqa: E731  (one candidate: the stripping vapour)
    vapour = "live steam" if data.stripping == "steam" else "solvent vapour"
    return dataclasses.replace(
        case, name=f"{case.name}: regenerator", service=service_for("strip"), agents=(vapour,),
        feed_flow=1.0, temperature=data.temperature, pressure=data.pressure, feed_in=np.full(n_s, 1e-3),
        target=np.full(n_s, np.inf), k_value=data.k_value[None, :], lean=np.zeros((1, n_s)),
        efficiency=data.efficiency[None, :], murphree=None,
        liquid_molar_mass=one(case.liquid_molar_mass[agent]), liquid_density=one(case.liquid_density[agent]),
        liquid_viscosity=one(case.liquid_viscosity[agent]), surface_tension=one(case.surface_tension[agent]),
        gas_molar_mass=one(data.vapour_molar_mass), gas_density=one(data.vapour_density),
        price=one(0.0), disposal=one(0.0), regenerated=one(False), loss=one(0.0), steam_ratio=one(0.0),
        cooling_ratio=one(0.0), credit=np.zeros(n_s), supply_pressure=case.pressure,
        trays_range=data.trays_range, ratio_range=(1e-12, 1e12), larger_diameters=0, shell_diameter=None,
        shell_max_trays=None, capital_budget=None, max_power=None, max_steam=None, max_pressure_drop=None,
        design_pressure=None, design_temperature=None, notes=(), packings=(), offer_trays=True,
        compete_tray_types=False, gas_viscosity=None, gas_diffusivity=None, liquid_diffusivity=None,
        loop=None, agent_supply=None, gas_mover=False)


def _retagged(item: ItemCost) -> ItemCost:
    """A row of the regenerator column under the regenerator's tags and words."""
    def spec(v):
        kind = v.kind if v.correlation.startswith("unused:") else f"regenerator {v.kind}"
        return dataclasses.replace(v, key=f"regenerator_{v.key}",
                                   tag=REGENERATOR_TAGS.get(v.tag, v.tag.replace("-1", "-2", 1)), kind=kind)
    variants = tuple(spec(v) for v in item.variants)
    return ItemCost(spec(item.spec), item.size, item.purchased, item.bare_module, item.bare_module_base,
                    item.in_range, item.material, variants, item.variant)


def _unused(spec: ItemSpec):
    from towercost.design.packed import unused_spec

    return unused_spec(spec, spec.kind)


def _spread(rows: list[tuple[np.ndarray, ItemCost]], n: int, variants: tuple) -> ItemCost:
    """One row over n points: the parts given (each point keeps its own variant), no cost elsewhere."""
    keys = [v.correlation for v in variants]
    out = {name: np.zeros(n) for name in ("size", "purchased", "bare_module", "bare_module_base")}
    in_range = np.ones(n, bool)
    variant = np.full(n, len(variants) - 1, dtype=np.int8)       # the unused variant (last)
    material = rows[0][1].material if rows else "carbon_steel"
    for at, row in rows:
        shape = np.shape(row.bare_module)
        for name in out:
            out[name][at] = np.broadcast_to(getattr(row, name), shape)
        in_range[at] = np.broadcast_to(row.in_range, shape)
        own = np.array([keys.index(v.correlation) for v in row.variants], dtype=np.int8)
        variant[at] = own[np.broadcast_to(row.variant, shape)]
    return ItemCost(variants[0], out["size"], out["purchased"], out["bare_module"], out["bare_module_base"],
                    in_range, material, variants, variant)


def _vapour_loss(gas_rate, vapour_pressure: float, pressure: float) -> np.ndarray:
    """Solvent carried off by a gas leaving in equilibrium with it [mol/s]; none for a solvent without vapour pressure."""
    if vapour_pressure == 0.0:
        return np.zeros(np.shape(gas_rate))
    return solvent_loop.solvent_vapour_loss(gas_rate, 1.0, vapour_pressure, pressure)


def fraction_needed(case, key: int, key_lean, factor, remaining, k_value):
    """Fraction of each solute the regenerator may leave in the solvent, (m, S); 1 where it need strip none.

    The key solute enters the absorber at ``key_lean`` (its level, the
    decision); each other solute with a spec at no more than
    x_cap = (y_spec - phi_a y_in) / ((1 - phi_a) K), the leanest its spec
    allows with the absorber's factor A and fraction remaining phi_a. With
    x_rich = x_cap (1 - (1 - phi_a)/A) + (1 - phi_a) y_in / (A K), the loop
    balance, the regenerator must leave at most phi_need = x_cap / x_rich.
    A spec the absorber cannot meet at any lean loading (x_cap <= 0) asks
    nothing of the regenerator; the design then fails that spec.
    """
    y_in = case.feed_in
    with np.errstate(divide="ignore", invalid="ignore"):
        cap = np.where(np.isfinite(case.target), (case.target - remaining * y_in) / ((1 - remaining) * k_value),
                       np.inf)
        cap[:, key] = key_lean
        rich_at_cap = cap * (1 - (1 - remaining) / factor) + (1 - remaining) * y_in / (factor * k_value)
        need = np.where(np.isfinite(cap) & (cap > 0), cap / rich_at_cap, 1.0)
    return np.clip(need, 0.0, 1.0)


def regenerator_stages(data, trays) -> np.ndarray:
    """Theoretical stages per solute of each count of real trays, (T, S): trays x efficiency, plus a reboiler's."""
    extra = 1.0 if data.stripping == "reboiled" else 0.0
    return np.asarray(trays, dtype=float)[:, None] * data.efficiency[None, :] + extra


def least_vapour(liquid, need, stages, k_value) -> np.ndarray:
    """Least stripping vapour [mol/s] leaving at most ``need`` of every solute, per design and tray count, (m, T).

    Per solute the least stripping factor with the stages (Kremser,
    ``kremser.factor_for_fraction``), V = S L / K_r; the largest governs.
    """
    strips = need < 1.0                                           # (m, S)
    some = np.flatnonzero(strips.any(axis=0))                     # only the solutes some design must strip
    if some.size == 0:
        return np.zeros((need.shape[0], stages.shape[0]))
    strips, need, stages, k_value = strips[:, some], need[:, some], stages[:, some], np.asarray(k_value)[some]
    fraction = np.where(strips, need, 0.5)
    factor = kremser.factor_for_fraction(np.maximum(fraction[:, None, :], 1e-300), stages[None, :, :], strict=False)
    return np.max(np.where(strips[:, None, :], factor * liquid[:, None, None] / k_value, 0.0), axis=-1)


class SolventLoop(SingleColumn):
    """The absorber of ``SingleColumn`` with each loop candidate's regenerator, exchangers and make-up."""

    def __init__(self, case):
        super().__init__(case)
        self.loop = case.loop
        # one regenerator flowsheet per regenerated solvent (its first expanded candidate's properties)
        self.regenerators = {}
        for agent in np.flatnonzero(self.loop.looped):
            parent = int(self.loop.parent[agent])
            if parent not in self.regenerators:
                data = self.loop.regenerator(agent)
                self.regenerators[parent] = (data, SingleColumn(regenerator_case(case, data, agent)))
        self._variants = None
        #: per candidate, the one it counts under in the listings: the first lean level of its solvent's loop
        self.representative = np.arange(len(case.agents))
        for agent in np.flatnonzero(self.loop.looped):
            same = np.flatnonzero(self.loop.looped & (self.loop.parent == self.loop.parent[agent]))
            self.representative[agent] = same[0]

    def packed_rates(self, agents):
        """Packed beds for the candidates without a loop (a loop's absorber is a tray column here)."""
        agents = np.asarray(agents, dtype=int)
        return super().packed_rates(agents[~self.loop.looped[agents]])

    # ----------------------------------------------------------------- the loop per design

    def separate(self, agent, trays, rate, internals=None) -> Separation:
        """The one-column separation, then each loop design's loadings, regenerator and heat exchange (``_loop``)."""
        base = super().separate(agent, trays, rate, internals)
        figures = dict(base.figures)
        notes: list[str] = []
        loop_fig, rows = self._loop(base, figures, notes)
        extra = self._extra(base.agent, rows, loop_fig, notes)
        return dataclasses.replace(base, figures=figures, extra=extra)

    def _loop(self, base: Separation, figures: dict, notes: list[str]):
        """Loadings, regenerator choice and heat exchange of every loop design; figures updated in place."""
        case, loop = self.case, self.loop
        agent, rate = base.agent, base.rate
        n, n_s = rate.shape[0], len(case.solutes)
        nan_s = np.full((n, n_s), np.nan)
        out = {name: nan_s.copy() for name in ("lean_loading", "rich_loading", "stripping_factor", "build_up",
                                               "loop_balance", "regenerator_overhead")}
        for name in ("lean_level", "regenerator_trays", "regenerator_diameter", "regenerator_height",
                     "regenerator_vapour", "live_steam", "heater_duty", "reboiler_duty", "cross_duty",
                     "cooler_duty", "cross_area", "cooler_area", "heater_area", "reboiler_area",
                     "vapour_loss", "regenerator_fraction_of_flood", "steam", "cooling_water",
                     "regenerator_liquid_mass", "regenerator_vapour_mass"):
            out[name] = np.full(n, np.nan)
        out["regenerator_ok"] = np.ones(n, bool)
        rows = []
        looped = loop.looped[agent]
        for parent, (data, column) in self.regenerators.items():
            at = np.flatnonzero(looped & (loop.parent[agent] == parent))
            if at.size == 0:
                continue
            rows.append((at, self._regenerate(data, column, base, figures, at, out, notes)))
        if looped.any():
            outlet = figures["outlet"]
            figures["meets_spec"] = cascade.meets_spec(case, outlet)
            with np.errstate(divide="ignore", invalid="ignore"):
                share = np.where(np.isfinite(case.target), outlet / case.target, 0.0)
            figures["controlling"] = np.argmax(share, axis=-1)
        return out, rows

    def _regenerate(self, data, column: SingleColumn, base: Separation, figures: dict, at, out, notes):
        """One regenerated solvent's designs ``at``: choose the regenerator trays, fix every loading, price."""
        case = self.case
        agent = base.agent[at]
        L = base.rate[at]                                       # [mol/s] circulation
        G = case.feed_flow                                      # [mol/s] gas treated
        A = figures["factor"][at]                               # (m, S)
        N = figures["stages"][at]
        K = case.k_value[agent]
        y_in = case.feed_in
        m = L.shape[0]
        phi_a = kremser.fraction_remaining(A, N)
        need = fraction_needed(case, data.key, case.lean[agent, data.key], A, phi_a, K)
        lo, hi = data.trays_range
        shared = self.loop.shared_trays
        trays = np.arange(lo, hi + 1, dtype=float) if shared is None else np.array([float(shared)])
        stages = regenerator_stages(data, trays)
        vapour = least_vapour(L, need, stages, data.k_value)
        # the regenerator column at each count, priced as a stripper through the same internals and vessel
        flat_v = vapour.ravel()
        flat_l = np.repeat(L, trays.size)
        flat_t = np.tile(trays, m)
        designs = self._column(data, column, agent, flat_l, flat_v, flat_t)
        eco = case.economics
        # what the count of regenerator trays changes: its column, the vapour's steam (live, or the reboiler's
        # steam and area) and the solvent lost overhead; the exchangers and the rich heater do not change
        varying = [*designs.equipment.items] if shared is None else [*designs.equipment.items[2:]]
        vapour_steam, vapour_heat = self._vapour_steam(data, flat_v)
        if data.stripping == "reboiled":
            varying.append(price_item(REBOILER, vapour_heat["reboiler_area"],
                                      pressure_gauge=max(max(case.pressure, data.pressure) - STANDARD_ATMOSPHERE, 0.0)))
        top_loss = self._top_loss(data, flat_v) * case.liquid_molar_mass[agent][0]
        uses = Uses.stack([(ELECTRICITY, designs.electric_power, eco.electricity), (STEAM, vapour_steam, eco.steam),
                           (VAPOUR_LOSS, top_loss, case.price[agent][0])])
        cost = annualize(Equipment(varying), uses, eco).annualized.reshape(m, trays.size)
        ok = vapour > 0
        if shared is None:   # a shared column's limits are the site's to check, at the summed loads
            ok = ok & designs.within_limits.reshape(m, trays.size)
        best = np.argmin(np.where(ok, cost, np.inf), axis=1)
        none = ~ok[np.arange(m), best]
        best = np.where(none, np.argmin(cost, axis=1), best)
        pick = np.arange(m) * trays.size + best
        V = vapour[np.arange(m), best]
        heat = self._heat(data, agent, L, V)              # the chosen designs' heat exchange, once each
        n_r = stages[best]                                      # (m, S)
        S = data.k_value * V[:, None] / L[:, None]
        state = solvent_loop.kremser_loop_lean_loading(A, N, y_in, K, np.maximum(S, 1e-300), n_r, 0.0,
                                                       data.k_value)
        lean, rich = state.lean_loading, state.rich_loading
        outlet = K * lean + phi_a * (y_in - K * lean)
        figures["outlet"] = figures["outlet"].copy()
        figures["outlet"][at] = outlet
        figures["agent_outlet"] = figures["agent_outlet"].copy()
        figures["agent_outlet"][at] = rich
        with np.errstate(divide="ignore", invalid="ignore"):   # no vapour: no overhead
            overhead = np.where(V[:, None] > 0, L[:, None] * (rich - lean) / V[:, None], 0.0)
        out["lean_loading"][at], out["rich_loading"][at] = lean, rich
        out["stripping_factor"][at] = S
        out["regenerator_overhead"][at] = overhead
        # the loop's solute balance: gas in = gas out + regenerator overhead, relative to what enters
        out["loop_balance"][at] = (G * (y_in - outlet) - V[:, None] * overhead) / (G * y_in)
        out["build_up"][at] = lean * K / y_in
        out["lean_level"][at] = self.loop.level[agent]
        out["regenerator_trays"][at] = trays[best]
        if shared is None:   # a shared regenerator's column is sized and priced by the site
            out["regenerator_diameter"][at] = designs.diameter[pick]
            out["regenerator_height"][at] = designs.height[pick]
            out["regenerator_fraction_of_flood"][at] = designs.fraction_of_flood[pick]
        out["regenerator_liquid_mass"][at] = L * case.liquid_molar_mass[agent]
        out["regenerator_vapour_mass"][at] = V * data.vapour_molar_mass
        out["regenerator_vapour"][at] = V
        out["regenerator_ok"][at] = ~none
        for name in ("live_steam", "heater_duty", "reboiler_duty", "cross_duty", "cooler_duty", "cross_area",
                     "cooler_area", "heater_area", "reboiler_area", "cooling_water", "steam"):
            out.setdefault(name, np.full(base.rate.shape[0], np.nan))[at] = heat[name]
        gas_loss = _vapour_loss(np.full(m, G), data.vapour_pressure, case.pressure)
        out["vapour_loss"][at] = (gas_loss + self._top_loss(data, V)) * case.liquid_molar_mass[agent]
        self._warn(data, out, at, agent, notes)
        items = [_retagged(item).take(pick) for item in designs.equipment.items]
        if shared is not None:    # the shell and trays of the shared column: not this unit's (no cost here)
            items[0] = items[1] = None
        items += self._exchanger_items(data, heat, notes)
        return items, designs.electric_power[pick]

    @staticmethod
    def _top_loss(data, vapour):
        """Solvent carried off in the regenerator's overhead [mol/s] (Raoult); none from a reboiled one's."""
        if data.stripping != "steam":
            return np.zeros(np.shape(vapour))
        return _vapour_loss(vapour, data.vapour_pressure_hot, data.pressure)

    def _column(self, data, column: SingleColumn, agent, liquid, vapour, trays, diameter=None):
        """The regenerator column priced at its least standard diameter (or ``diameter``): rich solvent down,
        vapour up."""
        case = self.case
        rc = column.case
        loads = Loads(vapour * data.vapour_molar_mass, liquid * case.liquid_molar_mass[agent][0],
                      np.full(liquid.shape, data.vapour_density), np.full(liquid.shape, rc.liquid_density[0]),
                      np.full(liquid.shape, rc.surface_tension[0]))
        n = liquid.shape[0]
        zeros_s = np.zeros((n, len(case.solutes)))
        figures = dict(rate_min=np.zeros(n), ratio=np.ones(n), factor=zeros_s, stages=zeros_s, efficiency=zeros_s,
                       controlling=np.zeros(n, int), outlet=zeros_s, agent_outlet=zeros_s,
                       meets_spec=np.ones(n, bool), liquid_flow=liquid, gas_flow=vapour,
                       liquid_mass_flow=loads.liquid_mass_flow, gas_mass_flow=loads.gas_mass_flow)
        separation = Separation(np.zeros(n, int), trays, vapour, figures, loads)
        return column.price(separation, np.full(n, np.nan) if diameter is None else diameter, messages=False)

    def _heat(self, data, agent, liquid, vapour):
        """Duties, areas and utilities of the loop's heat exchange, per point (rich and lean: the circulation)."""
        case = self.case
        mass = liquid * case.liquid_molar_mass[agent][0]        # [kg/s]
        capacity = mass * data.heat_capacity                    # [W/K]
        t_abs, t_reg = case.temperature, data.temperature
        cross = exchangers.cross_exchanger(t_abs, t_reg, data.approach, capacity, capacity)
        ratio_r, ratio_p = exchangers.temperature_ratios(t_reg, cross.lean_out, t_abs, cross.rich_out)
        shells = exchangers.shells_for_correction_factor(ratio_r, ratio_p)
        f_cross = exchangers.correction_factor_shells(ratio_r, ratio_p, shells)
        cross_area = exchangers.exchanger_area(cross.duty, data.u_cross, cross.temperature_difference, f_cross)
        water_in = defaults.COOLING_WATER_IN
        water_out = np.minimum(water_in + defaults.COOLING_WATER_RISE, cross.lean_out - COOLER_APPROACH)
        cooler = exchangers.lean_cooler(capacity, cross.lean_out, t_abs, water_in, water_out)
        cooler_area = exchangers.exchanger_area(cooler.duty, data.u_cooler, cooler.temperature_difference)
        t_steam = defaults.STEAM_TEMPERATURE
        heater_duty = capacity * (t_reg - cross.rich_out)
        heater_dt = exchangers.counterflow_temperature_difference(t_steam, t_steam, cross.rich_out, t_reg)
        heater_area = exchangers.exchanger_area(heater_duty, data.u_heater, heater_dt)
        vapour_steam, vapour_heat = self._vapour_steam(data, vapour)
        steam = vapour_steam + exchangers.steam_rate(heater_duty, exchangers.water_latent_heat(t_steam))
        return dict(live_steam=vapour_heat["live_steam"], heater_duty=heater_duty,
                    reboiler_duty=vapour_heat["reboiler_duty"], cross_duty=cross.duty,
                    cooler_duty=cooler.duty, cross_area=cross_area, cooler_area=cooler_area,
                    heater_area=heater_area, reboiler_area=vapour_heat["reboiler_area"], steam=steam,
                    cooling_water=cooler.water_rate / _water_density(),
                    pressure=np.full(vapour.shape, max(case.pressure, data.pressure) - STANDARD_ATMOSPHERE))

    @staticmethod
    def _vapour_steam(data, vapour):
        """Steam the stripping vapour costs [kg/s]: live steam itself, or the reboiler's; with the reboiler's figures."""
        vapour = np.asarray(vapour, dtype=float)
        if data.stripping == "steam":
            zero = np.zeros_like(vapour)
            return vapour * data.vapour_molar_mass, dict(live_steam=vapour * data.vapour_molar_mass,
                                                         reboiler_duty=zero, reboiler_area=zero)
        t_steam = defaults.STEAM_TEMPERATURE
        duty = exchangers.reboiler_duty(vapour, data.latent_heat * data.vapour_molar_mass)
        area = exchangers.exchanger_area(np.maximum(duty, 1e-9), data.u_heater, t_steam - data.temperature)
        steam = exchangers.steam_rate(duty, exchangers.water_latent_heat(t_steam))
        return steam, dict(live_steam=np.zeros_like(vapour), reboiler_duty=duty, reboiler_area=area)

    def _exchanger_items(self, data, heat, notes):
        p = np.maximum(heat["pressure"], 0.0)
        items = [price_item(CROSS, heat["cross_area"], pressure_gauge=p, warnings=notes),
                 price_item(COOLER, heat["cooler_area"], pressure_gauge=p, warnings=notes),
                 price_item(HEATER, heat["heater_area"], pressure_gauge=p, warnings=notes)]
        if data.stripping == "reboiled":
            items.append(price_item(REBOILER, heat["reboiler_area"], pressure_gauge=p, warnings=notes))
        return items

    def _warn(self, data, out, at, agent, notes):
        case = self.case
        built = out["build_up"][at] > defaults.BUILD_UP
        for s in np.flatnonzero(built.any(axis=0)):
            notes.append(f"{case.solutes[s]} builds up around the loop: at {int(built[:, s].sum())} of {at.size} "
                         f"designs its steady lean loading reaches {float(np.max(out['build_up'][at, s])):.3g} of the "
                         f"loading in equilibrium with the feed gas (above {defaults.BUILD_UP:g}, common practice); "
                         "the regenerator barely strips it")
        rich = out["rich_loading"][at]
        over = np.any(rich > case.max_dilute, axis=1)
        if over.any():
            notes.append(f"regenerated loop: the rich loading passes the dilute threshold {case.max_dilute:g} at "
                         f"{int(over.sum())} of {at.size} designs (largest {float(np.max(rich)):.3g}); the search "
                         "stays on the dilute Kremser basis there: the design sheet re-solves such an absorber on the "
                         "mole-ratio basis (averaged factor and stage by stage on the curved line) for comparison")

    def _extra(self, agent, rows, figures: dict, notes) -> Extra:
        """The loop's rows over all designs: no cost where a design has no loop."""
        case = self.case
        n = agent.shape[0]
        merged = [_spread([(at, items[j]) for at, (items, _) in rows if items[j] is not None], n, variants)
                  for j, variants in enumerate(self._template())]
        electric = np.zeros(n)
        for at, (_, power) in rows:
            electric[at] = power
        steam = np.nan_to_num(figures.pop("steam"), nan=0.0)
        cooling = np.nan_to_num(figures.pop("cooling_water"), nan=0.0)
        vapour_loss = np.nan_to_num(figures["vapour_loss"], nan=0.0)
        eco = case.economics
        uses = ((VAPOUR_LOSS, vapour_loss, case.price[agent]), (STEAM, steam, eco.steam),
                (COOLING, cooling, eco.cooling_water))
        # the case-wide totals the limits and the site read (the absorber adds none for a loop candidate)
        looped = self.loop.looped[agent]
        for name in ("regenerator_liquid_mass", "regenerator_vapour_mass"):   # a site sums them (0: no loop)
            figures[name] = np.nan_to_num(figures[name], nan=0.0)
        totals = {"steam_rate": steam, "cooling_rate": cooling, "loop_steam": np.where(looped, steam, np.nan),
                  "loop_cooling": np.where(looped, cooling, np.nan)}
        return Extra(tuple(merged), electric, uses, {**figures, **{k: v for k, v in totals.items()},
                                                     "loop_looped": looped}, tuple(notes))

    def _template(self) -> list[tuple]:
        """The variants of every row the loop adds: the same for every design of the case."""
        if self._variants is None:
            variants = []
            data, column = next(iter(self.regenerators.values()))
            agent = int(np.flatnonzero(self.loop.looped)[0])
            probe = self._column(data, column, np.array([agent]), np.array([1.0]), np.array([1.0]),
                                 np.array([float(data.trays_range[0])]))
            for item in probe.equipment.items:
                tagged = _retagged(item)
                variants.append(tuple(tagged.variants) + (_unused(tagged.variants[0]),))
            reboiled = any(d.stripping == "reboiled" for d, _ in self.regenerators.values())
            for spec in (CROSS, COOLER, HEATER) + ((REBOILER,) if reboiled else ()):
                variants.append((spec, _unused(spec)))
            self._variants = variants
        return self._variants


def flowsheet_for(case) -> SingleColumn:
    """The flowsheet of a case: a solvent loop where a candidate has a designed regenerator, else one column."""
    return SolventLoop(case) if getattr(case, "loop", None) is not None else SingleColumn(case)


def concentrated_check(case, d, i: int) -> list[dict]:
    """Each solute whose rich loading passes the dilute threshold, re-solved in the absorber on the mole-ratio basis.

    Taken one solute at a time in its solute-free carriers, at design ``i``'s
    stages, flows and lean loading: the Kremser relation with the absorption
    factor averaged between the ends (Treybal, Mass-Transfer Operations, 3rd
    ed., Eq. 5.54; ``concentrated.averaged_outlets``) and the stage-by-stage
    solution on the curved equilibrium line (``concentrated.stagewise_outlets``),
    beside the dilute outlet the search used. Empty where every rich loading
    is within the threshold (the dilute basis holds).
    """
    from towercost.models import concentrated

    out = []
    a = int(d.agent[i])
    for s, solute in enumerate(case.solutes):
        if not d.rich_loading[i, s] > case.max_dilute:
            continue
        x0 = float(d.lean_loading[i, s])
        y_in = float(case.feed_in[s])
        liquid = float(d.rate[i]) * (1.0 - x0)            # solute-free solvent [mol/s]
        gas = case.feed_flow * (1.0 - y_in)               # solute-free gas [mol/s]
        args = (liquid, gas, float(case.k_value[a, s]), concentrated.mole_ratio(x0), concentrated.mole_ratio(y_in),
                float(d.stages[i, s]))
        averaged = concentrated.averaged_outlets(*args)
        whole = float(np.floor(args[-1]))                 # the stage-by-stage march takes whole stages: a bracket
        stagewise = concentrated.stagewise_outlets(*args[:-1], whole)
        above = concentrated.stagewise_outlets(*args[:-1], whole + 1.0)
        out.append({"solute": solute, "stages": float(d.stages[i, s]), "dilute_outlet": float(d.outlet[i, s]),
                    "averaged_factor_outlet": float(concentrated.mole_fraction(averaged.gas_out)),
                    "whole_stages": whole,
                    "stagewise_outlet": float(concentrated.mole_fraction(stagewise.gas_out)),
                    "stagewise_outlet_one_more": float(concentrated.mole_fraction(above.gas_out)),
                    "spec_mole_fraction": float(case.target[s]) if np.isfinite(case.target[s]) else None})
    return out


def candidate_name(case, agent: int) -> str:
    """The name a listing gives candidate ``agent``: a loop's solvent as "wash oil, regenerated", else its own."""
    loop = case.loop
    if loop is not None and loop.looped[agent]:
        return f"{loop.parents[int(loop.parent[agent])]}, regenerated"
    return case.agents[agent]
