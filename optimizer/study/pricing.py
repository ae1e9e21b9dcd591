"""The annualized cost of design points, each under its own sampled economics.

``towercost.design.costlines.annualize`` broadcasts economic inputs with a
leading sample axis against the design axis: S samples of the economics and
n design points give (S, n) costs. A study whose samples are themselves the
design points (a sampled K is a replica candidate) wants only the diagonal.
``annualize_points`` lays each point's equipment and consumption rows out as
one sample of a single design, shape (n, 1), so that the same ``annualize``
gives each point its own index, capital recovery and unit prices: (n, 1),
read as (n,). Rows are iterated over; new equipment or consumption rows are
priced without an edit here.

Price factors name consumption rows by their key (``PRICE_ROWS``); credit
rows (``credit_<solute>``) take the ``credit`` factor.
"""

from __future__ import annotations

import dataclasses

import numpy as np

from towercost.design.costlines import Annual, Equipment, ItemCost, Uses, annualize
from towercost.design.designs import Designs
from towercost.models import economics as economics_models

#: Study input -> the consumption row whose unit price it multiplies.
PRICE_ROWS = {"agent_price": "agent_purchase", "disposal": "disposal", "electricity": "electricity",
              "steam": "steam", "cooling_water": "cooling_water"}


def _column(value, n: int) -> np.ndarray:
    return np.broadcast_to(np.asarray(value), (n,))[:, None]


def _as_samples(equipment: Equipment, n: int) -> Equipment:
    """Each design point's equipment rows as one sample of one design: every numeric field (n, 1)."""
    rows = []
    for item in equipment.items:
        numeric = {f.name: _column(getattr(item, f.name), n) for f in dataclasses.fields(ItemCost)
                   if isinstance(getattr(item, f.name), (np.ndarray, float, int, bool, np.generic))}
        rows.append(dataclasses.replace(item, **numeric))
    return Equipment(rows)


def price_factors(uses: Uses, factors: dict[str, np.ndarray], n: int) -> np.ndarray:
    """(n, uses) factors on each consumption row's unit price, 1 where no factor is named."""
    table = np.ones((n, len(uses.specs)))
    by_row = {row: name for name, row in PRICE_ROWS.items()}
    for c, spec in enumerate(uses.specs):
        name = "credit" if spec.key.startswith("credit_") else by_row.get(spec.key)
        if name is not None and name in factors:
            table[:, c] = factors[name]
    return table


def annualize_points(designs: Designs, economics, *, index=None, interest=None, price_factor=None) -> Annual:
    """Capital and yearly figures of n design points, point i under its own economics.

    Parameters
    ----------
    designs : Designs
        n evaluated design points (``SingleColumn.evaluate``).
    economics : towercost.design.case.Economics
        The nominal economics.
    index, interest : array_like, optional
        Factors (n,) on the cost index and on the interest rate (the capital
        recovery factor is recomputed with ``economics.capital_recovery_factor``).
    price_factor : array_like, optional
        (n, uses) factors on each consumption row's unit price.

    Returns
    -------
    Annual
        Arrays of shape (n,).
    """
    n = len(designs)
    eco = economics
    changes = {}
    if index is not None:
        changes["index_to"] = eco.index_to * np.broadcast_to(np.asarray(index, dtype=float), (n,))
    if interest is not None:
        rate = eco.interest * np.broadcast_to(np.asarray(interest, dtype=float), (n,))
        changes["capital_recovery"] = economics_models.capital_recovery_factor(rate, eco.life)
    if changes:
        eco = dataclasses.replace(eco, **{k: np.asarray(v, dtype=float) for k, v in changes.items()})
    factor = np.ones((n, len(designs.uses.specs))) if price_factor is None else np.asarray(price_factor, float)
    uses = Uses([dataclasses.replace(row, rate=_column(row.rate, n), unit_price=_column(row.unit_price, n)
                                     * factor[:, c:c + 1]) for c, row in enumerate(designs.uses.rows)])
    annual = annualize(_as_samples(designs.equipment, n), uses, eco)
    squeeze = {f.name: getattr(annual, f.name) for f in dataclasses.fields(Annual)}
    for name, value in squeeze.items():
        if name == "use_cost":
            squeeze[name] = [np.asarray(col)[..., 0] for col in value]
        elif name != "escalation":
            squeeze[name] = np.broadcast_to(value, (n, 1))[:, 0]
    return Annual(**squeeze)
