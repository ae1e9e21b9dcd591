"""Column internals: what fills the shell, how it sizes the column and what it costs.

An internals object answers three questions for arrays of design points:

* ``size(loads, count, diameter)``: diameter (least standard size for the
  design flood, or a given shell), height, pressure drop, operating figures;
* ``larger(diameter, steps)``: the next standard sizes, when a wider shell
  is offered as a decision;
* ``items(sizing, count, ...)``: its own cost lines (the trays; a packing's
  bed, distributors and supports).

Trays are the internals today (sieve or valve, Fair's flooding correlation
with the tray hydraulics of ``towercost.models.hydraulics``); packings plug
in beside them with the same three methods.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from towercost.design.costlines import ItemCost, ItemSpec, price_item
from towercost.models import hydraulics


@dataclass(frozen=True)
class Loads:
    """The largest gas and liquid loads of the column and the phase properties, per design point."""

    gas_mass_flow: np.ndarray       # [kg/s]
    liquid_mass_flow: np.ndarray    # [kg/s]
    gas_density: np.ndarray         # [kg/m3]
    liquid_density: np.ndarray      # [kg/m3]
    surface_tension: np.ndarray     # [N/m]


@dataclass(frozen=True)
class Trays:
    """Sieve or valve trays at one spacing, sized at a design fraction of flood."""

    tray_type: str          # "sieve" or "valve" (models/data/tray_types.toml)
    spacing: float          # [m]
    flood_fraction: float   # design fraction of flood [-]
    material: str

    @property
    def item(self) -> ItemSpec:
        return ItemSpec("trays", "TR-101", f"{self.tray_type} trays", f"tray_{self.tray_type}")

    def size(self, loads: Loads, count, diameter=None, *, warnings: list[str] | None = None) -> hydraulics.ColumnSize:
        """Hydraulic sizing of ``count`` trays; ``diameter`` [m] given (NaN where the least size is wanted) or None."""
        common = dict(tray_spacing=self.spacing, flood_fraction=self.flood_fraction, tray_type=self.tray_type)
        args = (loads.gas_mass_flow, loads.liquid_mass_flow, loads.gas_density, loads.liquid_density,
                loads.surface_tension, count)
        if diameter is None or np.all(np.isnan(diameter)):
            return hydraulics.size_column(*args, **common, warnings=warnings)
        diameter = np.asarray(diameter, dtype=float)
        if np.any(np.isnan(diameter)):  # fill the gaps with the least standard size
            least = hydraulics.size_column(*args, **common).diameter
            diameter = np.where(np.isnan(diameter), least, diameter)
        return hydraulics.size_column(*args, **common, diameter=diameter, warnings=warnings)

    @staticmethod
    def larger(diameter, steps: np.ndarray) -> np.ndarray:
        """Standard diameters ``steps`` sizes above ``diameter`` [m], shape (n, len(steps))."""
        return hydraulics.standard_diameter(
            np.asarray(diameter)[:, None] + steps[None, :] * hydraulics.STANDARD_DIAMETER_STEP)

    def items(self, diameter, count, *, warnings: list[str] | None = None) -> list[ItemCost]:
        """The trays' cost line: per tray from the tower cross-section, times the count and its quantity factor."""
        area = math.pi / 4.0 * np.asarray(diameter, dtype=float) ** 2
        return [price_item(self.item, area, material=self.material, count=count, warnings=warnings)]
