"""A site file: several unit scenarios chosen together under shared limits and linking rules.

A site is a TOML file with these tables (units as in scenario files):

``[site]``              name, notes
``[[unit]]``            name, ``scenario`` = path of the unit's scenario file (relative to the site file)
``[shared]``            site-wide limits over the sum of the units' designs: ``capital_budget``
                        (installed cost), ``electric_power``, ``steam``, ``cooling_water``
``[[solvent_group]]``   name, ``units``: the units that must all use one solvent (served by one
                        regenerator and one tank farm)
``[[exclusive]]``       ``choices`` = [{unit, candidate}, ...]: at most one of them is chosen
``[[require]]``         unit, candidate: that unit's design must use that candidate

``load_site`` returns a ``SiteSpec`` with every unit scenario read and
validated; errors name the site file (or the unit's scenario file), the
field and the value.
"""

from __future__ import annotations

import tomllib
from dataclasses import dataclass
from pathlib import Path

from pydantic import Field, StrictBool, ValidationError, model_validator

from towercost.errors import ScenarioError
from towercost.scenario import envelope as env
from towercost.scenario.envelope import number, quantity
from towercost.scenario.load import load_scenario, read_text
from towercost.scenario.messages import one_line, relevance
from towercost.scenario.schema import Name, Scenario, _Table

Money = quantity(env.BUDGET)
Power = quantity(env.POWER)
MassFlow = quantity(env.STEAM_LIMIT)
VolumeFlow = quantity(env.COOLING_LIMIT)


class SiteHeader(_Table):
    name: Name
    notes: str = ""


class UnitEntry(_Table):
    """One unit of the site: its name and its scenario file."""

    name: Name
    scenario: str = Field(min_length=1, max_length=4096)   # path, relative to the site file


class SharedLimits(_Table):
    """Limits over the sum of the units' designs; each is optional."""

    capital_budget: Money | None = None      # [USD] of installed cost in all
    electric_power: Power | None = None      # [W] in all
    steam: MassFlow | None = None            # [kg/s] in all
    cooling_water: VolumeFlow | None = None  # [m3/s] in all


class SolventGroup(_Table):
    """Units that must all use the same solvent (one regenerator, one tank farm)."""

    name: Name
    units: list[str] = Field(min_length=2)
    # one regenerator column for the group's regenerated loops, sized for their summed circulation and vapour
    shared_regenerator: StrictBool = False
    regenerator_trays: number(env.TRAYS) | None = None   # real trays of the shared column

    @model_validator(mode="after")
    def _shared(self):
        if self.shared_regenerator and self.regenerator_trays is None:
            raise ValueError(f"[[solvent_group]] {self.name!r}: shared_regenerator = true needs regenerator_trays "
                             "(real trays of the shared column)")
        if self.regenerator_trays is not None and not self.shared_regenerator:
            raise ValueError(f"[[solvent_group]] {self.name!r}: regenerator_trays applies with shared_regenerator "
                             "= true only")
        return self


class Choice(_Table):
    """A unit's design using one candidate."""

    unit: str
    candidate: str


class Exclusive(_Table):
    """At most one of these choices is made."""

    choices: list[Choice] = Field(min_length=2)


class SiteFile(_Table):
    site: SiteHeader
    unit: list[UnitEntry] = Field(min_length=1)
    shared: SharedLimits = SharedLimits()
    solvent_group: list[SolventGroup] = []
    exclusive: list[Exclusive] = []
    require: list[Choice] = []

    @model_validator(mode="after")
    def _consistent(self):
        names = [u.name for u in self.unit]
        if len(set(names)) != len(names):
            raise ValueError(f"[[unit]] names must be distinct, got {names}")
        for group in self.solvent_group:
            for name in group.units:
                if name not in names:
                    raise ValueError(f"[[solvent_group]] {group.name!r}: no unit named {name!r} ({', '.join(names)})")
        seen = [n for g in self.solvent_group for n in g.units]
        if len(set(seen)) != len(seen):
            raise ValueError("[[solvent_group]]: a unit may belong to one group only")
        for choice in [c for e in self.exclusive for c in e.choices] + list(self.require):
            if choice.unit not in names:
                raise ValueError(f"choice of unit {choice.unit!r}: no such unit ({', '.join(names)})")
        return self


@dataclass(frozen=True)
class SiteSpec:
    """A site ready to optimize: its units' scenarios read and validated, plain data otherwise."""

    name: str
    units: tuple[tuple[str, Scenario], ...]          # (unit name, scenario)
    shared: SharedLimits
    solvent_groups: tuple[SolventGroup, ...] = ()
    exclusive: tuple[Exclusive, ...] = ()
    require: tuple[Choice, ...] = ()
    notes: str = ""


def _check_candidates(spec: SiteSpec) -> None:
    from towercost.design.loop_case import candidate_names

    agents = {name: candidate_names(scenario) for name, scenario in spec.units}
    for choice in [c for e in spec.exclusive for c in e.choices] + list(spec.require):
        if choice.candidate not in agents[choice.unit]:
            raise ScenarioError(f"choice {choice.unit!r} / {choice.candidate!r}: unit {choice.unit!r} has no "
                                f"candidate of that name ({', '.join(map(repr, agents[choice.unit]))})")
    for group in spec.solvent_groups:
        common = set.intersection(*(set(agents[u]) for u in group.units))
        if not common:
            raise ScenarioError(f"[[solvent_group]] {group.name!r}: its units share no candidate by name, so no "
                                "one solvent can serve them all")
        if group.shared_regenerator:
            scenarios = dict(spec.units)
            for unit in group.units:
                if not any(a.regenerator is not None for a in scenarios[unit].agents):
                    raise ScenarioError(f"[[solvent_group]] {group.name!r}: shared_regenerator = true, but unit "
                                        f"{unit!r} has no solvent with a [solvent.regenerator]")


def site_from_units(name: str, units: list[tuple[str, Scenario]], *, shared: dict | None = None,
                    solvent_groups: list[dict] = (), exclusive: list[dict] = (), require: list[dict] = (),
                    notes: str = "") -> SiteSpec:
    """A site from scenarios already in hand (the Python API; the file loader calls it too)."""
    try:
        parsed = SiteFile.model_validate({
            "site": {"name": name, "notes": notes}, "unit": [{"name": n, "scenario": "-"} for n, _ in units],
            "shared": shared or {}, "solvent_group": list(solvent_groups), "exclusive": list(exclusive),
            "require": list(require)})
    except ValidationError as exc:
        raise ScenarioError(f"site {name!r}: " + str(exc.errors()[0]["msg"]).removeprefix("Value error, ")) from None
    spec = SiteSpec(name, tuple(units), parsed.shared, tuple(parsed.solvent_group), tuple(parsed.exclusive),
                    tuple(parsed.require), notes)
    _check_candidates(spec)
    return spec


def load_site(path: str | Path) -> SiteSpec:
    """Read a site file and every unit scenario it names."""
    path = Path(path)
    text = read_text(path)            # regular files only, size-capped, UTF-8 (as scenario files)
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise ScenarioError(f"{path}: not valid TOML ({exc})") from None
    except RecursionError:
        raise ScenarioError(f"{path}: tables or arrays nested too deep") from None
    try:
        parsed = SiteFile.model_validate(data)
    except ValidationError as exc:
        best = max(exc.errors(), key=lambda e: relevance(e, data, SiteFile))
        raise ScenarioError(one_line(str(path), best, data, SiteFile)) from None
    units = [(u.name, load_scenario(path.parent / u.scenario)) for u in parsed.unit]
    spec = SiteSpec(parsed.site.name, tuple(units), parsed.shared, tuple(parsed.solvent_group),
                    tuple(parsed.exclusive), tuple(parsed.require), parsed.site.notes)
    _check_candidates(spec)
    return spec


def is_site_file(path: str | Path) -> bool:
    """True when a TOML file is a site file (it has a [site] table) rather than a unit scenario."""
    try:
        return "site" in tomllib.loads(Path(path).read_text(encoding="utf-8"))
    except (OSError, UnicodeDecodeError, tomllib.TOMLDecodeError):
        return False
