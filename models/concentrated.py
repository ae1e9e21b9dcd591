r"""Countercurrent cascades beyond the dilute limit, on the solute-free (mole-ratio) basis.

Once the solute is no longer dilute (see ``equilibrium.dilute_warnings``) the
phase flows change down the column and the equilibrium line bends. Counting
compositions as mole ratios,

    X = x / (1 - x)   mol solute per mol solute-free liquid,
    Y = y / (1 - y)   mol solute per mol solute-free gas,

and flows as the solute-free flows L' (liquid) and G' (gas), which stay
constant when only the solute crosses between the phases, the solute balance
over the top n stages is exact and straight:

    G' (Y_{n+1} - Y_1) = L' (X_n - X_0)                          (operating line)

while y = K x with a constant K becomes the curve of
``equilibrium.gas_ratio_at_equilibrium``:

    Y* = K X / (1 + (1 - K) X).

Stages are numbered from the top: stage 1 is where the liquid enters (X_0)
and the gas leaves (Y_1); stage N is where the gas enters (Y_{N+1}) and the
liquid leaves (X_N). An absorber treats the gas (Y_{N+1} > Y*(X_0)); a
stripper treats the liquid (Y_{N+1} < Y*(X_0)). The same countercurrent
cascade describes both; only which outlet is specified differs.

Three methods live here:

* the Kremser relation with the absorption factor averaged between the
  column ends (Treybal's approach, an approximation):
  :func:`end_absorption_factors`, :func:`averaged_factor`,
  :func:`averaged_absorber_stages`, :func:`averaged_stripper_stages`,
  :func:`averaged_outlets`;
* the exact stage-by-stage solution on the curved line (the oracle):
  :func:`stagewise_outlets`, :func:`stagewise_absorber_stages`,
  :func:`stagewise_stripper_stages`;
* the least solvent and the least stripping gas on the curved line, with
  the pinch at a tangent or at the column end: :func:`minimum_solvent_rate`,
  :func:`minimum_stripping_rate`.

Units: flows are solute-free molar flows [mol/s]; compositions are mole
ratios [mol/mol solute-free phase, -] unless the name says fraction; K is
the mole-fraction equilibrium ratio y / x [-].
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

from towercost.models import kremser
from towercost.models.equilibrium import _gas_ratio_curve, _liquid_ratio_curve
from towercost.models.validity import check_range

__all__ = [
    "AveragedOutlets",
    "EndFactors",
    "MinimumFlow",
    "RatioOutlets",
    "StageCount",
    "averaged_absorber_stages",
    "averaged_factor",
    "averaged_outlets",
    "averaged_stripper_stages",
    "end_absorption_factors",
    "minimum_solvent_rate",
    "minimum_stripping_rate",
    "mole_fraction",
    "mole_ratio",
    "stagewise_absorber_stages",
    "stagewise_outlets",
    "stagewise_stripper_stages",
]

_TREYBAL = "Treybal, Mass-Transfer Operations, 3rd ed. (1980)"
# Ratio of the end factors beyond which the geometric mean is a poor stand-in
# for a factor that varies along the column (common practice).
_FACTOR_SPREAD = (0.5, 2.0)
# Bisection on an outlet ratio: enough halvings to close any bracket in
# [1e-30, 1e3] to adjacent floats; the loop stops once every point has.
_BISECTION_MAX = 200
# Stage-to-stage march when counting stages: a target not reached within this
# many stages is taken as unreachable (a pinch) and given inf stages.
_MAX_STAGES = 1000


class EndFactors(NamedTuple):
    """Absorption factors A = L / (K G) at the two column ends [-] (stripping factor S = 1 / A)."""

    top: np.ndarray
    bottom: np.ndarray


class AveragedOutlets(NamedTuple):
    """Outlets of the averaged-factor cascade: Y_1, X_N [mol/mol] and the averaged A [-]."""

    gas_out: np.ndarray
    liquid_out: np.ndarray
    absorption_factor: np.ndarray


class RatioOutlets(NamedTuple):
    """Outlets of the stage-by-stage cascade: gas leaving the top Y_1, liquid leaving the bottom X_N [mol/mol]."""

    gas_out: np.ndarray
    liquid_out: np.ndarray


class StageCount(NamedTuple):
    """Stages to reach a target on the curved line.

    ``stages`` [-] is real, the last step counted by the part of it needed
    (along the operating line, the same fraction in X as in Y);
    ``whole_stages`` [-] is the whole number of equilibrium stages that
    reach the target. Both are inf where the target lies beyond a pinch.
    """

    stages: np.ndarray
    whole_stages: np.ndarray


class MinimumFlow(NamedTuple):
    """Least solvent (absorber) or stripping gas (stripper) with unlimited stages.

    rate [mol/s] solute-free; liquid_out X_N and gas_out Y_1 [mol/mol] at that
    rate; pinch_liquid, pinch_gas [mol/mol] the point where the operating line
    touches the equilibrium curve; tangent [bool] True where that point is a
    tangent inside the column rather than the column end.
    """

    rate: np.ndarray
    liquid_out: np.ndarray
    gas_out: np.ndarray
    pinch_liquid: np.ndarray
    pinch_gas: np.ndarray
    tangent: np.ndarray


# ---------------------------------------------------------------------------
# helpers
# ---------------------------------------------------------------------------


def _flat(*values):
    """Broadcast to flat float arrays and the common shape."""
    arrays = [np.asarray(v, dtype=float) for v in values]
    shape = np.broadcast_shapes(*(a.shape for a in arrays))
    return [np.array(np.broadcast_to(a, shape), dtype=float).reshape(-1) for a in arrays], shape


def _check_positive(name, values, unit="mol/s"):
    bad = ~(values > 0.0)
    if np.any(bad):
        raise ValueError(f"{name} must be > 0 {unit}, got {values[bad][0]:.6g}")


def _check_ratio(name, values):
    bad = ~(values >= 0.0) | ~np.isfinite(values)
    if np.any(bad):
        raise ValueError(f"the {name} mole ratio must be finite and >= 0, got {values[bad][0]:.6g}")


def mole_ratio(fraction):
    r"""Mole ratio of a solute from its mole fraction.

        X = x / (1 - x)

    Parameters
    ----------
    fraction : array_like
        Solute mole fraction x [-], in [0, 1).

    Returns
    -------
    ndarray
        X [mol solute / mol solute-free phase].

    Source: Treybal, Mass-Transfer Operations, 3rd ed. (1980), Chapter 8
    (solute-free basis; value from memory for the section).

    Examples
    --------
    >>> round(float(mole_ratio(0.02)), 12)
    0.020408163265
    """
    fraction = np.asarray(fraction, dtype=float)
    if np.any(~((fraction >= 0.0) & (fraction < 1.0))):
        raise ValueError("a mole fraction must lie in [0, 1) to have a mole ratio")
    return fraction / (1.0 - fraction)


def mole_fraction(ratio):
    r"""Mole fraction of a solute from its mole ratio.

        x = X / (1 + X)

    Parameters
    ----------
    ratio : array_like
        Mole ratio X [mol solute / mol solute-free phase], >= 0.

    Returns
    -------
    ndarray
        x [-], in [0, 1).

    Source: as :func:`mole_ratio`.

    Examples
    --------
    >>> round(float(mole_fraction(0.25)), 12)
    0.2
    """
    ratio = np.asarray(ratio, dtype=float)
    if np.any(~(ratio >= 0.0)):
        raise ValueError("a mole ratio must be >= 0")
    return ratio / (1.0 + ratio)


# ---------------------------------------------------------------------------
# the averaged-factor Kremser relation
# ---------------------------------------------------------------------------


def end_absorption_factors(liquid_rate, gas_rate, k_value, liquid_in, gas_out, liquid_out, gas_in):
    r"""Absorption factors at the top and bottom of a column, from the total flows there.

        A_top    = L_0 / (K G_1)     = L' (1 + X_0) / (K G' (1 + Y_1))
        A_bottom = L_N / (K G_{N+1}) = L' (1 + X_N) / (K G' (1 + Y_{N+1}))

    The stripping factors are S = 1 / A at each end.

    Parameters
    ----------
    liquid_rate, gas_rate : array_like
        Solute-free liquid L' and gas G' flows [mol/s], > 0.
    k_value : array_like
        Equilibrium ratio K = y / x [-], > 0.
    liquid_in, gas_out : array_like
        Liquid entering X_0 and gas leaving Y_1 at the top [mol/mol].
    liquid_out, gas_in : array_like
        Liquid leaving X_N and gas entering Y_{N+1} at the bottom [mol/mol].

    Returns
    -------
    EndFactors
        (top, bottom) [-].

    Source: Treybal, Mass-Transfer Operations, 3rd ed. (1980), Section 5
    (Kremser equations for varying A, with Eqs. 5.54 and 5.55), as applied
    in Illustration 8.3.

    Examples
    --------
    >>> ends = end_absorption_factors(1.0, 1.0, 0.5, 0.0, 0.01, 0.2, 0.21)
    >>> round(float(ends.top), 6), round(float(ends.bottom), 6)
    (1.980198, 1.983471)
    """
    (l_rate, g_rate, k, x0, y1, xn, yn1), shape = _flat(liquid_rate, gas_rate, k_value, liquid_in, gas_out,
                                                        liquid_out, gas_in)
    _check_positive("the solute-free liquid rate", l_rate)
    _check_positive("the solute-free gas rate", g_rate)
    _check_positive("the equilibrium ratio K", k, "")
    top = l_rate * (1.0 + x0) / (k * g_rate * (1.0 + y1))
    bottom = l_rate * (1.0 + xn) / (k * g_rate * (1.0 + yn1))
    return EndFactors(top.reshape(shape), bottom.reshape(shape))


def averaged_factor(top, bottom, *, warnings: list[str] | None = None):
    r"""One absorption (or stripping) factor for a column whose factor varies: the geometric mean.

        A = (A_top A_bottom)**0.5

    The same mean of the stripping factors is 1 / A, so an absorber and a
    stripper solved with averaged factors agree.

    Parameters
    ----------
    top, bottom : array_like
        The factor at the two column ends [-], > 0.
    warnings : list of str, optional
        Receives a message where the end factors differ by more than a
        factor of two (common practice: beyond it solve stage by stage).

    Returns
    -------
    ndarray
        A [-]; exactly the end value where both ends are equal.

    Source: Treybal, Mass-Transfer Operations, 3rd ed. (1980), Section 5,
    with Eqs. 5.54 and 5.55 (value from memory for the placement of the
    averaging in the text); Illustration 8.3 uses it.

    Examples
    --------
    >>> float(averaged_factor(1.2, 1.2))
    1.2
    >>> round(float(averaged_factor(1.0, 4.0)), 12)
    2.0
    """
    top = np.asarray(top, dtype=float)
    bottom = np.asarray(bottom, dtype=float)
    if np.any(~(top > 0.0)) or np.any(~(bottom > 0.0)):
        raise ValueError("absorption or stripping factors must be > 0")
    check_range("ratio of the bottom to the top absorption factor", bottom / top, *_FACTOR_SPREAD, "-",
                "one averaged factor (common practice: solve stage by stage beyond it)", warnings)
    return np.sqrt(top * bottom)


def _fraction_stages(fraction, factor, strict):
    """kremser.stages_for_fraction with fractions outside (0, 1) treated as unreachable (inf) or done (0)."""
    done = fraction >= 1.0
    beyond = ~(fraction > 0.0)
    if strict and beyond.any():
        i = int(np.flatnonzero(beyond)[0])
        raise kremser.UnreachableTarget(
            f"the target is unreachable: it asks for the treated stream to leave at or past equilibrium with "
            f"the entering agent (fraction of driving force remaining {fraction[i]:.6g})", 0.0)
    inside = ~done & ~beyond
    stages = np.where(done, 0.0, np.inf)
    if inside.any():
        stages[inside] = kremser.stages_for_fraction(fraction[inside], factor[inside], strict=strict)
    return stages


def averaged_absorber_stages(liquid_rate, gas_rate, k_value, gas_in, gas_out, liquid_in=0.0, *, strict=True,
                             warnings: list[str] | None = None):
    r"""Theoretical stages of an absorber by the Kremser relation with an averaged absorption factor.

    Solute balance on the solute-free basis for the rich outlet,
    X_N = X_0 + G' (Y_{N+1} - Y_1) / L'; end factors from
    :func:`end_absorption_factors`; A = (A_top A_bottom)**0.5; then in mole
    fractions (Treybal Eq. 5.55):

        N = ln[ (y_{N+1} - K x_0) / (y_1 - K x_0) (1 - 1/A) + 1/A ] / ln A

    evaluated through ``kremser.stages_for_fraction`` with
    phi = (y_1 - K x_0) / (y_{N+1} - K x_0).

    Parameters
    ----------
    liquid_rate, gas_rate : array_like
        Solute-free solvent L' and carrier-gas G' flows [mol/s], > 0.
    k_value : array_like
        Equilibrium ratio K = y / x [-], > 0.
    gas_in, gas_out : array_like
        Gas entering Y_{N+1} and the specified gas leaving Y_1 [mol/mol].
    liquid_in : array_like
        Solvent entering X_0 [mol/mol], >= 0.
    strict : bool
        Raise ``kremser.UnreachableTarget`` where the averaged cascade cannot
        reach the target; if False, return inf there.
    warnings : list of str, optional
        Receives a message where the end factors differ by more than 2:1.

    Returns
    -------
    ndarray
        N [-], real.

    Notes
    -----
    An approximation: it treats the cascade as if its factor were the mean
    everywhere and the operating line straight in mole fractions. Against
    the exact stage-by-stage count (:func:`stagewise_absorber_stages`) it
    was 0.03 stage high on Treybal's wash-oil absorber; on outlets its error
    grows with the solute level (tests/test_concentrated.py, measured: up
    to 0.7 % of the driving force with every stream below 2 mol %, 4 %
    below 10 mol %, 14 % below 30 mol %). In the dilute limit
    (ratios below about 1e-17, where 1 + X rounds to 1) both end factors are
    L' / (K G') and the result is exactly ``kremser.stages_for_fraction``.

    Source: Treybal, Mass-Transfer Operations, 3rd ed. (1980), Eq. 5.55 and
    Illustration 8.3.

    Examples
    --------
    >>> round(float(averaged_absorber_stages(1.0, 1.0, 0.5, 1e-20, 1e-21)), 9)     # dilute: A = 2
    2.459431619
    """
    (l_rate, g_rate, k, y_in, y_out, x_in), shape = _flat(liquid_rate, gas_rate, k_value, gas_in, gas_out,
                                                          liquid_in)
    for name, v in (("gas inlet", y_in), ("gas outlet", y_out), ("solvent inlet", x_in)):
        _check_ratio(name, v)
    x_out = x_in + g_rate * (y_in - y_out) / np.where(l_rate > 0.0, l_rate, 1.0)
    ends = end_absorption_factors(l_rate, g_rate, k, x_in, y_out, x_out, y_in)
    factor = averaged_factor(ends.top, ends.bottom, warnings=warnings)
    frac_in, frac_out, frac_x = (v / (1.0 + v) for v in (y_in, y_out, x_in))
    equilibrium = k * frac_x
    with np.errstate(divide="ignore", invalid="ignore"):
        fraction = (frac_out - equilibrium) / (frac_in - equilibrium)
    fraction = np.where(frac_in > equilibrium, fraction, 0.0)
    return _fraction_stages(fraction, factor, strict).reshape(shape)


def averaged_stripper_stages(liquid_rate, gas_rate, k_value, liquid_in, liquid_out, gas_in=0.0, *, strict=True,
                             warnings: list[str] | None = None):
    r"""Theoretical stages of a stripper by the Kremser relation with an averaged stripping factor.

    Y_1 = Y_{N+1} + L' (X_0 - X_N) / G'; S at each end is 1 / A of
    :func:`end_absorption_factors`; S = (S_top S_bottom)**0.5; then in mole
    fractions

        N = ln[ (x_0 - y_{N+1}/K) / (x_N - y_{N+1}/K) (1 - 1/S) + 1/S ] / ln S

    through ``kremser.stages_for_fraction`` with
    phi = (x_N - y_{N+1}/K) / (x_0 - y_{N+1}/K).

    Parameters
    ----------
    liquid_rate, gas_rate : array_like
        Solute-free liquid L' and stripping-gas G' flows [mol/s], > 0.
    k_value : array_like
        Equilibrium ratio K = y / x [-], > 0.
    liquid_in, liquid_out : array_like
        Liquid entering X_0 and the specified liquid leaving X_N [mol/mol].
    gas_in : array_like
        Stripping gas entering Y_{N+1} [mol/mol], >= 0.
    strict : bool
        As in :func:`averaged_absorber_stages`.
    warnings : list of str, optional
        Receives a message where the end factors differ by more than 2:1.

    Returns
    -------
    ndarray
        N [-], real.

    Notes
    -----
    With geometric means S = 1 / A. On Treybal's steam stripper the end
    factors differ by about 17 % and the averaged count is 0.04 stage below
    the exact one (tests/test_concentrated.py).

    Source: Treybal, Mass-Transfer Operations, 3rd ed. (1980), Section 5
    (stripping form of the Kremser equations; equation number from memory)
    and Illustration 8.3.

    Examples
    --------
    >>> round(float(averaged_stripper_stages(1.0, 1.0, 2.0, 1e-20, 1e-21)), 9)     # dilute: S = 2
    2.459431619
    """
    (l_rate, g_rate, k, x_in, x_out, y_in), shape = _flat(liquid_rate, gas_rate, k_value, liquid_in, liquid_out,
                                                          gas_in)
    for name, v in (("liquid inlet", x_in), ("liquid outlet", x_out), ("stripping gas inlet", y_in)):
        _check_ratio(name, v)
    y_out = y_in + l_rate * (x_in - x_out) / np.where(g_rate > 0.0, g_rate, 1.0)
    ends = end_absorption_factors(l_rate, g_rate, k, x_in, y_out, x_out, y_in)
    factor = averaged_factor(1.0 / ends.top, 1.0 / ends.bottom, warnings=warnings)
    frac_in, frac_out, frac_y = (v / (1.0 + v) for v in (x_in, x_out, y_in))
    equilibrium = frac_y / k
    with np.errstate(divide="ignore", invalid="ignore"):
        fraction = (frac_out - equilibrium) / (frac_in - equilibrium)
    fraction = np.where(frac_in > equilibrium, fraction, 0.0)
    return _fraction_stages(fraction, factor, strict).reshape(shape)


def _bracket(k, x_in, y_in):
    """The interval holding the top gas outlet Y_1: between Y_{N+1} and Y*(X_0).

    Rejects inlets no equilibrium stage can handle: a liquid with K x >= 1 or
    a gas with y >= K when K < 1 (either needs the other phase past pure solute).
    """
    y_eq = _gas_ratio_curve(x_in, k)
    if np.any(~np.isfinite(y_eq)):
        raise ValueError("the entering liquid has K x >= 1: its equilibrium gas would be pure solute")
    if np.any(~np.isfinite(_liquid_ratio_curve(y_in, k))):
        raise ValueError("the entering gas has y >= K: no liquid can be in equilibrium with it (the solute "
                         "would condense)")
    return np.minimum(y_eq, y_in), np.maximum(y_eq, y_in), y_eq


def _bisect(residual, low, high):
    """Vectorized bisection for an increasing residual with residual(low) <= 0 <= residual(high)."""
    low = low.copy()
    high = high.copy()
    for _ in range(_BISECTION_MAX):
        middle = 0.5 * (low + high)
        open_ = (middle > low) & (middle < high)
        if not open_.any():
            break
        upper = residual(middle) > 0.0
        high = np.where(open_ & upper, middle, high)
        low = np.where(open_ & ~upper, middle, low)
    return 0.5 * (low + high)


def averaged_outlets(liquid_rate, gas_rate, k_value, liquid_in, gas_in, stages):
    r"""Outlets of a cascade of N stages by the Kremser relation with an averaged factor.

    The treated stream's outlet comes from the Kremser relation in mole
    fractions, with the factor averaged between the column ends
    (:func:`end_absorption_factors`, :func:`averaged_factor`), and the other
    outlet from the exact solute balance on the solute-free basis,
    G' (Y_{N+1} - Y_1) = L' (X_N - X_0):

    * absorber (Y_{N+1} > Y*(X_0), the gas is treated; Treybal Eq. 5.54):
      y_1 = K x_0 + phi(A, N) (y_{N+1} - K x_0);
    * stripper (the liquid is treated): x_N = y_{N+1}/K + phi(S, N) (x_0 - y_{N+1}/K),

    with phi = ``kremser.fraction_remaining``. The end factors depend on the
    unknown outlet, which is found by bisection between the inlet and its
    equilibrium value.

    Parameters
    ----------
    liquid_rate, gas_rate : array_like
        Solute-free liquid L' and gas G' flows [mol/s], > 0.
    k_value : array_like
        Equilibrium ratio K = y / x [-], > 0.
    liquid_in, gas_in : array_like
        Liquid entering the top X_0 and gas entering the bottom Y_{N+1}
        [mol/mol], >= 0.
    stages : array_like
        Theoretical stages N [-], >= 0, need not be whole.

    Returns
    -------
    AveragedOutlets
        gas_out Y_1, liquid_out X_N [mol/mol] (the solute balance closes),
        and the averaged absorption factor A [-] (stripping factor 1 / A).

    Notes
    -----
    The treated outlet returned is the Kremser value at the converged
    factor, so in the dilute limit (constant factor) it is exactly the
    dilute Kremser outlet. The stripper uses the stripping form because the
    absorption form, combined with the mole-ratio balance, can predict more
    solute leaving than enters when stripping is nearly complete.

    Source: Treybal, Mass-Transfer Operations, 3rd ed. (1980), Eq. 5.54 and
    its stripping counterpart, with the averaged factor of Illustration 8.3.

    Examples
    --------
    >>> out = averaged_outlets(1.0, 1.0, 0.5, 0.0, 7e-20, 2)     # dilute: A = 2, phi = 1/7
    >>> round(float(out.gas_out) * 1e20, 9), round(float(out.absorption_factor), 12)
    (1.0, 2.0)
    """
    (l_rate, g_rate, k, x_in, y_in, n), shape = _flat(liquid_rate, gas_rate, k_value, liquid_in, gas_in, stages)
    _check_positive("the solute-free liquid rate", l_rate)
    _check_positive("the solute-free gas rate", g_rate)
    _check_positive("the equilibrium ratio K", k, "")
    _check_ratio("liquid inlet", x_in)
    _check_ratio("gas inlet", y_in)
    if np.any(~(n >= 0.0)):
        raise ValueError("the number of stages must be >= 0")
    _, _, y_eq = _bracket(k, x_in, y_in)
    x_eq = _liquid_ratio_curve(y_in, k)
    slope = l_rate / g_rate
    frac_x, frac_y = x_in / (1.0 + x_in), y_in / (1.0 + y_in)
    gas_out = np.empty_like(y_in)
    liquid_out = np.empty_like(x_in)
    factor = np.empty_like(k)

    absorbing = y_in > y_eq
    if absorbing.any():
        i = absorbing
        sl, kk, xi, yi, nn, fx, fy = slope[i], k[i], x_in[i], y_in[i], n[i], frac_x[i], frac_y[i]
        rich_limit = x_eq[i]

        def predicted_gas(gas):
            rich = np.minimum(xi + (yi - gas) / sl, rich_limit)
            a = np.sqrt(sl * (1.0 + xi) / (kk * (1.0 + gas)) * sl * (1.0 + rich) / (kk * (1.0 + yi)))
            out = kk * fx + kremser.fraction_remaining(a, nn) * (fy - kk * fx)
            return out / (1.0 - out), a

        gas = _bisect(lambda g: g - predicted_gas(g)[0], y_eq[i], yi)
        gas, a = predicted_gas(gas)
        gas_out[i], liquid_out[i], factor[i] = gas, xi + (yi - gas) / sl, a

    stripping = ~absorbing
    if stripping.any():
        i = stripping
        sl, kk, xi, yi, nn, fx, fy = slope[i], k[i], x_in[i], y_in[i], n[i], frac_x[i], frac_y[i]
        rich_limit = y_eq[i]

        def predicted_liquid(liquid):
            top_gas = np.minimum(yi + sl * (xi - liquid), rich_limit)
            a = np.sqrt(sl * (1.0 + xi) / (kk * (1.0 + top_gas)) * sl * (1.0 + liquid) / (kk * (1.0 + yi)))
            equilibrium = (1.0 / kk) * fy
            out = equilibrium + kremser.fraction_remaining(1.0 / a, nn) * (fx - equilibrium)
            return out / (1.0 - out), a

        liquid = _bisect(lambda x: x - predicted_liquid(x)[0], x_eq[i], xi)
        liquid, a = predicted_liquid(liquid)
        gas_out[i], liquid_out[i], factor[i] = yi + sl * (xi - liquid), liquid, a
    return AveragedOutlets(gas_out.reshape(shape), liquid_out.reshape(shape), factor.reshape(shape))


# ---------------------------------------------------------------------------
# stage by stage on the curved equilibrium line (the oracle)
# ---------------------------------------------------------------------------


def _march(forward, gain, near_in, start, stages, passed_sign, far_in, max_stages):
    """March a cascade from one end: s_1 = start, t_n = forward(s_n), s_{n+1} = start + gain (t_n - near_in).

    From the top: s = Y (Y_1 = start), t = X, forward = X*, gain = L'/G', near_in = X_0;
    from the bottom: s = X (X_N = start), t = Y, forward = Y*, gain = G'/L', near_in = Y_{N+1}.
    Returns (s after ``stages`` steps, t of the last step). The s sequence is
    monotone; once it passes ``far_in`` it cannot come back, so such points
    are frozen (their last value keeps the right sign against far_in).
    """
    s = start.copy()
    t = near_in.copy()
    frozen = np.zeros(s.shape, dtype=bool)
    for n in range(1, max_stages + 1):
        active = (n <= stages) & ~frozen
        if not active.any():
            break
        t_n = forward(np.where(active, s, 0.0))
        t = np.where(active, t_n, t)
        s = np.where(active, start + gain * (t_n - near_in), s)
        frozen |= active & (((passed_sign > 0.0) & (s > far_in)) | ((passed_sign < 0.0) & (s < far_in)))
    return s, t


def _top_down_is_stable(slope, k, x_in, y_in):
    """True where the march from the top damps errors: the stage-to-stage gain L' / (G' dY*/dX) < 1.

    Marching down multiplies an error by A_local = (L'/G') / Y*'(X) per stage,
    marching up by its inverse; the geometric mean of the two column ends
    (at X_0 and at X*(Y_{N+1})) decides.
    """
    def curve_slope(x):
        return k / (1.0 + (1.0 - k) * x) ** 2

    return slope * slope < curve_slope(x_in) * curve_slope(_liquid_ratio_curve(y_in, k))


def _curves(k):
    return (lambda gas: _liquid_ratio_curve(gas, k)), (lambda liquid: _gas_ratio_curve(liquid, k))


def _shoot(forward, inverse, gain, near_in, far_in, stages):
    """The near-end outlet s_1 for which the march ends at far_in, by bisection; and the far-end outlet t_N."""
    equilibrium = inverse(near_in)
    low, high = np.minimum(equilibrium, far_in), np.maximum(equilibrium, far_in)
    passed_sign = np.where(equilibrium < far_in, 1.0, -1.0)
    max_stages = int(stages.max()) if stages.size else 0

    def residual(start):
        return _march(forward, gain, near_in, start, stages, passed_sign, far_in, max_stages)[0] - far_in

    start = _bisect(residual, low, high)
    _, far_out = _march(forward, gain, near_in, start, stages, np.zeros_like(passed_sign), far_in, max_stages)
    return start, far_out


def stagewise_outlets(liquid_rate, gas_rate, k_value, liquid_in, gas_in, stages):
    r"""Exact outlets of N equilibrium stages on the curved mole-ratio equilibrium line.

    Each stage puts its leaving streams in equilibrium, X_n = X*(Y_n)
    (:func:`equilibrium.liquid_ratio_at_equilibrium`), and the solute balance
    over the top n stages links the streams between stages:

        Y_{n+1} = Y_1 + (L' / G') (X_n - X_0)

    The cascade is shot from one end: from a trial outlet there the stages
    are marched to the other end, where the march must meet the entering
    stream; the trial outlet is found by bisection to the last bit (the
    march's far end is monotone in it). The march runs from the end that
    damps rounding errors: downwards from Y_1 where the stage-to-stage gain
    (L'/G') / (dY*/dX) is below 1 (strippers, mostly), upwards from X_N,

        X_{n-1} = X_N - (G' / L') (Y_{N+1} - Y*(X_n)),

    where it is above 1 (absorbers, mostly). Absorbers and strippers alike.

    Parameters
    ----------
    liquid_rate, gas_rate : array_like
        Solute-free liquid L' and gas G' flows [mol/s], > 0.
    k_value : array_like
        Equilibrium ratio K = y / x in mole fractions [-], > 0.
    liquid_in, gas_in : array_like
        Liquid entering the top X_0 and gas entering the bottom Y_{N+1}
        [mol/mol], >= 0; K x_0 < 1 and, for K < 1, y_{N+1} < K.
    stages : array_like
        Whole number of equilibrium stages N [-], >= 0.

    Returns
    -------
    RatioOutlets
        gas_out Y_1, liquid_out X_N [mol/mol]. The outlet at the far end of
        the march is the stage's equilibrium value, so the overall solute
        balance G' (Y_{N+1} - Y_1) = L' (X_N - X_0) is a check of the
        solution, not an input.

    Notes
    -----
    Exact for equilibrium stages with constant K, a non-volatile solvent and
    an insoluble carrier (constant L', G'). Cost: about 60 to 200 marches of
    N stages, vectorized over the design points.

    Source: Treybal, Mass-Transfer Operations, 3rd ed. (1980), Chapter 8,
    the stage-to-stage construction of Illustration 8.2 done numerically.

    Examples
    --------
    One stage, K = 1 (straight line Y* = X): Y_1 = X_1 and Y_2 = Y_1 + X_1, so
    Y_1 = Y_2 / 2:

    >>> out = stagewise_outlets(1.0, 1.0, 1.0, 0.0, 0.1, 1)
    >>> round(float(out.gas_out), 12), round(float(out.liquid_out), 12)
    (0.05, 0.05)
    """
    (l_rate, g_rate, k, x_in, y_in, n), shape = _flat(liquid_rate, gas_rate, k_value, liquid_in, gas_in, stages)
    _check_positive("the solute-free liquid rate", l_rate)
    _check_positive("the solute-free gas rate", g_rate)
    _check_positive("the equilibrium ratio K", k, "")
    _check_ratio("liquid inlet", x_in)
    _check_ratio("gas inlet", y_in)
    if np.any(~(n >= 0.0)) or np.any(n != np.round(n)):
        raise ValueError("the stage-by-stage solution needs a whole number of stages >= 0")
    _bracket(k, x_in, y_in)
    slope = l_rate / g_rate
    down = _top_down_is_stable(slope, k, x_in, y_in)
    gas_out = np.empty_like(y_in)
    liquid_out = np.empty_like(x_in)
    for chosen, from_top in ((down, True), (~down, False)):
        if not chosen.any():
            continue
        kk, sl = k[chosen], slope[chosen]
        to_liquid, to_gas = _curves(kk)
        if from_top:
            top_gas, bottom_liquid = _shoot(to_liquid, to_gas, sl, x_in[chosen], y_in[chosen], n[chosen])
        else:
            bottom_liquid, top_gas = _shoot(to_gas, to_liquid, 1.0 / sl, y_in[chosen], x_in[chosen], n[chosen])
        gas_out[chosen], liquid_out[chosen] = top_gas, bottom_liquid
    # no stage: nothing crosses
    gas_out = np.where(n == 0.0, y_in, gas_out)
    liquid_out = np.where(n == 0.0, x_in, liquid_out)
    return RatioOutlets(gas_out.reshape(shape), liquid_out.reshape(shape))


def _count(forward, gain, near_in, start, target, max_stages):
    """Stages marched from ``start`` until t_n passes ``target``: (real, whole), inf past a pinch.

    t_n = forward(s_n), s_{n+1} = start + gain (t_n - near_in), t_0 = near_in;
    the last step counts by the part of it used, (target - t_{n-1}) / (t_n - t_{n-1}).
    """
    direction = np.sign(target - near_in)
    stages = np.where(direction == 0.0, 0.0, np.inf)
    whole = stages.copy()
    pending = direction != 0.0
    s = start.copy()
    previous = near_in.copy()
    for n in range(1, max_stages + 1):
        if not pending.any():
            break
        t = forward(np.where(pending, s, 0.0))
        reached = pending & ((t - target) * direction >= 0.0)
        stuck = pending & ~reached & ((t - previous) * direction <= 0.0)
        if reached.any():
            step = t[reached] - previous[reached]
            stages[reached] = (n - 1) + (target[reached] - previous[reached]) / step
            whole[reached] = n
        pending &= ~(reached | stuck)
        s = np.where(pending, start + gain * (t - near_in), s)
        previous = np.where(pending, t, previous)
    return stages, whole


def _stagewise_count(slope, k, x_in, gas_out, liquid_out, max_stages):
    """Stages between fully specified terminals, stepped off from the top.

    With the top outlet given, the march from the top is well conditioned for
    a count even where it amplifies errors (the distance from a pinch grows
    at the same rate), so one direction serves absorbers and strippers.
    """
    to_liquid, _ = _curves(k)
    return _count(to_liquid, slope, x_in, gas_out, liquid_out, max_stages)


def stagewise_absorber_stages(liquid_rate, gas_rate, k_value, gas_in, gas_out, liquid_in=0.0, *,
                              max_stages: int = _MAX_STAGES):
    r"""Equilibrium stages an absorber needs on the curved line, stepped off stage by stage.

    With Y_1 the specified treated gas, the rich outlet follows from the
    balance, X_N = X_0 + G' (Y_{N+1} - Y_1) / L'. Stages are stepped from
    the top, X_n = X*(Y_n), Y_{n+1} = Y_1 + (L'/G') (X_n - X_0), until X_n
    reaches X_N; the last step counts by the part of it used.

    Parameters
    ----------
    liquid_rate, gas_rate : array_like
        Solute-free solvent L' and carrier-gas G' flows [mol/s], > 0.
    k_value : array_like
        Equilibrium ratio K = y / x [-], > 0.
    gas_in, gas_out : array_like
        Gas entering Y_{N+1} and the specified gas leaving Y_1 [mol/mol].
    liquid_in : array_like
        Solvent entering X_0 [mol/mol], >= 0.
    max_stages : int
        Stages beyond which the target counts as unreachable (inf).

    Returns
    -------
    StageCount
        stages (real, the last step counted by the part of it used, along
        the operating line) and whole_stages [-]; inf beyond a pinch.

    Source: Treybal, Mass-Transfer Operations, 3rd ed. (1980), Chapter 8,
    Illustration 8.2 (graphical stepping), done numerically.

    Examples
    --------
    K = 1, L' = G': each stage adds Y_1 to the gas, so Y_{N+1} = (N + 1) Y_1:

    >>> count = stagewise_absorber_stages(1.0, 1.0, 1.0, 0.04, 0.01)
    >>> round(float(count.stages), 12), float(count.whole_stages)
    (3.0, 3.0)
    """
    (l_rate, g_rate, k, y_in, y_out, x_in), shape = _flat(liquid_rate, gas_rate, k_value, gas_in, gas_out,
                                                          liquid_in)
    _check_positive("the solute-free liquid rate", l_rate)
    _check_positive("the solute-free gas rate", g_rate)
    _check_positive("the equilibrium ratio K", k, "")
    for name, v in (("gas inlet", y_in), ("gas outlet", y_out), ("solvent inlet", x_in)):
        _check_ratio(name, v)
    if np.any(y_out > y_in):
        raise ValueError("an absorber's treated gas must leave leaner than it enters (gas_out <= gas_in)")
    _bracket(k, x_in, y_in)
    slope = l_rate / g_rate
    x_out = x_in + (y_in - y_out) / slope
    stages, whole = _stagewise_count(slope, k, x_in, y_out, x_out, max_stages)
    return StageCount(stages.reshape(shape), whole.reshape(shape))


def stagewise_stripper_stages(liquid_rate, gas_rate, k_value, liquid_in, liquid_out, gas_in=0.0, *,
                              max_stages: int = _MAX_STAGES):
    r"""Equilibrium stages a stripper needs on the curved line, stepped off stage by stage.

    The gas leaving the top follows from the balance,
    Y_1 = Y_{N+1} + L' (X_0 - X_N) / G'; stages are stepped from the top as
    in :func:`stagewise_absorber_stages` until X_n falls to X_N.

    Parameters
    ----------
    liquid_rate, gas_rate : array_like
        Solute-free liquid L' and stripping-gas G' flows [mol/s], > 0.
    k_value : array_like
        Equilibrium ratio K = y / x [-], > 0.
    liquid_in, liquid_out : array_like
        Liquid entering X_0 and the specified liquid leaving X_N [mol/mol].
    gas_in : array_like
        Stripping gas entering Y_{N+1} [mol/mol], >= 0.
    max_stages : int
        Stages beyond which the target counts as unreachable (inf).

    Returns
    -------
    StageCount
        stages (real) and whole_stages [-].

    Source: Treybal, Mass-Transfer Operations, 3rd ed. (1980), Chapter 8,
    Illustration 8.2 (stripping section), done numerically.

    Examples
    --------
    >>> count = stagewise_stripper_stages(1.0, 1.0, 1.0, 0.04, 0.01)
    >>> round(float(count.stages), 12), float(count.whole_stages)
    (3.0, 3.0)
    """
    (l_rate, g_rate, k, x_in, x_out, y_in), shape = _flat(liquid_rate, gas_rate, k_value, liquid_in, liquid_out,
                                                          gas_in)
    _check_positive("the solute-free liquid rate", l_rate)
    _check_positive("the solute-free gas rate", g_rate)
    _check_positive("the equilibrium ratio K", k, "")
    for name, v in (("liquid inlet", x_in), ("liquid outlet", x_out), ("stripping gas inlet", y_in)):
        _check_ratio(name, v)
    if np.any(x_out > x_in):
        raise ValueError("a stripper's treated liquid must leave leaner than it enters (liquid_out <= liquid_in)")
    _bracket(k, x_in, y_in)
    slope = l_rate / g_rate
    y_out = y_in + slope * (x_in - x_out)
    stages, whole = _stagewise_count(slope, k, x_in, y_out, x_out, max_stages)
    return StageCount(stages.reshape(shape), whole.reshape(shape))


# ---------------------------------------------------------------------------
# minimum flows on the curved line
# ---------------------------------------------------------------------------


def _tangent_point(k, liquid, gas):
    r"""Liquid ratio where a line through (X_p, Y_p) touches Y* = K X / (1 + c X), c = 1 - K.

    Tangency Y*'(X) (X - X_p) = Y*(X) - Y_p is the quadratic
    c (K - c Y_p) X**2 - 2 c Y_p X + (K X_p - Y_p) = 0, whose root on the far
    side of X_p is

        X_t = (|c| Y_p + D**0.5) / (|c| (K - c Y_p)),
        D = c K (1 + c X_p) (Y_p - Y*(X_p)).

    inf where no such tangent exists (c = 0, D < 0 or K - c Y_p <= 0).
    """
    c = 1.0 - k
    discriminant = c * k * (1.0 + c * liquid) * (gas - _gas_ratio_curve(liquid, k))
    denominator = np.abs(c) * (k - c * gas)
    exists = (c != 0.0) & (discriminant >= 0.0) & (denominator > 0.0)
    root = np.sqrt(np.where(exists, discriminant, 0.0))
    return np.where(exists, (np.abs(c) * gas + root) / np.where(exists, denominator, 1.0), np.inf)


def _chord_slope(k, liquid_from, gas_from, liquid_to):
    """Slope of the line from (X_p, Y_p) to the curve point at X (finite X only)."""
    return (_gas_ratio_curve(liquid_to, k) - gas_from) / (liquid_to - liquid_from)


def minimum_solvent_rate(gas_rate, k_value, gas_in, gas_out, liquid_in=0.0, *, strict=True):
    r"""Least solute-free solvent rate of an absorber on the curved equilibrium line.

    The operating line runs from the top point (X_0, Y_1) with slope L'/G'
    and must stay above Y*(X) up to the rich end. Its least slope is the
    largest chord slope (Y*(X) - Y_1) / (X - X_0) over the column: for a
    curve that bends down (K < 1) it can be a tangent inside the column,
    whose touching point is the root of a quadratic,

        c (K - c Y_1) X**2 - 2 c Y_1 X + (K X_0 - Y_1) = 0,    c = 1 - K,

    otherwise the line pinches at the rich end,
    X_N = X*(Y_{N+1}):

        L'_min = G' max[ (Y_{N+1} - Y_1) / (X*(Y_{N+1}) - X_0),  slope at the tangent if inside ]

    Parameters
    ----------
    gas_rate : array_like
        Solute-free carrier gas G' [mol/s], > 0.
    k_value : array_like
        Equilibrium ratio K = y / x [-], > 0.
    gas_in, gas_out : array_like
        Gas entering Y_{N+1} and the specified gas leaving Y_1 [mol/mol].
    liquid_in : array_like
        Solvent entering X_0 [mol/mol], >= 0.
    strict : bool
        Raise ``kremser.UnreachableTarget`` where Y_1 <= Y*(X_0) (leaner than
        the gas in equilibrium with the entering solvent); if False, return
        inf there.

    Returns
    -------
    MinimumFlow
        rate L'_min [mol/s], liquid_out X_N at L'_min, gas_out Y_1, the pinch
        point and whether it is a tangent; with ``strict=False`` an
        unreachable target gives rate inf and liquid_out NaN.

    Source: Treybal, Mass-Transfer Operations, 3rd ed. (1980), Chapter 8
    (minimum liquid-gas ratio for absorbers; value from memory for the
    section), Illustration 8.2 (tangent pinch of the wash-oil absorber).

    Examples
    --------
    K = 1 gives a straight curve and an end pinch: L'_min = G' (0.1 - 0.01) / 0.1:

    >>> out = minimum_solvent_rate(1.0, 1.0, 0.1, 0.01)
    >>> round(float(out.rate), 12), bool(out.tangent)
    (0.9, False)
    """
    (g_rate, k, y_in, y_out, x_in), shape = _flat(gas_rate, k_value, gas_in, gas_out, liquid_in)
    _check_positive("the solute-free gas rate", g_rate)
    _check_positive("the equilibrium ratio K", k, "")
    for name, v in (("gas inlet", y_in), ("gas outlet", y_out), ("solvent inlet", x_in)):
        _check_ratio(name, v)
    floor = _gas_ratio_curve(x_in, k)
    unreachable = ~(y_out > floor) | ~(y_in > y_out)
    if strict and unreachable.any():
        i = int(np.flatnonzero(unreachable)[0])
        raise kremser.UnreachableTarget(
            f"the gas cannot leave at {y_out[i]:.6g} mol/mol: it must be richer than {floor[i]:.6g} mol/mol, "
            f"the gas in equilibrium with the entering solvent, and leaner than the entering gas", floor[i])
    rich_end = _liquid_ratio_curve(y_in, k)
    tangent_x = _tangent_point(k, x_in, y_out)
    tangent = ~unreachable & (tangent_x > x_in) & (tangent_x < rich_end)
    pinch_x = np.where(tangent, tangent_x, rich_end)
    finite = ~unreachable & np.isfinite(pinch_x) & (pinch_x > x_in)
    safe_x = np.where(finite, pinch_x, x_in + 1.0)
    ratio = np.where(finite, _chord_slope(k, x_in, np.where(finite, y_out, 0.0), safe_x), np.inf)
    rate = np.where(unreachable, np.inf, g_rate * ratio)
    with np.errstate(divide="ignore", invalid="ignore"):
        liquid_out = np.where(unreachable, np.nan, x_in + (y_in - y_out) / ratio)
    pinch_y = np.where(tangent, _gas_ratio_curve(np.where(tangent, pinch_x, 0.0), k), y_in)
    return MinimumFlow(rate.reshape(shape), liquid_out.reshape(shape), y_out.reshape(shape),
                       pinch_x.reshape(shape), pinch_y.reshape(shape), tangent.reshape(shape))


def minimum_stripping_rate(liquid_rate, k_value, liquid_in, liquid_out, gas_in=0.0, *, strict=True):
    r"""Least solute-free stripping-gas (or live-steam) rate of a stripper on the curved line.

    The operating line runs from the bottom point (X_N, Y_{N+1}) with slope
    L'/G' and must stay below Y*(X) up to the top. Its largest slope is the
    least chord slope (Y*(X) - Y_{N+1}) / (X - X_N) over the column: for a
    curve that bends up (K > 1) it can be a tangent inside the column (the
    quadratic of :func:`minimum_solvent_rate` with the bottom point
    (X_N, Y_{N+1}) in place of the top one), otherwise the line pinches at
    the top, in equilibrium with the entering liquid, Y_1 = Y*(X_0):

        G'_min = L' / min[ (Y*(X_0) - Y_{N+1}) / (X_0 - X_N),  slope at the tangent if inside ]

    Parameters
    ----------
    liquid_rate : array_like
        Solute-free liquid L' [mol/s], > 0.
    k_value : array_like
        Equilibrium ratio K = y / x [-], > 0.
    liquid_in, liquid_out : array_like
        Liquid entering X_0 and the specified liquid leaving X_N [mol/mol].
    gas_in : array_like
        Stripping gas entering Y_{N+1} [mol/mol], >= 0.
    strict : bool
        Raise ``kremser.UnreachableTarget`` where X_N <= X*(Y_{N+1}); if
        False, return inf there.

    Returns
    -------
    MinimumFlow
        rate G'_min [mol/s], gas_out Y_1 at G'_min, liquid_out X_N, the pinch
        point and whether it is a tangent; with ``strict=False`` an
        unreachable target gives rate inf and gas_out NaN.

    Source: Treybal, Mass-Transfer Operations, 3rd ed. (1980), Chapter 8,
    Illustration 8.2 (tangent pinch of the steam stripper).

    Examples
    --------
    >>> out = minimum_stripping_rate(1.0, 1.0, 0.1, 0.01)     # K = 1: end pinch at Y_1 = X_0
    >>> round(float(out.rate), 12), bool(out.tangent)
    (1.0, False)
    """
    (l_rate, k, x_in, x_out, y_in), shape = _flat(liquid_rate, k_value, liquid_in, liquid_out, gas_in)
    _check_positive("the solute-free liquid rate", l_rate)
    _check_positive("the equilibrium ratio K", k, "")
    for name, v in (("liquid inlet", x_in), ("liquid outlet", x_out), ("stripping gas inlet", y_in)):
        _check_ratio(name, v)
    floor = _liquid_ratio_curve(y_in, k)
    unreachable = ~(x_out > floor) | ~(x_in > x_out)
    if strict and unreachable.any():
        i = int(np.flatnonzero(unreachable)[0])
        raise kremser.UnreachableTarget(
            f"the liquid cannot leave at {x_out[i]:.6g} mol/mol: it must be richer than {floor[i]:.6g} mol/mol, "
            f"the liquid in equilibrium with the entering stripping gas, and leaner than the entering liquid",
            floor[i])
    top_gas = _gas_ratio_curve(x_in, k)
    tangent_x = _tangent_point(k, x_out, y_in)
    tangent = ~unreachable & (tangent_x > x_out) & (tangent_x < x_in)
    pinch_x = np.where(tangent, tangent_x, x_in)
    ok = ~unreachable
    safe_x = np.where(ok, pinch_x, x_out + 1.0)
    ratio = np.where(ok, _chord_slope(k, x_out, y_in, safe_x), 0.0)
    if np.any(ok & ~np.isfinite(top_gas) & ~tangent):
        raise ValueError("the entering liquid has K x >= 1: its equilibrium gas would be pure solute")
    with np.errstate(divide="ignore"):
        rate = np.where(ok, l_rate / np.where(ok, ratio, 1.0), np.inf)
    gas_out = np.where(ok, y_in + ratio * (x_in - x_out), np.nan)
    pinch_y = np.where(ok, _gas_ratio_curve(np.where(ok, pinch_x, 0.0), k), np.nan)
    return MinimumFlow(rate.reshape(shape), x_out.reshape(shape), gas_out.reshape(shape),
                       pinch_x.reshape(shape), pinch_y.reshape(shape), tangent.reshape(shape))
