"""Units at the edge: text such as "1200 kmol/h" or "35 degC" to SI floats.

Parsed once, here, with pint. Everything past this module works in SI
(mol/s, kg/s, Pa absolute, K, m, kg, s, W, USD).
"""

from __future__ import annotations

import re
import sys
from functools import lru_cache


def _import_pint():
    """Import pint without letting it pull in scipy.

    pint imports scipy, when installed, only to test for it; once scipy is
    loaded, Pyomo resolves its own deferred scipy import eagerly and loads
    scipy.stats, which cost about 1 s per command on this machine. Nothing
    towercost asks of pint uses scipy.
    """
    hide = "scipy" not in sys.modules
    if hide:
        sys.modules["scipy"] = None  # makes `import scipy` raise ImportError inside pint
    try:
        import pint
    finally:
        if hide:
            del sys.modules["scipy"]
    return pint


pint = _import_pint()

from towercost.models.constants import STANDARD_ATMOSPHERE  # noqa: E402 - after the pint import on purpose

_NUMBER = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*$")

#: Gauge pressure units we accept, and the absolute unit they stand for.
_GAUGE = {"barg": "bar", "psig": "psi", "kPag": "kPa", "MPag": "MPa"}

#: Powers written without an operator, as engineers do: m3, ft2, cm3.
_POWER = re.compile(r"\b(m|cm|mm|dm|km|ft|in|yd)([23])\b")


def _pint_text(text: str) -> str:
    """Unit text as pint reads it: "kg/m3" -> "kg/m**3"."""
    return _POWER.sub(r"\1**\2", text)


@lru_cache(maxsize=1)
def registry() -> pint.UnitRegistry:
    """The one unit registry, with money and mole-fraction shorthands."""
    ureg = pint.UnitRegistry(autoconvert_offset_to_baseunit=True, cache_folder=":auto:")
    ureg.define("USD = [currency] = usd = dollar")
    ureg.define("kUSD = 1000 USD")
    ureg.define("MUSD = 1e6 USD")
    ureg.define("lbmol = 453.59237 mol = lb_mol = lbmole")  # pound-mole: the avoirdupois pound, exact
    ureg.define("psia = psi")                                # absolute; psig is handled as a gauge unit
    ureg.define("ppmv = 1e-6 = ppmv")
    ureg.define("ppbv = 1e-9 = ppbv")
    return ureg


class UnitError(ValueError):
    """A value whose unit is unknown or of the wrong kind."""


def to_si(value, unit: str, *, what: str = "value") -> float:
    """Convert ``value`` (a number, or text "number unit") to the float magnitude in ``unit``.

    A bare number is taken to be in ``unit`` already. Offset temperatures
    ("35 degC", "95 degF") and gauge pressures ("2 barg", "30 psig") are
    accepted.

    >>> round(to_si("1200 kmol/h", "mol/s"), 6)
    333.333333
    >>> round(to_si("35 degC", "K"), 2)
    308.15
    >>> round(to_si("1 barg", "Pa"), 1)
    201325.0
    >>> round(to_si("780 kg/m3", "kg/m^3"), 6)
    780.0
    >>> to_si(4.5, "m")
    4.5
    """
    if isinstance(value, bool):
        raise UnitError(f"{what} must be a number or text such as '12 {unit}', got {value!r}")
    if isinstance(value, (int, float)):
        return float(value)
    if not isinstance(value, str):
        raise UnitError(f"{what} must be a number or text such as '12 {unit}', got {value!r}")
    match = _NUMBER.match(value)
    if not match:
        raise UnitError(f"{what} must start with a number, as in '12 {unit}', got {value!r}")
    number, text = float(match.group(1)), match.group(2)
    if not text:
        return number
    ureg = registry()
    offset = 0.0
    if text in _GAUGE:
        text, offset = _GAUGE[text], STANDARD_ATMOSPHERE
    try:
        quantity = ureg.Quantity(number, _pint_text(text))
    except (pint.errors.UndefinedUnitError, pint.errors.DefinitionSyntaxError, AttributeError, TypeError, ValueError) as exc:
        raise UnitError(f"{what}: unknown unit {text!r} in {value!r}") from exc
    try:
        converted = quantity.to(unit).magnitude
    except pint.errors.DimensionalityError as exc:
        raise UnitError(
            f"{what}: {value!r} is not convertible to {unit} "
            f"(it is {quantity.dimensionality}, {unit} is {ureg.Quantity(1, unit).dimensionality})"
        ) from exc
    if offset:
        converted += ureg.Quantity(offset, "Pa").to(unit).magnitude
    return float(converted)


def dimension_of(value) -> str | None:
    """The pint dimensionality of text "number unit", or None for a bare number."""
    if not isinstance(value, str):
        return None
    match = _NUMBER.match(value)
    if not match or not match.group(2):
        return None
    text = _GAUGE.get(match.group(2), match.group(2))
    try:
        return str(registry().Quantity(1.0, _pint_text(text)).dimensionality)
    except Exception:  # noqa: BLE001 - an unknown unit is reported by to_si
        return None


def mole_fraction_text(value: float) -> str:
    """A mole fraction as an engineer writes it: ppbv, ppmv or %.

    >>> mole_fraction_text(2.5e-5), mole_fraction_text(4e-8), mole_fraction_text(0.012)
    ('25 ppmv', '40 ppbv', '1.2 %')
    """
    import math

    if not math.isfinite(value):
        return "-"
    if value == 0:
        return "0"
    if value < 1e-6:
        return f"{value * 1e9:.3g} ppbv"
    if value < 1e-3:
        return f"{value * 1e6:.4g} ppmv"
    return f"{value * 100:.4g} %"
