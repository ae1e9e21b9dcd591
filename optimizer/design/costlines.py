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

from dataclasses import dataclass

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
    def size_basis(self) -> str:
        return costing.correlation(self.correlation).size

    @property
    def size_unit(self) -> str:
        return costing.correlation(self.correlation).size_unit

    @property
    def source(self) -> str:
        return costing.correlation(self.correlation).source

    @property
    def basis(self) -> float:
        return costing.correlation(self.correlation).index_basis


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
    one = costing.purchased_cost(spec.correlation, size, warnings=warnings)
    bare = costing.bare_module_cost(spec.correlation, size, material=material, pressure_gauge=pressure_gauge,
                                    diameter=diameter, trays=count, purchased=one)
    base = costing.bare_module_cost(spec.correlation, size, diameter=diameter, trays=count, purchased=one)
    purchased = one if count is None else one * count
    return ItemCost(spec, size, purchased, bare, base, costing.size_in_range(spec.correlation, size), material)


def _table(rows, attr: str, dtype=float) -> np.ndarray:
    """The rows' ``attr`` arrays side by side: shape (n, rows)."""
    n = np.broadcast_shapes(*(np.shape(getattr(r, attr)) for r in rows))
    table = np.empty(n + (len(rows),), dtype=dtype)
    for j, row in enumerate(rows):
        table[..., j] = getattr(row, attr)
    return table


class Equipment:
    """Equipment rows over design points, each at its own cost basis [USD].

    Kept as the list of priced rows; the (n, items) tables (``size``,
    ``purchased``, ``bare_module``, ``bare_module_base``, ``in_range``) are
    laid out when first asked for.
    """

    def __init__(self, items: list[ItemCost]):
        self.items = list(items)
        self.specs = tuple(i.spec for i in self.items)
        self.materials = tuple(i.material for i in self.items)
        self.basis = np.array([spec.basis for spec in self.specs])   # (items,) cost index of each correlation
        self._tables: dict[str, np.ndarray] = {}

    stack = classmethod(lambda cls, items: cls(items))

    def _get(self, attr: str) -> np.ndarray:
        if attr not in self._tables:
            self._tables[attr] = _table(self.items, attr, bool if attr == "in_range" else float)
        return self._tables[attr]

    size = property(lambda self: self._get("size"))
    purchased = property(lambda self: self._get("purchased"))
    bare_module = property(lambda self: self._get("bare_module"))
    bare_module_base = property(lambda self: self._get("bare_module_base"))
    in_range = property(lambda self: self._get("in_range"))

    def take(self, index) -> "Equipment":
        return Equipment([ItemCost(i.spec, *(np.broadcast_to(getattr(i, a), np.shape(i.bare_module))[index]
                                             for a in ("size", "purchased", "bare_module", "bare_module_base",
                                                       "in_range")), i.material) for i in self.items])

    @classmethod
    def concatenate(cls, parts: list["Equipment"]) -> "Equipment":
        rows = []
        for j, item in enumerate(parts[0].items):
            pieces = [p.items[j] for p in parts]
            rows.append(ItemCost(item.spec, *(np.concatenate([np.broadcast_to(getattr(q, a), np.shape(q.bare_module))
                                                              for q in pieces])
                                              for a in ("size", "purchased", "bare_module", "bare_module_base",
                                                        "in_range")), item.material))
        return cls(rows)

    def escalation(self, index_to) -> np.ndarray:
        """Each row's factor from its own basis to ``index_to``: (items,), or (S, items) for sampled indices."""
        return costing.escalate(1.0, self.basis, np.asarray(index_to, dtype=float)[..., None])

    def escalated_sum(self, attr: str, index_to) -> np.ndarray:
        """Sum over rows of ``attr`` escalated to ``index_to``: (n,), or (S, n) for sampled indices."""
        factor = self.escalation(index_to)
        total = 0.0
        for j, item in enumerate(self.items):
            total = total + getattr(item, attr) * factor[..., j:j + 1]
        return total


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
class UseRow:
    """One consumption row over design points."""

    spec: UseSpec
    rate: np.ndarray          # in spec.rate_unit
    unit_price: np.ndarray    # in spec.price_unit


class Uses:
    """Consumption rows over design points; ``rate`` and ``unit_price`` as (n, uses) tables on demand."""

    def __init__(self, rows: list[UseRow]):
        self.rows = list(rows)
        self.specs = tuple(r.spec for r in self.rows)
        self._tables: dict[str, np.ndarray] = {}

    @classmethod
    def stack(cls, rows: list[tuple[UseSpec, np.ndarray, np.ndarray]]) -> "Uses":
        n = np.broadcast_shapes(*(np.shape(r) for _, r, _ in rows))
        return cls([UseRow(spec, np.broadcast_to(np.asarray(r, dtype=float), n),
                           np.broadcast_to(np.asarray(p, dtype=float), n)) for spec, r, p in rows])

    def _get(self, attr: str) -> np.ndarray:
        if attr not in self._tables:
            self._tables[attr] = _table(self.rows, attr)
        return self._tables[attr]

    rate = property(lambda self: self._get("rate"))
    unit_price = property(lambda self: self._get("unit_price"))

    def take(self, index) -> "Uses":
        return Uses([UseRow(r.spec, r.rate[index], r.unit_price[index]) for r in self.rows])

    @classmethod
    def concatenate(cls, parts: list["Uses"]) -> "Uses":
        return cls([UseRow(row.spec, np.concatenate([p.rows[j].rate for p in parts]),
                           np.concatenate([p.rows[j].unit_price for p in parts]))
                    for j, row in enumerate(parts[0].rows)])

    def column(self, key: str) -> int:
        return [s.key for s in self.specs].index(key)


# --------------------------------------------------------------------------- annualized cost


@dataclass
class Annual:
    """Capital and yearly figures of design points; (n,) or, with sampled inputs, (S, n)."""

    escalation: np.ndarray        # (..., items) factor from each row's basis to the estimate's index
    bare_module: np.ndarray       # [USD] sum over items, at the estimate's index
    total_module: np.ndarray      # [USD] with contingency and fee
    installed: np.ndarray         # [USD] grassroots, with auxiliary facilities
    use_cost: list[np.ndarray]    # per consumption row, (n,) or (S, n) [USD/yr], credits positive
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
    bare = equipment.escalated_sum("bare_module", eco.index_to)
    base = equipment.escalated_sum("bare_module_base", eco.index_to)
    capital = costing.installed_cost(bare, contingency=_sample(eco.contingency), fee=_sample(eco.fee),
                                     auxiliary=_sample(eco.auxiliary), bare_module_base=base)
    hours = _sample(eco.hours)
    price = None if unit_price is None else np.asarray(unit_price, dtype=float)
    columns = []
    for c, row in enumerate(uses.rows):
        p = row.unit_price if price is None else price[..., c]
        if row.spec.key == ELECTRICITY.key:  # priced per kWh by its own relation
            columns.append(economics.electricity_cost(row.rate, p * 3.6e6, hours))
        else:
            columns.append(economics.annual_utility_cost(row.rate, p, hours))
    shape = np.broadcast_shapes(*(np.shape(col) for col in columns))
    operating, credit = np.zeros(shape), np.zeros(shape)
    for row, col in zip(uses.rows, columns):
        if row.spec.credit:
            credit = credit + col
        else:
            operating = operating + col
    recovery = _sample(eco.capital_recovery)
    installed = capital.grassroots
    annualized = economics.annualized_cost(installed, recovery, operating, credit)
    return Annual(escalation=equipment.escalation(eco.index_to), bare_module=bare,
                  total_module=capital.total_module, installed=installed, use_cost=columns, operating=operating,
                  credit=credit, capital_charge=recovery * installed, annualized=annualized)
