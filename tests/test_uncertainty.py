"""Tests for the Monte Carlo study (towercost.study): probability of meeting the spec, margins, re-optimization.

Oracles: the closed form of the probability for one solute with lognormal K
(the threshold K from the cascade's inverse, checked against the forward
cascade and against bisection); a zero spread against the deterministic
evaluation; a standard normal table value reproduced through the whole
sampled path; each sample's re-optimization against the exhaustive scan of
that sample's own case, priced by the flowsheet itself; the per-point
annualization against a loop of single-point annualizations.
"""

from __future__ import annotations

import dataclasses
import math
import tomllib
from pathlib import Path

import numpy as np
import pytest

import towercost
from towercost.design import cascade
from towercost.design.case import prepare
from towercost.design.column import SingleColumn
from towercost.design.costlines import annualize
from towercost.design.space import build_space
from towercost.models import economics as economics_models
from towercost.select.scan import scan
from towercost.study.fixed import Decisions, sample_design, sampled_case
from towercost.study.margin import cheapest_margin, rate_margin, trays_margin
from towercost.study.montecarlo import Chosen, monte_carlo
from towercost.study.pricing import annualize_points, price_factors
from towercost.study.reoptimize import reoptimize
from towercost.study.sampling import draw
from towercost.study.uncertainty import closed_form, study_design, three_standard_errors
from towercost.study.variation import agent_fields, replicate, with_economics

ROOT = Path(__file__).resolve().parents[1]
ABSORBER = ROOT / "scenarios" / "demo_absorber.toml"
STRIPPER = ROOT / "scenarios" / "demo_air_stripper.toml"


def raw(path=ABSORBER) -> dict:
    """A demo scenario as a dict, its packed beds left out: the studies cover tray columns."""
    data = tomllib.loads(path.read_text(encoding="utf-8"))
    data.pop("packing", None)
    return data


def one_solute(k_log_sd=0.2, lean=0.0, efficiency=0.5, spreads=None) -> towercost.scenario.Scenario:
    """The demo absorber cut to toluene and the glycol ether (K = 0.12 given), a fixed efficiency."""
    data = raw()
    data["feed"]["composition"] = {"toluene": "500 ppmv"}
    data.get("solute", {}).pop("p-xylene", None)
    data["spec"] = [data["spec"][0]]
    solvent = data["solvent"][2]
    solvent["k"] = {"toluene": 0.12}
    if lean:
        solvent["lean"] = {"toluene": lean}
    data["solvent"] = [solvent]
    data["column"]["efficiency"] = efficiency
    fixed = {"distribution": "fixed"}
    data["uncertainty"] = {"k": {"log_sd": k_log_sd}, "efficiency": fixed, "agent_price": fixed,
                           "disposal": fixed, "electricity": fixed, "steam": fixed, "cooling_water": fixed,
                           "credit": fixed, "cost_index": fixed, **(spreads or {})}
    return towercost.from_dict(data)


def design_at(scenario, trays, ratio, agent=0):
    case = prepare(scenario)
    flowsheet = SingleColumn(case)
    d = flowsheet.evaluate(np.array([agent]), np.array([trays]), np.array([ratio * flowsheet.rate_min[agent]]))
    return case, d, Decisions.of(d)


# --------------------------------------------------------------------------- the exact oracle


@pytest.mark.parametrize("trays, ratio", [(12, 1.6), (8, 2.0), (16, 2.0)])
def test_monte_carlo_agrees_with_the_closed_form_for_one_solute(trays, ratio):
    # Oracle: with lognormal K and a fixed design the spec holds exactly when K lies below the K giving the
    # spec outlet (Kremser inverse): P = Phi(ln f* / sigma). The estimate must lie within three standard errors.
    scenario = one_solute()
    case, d, design = design_at(scenario, trays, ratio)
    draws = draw(scenario.uncertainty, 1, case.solutes, 20_000, 11)
    study = study_design(scenario, case, design, draws, nominal_meets=bool(d.meets_spec[0]))
    cf = study.closed_form
    assert cf.available and cf.method.startswith("Kremser inverse")
    assert 0.01 < cf.probability < 0.99
    assert three_standard_errors(study.every_spec, cf.probability)


def test_the_threshold_k_gives_the_spec_outlet_and_bisection_finds_the_same():
    # Independent methods: the forward cascade at K* x nominal K leaves exactly the spec; bisection on the
    # forward cascade (the route taken for a lean agent or an O'Connell efficiency) finds the same K*.
    scenario = one_solute()
    case, d, design = design_at(scenario, 12, 1.6)
    draws = draw(scenario.uncertainty, 1, case.solutes, 10, 0)
    cf = closed_form(scenario, case, design, draws, True)
    f_star = cf.thresholds["toluene"]
    shifted = dataclasses.replace(case, k_value=case.k_value * f_star)
    outlet = cascade.outlet(shifted, np.array([0]), np.array([12]), np.array([design.rate]))[0]
    assert float(outlet[0, 0]) == pytest.approx(float(case.target[0]), rel=1e-10)
    lean = one_solute(lean=1e-12)          # a lean agent sends the threshold through bisection
    case2, _, design2 = design_at(lean, 12, 1.6)
    cf2 = closed_form(lean, case2, design2, draws, True)
    assert cf2.method.startswith("threshold K by bisection")
    assert cf2.thresholds["toluene"] == pytest.approx(f_star, rel=1e-6)


def test_lean_solvent_closed_form_by_bisection_agrees_with_monte_carlo():
    scenario = one_solute(lean=1e-5)
    case, d, design = design_at(scenario, 14, 1.5)
    draws = draw(scenario.uncertainty, 1, case.solutes, 20_000, 4)
    study = study_design(scenario, case, design, draws, nominal_meets=bool(d.meets_spec[0]))
    assert study.closed_form.available
    assert three_standard_errors(study.every_spec, study.closed_form.probability)


def test_stripper_closed_form_agrees_with_monte_carlo():
    # The same oracle for a stripper: the spec holds when K lies above its threshold (the demo stripper has a
    # given efficiency and two solutes; one shared factor per candidate gives the least of the two).
    data = raw(STRIPPER)
    data["uncertainty"] = {"efficiency": {"distribution": "fixed"}}
    scenario = towercost.from_dict(data)
    result = towercost.optimize(scenario, top=1, method="scan")
    case = result.case
    design = Decisions.of(result.designs)
    slower = dataclasses.replace(design, rate=design.rate * 1.15)
    draws = draw(scenario.uncertainty, len(case.agents), case.solutes, 20_000, 2)
    study = study_design(scenario, case, slower, draws, nominal_meets=True)
    assert study.closed_form.available, study.closed_form.method
    assert 0.05 < study.closed_form.probability < 0.999
    assert three_standard_errors(study.every_spec, study.closed_form.probability)


def test_two_solutes_with_independent_factors_multiply():
    # Oracle: independent K factors per solute give the product of the per-solute closed forms.
    data = raw()
    for solvent in data["solvent"]:
        solvent.pop("lean", None)
    data["column"]["efficiency"] = 0.4
    data["uncertainty"] = {"efficiency": {"distribution": "fixed"}, "k": {"log_sd": 0.25, "shared": "none"}}
    scenario = towercost.from_dict(data)
    case, d, design = design_at(scenario, 10, 1.8, agent=2)
    draws = draw(scenario.uncertainty, len(case.agents), case.solutes, 20_000, 9)
    study = study_design(scenario, case, design, draws, nominal_meets=bool(d.meets_spec[0]))
    cf = study.closed_form
    assert cf.available and "independent" in cf.method
    assert three_standard_errors(study.every_spec, cf.probability)
    each = [study.each_spec[s] for s in case.solutes]
    assert cf.probability == pytest.approx(np.prod([e.probability for e in each]), abs=0.03)


def test_sampled_efficiency_closed_form_by_quadrature_agrees_with_monte_carlo():
    # Oracle: with the efficiency lognormal too (the demo's defaults, O'Connell re-evaluated at each K), the
    # probability is the expectation over the efficiency factor of the K closed form (Gauss-Hermite).
    scenario = towercost.load(ABSORBER)
    result = towercost.optimize(scenario, top=1, method="scan")
    case, best = result.case, Decisions.of(result.designs)
    draws = draw(scenario.uncertainty, len(case.agents), case.solutes, 20_000, 5)
    for design in (best, dataclasses.replace(best, trays=20), dataclasses.replace(best, trays=12, rate=best.rate * 1.3)):
        study = study_design(scenario, case, design, draws, nominal_meets=True)
        assert study.closed_form.method.startswith("quadrature")
        assert three_standard_errors(study.every_spec, study.closed_form.probability)


def test_held_k_gives_a_threshold_on_the_efficiency():
    data = raw()
    data["uncertainty"] = {"k": {"distribution": "fixed"}}
    scenario = towercost.from_dict(data)
    result = towercost.optimize(scenario, top=1, method="scan")
    case, best = result.case, Decisions.of(result.designs)
    draws = draw(scenario.uncertainty, len(case.agents), case.solutes, 20_000, 6)
    study = study_design(scenario, case, dataclasses.replace(best, trays=18), draws, nominal_meets=True)
    assert study.closed_form.method.startswith("threshold efficiency")
    assert three_standard_errors(study.every_spec, study.closed_form.probability)


def test_partly_correlated_factors_have_no_closed_form():
    scenario = towercost.load(ABSORBER)
    case, d, design = design_at(scenario, 16, 1.5)
    data = raw()
    data["uncertainty"] = {"efficiency": {"distribution": "fixed"}, "k": {"log_sd": 0.2, "correlation": 0.5}}
    partly = towercost.from_dict(data)
    draws = draw(partly.uncertainty, len(case.agents), case.solutes, 10, 0)
    assert "correlated" in closed_form(partly, case, design, draws, True).method
    data["uncertainty"] = {"efficiency": {"log_sd": 0.1, "shared": "none", "correlation": 0.3}}
    apart = towercost.from_dict(data)
    draws = draw(apart.uncertainty, len(case.agents), case.solutes, 10, 0)
    assert not closed_form(apart, case, design, draws, True).available


# --------------------------------------------------------------------------- a published figure through the same path


@pytest.mark.parametrize("z, table", [(3.0, 0.99865), (2.0, 0.97725)])
def test_standard_normal_table_value_through_the_sampled_design(z, table):
    # Source: a standard normal table ("Standard Normal Probabilities", math.com tables): the area below
    # z = -3.00 is 0.00135, so Phi(3.00) = 0.99865, the 1350 ppm one-sided fallout of a centred process of
    # capability ratio Cp = 1 (D. C. Montgomery, Introduction to Statistical Quality Control, 6th ed.,
    # Table 8.2, value from memory); Phi(2.00) = 0.97725 (value from memory). Here ln K has the normal spread:
    # a design whose threshold K lies z standard deviations above the median K meets its spec with probability
    # Phi(z). The rate is set by the cascade's inverse; the probability then comes from the forward cascade of
    # every sample (the path of every fixed-design study) and from the closed form.
    sigma = 0.2
    scenario = one_solute(k_log_sd=sigma)
    case = prepare(scenario)
    trays = 12
    phi = float(cascade.target_fraction(case, np.array([0]))[0, 0])
    from towercost.models import kremser

    needed = float(kremser.factor_for_fraction(phi, trays * case.efficiency[0, 0]))
    k_star = case.k_value[0, 0] * math.exp(z * sigma)
    rate = float(case.service.rate_for_factor(needed, k_star, case.feed_flow))
    design = Decisions.of(SingleColumn(case).evaluate(np.array([0]), np.array([trays]), np.array([rate])))
    draws = draw(scenario.uncertainty, 1, case.solutes, 100_000, 2024)
    study = study_design(scenario, case, design, draws, nominal_meets=True)
    assert round(study.closed_form.probability, 5) == table
    assert abs(study.every_spec.probability - table) <= 3 * study.every_spec.standard_error


# --------------------------------------------------------------------------- zero spread, seeds, signs


@pytest.mark.parametrize("trays, ratio, meets", [(12, 1.6, False), (30, 1.6, True)])
def test_zero_spread_gives_exactly_the_deterministic_answer(trays, ratio, meets):
    fixed = {"distribution": "fixed"}
    scenario = one_solute(k_log_sd=0.0, spreads={"interest": fixed})
    case, d, design = design_at(scenario, trays, ratio)
    assert bool(d.meets_spec[0]) is meets
    draws = draw(scenario.uncertainty, 1, case.solutes, 500, 1)
    study = study_design(scenario, case, design, draws, nominal_meets=meets)
    assert study.every_spec.probability == (1.0 if meets else 0.0)
    assert study.every_spec.standard_error == 0.0
    assert study.closed_form.probability == (1.0 if meets else 0.0)
    np.testing.assert_allclose(study.sampled.annualized, d.annualized[0], rtol=1e-13)
    np.testing.assert_allclose(study.sampled.outlet, np.broadcast_to(d.outlet, study.sampled.outlet.shape),
                               rtol=1e-13)


def test_zero_spread_on_the_demo_with_oconnell_and_every_price():
    data = raw()
    fixed = {"distribution": "fixed"}
    data["uncertainty"] = {name: fixed for name in ("k", "efficiency", "agent_price", "disposal", "electricity",
                                                    "steam", "cooling_water", "credit", "cost_index")}
    scenario = towercost.from_dict(data)
    result = towercost.optimize(scenario, top=1, method="scan")
    case, best = result.case, result.designs
    draws = draw(scenario.uncertainty, len(case.agents), case.solutes, 300, 0)
    study = study_design(scenario, case, Decisions.of(best), draws, nominal_meets=True)
    assert study.every_spec.probability == 1.0
    np.testing.assert_allclose(study.sampled.annualized, best.annualized[0], rtol=1e-13)


def test_same_seed_same_answer_and_other_seeds_within_the_standard_error():
    scenario = towercost.load(ABSORBER)
    result = towercost.optimize(scenario, top=1, method="scan")
    case, design = result.case, Decisions.of(result.designs)
    runs = {}
    for seed in (1, 1, 2, 3):
        draws = draw(scenario.uncertainty, len(case.agents), case.solutes, 8_000, seed)
        runs.setdefault(seed, []).append(study_design(scenario, case, design, draws, nominal_meets=True))
    a, b = runs[1]
    np.testing.assert_array_equal(a.sampled.annualized, b.sampled.annualized)
    np.testing.assert_array_equal(a.sampled.outlet, b.sampled.outlet)
    assert a.every_spec == b.every_spec
    for other in (runs[2][0], runs[3][0]):
        assert not np.array_equal(other.sampled.annualized, a.sampled.annualized)
        combined = math.hypot(a.every_spec.standard_error, other.every_spec.standard_error)
        assert abs(a.every_spec.probability - other.every_spec.probability) <= 3 * combined


def test_dearer_steam_never_lowers_a_fixed_designs_cost():
    # Same samples, steam factor raised: every sample's cost rises or stays.
    scenario = towercost.load(ABSORBER)
    result = towercost.optimize(scenario, top=1, method="scan")
    case, design = result.case, Decisions.of(result.designs)
    draws = draw(scenario.uncertainty, len(case.agents), case.solutes, 2_000, 6)
    base = sample_design(scenario, case, design, draws).annualized
    for scale in (1.01, 1.5, 3.0):
        dearer = dataclasses.replace(draws, sample={**draws.sample, "steam": draws.sample["steam"] * scale})
        assert np.all(sample_design(scenario, case, design, dearer).annualized >= base)
        base = sample_design(scenario, case, design, dearer).annualized


def test_a_lower_k_never_lowers_an_absorbers_probability():
    # Common random numbers: with every K scaled down, each sample that met the spec still meets it.
    scenario = towercost.load(ABSORBER)
    result = towercost.optimize(scenario, top=1, method="scan")
    case, design = result.case, Decisions.of(result.designs)
    draws = draw(scenario.uncertainty, len(case.agents), case.solutes, 4_000, 8)
    meets = sample_design(scenario, case, design, draws).meets_spec
    for scale in (0.97, 0.9, 0.7):
        lower = dataclasses.replace(draws, k=draws.k * scale)
        now = sample_design(scenario, case, design, lower).meets_spec
        assert np.all(now >= meets)
        assert now.mean() > meets.mean()
        meets = now


# --------------------------------------------------------------------------- the machinery


def test_per_candidate_fields_are_those_that_follow_the_candidates():
    # Independent method: drop a candidate from the scenario and see which case arrays lose an entry.
    scenario = towercost.load(ABSORBER)
    full = prepare(scenario)
    fewer = prepare(scenario.model_copy(update={"solvent": scenario.solvent[:2]}))
    changed = {f.name for f in dataclasses.fields(full) if isinstance(getattr(full, f.name), np.ndarray)
               and np.shape(getattr(full, f.name)) != np.shape(getattr(fewer, f.name))}
    assert set(agent_fields(full)) == changed
    copies = replicate(full, [2, 2, 0])
    assert copies.agents == ("glycol ether", "glycol ether", "light wash oil")
    np.testing.assert_array_equal(copies.k_value, full.k_value[[2, 2, 0]])


def test_annualize_points_is_a_loop_of_single_point_annualizations():
    # Oracle: each point annualized on its own with its economics put in the case's Economics.
    scenario = towercost.load(ABSORBER)
    case = prepare(scenario)
    flowsheet = SingleColumn(case)
    rng = np.random.default_rng(3)
    n = 9
    agent = rng.integers(0, 3, n)
    d = flowsheet.evaluate(agent, rng.integers(6, 30, n), rng.uniform(1.1, 2.5, n) * flowsheet.rate_min[agent])
    index, interest = rng.uniform(0.8, 1.2, n), rng.uniform(0.7, 1.3, n)
    factor = rng.uniform(0.5, 2.0, (n, len(d.uses.specs)))
    together = annualize_points(d, case.economics, index=index, interest=interest, price_factor=factor)
    for i in range(n):
        eco = dataclasses.replace(case.economics, index_to=case.economics.index_to * index[i],
                                  capital_recovery=float(economics_models.capital_recovery_factor(
                                      case.economics.interest * interest[i], case.economics.life)))
        one = d.take(np.array([i]))
        alone = annualize(one.equipment, one.uses, eco, unit_price=one.uses.unit_price * factor[i])
        assert together.annualized[i] == pytest.approx(float(alone.annualized[0]), rel=1e-13)
        assert together.installed[i] == pytest.approx(float(alone.installed[0]), rel=1e-13)


def test_price_factors_name_rows_by_key():
    scenario = towercost.load(ABSORBER)
    case = prepare(scenario)
    d = SingleColumn(case).evaluate(np.array([0]), np.array([10]), np.array([20.0]))
    table = price_factors(d.uses, {"steam": np.array([2.0]), "agent_price": np.array([3.0])}, 1)
    keys = [s.key for s in d.uses.specs]
    assert table[0, keys.index("steam")] == 2.0 and table[0, keys.index("agent_purchase")] == 3.0
    assert table[0, keys.index("electricity")] == 1.0


def test_draws_follow_the_declared_spreads():
    # Sample moments against the declared distributions: lognormal ln-sd, triangular mean (a + b + c) / 3,
    # normal sd; a shared factor is the same for every solute of a candidate.
    data = raw()
    data["uncertainty"] = {"k": {"log_sd": 0.3}, "efficiency": {"log_sd": 0.1, "shared": "none"},
                           "steam": {"low": 0.5, "mode": 1.0, "high": 2.0}, "cost_index": {"sd": 0.1}}
    scenario = towercost.from_dict(data)
    d = draw(scenario.uncertainty, 3, ("toluene", "p-xylene"), 200_000, 1)
    np.testing.assert_array_equal(d.k[:, :, 0], d.k[:, :, 1])
    assert float(np.std(np.log(d.k[:, 0, 0]))) == pytest.approx(0.3, rel=0.01)
    assert float(np.median(d.k[:, 0, 0])) == pytest.approx(1.0, abs=0.005)
    assert abs(float(np.corrcoef(np.log(d.efficiency[:, 0, 0]), np.log(d.efficiency[:, 0, 1]))[0, 1])) < 0.01
    assert float(np.mean(d.sample["steam"])) == pytest.approx((0.5 + 1.0 + 2.0) / 3, rel=0.005)
    assert float(np.std(d.sample["cost_index"])) == pytest.approx(0.1, rel=0.01)
    assert np.all(d.sample["interest"] == 1.0)


# --------------------------------------------------------------------------- margins and re-optimization


def test_margin_designs_reach_the_confidence_and_one_step_less_does_not():
    scenario = towercost.load(ABSORBER)
    result = towercost.optimize(scenario, top=1, method="scan")
    case, best = result.case, result.designs
    design = Decisions.of(best)
    draws = draw(scenario.uncertainty, len(case.agents), case.solutes, 3_000, 5)
    base = float(best.annualized[0])
    by_trays = trays_margin(scenario, case, design, draws, 0.9, base)
    assert by_trays.meets.probability >= 0.9
    fewer = dataclasses.replace(by_trays.design, trays=by_trays.design.trays - 1)
    assert sample_design(scenario, case, fewer, draws).meets_spec.mean() < 0.9
    by_rate = rate_margin(scenario, case, design, draws, 0.9, base)
    assert by_rate.meets.probability >= 0.9
    less = dataclasses.replace(by_rate.design, rate=by_rate.design.rate * (1 - 1e-6))
    assert sample_design(scenario, case, less, draws).meets_spec.mean() < 0.9
    assert by_trays.extra_cost > 0 and by_rate.extra_cost > 0
    # both free: never dearer than either, and its rate one step lower misses the confidence
    cheapest = cheapest_margin(scenario, case, draws, 0.9, base)
    assert cheapest.meets.probability >= 0.9
    assert cheapest.extra_cost <= min(by_trays.extra_cost, by_rate.extra_cost) + 1e-6
    less = dataclasses.replace(cheapest.design, rate=cheapest.design.rate * (1 - 1e-6))
    assert sample_design(scenario, case, less, draws).meets_spec.mean() < 0.9


def _own_case(scenario, case, draws, i):
    """Sample i's case built without the replica machinery: K, efficiency and prices put on a plain case."""
    one = draws.take(np.array([i]))
    agents = np.arange(len(case.agents))
    c = sampled_case(scenario, case, agents, one, np.zeros(agents.size, int))
    factors = {name: float(v[0]) for name, v in one.sample.items()}
    factors.update({name: v[0] for name, v in one.agent.items()})
    return with_economics(c, factors)


@pytest.mark.parametrize("path", [ABSORBER, STRIPPER])
def test_each_samples_best_is_the_scan_of_its_own_case(path):
    # Oracle: the exhaustive scan of the sample's own case, priced by the flowsheet itself (prices in the case,
    # not re-priced per point), picks the same design at the same cost.
    scenario = towercost.load(path)
    case = prepare(scenario)
    draws = draw(scenario.uncertainty, len(case.agents), case.solutes, 4, 17)
    result = reoptimize(scenario, case, draws, [], [])
    for i in range(draws.samples):
        space = build_space(_own_case(scenario, case, draws, i))
        order, _ = scan(space, 1)
        best = space.designs(order)
        assert result.best["cost"][i] == pytest.approx(float(best.annualized[0]), rel=1e-12)
        assert (result.best["agent"][i], result.best["trays"][i]) == (int(best.agent[0]), int(best.trays[0]))
        assert result.best["diameter"][i] == pytest.approx(float(best.diameter[0]))
        assert result.best["rate"][i] == pytest.approx(float(best.rate[0]), rel=1e-12)


def test_regret_is_never_negative_where_the_design_meets_the_spec():
    scenario = towercost.load(ABSORBER)
    mc = monte_carlo(scenario, samples=400, seed=3, reoptimize_samples=6)
    ro = mc.reoptimized
    assert ro.samples == 6 and sum(w.count for w in ro.winners) == 6
    assert sum(ro.candidate_shares().values()) == pytest.approx(1.0)
    for g in ro.regrets:
        assert math.isnan(g.regret_when_met) or g.regret_when_met >= -1e-6
        assert 0.0 <= g.meets <= 1.0 and 0.0 <= g.wins <= 1.0
    assert mc.fixed.samples == 400
    assert [m.kind for m in mc.margins] == ["trays", "rate", "cheapest"]


def test_a_design_of_ones_own_and_a_rank():
    scenario = towercost.load(ABSORBER)
    mine = monte_carlo(scenario, Chosen(None, "heavy wash oil", 20, ratio=1.6), samples=200, reoptimize_samples=0)
    assert mine.case.agents[mine.fixed.design.agent] == "heavy wash oil" and mine.fixed.design.trays == 20
    second = monte_carlo(scenario, Chosen(rank=2), samples=200, reoptimize_samples=0)
    assert second.label.startswith("rank 2")
    with pytest.raises(towercost.ScenarioError):
        monte_carlo(scenario, Chosen(rank=500), samples=10, reoptimize_samples=0)
