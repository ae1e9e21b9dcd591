"""The scenario's limits, each stated once as ``value <= bound`` over design points.

Every limit of a one-column scenario is a property of one design (its
outlets, its flooding, its height, its cost...), so it is applied point by
point in numpy before any selection: the scan filters with it and the
selection model only ever sees alternatives that meet every one. Limits that
couple several units (a site's shared budget or steam cap) are stated in the
selection model instead (``towercost.select.model``).

A limit of one kind of internals (the trays' flooding and operating range, a
packing's flood, pressure drop, wetting, diameter ratio, temperature,
material, height) has the value -inf at the designs of the other kinds: it
does not apply there (``Limit.applies``). A packing's limits are stated as
uses (its figure over that packing's own bound, at most 1), so that one row
serves packings with different bounds.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from towercost.design.internals import FIRST_PACKING
from towercost.models import hydraulics

#: Relative slack on a spec or limit: rounding of the last digits, not engineering. A design whose
#: outlet is within this fraction above its spec meets it. The one definition used everywhere.
SPEC_TOLERANCE = 1e-9

#: Relative slack on the ratio range (L/Lmin or G/Gmin), which the space itself generates.
RATIO_TOLERANCE = 1e-12


@dataclass(frozen=True)
class Limit:
    """One limit of the scenario, stated point by point as ``values <= bound``."""

    name: str             # short key
    label: str            # what the user set, in words
    values: np.ndarray    # one per design point
    bound: float
    unit: str = ""        # of values and bound, for messages

    @property
    def met(self) -> np.ndarray:
        return self.values <= self.bound

    @property
    def is_spec(self) -> bool:
        return self.name.startswith("spec_")

    @property
    def applies(self) -> np.ndarray:
        """False at the design points whose internals the limit is not about."""
        return self.values != -np.inf


def limit_table(case, d) -> list[Limit]:
    """Every limit the scenario sets, over the design points ``d`` (a ``Designs``)."""
    lo, hi = case.ratio_range
    word = case.service.ratio_word
    slack = 1.0 + SPEC_TOLERANCE
    table = []
    for s, solute in enumerate(case.solutes):
        if np.isfinite(case.target[s]):
            table.append(Limit(f"spec_{s}", f"{solute} outlet spec", d.outlet[:, s], float(case.target[s] * slack)))
    table.append(Limit("ratio_low", f"{word} at least {lo:g}", -d.ratio, -lo * (1 - RATIO_TOLERANCE)))
    table.append(Limit("ratio_high", f"{word} at most {hi:g}", d.ratio, hi * (1 + RATIO_TOLERANCE)))
    trays = d.internals < FIRST_PACKING if case.packings else None

    def on(values, where):
        return values if where is None else np.where(where, values, -np.inf)

    if case.offer_trays:
        table.append(Limit("flood", f"fraction of flood at most {case.flood_fraction:g}",
                           on(d.fraction_of_flood, trays), case.flood_fraction * slack))
        table.append(Limit("operating_range", f"tray operating-range use (weeping at {100 * case.turndown:g} % of "
                           "the design loads, entrainment, downcomer back-up and residence time) at most 1",
                           on(d.range_use, trays), 1.0))
    if case.packings:
        table += packed_limits(case, d, ~trays, slack)
    optional = [
        ("max_height", "height", d.height, case.max_height, "m"),
        ("max_diameter", "diameter", d.diameter, case.max_diameter, "m"),
        ("shell_trays", "trays in the existing shell", on(d.trays.astype(float), trays), case.shell_max_trays, ""),
        ("capital_budget", "installed cost", d.installed, case.capital_budget, "USD"),
        ("max_power", "electric power", d.electric_power, case.max_power, "W"),
        ("max_steam", "steam", d.steam_rate, case.max_steam, "kg/s"),
        ("max_pressure_drop", "gas pressure drop", d.pressure_drop, case.max_pressure_drop, "Pa"),
    ]
    for name, what, values, bound, unit in optional:
        if bound is not None and np.isfinite(bound):
            table.append(Limit(name, f"{what} at most {bound:.4g} {unit}".strip(), values, float(bound) * slack, unit))
    if getattr(case, "loop", None) is not None:   # a loop design's regenerator column meets its own limits
        looped = d.loop_looped.astype(bool)
        table.append(Limit("regenerator", "regenerator within its limits (flood, operating range, height, diameter)",
                           np.where(looped, np.where(d.regenerator_ok, -1.0, 1.0), -np.inf), 0.0))   # met: -1, broken: 1
    if case.packings and case.shell_max_trays is not None:
        # a packed bed in an existing shell: no taller than the shell, the height its most trays would take
        shell = float(hydraulics.column_height(case.shell_max_trays, case.tray_spacing))
        table.append(Limit("shell_height", f"packed column height in the existing shell at most {shell:.4g} m (its "
                           f"{case.shell_max_trays} trays at {case.tray_spacing:.3g} m spacing)",
                           on(d.height, ~trays), shell * slack, "m"))
    return table


def _per_packing(case, d, values) -> np.ndarray:
    """A packing's own bound at each design point: ``values[p]`` of the design's packing (NaN at trays)."""
    table = np.append(np.asarray(values, dtype=float), np.nan)
    packing = np.where(d.internals >= FIRST_PACKING, d.internals - FIRST_PACKING, len(values))
    return table[packing]


def packed_limits(case, d, beds, slack) -> list[Limit]:
    """The limits of the packed beds, each as a use (figure over the design's packing's own bound) at most 1."""
    choices = case.packings
    limits = []

    def use(figure, bound, invert=False):
        bound = _per_packing(case, d, bound)
        with np.errstate(divide="ignore", invalid="ignore"):
            ratio = bound / figure if invert else figure / bound
        return np.where(beds, ratio, -np.inf)

    words = ", ".join(f"{c.name} {c.flood_fraction:g}" for c in choices)
    limits.append(Limit("packed_flood", f"packed-bed fraction of flood over its design fraction ({words}) at most 1",
                        use(d.fraction_of_flood, [c.flood_fraction for c in choices]), slack))
    words = ", ".join(f"{c.name} {c.pressure_drop_per_m:.4g} Pa/m" for c in choices)
    limits.append(Limit("packed_pressure_drop", f"packed-bed pressure drop per metre over its limit ({words}) at most 1",
                        use(d.pressure_drop_per_m, [c.pressure_drop_per_m for c in choices]), slack))
    limits.append(Limit("wetting", "minimum wetting rate (Morris and Jackson) over the liquid load at most 1",
                        np.where(beds, 1.0 / d.wetting_ratio, -np.inf), slack))
    words = ", ".join(f"{c.name} {c.data['min_diameter_ratio']:g}" for c in choices)
    limits.append(Limit("diameter_ratio", f"least diameter over packing size ({words}, common practice) over the "
                        "design's at most 1", use(d.diameter_ratio, [c.data["min_diameter_ratio"] for c in choices],
                                                  invert=True), slack))
    words = ", ".join(f"{c.name} {c.data['max_temperature'] - 273.15:.0f} degC" for c in choices)
    limits.append(Limit("packing_temperature", f"design temperature over the packing's limit ({words}, common "
                        "practice) at most 1", use(d.design_temperature, [c.data["max_temperature"] for c in choices]),
                        slack))
    if case.packing_materials is not None:
        allowed = [0.0 if c.data["material"] in case.packing_materials else 1.0 for c in choices]
        limits.append(Limit("packing_material", f"packing material among {', '.join(case.packing_materials)} "
                            "(0 allowed, 1 not)", np.where(beds, _per_packing(case, d, allowed), -np.inf), 0.0))
    for name, what, figure, attr in (("packing_height", "column height", d.height, "max_height"),
                                     ("packing_pressure_drop", "gas pressure drop", d.pressure_drop,
                                      "max_pressure_drop")):
        bounds = [getattr(c, attr) for c in choices]
        if any(b is not None for b in bounds):
            given = [np.inf if b is None else float(b) for b in bounds]
            words = ", ".join(f"{c.name} {b:.4g}" for c, b in zip(choices, bounds) if b is not None)
            limits.append(Limit(name, f"{what} over the packing's limit ({words}) at most 1",
                                np.where(beds, figure / _per_packing(case, d, given), -np.inf), slack))
    return limits


def limits_met(limits: list[Limit], n: int) -> np.ndarray:
    """True where a design point meets every limit of ``limits``."""
    ok = np.ones(n, dtype=bool)
    for limit in limits:
        ok &= limit.met
    return ok
