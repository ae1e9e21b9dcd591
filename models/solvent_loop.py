r"""The closed solvent loop: solvent lost to the gas, and the steady lean loading.

A regenerated solvent circulates absorber -> regenerator -> absorber. Two
loop relations sit outside any one column:

* the solvent that evaporates into a gas leaving a column, by Raoult's law
  (:func:`solvent_vapour_loss`), with the vapour pressure given or taken from
  ``equilibrium.vapour_pressure_dippr101`` by CAS number;
* the lean loading the loop settles at. The absorber turns a lean loading
  into a rich one, the regenerator a rich loading back into a lean one; at
  steady state the lean loading reproduces itself,
  x_lean = g(x_lean) = R(A(x_lean)). A solute that the regenerator barely
  strips builds up until the absorber picks up no more than the
  regenerator (and any purge) removes.
  :func:`lean_loading_fixed_point` solves the loop for any vectorized column
  relations; :func:`linear_loop_lean_loading` is its closed form when both
  columns are affine in the entering loading, and
  :func:`kremser_loop_lean_loading` builds those lines from dilute Kremser
  cascades.

Units: molar flows [mol/s], pressures [Pa], loadings as mole fractions (or
mole ratios, if the column relations use them; the loop balance does not
care) [-].
"""

from __future__ import annotations

from collections.abc import Callable
from typing import NamedTuple

import numpy as np

from towercost.models import kremser

__all__ = [
    "LoopState",
    "kremser_loop_lean_loading",
    "lean_loading_fixed_point",
    "linear_loop_lean_loading",
    "solvent_vapour_loss",
]

# Bisection on the lean loading: enough halvings for any bracket inside [0, 1]
# to close to adjacent floats; the loop stops once every point has.
_BISECTION_MAX = 200


class LoopState(NamedTuple):
    """Steady state of the solvent loop.

    lean_loading, rich_loading [-]: loadings of the solvent entering and
    leaving the absorber; steady [bool]: True where a steady state exists
    within the bounds. Where it does not, the loadings are those at the
    bound the loop drifts to (finite, never NaN): the upper bound where the
    solute keeps building up, the lower bound where the loop would run below it.
    """

    lean_loading: np.ndarray
    rich_loading: np.ndarray
    steady: np.ndarray


# ---------------------------------------------------------------------------
# solvent lost by evaporation
# ---------------------------------------------------------------------------


def solvent_vapour_loss(gas_rate, solvent_fraction, vapour_pressure, pressure, activity_coefficient=1.0):
    r"""Solvent carried off as vapour by a gas leaving in equilibrium with the solvent.

    Modified Raoult's law for the solvent in the gas leaving the column:

        y_s = gamma x_s Psat / P,      loss = V y_s

    Parameters
    ----------
    gas_rate : array_like
        Total molar flow of the gas leaving [mol/s], >= 0 (solvent vapour
        included). For a solvent-free gas flow G', the loss is G' y_s / (1 - y_s).
    solvent_fraction : array_like
        Mole fraction of solvent in the liquid the gas leaves from x_s [-],
        in (0, 1] (about 1 for a lean solvent).
    vapour_pressure : array_like
        Vapour pressure of the pure solvent at the leaving-gas temperature
        Psat [Pa], > 0; e.g. ``equilibrium.vapour_pressure_dippr101(cas, T)``.
    pressure : array_like
        Total pressure where the gas leaves P [Pa], > 0.
    activity_coefficient : array_like
        Activity coefficient of the solvent gamma [-], > 0; 1 for an ideal
        solution.

    Returns
    -------
    ndarray
        Solvent loss [mol/s]; multiply by the solvent molar mass [kg/mol]
        for kg/s.

    Raises
    ------
    ValueError
        Where gamma x_s Psat >= P: the solvent would boil at that pressure.

    Notes
    -----
    Assumes the gas leaves in equilibrium with the top-stage liquid (an
    upper bound for a real tray) and an ideal gas. Source: modified
    Raoult's law, Smith, Van Ness and Abbott, Introduction to Chemical
    Engineering Thermodynamics, 7th ed., Section 10.5 (value from memory for
    the section).

    Examples
    --------
    100 mol/s of gas leaving over water at 40 C (Psat 7.385 kPa) and 1 atm:

    >>> round(float(solvent_vapour_loss(100.0, 1.0, 7385.0, 101325.0)), 4)
    7.2884
    """
    v = np.asarray(gas_rate, dtype=float)
    x = np.asarray(solvent_fraction, dtype=float)
    p_sat = np.asarray(vapour_pressure, dtype=float)
    p = np.asarray(pressure, dtype=float)
    gamma = np.asarray(activity_coefficient, dtype=float)
    if np.any(~(v >= 0.0)) or np.any(~((x > 0.0) & (x <= 1.0))):
        raise ValueError("need gas rate >= 0 mol/s and solvent mole fraction in (0, 1]")
    if np.any(~(p_sat > 0.0)) or np.any(~(p > 0.0)) or np.any(~(gamma > 0.0)):
        raise ValueError("vapour pressure, total pressure and activity coefficient must be > 0")
    fraction = gamma * x * p_sat / p
    if np.any(fraction >= 1.0):
        raise ValueError("gamma x Psat reaches the total pressure: the solvent would boil there")
    return v * fraction


# ---------------------------------------------------------------------------
# the steady lean loading
# ---------------------------------------------------------------------------


def _check_purge(purge, makeup_loading):
    purge = np.asarray(purge, dtype=float)
    makeup = np.asarray(makeup_loading, dtype=float)
    if np.any(~((purge >= 0.0) & (purge < 1.0))) or np.any(~(makeup >= 0.0)):
        raise ValueError("the purge fraction must lie in [0, 1) and the make-up loading be >= 0")
    return purge, makeup


def lean_loading_fixed_point(absorber: Callable, regenerator: Callable, lower, upper, *, purge=0.0,
                             makeup_loading=0.0):
    r"""Steady lean loading of a closed solvent loop, by bisection, for any column relations.

    One trip round the loop maps the lean loading entering the absorber to
    the lean loading returning to it,

        g(x) = (1 - f) R(A(x)) + f x_makeup,

    with A the absorber (lean in -> rich out), R the regenerator (rich in ->
    lean out) and f the fraction of the circulating solvent purged and
    replaced by make-up of loading x_makeup. The steady state solves
    g(x) = x; with h(x) = g(x) - x >= 0 at ``lower`` and <= 0 at ``upper``
    (the loop loads up from below and unloads from above) it is found by
    bisection to the last bit.

    Parameters
    ----------
    absorber : callable
        Vectorized x_lean -> x_rich [-] (e.g. a Kremser or stage-by-stage
        cascade at fixed flows and stages).
    regenerator : callable
        Vectorized x_rich -> x_lean [-].
    lower, upper : array_like
        Bounds on the lean loading [-], lower < upper; broadcast with the
        design points the callables work on.
    purge : array_like
        Fraction of the circulating solvent purged each pass f [-], in [0, 1).
    makeup_loading : array_like
        Loading of the fresh make-up solvent [-], >= 0.

    Returns
    -------
    LoopState
        lean and rich loadings and the ``steady`` flag. Where h does not
        fall from >= 0 to <= 0 across the bounds there is no steady state
        within them: steady is False and the loadings are those at the bound
        the loop drifts to (upper where h > 0 at the upper bound: the solute
        builds up past it; lower otherwise).

    Notes
    -----
    Converges for any continuous g with one crossing in the bounds; if g
    crosses the diagonal several times, one stable crossing is returned.
    Source: steady-state solute balance over the loop (common practice).

    Examples
    --------
    An absorber adding 0.002 to the loading and a regenerator removing 80 %
    of what it receives: x = 0.2 (x + 0.002), x = 0.0005.

    >>> state = lean_loading_fixed_point(lambda x: x + 0.002, lambda x: 0.2 * x, 0.0, 1.0)
    >>> round(float(state.lean_loading), 12), bool(state.steady)
    (0.0005, True)
    """
    purge, makeup = _check_purge(purge, makeup_loading)
    low = np.asarray(lower, dtype=float)
    high = np.asarray(upper, dtype=float)
    if np.any(~(low < high)):
        raise ValueError("the lower bound on the lean loading must be below the upper bound")

    def excess(x):
        return (1.0 - purge) * np.asarray(regenerator(absorber(x)), dtype=float) + purge * makeup - x

    at_low, at_high = excess(low), excess(high)
    low, high, at_low, at_high = np.broadcast_arrays(low, high, at_low, at_high)
    builds_up = at_high > 0.0
    runs_down = at_low < 0.0
    steady = ~builds_up & ~runs_down
    a, b = low.astype(float).copy(), high.astype(float).copy()
    for _ in range(_BISECTION_MAX):
        middle = 0.5 * (a + b)
        open_ = steady & (middle > a) & (middle < b)
        if not open_.any():
            break
        rising = excess(middle) > 0.0
        a = np.where(open_ & rising, middle, a)
        b = np.where(open_ & ~rising, middle, b)
    lean = np.where(steady, 0.5 * (a + b), np.where(builds_up, high, low))
    rich = np.asarray(absorber(lean), dtype=float)
    return LoopState(lean, np.broadcast_to(rich, lean.shape).copy(), steady)


def linear_loop_lean_loading(absorber_slope, absorber_intercept, regenerator_slope, regenerator_intercept, *,
                             purge=0.0, makeup_loading=0.0, lower=0.0, upper=1.0):
    r"""Steady lean loading in closed form when both columns are affine in the entering loading.

    With x_rich = a x_lean + b across the absorber, x_lean,out = c x_rich + d
    across the regenerator and a purge fraction f replaced by make-up at
    x_m, one trip round the loop is affine, g(x) = (1 - f)(c (a x + b) + d) + f x_m,
    and its fixed point is

        x_lean = [(1 - f)(c b + d) + f x_m] / [1 - (1 - f) a c]

    It is a steady state (the loop converges to it) where the loop slope
    (1 - f) a c < 1, and it counts where it lies within [lower, upper].

    Parameters
    ----------
    absorber_slope, absorber_intercept : array_like
        a [-] and b [-] of x_rich = a x_lean + b.
    regenerator_slope, regenerator_intercept : array_like
        c [-] and d [-] of x_lean,out = c x_rich + d.
    purge : array_like
        Purged fraction of the circulating solvent f [-], in [0, 1).
    makeup_loading : array_like
        Loading of the make-up solvent x_m [-], >= 0.
    lower, upper : array_like
        Bounds on the lean loading [-].

    Returns
    -------
    LoopState
        Lean and rich loadings and ``steady``; where there is no steady state
        within the bounds (loop slope >= 1, or the fixed point outside them)
        steady is False and the loadings are those at the bound the loop
        drifts to.

    Source: steady-state solute balance over the loop, derived here: the
    loop map is affine, so its fixed point is the root of a linear equation
    (checked against an iterated simulation in tests/test_solvent_loop.py).

    Examples
    --------
    >>> state = linear_loop_lean_loading(1.0, 0.002, 0.2, 0.0)
    >>> round(float(state.lean_loading), 12), round(float(state.rich_loading), 12)
    (0.0005, 0.0025)
    """
    purge, makeup = _check_purge(purge, makeup_loading)
    a, b, c, d, low, high = (np.asarray(v, dtype=float) for v in (absorber_slope, absorber_intercept,
                                                                  regenerator_slope, regenerator_intercept,
                                                                  lower, upper))
    if np.any(~(low < high)):
        raise ValueError("the lower bound on the lean loading must be below the upper bound")
    keep = 1.0 - purge
    loop_slope = keep * a * c
    loop_intercept = keep * (c * b + d) + purge * makeup
    loop_slope, loop_intercept, low, high, a, b = np.broadcast_arrays(loop_slope, loop_intercept, low, high, a, b)
    converges = loop_slope < 1.0
    with np.errstate(divide="ignore", invalid="ignore"):
        fixed = loop_intercept / np.where(converges, 1.0 - loop_slope, 1.0)
    inside = converges & (fixed >= low) & (fixed <= high)
    # without a steady state inside the bounds, where does the loop go? up if g(upper) > upper
    builds_up = loop_slope * high + loop_intercept > high
    lean = np.where(inside, fixed, np.where(builds_up, high, low))
    return LoopState(lean, a * lean + b, inside)


def kremser_loop_lean_loading(absorption_factor, absorber_stages, gas_in, absorber_k, stripping_factor,
                              regenerator_stages, stripping_gas_in, regenerator_k, *, purge=0.0,
                              makeup_loading=0.0, lower=0.0, upper=1.0):
    r"""Steady lean loading of an absorber and regenerator that are both dilute Kremser cascades.

    Each cascade is affine in its entering liquid (``kremser.absorb``,
    ``kremser.strip``). With phi = ``kremser.fraction_remaining``:

        absorber:     y_out = K_a x_lean + phi_a (y_in - K_a x_lean)
                      x_rich = x_lean + (y_in - y_out) / (A K_a)
                             = [1 - (1 - phi_a) / A] x_lean + (1 - phi_a) y_in / (A K_a)
        regenerator:  x_lean,out = phi_r x_rich + (1 - phi_r) y_s / K_r

    so a = 1 - (1 - phi_a)/A, b = (1 - phi_a) y_in / (A K_a), c = phi_r,
    d = (1 - phi_r) y_s / K_r in :func:`linear_loop_lean_loading`. Since
    1 - phi_a < A for any stages (Kremser), 0 < a <= 1 (a = 1 only without
    absorber stages) and 0 < c <= 1, so the loop converges whenever either
    column has a stage; a regenerator that barely strips (phi_r -> 1) lets
    the lean loading rise towards y_in / K_a, where the absorber stops
    taking the solute up.

    Parameters
    ----------
    absorption_factor : array_like
        A = L / (K_a V) of the absorber for this solute [-], > 0.
    absorber_stages : array_like
        Theoretical stages of the absorber [-], >= 0.
    gas_in : array_like
        Solute mole fraction in the gas entering the absorber y_in [-].
    absorber_k : array_like
        K_a = y / x in the absorber [-], > 0.
    stripping_factor : array_like
        S = K_r V_r / L of the regenerator for this solute [-], > 0.
    regenerator_stages : array_like
        Theoretical stages of the regenerator [-], >= 0.
    stripping_gas_in : array_like
        Solute mole fraction in the stripping gas or vapour entering the
        regenerator y_s [-].
    regenerator_k : array_like
        K_r = y / x in the regenerator [-], > 0.
    purge, makeup_loading, lower, upper : array_like
        As in :func:`linear_loop_lean_loading`.

    Returns
    -------
    LoopState
        Lean and rich loadings [-] and ``steady``.

    Notes
    -----
    Dilute solute (straight equilibrium lines, constant flows), the same
    liquid rate in both columns. Source: Kremser (1930) as in
    ``models.kremser``; the loop closure is a steady-state solute balance.

    Examples
    --------
    A regenerator of one stage with S = 0.05 (phi_r = 0.95 / 0.9975) barely
    strips, so the lean loading builds up close to y_in / K_a = 0.002
    (a = 1 - (62/63)/2, b = (62/63) 0.001, x = c b / (1 - a c)):

    >>> state = kremser_loop_lean_loading(2.0, 5, 0.001, 0.5, 0.05, 1, 0.0, 10.0)
    >>> round(float(state.lean_loading), 8), bool(state.steady)
    (0.00181552, True)
    """
    removed_a = kremser.fraction_removed(absorption_factor, absorber_stages)
    remaining_r = kremser.fraction_remaining(stripping_factor, regenerator_stages)
    removed_r = kremser.fraction_removed(stripping_factor, regenerator_stages)
    factor = np.asarray(absorption_factor, dtype=float)
    k_a = np.asarray(absorber_k, dtype=float)
    k_r = np.asarray(regenerator_k, dtype=float)
    if np.any(~(k_a > 0.0)) or np.any(~(k_r > 0.0)):
        raise ValueError("equilibrium ratios must be > 0")
    slope_a = 1.0 - removed_a / factor
    intercept_a = removed_a * np.asarray(gas_in, dtype=float) / (factor * k_a)
    intercept_r = removed_r * np.asarray(stripping_gas_in, dtype=float) / k_r
    return linear_loop_lean_loading(slope_a, intercept_a, remaining_r, intercept_r, purge=purge,
                                    makeup_loading=makeup_loading, lower=lower, upper=upper)
