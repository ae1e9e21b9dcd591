r"""Probabilities of meeting a specification under a spread of the inputs, and the error of an estimate.

Closed forms for the distributions an uncertainty study declares (normal and
lognormal), used beside a Monte Carlo estimate wherever they apply, and the
standard error of a proportion estimated from independent samples.

Units: every argument is a number in the units of the quantity it describes
(the same units for a limit, a mean and a standard deviation); probabilities
are fractions [-].
"""

from __future__ import annotations

import numpy as np
from scipy import special

__all__ = [
    "proportion_standard_error",
    "probability_lognormal_below",
    "probability_normal_below",
    "standard_normal_cdf",
]


def standard_normal_cdf(z):
    r"""The standard normal distribution function Phi(z).

        Phi(z) = (1 / sqrt(2 pi)) integral_{-inf}^{z} exp(-t**2 / 2) dt = erfc(-z / sqrt(2)) / 2

    Parameters
    ----------
    z : array_like
        Standard normal deviate [-], any real; +-inf allowed.

    Returns
    -------
    ndarray
        Phi(z) [-], in [0, 1], to full double precision in both tails
        (``scipy.special.ndtr``).

    Source: Abramowitz and Stegun, Handbook of Mathematical Functions (1964),
    Eq. 26.2.2 and 26.2.29 (value from memory for the equation numbers);
    tabulated in every table of the standard normal distribution.

    Examples
    --------
    >>> round(float(standard_normal_cdf(-3.0)), 5)       # the table's 0.00135
    0.00135
    >>> round(float(standard_normal_cdf(1.96)), 4)
    0.975
    """
    return np.asarray(special.ndtr(np.asarray(z, dtype=float)), dtype=float)


def probability_normal_below(limit, mean, sd):
    r"""Fraction of a normal population at or below an upper specification limit.

        P(X <= limit) = Phi((limit - mean) / sd)

    with ``sd = 0`` giving 1 where ``limit >= mean`` and 0 elsewhere. For a
    lower limit use ``1 - probability_normal_below``.

    Parameters
    ----------
    limit : array_like
        Upper specification limit, in the units of ``mean``.
    mean : array_like
        Mean of the quantity.
    sd : array_like
        Its standard deviation, >= 0, in the units of ``mean``.

    Returns
    -------
    ndarray
        Fraction meeting the limit [-].

    Notes
    -----
    The fraction not meeting it (the process fallout) is ``1 -`` this. A limit
    three standard deviations above the mean (a centred process of
    capability ratio Cp = 1 held to one limit) leaves 0.00135 outside: 1350
    parts per million.

    Source: D. C. Montgomery, Introduction to Statistical Quality Control,
    6th ed., Wiley (2009), Section 8.3 and Table 8.2, process fallout of a
    normally distributed process (value from memory for the section and
    table numbers).

    Examples
    --------
    >>> round(float(1.0 - probability_normal_below(20.0 + 3 * 2.0, 20.0, 2.0)) * 1e6)   # ppm outside
    1350
    """
    limit = np.asarray(limit, dtype=float)
    mean = np.asarray(mean, dtype=float)
    sd = np.asarray(sd, dtype=float)
    if np.any(sd < 0):
        raise ValueError("the standard deviation must be >= 0")
    spread = sd > 0
    with np.errstate(divide="ignore", invalid="ignore"):
        z = np.where(spread, (limit - mean) / np.where(spread, sd, 1.0), 0.0)
    return np.where(spread, standard_normal_cdf(z), np.where(limit >= mean, 1.0, 0.0))


def probability_lognormal_below(threshold, median, log_sd):
    r"""Probability that a lognormal quantity lies at or below ``threshold``.

        P(X <= t) = Phi(ln(t / m) / sigma),      ln X normal with mean ln m, sd sigma

    with ``sigma = 0`` giving 1 where ``t >= m`` and 0 elsewhere, and
    ``t <= 0`` giving 0.

    Parameters
    ----------
    threshold : array_like
        t, in the units of ``median``; >= 0 (inf allowed).
    median : array_like
        Median m of the quantity, > 0.
    log_sd : array_like
        Standard deviation sigma of ln X [-], >= 0.

    Returns
    -------
    ndarray
        P(X <= t) [-].

    Source: NIST/SEMATECH e-Handbook of Statistical Methods, Section
    1.3.6.6.9, lognormal distribution, cumulative distribution function
    Phi(ln(x / m) / sigma) (value from memory for the section number).

    Examples
    --------
    >>> round(float(probability_lognormal_below(1.0, 1.0, 0.2)), 12)
    0.5
    >>> round(float(probability_lognormal_below(np.exp(0.4), 1.0, 0.2)), 5)   # Phi(2)
    0.97725
    """
    t = np.asarray(threshold, dtype=float)
    m = np.asarray(median, dtype=float)
    sigma = np.asarray(log_sd, dtype=float)
    if np.any(m <= 0) or np.any(sigma < 0):
        raise ValueError("the median must be > 0 and the log standard deviation >= 0")
    with np.errstate(divide="ignore", invalid="ignore"):
        log_ratio = np.log(np.where(t > 0, t, 1.0) / m)
        spread = sigma > 0
        z = np.where(spread, log_ratio / np.where(spread, sigma, 1.0), 0.0)
    z = np.where(np.isinf(t), np.inf, z)
    inside = np.where(spread, standard_normal_cdf(z), np.where(t >= m, 1.0, 0.0))
    return np.where(t > 0, inside, 0.0)


def proportion_standard_error(probability, samples):
    r"""Standard error of a proportion estimated from independent samples.

        SE = sqrt(p (1 - p) / n)

    Parameters
    ----------
    probability : array_like
        Estimated proportion p [-], in [0, 1].
    samples : array_like
        Number of independent samples n [-], >= 1.

    Returns
    -------
    ndarray
        SE [-]; 0 where p is 0 or 1 (every sample agreed).

    Source: D. C. Montgomery and G. C. Runger, Applied Statistics and
    Probability for Engineers, 5th ed., Wiley (2011), Section 8.4, the
    sample proportion (value from memory for the section number).

    Examples
    --------
    >>> float(proportion_standard_error(0.5, 10_000))
    0.005
    """
    p = np.asarray(probability, dtype=float)
    n = np.asarray(samples, dtype=float)
    if np.any((p < 0) | (p > 1)) or np.any(n < 1):
        raise ValueError("the proportion must lie in [0, 1] and the sample count be >= 1")
    return np.sqrt(p * (1.0 - p) / n)
