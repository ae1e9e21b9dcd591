"""A site group's shared regenerator (towercost.select.shared_regenerator) against brute force.

Truth by enumeration: every joint choice of the units' feasible alternatives
(each unit's whole feasible set, not the model's reduced one), with the one
solvent rule (the same candidate, hence the same lean level), the cheapest
column option carrying the summed circulation and vapour, and the shared
limits with the column's installed cost in the budget. The chosen column is
then checked exactly at the summed loads.
"""

from __future__ import annotations

import copy
import tomllib
from pathlib import Path

import numpy as np
import pytest

import towercost
from towercost.scenario.site import load_site, site_from_units
from towercost.select import site as site_model
from towercost.select.site import optimize_site

ROOT = Path(__file__).resolve().parents[1]
LOOP = tomllib.loads((ROOT / "scenarios" / "demo_solvent_loop.toml").read_text(encoding="utf-8"))
SITE = ROOT / "scenarios" / "demo_site_loop.toml"


def _unit(flow: float, steam_price: float, seed: int):
    rng = np.random.default_rng(seed)
    raw = copy.deepcopy(LOOP)
    raw["feed"]["flow"] = f"{flow:.1f} kmol/h"
    raw["economics"]["steam"] = f"{steam_price:.2f} USD/t"
    raw["column"].update(trays=[int(rng.integers(3, 6)), int(rng.integers(8, 12))], ratio_levels=2)
    reg = raw["solvent"][0]["regenerator"]
    reg.update(lean_levels=int(rng.integers(2, 4)), once_through=False)
    raw["solvent"] = raw["solvent"][:1] if rng.integers(2) else raw["solvent"]
    return towercost.from_dict(raw, f"unit-{seed}")


def _brute(assembly, limits):
    """The cheapest joint choice over the units' whole feasible sets (two units of one shared group)."""
    a, b = assembly.spaces
    fa, fb = np.flatnonzero(a.feasible), np.flatnonzero(b.feasible)
    name_a = np.asarray(a.case.agents, dtype=object)[a.agent[fa]]
    name_b = np.asarray(b.case.agents, dtype=object)[b.agent[fb]]
    cost = a.cost[fa][:, None] + b.cost[fb][None, :]
    same = name_a[:, None] == name_b[None, :]
    liquid = a.usage["regenerator_liquid_mass"][fa][:, None] + b.usage["regenerator_liquid_mass"][fb][None, :]
    vapour = a.usage["regenerator_vapour_mass"][fa][:, None] + b.usage["regenerator_vapour_mass"][fb][None, :]
    columns = sorted(assembly.columns.values(), key=lambda c: c[0].annualized)
    extra = np.where(vapour > 0, np.inf, 0.0)
    extra_installed = np.zeros_like(cost)
    for column, _ in reversed(columns):          # the cheapest column that carries both loads
        fits = (vapour > 0) & (vapour <= column.vapour) & (liquid <= column.liquid)
        extra = np.where(fits, column.annualized, extra)
        extra_installed = np.where(fits, column.installed, extra_installed)
    ok = same & np.isfinite(extra)
    for name, (bound, _, _) in limits.items():
        figure = site_model.SHARED[name][0]
        total = a.usage[figure][fa][:, None] + b.usage[figure][fb][None, :]
        if name == "capital_budget":
            total = total + extra_installed
        ok &= total <= bound * (1 + 1e-9)
    total = np.where(ok, cost + extra, np.inf)
    return float(total.min())


@pytest.mark.parametrize("seed", range(12))
def test_the_shared_regenerator_choice_equals_brute_force(seed):
    rng = np.random.default_rng(seed)
    units = [("A", _unit(rng.uniform(500, 1500), 25.0, 10 * seed)), ("B", _unit(rng.uniform(300, 900), 25.0,
                                                                                  10 * seed + 1))]
    shared = {"steam": f"{rng.uniform(2.5, 8.0):.2f} t/h"} if rng.integers(2) else {}
    spec = site_from_units(f"site-{seed}", units, shared=shared,
                           solvent_groups=[{"name": "loop", "units": ["A", "B"], "shared_regenerator": True,
                                            "regenerator_trays": int(rng.integers(15, 40))}])
    assembly = site_model.assemble(spec, 1)
    limits = assembly.limits
    truth = _brute(assembly, limits)
    if not np.isfinite(truth):
        with pytest.raises(towercost.InfeasibleSpec):
            optimize_site(spec, top=1)
        return
    result = optimize_site(spec, top=1)
    best = result.portfolios[0]
    assert best.annualized == pytest.approx(truth, rel=1e-9)
    taken = best.regenerators
    assert len(taken) == 1
    column = taken[0]
    # the column carries the summed loads it was chosen for, checked exactly at them
    assert column["vapour_kg_s"] <= column["capacity_vapour_kg_s"] * (1 + 1e-12)
    assert column["liquid_kg_s"] <= column["capacity_liquid_kg_s"] * (1 + 1e-12)
    assert column["within_its_limits"]


def test_bundled_shared_regenerator_site_prices_one_column_and_explains():
    result = optimize_site(load_site(SITE), top=2)
    best = result.portfolios[0]
    assert len(best.regenerators) == 1 and best.regenerators[0]["within_its_limits"]
    looped = [d for d in best.designs if "loop_looped" in d.figures and bool(d.loop_looped[0])]
    assert len(looped) == 2
    # one lean solvent for both trains: the same candidate (the same lean level)
    names = {result.spaces[u].case.agents[int(d.agent[0])] for u, d in enumerate(best.designs[:2])}
    assert len(names) == 1
    # no unit carries a regenerator shell of its own: the group's column is the site's row
    for d in looped:
        own = [d.equipment.spec_at(0, j).tag for j in range(len(d.equipment.specs)) if d.equipment.bare_module[0, j] > 0]
        assert "T-201" not in own and "E-201" in own
    assert result.stand_alone_breaks   # the stand-alone bests need more steam than the site has
