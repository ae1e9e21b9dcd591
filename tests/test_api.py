"""The Python API (``import towercost``), the cost lines' sample axis, and the CLI's exit code for a bug.

The sample-axis checks hold the annualization to itself evaluated one
sample at a time (an independent loop over re-priced cases) and to the
models' own functions; the API checks hold it to the CLI's numbers.
"""

from __future__ import annotations

import dataclasses
import json
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest
from typer.testing import CliRunner

import towercost
from towercost.design.case import prepare
from towercost.design.column import SingleColumn
from towercost.design.costlines import annualize
from towercost.design.space import build_space
from towercost.models import economics

ROOT = Path(__file__).resolve().parents[1]
ABSORBER = ROOT / "scenarios" / "demo_absorber.toml"


@pytest.fixture(scope="module")
def scenario():
    return towercost.load(ABSORBER)


def test_api_entry_points_from_a_notebook(scenario):
    result = towercost.optimize(scenario, top=3)
    frame = result.to_frame()
    assert list(frame["rank"]) == [1, 2, 3]
    assert frame["annualized"].is_monotonic_increasing
    assert {"agent", "trays", "rate", "diameter", "outlet[toluene]", "purchased[T-101]"} <= set(frame.columns)
    best = result.designs
    sheet = towercost.evaluate(scenario, towercost_name(result), int(best.trays[0]), rate=float(best.rate[0]),
                               diameter=float(best.diameter[0]))
    assert sheet.annualized[0] == pytest.approx(best.annualized[0], rel=1e-12)
    assert len(sheet.to_frame()) == 1
    curve = towercost.curve(ABSORBER, towercost_name(result))
    assert float(np.min(curve.by_trays.annualized)) == pytest.approx(float(result.per_agent.annualized[0]),
                                                                     rel=1e-12)


def towercost_name(result) -> str:
    return result.case.agents[int(result.designs.agent[0])]


def test_api_takes_a_dict_and_a_path(scenario):
    import tomllib

    raw = tomllib.loads(ABSORBER.read_text(encoding="utf-8"))
    by_dict = towercost.optimize(raw, top=1, method="scan")
    by_path = towercost.optimize(str(ABSORBER), top=1, method="scan")
    assert by_dict.designs.annualized[0] == by_path.designs.annualized[0]
    with pytest.raises(towercost.ScenarioError):
        towercost.from_dict({"case": {"name": "x"}})
    assert isinstance(towercost.__version__, str)


def test_space_to_frame_has_one_row_per_alternative(scenario):
    space = build_space(prepare(scenario))
    frame = space.to_frame()
    assert len(frame) == len(space)
    assert frame["feasible"].sum() == int(space.feasible.sum())


# --------------------------------------------------------------------------- a leading sample axis


def _designs(scenario, n=25):
    case = prepare(scenario)
    flowsheet = SingleColumn(case)
    rng = np.random.default_rng(3)
    agent = rng.integers(0, len(case.agents), n)
    trays = rng.integers(5, 40, n)
    rate = rng.uniform(1.1, 3.0, n) * flowsheet.rate_min[agent]
    return case, flowsheet.evaluate(agent, trays, rate)


def test_annualize_broadcasts_over_samples_of_prices_and_economics(scenario):
    # Oracle: each sample evaluated on its own with the same function (a plain loop).
    case, d = _designs(scenario)
    eco = case.economics
    samples = 7
    rng = np.random.default_rng(11)
    factor = rng.uniform(0.5, 2.0, (samples, 1, len(d.uses.specs)))
    sampled = dataclasses.replace(eco, index_to=eco.index_to * rng.uniform(0.9, 1.1, samples),
                                  capital_recovery=eco.capital_recovery * rng.uniform(0.8, 1.2, samples),
                                  hours=eco.hours * rng.uniform(0.9, 1.0, samples))
    together = annualize(d.equipment, d.uses, sampled, unit_price=d.uses.unit_price * factor)
    assert together.annualized.shape == (samples, len(d))
    for s in range(samples):
        one = dataclasses.replace(eco, index_to=sampled.index_to[s], capital_recovery=sampled.capital_recovery[s],
                                  hours=sampled.hours[s])
        alone = annualize(d.equipment, d.uses, one, unit_price=d.uses.unit_price * factor[s])
        np.testing.assert_allclose(together.annualized[s], alone.annualized, rtol=1e-13)
        np.testing.assert_allclose(together.installed[s], alone.installed, rtol=1e-13)


def test_annualize_without_samples_reproduces_the_designs(scenario):
    # Identity: the nominal economics give the figures the flowsheet reported; the
    # annualized cost is economics.annualized_cost of its parts.
    case, d = _designs(scenario)
    nominal = annualize(d.equipment, d.uses, case.economics)
    np.testing.assert_allclose(nominal.annualized, d.annualized, rtol=1e-15)
    np.testing.assert_allclose(nominal.annualized, economics.annualized_cost(
        d.installed, case.economics.capital_recovery, d.operating, d.credit), rtol=1e-13)


def test_dearer_steam_samples_never_lower_a_designs_cost(scenario):
    case, d = _designs(scenario)
    column = d.uses.column("steam")
    scale = np.ones((5, 1, len(d.uses.specs)))
    scale[:, 0, column] = [1.0, 1.5, 2.0, 3.0, 4.0]
    cost = annualize(d.equipment, d.uses, case.economics, unit_price=d.uses.unit_price * scale).annualized
    assert np.all(np.diff(cost, axis=0) >= 0)


# --------------------------------------------------------------------------- CLI contracts


def test_json_on_standard_output_is_only_json():
    # Run as a real process: output written by the solver library straight to the
    # process's standard output would spoil the JSON (CliRunner does not see it).
    out = subprocess.run([sys.executable, "-m", "towercost.cli", "optimize", str(ABSORBER), "--top", "2", "--json"],
                         capture_output=True, text=True, check=True, cwd=ROOT)
    assert json.loads(out.stdout)["best"]["rank"] == 1


def test_an_internal_error_exits_70_with_one_line_and_a_log(tmp_path, monkeypatch):
    from towercost.cli import app
    from towercost.select import ranking

    def broken(*args, **kwargs):
        raise ZeroDivisionError("a bug planted by the test")

    monkeypatch.setattr(ranking, "optimize", broken)
    result = CliRunner().invoke(app, ["optimize", str(ABSORBER), "--out", str(tmp_path)])
    assert result.exit_code == 70
    lines = result.stderr.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("error: internal error") and "bug in towercost" in lines[0]
    logs = list(tmp_path.glob("towercost-internal-error-*.log"))
    assert len(logs) == 1 and "ZeroDivisionError" in logs[0].read_text()


def test_progress_is_reported_for_every_chunk(scenario):
    seen = []
    build_space(prepare(scenario), chunk=2000, progress=lambda done, total: seen.append((done, total)))
    assert len(seen) > 3
    assert all(b >= a for (a, _), (b, _) in zip(seen, seen[1:]))
    assert seen[-1][0] == seen[-1][1] or seen[-1][0] <= seen[-1][1]


def test_the_api_makes_the_command_lines_checks_before_evaluating(scenario, monkeypatch):
    """A scenario built in a notebook is refused as the command line refuses it, in one line, nothing evaluated."""
    from towercost.errors import ScenarioError, TooLarge

    import tomllib

    raw = tomllib.loads(ABSORBER.read_text(encoding="utf-8"))
    raw["column"]["ratio_levels"] = 2000        # within its field's range; beyond a machine with 64 MiB free
    huge = towercost.from_dict(raw)
    monkeypatch.setattr("towercost.design.reasons.available_memory", lambda: 64 * 2**20)
    with pytest.raises(TooLarge, match="alternatives"):
        towercost.optimize(huge)
    with pytest.raises(TooLarge):
        towercost.curve(huge, "light wash oil")

    monkeypatch.undo()
    raw = tomllib.loads(ABSORBER.read_text(encoding="utf-8"))
    # K = 1e-4 is a valid field, but the solvent in equilibrium with 500 ppmv would hold a mole fraction of 5
    raw["solvent"][2]["k"] = {"toluene": 1e-4, "p-xylene": 0.06}
    beyond = towercost.from_dict(raw)
    with pytest.raises(ScenarioError, match=r"'glycol ether': in equilibrium"):
        towercost.optimize(beyond)
    with pytest.raises(ScenarioError, match=r"'glycol ether': in equilibrium"):
        towercost.evaluate(beyond, "glycol ether", trays=10, ratio=1.5)
    towercost.evaluate(beyond, "light wash oil", trays=10, ratio=1.5)   # the check is per candidate named
