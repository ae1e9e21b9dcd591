"""Tests for models/solvent_loop.py: solvent vapour loss and the steady lean loading of the loop."""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from towercost.models import concentrated, kremser, solvent_loop
from towercost.models.equilibrium import vapour_pressure_dippr101

# ---------------------------------------------------------------------------
# solvent lost by evaporation
# ---------------------------------------------------------------------------


def test_water_loss_with_iapws_vapour_pressure():
    # Source: IAPWS-95 (Wagner and Pruss 2002) as implemented in chemicals.iapws.iapws95_Psat:
    # water at 40 C has Psat = 7.3849 kPa (the steam-table value, value from memory). 250 mol/s of
    # gas leaving over pure water at 1.2 bar carries 250 x 7384.9 / 120000 = 15.385 mol/s of water.
    from chemicals.iapws import iapws95_Psat

    p_sat = iapws95_Psat(313.15)
    assert p_sat == pytest.approx(7384.9, rel=2e-4)
    loss = solvent_loop.solvent_vapour_loss(250.0, 1.0, p_sat, 1.2e5)
    assert float(loss) == pytest.approx(250.0 * p_sat / 1.2e5, rel=1e-15)
    # the same loss with the vapour pressure from the CAS-number table (Perry's DIPPR-101 fit)
    tabulated = solvent_loop.solvent_vapour_loss(250.0, 1.0, vapour_pressure_dippr101("7732-18-5", 313.15), 1.2e5)
    assert float(tabulated) == pytest.approx(float(loss), rel=3e-3)


def test_loss_scales_with_activity_and_fraction_and_broadcasts():
    loss = solvent_loop.solvent_vapour_loss([[100.0], [200.0]], [0.9, 1.0], 500.0, 1.0e5, activity_coefficient=1.2)
    assert loss.shape == (2, 2)
    assert float(loss[1, 0]) == pytest.approx(200.0 * 1.2 * 0.9 * 500.0 / 1.0e5, rel=1e-15)


@settings(max_examples=100, deadline=None)
@given(st.floats(1.0, 1e4), st.floats(1.0, 9e4))
def test_loss_on_a_solvent_free_gas_basis(carrier, vapour_pressure):
    # Property: a solvent-free gas G' leaves as V = G' / (1 - y) of total gas, so V y = G' y / (1 - y).
    y = vapour_pressure / 1.0e5
    total = carrier / (1.0 - y)
    loss = float(solvent_loop.solvent_vapour_loss(total, 1.0, vapour_pressure, 1.0e5))
    assert loss == pytest.approx(carrier * y / (1.0 - y), rel=1e-12)
    assert total - loss == pytest.approx(carrier, rel=1e-12)


def test_loss_rejects_a_boiling_solvent():
    with pytest.raises(ValueError, match="boil"):
        solvent_loop.solvent_vapour_loss(10.0, 1.0, 1.1e5, 1.0e5)


# ---------------------------------------------------------------------------
# the steady lean loading
# ---------------------------------------------------------------------------


def iterate_the_loop(absorption_factor, absorber_stages, gas_in, absorber_k, stripping_factor, regenerator_stages,
                     stripping_gas_in, regenerator_k, purge=0.0, makeup=0.0, passes=200_000):
    """Independent method: run the loop pass by pass with kremser.absorb and kremser.strip until it settles."""
    lean = np.zeros(np.broadcast(np.asarray(absorption_factor), np.asarray(stripping_factor)).shape)
    for _ in range(passes):
        rich = kremser.absorb(absorption_factor, absorber_stages, gas_in, lean, k_value=absorber_k).liquid_out
        out = kremser.strip(stripping_factor, regenerator_stages, rich, stripping_gas_in,
                            k_value=regenerator_k).liquid_out
        new = (1.0 - purge) * out + purge * makeup
        if np.all(np.abs(new - lean) <= 1e-17 * np.maximum(np.abs(new), 1e-300)):
            return new, rich
        lean = new
    raise AssertionError("the loop did not settle")


CASES = [
    # A, N_a, y_in, K_a, S, N_r, y_s, K_r, purge, make-up
    (1.4, 8, 0.002, 0.8, 1.6, 10, 0.0, 40.0, 0.0, 0.0),       # a good regenerator
    (2.0, 5, 0.001, 0.5, 0.05, 1, 0.0, 10.0, 0.0, 0.0),       # a regenerator that barely strips
    (0.9, 12, 0.004, 1.2, 1.1, 6, 0.0005, 30.0, 0.0, 0.0),    # stripping vapour carrying solute
    (1.4, 8, 0.002, 0.8, 0.02, 2, 0.0, 5.0, 0.01, 0.0),       # barely strips, held down by a 1 % purge
    (3.0, 20, 0.0005, 0.3, 2.5, 15, 0.0, 50.0, 0.05, 1e-5),   # purge with a loaded make-up
]


@pytest.mark.parametrize("case", CASES)
def test_closed_form_against_an_iterated_loop(case):
    # Independent method: the loop simulated pass by pass (kremser.absorb / kremser.strip).
    *columns, purge, makeup = case
    lean, rich = iterate_the_loop(*columns, purge=purge, makeup=makeup)
    state = solvent_loop.kremser_loop_lean_loading(*columns, purge=purge, makeup_loading=makeup)
    assert bool(state.steady)
    assert float(state.lean_loading) == pytest.approx(float(lean), rel=1e-10)
    assert float(state.rich_loading) == pytest.approx(float(rich), rel=1e-10)


@pytest.mark.parametrize("case", CASES)
def test_bisection_agrees_with_the_closed_form(case):
    # Independent method: the general bisection solver on the same Kremser columns.
    a_factor, n_a, y_in, k_a, s_factor, n_r, y_s, k_r, purge, makeup = case
    state = solvent_loop.lean_loading_fixed_point(
        lambda x: kremser.absorb(a_factor, n_a, y_in, x, k_value=k_a).liquid_out,
        lambda x: kremser.strip(s_factor, n_r, x, y_s, k_value=k_r).liquid_out,
        0.0, 0.05, purge=purge, makeup_loading=makeup)
    closed = solvent_loop.kremser_loop_lean_loading(a_factor, n_a, y_in, k_a, s_factor, n_r, y_s, k_r,
                                                    purge=purge, makeup_loading=makeup)
    assert bool(state.steady)
    assert float(state.lean_loading) == pytest.approx(float(closed.lean_loading), rel=1e-12)


def test_a_regenerator_that_does_not_strip_saturates_the_solvent():
    # Property: with no regenerator stage the loop settles where the absorber takes no more up,
    # x_lean = y_in / K_a; nearly the same with a regenerator that barely strips.
    state = solvent_loop.kremser_loop_lean_loading(1.5, 6, 0.003, 0.6, 0.3, 0, 0.0, 10.0)
    assert float(state.lean_loading) == pytest.approx(0.003 / 0.6, rel=1e-12)
    assert float(state.rich_loading) == pytest.approx(0.003 / 0.6, rel=1e-12)
    weak = solvent_loop.kremser_loop_lean_loading(1.5, 6, 0.003, 0.6, [1e-6, 1e-3, 0.1], 1, 0.0, 10.0)
    assert np.all(np.diff(weak.lean_loading) < 0.0) and np.all(weak.lean_loading < 0.005)


def test_curved_columns_against_an_iterated_loop():
    # Independent method: a loop of two averaged-factor cascades on the mole-ratio basis (nonlinear in
    # the loading), simulated pass by pass, against the bisection solver.
    def absorber(lean):
        return concentrated.averaged_outlets(1.2, 1.0, 0.6, lean, 0.08, 6).liquid_out

    def regenerator(rich):
        return concentrated.averaged_outlets(1.2, 0.5, 3.0, rich, 0.0, 4).liquid_out

    lean = np.array(0.0)
    for _ in range(2000):
        new = regenerator(absorber(lean))
        if abs(float(new - lean)) <= 1e-16 * abs(float(new)):
            break
        lean = new
    state = solvent_loop.lean_loading_fixed_point(absorber, regenerator, 0.0, 0.5)
    assert bool(state.steady)
    assert float(state.lean_loading) == pytest.approx(float(new), rel=1e-10)


def test_no_steady_state_is_flagged_without_inf_or_nan():
    # Loop slope 1 with a positive intercept: the solute builds up without end.
    state = solvent_loop.linear_loop_lean_loading([1.0, 0.5], [0.001, 0.001], [1.0, 0.9], [0.0, 0.0], upper=0.01)
    assert state.steady.tolist() == [False, True]
    assert np.all(np.isfinite(state.lean_loading)) and np.all(np.isfinite(state.rich_loading))
    assert float(state.lean_loading[0]) == 0.01
    # a fixed point above the bound
    high = solvent_loop.kremser_loop_lean_loading(1.5, 6, 0.003, 0.6, 0.01, 1, 0.0, 10.0, upper=0.001)
    assert not bool(high.steady) and float(high.lean_loading) == 0.001
    # the same through the bisection solver
    flagged = solvent_loop.lean_loading_fixed_point(lambda x: x + 0.001, lambda x: x, 0.0, [0.01, 0.02])
    assert flagged.steady.tolist() == [False, False]
    assert flagged.lean_loading.tolist() == [0.01, 0.02]


def test_vectorized_over_design_points():
    factors = np.linspace(1.1, 3.0, 5)[:, None]
    stages = np.arange(2, 8)[None, :]
    state = solvent_loop.kremser_loop_lean_loading(factors, 6, 0.002, 0.8, 1.5, stages, 0.0, 40.0)
    assert state.lean_loading.shape == (5, 6)
    assert np.all(np.diff(state.lean_loading, axis=1) < 0.0)     # more regenerator stages, leaner solvent
