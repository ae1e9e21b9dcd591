"""Several towers chosen together: the site model against brute force over the joint product.

Truth comes from enumeration: every joint choice of the units' feasible
alternatives is priced by summing their exact costs, filtered by the shared
limits and the site's rules, and sorted. Shadow values are held to finite
differences of the same LP.
"""

from __future__ import annotations

import copy
import json
import tomllib
from pathlib import Path

import numpy as np
import pytest
from hypothesis import HealthCheck, Phase, given, settings
from hypothesis import strategies as st
from typer.testing import CliRunner

import towercost
from towercost.design.case import prepare
from towercost.design.limits import SPEC_TOLERANCE
from towercost.design.space import RESOURCES, build_space
from towercost.errors import InfeasibleSpec, ScenarioError
from towercost.scenario.site import load_site, site_from_units
from towercost.select import model
from towercost.select import site as site_model
from towercost.select.site import SHARED, optimize_site

ROOT = Path(__file__).resolve().parents[1]
ABSORBER = tomllib.loads((ROOT / "scenarios" / "demo_absorber.toml").read_text(encoding="utf-8"))
STRIPPER = tomllib.loads((ROOT / "scenarios" / "demo_air_stripper.toml").read_text(encoding="utf-8"))
SITE = ROOT / "scenarios" / "demo_site.toml"


def small_unit(base: dict, name: str, flow_scale: float, price_scale: float, trays: tuple[int, int],
               packed: bool = False):
    """A small variant of a demo scenario: fewer trays and rate levels, so that brute force stays cheap.

    ``packed``: the demo's packed beds stay, searched over two counts of theoretical stages from the trays'
    least; otherwise they are left out.
    """
    data = copy.deepcopy(base)
    if packed:
        data["column"]["stages"] = [trays[0], trays[0] + 1]
    else:
        data.pop("packing", None)
    data["case"]["name"] = name
    number, unit = data["feed"]["flow"].split(" ", 1)
    data["feed"]["flow"] = f"{float(number) * flow_scale:.6g} {unit}"
    for agent in data.get("solvent", []) + data.get("stripping_gas", []):
        if "price" in agent:
            number, unit = str(agent["price"]).split(" ", 1)
            agent["price"] = f"{float(number) * price_scale:.6g} {unit}"
    data["column"].update(trays=list(trays), ratio_levels=4, larger_diameters=1)
    return towercost.from_dict(data, name)


def brute_force(site, top: int) -> list[float]:
    """The ``top`` least site costs over every joint choice meeting the shared limits and rules (enumeration)."""
    spaces = site.spaces
    feasible = [np.flatnonzero(s.feasible) for s in spaces]
    grids = np.meshgrid(*feasible, indexing="ij")
    picks = [g.ravel() for g in grids]
    cost = sum(s.cost[p] for s, p in zip(spaces, picks))
    ok = np.ones(cost.shape, bool)
    for name, (bound, _, _) in site.limits.items():   # met to the project's spec tolerance, as the model meets it
        ok &= sum(s.usage[SHARED[name][0]][p] for s, p in zip(spaces, picks)) <= bound + SPEC_TOLERANCE * bound
    return sorted(cost[ok])[:top], picks, ok


def rules_ok(spec, spaces, picks) -> np.ndarray:
    """Where a joint choice keeps the site's rules (one solvent per group, exclusive, required)."""
    index = {n: u for u, (n, _) in enumerate(spec.units)}
    names = [np.asarray(s.case.agents, dtype=object)[s.agent[p]] for s, p in zip(spaces, picks)]
    ok = np.ones(picks[0].shape, bool)
    for group in spec.solvent_groups:
        first = names[index[group.units[0]]]
        for u in group.units[1:]:
            ok &= names[index[u]] == first
    for exclusive in spec.exclusive:
        ok &= sum((names[index[c.unit]] == c.candidate).astype(int) for c in exclusive.choices) <= 1
    for choice in spec.require:
        ok &= names[index[choice.unit]] == choice.candidate
    return ok


@st.composite
def small_sites(draw):
    """Two or three small units, shared limits that may bite, and sometimes a solvent group or a required choice."""
    count = draw(st.integers(2, 3))
    units = []
    for u in range(count):
        absorb = u < 2 or draw(st.booleans())
        low = draw(st.integers(8, 14)) if absorb else draw(st.integers(12, 18))
        base = ABSORBER if absorb else STRIPPER
        units.append((f"unit {u}", small_unit(base, f"unit {u}", draw(st.floats(0.4, 1.2)), draw(st.floats(0.3, 3.0)),
                                              (low, low + draw(st.integers(2, 5))), packed=u == 0 and draw(st.booleans()))))
    spaces = [build_space(prepare(scenario), keep=RESOURCES) for _, scenario in units]
    least = {name: sum(float(s.usage[SHARED[name][0]][s.feasible].min()) for s in spaces) for name in SHARED}
    alone = {name: sum(float(s.usage[SHARED[name][0]][int(np.flatnonzero(s.feasible)[np.argmin(s.cost[s.feasible])])])
                       for s in spaces) for name in SHARED}
    shared = {}
    for name, unit in (("capital_budget", "USD"), ("steam", "kg/s"), ("electric_power", "W")):
        if draw(st.integers(0, 2)) and alone[name] > 0:
            where = draw(st.floats(0.3, 1.1))   # between the least use and the stand-alone use, or above it
            shared[name] = f"{least[name] + where * (alone[name] - least[name]) + 1e-9:.12g} {unit}"
    groups, require = [], []
    if draw(st.booleans()):
        groups = [{"name": "pair", "units": ["unit 0", "unit 1"]}]
    elif draw(st.integers(0, 3)) == 0:
        require = [{"unit": "unit 0", "candidate": draw(st.sampled_from([a["name"] for a in ABSORBER["solvent"]]))}]
    return site_from_units("generated", units, shared=shared, solvent_groups=groups, require=require)


SITES = settings(max_examples=100, deadline=None, database=None, derandomize=True,
                 phases=[Phase.explicit, Phase.generate],
                 suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large])


@SITES
@given(spec=small_sites(), listing=st.sampled_from(["trays", "variant", "candidate"]))
def test_site_model_equals_brute_force_over_the_joint_product(spec, listing):
    # Independent method: enumeration of every joint choice of the units' feasible designs;
    # listing distinct groups, each joint choice of groups at its cheapest feasible variants.
    site = site_model.assemble(spec, 3, listing)
    expected, picks, ok = brute_force(site, 10**9)
    ok &= rules_ok(spec, site.spaces, picks)
    cost = sum(s.cost[p] for s, p in zip(site.spaces, picks))
    if listing == "variant":
        expected = np.sort(cost[ok])[:3]
    else:
        keys = np.stack([(s.group if listing == "trays" else s.agent)[p] for s, p in zip(site.spaces, picks)])[:, ok]
        _, inverse = np.unique(keys, axis=1, return_inverse=True)
        best = np.full(inverse.max() + 1 if inverse.size else 0, np.inf)
        np.minimum.at(best, inverse.ravel(), cost[ok])
        expected = np.sort(best)[:3]
    if expected.size == 0:
        with pytest.raises(InfeasibleSpec):
            optimize_site(spec, top=3, distinct=listing)
        return
    result = optimize_site(spec, top=3, distinct=listing)
    got = [p.annualized for p in result.portfolios]
    np.testing.assert_allclose(got, expected[:len(got)], rtol=1e-9)
    assert len(got) == expected.size
    for p in result.portfolios:
        for name, (bound, _, _) in result.limits.items():
            assert p.totals[name] <= bound * (1 + SPEC_TOLERANCE)


def test_stand_alone_bests_that_break_the_budget_give_a_dearer_joint_choice():
    units = [("a", small_unit(ABSORBER, "a", 1.0, 1.0, (10, 16))),
             ("b", small_unit(ABSORBER, "b", 0.7, 1.0, (10, 16)))]
    free = optimize_site(site_from_units("free", units), top=1)
    alone = free.stand_alone.annualized
    assert free.portfolios[0].annualized == pytest.approx(alone, rel=1e-12)     # nothing shared: each its best
    budget = 0.97 * float(sum(d.installed[0] for d in free.stand_alone.designs))
    tight = optimize_site(site_from_units("tight", units, shared={"capital_budget": f"{budget!r} USD"}), top=1)
    assert "installed cost" in tight.stand_alone_breaks
    assert tight.portfolios[0].annualized > alone
    assert tight.portfolios[0].totals["capital_budget"] <= budget
    assert tight.binding["capital_budget"]


def test_the_solvent_rule_changes_the_answer():
    # Two absorbers whose own bests use different solvents (the second's oil made dear):
    # one solvent for both must cost more than each its own.
    cheap = small_unit(ABSORBER, "a", 1.0, 1.0, (10, 16))
    data = copy.deepcopy(ABSORBER)
    data["solvent"][0]["price"] = "40 USD/kg"               # the light oil made dear for the second unit only
    data["column"].update(trays=[10, 16], ratio_levels=4, larger_diameters=1)
    dear = towercost.from_dict(data, "b")
    apart = optimize_site(site_from_units("apart", [("a", cheap), ("b", dear)]), top=1)
    chosen = [s.case.agents[int(d.agent[0])] for s, d in zip(apart.spaces, apart.portfolios[0].designs)]
    assert chosen[0] != chosen[1]
    together = optimize_site(site_from_units("together", [("a", cheap), ("b", dear)],
                                             solvent_groups=[{"name": "loop", "units": ["a", "b"]}]), top=1)
    one = {s.case.agents[int(d.agent[0])] for s, d in zip(together.spaces, together.portfolios[0].designs)}
    assert len(one) == 1
    assert together.portfolios[0].annualized > apart.portfolios[0].annualized
    assert "one solvent for 'loop'" in together.stand_alone_breaks


def test_shadow_value_equals_finite_differences_of_the_fixed_choice_lp():
    # Independent method: central differences of the LP optimum in the budget.
    spec = load_site(SITE)
    site = site_model.assemble(spec, 5)
    chosen = model.SelectionModel(site.units, site.shared, site.options, site.rows).best(1).choices[0]
    groups = site_model.chosen_groups(site, chosen)

    def lp(budget_scale: float) -> tuple[float, dict]:
        shared = [model.SharedLimit(s.name, s.resource, s.bound * (budget_scale if s.name == "capital_budget" else 1),
                                    s.label) for s in site.shared]
        return model.SelectionModel(site.units, shared, site.options, site.rows).fixed_choice_lp(groups)

    objective, shadow = lp(1.0)
    bound = site.limits["capital_budget"][0]
    step = 1e-4
    low, _ = lp(1 - step)
    high, _ = lp(1 + step)
    slope = (low - high) / (2 * step * bound)
    assert shadow["capital_budget"] > 0
    assert slope == pytest.approx(shadow["capital_budget"], rel=1e-6)


def test_bundled_site_runs_and_explains(tmp_path):
    result = CliRunner().invoke(towercost_app(), ["site", str(SITE), "--json", "--top", "3"])
    assert result.exit_code == 0, result.output
    record = json.loads(result.stdout)
    assert len(record["portfolios"]) == 3
    assert record["stand_alone"]["breaks_shared_limits"]
    best = record["best"]["annualized_cost_USD_per_yr"]
    assert best >= record["stand_alone"]["annualized_cost_USD_per_yr"]
    candidates = {u["unit"]: u["agent"] for u in record["best"]["units"]}
    assert candidates["coater line 1"] == candidates["coater line 2"]     # the solvent group holds


def towercost_app():
    from towercost.cli import app

    return app


@pytest.mark.parametrize("text, fragment", [
    ("[site]\nname = 'x'\n", "[unit]"),
    ("[site]\nname = 'x'\n[[unit]]\nname = 'a'\nscenario = 'missing.toml'\n", "no such file"),
    ("[site]\nname = 'x'\n[[unit]]\nname = 'a'\nscenario = '../scenarios/demo_absorber.toml'\n"
     "[[require]]\nunit = 'a'\ncandidate = 'nothing'\n", "no candidate of that name"),
    ("[site]\nname = 'x'\n[[unit]]\nname = 'a'\nscenario = '../scenarios/demo_absorber.toml'\n[shared]\n"
     "capital_budjet = '1 MUSD'\n", "did you mean 'capital_budget'"),
])
def test_bad_site_files_are_one_line(tmp_path, text, fragment):
    folder = tmp_path / "site"
    folder.mkdir()
    path = folder / "site.toml"
    path.write_text(text.replace("../scenarios/", str(ROOT / "scenarios") + "/"), encoding="utf-8")
    result = CliRunner().invoke(towercost_app(), ["site", str(path)])
    assert result.exit_code == 2, result.output
    lines = result.stderr.strip().splitlines()
    assert len(lines) == 1 and fragment in lines[0], lines


def test_a_budget_below_every_joint_choice_names_the_least_total():
    units = [("a", small_unit(ABSORBER, "a", 1.0, 1.0, (10, 16))),
             ("b", small_unit(ABSORBER, "b", 0.7, 1.0, (10, 16)))]
    with pytest.raises(InfeasibleSpec, match="least installed cost together"):
        optimize_site(site_from_units("poor", units, shared={"capital_budget": "1000 USD"}))
    with pytest.raises(ScenarioError):
        site_from_units("bad", units, solvent_groups=[{"name": "g", "units": ["a", "nobody"]}])
