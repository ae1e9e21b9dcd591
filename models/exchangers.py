r"""Heat exchange around a regenerated solvent loop: temperature differences, areas, utilities.

The loop has a lean/rich cross exchanger (hot lean solvent from the
regenerator heats the rich solvent from the absorber), a lean cooler on
cooling water, and a steam heater or a reboiler. This module holds the
relations to size them:

* the log-mean temperature difference (:func:`log_mean_temperature_difference`,
  :func:`counterflow_temperature_difference`) and the shell-and-tube
  correction factor F of Bowman, Mueller and Nagle (1940) for one shell
  pass (:func:`correction_factor`) and for N shell passes in series
  (:func:`correction_factor_shells`), with the temperature groups R and P
  (:func:`temperature_ratios`) and the least shells for a given F
  (:func:`shells_for_correction_factor`);
* the area from Q = U A F LMTD (:func:`exchanger_area`);
* the cross exchanger set by an approach temperature (:func:`cross_exchanger`),
  the lean cooler (:func:`lean_cooler`), condensing steam
  (:func:`water_latent_heat`, :func:`steam_rate`) and a reboiler's vapour
  duty (:func:`reboiler_duty`).

Costs go through ``models.costing``: ``bare_module_cost`` with the rows
``heat_exchanger_fixed_tube``, ``heat_exchanger_floating_head`` and
``reboiler_kettle`` (area in m2).

Units: temperatures [K] (differences [K]), heat-capacity rates [W/K], duties
[W], overall coefficients [W/(m2 K)], areas [m2], mass flows [kg/s], molar
flows [mol/s], latent heats [J/kg] or [J/mol] as named.
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

from towercost.models.validity import check_range

__all__ = [
    "Cooler",
    "CrossExchange",
    "correction_factor",
    "correction_factor_shells",
    "counterflow_temperature_difference",
    "cross_exchanger",
    "exchanger_area",
    "lean_cooler",
    "log_mean_temperature_difference",
    "reboiler_duty",
    "shells_for_correction_factor",
    "steam_rate",
    "temperature_ratios",
    "water_heat_capacity",
    "water_latent_heat",
]

_BMN = "Bowman, Mueller and Nagle, Trans. ASME 62, 283 (1940)"
#: Least correction factor held economic for a shell-and-tube design (common practice).
MINIMUM_CORRECTION_FACTOR = 0.75
#: IAPWS-95 range of the saturation line used for the latent heat [K]: triple point to critical point.
_WATER_TRIPLE = 273.16
_WATER_CRITICAL = 647.096
#: Pressure at which cooling water's heat capacity is taken [Pa] (it hardly depends on it).
_COOLING_WATER_PRESSURE = 101325.0


class CrossExchange(NamedTuple):
    """Lean/rich cross exchanger: duty [W], rich and lean outlet temperatures [K], LMTD [K]."""

    duty: np.ndarray
    rich_out: np.ndarray
    lean_out: np.ndarray
    temperature_difference: np.ndarray


class Cooler(NamedTuple):
    """Lean cooler: duty [W], cooling-water mass flow [kg/s], LMTD [K]."""

    duty: np.ndarray
    water_rate: np.ndarray
    temperature_difference: np.ndarray


# ---------------------------------------------------------------------------
# temperature differences
# ---------------------------------------------------------------------------


def log_mean_temperature_difference(difference_1, difference_2):
    r"""Log-mean of the temperature differences at the two ends of an exchanger.

        LMTD = (dT_1 - dT_2) / ln(dT_1 / dT_2),      LMTD = dT_1 at dT_1 = dT_2

    evaluated as dT_2 expm1(u) / u with u = ln(dT_1 / dT_2), which is
    accurate through the equal-difference limit.

    Parameters
    ----------
    difference_1, difference_2 : array_like
        Hot-minus-cold temperature differences at the two ends [K], > 0.

    Returns
    -------
    ndarray
        LMTD [K], between the two differences.

    Raises
    ------
    ValueError
        Where a difference is not positive (a temperature cross).

    Notes
    -----
    Holds for constant U and heat-capacity rates in pure counter- or
    co-current flow. Source: Kern, Process Heat Transfer, McGraw-Hill
    (1950), Chapter 5, Eq. (5.14) (equation number from memory).

    Examples
    --------
    >>> round(float(log_mean_temperature_difference(220.0, 100.0)), 4)     # 120 / ln 2.2
    152.1959
    >>> float(log_mean_temperature_difference(35.0, 35.0))
    35.0
    """
    first = np.asarray(difference_1, dtype=float)
    second = np.asarray(difference_2, dtype=float)
    if np.any(~(first > 0.0)) or np.any(~(second > 0.0)):
        raise ValueError("both terminal temperature differences must be > 0 K (no temperature cross)")
    u = np.log(first / second)
    same = u == 0.0
    return second * np.where(same, 1.0, np.expm1(u) / np.where(same, 1.0, u))


def counterflow_temperature_difference(hot_in, hot_out, cold_in, cold_out):
    r"""LMTD of a counterflow exchanger from its four terminal temperatures.

        dT_1 = T_hot,in - T_cold,out,    dT_2 = T_hot,out - T_cold,in

    Parameters
    ----------
    hot_in, hot_out : array_like
        Hot stream inlet and outlet temperatures [K].
    cold_in, cold_out : array_like
        Cold stream inlet and outlet temperatures [K].

    Returns
    -------
    ndarray
        LMTD [K] (:func:`log_mean_temperature_difference`).

    Source: Kern, Process Heat Transfer (1950), Chapter 5 (value from memory
    for the chapter).

    Examples
    --------
    Kern's kerosene-crude exchanger (Example 7.3): kerosene 390 to 200 F, crude
    100 to 170 F; the same in kelvin differences:

    >>> round(float(counterflow_temperature_difference(390.0, 200.0, 100.0, 170.0)) / 1.8, 4)
    84.5533
    """
    hot_in, hot_out, cold_in, cold_out = (np.asarray(v, dtype=float) for v in (hot_in, hot_out, cold_in, cold_out))
    return log_mean_temperature_difference(hot_in - cold_out, hot_out - cold_in)


def temperature_ratios(hot_in, hot_out, cold_in, cold_out):
    r"""The groups R and P of the LMTD correction factor.

        R = (T_1 - T_2) / (t_2 - t_1),      P = (t_2 - t_1) / (T_1 - t_1)

    with T the hot and t the cold stream (Kern writes S for P). F of a
    1-2N exchanger is the same whichever stream is in the shell.

    Parameters
    ----------
    hot_in, hot_out, cold_in, cold_out : array_like
        Terminal temperatures [K]; hot_in > cold_in, cold_out > cold_in.

    Returns
    -------
    tuple of ndarray
        (R, P) [-].

    Source: Kern, Process Heat Transfer (1950), Chapter 7, Eqs. (7.40) and
    (7.41) (equation numbers from memory).

    Examples
    --------
    >>> r, p = temperature_ratios(390.0, 200.0, 100.0, 170.0)
    >>> round(float(r), 4), round(float(p), 4)
    (2.7143, 0.2414)
    """
    hot_in, hot_out, cold_in, cold_out = (np.asarray(v, dtype=float) for v in (hot_in, hot_out, cold_in, cold_out))
    rise = cold_out - cold_in
    if np.any(~(rise > 0.0)) or np.any(~(hot_in > cold_in)):
        raise ValueError("the cold stream must warm (cold_out > cold_in) and enter below the hot inlet")
    return (hot_in - hot_out) / rise, rise / (hot_in - cold_in)


# ---------------------------------------------------------------------------
# correction factor
# ---------------------------------------------------------------------------


def _check_ratios(ratio_r, ratio_p):
    r = np.asarray(ratio_r, dtype=float)
    p = np.asarray(ratio_p, dtype=float)
    if np.any(~(r >= 0.0)) or np.any(~(p >= 0.0)) or np.any(p >= 1.0):
        raise ValueError("R must be >= 0 and P must lie in [0, 1)")
    return np.broadcast_arrays(r, p)


def _one_shell(r, p):
    """F of one shell pass and an even number of tube passes; 0 where no 1-2 exchanger can do it."""
    root = np.sqrt(r * r + 1.0)
    far = r + 1.0 + root
    feasible = (p * far < 2.0) & (p * r < 1.0)
    p_ok = np.where(feasible, p, 0.0)
    # ln((1 - P)/(1 - RP)) / (R - 1) = P / (1 - RP) * log1p(z) / z,  z = P (R - 1) / (1 - RP)
    z = p_ok * (r - 1.0) / (1.0 - r * p_ok)
    small = np.abs(z) < 1e-300
    log_ratio = np.where(small, 1.0, np.log1p(z) / np.where(small, 1.0, z))
    # ln((2 - P(R + 1 - root)) / (2 - P(R + 1 + root))) = log1p(2 P root / (2 - P far))
    denominator = np.log1p(2.0 * p_ok * root / (2.0 - p_ok * far))
    zero_p = p_ok == 0.0
    factor = root * p_ok * log_ratio / ((1.0 - r * p_ok) * np.where(zero_p, 1.0, denominator))
    factor = np.where(zero_p, 1.0, factor)
    return np.where(feasible, np.minimum(factor, 1.0), 0.0)


def correction_factor(ratio_r, ratio_p, *, warnings: list[str] | None = None):
    r"""LMTD correction factor F of a shell-and-tube exchanger with one shell pass, two or more tube passes.

    Bowman, Mueller and Nagle's closed form for the 1-2 exchanger:

        F = (R**2 + 1)**0.5 ln[(1 - P) / (1 - R P)]
            / ( (R - 1) ln{ [2 - P (R + 1 - (R**2 + 1)**0.5)] / [2 - P (R + 1 + (R**2 + 1)**0.5)] } )

        R = 1:  F = (2**0.5 P / (1 - P)) / ln{ [2 - P (2 - 2**0.5)] / [2 - P (2 + 2**0.5)] }

    evaluated through log1p so that R = 1, P -> 0 and R -> 0 are accurate
    (F = 1 at P = 0 and at R = 0).

    Parameters
    ----------
    ratio_r : array_like
        R = (T_1 - T_2) / (t_2 - t_1) [-], >= 0.
    ratio_p : array_like
        P = (t_2 - t_1) / (T_1 - t_1) [-], in [0, 1).
    warnings : list of str, optional
        Receives a message where F < 0.75 (F = 0 included), below which a
        design with more shell passes is usual (common practice).

    Returns
    -------
    ndarray
        F [-], in (0, 1]; 0 where P is at or past the largest a 1-2
        exchanger can reach, P >= 2 / (R + 1 + (R**2 + 1)**0.5) (a
        temperature cross the arrangement cannot carry).

    Notes
    -----
    Exact for one shell pass and two tube passes with a well-mixed shell
    fluid, constant U and heat capacities; used for 4, 6, ... tube passes as
    well, where it is a close approximation.

    Source: Bowman, Mueller and Nagle, "Mean temperature difference in
    design", Trans. ASME 62, 283 (1940), the 1-2 relation (after Nagle and
    Underwood), as given in Kern, Process Heat Transfer (1950), Eq. (7.41),
    and in Perry's Chemical Engineers' Handbook, Section 11 (equation
    numbers from memory).

    Examples
    --------
    Kern's Example 7.3 (R = 2.71, S = 0.241; Kern reads 0.905 off Fig. 18):

    >>> round(float(correction_factor(190.0 / 70.0, 70.0 / 290.0)), 4)
    0.8917
    >>> round(float(correction_factor(1.0, 0.5)), 4)
    0.8023
    """
    r, p = _check_ratios(ratio_r, ratio_p)
    factor = _one_shell(r, p)
    check_range("LMTD correction factor", factor, MINIMUM_CORRECTION_FACTOR, 1.0, "-",
                "one shell pass (common practice: add shell passes below it)", warnings)
    return factor


def _per_shell_effectiveness(r, p, shells):
    r"""P of each of N identical shells in counterflow series that gives P overall.

        P_1 = (1 - W) / (R - W),  W = [(1 - R P) / (1 - P)]**(1/N);    R = 1: P_1 = P / (N - (N - 1) P)

    written as P_1 = h P / ((1 - P) + h P), h = (1 - W) / e, e = P (R - 1) / (1 - P),
    with h -> 1 / N as R -> 1, so that it is continuous through R = 1.
    """
    e = p * (r - 1.0) / (1.0 - p)
    small = np.abs(e) < 1e-300
    h = np.where(small, 1.0 / shells, -np.expm1(np.log1p(-np.where(small, 0.0, e)) / shells) / np.where(small, 1.0, e))
    return h * p / ((1.0 - p) + h * p)


def correction_factor_shells(ratio_r, ratio_p, shells, *, warnings: list[str] | None = None):
    r"""LMTD correction factor F for N shell passes in series, each with 2 or more tube passes.

    The N shells act as N identical 1-2 exchangers in counterflow series, so
    F is the 1-2 factor (:func:`correction_factor`) at the per-shell P:

        P_1 = (1 - W) / (R - W),   W = [(1 - R P) / (1 - P)]**(1/N)
        P_1 = P / (N - (N - 1) P)                              at R = 1
        F_N(R, P) = F_1(R, P_1)

    Parameters
    ----------
    ratio_r : array_like
        R [-], >= 0.
    ratio_p : array_like
        Overall P [-], in [0, 1); with R > 1 also P < 1 / R (counterflow limit).
    shells : array_like
        Shell passes N [-], whole, >= 1.
    warnings : list of str, optional
        Receives a message where F < 0.75 (common practice).

    Returns
    -------
    ndarray
        F [-]; 0 where even N shells cannot reach P.

    Source: Bowman, Mueller and Nagle, Trans. ASME 62, 283 (1940); the
    series form is given in Perry's Chemical Engineers' Handbook, Section 11
    (value from memory for the equation number).

    Examples
    --------
    >>> round(float(correction_factor_shells(190.0 / 70.0, 70.0 / 290.0, 2)), 4)
    0.9755
    >>> bool(correction_factor_shells(2.0, 0.3, 1) == correction_factor(2.0, 0.3))
    True
    """
    r, p = _check_ratios(ratio_r, ratio_p)
    count = np.asarray(shells, dtype=float)
    if np.any(~(count >= 1.0)) or np.any(count != np.round(count)):
        raise ValueError("the number of shell passes must be a whole number >= 1")
    r, p, count = np.broadcast_arrays(r, p, count)
    counterflow = (r * p < 1.0)
    p_in = np.where(counterflow, p, 0.0)
    per_shell = np.where(count == 1.0, p_in, _per_shell_effectiveness(r, p_in, count))
    factor = np.where(counterflow, _one_shell(r, per_shell), 0.0)
    check_range("LMTD correction factor", factor, MINIMUM_CORRECTION_FACTOR, 1.0, "-",
                "the shell passes given (common practice: add shell passes below it)", warnings)
    return factor


def shells_for_correction_factor(ratio_r, ratio_p, minimum=MINIMUM_CORRECTION_FACTOR, *, max_shells: int = 10):
    r"""Least number of shell passes whose correction factor reaches ``minimum``.

        N = min { n : F_n(R, P) >= minimum },  n = 1 .. max_shells

    Parameters
    ----------
    ratio_r, ratio_p : array_like
        R and overall P [-], as in :func:`correction_factor_shells`.
    minimum : float
        Least acceptable F [-]; 0.75 by default (common practice).
    max_shells : int
        Largest number of shells tried.

    Returns
    -------
    ndarray
        N [-] as float; inf where even ``max_shells`` shells fall short.

    Source: Bowman, Mueller and Nagle, Trans. ASME 62, 283 (1940), through
    :func:`correction_factor_shells`.

    Examples
    --------
    >>> float(shells_for_correction_factor(1.0, 0.6))
    2.0
    """
    r, p = _check_ratios(ratio_r, ratio_p)
    needed = np.full(r.shape, np.inf)
    for n in range(max_shells, 0, -1):
        enough = correction_factor_shells(r, p, n) >= minimum
        needed = np.where(enough, float(n), needed)
    return needed


def exchanger_area(duty, overall_coefficient, temperature_difference, correction=1.0):
    r"""Heat-transfer area from the design equation.

        A = Q / (U F LMTD)

    Parameters
    ----------
    duty : array_like
        Heat duty Q [W], >= 0.
    overall_coefficient : array_like
        Overall heat-transfer coefficient U [W/(m2 K)], > 0.
    temperature_difference : array_like
        LMTD [K], > 0.
    correction : array_like
        Correction factor F [-], in [0, 1]; 1 for pure counterflow or for a
        stream at constant temperature.

    Returns
    -------
    ndarray
        A [m2]; 0 where Q = 0, inf where F = 0 and Q > 0.

    Source: Kern, Process Heat Transfer (1950), Chapter 7, Eq. (7.42)
    (equation number from memory).

    Examples
    --------
    >>> round(float(exchanger_area(1.0e6, 500.0, 40.0, 0.9)), 4)
    55.5556
    """
    q = np.asarray(duty, dtype=float)
    u = np.asarray(overall_coefficient, dtype=float)
    dt = np.asarray(temperature_difference, dtype=float)
    f = np.asarray(correction, dtype=float)
    if np.any(~(q >= 0.0)) or np.any(~(u > 0.0)) or np.any(~(dt > 0.0)) or np.any(~((f >= 0.0) & (f <= 1.0))):
        raise ValueError("need duty >= 0 W, U > 0 W/(m2 K), LMTD > 0 K and 0 <= F <= 1")
    q, u, dt, f = np.broadcast_arrays(q, u, dt, f)
    usable = f > 0.0
    area = q / (u * dt * np.where(usable, f, 1.0))
    return np.where(usable, area, np.where(q > 0.0, np.inf, 0.0))


# ---------------------------------------------------------------------------
# the loop's exchangers and utilities
# ---------------------------------------------------------------------------


def cross_exchanger(rich_in, lean_in, approach, rich_capacity_rate, lean_capacity_rate):
    r"""Lean/rich cross exchanger in counterflow, set by its approach temperature.

    The closest approach sits at the end where the stream with the smaller
    heat-capacity rate C_min leaves, so the duty is

        Q = C_min (T_lean,in - T_rich,in - dT_approach)

    and the outlets follow from each stream's balance:
    T_rich,out = T_rich,in + Q / C_rich, T_lean,out = T_lean,in - Q / C_lean.

    Parameters
    ----------
    rich_in : array_like
        Rich solvent from the absorber, entering [K].
    lean_in : array_like
        Lean solvent from the regenerator, entering [K].
    approach : array_like
        Least temperature difference between the streams [K], > 0 and below
        lean_in - rich_in.
    rich_capacity_rate, lean_capacity_rate : array_like
        Heat-capacity rates m c_p of the rich and lean solvent [W/K], > 0.

    Returns
    -------
    CrossExchange
        duty [W], rich_out [K], lean_out [K] and the counterflow LMTD [K].

    Notes
    -----
    Constant heat capacities, no phase change (a rich solvent that flashes
    in the exchanger is outside this relation). Source: the energy balances
    of both streams; that the closest approach sits at the C_min outlet
    follows from them, since dT_hot end - dT_cold end = Q (1/C_lean - 1/C_rich)
    (derived here; an approach temperature as the design variable is common
    practice).

    Examples
    --------
    >>> out = cross_exchanger(313.15, 393.15, 10.0, 2.0e4, 1.8e4)
    >>> round(float(out.duty)), round(float(out.rich_out), 2), round(float(out.lean_out), 2)
    (1260000, 376.15, 323.15)
    """
    rich_in, lean_in, approach, c_rich, c_lean = (
        np.asarray(v, dtype=float) for v in (rich_in, lean_in, approach, rich_capacity_rate, lean_capacity_rate))
    if np.any(~(c_rich > 0.0)) or np.any(~(c_lean > 0.0)):
        raise ValueError("heat-capacity rates must be > 0 W/K")
    span = lean_in - rich_in
    if np.any(~(approach > 0.0)) or np.any(~(approach < span)):
        raise ValueError("the approach must be > 0 K and below the lean-minus-rich inlet difference")
    duty = np.minimum(c_rich, c_lean) * (span - approach)
    rich_out = rich_in + duty / c_rich
    lean_out = lean_in - duty / c_lean
    difference = counterflow_temperature_difference(lean_in, lean_out, rich_in, rich_out)
    return CrossExchange(duty, rich_out, lean_out, difference)


def water_heat_capacity(temperature, pressure=_COOLING_WATER_PRESSURE):
    r"""Isobaric heat capacity of liquid water from IAPWS-95.

    Parameters
    ----------
    temperature : array_like
        Temperature [K], above 273.16 K and below the boiling point at
        ``pressure`` (liquid water).
    pressure : float
        Pressure [Pa].

    Returns
    -------
    ndarray
        c_p [J/(kg K)].

    Notes
    -----
    Evaluated with ``chemicals.iapws.iapws95_properties`` (IAPWS-95, Wagner
    and Pruss, J. Phys. Chem. Ref. Data 31, 387 (2002)); the property call
    is scalar, so it runs once per distinct temperature.

    Examples
    --------
    >>> round(float(water_heat_capacity(298.15)), 1)
    4181.3
    """
    from chemicals.iapws import iapws95_Psat, iapws95_properties

    temperature = np.asarray(temperature, dtype=float)
    if np.any(~((temperature > _WATER_TRIPLE) & (temperature < _WATER_CRITICAL))):
        raise ValueError("water temperature must lie between the triple point, 273.16 K, and 647.096 K")
    distinct, where = np.unique(temperature, return_inverse=True)
    if any(iapws95_Psat(float(t)) >= pressure for t in distinct):
        raise ValueError(f"water at {float(distinct.max()):.2f} K boils at {pressure:.6g} Pa; cooling water must be liquid")
    values = np.array([iapws95_properties(float(t), float(pressure))[5] for t in distinct])
    return values[where].reshape(temperature.shape)


def lean_cooler(solvent_capacity_rate, solvent_in, solvent_out, water_in, water_out, water_cp=None):
    r"""Lean-solvent cooler on cooling water, in counterflow.

        Q = C_solvent (T_in - T_out),      m_water = Q / (c_p,water (t_out - t_in))

    Parameters
    ----------
    solvent_capacity_rate : array_like
        Heat-capacity rate of the lean solvent [W/K], > 0.
    solvent_in, solvent_out : array_like
        Lean solvent entering (from the cross exchanger) and leaving (to the
        absorber) [K], solvent_in > solvent_out.
    water_in, water_out : array_like
        Cooling water supply and return [K], water_out > water_in.
    water_cp : array_like, optional
        Heat capacity of the cooling water [J/(kg K)]; by default IAPWS-95 at
        the mean water temperature (:func:`water_heat_capacity`).

    Returns
    -------
    Cooler
        duty [W], water_rate [kg/s], counterflow LMTD [K].

    Source: energy balance and Kern, Process Heat Transfer (1950), Chapter 5
    (LMTD).

    Examples
    --------
    >>> out = lean_cooler(1.8e4, 323.15, 313.15, 303.15, 313.15, water_cp=4180.0)
    >>> round(float(out.duty)), round(float(out.water_rate), 4), round(float(out.temperature_difference), 4)
    (180000, 4.3062, 10.0)
    """
    c_solvent, t_in, t_out, w_in, w_out = (
        np.asarray(v, dtype=float) for v in (solvent_capacity_rate, solvent_in, solvent_out, water_in, water_out))
    if np.any(~(c_solvent > 0.0)):
        raise ValueError("the solvent heat-capacity rate must be > 0 W/K")
    if np.any(~(t_in > t_out)) or np.any(~(w_out > w_in)):
        raise ValueError("the solvent must cool (solvent_in > solvent_out) and the water warm (water_out > water_in)")
    cp = water_heat_capacity(0.5 * (w_in + w_out)) if water_cp is None else np.asarray(water_cp, dtype=float)
    duty = c_solvent * (t_in - t_out)
    difference = counterflow_temperature_difference(t_in, t_out, w_in, w_out)
    return Cooler(duty, duty / (cp * (w_out - w_in)), difference)


def water_latent_heat(temperature):
    r"""Latent heat of vaporization of water on the saturation line, IAPWS-95.

        h_fg = h'' - h',   h / (R T) = 1 + tau (phi0_tau + phir_tau) + delta phir_delta

    with the saturated liquid and vapour densities of IAPWS-95 (the ideal
    part phi0_tau does not depend on density, so it cancels).

    Parameters
    ----------
    temperature : array_like
        Saturation temperature [K], 273.16 to 647.096 K.

    Returns
    -------
    ndarray
        h_fg [J/kg].

    Notes
    -----
    Evaluated with the IAPWS-95 functions of ``chemicals.iapws``
    (saturation densities and Helmholtz-energy derivatives), once per
    distinct temperature. Source: Wagner and Pruss, "The IAPWS formulation
    1995 for the thermodynamic properties of ordinary water substance",
    J. Phys. Chem. Ref. Data 31, 387 (2002), Table 6.3 (enthalpy relation;
    table number from memory).

    Examples
    --------
    >>> round(float(water_latent_heat(373.15)) / 1000.0, 1)
    2256.4
    """
    from chemicals.iapws import (iapws95_dAr_ddelta, iapws95_dAr_dtau, iapws95_R, iapws95_rhoc, iapws95_rhog_sat,
                                 iapws95_rhol_sat, iapws95_Tc)

    temperature = np.asarray(temperature, dtype=float)
    if np.any(~((temperature >= _WATER_TRIPLE) & (temperature < _WATER_CRITICAL))):
        raise ValueError("saturation temperature must lie between 273.16 K and the critical point, 647.096 K")

    def latent(t):
        tau = iapws95_Tc / t
        enthalpy = []
        for rho in (iapws95_rhog_sat(t), iapws95_rhol_sat(t)):
            delta = rho / iapws95_rhoc
            enthalpy.append(tau * iapws95_dAr_dtau(tau, delta) + delta * iapws95_dAr_ddelta(tau, delta))
        return iapws95_R * t * (enthalpy[0] - enthalpy[1])

    distinct, where = np.unique(temperature, return_inverse=True)
    values = np.array([latent(float(t)) for t in distinct])
    return values[where].reshape(temperature.shape)


def steam_rate(duty, latent_heat):
    r"""Condensing-steam flow for a heater or reboiler duty.

        m_steam = Q / h_fg

    Parameters
    ----------
    duty : array_like
        Heat duty Q [W], >= 0.
    latent_heat : array_like
        Latent heat of the steam at its condensing temperature [J/kg], > 0
        (:func:`water_latent_heat`).

    Returns
    -------
    ndarray
        Steam mass flow [kg/s], saturated steam condensing to saturated
        liquid (superheat and condensate subcooling neglected).

    Source: energy balance (common practice for utility steam).

    Examples
    --------
    >>> round(float(steam_rate(1.0e6, water_latent_heat(423.15))), 4)     # 150 C steam
    0.4731
    """
    q = np.asarray(duty, dtype=float)
    latent = np.asarray(latent_heat, dtype=float)
    if np.any(~(q >= 0.0)) or np.any(~(latent > 0.0)):
        raise ValueError("need duty >= 0 W and latent heat > 0 J/kg")
    return q / latent


def reboiler_duty(vapour_rate, latent_heat):
    r"""Reboiler duty of a reboiled stripper from the vapour it must raise.

        Q = V lambda

    Parameters
    ----------
    vapour_rate : array_like
        Stripping vapour generated at the bottom V [mol/s], >= 0.
    latent_heat : array_like
        Molar latent heat of the boiling solvent at the reboiler temperature
        lambda [J/mol], > 0.

    Returns
    -------
    ndarray
        Q [W]. Sensible heating of the feed to its bubble point and any
        desorption heat of the solute are not included.

    Source: energy balance on a reboiler raising saturated vapour (common
    practice).

    Examples
    --------
    Water boiled at 393.15 K, lambda = h_fg M with M = 0.018015 kg/mol:

    >>> round(float(reboiler_duty(10.0, water_latent_heat(393.15) * 0.018015)))
    396711
    """
    v = np.asarray(vapour_rate, dtype=float)
    latent = np.asarray(latent_heat, dtype=float)
    if np.any(~(v >= 0.0)) or np.any(~(latent > 0.0)):
        raise ValueError("need vapour rate >= 0 mol/s and latent heat > 0 J/mol")
    return v * latent
