r"""Solute concentrations in each phase: what a scenario may write, and how each phase's figures are shown.

Inside the code every concentration is a mole fraction. At the edge:

- a **gas** concentration is by volume, which for an ideal gas is the mole
  fraction: a bare mole fraction, or text in ppmv, ppbv, pptv, % (vol%, mol%);
- a **liquid** concentration is a bare mole fraction, or by mass (ppmw, ppbw,
  mg/kg, ug/kg, wt%), or per volume (g/L, mg/L, ug/L), converted with the
  liquid's molar mass M_l and density rho and the solute's molar mass M_s:

      w = x M_s / (x M_s + (1 - x) M_l)           mass fraction from mole fraction
      x = (w / M_s) / (w / M_s + (1 - w) / M_l)    its inverse
      c = w rho                                    mass per volume [kg/m3]

  with rho the liquid's density standing for the solution's (dilute).

"ppm" and "ppb" alone are refused: by volume and by mass differ by the ratio
of molar masses (for 1 ppm of trichloroethylene in water, a factor of 7.3).
A gas unit in a liquid, or a liquid unit in a gas, is refused with the units
that phase takes.

Output: gas figures in ppmv; liquid figures in the unit the scenario used
for that solute in that liquid, else ppmw where the solute's molar mass is
known, else as a mole fraction.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from typing import Any

from towercost.scenario.units import MAX_TEXT, Basis, UnitError, is_gas_volume, mole_fraction_text, to_si

#: Gas units: name -> mole fraction per unit.
GAS = {"ppmv": 1e-6, "ppbv": 1e-9, "pptv": 1e-12, "%": 1e-2, "vol%": 1e-2, "mol%": 1e-2}

#: Liquid units by mass: name -> mass fraction per unit.
LIQUID_MASS = {"ppmw": 1e-6, "ppbw": 1e-9, "mg/kg": 1e-6, "ug/kg": 1e-9, "µg/kg": 1e-9, "wt%": 1e-2}

#: Liquid units per volume: name -> kg/m3 per unit.
LIQUID_VOLUME = {"g/L": 1.0, "mg/L": 1e-3, "ug/L": 1e-6, "µg/L": 1e-6,
                 "g/l": 1.0, "mg/l": 1e-3, "ug/l": 1e-6, "µg/l": 1e-6}

#: Liquid units by mole: name -> mole fraction per unit.
LIQUID_MOLE = {"mol%": 1e-2}

_NUMBER = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*$", re.DOTALL)

GAS_WORDS = "a mole fraction, ppmv, ppbv, pptv or %"

#: Every unit text a concentration may carry (either phase), for the schema's pattern.
ALL_UNITS = tuple(dict.fromkeys([*GAS, *LIQUID_MASS, *LIQUID_VOLUME, *LIQUID_MOLE]))
LIQUID_WORDS = "a mole fraction, ppmw, ppbw, mg/kg, ug/kg, wt%, mol%, g/L, mg/L or ug/L"


def json_schema(positive: bool = False) -> dict:
    """The JSON Schema of a concentration: a mole fraction in [0, 1) ((0, 1) if ``positive``), or text in a unit."""
    units = "|".join(re.escape(u) for u in ALL_UNITS)
    words = (f"a concentration: a mole fraction in [0, 1); or in a gas {GAS_WORDS.removeprefix('a mole fraction, ')}; "
             f"or in a liquid {LIQUID_WORDS.removeprefix('a mole fraction, ')} (by mass: needs the solute's molar "
             "mass in [solute.<name>])")
    low = {"minimum": 1e-15} if positive else {"minimum": 0}
    return {"anyOf": [{"type": "number", **low, "exclusiveMaximum": 1},
                      {"type": "string", "pattern": rf"^\s*[+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?\s*({units})?\s*$"}],
            "description": words, "x-description": words, "x-dimension": "a concentration",
            "examples": ["20 ppmv", "5 ug/L"]}


@dataclass(frozen=True)
class Liquid:
    """What converting a liquid concentration needs of the liquid."""

    molar_mass: float | None   # [kg/mol]
    density: float | None      # [kg/m3]


def mass_to_mole(w: float, solute_molar_mass: float, liquid_molar_mass: float) -> float:
    """Mole fraction from mass fraction: x = (w / M_s) / (w / M_s + (1 - w) / M_l).

    >>> round(mass_to_mole(1e-6, 0.13139, 0.018015) * 1e9, 4)   # 1 ppmw trichloroethylene in water
    137.111
    """
    solute = w / solute_molar_mass
    return solute / (solute + (1.0 - w) / liquid_molar_mass)


def mole_to_mass(x: float, solute_molar_mass: float, liquid_molar_mass: float) -> float:
    """Mass fraction from mole fraction: w = x M_s / (x M_s + (1 - x) M_l).

    >>> round(mole_to_mass(mass_to_mole(2.5e-4, 0.09214, 0.17), 0.09214, 0.17), 15)
    0.00025
    """
    solute = x * solute_molar_mass
    return solute / (solute + (1.0 - x) * liquid_molar_mass)


def parse(value, phase: str, *, what: str, liquid: Liquid | None = None,
          solute_molar_mass: float | None = None) -> tuple[float, str | None]:
    """A concentration in ``phase`` ("gas" or "liquid") as a mole fraction, and the unit it was written in.

    A bare number is a mole fraction (unit None). Mass-based liquid units
    need ``solute_molar_mass`` [kg/mol] and the liquid's molar mass; per-volume
    units also its density.

    >>> parse("500 ppmv", "gas", what="x")
    (0.0005, 'ppmv')
    >>> x, unit = parse("5 ug/L", "liquid", what="x", liquid=Liquid(0.018015, 999.1), solute_molar_mass=0.13139)
    >>> round(x * 1e10, 6), unit
    (6.86172, 'ug/L')
    """
    if isinstance(value, bool) or not isinstance(value, (int, float, str)):
        raise UnitError(f"{what}: must be a mole fraction or text such as '{_example(phase)}', got {value!r}")
    if not isinstance(value, str):
        x = float(value)
        if not math.isfinite(x):
            raise UnitError(f"{what}: must be a finite number, got {value!r}")
        return x, None
    if len(value) > MAX_TEXT:
        raise UnitError(f"{what}: text of {len(value):,} characters is not a concentration (at most {MAX_TEXT})")
    match = _NUMBER.match(value)
    if not match:
        raise UnitError(f"{what}: must start with a number, as in '{_example(phase)}', got {value!r}")
    number, unit = float(match.group(1)), match.group(2)
    if not math.isfinite(number):
        raise UnitError(f"{what}: must be a finite number, got {value!r}")
    if not unit:
        return number, None
    if unit in ("ppm", "ppb"):
        raise UnitError(f"{what}: {value!r} could be misread; in a {phase} write {_example(phase, unit)}")
    if phase == "gas":
        if unit in GAS:
            return number * GAS[unit], unit
        if unit in LIQUID_MASS or unit in LIQUID_VOLUME:
            raise UnitError(f"{what}: {unit} is a liquid unit; a gas concentration is {GAS_WORDS}, got {value!r}")
        raise UnitError(f"{what}: unknown gas concentration unit {unit!r} in {value!r}; use {GAS_WORDS}")
    if unit in LIQUID_MOLE:
        return number * LIQUID_MOLE[unit], unit
    if unit in GAS:
        raise UnitError(f"{what}: {unit} is a gas unit; a liquid concentration is {LIQUID_WORDS}, got {value!r}")
    if unit not in LIQUID_MASS and unit not in LIQUID_VOLUME:
        raise UnitError(f"{what}: unknown liquid concentration unit {unit!r} in {value!r}; use {LIQUID_WORDS}")
    if solute_molar_mass is None:
        raise UnitError(f"{what}: {value!r} is by mass and needs the solute's molar mass; "
                        f"add it as [solute.<name>] molar_mass = \"131.39 g/mol\"")
    if liquid is None or liquid.molar_mass is None:
        raise UnitError(f"{what}: {value!r} is by mass and needs the liquid's molar_mass (with a unit)")
    if unit in LIQUID_MASS:
        w = number * LIQUID_MASS[unit]
    else:
        if liquid.density is None:
            raise UnitError(f"{what}: {value!r} is per volume and needs the liquid's density (with a unit)")
        w = number * LIQUID_VOLUME[unit] / liquid.density
    if not 0.0 <= w < 1.0:
        raise UnitError(f"{what}: {value!r} is a mass fraction of {w:.4g}, outside [0, 1)")
    return mass_to_mole(w, solute_molar_mass, liquid.molar_mass), unit


def _example(phase: str, unit: str = "ppm") -> str:
    if phase == "gas":
        return "20 ppbv" if unit == "ppb" else "20 ppmv"
    return "20 ppbw or 20 ug/L" if unit == "ppb" else "20 ppmw or 20 mg/L"


def from_mole_fraction(x: float, unit: str, *, liquid: Liquid | None = None,
                       solute_molar_mass: float | None = None) -> float:
    """A mole fraction in ``unit`` (a gas or liquid unit above, or "mole fraction").

    >>> round(from_mole_fraction(6.86172e-10, "ug/L", liquid=Liquid(0.018015, 999.1), solute_molar_mass=0.13139), 4)
    5.0
    """
    if unit == "mole fraction":
        return x
    if unit in GAS:
        return x / GAS[unit]
    if unit in LIQUID_MOLE:
        return x / LIQUID_MOLE[unit]
    w = mole_to_mass(x, solute_molar_mass, liquid.molar_mass)
    if unit in LIQUID_MASS:
        return w / LIQUID_MASS[unit]
    return w * liquid.density / LIQUID_VOLUME[unit]


@dataclass(frozen=True)
class Display:
    """The unit each phase's concentrations are shown in, per solute, and what converting to it needs.

    ``treated`` is the stream the column cleans (gas when absorbing, liquid
    when stripping); ``agent`` the solvent or stripping gas, one entry per
    candidate.
    """

    treated_phase: str
    agent_phase: str
    treated_units: tuple[str, ...]                    # per solute
    agent_units: tuple[tuple[str, ...], ...]          # per agent, per solute
    treated_liquid: Liquid | None
    agent_liquids: tuple[Liquid | None, ...]
    solute_molar_mass: tuple[float | None, ...]       # per solute [kg/mol]

    def treated(self, s: int, x: float) -> tuple[float, str]:
        """Solute ``s`` at mole fraction ``x`` in the treated stream: (value, unit)."""
        unit = self.treated_units[s]
        return self._value(x, unit, self.treated_liquid, s), unit

    def agent(self, a: int, s: int, x: float) -> tuple[float, str]:
        """Solute ``s`` at mole fraction ``x`` in agent ``a``: (value, unit)."""
        unit = self.agent_units[a][s]
        return self._value(x, unit, self.agent_liquids[a], s), unit

    def treated_text(self, s: int, x: float) -> str:
        """As the tables print it: gas in ppbv, ppmv or %, liquid in its unit."""
        if self.treated_phase == "gas":
            return mole_fraction_text(x)
        return text(*self.treated(s, x))

    def _value(self, x: float, unit: str, liquid: Liquid | None, s: int) -> float:
        if not math.isfinite(x):
            return math.nan
        return from_mole_fraction(x, unit, liquid=liquid, solute_molar_mass=self.solute_molar_mass[s])


def text(value: float, unit: str) -> str:
    """A concentration for a table: four significant figures and the unit.

    >>> text(5.0, "ug/L"), text(2e-07, "mole fraction"), text(float("nan"), "ppmw")
    ('5 ug/L', '2e-07 mol/mol', '-')
    """
    if not math.isfinite(value):
        return "-"
    if unit == "mole fraction":
        return f"{value:.4g} mol/mol"
    return f"{value:.4g} {unit}"


def liquid_unit(used: str | None, solute_molar_mass: float | None, liquid: Liquid | None) -> str:
    """The unit a liquid's figures are shown in: the one used, else ppmw when it can be computed, else mole fraction."""
    if used is not None:
        return used
    if solute_molar_mass is not None and liquid is not None and liquid.molar_mass is not None:
        return "ppmw"
    return "mole fraction"


def display_for(scenario, used: dict) -> Display:
    """The units a scenario's concentrations are shown in: gas ppmv; liquid as written (``used``), else ppmw."""
    absorb = scenario.case.mode == "absorb"
    solutes = scenario.solutes
    molar = tuple(scenario.solute_molar_mass(s) for s in solutes)
    feed_liquid = None if absorb else Liquid(scenario.feed.molar_mass, scenario.feed.density)
    agent_liquids = tuple(Liquid(a.molar_mass, a.density) if absorb else None for a in scenario.agents)

    def liquid_units(key, liquid):
        return tuple(liquid_unit(used.get(key(s)), molar[i], liquid) for i, s in enumerate(solutes))

    treated = ("ppmv",) * len(solutes) if absorb else liquid_units(lambda s: ("treated", s), feed_liquid)
    agents = tuple(liquid_units(lambda s, a=a: ("agent", a, s), agent_liquids[a]) if absorb
                   else ("ppmv",) * len(solutes) for a in range(len(scenario.agents)))
    return Display(treated_phase="gas" if absorb else "liquid", agent_phase="liquid" if absorb else "gas",
                   treated_units=treated, agent_units=agents, treated_liquid=feed_liquid,
                   agent_liquids=agent_liquids, solute_molar_mass=molar)


# --------------------------------------------------------------------------- a scenario's text


def _quiet_si(value, unit: str, basis: Basis) -> float | None:
    """``value`` in ``unit`` or None where it cannot be read (the field itself reports on it)."""
    if value is None:
        return None
    try:
        return to_si(value, unit, basis=basis)
    except UnitError:
        return None


def convert_raw(data: Any, basis: Basis) -> tuple[Any, dict]:
    """A scenario as read (a dict), its concentration text turned into mole fractions per phase.

    Returns the new dict and the unit each concentration was written in:
    ``("treated", solute)`` for the treated stream, ``("agent", index,
    solute)`` for a candidate's entering loading. UnitError names the field.
    """
    if not isinstance(data, dict) or not isinstance(data.get("case"), dict):
        return data, {}
    mode = data["case"].get("mode")
    if mode not in ("absorb", "strip"):
        return data, {}
    treated = "gas" if mode == "absorb" else "liquid"
    feed = data.get("feed")
    if treated == "liquid" and isinstance(feed, dict) and is_gas_volume(feed.get("flow")):
        raise UnitError(f"[feed] flow: {feed['flow']!r} is a gas volume at normal or standard conditions, but the "
                         "feed of a stripper is a liquid: give a molar, mass or volume flow (kmol/h, kg/h, m3/h)")
    word = "solvent" if mode == "absorb" else "stripping_gas"
    molar: dict[str, float | None] = {}
    sources = [data.get("solute"), (data.get("economics") or {}).get("solute_molar_mass")
               if isinstance(data.get("economics"), dict) else None]
    for source in sources:
        if isinstance(source, dict):
            for name, item in source.items():
                raw = item.get("molar_mass") if isinstance(item, dict) else item
                molar.setdefault(name, _quiet_si(raw, "kg/mol", basis))

    def liquid_of(table) -> Liquid:
        return Liquid(_quiet_si(table.get("molar_mass"), "kg/mol", basis),
                      _quiet_si(table.get("density"), "kg/m^3", basis))

    used: dict = {}
    data = dict(data)
    feed = data.get("feed")
    if isinstance(feed, dict) and isinstance(feed.get("composition"), dict):
        liquid = liquid_of(feed) if treated == "liquid" else None
        converted = {}
        for solute, value in feed["composition"].items():
            converted[solute], unit = _read(value, treated, f"[feed] composition.{solute}", liquid,
                                            molar.get(solute))
            if unit:
                used.setdefault(("treated", solute), unit)
        data["feed"] = {**feed, "composition": converted}
    specs = data.get("spec")
    if isinstance(specs, list):
        liquid = liquid_of(feed) if treated == "liquid" and isinstance(feed, dict) else None
        out = []
        for item in specs:
            if isinstance(item, dict) and "outlet" in item:
                solute = item.get("solute") if isinstance(item.get("solute"), str) else None
                x, unit = _read(item["outlet"], treated, f"[[spec]] {repr(solute)[:50]} outlet", liquid,
                                molar.get(solute) if solute is not None else None)
                if unit and solute is not None:
                    used[("treated", solute)] = unit
                item = {**item, "outlet": x}
            out.append(item)
        data["spec"] = out
    agents = data.get(word)
    if isinstance(agents, list):
        phase = "liquid" if mode == "absorb" else "gas"
        out = []
        for a, agent in enumerate(agents):
            if isinstance(agent, dict) and isinstance(agent.get("lean"), dict):
                liquid = liquid_of(agent) if phase == "liquid" else None
                label = agent.get("name") if isinstance(agent.get("name"), str) else f"#{a + 1}"
                lean = {}
                for solute, value in agent["lean"].items():
                    lean[solute], unit = _read(value, phase, f"[[{word}]] {label[:40]!r} lean.{solute}", liquid,
                                               molar.get(solute))
                    if unit:
                        used[("agent", a, solute)] = unit
                agent = {**agent, "lean": lean}
            out.append(agent)
        data[word] = out
    return data, used


def _read(value, phase, where, liquid, molar_mass):
    return parse(value, phase, what=where, liquid=liquid, solute_molar_mass=molar_mass)
