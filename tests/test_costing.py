"""Checks of models/costing.py against Turton's Appendix A and the CEPCI table.

Book: Turton, Bailie, Whiting, Shaeiwitz, Bhattacharyya, "Analysis, Synthesis
and Design of Chemical Processes", 4th ed. (2012). Coefficients and equation
numbers cited here are value from memory, as marked; no worked example of
the book was available in stored material, so the cost figures below are
hand evaluations of the published correlations with the published
coefficients, not example answers.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from towercost.models import costing


# ----------------------------------------------------------------------------- table data


@pytest.mark.parametrize(
    ("item", "coefficients", "valid"),
    [
        # Source: Turton 4th ed., App. A, Table A.1 (value from memory).
        ("vessel_vertical", (3.4974, 0.4485, 0.1074), (0.3, 520.0)),
        ("tray_sieve", (2.9949, 0.4465, 0.3961), (0.07, 12.3)),
        ("tray_valve", (3.3322, 0.4838, 0.3434), (0.7, 10.5)),
        ("pump_centrifugal", (3.3892, 0.0536, 0.1538), (1.0, 300.0)),
        ("heat_exchanger_fixed_tube", (4.3247, -0.3030, 0.1634), (10.0, 1000.0)),
        ("blower_centrifugal", (3.5391, -0.3533, 0.4477), (1.0, 100.0)),
    ],
)
def test_table_rows_carry_turton_coefficients(item, coefficients, valid):
    row = costing.load_cost_table()[item]
    assert (row["k1"], row["k2"], row["k3"]) == coefficients
    assert tuple(row["valid"]) == valid
    assert row["index_basis"] == 397.0  # Turton 4th ed., App. A: CEPCI 397, Sept. 2001 (value from memory)
    assert "Turton" in row["source"]


def test_every_row_names_a_source():
    for item, row in costing.load_cost_table().items():
        assert row["source"], item
        assert row["material"]["source"], item
        if "pressure" in row:
            assert row["pressure"]["source"], item


def test_load_cost_table_returns_independent_copies():
    first = costing.load_cost_table()
    first["vessel_vertical"]["k1"] = 0.0
    assert costing.load_cost_table()["vessel_vertical"]["k1"] == 3.4974


def test_bare_module_b1_b2_constants():
    # Source: Turton 4th ed., App. A, Table A.4 (value from memory): vessels 2.25/1.82,
    # pumps 1.89/1.35, shell-and-tube exchangers 1.63/1.66.
    table = costing.load_cost_table()
    assert (table["vessel_vertical"]["b1"], table["vessel_vertical"]["b2"]) == (2.25, 1.82)
    assert (table["pump_centrifugal"]["b1"], table["pump_centrifugal"]["b2"]) == (1.89, 1.35)
    assert (table["heat_exchanger_fixed_tube"]["b1"], table["heat_exchanger_fixed_tube"]["b2"]) == (1.63, 1.66)


# ----------------------------------------------------------------------------- purchased cost


def test_vessel_purchased_cost_hand_evaluation():
    # Source: Turton 4th ed., App. A, Eq. (A.1), Table A.1 vertical vessel (value from memory).
    # Hand evaluation at V = 10 m3: log10 Cp0 = 3.4974 + 0.4485 + 0.1074 = 4.0533 -> 11,306 USD.
    assert float(costing.purchased_cost("vessel_vertical", 10.0)) == pytest.approx(10**4.0533, rel=1e-12)
    assert float(costing.purchased_cost("vessel_vertical", 10.0)) == pytest.approx(11306, abs=1)


def test_sieve_tray_purchased_cost_hand_evaluation():
    # Source: Turton 4th ed., App. A, Table A.1 sieve trays (value from memory).
    # A = 1 m2 leaves only K1: Cp0 = 10**2.9949 = 988.3 USD per tray.
    assert float(costing.purchased_cost("tray_sieve", 1.0)) == pytest.approx(988.3, abs=0.1)


def test_purchased_cost_matches_mpmath_over_range():
    # Independent evaluation: mpmath at 30 digits of the same Table A.1 row.
    import mpmath

    mpmath.mp.dps = 30
    sizes = np.geomspace(0.3, 520.0, 25)
    got = costing.purchased_cost("vessel_vertical", sizes)
    for size, value in zip(sizes, got):
        x = mpmath.log10(mpmath.mpf(float(size)))
        expect = mpmath.power(10, mpmath.mpf("3.4974") + mpmath.mpf("0.4485") * x + mpmath.mpf("0.1074") * x**2)
        assert value == pytest.approx(float(expect), rel=1e-12)


def test_purchased_cost_out_of_range_answers_and_warns():
    warnings: list[str] = []
    value = costing.purchased_cost("tray_sieve", 0.05, warnings=warnings)
    assert np.isfinite(value) and value > 0
    assert len(warnings) == 1 and "0.07 to 12.3 m2" in warnings[0]
    quiet: list[str] = []
    costing.purchased_cost("tray_sieve", [0.5, 2.0], warnings=quiet)
    assert quiet == []


def test_purchased_cost_broadcasts():
    sizes = np.array([[1.0, 2.0, 5.0], [10.0, 20.0, 50.0]])
    assert costing.purchased_cost("vessel_vertical", sizes).shape == (2, 3)


def test_bad_inputs_raise():
    with pytest.raises(ValueError, match="known items"):
        costing.purchased_cost("reactor", 1.0)
    with pytest.raises(ValueError, match="> 0"):
        costing.purchased_cost("vessel_vertical", 0.0)


# ----------------------------------------------------------------------------- factors


def test_vessel_pressure_factor_clips_to_one_at_ambient():
    # Source: Turton 4th ed., App. A, Eq. (A.2) (value from memory): F_P >= 1.
    assert np.all(costing.vessel_pressure_factor(0.0, np.array([0.5, 1.0, 3.0])) == 1.0)


def test_vessel_pressure_factor_vacuum_is_1_25():
    # Source: Turton 4th ed., App. A, text beside Eq. (A.2) (value from memory): P < -0.5 barg -> 1.25.
    assert float(costing.vessel_pressure_factor(-0.6e5, 2.0)) == 1.25
    assert float(costing.vessel_pressure_factor(-0.4e5, 2.0)) == 1.0


def test_vessel_pressure_factor_hand_evaluation():
    # Source: Turton 4th ed., App. A, Eq. (A.2) (value from memory); hand arithmetic at
    # P = 20 barg, D = 2 m: (21*2 / (2*(850 - 12.6)) + 0.00315) / 0.0063 = 4.4806.
    assert float(costing.vessel_pressure_factor(20e5, 2.0)) == pytest.approx(4.48057, rel=1e-5)


def test_table_pressure_factor_hand_evaluation():
    # Source: Turton 4th ed., App. A, Table A.2, centrifugal pump (value from memory):
    # P = 50 barg: log10 F_P = -0.3935 + 0.3957*1.69897 - 0.00226*1.69897**2 = 0.27224.
    assert float(costing.pressure_factor("pump_centrifugal", 50e5)) == pytest.approx(10**0.27224, rel=1e-4)
    assert float(costing.pressure_factor("pump_centrifugal", 9e5)) == 1.0
    # Fixed-tube exchanger at 5 barg, the low end: log10 5 = 0.69897,
    # 0.03881 - 0.11272*0.69897 + 0.08183*0.48856 = 0.00007 -> F_P close to 1.
    assert float(costing.pressure_factor("heat_exchanger_fixed_tube", 5e5)) == pytest.approx(1.0, abs=1e-3)


def test_pressure_factor_above_range_warns():
    warnings: list[str] = []
    value = costing.pressure_factor("pump_centrifugal", 150e5, warnings=warnings)
    assert value > 1.0 and len(warnings) == 1 and "barg" in warnings[0]


def test_blower_pressure_factor_uses_rise_in_kpa():
    # Source: Turton 4th ed., App. A, Table A.2, fans (value from memory): C2 = 0.20899,
    # C3 = -0.0328 on the rise in kPa. dP = 10 kPa: log10 F_P = 0.20899 - 0.0328 = 0.17619.
    assert float(costing.pressure_factor("blower_centrifugal", 10e3)) == pytest.approx(10**0.17619, rel=1e-9)


def test_material_factor_values_and_errors():
    # Source: Turton et al., 3rd ed., Example 7.13 (read in a stored copy of the book):
    # stainless sieve trays, F_BM = 1.83 from Figure A.19.
    assert costing.material_factor("tray_sieve", "ss304") == 1.83
    assert costing.material_factor("vessel_vertical", "carbon_steel") == 1.0
    with pytest.raises(ValueError, match="allowed: carbon_steel, ss304, ss316"):
        costing.material_factor("tray_sieve", "titanium")


def test_tray_quantity_factor_one_tray_is_about_three():
    # Source: Turton 4th ed., App. A, Eq. (A.6) (value from memory): F_q(1) = 10**0.4771 = 3.0.
    assert float(costing.tray_quantity_factor(1)) == pytest.approx(10**0.4771, rel=1e-12)
    assert float(costing.tray_quantity_factor(1)) == pytest.approx(3.0, abs=1e-3)


def test_tray_quantity_factor_meets_one_at_twenty():
    # Source: Turton 4th ed., App. A, Eq. (A.6) (value from memory): F_q = 1 for N >= 20;
    # the fit itself gives 1.0000 at N = 20 (0.4771 + 0.08516*1.30103 - 0.3473*1.69268 = -2e-5).
    assert float(costing.tray_quantity_factor(19.9999)) == pytest.approx(1.0, abs=1e-3)
    assert np.all(costing.tray_quantity_factor([20, 35, 80]) == 1.0)


@settings(max_examples=200, deadline=None)
@given(st.floats(1.0, 40.0), st.floats(0.0, 20.0))
def test_more_trays_never_cost_less_in_total(count, extra):
    # Property: N F_q, the quantity-weighted tray count, never falls as N grows.
    # (F_q alone is not monotone: the fit peaks at N = 10**(0.08516/0.6946) = 1.33, F_q = 3.04.)
    more = count + extra
    assert more * costing.tray_quantity_factor(more) >= count * costing.tray_quantity_factor(count) * (1 - 1e-12)


@settings(max_examples=100, deadline=None)
@given(st.integers(2, 40), st.integers(0, 20))
def test_per_tray_factor_never_rises_for_whole_trays_from_two(count, extra):
    # Property: from two whole trays on, buying more never raises the factor per tray.
    assert costing.tray_quantity_factor(count + extra) <= costing.tray_quantity_factor(count) + 1e-12


# ----------------------------------------------------------------------------- bare module


def test_vessel_bare_module_at_base_conditions():
    # Source: Turton 4th ed., App. A, Eq. (A.4) and Table A.4 (value from memory):
    # carbon steel at ambient pressure, F_BM = B1 + B2 = 2.25 + 1.82 = 4.07.
    cp0 = costing.purchased_cost("vessel_vertical", 30.0)
    cbm = costing.bare_module_cost("vessel_vertical", 30.0, diameter=2.0)
    assert float(cbm / cp0) == pytest.approx(4.07, rel=1e-12)


def test_vessel_bare_module_stainless_at_pressure():
    # Turton 4th ed., App. A, Eq. (A.4) (value from memory), hand evaluation:
    # SS (F_M 3.12), 20 barg, D = 2 m (F_P 4.4806): F_BM = 2.25 + 1.82*3.12*4.4806 = 27.69.
    cp0 = costing.purchased_cost("vessel_vertical", 30.0)
    cbm = costing.bare_module_cost("vessel_vertical", 30.0, material="ss316", pressure_gauge=20e5, diameter=2.0)
    assert float(cbm / cp0) == pytest.approx(2.25 + 1.82 * 3.12 * 4.48057, rel=1e-5)


def test_tray_bare_module_cost_build_up():
    # Source: Turton 4th ed., App. A, Eq. (A.5) (value from memory): C_BM = Cp0 N F_BM F_q.
    # 10 SS sieve trays on a 1 m2 tower: 988.3 * 10 * 1.83 * F_q(10);
    # log10 F_q(10) = 0.4771 + 0.08516 - 0.3473 = 0.21496 -> F_q = 1.6402.
    cbm = costing.bare_module_cost("tray_sieve", 1.0, material="ss304", trays=10)
    assert float(cbm) == pytest.approx(10**2.9949 * 10 * 1.83 * 10**0.21496, rel=1e-9)
    assert float(cbm) == pytest.approx(29666, abs=5)


def test_bare_module_broadcasts_over_designs():
    areas = np.array([0.8, 1.5, 3.0])[:, None]
    trays = np.array([5, 12, 30])[None, :]
    assert costing.bare_module_cost("tray_valve", areas, trays=trays).shape == (3, 3)


def test_bare_module_needs_geometry():
    with pytest.raises(ValueError, match="diameter"):
        costing.bare_module_cost("vessel_vertical", 10.0)
    with pytest.raises(ValueError, match="trays"):
        costing.bare_module_cost("tray_sieve", 1.0)


def test_pump_and_blower_bare_module():
    # Source: Turton 4th ed., App. A, Tables A.3, A.4, A.6 (value from memory).
    cp0 = costing.purchased_cost("pump_centrifugal", 10.0)
    assert float(costing.bare_module_cost("pump_centrifugal", 10.0) / cp0) == pytest.approx(1.89 + 1.35 * 1.54)
    fan = costing.purchased_cost("blower_centrifugal", 5.0)
    assert float(costing.bare_module_cost("blower_centrifugal", 5.0, pressure_gauge=0.5e3) / fan) == pytest.approx(2.74)


# ----------------------------------------------------------------------------- index, installed cost


def test_cost_index_rows():
    # Source: Chemical Engineering magazine, CEPCI annual averages (value from memory).
    assert costing.cost_index(2001) == 394.3
    assert costing.cost_index(2019) == 607.5
    assert np.allclose(costing.cost_index([2010, 2020]), [550.8, 596.2])


def test_cost_index_missing_year_is_clear():
    with pytest.raises(ValueError, match="no cost index for year 1850; the table covers 1994 to 2024"):
        costing.cost_index(1850)


def test_escalation_from_turton_basis():
    # Source: Turton 4th ed., Section 7.2, Eq. (7.4) (value from memory):
    # 10,000 USD at CEPCI 397 -> 2019 (607.5): 10,000 * 607.5 / 397 = 15,302.27 USD.
    assert float(costing.escalate(10000.0, 397.0, costing.cost_index(2019))) == pytest.approx(15302.27, abs=0.01)
    # Round trip.
    assert float(costing.escalate(costing.escalate(123.0, 397.0, 816.0), 816.0, 397.0)) == pytest.approx(123.0)


def test_installed_cost_reproduces_turton_factors():
    # Source: Turton 4th ed., Section 7.3, Eqs. (7.10)-(7.11) (value from memory):
    # C_TM = 1.18 sum C_BM; C_GR = C_TM + 0.50 sum C_BM0.
    cost = costing.installed_cost(np.array([1.0e5, 2.5e6]), bare_module_base=np.array([6.0e4, 1.0e6]))
    assert np.allclose(cost.total_module, 1.18 * np.array([1.0e5, 2.5e6]))
    assert np.allclose(cost.grassroots, 1.18 * np.array([1.0e5, 2.5e6]) + 0.5 * np.array([6.0e4, 1.0e6]))
    default = costing.installed_cost(1.0e5)
    assert math.isclose(float(default.grassroots), 1.68e5)


@pytest.mark.parametrize("item", ["vessel_vertical", "tray_sieve", "pump_centrifugal", "blower_centrifugal"])
def test_cost_beyond_the_fitted_range_scales_by_six_tenths(item):
    # Outside the fitted range the cost follows the six-tenths rule from the
    # nearest end (Williams, Chem. Eng. 54(12), 124, 1947; value from memory):
    # it keeps rising with size and never turns back as the quadratic would.
    low, high = costing.load_cost_table()[item]["valid"]
    sizes = np.array([low / 20.0, low / 4.0, low, high, high * 3.0])
    cost = costing.purchased_cost(item, sizes)
    assert np.all(np.diff(cost) > 0)
    assert cost[0] / cost[2] == pytest.approx(20.0 ** -0.6, rel=1e-12)
    assert cost[4] / cost[3] == pytest.approx(3.0 ** 0.6, rel=1e-12)
    messages = []
    costing.purchased_cost(item, sizes, warnings=messages)
    assert len(messages) == 1 and "outside" in messages[0]


# ----------------------------------------------------------------------------- published example


def test_reproduces_turton_example_7_13_tower_and_trays():
    # Source: Turton, Bailie, Whiting, Shaeiwitz, Analysis, Synthesis and
    # Design of Chemical Processes, 3rd ed. (2009), Example 7.13 (read in a
    # stored copy of the book, pp. 211-212): stainless tower 3 m diameter,
    # 30 m tall (212.1 m3), 20 barg, 40 stainless sieve trays; 2006 costs.
    # Published: C_BM tower = $6,486,000, one tray $5,756, C_BM trays =
    # $5,756 x 40 x 1.83 x 1.0 = $421,300, total $6,908,300. The 2006 index
    # CEPCI 500 is value from memory (the published $5,756 per tray is the
    # 2001 fit x 500/397 to 0.02 %).
    index_2006 = 500.0
    volume = math.pi * 3.0**2 * 30.0 / 4.0
    area = math.pi * 3.0**2 / 4.0
    tower = costing.escalate(
        costing.bare_module_cost("vessel_vertical", volume, material="ss304", pressure_gauge=20e5, diameter=3.0),
        397.0, index_2006)
    per_tray = costing.escalate(costing.purchased_cost("tray_sieve", area), 397.0, index_2006)
    trays = costing.escalate(costing.bare_module_cost("tray_sieve", area, material="ss304", trays=40), 397.0, index_2006)
    assert float(per_tray) == pytest.approx(5756, rel=0.01)
    assert float(trays) == pytest.approx(421300, rel=0.01)
    assert float(tower) == pytest.approx(6486000, rel=0.01)       # +0.3 %: the table's SS F_M 3.12, the book 3.11
    assert float(tower + trays) == pytest.approx(6908300, rel=0.01)


# ----------------------------------------------------------------------------- drives and blowers


@pytest.mark.parametrize(
    ("item", "coefficients"),
    [
        # Source: Turton 4th ed., App. A, Table A.1, drives: electric (value from memory), 75 to 2600 kW.
        ("drive_electric_explosion_proof", (2.4604, 1.4191, -0.1798)),
        ("drive_electric_enclosed", (1.9560, 1.7142, -0.2282)),
        ("drive_electric_open", (2.9508, 1.0688, -0.1315)),
    ],
)
def test_electric_drive_rows(item, coefficients):
    row = costing.load_cost_table()[item]
    assert (row["k1"], row["k2"], row["k3"]) == coefficients
    assert tuple(row["valid"]) == (75.0, 2600.0)
    # Source: Turton 4th ed., App. A, Table A.6, electric drives F_BM = 1.5 (value from memory).
    assert costing.material_factor(item, "carbon_steel") == 1.5
    cp0 = costing.purchased_cost(item, 300.0)
    x = math.log10(300.0)
    assert float(cp0) == pytest.approx(10 ** (coefficients[0] + coefficients[1] * x + coefficients[2] * x**2), rel=1e-12)
    assert float(costing.bare_module_cost(item, 300.0)) == pytest.approx(1.5 * float(cp0), rel=1e-12)
    # a 10 kW pump motor lies below the fitted range: six-tenths rule from 75 kW, with a warning
    messages: list[str] = []
    small = costing.purchased_cost(item, 10.0, warnings=messages)
    assert float(small) == pytest.approx(float(costing.purchased_cost(item, 75.0)) * (10.0 / 75.0) ** 0.6, rel=1e-12)
    assert len(messages) == 1 and "75 to 2600 kW" in messages[0]


def test_explosion_proof_costs_more_than_totally_enclosed():
    # An explosion-proof motor costs more than a totally enclosed one of the
    # same power over the whole fitted range (Turton Table A.1 rows).
    # (The open/drip-proof row, value from memory, prices above the totally
    # enclosed one below about 300 kW: doubtful, see its source note.)
    power = np.geomspace(75.0, 2600.0, 20)
    explosion = costing.purchased_cost("drive_electric_explosion_proof", power)
    enclosed = costing.purchased_cost("drive_electric_enclosed", power)
    assert np.all(explosion > enclosed)


def test_blower_row_by_fluid_power():
    # Source: Turton 4th ed., App. A, Table A.1, blowers: centrifugal, fluid
    # power 50 to 1000 kW (value from memory); fans and blowers F_BM CS 2.74.
    row = costing.load_cost_table()["blower_centrifugal_power"]
    assert (row["k1"], row["k2"], row["k3"]) == (3.8696, 0.3161, 0.1220)
    assert row["size_unit"] == "kW" and tuple(row["valid"]) == (50.0, 1000.0)
    assert float(costing.fluid_power(4.0, 25e3)) == pytest.approx(100.0)
    x = math.log10(100.0)
    cp0 = 10 ** (3.8696 + 0.3161 * x + 0.1220 * x**2)
    assert float(costing.bare_module_cost("blower_centrifugal_power", 100.0)) == pytest.approx(2.74 * cp0, rel=1e-12)


def test_gas_mover_switches_to_the_blower_above_the_fan_range():
    flow = np.array([5.0, 5.0, 5.0])
    rise = np.array([8e3, 16e3, 40e3])
    cost = costing.gas_mover_bare_module_cost(flow, rise)
    fan = costing.bare_module_cost("blower_centrifugal", 5.0, pressure_gauge=np.array([8e3, 16e3]))
    assert cost[:2] == pytest.approx(fan, rel=1e-12)
    assert cost[2] == pytest.approx(float(costing.bare_module_cost("blower_centrifugal_power", 200.0)), rel=1e-12)
    quiet: list[str] = []
    costing.gas_mover_bare_module_cost(flow, rise, warnings=quiet)
    assert quiet == []          # each point priced inside its own row's range
    loud: list[str] = []
    costing.gas_mover_bare_module_cost([0.5, 0.5], [5e3, 20e3], warnings=loud)
    assert len(loud) == 2       # fan flow below 1 m3/s; blower power 10 kW below 50 kW


def test_bare_module_cost_passes_warnings_to_every_inner_call():
    # Pressure factor above its fitted range (pump 150 barg > 100 barg; fan 20 kPa > 16 kPa)
    # and size outside the purchased-cost range must all reach the caller.
    pump: list[str] = []
    costing.bare_module_cost("pump_centrifugal", 10.0, pressure_gauge=150e5, warnings=pump)
    assert len(pump) == 1 and "barg" in pump[0]
    fan: list[str] = []
    costing.bare_module_cost("blower_centrifugal", 0.5, pressure_gauge=20e3, warnings=fan)
    assert len(fan) == 2 and any("kPa" in m for m in fan) and any("m3/s" in m for m in fan)
    exchanger: list[str] = []
    costing.bare_module_cost("heat_exchanger_fixed_tube", 5.0, pressure_gauge=200e5, warnings=exchanger)
    assert len(exchanger) == 2
