"""How sure a fixed design is: the probability of meeting every spec, and the spread of its outlets and cost.

The Monte Carlo estimate is the fraction of samples in which every solute's
outlet meets its spec, with the standard error of a proportion
(``towercost.models.probability``). Beside it, wherever one exists, the
closed form:

* The outlet of solute j rises steadily with its K (the factor A = L/(K V)
  falls, or S = K V / L rises for a stripper seen from the other side; an
  O'Connell efficiency re-evaluated at K and a lean agent move the same
  way), so the spec holds exactly when the K factor f_j lies on one side of
  a threshold f*_j: the factor at which the outlet equals the spec.
* For a clean agent and an efficiency that does not depend on K, f*_j comes
  from the cascade's inverse: F* = ``kremser.factor_for_fraction`` (spec /
  inlet, trays x efficiency), f* = F_nominal / F* (absorber) or F* / F_nominal
  (stripper). Otherwise the threshold is found by bisection on the forward
  cascade (monotone, to round-off).
* With lognormal K of ln-standard deviation sigma_j, P_j = Phi(ln f*_j / sigma_j)
  (absorber; 1 - that for a stripper); every spec together: the least P_j
  when one factor is shared (correlation 1), their product when the factors
  are independent.
* With the efficiency lognormal as well (one factor for the specified
  solutes, drawn apart from K), the probability is the expectation of that
  over the efficiency factor, by Gauss-Hermite quadrature, the thresholds
  found by bisection at each node; with K held, the threshold is on the
  efficiency factor itself (the spec holds above it).
* Other correlations have no closed form here, and the reason is reported.

The bisection searches ln f within ten standard deviations and a half of 0:
far outside, an O'Connell efficiency re-evaluated at K falls again as K
falls (the fit has its maximum near K M mu / rho = 0.08), and the outlet
need not rise with K any more.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from towercost.design import cascade
from towercost.design.case import Case
from towercost.models import kremser
from towercost.models.probability import probability_lognormal_below, proportion_standard_error
from towercost.scenario.schema import Scenario
from towercost.study.fixed import Decisions, Sampled, meets_each_spec, sample_design
from towercost.study.sampling import Draws
from towercost.study.variation import oconnell_agents, replicate, with_separation

#: Percentiles reported for outlets and cost.
PERCENTILES = (5.0, 50.0, 95.0)

#: Bisection steps on ln f for a threshold: the bracket [-40, 40] shrinks below 1e-15.
BISECTION_STEPS = 70

#: Gauss-Hermite nodes of the quadrature over an efficiency factor.
QUADRATURE_NODES = 48


@dataclass
class Estimate:
    """A probability estimated from samples, with its standard error."""

    probability: float
    standard_error: float
    samples: int

    @classmethod
    def of(cls, hits: np.ndarray) -> "Estimate":
        n = int(hits.size)
        p = float(np.count_nonzero(hits)) / n
        return cls(p, float(proportion_standard_error(p, n)), n)


@dataclass
class ClosedForm:
    """The exact probability where one exists, with the K-factor thresholds behind it."""

    probability: float | None
    method: str                              # how the thresholds were found, or why there is none
    thresholds: dict[str, float] = field(default_factory=dict)   # per spec solute: f* on the K factor

    @property
    def available(self) -> bool:
        return self.probability is not None


@dataclass
class FixedStudy:
    """A fixed design under the scenario's spreads."""

    case: Case
    design: Decisions
    sampled: Sampled
    seed: int
    every_spec: Estimate
    each_spec: dict[str, Estimate]           # per solute with a spec
    within_limits: Estimate
    closed_form: ClosedForm
    outlet_percentiles: np.ndarray           # (3, solutes) mole fractions at PERCENTILES
    cost_percentiles: np.ndarray             # (3,) [USD/yr]
    cost_mean: float
    notes: list[str]

    @property
    def samples(self) -> int:
        return self.every_spec.samples


def spec_solutes(case: Case, agent: int) -> list[int]:
    """The solutes whose spec asks for removal with this candidate (finite, below the inlet)."""
    phi = cascade.target_fraction(case, np.array([agent]))[0]
    return [s for s in range(len(case.solutes)) if np.isfinite(phi[s]) and phi[s] < 1.0]


def _grows_with_k(case: Case, design: Decisions) -> bool:
    """Whether the separation factor rises with K (a stripper) rather than falls (an absorber)."""
    k = case.k_value[design.agent]
    return bool(np.all(case.service.factor(design.rate, 2.0 * k, case.feed_flow)
                       > case.service.factor(design.rate, k, case.feed_flow)))


def _inverse_thresholds(case: Case, design: Decisions, solutes: list[int], grows: bool) -> np.ndarray:
    """f*_j from the cascade's inverse (clean agent, efficiency independent of K)."""
    a = design.agent
    phi = cascade.target_fraction(case, np.array([a]))[0, solutes]
    stages = design.trays * case.efficiency[a, solutes]
    needed = kremser.factor_for_fraction(phi, stages)
    nominal = case.service.factor(design.rate, case.k_value[a], case.feed_flow)[solutes]
    return needed / nominal if grows else nominal / needed


def _bisected_thresholds(scenario: Scenario, case: Case, design: Decisions, solutes: list[int], grows: bool,
                         efficiency=None, *, on_efficiency: bool = False, span: float = 40.0) -> np.ndarray:
    """f*_j by bisection on ln f of the forward cascade, one solute's K changed at a time.

    ``efficiency`` (m, solutes) gives m sets of efficiency factors (one row per quadrature node); the
    thresholds come back as (m, len(solutes)). With ``on_efficiency`` the factor bisected is the
    efficiency's instead (K nominal): the spec holds above it. The threshold is sought for ln f
    within +-``span``; a threshold outside comes back as the nearer end.
    """
    eff = np.ones((1, len(case.solutes))) if efficiency is None else np.asarray(efficiency, dtype=float)
    count = eff.shape[0] * len(solutes)
    lo, hi = np.full(count, -span), np.full(count, span)
    replica = replicate(case, np.full(count, design.agent))
    oconnell = oconnell_agents(scenario)[np.full(count, design.agent)]
    follows = scenario.uncertainty.efficiency_follows_k
    rows = np.arange(count)
    column = np.tile(np.array(solutes), eff.shape[0])
    factors = np.repeat(eff, len(solutes), axis=0)

    def meets(log_f):
        k = np.ones(replica.k_value.shape)
        e = factors
        if on_efficiency:
            e = np.ones(replica.k_value.shape)
            if case.murphree is None:
                e[rows, column] = np.exp(log_f)
            else:                       # one Murphree efficiency for every solute
                e = np.broadcast_to(np.exp(log_f)[:, None], e.shape)
        else:
            k[rows, column] = np.exp(log_f)
        varied = with_separation(replica, oconnell, k=k, efficiency=e, follows_k=follows)
        outlet = cascade.outlet(varied, rows, design.trays, design.rate)[0]
        return meets_each_spec(case, outlet)[rows, column]

    for _ in range(BISECTION_STEPS):
        mid = 0.5 * (lo + hi)
        ok = meets(mid)
        # the spec holds above the threshold when the factor grows with K (or for an efficiency), below otherwise
        above = ok if (grows or on_efficiency) else ~ok
        hi = np.where(above, mid, hi)
        lo = np.where(above, lo, mid)
    return np.exp(0.5 * (lo + hi)).reshape(eff.shape[0], len(solutes))


def _span(sigma) -> float:
    """Half-width in ln f searched for a threshold: ten standard deviations and a half (beyond, the
    probability is 0 or 1 to double precision). A wider search would leave the range where an
    O'Connell efficiency re-evaluated at K keeps the outlet rising with K (the fit has its maximum
    at K M mu / rho near 0.08)."""
    return 10.0 * float(np.max(sigma, initial=0.0)) + 0.5


def _combine(thresholds, sigma, grows: bool, shared: bool) -> np.ndarray:
    """Probability of meeting every spec for thresholds (..., solutes) on lognormal K factors."""
    below = probability_lognormal_below(thresholds, 1.0, sigma)
    each = below if not grows else 1.0 - below
    return np.min(each, axis=-1) if shared else np.prod(each, axis=-1)


def closed_form(scenario: Scenario, case: Case, design: Decisions, draws: Draws,
                deterministic: bool) -> ClosedForm:
    """The exact probability of meeting every spec, where the spreads allow one (see the module notes)."""
    spreads = draws.spreads
    k_spread = spreads["k"]
    if not draws.varies("k") and not draws.varies("efficiency"):
        return ClosedForm(1.0 if deterministic else 0.0, "no spread on K or efficiency: the nominal answer")
    solutes = spec_solutes(case, design.agent)
    if not solutes:
        return ClosedForm(1.0, "no spec asks for removal")
    sigma = np.array([k_spread.by_solute.get(case.solutes[s], k_spread.log_sd) for s in solutes])
    shared = len(solutes) == 1 or (k_spread.shared in ("candidate", "all") and k_spread.correlation == 1.0)
    independent = len(solutes) == 1 or k_spread.shared in ("none", "solute") or k_spread.correlation == 0.0
    if not (shared or independent):
        return ClosedForm(None, f"none: the K factors of the {len(solutes)} specified solutes are correlated "
                                f"with {k_spread.correlation:g}")
    grows = _grows_with_k(case, design)
    if draws.varies("efficiency"):
        e_spread = spreads["efficiency"]
        one = case.murphree is not None or len(solutes) == 1 or (
            e_spread.shared in ("candidate", "all") and e_spread.correlation == 1.0)
        apart = case.murphree is None and (e_spread.shared in ("none", "solute") or e_spread.correlation == 0.0)
        sigma_e = np.array([e_spread.by_solute.get(case.solutes[s], e_spread.log_sd) for s in solutes])
        if case.murphree is not None:
            sigma_e = np.full(sigma_e.shape, e_spread.by_solute.get(case.solutes[0], e_spread.log_sd))
        if not draws.varies("k") and (one or apart):
            thresholds = _bisected_thresholds(scenario, case, design, solutes, grows, on_efficiency=True,
                                              span=_span(sigma_e))[0]
            value = float(_combine(thresholds, sigma_e, True, one))
            return ClosedForm(value, "threshold efficiency by bisection on the Kremser cascade (K held)",
                              {case.solutes[s]: float(t) for s, t in zip(solutes, thresholds)})
        if not one:
            return ClosedForm(None, "none: the efficiencies of the specified solutes vary by more than one factor")
        # E[P(meet | efficiency factor)] over the efficiency's standard normal deviate, by Gauss-Hermite.
        z, weight = np.polynomial.hermite_e.hermegauss(QUADRATURE_NODES)
        every = np.array([e_spread.by_solute.get(s, e_spread.log_sd) for s in case.solutes])
        if case.murphree is not None:   # one Murphree factor per sample, that of the first solute
            every = np.full(every.shape, every[0])
        nodes = _bisected_thresholds(scenario, case, design, solutes, grows, np.exp(np.outer(z, every)),
                                     span=_span(sigma))
        value = float(np.dot(weight, _combine(nodes, sigma, grows, shared)) / math.sqrt(2.0 * math.pi))
        nominal = _bisected_thresholds(scenario, case, design, solutes, grows, span=_span(sigma))[0]
        method = (f"quadrature over the efficiency factor ({QUADRATURE_NODES} Gauss-Hermite nodes), threshold K "
                  "by bisection on the Kremser cascade at each")
        return ClosedForm(value, method, {case.solutes[s]: float(t) for s, t in zip(solutes, nominal)})
    a = design.agent
    clean = np.all(case.lean[a, solutes] == 0.0)
    follows = scenario.uncertainty.efficiency_follows_k and bool(oconnell_agents(scenario)[a])
    if clean and not follows and case.murphree is None:
        thresholds = _inverse_thresholds(case, design, solutes, grows)
        method = "Kremser inverse (kremser.factor_for_fraction) for the threshold K"
    else:
        thresholds = _bisected_thresholds(scenario, case, design, solutes, grows, span=_span(sigma))[0]
        method = "threshold K by bisection on the Kremser cascade"
    value = float(_combine(thresholds, sigma, grows, shared))
    method += "; one shared factor" if shared and len(solutes) > 1 else ""
    method += "; independent factors" if not shared else ""
    return ClosedForm(value, method, {case.solutes[s]: float(t) for s, t in zip(solutes, thresholds)})


def study_design(scenario: Scenario, case: Case, design: Decisions, draws: Draws, *,
                 nominal_meets: bool, progress=None) -> FixedStudy:
    """Monte Carlo of one fixed design, with the closed form beside the estimate where one exists."""
    notes: list[str] = []
    sampled = sample_design(scenario, case, design, draws, notes=notes, progress=progress)
    each = {case.solutes[s]: Estimate.of(sampled.meets_each[:, s]) for s in spec_solutes(case, design.agent)}
    return FixedStudy(
        case=case, design=design, sampled=sampled, seed=draws.seed,
        every_spec=Estimate.of(sampled.meets_spec), each_spec=each,
        within_limits=Estimate.of(sampled.within_limits & sampled.meets_spec),
        closed_form=closed_form(scenario, case, design, draws, nominal_meets),
        outlet_percentiles=np.percentile(sampled.outlet, PERCENTILES, axis=0),
        cost_percentiles=np.percentile(sampled.annualized, PERCENTILES),
        cost_mean=float(np.mean(sampled.annualized)), notes=list(dict.fromkeys(notes)),
    )


def three_standard_errors(estimate: Estimate, exact: float) -> bool:
    """Whether an estimate lies within three of its standard errors of an exact value (or equals it)."""
    se = estimate.standard_error
    if se == 0.0:
        se = math.sqrt(max(exact * (1.0 - exact), 0.0) / estimate.samples)
    return abs(estimate.probability - exact) <= 3.0 * se + 1e-15
