"""Tests for towercost.models.probability: normal and lognormal probabilities, the standard error of a proportion.

Held to standard normal tables, to a worked process-fallout figure, to
mpmath at high precision and to scipy.stats as independent references.
"""

from __future__ import annotations

import math

import mpmath
import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy import stats

from towercost.models.probability import (probability_lognormal_below, probability_normal_below,
                                          proportion_standard_error, standard_normal_cdf)


def test_standard_normal_table_values():
    # Source: a table of the standard normal distribution function (area below z), "Standard Normal
    # Probabilities", math.com tables: z = -3.00 gives 0.00135. The entries at -2.00 (0.02275), 1.645 (0.9500)
    # and 1.96 (0.9750) are value from memory.
    assert round(float(standard_normal_cdf(-3.0)), 5) == 0.00135
    assert round(float(standard_normal_cdf(-2.0)), 5) == 0.02275
    assert round(float(standard_normal_cdf(1.645)), 4) == 0.9500
    assert round(float(standard_normal_cdf(1.96)), 4) == 0.9750


def test_standard_normal_agrees_with_mpmath_in_both_tails():
    # Independent method: mpmath's erfc at 30 digits, Phi(z) = erfc(-z / sqrt 2) / 2.
    mpmath.mp.dps = 30
    for z in (-37.0, -8.5, -3.0, -0.1, 0.0, 0.7, 5.0, 8.0):
        exact = float(mpmath.erfc(-mpmath.mpf(z) / mpmath.sqrt(2)) / 2)
        assert float(standard_normal_cdf(z)) == pytest.approx(exact, rel=1e-13, abs=1e-300)


def test_process_fallout_of_a_three_sigma_limit():
    # Source: D. C. Montgomery, Introduction to Statistical Quality Control, 6th ed., Table 8.2: a process with
    # Cp = 1.00 (limits at +-3 sigma, centred) has a fallout of 1350 ppm for a one-sided specification and
    # 2700 ppm for two (value from memory).
    one_sided = 1.0 - probability_normal_below(26.0, 20.0, 2.0)
    two_sided = 1.0 - (probability_normal_below(26.0, 20.0, 2.0) - probability_normal_below(14.0, 20.0, 2.0))
    assert round(float(one_sided) * 1e6) == 1350
    assert round(float(two_sided) * 1e6) == 2700


@settings(max_examples=200, deadline=None)
@given(st.floats(-50, 50), st.floats(-50, 50), st.floats(0.01, 20))
def test_normal_probability_is_scipys(limit, mean, sd):
    # Independent reference: scipy.stats.norm.cdf.
    assert float(probability_normal_below(limit, mean, sd)) == pytest.approx(
        float(stats.norm.cdf(limit, loc=mean, scale=sd)), rel=1e-12, abs=1e-300)


@settings(max_examples=200, deadline=None)
@given(st.floats(1e-6, 1e6), st.floats(1e-3, 1e3), st.floats(0.01, 3.0))
def test_lognormal_probability_is_scipys(threshold, median, sigma):
    # Independent reference: scipy.stats.lognorm (shape sigma, scale = median).
    assert float(probability_lognormal_below(threshold, median, sigma)) == pytest.approx(
        float(stats.lognorm.cdf(threshold, sigma, scale=median)), rel=1e-11, abs=1e-300)


def test_zero_spread_is_a_step_and_the_ends_are_exact():
    assert float(probability_normal_below(1.0, 1.0, 0.0)) == 1.0
    assert float(probability_normal_below(0.999, 1.0, 0.0)) == 0.0
    assert float(probability_lognormal_below(1.0, 1.0, 0.0)) == 1.0
    assert float(probability_lognormal_below(0.999, 1.0, 0.0)) == 0.0
    assert float(probability_lognormal_below(0.0, 1.0, 0.3)) == 0.0
    assert float(probability_lognormal_below(math.inf, 1.0, 0.3)) == 1.0
    with pytest.raises(ValueError):
        probability_normal_below(1.0, 0.0, -1.0)
    with pytest.raises(ValueError):
        probability_lognormal_below(1.0, 0.0, 0.2)


def test_standard_error_of_a_proportion():
    # Independent method: the binomial variance n p (1 - p) of scipy.stats.binom, divided by n**2.
    for p, n in ((0.5, 10_000), (0.9, 200), (0.01, 1_000_000)):
        assert float(proportion_standard_error(p, n)) == pytest.approx(
            math.sqrt(stats.binom.var(n, p)) / n, rel=1e-12)
    assert float(proportion_standard_error(1.0, 50)) == 0.0
    with pytest.raises(ValueError):
        proportion_standard_error(1.2, 10)


def test_standard_error_matches_the_scatter_of_repeated_estimates():
    # Independent method: 400 repeated estimates from 2000 Bernoulli draws each; their standard deviation is the
    # standard error to within the chi-square scatter of 400 values (about 3.5 % at one standard deviation).
    rng = np.random.default_rng(5)
    estimates = (rng.random((400, 2000)) < 0.3).mean(axis=1)
    assert float(np.std(estimates, ddof=1)) == pytest.approx(float(proportion_standard_error(0.3, 2000)), rel=0.12)
