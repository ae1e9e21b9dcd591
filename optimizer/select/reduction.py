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
first ``keep`` layers has at least ``keep`` dominators. With several, an
alternative is dropped when ``keep`` of the cheapest alternatives (the
anchors) dominate it; that is sound, if less thorough.
"""

from __future__ import annotations

import numpy as np

#: How many of the cheapest alternatives are tried as dominators when there are several resources.
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


def _anchored(use: np.ndarray, keep: int, block: int = 2048) -> np.ndarray:
    """Positions (in cost order) with fewer than ``keep`` dominators among the first ``ANCHORS``."""
    anchors = use[:ANCHORS]                                   # (A, R)
    kept = []
    for start in range(0, use.shape[0], block):
        rows = use[start:start + block]                       # (b, R)
        dominated = np.all(anchors[None, :, :] <= rows[:, None, :], axis=2)    # (b, A)
        earlier = np.arange(anchors.shape[0])[None, :] < np.arange(start, start + rows.shape[0])[:, None]
        count = np.count_nonzero(dominated & earlier, axis=1)
        kept.append(start + np.flatnonzero(count < keep))
    return np.concatenate(kept)


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
    return order[_anchored(use, keep)]
