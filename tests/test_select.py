"""The selection model over several units with shared limits, against brute force over the joint choices.

Truth comes from enumeration: every pair (or triple) of alternatives is
priced by summing the units' exact costs, filtered by the shared limits and
sorted; the model's k best joint choices must cost the same. The exact
reduction is held to the same oracle.
"""

from __future__ import annotations

import copy
import itertools
import tomllib
from pathlib import Path

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from towercost.design.case import prepare
from towercost.design.space import build_space
from towercost.scenario import parse_scenario
from towercost.select import model
from towercost.select.reduction import undominated

ROOT = Path(__file__).resolve().parents[1]


def _small_space(path: str, **column):
    raw = tomllib.loads((ROOT / path).read_text(encoding="utf-8"))
    raw["column"].update(column)
    return build_space(prepare(parse_scenario(copy.deepcopy(raw), path)), keep=("installed", "steam_rate"))


def _unit(space, name: str) -> model.Unit:
    kept = space.tie_order(np.flatnonzero(space.feasible))
    return model.Unit(name, cost=space.cost[kept], rank=np.arange(kept.size),
                      usage={"installed": space.usage["installed"][kept]}, label=kept)


def _brute_force(units: list[model.Unit], budget: float, top: int) -> list[float]:
    """The ``top`` least total costs over every joint choice within the shared budget (enumeration)."""
    totals = []
    for choice in itertools.product(*(range(len(u)) for u in units)):
        spend = sum(u.usage["installed"][d] for u, d in zip(units, choice))
        if spend <= budget:
            totals.append(sum(u.cost[d] for u, d in zip(units, choice)))
    return sorted(totals)[:top]


@pytest.fixture(scope="module")
def two_units():
    absorber = _small_space("scenarios/demo_absorber.toml", trays=[8, 16], ratio_levels=4, larger_diameters=1)
    stripper = _small_space("scenarios/demo_air_stripper.toml", trays=[4, 12], ratio_levels=4, larger_diameters=1)
    return [_unit(absorber, "absorber"), _unit(stripper, "stripper")]


def test_two_units_with_a_shared_budget_match_brute_force(two_units):
    # Independent method: enumeration of every joint choice (about 10^4 pairs).
    units = two_units
    free = [u.usage["installed"][int(np.argmin(u.cost))] for u in units]
    budget = 0.97 * sum(free)           # the stand-alone bests together break it
    expected = _brute_force(units, budget, 5)
    got = model.solve(units, [model.SharedLimit("budget", "installed", budget, "site capital budget")], top=5)
    np.testing.assert_allclose(got.objective, expected, rtol=1e-12)
    for choice in got.choices:
        assert sum(u.usage["installed"][d] for u, d in zip(units, choice)) <= budget
    assert got.objective[0] > sum(float(u.cost.min()) for u in units)   # the budget bites


def test_shared_budget_that_does_not_bite_gives_the_stand_alone_bests(two_units):
    units = two_units
    loose = 10.0 * sum(float(u.usage["installed"].max()) for u in units)
    got = model.solve(units, [model.SharedLimit("budget", "installed", loose)], top=1)
    assert got.choices[0] == tuple(int(np.argmin(u.cost)) for u in units)


def test_no_joint_choice_within_the_budget_is_reported(two_units):
    with pytest.raises(model.Infeasible):
        model.solve(two_units, [model.SharedLimit("budget", "installed", 1.0)], top=1)


def test_reduced_units_keep_the_joint_top_k(two_units):
    # The reduction drops alternatives with at least k dominators; the model over the
    # reduced units must give the same k best joint costs as the brute force over all.
    units = two_units
    budget = 0.97 * sum(float(u.usage["installed"][int(np.argmin(u.cost))]) for u in units)
    reduced = []
    for u in units:
        keep = undominated(u.cost, u.rank, u.usage, 4)
        reduced.append(model.Unit(u.name, u.cost[keep], u.rank[keep], {"installed": u.usage["installed"][keep]}))
        assert keep.size < len(u)
    got = model.solve(reduced, [model.SharedLimit("budget", "installed", budget)], top=4)
    np.testing.assert_allclose(got.objective, _brute_force(units, budget, 4), rtol=1e-12)


@settings(max_examples=60, deadline=None, database=None, suppress_health_check=[HealthCheck.too_slow])
@given(seed=st.integers(0, 2**32 - 1), resources=st.integers(0, 3), keep=st.sampled_from([1, 2, 3]),
       units=st.integers(1, 3))
def test_reduction_and_model_match_brute_force_on_random_units(seed, resources, keep, units):
    # Independent method: enumeration of every joint choice of random units with 0 to 3
    # shared resources (random costs and uses, with deliberate ties).
    rng = np.random.default_rng(seed)
    names = [f"r{i}" for i in range(resources)]
    made = []
    for u in range(units):
        n = int(rng.integers(3, 12))
        cost = np.round(rng.uniform(1, 10, n), 1)               # rounded: ties happen
        usage = {r: np.round(rng.uniform(0, 5, n), 1) for r in names}
        made.append(model.Unit(f"u{u}", cost, np.arange(n), usage))
    caps = {r: float(rng.uniform(1.5, 4.0)) * units for r in names}
    limits = [model.SharedLimit(r, r, caps[r]) for r in names]

    totals = []
    for choice in itertools.product(*(range(len(u)) for u in made)):
        if all(sum(u.usage[r][d] for u, d in zip(made, choice)) <= caps[r] for r in names):
            totals.append(sum(u.cost[d] for u, d in zip(made, choice)))
    expected = sorted(totals)[:keep]

    reduced = []
    for u in made:
        kept = undominated(u.cost, u.rank, u.usage, keep)
        reduced.append(model.Unit(u.name, u.cost[kept], u.rank[kept], {r: v[kept] for r, v in u.usage.items()}))
    if not expected:
        with pytest.raises(model.Infeasible):
            model.solve(reduced, limits, top=keep)
        return
    got = model.solve(reduced, limits, top=keep)
    np.testing.assert_allclose(got.objective, expected, rtol=1e-12)
