"""The exhaustive scan: every alternative evaluated, the feasible ones ordered by the tie key.

It is the oracle the selection model is held to (``tests/test_optimizer.py``)
and a method of its own (``towercost optimize --method scan``). The same
helpers give the model its reduced set: the first ``keep`` alternatives of
each candidate in tie order.

Distinct designs: the ranking can list one row per group of alternatives
(the same candidate and tray count, or the same candidate) at the group's
best rate and diameter. ``first_distinct`` gives the first ``keep`` groups
in tie order, each by its leader (its first alternative in tie order).
"""

from __future__ import annotations

import numpy as np

from towercost.design.reasons import infeasible_reason
from towercost.design.space import Space
from towercost.errors import InfeasibleSpec


def first_in_order(space: Space, index: np.ndarray, keep: int) -> np.ndarray:
    """The first ``keep`` of ``index`` in tie order (cost first), without sorting all of them."""
    index = np.asarray(index, dtype=int)
    if index.size > keep:
        cost = space.cost[index]
        kth = np.partition(cost, keep - 1)[keep - 1]
        index = index[cost <= kth]            # every alternative that can be among the first keep
    return space.tie_order(index)[:keep]


def first_distinct(space: Space, index: np.ndarray, keep: int, group: np.ndarray | None) -> np.ndarray:
    """The leaders of the first ``keep`` groups of ``index`` in tie order (``group``: a label per alternative).

    Looks at the first m alternatives in tie order for growing m: once they
    hold ``keep`` groups, those are the first ``keep`` groups, and each
    leader is the first of its group among them. ``group`` None: every
    alternative is its own group.
    """
    index = np.asarray(index, dtype=int)
    if group is None:
        return first_in_order(space, index, keep)
    m = keep
    while True:
        head = first_in_order(space, index, m)
        _, first = np.unique(group[head], return_index=True)
        leaders = head[np.sort(first)]
        if leaders.size >= keep or head.size == index.size:
            return leaders[:keep]
        m *= 4


def first_per_agent(space: Space, index: np.ndarray, keep: int) -> dict[int, np.ndarray]:
    """For each kind (candidate, and internals family where the case has packings: ``Space.kind``), the first
    ``keep`` of its alternatives in ``index``, in tie order."""
    index = np.asarray(index, dtype=int)
    kinds = space.kind[index]
    out = {}
    for a in np.unique(kinds):
        out[int(a)] = first_in_order(space, index[kinds == a], keep)
    return out


def scan(space: Space, top: int, distinct: np.ndarray | None = None) -> tuple[list[int], dict[int, int]]:
    """The ``top`` cheapest alternatives meeting every limit, and each kind's best (indices into ``space``).

    ``distinct`` (a group label per alternative of the space): the leaders of
    the ``top`` cheapest groups instead, one alternative per group.
    """
    feasible = np.flatnonzero(space.feasible)
    if feasible.size == 0:
        raise InfeasibleSpec(infeasible_reason(space))
    order = [int(i) for i in first_distinct(space, feasible, top, distinct)]
    best_of = {a: int(first[0]) for a, first in first_per_agent(space, feasible, 1).items()}
    return order, best_of
