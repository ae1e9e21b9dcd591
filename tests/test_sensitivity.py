"""Tests for the one-at-a-time sensitivity study (towercost.study.sensitivity) and the varied cases behind it.

Oracle: the same change written into the scenario file itself (a dearer
steam price, a larger feed, a larger activity coefficient or K) and run
through ``towercost.optimize`` and ``towercost.evaluate``, which never see
the study's code: the tornado's figures must be theirs.
"""

from __future__ import annotations

import copy
import tomllib
from pathlib import Path

import numpy as np
import pytest

import towercost
from towercost.study.sensitivity import change_of, sensitivity
from towercost.study.variation import varied_case

ROOT = Path(__file__).resolve().parents[1]
ABSORBER = ROOT / "scenarios" / "demo_absorber.toml"
STRIPPER = ROOT / "scenarios" / "demo_air_stripper.toml"


def raw(path=ABSORBER) -> dict:
    """A demo scenario as a dict, its packed beds left out: the study covers tray columns."""
    data = tomllib.loads(path.read_text(encoding="utf-8"))
    data.pop("packing", None)
    return data


@pytest.fixture(scope="module")
def absorber_study():
    return sensitivity(towercost.load(ABSORBER))


def _row(study, name):
    return next(r for r in study.rows if r.name == name)


def _scaled_k(data, solute, factor):
    """The scenario dict with K of ``solute`` scaled in every candidate: K = gamma Psat / P, or K given."""
    data = copy.deepcopy(data)
    for solvent in data["solvent"]:
        source = solvent["k"][solute]
        if isinstance(source, dict):
            source["activity_coefficient"] = source["activity_coefficient"] * factor
        else:
            solvent["k"][solute] = source * factor
    return data


def _edits(data):
    """Each study input written into the scenario file by hand, at +20 %."""
    steam = copy.deepcopy(data)
    steam["economics"]["steam"] = "36 USD/t"
    feed = copy.deepcopy(data)
    feed["feed"]["flow"] = "1080 kmol/h"
    inlet = copy.deepcopy(data)
    inlet["feed"]["composition"] = {"toluene": "600 ppmv", "p-xylene": "180 ppmv"}
    electricity = copy.deepcopy(data)
    electricity["economics"]["electricity"] = "0.108 USD/kWh"
    return {"steam": steam, "feed_flow": feed, "inlet": inlet, "electricity": electricity,
            "k[toluene]": _scaled_k(data, "toluene", 1.2)}


@pytest.mark.parametrize("name", ["steam", "feed_flow", "inlet", "electricity", "k[toluene]"])
def test_the_tornado_is_the_scenario_file_changed_by_hand(absorber_study, name):
    row = _row(absorber_study, name)
    by_hand = towercost.from_dict(_edits(raw())[name])
    best = towercost.optimize(by_hand, top=1, method="scan").designs
    up = row.best[1].designs
    assert float(up.annualized[0]) == pytest.approx(float(best.annualized[0]), rel=1e-12)
    assert (int(up.agent[0]), int(up.trays[0])) == (int(best.agent[0]), int(best.trays[0]))
    nominal = absorber_study.nominal
    fixed = towercost.evaluate(by_hand, "light wash oil", int(nominal.trays[0]), rate=float(nominal.rate[0]),
                               diameter=float(nominal.diameter[0]))
    assert row.fixed[1].annualized == pytest.approx(float(fixed.annualized[0]), rel=1e-12)
    assert row.fixed[1].meets_spec == bool(fixed.meets_spec[0])


def test_signs_of_the_fixed_design(absorber_study):
    base = float(absorber_study.nominal.annualized[0])
    steam = _row(absorber_study, "steam")
    assert steam.fixed[0].annualized < base < steam.fixed[1].annualized
    k = _row(absorber_study, "k[toluene]")
    assert k.fixed[0].meets_spec and not k.fixed[1].meets_spec   # a larger K leaves more toluene
    efficiency = _row(absorber_study, "efficiency")
    assert not efficiency.fixed[0].meets_spec and efficiency.fixed[1].meets_spec
    assert k.best[1].change > 0 > k.best[0].change


def test_rows_are_ordered_by_swing_and_zero_inputs_left_alone(absorber_study):
    swings = [r.swing for r in absorber_study.rows]
    assert swings == sorted(swings, reverse=True)
    assert "credit for recovered solute" in absorber_study.unvaried
    names = {r.name for r in absorber_study.rows}
    assert {"k[toluene]", "k[p-xylene]", "efficiency", "feed_flow", "inlet", "cost_index", "interest"} <= names


def test_changes_per_input_from_the_scenario():
    data = raw()
    data["uncertainty"] = {"change": 0.1, "changes": {"steam": [-0.5, 1.0], "k": 0.3, "k[p-xylene]": 0.05}}
    scenario = towercost.from_dict(data)
    assert change_of(scenario, "steam") == (-0.5, 1.0)
    assert change_of(scenario, "k[toluene]") == (-0.3, 0.3)
    assert change_of(scenario, "k[p-xylene]") == (-0.05, 0.05)
    assert change_of(scenario, "interest") == (-0.1, 0.1)
    assert change_of(scenario, "interest", 0.25) == (-0.25, 0.25)
    # a factor of 2 on steam (+100 %) reaches the case's economics
    case = varied_case(scenario, {"steam": 2.0})
    assert case.economics.steam == pytest.approx(2 * towercost.load(ABSORBER).economics.steam)


def test_stripper_sensitivity_runs_and_a_larger_feed_overloads_the_fixed_design():
    study = sensitivity(towercost.load(STRIPPER))
    feed = _row(study, "feed_flow")
    # 20 % more water through the same trays, air rate and shell: it misses the spec or breaks a limit
    assert not (feed.fixed[1].meets_spec and feed.fixed[1].within_limits)
    assert feed.best[1].designs is not None
    assert "steam price" in study.unvaried


def test_interest_changes_the_capital_recovery_factor():
    # Source: the capital recovery factor i (1 + i)**n / ((1 + i)**n - 1); 12 % over 15 years gives 0.14682
    # (value from memory of a compound-interest table).
    case = varied_case(towercost.load(ABSORBER), {"interest": 1.2})
    assert case.economics.interest == pytest.approx(0.12)
    assert round(float(case.economics.capital_recovery), 5) == 0.14682
    assert np.isscalar(case.economics.capital_recovery) or np.ndim(case.economics.capital_recovery) == 0
