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

A row may switch correlation from one design point to the next (a gas
mover is a fan up to the fan row's pressure range and a blower priced by
fluid power above it; trays are sieve or valve trays): its ``variants``
name the specs it switches between (same key, tag and cost basis) and
``variant`` says which one priced each point (``merge_rows``).
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


#: The per-point arrays of an ``ItemCost``.
ITEM_ARRAYS = ("size", "purchased", "bare_module", "bare_module_base", "in_range", "variant")


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
    variants: tuple[ItemSpec, ...] = ()   # the specs the row switches between; () is ``spec`` alone
    variant: np.ndarray | None = None     # index into ``variants`` per point (None: all the first)

    def __post_init__(self):
        if not self.variants:
            self.variants = (self.spec,)
        if self.variant is None:
            self.variant = np.zeros(np.shape(self.bare_module), dtype=np.int8)
        if len(self.variants) > 1 and len({v.basis for v in self.variants}) != 1:
            raise ValueError(f"the variants of {self.spec.key} must share one cost basis")

    def take(self, index) -> "ItemCost":
        shape = np.shape(self.bare_module)
        return ItemCost(self.spec, *(np.broadcast_to(getattr(self, a), shape)[index] for a in ITEM_ARRAYS[:5]),
                        self.material, self.variants, np.broadcast_to(self.variant, shape)[index])

    def spec_at(self, i: int) -> ItemSpec:
        """The spec (correlation, kind) that priced design point ``i``."""
        return self.variants[int(np.broadcast_to(self.variant, np.shape(self.bare_module))[i])]

    def scaled(self, factor: float, spec: ItemSpec | None = None) -> "ItemCost":
        """The row with every cost multiplied by ``factor`` (an allowance on a new item's cost)."""
        return ItemCost(spec or self.spec, self.size, self.purchased * factor, self.bare_module * factor,
                        self.bare_module_base * factor, self.in_range, self.material,
                        (spec,) if spec is not None else self.variants, self.variant)


def price_item(spec: ItemSpec, size, *, material: str = "carbon_steel", pressure_gauge=0.0, diameter=None,
               count=None, warnings: list[str] | None = None) -> ItemCost:
    """Price one equipment row with ``towercost.models.costing`` (purchased and bare-module cost).

    ``count`` is the number of identical pieces priced by one size (trays);
    ``pressure_gauge`` is the operating gauge pressure [Pa] (the pressure
    rise for a blower); ``diameter`` [m] is needed by vessels. Every
    out-of-range message (size, pressure factor) goes to ``warnings``.
    """
    size = np.asarray(size, dtype=float)
    local: list[str] | None = None if warnings is None else []
    one = costing.purchased_cost(spec.correlation, size, warnings=local)
    bare = costing.bare_module_cost(spec.correlation, size, material=material, pressure_gauge=pressure_gauge,
                                    diameter=diameter, trays=count, purchased=one, warnings=local)
    base = costing.bare_module_cost(spec.correlation, size, diameter=diameter, trays=count, purchased=one)
    purchased = one if count is None else one * count
    if local:   # each message names the item it is about
        warnings.extend(f"{spec.tag} {spec.kind}: {message}" for message in local)
    return ItemCost(spec, size, purchased, bare, base, costing.size_in_range(spec.correlation, size), material)


def merge_rows(parts: list[tuple[np.ndarray, ItemCost]], n: int, spec: ItemSpec,
               variants: tuple[ItemSpec, ...]) -> ItemCost:
    """One row over ``n`` points from rows priced on parts of them.

    ``parts`` pairs the positions of each part with its row; each part's
    spec must be one of ``variants``, which the merged row's ``variant``
    indexes. The material is the first part's.
    """
    out = {"size": np.empty(n), "purchased": np.empty(n), "bare_module": np.empty(n),
           "bare_module_base": np.empty(n), "in_range": np.empty(n, dtype=bool),
           "variant": np.empty(n, dtype=np.int8)}
    keys = [v.correlation for v in variants]
    for index, row in parts:
        for name in ITEM_ARRAYS[:-1]:
            out[name][index] = np.broadcast_to(getattr(row, name), np.shape(index))
        out["variant"][index] = keys.index(row.spec.correlation)
    material = parts[0][1].material if parts else "carbon_steel"
    return ItemCost(spec, out["size"], out["purchased"], out["bare_module"], out["bare_module_base"],
                    out["in_range"], material, variants, out["variant"])


def price_gas_mover(fan: ItemSpec, blower: ItemSpec, volumetric_flow, pressure_rise, *,
                    material: str = "carbon_steel", warnings: list[str] | None = None) -> ItemCost:
    r"""The machine that moves a gas stream: a fan up to the fan row's pressure range, a blower above it.

        dP <= 16 kPa:  ``fan`` row, sized on the inlet flow Q, with its pressure factor F_P(dP)
        dP >  16 kPa:  ``blower`` row, sized on the fluid power Q dP (``costing.fluid_power``)

    as ``towercost.models.costing.gas_mover_bare_module_cost`` prices it
    (``costing.FAN_RISE_LIMIT``); here each point also keeps its purchased
    cost, size and range flag. Points above the fan's range get a warning
    naming the step in cost the two rows make there.
    """
    flow, rise = (np.asarray(a, dtype=float) for a in np.broadcast_arrays(volumetric_flow, pressure_rise))
    above = rise > costing.FAN_RISE_LIMIT
    variants = (fan, blower)
    if not np.any(above):
        row = price_item(fan, flow, material=material, pressure_gauge=rise, warnings=warnings)
        return ItemCost(fan, row.size, row.purchased, row.bare_module, row.bare_module_base, row.in_range,
                        material, variants)
    if warnings is not None:
        warnings.append(
            f"{fan.tag} gas mover: pressure rise of {int(above.sum())} of {above.size} points ({float(rise[above].min()) / 1e3:.4g}"
            f" to {float(rise[above].max()) / 1e3:.4g} kPa) is above the {costing.FAN_RISE_LIMIT / 1e3:g} kPa of the fan "
            "correlation's pressure factor; priced as a centrifugal blower by fluid power (Turton Table A.1), a row that "
            "does not meet the fan's at 16 kPa: expect a step in cost there")
    parts = []
    fan_at = np.flatnonzero(~above)
    if fan_at.size:
        parts.append((fan_at, price_item(fan, flow[fan_at], material=material, pressure_gauge=rise[fan_at],
                                         warnings=warnings)))
    blower_at = np.flatnonzero(above)
    parts.append((blower_at, price_item(blower, costing.fluid_power(flow[blower_at], rise[blower_at]),
                                        material=material, warnings=warnings)))
    return merge_rows(parts, flow.size, fan, variants)


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
        self.specs = tuple(i.spec for i in self.items)   # each row's first spec: key, tag
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

    def spec_at(self, i: int, j: int) -> ItemSpec:
        """The spec (correlation, kind) that priced row ``j`` at design point ``i``."""
        return self.items[j].spec_at(i)

    def take(self, index) -> "Equipment":
        return Equipment([i.take(index) for i in self.items])

    @classmethod
    def concatenate(cls, parts: list["Equipment"]) -> "Equipment":
        rows = []
        for j, item in enumerate(parts[0].items):
            pieces = [p.items[j] for p in parts]
            variants = item.variants
            for q in pieces:
                if q.variants != variants:
                    raise ValueError(f"row {item.spec.key}: parts switch between different correlations")
            rows.append(ItemCost(item.spec, *(np.concatenate([np.broadcast_to(getattr(q, a), np.shape(q.bare_module))
                                                              for q in pieces])
                                              for a in ITEM_ARRAYS[:5]), item.material, variants,
                                 np.concatenate([np.broadcast_to(q.variant, np.shape(q.bare_module)) for q in pieces])))
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
