"""The scenario file's schema: one absorber or stripper case, validated, in SI.

A scenario is a TOML file with these tables. Every dimensional value carries
its unit as text ("1200 kmol/h", "35 degC", "1.2 bara", "0.09 USD/kWh"); a
bare number there is refused, because it would have to be read in some unit
the file does not state. Dimensionless values (fractions, factors, counts,
K-values) are bare numbers.

``[case]``          name, ``mode`` = "absorb" (treat a gas) or "strip" (treat a liquid)
``[feed]``          the stream to treat: flow, temperature, pressure, molar mass,
                    ``[feed.composition]`` solute concentrations; for a liquid feed
                    also density, viscosity, surface tension
``[[spec]]``        one per solute: ``outlet`` (a concentration), ``removal``
                    (fraction removed) or ``outlet_mass_rate``
``[[solvent]]``     (absorb) or ``[[stripping_gas]]`` (strip): the candidates,
                    each with ``[...k]`` K-values per solute and its prices
``[column]``        tray type, spacing, flood fraction, efficiency, material, limits
``[[packing]]``     optional: packed beds offered beside the trays, each a row of
                    ``models/data/packings.toml`` with its design fraction of flood,
                    pressure-drop limit per metre, limits and an optional given H_OG,
                    H_OL or HETP; diffusivities of the solutes then come with the feed
                    and the candidates (``[feed.diffusivity]``, ``[solvent.diffusivity]``)
``[economics]``     interest, life, hours, utility prices, cost index, factors, caps
``[uncertainty]``   optional: how far each input may be off (distributions of factors on the
                    nominal K-values, efficiencies, prices and cost index), samples, seed,
                    confidence, and the one-at-a-time changes of a sensitivity study
``[units]``         optional: the atmosphere gauge pressures are read against, and
                    the normal (Nm3) and standard (scf) conditions of gas volumes
``[solute.<name>]`` optional: per solute, its molar mass (needed for liquid
                    concentrations by mass, and to show liquids in ppmw)

Concentrations follow their phase (``towercost.scenario.concentration``):
gas by volume (ppmv, ppbv, %), liquid by mass or per volume (ppmw, mg/L,
ug/L) or as a mole fraction. Every value has an allowed range (outside it:
an error) and most a usual range (outside it: a warning in every output),
``towercost.scenario.envelope``.

Units are converted here, once; ``towercost.models`` never sees a unit
string. Defaults come from ``towercost.models.defaults``, the same values
the relations use.
"""

from __future__ import annotations

import math
import unicodedata
from typing import Annotated, Any, Literal

from pydantic import (AfterValidator, BaseModel, ConfigDict, Field, PrivateAttr, StrictBool, field_validator,
                      model_validator)

from towercost.models import defaults
from towercost.models import packing as packing_data
from towercost.models.equilibrium import HENRY_SCALES
from towercost.scenario import concentration as conc
from towercost.scenario import envelope as env
from towercost.scenario.envelope import number, quantity
from towercost.scenario.units import DEFAULT_BASIS, NUMBER, Basis, UnitError, dimension_of, registry, to_si, words

__all__ = ["Scenario", "HENRY_SCALES", "MAX_NAME", "MAX_CANDIDATES", "MAX_SOLUTES"]

#: Longest name (of a case, candidate or solute) accepted [characters].
MAX_NAME = 200

#: Most candidates, solutes and notes characters in one scenario.
MAX_CANDIDATES = 200
MAX_SOLUTES = 50
MAX_NOTES = 2000


def _printable(allow_lines: bool):
    def check(value: str) -> str:
        for ch in value:
            if allow_lines and ch in "\n\t":
                continue
            if unicodedata.category(ch).startswith("C"):
                raise ValueError(f"must be plain text: it holds the control character U+{ord(ch):04X}")
        if not allow_lines and value.strip() != value:
            raise ValueError("must not start or end with blanks")
        return value

    return AfterValidator(check)


_TEXT_PATTERN = r"^[^\u0000-\u001f\u007f-\u009f]*$"

#: A name: 1 to MAX_NAME characters of plain text (printed as text, never as terminal markup).
Name = Annotated[str, Field(min_length=1, max_length=MAX_NAME, json_schema_extra={"pattern": _TEXT_PATTERN}),
                 _printable(False)]
Notes = Annotated[str, Field(max_length=MAX_NOTES), _printable(True)]

MoleFraction = number(env.MOLE_FRACTION)
Concentration = number(env.MOLE_FRACTION, schema=conc.json_schema())
FeedConcentration = number(env.FEED_FRACTION, schema=conc.json_schema(positive=True))
Temperature = quantity(env.COLUMN_TEMPERATURE)
Pressure = quantity(env.COLUMN_PRESSURE, gauge_or_absolute=True)
MolarMass = quantity(env.MOLAR_MASS)
Density = quantity(env.DENSITY)
Viscosity = quantity(env.VISCOSITY)
SurfaceTension = quantity(env.SURFACE_TENSION)
Price = quantity(env.AGENT_PRICE)

#: A spread parameter of the uncertainty study: a finite number >= 0 (a factor's spread has no unit).
NonNegative = Annotated[float, Field(ge=0, allow_inf_nan=False)]
Diffusivity = quantity(env.DIFFUSIVITY)
PressureGradient = quantity(env.PRESSURE_GRADIENT)
TransferHeight = quantity(env.TRANSFER_HEIGHT)


def _described(text: str) -> Any:
    return Field(description=text)


class _Table(BaseModel):
    model_config = ConfigDict(extra="forbid", frozen=True)


class CaseHeader(_Table):
    """The ``[case]`` table: what the scenario is and which service it asks for."""

    name: Annotated[Name, _described("name of the case, printed as plain text")]
    mode: Literal["absorb", "strip"] = Field(description="absorb: treat a gas with a liquid solvent; "
                                             "strip: treat a liquid with a stripping gas")
    notes: Annotated[Notes, _described("free notes")] = ""


class Feed(_Table):
    """The stream to treat: a gas (absorb) or a liquid (strip)."""

    flow: Annotated[quantity(env.MOLAR_FLOW), _described(
        "feed flow: molar (kmol/h, lbmol/h), mass (kg/h, lb/h; with molar_mass), volume of a liquid (m3/h, "
        "gpm; with density and molar_mass) or of a gas at normal or standard conditions (Nm3/h, scfm)")]  # [mol/s]
    temperature: Annotated[Temperature, _described("column temperature (isothermal)")]  # [K]
    pressure: Annotated[Pressure, _described("pressure at the column (absolute, or gauge as barg/psig)")]  # [Pa]
    molar_mass: Annotated[MolarMass, _described("molar mass of the carrier gas or liquid")]  # [kg/mol]
    composition: dict[Annotated[str, Field(min_length=1, max_length=MAX_NAME)], FeedConcentration] = Field(
        max_length=MAX_SOLUTES, description="solute concentrations in the feed: a gas by volume (ppmv, ppbv, %), "
        "a liquid by mass or per volume (ppmw, mg/L, ug/L) or a mole fraction")
    density: Annotated[Density | None, _described("liquid feed only")] = None  # [kg/m3]
    viscosity: Annotated[Viscosity | None, _described(
        "of the feed's phase: a liquid feed's; a gas feed's where [[packing]] is offered")] = None  # [Pa s]
    surface_tension: Annotated[SurfaceTension | None, _described("liquid feed only")] = None  # [N/m]
    diffusivity: dict[Annotated[str, Field(min_length=1, max_length=MAX_NAME)], Diffusivity] = Field(
        {}, max_length=MAX_SOLUTES, description="of each solute in the feed's phase, for packed beds (Onda)")  # [m2/s]

    @model_validator(mode="before")
    @classmethod
    def _flow_to_molar(cls, data: Any, info):
        """Accept a molar, mass or (liquid) volume flow; hand the field "<mol/s> mol/s"."""
        if not isinstance(data, dict) or "flow" not in data:
            return data
        raw = data["flow"]
        dim = dimension_of(raw)
        if dim is None or dim == "[substance] / [time]":
            return data  # molar, a bare number, or text the field itself reports on
        basis = env._basis(info)
        context = getattr(info, "context", None)
        bare_si = isinstance(context, dict) and context.get("bare_si", False)

        def side(name: str, unit: str, envelope) -> float:
            """A value the conversion needs, read and range-checked as its own field would be."""
            value = to_si(data[name], unit, what=name, basis=basis, require_unit=not bare_si, example=envelope.show)
            try:
                return envelope.check(value)
            except ValueError as exc:
                raise UnitError(f"{name} {exc}, got {data[name]!r}") from None

        if "molar_mass" not in data:
            raise ValueError(f"a mass or volume flow {raw!r} needs the feed molar_mass")
        try:
            if dim == "[mass] / [time]":
                molar_mass = side("molar_mass", "kg/mol", env.MOLAR_MASS)
                value = to_si(raw, "kg/s", basis=basis) / molar_mass
            elif dim == "[length] ** 3 / [time]":
                if "density" not in data:
                    raise ValueError(f"a volume flow {raw!r} needs the feed density (a liquid), or write a gas "
                                     "flow at normal or standard conditions (Nm3/h, scfm)")
                density = side("density", "kg/m^3", env.DENSITY)
                molar_mass = side("molar_mass", "kg/mol", env.MOLAR_MASS)
                value = to_si(raw, "m^3/s", basis=basis) * density / molar_mass
            else:
                try:
                    kind = words(registry().Quantity(NUMBER.match(raw).group(2)).dimensionality)
                except Exception:  # noqa: BLE001 - the dimension as pint writes it will do
                    kind = dim
                raise ValueError(f"flow {raw!r} must be a molar, mass or volume flow per time, not {kind}")
        except UnitError as exc:
            raise ValueError(str(exc)) from None
        if not (math.isfinite(value) and value > 0):
            raise ValueError(f"flow {raw!r} with the feed's molar_mass and density is not a flow > 0")
        return {**data, "flow": f"{value!r} mol/s"}

    @field_validator("composition")
    @classmethod
    def _some_solute(cls, value: dict[str, float]):
        if not value:
            raise ValueError("list at least one solute with its concentration")
        if sum(value.values()) >= 1:
            raise ValueError("solute mole fractions must add up to less than 1")
        return value


class Spec(_Table):
    """What the treated stream must meet for one solute: give exactly one of the three."""

    solute: Annotated[str, Field(min_length=1, max_length=MAX_NAME, description="a solute of [feed.composition]")]
    outlet: Annotated[Concentration | None, _described("allowed concentration in the treated stream (units of its "
                                                      "phase)")] = None
    removal: Annotated[number(env.REMOVAL) | None, _described("fraction of the entering solute removed")] = None
    outlet_mass_rate: Annotated[quantity(env.SOLUTE_MASS_RATE) | None, _described(
        "solute leaving with the treated stream")] = None  # [kg/s]
    solute_molar_mass: Annotated[MolarMass | None, _described("needed with outlet_mass_rate")] = None  # [kg/mol]

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

    henry: Annotated[number(env.HENRY), _described("Henry's-law constant in the units of `scale`")]
    scale: str = Field(max_length=40, description=f"one of {', '.join(HENRY_SCALES)} (the scales of "
                       "chemicals.Henry_converter)")
    temperature: Annotated[quantity(env.REFERENCE_TEMPERATURE), _described(
        "temperature at which `henry` is given")] = 298.15  # [K]
    slope: Annotated[quantity(env.HENRY_SLOPE, only=("K", "kelvin")), _described(
        "d ln H / d(1/T) of the solubility constant, in K (Sander 2015 convention)")] = 0.0  # [K]

    @field_validator("scale")
    @classmethod
    def _known_scale(cls, value: str):
        if value not in HENRY_SCALES:
            raise ValueError(f"scale must be one of {', '.join(HENRY_SCALES)}")
        return value


class VapourPressure(_Table):
    """Modified Raoult's law: K = gamma_inf Psat / P."""

    vapour_pressure: Annotated[quantity(env.VAPOUR_PRESSURE, absolute=True), _described(
        "of the pure solute at the column temperature")]  # [Pa]
    activity_coefficient: Annotated[number(env.ACTIVITY), _described("infinite-dilution value in this liquid")] = 1.0


KSource = number(env.K_VALUE) | Henry | VapourPressure


class Regenerator(_Table):
    """The regenerator of a circulated solvent: a stripping column, its exchangers and pumps, all priced.

    Lean loading becomes a decision: the levels of K x_lean / y_out of the key solute searched.
    """

    temperature: Annotated[Temperature, _described("regenerator temperature (isothermal)")]  # [K]
    pressure: Annotated[quantity(env.COLUMN_PRESSURE, absolute=True), _described("absolute, at the regenerator")]
    stripping: Literal["steam", "reboiled"] = Field("steam", description="steam: live steam fed below the bottom "
                                                    "tray; reboiled: the solvent's own vapour from a kettle reboiler")
    k: dict[Annotated[str, Field(min_length=1, max_length=MAX_NAME)], KSource] = Field(
        {}, max_length=MAX_SOLUTES, description="per solute: K = y/x at the regenerator; a solute left out takes "
        "its absorber Henry's-law data at the regenerator's temperature and pressure")
    trays: tuple[Trays, Trays] = Field(defaults.REGENERATOR_TRAYS, description="range of regenerator real trays "
                                       "searched, [low, high]")
    efficiency: Annotated[number(env.EFFICIENCY) | None, _described(
        "overall tray efficiency; unset: O'Connell's correlation at the regenerator's K and the solvent viscosity "
        "below")] = None
    viscosity: Annotated[Viscosity | None, _described("solvent viscosity at the regenerator; unset: the "
                                                      "solvent's (conservative for O'Connell)")] = None
    lean_range: tuple[number(env.LEAN_LEVEL), number(env.LEAN_LEVEL)] = Field(
        defaults.LEAN_RANGE, description="range of the lean level K x_lean / y_out of the key solute, [low, high]")
    lean_levels: number(env.LEAN_LEVELS) = defaults.LEAN_LEVELS
    key: Annotated[str | None, _described("the solute whose lean loading is the decision; unset: the first with "
                                          "a spec")] = None
    heat_capacity: Annotated[quantity(env.HEAT_CAPACITY), _described("of the solvent")]  # [J/(kg K)]
    latent_heat: Annotated[quantity(env.LATENT_HEAT) | None, _described(
        "of the solvent at the regenerator (stripping = 'reboiled')")] = None  # [J/kg]
    approach: Annotated[quantity(env.APPROACH, only=("K",)), _described(
        "hot-end approach of the lean/rich cross exchanger")] = defaults.APPROACH  # [K]
    u_cross: quantity(env.HEAT_COEFFICIENT) = defaults.U_CROSS      # [W/(m2 K)]
    u_cooler: quantity(env.HEAT_COEFFICIENT) = defaults.U_COOLER    # [W/(m2 K)]
    u_heater: quantity(env.HEAT_COEFFICIENT) = defaults.U_HEATER    # [W/(m2 K)]
    vapour_pressure: Annotated[quantity(env.SOLVENT_VAPOUR_PRESSURE, absolute=True), _described(
        "of the solvent at the absorber (its loss to the treated gas)")] = 0.0  # [Pa]
    vapour_pressure_hot: Annotated[quantity(env.SOLVENT_VAPOUR_PRESSURE, absolute=True), _described(
        "of the solvent at the regenerator (its loss to the overhead)")] = 0.0  # [Pa]
    once_through: StrictBool = Field(False, description="true: the same solvent is also offered once through "
                                     "(bought fresh, spent solvent disposed of), competing in one ranking")

    @model_validator(mode="after")
    def _ranges(self):
        if self.trays[0] > self.trays[1]:
            raise ValueError(f"trays range {list(self.trays)} must be [low, high] with low <= high")
        if self.lean_range[0] > self.lean_range[1]:
            raise ValueError(f"lean_range {list(self.lean_range)} must be [low, high] with low <= high")
        if self.stripping == "reboiled" and self.latent_heat is None:
            raise ValueError("stripping = 'reboiled' needs latent_heat (of the solvent at the regenerator)")
        return self


class Agent(_Table):
    """A candidate solvent (absorb) or stripping gas (strip)."""

    name: Annotated[Name, _described("name of the candidate, printed as plain text")]
    molar_mass: MolarMass
    k: dict[Annotated[str, Field(min_length=1, max_length=MAX_NAME)], KSource] = Field(
        max_length=MAX_SOLUTES, description="per solute: K = y/x at column conditions, or Henry's-law or "
        "vapour-pressure data")
    density: Annotated[Density | None, _described("liquid solvents")] = None  # [kg/m3]
    viscosity: Annotated[Viscosity | None, _described(
        "liquid solvents; a stripping gas's where [[packing]] is offered")] = None  # [Pa s]
    diffusivity: dict[Annotated[str, Field(min_length=1, max_length=MAX_NAME)], Diffusivity] = Field(
        {}, max_length=MAX_SOLUTES, description="of each solute in the candidate's phase, for packed beds (Onda)")
    surface_tension: Annotated[SurfaceTension | None, _described("liquid solvents")] = None  # [N/m]
    price: Annotated[Price, _described("fresh agent")] = 0.0  # [USD/kg]
    disposal: Annotated[Price, _described("to dispose of or treat the spent agent")] = 0.0  # [USD/kg]
    regenerated: StrictBool = Field(False, description="true: circulated through a regenerator, only losses made up")
    loss: number(env.LOSS) = 0.0
    lean: dict[Annotated[str, Field(min_length=1, max_length=MAX_NAME)], Concentration] = Field(
        {}, max_length=MAX_SOLUTES, description="solute concentrations in the agent entering the column (units of "
        "its phase)")
    regeneration_steam: number(env.STEAM_RATIO) = 0.0  # [kg steam / kg agent circulated]
    regeneration_cooling: quantity(env.COOLING_RATIO) = 0.0  # [m3 cooling water / kg agent circulated]
    efficiency: Annotated[number(env.EFFICIENCY) | None, _described("overall tray efficiency override")] = None
    regenerator: Regenerator | None = Field(None, description="a designed and priced regenerator (solvents only); "
                                            "replaces regeneration_steam and regeneration_cooling")

    @model_validator(mode="after")
    def _regeneration_consistent(self):
        if not self.regenerated and (self.regeneration_steam or self.regeneration_cooling or self.loss):
            raise ValueError("loss and regeneration_* apply only with regenerated = true")
        if self.regenerator is not None:
            if not self.regenerated:
                raise ValueError("a regenerator applies only with regenerated = true")
            if self.regeneration_steam or self.regeneration_cooling:
                raise ValueError("give either a regenerator or regeneration_steam/regeneration_cooling, not both: "
                                 "the regenerator's steam and cooling water are computed")
            if self.lean:
                raise ValueError("lean applies without a regenerator only: with one, the lean loadings are the "
                                 "loop's (a decision for the key solute, the regenerator's outlet for the others)")
        return self


class Murphree(_Table):
    murphree: number(env.MURPHREE)  # Murphree vapour efficiency per tray


class Shell(_Table):
    """An existing shell to reuse: no new shell is bought; the new internals are priced."""

    diameter: quantity(env.SHELL_DIAMETER)  # [m] inside diameter
    max_trays: number(env.SHELL_TRAYS)
    # fraction of a new shell's bare-module cost allowed for modifications (nozzles, tray rings, inspection)
    modification_allowance: number(env.MODIFICATION) = 0.0


Trays = number(env.TRAYS)
Ratio = number(env.RATIO)


class Column(_Table):
    tray: Literal["sieve", "valve"] = Field("sieve", description="tray type")
    tray_spacing: quantity(env.TRAY_SPACING) = defaults.TRAY_SPACING  # [m]; 24 in, common practice
    flood_fraction: number(env.FLOOD) = defaults.FLOOD_FRACTION
    efficiency: number(env.EFFICIENCY) | Literal["oconnell"] | Murphree = Field(
        "oconnell", description="overall tray efficiency in (0, 1], 'oconnell' (O'Connell's absorber correlation "
        "per solute), or { murphree = 0.7 }")

    @field_validator("efficiency", mode="before")
    @classmethod
    def _efficiency_word(cls, value):
        if isinstance(value, str) and value != "oconnell":
            raise ValueError("must be an overall efficiency in (0, 1], 'oconnell', or { murphree = 0.7 }")
        return value
    material: Literal["carbon_steel", "ss304", "ss316"] = Field("carbon_steel", description="column material")
    trays: tuple[Trays, Trays] = Field((1, 80), description="range of real trays searched, [low, high]")
    ratio: tuple[Ratio, Ratio] = Field((1.05, 5.0), description="range of the agent rate over its minimum "
                                       "searched, [low, high]")
    ratio_levels: number(env.RATIO_LEVELS) = 50
    max_height: Annotated[quantity(env.HEIGHT_LIMIT), _described("tangent to tangent; no limit unless given")] \
        = math.inf  # [m]
    max_diameter: Annotated[quantity(env.DIAMETER_LIMIT), _described("no limit unless given")] = math.inf  # [m]
    existing_shell: Shell | None = Field(None, description="an existing shell to reuse: diameter and max_trays")
    supply_pressure: Annotated[Pressure, _described("pressure the liquid is pumped from")] \
        = defaults.SUPPLY_PRESSURE  # [Pa]
    # standard sizes above the least also tried; unset: every size upward until the cost has risen twice in a row
    larger_diameters: number(env.LARGER) | None = None
    design_pressure: Annotated[Pressure | None, _described(
        "vessel design pressure (absolute, or gauge as barg/psig); the margin rule unless given")] = None  # [Pa]
    design_temperature: Annotated[Temperature | None, _described(
        "vessel design temperature; operating temperature plus the margin unless given")] = None  # [K]
    drive_enclosure: Literal["totally_enclosed", "explosion_proof", "open_drip_proof"] = Field(
        "totally_enclosed", description="enclosure of the electric motors of the pump and the gas mover")
    turndown: number(env.TURNDOWN) = defaults.TURNDOWN  # lowest loads / design loads; common practice
    valve_fallback: StrictBool = Field(True, description="offer valve trays where sieve trays fall outside their "
                                       "operating range")
    max_dilute: number(env.DILUTE) = defaults.MAX_DILUTE  # solute mole fraction; common practice
    max_flow_change: number(env.DILUTE) = defaults.MAX_FLOW_CHANGE  # fractional; common practice
    offer_trays: StrictBool = Field(True, description="false: only the [[packing]] beds are offered")
    compete_tray_types: StrictBool = Field(False, description="true: sieve and valve trays both offered at every "
                                           "point, each its own alternative competing with the other")
    stages: tuple[number(env.STAGES), number(env.STAGES)] | None = Field(
        None, description="range of theoretical stages searched in packed beds, [low, high]; unset: [1, the upper "
        "end of trays]")
    max_pressure_drop: Annotated[quantity(env.PRESSURE_DROP_LIMIT) | None, _described(
        "gas pressure drop of the column (trays or beds), a limit")] = None  # [Pa]
    packing_materials: list[Name] | None = Field(None, max_length=MAX_CANDIDATES, description=(
        "packing materials allowed (a limit); unset: any"))

    @model_validator(mode="after")
    def _ranges(self):
        if self.trays[0] > self.trays[1]:
            raise ValueError(f"trays range {list(self.trays)} must be [low, high] with low <= high")
        if self.stages is not None and self.stages[0] > self.stages[1]:
            raise ValueError(f"stages range {list(self.stages)} must be [low, high] with low <= high")
        if self.ratio[0] >= self.ratio[1]:
            raise ValueError(f"ratio range {list(self.ratio)} must be [low, high] with low < high")
        return self


class PackedBed(_Table):
    """One ``[[packing]]`` entry: a random packing offered as the column's internals, with its design options.

    Defaults are common practice (``towercost.models.packing``): design at 0.70
    of flood and at most 400 Pa/m; beds no taller than the packing row's
    ``max_bed_height``. A given ``h_og``, ``h_ol`` or ``hetp`` (one at most)
    replaces the Onda film heights for every solute.
    """

    packing: Annotated[Name, _described("a row of models/data/packings.toml, e.g. 'pall_ring_plastic_50'")]
    name: Annotated[Name | None, _described("label in the ranking; unset: the packing's kind, material and size")] \
        = None
    flood_fraction: number(env.FLOOD) = packing_data.FLOOD_FRACTION
    pressure_drop_per_m: Annotated[PressureGradient, _described("design limit of the bed")] \
        = packing_data.PRESSURE_DROP_LIMIT  # [Pa/m]
    max_pressure_drop: Annotated[quantity(env.PRESSURE_DROP_LIMIT) | None, _described(
        "across the beds, a limit for this packing")] = None  # [Pa]
    max_height: Annotated[quantity(env.HEIGHT_LIMIT) | None, _described(
        "column height, tangent to tangent, a limit for this packing")] = None  # [m]
    max_bed_height: Annotated[quantity(env.BED_HEIGHT) | None, _described(
        "tallest bed; unset: the packing row's (common practice)")] = None  # [m]
    h_og: Annotated[TransferHeight | None, _described("given overall height of a gas-phase transfer unit")] = None
    h_ol: Annotated[TransferHeight | None, _described("given overall height of a liquid-phase transfer unit")] = None
    hetp: Annotated[TransferHeight | None, _described("given height equivalent to a theoretical stage")] = None
    price: Annotated[quantity(env.PACKING_PRICE) | None, _described(
        "per packed volume at the estimate's cost index; unset: the row's")] = None  # [USD/m3]

    @field_validator("packing")
    @classmethod
    def _known_packing(cls, value: str):
        known = packing_data.packing_names()
        if value not in known:
            raise ValueError(f"unknown packing {value!r}; models/data/packings.toml has {', '.join(known)}")
        return value

    @model_validator(mode="after")
    def _one_height(self):
        given = [n for n in ("h_og", "h_ol", "hetp") if getattr(self, n) is not None]
        if len(given) > 1:
            raise ValueError(f"give at most one of h_og, h_ol and hetp (got {', '.join(given)})")
        return self

    @property
    def label(self) -> str:
        """The name shown: the entry's own, or the packing's kind, material and size."""
        if self.name is not None:
            return self.name
        row = packing_data.packing_data(self.packing)
        return f"{row['material']} {row['kind']}s {1000 * row['nominal_size']:g} mm"

    @property
    def given_height(self) -> bool:
        return any(getattr(self, n) is not None for n in ("h_og", "h_ol", "hetp"))


class Economics(_Table):
    interest: number(env.INTEREST) = defaults.INTEREST  # per year
    life: quantity(env.LIFE) = defaults.LIFE  # [yr]
    hours: quantity(env.HOURS) = defaults.HOURS  # [h/yr] of operation
    electricity: quantity(env.ELECTRICITY) = defaults.ELECTRICITY  # [USD/J]
    steam: quantity(env.STEAM) = 0.0  # [USD/kg]
    cooling_water: quantity(env.COOLING_WATER) = 0.0  # [USD/m3]
    cost_year: Annotated[number(env.COST_YEAR) | None, _described("cost-index year from the bundled table; "
                                                                  "default: the latest")] = None
    cost_index: Annotated[number(env.COST_INDEX) | None, _described("an index value of your own, overrides "
                                                                     "cost_year")] = None
    contingency: number(env.FRACTION) = defaults.CONTINGENCY
    fee: number(env.FRACTION) = defaults.FEE
    auxiliary: number(env.AUXILIARY) = defaults.AUXILIARY
    pump_efficiency: number(env.MACHINE_EFFICIENCY) = defaults.PUMP_EFFICIENCY
    blower_efficiency: number(env.MACHINE_EFFICIENCY) = defaults.BLOWER_EFFICIENCY
    motor_efficiency: number(env.MACHINE_EFFICIENCY) = defaults.MOTOR_EFFICIENCY
    credit: dict[Annotated[str, Field(max_length=MAX_NAME)], quantity(env.SOLUTE_CREDIT)] = Field(
        {}, max_length=MAX_SOLUTES, description="per solute: value of recovered solute (regenerated agents only)")
    solute_molar_mass: dict[Annotated[str, Field(max_length=MAX_NAME)], MolarMass] = Field(
        {}, max_length=MAX_SOLUTES, description="per solute, needed for credit")
    capital_budget: quantity(env.BUDGET) | None = None  # [USD] installed cost cap
    max_power: quantity(env.POWER) | None = None  # [W] electric power cap
    max_steam: quantity(env.STEAM_LIMIT) | None = None  # [kg/s] steam cap
    margin: number(env.MARGIN) = defaults.MARGIN  # near-optimal band, fraction above best


class UnitBasis(_Table):
    """The ``[units]`` table: what gauge pressures and gas volumes at normal or standard conditions refer to."""

    atmosphere: Annotated[quantity(env.ATMOSPHERE, absolute=True), _described(
        "local atmospheric pressure that gauge pressures (barg, psig) are read against")] \
        = DEFAULT_BASIS.atmosphere  # [Pa]
    normal_temperature: quantity(env.BASIS_TEMPERATURE) = DEFAULT_BASIS.normal_temperature  # [K] of Nm3
    normal_pressure: quantity(env.ATMOSPHERE, absolute=True) = DEFAULT_BASIS.normal_pressure  # [Pa] of Nm3
    standard_temperature: quantity(env.BASIS_TEMPERATURE) = DEFAULT_BASIS.standard_temperature  # [K] of scf
    standard_pressure: quantity(env.ATMOSPHERE, absolute=True) = DEFAULT_BASIS.standard_pressure  # [Pa] of scf

    def basis(self) -> Basis:
        return Basis(atmosphere=self.atmosphere, normal_temperature=self.normal_temperature,
                     normal_pressure=self.normal_pressure, standard_temperature=self.standard_temperature,
                     standard_pressure=self.standard_pressure)


class Solute(_Table):
    """A ``[solute.<name>]`` entry: what the solute itself is."""

    molar_mass: MolarMass  # [kg/mol]


SoluteName = Annotated[str, Field(min_length=1, max_length=MAX_NAME)]


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

    distribution: Literal["lognormal", "normal", "triangular", "fixed"] = Field(
        description="how the factor on the nominal value is drawn (may be left out where the parameters say it)")
    log_sd: NonNegative | None = Field(None, description="lognormal: standard deviation of ln(factor)")
    sd: NonNegative | None = Field(None, description="normal: standard deviation of the factor (mean 1)")
    low: NonNegative | None = Field(None, description="triangular: least factor")
    mode: NonNegative | None = Field(None, description="triangular: most likely factor")
    high: NonNegative | None = Field(None, description="triangular: largest factor")
    shared: Literal["candidate", "solute", "all", "none"] = Field(
        "candidate", description="K and efficiency: what one factor is common to")
    correlation: Annotated[float, Field(ge=0, le=1)] = Field(
        1.0, description="K and efficiency: how strongly the shared factor binds (1: the same factor)")
    by_solute: dict[str, NonNegative] = Field({}, description="lognormal: log_sd per solute")

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

    samples: Annotated[int, Field(ge=1, le=10_000_000)] = Field(defaults.SAMPLES, description="Monte Carlo samples")
    seed: Annotated[int, Field(ge=0)] = Field(0, description="seed of the random draws (the same seed, the same "
                                              "results)")
    confidence: Annotated[float, Field(gt=0, lt=1)] = Field(
        defaults.CONFIDENCE, description="share of the samples a margin design meets every spec in")
    reoptimize: Annotated[int, Field(ge=0, le=100_000)] = Field(
        defaults.REOPTIMIZE_SAMPLES, description="samples re-optimized one by one")
    efficiency_follows_k: StrictBool = Field(True, description="O'Connell efficiencies re-evaluated at each "
                                             "sampled K")
    change: Annotated[float, Field(gt=0, lt=1)] = Field(
        defaults.SENSITIVITY_CHANGE, description="sensitivity study: the +- fraction each input is changed by")
    changes: dict[str, Annotated[float, Field(gt=0, lt=1)] | ChangePair] = Field(
        {}, description="sensitivity study, per input: +- c, or [down, up]")
    k: Spread = Field(_lognormal(defaults.K_LOG_SD), description="spread of the K-values")
    efficiency: Spread = Field(_lognormal(defaults.EFFICIENCY_LOG_SD), description="spread of the tray efficiencies")
    agent_price: Spread = Field(_price_spread(), description="spread of the agents' prices")
    disposal: Spread = Field(_price_spread(), description="spread of the disposal prices")
    electricity: Spread = Field(_price_spread(), description="spread of the electricity price")
    steam: Spread = Field(_price_spread(), description="spread of the steam price")
    cooling_water: Spread = Field(_price_spread(), description="spread of the cooling-water price")
    credit: Spread = Field(_price_spread(), description="spread of the credits for recovered solute")
    cost_index: Spread = Field(Spread(distribution="normal", sd=defaults.INDEX_SD),
                               description="spread of the cost index")
    interest: Spread = Field(Spread(distribution="fixed"), description="spread of the interest rate")

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
    spec: list[Spec] = Field(min_length=1, max_length=MAX_SOLUTES)
    solvent: list[Agent] = Field([], max_length=MAX_CANDIDATES)
    stripping_gas: list[Agent] = Field([], max_length=MAX_CANDIDATES)
    column: Column = Column()
    packing: list[PackedBed] = Field([], max_length=MAX_CANDIDATES, description="packed beds offered beside the trays")
    economics: Economics = Economics()
    uncertainty: Uncertainty = Uncertainty()
    units: UnitBasis = Field(UnitBasis(), description="reference conditions of gauge pressures and of gas volumes")
    solute: dict[SoluteName, Solute] = Field({}, max_length=MAX_SOLUTES, description="per solute: molar_mass, "
                                             "as [solute.<name>] molar_mass = \"92.14 g/mol\"")

    _warnings: tuple[str, ...] = PrivateAttr(default=())
    _used: dict = PrivateAttr(default_factory=dict)

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

    @property
    def warnings(self) -> tuple[str, ...]:
        """Values outside their usual range, one line each (they reach every output)."""
        return self._warnings

    @model_validator(mode="before")
    @classmethod
    def _concentrations(cls, data: Any, info):
        """Concentration text to mole fractions, per phase; the units used are kept for the output."""
        try:
            data, used = conc.convert_raw(data, env._basis(info))
        except UnitError as exc:
            raise ValueError(str(exc)) from None
        context = getattr(info, "context", None)
        if isinstance(context, dict):
            context["used"] = used
        return data

    @model_validator(mode="after")
    def _consistent(self, info):
        mode, word = self.case.mode, self.agent_word
        other = "stripping_gas" if mode == "absorb" else "solvent"
        if getattr(self, other):
            raise ValueError(f"[[{other}]] does not apply with mode = {mode!r}; use [[{word}]]")
        if not self.agents:
            raise ValueError(f"mode = {mode!r} needs at least one [[{word}]]")
        names = [a.name for a in self.agents]
        if len(set(names)) != len(names):
            twice = sorted({n for n in names if names.count(n) > 1})
            raise ValueError(f"[[{word}]] names must be distinct; {', '.join(map(repr, twice))} appears twice")
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
        for solute in self.solute:
            if solute not in solutes:
                raise ValueError(f"[solute] {solute!r} is not in [feed.composition] ({', '.join(solutes)})")
        context = getattr(info, "context", None)
        if isinstance(context, dict):
            self._used = dict(context.get("used", {}))
        return self

    @model_validator(mode="after")
    def _packings(self):
        """Packed beds need distinct names and, unless every bed has a given height, the transport properties."""
        if not self.column.offer_trays and not self.packing:
            raise ValueError("[column] offer_trays = false needs at least one [[packing]]")
        labels = [p.label for p in self.packing]
        if len(set(labels)) != len(labels):
            raise ValueError(f"[[packing]] names must be distinct, got {labels}; give each a name")
        if not self.packing:
            return self
        word = self.agent_word
        gas_word = "[feed] viscosity (the gas's)" if self.case.mode == "absorb" else None
        for agent in self.agents:
            if self.case.mode == "strip" and agent.viscosity is None:
                raise ValueError(f"[[stripping_gas]] {agent.name!r}: viscosity (the gas's) is needed by [[packing]] "
                                 "for the bed's pressure drop")
        if gas_word and self.feed.viscosity is None:
            raise ValueError(f"{gas_word} is needed by [[packing]] for the bed's pressure drop, e.g. '0.018 cP'")
        if all(p.given_height for p in self.packing):
            return self
        for solute in self.solutes:
            if solute not in self.feed.diffusivity:
                raise ValueError(f"[feed.diffusivity] {solute!r} is needed by [[packing]] without h_og, h_ol or hetp "
                                 "(the Onda film heights), e.g. '1.0e-9 m2/s' in a liquid, '8e-6 m2/s' in a gas")
            for agent in self.agents:
                if solute not in agent.diffusivity:
                    raise ValueError(f"[[{word}]] {agent.name!r}: diffusivity of {solute!r} is needed by [[packing]] "
                                     f"without h_og, h_ol or hetp ([{word}.diffusivity])")
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

    # ----------------------------------------------------------------- concentrations

    def solute_molar_mass(self, solute: str) -> float | None:
        """The solute's molar mass [kg/mol] where the scenario gives one ([solutes], economics or spec)."""
        if solute in self.solute:
            return self.solute[solute].molar_mass
        if solute in self.economics.solute_molar_mass:
            return self.economics.solute_molar_mass[solute]
        return next((s.solute_molar_mass for s in self.spec if s.solute == solute and s.solute_molar_mass), None)

    def concentrations(self) -> conc.Display:
        """The unit each phase's concentrations are shown in (gas ppmv; liquid as written, else ppmw)."""
        return conc.display_for(self, self._used)
