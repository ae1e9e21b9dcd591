"""Column internals: what fills the shell, how it sizes the column, where it works and what it costs.

An internals object answers, for arrays of design points:

* ``least(loads, count)``: the least standard shell, from whichever of
  flooding and the downcomer limits needs the larger one;
* ``size(loads, count, diameter)``: at a given shell, the height, pressure
  drop and the operating range (weeping at the lowest expected loads,
  entrainment at the design loads, downcomer back-up and residence time);
* ``larger(diameter, steps)``: the next standard sizes, when a wider shell
  is offered as a decision;
* ``items(diameter, count, ...)``: its own cost lines (the trays; a
  packing's bed, distributors and supports).

Trays are sieve or valve (Fair's flooding correlation, the Sinnott weep
point for sieve trays, Fair's entrainment chart and the downcomer checks of
``towercost.models.hydraulics``). ``TrayChoice`` holds the scenario's trays
and, where they are sieve trays and fall outside their operating range,
valve trays with their wider turndown in their place. Packed beds
(``towercost.design.packed``) are the other alternatives.

``towercost.design.column_internals.ColumnInternals`` puts every
alternative of a case behind one interface (an internals index per point:
0 and 1 the tray types, ``FIRST_PACKING`` + p the case's p-th packing).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, fields

import numpy as np

from towercost.design.costlines import ItemCost, ItemSpec, merge_rows, price_item
from towercost.models import hydraulics

#: Tray types in the order their index is stored per design (figure ``tray_type``).
TRAY_TYPES = ("sieve", "valve")

#: The internals index of the case's first [[packing]]: the tray types come first.
FIRST_PACKING = len(TRAY_TYPES)

#: Standard sizes above the flooding size tried for the downcomer limits before giving up.
DOWNCOMER_STEPS = 40


@dataclass(frozen=True)
class Loads:
    """The largest gas and liquid loads of the column and the phase properties, per design point."""

    gas_mass_flow: np.ndarray       # [kg/s]
    liquid_mass_flow: np.ndarray    # [kg/s]
    gas_density: np.ndarray         # [kg/m3]
    liquid_density: np.ndarray      # [kg/m3]
    surface_tension: np.ndarray     # [N/m]

    def take(self, index) -> "Loads":
        return Loads(*(getattr(self, f.name)[index] for f in fields(Loads)))


@dataclass(frozen=True)
class Least:
    """The least standard shell of design points, and which rule set it."""

    flooding: np.ndarray     # least standard size at the design fraction of flood [m]
    downcomer: np.ndarray    # least standard size, at or above it, meeting the downcomer limits [m]

    @property
    def diameter(self) -> np.ndarray:
        return self.downcomer

    @property
    def downcomer_governs(self) -> np.ndarray:
        return self.downcomer > self.flooding

    def take(self, index) -> "Least":
        return Least(self.flooding[index], self.downcomer[index])


@dataclass(frozen=True)
class TraySizing:
    """Trays in a shell of given diameter, per design point: hydraulics and operating range."""

    tray_type: np.ndarray               # index into TRAY_TYPES
    flow_parameter: np.ndarray
    flooding_velocity: np.ndarray       # [m/s] on the net area
    diameter_required: np.ndarray       # [m] at the design fraction of flood
    diameter: np.ndarray                # [m] the shell
    fraction_of_flood: np.ndarray
    height: np.ndarray                  # [m]
    pressure_drop_per_tray: np.ndarray  # [Pa]
    pressure_drop: np.ndarray           # [Pa]
    weep_ratio: np.ndarray              # lowest-load hole velocity over the weep point (sieve), turndown margin (valve)
    entrainment: np.ndarray             # fractional entrainment at the design loads
    backup_fraction: np.ndarray         # downcomer back-up over (tray spacing + weir height)
    residence_time: np.ndarray          # [s] in the downcomer
    range_use: np.ndarray               # largest of the limits' utilizations; <= 1 is inside the operating range
    range_governs: np.ndarray           # index into hydraulics.LIMIT_NAMES of the most utilized limit

    @property
    def in_range(self) -> np.ndarray:
        return self.range_use <= 1.0

    @property
    def weeps(self) -> np.ndarray:
        """True where the trays weep at the lowest expected loads: a wider shell only weeps more."""
        return self.weep_ratio < 1.0

    def take(self, index) -> "TraySizing":
        return TraySizing(*(getattr(self, f.name)[index] for f in fields(TraySizing)))

    def put(self, index, part: "TraySizing") -> None:
        """Write ``part`` over the points at ``index`` (in place)."""
        for f in fields(TraySizing):
            getattr(self, f.name)[index] = getattr(part, f.name)

    @classmethod
    def scatter(cls, n: int, parts: list[tuple[np.ndarray, "TraySizing"]]) -> "TraySizing":
        """One sizing over ``n`` points from sizings of parts of them (positions, sizing)."""
        out = {}
        for f in fields(cls):
            first = getattr(parts[0][1], f.name)
            column = np.empty(n, dtype=first.dtype)
            for index, part in parts:
                column[index] = getattr(part, f.name)
            out[f.name] = column
        return cls(**out)


@dataclass(frozen=True)
class Trays:
    """Sieve or valve trays of one type at one spacing, sized at a design fraction of flood."""

    tray_type: str          # "sieve" or "valve" (models/data/tray_types.toml)
    spacing: float          # [m]
    flood_fraction: float   # design fraction of flood [-]
    material: str
    turndown: float = hydraulics.TURNDOWN   # lowest expected loads / design loads [-]

    @property
    def item(self) -> ItemSpec:
        return ItemSpec("trays", "TR-101", f"{self.tray_type} trays", f"tray_{self.tray_type}")

    @property
    def index(self) -> int:
        return TRAY_TYPES.index(self.tray_type)

    def _args(self, loads: Loads):
        return (loads.gas_mass_flow, loads.liquid_mass_flow, loads.gas_density, loads.liquid_density,
                loads.surface_tension)

    def _range(self, loads: Loads, size: hydraulics.ColumnSize, warnings=None) -> hydraulics.OperatingRange:
        return hydraulics.tray_operating_range(
            loads.gas_mass_flow, loads.liquid_mass_flow, loads.gas_density, loads.liquid_density, size.diameter,
            size.flooding_velocity, size.downcomer_fraction, self.tray_type, self.spacing, self.turndown,
            warnings=warnings)

    def least(self, loads: Loads, count) -> tuple[Least, TraySizing]:
        """The least standard shell: the flooding size, stepped up while the downcomer limits fail there.

        D = least standard size >= standard(D_flood) with h_b/(l_t + h_w) <= the back-up limit
        and t_r >= the least residence time (``hydraulics.tray_operating_range``); at high
        liquid loads (flow parameters beyond the flooding chart) the downcomers govern.
        Returns the least shells and the sizing in them.
        """
        common = dict(tray_spacing=self.spacing, flood_fraction=self.flood_fraction, tray_type=self.tray_type)
        size = hydraulics.size_column(*self._args(loads), count, **common)
        sizing = self._sizing(size, self._range(loads, size))
        flooding = sizing.diameter.copy()
        active = np.arange(flooding.size)
        for _ in range(DOWNCOMER_STEPS):
            fails = ((sizing.backup_fraction[active] > hydraulics.BACKUP_LIMIT)
                     | (sizing.residence_time[active] < hydraulics.RESIDENCE_TIME_MIN))
            active = active[fails]
            if active.size == 0:
                break
            shell = hydraulics.standard_diameter(sizing.diameter[active] + hydraulics.STANDARD_DIAMETER_STEP)
            part = loads.take(active)
            size = hydraulics.size_column(*self._args(part), count[active], **common, diameter=shell)
            sizing.put(active, self._sizing(size, self._range(part, size)))
        return Least(flooding, sizing.diameter.copy()), sizing

    def size(self, loads: Loads, count, diameter, *, warnings: list[str] | None = None) -> TraySizing:
        """Hydraulics and operating range of ``count`` trays in shells of ``diameter`` [m]."""
        size = hydraulics.size_column(*self._args(loads), count, tray_spacing=self.spacing,
                                      flood_fraction=self.flood_fraction, tray_type=self.tray_type,
                                      diameter=diameter, warnings=warnings)
        return self._sizing(size, self._range(loads, size, warnings))

    def _sizing(self, size: hydraulics.ColumnSize, r: hydraulics.OperatingRange) -> TraySizing:
        n = np.shape(size.diameter)
        return TraySizing(
            tray_type=np.full(n, self.index, dtype=np.int8), flow_parameter=np.array(size.flow_parameter),
            flooding_velocity=np.array(size.flooding_velocity), diameter_required=np.array(size.diameter_required),
            diameter=np.array(size.diameter), fraction_of_flood=size.fraction_of_flood_at_standard_diameter,
            height=np.broadcast_to(size.height, n).astype(float),
            pressure_drop_per_tray=size.pressure_drop_per_tray, pressure_drop=size.pressure_drop,
            weep_ratio=r.weep_ratio, entrainment=r.entrainment, backup_fraction=r.backup_fraction,
            residence_time=r.residence_time, range_use=_largest(r.utilization),
            range_governs=np.argmax(r.utilization, axis=-1).astype(np.int8))

    @staticmethod
    def larger(diameter, steps: np.ndarray) -> np.ndarray:
        """Standard diameters ``steps`` sizes above ``diameter`` [m], shape (n, len(steps))."""
        return hydraulics.standard_diameter(
            np.asarray(diameter)[:, None] + steps[None, :] * hydraulics.STANDARD_DIAMETER_STEP)

    def items(self, diameter, count, *, warnings: list[str] | None = None) -> ItemCost:
        """The trays' cost line: per tray from the tower cross-section, times the count and its quantity factor."""
        area = math.pi / 4.0 * np.asarray(diameter, dtype=float) ** 2
        return price_item(self.item, area, material=self.material, count=count, warnings=warnings)


class LeastCache:
    """The least shells of a batch of design points, per tray type, filled as they are first asked for.

    They depend on the loads and the tray count only, not on the shell, so a
    batch priced at several shell sizes computes them once; ``take`` gives a
    part of the batch that shares the same store.
    """

    def __init__(self, n: int):
        self._store: dict[int, tuple[np.ndarray, np.ndarray]] = {}
        self._n = n
        self.index = np.arange(n)

    def take(self, index) -> "LeastCache":
        part = LeastCache.__new__(LeastCache)
        part._store, part._n, part.index = self._store, self._n, self.index[index]
        return part

    def arrays(self, key, count: int, compute) -> list[np.ndarray]:
        """``count`` arrays of this part's points kept under ``key`` (a packing's least shells), computed once.

        ``compute(local)`` gives the arrays for the points of the part still missing.
        """
        store = self._store.setdefault(key, tuple(np.full(self._n, np.nan) for _ in range(count)))
        missing = np.flatnonzero(np.isnan(store[0][self.index]))
        if missing.size:
            for column, values in zip(store, compute(missing)):
                column[self.index[missing]] = values
        return [column[self.index] for column in store]

    def get(self, kind: int, compute) -> tuple[Least, TraySizing | None]:
        """The least shells of tray type ``kind`` for this part, and the sizing in them where just found.

        ``compute(local)`` gives (least shells, sizing) for the points missing;
        the sizing is returned only when every point of the part was missing.
        """
        flooding, downcomer = self._store.setdefault(kind, (np.full(self._n, np.nan), np.full(self._n, np.nan)))
        missing = np.flatnonzero(np.isnan(flooding[self.index]))
        fresh = None
        if missing.size:
            least, sizing = compute(missing)
            flooding[self.index[missing]] = least.flooding
            downcomer[self.index[missing]] = least.downcomer
            if missing.size == self.index.size:
                fresh = sizing
        return Least(flooding[self.index], downcomer[self.index]), fresh


class TrayChoice:
    """The scenario's trays, and valve trays where sieve trays would fall outside their operating range.

    Per design point one tray type is priced: the scenario's where they do
    not weep at that shell; where they would, with ``fallback``, valve trays
    if they work there (their lower limit is a turndown ratio, wider than a
    sieve tray's weep point); otherwise the scenario's trays, outside their
    range (a design the limits then refuse). Weeping is the one limit valve
    trays mend: they share Fair's entrainment chart and the downcomers.
    """

    def __init__(self, tray_type: str, spacing: float, flood_fraction: float, material: str,
                 turndown: float = hydraulics.TURNDOWN, fallback: bool = True, both: bool = False):
        self.kinds = tuple(Trays(t, spacing, flood_fraction, material, turndown) for t in TRAY_TYPES)
        self.preferred = TRAY_TYPES.index(tray_type)
        self.fallback = TRAY_TYPES.index("valve") if fallback and tray_type == "sieve" else None
        used = [self.preferred] + ([self.fallback] if self.fallback is not None else [])
        if both:     # every tray type priced somewhere (the types compete as alternatives)
            used += [k for k in range(len(TRAY_TYPES)) if k not in used]
        self.variants = tuple(self.kinds[k].item for k in used)

    def size(self, loads: Loads, count, diameter, tray=None, *, cache: LeastCache | None = None,
             warnings: list[str] | None = None) -> tuple[TraySizing, Least]:
        """Sizing at ``diameter`` [m] (NaN: the least shell) with ``tray`` types (None, or -1 per point: the rule).

        Returns the sizing and, per point, the least shells of the tray type priced.
        """
        diameter = np.asarray(diameter, dtype=float)
        count = np.asarray(count)
        n = diameter.size
        cache = LeastCache(n) if cache is None else cache
        if tray is None:
            return self._by_rule(loads, count, diameter, cache, warnings)
        tray = np.broadcast_to(np.asarray(tray, dtype=np.int8), (n,))
        kinds = np.unique(tray)
        if kinds.size == 1:
            k = int(kinds[0])
            if k < 0:
                return self._by_rule(loads, count, diameter, cache, warnings)
            return self._sized(loads, count, diameter, k, cache, warnings)
        parts, leasts = [], []
        for k in kinds:
            at = np.flatnonzero(tray == k)
            args = (loads.take(at), count[at], diameter[at])
            if k < 0:
                s, least = self._by_rule(*args, cache.take(at), warnings)
            else:
                s, least = self._sized(*args, int(k), cache.take(at), warnings)
            parts.append((at, s))
            leasts.append((at, least))
        return TraySizing.scatter(n, parts), _scatter_least(n, leasts)

    def _by_rule(self, loads, count, diameter, cache: LeastCache, warnings) -> tuple[TraySizing, Least]:
        n = diameter.size
        local: list[str] | None = None if warnings is None else []
        sizing, least = self._sized(loads, count, diameter, self.preferred, cache, local)
        if self.fallback is not None:
            out = np.flatnonzero(sizing.weeps)   # what valve trays' wider turndown can mend
            if out.size:
                other, other_least = self._sized(loads.take(out), count[out], diameter[out], self.fallback,
                                                 cache.take(out), None)
                works = np.flatnonzero(other.in_range)
                if works.size:
                    chosen = out[works]
                    keep = np.setdiff1d(np.arange(n), chosen, assume_unique=True)
                    sizing = TraySizing.scatter(n, [(keep, sizing.take(keep)), (chosen, other.take(works))])
                    least = _scatter_least(n, [(keep, least.take(keep)), (chosen, other_least.take(works))])
                    if warnings is not None:   # each type's range messages, for the points it prices
                        self._messages(loads, count, sizing, warnings)
                    return sizing, least
        if warnings is not None:
            warnings.extend(local)
        return sizing, least

    def _messages(self, loads, count, sizing: TraySizing, warnings: list[str]) -> None:
        for k in np.unique(sizing.tray_type):
            at = np.flatnonzero(sizing.tray_type == k)
            self.kinds[int(k)].size(loads.take(at), count[at], sizing.diameter[at], warnings=warnings)

    def _sized(self, loads, count, diameter, kind, cache: LeastCache, warnings) -> tuple[TraySizing, Least]:
        trays = self.kinds[kind]
        least, fresh = cache.get(kind, lambda local: trays.least(loads.take(local), count[local]))
        wanted = np.isnan(diameter)
        if fresh is not None and warnings is None and np.all(wanted):   # sized in the least shells already
            return fresh, least
        shell = np.where(wanted, least.diameter, diameter)
        return trays.size(loads, count, shell, warnings=warnings), least

    def items(self, diameter, count, tray, *, warnings: list[str] | None = None) -> list[ItemCost]:
        """The trays' cost line, each point priced by its own tray type's row."""
        tray = np.asarray(tray)
        kinds = np.unique(tray)
        first = self.kinds[self.preferred].item
        if kinds.size == 1:
            k = int(kinds[0])
            row = self.kinds[k].items(diameter, count, warnings=warnings)
            variant = np.full(tray.size, self.variants.index(self.kinds[k].item), dtype=np.int8)
            return [ItemCost(first, row.size, row.purchased, row.bare_module, row.bare_module_base, row.in_range,
                             row.material, self.variants, variant)]
        parts = []
        for k in kinds:
            at = np.flatnonzero(tray == k)
            parts.append((at, self.kinds[int(k)].items(np.asarray(diameter)[at], np.asarray(count)[at],
                                                       warnings=warnings)))
        return [merge_rows(parts, tray.size, first, self.variants)]


def _largest(table: np.ndarray) -> np.ndarray:
    """Largest entry of each row of a narrow (n, k) table (column by column: faster than a row reduction)."""
    out = table[..., 0].copy()
    for j in range(1, table.shape[-1]):
        np.maximum(out, table[..., j], out=out)
    return out


def _scatter_least(n: int, parts: list[tuple[np.ndarray, Least]]) -> Least:
    flooding, downcomer = np.empty(n), np.empty(n)
    for index, least in parts:
        flooding[index] = least.flooding
        downcomer[index] = least.downcomer
    return Least(flooding, downcomer)
