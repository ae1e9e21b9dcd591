"""Tests for models/equilibrium.py: K-values, T and P corrections, dilute checks."""

from __future__ import annotations

import chemicals
import numpy as np
import pytest
from chemicals import vapor_pressure
from hypothesis import given, settings
from hypothesis import strategies as st

from towercost.models.equilibrium import (
    ATMOSPHERE,
    HENRY_SCALES,
    SCALES_NEEDING_DENSITY,
    SCALES_NEEDING_MOLAR_MASS,
    dilute_warnings,
    henry_at_temperature,
    k_at_conditions,
    k_at_pressure,
    k_from_henry,
    k_from_vapour_pressure,
    slope_from_two_points,
    van_t_hoff_slope,
    volatility_constant,
)

# Water as solvent, the values used in the chemicals.Henry_converter docstring.
WATER_MOLAR_DENSITY = 55344.59  # mol/m3
WATER_MOLAR_MASS_G = 18.01528  # g/mol
WATER_MOLAR_MASS = WATER_MOLAR_MASS_G / 1000.0  # kg/mol

positive = st.floats(min_value=1e-8, max_value=1e8, allow_nan=False, allow_infinity=False)
pressures = st.floats(min_value=1e3, max_value=1e7, allow_nan=False, allow_infinity=False)
temperatures = st.floats(min_value=250.0, max_value=400.0, allow_nan=False, allow_infinity=False)
slopes = st.floats(min_value=-8000.0, max_value=8000.0, allow_nan=False, allow_infinity=False)


def _reference_volatility(value, scale):
    # Independent reference: chemicals.Henry_converter (chemicals 1.x), scalar.
    return chemicals.Henry_converter(
        value, old_scale=scale, new_scale="SI", rhom=WATER_MOLAR_DENSITY, MW=WATER_MOLAR_MASS_G
    )


def _ours(value, scale):
    return volatility_constant(
        value,
        scale,
        liquid_molar_density=WATER_MOLAR_DENSITY,
        liquid_molar_mass=WATER_MOLAR_MASS,
    )


def test_every_chemicals_scale_is_supported():
    # Source: chemicals.solubility.HENRY_SCALES_LIST (chemicals 1.x).
    from chemicals.solubility import HENRY_SCALES_LIST

    assert set(HENRY_SCALES) == set(HENRY_SCALES_LIST)


@pytest.mark.parametrize("scale", HENRY_SCALES)
def test_round_trip_through_chemicals_henry_converter(scale):
    # Source: chemicals.Henry_converter (chemicals 1.x) as the reference.
    # Start from benzene's Hcp = 1.7e-3 mol/(m3 Pa) (Sander 2015, see below),
    # express it in `scale` with chemicals, and convert back with ours.
    hcp = np.array([1.7e-3, 3.3e-4, 1.2e-5])
    in_scale = np.array(
        [
            chemicals.Henry_converter(
                h, old_scale="Hcp", new_scale=scale, rhom=WATER_MOLAR_DENSITY, MW=WATER_MOLAR_MASS_G
            )
            for h in hcp
        ]
    )
    expected = np.array([_reference_volatility(h, "Hcp") for h in hcp])
    got = _ours(in_scale, scale)  # one vectorized call
    np.testing.assert_allclose(got, expected, rtol=1e-12)


@settings(max_examples=60, deadline=None)
@given(value=positive, scale=st.sampled_from(HENRY_SCALES))
def test_volatility_matches_chemicals_for_any_value(value, scale):
    # Source: chemicals.Henry_converter(val, scale, 'SI') (chemicals 1.x).
    assert float(_ours(value, scale)) == pytest.approx(_reference_volatility(value, scale), rel=1e-12)


def test_missing_solvent_property_is_reported():
    for scale in SCALES_NEEDING_DENSITY:
        with pytest.raises(ValueError, match="molar density"):
            volatility_constant(1.0, scale, liquid_molar_mass=WATER_MOLAR_MASS)
    for scale in SCALES_NEEDING_MOLAR_MASS:
        with pytest.raises(ValueError, match="molar mass"):
            volatility_constant(1.0, scale, liquid_molar_density=WATER_MOLAR_DENSITY)
    with pytest.raises(ValueError, match="unknown"):
        volatility_constant(1.0, "bogus")


def test_co2_in_water_matches_handbook_henry_constants():
    # Source: Sander, "Compilation of Henry's law constants (version 4.0) for
    # water as solvent", Atmos. Chem. Phys. 15, 4399 (2015), entry for carbon
    # dioxide: Hcp = 3.3e-4 mol/(m3 Pa), d ln Hcp/d(1/T) = 2400 K (Sander et al.
    # 2011 row, read from henrys-law.org).
    # Check: Perry's Chemical Engineers' Handbook, Table 2-123 (Henry's
    # constants for gases in water): CO2 1.64e3 atm at 25 C and 1.42e3 atm
    # at 20 C (mole-fraction basis; value from memory).
    k = k_at_conditions(
        3.3e-4,
        "Hcp",
        298.15,
        2400.0,
        np.array([298.15, 293.15]),
        ATMOSPHERE,
        liquid_molar_density=WATER_MOLAR_DENSITY,
    )
    np.testing.assert_allclose(k, [1.64e3, 1.42e3], rtol=0.03)


def test_benzene_henry_agrees_with_modified_raoult():
    # Source: Sander (2015), Atmos. Chem. Phys. 15, 4399, benzene entry:
    # Hcp = 1.7e-3 mol/(m3 Pa) at 298.15 K (Staudinger and Roberts 2001 row,
    # read from henrys-law.org).
    # Independent route: gamma_inf Psat / P with benzene's vapour pressure from
    # chemicals' Antoine coefficients (Poling, Prausnitz & O'Connell, The
    # Properties of Gases and Liquids, 5th ed., via chemicals.vapor_pressure)
    # and gamma_inf of benzene in water ~ 2.4e3 at 25 C (value from memory).
    row = vapor_pressure.Psat_data_AntoinePoling.loc["71-43-2"]
    psat = chemicals.Antoine(298.15, row.A, row.B, row.C)
    assert psat == pytest.approx(12.7e3, rel=0.01)  # ~12.7 kPa at 25 C (value from memory)
    k_raoult = k_from_vapour_pressure(psat, ATMOSPHERE, 2.4e3)
    k_henry = k_from_henry(1.7e-3, "Hcp", ATMOSPHERE, liquid_molar_density=WATER_MOLAR_DENSITY)
    assert float(k_henry) == pytest.approx(float(k_raoult), rel=0.15)


def test_air_solubility_temperature_slope_matches_iapws():
    # Source: chemicals.iapws04_Henry_air (IAPWS guideline on Henry's constants,
    # Fernandez-Prini, Alvarez & Harvey, J. Phys. Chem. Ref. Data 32, 903
    # (2003)), returning x/p [1/Pa] for air in water.
    # Compared with Sander (2015), Sander et al. (2011) rows read from
    # henrys-law.org: N2 Hcp = 6.4e-6 mol/(m3 Pa), 1300 K; O2 1.3e-5, 1500 K;
    # Ar 1.4e-5, 1500 K (Ar value from memory), mixed by the air composition
    # chemicals uses (0.7812, 0.2095, 0.0093).
    composition = np.array([0.7812, 0.2095, 0.0093])
    hcp = np.array([6.4e-6, 1.3e-5, 1.4e-5])
    slope = np.array([1300.0, 1500.0, 1500.0])
    t1, t2 = 288.15, 308.15
    # x = p sum(y_i / H^px_i): the air constant in 1/atm ('Hxp' of chemicals).
    def air_hxp(t):
        h = henry_at_temperature(hcp, 298.15, t, slope)
        return ATMOSPHERE * np.sum(composition / volatility_constant(h, "Hcp", liquid_molar_density=WATER_MOLAR_DENSITY))

    ours = slope_from_two_points(air_hxp(t1), t1, air_hxp(t2), t2)
    ref = slope_from_two_points(chemicals.iapws04_Henry_air(t1), t1, chemicals.iapws04_Henry_air(t2), t2)
    assert float(ours) == pytest.approx(float(ref), rel=0.1)
    k_ref = k_from_henry(chemicals.iapws04_Henry_air(298.15) * ATMOSPHERE, "Hxp", ATMOSPHERE)
    k_ours = ATMOSPHERE / air_hxp(298.15) / ATMOSPHERE
    assert float(k_ours) == pytest.approx(float(k_ref), rel=0.05)


def test_van_t_hoff_slope_sign_convention():
    # Source: Sander (2015), temperature dependence: d ln Hcp / d(1/T) = -Delta_sol H / R;
    # gases dissolve exothermically, so the slope is positive and Hcp falls
    # as T rises.
    slope = van_t_hoff_slope(-20_000.0)
    assert float(slope) == pytest.approx(20_000.0 / 8.31446261815324, rel=1e-12)
    assert henry_at_temperature(3.3e-4, 298.15, 318.15, slope) < 3.3e-4


@settings(max_examples=100, deadline=None)
@given(h=positive, p1=pressures, p2=pressures, scale=st.sampled_from(["SI", "KHpx", "Hcp", "Hxp"]))
def test_k_is_inversely_proportional_to_pressure(h, p1, p2, scale):
    # Common practice: ideal gas, y = p / P, so K P is independent of P.
    kw = {"liquid_molar_density": WATER_MOLAR_DENSITY}
    k1 = k_from_henry(h, scale, p1, **kw)
    k2 = k_from_henry(h, scale, p2, **kw)
    assert float(k1 * p1) == pytest.approx(float(k2 * p2), rel=1e-13)
    assert float(k_at_pressure(k1, p1, p2)) == pytest.approx(float(k2), rel=1e-13)


@settings(max_examples=100, deadline=None)
@given(h=positive, t1=temperatures, t2=temperatures, t3=temperatures, slope=slopes)
def test_van_t_hoff_round_trips(h, t1, t2, t3, slope):
    # Independent method: exact algebra of the van 't Hoff form.
    h2 = henry_at_temperature(h, t1, t2, slope)
    h3_direct = henry_at_temperature(h, t1, t3, slope)
    h3_chain = henry_at_temperature(h2, t2, t3, slope)
    assert float(h3_chain) == pytest.approx(float(h3_direct), rel=1e-12)
    if abs(1.0 / t2 - 1.0 / t1) > 1e-6:
        assert float(slope_from_two_points(h, t1, h2, t2)) == pytest.approx(slope, rel=1e-6, abs=1e-6)


def test_functions_broadcast():
    k = k_from_henry(np.array([[1e-3], [2e-3]]), "Hcp", np.array([1e5, 2e5, 4e5]), liquid_molar_density=WATER_MOLAR_DENSITY)
    assert k.shape == (2, 3)
    np.testing.assert_allclose(k[1] / k[0], 0.5, rtol=1e-14)
    kv = k_from_vapour_pressure(np.array([1e3, 2e3]), 1e5, np.array([[1.0], [3.0]]))
    np.testing.assert_allclose(kv, [[0.01, 0.02], [0.03, 0.06]], rtol=1e-14)


def test_hcc_uses_the_given_temperature():
    # Source: Sander (2015), Sec. 2: Hcc = Hcp R T; at T = 298.15 K it is the
    # chemicals.Henry_converter convention.
    hcc = 0.2
    at_298 = volatility_constant(hcc, "Hcc", liquid_molar_density=WATER_MOLAR_DENSITY)
    at_330 = volatility_constant(hcc, "Hcc", liquid_molar_density=WATER_MOLAR_DENSITY, temperature=330.0)
    assert float(at_330 / at_298) == pytest.approx(330.0 / 298.15, rel=1e-14)


def test_k_at_conditions_warns_far_from_reference():
    warnings: list[str] = []
    k_at_conditions(1.7e-3, "Hcp", 298.15, 4200.0, 360.0, 1e5, liquid_molar_density=WATER_MOLAR_DENSITY, warnings=warnings)
    assert len(warnings) == 1 and "van 't Hoff" in warnings[0]


def test_dilute_streams_give_no_warning():
    assert dilute_warnings([0.004, 0.003], [2e-4, 1e-4], [0.0, 0.0], [0.003, 0.002]) == []


def test_concentrated_gas_warns_with_value_and_threshold():
    # Two solutes each below 1 % but 1.2 % in total.
    messages = dilute_warnings([0.006, 0.006], [1e-4, 1e-4], [0.0, 0.0], [0.002, 0.002])
    assert any("gas inlet" in m and "0.012" in m and "0.01" in m and "Kremser" in m for m in messages)


@settings(max_examples=100, deadline=None)
@given(
    y_in=st.floats(0.0, 0.3),
    removal=st.floats(0.0, 1.0),
    gas_flow=st.floats(1.0, 1e3),
)
def test_flow_change_from_solute_matches_carrier_balance(y_in, removal, gas_flow):
    # Independent method: carry the solute-free gas through the column,
    # V_out = V_in (1 - y_in) / (1 - y_out), and compare the relative change.
    y_out = y_in * (1.0 - removal)
    v_out = gas_flow * (1.0 - y_in) / (1.0 - y_out)
    change = abs(v_out - gas_flow) / gas_flow
    from_fractions = dilute_warnings(y_in, y_out, 0.0, 0.0, max_mole_fraction=1.0, max_flow_change=0.05)
    from_flows = dilute_warnings(
        y_in, y_out, 0.0, 0.0, gas_flow_in=gas_flow, gas_flow_out=v_out, max_mole_fraction=1.0, max_flow_change=0.05
    )
    flagged = change > 0.05 * (1 + 1e-9)
    clear = change < 0.05 * (1 - 1e-9)
    if flagged:
        assert any(m.startswith("gas flow") for m in from_fractions)
        assert any(m.startswith("gas flow") for m in from_flows)
    elif clear:
        assert from_fractions == [] and from_flows == []


def test_liquid_flow_change_warns():
    # Liquid picks up 6 % solute: L_out / L_in = 1 / 0.94, a 6.4 % change.
    messages = dilute_warnings(0.005, 0.0001, 0.0, 0.06, max_mole_fraction=0.1)
    assert len(messages) == 1
    assert messages[0].startswith("liquid flow changes by 6.38%")


# ---------------------------------------------------------------------------
# the equilibrium line on the mole-ratio basis
# ---------------------------------------------------------------------------

from towercost.models.equilibrium import (  # noqa: E402
    gas_ratio_at_equilibrium,
    liquid_ratio_at_equilibrium,
    vapour_pressure_dippr101,
)


@settings(max_examples=100, deadline=None)
@given(
    liquid_fraction=st.floats(0.0, 0.95),
    k_value=st.floats(0.01, 100.0),
)
def test_ratio_curve_is_y_equals_k_x_in_fractions(liquid_fraction, k_value):
    # Independent method: the definition y = K x with X = x / (1 - x), Y = y / (1 - y).
    gas_fraction = k_value * liquid_fraction
    if gas_fraction >= 0.999:
        return
    liquid_ratio = liquid_fraction / (1.0 - liquid_fraction)
    gas_ratio = float(gas_ratio_at_equilibrium(liquid_ratio, k_value))
    assert gas_ratio == pytest.approx(gas_fraction / (1.0 - gas_fraction), rel=1e-12, abs=1e-300)
    assert float(liquid_ratio_at_equilibrium(gas_ratio, k_value)) == pytest.approx(liquid_ratio, rel=1e-10,
                                                                                  abs=1e-300)


def test_ratio_curve_treybal_wash_oil_point():
    # Source: Treybal, Mass-Transfer Operations, 3rd ed., Illustration 8.2 (as transcribed): the
    # curve Y*/(1 + Y*) = (p*/P) X/(1 + X) with p* = 13.33 kN/m2, P = 1.07e5 N/m2. Hand evaluation
    # at X = 0.1: x = 1/11, y = 0.124579 / 11 = 0.0113253, Y = 0.0114551.
    k = 13.33e3 / 1.07e5
    assert float(gas_ratio_at_equilibrium(0.1, k)) == pytest.approx(0.0114551, rel=1e-5)


def test_ratio_curve_limits():
    # A liquid with K x >= 1 or a gas with y >= K (K < 1) has no equilibrium partner: inf.
    assert np.isinf(gas_ratio_at_equilibrium(1.0, 3.0))          # x = 0.5, K x = 1.5
    assert np.isinf(liquid_ratio_at_equilibrium(0.5, 0.2))       # y = 1/3 > K
    assert float(gas_ratio_at_equilibrium(np.inf, 0.5)) == pytest.approx(1.0)     # y -> K
    assert float(liquid_ratio_at_equilibrium(np.inf, 3.0)) == pytest.approx(0.5)   # x -> 1/K
    with pytest.raises(ValueError, match="K must be > 0"):
        gas_ratio_at_equilibrium(0.1, 0.0)
    with pytest.raises(ValueError, match="mole ratio"):
        liquid_ratio_at_equilibrium(-0.1, 1.0)
    assert gas_ratio_at_equilibrium([[0.1, 0.2]], [[0.5], [2.0]]).shape == (2, 2)


# ---------------------------------------------------------------------------
# vapour pressure by CAS number
# ---------------------------------------------------------------------------


@pytest.mark.parametrize("cas", ["71-43-2", "7732-18-5", "108-88-3", "64-17-5", "112-40-3", "107-21-1"])
def test_vapour_pressure_matches_chemicals_dippr_101(cas):
    # Reference library: chemicals.dippr.EQ101 with the same Perry's Table 2-8 row (chemicals 1.x).
    from chemicals.dippr import EQ101
    from chemicals.vapor_pressure import Psat_data_Perrys2_8

    row = Psat_data_Perrys2_8.loc[cas]
    temperatures = np.linspace(row["Tmin"], row["Tmax"], 7)
    got = vapour_pressure_dippr101(cas, temperatures)
    expected = [EQ101(t, row["C1"], row["C2"], row["C3"], row["C4"], row["C5"]) for t in temperatures]
    assert np.allclose(got, expected, rtol=1e-12, atol=0.0)


def test_vapour_pressure_against_treybal_benzene():
    # Source: Treybal, Mass-Transfer Operations, 3rd ed., Illustration 8.2 (as transcribed): benzene
    # vapour pressure 13.33 kN/m2 at 26 C and 319.9 kN/m2 at 122 C. Measured with Perry's
    # coefficients: 13.24 (-0.7 %) and 314.2 kN/m2 (-1.8 %).
    got = vapour_pressure_dippr101("71-43-2", [299.15, 395.15])
    assert got[0] == pytest.approx(13.33e3, rel=0.01)
    assert got[1] == pytest.approx(319.9e3, rel=0.02)


def test_vapour_pressure_of_water_at_the_normal_boiling_point():
    # Source: IAPWS-95 (Wagner and Pruss 2002) as implemented in chemicals.iapws.iapws95_Psat:
    # 101.418 kPa at 373.15 K; Perry's DIPPR-101 fit reproduces it within 0.2 %.
    from chemicals.iapws import iapws95_Psat

    assert float(vapour_pressure_dippr101("7732-18-5", 373.15)) == pytest.approx(iapws95_Psat(373.15), rel=2e-3)


def test_vapour_pressure_range_and_unknown_compound():
    warnings: list[str] = []
    value = vapour_pressure_dippr101("71-43-2", 250.0, warnings=warnings)
    assert np.isfinite(value) and len(warnings) == 1 and "Benzene" in warnings[0]
    with pytest.raises(ValueError, match="no DIPPR-101"):
        vapour_pressure_dippr101("0-00-0", 300.0)
