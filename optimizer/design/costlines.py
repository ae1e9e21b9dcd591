"""Cost lines on an item axis: equipment rows and consumption rows, and the annualized cost built from them.

Each equipment item of a flowsheet is one row (``ItemSpec``): a tag of the
usual trade form, what it is, and the cost-table correlation that prices it.
``price_item`` prices one row over every design point from
``towercost.models.costing`` at the correlation's own cost basis; the rows
stack into an ``Equipment`` table of shape (design points, items), which is
escalated item by item from its own basis to the estimate's index.

Each consumption is one row (``UseSpec``): electricity, steam, cooling
water, agent make-up, disposal, and solute credits. A ``Uses`` table holds
the rate and the unit price of every row at every design point.

``annualize`` turns the two tables into installed capital, operating cost,
credit and total annualized cost. Its economic inputs may carry a leading
sample axis (shape ``(S,)``, or ``(S, n, c)`` for unit prices): the results
then have shape ``(S, n)``.

Adding an item: one row in ``models/data/equipment_cost.toml``, one
``ItemSpec`` and one call of ``price_item`` in the flowsheet that has it.
"""

from __future__ import annotations

from dataclasses import dataclass, fields

import numpy as np

from towercost.models import costing, economics


# --------------------------------------------------------------------------- equipment


@dataclass(frozen=True)
class ItemSpec:
    """One equipment row of a flowsheet."""

    key: str            # record key, e.g. "tower_shell"
    tag: str            # equipment tag, e.g. "T-101"
    kind: str           # what it is, in words, e.g. "tower shell"
    correlation: str    # row of models/data/equipment_cost.toml that prices it

    @property
    def _row(self) -> dict:
        return costing.load_cost_table()[self.correlation]

    @property
    def size_basis(self) -> str:
        return str(self._row["size"])

    @property
    def size_unit(self) -> str:
        return str(self._row["size_unit"])

    @property
    def source(self) -> str:
        return str(self._row["source"])

    @property
    def basis(self) -> float:
        return costing.cost_basis(self.correlation)


@dataclass
class ItemCost:
    """One equipment row priced over the design points, at its correlation's cost basis [USD]."""

    spec: ItemSpec
    size: np.ndarray              # in the correlation's size unit
    purchased: np.ndarray         # purchased cost, actual count (trays), base material
    bare_module: np.ndarray       # bare-module cost at the actual material and pressure
    bare_module_base: np.ndarray  # bare-module cost in carbon steel at ambient pressure (for C_GR)
    in_range: np.ndarray          # the size lies inside the correlation's fitted range
    material: str


def price_item(spec: ItemSpec, size, *, material: str = "carbon_steel", pressure_gauge=0.0, diameter=None,
               count=None, warnings: list[str] | None = None) -> ItemCost:
    """Price one equipment row with ``towercost.models.costing`` (purchased and bare-module cost).

    ``count`` is the number of identical pieces priced by one size (trays);
    ``pressure_gauge`` is the operating gauge pressure [Pa] (the pressure
    rise for a blower); ``diameter`` [m] is needed by vessels.
    """
    size = np.asarray(size, dtype=float)
    purchased = costing.purchased_cost(spec.correlation, size, warnings=warnings)
    if count is not None:
        purchased = purchased * count
    bare = costing.bare_module_cost(spec.correlation, size, material=material, pressure_gauge=pressure_gauge,
                                    diameter=diameter, trays=count)
    base = costing.bare_module_cost(spec.correlation, size, diameter=diameter, trays=count)
    return ItemCost(spec, size, purchased, bare, base, costing.size_in_range(spec.correlation, size), material)


@dataclass
class Equipment:
    """Equipment rows over design points: arrays of shape (n, items), at each row's own cost basis [USD]."""

    specs: tuple[ItemSpec, ...]
    materials: tuple[str, ...]
    size: np.ndarray
    purchased: np.ndarray
    bare_module: np.ndarray
    bare_module_base: np.ndarray
    in_range: np.ndarray
    basis: np.ndarray             # (items,) cost index of each row's correlation

    @classmethod
    def stack(cls, items: list[ItemCost]) -> "Equipment":
        n = np.broadcast_shapes(*(np.shape(i.bare_module) for i in items))

        def column(attr):
            return np.stack([np.broadcast_to(getattr(i, attr), n) for i in items], axis=-1).astype(
                bool if attr == "in_range" else float)

        return cls(tuple(i.spec for i in items), tuple(i.material for i in items), column("size"),
                   column("purchased"), column("bare_module"), column("bare_module_base"), column("in_range"),
                   np.array([i.spec.basis for i in items]))

    def take(self, index) -> "Equipment":
        return Equipment(self.specs, self.materials, self.size[index], self.purchased[index],
                         self.bare_module[index], self.bare_module_base[index], self.in_range[index], self.basis)

    @classmethod
    def concatenate(cls, parts: list["Equipment"]) -> "Equipment":
        first = parts[0]
        return cls(first.specs, first.materials,
                   *(np.concatenate([getattr(p, f.name) for p in parts])
                     for f in fields(cls) if f.name in ("size", "purchased", "bare_module", "bare_module_base",
                                                        "in_range")),
                   first.basis)

    def escalated(self, table: np.ndarray, index_to) -> np.ndarray:
        """An (n, items) cost table moved from each row's basis to ``index_to`` (broadcast: (S,) gives (S, n, items))."""
        target = np.asarray(index_to, dtype=float)[..., None, None]
        return costing.escalate(table, self.basis, target)


# --------------------------------------------------------------------------- consumptions


@dataclass(frozen=True)
class UseSpec:
    """One consumption row: what is used or credited, at what rate unit, priced per what."""

    key: str            # record key, e.g. "electricity"
    label: str          # in words
    rate_unit: str      # SI unit of the rate: W, kg/s, m3/s, mol/s
    price_unit: str     # SI unit of the unit price: USD/J, USD/kg, USD/m3, USD/mol
    credit: bool = False  # a credit (subtracted) rather than a cost


ELECTRICITY = UseSpec("electricity", "electricity", "W", "USD/J")
AGENT = UseSpec("agent_purchase", "agent purchase or make-up", "kg/s", "USD/kg")
DISPOSAL = UseSpec("disposal", "disposal or treatment", "kg/s", "USD/kg")
STEAM = UseSpec("steam", "regeneration steam", "kg/s", "USD/kg")
COOLING = UseSpec("cooling_water", "cooling water", "m3/s", "USD/m3")


def credit_spec(solute: str) -> UseSpec:
    return UseSpec(f"credit_{solute}", f"recovered {solute}", "mol/s", "USD/mol", credit=True)


@dataclass
class Uses:
    """Consumption rows over design points: rate and unit price, each (n, uses)."""

    specs: tuple[UseSpec, ...]
    rate: np.ndarray
    unit_price: np.ndarray

    @classmethod
    def stack(cls, rows: list[tuple[UseSpec, np.ndarray, np.ndarray]]) -> "Uses":
        n = np.broadcast_shapes(*(np.shape(r) for _, r, _ in rows), *(np.shape(p) for _, _, p in rows))
        return cls(tuple(s for s, _, _ in rows),
                   np.stack([np.broadcast_to(np.asarray(r, dtype=float), n) for _, r, _ in rows], axis=-1),
                   np.stack([np.broadcast_to(np.asarray(p, dtype=float), n) for _, _, p in rows], axis=-1))

    def take(self, index) -> "Uses":
        return Uses(self.specs, self.rate[index], self.unit_price[index])

    @classmethod
    def concatenate(cls, parts: list["Uses"]) -> "Uses":
        return cls(parts[0].specs, np.concatenate([p.rate for p in parts]),
                   np.concatenate([p.unit_price for p in parts]))

    def column(self, key: str) -> int:
        return [s.key for s in self.specs].index(key)


# --------------------------------------------------------------------------- annualized cost


@dataclass
class Annual:
    """Capital and yearly figures of design points; (n,) or, with sampled inputs, (S, n)."""

    purchased: np.ndarray         # (..., n, items) [USD] at the estimate's index
    bare_module_items: np.ndarray  # (..., n, items) [USD] at the estimate's index
    bare_module: np.ndarray       # [USD] sum over items
    total_module: np.ndarray      # [USD] with contingency and fee
    installed: np.ndarray         # [USD] grassroots, with auxiliary facilities
    use_cost: np.ndarray          # (..., n, uses) [USD/yr], credits positive
    operating: np.ndarray         # [USD/yr] sum of the cost rows
    credit: np.ndarray            # [USD/yr] sum of the credit rows
    capital_charge: np.ndarray    # [USD/yr] capital recovery x installed
    annualized: np.ndarray        # [USD/yr]


def _sample(value):
    """An economic input as an array whose trailing axis broadcasts against the design axis."""
    return np.asarray(value, dtype=float)[..., None]


def annualize(equipment: Equipment, uses: Uses, eco, unit_price=None) -> Annual:
    r"""Installed capital, operating cost, credit and total annualized cost.

        C_BM = sum_items C_BM,item I / I_item          (each item from its own basis)
        C_TM = (1 + contingency + fee) C_BM,  C_GR = C_TM + auxiliary C_BM0
        operating = sum_uses rate price hours,  credit likewise over the credit rows
        TAC = CRF C_GR + operating - credit

    through ``costing.escalate``, ``costing.installed_cost``,
    ``economics.electricity_cost``, ``economics.annual_utility_cost`` and
    ``economics.annualized_cost``.

    Parameters
    ----------
    equipment, uses : Equipment, Uses
        The cost lines of n design points.
    eco : towercost.design.case.Economics
        Interest-derived capital recovery, hours, cost index and factors;
        each may be a number or an array of shape (S,) (samples).
    unit_price : array_like, optional
        Unit prices overriding ``uses.unit_price``, broadcastable to
        (S, n, uses) or (n, uses).

    Returns
    -------
    Annual
        Arrays of shape (n,), or (S, n) where any input carries samples.
    """
    purchased = equipment.escalated(equipment.purchased, eco.index_to)
    bare_items = equipment.escalated(equipment.bare_module, eco.index_to)
    bare = bare_items.sum(axis=-1)
    base = equipment.escalated(equipment.bare_module_base, eco.index_to).sum(axis=-1)
    capital = costing.installed_cost(bare, contingency=_sample(eco.contingency), fee=_sample(eco.fee),
                                     auxiliary=_sample(eco.auxiliary), bare_module_base=base)
    price = uses.unit_price if unit_price is None else np.asarray(unit_price, dtype=float)
    hours = np.asarray(eco.hours, dtype=float)[..., None, None]
    rate = uses.rate
    columns = []
    for c, spec in enumerate(uses.specs):
        if spec.key == ELECTRICITY.key:  # priced per kWh by its own relation
            columns.append(economics.electricity_cost(rate[..., c], price[..., c] * 3.6e6, hours[..., 0]))
        else:
            columns.append(economics.annual_utility_cost(rate[..., c], price[..., c], hours[..., 0]))
    shape = np.broadcast_shapes(*(np.shape(col) for col in columns))
    use_cost = np.stack([np.broadcast_to(col, shape) for col in columns], axis=-1)
    is_credit = np.array([s.credit for s in uses.specs])
    operating = use_cost[..., ~is_credit].sum(axis=-1)
    credit = use_cost[..., is_credit].sum(axis=-1)
    recovery = _sample(eco.capital_recovery)
    installed = capital.grassroots
    annualized = economics.annualized_cost(installed, recovery, operating, credit)
    return Annual(purchased=purchased, bare_module_items=bare_items, bare_module=bare,
                  total_module=capital.total_module, installed=installed, use_cost=use_cost, operating=operating,
                  credit=credit, capital_charge=recovery * installed, annualized=annualized)
