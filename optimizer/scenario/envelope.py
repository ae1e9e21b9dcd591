"""Plausibility envelopes: the range each scenario value is accepted in, and the range it usually lies in.

Every field of a scenario has an ``Envelope``: outside its *allowed* range a
value is refused (a physical limit: absolute temperature and pressure above
zero, a fraction in [0, 1], a price not negative; or a bound far beyond any
column, kept so that every accepted scenario computes in finite numbers);
outside its *usual* range (common practice for industrial absorbers and
strippers) it is accepted with a warning that reaches every output.

``quantity(envelope)`` and ``number(envelope)`` make the pydantic field types:
a dimensional field takes text with a unit ("30 degC") and refuses a bare
number; a dimensionless field (fractions, factors, counts) takes a bare
number. The JSON Schema of each field states its unit, allowed and usual
ranges (``towercost.scenario.editor``).
"""

from __future__ import annotations

import functools

import math
import re
import typing
from dataclasses import dataclass
from functools import cached_property
from typing import Annotated, Any

from pydantic import AfterValidator, BaseModel, BeforeValidator, WithJsonSchema

from towercost.scenario.units import DEFAULT_BASIS, GAUGE_UNITS, NUMBER, UnitError, to_si

#: A value with a unit: a number, blanks, then the unit (the schema's pattern for unit text).
QUANTITY_PATTERN = r"^\s*[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?\s*[^\s\d.+-].*$"

#: A pure number as text: bare, a percentage, or a ratio of like units ("0.06 lb/lb").
RATIO_PATTERN = r"^\s*[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?\s*(%|[A-Za-z]+\s*/\s*[A-Za-z]+)?\s*$"

#: Display units pint spells otherwise.
PINT_NAME = {"bara": "bar"}


@dataclass(frozen=True)
class Envelope:
    """Where one kind of value is allowed and where it usually lies; bounds written in ``show`` units."""

    kind: str                          # in words: "column temperature"
    si: str                            # the SI unit the value is held in ("" for a pure number)
    show: str                          # the unit bounds and examples are written in
    low: float | None = None           # allowed range
    high: float | None = None
    low_open: bool = False             # True: the bound itself is refused
    high_open: bool = False
    usual: tuple[float, float] | None = None   # usual range, inclusive
    zero_unused: bool = False          # 0 means "not used": no usual-range warning for it
    integer: bool = False
    example: float | None = None       # a typical value, in ``show`` units, for hints and the schema
    least_nonzero: float | None = None  # a value other than 0 must be at least this (no vanishing magnitudes)

    # ----------------------------------------------------------- bounds in SI

    def _to_si(self, x: float) -> float:
        if not self.si:
            return x
        return to_si(f"{x!r} {self.show}", self.si)

    @cached_property
    def bounds(self) -> tuple[float, float]:
        low = -math.inf if self.low is None else self._to_si(self.low)
        high = math.inf if self.high is None else self._to_si(self.high)
        return low, high

    @cached_property
    def usual_si(self) -> tuple[float, float] | None:
        return None if self.usual is None else (self._to_si(self.usual[0]), self._to_si(self.usual[1]))

    # ----------------------------------------------------------- words

    def _bound(self, x: float) -> str:
        return f"{x:g} {self.show}".strip()

    def allowed(self) -> str:
        """The allowed range in words: "above 0 K, at most 1000 degC"."""
        parts = []
        if self.low is not None:
            parts.append(("above " if self.low_open else "at least ") + self._bound(self.low))
        if self.high is not None:
            parts.append(("below " if self.high_open else "at most ") + self._bound(self.high))
        return ", ".join(parts) or "any finite value"

    def usual_words(self) -> str:
        if self.usual is None:
            return ""
        return f"{self.usual[0]:g} to {self.usual[1]:g} {self.show}".strip()

    # ----------------------------------------------------------- checks

    def check(self, value: float) -> float:
        """``value`` [SI] if allowed, else ValueError saying what is allowed."""
        low, high = self.bounds
        below = value <= low if self.low_open else value < low
        above = value >= high if self.high_open else value > high
        if not math.isfinite(value) or below or above:
            raise ValueError(f"must be {self.allowed()}")
        if self.least_nonzero is not None and 0 < abs(value) < self.least_nonzero:
            raise ValueError(f"must be 0 or at least {self.least_nonzero:g}")
        return value

    def unusual(self, value: float) -> bool:
        """True when ``value`` [SI] lies outside the usual range (and is not an unused zero)."""
        if self.usual_si is None or (self.zero_unused and value == 0):
            return False
        low, high = self.usual_si
        return not (low - 1e-12 * abs(low) <= value <= high + 1e-12 * abs(high))

    def typical(self) -> float:
        """A value to show as an example, in ``show`` units."""
        if self.example is not None:
            return self.example
        if self.usual is not None:
            return self.usual[0] if self.usual[0] > 0 else self.usual[1]
        return self.high if self.low is None or (self.low <= 0 and self.high is not None and self.high < 10) \
            else (self.low if self.low > 0 else 1)

    def display(self, value: float) -> str:
        """An SI value as text in ``show`` units: 0.6096 m -> "24 in"."""
        if not self.si:
            return f"{value:.6g}"
        from towercost.scenario.units import _pint_text, registry

        shown = registry().Quantity(value, self.si).to(_pint_text(PINT_NAME.get(self.show, self.show))).magnitude
        return f"{float(shown):.6g} {self.show}"

    def schema(self) -> dict:
        """The JSON Schema of a field of this envelope."""
        words = f"{self.kind}; allowed: {self.allowed()}"
        if self.usual is not None:
            words += f"; usual: {self.usual_words()} (a warning outside)"
        extra: dict[str, Any] = {"x-allowed": self.allowed()}
        if self.usual is not None:
            extra["x-usual"] = self.usual_words()
        if self.si:
            example = f"{self.typical():g} {self.show}"
            words += f"; give a unit, e.g. \"{example}\""
            dimension = _dimension_words(self.si)
            return {"type": "string", "pattern": QUANTITY_PATTERN, "description": words, "x-description": words,
                    "examples": [example], "x-dimension": dimension, "x-unit": self.show, "x-si-unit": self.si,
                    **extra}
        number: dict[str, Any] = {"type": "integer" if self.integer else "number"}
        if self.low is not None:
            number["exclusiveMinimum" if self.low_open else "minimum"] = self.low
        if self.high is not None:
            number["exclusiveMaximum" if self.high_open else "maximum"] = self.high
        if self.integer:
            words += "; a whole number"
            return {**number, "description": words, "x-description": words, "x-dimension": "a count", **extra}
        words += "; a bare number (or a ratio of like units, \"0.06 lb/lb\", or a percentage, \"80 %\")"
        return {"anyOf": [number, {"type": "string", "pattern": RATIO_PATTERN}], "description": words,
                "x-description": words, "x-dimension": "a pure number", **extra}


@functools.lru_cache(maxsize=None)
def _dimension_words(si: str) -> str:
    """The dimension of an SI unit's text in words ("a mass flow"); parsed once per unit (schema fields share them)."""
    from towercost.scenario.units import registry, words as in_words

    return in_words(registry().Quantity(1, si).dimensionality)


def _basis(info):
    context = getattr(info, "context", None)
    return context.get("basis", DEFAULT_BASIS) if isinstance(context, dict) else DEFAULT_BASIS


def _reword(exc: UnitError) -> ValueError:
    return ValueError(str(exc).removeprefix("value: "))


#: Pressure units that plant practice writes for gauge and absolute pressures alike.
AMBIGUOUS_PRESSURE = ("bar", "psi")


def quantity(envelope: Envelope, *, only: tuple[str, ...] | None = None, absolute: bool = False,
             gauge_or_absolute: bool = False):
    """The field type of a dimensional value: text with a unit, converted to ``envelope.si``, then range-checked.

    ``only`` lists the unit texts allowed (a slope in K must not take an
    offset unit such as degC); ``absolute`` refuses gauge pressures;
    ``gauge_or_absolute`` (a column's pressure) refuses "bar" and "psi"
    alone, which plant practice writes for either: bara or barg, psia or psig.
    """

    def parse(value, info):
        if value is None:
            return None
        try:
            if isinstance(value, str) and (only or absolute or gauge_or_absolute):
                unit = NUMBER.match(value)
                unit = unit.group(2) if unit else ""
                if only and unit and unit not in only:
                    raise UnitError(f"value: {value!r} must be in {' or '.join(only)}")
                if absolute and unit in GAUGE_UNITS:
                    raise UnitError(f"value: {value!r} must be an absolute pressure (not gauge)")
                if gauge_or_absolute and unit in AMBIGUOUS_PRESSURE:
                    number_text = NUMBER.match(value).group(1)
                    raise UnitError(f"value: {value!r} could be gauge or absolute; write \"{number_text} {unit}a\" "
                                    f"(absolute) or \"{number_text} {unit}g\" (gauge)")
            bare_si = isinstance(getattr(info, "context", None), dict) and info.context.get("bare_si", False)
            return to_si(value, envelope.si, basis=_basis(info), require_unit=not bare_si, example=envelope.show)
        except UnitError as exc:
            raise _reword(exc) from None

    return Annotated[float, BeforeValidator(parse), AfterValidator(envelope.check),
                     WithJsonSchema(envelope.schema()), envelope]


def number(envelope: Envelope, *, schema: dict | None = None):
    """The field type of a dimensionless value: a bare number (or a ratio of like units), range-checked.

    ``schema`` replaces the field's JSON Schema (a concentration, which the
    scenario converts from its phase's units before this field sees it).
    """

    def parse(value):
        if isinstance(value, bool):
            raise ValueError(f"must be a number, got {value!r}")
        if envelope.integer:
            if isinstance(value, float) and value.is_integer() and math.isfinite(value):
                value = int(value)
            if not isinstance(value, int):
                raise ValueError(f"must be a whole number, got {value!r}")
            return value
        if isinstance(value, str):
            if not re.match(RATIO_PATTERN, value):
                raise ValueError(f"must be a number (or a ratio of like units, '0.06 lb/lb', or a percentage, "
                                 f"'80 %'), got {value!r}")
            try:
                return to_si(value, "dimensionless")
            except UnitError as exc:
                raise _reword(exc) from None
        if isinstance(value, (int, float)):
            value = float(value)
            if not math.isfinite(value):
                raise ValueError(f"must be a finite number, got {value!r}")
        return value

    base = int if envelope.integer else float
    return Annotated[base, BeforeValidator(parse), AfterValidator(envelope.check),
                     WithJsonSchema(schema or envelope.schema()), envelope]


# --------------------------------------------------------------------------- the envelopes
# Allowed ranges: physical limits, or bounds far beyond any column (so that every accepted
# scenario computes in finite numbers). Usual ranges: common practice.

E = Envelope
COLUMN_TEMPERATURE = E("column temperature", "K", "degC", -273.15, 1000.0, low_open=True, usual=(-50.0, 300.0),
                       example=30.0)
REFERENCE_TEMPERATURE = E("reference temperature of a Henry's-law constant", "K", "degC", -273.15, 1000.0,
                          low_open=True, usual=(0.0, 100.0), example=25.0)
BASIS_TEMPERATURE = E("reference temperature", "K", "degC", -273.15, 100.0, low_open=True, usual=(0.0, 25.0),
                      example=0.0)
COLUMN_PRESSURE = E("absolute pressure", "Pa", "bara", 0.01, 1000.0, usual=(0.1, 150.0), example=1.2)
VAPOUR_PRESSURE = E("vapour pressure", "Pa", "kPa", 0.0, 1e5, low_open=True, example=5.0)
ATMOSPHERE = E("atmospheric pressure", "Pa", "kPa", 50.0, 110.0, usual=(70.0, 105.0), example=101.325)
# the least flow accepted: 1 mol/h, far below any column, above the underflow of the packed-bed relations
MOLAR_FLOW = E("feed flow (molar, mass or volume)", "mol/s", "kmol/h", 0.001, 1e7,
               usual=(1.0, 1e5), example=900.0)
MOLAR_MASS = E("molar mass", "kg/mol", "g/mol", 1.0, 1e5, usual=(2.0, 1000.0), example=29.0)
DENSITY = E("liquid density", "kg/m^3", "kg/m3", 50.0, 25000.0, usual=(500.0, 2000.0), example=1000.0)
VISCOSITY = E("viscosity", "Pa*s", "cP", 0.001, 1e5, usual=(0.005, 100.0), example=1.0)   # gases about 0.01-0.03 cP
SURFACE_TENSION = E("surface tension", "N/m", "mN/m", 0.1, 2000.0, usual=(5.0, 100.0), example=30.0)
AGENT_PRICE = E("price per mass", "USD/kg", "USD/kg", 0.0, 1e4, usual=(0.0, 50.0), example=1.1)
SOLUTE_CREDIT = E("value of recovered solute", "USD/kg", "USD/kg", 0.0, 1e4, usual=(0.0, 50.0), example=0.5)
ELECTRICITY = E("electricity price", "USD/J", "USD/kWh", 0.0, 100.0, usual=(0.01, 1.0), example=0.08)
STEAM = E("steam price", "USD/kg", "USD/t", 0.0, 1e5, usual=(1.0, 200.0), zero_unused=True, example=30.0)
COOLING_WATER = E("cooling water price", "USD/m^3", "USD/m3", 0.0, 100.0, usual=(0.005, 2.0), zero_unused=True,
                  example=0.05)
TRAY_SPACING = E("tray spacing", "m", "in", 2.0, 200.0, usual=(6.0, 48.0), example=24.0)
HEIGHT_LIMIT = E("height limit", "m", "m", 0.0, 1000.0, low_open=True, example=40.0)
DIAMETER_LIMIT = E("diameter limit", "m", "m", 0.0, 100.0, low_open=True, example=4.0)
SHELL_DIAMETER = E("inside diameter of an existing shell", "m", "m", 0.1, 50.0, usual=(0.3, 12.0), example=1.5)
LIFE = E("plant life", "year", "yr", 1.0, 100.0, usual=(3.0, 40.0), example=15.0)
HOURS = E("hours on stream per year", "hour/year", "h/yr", 0.0, 8784.0, low_open=True, usual=(1000.0, 8784.0),
          example=8000.0)
BUDGET = E("installed-cost budget", "USD", "USD", 0.0, 1e13, low_open=True, example=2000000.0)
POWER = E("electric power limit", "W", "kW", 0.0, 1e7, low_open=True, example=250.0)
STEAM_LIMIT = E("steam limit", "kg/s", "kg/h", 0.0, 1e8, low_open=True, example=2000.0)
COOLING_LIMIT = E("cooling water limit", "m^3/s", "m3/h", 0.0, 1e7, low_open=True, example=100.0)
SOLUTE_MASS_RATE = E("solute leaving in the treated stream", "kg/s", "kg/h", 0.0, 1e6, low_open=True, example=0.5)
COOLING_RATIO = E("regeneration cooling water per kg of agent circulated", "m^3/kg", "m3/kg", 0.0, 10.0,
                  usual=(0.0, 0.2), example=0.004)
HENRY_SLOPE = E("temperature dependence d ln H / d(1/T)", "K", "K", -20000.0, 20000.0, usual=(-1000.0, 12000.0),
                example=4000.0)

STEAM_RATIO = E("regeneration steam per kg of agent circulated [kg/kg]", "", "", 0.0, 100.0, usual=(0.0, 1.0))
K_VALUE = E("K = y/x at column conditions", "", "", 1e-12, 1e12, usual=(1e-5, 1e5))
HENRY = E("Henry's-law constant in the units of its scale", "", "", 1e-30, 1e30, low_open=True)
ACTIVITY = E("infinite-dilution activity coefficient", "", "", 1e-6, 1e8, usual=(0.1, 1e5))
MOLE_FRACTION = E("mole fraction (0, or at least 1e-15)", "", "", 0.0, 1.0, high_open=True, least_nonzero=1e-15)
FEED_FRACTION = E("solute mole fraction in the feed (a solute the feed does not carry is left out)", "", "", 1e-15,
                  1.0, high_open=True)
REMOVAL = E("fraction of the entering solute removed", "", "", 0.0, 1.0, low_open=True, high_open=True)
EFFICIENCY = E("overall tray efficiency", "", "", 0.01, 1.0, usual=(0.1, 1.0))
MURPHREE = E("Murphree vapour efficiency", "", "", 0.01, 1.0, usual=(0.2, 1.0))
FLOOD = E("design fraction of flood", "", "", 0.05, 1.0, usual=(0.5, 0.9))
LOSS = E("fraction of the circulating agent lost per pass", "", "", 0.0, 1.0, usual=(0.0, 0.05))
INTEREST = E("interest rate per year", "", "", 0.0, 1.0, usual=(0.01, 0.3))
FRACTION = E("fraction", "", "", 0.0, 1.0)
AUXILIARY = E("auxiliary facilities, fraction of the base bare-module cost", "", "", 0.0, 2.0, usual=(0.0, 1.0))
MACHINE_EFFICIENCY = E("efficiency", "", "", 0.0, 1.0, low_open=True, usual=(0.3, 0.98))
COST_INDEX = E("cost index of the estimate", "", "", 0.0, 1e5, low_open=True, usual=(100.0, 3000.0))
MARGIN = E("near-optimal band, fraction above the best", "", "", 0.0, 1.0, low_open=True, high_open=True)
DILUTE = E("threshold fraction", "", "", 0.0, 1.0, low_open=True, high_open=True)
RATIO = E("multiple of the minimum rate", "", "", 1.0, 1000.0, low_open=True)
TRAYS = E("real trays", "", "", 1, 1000, integer=True)
RATIO_LEVELS = E("rate levels", "", "", 2, 2000, integer=True)
LARGER = E("larger standard diameters tried", "", "", 0, 60, integer=True)
TURNDOWN = E("lowest loads over design loads (turndown)", "", "", 0.05, 1.0, usual=(0.3, 0.9))
MODIFICATION = E("modification allowance, fraction of a new shell's bare-module cost", "", "", 0.0, 2.0,
                 usual=(0.0, 0.5))
SHELL_TRAYS = E("trays the existing shell holds", "", "", 1, 1000, integer=True)
DIFFUSIVITY = E("diffusivity of a solute", "m^2/s", "m2/s", 0.0, 1e-2, low_open=True, usual=(1e-11, 1e-4),
                example=1e-9)   # liquids about 1e-10 to 5e-9, gases 5e-6 to 5e-5 m2/s
PRESSURE_GRADIENT = E("pressure drop per metre of packing", "Pa/m", "Pa/m", 0.0, 1e5, low_open=True,
                      usual=(40.0, 1200.0), example=400.0)
PRESSURE_DROP_LIMIT = E("gas pressure-drop limit", "Pa", "kPa", 0.0, 1e5, low_open=True, example=10.0)
TRANSFER_HEIGHT = E("height of a transfer unit or HETP", "m", "m", 0.0, 100.0, low_open=True, usual=(0.1, 5.0),
                    example=0.6)
BED_HEIGHT = E("height of one packed bed", "m", "m", 0.0, 100.0, low_open=True, usual=(1.0, 12.0), example=6.0)
PACKING_PRICE = E("packing price per packed volume", "USD/m^3", "USD/m3", 0.0, 1e6, usual=(50.0, 30000.0),
                  example=1500.0)
STAGES = E("theoretical stages", "", "", 1, 1000, integer=True)
COST_YEAR = E("cost-index year", "", "", 1950, 2100, integer=True)


# --------------------------------------------------------------------------- warnings


def _envelope_of(metadata) -> Envelope | None:
    return next((m for m in metadata if isinstance(m, Envelope)), None)


def _members(annotation) -> list:
    """The annotations a value of ``annotation`` may match: unions flattened, None dropped."""
    origin = typing.get_origin(annotation)
    if origin is typing.Union or str(origin) == "<class 'types.UnionType'>":
        out = []
        for arg in typing.get_args(annotation):
            if arg is not type(None):
                out += _members(arg)
        return out
    return [annotation]


def _scalar_envelope(annotation) -> Envelope | None:
    for member in _members(annotation):
        if typing.get_origin(member) is Annotated:
            found = _envelope_of(typing.get_args(member)[1:])
            if found is not None:
                return found
    return None


def _container_args(annotation, kind) -> tuple | None:
    for member in _members(annotation):
        base = typing.get_args(member)[0] if typing.get_origin(member) is Annotated else member
        if typing.get_origin(base) is kind:
            return typing.get_args(base)
    return None


def unusual_values(model: BaseModel, path: tuple = ()) -> list[tuple[tuple, Envelope, float]]:
    """Every value the user set that lies outside its usual range: (key path, envelope, SI value)."""
    found: list[tuple[tuple, Envelope, float]] = []
    for name, field in type(model).model_fields.items():
        if name not in model.model_fields_set:
            continue
        value = getattr(model, name)
        envelope = _envelope_of(field.metadata) or _scalar_envelope(field.annotation)
        found += _walk(value, field.annotation, envelope, path + (name,))
    return found


def _walk(value, annotation, envelope, path) -> list:
    if isinstance(value, BaseModel):
        return unusual_values(value, path)
    if isinstance(value, dict):
        args = _container_args(annotation, dict)
        inner = args[1] if args else Any
        return [hit for key, item in value.items() for hit in _walk(item, inner, _scalar_envelope(inner),
                                                                      path + (key,))]
    if isinstance(value, (list, tuple)):
        args = _container_args(annotation, list) or _container_args(annotation, tuple) or ()
        out = []
        for i, item in enumerate(value):
            inner = args[0] if len(args) == 1 else (args[i] if i < len(args) else Any)
            out += _walk(item, inner, _scalar_envelope(inner), path + (i,))
        return out
    if envelope is not None and isinstance(value, (int, float)) and not isinstance(value, bool):
        if envelope.unusual(float(value)):
            return [(path, envelope, float(value))]
    return []

# The regenerated loop ([solvent.regenerator], [stripping_gas.regenerator]).
APPROACH = E("approach temperature difference of the lean/rich cross exchanger", "K", "K", 0.0, 200.0,
             low_open=True, usual=(3.0, 30.0), example=10.0)
HEAT_CAPACITY = E("liquid heat capacity", "J/(kg*K)", "kJ/(kg*K)", 0.1, 50.0, usual=(0.8, 5.0), example=2.0)
HEAT_COEFFICIENT = E("overall heat-transfer coefficient", "W/(m^2*K)", "W/(m^2*K)", 1.0, 20000.0,
                     usual=(50.0, 3000.0), example=300.0)
LATENT_HEAT = E("latent heat of vaporization", "J/kg", "kJ/kg", 1.0, 1e5, usual=(100.0, 2500.0), example=300.0)
LEAN_LEVEL = E("lean level K x_lean / y_out", "", "", 0.0, 1.0, low_open=True, high_open=True)
LEAN_LEVELS = E("lean levels", "", "", 1, 200, integer=True)
SOLVENT_VAPOUR_PRESSURE = E("vapour pressure of the solvent itself (0: none lost as vapour)", "Pa", "kPa", 0.0, 1e5,
                            example=0.01)
