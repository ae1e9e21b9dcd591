r"""Countercurrent cascades of equilibrium stages: the Kremser (absorption-factor) method.

A dilute solute, a straight equilibrium line ``y = K x`` and constant molar
flows ``L`` (liquid) and ``V`` (gas) make every stage balance linear, and the
whole cascade has a closed form in one group:

    absorption factor   A = L / (K V)       (absorber, gas is treated)
    stripping factor    S = K V / L         (stripper, liquid is treated)

For a cascade of ``N`` theoretical stages whose other phase enters clean, the
part of the driving force that is *not* removed is

    phi = (F - 1) / (F**(N + 1) - 1),      phi = 1 / (N + 1) at F = 1,

with ``F`` the absorption factor of an absorber or the stripping factor of a
stripper. Equivalently ``phi / (1 - phi) = 1 / (F + F**2 + ... + F**N)``; this
module works with the logarithm of that sum (a log-sum-exp in ``ln F``), which
stays finite and accurate for hundreds of stages and for factors within a
rounding error of 1.

Source for every relation here: A. Kremser, Natl. Petroleum News 22(21), 42
(1930), in the form given by J. D. Seader, E. J. Henley and D. K. Roper,
Separation Process Principles, 3rd ed., Wiley (2011), Section 6.5, and by
P. C. Wankat, Separation Process Engineering, 3rd ed., Prentice Hall (2012),
Section 12.4 (value from memory for the equation numbers of neither).

Units: compositions are mole fractions [-]; flows are molar flows [mol/s];
``K`` is the equilibrium ratio y/x [-].
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

from towercost.models.validity import check_range

__all__ = [
    "Cascade",
    "UnreachableTarget",
    "absorb",
    "driving_force_fraction",
    "factor_for_fraction",
    "fraction_remaining",
    "fraction_removed",
    "minimum_factor",
    "minimum_gas_rate",
    "minimum_liquid_rate",
    "stages_for_fraction",
    "strip",
]

# |ln F| * max(N, 1) below which the log of the geometric sum is taken from its
# Taylor series in ln F. The first omitted term is (N u)**6 / 181440, so at
# this threshold the truncation error is below 6e-18 (absolute, in the logit).
_SERIES_THRESHOLD = 1e-2
# |ln F| * max(S, 1) below which the stage count is taken from its series in
# ln F (first omitted term of relative size (S u)**3 / 4 < 3e-19).
_STAGES_SERIES_THRESHOLD = 1e-6
# Newton iterations for factor_for_fraction: seven reach the rounding floor
# over fractions 1e-12 .. 1 - 1e-14, stages 0.01 .. 500; the loop stops early
# once every point has converged.
_NEWTON_MAX_ITERATIONS = 10

_DILUTE_LIMIT = 0.01  # mole fraction; Wankat, Separation Process Engineering, 3rd ed., Section 12.4
_DILUTE_SOURCE = "the dilute Kremser cascade (Wankat, Separation Process Engineering, 3rd ed., Section 12.4)"


class UnreachableTarget(ValueError):
    """A separation target that no cascade with the given factor or stages can reach.

    Attributes
    ----------
    best : ndarray or float
        The best (lowest) reachable fraction remaining for each point.
    """

    def __init__(self, message: str, best):
        super().__init__(message)
        self.best = best


class Cascade(NamedTuple):
    """Outlet compositions of a countercurrent cascade.

    ``fraction_remaining`` and ``fraction_removed`` refer to the solute that
    enters with the treated phase (the gas of an absorber, the liquid of a
    stripper); they add up to 1.
    """

    gas_out: np.ndarray | None
    liquid_out: np.ndarray | None
    fraction_remaining: np.ndarray
    fraction_removed: np.ndarray


# ---------------------------------------------------------------------------
# numerical core
# ---------------------------------------------------------------------------


def _as_float(*values):
    """Broadcast the inputs to 1-d float arrays (for masked assignment) and the common shape."""
    arrays = [np.asarray(v, dtype=float) for v in values]
    shape = np.broadcast_shapes(*(a.shape for a in arrays))
    flat = [np.array(np.broadcast_to(a, shape), dtype=float).reshape(-1) for a in arrays]
    return flat, shape


def _shaped(values: np.ndarray, shape):
    """Reshape a flat result back to the broadcast shape (0-d for scalar inputs)."""
    return values.reshape(shape)


def _log_geometric_sum(log_factor, stages, one_minus_exp_minus_abs):
    """ln(F + F**2 + ... + F**N) for real N >= 0, as a function of u = ln F.

    ``one_minus_exp_minus_abs`` is 1 - exp(-|u|), supplied by the caller from
    the most accurate data it has. Exact form, with a = |u|:

        u > 0:  N u + ln(1 - e^{-N a}) - ln(1 - e^{-a})
        u < 0:    u + ln(1 - e^{-N a}) - ln(1 - e^{-a})

    and, for |u| max(N, 1) < 1e-2, the series

        ln N + (N + 1) u / 2 + (N**2 - 1) u**2 / 24 - (N**4 - 1) u**4 / 2880

    (the cumulant expansion of the discrete uniform distribution on 1..N,
    which holds for real N by analytic continuation). Returns -inf at N = 0.
    """
    u = log_factor
    a = np.abs(u)
    with np.errstate(divide="ignore", invalid="ignore"):
        numerator = -np.expm1(-stages * a)
        denominator = np.where(one_minus_exp_minus_abs == 0.0, 1.0, one_minus_exp_minus_abs)
        logit = np.where(u > 0.0, stages * u, u) + np.log(numerator / denominator)
        near = a * np.maximum(stages, 1.0) < _SERIES_THRESHOLD
        if near.any():
            un = u[near]
            nn = stages[near]
            n2 = nn * nn
            logit[near] = np.log(nn) + un * ((nn + 1.0) / 2.0 + un * ((n2 - 1.0) / 24.0 - un * un * (n2 * n2 - 1.0) / 2880.0))
    return logit


def _log_geometric_sum_slope(log_factor, stages, one_minus_exp_minus_abs):
    """d/du of _log_geometric_sum (the mean exponent 1..N weighted by F**k)."""
    u = log_factor
    a = np.abs(u)
    with np.errstate(divide="ignore", invalid="ignore"):
        e_n = -np.expm1(-stages * a)
        q_n = 1.0 / np.where(e_n == 0.0, 1.0, e_n)
        q_1 = 1.0 / np.where(one_minus_exp_minus_abs == 0.0, 1.0, one_minus_exp_minus_abs)
        slope = np.where(u > 0.0, 1.0 + stages * q_n - q_1, stages + q_1 - stages * q_n)
        near = a * np.maximum(stages, 1.0) < _SERIES_THRESHOLD
        if near.any():
            un = u[near]
            nn = stages[near]
            n2 = nn * nn
            slope[near] = (nn + 1.0) / 2.0 + un * ((n2 - 1.0) / 12.0 - un * un * (n2 * n2 - 1.0) / 720.0)
    return slope


def _logistic_pair(logit):
    """(1 / (1 + e^L), 1 / (1 + e^-L)) without overflow; L = -inf gives (1, 0)."""
    small = np.exp(-np.abs(logit))
    share = 1.0 / (1.0 + small)
    positive = logit > 0.0
    lower = np.where(positive, small * share, share)
    upper = np.where(positive, share, small * share)
    return lower, upper


def _check_factor_stages(factor, stages):
    if np.any(~(factor > 0.0)):
        raise ValueError(f"the absorption or stripping factor must be > 0, got {factor[~(factor > 0.0)][0]:.6g}")
    if np.any(~(stages >= 0.0)):
        raise ValueError(f"the number of stages must be >= 0, got {stages[~(stages >= 0.0)][0]:.6g}")


def _remaining_and_removed(factor, stages):
    """Flat (phi, 1 - phi) for flat float arrays of factors and stages."""
    _check_factor_stages(factor, stages)
    log_factor = np.log(factor)
    # 1 - e^{-|u|} from F itself: |F - 1| / max(F, 1); F - 1 is exact near F = 1.
    gap = np.abs(factor - 1.0) / np.maximum(factor, 1.0)
    remaining, removed = _logistic_pair(_log_geometric_sum(log_factor, stages, gap))
    unit = factor == 1.0
    if unit.any():  # F = 1 exactly: phi = 1 / (N + 1), correctly rounded
        n = stages[unit]
        remaining[unit] = 1.0 / (n + 1.0)
        removed[unit] = n / (n + 1.0)
    return remaining, removed


# ---------------------------------------------------------------------------
# the cascade relation and its inverses
# ---------------------------------------------------------------------------


def fraction_remaining(factor, stages):
    r"""Part of the driving force that a cascade of equilibrium stages does not remove.

    Kremser relation for ``N`` countercurrent equilibrium stages whose other
    phase enters clean:

        phi = (F - 1) / (F**(N + 1) - 1),      phi = 1 / (N + 1) at F = 1

    Parameters
    ----------
    factor : array_like
        Absorption factor A = L / (K V) of an absorber, or stripping factor
        S = K V / L of a stripper [-], > 0.
    stages : array_like
        Theoretical stages N [-], >= 0, need not be whole (N = 0 gives 1).

    Returns
    -------
    ndarray
        phi [-], in (0, 1]; for an absorber with clean solvent it is
        y_out / y_in, for a stripper with clean gas x_out / x_in.

    Notes
    -----
    Dilute solute, straight equilibrium line, constant L and V. Evaluated as
    phi = 1 / (1 + exp(ln(F + ... + F**N))) with the log-sum computed from
    expm1 and a series near F = 1, so it stays accurate (relative error below
    1e-12 against 50-digit arithmetic) for N up to 500 and F from 1e-3 to 1e3,
    including F = 1 exactly. Values smaller than about 1e-308 underflow to 0.

    Source: Kremser (1930); Seader, Henley and Roper, Separation Process
    Principles, 3rd ed. (2011), Section 6.5.

    Examples
    --------
    >>> round(float(fraction_remaining(1.0, 9)), 12)
    0.1
    >>> round(float(fraction_remaining(2.0, 2)), 12)     # 1 / (1 + 2 + 4)
    0.142857142857
    """
    (factor, stages), shape = _as_float(factor, stages)
    remaining, _ = _remaining_and_removed(factor, stages)
    return _shaped(remaining, shape)


def fraction_removed(factor, stages):
    r"""Part of the driving force that the cascade removes, 1 - phi, without cancellation.

        1 - phi = (F**(N + 1) - F) / (F**(N + 1) - 1),      N / (N + 1) at F = 1

    Parameters
    ----------
    factor : array_like
        Absorption or stripping factor [-], > 0.
    stages : array_like
        Theoretical stages N [-], >= 0.

    Returns
    -------
    ndarray
        1 - phi [-], in [0, 1).

    Notes
    -----
    Same numerics and range as :func:`fraction_remaining`; accurate also
    where phi is close to 1 (few stages, small factor).

    Source: Kremser (1930); Seader, Henley and Roper, Separation Process
    Principles, 3rd ed. (2011), Section 6.5.

    Examples
    --------
    >>> round(float(fraction_removed(1.0, 9)), 12)
    0.9
    >>> float(fraction_removed(1e-3, 1))     # A / (1 + A)
    0.000999000999000999
    """
    (factor, stages), shape = _as_float(factor, stages)
    _, removed = _remaining_and_removed(factor, stages)
    return _shaped(removed, shape)


def minimum_factor(fraction):
    r"""Smallest factor that reaches a fraction remaining with unlimited stages.

    With N -> infinity the Kremser relation tends to phi = 1 - F for F < 1
    (the cascade pinches at the end where the treated phase enters) and to 0
    for F >= 1, so the least factor for a target phi is

        F_min = 1 - phi

    Parameters
    ----------
    fraction : array_like
        Target fraction remaining phi [-], in (0, 1).

    Returns
    -------
    ndarray
        F_min [-].

    Source: Seader, Henley and Roper, Separation Process Principles, 3rd ed.
    (2011), Section 6.5 (value from memory for the section number).

    Examples
    --------
    >>> float(minimum_factor(0.25))
    0.75
    """
    return 1.0 - np.asarray(fraction, dtype=float)


def driving_force_fraction(outlet, inlet, equilibrium_inlet):
    r"""Turn an outlet specification into the fraction of driving force remaining.

        phi = (outlet - eq) / (inlet - eq)

    where ``eq`` is the composition of the treated phase in equilibrium with
    the other phase as it enters: absorber eq = K x_in (gas mole fraction),
    stripper eq = y_in / K (liquid mole fraction). With a clean entering
    phase, eq = 0 and phi is the plain ratio outlet / inlet.

    Parameters
    ----------
    outlet : array_like
        Specified outlet mole fraction of the treated phase [-].
    inlet : array_like
        Inlet mole fraction of the treated phase [-].
    equilibrium_inlet : array_like
        eq as above [-], in the same phase as ``outlet`` and ``inlet``.

    Returns
    -------
    ndarray
        phi [-]; a value outside (0, 1) means the specification cannot be met.

    Source: Seader, Henley and Roper, Separation Process Principles, 3rd ed.
    (2011), Section 6.5 (value from memory for the section number).

    Examples
    --------
    >>> round(float(driving_force_fraction(0.0002, 0.01, 0.0001)), 12)     # 1 / 99
    0.010101010101
    """
    outlet = np.asarray(outlet, dtype=float)
    inlet = np.asarray(inlet, dtype=float)
    eq = np.asarray(equilibrium_inlet, dtype=float)
    return (outlet - eq) / (inlet - eq)


def _check_fraction(fraction, what="fraction remaining"):
    bad = ~((fraction > 0.0) & (fraction < 1.0))
    if np.any(bad):
        raise ValueError(f"the {what} must lie strictly between 0 and 1, got {fraction[bad][0]:.6g}")


def _unreachable_message(count, total, target, best, reason):
    head = "the target is" if total == 1 else f"{count} of {total} targets are"
    return f"{head} unreachable: fraction remaining {target:.6g} asked, but {reason} {best:.6g}"


def stages_for_fraction(fraction, factor, *, strict=True):
    r"""Theoretical stages a cascade needs to bring the driving force down to ``fraction``.

    Kremser relation solved for N:

        N = ln(1 + S_N (F - 1) / F) / ln F,     S_N = (1 - phi) / phi,
        N = (1 - phi) / phi                       at F = 1,

    near F = 1 from the series N = S_N - (S_N + S_N**2) u / 2
    + (S_N / 6 + S_N**2 / 2 + S_N**3 / 3) u**2 in u = ln F.

    Parameters
    ----------
    fraction : array_like
        Target fraction remaining phi [-], in (0, 1).
    factor : array_like
        Absorption or stripping factor F [-], > 0.
    strict : bool
        If True, raise :class:`UnreachableTarget` where the target cannot be
        met; if False, return inf there.

    Returns
    -------
    ndarray
        N [-], real (round up for whole trays).

    Raises
    ------
    UnreachableTarget
        Where F < 1 and phi <= 1 - F: even unlimited stages leave 1 - F;
        ``best`` is 1 - F (0 where F >= 1).

    Source: Kremser (1930); Wankat, Separation Process Engineering, 3rd ed.
    (2012), Section 12.4.

    Examples
    --------
    >>> round(float(stages_for_fraction(0.1, 1.0)), 12)
    9.0
    >>> round(float(stages_for_fraction(1 / 7, 2.0)), 12)
    2.0
    """
    (fraction, factor), shape = _as_float(fraction, factor)
    _check_fraction(fraction)
    if np.any(~(factor > 0.0)):
        raise ValueError(f"the absorption or stripping factor must be > 0, got {factor[~(factor > 0.0)][0]:.6g}")
    best = np.where(factor < 1.0, 1.0 - factor, 0.0)
    unreachable = fraction <= best
    if strict and unreachable.any():
        i = int(np.flatnonzero(unreachable)[0])
        message = _unreachable_message(
            int(unreachable.sum()), fraction.size, fraction[i], best[i],
            "with unlimited stages the fraction remaining cannot fall below 1 - A =",
        )
        message += f" (factor A = {factor[i]:.6g}; a factor of more than {1.0 - fraction[i]:.6g} is needed)"
        raise UnreachableTarget(message, _shaped(best, shape) if shape else float(best[0]))
    ratio = (1.0 - fraction) / fraction  # 1 - phi is exact for phi >= 1/2
    u = np.log(factor)
    w = (factor - 1.0) / factor  # F - 1 is exact near F = 1
    with np.errstate(divide="ignore", invalid="ignore"):
        argument = ratio * w
        argument = np.where(unreachable, 0.0, argument)
        stages = np.log1p(argument) / np.where(u == 0.0, 1.0, u)
        near = np.abs(u) * np.maximum(ratio, 1.0) < _STAGES_SERIES_THRESHOLD
        if near.any():
            s = ratio[near]
            un = u[near]
            stages[near] = s + un * (-(s + s * s) / 2.0 + un * (s / 6.0 + s * s / 2.0 + s * s * s / 3.0))
    stages = np.where(unreachable, np.inf, stages)
    return _shaped(stages, shape)


def _factor_initial_guess(target, stages):
    """u = ln F where the hyperbola with asymptotes L = u and L = N u through (0, ln N) reaches L."""
    c = np.log(stages) ** 2
    root = np.sqrt((stages - 1.0) ** 2 * target * target + 4.0 * stages * c)
    return ((stages + 1.0) * target - root) / (2.0 * stages)


def factor_for_fraction(fraction, stages, *, strict=True):
    r"""Absorption or stripping factor that brings N stages down to ``fraction``.

    Solves the Kremser relation phi(F, N) = fraction for F. With u = ln F the
    function ln((1 - phi) / phi) = ln(F + F**2 + ... + F**N) is increasing in
    u, with slope between 1 and N; it is solved by Newton's method in u from
    the hyperbola through its two asymptotes (u and N u) and its value ln N at
    u = 0, which converges in at most seven steps over fractions 1e-12 to
    1 - 1e-14 and N from 0.01 to 500.

    Parameters
    ----------
    fraction : array_like
        Target fraction remaining phi [-], in (0, 1).
    stages : array_like
        Theoretical stages N [-], >= 0.
    strict : bool
        If True, raise :class:`UnreachableTarget` where N = 0; if False,
        return inf there.

    Returns
    -------
    ndarray
        F [-], > 0. Factors beyond the float range (about 1e308, met only with
        a small fraction of one stage) are returned as inf.

    Raises
    ------
    UnreachableTarget
        Where N = 0: no factor removes anything without a stage; ``best`` is 1.

    Source: Kremser (1930); Seader, Henley and Roper, Separation Process
    Principles, 3rd ed. (2011), Section 6.5.

    Examples
    --------
    >>> round(float(factor_for_fraction(0.1, 9)), 12)
    1.0
    >>> round(float(factor_for_fraction(1 / 7, 2)), 12)
    2.0
    """
    (fraction, stages), shape = _as_float(fraction, stages)
    _check_fraction(fraction)
    if np.any(~(stages >= 0.0)):
        raise ValueError(f"the number of stages must be >= 0, got {stages[~(stages >= 0.0)][0]:.6g}")
    no_stage = stages == 0.0
    if strict and no_stage.any():
        i = int(np.flatnonzero(no_stage)[0])
        message = _unreachable_message(
            int(no_stage.sum()), fraction.size, fraction[i], 1.0,
            "with no stage nothing is removed, whatever the factor: the fraction remaining stays at",
        )
        best = np.where(no_stage, 1.0, 0.0)
        raise UnreachableTarget(message, _shaped(best, shape) if shape else 1.0)
    target = np.log1p(-fraction) - np.log(fraction)  # ln((1 - phi) / phi)
    n = np.where(no_stage, 1.0, stages)
    u = _factor_initial_guess(target, n)
    active = np.ones(u.shape, dtype=bool)
    for _ in range(_NEWTON_MAX_ITERATIONS):
        ua, na, ta = u[active], n[active], target[active]
        gap = -np.expm1(-np.abs(ua))
        step = (_log_geometric_sum(ua, na, gap) - ta) / _log_geometric_sum_slope(ua, na, gap)
        u[active] = ua - step
        still = np.abs(step) > 4.0 * np.finfo(float).eps * np.maximum(np.abs(ua), 1.0)
        active[active] = still
        if not active.any():
            break
    with np.errstate(over="ignore"):
        factor = np.exp(u)
    factor = np.where(no_stage, np.inf, factor)
    return _shaped(factor, shape)


# ---------------------------------------------------------------------------
# absorber and stripper outlets
# ---------------------------------------------------------------------------


def absorb(factor, stages, gas_in, liquid_in=0.0, k_value=None, *, warnings: list[str] | None = None):
    r"""Outlet compositions of a countercurrent absorber of N equilibrium stages.

        y_out = K x_in + phi (y_in - K x_in)
        x_out = x_in + (y_in - y_out) / (A K)        (solute balance)

    with phi = :func:`fraction_remaining` (A, N).

    Parameters
    ----------
    factor : array_like
        Absorption factor A = L / (K V) [-], > 0.
    stages : array_like
        Theoretical stages N [-], >= 0.
    gas_in : array_like
        Solute mole fraction in the entering gas y_in [-], > 0.
    liquid_in : array_like
        Solute mole fraction in the entering solvent x_in [-], >= 0.
    k_value : array_like or None
        Equilibrium ratio K = y / x [-]. Needed for the liquid outlet and for
        a solvent that is not clean; without it ``liquid_out`` is None.
    warnings : list of str, optional
        Receives a message if a composition exceeds the dilute range.

    Returns
    -------
    Cascade
        gas_out y_out [-], liquid_out x_out [-] (or None),
        fraction_remaining y_out / y_in [-], fraction_removed 1 - y_out / y_in [-].

    Notes
    -----
    Valid for dilute systems (below about 1 % solute in both phases, Wankat,
    Separation Process Engineering, 3rd ed., Section 12.4); outside it the
    answer is still given, with a warning.

    Source: Kremser (1930); Seader, Henley and Roper, Separation Process
    Principles, 3rd ed. (2011), Section 6.5.

    Examples
    --------
    >>> out = absorb(2.0, 2, 0.007, 0.0, k_value=0.5)
    >>> round(float(out.gas_out), 12), round(float(out.liquid_out), 12)
    (0.001, 0.006)
    """
    if k_value is None and np.any(np.asarray(liquid_in) != 0.0):
        raise ValueError("absorb needs k_value when the entering solvent carries solute (liquid_in != 0)")
    check_range("solute mole fraction in the entering gas", gas_in, 0.0, _DILUTE_LIMIT, "-", _DILUTE_SOURCE, warnings)
    gas_out, liquid_out, remaining, removed = _cascade(factor, stages, gas_in, liquid_in, k_value, invert=False)
    if liquid_out is not None:
        check_range("solute mole fraction in the leaving liquid", liquid_out, 0.0, _DILUTE_LIMIT, "-",
                    _DILUTE_SOURCE, warnings)
    return Cascade(gas_out, liquid_out, remaining, removed)


def _cascade(factor, stages, treated_in, other_in, k_value, *, invert: bool):
    """Outlets of either cascade, by the treated stream and the agent stream.

    The entering agent holds the treated stream at ``eq = c * other_in`` and
    the agent leaves with ``other_in + removed * (treated_in - eq) / (F c)``,
    where c = K for an absorber (treated = gas) and c = 1 / K for a stripper
    (treated = liquid; ``invert``). Returns flat-shaped (treated_out,
    other_out or None, fraction remaining and removed of the entering solute).
    """
    (factor, stages, treated_in, other_in), shape = _as_float(factor, stages, treated_in, other_in)
    remaining, removed = _remaining_and_removed(factor, stages)
    if k_value is None:
        return (_shaped(remaining * treated_in, shape), None, _shaped(remaining, shape), _shaped(removed, shape))
    (k, _), _ = _as_float(k_value, np.zeros(shape))
    conversion = 1.0 / k if invert else k
    equilibrium = conversion * other_in
    driving = treated_in - equilibrium
    treated_out = equilibrium + remaining * driving
    other_out = other_in + removed * driving / (factor * conversion)
    with np.errstate(divide="ignore", invalid="ignore"):
        removed_of_feed = removed * driving / treated_in
    return (_shaped(treated_out, shape), _shaped(other_out, shape), _shaped(1.0 - removed_of_feed, shape),
            _shaped(removed_of_feed, shape))


def strip(factor, stages, liquid_in, gas_in=0.0, k_value=None, *, warnings: list[str] | None = None):
    r"""Outlet compositions of a countercurrent stripper of N equilibrium stages.

        x_out = y_in / K + phi (x_in - y_in / K)
        y_out = y_in + K (x_in - x_out) / S          (solute balance)

    with phi = :func:`fraction_remaining` (S, N).

    Parameters
    ----------
    factor : array_like
        Stripping factor S = K V / L [-], > 0.
    stages : array_like
        Theoretical stages N [-], >= 0.
    liquid_in : array_like
        Solute mole fraction in the entering liquid x_in [-], > 0.
    gas_in : array_like
        Solute mole fraction in the entering stripping gas y_in [-], >= 0.
    k_value : array_like or None
        Equilibrium ratio K = y / x [-]. Needed for the gas outlet and for a
        stripping gas that is not clean; without it ``gas_out`` is None.
    warnings : list of str, optional
        Receives a message if a composition exceeds the dilute range.

    Returns
    -------
    Cascade
        gas_out y_out [-] (or None), liquid_out x_out [-],
        fraction_remaining x_out / x_in [-], fraction_removed 1 - x_out / x_in [-].

    Notes
    -----
    Valid for dilute systems (below about 1 % solute in both phases, Wankat,
    Separation Process Engineering, 3rd ed., Section 12.4).

    Source: Kremser (1930); Seader, Henley and Roper, Separation Process
    Principles, 3rd ed. (2011), Section 6.5.

    Examples
    --------
    >>> out = strip(2.0, 2, 0.007, 0.0, k_value=10.0)
    >>> round(float(out.liquid_out), 12), round(float(out.gas_out), 12)
    (0.001, 0.03)
    """
    if k_value is None and np.any(np.asarray(gas_in) != 0.0):
        raise ValueError("strip needs k_value when the entering stripping gas carries solute (gas_in != 0)")
    check_range("solute mole fraction in the entering liquid", liquid_in, 0.0, _DILUTE_LIMIT, "-", _DILUTE_SOURCE,
                warnings)
    liquid_out, gas_out, remaining, removed = _cascade(factor, stages, liquid_in, gas_in, k_value, invert=True)
    if gas_out is not None:
        check_range("solute mole fraction in the leaving gas", gas_out, 0.0, _DILUTE_LIMIT, "-", _DILUTE_SOURCE,
                    warnings)
    return Cascade(gas_out, liquid_out, remaining, removed)


# ---------------------------------------------------------------------------
# minimum flows
# ---------------------------------------------------------------------------


def minimum_liquid_rate(gas_rate, k_value, gas_in, gas_out, liquid_in=0.0, *, strict=True):
    r"""Least solvent rate of an absorber, with unlimited stages.

    The straight operating line touches the straight equilibrium line at the
    rich end (the bottom, where the gas enters and the liquid leaves in
    equilibrium with it, x_out = y_in / K):

        L_min = V (y_in - y_out) / (y_in / K - x_in)

    Parameters
    ----------
    gas_rate : array_like
        Gas molar flow V [mol/s].
    k_value : array_like
        Equilibrium ratio K = y / x [-], > 0.
    gas_in, gas_out : array_like
        Solute mole fraction in the entering and in the specified leaving gas [-].
    liquid_in : array_like
        Solute mole fraction in the entering solvent [-].
    strict : bool
        If True, raise :class:`UnreachableTarget` where y_out <= K x_in; if
        False, return inf there.

    Returns
    -------
    ndarray
        L_min [mol/s].

    Raises
    ------
    UnreachableTarget
        Where the leaving gas is asked to be leaner than K x_in, the gas in
        equilibrium with the entering solvent; ``best`` is K x_in / y_in.

    Source: Seader, Henley and Roper, Separation Process Principles, 3rd ed.
    (2011), Section 6.3 (value from memory for the section number).

    Examples
    --------
    >>> round(float(minimum_liquid_rate(100.0, 0.5, 0.01, 0.001)), 12)     # 100 * 0.009 / 0.02
    45.0
    """
    (v, k, y_in, y_out, x_in), shape = _as_float(gas_rate, k_value, gas_in, gas_out, liquid_in)
    floor = k * x_in
    unreachable = y_out <= floor
    best = floor / y_in
    if strict and unreachable.any():
        i = int(np.flatnonzero(unreachable)[0])
        message = _unreachable_message(
            int(unreachable.sum()), v.size, y_out[i] / y_in[i], best[i],
            "the gas cannot leave leaner than K x_in, the gas in equilibrium with the entering solvent: "
            "the fraction remaining cannot fall below",
        )
        raise UnreachableTarget(message, _shaped(best, shape) if shape else float(best[0]))
    with np.errstate(divide="ignore", invalid="ignore"):
        rate = v * (y_in - y_out) / (y_in / k - x_in)
    return _shaped(np.where(unreachable, np.inf, rate), shape)


def minimum_gas_rate(liquid_rate, k_value, liquid_in, liquid_out, gas_in=0.0, *, strict=True):
    r"""Least stripping-gas rate of a stripper, with unlimited stages.

    For a straight equilibrium line the operating line first touches it where
    the liquid enters (the top of the stripper, where the gas leaves in
    equilibrium with the entering liquid, y_out = K x_in):

        V_min = L (x_in - x_out) / (K x_in - y_in)

    Parameters
    ----------
    liquid_rate : array_like
        Liquid molar flow L [mol/s].
    k_value : array_like
        Equilibrium ratio K = y / x [-], > 0.
    liquid_in, liquid_out : array_like
        Solute mole fraction in the entering and in the specified leaving liquid [-].
    gas_in : array_like
        Solute mole fraction in the entering stripping gas [-].
    strict : bool
        If True, raise :class:`UnreachableTarget` where x_out <= y_in / K; if
        False, return inf there.

    Returns
    -------
    ndarray
        V_min [mol/s].

    Raises
    ------
    UnreachableTarget
        Where the leaving liquid is asked to be leaner than y_in / K;
        ``best`` is y_in / (K x_in).

    Source: Seader, Henley and Roper, Separation Process Principles, 3rd ed.
    (2011), Section 6.3 (value from memory for the section number).

    Examples
    --------
    >>> round(float(minimum_gas_rate(100.0, 50.0, 0.001, 0.0001)), 12)     # 100 * 0.0009 / 0.05
    1.8
    """
    (l_rate, k, x_in, x_out, y_in), shape = _as_float(liquid_rate, k_value, liquid_in, liquid_out, gas_in)
    floor = y_in / k
    unreachable = x_out <= floor
    best = floor / x_in
    if strict and unreachable.any():
        i = int(np.flatnonzero(unreachable)[0])
        message = _unreachable_message(
            int(unreachable.sum()), l_rate.size, x_out[i] / x_in[i], best[i],
            "the liquid cannot leave leaner than y_in / K, the liquid in equilibrium with the entering gas: "
            "the fraction remaining cannot fall below",
        )
        raise UnreachableTarget(message, _shaped(best, shape) if shape else float(best[0]))
    with np.errstate(divide="ignore", invalid="ignore"):
        rate = l_rate * (x_in - x_out) / (k * x_in - y_in)
    return _shaped(np.where(unreachable, np.inf, rate), shape)


# ---------------------------------------------------------------------------
# a cascade solved for a fraction of its inlet
# ---------------------------------------------------------------------------


class Requirement(NamedTuple):
    """What a cascade needs to leave a given fraction of its inlet in the treated stream."""

    stages: float          # theoretical stages N [-]
    factor: float          # absorption or stripping factor F [-]
    fraction: float        # driving-force fraction phi reached [-]


def requirement_for_remaining(target_remaining, treated_in, equilibrium_inlet=0.0, *, factor=None, stages=None):
    r"""Stages for a given factor, or factor for given stages, to leave ``target_remaining`` of the inlet.

    The target, a fraction t of the treated stream's inlet, is first turned
    into the driving-force fraction (:func:`driving_force_fraction`)

        phi = (t z_in - eq) / (z_in - eq)

    with eq the treated-stream composition in equilibrium with the entering
    agent (absorber: K x_in; stripper: y_in / K); then the Kremser relation
    is inverted for N (:func:`stages_for_fraction`) or for F
    (:func:`factor_for_fraction`).

    Parameters
    ----------
    target_remaining : float
        Fraction of the entering solute left in the treated stream t [-], in (0, 1).
    treated_in : float
        Solute mole fraction of the treated stream as it enters z_in [-], > 0.
    equilibrium_inlet : float
        eq [-], >= 0.
    factor, stages : float
        Exactly one: the absorption or stripping factor F [-] (to solve for N)
        or the theoretical stages N [-] > 0 (to solve for F).

    Returns
    -------
    Requirement
        ``(stages, factor, fraction)``.

    Raises
    ------
    UnreachableTarget
        When the entering agent alone holds the treated stream at or above
        the target (``best`` = eq / z_in), or when the factor is too small
        for any number of stages (``best`` = the least fraction of the inlet
        that unlimited stages leave).

    Source: Kremser (1930); Seader, Henley and Roper, Separation Process
    Principles, 3rd ed. (2011), Section 6.5.

    Examples
    --------
    >>> need = requirement_for_remaining(1 / 7, 0.007, factor=2.0)
    >>> round(need.stages, 12)
    2.0
    >>> round(requirement_for_remaining(0.1, 1e-3, stages=9).factor, 12)
    1.0
    """
    if (factor is None) == (stages is None):
        raise ValueError("give exactly one of factor and stages")
    eq = float(equilibrium_inlet)
    outlet = float(target_remaining) * float(treated_in)
    floor = eq / float(treated_in)
    if outlet <= eq:
        raise UnreachableTarget(
            f"a fraction remaining of {target_remaining:g} is beyond reach: the entering agent holds the "
            f"treated stream at or above {floor:.6g} of its inlet", best=floor)
    phi = float(driving_force_fraction(outlet, treated_in, eq))
    if stages is None:
        best = (1.0 - factor) * (1.0 - floor) + floor if factor < 1.0 else floor
        try:
            needed = float(stages_for_fraction(phi, factor))
        except UnreachableTarget:
            raise UnreachableTarget(
                f"a fraction remaining of {target_remaining:g} is beyond reach with factor {factor:g}: with "
                f"unlimited stages the fraction remaining cannot fall below {best:.6g}", best=best) from None
        return Requirement(needed, float(factor), phi)
    if stages <= 0:
        raise UnreachableTarget("a fraction remaining below 1 needs at least some stages (stages > 0)", best=1.0)
    return Requirement(float(stages), float(factor_for_fraction(phi, stages)), phi)
