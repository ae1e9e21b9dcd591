"""Exact reduction of a unit's alternatives before the selection model sees them.

An alternative can be dropped when at least ``keep`` other alternatives of
the same unit cost no more, come earlier in the tie order and use no more of
every shared resource: in any choice that holds it, each of those ``keep``
could take its place without breaking a shared limit or raising the cost, so
it cannot be part of the ``keep`` best choices. Dropping only such
alternatives keeps the model's top ``keep`` exact.

With no shared resource that leaves the first ``keep`` in tie order. With
one, the first ``keep`` Pareto layers of (cost, use) are kept: every member
of layer L has a dominator in each earlier layer, so anything outside the
first ``keep`` layers has at least ``keep`` dominators. With several, the
dominators of each alternative are counted among all cheaper ones (first
against the cheapest ``ANCHORS``, which settle most, then slice by slice for
the rest), and exactly those with ``keep`` or more are dropped.
"""

from __future__ import annotations

import numpy as np

#: How many of the cheapest alternatives are tried first as dominators when there are several resources.
ANCHORS = 256


def _layers(use: np.ndarray, keep: int) -> np.ndarray:
    """Positions (in cost order) in the first ``keep`` Pareto layers of (position, use)."""
    remaining = np.arange(use.size)
    kept = []
    for _ in range(keep):
        if remaining.size == 0:
            break
        values = use[remaining]
        before = np.minimum.accumulate(np.concatenate([[np.inf], values[:-1]]))
        front = values < before          # strictly below every earlier one: nothing earlier dominates it
        kept.append(remaining[front])
        remaining = remaining[~front]
    return np.sort(np.concatenate(kept)) if kept else np.zeros(0, int)


def _dominators(use: np.ndarray, positions: np.ndarray, anchors: np.ndarray, block: int = 1024) -> np.ndarray:
    """For each of ``positions``, how many of ``anchors`` (positions too) come earlier and use no more of anything."""
    count = np.zeros(positions.size, int)
    columns = [use[anchors, r] for r in range(use.shape[1])]
    for start in range(0, positions.size, block):
        rows = positions[start:start + block]
        dominated = anchors[None, :] < rows[:, None]                                # (b, A): earlier in order
        for r, anchor_use in enumerate(columns):
            dominated &= anchor_use[None, :] <= use[rows, r][:, None]               # and no more of resource r
        count[start:start + block] = np.count_nonzero(dominated, axis=1)
    return count


def _exact_count(use: np.ndarray, keep: int) -> np.ndarray:
    """Positions (in cost order) with fewer than ``keep`` dominators among all earlier positions.

    Tried first against the ``ANCHORS`` cheapest, which settle most; the rest
    are counted against every earlier position, in slices.
    """
    n = use.shape[0]
    positions = np.arange(n)
    count = _dominators(use, positions, positions[:ANCHORS])
    open_ = positions[(count < keep) & (positions > ANCHORS)]
    for start in range(ANCHORS, n, 4 * ANCHORS):           # the later anchors, slice by slice
        if open_.size == 0:
            break
        anchors = positions[start:start + 4 * ANCHORS]
        later = open_[open_ > anchors[0]]
        if later.size:
            count[later] += _dominators(use, later, anchors)
        open_ = open_[count[open_] < keep]
    return positions[count < keep]


def undominated(cost: np.ndarray, rank: np.ndarray, usage: dict[str, np.ndarray], keep: int) -> np.ndarray:
    """Indices of the alternatives that can be among the ``keep`` best choices, in tie order.

    ``cost`` and ``rank`` order the alternatives (cost first, then the tie
    rank); ``usage`` maps each shared resource to the alternatives' use of it.
    """
    order = np.lexsort((rank, cost))
    if keep < 1 or order.size == 0:
        return order[:0]
    if not usage:
        return order[:keep]
    use = np.stack([np.asarray(usage[name], dtype=float)[order] for name in sorted(usage)], axis=1)
    if use.shape[1] == 1:
        return order[_layers(use[:, 0], keep)]
    return order[_exact_count(use, keep)]
