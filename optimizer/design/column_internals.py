"""Every internals alternative of a case behind one interface: the trays (by the scenario's rule) and each packing.

Each design point carries an internals index (``internals``): 0 and 1 the
tray types of ``towercost.design.internals.TRAY_TYPES``, ``FIRST_PACKING + p``
the case's p-th ``[[packing]]`` (``towercost.design.packed``), -1 the
scenario's tray rule before it is resolved. ``ColumnInternals.size`` and
``items`` split a set of points by it, size and price each part with its
own internals, and join the parts again, so that the flowsheet
(``towercost.design.column``) prices trays and packed beds in one call.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from towercost.design.costlines import ItemCost
from towercost.design.internals import FIRST_PACKING, TRAY_TYPES, TrayChoice
from towercost.models import vessel

#: Figures of the trays, NaN (or the fill below) at packed points; and of the beds, NaN at tray points.
TRAY_FIGURES = ("weep_ratio", "entrainment", "backup_fraction", "residence_time", "range_use", "range_governs",
                "pressure_drop_per_tray", "tray_type")
PACKED_FIGURES = ("packed_height", "beds", "bed_height", "pressure_drop_per_m", "wetting_ratio", "diameter_ratio",
                  "diameter_pressure_drop", "packing_weight", "packing_volume", "wetted_area")
PACKED_PER_SOLUTE = ("transfer_units", "htu", "hetp", "film_gas_htu", "film_liquid_htu")

#: Separation figures a packed bed sets itself (its stages follow from its height).
SEPARATION_FIGURES = ("stages", "outlet", "agent_outlet", "meets_spec", "efficiency", "controlling")


@dataclass
class Sizing:
    """The internals of design points sized in their shells: what the vessel, machines and cost lines read."""

    internals: np.ndarray        # resolved index per point (0, 1 trays; FIRST_PACKING + p a packing)
    diameter: np.ndarray         # [m] the shell
    height: np.ndarray           # [m] tangent to tangent
    pressure_drop: np.ndarray    # [Pa] gas pressure drop of the column
    figures: dict                # every figure of the internals, one array (or (n, solutes)) each

    @property
    def is_tray(self) -> np.ndarray:
        return self.internals < FIRST_PACKING


def _fill(dtype):
    if np.issubdtype(dtype, np.floating):
        return np.nan
    if dtype == bool:
        return False
    return -1


def _joined(n: int, parts: list[tuple[np.ndarray, dict]], fallback: dict) -> dict:
    """One figure table over n points from tables of parts (positions, figures); a key a part lacks is filled.

    Separation figures a part lacks come from ``fallback`` (the separated
    points' own); other keys get NaN, -1 or False.
    """
    keys: dict[str, np.ndarray] = {}
    for _, figures in parts:
        for key, value in figures.items():
            keys.setdefault(key, np.asarray(value))
    out = {}
    for key, first in keys.items():
        column = np.full((n,) + first.shape[1:], _fill(first.dtype), dtype=first.dtype)
        for index, figures in parts:
            if key in figures:
                column[index] = figures[key]
            elif key in SEPARATION_FIGURES and key in fallback:
                column[index] = fallback[key][index]
        out[key] = column
    return out


def _merged_row(parts: list[tuple[np.ndarray, ItemCost]], n: int, variants: tuple) -> ItemCost:
    """One equipment row over n points from rows of parts, each point keeping the variant that priced it."""
    out = {"size": np.empty(n), "purchased": np.empty(n), "bare_module": np.empty(n),
           "bare_module_base": np.empty(n), "in_range": np.empty(n, dtype=bool), "variant": np.empty(n, dtype=np.int8)}
    keys = [v.correlation for v in variants]
    for index, row in parts:
        for name in ("size", "purchased", "bare_module", "bare_module_base", "in_range"):
            out[name][index] = np.broadcast_to(getattr(row, name), np.shape(index))
        own = np.broadcast_to(row.variant, np.shape(index))
        mapping = np.array([keys.index(v.correlation) for v in row.variants], dtype=np.int8)
        out["variant"][index] = mapping[own]
    material = parts[0][1].material
    return ItemCost(variants[0], out["size"], out["purchased"], out["bare_module"], out["bare_module_base"],
                    out["in_range"], material, variants, out["variant"])


class ColumnInternals:
    """The trays (by the scenario's rule) and every [[packing]] of a case, as one set of internals alternatives.

    ``names`` lists them by index. The equipment rows are the same at every
    point of a case: the trays row, and where the case has packings the
    packing, distributor and support rows; a row that is not part of a
    design is its "unused" variant and costs nothing.
    """

    def __init__(self, case):
        from towercost.design import packed

        self.case = case
        self.trays = TrayChoice(case.tray, case.tray_spacing, case.flood_fraction, case.material, case.turndown,
                                case.valve_fallback, both=case.compete_tray_types)
        self.beds = tuple(packed.PackedBeds(case, c, FIRST_PACKING + p) for p, c in enumerate(case.packings))
        self.names = TRAY_TYPES + tuple(c.name for c in case.packings)
        self.tray_variants = self.trays.variants
        if self.beds:
            self.tray_variants += (packed.unused_spec(self.trays.variants[0], "trays"),)
            specs = tuple(b.spec for b in self.beds)
            distributor, support = packed.distributor_spec(), packed.support_spec()
            self.packed_rows = (specs + (packed.unused_spec(specs[0], "packing"),),
                                (distributor, packed.unused_spec(distributor, "distributors")),
                                (support, packed.unused_spec(support, "support plates")))
        else:
            self.packed_rows = ()

    @property
    def fallback(self) -> int | None:
        return self.trays.fallback

    def name(self, index: int) -> str:
        return self.names[int(index)]

    def resolved(self, internals, n: int) -> np.ndarray:
        """The internals index per point; None: the tray rule everywhere (or the first packing if trays are off)."""
        if internals is None:
            first = -1 if self.case.offer_trays or not self.beds else FIRST_PACKING
            return np.full(n, first, dtype=np.int8)
        return np.broadcast_to(np.asarray(internals, dtype=np.int8), (n,)).copy()

    def size(self, separation, diameter, internals=None, *, warnings: list[str] | None = None) -> Sizing:
        """Every point sized in its shell (``diameter`` [m], NaN: its least shell) with its internals."""
        diameter = np.asarray(diameter, dtype=float)
        n = diameter.size
        internals = self.resolved(internals, n)
        kinds = np.unique(np.where(internals < FIRST_PACKING, -1, internals))
        parts = []
        for kind in kinds:
            at = np.flatnonzero(internals < FIRST_PACKING) if kind < 0 else np.flatnonzero(internals == kind)
            whole = at.size == n
            part = separation if whole else separation.take(at)
            if kind < 0:
                sizing = self._trays(part, diameter[at], internals[at], warnings)
            else:
                sized = self.beds[int(kind) - FIRST_PACKING].size(part, diameter[at], warnings=warnings)
                figures = sized["figures"]
                figures.update(internals=np.full(at.size, kind, dtype=np.int8), tray_weight=np.zeros(at.size))
                for key in TRAY_FIGURES:
                    integer = key in ("tray_type", "range_governs")
                    figures[key] = np.full(at.size, -1 if integer else np.nan, dtype=np.int8 if integer else float)
                sizing = Sizing(np.full(at.size, kind, dtype=np.int8), sized["diameter"], figures["height"],
                                figures["pressure_drop"], figures)
            if whole:
                return sizing
            parts.append((at, sizing))
        figures = _joined(n, [(at, s.figures) for at, s in parts], separation.figures)
        out = Sizing(np.empty(n, np.int8), np.empty(n), np.empty(n), np.empty(n), figures)
        for at, s in parts:
            out.internals[at], out.diameter[at], out.height[at], out.pressure_drop[at] = (
                s.internals, s.diameter, s.height, s.pressure_drop)
        return out

    def _trays(self, separation, diameter, internals, warnings) -> Sizing:
        rule = None if np.all(internals < 0) else internals
        size, least = self.trays.size(separation.loads, separation.trays, diameter, rule, cache=separation.cache,
                                      warnings=warnings)
        figures = dict(
            flow_parameter=size.flow_parameter, flooding_velocity=size.flooding_velocity,
            diameter_required=size.diameter_required, diameter_flooding=least.flooding,
            diameter_least=least.diameter, fraction_of_flood=size.fraction_of_flood, tray_type=size.tray_type,
            weep_ratio=size.weep_ratio, entrainment=size.entrainment, backup_fraction=size.backup_fraction,
            residence_time=size.residence_time, range_use=size.range_use, range_governs=size.range_governs,
            height=size.height, pressure_drop_per_tray=size.pressure_drop_per_tray, pressure_drop=size.pressure_drop,
            internals=size.tray_type, can_widen=size.weep_ratio >= 1.0,
            tray_weight=vessel.tray_weight(size.diameter, separation.trays))
        if self.beds:
            n = size.diameter.size
            solutes = len(self.case.solutes)
            for key in PACKED_FIGURES:
                figures[key] = np.full(n, -1 if key == "beds" else np.nan,
                                       dtype=np.int16 if key == "beds" else float)
            for key in PACKED_PER_SOLUTE:
                figures[key] = np.full((n, solutes), np.nan)
        return Sizing(size.tray_type.astype(np.int8), size.diameter, size.height, size.pressure_drop, figures)

    def items(self, sizing: Sizing, count, *, warnings: list[str] | None = None) -> list[ItemCost]:
        """The internals' cost lines at every point: the trays row, then the packing rows where the case has them."""
        n = sizing.diameter.size
        tray_at = np.flatnonzero(sizing.is_tray)
        rows: list[list[tuple[np.ndarray, ItemCost]]] = [[] for _ in range(1 + len(self.packed_rows))]
        material = self.case.material
        if tray_at.size:
            whole = tray_at.size == n
            part = (slice(None) if whole else tray_at)
            trays = self.trays.items(sizing.diameter[part], np.asarray(count)[part], sizing.internals[part],
                                     warnings=warnings)[0]
            rows[0].append((tray_at, trays))
            for j, variants in enumerate(self.packed_rows):
                rows[j + 1].append((tray_at, _zero(variants, tray_at.size, variants[0].material)))
        for bed in self.beds:
            at = np.flatnonzero(sizing.internals == bed.index)
            if not at.size:
                continue
            figures = {key: sizing.figures[key][at] for key in ("packing_volume", "beds")}
            rows[0].append((at, _zero(self.tray_variants, at.size, material)))
            for j, row in enumerate(bed.items(sizing.diameter[at], figures, warnings=warnings)):
                rows[j + 1].append((at, row))
        variants = (self.tray_variants,) + self.packed_rows
        out = []
        for j, parts in enumerate(rows):
            if len(parts) == 1 and parts[0][0].size == n and parts[0][1].variants == variants[j]:
                out.append(parts[0][1])
            else:
                out.append(_merged_row(parts, n, variants[j]))
        return out


def _zero(variants: tuple, n: int, material: str) -> ItemCost:
    """The row's unused variant (its last) at n points: no cost."""
    from towercost.design.packed import zero_row

    return zero_row(variants[-1], variants, n, material)
