"""Tests for models/kremser.py: each check names where its truth comes from."""

from __future__ import annotations

import mpmath
import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.optimize import brentq

from towercost.models import kremser

# ---------------------------------------------------------------------------
# independent references
# ---------------------------------------------------------------------------


def stage_by_stage(absorption_factor, stages, gas_in, liquid_in, k_value):
    """Solve the N stage balances and N equilibrium relations as one linear system.

    Independent method: unknowns x_1..x_N, y_1..y_N (stage 1 at the top, where
    the liquid enters with x_0 = liquid_in; the gas enters stage N with
    y_{N+1} = gas_in). With flows per unit gas, V = 1 and L = A K:
        L x_{n-1} + V y_{n+1} - L x_n - V y_n = 0     (solute balance)
        y_n - K x_n = 0                               (equilibrium stage)
    Returns the whole profile (x, y).
    """
    n = int(stages)
    liquid = absorption_factor * k_value
    gas = 1.0
    matrix = np.zeros((2 * n, 2 * n))
    rhs = np.zeros(2 * n)
    for i in range(n):  # balance rows; x index i, y index n + i
        matrix[i, i] = -liquid
        matrix[i, n + i] = -gas
        if i > 0:
            matrix[i, i - 1] = liquid
        else:
            rhs[i] -= liquid * liquid_in
        if i < n - 1:
            matrix[i, n + i + 1] = gas
        else:
            rhs[i] -= gas * gas_in
        matrix[n + i, n + i] = 1.0  # equilibrium rows
        matrix[n + i, i] = -k_value
    solution = np.linalg.solve(matrix, rhs)
    return solution[:n], solution[n:]


mpmath.mp.dps = 50


def mp_phi(factor, stages):
    """(F - 1) / (F**(N+1) - 1) at 50 digits from the exact binary values of the floats."""
    f = mpmath.mpf(float(factor))
    n = mpmath.mpf(float(stages))
    if f == 1:
        return 1 / (n + 1)
    return (f - 1) / (f ** (n + 1) - 1)


def rel_err(value, reference):
    value = mpmath.mpf(float(value))
    if reference == 0:
        return float(abs(value))
    return float(abs(value - reference) / abs(reference))


# ---------------------------------------------------------------------------
# against the stage-by-stage solution
# ---------------------------------------------------------------------------

FACTORS = [0.05, 0.3, 0.7, 0.95, 1.0, 1.0 + 1e-7, 1.05, 1.4, 2.5, 10.0, 80.0]


@pytest.mark.parametrize("factor", FACTORS)
def test_absorber_agrees_with_stage_by_stage_solution(factor):
    # Independent method: the N stage balances solved as a linear system (numpy.linalg.solve).
    k_value, gas_in, liquid_in = 1.7, 0.008, 0.0009
    for stages in range(1, 31):
        x, y = stage_by_stage(factor, stages, gas_in, liquid_in, k_value)
        out = kremser.absorb(factor, stages, gas_in, liquid_in, k_value=k_value)
        assert abs(out.gas_out - y[0]) <= 1e-9 * abs(y[0])
        assert abs(out.liquid_out - x[-1]) <= 1e-9 * abs(x[-1])
        # the gas leaving the top stage is in equilibrium with the liquid leaving it
        assert abs(out.gas_out - k_value * x[0]) <= 1e-9 * abs(out.gas_out)


@pytest.mark.parametrize("factor", FACTORS)
def test_stripper_agrees_with_stage_by_stage_solution(factor):
    # Independent method: same linear system; a stripper of stripping factor S is
    # the cascade of absorption factor 1 / S, the liquid being the treated phase.
    k_value, liquid_in, gas_in = 25.0, 0.004, 0.002
    for stages in range(1, 31):
        x, y = stage_by_stage(1.0 / factor, stages, gas_in, liquid_in, k_value)
        out = kremser.strip(factor, stages, liquid_in, gas_in, k_value=k_value)
        assert abs(out.liquid_out - x[-1]) <= 1e-9 * abs(x[-1])
        assert abs(out.gas_out - y[0]) <= 1e-9 * abs(y[0])


# ---------------------------------------------------------------------------
# against 50-digit arithmetic (mpmath)
# ---------------------------------------------------------------------------


def _mpmath_points():
    rng = np.random.default_rng(7)
    grid_f = np.concatenate([np.logspace(-3, 3, 25), [1.0, 1 + 1e-9, 1 - 1e-9, 1 + 1e-12, 1 - 1e-15, 1 + 2.0**-52]])
    grid_n = np.array([0.0, 1e-3, 0.5, 1.0, 2.0, 3.5, 10.0, 30.0, 99.9, 250.0, 500.0])
    ff, nn = np.meshgrid(grid_f, grid_n)
    rand_f = 10.0 ** rng.uniform(-3, 3, 400)
    rand_n = rng.uniform(0, 500, 400)
    near_f = 1.0 + rng.choice([-1.0, 1.0], 300) * 10.0 ** rng.uniform(-16, -9, 300)
    near_n = np.concatenate([rng.uniform(0, 500, 200), rng.integers(1, 501, 100)])
    factors = np.concatenate([ff.ravel(), rand_f, near_f])
    stages = np.concatenate([nn.ravel(), rand_n, near_n])
    return factors, stages


def test_fraction_remaining_and_removed_against_mpmath():
    # Reference library: mpmath (PyPI), the Kremser relation evaluated at 50 digits.
    factors, stages = _mpmath_points()
    remaining = kremser.fraction_remaining(factors, stages)
    removed = kremser.fraction_removed(factors, stages)
    assert np.all(np.isfinite(remaining)) and np.all(np.isfinite(removed))
    worst_remaining = worst_removed = 0.0
    for f, n, phi, one_minus in zip(factors, stages, remaining, removed):
        ref = mp_phi(f, n)
        if ref > mpmath.mpf("1e-290"):
            worst_remaining = max(worst_remaining, rel_err(phi, ref))
        else:  # below the normal float range the answer may only be tiny or zero
            assert phi <= 1e-280
        worst_removed = max(worst_removed, rel_err(one_minus, 1 - ref))
    assert worst_remaining <= 1e-10
    assert worst_removed <= 1e-10


def test_factor_one_is_exact():
    # Source: Kremser relation at A = 1, phi = 1 / (N + 1) (Seader, Henley and Roper,
    # Separation Process Principles, 3rd ed., Section 6.5; value from memory).
    stages = np.arange(0, 501)
    assert np.array_equal(kremser.fraction_remaining(1.0, stages), 1.0 / (stages + 1.0))


# ---------------------------------------------------------------------------
# inverses against scipy.optimize.brentq on the 50-digit relation
# ---------------------------------------------------------------------------

INVERSE_CASES = [
    (1e-12, 500.0), (1e-12, 30.0), (1e-6, 7.0), (0.01, 3.0), (0.1, 9.0), (0.3, 1.0),
    (0.5, 2.0), (0.9, 0.5), (0.999, 12.0), (1 - 1e-9, 40.0), (1 - 1e-14, 500.0), (0.25, 0.01),
    (1 / 501, 500.0), (1 / 31 * (1 + 1e-10), 30.0),
]


@pytest.mark.parametrize("fraction, stages", INVERSE_CASES)
def test_factor_for_fraction_against_brentq(fraction, stages):
    # Reference library: scipy.optimize.brentq on ln phi(e^u, N) - ln(fraction), phi from mpmath.
    def gap(u):
        return float(mpmath.log(mp_phi(mpmath.e ** u, stages)) - mpmath.log(fraction))

    u_ref = brentq(gap, -40.0, 700.0, xtol=1e-15, rtol=8.9e-16, maxiter=500)
    got = float(kremser.factor_for_fraction(fraction, stages))
    assert abs(np.log(got) - u_ref) <= 1e-10 * max(1.0, abs(u_ref))


@pytest.mark.parametrize(
    "fraction, factor",
    [(1e-12, 1e3), (1e-9, 1.5), (0.01, 1.0), (0.01, 1 + 1e-9), (0.2, 1 - 1e-9), (0.31, 0.7),
     (0.5, 0.6), (0.9, 0.2), (1 - 1e-9, 0.5), (1 - 1e-14, 3.0), (0.05, 50.0), (0.0011, 1e-3 + 0.999)],
)
def test_stages_for_fraction_against_brentq(fraction, factor):
    # Reference library: scipy.optimize.brentq on phi(F, N) - fraction over N, phi from mpmath.
    def gap(n):
        return float(mpmath.log(mp_phi(factor, n)) - mpmath.log(fraction))

    n_ref = brentq(gap, 0.0, 1e5, xtol=1e-14, rtol=8.9e-16, maxiter=500)
    got = float(kremser.stages_for_fraction(fraction, factor))
    assert abs(got - n_ref) <= 1e-10 * max(1.0, n_ref)


# ---------------------------------------------------------------------------
# published relations
# ---------------------------------------------------------------------------


def test_stages_at_unit_absorption_factor_match_the_limiting_form():
    # Source: Wankat, Separation Process Engineering, 3rd ed., Section 12.4: at A = 1 the
    # Kremser equation becomes N = (y_in - y_out) / (y_out - K x_in) (value from memory).
    k_value, gas_in, liquid_in, gas_out = 2.0, 0.01, 0.001, 0.0025
    phi = kremser.driving_force_fraction(gas_out, gas_in, k_value * liquid_in)
    expected = (gas_in - gas_out) / (gas_out - k_value * liquid_in)
    assert float(kremser.stages_for_fraction(phi, 1.0)) == pytest.approx(expected, rel=1e-13)
    out = kremser.absorb(1.0, expected, gas_in, liquid_in, k_value=k_value)
    assert float(out.gas_out) == pytest.approx(gas_out, rel=1e-12)


def test_minimum_liquid_rate_is_the_pinch_of_the_stage_solution():
    # Independent method: with L slightly above L_min the stage-by-stage solution needs
    # many stages, and the Kremser stage count diverges as L -> L_min (pinch at the bottom).
    k_value, gas_in, gas_out = 0.8, 0.01, 0.001
    l_min = float(kremser.minimum_liquid_rate(1.0, k_value, gas_in, gas_out))
    assert l_min == pytest.approx((gas_in - gas_out) / (gas_in / k_value), rel=1e-14)
    factors = np.array([1.0001, 1.01, 1.1]) * l_min / k_value
    stages = kremser.stages_for_fraction(gas_out / gas_in, factors)
    assert np.all(np.diff(stages) < 0) and stages[0] > 50
    # at L_min itself the factor equals minimum_factor when the solvent is clean
    assert l_min / k_value == pytest.approx(float(kremser.minimum_factor(gas_out / gas_in)), rel=1e-14)


def test_minimum_gas_rate_pinches_at_the_liquid_inlet():
    # Independent method: at V_min the gas leaves in equilibrium with the entering liquid,
    # y_out = K x_in, and the solute balance closes (straight equilibrium line).
    k_value, liquid_in, liquid_out, gas_in = 30.0, 0.002, 0.0001, 0.0006
    liquid_rate = 5.0
    v_min = float(kremser.minimum_gas_rate(liquid_rate, k_value, liquid_in, liquid_out, gas_in))
    gas_out = gas_in + liquid_rate * (liquid_in - liquid_out) / v_min
    assert gas_out == pytest.approx(k_value * liquid_in, rel=1e-13)


# ---------------------------------------------------------------------------
# unreachable targets
# ---------------------------------------------------------------------------


def test_unreachable_stage_target_states_best_value():
    # Source: Kremser relation, N -> infinity limit phi -> 1 - A for A < 1 (Seader, Henley
    # and Roper, Separation Process Principles, 3rd ed., Section 6.5; value from memory).
    with pytest.raises(kremser.UnreachableTarget) as info:
        kremser.stages_for_fraction(0.2, 0.7)
    assert "with unlimited stages the fraction remaining cannot fall below 1 - A = 0.3" in str(info.value)
    assert info.value.best == pytest.approx(0.3)
    assert isinstance(info.value, ValueError)
    loose = kremser.stages_for_fraction([0.2, 0.5], 0.7, strict=False)
    assert np.isinf(loose[0]) and np.isfinite(loose[1])
    with pytest.raises(kremser.UnreachableTarget) as info:
        kremser.stages_for_fraction([0.2, 0.5, 0.01], [0.7, 0.7, 0.95])
    assert "2 of 3 targets are unreachable" in str(info.value)
    assert np.allclose(info.value.best, [0.3, 0.3, 0.05])


def test_unreachable_factor_target_states_best_value():
    # Source: Kremser relation at N = 0, phi = 1 for every factor.
    with pytest.raises(kremser.UnreachableTarget) as info:
        kremser.factor_for_fraction(0.5, 0.0)
    assert "stays at 1" in str(info.value)
    assert info.value.best == 1.0
    loose = kremser.factor_for_fraction(0.5, [0.0, 2.0], strict=False)
    # two stages: 1 / (1 + F + F**2) = 1/2 at the golden ratio F = (sqrt(5) - 1) / 2
    assert np.isinf(loose[0]) and loose[1] == pytest.approx((5**0.5 - 1) / 2, rel=1e-14)


def test_unreachable_minimum_flows_state_best_value():
    # Independent method: the outlet cannot be leaner than equilibrium with the entering other phase.
    with pytest.raises(kremser.UnreachableTarget) as info:
        kremser.minimum_liquid_rate(1.0, 2.0, 0.01, 0.001, liquid_in=0.001)
    assert "cannot fall below 0.2" in str(info.value)
    with pytest.raises(kremser.UnreachableTarget) as info:
        kremser.minimum_gas_rate(1.0, 10.0, 0.001, 0.0001, gas_in=0.002)
    assert "cannot fall below 0.2" in str(info.value)


def test_bad_inputs_are_refused():
    with pytest.raises(ValueError):
        kremser.fraction_remaining(-1.0, 3)
    with pytest.raises(ValueError):
        kremser.fraction_remaining(1.2, -1)
    with pytest.raises(ValueError):
        kremser.factor_for_fraction(1.0, 3)
    with pytest.raises(ValueError, match="k_value"):
        kremser.absorb(1.2, 3, 0.01, liquid_in=0.001)
    with pytest.raises(ValueError, match="k_value"):
        kremser.strip(1.2, 3, 0.01, gas_in=0.001)


def test_clean_inlet_without_k_value_gives_no_other_outlet():
    out = kremser.absorb(2.0, 2, 0.007)
    assert out.liquid_out is None and float(out.gas_out) == pytest.approx(0.001, rel=1e-14)
    out = kremser.strip(2.0, 2, 0.007)
    assert out.gas_out is None and float(out.liquid_out) == pytest.approx(0.001, rel=1e-14)


def test_dilute_range_warning():
    # Source: Wankat, Separation Process Engineering, 3rd ed., Section 12.4 ("less than 1 % solute").
    warnings: list[str] = []
    kremser.absorb(1.5, 4, 0.05, 0.0, k_value=1.0, warnings=warnings)
    assert warnings and "dilute" in warnings[0]
    warnings.clear()
    kremser.absorb(1.5, 4, 0.001, 0.0, k_value=1.0, warnings=warnings)
    assert warnings == []


def test_no_runtime_warnings_at_extremes():
    # pyproject turns RuntimeWarnings into errors; these must evaluate silently.
    f = np.array([1e-3, 1.0, 1e3, 1e300, 1e-300])[:, None]
    n = np.array([0.0, 1e-9, 1.0, 500.0, 1e4])[None, :]
    phi = kremser.fraction_remaining(f, n)
    assert np.all((phi >= 0) & (phi <= 1))
    assert np.all(kremser.fraction_remaining(f, 0.0) == 1.0)
    assert np.all(kremser.fraction_removed(f, 0.0) == 0.0)
    assert np.isinf(kremser.factor_for_fraction(1e-12, 0.001))


# ---------------------------------------------------------------------------
# properties (hypothesis)
# ---------------------------------------------------------------------------

factor_st = st.floats(1e-3, 1e3)
stages_st = st.floats(0.0, 500.0)
int_stages_st = st.integers(1, 60)
fraction_st = st.floats(1e-12, 1 - 1e-14)


@settings(max_examples=200, deadline=None)
@given(factor_st, int_stages_st, st.floats(1e-6, 1e-2), st.floats(0.0, 1.0), st.floats(0.05, 20.0))
def test_solute_balance_closes(factor, stages, gas_in, liquid_share, k_value):
    # Independent method: overall solute balance V (y_in - y_out) = L (x_out - x_in), L = A K V.
    liquid_in = liquid_share * gas_in / k_value
    out = kremser.absorb(factor, stages, gas_in, liquid_in, k_value=k_value)
    absorbed = gas_in - out.gas_out
    taken = factor * k_value * (out.liquid_out - liquid_in)
    assert abs(absorbed - taken) <= 1e-12 * gas_in
    # stripper: L (x_in - x_out) = V (y_out - y_in), V / L = S / K
    stripping_gas_in = liquid_share * gas_in * k_value
    out = kremser.strip(factor, stages, gas_in, stripping_gas_in, k_value=k_value)
    stripped = gas_in - out.liquid_out
    carried = (factor / k_value) * (out.gas_out - stripping_gas_in)
    assert abs(stripped - carried) <= 1e-12 * gas_in


@settings(max_examples=200, deadline=None)
@given(factor_st, stages_st, st.floats(0.0, 50.0), st.floats(1.0, 10.0))
def test_more_stages_or_more_solvent_never_absorb_less(factor, stages, more_stages, more_solvent):
    # Kremser relation: phi decreases in N and in A (common practice to rely on; checked here).
    base = kremser.fraction_remaining(factor, stages)
    assert kremser.fraction_remaining(factor, stages + more_stages) <= base * (1 + 1e-13)
    assert kremser.fraction_remaining(min(factor * more_solvent, 1e300), stages) <= base * (1 + 1e-13)


@settings(max_examples=200, deadline=None)
@given(fraction_st, st.floats(0.01, 500.0))
def test_factor_inverse_round_trips(fraction, stages):
    factor = float(kremser.factor_for_fraction(fraction, stages))
    if 1e-3 <= factor <= 1e3:
        assert float(kremser.fraction_remaining(factor, stages)) == pytest.approx(fraction, rel=1e-11)


@settings(max_examples=200, deadline=None)
@given(factor_st, st.floats(0.0, 500.0))
def test_stages_inverse_round_trips(factor, stages):
    phi = float(kremser.fraction_remaining(factor, stages))
    pinch = (1.0 - factor) * (1.0 + 1e-12) if factor < 1.0 else 0.0
    if max(1e-12, pinch) < phi < 1 - 1e-14:
        back = float(kremser.stages_for_fraction(phi, factor))
        # N is ill-conditioned where phi is close to its pinch value 1 - A; compare in phi
        assert float(kremser.fraction_remaining(factor, back)) == pytest.approx(phi, rel=1e-10)


@settings(max_examples=100, deadline=None)
@given(st.floats(1e-3, 0.999))
def test_limits(factor):
    # Source: Kremser relation limits, N -> infinity: phi -> 1 - A (A < 1), phi -> 0 (A > 1);
    # A -> infinity: phi -> 0 (Seader, Henley and Roper, 3rd ed., Section 6.5; value from memory).
    assert float(kremser.fraction_remaining(factor, 1e6)) == pytest.approx(1 - factor, rel=1e-9)
    assert float(kremser.fraction_remaining(1 / factor, 1e4)) < 1e-3
    assert float(kremser.fraction_remaining(1e250, 2.0 + factor)) < 1e-300


@settings(max_examples=100, deadline=None)
@given(factor_st, int_stages_st, st.floats(1e-6, 1e-2), st.floats(0.0, 0.9), st.floats(0.05, 20.0))
def test_top_stage_gas_is_in_equilibrium_with_its_liquid(factor, stages, gas_in, liquid_share, k_value):
    # Independent method: linear-system solution gives x_1; Kremser's y_out must equal K x_1.
    liquid_in = liquid_share * gas_in / k_value
    x, y = stage_by_stage(factor, stages, gas_in, liquid_in, k_value)
    out = kremser.absorb(factor, stages, gas_in, liquid_in, k_value=k_value)
    assert float(out.gas_out) == pytest.approx(k_value * x[0], rel=1e-8, abs=1e-15)
