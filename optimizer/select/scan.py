"""The exhaustive scan: every alternative evaluated, the feasible ones ordered by the tie key.

It is the oracle the selection model is held to (``tests/test_optimizer.py``)
and a method of its own (``towercost optimize --method scan``). The same
helpers give the model its reduced set: the first ``keep`` alternatives of
each candidate in tie order.
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


def first_per_agent(space: Space, index: np.ndarray, keep: int) -> dict[int, np.ndarray]:
    """For each candidate, the first ``keep`` of its alternatives in ``index``, in tie order."""
    index = np.asarray(index, dtype=int)
    out = {}
    for a in np.unique(space.agent[index]):
        out[int(a)] = first_in_order(space, index[space.agent[index] == a], keep)
    return out


def scan(space: Space, top: int) -> tuple[list[int], dict[int, int]]:
    """The ``top`` cheapest alternatives meeting every limit, and each candidate's best (indices into ``space``)."""
    feasible = np.flatnonzero(space.feasible)
    if feasible.size == 0:
        raise InfeasibleSpec(infeasible_reason(space))
    order = [int(i) for i in first_in_order(space, feasible, top)]
    best_of = {a: int(first[0]) for a, first in first_per_agent(space, feasible, 1).items()}
    return order, best_of
