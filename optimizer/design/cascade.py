"""The separation of a design: real trays and agent rate to outlets, and the rates a spec asks for.

Real trays become theoretical stages through the overall efficiency (given,
or O'Connell per solute), or through the Lewis relation from a Murphree
efficiency, which depends on the rate. The cascade itself, its inverse and
the minimum rate are those of ``towercost.models.kremser``, reached through
the case's ``Service``.
"""

from __future__ import annotations

import numpy as np

from towercost.design.case import Case
from towercost.design.limits import SPEC_TOLERANCE
from towercost.models import efficiency, equilibrium, kremser


def target_fraction(case: Case, agent):
    """Driving-force fraction phi each solute must reach, (..., n_solutes); >= 1 (inf) means no spec.

    NaN-free: a spec below what the entering agent allows gives phi <= 0.
    """
    eq = case.service.equilibrium_inlet(case.k_value[agent], case.lean[agent])
    with np.errstate(divide="ignore", invalid="ignore"):
        phi = np.where(np.isinf(case.target), np.inf,
                       kremser.driving_force_fraction(case.target, case.feed_in, eq))
    return np.where(case.feed_in > eq, phi, np.inf)


def minimum_rate(case: Case, agent):
    """Least agent rate with unlimited stages [mol/s], (...,): the pinch of the controlling solute."""
    per_solute = case.service.minimum_rate(case.feed_flow, case.k_value[agent], case.feed_in, case.target,
                                           case.lean[agent])
    return np.max(per_solute, axis=-1)


def stages(case: Case, agent, trays, factor):
    """Theoretical stages per solute, (..., n_solutes): real trays x overall efficiency."""
    trays = np.asarray(trays, dtype=float)[..., None]
    if case.murphree is None:
        return trays * case.efficiency[agent]
    return trays * efficiency.overall_from_murphree(case.murphree, case.service.slope_ratio(factor))


def outlet(case: Case, agent, trays, rate):
    """Treated-stream and agent outlet mole fractions, the factor and the stages, each (..., n_solutes)."""
    service = case.service
    k, lean = case.k_value[agent], case.lean[agent]
    factor = service.factor(rate, k, case.feed_flow)
    n = stages(case, agent, trays, factor)
    flowing = factor > 0
    treated, agent_out = service.outlets(np.where(flowing, factor, 1.0), n, case.feed_in, lean, k)
    treated = np.where(flowing, treated, case.feed_in)
    agent_out = np.where(flowing, agent_out, lean)
    return treated, agent_out, factor, n


def meets_spec(case: Case, treated_outlet) -> np.ndarray:
    """True where every solute's outlet meets its spec (within ``SPEC_TOLERANCE``)."""
    return np.all(treated_outlet <= case.target * (1.0 + SPEC_TOLERANCE), axis=-1)


def least_rate(case: Case, agent, trays):
    """Least agent rate [mol/s] meeting every spec with ``trays`` real trays, (...,); inf if none."""
    agent = np.asarray(agent)
    trays = np.asarray(trays, dtype=float)
    phi = target_fraction(case, agent)
    need = np.isfinite(phi) & (phi < 1.0)
    k = case.k_value[agent]
    if case.murphree is None:
        n = trays[..., None] * case.efficiency[agent]
        ok = need & (phi > 0)
        factor = kremser.factor_for_fraction(np.where(ok, phi, 0.5), np.where(ok, n, 1.0), strict=False)
        factor = np.where(need, np.where(ok, factor, np.inf), 0.0)
        return np.max(case.service.rate_for_factor(factor, k, case.feed_flow), axis=-1)
    # Murphree: the efficiency depends on the rate; bisect ln(rate) between the pinch and a wide bound.
    low = minimum_rate(case, agent)
    shape = np.broadcast_shapes(np.shape(low), trays.shape)
    low = np.broadcast_to(low, shape).astype(float)
    reachable = np.isfinite(low) & (low > 0)
    lo = np.log(np.where(reachable, low, 1.0))
    hi = np.log(np.where(reachable, low * 1e6, 1.0))

    def meets(rate):
        return meets_spec(case, outlet(case, agent, trays, rate)[0])

    meets_hi = meets(np.exp(hi))
    for _ in range(80):
        mid = 0.5 * (lo + hi)
        ok = meets(np.exp(mid))
        hi = np.where(ok, mid, hi)
        lo = np.where(ok, lo, mid)
    zero_need = np.broadcast_to(low == 0, shape)
    return np.where(zero_need, 0.0, np.where(reachable & meets_hi, np.exp(hi), np.inf))


def dilute_checks(case: Case, designs) -> list[str]:
    """Dilute-validity warnings for each design point given (use on a few chosen designs)."""
    messages: list[str] = []
    for i in range(len(designs)):
        streams = case.service.streams(case.feed_in, designs.outlet[i], case.lean[designs.agent[i]],
                                       designs.agent_outlet[i])
        for m in equilibrium.dilute_warnings(*streams, max_mole_fraction=case.max_dilute,
                                             max_flow_change=case.max_flow_change):
            if m not in messages:
                messages.append(m)
    return messages
