"""Tests for models/concentrated.py: cascades on the mole-ratio basis, each check with its source.

Published figures: Treybal, Mass-Transfer Operations, 3rd ed. (1980),
Illustration 8.2 (p. 286: coal-gas benzene absorber with wash oil, and the
steam stripper of the rich oil) and Illustration 8.3 (p. 292: the same by the
Kremser relation with averaged factors). The book itself was not available;
its figures were read from a stored public re-typed copy of the two worked
solutions (a Scilab re-typed copy that quotes the book's numbers and figure
readings). Treybal reads the tangent pinches and the stage counts off his
own charts, so his figures carry chart-reading error of a few per cent.
"""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.optimize import brentq, root

from towercost.models import concentrated, kremser
from towercost.models.equilibrium import GAS_CONSTANT, gas_ratio_at_equilibrium, liquid_ratio_at_equilibrium

# ---------------------------------------------------------------------------
# Treybal's wash-oil absorber and steam stripper (Illustrations 8.2 and 8.3)
# ---------------------------------------------------------------------------

# Source: Treybal, Mass-Transfer Operations, 3rd ed., Illustration 8.2 (as transcribed):
# 0.250 m3/s of coal gas at 26 C and 1.07e5 N/m2 with 2.0 % benzene, 95 % to be removed by
# a wash oil entering with 0.005 mole fraction benzene; ideal solutions; benzene vapour
# pressure 13.33 kN/m2 at 26 C; the rich oil stripped to 0.005 mole fraction by steam at
# 101.33 kN/m2 and 122 C, benzene vapour pressure 319.9 kN/m2; both agents at 1.5 x minimum.
GAS_VOLUME = 0.250          # m3/s
GAS_TEMPERATURE = 299.15    # K (the book rounds to 299 K)
ABSORBER_PRESSURE = 1.07e5  # Pa
K_ABSORBER = 13.33e3 / ABSORBER_PRESSURE
K_STRIPPER = 319.9 / 101.33
GAS_TOTAL = GAS_VOLUME * ABSORBER_PRESSURE / (GAS_CONSTANT * GAS_TEMPERATURE)   # mol/s
CARRIER = GAS_TOTAL * (1.0 - 0.02)
GAS_IN = 0.02 / 0.98
GAS_OUT = 0.05 * GAS_IN
LEAN = 0.005 / 0.995

# Book figures (Illustration 8.2 and 8.3, as transcribed), converted to mol/s:
BOOK_GAS_TOTAL = 10.75        # 0.01075 kmol/s
BOOK_RICH_AT_MINIMUM = 0.176  # X_N of the minimum-oil line, read at the tangent (chart)
BOOK_OIL = 1.787              # 1.787e-3 kmol/s of oil, 1.5 x minimum
BOOK_RICH = 0.1190            # X_N at the design oil rate
BOOK_ABSORBER_STAGES = 7.6    # graphical
BOOK_STEAM_TOP_AT_MINIMUM = 0.45   # Y_1 of the minimum-steam line, read at the tangent (chart)
BOOK_STRIPPER_STAGES = 6.7    # graphical
BOOK_STRIPPER_STAGES_AVERAGED = 6.0   # Fig. 5.16 with the averaged stripping factor
BOOK_STEAM = 1.5 * BOOK_OIL * (BOOK_RICH - LEAN) / BOOK_STEAM_TOP_AT_MINIMUM   # mol/s


def test_treybal_gas_rate():
    # Source: Treybal 3rd ed., Illustration 8.2 (as transcribed): 0.01075 kmol/s of gas.
    assert GAS_TOTAL == pytest.approx(BOOK_GAS_TOTAL, rel=1e-3)


def test_treybal_minimum_oil_is_a_tangent_pinch():
    # Source: Treybal 3rd ed., Illustration 8.2 (as transcribed): the minimum-oil line touches the
    # equilibrium curve inside the column and meets Y_{N+1} at X = 0.176 (chart reading); minimum
    # oil = 1.787e-3 / 1.5 kmol/s. Measured: X_N 0.1801 (+2.3 %), minimum oil 1.167 mol/s (-2.0 %).
    out = concentrated.minimum_solvent_rate(CARRIER, K_ABSORBER, GAS_IN, GAS_OUT, LEAN)
    assert bool(out.tangent)
    assert LEAN < out.pinch_liquid < out.liquid_out
    assert float(out.liquid_out) == pytest.approx(BOOK_RICH_AT_MINIMUM, rel=0.03)
    assert float(out.rate) == pytest.approx(BOOK_OIL / 1.5, rel=0.03)
    # the design rate and its rich outlet: measured 1.751 mol/s (-2.0 %) and X_N 0.1217 (+2.3 %)
    design = 1.5 * float(out.rate)
    assert design == pytest.approx(BOOK_OIL, rel=0.03)
    assert LEAN + CARRIER * (GAS_IN - GAS_OUT) / design == pytest.approx(BOOK_RICH, rel=0.03)


def test_treybal_absorber_stages():
    # Source: Treybal 3rd ed., Illustrations 8.2 and 8.3 (as transcribed): 7.6 ideal trays at
    # 1.787e-3 kmol/s of oil (graphical). Measured: stage by stage 7.63, averaged factor 7.66.
    exact = concentrated.stagewise_absorber_stages(BOOK_OIL, CARRIER, K_ABSORBER, GAS_IN, GAS_OUT, LEAN)
    averaged = concentrated.averaged_absorber_stages(BOOK_OIL, CARRIER, K_ABSORBER, GAS_IN, GAS_OUT, LEAN)
    assert float(exact.stages) == pytest.approx(BOOK_ABSORBER_STAGES, abs=0.2)
    assert float(exact.whole_stages) == 8.0
    assert float(averaged) == pytest.approx(BOOK_ABSORBER_STAGES, abs=0.2)
    # the approximation against the oracle: measured +0.029 stage
    assert abs(float(averaged) - float(exact.stages)) < 0.05


def test_treybal_averaged_factor_is_eq_5_55_as_written():
    # Source: Treybal 3rd ed., Eq. 5.55 with A = (A_1 A_Np)**0.5, A_1 = L_0 / (m G_1),
    # A_Np = L_Np / (m G_Np+1), written out as in Illustration 8.3 (as transcribed).
    l_0 = BOOK_OIL * (1.0 + LEAN)
    rich = LEAN + CARRIER * (GAS_IN - GAS_OUT) / BOOK_OIL
    l_np = BOOK_OIL * (1.0 + rich)
    g_1 = CARRIER * (1.0 + GAS_OUT)
    a = np.sqrt(l_np / (K_ABSORBER * GAS_TOTAL) * l_0 / (K_ABSORBER * g_1))
    y_in, y_out, x_0 = 0.02, GAS_OUT / (1.0 + GAS_OUT), 0.005
    ratio = (y_in - K_ABSORBER * x_0) / (y_out - K_ABSORBER * x_0)
    book = np.log(ratio * (1.0 - 1.0 / a) + 1.0 / a) / np.log(a)
    got = concentrated.averaged_absorber_stages(BOOK_OIL, CARRIER, K_ABSORBER, GAS_IN, GAS_OUT, LEAN)
    assert float(got) == pytest.approx(book, rel=1e-10)


def test_treybal_minimum_steam_is_a_tangent_pinch():
    # Source: Treybal 3rd ed., Illustration 8.2 (as transcribed): the minimum-steam line is tangent
    # to the equilibrium curve and reaches Y_1 = 0.45 at X_0 = 0.1190 (chart reading), so minimum
    # steam = 1.787e-3 (0.1190 - 0.00503) / 0.45 kmol/s. Measured: Y_1 0.4483 (-0.4 %),
    # minimum steam 0.4543 mol/s (+0.4 %).
    out = concentrated.minimum_stripping_rate(BOOK_OIL, K_STRIPPER, BOOK_RICH, LEAN, 0.0)
    assert bool(out.tangent)
    assert float(out.gas_out) == pytest.approx(BOOK_STEAM_TOP_AT_MINIMUM, rel=0.02)
    assert float(out.rate) == pytest.approx(BOOK_STEAM / 1.5, rel=0.02)


def test_treybal_stripper_stages():
    # Source: Treybal 3rd ed., Illustration 8.2 (as transcribed): 6.7 ideal trays at 1.5 x the
    # minimum steam (graphical). Measured: stage by stage 6.77; averaged stripping factor 6.74.
    # Illustration 8.3 (as transcribed) reads 6.0 off Fig. 5.16 with an averaged stripping factor;
    # that figure is not reproduced (the averaged relation gives 6.74 here, 0.04 below the exact
    # count), so it is not asserted; the doubt is noted in the report.
    exact = concentrated.stagewise_stripper_stages(BOOK_OIL, BOOK_STEAM, K_STRIPPER, BOOK_RICH, LEAN, 0.0)
    averaged = concentrated.averaged_stripper_stages(BOOK_OIL, BOOK_STEAM, K_STRIPPER, BOOK_RICH, LEAN, 0.0)
    assert float(exact.stages) == pytest.approx(BOOK_STRIPPER_STAGES, abs=0.2)
    assert float(exact.whole_stages) == 7.0
    assert abs(float(averaged) - float(exact.stages)) < 0.05
    assert float(averaged) > BOOK_STRIPPER_STAGES_AVERAGED + 0.5


# ---------------------------------------------------------------------------
# the stage-by-stage oracle against an independent solver
# ---------------------------------------------------------------------------


def nonlinear_stage_system(liquid_rate, gas_rate, k_value, liquid_in, gas_in, stages, guess):
    """Independent method: the 2N stage equations solved together by scipy.optimize.root.

    Unknowns X_1..X_N, Y_1..Y_N; for every stage n
        L' X_{n-1} + G' Y_{n+1} - L' X_n - G' Y_n = 0        (solute balance)
        Y_n - K X_n / (1 + (1 - K) X_n) = 0                (equilibrium stage)
    with X_0 = liquid_in and Y_{N+1} = gas_in.
    """
    n = stages

    def equations(z):
        x, y = z[:n], z[n:]
        x_above = np.concatenate([[liquid_in], x[:-1]])
        y_below = np.concatenate([y[1:], [gas_in]])
        balance = liquid_rate * x_above + gas_rate * y_below - liquid_rate * x - gas_rate * y
        equilibrium = y - k_value * x / (1.0 + (1.0 - k_value) * x)
        return np.concatenate([balance, equilibrium])

    solution = root(equations, guess, method="hybr", tol=1e-14)
    scale = liquid_rate * max(liquid_in, 1e-300) + gas_rate * max(gas_in, 1e-300)
    assert np.max(np.abs(equations(solution.x))) < 1e-13 * max(scale, 1.0)
    return solution.x[:n], solution.x[n:]


@pytest.mark.parametrize(
    ("liquid_rate", "gas_rate", "k_value", "liquid_in", "gas_in", "stages"),
    [
        (BOOK_OIL, CARRIER, K_ABSORBER, LEAN, GAS_IN, 8),          # Treybal's absorber
        (BOOK_OIL, BOOK_STEAM, K_STRIPPER, BOOK_RICH, 0.0, 7),     # Treybal's stripper
        (3.0, 10.0, 0.3, 0.0, 0.25, 5),                             # a rich gas, concave curve
        (2.0, 1.0, 4.0, 0.3, 0.01, 4),                               # a strong stripper, convex curve
    ],
)
def test_stagewise_outlets_match_the_stage_equations(liquid_rate, gas_rate, k_value, liquid_in, gas_in, stages):
    # Independent method: scipy.optimize.root on the 2N nonlinear stage equations.
    out = concentrated.stagewise_outlets(liquid_rate, gas_rate, k_value, liquid_in, gas_in, stages)
    guess_x = np.linspace(liquid_in, float(out.liquid_out), stages)
    guess = np.concatenate([guess_x, gas_ratio_at_equilibrium(guess_x, k_value)])
    x, y = nonlinear_stage_system(liquid_rate, gas_rate, k_value, liquid_in, gas_in, stages, guess)
    assert float(out.gas_out) == pytest.approx(y[0], rel=1e-9)
    assert float(out.liquid_out) == pytest.approx(x[-1], rel=1e-9)


def rich_gas(ratio, k):
    """Cap a gas mole ratio so that y < 0.9 K: a liquid can still be in equilibrium with it."""
    return np.minimum(ratio, 0.9 * k / (1.0 - np.minimum(0.9 * k, 0.5)))


def test_stagewise_solute_balance_closes():
    # Property: the liquid leaving the last stage of the march closes the overall balance.
    rng = np.random.default_rng(3)
    size = 200
    liquid = 10.0 ** rng.uniform(-1, 1, size)
    gas = 10.0 ** rng.uniform(-1, 1, size)
    k = 10.0 ** rng.uniform(-1.5, 1.5, size)
    x_in = rng.uniform(0.0, 0.05, size) * np.minimum(1.0, 1.0 / k)
    y_in = rich_gas(rng.uniform(0.0, 0.3, size), k)
    stages = rng.integers(0, 25, size)
    out = concentrated.stagewise_outlets(liquid, gas, k, x_in, y_in, stages)
    entering = gas * y_in + liquid * x_in
    imbalance = gas * (y_in - out.gas_out) - liquid * (out.liquid_out - x_in)
    assert np.max(np.abs(imbalance) / entering) < 1e-12


def test_stagewise_stage_count_inverts_the_outlets():
    # Property: N whole stages give a gas outlet that the stage count reaches in exactly N stages.
    for stages in (1, 3, 6, 12):
        out = concentrated.stagewise_outlets(BOOK_OIL, CARRIER, K_ABSORBER, LEAN, GAS_IN, stages)
        count = concentrated.stagewise_absorber_stages(BOOK_OIL, CARRIER, K_ABSORBER, GAS_IN, out.gas_out, LEAN)
        assert float(count.stages) == pytest.approx(stages, abs=1e-6)
        out = concentrated.stagewise_outlets(BOOK_OIL, BOOK_STEAM, K_STRIPPER, BOOK_RICH, 0.0, stages)
        count = concentrated.stagewise_stripper_stages(BOOK_OIL, BOOK_STEAM, K_STRIPPER, BOOK_RICH,
                                                       out.liquid_out, 0.0)
        assert float(count.stages) == pytest.approx(stages, abs=1e-6)


@settings(max_examples=30, deadline=None)
@given(
    k_value=st.floats(0.05, 20.0),
    slope=st.floats(0.1, 10.0),
    gas_in=st.floats(0.0, 0.3),
    liquid_in=st.floats(0.0, 0.05),
)
def test_more_stages_never_transfer_less(k_value, slope, gas_in, liquid_in):
    # Property: the gas outlet moves monotonically towards equilibrium with the entering liquid.
    if k_value * liquid_in / (1.0 + liquid_in) >= 0.99:
        return
    gas_in = float(rich_gas(gas_in, k_value))
    out = concentrated.stagewise_outlets(slope, 1.0, k_value, liquid_in, gas_in, np.arange(0, 16))
    towards = np.sign(float(gas_ratio_at_equilibrium(liquid_in, k_value)) - gas_in)
    assert np.all(np.diff(out.gas_out) * towards >= -1e-15)


# ---------------------------------------------------------------------------
# the averaged factor against the oracle and the dilute limit
# ---------------------------------------------------------------------------


def test_averaged_outlets_against_the_oracle():
    # Independent method: the exact stage-by-stage solution. The averaged factor is an
    # approximation whose error grows with the solute level. Error measured as the miss in the
    # treated stream's outlet as a fraction of its inlet driving force, over K 0.05..20,
    # A 0.3..3.2, 1..20 stages, gas up to 30 mol% and liquids up to 30 mol% in equilibrium;
    # c is the richest of the four terminal compositions (mole fraction). Measured on this
    # sample (worst / median): c <= 0.02: 0.0069 / 0.0011; c <= 0.1: 0.042 / 0.0045;
    # c <= 0.3: 0.143 / 0.0096 (the worst are absorbers; strippers at most 0.023).
    rng = np.random.default_rng(11)
    size = 1200
    k = 10.0 ** rng.uniform(np.log10(0.05), np.log10(20.0), size)
    liquid = 10.0 ** rng.uniform(-0.5, 0.5, size) * k
    gas = np.ones(size)
    gas_fraction = np.minimum(rng.uniform(0.0, 0.3, size), 0.3 * k)
    y_in = gas_fraction / (1.0 - gas_fraction)
    x_in = rng.uniform(0.0, 0.05, size) * np.minimum(1.0, 1.0 / k)
    stages = rng.integers(1, 21, size)
    exact = concentrated.stagewise_outlets(liquid, gas, k, x_in, y_in, stages)
    approx = concentrated.averaged_outlets(liquid, gas, k, x_in, y_in, stages)
    y_eq = gas_ratio_at_equilibrium(x_in, k)
    x_eq = liquid_ratio_at_equilibrium(y_in, k)
    absorbing = y_in > y_eq
    error = np.where(absorbing, np.abs(approx.gas_out - exact.gas_out) / np.abs(y_in - y_eq),
                     np.abs(approx.liquid_out - exact.liquid_out) / np.abs(x_eq - x_in))
    level = np.max([v / (1.0 + v) for v in (y_in, x_eq, x_in, y_eq)], axis=0)
    for richest, bound in ((0.02, 0.008), (0.1, 0.06), (0.3, 0.17)):
        assert np.max(error[level <= richest]) < bound
    assert np.max(error[~absorbing]) < 0.03


def test_dilute_limit_is_exactly_kremser():
    # Source: towercost.models.kremser (the dilute relations). Below about 1e-17 mol/mol, 1 + X
    # rounds to 1, both end factors equal L'/(K G') and the averaged form must return the dilute
    # numbers bit for bit.
    liquid, gas = np.array([2.0, 0.7, 5.0]), np.array([1.0, 1.0, 3.0])
    k = np.array([0.8, 2.5, 1.0])
    x_in, y_in = np.array([0.0, 2e-19, 1e-19]), np.array([3e-18, 1e-19, 4e-18])
    stages = np.array([4.0, 7.5, 12.0])
    factor = (liquid / gas) / k
    out = concentrated.averaged_outlets(liquid, gas, k, x_in, y_in, stages)
    reference = kremser.absorb(factor, stages, y_in, x_in, k_value=k)
    assert np.array_equal(out.absorption_factor, factor)
    assert np.array_equal(out.gas_out, reference.gas_out)
    # stages for the absorber outlet reached, and for a stripper spec
    y_out = reference.gas_out[:1]
    phi = (y_out - k[:1] * x_in[:1]) / (y_in[:1] - k[:1] * x_in[:1])
    got = concentrated.averaged_absorber_stages(liquid[:1], gas[:1], k[:1], y_in[:1], y_out, x_in[:1])
    assert np.array_equal(got, kremser.stages_for_fraction(phi, factor[:1]))
    got = concentrated.averaged_stripper_stages(1.0, 1.0, 2.0, 5e-18, 1e-18, 0.0)
    assert float(got) == float(kremser.stages_for_fraction(0.2, 2.0))


def test_dilute_limit_of_the_oracle_is_kremser():
    # Source: towercost.models.kremser. At 1e-18 the curve is the straight line Y = K X in
    # floating point and the stage-by-stage solution is the linear cascade.
    liquid, gas, k = np.array([2.0, 0.7]), np.array([1.0, 1.0]), np.array([0.8, 2.5])
    x_in, y_in = np.array([0.0, 2e-18]), np.array([3e-18, 1e-19])
    stages = np.array([4, 9])
    out = concentrated.stagewise_outlets(liquid, gas, k, x_in, y_in, stages)
    reference = kremser.absorb((liquid / gas) / k, stages, y_in, x_in, k_value=k)
    assert np.allclose(out.gas_out, reference.gas_out, rtol=1e-12, atol=0.0)
    assert np.allclose(out.liquid_out, reference.liquid_out, rtol=1e-12, atol=0.0)


def test_moderately_dilute_converges_to_kremser():
    # Source: towercost.models.kremser. At 1e-6 mol/mol the mole-ratio corrections are O(1e-6).
    out = concentrated.averaged_outlets(2.0, 1.0, 0.8, 0.0, 1e-6, 6)
    reference = kremser.absorb(2.5, 6, 1e-6 / (1 + 1e-6), 0.0, k_value=0.8)
    assert float(out.gas_out) == pytest.approx(float(reference.gas_out), rel=1e-5)


@pytest.mark.parametrize("stages", [0.5, 3.0, 7.25, 15.0])
def test_averaged_stage_forms_invert_the_averaged_outlets(stages):
    # Property: with geometric means S = 1 / A, absorber form, stripper form and outlets describe
    # one cascade, so each stage form inverts the outlet solution.
    absorber = concentrated.averaged_outlets(1.787, 10.5, 0.3, 0.001, 0.2, stages)
    n_abs = concentrated.averaged_absorber_stages(1.787, 10.5, 0.3, 0.2, absorber.gas_out, 0.001)
    assert float(n_abs) == pytest.approx(stages, rel=1e-8)
    stripper = concentrated.averaged_outlets(1.787, 0.6, 3.2, 0.12, 0.0, stages)
    n_str = concentrated.averaged_stripper_stages(1.787, 0.6, 3.2, 0.12, stripper.liquid_out, 0.0)
    assert float(n_str) == pytest.approx(stages, rel=1e-8)


def test_averaged_factor_warns_when_ends_differ():
    warnings: list[str] = []
    concentrated.averaged_factor(1.0, 3.0, warnings=warnings)
    assert len(warnings) == 1 and "absorption factor" in warnings[0]
    quiet: list[str] = []
    concentrated.averaged_factor(1.0, 1.5, warnings=quiet)
    assert quiet == []


# ---------------------------------------------------------------------------
# minimum flows
# ---------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("k_value", "gas_in", "gas_out", "liquid_in"),
    [(K_ABSORBER, GAS_IN, GAS_OUT, LEAN), (0.3, 0.4, 0.02, 0.0), (0.9, 0.1, 0.005, 0.001), (2.0, 0.1, 0.01, 0.0)],
)
def test_minimum_solvent_is_the_largest_chord_slope(k_value, gas_in, gas_out, liquid_in):
    # Independent method: the largest chord slope from the top point over a fine grid of the curve.
    out = concentrated.minimum_solvent_rate(1.0, k_value, gas_in, gas_out, liquid_in)
    rich_end = float(liquid_ratio_at_equilibrium(gas_in, k_value))
    grid = np.linspace(liquid_in, rich_end, 400001)[1:]
    chords = (gas_ratio_at_equilibrium(grid, k_value) - gas_out) / (grid - liquid_in)
    assert float(out.rate) == pytest.approx(chords.max(), rel=1e-8)
    assert bool(out.tangent) == (grid[np.argmax(chords)] < rich_end * (1 - 1e-6))


@pytest.mark.parametrize(
    ("k_value", "liquid_in", "liquid_out", "gas_in"),
    [(K_STRIPPER, BOOK_RICH, LEAN, 0.0), (5.0, 0.15, 0.001, 0.0), (1.5, 0.1, 0.01, 0.005), (0.5, 0.1, 0.01, 0.0)],
)
def test_minimum_stripping_gas_is_the_least_chord_slope(k_value, liquid_in, liquid_out, gas_in):
    # Independent method: the least chord slope from the bottom point over a fine grid of the curve.
    out = concentrated.minimum_stripping_rate(1.0, k_value, liquid_in, liquid_out, gas_in)
    grid = np.linspace(liquid_out, liquid_in, 400001)[1:]
    chords = (gas_ratio_at_equilibrium(grid, k_value) - gas_in) / (grid - liquid_out)
    assert 1.0 / float(out.rate) == pytest.approx(chords.min(), rel=1e-8)


def test_tangent_point_against_a_root_finder():
    # Independent method: scipy brentq on the tangency condition Y*'(X)(X - X_p) = Y*(X) - Y_p.
    k = K_ABSORBER

    def condition(x):
        return k / (1 + (1 - k) * x) ** 2 * (x - LEAN) - (k * x / (1 + (1 - k) * x) - GAS_OUT)

    expected = brentq(condition, 0.01, 1.0, xtol=1e-15)
    got = concentrated.minimum_solvent_rate(CARRIER, k, GAS_IN, GAS_OUT, LEAN).pinch_liquid
    assert float(got) == pytest.approx(expected, rel=1e-12)


def test_stages_finite_just_above_minimum_and_infinite_below():
    # Property: the minimum rate is where the cascade pinches (stage by stage, independent of the
    # chord-slope construction).
    least = float(concentrated.minimum_solvent_rate(CARRIER, K_ABSORBER, GAS_IN, GAS_OUT, LEAN).rate)
    above = concentrated.stagewise_absorber_stages(least * 1.01, CARRIER, K_ABSORBER, GAS_IN, GAS_OUT, LEAN)
    below = concentrated.stagewise_absorber_stages(least * 0.99, CARRIER, K_ABSORBER, GAS_IN, GAS_OUT, LEAN)
    assert np.isfinite(above.stages) and np.isinf(below.stages)
    least = float(concentrated.minimum_stripping_rate(BOOK_OIL, K_STRIPPER, BOOK_RICH, LEAN, 0.0).rate)
    above = concentrated.stagewise_stripper_stages(BOOK_OIL, least * 1.01, K_STRIPPER, BOOK_RICH, LEAN, 0.0)
    below = concentrated.stagewise_stripper_stages(BOOK_OIL, least * 0.99, K_STRIPPER, BOOK_RICH, LEAN, 0.0)
    assert np.isfinite(above.stages) and np.isinf(below.stages)


def test_unreachable_targets():
    with pytest.raises(kremser.UnreachableTarget):
        concentrated.minimum_solvent_rate(1.0, 0.5, 0.1, 0.001, 0.01)     # Y_1 below Y*(X_0)
    out = concentrated.minimum_solvent_rate(1.0, 0.5, 0.1, 0.001, 0.01, strict=False)
    assert np.isinf(out.rate)
    with pytest.raises(kremser.UnreachableTarget):
        concentrated.minimum_stripping_rate(1.0, 2.0, 0.1, 0.001, 0.01)
    count = concentrated.stagewise_absorber_stages(1.0, 1.0, 0.5, 0.1, 0.001, 0.01)
    assert np.isinf(count.stages) and np.isinf(count.whole_stages)
    with pytest.raises(kremser.UnreachableTarget):
        concentrated.averaged_absorber_stages(0.1, 1.0, 1.0, 0.1, 0.001)
    assert np.isinf(concentrated.averaged_absorber_stages(0.1, 1.0, 1.0, 0.1, 0.001, strict=False))


def test_ratio_conversions_round_trip():
    x = np.array([0.0, 1e-12, 0.02, 0.5, 0.9])
    assert np.allclose(concentrated.mole_fraction(concentrated.mole_ratio(x)), x, rtol=1e-15, atol=0.0)


def test_broadcasting_over_design_points():
    rates = np.linspace(1.3, 3.0, 6)[:, None]
    stages = np.arange(1, 5)[None, :]
    out = concentrated.stagewise_outlets(rates, CARRIER, K_ABSORBER, LEAN, GAS_IN, stages)
    assert out.gas_out.shape == (6, 4)
    assert np.all(np.diff(out.gas_out, axis=0) < 0) and np.all(np.diff(out.gas_out, axis=1) < 0)
    single = concentrated.stagewise_outlets(float(rates[2, 0]), CARRIER, K_ABSORBER, LEAN, GAS_IN, 3)
    assert float(single.gas_out) == out.gas_out[2, 2]
