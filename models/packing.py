r"""Packed columns: transfer units, film coefficients, capacity, pressure drop, internals.

A packed column is rated here by three published relations, each in its own
group of functions:

* Colburn's transfer units for a straight equilibrium line and straight
  operating line (dilute solute), with the overall heights of a transfer
  unit from the two film heights and the HETP that links a packed bed to
  the theoretical stages of :mod:`towercost.models.kremser`;
* the film coefficients and wetted area of Onda, Takeuchi and Okumoto
  (1968), giving the film heights H_G and H_L of random packings;
* the capacity and pressure-drop model of Stichlmair, Bravo and Fair (1989),
  giving the irrigated pressure drop, the flooding gas velocity and the
  least diameter that meets both a design fraction of flood and a
  pressure-drop limit.

Common-practice checks (minimum wetting rate, diameter / packing size),
the split of the packed height into beds, and the packing and internals cost
complete the set. Packing data live in ``models/data/packings.toml``; every
row names its source.

Conventions: SI throughout (m, s, kg, Pa, N/m, Pa s, m2/s). Gas and liquid
loads are superficial mass fluxes [kg/(m2 s)] or superficial velocities
[m/s] as each function says. ``slope_ratio`` is lambda = m V / L, the
equilibrium slope over the operating-line slope: lambda = 1/A in an absorber,
lambda = S in a stripper. Every function broadcasts over numpy arrays.

Diffusivities are inputs: they come with the scenario (handbook values or an
estimate made there). The ``chemicals`` package installed with this project
(1.5) has no diffusivity estimator, so none is wrapped here.
"""

from __future__ import annotations

import functools
import tomllib
from pathlib import Path
from typing import NamedTuple

import numpy as np

from towercost.models import defaults
from towercost.models.hydraulics import GRAVITY, standard_diameter
from towercost.models.kremser import UnreachableTarget
from towercost.models.validity import check_range

__all__ = [
    "BedSplit",
    "FilmHeights",
    "InternalsCost",
    "PackedDiameter",
    "bed_split",
    "check_diameter_ratio",
    "check_temperature",
    "check_wetting",
    "dry_pressure_drop",
    "flood_pressure_drop",
    "flooding_gas_velocity",
    "fraction_of_flood",
    "fraction_remaining_packed",
    "hetp",
    "htu_from_capacity_coefficient",
    "internals_cost",
    "irrigated_pressure_drop",
    "minimum_wetting_velocity",
    "onda_film_heights",
    "onda_gas_coefficient",
    "onda_liquid_coefficient",
    "onda_wetted_area",
    "overall_htu_gas",
    "overall_htu_liquid",
    "packed_column_height",
    "packed_diameter",
    "packing_cost",
    "packing_data",
    "packing_names",
    "packing_volume",
    "packing_weight",
    "transfer_units",
    "transfer_units_gas",
    "transfer_units_liquid",
]

_DATA_FILE = Path(__file__).resolve().parent / "data" / "packings.toml"

# Design defaults of a packed column, each a rule of thumb (common practice);
# the scenario schema reads them here.

#: Design fraction of flood of a random packing [-]: 0.70 (0.65 to 0.80 is usual), common practice.
FLOOD_FRACTION = 0.70

#: Pressure-drop limit of a packed bed [Pa/m]: 400 Pa/m, about 0.5 in of water per foot, the upper end of the
#: 200 to 400 Pa/m usual for absorbers and strippers; common practice. The diameter search finds the economic
#: pressure drop below it.
PRESSURE_DROP_LIMIT = 400.0

#: Shell length taken by each redistributor with the support plate and hold-down of the bed below it [m];
#: common practice for estimating.
REDISTRIBUTOR_SPACE = 0.9

_ONDA_SOURCE = "the Onda (1968) correlation"
_STICHLMAIR_SOURCE = "the Stichlmair-Bravo-Fair (1989) model"

# Root finding. Every implicit relation of the Stichlmair model is solved per
# point by Newton's method with exact slopes, kept inside a bracket that
# always holds the root (a step leaving it bisects). The loops run over the
# whole array; a point that has converged keeps its value from then on, so a
# point's result does not depend on the other points evaluated with it (a
# design re-evaluated alone gives the very figures of the space's batch).
_MAX_STEPS = 80
#: Converged when a step moves the logarithm of the unknown by less than this.
_LOG_TOLERANCE = 1e-13
#: Bracket of superficial gas velocities searched for flood or a pressure limit [m/s].
_VELOCITY_BRACKET = (1e-4, 1e2)


def _arrays(*values):
    """Broadcast the inputs to float arrays of one common shape."""
    arrays = [np.asarray(v, dtype=float) for v in values]
    shape = np.broadcast_shapes(*(a.shape for a in arrays))
    return [np.broadcast_to(a, shape).astype(float) for a in arrays]


# ---------------------------------------------------------------------------
# data
# ---------------------------------------------------------------------------


#: Tables of packings.toml that are not packing rows.
_NOT_PACKINGS = ("material", "material_density", "internals")


@functools.lru_cache(maxsize=1)
def _table() -> dict:
    with _DATA_FILE.open("rb") as handle:
        return tomllib.load(handle)


def packing_names() -> tuple[str, ...]:
    """Keys of the packings in ``models/data/packings.toml``.

    Examples
    --------
    >>> "pall_ring_plastic_50" in packing_names()
    True
    """
    return tuple(k for k in _table() if k not in _NOT_PACKINGS)


def packing_data(name: str) -> dict:
    """One packing row, with the critical surface tension of its material added.

    Parameters
    ----------
    name : str
        A key of :func:`packing_names`.

    Returns
    -------
    dict
        The row of ``packings.toml`` (SI values and source strings) plus
        ``critical_surface_tension`` [N/m] from the ``[material]`` table and
        ``solid_density`` [kg/m3] from the ``[material_density]`` table.

    Examples
    --------
    >>> row = packing_data("berl_saddle_ceramic_25")
    >>> row["specific_area"], row["critical_surface_tension"]
    (260.0, 0.061)
    """
    table = _table()
    if name not in packing_names():
        raise ValueError(f"unknown packing {name!r}; known packings: {', '.join(packing_names())}")
    row = dict(table[name])
    row["critical_surface_tension"] = float(table["material"][row["material"]])
    row["solid_density"] = float(table["material_density"][row["material"]])
    return row


# ---------------------------------------------------------------------------
# transfer units (Colburn)
# ---------------------------------------------------------------------------


def _log1p_ratio(z):
    """ln(1 + z) / z, equal to 1 at z = 0 and accurate near it."""
    safe = np.where(z == 0.0, 1.0, z)
    return np.where(z == 0.0, 1.0, np.log1p(safe) / safe)


def _expm1_ratio(x):
    """(e^x - 1) / x, equal to 1 at x = 0 and accurate near it."""
    safe = np.where(x == 0.0, 1.0, x)
    return np.where(x == 0.0, 1.0, np.expm1(safe) / safe)


def transfer_units(factor, fraction, *, strict=True):
    r"""Overall transfer units of a dilute countercurrent column (Colburn).

    With the straight equilibrium line, the straight operating line and
    ``F`` the absorption factor (absorber, gas-phase units N_OG) or the
    stripping factor (stripper, liquid-phase units N_OL):

        N = ln[(1 - 1/F) / phi + 1/F] / (1 - 1/F),      N = (1 - phi) / phi  at F = 1

    evaluated as N = r ln(1 + u r) / (u r) with u = 1 - 1/F and
    r = (1 - phi) / phi, so it is exact at F = 1 and smooth through it.

    Parameters
    ----------
    factor : array_like
        Absorption factor A = L / (m V) or stripping factor S = m V / L [-], > 0.
    fraction : array_like
        Driving-force fraction remaining phi [-], in (0, 1): for an absorber
        (y_out - m x_in) / (y_in - m x_in), for a stripper
        (x_out - y_in/m) / (x_in - y_in/m).
    strict : bool
        If True, raise :class:`towercost.models.kremser.UnreachableTarget`
        where F < 1 and phi <= 1 - F (no height reaches it); if False,
        return inf there.

    Returns
    -------
    ndarray
        N_OG or N_OL [-].

    Notes
    -----
    Holds for a dilute solute (linear equilibrium, constant molar flows).
    Source: A. P. Colburn, Trans. AIChE 35, 211 (1939); in the form of
    Seader, Henley and Roper, Separation Process Principles, 3rd ed. (2011),
    Section 6.8 (section number from memory).

    Examples
    --------
    >>> round(float(transfer_units(1.0, 0.1)), 12)
    9.0
    >>> round(float(transfer_units(2.0, 0.2)), 6)     # 2 ln 3
    2.197225
    """
    factor, fraction = _arrays(factor, fraction)
    if np.any(~(factor > 0.0)):
        raise ValueError("the absorption or stripping factor must be > 0")
    if np.any(~((fraction > 0.0) & (fraction < 1.0))):
        raise ValueError("the fraction remaining must lie strictly between 0 and 1")
    u = (factor - 1.0) / factor  # 1 - 1/F, exact near F = 1
    ratio = (1.0 - fraction) / fraction
    z = u * ratio
    unreachable = z <= -1.0
    if strict and np.any(unreachable):
        best = np.where(factor < 1.0, 1.0 - factor, 0.0)
        i = int(np.flatnonzero(unreachable.reshape(-1))[0])
        raise UnreachableTarget(
            f"fraction remaining {fraction.reshape(-1)[i]:.6g} cannot be reached at factor "
            f"{factor.reshape(-1)[i]:.6g}: even an unlimited height leaves 1 - F = {best.reshape(-1)[i]:.6g}",
            best,
        )
    z = np.where(unreachable, 0.0, z)
    return np.where(unreachable, np.inf, ratio * _log1p_ratio(z))


def transfer_units_gas(absorption_factor, fraction, *, strict=True):
    r"""Overall gas-phase transfer units N_OG of an absorber (Colburn).

        N_OG = ln[(1 - 1/A) (y_in - m x_in)/(y_out - m x_in) + 1/A] / (1 - 1/A)

    Parameters
    ----------
    absorption_factor : array_like
        A = L / (m V) [-], > 0.
    fraction : array_like
        phi = (y_out - m x_in) / (y_in - m x_in) [-], in (0, 1).
    strict : bool
        See :func:`transfer_units`.

    Returns
    -------
    ndarray
        N_OG [-].

    Notes
    -----
    Same relation and source as :func:`transfer_units`.

    Examples
    --------
    >>> round(float(transfer_units_gas(1.6, 0.02)), 4)
    7.9040
    """
    return transfer_units(absorption_factor, fraction, strict=strict)


def transfer_units_liquid(stripping_factor, fraction, *, strict=True):
    r"""Overall liquid-phase transfer units N_OL of a stripper (Colburn).

        N_OL = S/(S - 1) ln[(S - 1)/S (x_in - y_in/m)/(x_out - y_in/m) + 1/S]

    Parameters
    ----------
    stripping_factor : array_like
        S = m V / L [-], > 0.
    fraction : array_like
        phi = (x_out - y_in/m) / (x_in - y_in/m) [-], in (0, 1).
    strict : bool
        See :func:`transfer_units`.

    Returns
    -------
    ndarray
        N_OL [-].

    Notes
    -----
    Same relation and source as :func:`transfer_units`; it is the form used
    for air strippers, e.g. Kuo, Practical Design Calculations for
    Groundwater and Soil Remediation, 2nd ed. (2014), Eq. (6.24).

    Examples
    --------
    >>> round(float(transfer_units_liquid(3.0, 0.001)), 4)     # 1.5 ln(2001/3)
    9.7542
    """
    return transfer_units(stripping_factor, fraction, strict=strict)


def fraction_remaining_packed(factor, transfer_units):
    r"""Driving-force fraction left by a column of N overall transfer units.

    Inverse of :func:`transfer_units`:

        phi = (1 - 1/F) / (exp(N (1 - 1/F)) - 1/F),      phi = 1 / (1 + N) at F = 1

    evaluated as phi = 1 / (1 + N (e^x - 1)/x) with x = N (1 - 1/F) for
    x <= 1, and as phi = u e^{-x} / (u e^{-x} - expm1(-x)) above, so it never
    overflows.

    Parameters
    ----------
    factor : array_like
        Absorption factor (N = N_OG) or stripping factor (N = N_OL) [-], > 0.
    transfer_units : array_like
        N [-], >= 0.

    Returns
    -------
    ndarray
        phi [-], in (0, 1].

    Source: Colburn, Trans. AIChE 35, 211 (1939).

    Examples
    --------
    >>> round(float(fraction_remaining_packed(1.0, 9.0)), 12)
    0.1
    >>> round(float(fraction_remaining_packed(2.0, 2.0 * np.log(3.0))), 12)
    0.2
    """
    factor, count = _arrays(factor, transfer_units)
    if np.any(~(factor > 0.0)) or np.any(~(count >= 0.0)):
        raise ValueError("the factor must be > 0 and the transfer units >= 0")
    u = (factor - 1.0) / factor
    x = count * u
    low = x <= 1.0
    x_low = np.where(low, x, 0.0)
    phi_low = 1.0 / (1.0 + count * _expm1_ratio(x_low))
    x_high = np.where(low, 1.0, x)
    decay = np.exp(-x_high)
    phi_high = u * decay / (u * decay - np.expm1(-x_high))
    return np.where(low, phi_low, phi_high)


def htu_from_capacity_coefficient(superficial_velocity, capacity_coefficient):
    r"""Height of a transfer unit from a volumetric mass-transfer coefficient.

        H = u / (K a)

    Parameters
    ----------
    superficial_velocity : array_like
        Superficial velocity of the phase the units are based on [m/s]
        (liquid loading Q_L / A for H_OL).
    capacity_coefficient : array_like
        Overall capacity coefficient K a on the same basis [1/s], > 0.

    Returns
    -------
    ndarray
        H [m].

    Source: Kuo, Practical Design Calculations for Groundwater and Soil
    Remediation, 2nd ed. (2014), Eq. (6.23).

    Examples
    --------
    >>> round(float(htu_from_capacity_coefficient(0.0377, 0.01)), 6)
    3.77
    """
    return np.asarray(superficial_velocity, dtype=float) / np.asarray(capacity_coefficient, dtype=float)


def overall_htu_gas(gas_film_htu, liquid_film_htu, slope_ratio):
    r"""Overall gas-phase height of a transfer unit from the two film heights.

        H_OG = H_G + lambda H_L,        lambda = m V / L  (= 1/A)

    Parameters
    ----------
    gas_film_htu, liquid_film_htu : array_like
        H_G and H_L [m].
    slope_ratio : array_like
        lambda = m V / L [-], > 0.

    Returns
    -------
    ndarray
        H_OG [m].

    Notes
    -----
    Two-film resistances in series with a straight equilibrium line.
    Source: Seader, Henley and Roper, Separation Process Principles, 3rd ed.
    (2011), Section 6.8 (section number from memory); Wang et al., Air
    Pollution Control Engineering (Humana, 2004), Ch. 5, Eq. (15).

    Examples
    --------
    >>> round(float(overall_htu_gas(2.06, 1.29, 1 / 1.6)), 5)
    2.86625
    """
    return np.asarray(gas_film_htu, dtype=float) + np.asarray(slope_ratio, dtype=float) * np.asarray(
        liquid_film_htu, dtype=float
    )


def overall_htu_liquid(gas_film_htu, liquid_film_htu, slope_ratio):
    r"""Overall liquid-phase height of a transfer unit from the two film heights.

        H_OL = H_L + H_G / lambda,      lambda = m V / L  (= S)

    Parameters
    ----------
    gas_film_htu, liquid_film_htu : array_like
        H_G and H_L [m].
    slope_ratio : array_like
        lambda = m V / L [-], > 0.

    Returns
    -------
    ndarray
        H_OL [m], equal to H_OG / lambda.

    Notes
    -----
    Source: as :func:`overall_htu_gas`. N_OL H_OL = N_OG H_OG for the same
    column.

    Examples
    --------
    >>> round(float(overall_htu_liquid(0.5, 0.6, 3.0)), 6)
    0.766667
    """
    return np.asarray(liquid_film_htu, dtype=float) + np.asarray(gas_film_htu, dtype=float) / np.asarray(
        slope_ratio, dtype=float
    )


def hetp(overall_gas_htu, slope_ratio):
    r"""Height equivalent to a theoretical plate from H_OG.

        HETP = H_OG ln(lambda) / (lambda - 1),      HETP = H_OG at lambda = 1

    evaluated as H_OG ln(1 + d) / d with d = lambda - 1.

    Parameters
    ----------
    overall_gas_htu : array_like
        H_OG [m].
    slope_ratio : array_like
        lambda = m V / L [-], > 0.

    Returns
    -------
    ndarray
        HETP [m].

    Notes
    -----
    Straight equilibrium and operating lines. Then the packed height is
    both N_OG H_OG and N_stages HETP, with N_stages from the Kremser
    relation. Source: Seader, Henley and Roper, Separation Process
    Principles, 3rd ed. (2011), Section 6.8 (value from memory for the
    section).

    Examples
    --------
    >>> round(float(hetp(1.0, 1.0)), 12)
    1.0
    >>> round(float(hetp(1.0, 2.0)), 6)     # ln 2
    0.693147
    """
    height, ratio = _arrays(overall_gas_htu, slope_ratio)
    if np.any(~(ratio > 0.0)):
        raise ValueError("the slope ratio m V / L must be > 0")
    return height * _log1p_ratio(ratio - 1.0)


# ---------------------------------------------------------------------------
# film coefficients and wetted area (Onda, Takeuchi and Okumoto 1968)
# ---------------------------------------------------------------------------

_ONDA_WETTED_LIMITS = {  # Onda et al. (1968) range of their data (value from memory)
    "liquid Reynolds number L/(a mu_L)": (0.04, 500.0),
    "liquid Weber number L^2/(rho_L sigma a)": (1.2e-8, 0.27),
    "liquid Froude number L^2 a/(rho_L^2 g)": (2.5e-9, 1.8e-2),
    "critical / liquid surface tension": (0.3, 2.0),
}


def onda_wetted_area(
    liquid_mass_flux,
    specific_area,
    liquid_density,
    liquid_viscosity,
    surface_tension,
    critical_surface_tension,
    *,
    warnings: list[str] | None = None,
):
    r"""Wetted area of a random packing (Onda, Takeuchi and Okumoto 1968).

        a_w / a = 1 - exp[-1.45 (sigma_c/sigma)^0.75 Re^0.1 Fr^-0.05 We^0.2]

        Re = L / (a mu_L),  Fr = L^2 a / (rho_L^2 g),  We = L^2 / (rho_L sigma a)

    Parameters
    ----------
    liquid_mass_flux : array_like
        Superficial liquid mass flux L [kg/(m2 s)], > 0.
    specific_area : array_like
        Dry packing area a [m2/m3].
    liquid_density : array_like
        rho_L [kg/m3].
    liquid_viscosity : array_like
        mu_L [Pa s].
    surface_tension : array_like
        sigma [N/m].
    critical_surface_tension : array_like
        sigma_c of the packing material [N/m] (``[material]`` table).
    warnings : list of str, optional
        Receives a message for use outside the range of the data.

    Returns
    -------
    ndarray
        a_w [m2/m3], below a.

    Notes
    -----
    Fitted to Raschig rings, Berl saddles, spheres and rods of ceramic,
    glass, PVC, carbon and wax-coated material, 0.04 < Re < 500,
    1.2e-8 < We < 0.27, 2.5e-9 < Fr < 1.8e-2, 0.3 < sigma_c/sigma < 2
    (ranges value from memory); about +-20 % on a_w. The wetted area is
    taken as the interfacial area for both films, as Onda did.

    Source: K. Onda, H. Takeuchi and Y. Okumoto, J. Chem. Eng. Japan 1(1),
    56-62 (1968), Eq. (4) (equation number from memory).

    Examples
    --------
    >>> round(float(onda_wetted_area(5.0, 260.0, 998.0, 1.0e-3, 0.072, 0.061)), 3)
    125.693
    """
    flux, area, rho, mu, sigma, sigma_c = _arrays(
        liquid_mass_flux, specific_area, liquid_density, liquid_viscosity, surface_tension,
        critical_surface_tension,
    )
    reynolds = flux / (area * mu)
    froude = flux**2 * area / (rho**2 * GRAVITY)
    weber = flux**2 / (rho * sigma * area)
    ratio = sigma_c / sigma
    for (what, (low, high)), values in zip(
        _ONDA_WETTED_LIMITS.items(), (reynolds, weber, froude, ratio), strict=True
    ):
        check_range(what, values, low, high, "-", _ONDA_SOURCE, warnings)
    exponent = -1.45 * ratio**0.75 * reynolds**0.1 * froude**-0.05 * weber**0.2
    return area * -np.expm1(exponent)


def onda_liquid_coefficient(
    liquid_mass_flux,
    wetted_area,
    specific_area,
    nominal_size,
    liquid_density,
    liquid_viscosity,
    liquid_diffusivity,
):
    r"""Liquid-film mass-transfer coefficient of a random packing (Onda 1968).

        k_L (rho_L / (mu_L g))^(1/3) = 0.0051 (L / (a_w mu_L))^(2/3) Sc_L^(-1/2) (a d_p)^0.4

    Parameters
    ----------
    liquid_mass_flux : array_like
        L [kg/(m2 s)].
    wetted_area : array_like
        a_w [m2/m3], from :func:`onda_wetted_area`.
    specific_area : array_like
        a [m2/m3].
    nominal_size : array_like
        d_p [m].
    liquid_density : array_like
        rho_L [kg/m3].
    liquid_viscosity : array_like
        mu_L [Pa s].
    liquid_diffusivity : array_like
        D_L [m2/s].

    Returns
    -------
    ndarray
        k_L [m/s].

    Notes
    -----
    Dimensionless as written, so any consistent units serve. Range as
    :func:`onda_wetted_area`; about +-20 % on k_L (Onda), +-30 % for VOC
    air strippers (Staudinger et al., value from memory).

    Source: Onda, Takeuchi and Okumoto, J. Chem. Eng. Japan 1(1), 56 (1968),
    Eq. (2) (equation number from memory).

    Examples
    --------
    >>> round(float(onda_liquid_coefficient(5.0, 125.7, 260.0, 0.025, 998.0, 1.0e-3, 1.0e-9)) * 1e4, 4)
    0.8502
    """
    flux, wetted, area, size, rho, mu, diffusivity = _arrays(
        liquid_mass_flux, wetted_area, specific_area, nominal_size, liquid_density, liquid_viscosity,
        liquid_diffusivity,
    )
    schmidt = mu / (rho * diffusivity)
    group = 0.0051 * (flux / (wetted * mu)) ** (2.0 / 3.0) * schmidt**-0.5 * (area * size) ** 0.4
    return group * (mu * GRAVITY / rho) ** (1.0 / 3.0)


#: Onda's constant of the gas-film correlation: 5.23, or 2.00 for packings
#: smaller than 15 mm.
ONDA_SMALL_PACKING = 0.015


def onda_gas_coefficient(
    gas_mass_flux,
    specific_area,
    nominal_size,
    gas_density,
    gas_viscosity,
    gas_diffusivity,
):
    r"""Gas-film mass-transfer coefficient of a random packing (Onda 1968).

        k_G R T / (a D_G) = C (G / (a mu_G))^0.7 Sc_G^(1/3) (a d_p)^-2.0

    with C = 5.23, or 2.00 for d_p < 15 mm. The left side is the coefficient
    as a velocity, k_c = k_G R T [m/s], returned here; k_G = k_c / (R T)
    [mol/(m2 s Pa)].

    Parameters
    ----------
    gas_mass_flux : array_like
        G [kg/(m2 s)].
    specific_area : array_like
        a [m2/m3].
    nominal_size : array_like
        d_p [m].
    gas_density : array_like
        rho_G [kg/m3].
    gas_viscosity : array_like
        mu_G [Pa s].
    gas_diffusivity : array_like
        D_G [m2/s].

    Returns
    -------
    ndarray
        k_c [m/s].

    Notes
    -----
    Based on the dry area a (not a_w), as Onda correlated it. Range as
    :func:`onda_wetted_area`.

    Source: Onda, Takeuchi and Okumoto, J. Chem. Eng. Japan 1(1), 56 (1968),
    Eq. (3) (equation number from memory).

    Examples
    --------
    >>> round(float(onda_gas_coefficient(1.2, 260.0, 0.025, 1.2, 1.8e-5, 1.0e-5)), 5)
    0.01789
    """
    flux, area, size, rho, mu, diffusivity = _arrays(
        gas_mass_flux, specific_area, nominal_size, gas_density, gas_viscosity, gas_diffusivity
    )
    constant = np.where(size < ONDA_SMALL_PACKING, 2.00, 5.23)
    schmidt = mu / (rho * diffusivity)
    return constant * (flux / (area * mu)) ** 0.7 * schmidt ** (1.0 / 3.0) * (area * size) ** -2.0 * area * diffusivity


class FilmHeights(NamedTuple):
    """Film heights of a transfer unit [m] and the wetted area [m2/m3] they rest on."""

    gas: np.ndarray
    liquid: np.ndarray
    wetted_area: np.ndarray


def onda_film_heights(
    gas_mass_flux,
    liquid_mass_flux,
    gas_density,
    liquid_density,
    gas_viscosity,
    liquid_viscosity,
    gas_diffusivity,
    liquid_diffusivity,
    surface_tension,
    specific_area,
    nominal_size,
    critical_surface_tension,
    *,
    warnings: list[str] | None = None,
) -> FilmHeights:
    r"""Film heights H_G and H_L of a random packing from the Onda correlations.

        H_G = G / (rho_G k_c a_w),        H_L = L / (rho_L k_L a_w)

    with a_w, k_L and k_c from :func:`onda_wetted_area`,
    :func:`onda_liquid_coefficient` and :func:`onda_gas_coefficient`.
    For an ideal gas this is the usual H_G = G_M / (k_G a_w P), since
    G / rho_G = G_M R T / P and k_c = k_G R T.

    Parameters
    ----------
    gas_mass_flux, liquid_mass_flux : array_like
        G and L, superficial [kg/(m2 s)].
    gas_density, liquid_density : array_like
        [kg/m3].
    gas_viscosity, liquid_viscosity : array_like
        [Pa s].
    gas_diffusivity, liquid_diffusivity : array_like
        Solute diffusivity in each phase [m2/s].
    surface_tension : array_like
        Liquid surface tension [N/m].
    specific_area : array_like
        a [m2/m3].
    nominal_size : array_like
        d_p [m].
    critical_surface_tension : array_like
        sigma_c of the packing material [N/m].
    warnings : list of str, optional
        Out-of-range messages of the wetted-area correlation.

    Returns
    -------
    FilmHeights
        (gas [m], liquid [m], wetted_area [m2/m3]).

    Source: Onda, Takeuchi and Okumoto, J. Chem. Eng. Japan 1(1), 56 (1968).

    Examples
    --------
    >>> h = onda_film_heights(1.2, 5.0, 1.2, 998.0, 1.8e-5, 1.0e-3, 1.0e-5, 1.0e-9, 0.072, 260.0, 0.025, 0.061)
    >>> round(float(h.gas), 4), round(float(h.liquid), 4)
    (0.4447, 0.4688)
    """
    wetted = onda_wetted_area(
        liquid_mass_flux, specific_area, liquid_density, liquid_viscosity, surface_tension,
        critical_surface_tension, warnings=warnings,
    )
    k_liquid = onda_liquid_coefficient(
        liquid_mass_flux, wetted, specific_area, nominal_size, liquid_density, liquid_viscosity,
        liquid_diffusivity,
    )
    k_gas = onda_gas_coefficient(
        gas_mass_flux, specific_area, nominal_size, gas_density, gas_viscosity, gas_diffusivity
    )
    gas_height = np.asarray(gas_mass_flux, dtype=float) / (np.asarray(gas_density, dtype=float) * k_gas * wetted)
    liquid_height = np.asarray(liquid_mass_flux, dtype=float) / (
        np.asarray(liquid_density, dtype=float) * k_liquid * wetted
    )
    return FilmHeights(gas_height, liquid_height, wetted)


# ---------------------------------------------------------------------------
# capacity and pressure drop (Stichlmair, Bravo and Fair 1989)
# ---------------------------------------------------------------------------


def _dry_terms(gas_velocity, gas_density, gas_viscosity, voidage, specific_area, c1, c2, c3):
    """Dry pressure gradient [Pa/m] and the exponent c of the friction factor."""
    particle = 6.0 * (1.0 - voidage) / specific_area
    reynolds = gas_velocity * gas_density * particle / gas_viscosity
    root = np.sqrt(reynolds)
    friction = c1 / reynolds + c2 / root + c3
    exponent = (-c1 / reynolds - c2 / (2.0 * root)) / friction
    gradient = 0.75 * friction * (1.0 - voidage) / voidage**4.65 * gas_density * gas_velocity**2 / particle
    return gradient, exponent


def dry_pressure_drop(gas_velocity, gas_density, gas_viscosity, voidage, specific_area, c1, c2, c3):
    r"""Pressure drop per metre of dry packing (Stichlmair, Bravo and Fair 1989).

        dP_dry / H = (3/4) f_0 (1 - eps) / eps^4.65 rho_G u_G^2 / d_p
        f_0 = C1 / Re + C2 / Re^0.5 + C3,   Re = u_G d_p rho_G / mu_G,   d_p = 6 (1 - eps) / a

    Parameters
    ----------
    gas_velocity : array_like
        Superficial gas velocity u_G [m/s], > 0.
    gas_density : array_like
        rho_G [kg/m3].
    gas_viscosity : array_like
        mu_G [Pa s].
    voidage : array_like
        eps [-].
    specific_area : array_like
        a [m2/m3].
    c1, c2, c3 : array_like
        Packing constants of the model [-].

    Returns
    -------
    ndarray
        dP_dry / H [Pa/m].

    Source: J. Stichlmair, J. L. Bravo and J. R. Fair, Gas Sep. Purif. 3,
    19-28 (1989), Eqs. (5)-(7) (equation numbers from memory).

    Examples
    --------
    >>> round(float(dry_pressure_drop(0.4, 5.0, 5e-5, 0.68, 260.0, 32.0, 7.0, 1.0)), 4)
    236.809
    """
    u, rho, mu, eps, area, k1, k2, k3 = _arrays(
        gas_velocity, gas_density, gas_viscosity, voidage, specific_area, c1, c2, c3
    )
    gradient, _ = _dry_terms(u, rho, mu, eps, area, k1, k2, k3)
    return gradient


def _holdup_factor(holdup, voidage, exponent):
    """ln of [(1 - eps + h)/(1 - eps)]^((2 + c)/3) [eps/(eps - h)]^4.65."""
    power = (2.0 + exponent) / 3.0
    return power * np.log1p(holdup / (1.0 - voidage)) - 4.65 * np.log1p(-holdup / voidage)


def _holdup_slopes(holdup, voidage, power):
    """First and second derivatives in h of the holdup factor ln G(h) of ``_holdup_factor``."""
    solid = 1.0 - voidage + holdup
    free = voidage - holdup
    return power / solid + 4.65 / free, 4.65 / (free * free) - power / (solid * solid)


def _safeguarded(value, low, high):
    """``value`` where it lies strictly inside (low, high), else the midpoint of the bracket."""
    inside = (value > low) & (value < high)
    return np.where(inside, value, 0.5 * (low + high))


def _newton_step(x, step, low, high):
    """The next iterate and whether it has converged: x - step, bisecting where it leaves (low, high).

    A step below the tolerance is taken as it is (the root is then at x to
    rounding, and x may sit on an end of the bracket).
    """
    small = np.abs(step) < _LOG_TOLERANCE
    new = np.where(small, x - np.where(small, step, 0.0), _safeguarded(x - step, low, high))
    return new, small


def _flood_head(static_holdup, voidage, exponent, start=None):
    """ln of the head gradient p_f [m/m] where the operating curve turns back (flood), per point.

    Root in (0, p_max) of 40 h0 p^2 [k/(1 - eps + h) + 4.65/(eps - h)] = 1,
    h = h0 (1 + 20 p^2), k = (2 + c)/3, whose left side rises with p; solved
    for y = ln p by Newton's method, kept inside a bracket by bisection.
    ``start`` is a first guess of y (the last root, when a velocity is being
    searched); without it the root with Phi' taken at the static holdup.
    """
    power = (2.0 + exponent) / 3.0
    high = 0.5 * np.log((voidage / static_holdup - 1.0) / 20.0)     # h reaches the voidage there
    low = high - 40.0
    base = np.log(40.0 * static_holdup)
    if start is None:
        first, _ = _holdup_slopes(static_holdup, voidage, power)
        start = -0.5 * (base + np.log(first))
    y = _safeguarded(start, low, high)
    done = np.zeros(y.shape, bool)
    for _ in range(_MAX_STEPS):
        square = np.exp(2.0 * y)
        holdup = static_holdup * (1.0 + 20.0 * square)
        first, second = _holdup_slopes(holdup, voidage, power)
        residual = base + 2.0 * y + np.log(first)
        below = residual < 0.0
        low = np.where(below, y, low)
        high = np.where(below, high, y)
        slope = 2.0 + second / first * 40.0 * static_holdup * square
        step = np.where(slope > 0.0, residual / np.where(slope > 0.0, slope, 1.0), np.nan)
        new, converged = _newton_step(y, step, low, high)
        y = np.where(done, y, new)          # a converged point keeps its root: no other point changes it
        done |= converged
        if np.all(done):
            break
    return y


def _operating_head(log_dry, static_holdup, voidage, exponent, log_flood):
    """ln of the operating head gradient: the root of ln p_dry + ln G(h(p)) - ln p below the flood head.

    The residual falls from > 0 at the dry value to its least at the flood
    head; Newton's method from the dry value, kept inside [ln p_dry, ln p_f]
    by bisection, finds the operating root (the only one in that bracket).
    Points without liquid (h0 = 0) return the dry value.
    """
    low, high = log_dry.copy(), np.maximum(log_flood, log_dry)
    x = log_dry.copy()
    done = np.zeros(x.shape, bool)
    for _ in range(_MAX_STEPS):
        square = np.exp(2.0 * x)
        holdup = static_holdup * (1.0 + 20.0 * square)
        residual = log_dry + _holdup_factor(holdup, voidage, exponent) - x
        left = residual > 0.0
        low = np.where(left, x, low)
        high = np.where(left, high, x)
        first, _ = _holdup_slopes(holdup, voidage, (2.0 + exponent) / 3.0)
        slope = first * 40.0 * static_holdup * square - 1.0
        step = np.where(slope < 0.0, residual / np.where(slope < 0.0, slope, -1.0), np.nan)
        new, converged = _newton_step(x, np.where(residual == 0.0, 0.0, step), low, high)
        x = np.where(done, x, new)          # a converged point keeps its root: no other point changes it
        done |= converged
        if np.all(done):
            break
    return x


def _exponent_slope(reynolds, c1, c2, c3):
    """d c / d ln Re of the friction-factor exponent c = d ln f_0 / d ln Re (see ``_dry_terms``)."""
    root = np.sqrt(reynolds)
    friction = c1 / reynolds + c2 / root + c3
    exponent = (-c1 / reynolds - c2 / (2.0 * root)) / friction
    return (c1 / reynolds + c2 / (4.0 * root)) / friction - exponent * exponent


def _velocity_root(residual, low, high, start):
    """Root of increasing residuals in ln u_G per point: Newton's method kept inside [low, high] by bisection.

    ``residual(w, state)`` returns (value, slope, state) at w = ln u_G, the
    value +inf where the bed is flooded outright; ``state`` carries a warm
    start between steps. Returns (w, state at w).
    """
    w = _safeguarded(start, low, high)
    state = None
    done = np.zeros(w.shape, bool)
    for _ in range(_MAX_STEPS):
        value, slope, state = residual(w, state)
        right = value >= 0.0
        high = np.where(right, w, high)
        low = np.where(right, low, w)
        usable = np.isfinite(value) & (slope > 0.0)
        step = np.where(usable, value / np.where(usable, slope, 1.0), np.nan)
        new, converged = _newton_step(w, np.where(value == 0.0, 0.0, step), low, high)
        w = np.where(done, w, new)          # a converged point keeps its root: no other point changes it
        done |= converged | (high - low < _LOG_TOLERANCE)
        if np.all(done):
            break
    return w, residual(w, state)[2]


def _flood_residual(ratio, fixed_liquid, rho_g, rho_l, mu_g, eps, area, c1, c2, c3):
    """The flood margin M(w) = ln p_dry + ln G(h_f) - ln p_f and its slope in w = ln u_G.

    With the flood head p_f where d/dp of the operating equation vanishes,
    dM/dw is the partial derivative at fixed p_f (envelope theorem):
    (2 + c) + Phi'(h) h dln(h0)/dw + ln(1 + h/(1 - eps)) (dc/dlnRe)/3,
    dln(h0)/dw = 2/3 when u_L = ratio u_G, 0 when ``fixed_liquid`` holds u_L.
    """
    particle = 6.0 * (1.0 - eps) / area

    def residual(w, start):
        u_g = np.exp(w)
        u_l = fixed_liquid if fixed_liquid is not None else ratio * u_g
        dry, exponent = _dry_terms(u_g, rho_g, mu_g, eps, area, c1, c2, c3)
        static = 0.555 * np.cbrt(u_l**2 * area / (GRAVITY * eps**4.65))
        usable = static < eps
        safe = np.where(usable, static, 0.5 * eps)
        y = _flood_head(safe, eps, exponent, start)
        holdup = safe * (1.0 + 20.0 * np.exp(2.0 * y))
        value = np.log(dry / (rho_l * GRAVITY)) + _holdup_factor(holdup, eps, exponent) - y
        first, _ = _holdup_slopes(holdup, eps, (2.0 + exponent) / 3.0)
        reynolds = u_g * rho_g * particle / mu_g
        slope = (2.0 + exponent + first * holdup * (0.0 if fixed_liquid is not None else 2.0 / 3.0)
                 + np.log1p(holdup / (1.0 - eps)) * _exponent_slope(reynolds, c1, c2, c3) / 3.0)
        return np.where(usable, value, np.inf), slope, y

    return residual


def _stichlmair_state(gas_velocity, liquid_velocity, gas_density, liquid_density, gas_viscosity, voidage,
                      specific_area, c1, c2, c3):
    """Dry head gradient, static holdup, flood head, exponent and the flood margin.

    Heads are pressure gradients over rho_L g [m/m]. The margin is
    ln(p_dry G(p_f)) - ln(p_f): < 0 below flood (the irrigated equation has
    its operating root below p_f), >= 0 at or above flood.
    """
    dry, exponent = _dry_terms(gas_velocity, gas_density, gas_viscosity, voidage, specific_area, c1, c2, c3)
    dry_head = dry / (liquid_density * GRAVITY)
    froude = liquid_velocity**2 * specific_area / (GRAVITY * voidage**4.65)
    static = 0.555 * np.cbrt(froude)
    # No flood without liquid; a static holdup filling the voids is flooded outright.
    usable = (static > 0.0) & (static < voidage)
    safe = np.where(usable, static, 0.5 * voidage)
    flood_head = np.exp(_flood_head(safe, voidage, exponent))
    holdup = safe * (1.0 + 20.0 * flood_head**2)
    margin = np.log(dry_head) + _holdup_factor(holdup, voidage, exponent) - np.log(flood_head)
    margin = np.where(usable, margin, np.where(static > 0.0, np.inf, -np.inf))
    return dry_head, static, flood_head, exponent, margin


def irrigated_pressure_drop(
    gas_velocity,
    liquid_velocity,
    gas_density,
    liquid_density,
    gas_viscosity,
    voidage,
    specific_area,
    c1,
    c2,
    c3,
    *,
    warnings: list[str] | None = None,
):
    r"""Pressure drop per metre of irrigated packing (Stichlmair, Bravo and Fair 1989).

        dP/H = dP_dry/H [(1 - eps + h_T)/(1 - eps)]^((2 + c)/3) [eps/(eps - h_T)]^4.65
        h_T  = h_0 [1 + 20 (dP / (H rho_L g))^2],   h_0 = 0.555 Fr_L^(1/3),
        Fr_L = u_L^2 a / (g eps^4.65),   c = (-C1/Re - C2/(2 Re^0.5)) / f_0

    with dP_dry/H from :func:`dry_pressure_drop`. The implicit equation in
    dP/H has its operating root between the dry value and the flood head
    p_f; it is found there by Newton's method on the logarithm, kept inside
    that bracket (the root is the only one in it).

    Parameters
    ----------
    gas_velocity, liquid_velocity : array_like
        Superficial velocities u_G, u_L [m/s] (u_L >= 0).
    gas_density, liquid_density : array_like
        rho_G, rho_L [kg/m3].
    gas_viscosity : array_like
        mu_G [Pa s].
    voidage, specific_area, c1, c2, c3 : array_like
        Packing data, see :func:`dry_pressure_drop`.
    warnings : list of str, optional
        Receives a message where a point is at or above flood.

    Returns
    -------
    ndarray
        dP/H [Pa/m]; inf at or above flood.

    Notes
    -----
    Holds from the dry bed through the loading region up to flood; above
    flood there is no steady operating point. Source: Stichlmair, Bravo and
    Fair, Gas Sep. Purif. 3, 19 (1989), Eqs. (14)-(16) as corrected by Piche,
    Larachi and Grandjean, Can. J. Chem. Eng. 79, 584 (2001) (equation numbers
    from memory); same form as fluids.packed_tower.Stichlmair_wet.

    Examples
    --------
    >>> round(float(irrigated_pressure_drop(0.4, 5e-3, 5.0, 1200.0, 5e-5, 0.68, 260.0, 32.0, 7.0, 1.0)), 3)
    539.877
    """
    u_g, u_l, rho_g, rho_l, mu_g, eps, area, k1, k2, k3 = _arrays(
        gas_velocity, liquid_velocity, gas_density, liquid_density, gas_viscosity, voidage, specific_area,
        c1, c2, c3,
    )
    dry_head, static, flood_head, exponent, margin = _stichlmair_state(
        u_g, u_l, rho_g, rho_l, mu_g, eps, area, k1, k2, k3
    )
    flooded = margin >= 0.0
    if warnings is not None and np.any(flooded):
        warnings.append(
            f"{int(flooded.sum())} of {flooded.size} points are at or above flood for {_STICHLMAIR_SOURCE}; "
            "their pressure drop is given as inf"
        )
    wet = u_l > 0.0
    static = np.where(flooded | ~wet, 0.0, static)  # those points keep the dry value
    log_dry = np.log(dry_head)
    log_flood = np.where(flooded | ~wet, log_dry, np.log(flood_head))
    head = np.exp(_operating_head(log_dry, static, eps, exponent, log_flood))
    head = np.where(wet, head, dry_head)
    return np.where(flooded & wet, np.inf, head * rho_l * GRAVITY)


def flood_pressure_drop(
    gas_velocity,
    liquid_velocity,
    gas_density,
    liquid_density,
    gas_viscosity,
    voidage,
    specific_area,
    c1,
    c2,
    c3,
):
    r"""Pressure drop per metre where the operating curve turns back: the flood point's (Stichlmair et al. 1989).

        dP_f / H = rho_L g p_f,    40 h0 p_f^2 [((2 + c)/3)/(1 - eps + h_T) + 4.65/(eps - h_T)] = 1

    At a gas load below flood it is the most the bed can hold at that
    liquid load; at or above flood (where :func:`irrigated_pressure_drop`
    has no operating point and gives inf) it is a finite stand-in for the
    pressure drop of a flooded bed.

    Parameters
    ----------
    gas_velocity, liquid_velocity : array_like
        u_G, u_L [m/s] (u_L > 0).
    gas_density, liquid_density, gas_viscosity : array_like
        [kg/m3], [kg/m3], [Pa s].
    voidage, specific_area, c1, c2, c3 : array_like
        Packing data, see :func:`dry_pressure_drop`.

    Returns
    -------
    ndarray
        dP_f / H [Pa/m].

    Source: Stichlmair, Bravo and Fair, Gas Sep. Purif. 3, 19 (1989), flooding condition.

    Examples
    --------
    >>> at_flood = 0.63943235427469
    >>> head = flood_pressure_drop(at_flood, 5e-3, 5.0, 1200.0, 5e-5, 0.68, 260.0, 32.0, 7.0, 1.0)
    >>> wet = irrigated_pressure_drop(0.999 * at_flood, 5e-3, 5.0, 1200.0, 5e-5, 0.68, 260.0, 32.0, 7.0, 1.0)
    >>> bool(abs(float(wet) / float(head) - 1) < 0.1)
    True
    """
    u_g, u_l, rho_g, rho_l, mu_g, eps, area, k1, k2, k3 = _arrays(
        gas_velocity, liquid_velocity, gas_density, liquid_density, gas_viscosity, voidage, specific_area,
        c1, c2, c3,
    )
    flood_head = _stichlmair_state(u_g, u_l, rho_g, rho_l, mu_g, eps, area, k1, k2, k3)[2]
    return flood_head * rho_l * GRAVITY


def _flood_bracket(shape):
    low, high = _VELOCITY_BRACKET
    return np.full(shape, np.log(low)), np.full(shape, np.log(high))


def flooding_gas_velocity(
    liquid_velocity,
    gas_density,
    liquid_density,
    gas_viscosity,
    voidage,
    specific_area,
    c1,
    c2,
    c3,
):
    r"""Superficial gas velocity at flood for a given liquid load (Stichlmair et al. 1989).

    Flood is the gas load at which the irrigated pressure-drop equation of
    :func:`irrigated_pressure_drop` loses its operating root, i.e. where
    that equation and its derivative in dP/H vanish together:

        40 h_0 p^2 [((2 + c)/3)/(1 - eps + h_T) + 4.65/(eps - h_T)] = 1,
        p = dP / (H rho_L g)

    solved by Newton's method on ln u_G (kept inside 1e-4 to 100 m/s).

    Parameters
    ----------
    liquid_velocity : array_like
        Superficial liquid velocity u_L [m/s], > 0.
    gas_density, liquid_density : array_like
        [kg/m3].
    gas_viscosity : array_like
        [Pa s].
    voidage, specific_area, c1, c2, c3 : array_like
        Packing data, see :func:`dry_pressure_drop`.

    Returns
    -------
    ndarray
        u_G at flood [m/s].

    Source: Stichlmair, Bravo and Fair, Gas Sep. Purif. 3, 19 (1989),
    flooding condition; same model as fluids.packed_tower.Stichlmair_flood.

    Examples
    --------
    >>> round(float(flooding_gas_velocity(5e-3, 5.0, 1200.0, 5e-5, 0.68, 260.0, 32.0, 7.0, 1.0)), 6)
    0.639432
    """
    u_l, rho_g, rho_l, mu_g, eps, area, k1, k2, k3 = _arrays(
        liquid_velocity, gas_density, liquid_density, gas_viscosity, voidage, specific_area, c1, c2, c3
    )
    if np.any(~(u_l > 0.0)):
        raise ValueError("the liquid velocity must be > 0 for a flooding point")
    low, high = _flood_bracket(u_l.shape)
    residual = _flood_residual(None, u_l, rho_g, rho_l, mu_g, eps, area, k1, k2, k3)
    return np.exp(_velocity_root(residual, low, high, np.zeros(u_l.shape))[0])


def _area(diameter):
    return np.pi * diameter**2 / 4.0


def _flood_diameter(gas_volume_flow, liquid_volume_flow, rho_g, rho_l, mu_g, eps, area, k1, k2, k3):
    """Diameter at which the column floods with the given volume flows [m].

    Both velocities scale with 1/D^2, so the liquid velocity is the gas
    velocity times Q_L/Q_G; the flood gas velocity at that ratio is found on
    ln u_G, then D = sqrt(4 Q_G / (pi u_G)).
    """
    ratio = liquid_volume_flow / gas_volume_flow
    low, high = _flood_bracket(gas_volume_flow.shape)
    residual = _flood_residual(ratio, None, rho_g, rho_l, mu_g, eps, area, k1, k2, k3)
    velocity = np.exp(_velocity_root(residual, low, high, np.zeros(ratio.shape))[0])
    return np.sqrt(gas_volume_flow / velocity / (np.pi / 4.0))


def _pressure_limited_diameter(gas_volume_flow, liquid_volume_flow, rho_g, rho_l, mu_g, eps, area, k1, k2, k3,
                               limit):
    """Diameter at which the irrigated pressure drop equals ``limit`` [Pa/m] on its operating branch [m].

    At the limit the head p is known, so the holdup h = h0 (1 + 20 p^2) is
    explicit in the velocities and ln p_dry(u_G) + ln G(h) - ln p = 0 is one
    increasing equation in ln u_G (u_L = u_G Q_L/Q_G). Where its root lies
    past the flood head (on the unstable branch), the limit is never reached
    below flood and the flood diameter is returned.
    """
    ratio = liquid_volume_flow / gas_volume_flow
    head = limit / (rho_l * GRAVITY)
    log_head = np.log(head)
    particle = 6.0 * (1.0 - eps) / area
    low, high = _flood_bracket(gas_volume_flow.shape)

    def excess(w, _):
        u_g = np.exp(w)
        dry, exponent = _dry_terms(u_g, rho_g, mu_g, eps, area, k1, k2, k3)
        static = 0.555 * np.cbrt((ratio * u_g) ** 2 * area / (GRAVITY * eps**4.65))
        holdup = static * (1.0 + 20.0 * head * head)
        fits = holdup < eps
        safe = np.where(fits, holdup, 0.0)
        value = np.log(dry / (rho_l * GRAVITY)) + _holdup_factor(safe, eps, exponent) - log_head
        first, _ = _holdup_slopes(safe, eps, (2.0 + exponent) / 3.0)
        reynolds = u_g * rho_g * particle / mu_g
        slope = (2.0 + exponent + first * safe * 2.0 / 3.0
                 + np.log1p(safe / (1.0 - eps)) * _exponent_slope(reynolds, k1, k2, k3) / 3.0)
        return np.where(fits, value, np.inf), slope, None

    velocity = np.exp(_velocity_root(excess, low, high, np.zeros(ratio.shape))[0])
    state = _stichlmair_state(velocity, ratio * velocity, rho_g, rho_l, mu_g, eps, area, k1, k2, k3)
    flood = _flood_diameter(gas_volume_flow, liquid_volume_flow, rho_g, rho_l, mu_g, eps, area, k1, k2, k3)
    diameter = np.sqrt(gas_volume_flow / velocity / (np.pi / 4.0))
    stable = (state[-1] < 0.0) & (head <= state[2])
    return np.where(stable, np.maximum(diameter, flood), flood), flood


def fraction_of_flood(
    gas_mass_flow,
    liquid_mass_flow,
    diameter,
    gas_density,
    liquid_density,
    gas_viscosity,
    voidage,
    specific_area,
    c1,
    c2,
    c3,
):
    r"""Fraction of flood of a packed column of given diameter, at constant L/V.

        f = u_G / u_G,flood = (D_flood / D)^2

    where D_flood is the diameter at which the given gas and liquid flows
    flood the packing (both velocities scale with 1/D^2, so the ratio of
    liquid to gas load is kept, the usual basis for packed columns).

    Parameters
    ----------
    gas_mass_flow, liquid_mass_flow : array_like
        V and L [kg/s].
    diameter : array_like
        Inside diameter D [m].
    gas_density, liquid_density, gas_viscosity : array_like
        [kg/m3], [kg/m3], [Pa s].
    voidage, specific_area, c1, c2, c3 : array_like
        Packing data, see :func:`dry_pressure_drop`.

    Returns
    -------
    ndarray
        f [-].

    Source: flood point from Stichlmair, Bravo and Fair, Gas Sep. Purif. 3,
    19 (1989); fraction of flood at constant L/V: Kister, Distillation
    Design (McGraw-Hill, 1992), Ch. 8 (value from memory).

    Examples
    --------
    >>> round(float(fraction_of_flood(1.0, 10.0, 1.5, 1.2, 998.0, 1.8e-5, 0.68, 260.0, 32.0, 7.0, 1.0)), 4)
    0.5792
    """
    v, l, d, rho_g, rho_l, mu_g, eps, area, k1, k2, k3 = _arrays(
        gas_mass_flow, liquid_mass_flow, diameter, gas_density, liquid_density, gas_viscosity, voidage,
        specific_area, c1, c2, c3,
    )
    flood = _flood_diameter(v / rho_g, l / rho_l, rho_g, rho_l, mu_g, eps, area, k1, k2, k3)
    return (flood / d) ** 2


class PackedDiameter(NamedTuple):
    """Least diameters of a packed column [m], broadcast over the design points.

    ``required`` is the larger of ``by_flood`` and ``by_pressure_drop``;
    ``standard`` is it rounded up by ``hydraulics.standard_diameter``.
    ``pressure_drop`` is the irrigated pressure drop at ``standard`` [Pa/m];
    ``flood`` the diameter at which the column floods at these flows [m].
    """

    by_flood: np.ndarray
    by_pressure_drop: np.ndarray
    required: np.ndarray
    standard: np.ndarray
    pressure_drop: np.ndarray
    flood: np.ndarray


def packed_diameter(
    gas_mass_flow,
    liquid_mass_flow,
    gas_density,
    liquid_density,
    gas_viscosity,
    voidage,
    specific_area,
    c1,
    c2,
    c3,
    flood_fraction=0.70,
    max_pressure_drop=400.0,
    *,
    warnings: list[str] | None = None,
) -> PackedDiameter:
    r"""Least diameter meeting a fraction of flood and a pressure-drop limit.

        D_flood-limited = D_flood / sqrt(f)
        D_dP-limited    : dP/H (D) = (dP/H)_max,   dP/H from irrigated_pressure_drop
        D               = max of the two, then rounded by standard_diameter

    Both velocities scale with 1/D^2 at the given mass flows; the pressure
    gradient falls as D grows, and the diameter that meets the limit is
    found from the explicit form the model takes at a known pressure drop
    (see ``_pressure_limited_diameter``), by Newton's method on ln u_G.

    Parameters
    ----------
    gas_mass_flow, liquid_mass_flow : array_like
        Largest gas and liquid loads V, L [kg/s].
    gas_density, liquid_density : array_like
        [kg/m3].
    gas_viscosity : array_like
        [Pa s].
    voidage, specific_area, c1, c2, c3 : array_like
        Packing data, see :func:`dry_pressure_drop`.
    flood_fraction : array_like
        Design fraction of flood f [-], in (0, 1); 0.65 to 0.80 is common
        practice for random packings.
    max_pressure_drop : array_like
        Pressure-drop limit [Pa/m]; 200 to 400 Pa/m (0.25 to 0.5 in water per
        foot) is common practice for absorbers and strippers.
    warnings : list of str, optional
        Receives a message if the fraction of flood is outside (0.4, 0.9).

    Returns
    -------
    PackedDiameter

    Source: Stichlmair, Bravo and Fair, Gas Sep. Purif. 3, 19 (1989) for
    flood and pressure drop; sizing by both limits as in Seader, Henley and
    Roper, Separation Process Principles, 3rd ed. (2011), Section 6.8
    (value from memory).

    Examples
    --------
    >>> size = packed_diameter(1.0, 10.0, 1.2, 998.0, 1.8e-5, 0.68, 260.0, 32.0, 7.0, 1.0, 0.7, 250.0)
    >>> round(float(size.by_flood), 4), round(float(size.by_pressure_drop), 4), float(size.standard)
    (1.3644, 1.4306, 1.524)
    """
    v, l, rho_g, rho_l, mu_g, eps, area, k1, k2, k3, f, limit = _arrays(
        gas_mass_flow, liquid_mass_flow, gas_density, liquid_density, gas_viscosity, voidage, specific_area,
        c1, c2, c3, flood_fraction, max_pressure_drop,
    )
    if np.any(~((f > 0.0) & (f < 1.0))):
        raise ValueError("the design fraction of flood must lie strictly between 0 and 1")
    if np.any(~(limit > 0.0)):
        raise ValueError("the pressure-drop limit must be > 0 Pa/m")
    check_range("design fraction of flood", f, 0.4, 0.9, "-", "packed-column sizing (common practice)", warnings)
    q_gas, q_liquid = v / rho_g, l / rho_l
    by_pressure, flood = _pressure_limited_diameter(q_gas, q_liquid, rho_g, rho_l, mu_g, eps, area, k1, k2, k3,
                                                    limit)
    by_flood = flood / np.sqrt(f)
    required = np.maximum(by_flood, by_pressure)
    shell = standard_diameter(required)
    cross = _area(shell)
    at_shell = irrigated_pressure_drop(q_gas / cross, q_liquid / cross, rho_g, rho_l, mu_g, eps, area, k1, k2, k3)
    return PackedDiameter(by_flood, by_pressure, required, shell, at_shell, flood)


# ---------------------------------------------------------------------------
# common-practice checks and bed split
# ---------------------------------------------------------------------------

#: Minimum wetting rate of Morris and Jackson [m3 of liquid / (m h) per m of
#: packing perimeter, i.e. m2/h]: 0.08 for rings up to 75 mm, 0.12 above.
MORRIS_JACKSON_SMALL = 0.08
MORRIS_JACKSON_LARGE = 0.12
_MORRIS_JACKSON_SIZE = 0.075


def minimum_wetting_velocity(specific_area, nominal_size):
    r"""Least superficial liquid velocity that keeps a random packing wetted.

        u_L,min = MWR a,     MWR = 0.08 m2/h (d_p <= 75 mm), 0.12 m2/h (larger)

    Parameters
    ----------
    specific_area : array_like
        a [m2/m3].
    nominal_size : array_like
        d_p [m].

    Returns
    -------
    ndarray
        u_L,min [m/s].

    Notes
    -----
    Source: Morris and Jackson, Absorption Towers (Butterworths, 1953), as
    given in Coulson and Richardson's Chemical Engineering, Vol. 2, 5th ed.,
    Section 4.2 (value from memory for the section).

    Examples
    --------
    >>> round(float(minimum_wetting_velocity(112.6, 0.05)) * 3600, 3)     # m/h
    9.008
    """
    area, size = _arrays(specific_area, nominal_size)
    rate = np.where(size <= _MORRIS_JACKSON_SIZE, MORRIS_JACKSON_SMALL, MORRIS_JACKSON_LARGE)
    return rate * area / 3600.0


def check_wetting(liquid_velocity, specific_area, nominal_size, *, warnings: list[str] | None = None):
    r"""Flag design points whose liquid load is below the minimum wetting rate.

        ok = u_L >= u_L,min      (u_L,min from minimum_wetting_velocity)

    Parameters
    ----------
    liquid_velocity : array_like
        Superficial liquid velocity u_L [m/s].
    specific_area : array_like
        a [m2/m3].
    nominal_size : array_like
        d_p [m].
    warnings : list of str, optional
        Receives one message if any point is below the minimum.

    Returns
    -------
    ndarray of bool
        True where the packing is adequately wetted.

    Source: Morris and Jackson (1953), see :func:`minimum_wetting_velocity`.

    Examples
    --------
    >>> w = []
    >>> check_wetting([0.001, 0.01], 112.6, 0.05, warnings=w).tolist(), len(w)
    ([False, True], 1)
    """
    u_l, area, size = _arrays(liquid_velocity, specific_area, nominal_size)
    least = minimum_wetting_velocity(area, size)
    ok = u_l >= least
    if warnings is not None and not np.all(ok):
        warnings.append(
            f"{int((~ok).sum())} of {ok.size} points load the packing below the minimum wetting rate "
            f"(Morris and Jackson): liquid {float(np.min(u_l[~ok])) * 3600:.3g} m/h against "
            f"{float(np.max(least[~ok])) * 3600:.3g} m/h needed; the wetted area and the transfer units "
            "are overstated there"
        )
    return ok


def check_diameter_ratio(diameter, nominal_size, minimum_ratio=10.0, *, warnings: list[str] | None = None):
    r"""Flag columns too narrow for their packing size.

        ok = D / d_p >= minimum ratio

    Parameters
    ----------
    diameter : array_like
        Column inside diameter D [m].
    nominal_size : array_like
        Nominal packing size d_p [m].
    minimum_ratio : array_like
        Least D / d_p [-]; 10 for rings, 8 for saddles is common practice
        (``min_diameter_ratio`` in ``packings.toml``).
    warnings : list of str, optional
        Receives one message if any point is too narrow.

    Returns
    -------
    ndarray of bool
        True where the ratio is met.

    Notes
    -----
    Common practice: below the ratio the wall voids carry too much liquid
    and gas past the bed.

    Examples
    --------
    >>> check_diameter_ratio([0.3, 0.6], 0.05).tolist()
    [False, True]
    """
    d, size, ratio = _arrays(diameter, nominal_size, minimum_ratio)
    ok = d / size >= ratio
    if warnings is not None and not np.all(ok):
        warnings.append(
            f"{int((~ok).sum())} of {ok.size} columns are narrower than {float(np.max(ratio[~ok])):.3g} "
            "packing sizes (common practice): choose a smaller packing or expect wall channelling"
        )
    return ok


def check_temperature(temperature, max_temperature, *, warnings: list[str] | None = None):
    r"""Flag design points hotter than the packing material allows.

        ok = T <= T_max

    Parameters
    ----------
    temperature : array_like
        Highest operating temperature in the bed T [K].
    max_temperature : array_like
        T_max of the packing [K] (``max_temperature`` in ``packings.toml``,
        common practice by material).
    warnings : list of str, optional
        Receives one message if any point is too hot.

    Returns
    -------
    ndarray of bool
        True where the packing may be used.

    Examples
    --------
    >>> check_temperature([320.0, 390.0], 373.0).tolist()
    [True, False]
    """
    t, t_max = _arrays(temperature, max_temperature)
    ok = t <= t_max
    if warnings is not None and not np.all(ok):
        warnings.append(
            f"{int((~ok).sum())} of {ok.size} points run the packing above its temperature limit "
            f"({float(np.max(t[~ok])):.4g} K against {float(np.min(t_max[~ok])):.4g} K, common practice)"
        )
    return ok


class BedSplit(NamedTuple):
    """Beds of a packed height: count, redistributors (count - 1), height of each bed [m]."""

    beds: np.ndarray
    redistributors: np.ndarray
    bed_height: np.ndarray


def bed_split(packed_height, max_bed_height):
    r"""Split a packed height into equal beds no taller than a maximum.

        beds = max(1, ceil(Z / Z_max)),   redistributors = beds - 1,   Z_bed = Z / beds

    Parameters
    ----------
    packed_height : array_like
        Total packed height Z [m], >= 0.
    max_bed_height : array_like
        Tallest bed Z_max [m], > 0 (``max_bed_height`` in ``packings.toml``:
        common practice by packing material).

    Returns
    -------
    BedSplit
        beds and redistributors as int arrays, bed height [m].

    Notes
    -----
    Common practice: liquid maldistribution grows with bed depth and the
    weight of a tall bed crushes ceramic or deforms plastic packing. A
    height within 1e-9 of a whole number of beds is taken as that number.

    Examples
    --------
    >>> split = bed_split([4.0, 7.6, 15.0], 7.5)
    >>> split.beds.tolist(), split.redistributors.tolist()
    ([1, 2, 2], [0, 1, 1])
    """
    height, tallest = _arrays(packed_height, max_bed_height)
    if np.any(~(height >= 0.0)) or np.any(~(tallest > 0.0)):
        raise ValueError("the packed height must be >= 0 and the maximum bed height > 0")
    beds = np.maximum(1, np.ceil(height / tallest - 1e-9)).astype(int)
    return BedSplit(beds, beds - 1, height / beds)


def packed_column_height(packed_height, beds, top_space=defaults.TOP_SPACE, bottom_space=defaults.BOTTOM_SPACE,
                         redistributor_space=REDISTRIBUTOR_SPACE):
    r"""Tangent-to-tangent height of a packed column.

        H = Z + (beds - 1) s_r + s_top + s_bottom

    Parameters
    ----------
    packed_height : array_like
        Total packed height Z [m].
    beds : array_like
        Number of beds [-], >= 1 (:func:`bed_split`).
    top_space, bottom_space : array_like
        Space above the top bed (liquid distributor, disengagement) and below
        the bottom one (support, gas inlet, liquid sump) [m]; the tray
        column's defaults (``towercost.models.defaults``), common practice.
    redistributor_space : array_like
        Shell length per redistributor with the support and hold-down of the
        bed below it [m]; ``REDISTRIBUTOR_SPACE``, common practice.

    Returns
    -------
    ndarray
        H [m].

    Notes
    -----
    Common practice for estimating; a mechanical design sets the real
    allowances.

    Examples
    --------
    >>> round(float(packed_column_height(10.0, 2)), 6)
    13.9
    """
    height, count = _arrays(packed_height, beds)
    return height + (count - 1.0) * redistributor_space + top_space + bottom_space


def packing_weight(volume, voidage, solid_density):
    r"""Weight of a dumped packing, dry.

        m = rho_s (1 - eps) V

    Parameters
    ----------
    volume : array_like
        Packed volume V [m3].
    voidage : array_like
        eps [-].
    solid_density : array_like
        Density of the packing material rho_s [kg/m3] (``[material_density]``
        of ``packings.toml``).

    Returns
    -------
    ndarray
        m [kg].

    Notes
    -----
    The solid fraction of the bed is 1 - eps by definition of the voidage;
    the liquid held up in operation comes on top.

    Examples
    --------
    >>> round(float(packing_weight(10.0, 0.919, 905.0)), 3)
    733.05
    """
    return np.asarray(solid_density, dtype=float) * (1.0 - np.asarray(voidage, dtype=float)) * np.asarray(
        volume, dtype=float)


# ---------------------------------------------------------------------------
# cost
# ---------------------------------------------------------------------------


def packing_volume(diameter, packed_height):
    r"""Packed volume of a column.

        V = pi D^2 / 4 Z

    Parameters
    ----------
    diameter : array_like
        Inside diameter D [m].
    packed_height : array_like
        Total packed height Z [m].

    Returns
    -------
    ndarray
        V [m3].

    Examples
    --------
    >>> round(float(packing_volume(1.0, 4.0)), 6)
    3.141593
    """
    return _area(np.asarray(diameter, dtype=float)) * np.asarray(packed_height, dtype=float)


def packing_cost(volume, price_per_m3):
    r"""Purchased cost of the packing.

        C = V p

    Parameters
    ----------
    volume : array_like
        Packed volume [m3].
    price_per_m3 : array_like
        Price [USD/m3] at its own cost index (``price_per_m3`` and
        ``price_index_basis`` in ``packings.toml``).

    Returns
    -------
    ndarray
        C [USD] at the price's index basis; escalate with
        ``costing.escalate``.

    Examples
    --------
    >>> float(packing_cost(3.0, 600.0))
    1800.0
    """
    return np.asarray(volume, dtype=float) * np.asarray(price_per_m3, dtype=float)


class InternalsCost(NamedTuple):
    """Cost of the tower internals [USD] at the index basis of the table."""

    distributor: np.ndarray
    redistributors: np.ndarray
    supports: np.ndarray
    total: np.ndarray
    index_basis: float


def internals_cost(diameter, beds, distributor_coefficient=None, support_factor=None) -> InternalsCost:
    r"""Liquid distributor, redistributors and support plates of a packed column.

        C_dist  = k D^2                    (one top liquid distributor)
        C_redis = (beds - 1) k D^2
        C_supp  = beds s k D^2              (one support plate per bed)

    Parameters
    ----------
    diameter : array_like
        Inside diameter D [m].
    beds : array_like
        Number of packed beds [-], >= 1.
    distributor_coefficient : float, optional
        k [USD/m2]; default ``distributor_coefficient`` of the
        ``[internals]`` table (Seider et al. C_DR = 125 D^2, D in ft, CE 500,
        converted to D in m; value from memory).
    support_factor : float, optional
        s [-]: a support plate as a fraction of a distributor; default 0.5
        (common practice, stated factor).

    Returns
    -------
    InternalsCost
        Parts and total [USD] at ``index_basis`` (CE index 500 for the
        default coefficient); escalate with ``costing.escalate``.

    Source: Seider, Seader, Lewin and Widagdo, Product and Process Design
    Principles, 3rd ed. (Wiley, 2009), Section 16.5 (value from memory).

    Examples
    --------
    >>> cost = internals_cost(1.0, 2)
    >>> float(cost.distributor), float(cost.redistributors), float(cost.supports), cost.index_basis
    (1345.5, 1345.5, 1345.5, 500.0)
    """
    table = _table()["internals"]
    k = table["distributor_coefficient"] if distributor_coefficient is None else distributor_coefficient
    s = table["support_factor"] if support_factor is None else support_factor
    d, count = _arrays(diameter, beds)
    if np.any(~(count >= 1.0)):
        raise ValueError("a packed column has at least one bed")
    one = k * d**2
    distributor = one
    redistributors = (count - 1.0) * one
    supports = count * s * one
    return InternalsCost(distributor, redistributors, supports, distributor + redistributors + supports,
                         float(table["distributor_index_basis"]))
