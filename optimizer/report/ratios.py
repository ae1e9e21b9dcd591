"""Ratios to the minimum as printed: the digits a reader needs to type one back and get the same design.

A least-rate design sits on the spec: its ratio to the minimum rounded to
three decimals and typed back gives a rate a hair too low, and the design
misses the spec by rounding. ``ratio_texts`` prints each ratio rounded *up*
(so that the typed value never holds less agent) to the fewest decimals at
which, typed back with the same trays and diameter, the design meets every
spec and costs the same to the dollar per year. ``miss_note`` explains a
typed ratio that misses the spec and gives the least ratio that meets it.
"""

from __future__ import annotations

import math
from decimal import ROUND_CEILING, Decimal

import numpy as np

from towercost.design import cascade
from towercost.design.loop import flowsheet_for

#: Fewest and most decimals tried; past the most the shortest round-trip text is printed.
DECIMALS = (3, 12)

#: "The same cost": typed back, the annualized cost may differ by less than this [USD/yr].
SAME_COST = 0.5


def rounded_up(value: float, decimals: int) -> str:
    """``value`` rounded up (toward +inf) to ``decimals`` decimals, as text.

    >>> rounded_up(1.4853271, 3), rounded_up(1.5, 3)
    ('1.486', '1.500')
    """
    return str(Decimal(repr(float(value))).quantize(Decimal(1).scaleb(-decimals), rounding=ROUND_CEILING))


def ratio_texts(case, designs) -> list[str]:
    """For each design, its ratio to the minimum with the digits needed to reproduce it (see the module)."""
    n = len(designs)
    if n == 0:
        return []
    ratio = np.asarray(designs.ratio, dtype=float)
    texts = ["-" if not math.isfinite(r) else repr(float(r)) for r in ratio]
    finite = np.flatnonzero(np.isfinite(ratio) & (designs.rate_min > 0))
    if finite.size == 0:
        return texts
    steps = np.arange(DECIMALS[0], DECIMALS[1] + 1)
    candidates = [[rounded_up(ratio[i], int(k)) for k in steps] for i in finite]
    typed = np.array([[float(t) for t in row] for row in candidates])              # (m, steps)
    pick = np.repeat(finite, steps.size)
    internals = designs.internals[pick] if "internals" in designs.figures else None
    tried = flowsheet_for(case).evaluate(designs.agent[pick], designs.trays[pick],
                                        typed.ravel() * designs.rate_min[pick], designs.diameter[pick], internals)
    same = (tried.meets_spec & (np.abs(tried.annualized - designs.annualized[pick]) < SAME_COST)
            ).reshape(finite.size, steps.size)
    for row, i in enumerate(finite):
        hits = np.flatnonzero(same[row])
        if hits.size:
            texts[i] = candidates[row][hits[0]]
    return texts


def least_ratio(case, agent: int, trays: int) -> float:
    """The least ratio to the minimum that meets every spec with ``trays`` real trays (inf: none does)."""
    least = float(cascade.least_rate(case, np.array([agent]), np.array([trays]))[0])
    minimum = float(cascade.minimum_rate(case, np.array([agent]))[0])
    if not (math.isfinite(least) and minimum > 0):
        return math.inf
    return least / minimum


def miss_note(case, designs, typed: float | None) -> str | None:
    """For a design that misses the spec: whether the typed ratio missed by rounding, and the least that meets it.

    ``typed`` is the ratio the user gave (None when a rate was given).
    """
    if bool(designs.meets_spec[0]):
        return None
    word = case.service.ratio_word
    from towercost.report.records import is_packed

    if is_packed(designs, 0):
        return (f"no packed height meets the spec at this rate: it is at or below the least rate with unlimited "
                f"stages ({word} 1); give a larger {word}")
    a, trays = int(designs.agent[0]), int(designs.trays[0])
    least = least_ratio(case, a, trays)
    if not math.isfinite(least):
        return f"no {word} within reach meets the spec with {trays} trays; allow more trays"
    least_text = rounded_up(least, 6)
    if typed is not None:
        decimals = max(0, -Decimal(repr(float(typed))).as_tuple().exponent)
        if typed < least and least - typed < 10.0 ** -decimals:
            return (f"{word} {typed:g} misses the spec by rounding: with {trays} trays the least {word} that "
                    f"meets it is {least_text} (rounded up); give more digits, or the design identifier")
    return f"with {trays} trays the least {word} that meets the spec is {least_text} (rounded up)"
