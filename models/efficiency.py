"""From theoretical stages to real trays: overall tray efficiency.

* :func:`oconnell_absorber` - O'Connell's (1946) absorber correlation;
* :func:`oconnell_distillation` - O'Connell's (1946) fractionator
  correlation (for strippers, with alpha = K_solute / K_solvent);
* :func:`overall_from_murphree` - Lewis's (1936) relation between the
  Murphree vapour efficiency and the overall efficiency;
* :func:`real_trays` - the number of real trays.

SI inside: K [-], kg/mol, Pa s, kg/m3. The correlations' customary units
(cP, lb/ft3, g/mol) are converted inside.
"""

from __future__ import annotations

import numpy as np

from towercost.models.validity import check_range

#: 1 lb/ft3 in kg/m3 (0.45359237 kg / 0.3048**3 m3, exact).
_KG_M3_PER_LB_FT3 = 0.45359237 / 0.3048**3
#: 1 cP in Pa s.
_PA_S_PER_CP = 1.0e-3

# Fit of O'Connell's absorber curve (E_o in percent, x = K M mu / rho with
# M in g/mol, mu in cP, rho in lb/ft3): log10 E = a0 + a1 log10 x + a2 (log10 x)^2.
_ABSORBER_FIT = (1.597, -0.199, -0.0896)
_ABSORBER_RANGE = (0.05, 10.0)

# Lockett's power-law form of O'Connell's distillation curve, mu in cP.
_DISTILLATION_FIT = (0.492, -0.245)
_DISTILLATION_RANGE = (0.1, 7.5)


def oconnell_absorber(
    k_value,
    liquid_molar_mass,
    liquid_viscosity,
    liquid_density,
    *,
    warnings: list[str] | None = None,
):
    r"""Overall tray efficiency of an absorber from O'Connell's correlation.

    Curve fit of O'Connell's absorber plot:

        log10(100 E_o) = 1.597 - 0.199 log10(X) - 0.0896 [log10(X)]^2
        X = K M_L mu_L / rho_L,  M_L in g/mol, mu_L in cP, rho_L in lb/ft3

    Parameters
    ----------
    k_value : array_like
        Equilibrium ratio K = y / x of the key solute [-], > 0, at the
        column's average temperature and pressure.
    liquid_molar_mass : array_like
        Molar mass of the liquid M_L [kg/mol], > 0.
    liquid_viscosity : array_like
        Liquid viscosity mu_L [Pa s], > 0.
    liquid_density : array_like
        Liquid density rho_L [kg/m3], > 0.

    Returns
    -------
    ndarray
        E_o [-], a fraction (not percent).

    Notes
    -----
    O'Connell's data are bubble-cap trays in plant absorbers (mostly
    hydrocarbon oils); on sieve and valve trays the correlation tends to be
    conservative, and some authors warn it can be optimistic for absorbers.
    Valid for about 0.05 <= X <= 10 in the units above (extent of the plotted
    data, value from memory); outside, the fit still answers and a warning is
    appended. Fit coefficients: Seader & Henley, Separation Process
    Principles, 2nd ed., Sec. 6.5 (fit of O'Connell's absorber curve; value
    from memory). Original: O'Connell, Trans. AIChE 42, 741 (1946).

    Examples
    --------
    Hydrocarbon oil, K = 0.5, M = 0.18 kg/mol, mu = 2 mPa s, rho = 800 kg/m3:

    >>> round(float(oconnell_absorber(0.5, 0.18, 2.0e-3, 800.0)), 3)
    0.287
    """
    k_value = np.asarray(k_value, dtype=float)
    molar_mass = np.asarray(liquid_molar_mass, dtype=float)
    viscosity = np.asarray(liquid_viscosity, dtype=float)
    density = np.asarray(liquid_density, dtype=float)
    for name, value in (
        ("K", k_value),
        ("liquid molar mass", molar_mass),
        ("liquid viscosity", viscosity),
        ("liquid density", density),
    ):
        if np.any(value <= 0.0):
            raise ValueError(f"{name} must be > 0 for O'Connell's absorber correlation")
    group = (
        k_value
        * (molar_mass * 1000.0)
        * (viscosity / _PA_S_PER_CP)
        / (density / _KG_M3_PER_LB_FT3)
    )
    check_range(
        "K M mu / rho",
        group,
        *_ABSORBER_RANGE,
        "(g/mol cP ft3/lb)",
        "O'Connell absorber efficiency",
        warnings,
    )
    log_group = np.log10(group)
    a0, a1, a2 = _ABSORBER_FIT
    return 10.0 ** (a0 + a1 * log_group + a2 * log_group**2) / 100.0


def oconnell_distillation(
    relative_volatility,
    liquid_viscosity,
    *,
    warnings: list[str] | None = None,
):
    r"""Overall tray efficiency of a fractionator from O'Connell's correlation.

    Lockett's power-law form of O'Connell's distillation curve:

        E_o = 0.492 (alpha mu_L)^(-0.245),  mu_L in cP

    For a stripper, alpha is K of the solute over K of the solvent.

    Parameters
    ----------
    relative_volatility : array_like
        Relative volatility of the key components alpha [-], > 0, at the
        average column temperature.
    liquid_viscosity : array_like
        Liquid viscosity at the same temperature mu_L [Pa s], > 0.

    Returns
    -------
    ndarray
        E_o [-], a fraction.

    Notes
    -----
    Valid for about 0.1 <= alpha mu_L <= 7.5 cP (O'Connell's data; value
    from memory); outside, a warning is appended. Bubble-cap trays.
    Source: Lockett, Distillation Tray Fundamentals, Cambridge University
    Press (1986), fit of O'Connell, Trans. AIChE 42, 741 (1946), as quoted by
    Kister, Distillation Design (1992), Sec. 7.3 (value from memory).

    Examples
    --------
    >>> round(float(oconnell_distillation(2.0, 0.5e-3)), 3)
    0.492
    """
    alpha = np.asarray(relative_volatility, dtype=float)
    viscosity = np.asarray(liquid_viscosity, dtype=float)
    if np.any(alpha <= 0.0) or np.any(viscosity <= 0.0):
        raise ValueError("relative volatility and liquid viscosity must be > 0")
    group = alpha * viscosity / _PA_S_PER_CP
    check_range(
        "alpha mu",
        group,
        *_DISTILLATION_RANGE,
        "cP",
        "O'Connell distillation efficiency",
        warnings,
    )
    coefficient, exponent = _DISTILLATION_FIT
    return coefficient * group**exponent


def overall_from_murphree(murphree_vapour, slope_ratio):
    r"""Overall tray efficiency from the Murphree vapour efficiency (Lewis).

        E_o = ln[1 + E_MV (lambda - 1)] / ln(lambda),   E_o = E_MV at lambda = 1

    with lambda = K V / L the ratio of the slopes of the equilibrium and
    operating lines: 1/A for an absorber, S for a stripper.

    Parameters
    ----------
    murphree_vapour : array_like
        Murphree vapour efficiency E_MV [-], in (0, 1].
    slope_ratio : array_like
        lambda = K V / L [-], > 0: the reciprocal of the absorption factor
        for an absorber, the stripping factor for a stripper.

    Returns
    -------
    ndarray
        E_o [-]: the number of theoretical stages equivalent to one real
        tray.

    Notes
    -----
    Holds for straight equilibrium and operating lines (dilute, constant L
    and V), the same E_MV on every tray and vapour entering each tray well
    mixed. Evaluated as log1p(E_MV u) / log1p(u) with u = lambda - 1, which
    keeps full precision for lambda near 1. Source: Lewis, Ind. Eng. Chem.
    28, 399 (1936), as given in Seader & Henley, Separation Process
    Principles, 2nd ed., Sec. 6.5, and Perry's Chemical Engineers' Handbook,
    8th ed., Sec. 14 (tray efficiency); equation numbers not verified
    (value from memory).

    Examples
    --------
    >>> round(float(overall_from_murphree(0.7, 2.0)), 6)
    0.765535
    >>> float(overall_from_murphree(0.7, 1.0))
    0.7

    An absorber at A = 2 with E_MV = 0.40 (lambda = 0.5) gives E_o = 0.3219,
    as in the calculatoratoz.com evaluation cited in the tests:

    >>> round(float(overall_from_murphree(0.40, 0.5)), 4)
    0.3219
    """
    efficiency = np.asarray(murphree_vapour, dtype=float)
    factor = np.asarray(slope_ratio, dtype=float)
    if np.any(efficiency <= 0.0) or np.any(efficiency > 1.0):
        raise ValueError(f"Murphree vapour efficiency must be in (0, 1], got {murphree_vapour}")
    if np.any(factor <= 0.0):
        raise ValueError(f"factor K V / L must be > 0, got {factor}")
    excess = factor - 1.0
    at_one = excess == 0.0
    safe_excess = np.where(at_one, 1.0, excess)
    ratio = np.log1p(efficiency * safe_excess) / np.log1p(safe_excess)
    return np.where(at_one, efficiency, ratio)


def real_trays(stages, efficiency):
    r"""Number of real trays for a number of theoretical stages.

        N_real = N / E_o

    Real-valued; the caller rounds up to whole trays.

    Parameters
    ----------
    stages : array_like
        Theoretical stages N [-], >= 0.
    efficiency : array_like
        Overall tray efficiency E_o [-], in (0, 1].

    Returns
    -------
    ndarray
        N_real [-].

    Notes
    -----
    Definition of the overall efficiency: Seader & Henley, Separation
    Process Principles, 2nd ed., Sec. 6.5.

    Examples
    --------
    >>> float(real_trays(6.0, 0.4))
    15.0
    """
    stages = np.asarray(stages, dtype=float)
    efficiency = np.asarray(efficiency, dtype=float)
    if np.any(stages < 0.0):
        raise ValueError(f"theoretical stages must be >= 0, got {stages}")
    if np.any(efficiency <= 0.0) or np.any(efficiency > 1.0):
        raise ValueError(f"overall tray efficiency must be in (0, 1], got {efficiency}")
    return stages / efficiency
