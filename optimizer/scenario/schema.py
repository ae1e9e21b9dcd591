"""The scenario file's schema: one absorber or stripper case, validated, in SI.

A scenario is a TOML file with these tables (every physical value may carry a
unit as text, "1200 kmol/h", "35 degC", "1.2 bar"; a bare number is in the SI
unit given below):

``[case]``          name, ``mode`` = "absorb" (treat a gas) or "strip" (treat a liquid)
``[feed]``          the stream to treat: flow, temperature, pressure, molar mass,
                    ``[feed.composition]`` solute mole fractions; for a liquid feed
                    also density, viscosity, surface tension
``[[spec]]``        one per solute: ``outlet`` (mole fraction or "20 ppmv"),
                    ``removal`` (fraction removed) or ``outlet_mass_rate``
``[[solvent]]``     (absorb) or ``[[stripping_gas]]`` (strip): the candidates,
                    each with ``[...k]`` K-values per solute and its prices
``[column]``        tray type, spacing, flood fraction, efficiency, material, limits
``[economics]``     interest, life, hours, utility prices, cost index, factors, caps
``[uncertainty]``   optional: how far each input may be off (distributions of factors on the
                    nominal K-values, efficiencies, prices and cost index), samples, seed,
                    confidence, and the one-at-a-time changes of a sensitivity study

Units are converted here, once; ``towercost.models`` never sees a unit
string. Defaults come from ``towercost.models.defaults``, the same values
the relations use.
"""

from __future__ import annotations

import math
from typing import Annotated, Any, Literal

from pydantic import BaseModel, BeforeValidator, ConfigDict, Field, field_validator, model_validator

from towercost.models import defaults
from towercost.models.equilibrium import HENRY_SCALES
from towercost.scenario.units import UnitError, dimension_of, to_si

__all__ = ["Scenario", "HENRY_SCALES"]


def _unit(unit: str):
    """A pydantic pre-validator turning "number unit" text into the SI magnitude."""

    def parse(value):
        if value is None:
            return None
        try:
            return to_si(value, unit)
        except UnitError as exc:
            raise ValueError(str(exc).replace("value: ", "")) from None

    return BeforeValidator(parse)


def _fraction_text(value):
    """Mole fractions as numbers or text: "500 ppmv", "0.2 %"."""
    if isinstance(value, str):
        try:
            return to_si(value, "dimensionless")
        except UnitError as exc:
            raise ValueError(str(exc).replace("value: ", "")) from None
    return value


Positive = Annotated[float, Field(gt=0, allow_inf_nan=False)]
NonNegative = Annotated[float, Field(ge=0, allow_inf_nan=False)]
MoleFraction = Annotated[float, BeforeValidator(_fraction_text), Field(ge=0, lt=1)]
Temperature = Annotated[float, _unit("K"), Field(gt=0, allow_inf_nan=False)]
Pressure = Annotated[float, _unit("Pa"), Field(gt=0, allow_inf_nan=False)]
Length = Annotated[float, _unit("m"), Field(gt=0)]
MolarMass = Annotated[float, _unit("kg/mol"), Field(gt=0, allow_inf_nan=False)]
Density = Annotated[float, _unit("kg/m^3"), Field(gt=0, allow_inf_nan=False)]
Viscosity = Annotated[float, _unit("Pa*s"), Field(gt=0, allow_inf_nan=False)]
SurfaceTension = Annotated[float, _unit("N/m"), Field(gt=0, allow_inf_nan=False)]
PricePerMass = Annotated[float, _unit("USD/kg"), Field(ge=0, allow_inf_nan=False)]
PricePerVolume = Annotated[float, _unit("USD/m^3"), Field(ge=0, allow_inf_nan=False)]
PricePerEnergy = Annotated[float, _unit("USD/J"), Field(ge=0, allow_inf_nan=False)]
Money = Annotated[float, _unit("USD"), Field(gt=0)]
Power = Annotated[float, _unit("W"), Field(gt=0)]
MassFlow = Annotated[float, _unit("kg/s"), Field(gt=0)]
MassRatio = Annotated[float, _unit("dimensionless"), Field(ge=0, allow_inf_nan=False)]
VolumePerMass = Annotated[float, _unit("m^3/kg"), Field(ge=0, allow_inf_nan=False)]
Years = Annotated[float, _unit("year"), Field(gt=0, le=100)]
HoursPerYear = Annotated[float, _unit("hour/year"), Field(gt=0, le=8784)]


class _Table(BaseModel):
    model_config = ConfigDict(extra="forbid", frozen=True)


class CaseHeader(_Table):
    """The ``[case]`` table: what the scenario is and which service it asks for."""

    name: str = Field(min_length=1)
    mode: Literal["absorb", "strip"]
    notes: str = ""


class Feed(_Table):
    """The stream to treat: a gas (absorb) or a liquid (strip)."""

    flow: Annotated[float, _unit("mol/s"), Field(gt=0, allow_inf_nan=False)]  # [mol/s]; mass or volume flows converted first
    temperature: Temperature  # [K]
    pressure: Pressure  # [Pa] at the column
    molar_mass: MolarMass  # [kg/mol] of the carrier (gas or liquid)
    composition: dict[str, MoleFraction]
    density: Density | None = None  # [kg/m3], liquid feed only
    viscosity: Viscosity | None = None  # [Pa s], liquid feed only
    surface_tension: SurfaceTension | None = None  # [N/m], liquid feed only

    @model_validator(mode="before")
    @classmethod
    def _flow_to_molar(cls, data: Any):
        """Accept a molar, mass or (liquid) volume flow; store mol/s."""
        if not isinstance(data, dict) or "flow" not in data:
            return data
        raw = data["flow"]
        dim = dimension_of(raw)
        if dim is None or dim == "[substance] / [time]":
            return data  # molar, a bare number, or text the field itself reports on
        if "molar_mass" not in data:
            raise ValueError(f"a mass or volume flow {raw!r} needs the feed molar_mass")
        if dim == "[mass] / [time]":
            molar_mass = to_si(data["molar_mass"], "kg/mol", what="molar_mass")
            value = to_si(raw, "kg/s") / molar_mass
        elif dim == "[length] ** 3 / [time]":
            if "density" not in data:
                raise ValueError(f"a volume flow {raw!r} needs the feed density")
            density = to_si(data["density"], "kg/m^3", what="density")
            molar_mass = to_si(data["molar_mass"], "kg/mol", what="molar_mass")
            value = to_si(raw, "m^3/s") * density / molar_mass
        else:
            raise ValueError(f"flow {raw!r} must be a molar, mass or volume flow per time, got {dim}")
        return {**data, "flow": value}

    @field_validator("composition")
    @classmethod
    def _some_solute(cls, value: dict[str, float]):
        if not value:
            raise ValueError("list at least one solute with its mole fraction")
        if sum(value.values()) >= 1:
            raise ValueError("solute mole fractions must add up to less than 1")
        return value


class Spec(_Table):
    """What the treated stream must meet for one solute: give exactly one of the three."""

    solute: str
    outlet: MoleFraction | None = None  # mole fraction in the treated stream
    removal: Annotated[float, Field(gt=0, lt=1)] | None = None  # fraction of the entering solute removed
    outlet_mass_rate: MassFlow | None = None  # [kg/s] of solute leaving in the treated stream
    solute_molar_mass: MolarMass | None = None  # [kg/mol], needed with outlet_mass_rate

    @model_validator(mode="after")
    def _one_target(self):
        given = [n for n in ("outlet", "removal", "outlet_mass_rate") if getattr(self, n) is not None]
        if len(given) != 1:
            raise ValueError(f"give exactly one of outlet, removal, outlet_mass_rate (got {', '.join(given) or 'none'})")
        if self.outlet_mass_rate is not None and self.solute_molar_mass is None:
            raise ValueError("outlet_mass_rate needs solute_molar_mass")
        return self


class Henry(_Table):
    """A Henry's-law constant with its scale and temperature dependence."""

    henry: Positive  # in the units of `scale` (the scales of chemicals.Henry_converter)
    scale: str
    temperature: Temperature = 298.15  # [K] at which `henry` is given
    slope: float = 0.0  # [K] d ln H / d(1/T) of the solubility constant (Sander 2015 convention)

    @field_validator("scale")
    @classmethod
    def _known_scale(cls, value: str):
        if value not in HENRY_SCALES:
            raise ValueError(f"scale must be one of {', '.join(HENRY_SCALES)}")
        return value


class VapourPressure(_Table):
    """Modified Raoult's law: K = gamma_inf Psat / P."""

    vapour_pressure: Pressure  # [Pa] of the pure solute at the column temperature
    activity_coefficient: Positive = 1.0  # infinite-dilution value in this liquid


KSource = Annotated[float, Field(gt=0, allow_inf_nan=False)] | Henry | VapourPressure


class Agent(_Table):
    """A candidate solvent (absorb) or stripping gas (strip)."""

    name: str = Field(min_length=1)
    molar_mass: MolarMass
    k: dict[str, KSource]  # per solute: K = y/x at column conditions, or Henry / vapour-pressure data
    density: Density | None = None  # [kg/m3], liquid solvents
    viscosity: Viscosity | None = None  # [Pa s], liquid solvents
    surface_tension: SurfaceTension | None = None  # [N/m], liquid solvents
    price: PricePerMass = 0.0  # [USD/kg] of fresh agent
    disposal: PricePerMass = 0.0  # [USD/kg] to dispose of or treat the spent agent
    regenerated: bool = False  # True: circulated through a regenerator, only losses made up
    loss: Annotated[float, Field(ge=0, le=1)] = 0.0  # fraction of the circulating agent lost per pass
    lean: dict[str, MoleFraction] = {}  # solute mole fractions in the agent entering the column
    regeneration_steam: MassRatio = 0.0  # [kg steam / kg agent circulated]
    regeneration_cooling: VolumePerMass = 0.0  # [m3 cooling water / kg agent circulated]
    efficiency: Annotated[float, Field(gt=0, le=1)] | None = None  # overall tray efficiency override

    @model_validator(mode="after")
    def _regeneration_consistent(self):
        if not self.regenerated and (self.regeneration_steam or self.regeneration_cooling or self.loss):
            raise ValueError("loss and regeneration_* apply only with regenerated = true")
        return self


class Murphree(_Table):
    murphree: Annotated[float, Field(gt=0, le=1)]  # Murphree vapour efficiency per tray


class Shell(_Table):
    """An existing shell to reuse: no new shell is bought; the new internals are priced."""

    diameter: Length  # [m] inside diameter
    max_trays: Annotated[int, Field(ge=1)]
    # fraction of a new shell's bare-module cost allowed for modifications (nozzles, tray rings, inspection)
    modification_allowance: Annotated[float, Field(ge=0, le=2)] = 0.0


class Column(_Table):
    tray: Literal["sieve", "valve"] = "sieve"
    tray_spacing: Length = defaults.TRAY_SPACING  # [m]; 24 in, common practice
    flood_fraction: Annotated[float, Field(gt=0, le=1)] = defaults.FLOOD_FRACTION
    efficiency: Annotated[float, Field(gt=0, le=1)] | Literal["oconnell"] | Murphree = "oconnell"

    @field_validator("efficiency", mode="before")
    @classmethod
    def _efficiency_word(cls, value):
        if isinstance(value, str) and value != "oconnell":
            raise ValueError("must be an overall efficiency in (0, 1], 'oconnell', or { murphree = 0.7 }")
        return value
    material: Literal["carbon_steel", "ss304", "ss316"] = "carbon_steel"
    trays: tuple[Annotated[int, Field(ge=1)], Annotated[int, Field(ge=1)]] = (1, 80)
    ratio: tuple[Annotated[float, Field(gt=1)], Annotated[float, Field(gt=1)]] = (1.05, 5.0)
    ratio_levels: Annotated[int, Field(ge=2, le=2000)] = 50
    max_height: Length = math.inf  # [m], tangent to tangent
    max_diameter: Length = math.inf  # [m]
    existing_shell: Shell | None = None
    supply_pressure: Pressure = defaults.SUPPLY_PRESSURE  # [Pa] the liquid is pumped from
    # standard sizes above the least also tried; unset: every size upward until the cost has risen twice in a row
    larger_diameters: Annotated[int, Field(ge=0, le=60)] | None = None
    design_pressure: Pressure | None = None  # [Pa] absolute, or gauge text "20 barg"; unset: the margin rule
    design_temperature: Temperature | None = None  # [K]; unset: operating temperature plus the margin
    drive_enclosure: Literal["totally_enclosed", "explosion_proof", "open_drip_proof"] = "totally_enclosed"
    turndown: Annotated[float, Field(gt=0, le=1)] = defaults.TURNDOWN  # lowest loads / design loads; common practice
    valve_fallback: bool = True  # offer valve trays where sieve trays fall outside their operating range
    max_dilute: Annotated[float, Field(gt=0, lt=1)] = defaults.MAX_DILUTE  # solute mole fraction; common practice
    max_flow_change: Annotated[float, Field(gt=0, lt=1)] = defaults.MAX_FLOW_CHANGE  # fractional; common practice

    @model_validator(mode="after")
    def _ranges(self):
        if self.trays[0] > self.trays[1]:
            raise ValueError(f"trays range {list(self.trays)} must be [low, high] with low <= high")
        if self.ratio[0] >= self.ratio[1]:
            raise ValueError(f"ratio range {list(self.ratio)} must be [low, high] with low < high")
        return self


class Economics(_Table):
    interest: Annotated[float, Field(ge=0, le=1)] = defaults.INTEREST  # per year
    life: Years = defaults.LIFE  # [yr]
    hours: HoursPerYear = defaults.HOURS  # [h/yr] of operation
    electricity: PricePerEnergy = defaults.ELECTRICITY  # [USD/J]; bare numbers are USD/J, write "0.08 USD/kWh"
    steam: PricePerMass = 0.0  # [USD/kg]
    cooling_water: PricePerVolume = 0.0  # [USD/m3]
    cost_year: Annotated[int, Field(ge=1950, le=2100)] | None = None  # index year from models/data
    cost_index: Positive | None = None  # an index value of your own, overrides cost_year
    contingency: Annotated[float, Field(ge=0, le=1)] = defaults.CONTINGENCY
    fee: Annotated[float, Field(ge=0, le=1)] = defaults.FEE
    auxiliary: Annotated[float, Field(ge=0, le=2)] = defaults.AUXILIARY
    pump_efficiency: Annotated[float, Field(gt=0, le=1)] = defaults.PUMP_EFFICIENCY
    blower_efficiency: Annotated[float, Field(gt=0, le=1)] = defaults.BLOWER_EFFICIENCY
    motor_efficiency: Annotated[float, Field(gt=0, le=1)] = defaults.MOTOR_EFFICIENCY
    credit: dict[str, PricePerMass] = {}  # [USD/kg] of solute recovered (regenerated agents only)
    solute_molar_mass: dict[str, MolarMass] = {}  # [kg/mol], needed for credit
    capital_budget: Money | None = None  # [USD] installed cost cap
    max_power: Power | None = None  # [W] electric power cap
    max_steam: MassFlow | None = None  # [kg/s] steam cap
    margin: Annotated[float, Field(gt=0, lt=1)] = defaults.MARGIN  # near-optimal band, fraction above best


#: What a [uncertainty] distribution may share one factor across (K-values and efficiencies).
SHARED = ("candidate", "solute", "all", "none")

#: Inputs a sensitivity study changes one at a time; ``k[solute]`` names the K-values of one solute.
SENSITIVITY_INPUTS = ("agent_price", "disposal", "electricity", "steam", "cooling_water", "credit", "cost_index",
                      "interest", "k", "efficiency", "feed_flow", "inlet")


class Spread(_Table):
    """How far one input may be off: a factor on its nominal value, drawn afresh for every sample.

    ``lognormal``: ln(factor) normal with mean 0 (median factor 1) and standard deviation ``log_sd``;
    ``normal``: factor normal with mean 1 and standard deviation ``sd`` (cut at 0);
    ``triangular``: factor between ``low`` and ``high``, most likely ``mode``; ``fixed``: factor 1.
    For K-values and efficiencies, ``shared`` says what one factor is common to ("candidate": all
    solutes of a candidate; "solute": one solute in every candidate; "all"; "none": each pair its own)
    and ``correlation`` how strongly (1: the same factor); ``by_solute`` sets ``log_sd`` per solute.
    """

    distribution: Literal["lognormal", "normal", "triangular", "fixed"]
    log_sd: NonNegative | None = None
    sd: NonNegative | None = None
    low: NonNegative | None = None
    mode: NonNegative | None = None
    high: NonNegative | None = None
    shared: Literal["candidate", "solute", "all", "none"] = "candidate"
    correlation: Annotated[float, Field(ge=0, le=1)] = 1.0
    by_solute: dict[str, NonNegative] = {}

    @model_validator(mode="before")
    @classmethod
    def _infer_distribution(cls, data: Any):
        """``distribution`` may be left out where the parameters say it: log_sd, sd, or low/mode/high."""
        if isinstance(data, dict) and "distribution" not in data:
            given = {"lognormal": "log_sd" in data, "normal": "sd" in data,
                     "triangular": any(k in data for k in ("low", "mode", "high"))}
            kinds = [k for k, v in given.items() if v]
            if len(kinds) == 1:
                return {**data, "distribution": kinds[0]}
        return data

    @model_validator(mode="after")
    def _parameters(self):
        needs = {"lognormal": ("log_sd",), "normal": ("sd",), "triangular": ("low", "mode", "high"), "fixed": ()}
        wanted = needs[self.distribution]
        missing = [n for n in wanted if getattr(self, n) is None]
        if missing:
            raise ValueError(f"a {self.distribution} spread needs {', '.join(missing)}")
        extra = [n for n in ("log_sd", "sd", "low", "mode", "high") if n not in wanted and getattr(self, n) is not None]
        if extra:
            raise ValueError(f"{', '.join(extra)} does not apply to a {self.distribution} spread")
        if self.distribution == "triangular" and not (self.low <= self.mode <= self.high):
            raise ValueError(f"triangular factors must have low <= mode <= high, got {self.low:g}, {self.mode:g}, "
                             f"{self.high:g}")
        if self.by_solute and self.distribution != "lognormal":
            raise ValueError("by_solute applies to a lognormal spread only")
        return self


def _lognormal(log_sd: float) -> Spread:
    return Spread(distribution="lognormal", log_sd=log_sd)


def _price_spread() -> Spread:
    low, mode, high = defaults.PRICE_TRIANGLE
    return Spread(distribution="triangular", low=low, mode=mode, high=high)


ChangePair = tuple[Annotated[float, Field(gt=-1, lt=0)], Annotated[float, Field(gt=0, allow_inf_nan=False)]]


class Uncertainty(_Table):
    """The optional ``[uncertainty]`` table: how far the inputs may be off, and how the studies run.

    Every spread is a factor on the scenario's own (nominal) value. Defaults (common practice, see
    ``towercost.models.defaults``): K lognormal, ln-standard deviation 0.20, one factor per
    candidate; efficiency lognormal 0.15, one factor per candidate; agent, disposal, utility and
    credit prices triangular (0.80, 1.00, 1.25); cost index normal, standard deviation 0.05;
    interest fixed.
    """

    samples: Annotated[int, Field(ge=1, le=10_000_000)] = defaults.SAMPLES
    seed: Annotated[int, Field(ge=0)] = 0
    confidence: Annotated[float, Field(gt=0, lt=1)] = defaults.CONFIDENCE  # a margin design meets every spec so often
    reoptimize: Annotated[int, Field(ge=0, le=100_000)] = defaults.REOPTIMIZE_SAMPLES  # samples re-optimized
    efficiency_follows_k: bool = True  # O'Connell efficiencies re-evaluated at each sampled K
    change: Annotated[float, Field(gt=0, lt=1)] = defaults.SENSITIVITY_CHANGE  # sensitivity: +- fraction
    changes: dict[str, Annotated[float, Field(gt=0, lt=1)] | ChangePair] = {}  # per input: +- c, or [low, high]
    k: Spread = _lognormal(defaults.K_LOG_SD)
    efficiency: Spread = _lognormal(defaults.EFFICIENCY_LOG_SD)
    agent_price: Spread = _price_spread()
    disposal: Spread = _price_spread()
    electricity: Spread = _price_spread()
    steam: Spread = _price_spread()
    cooling_water: Spread = _price_spread()
    credit: Spread = _price_spread()
    cost_index: Spread = Spread(distribution="normal", sd=defaults.INDEX_SD)
    interest: Spread = Spread(distribution="fixed")

    @model_validator(mode="after")
    def _kinds(self):
        for name in ("k", "efficiency"):
            if getattr(self, name).distribution not in ("lognormal", "fixed"):
                what = "K-values" if name == "k" else "tray efficiencies"
                raise ValueError(f"{name}: the spread of {what} is lognormal or fixed")
        for name in self.changes:
            base = name.split("[", 1)[0]
            if base not in SENSITIVITY_INPUTS or (name != base and not (base == "k" and name.endswith("]"))):
                raise ValueError(f"changes: {name!r} is not an input; use one of {', '.join(SENSITIVITY_INPUTS)} "
                                 "or k[solute]")
        return self


class Scenario(_Table):
    case: CaseHeader
    feed: Feed
    spec: list[Spec] = Field(min_length=1)
    solvent: list[Agent] = []
    stripping_gas: list[Agent] = []
    column: Column = Column()
    economics: Economics = Economics()
    uncertainty: Uncertainty = Uncertainty()

    @property
    def agents(self) -> list[Agent]:
        """The candidates: solvents when absorbing, stripping gases when stripping."""
        return self.solvent if self.case.mode == "absorb" else self.stripping_gas

    @property
    def solutes(self) -> list[str]:
        return list(self.feed.composition)

    @property
    def agent_word(self) -> str:
        return "solvent" if self.case.mode == "absorb" else "stripping_gas"

    @model_validator(mode="after")
    def _consistent(self):
        mode, word = self.case.mode, self.agent_word
        other = "stripping_gas" if mode == "absorb" else "solvent"
        if getattr(self, other):
            raise ValueError(f"[[{other}]] does not apply with mode = {mode!r}; use [[{word}]]")
        if not self.agents:
            raise ValueError(f"mode = {mode!r} needs at least one [[{word}]]")
        names = [a.name for a in self.agents]
        if len(set(names)) != len(names):
            raise ValueError(f"[[{word}]] names must be distinct, got {names}")
        solutes = self.solutes
        for spec in self.spec:
            if spec.solute not in solutes:
                raise ValueError(f"[[spec]] solute {spec.solute!r} is not in [feed.composition] ({', '.join(solutes)})")
        if len({s.solute for s in self.spec}) != len(self.spec):
            raise ValueError("[[spec]]: one entry per solute")
        for agent in self.agents:
            for solute in solutes:
                if solute not in agent.k:
                    raise ValueError(f"[[{word}]] {agent.name!r}: no K data for solute {solute!r} in [{word}.k]")
            for solute in list(agent.k) + list(agent.lean):
                if solute not in solutes:
                    raise ValueError(f"[[{word}]] {agent.name!r}: solute {solute!r} is not in [feed.composition]")
            if mode == "absorb":
                for field in ("density", "viscosity", "surface_tension"):
                    if getattr(agent, field) is None:
                        raise ValueError(f"[[solvent]] {agent.name!r}: {field} is required for a liquid solvent")
        if mode == "strip":
            for field in ("density", "viscosity", "surface_tension"):
                if getattr(self.feed, field) is None:
                    raise ValueError(f"[feed] {field} is required for a liquid feed (mode = 'strip')")
        for solute in self.economics.credit:
            if solute not in self.economics.solute_molar_mass:
                raise ValueError(f"[economics] credit for {solute!r} needs solute_molar_mass.{solute}")
        return self

    @model_validator(mode="after")
    def _uncertainty_solutes(self):
        solutes = self.solutes
        u = self.uncertainty
        for table in ("k", "efficiency"):
            for solute in getattr(u, table).by_solute:
                if solute not in solutes:
                    raise ValueError(f"[uncertainty.{table}] by_solute: {solute!r} is not in [feed.composition] "
                                     f"({', '.join(solutes)})")
        for name in u.changes:
            if name.startswith("k[") and name[2:-1] not in solutes:
                raise ValueError(f"[uncertainty] changes: {name!r} names no solute of [feed.composition] "
                                 f"({', '.join(solutes)})")
        return self
