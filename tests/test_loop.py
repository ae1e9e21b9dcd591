"""The regenerated loop (towercost.design.loop): loadings, balance, directions, refusals, model against scan.

Oracles outside the loop's own closed form:

* a stage-by-stage solution of the absorber and regenerator together: each
  theoretical stage's solute balance with its equilibrium line y = K x
  (the definition of an equilibrium stage; Seader, Henley and Roper,
  Separation Process Principles, 3rd ed., Section 6.5), the two cascades
  linked by the lean and rich streams, solved as one linear system with
  numpy;
* the exhaustive scan over the same space (the selection model must find
  the same best design);
* revealed preference for the direction tests: an exact optimizer that
  minimizes cost = f(x) + p g(x) never chooses a larger g(x) when p rises
  (common practice in economics; no source needed beyond the inequality).
"""

from __future__ import annotations

import copy
import tomllib
from pathlib import Path

import numpy as np
import pytest

import towercost
from towercost.design import cascade
from towercost.design.case import prepare
from towercost.design.loop import SolventLoop, fraction_needed, least_vapour, regenerator_stages
from towercost.models import kremser

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "scenarios" / "demo_solvent_loop.toml"


def _raw() -> dict:
    return tomllib.loads(DEMO.read_text(encoding="utf-8"))


def _small(raw: dict, *, once_through=True, gas_oil=True) -> dict:
    """The demo with a smaller space (quick to search exactly)."""
    raw = copy.deepcopy(raw)
    raw["column"].update(trays=[4, 24], ratio_levels=4)
    reg = raw["solvent"][0]["regenerator"]
    reg.update(trays=[4, 30], lean_levels=4, once_through=once_through)
    if not gas_oil:
        raw["solvent"] = raw["solvent"][:1]
    return raw


def _integer_stages(raw: dict) -> dict:
    """Every tray a theoretical stage, so that a stage-by-stage solution has whole stages."""
    raw = copy.deepcopy(raw)
    raw["column"]["efficiency"] = 1.0
    raw["solvent"][0]["regenerator"]["efficiency"] = 1.0
    return raw


def _stagewise_loop(L, G, K, N, V, K_r, M, y_in):
    """Absorber (N stages) and regenerator (M stages, clean vapour) solved together, stage by stage.

    Unknowns: the liquid leaving each absorber stage x_1..x_N (top down), then
    each regenerator stage x'_1..x'_M. Absorber stage n: L x_{n-1} + G K x_{n+1}
    = (L + G K) x_n, x_0 = x'_M (the lean solvent), G K x_{N+1} = G y_in.
    Regenerator stage m: L x'_{m-1} + V K_r x'_{m+1} = (L + V K_r) x'_m,
    x'_0 = x_N (the rich solvent), x'_{M+1} term 0 (solute-free vapour).
    Returns (lean, rich, gas outlet, regenerator overhead).
    """
    n = N + M
    a = np.zeros((n, n))
    b = np.zeros(n)
    for k in range(N):
        a[k, k] = -(L + G * K)
        a[k, k - 1 if k > 0 else n - 1] += L           # x_0 is the regenerator's last liquid
        if k + 1 < N:
            a[k, k + 1] += G * K
        else:
            b[k] -= G * y_in
    for j in range(M):
        r = N + j
        a[r, r] = -(L + V * K_r)
        a[r, r - 1] += L                                 # x'_0 is the absorber's last liquid (r - 1 = N - 1)
        if j + 1 < M:
            a[r, r + 1] += V * K_r
    x = np.linalg.solve(a, b)
    return x[n - 1], x[N - 1], K * x[0], K_r * x[N]


def test_loop_matches_a_stage_by_stage_solution_and_balances_every_solute():
    """Lean, rich, outlet and overhead of loop designs against the stage-by-stage linear system (rel 1e-9)."""
    scenario = towercost.from_dict(_integer_stages(_small(_raw())), "loop")
    case = prepare(scenario)
    flowsheet = SolventLoop(case)
    looped = np.flatnonzero(case.loop.looped)
    agents = np.repeat(looped, 3)
    trays = np.tile([6, 12, 20], looped.size)
    rate = 1.6 * flowsheet.rate_min[agents]
    d = flowsheet.evaluate(agents, trays, rate)
    checked = 0
    for i in range(len(d)):
        a = int(d.agent[i])
        data = case.loop.regenerator(a)
        M = int(d.regenerator_trays[i])
        for s in range(len(case.solutes)):
            lean, rich, out, top = _stagewise_loop(d.rate[i], case.feed_flow, case.k_value[a, s], int(d.trays[i]),
                                                   d.regenerator_vapour[i], data.k_value[s], M, case.feed_in[s])
            assert d.lean_loading[i, s] == pytest.approx(lean, rel=1e-9)
            assert d.rich_loading[i, s] == pytest.approx(rich, rel=1e-9)
            assert d.outlet[i, s] == pytest.approx(out, rel=1e-9)
            assert d.regenerator_overhead[i, s] == pytest.approx(top, rel=1e-9)
            assert abs(d.loop_balance[i, s]) <= 1e-9
            checked += 1
    assert checked == len(d) * len(case.solutes) > 0


def test_every_solute_balances_around_the_loop_on_the_bundled_scenario():
    """Solute in with the gas = out with the treated gas + out with the regenerator overhead, to 1e-9 of what enters."""
    result = towercost.optimize(DEMO, top=20)
    d = result.designs
    looped = d.loop_looped.astype(bool)
    assert looped.any()
    assert np.max(np.abs(d.loop_balance[looped])) <= 1e-9
    # and the rich solvent carries what the gas lost (the absorber's own balance)
    case = result.case
    gained = d.rate[looped, None] * (d.rich_loading[looped] - d.lean_loading[looped])
    lost = case.feed_flow * (case.feed_in - d.outlet[looped])
    np.testing.assert_allclose(gained, lost, rtol=1e-9, atol=1e-15)


def test_regenerated_and_once_through_service_compete_in_one_ranking():
    result = towercost.optimize(DEMO, top=5)
    names = set(result.case.agents)
    assert "wash oil, once through" in names and any(n.startswith("wash oil, lean") for n in names)
    best_of = {result.case.agents[int(a)]: float(c) for a, c in zip(result.per_agent.agent,
                                                                    result.per_agent.annualized)}
    assert "wash oil, once through" in best_of and "gas oil" in best_of
    # priced on equal terms: the once-through oil pays for every kg it circulates, the loop for its regenerator
    assert min(c for n, c in best_of.items() if "lean" in n) < best_of["wash oil, once through"]
    # every item of a loop design is priced: regenerator, exchangers, its pump
    d = result.designs
    i = int(np.flatnonzero(d.loop_looped.astype(bool))[0])
    tags = {d.equipment.spec_at(i, j).tag for j in range(len(d.equipment.specs))
            if d.equipment.bare_module[i, j] > 0}
    assert {"T-101", "T-201", "P-101", "P-201", "E-201", "E-202", "E-203"} <= tags


def test_a_lean_level_at_or_beyond_the_absorbers_reach_is_refused_with_the_bound():
    raw = _raw()
    raw["solvent"][0]["regenerator"]["lean_range"] = [0.5, 1.0]
    with pytest.raises(towercost.ScenarioError) as info:
        towercost.from_dict(raw, "loop")
    message = str(info.value)
    assert "lean_range" in message and "1" in message and "\n" not in message


def test_the_model_equals_the_scan_on_the_bundled_loop_scenario():
    model = towercost.optimize(DEMO, top=5, method="model")
    scan = towercost.optimize(DEMO, top=5, method="scan")
    np.testing.assert_allclose(model.designs.annualized, scan.designs.annualized, rtol=1e-12)
    assert list(model.designs.agent) == list(scan.designs.agent)


def _generated(k: int) -> dict:
    """A small generated loop case: flows, prices, equilibria, approach and stripping mode varied (invented)."""
    rng = np.random.default_rng(1000 + k)
    raw = _small(_raw(), once_through=bool(rng.integers(2)), gas_oil=bool(rng.integers(2)))
    raw["column"].update(trays=[3, 14], ratio_levels=3)
    raw["feed"]["flow"] = f"{rng.uniform(300, 2500):.1f} kmol/h"
    raw["economics"]["steam"] = f"{rng.uniform(5, 80):.2f} USD/t"
    solvent = raw["solvent"][0]
    solvent["price"] = f"{rng.uniform(0.3, 3.0):.3f} USD/kg"
    reg = solvent["regenerator"]
    reg.update(trays=[2, int(rng.integers(4, 16))], lean_levels=int(rng.integers(2, 5)),
               approach=f"{rng.uniform(5, 30):.1f} K")
    reg["lean_range"] = [float(rng.uniform(0.03, 0.2)), float(rng.uniform(0.3, 0.95))]
    for s in reg["k"].values():
        s["activity_coefficient"] = float(rng.uniform(0.6, 1.6))
    if rng.integers(3) == 0:
        reg["stripping"] = "reboiled"
        reg["latent_heat"] = f"{rng.uniform(200, 400):.0f} kJ/kg"
    return raw


def test_the_model_equals_the_scan_on_generated_loop_cases():
    """At least 100 generated loop cases: the same best design and cost (or the same refusal)."""
    agreed = 0
    for k in range(100):
        scenario = towercost.from_dict(_generated(k), f"loop-{k}")
        try:
            model = towercost.optimize(scenario, top=1, method="model")
        except towercost.InfeasibleSpec:
            with pytest.raises(towercost.InfeasibleSpec):
                towercost.optimize(scenario, top=1, method="scan")
            agreed += 1
            continue
        scan = towercost.optimize(scenario, top=1, method="scan")
        assert float(model.designs.annualized[0]) == pytest.approx(float(scan.designs.annualized[0]), rel=1e-12), k
        assert (int(model.designs.agent[0]), int(model.designs.trays[0])) == \
            (int(scan.designs.agent[0]), int(scan.designs.trays[0])), k
        agreed += 1
    assert agreed == 100


def _best(raw: dict):
    return towercost.optimize(towercost.from_dict(raw, "loop"), top=1).designs


def test_cheaper_steam_never_gives_less_steam_or_a_richer_lean_loading():
    raw = _small(_raw(), once_through=False, gas_oil=False)
    steam, level = [], []
    for price in (8.0, 16.0, 32.0, 64.0):          # USD/t, rising
        raw["economics"]["steam"] = f"{price} USD/t"
        d = _best(raw)
        steam.append(float(d.loop_steam[0]))
        level.append(float(d.lean_level[0]))
    assert all(a >= b * (1 - 1e-12) for a, b in zip(steam, steam[1:])), steam      # revealed preference
    assert all(a <= b for a, b in zip(level, level[1:])), level                     # richer lean as steam costs more


def test_a_dearer_solvent_never_gives_a_higher_circulation():
    """Make-up is the only solvent cost here (no vapour loss): it is proportional to the circulation."""
    raw = _small(_raw(), once_through=False, gas_oil=False)
    reg = raw["solvent"][0]["regenerator"]
    reg["vapour_pressure"] = "0 Pa"
    reg["vapour_pressure_hot"] = "0 Pa"
    raw["solvent"][0]["loss"] = 0.002
    circulation = []
    for price in (0.5, 2.0, 8.0, 32.0):
        raw["solvent"][0]["price"] = f"{price} USD/kg"
        circulation.append(float(_best(raw).liquid_mass_flow[0]))
    assert all(a >= b * (1 - 1e-12) for a, b in zip(circulation, circulation[1:])), circulation


def test_a_richer_lean_loading_needs_no_fewer_absorber_stages_and_no_more_regenerator_stages():
    scenario = towercost.from_dict(_small(_raw(), once_through=False, gas_oil=False), "loop")
    case = prepare(scenario)
    looped = np.flatnonzero(case.loop.looped)          # the lean levels, leanest first
    assert np.all(np.diff(case.loop.level[looped]) > 0)
    rate = np.full(looped.size, 1.3 * float(SolventLoop(case).rate_min[looped].max()))
    # absorber: at one circulation the stages the key solute's spec needs rise with the level
    k = case.loop.regenerator(int(looped[0])).key
    phi = cascade.target_fraction(case, looped)[:, k]
    factor = case.service.factor(rate, case.k_value[looped], case.feed_flow)[:, k]
    stages = kremser.stages_for_fraction(phi, factor)
    assert np.all(np.diff(stages) >= 0), stages
    # regenerator: at one circulation and vapour rate, the fraction it may leave rises with the level,
    # so the stages it needs (Kremser) do not rise
    data = case.loop.regenerator(int(looped[0]))
    n_abs = np.full((looped.size, len(case.solutes)), 8.0)
    a_abs = case.service.factor(rate, case.k_value[looped], case.feed_flow)
    need = fraction_needed(case, data.key, case.lean[looped, data.key], a_abs,
                           kremser.fraction_remaining(a_abs, n_abs), case.k_value[looped])
    assert np.all(np.diff(need[:, data.key]) > 0)
    needed = kremser.stages_for_fraction(need[:, data.key], np.full(looped.size, 2.0))   # S = 2 at every level
    assert np.all(np.diff(needed) <= 0), needed
    # and the least vapour at any fixed count of regenerator trays does not rise either
    vapour = least_vapour(rate, need, regenerator_stages(data, np.arange(4, 12)), data.k_value)
    assert np.all(np.diff(vapour, axis=0) <= 1e-12 * vapour[:-1])


def test_a_solute_the_regenerator_barely_strips_builds_up_and_says_so():
    raw = _small(_raw(), once_through=False, gas_oil=False)
    raw["solvent"][0]["regenerator"]["k"]["o-xylene"]["vapour_pressure"] = "2 kPa"
    result = towercost.optimize(towercost.from_dict(raw, "loop"), top=1)
    d = result.designs
    s = result.case.solutes.index("o-xylene")
    assert d.build_up[0, s] > 0.5
    assert any("o-xylene builds up around the loop" in w for w in result.warnings)


def test_a_rich_loading_past_the_dilute_threshold_is_re_solved_on_the_mole_ratio_basis():
    """Averaged-factor Kremser (Treybal, Mass-Transfer Operations, 3rd ed., Eq. 5.54) and stage by stage.

    With the threshold set below every loading, every solute is re-solved; for
    solutes that stay dilute in fact (well under 1 mol %), the averaged-factor
    outlet meets the dilute one, and the stage-by-stage outlets at the whole
    stages around the design's bracket it (more stages, less solute).
    """
    raw = _small(_raw(), once_through=False, gas_oil=False)
    raw["column"]["max_dilute"] = 1e-9
    result = towercost.optimize(towercost.from_dict(raw, "loop"), top=1)
    from towercost.design.loop import concentrated_check

    rows = concentrated_check(result.case, result.designs, 0)
    assert {r["solute"] for r in rows} == set(result.case.solutes)
    for r in rows:
        assert r["averaged_factor_outlet"] == pytest.approx(r["dilute_outlet"], rel=2e-2)
        assert r["stagewise_outlet_one_more"] <= r["dilute_outlet"] <= r["stagewise_outlet"]


def test_the_studies_refuse_a_designed_regenerator_in_one_line():
    from typer.testing import CliRunner

    from towercost.cli import app

    for command in (["sensitivity", str(DEMO)], ["uncertainty", str(DEMO), "--samples", "100"]):
        result = CliRunner().invoke(app, command)
        assert result.exit_code == 2, result.output
        text = (result.stderr if hasattr(result, "stderr") else result.output).strip()
        assert "regenerator" in text and len(text.splitlines()) == 1 and "Traceback" not in text
