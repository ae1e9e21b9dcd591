"""The scenario's limits, each stated once as ``value <= bound`` over design points.

Every limit of a one-column scenario is a property of one design (its
outlets, its flooding, its height, its cost...), so it is applied point by
point in numpy before any selection: the scan filters with it and the
selection model only ever sees alternatives that meet every one. Limits that
couple several units (a site's shared budget or steam cap) are stated in the
selection model instead (``towercost.select.model``).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

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
    table.append(Limit("flood", f"fraction of flood at most {case.flood_fraction:g}",
                       d.fraction_of_flood, case.flood_fraction * slack))
    table.append(Limit("operating_range", f"tray operating-range use (weeping at {100 * case.turndown:g} % of the "
                       "design loads, entrainment, downcomer back-up and residence time) at most 1",
                       d.range_use, 1.0))
    optional = [
        ("max_height", "height", d.height, case.max_height, "m"),
        ("max_diameter", "diameter", d.diameter, case.max_diameter, "m"),
        ("shell_trays", "trays in the existing shell", d.trays.astype(float), case.shell_max_trays, ""),
        ("capital_budget", "installed cost", d.installed, case.capital_budget, "USD"),
        ("max_power", "electric power", d.electric_power, case.max_power, "W"),
        ("max_steam", "steam", d.steam_rate, case.max_steam, "kg/s"),
    ]
    for name, what, values, bound, unit in optional:
        if bound is not None and np.isfinite(bound):
            table.append(Limit(name, f"{what} at most {bound:.4g} {unit}".strip(), values, float(bound) * slack, unit))
    return table


def limits_met(limits: list[Limit], n: int) -> np.ndarray:
    """True where a design point meets every limit of ``limits``."""
    ok = np.ones(n, dtype=bool)
    for limit in limits:
        ok &= limit.met
    return ok
