"""The design space: separation figures against independent solutions, least rates, reduction."""

from __future__ import annotations

import copy
import tomllib
from pathlib import Path

import numpy as np
import pytest

from towercost.design import cascade
from towercost.design.case import Case, prepare
from towercost.design.column import SingleColumn
from towercost.design.space import build_space
from towercost.models import economics, kremser
from towercost.scenario import parse_scenario
from towercost.select import ranking

ROOT = Path(__file__).resolve().parents[1]
ABSORBER = tomllib.loads((ROOT / "scenarios" / "demo_absorber.toml").read_text(encoding="utf-8"))
STRIPPER = tomllib.loads((ROOT / "scenarios" / "demo_air_stripper.toml").read_text(encoding="utf-8"))


def case_of(data: dict, **column) -> Case:
    data = copy.deepcopy(data)
    data["column"].update(column)
    return prepare(parse_scenario(data, "test.toml"))


def murphree_cascade(n_trays, liquid, gas, k_value, murphree, gas_in, liquid_in):
    """Treated-gas outlet of n real trays with Murphree vapour efficiency, solved as a linear system.

    Independent of the Kremser relation and of the Lewis relation: the 2n
    equations are, for trays j = 1..n counted from the top,
    y_j - (1 - E) y_{j+1} - E K x_j = 0 and L x_{j-1} + V y_{j+1} = L x_j + V y_j,
    with x_0 the entering liquid and y_{n+1} the entering gas.
    """
    n = n_trays
    matrix = np.zeros((2 * n, 2 * n))
    rhs = np.zeros(2 * n)
    ix, iy = np.arange(n), n + np.arange(n)
    rows = np.arange(n)
    matrix[rows, iy] = 1.0
    matrix[rows, ix] = -murphree * k_value
    matrix[rows[:-1], iy[1:]] = -(1.0 - murphree)
    rhs[n - 1] = (1.0 - murphree) * gas_in
    balance = n + rows
    matrix[balance, ix] = -liquid
    matrix[balance, iy] = -gas
    matrix[balance[1:], ix[:-1]] = liquid
    matrix[balance[:-1], iy[1:]] = gas
    rhs[n] += -liquid * liquid_in
    rhs[2 * n - 1] += -gas * gas_in
    solution = np.linalg.solve(matrix, rhs)
    return solution[iy[0]], solution[ix[-1]]


@pytest.mark.parametrize("trays, ratio", [(4, 1.3), (12, 1.6), (25, 2.5)])
def test_murphree_absorber_matches_tray_by_tray_solution(trays, ratio):
    # Independent method: the real-tray balances with Murphree vapour efficiency
    # solved as a linear system (numpy.linalg.solve), lean solvent not solute-free.
    case = case_of(ABSORBER, efficiency={"murphree": 0.55})
    agent = 0
    rate = ratio * float(cascade.minimum_rate(case, np.array([agent]))[0])
    designs = SingleColumn(case).evaluate([agent], [trays], [rate])
    for s in range(len(case.solutes)):
        y_out, _ = murphree_cascade(trays, rate, case.feed_flow, case.k_value[agent, s], 0.55,
                                    case.feed_in[s], case.lean[agent, s])
        assert designs.outlet[0, s] == pytest.approx(y_out, rel=1e-9)


@pytest.mark.parametrize("trays", [3, 10, 30])
def test_murphree_stripper_matches_tray_by_tray_solution(trays):
    # The same linear system with the roles of the phases exchanged: the
    # stripping gas rises through the liquid feed. Unknowns solved for the
    # liquid leaving the bottom tray.
    case = case_of(STRIPPER, efficiency={"murphree": 0.7})
    agent = 0
    rate = 2.0 * float(cascade.minimum_rate(case, np.array([agent]))[0])
    designs = SingleColumn(case).evaluate([agent], [trays], [rate])
    for s in range(len(case.solutes)):
        _, x_out = murphree_cascade(trays, case.feed_flow, rate, case.k_value[agent, s], 0.7,
                                    case.lean[agent, s], case.feed_in[s])
        assert designs.outlet[0, s] == pytest.approx(x_out, rel=1e-9)


@pytest.mark.parametrize("efficiency", [0.4, "oconnell", {"murphree": 0.6}])
@pytest.mark.parametrize("data", [ABSORBER, STRIPPER], ids=["absorb", "strip"])
def test_least_rate_meets_the_binding_spec_exactly(data, efficiency):
    # The least rate at each tray count meets every spec, and the controlling
    # solute sits on its spec (to the bisection or Newton tolerance).
    case = case_of(data, efficiency=efficiency)
    trays = np.arange(6, 30)
    agents = np.zeros_like(trays)
    rate = cascade.least_rate(case, agents, trays)
    assert np.all(np.isfinite(rate))
    out = cascade.outlet(case, agents, trays, rate)[0]
    slack = out / case.target
    assert np.all(slack <= 1 + 1e-9)
    assert np.allclose(slack.max(axis=1), 1.0, rtol=1e-8)
    # a rate 0.1 % lower misses the spec
    out_low = cascade.outlet(case, agents, trays, rate * 0.999)[0]
    assert np.all((out_low / case.target).max(axis=1) > 1.0)


def test_minimum_rate_is_the_pinch_of_the_controlling_solute():
    # Independent form: kremser.minimum_liquid_rate for each solute, the largest governs.
    case = case_of(ABSORBER)
    for agent in range(len(case.agents)):
        each = [
            kremser.minimum_liquid_rate(case.feed_flow, case.k_value[agent, s], case.feed_in[s],
                                        case.target[s], case.lean[agent, s])
            for s in range(len(case.solutes))
        ]
        assert float(cascade.minimum_rate(case, np.array([agent]))[0]) == pytest.approx(max(map(float, each)), rel=1e-12)


def test_reduction_keeps_the_exact_top_k_under_binding_limits():
    # A budget and a diameter limit that bind: the model's k best over its reduced set
    # equal the k best of the whole space (exhaustive sort).
    data = copy.deepcopy(ABSORBER)
    data["economics"]["capital_budget"] = "700 kUSD"
    data["column"]["max_diameter"] = "2.2 m"
    space = build_space(prepare(parse_scenario(data, "test.toml")))
    cost = np.where(space.feasible, space.cost, np.inf)
    for k in (1, 5, 20):
        order, _, figures = ranking.select_by_model(space, k)
        np.testing.assert_array_equal(space.cost[order], np.sort(cost)[:k])
        assert figures["binaries"] < int(space.feasible.sum())


def test_wider_shell_runs_further_from_flood():
    # Each separated design point is priced at consecutive standard sizes (6 in steps) from
    # its least one; wider shells run further from flood with less pressure drop.
    case = case_of(ABSORBER)
    space = build_space(case)
    d = space.full()
    first = np.flatnonzero(space.least)[0]
    same = np.flatnonzero((d.agent == d.agent[first]) & (d.trays == d.trays[first]) & (d.rate == d.rate[first]))
    order = same[np.argsort(d.diameter[same])]
    assert order.size >= 3
    assert np.all(np.diff(d.fraction_of_flood[order]) < 0)
    assert np.all(np.diff(d.pressure_drop[order]) <= 0)    # valve trays: one estimating figure per tray
    np.testing.assert_allclose(np.diff(d.diameter[order]), 0.1524, rtol=1e-9)


def test_diameter_search_stops_after_two_rises_or_where_the_trays_weep():
    # The rule of SingleColumn.shells, read back from the space: for every separated point the
    # widest size tried is preceded by two rises in cost, or its trays weep (a packed bed falls
    # below its minimum wetting rate), or it hits the cap; so the cheapest size tried is never
    # the widest unless the operating range ends there. The demo absorber's packed bed included.
    from towercost.design.column import MAX_WIDER, RISES

    case = case_of(ABSORBER, trays=[6, 30], ratio_levels=8)
    space = build_space(case)
    d = space.full()
    assert np.any(space.internals >= 2) and np.any(space.internals < 2)
    key = np.stack([d.agent, d.internals >= 2, d.trays, d.rate.view(np.int64)], axis=1)
    _, point = np.unique(key, axis=0, return_inverse=True)
    for p in range(point.max() + 1):
        sizes = np.flatnonzero(point == p)
        sizes = sizes[np.argsort(d.diameter[sizes])]
        cost, last = d.annualized[sizes], sizes[-1]
        rose_twice = sizes.size > RISES and np.all(np.diff(cost[-RISES - 1:]) > 0)
        assert rose_twice or not d.can_widen[last] or sizes.size == 1 + MAX_WIDER
        if d.can_widen[last]:
            assert np.argmin(cost) < sizes.size - 1


# --------------------------------------------------------------------------- one source for each relation


def _random_designs(case: Case, rng: np.random.Generator, n: int = 400):
    """Random design points inside the case's search range, evaluated by the flowsheet."""
    agent = rng.integers(0, len(case.agents), n)
    trays = rng.integers(case.trays_range[0], case.trays_range[1] + 1, n)
    ratio = rng.uniform(1.02, 4.0, n)
    rate = ratio * cascade.minimum_rate(case, agent)
    return agent, trays, rate, SingleColumn(case).evaluate(agent, trays, rate)


@pytest.mark.parametrize("data", [ABSORBER, STRIPPER], ids=["absorb", "strip"])
def test_space_figures_are_the_models_own(data):
    # The flowsheet must call towercost.models, not re-derive it: its outlets, minimum rates
    # and yearly utility costs equal direct calls of kremser.absorb / strip,
    # kremser.minimum_liquid_rate / minimum_gas_rate, economics.annual_utility_cost and
    # economics.electricity_cost on random designs.
    case = case_of(data, efficiency=0.55)
    agent, trays, rate, d = _random_designs(case, np.random.default_rng(7))
    k, lean = case.k_value[agent], case.lean[agent]
    stages = trays[:, None] * 0.55
    if case.mode == "absorb":
        factor = rate[:, None] / (k * case.feed_flow)
        direct = kremser.absorb(factor, stages, case.feed_in, lean, k)
        treated, other = direct.gas_out, direct.liquid_out
        minimum = kremser.minimum_liquid_rate(case.feed_flow, k, case.feed_in, case.target, lean, strict=False)
    else:
        factor = k * rate[:, None] / case.feed_flow
        direct = kremser.strip(factor, stages, case.feed_in, lean, k)
        treated, other = direct.liquid_out, direct.gas_out
        minimum = kremser.minimum_gas_rate(case.feed_flow, k, case.feed_in, case.target, lean, strict=False)
    np.testing.assert_allclose(d.outlet, treated, rtol=1e-13, atol=0)
    np.testing.assert_allclose(d.agent_outlet, other, rtol=1e-13, atol=0)
    np.testing.assert_allclose(d.rate_min, np.nanmax(np.where(np.isfinite(case.target), minimum, 0.0), axis=1),
                               rtol=1e-13)
    eco = case.economics
    electricity = economics.electricity_cost(d.electric_power, eco.electricity * 3.6e6, eco.hours)
    steam = economics.annual_utility_cost(d.steam_rate, eco.steam, eco.hours)
    cooling = economics.annual_utility_cost(d.cooling_rate, eco.cooling_water, eco.hours)
    agent_cost = economics.annual_utility_cost(d.makeup_rate, case.price[agent], eco.hours)
    column = {spec.key: j for j, spec in enumerate(d.uses.specs)}
    np.testing.assert_allclose(d.use_cost[:, column["electricity"]], electricity, rtol=1e-13)
    np.testing.assert_allclose(d.use_cost[:, column["steam"]], steam, rtol=1e-13)
    np.testing.assert_allclose(d.use_cost[:, column["cooling_water"]], cooling, rtol=1e-13)
    np.testing.assert_allclose(d.use_cost[:, column["agent_purchase"]], agent_cost, rtol=1e-13)
    np.testing.assert_allclose(d.annualized, economics.annualized_cost(d.installed, eco.capital_recovery,
                                                                        d.operating, d.credit), rtol=1e-13)


# --------------------------------------------------------------------------- the diameter as a decision


def _generated_wide_shell_case(electricity: str, trays: list[int]) -> dict:
    """The demo absorber's light oil alone, dear power and cheap money, trays checked at the design loads.

    With no turndown asked of the sieve trays (turndown 1.0) a wider shell weeps only far
    from the least one, and dear power pays for the fan power a wider shell saves.
    """
    data = copy.deepcopy(ABSORBER)
    data.pop("packing")          # trays only: the search's rule for trays
    data["solvent"] = data["solvent"][:1]
    data["column"].update(trays=trays, ratio_levels=12, turndown=1.0, valve_fallback=False)
    data["economics"].update(electricity=electricity, interest=0.03)
    return data


@pytest.mark.parametrize("electricity", ["0.09 USD/kWh", "0.3 USD/kWh", "0.6 USD/kWh"])
@pytest.mark.parametrize("trays", [[8, 30], [10, 20]])
def test_diameter_search_finds_the_optimum_of_a_long_list_of_sizes(electricity, trays):
    # Independent method: the exhaustive scan over every point priced at its least size and 40
    # sizes above it (larger_diameters = 40, 6 ft of shells). The search (sizes upward until the
    # cost has risen twice in a row) must find the same best design; the old rule (the least
    # size and two above) misses it on these cases, with its best on the widest size it tried.
    from towercost.select.scan import scan

    base = _generated_wide_shell_case(electricity, trays)
    results = {}
    for larger in (None, 2, 40):
        data = copy.deepcopy(base)
        if larger is not None:
            data["column"]["larger_diameters"] = larger
        space = build_space(prepare(parse_scenario(data, "test.toml")))
        best = scan(space, 1)[0][0]
        results[larger] = (space, best)
    searched, best = results[None]
    long_list, reference = results[40]
    assert (int(searched.trays[best]), float(searched.rate[best]), float(searched.diameter[best])) == (
        int(long_list.trays[reference]), float(long_list.rate[reference]), float(long_list.diameter[reference]))
    assert searched.cost[best] == pytest.approx(long_list.cost[reference], rel=1e-12)
    assert len(searched) < len(long_list) / 4
    model_order, _, _ = ranking.select_by_model(searched, 1)
    assert model_order == [best]
    old, old_best = results[2]
    if electricity != "0.09 USD/kWh" or trays == [8, 30]:
        assert old.cost[old_best] > searched.cost[best] * (1 + 1e-6)
        same = (old.agent == old.agent[old_best]) & (old.trays == old.trays[old_best]) & (old.rate == old.rate[old_best])
        assert old.diameter[old_best] == old.diameter[same].max()


def test_space_stays_within_its_estimate_and_compact():
    case = case_of(ABSORBER)
    space = build_space(case)
    assert len(space) <= SingleColumn(case).estimate()
    kept = sum(getattr(space, name).nbytes for name in ("agent", "trays", "rate", "diameter", "internals", "cost",
                                                         "feasible", "least"))
    assert kept / len(space) == 35       # int32, int32, float, float, int8, float, bool, bool


def test_no_best_of_the_demo_sits_on_the_widest_shell_tried():
    for data in (ABSORBER, STRIPPER):
        result = ranking.optimize(parse_scenario(copy.deepcopy(data), "test.toml"), top=5, method="scan")
        space = build_space(result.case)
        for designs in (result.designs, result.per_agent):
            for i in range(len(designs)):
                same = ((space.agent == designs.agent[i]) & (space.trays == designs.trays[i])
                        & (space.rate == designs.rate[i]))
                assert designs.diameter[i] < space.diameter[same].max()
