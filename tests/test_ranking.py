"""Distinct rankings, the band per candidate, design identifiers and printed ratios.

Truth comes from outside the code under test: enumeration of every joint
choice (the model's group cuts), plain-Python grouping of the whole space in
tie order (ranks and bands), and re-evaluation of the design a printed value
names (identifiers and ratios).
"""

from __future__ import annotations

import itertools
import math
from pathlib import Path

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from towercost.design.case import prepare
from towercost.design.space import build_space
from towercost.errors import ScenarioError
from towercost.report import ids, ratios
from towercost.scenario import load_scenario
from towercost.select import model, ranking

ROOT = Path(__file__).resolve().parents[1]
ABSORBER = ROOT / "scenarios" / "demo_absorber.toml"
STRIPPER = ROOT / "scenarios" / "demo_air_stripper.toml"


# --------------------------------------------------------------------------- the model's group cuts


@settings(max_examples=60, deadline=None, database=None, suppress_health_check=[HealthCheck.too_slow])
@given(seed=st.integers(0, 2**32 - 1), units=st.integers(1, 3), shared=st.booleans(), keep=st.sampled_from([1, 2, 4]))
def test_distinct_groups_match_brute_force(seed, units, shared, keep):
    # Independent method: enumeration of every joint choice; for each tuple of groups its cheapest
    # member choice within the shared limit, tuples sorted by that cost.
    rng = np.random.default_rng(seed)
    made, groups = [], []
    for u in range(units):
        n = int(rng.integers(3, 9))
        cost = np.round(rng.uniform(1, 10, n), 1)
        made.append(model.Unit(f"u{u}", cost, np.arange(n), {"r": np.round(rng.uniform(0, 5, n), 1)}))
        groups.append(rng.integers(0, 3, n))
    cap = float(rng.uniform(1.5, 4.0)) * units
    limits = [model.SharedLimit("r", "r", cap)] if shared else []
    best_of_tuple: dict[tuple, float] = {}
    for choice in itertools.product(*(range(len(u)) for u in made)):
        if shared and sum(u.usage["r"][d] for u, d in zip(made, choice)) > cap:
            continue
        key = tuple(int(g[d]) for g, d in zip(groups, choice))
        total = sum(u.cost[d] for u, d in zip(made, choice))
        best_of_tuple[key] = min(total, best_of_tuple.get(key, math.inf))
    expected = sorted(best_of_tuple.values())[:keep]
    if not expected:
        with pytest.raises(model.Infeasible):
            model.solve(made, limits, top=keep, distinct=groups)
        return
    got = model.solve(made, limits, top=keep, distinct=groups)
    np.testing.assert_allclose(got.objective, expected, rtol=1e-12)
    tuples = [tuple(int(g[d]) for g, d in zip(groups, choice)) for choice in got.choices]
    assert len(set(tuples)) == len(tuples)


# --------------------------------------------------------------------------- listings, ranks, band


@pytest.fixture(scope="module", params=[ABSORBER, STRIPPER], ids=["absorber", "stripper"])
def space(request):
    return build_space(prepare(load_scenario(request.param)))


def _leaders(space, groups):
    """Every group's first alternative in tie order, groups in order of their first (plain Python)."""
    first = {}
    for i in space.tie_order(np.flatnonzero(space.feasible)):
        first.setdefault(int(groups[i]) if groups is not None else int(i), int(i))
    return list(first.values())


@pytest.mark.parametrize("distinct", ranking.DISTINCT)
def test_per_candidate_best_rank_is_its_place_in_the_full_listing(space, distinct):
    # Each kind's best (candidate, and internals where the demo offers packings) takes the place in the
    # listing after every group led by a design before it in tie order (its own place if it leads a group).
    groups = ranking.listing_groups(space, distinct)
    listing = _leaders(space, groups)
    place = {int(i): k for k, i in enumerate(space.tie_order(np.flatnonzero(space.feasible)))}
    _, best_of = ranking.scan(space, 1, groups)
    for a, i in best_of.items():
        earlier = sum(place[j] < place[i] for j in listing)
        assert ranking.rank_in_listing(space, i, groups) == earlier + 1
        if i in listing:
            assert earlier == listing.index(i)


def test_band_per_candidate_is_the_designs_within_the_margin(space):
    best = float(space.cost[ranking.scan(space, 1)[0][0]])
    band = ranking.near_optimal_band(space, best, 0.03)
    inside = space.feasible & (space.cost <= best * 1.03)
    assert sum(r.count for r in band.by_agent) == band.count == int(inside.sum())
    ratio = space.ratio
    names = ["trays"] + [c.name for c in space.case.packings]
    for r in band.by_agent:
        mine = inside & (space.agent == space.case.agents.index(r.agent)) & (space.family == names.index(r.internals))
        assert r.trays == (int(space.trays[mine].min()), int(space.trays[mine].max()))
        assert r.ratio == (float(ratio[mine].min()), float(ratio[mine].max()))
        assert r.diameter == (float(space.diameter[mine].min()), float(space.diameter[mine].max()))
        assert r.cost[0] >= best and r.cost[1] <= best * 1.03


def test_default_listing_has_distinct_candidate_and_trays():
    result = ranking.optimize(load_scenario(ABSORBER), top=10)
    pairs = list(zip(result.designs.agent.tolist(), result.designs.trays.tolist()))
    assert len(set(pairs)) == 10
    fine = ranking.optimize(load_scenario(ABSORBER), top=10, distinct="variant")
    assert len(set(zip(fine.designs.agent.tolist(), fine.designs.trays.tolist()))) < 10   # repeats in the fine one
    assert result.designs.annualized[0] == fine.designs.annualized[0]


# --------------------------------------------------------------------------- identifiers


def test_identifier_round_trips_exactly():
    agents = ("light wash oil", "heavy wash oil")
    for rate in (17.817202366347182, 0.1 + 0.2, 1e-7 / 3, 12345.678901234567):
        for diameter in (78 * 0.0254, 2.1336, 0.4572):
            text = ids.design_id(agents, 1, 23, rate, diameter)
            back = ids.parse(text, agents)
            assert (back.agent, back.trays, back.rate, back.diameter) == ("heavy wash oil", 23, rate, diameter)


def test_candidate_keys_are_unique_and_ignore_order():
    names = ["Light wash oil", "light-wash-oil", "=HYPERLINK(\"x\")", "***"]
    keys = ids.candidate_keys(names)
    assert len(set(keys.values())) == 4
    assert keys == ids.candidate_keys(list(reversed(names)))
    assert all(k[0].isalnum() for k in keys.values())    # never a leading =, +, - or @


@pytest.mark.parametrize("text, fragment", [
    ("light-wash-oil:16tr:17.8", "four fields"),
    ("diesel:16tr:17.8:2.286", "'diesel'"),
    ("light-wash-oil:16:17.8:2.286", "'16tr'"),
    ("light-wash-oil:0tr:17.8:2.286", "'16tr'"),
    ("light-wash-oil:16tr:-17.8:2.286", "rate"),
    ("light-wash-oil:16tr:17.8:nan", "diameter"),
])
def test_bad_identifiers_say_what_is_wrong(text, fragment):
    with pytest.raises(ScenarioError) as raised:
        ids.parse(text, ("light wash oil",))
    assert fragment in str(raised.value)


# --------------------------------------------------------------------------- printed ratios


@pytest.mark.parametrize("path", [ABSORBER, STRIPPER], ids=["absorber", "stripper"])
def test_printed_ratio_typed_back_gives_the_same_design(path):
    # Independent check: each printed ratio, typed back through the public evaluate call with the
    # same trays and diameter, meets the spec and costs the same to the dollar per year.
    scenario = load_scenario(path)
    result = ranking.optimize(scenario, top=10)
    texts = ratios.ratio_texts(result.case, result.designs)
    for i, text in enumerate(texts):
        d = result.designs
        packing = ids.packing_of(result.case, d, i)
        _, again, _ = ranking.evaluate_design(scenario, result.case.agents[int(d.agent[i])], int(d.trays[i]),
                                              ratio=float(text), diameter=float(d.diameter[i]), internals=packing)
        assert bool(again.meets_spec[0])
        assert abs(float(again.annualized[0]) - float(d.annualized[i])) < 0.5
        assert float(text) >= float(d.ratio[i])                 # rounded up, never less agent


def test_ratio_rounded_to_three_decimals_misses_and_says_so():
    # The demo's best sits on the toluene spec: its ratio cut to three decimals holds too little solvent.
    scenario = load_scenario(ABSORBER)
    result = ranking.optimize(scenario, top=1)
    d = result.designs
    ratio, trays, agent = float(d.ratio[0]), int(d.trays[0]), result.case.agents[int(d.agent[0])]
    cut = math.floor(ratio * 1000) / 1000
    case, sheet, _ = ranking.evaluate_design(scenario, agent, trays, ratio=cut)
    assert not bool(sheet.meets_spec[0])
    note = ratios.miss_note(case, sheet, cut)
    assert "by rounding" in note
    least = float(note.split(" is ")[1].split()[0])
    assert least >= ratio and least - ratio < 1e-6
    _, ok, _ = ranking.evaluate_design(scenario, agent, trays, ratio=least)
    assert bool(ok.meets_spec[0])
    # a ratio far too low is not "rounding", but the least that meets the spec is still given
    case, low, _ = ranking.evaluate_design(scenario, agent, trays, ratio=1.1)
    assert "by rounding" not in ratios.miss_note(case, low, 1.1)
    assert ratios.rounded_up(ratio, 6) in ratios.miss_note(case, low, 1.1)
