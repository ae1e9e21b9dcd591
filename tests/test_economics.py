"""Checks of models/economics.py.

Reference library: numpy-financial (PyPI), ``numpy_financial.pmt``, for the
capital recovery factor; scipy.integrate.quad and mpmath as independent
evaluations.
"""

from __future__ import annotations

import mpmath
import numpy as np
import numpy_financial as npf
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy import integrate

from towercost.models import economics


def test_crf_equals_numpy_financial_payment():
    # Reference library: numpy-financial 1.0, pmt(rate, nper, pv): the CRF is the
    # payment per unit present value, CRF = -pmt(i, n, 1).
    rates = np.array([0.0, 0.001, 0.02, 0.05, 0.08, 0.10, 0.15, 0.25])[:, None]
    lives = np.array([1, 2, 5, 10, 15, 20, 30, 50])[None, :]
    expect = -npf.pmt(rates, lives, 1.0)
    got = economics.capital_recovery_factor(rates, lives)
    assert got.shape == (8, 8)
    np.testing.assert_allclose(got, expect, rtol=1e-12)


def test_crf_interest_table_value():
    # Source: compound-interest factor tables, (A/P, 10%, 10) = 0.16275, e.g. Turton et al.,
    # Analysis, Synthesis and Design of Chemical Processes, 4th ed., Chapter 9 (value from memory).
    assert float(economics.capital_recovery_factor(0.10, 10)) == pytest.approx(0.16275, abs=5e-6)


def test_crf_zero_rate_limit_is_exact():
    assert float(economics.capital_recovery_factor(0.0, 8)) == 1.0 / 8.0


@pytest.mark.parametrize("rate", [1e-15, 1e-12, 1e-9, 1e-6, -1e-9])
def test_crf_small_rates_match_high_precision(rate):
    # Independent method: mpmath at 50 digits of i (1+i)^n / ((1+i)^n - 1).
    mpmath.mp.dps = 50
    i = mpmath.mpf(rate)
    n = 25
    expect = i * (1 + i) ** n / ((1 + i) ** n - 1)
    assert float(economics.capital_recovery_factor(rate, n)) == pytest.approx(float(expect), rel=1e-13)


def test_pump_power():
    # Source: Perry's Chemical Engineers' Handbook, 8th ed., Section 10 (value from memory):
    # W = Q dP / eta. 0.01 m3/s through 2 bar at 70 %: 2000 / 0.7 = 2857.14 W.
    assert float(economics.pump_power(0.01, 2.0e5)) == pytest.approx(2857.142857, rel=1e-9)
    assert float(economics.electric_power(2857.142857, 0.9)) == pytest.approx(3174.603, rel=1e-6)


def test_blower_power_matches_isentropic_work_integral():
    # Independent method: integrate V dP along the isentrope P V^k = const with scipy.quad.
    flow, inlet, rise, k, eta = 3.0, 101325.0, 12000.0, 1.4, 0.7

    def volume(pressure):
        return flow * (inlet / pressure) ** (1.0 / k)

    work, _ = integrate.quad(volume, inlet, inlet + rise)
    assert float(economics.blower_power(flow, inlet, rise, eta, k)) == pytest.approx(work / eta, rel=1e-10)


@settings(max_examples=200, deadline=None)
@given(
    st.floats(0.1, 100.0),
    st.floats(5.0e4, 5.0e5),
    st.floats(1e-6, 1e-2),
    st.floats(0.3, 1.0),
    st.floats(1.05, 1.67),
)
def test_blower_power_tends_to_fan_power_for_small_rise(flow, inlet, relative_rise, eta, k):
    # Property: for dP << P1 the adiabatic power tends to Q dP / eta from below, with a
    # relative gap of about dP / (2 k P1).
    rise = relative_rise * inlet
    adiabatic = float(economics.blower_power(flow, inlet, rise, eta, k))
    incompressible = flow * rise / eta
    assert adiabatic <= incompressible * (1 + 1e-12)
    assert adiabatic == pytest.approx(incompressible, rel=relative_rise)


def test_blower_power_broadcasts():
    assert economics.blower_power(np.ones((4, 1)), 101325.0, np.linspace(1e3, 8e3, 5)).shape == (4, 5)


def test_utility_costs():
    # Common practice: cost = rate * price * time on stream.
    # 1 kW for 8000 h at 0.10 USD/kWh = 800 USD/yr.
    assert float(economics.electricity_cost(1000.0, 0.10, 8000.0)) == pytest.approx(800.0)
    # 0.5 kg/s of steam at 0.02 USD/kg for 8000 h: 0.5 * 3600 * 8000 * 0.02 = 288,000 USD/yr.
    assert float(economics.annual_utility_cost(0.5, 0.02, 8000.0)) == pytest.approx(288000.0)


def test_annualized_cost():
    # Common practice: TAC = CRF * capital + operating - credit.
    crf = economics.capital_recovery_factor(0.10, 10)
    tac = economics.annualized_cost(np.array([1.0e6, 2.0e6]), crf, 5.0e4, credit=1.0e4)
    np.testing.assert_allclose(tac, np.array([1.0e6, 2.0e6]) * float(crf) + 4.0e4)


def test_bad_inputs_raise():
    with pytest.raises(ValueError):
        economics.capital_recovery_factor(0.1, 0)
    with pytest.raises(ValueError):
        economics.pump_power(1.0, 1.0, efficiency=0.0)
    with pytest.raises(ValueError):
        economics.blower_power(1.0, 0.0, 1.0)
