"""The one-column flowsheet's items as an estimator prices them: shell and heads, trays, pump, gas mover, motors.

Truth comes from outside the flowsheet: a published worked example of a
stainless tower (through a scenario file), the cost table's coefficients
evaluated here by hand, and geometry.
"""

from __future__ import annotations

import copy
import math
import tomllib
from pathlib import Path

import numpy as np
import pytest

import towercost
from towercost.design.case import prepare
from towercost.design.column import FAN, PUMP, SingleColumn
from towercost.design.costlines import price_item
from towercost.errors import ScenarioError
from towercost.models import costing, vessel
from towercost.models.constants import INCH
from towercost.report import records
from towercost.scenario import parse_scenario

ROOT = Path(__file__).resolve().parents[1]
ABSORBER_FILE = ROOT / "scenarios" / "demo_absorber.toml"
ABSORBER = tomllib.loads(ABSORBER_FILE.read_text(encoding="utf-8"))
ABSORBER.pop("packing")       # the tray checks below: the demo's packed bed left out
EXAMPLE = ROOT / "tests" / "data" / "stainless_tower_example.toml"
LIGHT = "light wash oil"


def scenario_with(**column):
    data = copy.deepcopy(ABSORBER)
    data["column"].update(column)
    return parse_scenario(data, "test.toml")


def row(designs, key: str) -> int:
    return [spec.key for spec in designs.equipment.specs].index(key)


# --------------------------------------------------------------------------- a published tower


def test_published_stainless_tower_through_a_scenario_file():
    # Source: Turton, Bailie, Whiting and Shaeiwitz, Analysis, Synthesis and Design of
    # Chemical Processes, 3rd ed. (2009), Example 7.13 (read in a stored copy of the book):
    # stainless tower 3 m x 30 m (212.1 m3), 20 barg, 40 stainless sieve trays, 2006 costs
    # (CEPCI 500, value from memory). Published: one tray 5,756 USD; trays C_BM
    # 5,756 x 40 x 1.83 x 1.0 = 421,300 USD; tower C_BM 6,486,000 USD; total 6,908,300 USD.
    scenario = towercost.load(EXAMPLE)
    d = towercost.evaluate(scenario, "amine-free wash", trays=40, ratio=1.5, diameter=3.0)
    assert float(d.height[0]) == pytest.approx(30.0, rel=1e-12)
    assert float(d.volume[0]) == pytest.approx(212.1, rel=1e-3)
    assert float(d.design_pressure[0]) == pytest.approx(20e5, rel=1e-12)     # given, not the margin rule
    assert int(d.tray_type[0]) == 0 and float(d.range_use[0]) <= 1.0          # sieve trays, inside their range
    shell = float(d.bare_module_items[0, row(d, "tower_shell")])
    trays = float(d.bare_module_items[0, row(d, "trays")])
    one_tray = float(d.purchased[0, row(d, "trays")]) / 40
    assert one_tray == pytest.approx(5756, rel=0.01)            # measured 5,755 (-0.02 %)
    assert trays == pytest.approx(421300, rel=0.01)             # measured 421,260 (-0.01 %)
    assert shell == pytest.approx(6486000, rel=0.01)            # measured 6,505,545 (+0.30 %: F_M 3.12, book 3.11)
    assert shell + trays == pytest.approx(6908300, rel=0.01)    # measured 6,926,805 (+0.27 %)
    record = records.design_record(prepare(scenario), d)
    assert record["column"]["design_pressure_basis"] == "given in the scenario"


# --------------------------------------------------------------------------- motors


def hand_cost(coefficients, kw):
    """Turton's log-quadratic purchased cost in USD at CEPCI 397, evaluated here."""
    k1, k2, k3 = coefficients
    x = math.log10(kw)
    return 10.0 ** (k1 + k2 * x + k3 * x * x)


#: Source: Turton et al., 4th ed., App. A, Table A.1, drives: electric, 75 to 2600 kW (value from memory).
DRIVES = {"totally_enclosed": (1.9560, 1.7142, -0.2282), "explosion_proof": (2.4604, 1.4191, -0.1798),
          "open_drip_proof": (2.9508, 1.0688, -0.1315)}
ROWS = {"totally_enclosed": "drive_electric_enclosed", "explosion_proof": "drive_electric_explosion_proof",
        "open_drip_proof": "drive_electric_open"}


@pytest.mark.parametrize("enclosure", list(DRIVES))
def test_motor_costs_by_hand_at_two_sizes(enclosure):
    # Two designs of the demo absorber with different fan powers, each motor priced on the
    # shaft power it delivers: Cp0 = 10**(K1 + K2 x + K3 x**2), x = log10(kW) at CEPCI 397;
    # C_BM = 1.5 Cp0 (Turton 4th ed., Table A.6, electric drives F_BM 1.5, value from memory);
    # escalated by the index ratio. Below 75 kW (the pump motor) the six-tenths rule from 75 kW.
    scenario = scenario_with(drive_enclosure=enclosure)
    case = prepare(scenario)
    index = case.economics.index_to
    d = towercost.evaluate(scenario, LIGHT, trays=16, ratio=1.485)
    tall = towercost.evaluate(scenario, LIGHT, trays=30, ratio=1.3)
    coefficients = DRIVES[enclosure]
    for designs in (d, tall):
        kw = float(designs.blower_shaft_power[0]) / 1000.0
        assert 75.0 < kw < 2600.0
        j = row(designs, "blower_drive")
        assert designs.equipment.spec_at(0, j).correlation == ROWS[enclosure]
        cp0 = hand_cost(coefficients, kw)
        assert float(designs.purchased[0, j]) == pytest.approx(cp0 * index / 397.0, rel=1e-10)
        assert float(designs.bare_module_items[0, j]) == pytest.approx(1.5 * cp0 * index / 397.0, rel=1e-10)
    assert tall.blower_shaft_power[0] > 1.5 * d.blower_shaft_power[0]      # two different sizes
    pump_kw = float(d.pump_shaft_power[0]) / 1000.0
    assert pump_kw < 75.0
    j = row(d, "pump_drive")
    small = hand_cost(coefficients, 75.0) * (pump_kw / 75.0) ** 0.6
    assert float(d.bare_module_items[0, j]) == pytest.approx(1.5 * small * index / 397.0, rel=1e-10)
    assert any("75 to 2600 kW" in w for w in d.warnings)


def test_capital_table_lists_the_motors():
    d = towercost.evaluate(scenario_with(), LIGHT, trays=16, ratio=1.485)
    tags = [spec.tag for spec in d.equipment.specs]
    assert tags == ["T-101", "TR-101", "P-101", "PM-101", "K-101", "KM-101"]
    assert np.all(d.bare_module_items[0] > 0)
    assert float(d.bare_module[0]) == pytest.approx(float(d.bare_module_items[0].sum()), rel=1e-12)


# --------------------------------------------------------------------------- the gas mover


def test_fan_range_warning_on_the_demo_design():
    # The demo's 16-tray design in its least shell: a pressure rise above the fan
    # correlation's 16 kPa (Turton 4th ed., Table A.2, fans 1 to 16 kPa, value from memory).
    # It is priced as a blower by fluid power, and the warning reaches the sheet, the JSON
    # of evaluate and the JSON of optimize alike.
    scenario = scenario_with()
    d = towercost.evaluate(scenario, LIGHT, trays=16, ratio=1.485)
    rise = float(d.blower_rise[0])
    assert rise > costing.FAN_RISE_LIMIT
    j = row(d, "blower")
    assert d.equipment.spec_at(0, j).correlation == "blower_centrifugal_power"
    expected = costing.gas_mover_bare_module_cost(d.gas_inlet_flow, d.blower_rise)
    assert float(d.equipment.bare_module[0, j]) == pytest.approx(float(expected[0]), rel=1e-12)
    message = [w for w in d.warnings if "16 kPa" in w]
    assert len(message) == 1 and "blower by fluid power" in message[0]
    from typer.testing import CliRunner

    from towercost.cli import app

    out = CliRunner().invoke(app, ["evaluate", str(ABSORBER_FILE), "--solvent", LIGHT, "--trays", "16", "--ratio",
                                   "1.485", "--json"])
    record = records_json(out.stdout)
    assert any("16 kPa" in w for w in record["warnings"])
    by_row = {e["item"]: e for e in record["equipment"]}
    assert by_row["blower"]["correlation"] == "blower_centrifugal_power"
    assert by_row["blower"]["size_unit"] == "kW"
    # a wider shell of the same design keeps the rise inside the fan's range: the fan row, no warning
    wide = towercost.evaluate(scenario, LIGHT, trays=16, ratio=1.485, diameter=2.286)
    assert float(wide.blower_rise[0]) < costing.FAN_RISE_LIMIT
    assert wide.equipment.spec_at(0, j) == FAN
    assert not any("16 kPa" in w for w in wide.warnings)


def records_json(text: str) -> dict:
    import json

    return json.loads(text)


def test_pressure_factor_warnings_reach_the_caller():
    # A pump discharging at 150 barg lies above Turton's pump pressure-factor range
    # (10 to 100 barg, Table A.2, value from memory): the message must not be lost.
    messages: list[str] = []
    price_item(PUMP, 10.0, material="carbon_steel", pressure_gauge=150e5, warnings=messages)
    assert len(messages) == 1 and "barg" in messages[0]


# --------------------------------------------------------------------------- vessel


def test_given_design_pressure_and_temperature_replace_the_margin_rule():
    margin = towercost.evaluate(scenario_with(), LIGHT, trays=16, ratio=1.485)
    case = prepare(scenario_with())
    # Source: Seider et al., Product and Process Design Principles, 2nd ed., Eq. (16.61) (value from memory)
    assert float(margin.design_pressure[0]) == pytest.approx(float(vessel.design_pressure(case.pressure)), rel=1e-12)
    assert records.design_record(case, margin)["column"]["design_pressure_basis"].startswith("operating pressure")
    given = scenario_with(design_pressure="3.5 barg", design_temperature="120 degC")
    d = towercost.evaluate(given, LIGHT, trays=16, ratio=1.485)
    assert float(d.design_pressure[0]) == pytest.approx(3.5e5, rel=1e-12)
    assert float(d.design_temperature[0]) == pytest.approx(393.15, rel=1e-12)
    record = records.design_record(prepare(given), d)
    assert record["column"]["design_pressure_basis"] == "given in the scenario"
    assert record["column"]["design_temperature_basis"] == "given in the scenario"
    # a higher design pressure raises the shell's pressure factor (Turton Eq. A.2) and its cost
    j = row(d, "tower_shell")
    assert d.bare_module_items[0, j] > margin.bare_module_items[0, j]
    with pytest.raises(ScenarioError, match="below the operating pressure"):
        prepare(scenario_with(design_pressure="0.05 barg"))
    with pytest.raises(ScenarioError, match="below the operating temperature"):
        prepare(scenario_with(design_temperature="10 degC"))


def test_heads_take_the_rigidity_minimum_and_corrosion_allowance_and_are_weighed():
    # Rigidity minimum 3/8 in for 6 to 8 ft (Seider et al., 2nd ed., Sec. 16.5, value from
    # memory) plus 1/8 in corrosion allowance: 1/2 in, as the shell; the weights from geometry.
    d = towercost.evaluate(scenario_with(), LIGHT, trays=16, ratio=1.485, diameter=2.286)
    assert float(d.head_thickness[0]) == pytest.approx(0.5 * INCH, rel=1e-9)
    assert float(d.head_thickness[0]) == pytest.approx(float(d.wall_thickness[0]), rel=1e-12)
    diameter, height, t_shell, t_head = 2.286, float(d.height[0]), float(d.wall_thickness[0]), float(d.head_thickness[0])
    # cylinder: exact annulus; heads: two blanks of 1.15 D + 2 x 2 in (head-dimension rule, see models.vessel)
    cylinder = math.pi / 4 * ((diameter + 2 * t_shell) ** 2 - diameter**2) * height * 7850.0
    heads = 2 * 7850.0 * t_head * math.pi / 4 * (1.15 * diameter + 2 * 0.0508) ** 2
    assert float(d.shell_weight[0]) == pytest.approx(cylinder, rel=1e-12)
    assert float(d.head_weight[0]) == pytest.approx(heads, rel=1e-12)
    assert float(d.vessel_weight[0]) == pytest.approx(cylinder + heads, rel=1e-12)


def test_existing_shell_is_charged_its_allowance_and_new_trays_only():
    new = towercost.evaluate(scenario_with(), LIGHT, trays=16, ratio=1.485, diameter=2.286)
    reused = scenario_with(existing_shell={"diameter": "2.286 m", "max_trays": 20})
    d = towercost.evaluate(reused, LIGHT, trays=16, ratio=1.485)
    shell, trays = row(d, "tower_shell"), row(d, "trays")
    assert float(d.bare_module_items[0, shell]) == 0.0
    assert float(d.bare_module_items[0, trays]) == pytest.approx(float(new.bare_module_items[0, trays]), rel=1e-12)
    assert float(d.installed[0]) < float(new.installed[0])
    allowed = scenario_with(existing_shell={"diameter": "2.286 m", "max_trays": 20, "modification_allowance": 0.15})
    a = towercost.evaluate(allowed, LIGHT, trays=16, ratio=1.485)
    assert float(a.bare_module_items[0, shell]) == pytest.approx(0.15 * float(new.bare_module_items[0, shell]),
                                                                 rel=1e-12)
    record = records.design_record(prepare(allowed), a)
    assert record["column"]["existing_shell"] == {"diameter_m": pytest.approx(2.286), "modification_allowance": 0.15}
    assert "15 %" in a.equipment.spec_at(0, shell).kind


# --------------------------------------------------------------------------- the tray's operating range

STRIPPER_FILE = ROOT / "scenarios" / "demo_air_stripper.toml"
STRIPPER = tomllib.loads(STRIPPER_FILE.read_text(encoding="utf-8"))
STRIPPER.pop("packing")       # the tray checks below: the demo's packed beds left out

#: Sinnott, Coulson & Richardson's Chemical Engineering Vol. 6, 4th ed., Fig. 11.30 (weep-point
#: constant K2 against h_w + h_ow in mm), as digitized in a public process-model file read
#: through the search tool (the points tests/test_hydraulics.py holds the fit to).
CHART_DEPTH_MM = np.array([15, 20, 30, 40, 50, 60, 70, 80, 90, 100, 110.0])
CHART_K2 = np.array([27.3, 28.3, 29.1, 29.6, 30.0, 30.3, 30.5, 30.8, 30.9, 31.0, 31.1])


def test_weep_margin_of_a_design_against_the_published_chart():
    # The demo absorber's sieve trays at two shells: the sheet's weep margin against a hand
    # evaluation of Sinnott's weep-point correlation (4th ed., Eq. 11.84, value from memory),
    # u_h,min = [K2 - 0.90 (25.4 - d_h)] / sqrt(rho_V), with K2 read off the chart points by
    # linear interpolation at h_w + h_ow of the lowest liquid load (crest 750 (L/(rho_L l_w))**(2/3)
    # mm, Eq. 11.85), the tray row's geometry (models/data/tray_types.toml) and the
    # downcomer area of the flow-parameter rule. The fit of K2 lies within 0.2 of the chart,
    # 1.7 % of the numerator: the tolerance.
    case = prepare(scenario_with())
    for diameter in (2.134, 2.438):
        d = towercost.evaluate(scenario_with(valve_fallback=False), LIGHT, trays=15, ratio=1.537, diameter=diameter)
        assert int(d.tray_type[0]) == 0
        gas, liquid = float(d.gas_mass_flow[0]), float(d.liquid_mass_flow[0])
        rho_v, rho_l = float(case.gas_density[0]), float(case.liquid_density[0])
        f_lv = liquid / gas * math.sqrt(rho_v / rho_l)
        downcomer = 0.1 + (min(max(f_lv, 0.1), 1.0) - 0.1) / 9.0   # Seader et al., 3rd ed., Sec. 6.6
        tower = math.pi * diameter**2 / 4
        holes = 0.10 * (tower - 2 * downcomer * tower)
        weir = 0.73 * diameter
        crest_mm = 750.0 * (0.6 * liquid / (rho_l * weir)) ** (2 / 3)
        k2 = float(np.interp(50.8 + crest_mm, CHART_DEPTH_MM, CHART_K2))
        weep_velocity = (k2 - 0.90 * (25.4 - 4.76)) / math.sqrt(rho_v)
        low_velocity = 0.6 * gas / (rho_v * holes)
        assert float(d.weep_ratio[0]) == pytest.approx(low_velocity / weep_velocity, rel=0.017)


def test_downcomers_govern_the_stripper_diameter():
    # The demo stripper's liquid load (flow parameter near 3, beyond the flooding chart):
    # the least shell is the least standard size at or above the flooding size whose
    # downcomers meet the back-up and residence-time limits. Independent method: the
    # continuous least downcomer diameter of towercost.models.hydraulics.downcomer_diameter
    # (bisection), rounded up to the standard size with the flooding diameter.
    from towercost.models import hydraulics

    case = prepare(parse_scenario(copy.deepcopy(STRIPPER), "test.toml"))
    rng = np.random.default_rng(3)
    agent = np.zeros(30, dtype=int)
    trays = rng.integers(10, 40, 30)
    rate = rng.uniform(1.5, 5.0, 30) * float(SingleColumn(case).rate_min[0])
    d = SingleColumn(case).evaluate(agent, trays, rate)
    assert np.all(d.diameter_least > d.diameter_flooding)           # the downcomers govern every one
    for kind in np.unique(d.tray_type):
        at = d.tray_type == kind
        tray = ("sieve", "valve")[int(kind)]
        fraction = hydraulics.downcomer_area_fraction(d.flow_parameter[at])
        continuous = hydraulics.downcomer_diameter(d.gas_mass_flow[at], d.liquid_mass_flow[at],
                                                   case.gas_density[0], case.liquid_density[0], fraction, tray,
                                                   case.tray_spacing)
        expected = hydraulics.standard_diameter(np.maximum(continuous, d.diameter_required[at]))
        np.testing.assert_allclose(d.diameter_least[at], expected, rtol=0, atol=1e-9)
        np.testing.assert_allclose(d.diameter[at], expected, rtol=0, atol=1e-9)


def test_designs_outside_the_operating_range_are_not_offered():
    from towercost.design.space import build_space

    for tray, fallback in (("sieve", True), ("sieve", False), ("valve", True)):
        case = prepare(scenario_with(tray=tray, valve_fallback=fallback, trays=[8, 24], ratio_levels=10))
        space = build_space(case)
        d = space.full()
        assert np.all(d.range_use[space.feasible] <= 1.0)
        assert np.all(~space.feasible[d.range_use > 1.0])
        if tray == "sieve" and not fallback:
            assert np.all(d.tray_type == 0) and np.any(d.range_use > 1.0)
        if tray == "valve":
            assert np.all(d.tray_type == 1)


def test_valve_trays_remain_a_choice_where_sieve_trays_weep():
    # The demo stripper's gas load is too small for sieve trays at any shell its liquid
    # needs: at 60 % of the design loads they weep (Sinnott's weep point). Without the
    # fallback no design is offered and the reason names the operating range; with it the
    # designs carry valve trays (turndown 4:1, Kister, Distillation Design, Table 6.1, value
    # from memory), priced by the valve-tray row.
    from towercost.errors import InfeasibleSpec
    from towercost.select import ranking

    data = copy.deepcopy(STRIPPER)
    data["column"].update(trays=[10, 20], ratio_levels=8)
    result = ranking.optimize(parse_scenario(copy.deepcopy(data), "test.toml"), top=3)
    assert np.all(result.designs.tray_type == 1)
    j = row(result.designs, "trays")
    assert result.designs.equipment.spec_at(0, j).correlation == "tray_valve"
    data["column"]["valve_fallback"] = False
    with pytest.raises(InfeasibleSpec, match="operating-range use") as raised:
        ranking.optimize(parse_scenario(data, "test.toml"), top=3)
    assert "valve" in str(raised.value)


# --------------------------------------------------------------------------- the sheet


def test_sheet_shows_tray_efficiency_per_solute_and_the_controlling_solute():
    # O'Connell's absorber correlation gives each solute its own efficiency (towercost.models.efficiency);
    # the sheet's figure is theoretical stages over real trays, and the solute whose outlet sits
    # nearest its spec controls (toluene on the demo: its pinch sets the least solvent rate).
    scenario = scenario_with()
    case = prepare(scenario)
    d = towercost.evaluate(scenario, LIGHT, trays=15, ratio=1.6)
    np.testing.assert_allclose(d.efficiency[0], d.stages[0] / 15.0, rtol=1e-15)
    np.testing.assert_allclose(d.efficiency[0], case.efficiency[0], rtol=1e-12)
    assert d.efficiency[0, 0] != pytest.approx(d.efficiency[0, 1], rel=1e-3)
    assert case.solutes[int(d.controlling[0])] == "toluene"
    share = d.outlet[0] / case.target
    assert int(np.argmax(share)) == int(d.controlling[0])
    record = records.design_record(case, d)
    assert record["controlling_solute"] == "toluene"
    assert record["solutes"]["p-xylene"]["tray_efficiency"] == pytest.approx(float(d.efficiency[0, 1]), rel=1e-15)
    from typer.testing import CliRunner

    from towercost.cli import app

    out = CliRunner().invoke(app, ["evaluate", str(ABSORBER_FILE), "--solvent", LIGHT, "--trays", "15", "--ratio", "1.6"])
    assert "tray efficiency" in out.stdout and "toluene controls" in out.stdout
