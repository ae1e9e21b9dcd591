"""Why no alternative qualifies: one line in the user's terms, with the best reachable figures."""

from __future__ import annotations

import numpy as np

from towercost.design import cascade
from towercost.design.limits import SPEC_TOLERANCE
from towercost.design.space import Space
from towercost.scenario.units import mole_fraction_text


def _unreachable(space: Space) -> str:
    """No alternative meets the spec at all: per candidate, what it reaches at the most trays and rate."""
    case = space.case
    word = case.service.ratio_word
    n_max, (_, hi) = case.trays_range[1], case.ratio_range
    if case.shell_max_trays is not None:
        n_max = min(n_max, case.shell_max_trays)
    parts = []
    agents = np.asarray(space.agents, dtype=int)
    rate = hi * cascade.minimum_rate(case, agents)
    # An agent whose lean loading already exceeds a spec has no finite minimum rate; its
    # outlet is not needed (the message names the lean loading), so evaluate it at any rate.
    out = cascade.outlet(case, agents, np.full(agents.shape, n_max), np.where(np.isfinite(rate), rate, 1.0))[0]
    for row, a in enumerate(agents):
        name = case.agents[a]
        if not np.isfinite(rate[row]):
            eq = case.service.equilibrium_inlet(case.k_value[a], case.lean[a])
            lean = [case.solutes[s] for s in range(len(case.solutes))
                    if np.isfinite(case.target[s]) and eq[s] >= case.target[s]]
            parts.append(f"{name!r}: its lean loading alone holds {', '.join(lean)} above the spec")
            continue
        misses = [
            f"{case.solutes[s]} {mole_fraction_text(out[row, s])} (spec {mole_fraction_text(case.target[s])})"
            for s in range(len(case.solutes)) if out[row, s] > case.target[s] * (1 + SPEC_TOLERANCE)
        ]
        reached = ", ".join(misses) if misses else "the spec only with a rate outside the ratio range"
        parts.append(f"{name!r} reaches {reached} even at {n_max} trays and {hi:g} x {word.split('/')[1]}")
    return ("no design meets the spec: " + "; ".join(parts)
            + "; allow more trays, a wider ratio range, a leaner solvent or another candidate")


def infeasible_reason(space: Space) -> str:
    """Why no alternative of ``space`` qualifies, with the best reachable figures, in one line."""
    if len(space) == 0 or not np.any(space.least) or space.spec_met == 0:
        return _unreachable(space)
    reasons = []
    for name, floor in space.floors.items():
        if floor.least > floor.bound:
            reasons.append(f"the least {floor.label.split(' at most')[0]} of any design meeting the spec is "
                           f"{floor.least:.4g} {floor.unit}".rstrip() + f", above the limit ({floor.label})")
            if name == "operating_range":
                reasons[-1] += ("; valve trays have a wider turndown ([column] tray = \"valve\", or "
                                "valve_fallback = true with sieve trays)")
    if not reasons:
        labels = [f.label for f in space.floors.values()]
        reasons.append("no single design meets every limit at once (" + "; ".join(labels) + ")")
    return "no design meets the spec within the limits: " + "; ".join(reasons)
