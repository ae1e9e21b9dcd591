"""Evaluated design points: decisions, every figure, and the cost lines, one entry per point.

``Designs`` holds arrays of equal length n: the four decisions (agent,
real trays, agent rate, shell diameter), the figures named in ``FIGURES``
(one array each, or (n, solutes) for the per-solute ones), and the
equipment and consumption rows (``towercost.design.costlines``). Figures
are read as attributes (``designs.height``); ``to_frame`` gives a pandas
table with one row per design and one column per figure.
"""

from __future__ import annotations

from collections.abc import MutableMapping
from dataclasses import dataclass, field

import numpy as np

from towercost.design.costlines import Equipment, Uses

#: Every figure of a design: name -> (unit, meaning). The one list the tables, CSV and JSON draw on.
FIGURES: dict[str, tuple[str, str]] = {
    "rate_min": ("mol/s", "least agent rate with unlimited stages"),
    "ratio": ("-", "agent rate over its minimum (L/Lmin or G/Gmin)"),
    "factor": ("-", "absorption factor A or stripping factor S, per solute"),
    "stages": ("-", "theoretical stages, per solute"),
    "efficiency": ("-", "overall tray efficiency, theoretical stages over real trays, per solute"),
    "controlling": ("", "the solute nearest its spec (outlet over spec largest), index into case.solutes"),
    "outlet": ("-", "treated-stream outlet mole fraction, per solute"),
    "agent_outlet": ("-", "agent outlet mole fraction, per solute"),
    "meets_spec": ("", "every solute meets its spec"),
    "within_limits": ("", "every limit of the scenario is met"),
    "liquid_flow": ("mol/s", "liquid molar flow"),
    "gas_flow": ("mol/s", "gas molar flow"),
    "liquid_mass_flow": ("kg/s", "liquid mass flow"),
    "gas_mass_flow": ("kg/s", "gas mass flow"),
    "flow_parameter": ("-", "flow parameter F_LV of the flooding correlation"),
    "flooding_velocity": ("m/s", "gas velocity at flood on the net area"),
    "diameter_required": ("m", "diameter at the design fraction of flood"),
    "diameter_flooding": ("m", "least standard shell at the design fraction of flood"),
    "diameter_least": ("m", "least standard shell meeting flooding and the downcomer limits"),
    "fraction_of_flood": ("-", "fraction of flood at the shell diameter"),
    "tray_type": ("", "tray type, index into towercost.design.internals.TRAY_TYPES (-1: a packed bed)"),
    "internals": ("", "internals, index into the flowsheet's internals names: tray types, then the [[packing]] entries"),
    "can_widen": ("", "a wider shell may still work (trays do not weep, a packing stays wetted)"),
    "weep_ratio": ("-", "sieve: hole velocity at the turndown loads over the weep point; valve: turndown margin"),
    "entrainment": ("-", "fractional entrainment at the design loads (Fair's chart)"),
    "backup_fraction": ("-", "downcomer back-up over tray spacing plus weir height"),
    "residence_time": ("s", "liquid residence time in the downcomer"),
    "range_use": ("-", "largest utilization of the operating-range limits; at most 1 inside the range"),
    "range_governs": ("", "limit nearest its bound, index into towercost.models.hydraulics.LIMIT_NAMES"),
    "height": ("m", "tangent-to-tangent height"),
    "stages_needed": ("-", "theoretical stages each solute's spec needs at the design's rate (cases with packings)"),
    "packed_height": ("m", "packed height: the least meeting every spec, max over solutes of stages x HETP"),
    "beds": ("-", "packed beds (the packed height split by the packing's tallest bed)"),
    "bed_height": ("m", "height of each packed bed"),
    "pressure_drop_per_m": ("Pa/m", "gas pressure drop per metre of packing (Stichlmair, Bravo and Fair)"),
    "wetting_ratio": ("-", "liquid load over the minimum wetting rate (Morris and Jackson); at least 1"),
    "diameter_ratio": ("-", "shell diameter over nominal packing size"),
    "diameter_pressure_drop": ("m", "diameter at the packing's pressure-drop limit per metre"),
    "transfer_units": ("-", "overall transfer units on the treated phase, per solute (N_OG absorbing, N_OL stripping)"),
    "htu": ("m", "overall height of a transfer unit on the treated phase, per solute (H_OG or H_OL)"),
    "hetp": ("m", "height equivalent to a theoretical stage, per solute"),
    "film_gas_htu": ("m", "gas-film height of a transfer unit H_G (Onda), per solute"),
    "film_liquid_htu": ("m", "liquid-film height of a transfer unit H_L (Onda), per solute"),
    "wetted_area": ("m2/m3", "wetted area of the packing (Onda)"),
    "packing_weight": ("kg", "dry packing"),
    "packing_volume": ("m3", "packed volume (the packing's cost basis)"),
    "pressure_drop_per_tray": ("Pa", "gas pressure drop per tray"),
    "pressure_drop": ("Pa", "gas pressure drop of the column"),
    "design_pressure": ("Pa gauge", "vessel design pressure"),
    "design_temperature": ("K", "vessel design temperature"),
    "wall_thickness": ("m", "shell plate thickness"),
    "head_thickness": ("m", "head plate thickness (pressure or rigidity, plus corrosion allowance)"),
    "shell_weight": ("kg", "cylindrical shell metal, tangent to tangent"),
    "head_weight": ("kg", "metal of the two 2:1 ellipsoidal heads"),
    "vessel_weight": ("kg", "shell and heads metal"),
    "tray_weight": ("kg", "tray metal"),
    "volume": ("m3", "shell volume (the vessel cost basis)"),
    "cross_section": ("m2", "tower cross-section (the tray cost basis)"),
    "liquid_volumetric_flow": ("m3/s", "pumped liquid flow"),
    "pump_head": ("Pa", "pump pressure rise"),
    "pump_shaft_power": ("W", "pump shaft power"),
    "gas_inlet_flow": ("m3/s", "actual gas flow at the blower inlet"),
    "blower_rise": ("Pa", "blower pressure rise"),
    "blower_shaft_power": ("W", "blower shaft power"),
    "electric_power": ("W", "electric power of pump and blower motors"),
    "steam_rate": ("kg/s", "regeneration steam"),
    "cooling_rate": ("m3/s", "regeneration cooling water"),
    "makeup_rate": ("kg/s", "fresh agent bought (once through) or made up (regenerated)"),
    "bare_module": ("USD", "sum of the bare-module costs"),
    "total_module": ("USD", "total module cost (with contingency and fee)"),
    "installed": ("USD", "grassroots capital (with auxiliary facilities)"),
    "operating": ("USD/yr", "operating cost"),
    "credit": ("USD/yr", "credit for recovered solute"),
    "capital_charge": ("USD/yr", "capital recovery x installed cost"),
    "annualized": ("USD/yr", "total annualized cost"),
    "escalation": ("-", "cost-index factor of each equipment item, from its basis to the estimate's index"),
    # the regenerated loop (towercost.design.loop); NaN for a design without one
    "lean_level": ("-", "K x_lean / y_out of the key solute: the lean-loading decision"),
    "lean_loading": ("-", "solute mole fraction in the lean solvent entering the absorber (the loop's steady state), per solute"),
    "rich_loading": ("-", "solute mole fraction in the rich solvent leaving the absorber, per solute"),
    "stripping_factor": ("-", "regenerator stripping factor S = K_r V / L, per solute"),
    "build_up": ("-", "steady lean loading over the loading in equilibrium with the feed gas, per solute"),
    "loop_balance": ("-", "solute balance around the loop (gas in - gas out - regenerator overhead) over solute in, per solute"),
    "regenerator_overhead": ("-", "solute mole fraction in the regenerator's overhead vapour, per solute"),
    "regenerator_trays": ("-", "regenerator real trays (the cheapest count meeting its limits)"),
    "regenerator_diameter": ("m", "regenerator shell diameter (least standard size)"),
    "regenerator_height": ("m", "regenerator tangent-to-tangent height"),
    "regenerator_fraction_of_flood": ("-", "regenerator fraction of flood"),
    "regenerator_vapour": ("mol/s", "stripping vapour up the regenerator (live steam or reboiled vapour)"),
    "regenerator_ok": ("", "the regenerator meets its own limits (flood, operating range, height, diameter)"),
    "live_steam": ("kg/s", "live stripping steam"),
    "heater_duty": ("W", "rich solvent heater duty"),
    "reboiler_duty": ("W", "reboiler duty"),
    "cross_duty": ("W", "lean/rich cross exchanger duty"),
    "cooler_duty": ("W", "lean cooler duty"),
    "cross_area": ("m2", "lean/rich cross exchanger area"),
    "cooler_area": ("m2", "lean cooler area"),
    "heater_area": ("m2", "rich solvent heater area"),
    "reboiler_area": ("m2", "reboiler area"),
    "vapour_loss": ("kg/s", "solvent evaporated into the treated gas and the regenerator overhead"),
    "loop_steam": ("kg/s", "the loop's steam: live steam plus heater and reboiler"),
    "loop_cooling": ("m3/s", "the loop's cooling water (lean cooler)"),
    "loop_looped": ("", "the design circulates its solvent through a designed regenerator"),
    "regenerator_liquid_mass": ("kg/s", "solvent through the regenerator (0 without one)"),
    "regenerator_vapour_mass": ("kg/s", "stripping vapour up the regenerator (0 without one)"),
}

#: Figures derived on demand from the equipment rows: name -> (unit, meaning).
DERIVED = {
    "purchased": ("USD", "purchased cost per equipment item, at the estimate's index"),
    "bare_module_items": ("USD", "bare-module cost per equipment item, at the estimate's index"),
    "use_cost": ("USD/yr", "yearly cost (or credit) per consumption row"),
}

DECISIONS = ("agent", "trays", "rate", "diameter")


class Figures(MutableMapping):
    """Figures by name: arrays of its own, then those of ``source`` (at ``index``), gathered when first read.

    Pricing a part of a separated batch at a wider shell reads only a few
    of the batch's figures; the others are gathered only if asked for.
    """

    def __init__(self, own: dict | None = None, source=None, index=None):
        self._own = dict(own or {})
        self._source = source
        self._index = index

    def __getitem__(self, key):
        if key in self._own:
            return self._own[key]
        if self._source is None or key not in self._source:
            raise KeyError(key)
        value = self._source[key]
        if self._index is not None:
            value = value[self._index]
        self._own[key] = value
        return value

    def __setitem__(self, key, value):
        self._own[key] = value

    def __delitem__(self, key):
        del self._own[key]

    def __contains__(self, key):
        return key in self._own or (self._source is not None and key in self._source)

    def __iter__(self):
        yield from self._own
        if self._source is not None:
            yield from (k for k in self._source if k not in self._own)

    def __len__(self):
        return sum(1 for _ in self)


@dataclass
class Designs:
    """Design points and all their figures; every array has n entries along its first axis."""

    agent: np.ndarray                # index into case.agents
    trays: np.ndarray                # real trays
    rate: np.ndarray                 # agent rate [mol/s]
    diameter: np.ndarray             # shell inside diameter [m]
    figures: dict[str, np.ndarray]   # the entries of FIGURES
    equipment: Equipment
    uses: Uses
    warnings: list[str] = field(default_factory=list)
    use_cost_rows: list[np.ndarray] | None = None   # yearly cost of each consumption row, as priced
    limits: list = field(default_factory=list, repr=False)   # the scenario's limits over these points, as checked

    def __getattr__(self, name: str):
        figures = self.__dict__.get("figures")
        if figures is not None and name in figures:
            return figures[name]
        raise AttributeError(name)

    @property
    def purchased(self) -> np.ndarray:
        """(n, items) purchased cost of each equipment row at the estimate's index [USD]."""
        return self.equipment.purchased * self.figures["escalation"]

    @property
    def use_cost(self) -> np.ndarray:
        """(n, uses) yearly cost of each consumption row [USD/yr]; credits are positive."""
        table = np.empty((len(self), len(self.uses.specs)))
        for j, column in enumerate(self.use_cost_rows):
            table[:, j] = column
        return table

    @property
    def bare_module_items(self) -> np.ndarray:
        """(n, items) bare-module cost of each equipment row at the estimate's index [USD]."""
        return self.equipment.bare_module * self.figures["escalation"]

    def __len__(self) -> int:
        return int(self.agent.shape[0])

    def take(self, index) -> "Designs":
        """The designs at ``index`` (an integer array or a mask)."""
        return Designs(self.agent[index], self.trays[index], self.rate[index], self.diameter[index],
                       {k: v[index] for k, v in self.figures.items()}, self.equipment.take(index),
                       self.uses.take(index), list(self.warnings), [c[index] for c in self.use_cost_rows])

    @classmethod
    def concatenate(cls, parts: list["Designs"]) -> "Designs":
        """One Designs from several, in order; warnings merged without repeats."""
        merged: list[str] = []
        for part in parts:
            merged += [w for w in part.warnings if w not in merged]
        first = parts[0]
        return cls(*(np.concatenate([getattr(p, name) for p in parts]) for name in DECISIONS),
                   {k: np.concatenate([p.figures[k] for p in parts]) for k in first.figures},
                   Equipment.concatenate([p.equipment for p in parts]), Uses.concatenate([p.uses for p in parts]),
                   merged, [np.concatenate(rows) for rows in zip(*(p.use_cost_rows for p in parts))])

    def to_frame(self, case=None):
        """A pandas table: one row per design, one column per decision, figure, item and use.

        Per-solute figures become one column per solute (``outlet[toluene]``);
        item and use figures one column per row (``purchased[T-101]``).
        With the case given, the agent column holds names.
        """
        import pandas as pd

        columns: dict[str, np.ndarray] = {}
        columns["agent"] = (np.asarray(case.agents, dtype=object)[self.agent] if case is not None else self.agent)
        for name in ("trays", "rate", "diameter"):
            columns[name] = getattr(self, name)
        solutes = list(case.solutes) if case is not None else None
        figures = {**self.figures, "purchased": self.purchased, "bare_module_items": self.bare_module_items,
                   "use_cost": self.use_cost}
        for name, values in figures.items():
            if values.ndim == 1:
                columns[name] = values
                continue
            if name in ("purchased", "bare_module_items", "escalation"):
                labels = [s.tag for s in self.equipment.specs]
            elif name == "use_cost":
                labels = [s.key for s in self.uses.specs]
            else:
                labels = solutes or [str(s) for s in range(values.shape[1])]
            for j, label in enumerate(labels):
                columns[f"{name}[{label}]"] = values[:, j]
        return pd.DataFrame(columns)
