"""Units at the edge: text such as "1200 kmol/h" or "35 degC" to SI floats.

Parsed once, here, with pint. Everything past this module works in SI
(mol/s, kg/s, Pa absolute, K, m, kg, s, W, USD).

Text the trade writes that pint alone would misread is handled before pint
sees it: absolute and gauge pressures (bara, psia, barg, psig, kPag, MPag;
gauge read against the scenario's stated atmosphere), gas volumes at normal
or standard conditions (Nm3/h, scfm, scfh, scfd, MMscfd; the conditions are
stated in the scenario), ``gpm`` (US gallons per minute). Text that would be
read as something else is refused with a hint: "30 C" (the coulomb), "ppm"
(by volume or by mass?), "ton" (short, long or metric?), "$" (which dollar?).
Any value that is not a finite number, before or after conversion, is refused.
"""

from __future__ import annotations

import math
import re
import sys
from dataclasses import dataclass
from functools import lru_cache


#: Optional packages pint imports (or imports from) at its own import only to offer their types; none is
#: used by towercost's units. dask (installed for distributed batches) alone costs about 0.17 s a command.
_PINT_OPTIONAL = ("scipy", "dask", "xarray", "babel", "uncertainties")


def _import_pint():
    """Import pint without letting it pull in scipy, dask and the other optional packages it tests for.

    pint imports scipy, when installed, only to test for it; once scipy is
    loaded, Pyomo resolves its own deferred scipy import eagerly and loads
    scipy.stats, which cost about 1 s per command on this machine. pint
    likewise imports ``dask.base`` whenever dask is installed (for its dask
    arrays), about 0.17 s. Nothing towercost asks of pint uses either; a
    package already imported is left as it is, and a hidden one can be
    imported normally afterwards.
    """
    hidden = [name for name in _PINT_OPTIONAL if name not in sys.modules]
    for name in hidden:
        sys.modules[name] = None  # makes `import name` raise ImportError and find_spec(name) give None inside pint
    try:
        import pint
    finally:
        for name in hidden:
            if sys.modules.get(name, 0) is None:
                del sys.modules[name]
    return pint


pint = _import_pint()

from towercost.models.constants import FOOT, GAS_CONSTANT, STANDARD_ATMOSPHERE  # noqa: E402 - after pint on purpose

#: A number at the start of a value's text, then the unit.
NUMBER = _NUMBER = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*$", re.DOTALL)

#: Characters a unit's text may hold; anything else is refused before pint parses it.
_UNIT_CHARS = re.compile(r"^[A-Za-z0-9 /*^.()%µ°·_\-]*$")

#: Longest value text read (a unit never needs more).
MAX_TEXT = 80

#: Absolute pressure units written with an "a", and the unit they stand for.
_ABSOLUTE = {"bara": "bar", "psia": "psi", "kPaa": "kPa", "MPaa": "MPa"}

#: Gauge pressure units, and the absolute unit they are read in before the atmosphere is added.
_GAUGE = {"barg": "bar", "psig": "psi", "kPag": "kPa", "MPag": "MPa"}
GAUGE_UNITS = tuple(_GAUGE)

#: Gas volumes at normal conditions: Nm3 per time.
_NORMAL = re.compile(r"^Nm(?:3|\^3|\*\*3)/(s|min|h|hr|d|day)$")

#: Gas volumes at standard conditions: (time unit, standard cubic feet per unit).
_STANDARD = {"scfm": ("min", 1.0), "scfh": ("h", 1.0), "scfd": ("d", 1.0), "Mscfd": ("d", 1e3),
             "MMscfd": ("d", 1e6)}

_SECONDS = {"s": 1.0, "min": 60.0, "h": 3600.0, "hr": 3600.0, "d": 86400.0, "day": 86400.0}

#: Powers written without an operator, as engineers do: m3, ft2, cm3.
_POWER = re.compile(r"\b(m|cm|mm|dm|km|ft|in|yd)([23])\b")

#: Unit text that would be read as something else: token -> what to write instead.
_MISREAD = {
    "C": "write degC for degrees Celsius ('C' is the coulomb)",
    "F": "write degF for degrees Fahrenheit ('F' is the farad)",
    "deg C": "write degC", "deg F": "write degF", "Celsius": "write degC", "Fahrenheit": "write degF",
    "ppm": "write ppmv (by volume, for a gas) or ppmw (by mass, for a liquid)",
    "ppb": "write ppbv (by volume, for a gas) or ppbw (by mass, for a liquid)",
    "ton": "write t (metric tonne), short_ton or long_ton",
    "tons": "write t (metric tonne), short_ton or long_ton",
}
_MISREAD_IN = (("$", "write USD"), ("USD/ton", "write USD/t (metric tonne), USD/short_ton or USD/long_ton"))

#: Dimensions in words, for messages: a unit of each kind, and the word for its dimension.
_WORDS = (
    ("K", "a temperature"), ("m", "a length"), ("kg", "a mass"), ("s", "a time"), ("mol", "an amount of substance"),
    ("Pa", "a pressure"), ("mol/s", "a molar flow"), ("kg/s", "a mass flow"), ("m**3/s", "a volume flow"),
    ("kg/m**3", "a density"), ("kg/mol", "a molar mass"), ("Pa*s", "a viscosity"), ("N/m", "a surface tension"),
    ("dimensionless", "a pure number"), ("USD", "an amount of money"), ("USD/kg", "a price per mass"),
    ("USD/m**3", "a price per volume"), ("USD/J", "a price per energy"), ("W", "a power"), ("J", "an energy"),
    ("m**3/kg", "a volume per mass"), ("m**3", "a volume"), ("m**2", "an area"), ("A*s", "an electric charge"),
)


@dataclass(frozen=True)
class Basis:
    """The reference conditions a scenario states: gauge pressures and gas volumes at normal or standard conditions.

    Defaults (common practice): gauge pressures against the standard
    atmosphere, 101.325 kPa; normal cubic metres (Nm3) at 0 degC and
    101.325 kPa; standard cubic feet (scf) at 60 degF and 101.325 kPa
    (14.696 psia).
    """

    atmosphere: float = STANDARD_ATMOSPHERE      # [Pa] gauge pressures are read against
    normal_temperature: float = 273.15           # [K] of a normal cubic metre
    normal_pressure: float = STANDARD_ATMOSPHERE  # [Pa] of a normal cubic metre
    standard_temperature: float = (60.0 - 32.0) / 1.8 + 273.15  # [K] of a standard cubic foot
    standard_pressure: float = STANDARD_ATMOSPHERE  # [Pa] of a standard cubic foot


DEFAULT_BASIS = Basis()


def _pint_text(text: str) -> str:
    """Unit text as pint reads it: "kg/m3" -> "kg/m**3"."""
    return _POWER.sub(r"\1**\2", text)


@lru_cache(maxsize=1)
def registry() -> pint.UnitRegistry:
    """The one unit registry, with money, pound-mole and gpm.

    pint keeps a cache of its parsed definitions in the user's cache folder;
    where that folder cannot be written (a read-only home, a file in its
    place) the registry is built without the cache, about 0.2 s slower.
    """
    try:
        ureg = pint.UnitRegistry(autoconvert_offset_to_baseunit=True, cache_folder=":auto:")
    except Exception:  # noqa: BLE001 - any failure of the cache: build without it
        ureg = pint.UnitRegistry(autoconvert_offset_to_baseunit=True, cache_folder=None)
    ureg.define("USD = [currency] = usd = dollar")
    ureg.define("kUSD = 1000 USD")
    ureg.define("MUSD = 1e6 USD")
    ureg.define("lbmol = 453.59237 mol = lb_mol = lbmole")  # pound-mole: the avoirdupois pound, exact
    ureg.define("gpm = gallon / minute")                     # US liquid gallon
    ureg.define("ppmv = 1e-6")
    ureg.define("ppbv = 1e-9")
    return ureg


class UnitError(ValueError):
    """A value whose unit is unknown, missing, or of the wrong kind."""


def words(dimension) -> str:
    """A pint dimensionality in words ("a mass flow"), or as pint writes it when there is no word for it.

    >>> words(registry().Quantity(1, "USD/kWh").dimensionality)
    'a price per energy'
    """
    for known, word in _word_dimensions():
        if known == dimension:
            return word
    return str(dimension)


@lru_cache(maxsize=1)
def _word_dimensions() -> tuple:
    """(pint dimensionality, word) of each entry of ``_WORDS``, parsed once (the schema asks at import, per field)."""
    ureg = registry()
    return tuple((ureg.Quantity(1, unit).dimensionality, word) for unit, word in _WORDS)


def _split(value, unit: str, what: str) -> tuple[float, str]:
    """The number and the unit text of a value; UnitError for anything that is not a finite number."""
    if isinstance(value, bool) or not isinstance(value, (int, float, str)):
        raise UnitError(f"{what}: must be a number or text such as '12 {unit}', got {_short(value)}")
    if isinstance(value, (int, float)):
        number, text = float(value), ""
    else:
        if len(value) > MAX_TEXT:
            raise UnitError(f"{what}: text of {len(value):,} characters is not a value (at most {MAX_TEXT})")
        match = _NUMBER.match(value)
        if not match:
            raise UnitError(f"{what}: must start with a number, as in '12 {unit}', got {value!r}")
        number, text = float(match.group(1)), match.group(2)
    if not math.isfinite(number):
        raise UnitError(f"{what}: must be a finite number, got {_short(value)}")
    return number, text


def _short(value) -> str:
    text = repr(value)
    return text if len(text) <= 60 else text[:57] + "..."


def _quantity(number: float, text: str, value, what: str):
    """The pint quantity of a number and unit text; UnitError naming the text for anything pint cannot read."""
    hint = _MISREAD.get(text) or next((h for token, h in _MISREAD_IN if token in text), None)
    if hint:
        raise UnitError(f"{what}: {value!r} could be misread; {hint}")
    if not _UNIT_CHARS.match(text):
        raise UnitError(f"{what}: unknown unit {text!r} in {value!r}")
    try:
        return registry().Quantity(number, _pint_text(text))
    except Exception as exc:  # noqa: BLE001 - pint raises many kinds (syntax, tokenizer, division by zero)
        raise UnitError(f"{what}: unknown unit {text!r} in {value!r}") from exc


def to_si(value, unit: str, *, what: str = "value", basis: Basis | None = None, require_unit: bool = False,
          example: str | None = None) -> float:
    """Convert ``value`` (a number, or text "number unit") to the float magnitude in ``unit``.

    With ``require_unit`` a bare number is refused with an example
    (``example``, default ``unit``); otherwise it is taken to be in ``unit``
    already. Offset temperatures ("35 degC", "95 degF"), absolute and gauge
    pressures ("1.2 bara", "2 barg", "30 psig", against ``basis.atmosphere``)
    and gas flows at normal or standard conditions ("1000 Nm3/h", "500 scfm")
    are accepted.

    >>> round(to_si("1200 kmol/h", "mol/s"), 6)
    333.333333
    >>> round(to_si("35 degC", "K"), 2)
    308.15
    >>> round(to_si("1 barg", "Pa"), 1), round(to_si("1 bara", "Pa"), 1)
    (201325.0, 100000.0)
    >>> round(to_si("780 kg/m3", "kg/m^3"), 6)
    780.0
    >>> round(to_si("22.413969545014 Nm3/h", "kmol/h"), 9)
    1.0
    >>> to_si(4.5, "m")
    4.5
    """
    basis = basis or DEFAULT_BASIS
    number, text = _split(value, unit, what)
    if not text:
        if require_unit:
            raise UnitError(f"{what}: {_short(value)} has no unit; write it with one, "
                            f"e.g. \"{number:g} {example or unit}\"")
        return number
    offset = 0.0
    if text in _ABSOLUTE:
        text = _ABSOLUTE[text]
    elif text in _GAUGE:
        text, offset = _GAUGE[text], basis.atmosphere
    standard = _standard_flow(number, text, basis)
    if standard is not None:
        quantity = registry().Quantity(standard, "mol/s")
    else:
        quantity = _quantity(number, text, value, what)
    try:
        converted = quantity.to(unit).magnitude
    except pint.errors.DimensionalityError as exc:
        target = registry().Quantity(1, unit).dimensionality
        raise UnitError(f"{what}: {value!r} is not convertible to {unit} (it is {words(quantity.dimensionality)}, "
                        f"{unit} is {words(target)})") from exc
    except Exception as exc:  # noqa: BLE001 - overflow and the like inside pint
        raise UnitError(f"{what}: {value!r} cannot be converted to {unit}") from exc
    if offset:
        converted += registry().Quantity(offset, "Pa").to(unit).magnitude
    converted = float(converted)
    if not math.isfinite(converted):
        raise UnitError(f"{what}: {value!r} is beyond the range of a floating-point number in {unit}")
    return converted


def _standard_flow(number: float, text: str, basis: Basis) -> float | None:
    """A gas flow at normal (Nm3) or standard (scf) conditions in mol/s, by the ideal-gas law; None for other text."""
    match = _NORMAL.match(text)
    if match:
        per_second = number / _SECONDS[match.group(1)]
        return per_second * basis.normal_pressure / (GAS_CONSTANT * basis.normal_temperature)
    if text in _STANDARD:
        time_unit, scale = _STANDARD[text]
        per_second = number * scale * FOOT**3 / _SECONDS[time_unit]
        return per_second * basis.standard_pressure / (GAS_CONSTANT * basis.standard_temperature)
    return None


def is_gas_volume(value) -> bool:
    """True for text of a gas flow at normal or standard conditions ("2000 Nm3/h", "500 scfm")."""
    if not isinstance(value, str) or len(value) > MAX_TEXT:
        return False
    match = _NUMBER.match(value)
    return bool(match) and (bool(_NORMAL.match(match.group(2))) or match.group(2) in _STANDARD)


def dimension_of(value) -> str | None:
    """The pint dimensionality of text "number unit", or None for a bare number or text that is not a quantity."""
    if not isinstance(value, str) or len(value) > MAX_TEXT:
        return None
    match = _NUMBER.match(value)
    if not match or not match.group(2):
        return None
    text = match.group(2)
    text = _ABSOLUTE.get(text) or _GAUGE.get(text) or text
    if _NORMAL.match(text) or text in _STANDARD:
        return "[substance] / [time]"
    if text in _MISREAD or not _UNIT_CHARS.match(text):
        return None
    try:
        return str(registry().Quantity(1.0, _pint_text(text)).dimensionality)
    except Exception:  # noqa: BLE001 - an unknown unit is reported by to_si
        return None


def mole_fraction_text(value: float) -> str:
    """A gas mole fraction as an engineer writes it: ppbv, ppmv or %.

    >>> mole_fraction_text(2.5e-5), mole_fraction_text(4e-8), mole_fraction_text(0.012)
    ('25 ppmv', '40 ppbv', '1.2 %')
    """
    if not math.isfinite(value):
        return "-"
    if value == 0:
        return "0"
    if value < 1e-6:
        return f"{value * 1e9:.3g} ppbv"
    if value < 1e-3:
        return f"{value * 1e6:.4g} ppmv"
    return f"{value * 100:.4g} %"
