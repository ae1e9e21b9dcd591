r"""Tray-column hydraulics: flooding, diameter, height and gas pressure drop.

The column diameter follows the entrainment-flooding method built on Fair's
(1961) chart of the Souders-Brown capacity factor:

    F_LV = (L / V) sqrt(rho_V / rho_L)                     flow parameter
    C    = C_SB(F_LV, tray spacing) F_ST F_F F_HA           capacity factor
    U_f  = C sqrt((rho_L - rho_V) / rho_V)                  flooding velocity (net area)
    D_T  = sqrt(4 V / (f U_f pi (1 - A_d/A_T) rho_V))       tower diameter

as set out in Seader, Henley & Roper, Separation Process Principles, 3rd ed.,
Section 6.6 (equation numbers there, value from memory). The chart itself
is evaluated with the Lygeros and Magoulas (1986) fit quoted in Perry's
Chemical Engineers' Handbook, 7th ed., Section 14, Eq. (14-90).

All quantities are SI: kg/s, kg/m3, N/m, m, m/s, Pa. Every function
broadcasts over numpy arrays.
"""

from __future__ import annotations

import tomllib
from dataclasses import dataclass, field
from typing import NamedTuple
from functools import lru_cache
from pathlib import Path

import numpy as np

from towercost.models import defaults
from towercost.models.constants import GRAVITY
from towercost.models.validity import check_range

REFERENCE_SURFACE_TENSION = 0.020  # surface tension of Fair's chart [N/m]

_TRAY_FILE = Path(__file__).parent / "data" / "tray_types.toml"
_FAIR_SOURCE = "Fair flooding chart (Lygeros-Magoulas fit)"


@lru_cache(maxsize=1)
def _tray_table() -> dict:
    with open(_TRAY_FILE, "rb") as handle:
        return tomllib.load(handle)


def tray_types() -> tuple[str, ...]:
    """Names of the tray types in ``models/data/tray_types.toml``.

    Examples
    --------
    >>> tray_types()
    ('sieve', 'valve')
    """
    return tuple(_tray_table())


def tray_data(tray_type: str) -> dict:
    """Geometry and defaults for one tray type, as a dict of floats and source strings.

    Parameters
    ----------
    tray_type : str
        'sieve' or 'valve'.

    Examples
    --------
    >>> tray_data("sieve")["hole_area_fraction"]
    0.1
    """
    table = _tray_table()
    if tray_type not in table:
        raise ValueError(f"tray type must be one of {', '.join(table)}, got {tray_type!r}")
    return dict(table[tray_type])


def flow_parameter(liquid_mass_flow, gas_mass_flow, liquid_density, gas_density):
    r"""Flow parameter of the flooding chart.

        F_LV = (L / V) sqrt(rho_V / rho_L)

    Parameters
    ----------
    liquid_mass_flow : array_like
        Liquid mass flow L [kg/s], >= 0.
    gas_mass_flow : array_like
        Gas mass flow V [kg/s], > 0.
    liquid_density, gas_density : array_like
        rho_L and rho_V [kg/m3], > 0.

    Returns
    -------
    ndarray
        F_LV [-].

    Notes
    -----
    Source: Fair, Petro/Chem Engineer 33(10), 45 (1961); Seader, Henley &
    Roper, Separation Process Principles, 3rd ed., Section 6.6.

    Examples
    --------
    >>> round(float(flow_parameter(2.0, 1.0, 1000.0, 2.5)), 6)
    0.1
    """
    liquid = np.asarray(liquid_mass_flow, dtype=float)
    gas = np.asarray(gas_mass_flow, dtype=float)
    return liquid / gas * np.sqrt(np.asarray(gas_density, dtype=float) / np.asarray(liquid_density, dtype=float))


def fair_capacity_factor(flow_parameter, tray_spacing, *, warnings: list[str] | None = None):
    r"""Souders-Brown capacity factor at entrainment flood, from Fair's chart.

    Lygeros and Magoulas fit of the chart, surface tension 20 mN/m:

        C_SB = 0.0105 + 8.127e-4 TS**0.755 exp(-1.463 F_LV**0.842)

    with TS the tray spacing in mm and C_SB in m/s.

    Parameters
    ----------
    flow_parameter : array_like
        F_LV [-], > 0.
    tray_spacing : array_like
        Tray spacing [m].

    Returns
    -------
    ndarray
        C_SB [m/s], based on the net area (tower area less one downcomer).

    Notes
    -----
    The chart covers F_LV 0.01 to 1.0 and tray spacings 6 to 36 in
    (0.15 to 0.91 m); outside, the fit still answers and a warning is added.
    It holds for low- or non-foaming systems, weir height below 15 % of the
    spacing, holes of 13 mm or less, and A_h/A_a >= 0.1 (other cases through
    the factors of ``capacity_factor``). The fit departs from the chart by up
    to about 10 % (more near F_LV = 0.01 at small spacing).

    Source: Lygeros and Magoulas, Hydrocarbon Processing 65(12), 43 (1986),
    as given in Perry's Chemical Engineers' Handbook, 7th ed., Section 14,
    Eq. (14-90), for Fair, Petro/Chem Engineer 33(10), 45 (1961).

    Examples
    --------
    >>> round(float(fair_capacity_factor(0.1, 0.6096)), 4)
    0.0939
    """
    flow = np.asarray(flow_parameter, dtype=float)
    spacing_mm = 1000.0 * np.asarray(tray_spacing, dtype=float)
    check_range("flow parameter", flow, 0.01, 1.0, "-", _FAIR_SOURCE, warnings)
    check_range("tray spacing", spacing_mm / 1000.0, 0.15, 0.91, "m", _FAIR_SOURCE, warnings)
    return 0.0105 + 8.127e-4 * spacing_mm**0.755 * np.exp(-1.463 * flow**0.842)


def surface_tension_factor(surface_tension):
    r"""Correction of Fair's capacity factor for liquid surface tension.

        F_ST = (sigma / 0.020)**0.2

    Parameters
    ----------
    surface_tension : array_like
        Liquid surface tension sigma [N/m], > 0.

    Returns
    -------
    ndarray
        F_ST [-].

    Notes
    -----
    Source: Fair, Petro/Chem Engineer 33(10), 45 (1961); Seader, Henley &
    Roper, Separation Process Principles, 3rd ed., Section 6.6.

    Examples
    --------
    >>> round(float(surface_tension_factor(0.072)), 4)
    1.2919
    """
    return (np.asarray(surface_tension, dtype=float) / REFERENCE_SURFACE_TENSION) ** 0.2


def hole_area_factor(hole_area_fraction, *, warnings: list[str] | None = None):
    r"""Correction of Fair's capacity factor for a small hole area.

        F_HA = 1                          for A_h/A_a >= 0.10
        F_HA = 5 (A_h/A_a) + 0.5          for 0.06 <= A_h/A_a < 0.10

    Parameters
    ----------
    hole_area_fraction : array_like
        Hole (or full valve-opening) area over active area A_h/A_a [-].

    Returns
    -------
    ndarray
        F_HA [-].

    Notes
    -----
    Below 0.06 the straight line is extrapolated and a warning is added.

    Source: Seader, Henley & Roper, Separation Process Principles, 3rd ed.,
    Section 6.6 (value from memory); the same steps (0.1 -> 1.0, 0.08 -> 0.9,
    0.06 -> 0.8) are tabulated in Ludwig, Applied Process Design for Chemical
    and Petrochemical Plants, Vol. 2, 3rd ed., with Fig. 8-137.

    Examples
    --------
    >>> hole_area_factor([0.12, 0.08, 0.06]).round(6).tolist()
    [1.0, 0.9, 0.8]
    """
    fraction = np.asarray(hole_area_fraction, dtype=float)
    check_range("hole area / active area", fraction, 0.06, 1.0, "-", "Fair hole-area factor", warnings)
    return np.where(fraction >= 0.1, 1.0, 5.0 * fraction + 0.5)


def capacity_factor(
    flow_parameter,
    tray_spacing,
    surface_tension=REFERENCE_SURFACE_TENSION,
    foaming_factor=1.0,
    hole_area_fraction=0.1,
    capacity_multiplier=1.0,
    *,
    warnings: list[str] | None = None,
):
    r"""Flooding capacity factor corrected for the system and the tray.

        C = C_SB F_ST F_F F_HA m

    Parameters
    ----------
    flow_parameter : array_like
        F_LV [-].
    tray_spacing : array_like
        Tray spacing [m].
    surface_tension : array_like
        Liquid surface tension [N/m]; 0.020 leaves the chart value.
    foaming_factor : array_like
        F_F [-]: 1 for non-foaming systems, less for foaming ones.
    hole_area_fraction : array_like
        A_h/A_a [-], enters through ``hole_area_factor``.
    capacity_multiplier : array_like
        m [-], capacity of the tray type relative to a sieve tray (1 for
        sieve and valve trays, see ``models/data/tray_types.toml``).

    Returns
    -------
    ndarray
        C [m/s].

    Notes
    -----
    Source: Seader, Henley & Roper, Separation Process Principles, 3rd ed.,
    Section 6.6 (C = F_ST F_F F_HA C_F).

    Examples
    --------
    >>> round(float(capacity_factor(0.1, 0.6096, surface_tension=0.072, foaming_factor=0.9)), 4)
    0.1092
    """
    c_sb = fair_capacity_factor(flow_parameter, tray_spacing, warnings=warnings)
    return (
        c_sb
        * surface_tension_factor(surface_tension)
        * np.asarray(foaming_factor, dtype=float)
        * hole_area_factor(hole_area_fraction, warnings=warnings)
        * np.asarray(capacity_multiplier, dtype=float)
    )


def flooding_velocity(capacity_factor, liquid_density, gas_density):
    r"""Gas velocity through the net area at entrainment flood (Souders-Brown).

        U_f = C sqrt((rho_L - rho_V) / rho_V)

    Parameters
    ----------
    capacity_factor : array_like
        C [m/s].
    liquid_density, gas_density : array_like
        rho_L > rho_V > 0 [kg/m3].

    Returns
    -------
    ndarray
        U_f [m/s].

    Notes
    -----
    Source: Souders and Brown, Ind. Eng. Chem. 26, 98 (1934); Seader, Henley
    & Roper, Separation Process Principles, 3rd ed., Section 6.6.

    Examples
    --------
    >>> round(float(flooding_velocity(0.1, 1001.0, 1.0)), 6)
    3.162278
    """
    rho_l = np.asarray(liquid_density, dtype=float)
    rho_v = np.asarray(gas_density, dtype=float)
    return np.asarray(capacity_factor, dtype=float) * np.sqrt((rho_l - rho_v) / rho_v)


def downcomer_area_fraction(flow_parameter):
    r"""Downcomer area as a fraction of the tower area, from the flow parameter.

        A_d/A_T = 0.1                          F_LV <= 0.1
        A_d/A_T = 0.1 + (F_LV - 0.1) / 9       0.1 < F_LV < 1.0
        A_d/A_T = 0.2                          F_LV >= 1.0

    Parameters
    ----------
    flow_parameter : array_like
        F_LV [-].

    Returns
    -------
    ndarray
        A_d/A_T [-].

    Notes
    -----
    Source: Seader, Henley & Roper, Separation Process Principles, 3rd ed.,
    Section 6.6, text with the tower-diameter equation.

    Examples
    --------
    >>> downcomer_area_fraction([0.05, 0.55, 2.0]).round(6).tolist()
    [0.1, 0.15, 0.2]
    """
    flow = np.asarray(flow_parameter, dtype=float)
    return 0.1 + (np.clip(flow, 0.1, 1.0) - 0.1) / 9.0


def column_diameter(gas_mass_flow, gas_density, flooding_velocity, flood_fraction=defaults.FLOOD_FRACTION,
                    downcomer_fraction=0.1):
    r"""Inside tower diameter that runs at ``flood_fraction`` of entrainment flood.

        D_T = sqrt(4 V / (f U_f pi (1 - A_d/A_T) rho_V))

    Parameters
    ----------
    gas_mass_flow : array_like
        V [kg/s].
    gas_density : array_like
        rho_V [kg/m3].
    flooding_velocity : array_like
        U_f [m/s], through the net area.
    flood_fraction : array_like
        f [-], design fraction of flood, typically 0.75 to 0.85.
    downcomer_fraction : array_like
        A_d/A_T [-].

    Returns
    -------
    ndarray
        D_T [m].

    Notes
    -----
    Source: Seader, Henley & Roper, Separation Process Principles, 3rd ed.,
    Section 6.6.

    Examples
    --------
    >>> round(float(column_diameter(1.0, 1.0, 2.0, 0.8, 0.1)), 4)
    0.9403
    """
    area_term = (
        np.asarray(flood_fraction, dtype=float)
        * np.asarray(flooding_velocity, dtype=float)
        * np.pi
        * (1.0 - np.asarray(downcomer_fraction, dtype=float))
        * np.asarray(gas_density, dtype=float)
    )
    return np.sqrt(4.0 * np.asarray(gas_mass_flow, dtype=float) / area_term)


def fraction_of_flood(gas_mass_flow, gas_density, flooding_velocity, diameter, downcomer_fraction=0.1):
    r"""Fraction of entrainment flood at which a tower of given diameter runs.

        f = V / (rho_V U_f (pi D**2 / 4) (1 - A_d/A_T))

    The inverse of ``column_diameter``.

    Parameters
    ----------
    gas_mass_flow : array_like
        V [kg/s].
    gas_density : array_like
        rho_V [kg/m3].
    flooding_velocity : array_like
        U_f [m/s].
    diameter : array_like
        Inside diameter [m].
    downcomer_fraction : array_like
        A_d/A_T [-].

    Returns
    -------
    ndarray
        f [-].

    Notes
    -----
    Source: Seader, Henley & Roper, Separation Process Principles, 3rd ed.,
    Section 6.6 (the diameter equation solved for f).

    Examples
    --------
    >>> round(float(fraction_of_flood(1.0, 1.0, 2.0, 0.9403)), 3)
    0.8
    """
    net_area = np.pi * np.asarray(diameter, dtype=float) ** 2 / 4.0 * (1.0 - np.asarray(downcomer_fraction, dtype=float))
    velocity = np.asarray(gas_mass_flow, dtype=float) / (np.asarray(gas_density, dtype=float) * net_area)
    return velocity / np.asarray(flooding_velocity, dtype=float)


#: Step between standard shell diameters [m]: 6 in (common practice).
STANDARD_DIAMETER_STEP = 0.1524


def standard_diameter(diameter, increment=STANDARD_DIAMETER_STEP, minimum=0.4572):
    r"""Round a required diameter up to the next standard shell size.

        D = max(minimum, increment * ceil(D_required / increment))

    Parameters
    ----------
    diameter : array_like
        Required inside diameter [m].
    increment : float
        Step between standard sizes [m]; 0.1524 m = 6 in.
    minimum : float
        Smallest shell [m]; 0.4572 m = 1.5 ft.

    Returns
    -------
    ndarray
        Standard inside diameter [m], >= ``diameter``.

    Notes
    -----
    Six-inch steps and a 1.5 ft smallest tray column are common practice.
    A diameter within 1e-9 of a step is taken as that step.

    Examples
    --------
    >>> standard_diameter([0.30, 0.8436, 1.2192]).tolist()
    [0.4572, 0.9144, 1.2192]
    """
    required = np.asarray(diameter, dtype=float)
    steps = np.ceil(required / increment - 1e-9)
    # Rounded to the micrometre so that 6 x 0.1524 is 0.9144 and not 0.9144000000000001.
    return np.round(np.maximum(minimum, steps * increment), 6)


def column_height(trays, tray_spacing=defaults.TRAY_SPACING, top_space=defaults.TOP_SPACE,
                  bottom_space=defaults.BOTTOM_SPACE):
    r"""Tangent-to-tangent height of a tray column.

        H = N_trays * tray_spacing + top_space + bottom_space

    Parameters
    ----------
    trays : array_like
        Number of real trays [-].
    tray_spacing : array_like
        [m]; 0.6096 m = 24 in.
    top_space : array_like
        Disengaging space above the top tray [m].
    bottom_space : array_like
        Sump and gas-inlet space below the bottom tray [m].

    Returns
    -------
    ndarray
        H [m].

    Notes
    -----
    The defaults (1.2 m above, 1.8 m below) are common practice for
    absorbers and strippers without a reboiler. Seider et al., Product and
    Process Design Principles, 3rd ed., Section 16.5, add 4 ft above and
    10 ft below for distillation towers, where the bottom holds the
    reboiler return (value from memory); pass those for such columns.

    Examples
    --------
    >>> round(float(column_height(10)), 4)
    9.096
    """
    return (
        np.asarray(trays, dtype=float) * np.asarray(tray_spacing, dtype=float)
        + np.asarray(top_space, dtype=float)
        + np.asarray(bottom_space, dtype=float)
    )


def dry_tray_head(hole_velocity, gas_density, liquid_density, orifice_coefficient=0.73):
    r"""Dry-tray (orifice) pressure drop across sieve holes, as head of clear liquid.

        h_d = (rho_V / rho_L) U_h**2 / (2 g C_o**2)

    Parameters
    ----------
    hole_velocity : array_like
        Gas velocity through the holes U_h [m/s].
    gas_density, liquid_density : array_like
        rho_V, rho_L [kg/m3].
    orifice_coefficient : array_like
        Discharge coefficient C_o [-], 0.65 to 0.85 from the chart of
        Liebson, Kelley and Bullington, Pet. Refiner 36(3), 288 (1957).

    Returns
    -------
    ndarray
        h_d [m of clear liquid].

    Notes
    -----
    Same relation as 0.186 (U_h/C_o)**2 (rho_V/rho_L) inches with U_h in ft/s.
    Source: Perry's Chemical Engineers' Handbook, 7th ed., Section 14 (tray
    pressure drop); Seader, Henley & Roper, Separation Process Principles,
    3rd ed., Section 6.6.

    Examples
    --------
    >>> round(float(dry_tray_head(20.0, 2.0, 1000.0, 0.73)), 5)
    0.07654
    """
    rho_ratio = np.asarray(gas_density, dtype=float) / np.asarray(liquid_density, dtype=float)
    velocity = np.asarray(hole_velocity, dtype=float)
    return rho_ratio * velocity**2 / (2.0 * GRAVITY * np.asarray(orifice_coefficient, dtype=float) ** 2)


def weir_crest_height(liquid_volumetric_flow, weir_length):
    r"""Height of liquid crest over a straight segmental weir (Francis weir formula).

        h_ow = (Q_L / (1.84 l_w))**(2/3)

    Parameters
    ----------
    liquid_volumetric_flow : array_like
        Q_L [m3/s], >= 0.
    weir_length : array_like
        l_w [m], > 0.

    Returns
    -------
    ndarray
        h_ow [m of clear liquid].

    Notes
    -----
    1.84 m**0.5/s is the Francis coefficient in SI; the form equals
    0.666 (Q_L/l_w)**(2/3), as in Perry's Chemical Engineers' Handbook, 7th
    ed., Section 14 (664 F_w (q/L_w)**(2/3) mm with the weir constriction
    factor F_w = 1; value from memory). Source: Francis, Lowell Hydraulic
    Experiments (1855).

    Examples
    --------
    >>> round(float(weir_crest_height(0.01, 1.0)), 5)
    0.03091
    """
    flow = np.asarray(liquid_volumetric_flow, dtype=float)
    return (flow / (1.84 * np.asarray(weir_length, dtype=float))) ** (2.0 / 3.0)


def surface_tension_head(surface_tension, liquid_density, hole_diameter):
    r"""Head lost to form bubbles at the holes (surface-tension head).

        h_sigma = 6 sigma / (g rho_L d_h)

    Parameters
    ----------
    surface_tension : array_like
        sigma [N/m].
    liquid_density : array_like
        rho_L [kg/m3].
    hole_diameter : array_like
        d_h [m].

    Returns
    -------
    ndarray
        h_sigma [m of clear liquid].

    Notes
    -----
    Source: Seader, Henley & Roper, Separation Process Principles, 3rd ed.,
    Section 6.6 (value from memory).

    Examples
    --------
    >>> round(float(surface_tension_head(0.07, 1000.0, 0.005)), 6)
    0.008566
    """
    return 6.0 * np.asarray(surface_tension, dtype=float) / (
        GRAVITY * np.asarray(liquid_density, dtype=float) * np.asarray(hole_diameter, dtype=float)
    )


def sieve_tray_pressure_drop(
    gas_mass_flow,
    gas_density,
    liquid_mass_flow,
    liquid_density,
    diameter,
    surface_tension=REFERENCE_SURFACE_TENSION,
    downcomer_fraction=0.1,
    hole_area_fraction=0.10,
    hole_diameter=0.00476,
    weir_height=0.0508,
    weir_length_ratio=0.73,
    orifice_coefficient=0.73,
    aeration_factor=0.6,
):
    r"""Gas pressure drop across one sieve tray.

        h_t = h_d + beta (h_w + h_ow) + h_sigma
        dP  = rho_L g h_t

    with h_d from ``dry_tray_head`` at U_h = V / (rho_V A_h),
    A_h = (A_h/A_a) A_a, A_a = A_T (1 - 2 A_d/A_T), h_ow from
    ``weir_crest_height`` at Q_L = L / rho_L over l_w = ratio * D, and h_sigma
    from ``surface_tension_head``.

    Parameters
    ----------
    gas_mass_flow, liquid_mass_flow : array_like
        V, L [kg/s].
    gas_density, liquid_density : array_like
        rho_V, rho_L [kg/m3].
    diameter : array_like
        Inside tower diameter D [m].
    surface_tension : array_like
        [N/m].
    downcomer_fraction : array_like
        A_d/A_T [-].
    hole_area_fraction : array_like
        A_h/A_a [-].
    hole_diameter : array_like
        d_h [m].
    weir_height : array_like
        h_w [m].
    weir_length_ratio : array_like
        l_w / D [-].
    orifice_coefficient : array_like
        C_o [-].
    aeration_factor : array_like
        beta [-], clear-liquid head over (h_w + h_ow); 0.6 is common practice
        (Fair's aeration chart gives about 0.5 to 0.8 over usual F-factors).

    Returns
    -------
    ndarray
        Pressure drop per tray [Pa].

    Notes
    -----
    Source: the dry-tray plus clear-liquid plus surface-tension head sum of
    Seader, Henley & Roper, Separation Process Principles, 3rd ed.,
    Section 6.6, and Perry's Chemical Engineers' Handbook, 7th ed.,
    Section 14 (tray pressure drop); hydraulic gradient neglected.

    Examples
    --------
    >>> round(float(sieve_tray_pressure_drop(2.2, 1.92, 0.80, 986.0, 0.9144, 0.070)))
    1284
    """
    diameter = np.asarray(diameter, dtype=float)
    rho_l = np.asarray(liquid_density, dtype=float)
    tower_area = np.pi * diameter**2 / 4.0
    active_area = tower_area * (1.0 - 2.0 * np.asarray(downcomer_fraction, dtype=float))
    hole_area = np.asarray(hole_area_fraction, dtype=float) * active_area
    hole_velocity = np.asarray(gas_mass_flow, dtype=float) / (np.asarray(gas_density, dtype=float) * hole_area)
    head_dry = dry_tray_head(hole_velocity, gas_density, rho_l, orifice_coefficient)
    crest = weir_crest_height(np.asarray(liquid_mass_flow, dtype=float) / rho_l, np.asarray(weir_length_ratio, dtype=float) * diameter)
    head_liquid = np.asarray(aeration_factor, dtype=float) * (np.asarray(weir_height, dtype=float) + crest)
    head_sigma = surface_tension_head(surface_tension, rho_l, hole_diameter)
    return rho_l * GRAVITY * (head_dry + head_liquid + head_sigma)


def valve_tray_pressure_drop(reference, per_tray=None):
    r"""Per-tray gas pressure drop of a valve tray as a fixed estimating figure.

        dP = dP_tray   (broadcast to the shape of ``reference``)

    Parameters
    ----------
    reference : array_like
        Any array of the design points (only its shape is used).
    per_tray : float or None
        Pressure drop per tray [Pa]; None takes ``default_pressure_drop`` of
        the valve row of ``models/data/tray_types.toml`` (690 Pa = 0.1 psi,
        common practice).

    Returns
    -------
    ndarray
        Pressure drop per tray [Pa].

    Examples
    --------
    >>> valve_tray_pressure_drop([1.0, 2.0]).tolist()
    [690.0, 690.0]
    """
    value = tray_data("valve")["default_pressure_drop"] if per_tray is None else per_tray
    return np.broadcast_to(np.asarray(value, dtype=float), np.shape(reference)).astype(float)


def column_pressure_drop(per_tray, trays):
    r"""Gas pressure drop over all trays.

        dP_column = N_trays * dP_tray

    Parameters
    ----------
    per_tray : array_like
        Pressure drop per tray [Pa].
    trays : array_like
        Number of real trays [-].

    Returns
    -------
    ndarray
        [Pa].

    Examples
    --------
    >>> float(column_pressure_drop(700.0, 12))
    8400.0
    """
    return np.asarray(per_tray, dtype=float) * np.asarray(trays, dtype=float)


@dataclass(frozen=True)
class ColumnSize:
    """Hydraulic sizing of a tray column; every field broadcasts over the design points.

    Lengths in m, velocities in m/s, pressures in Pa.
    """

    flow_parameter: np.ndarray
    capacity_factor: np.ndarray
    flooding_velocity: np.ndarray
    downcomer_fraction: np.ndarray
    diameter_required: np.ndarray
    diameter: np.ndarray
    fraction_of_flood_at_standard_diameter: np.ndarray
    height: np.ndarray
    pressure_drop_per_tray: np.ndarray
    pressure_drop: np.ndarray
    warnings: list[str] = field(default_factory=list)


def size_column(
    gas_mass_flow,
    liquid_mass_flow,
    gas_density,
    liquid_density,
    surface_tension,
    trays,
    tray_spacing=defaults.TRAY_SPACING,
    flood_fraction=defaults.FLOOD_FRACTION,
    tray_type: str = "sieve",
    foaming_factor=1.0,
    diameter=None,
    top_space=defaults.TOP_SPACE,
    bottom_space=defaults.BOTTOM_SPACE,
    *,
    warnings: list[str] | None = None,
) -> ColumnSize:
    r"""Diameter, height and pressure drop of a tray column in one call.

    Chains ``flow_parameter`` -> ``capacity_factor`` -> ``flooding_velocity``
    -> ``column_diameter`` (at ``downcomer_area_fraction``) ->
    ``standard_diameter``; ``column_height``; and the per-tray pressure drop
    (``sieve_tray_pressure_drop`` or ``valve_tray_pressure_drop``) at the
    shell diameter.

    Parameters
    ----------
    gas_mass_flow, liquid_mass_flow : array_like
        Largest gas and liquid loads in the column [kg/s].
    gas_density, liquid_density : array_like
        [kg/m3].
    surface_tension : array_like
        [N/m].
    trays : array_like
        Real trays [-].
    tray_spacing : array_like
        [m].
    flood_fraction : array_like
        Design fraction of flood [-].
    tray_type : str
        'sieve' or 'valve'.
    foaming_factor : array_like
        F_F [-].
    diameter : array_like or None
        Inside diameter of an existing shell [m]; None sizes a new one.
        With a given shell, ``diameter`` is that shell and the reported
        fraction of flood is the one it runs at.
    top_space, bottom_space : array_like
        [m], see ``column_height``.
    warnings : list of str or None
        Messages for out-of-range use are appended here.

    Returns
    -------
    ColumnSize
        Its ``warnings`` holds the messages of this call.

    Examples
    --------
    >>> size = size_column(2.2, 0.80, 1.92, 986.0, 0.070, 10)
    >>> round(float(size.diameter), 4), round(float(size.fraction_of_flood_at_standard_diameter), 3)
    (0.9144, 0.612)
    """
    local: list[str] = []
    data = tray_data(tray_type)
    f_lv = flow_parameter(liquid_mass_flow, gas_mass_flow, liquid_density, gas_density)
    capacity = capacity_factor(
        f_lv,
        tray_spacing,
        surface_tension,
        foaming_factor,
        data["hole_area_fraction"],
        data["capacity_multiplier"],
        warnings=local,
    )
    u_flood = flooding_velocity(capacity, liquid_density, gas_density)
    downcomer = downcomer_area_fraction(f_lv)
    required = column_diameter(gas_mass_flow, gas_density, u_flood, flood_fraction, downcomer)
    if diameter is None:
        shell = standard_diameter(required)
    else:
        shell = np.broadcast_to(np.asarray(diameter, dtype=float), np.shape(required)).astype(float)
    flood = fraction_of_flood(gas_mass_flow, gas_density, u_flood, shell, downcomer)
    if np.any(flood > 1.0):
        local.append(
            f"the shell runs above flood (up to {float(np.max(flood)):.3g} of flood); a larger diameter is needed"
        )
    check_range(
        "weir height / tray spacing",
        data["weir_height"] / np.asarray(tray_spacing, dtype=float),
        0.0,
        0.15,
        "-",
        _FAIR_SOURCE,
        local,
    )
    height = column_height(trays, tray_spacing, top_space, bottom_space)
    if tray_type == "sieve":
        per_tray = sieve_tray_pressure_drop(
            gas_mass_flow,
            gas_density,
            liquid_mass_flow,
            liquid_density,
            shell,
            surface_tension,
            downcomer,
            data["hole_area_fraction"],
            data["hole_diameter"],
            data["weir_height"],
            data["weir_length_ratio"],
            data["orifice_coefficient"],
            data["aeration_factor"],
        )
    else:
        per_tray = valve_tray_pressure_drop(shell, data["default_pressure_drop"])
    per_tray = np.broadcast_to(per_tray, np.broadcast_shapes(np.shape(per_tray), np.shape(trays))).astype(float)
    total = column_pressure_drop(per_tray, trays)
    if warnings is not None:
        warnings.extend(local)
    return ColumnSize(
        flow_parameter=f_lv,
        capacity_factor=capacity,
        flooding_velocity=u_flood,
        downcomer_fraction=downcomer,
        diameter_required=required,
        diameter=shell,
        fraction_of_flood_at_standard_diameter=flood,
        height=height,
        pressure_drop_per_tray=per_tray,
        pressure_drop=total,
        warnings=local,
    )


# --------------------------------------------------------------------------- operating range
#
# The lower limit (weeping), the entrainment at the design rate and the
# downcomer limits of a crossflow tray, after the tray-design procedure of
# Sinnott, Coulson & Richardson's Chemical Engineering Vol. 6 (Chemical
# Engineering Design), 4th ed., Section 11.13 (the same relations are in
# Towler & Sinnott, Chemical Engineering Design, 2nd ed., Section 17.13).
# Equation and figure numbers are those of the 4th edition, value from memory.

#: Largest fractional entrainment at the design rate (common practice: Kister,
#: Distillation Design, 1992, Sec. 6.5, and Sinnott Sec. 11.13 both use 0.1).
ENTRAINMENT_LIMIT = 0.10
#: Largest clear-liquid back-up in the downcomer as a fraction of (tray spacing
#: + weir height) (Sinnott, 4th ed., Sec. 11.13, Eq. (11.93) guideline, value from memory).
BACKUP_LIMIT = 0.5
#: Least liquid residence time in the downcomer [s] (Sinnott, 4th ed.,
#: Sec. 11.13: "at least 3 seconds", value from memory).
RESIDENCE_TIME_MIN = 3.0
#: Lowest expected rate as a fraction of the design vapour and liquid loads (common practice).
TURNDOWN = defaults.TURNDOWN

_K2_SOURCE = "Sinnott weep-point chart (Fig. 11.30) fit"
_PSI_SOURCE = "Fair entrainment chart fit"


def weep_point_constant(clear_liquid_depth, *, warnings: list[str] | None = None):
    r"""Constant K2 of the sieve-tray weep-point correlation, from Sinnott's chart.

    Fit of Sinnott's Fig. 11.30 (K2 against the clear liquid depth
    h = h_w + h_ow at the lowest rate), form chosen to saturate as the chart does:

        K2 = 32.14 - 130.2 / (h + 12.45),      h in mm

    Parameters
    ----------
    clear_liquid_depth : array_like
        h_w + h_ow at the lowest liquid rate [m].

    Returns
    -------
    ndarray
        K2 [-] (the constant of ``weep_hole_velocity``).

    Notes
    -----
    Fitted by least squares to eleven points of the chart, h = 15 to 110 mm,
    as digitized in a public process-model file read through the search tool
    (K2 = 27.3 at 15 mm to 31.1 at 110 mm); the fit departs from them by at
    most 0.17 (0.6 %), rms 0.07. An independent regression of the same chart
    in another public repository agrees within 0.2. Outside 15 to 110 mm the
    fit still answers and a warning is added.

    Source: Sinnott, Coulson & Richardson's Chemical Engineering Vol. 6,
    4th ed., Fig. 11.30 (after Eduljee, Brit. Chem. Eng. 4, 320, 1959; value
    from memory); Towler & Sinnott, Chemical Engineering Design, 2nd ed.,
    Fig. 17.36 (figure number from memory).

    Examples
    --------
    >>> round(float(weep_point_constant(0.0678)), 2)    # Sinnott's example reads 30.6
    30.52
    """
    depth_mm = 1000.0 * np.asarray(clear_liquid_depth, dtype=float)
    check_range("clear liquid depth h_w + h_ow", depth_mm / 1000.0, 0.015, 0.110, "m", _K2_SOURCE, warnings)
    return 32.14 - 130.2 / (np.maximum(depth_mm, 0.0) + 12.45)


def weep_hole_velocity(clear_liquid_depth, hole_diameter, gas_density, *, warnings: list[str] | None = None):
    r"""Least gas velocity through the holes of a sieve tray before it weeps (weep point).

        u_h,min = [K2 - 0.90 (25.4 - d_h)] / sqrt(rho_V),     d_h in mm

    with K2 from ``weep_point_constant`` at h_w + h_ow.

    Parameters
    ----------
    clear_liquid_depth : array_like
        h_w + h_ow at the lowest liquid rate [m].
    hole_diameter : array_like
        d_h [m], the correlation was drawn for 2.5 to 12.5 mm holes.
    gas_density : array_like
        rho_V [kg/m3].

    Returns
    -------
    ndarray
        u_h,min [m/s], based on the hole area.

    Notes
    -----
    A dimensional correlation: u in m/s, d_h in mm, rho_V in kg/m3.
    Source: Sinnott, Coulson & Richardson's Chemical Engineering Vol. 6,
    4th ed., Eq. (11.84) (after Eduljee 1959; equation number from memory);
    Towler & Sinnott, Chemical Engineering Design, 2nd ed., Section 17.13.

    Examples
    --------
    >>> round(float(weep_hole_velocity(0.0678, 0.005, 0.72)), 2)
    14.33
    """
    k2 = weep_point_constant(clear_liquid_depth, warnings=warnings)
    diameter_mm = 1000.0 * np.asarray(hole_diameter, dtype=float)
    check_range("hole diameter", diameter_mm / 1000.0, 0.0025, 0.0125, "m", "Sinnott weep-point correlation", warnings)
    return (k2 - 0.90 * (25.4 - diameter_mm)) / np.sqrt(np.asarray(gas_density, dtype=float))


def segmental_weir_crest(liquid_mass_flow, liquid_density, weir_length):
    r"""Crest of clear liquid over a segmental-downcomer weir (Francis form as Sinnott gives it).

        h_ow = 0.750 [L / (rho_L l_w)]**(2/3)     (750 [..]**(2/3) mm in the source)

    Parameters
    ----------
    liquid_mass_flow : array_like
        L [kg/s], >= 0.
    liquid_density : array_like
        rho_L [kg/m3].
    weir_length : array_like
        l_w [m].

    Returns
    -------
    ndarray
        h_ow [m of clear liquid].

    Notes
    -----
    Sinnott's coefficient (0.750 m**(1/3) s**(2/3)) is 13 % above the plain
    Francis coefficient of ``weir_crest_height`` (0.666); it allows for the
    constriction of a segmental weir and is the one his weep and back-up
    checks use. Source: Sinnott, Coulson & Richardson's Chemical
    Engineering Vol. 6, 4th ed., Eq. (11.85) (value from memory).

    Examples
    --------
    >>> round(float(segmental_weir_crest(3.0, 954.0, 0.60)) * 1000, 1)
    22.6
    """
    flow = np.asarray(liquid_mass_flow, dtype=float) / np.asarray(liquid_density, dtype=float)
    return 0.750 * (flow / np.asarray(weir_length, dtype=float)) ** (2.0 / 3.0)


def residual_head(liquid_density):
    r"""Residual head of a sieve tray: the loss not accounted for by the dry and liquid heads.

        h_r = 12.5 / rho_L       (12.5e3 / rho_L mm in the source)

    Parameters
    ----------
    liquid_density : array_like
        rho_L [kg/m3].

    Returns
    -------
    ndarray
        h_r [m of clear liquid].

    Notes
    -----
    Source: Sinnott, Coulson & Richardson's Chemical Engineering Vol. 6,
    4th ed., Eq. (11.89) (after Hunt et al. 1955; value from memory).

    Examples
    --------
    >>> round(float(residual_head(954.0)) * 1000, 1)
    13.1
    """
    return 12.5 / np.asarray(liquid_density, dtype=float)


def sinnott_tray_head(hole_velocity, gas_density, liquid_density, weir_height, crest_height, orifice_coefficient=0.84):
    r"""Total pressure drop of a sieve tray as head of clear liquid (Sinnott's sum).

        h_t = h_d + (h_w + h_ow) + h_r

    with h_d = ``dry_tray_head`` (51 (u_h/C_o)**2 rho_V/rho_L mm in the
    source) and h_r = ``residual_head``.

    Parameters
    ----------
    hole_velocity : array_like
        u_h at the design (largest) vapour rate [m/s].
    gas_density, liquid_density : array_like
        [kg/m3].
    weir_height, crest_height : array_like
        h_w and h_ow at the design liquid rate [m].
    orifice_coefficient : array_like
        C_o [-] (Sinnott's Fig. 11.34: 0.84 for plate thickness / hole
        diameter 1 and A_h/A_p 0.1).

    Returns
    -------
    ndarray
        h_t [m of clear liquid].

    Notes
    -----
    Source: Sinnott, Coulson & Richardson's Chemical Engineering Vol. 6,
    4th ed., Eqs. (11.88) to (11.90) (value from memory). The 51 of the
    source is 1000/(2 g), so ``dry_tray_head`` gives the same h_d to 0.03 %.

    Examples
    --------
    >>> round(float(sinnott_tray_head(34.0, 0.72, 954.0, 0.050, 0.0226)) * 1000, 1)
    148.7
    """
    head_dry = dry_tray_head(hole_velocity, gas_density, liquid_density, orifice_coefficient)
    return (head_dry + np.asarray(weir_height, dtype=float) + np.asarray(crest_height, dtype=float)
            + residual_head(liquid_density))


def downcomer_head_loss(liquid_mass_flow, liquid_density, flow_area):
    r"""Head lost by the liquid leaving the downcomer under its apron.

        h_dc = 0.166 [L / (rho_L A_m)]**2       (166 [..]**2 mm in the source)

    Parameters
    ----------
    liquid_mass_flow : array_like
        L [kg/s], the largest liquid rate.
    liquid_density : array_like
        rho_L [kg/m3].
    flow_area : array_like
        A_m [m2], the smaller of the downcomer area A_d and the area under
        the apron A_ap = h_ap l_w.

    Returns
    -------
    ndarray
        h_dc [m of clear liquid].

    Notes
    -----
    0.166 s2/m is about 1.6 velocity heads (1 / (2 g) = 0.051) of the
    clear liquid under the apron. Source: Sinnott, Coulson & Richardson's
    Chemical Engineering Vol. 6, 4th ed., Eq. (11.92) (value from memory).

    Examples
    --------
    >>> round(float(downcomer_head_loss(3.0, 954.0, 0.024)) * 1000, 2)
    2.85
    """
    velocity = np.asarray(liquid_mass_flow, dtype=float) / (
        np.asarray(liquid_density, dtype=float) * np.asarray(flow_area, dtype=float))
    return 0.166 * velocity**2


def downcomer_backup(weir_height, crest_height, tray_head, head_loss):
    r"""Clear-liquid back-up in the downcomer.

        h_b = (h_w + h_ow) + h_t + h_dc

    Parameters
    ----------
    weir_height, crest_height : array_like
        h_w and h_ow at the largest liquid rate [m].
    tray_head : array_like
        h_t, total tray pressure drop as head of clear liquid [m].
    head_loss : array_like
        h_dc from ``downcomer_head_loss`` [m].

    Returns
    -------
    ndarray
        h_b [m of clear liquid].

    Notes
    -----
    The back-up should not exceed half of (tray spacing + weir height) to
    leave room for the froth (``BACKUP_LIMIT``). Source: Sinnott, Coulson &
    Richardson's Chemical Engineering Vol. 6, 4th ed., Eqs. (11.91) and
    (11.93) (value from memory).

    Examples
    --------
    >>> round(float(downcomer_backup(0.050, 0.0226, 0.1487, 0.00285)), 3)
    0.224
    """
    return (np.asarray(weir_height, dtype=float) + np.asarray(crest_height, dtype=float)
            + np.asarray(tray_head, dtype=float) + np.asarray(head_loss, dtype=float))


def downcomer_residence_time(downcomer_area, backup_height, liquid_density, liquid_mass_flow):
    r"""Residence time of the clear liquid in the downcomer.

        t_r = A_d h_b rho_L / L

    Parameters
    ----------
    downcomer_area : array_like
        A_d [m2].
    backup_height : array_like
        h_b, clear-liquid back-up [m].
    liquid_density : array_like
        rho_L [kg/m3].
    liquid_mass_flow : array_like
        L [kg/s], > 0.

    Returns
    -------
    ndarray
        t_r [s]; at least 3 s lets entrained gas leave the liquid
        (``RESIDENCE_TIME_MIN``).

    Notes
    -----
    Source: Sinnott, Coulson & Richardson's Chemical Engineering Vol. 6,
    4th ed., Eq. (11.95) (value from memory).

    Examples
    --------
    >>> round(float(downcomer_residence_time(0.059, 0.2242, 954.0, 3.0)), 2)
    4.21
    """
    flow = np.asarray(liquid_mass_flow, dtype=float)
    if np.any(~(flow > 0.0)):
        raise ValueError("the liquid rate must be > 0 kg/s for a downcomer residence time")
    return (np.asarray(downcomer_area, dtype=float) * np.asarray(backup_height, dtype=float)
            * np.asarray(liquid_density, dtype=float) / flow)


#: Coefficients of the fit of Fair's entrainment chart (see ``fractional_entrainment``).
_PSI_COEFFICIENTS = (-5.2369, -1.6114, -0.2358, 3.0413, 0.0767)


def fractional_entrainment(flow_parameter, flood_fraction, *, warnings: list[str] | None = None):
    r"""Fractional entrainment of a crossflow tray, from Fair's chart.

    psi = e / (L + e), entrained liquid over gross liquid downflow, fitted as

        log10 psi = -5.2369 - 1.6114 x - 0.2358 x**2 + (3.0413 + 0.0767 x) f

    with x = log10 F_LV and f the fraction of entrainment flood.

    Parameters
    ----------
    flow_parameter : array_like
        F_LV [-].
    flood_fraction : array_like
        f = u_n / u_n,flood [-] at the rate of interest.

    Returns
    -------
    ndarray
        psi [-], capped at 1.

    Notes
    -----
    Fair's chart covers F_LV 0.01 to 1 and 30 to 95 % of flood; outside
    F_LV 0.01 to 0.5 or f 0.3 to 0.95 the fit still answers and a warning
    is added. No stored copy of the chart could be digitized: the
    coefficients are a least-squares fit to 40 readings of the chart (F_LV
    0.01 to 0.5, 30 to 95 % of flood) recalled from memory, and agree with
    them within a factor 1.17 (rms 0.03 in log10 psi). Against the two
    published readings of Perry's Chemical Engineers' Handbook, 8th ed.,
    Section 14, Example 10 (F_LV = 0.021: psi = 0.15 at 80 %, 0.24 at 90 %
    of flood) the fit gives 0.136 and 0.266 (-10 %, +11 %). Doubtful until
    re-fitted to a real digitization of the chart.

    Source: Fair, Petro/Chem Engineer 33(10), 45 (1961); the chart is
    Perry's 7th ed. Fig. 14-28 / 8th ed. Fig. 14-34 and Sinnott, Coulson &
    Richardson's Chemical Engineering Vol. 6, 4th ed., Fig. 11.29 (figure
    numbers from memory).

    Examples
    --------
    >>> round(float(fractional_entrainment(0.021, 0.80)), 3)
    0.136
    """
    flow = np.asarray(flow_parameter, dtype=float)
    fraction = np.asarray(flood_fraction, dtype=float)
    check_range("flow parameter", flow, 0.01, 0.5, "-", _PSI_SOURCE, warnings)
    check_range("fraction of flood", fraction, 0.30, 0.95, "-", _PSI_SOURCE, warnings)
    a0, a1, a2, b0, b1 = _PSI_COEFFICIENTS
    x = np.log10(flow)
    return np.minimum(10.0 ** (a0 + a1 * x + a2 * x**2 + (b0 + b1 * x) * fraction), 1.0)


@dataclass(frozen=True)
class TrayGeometry:
    """Areas and lengths of a single-pass crossflow tray in a shell of diameter D [m, m2]."""

    tower_area: np.ndarray
    downcomer_area: np.ndarray
    net_area: np.ndarray
    active_area: np.ndarray
    hole_area: np.ndarray
    weir_length: np.ndarray
    apron_area: np.ndarray


def tray_geometry(diameter, downcomer_fraction=0.1, hole_area_fraction=0.10, weir_length_ratio=0.73,
                  weir_height=0.0508, apron_offset=0.010) -> TrayGeometry:
    r"""Areas of a single-pass tray from the shell diameter.

        A_T = pi D**2 / 4,  A_d = (A_d/A_T) A_T,  A_n = A_T - A_d,  A_a = A_T - 2 A_d,
        A_h = (A_h/A_a) A_a,  l_w = (l_w/D) D,  A_ap = (h_w - offset) l_w

    Parameters
    ----------
    diameter : array_like
        Inside shell diameter D [m].
    downcomer_fraction : array_like
        A_d/A_T [-].
    hole_area_fraction : array_like
        A_h/A_a [-].
    weir_length_ratio : array_like
        l_w/D [-].
    weir_height : array_like
        h_w [m].
    apron_offset : array_like
        How far the downcomer apron ends below the weir top [m].

    Returns
    -------
    TrayGeometry

    Notes
    -----
    Source: the area definitions of Sinnott, Coulson & Richardson's Chemical
    Engineering Vol. 6, 4th ed., Section 11.13 (net, active, hole area and
    h_ap = h_w - 5 to 10 mm; value from memory).

    Examples
    --------
    >>> g = tray_geometry(0.79, 0.12, 0.10, 0.76, 0.050, 0.010)
    >>> round(float(g.active_area), 3), round(float(g.apron_area), 4)
    (0.373, 0.024)
    """
    diameter = np.asarray(diameter, dtype=float)
    tower = np.pi * diameter**2 / 4.0
    downcomer = np.asarray(downcomer_fraction, dtype=float) * tower
    active = tower - 2.0 * downcomer
    weir = np.asarray(weir_length_ratio, dtype=float) * diameter
    apron = (np.asarray(weir_height, dtype=float) - np.asarray(apron_offset, dtype=float)) * weir
    return TrayGeometry(
        tower_area=tower,
        downcomer_area=downcomer,
        net_area=tower - downcomer,
        active_area=active,
        hole_area=np.asarray(hole_area_fraction, dtype=float) * active,
        weir_length=weir,
        apron_area=apron,
    )


def _tray_heads(gas_mass_flow, liquid_mass_flow, gas_density, liquid_density, geometry: TrayGeometry, data: dict):
    """Crest, tray head, downcomer loss and back-up at the design rates [m]; tray row ``data``."""
    crest = segmental_weir_crest(liquid_mass_flow, liquid_density, geometry.weir_length)
    if data["weep_method"] == "sieve":
        hole_velocity = np.asarray(gas_mass_flow, dtype=float) / (np.asarray(gas_density, dtype=float) * geometry.hole_area)
        tray_head = sinnott_tray_head(hole_velocity, gas_density, liquid_density, data["weir_height"], crest,
                                      data["orifice_coefficient"])
    else:  # valve trays: the estimating pressure drop per tray as head
        tray_head = data["default_pressure_drop"] / (np.asarray(liquid_density, dtype=float) * GRAVITY)
    flow_area = np.minimum(geometry.downcomer_area, geometry.apron_area)
    loss = downcomer_head_loss(liquid_mass_flow, liquid_density, flow_area)
    backup = downcomer_backup(data["weir_height"], crest, tray_head, loss)
    return crest, tray_head, loss, backup


#: Names of the limits, in the order of ``OperatingRange.utilization``.
LIMIT_NAMES = ("weeping", "entrainment", "downcomer back-up", "downcomer residence time")


@dataclass(frozen=True)
class OperatingRange:
    """Operating-range figures of a tray column per design point.

    weep_ratio : lowest-rate hole velocity over the weep-point velocity (sieve),
        or turndown fraction asked over the least the tray allows (valve) [-], >= 1 is in range;
    entrainment : fractional entrainment psi at the design rate [-];
    backup_fraction : downcomer back-up h_b over (tray spacing + weir height) [-];
    residence_time : clear-liquid residence time in the downcomer [s];
    utilization : each limit's figure over its allowed value, stacked on the
        last axis in the order of ``LIMIT_NAMES`` [-], <= 1 is in range;
    in_range : all limits met; governs : the name of the most utilized limit.
    """

    fraction_of_flood: np.ndarray
    weep_ratio: np.ndarray
    entrainment: np.ndarray
    backup_height: np.ndarray
    backup_fraction: np.ndarray
    residence_time: np.ndarray
    utilization: np.ndarray
    in_range: np.ndarray
    warnings: list[str] = field(default_factory=list)

    @property
    def governs(self) -> np.ndarray:
        """The name of the most utilized limit per point (from ``utilization``, built when asked for)."""
        return np.asarray(LIMIT_NAMES)[np.argmax(self.utilization, axis=-1)]


def tray_operating_range(
    gas_mass_flow,
    liquid_mass_flow,
    gas_density,
    liquid_density,
    diameter,
    flooding_velocity,
    downcomer_fraction=0.1,
    tray_type: str = "sieve",
    tray_spacing=0.6096,
    turndown=TURNDOWN,
    entrainment_limit=ENTRAINMENT_LIMIT,
    backup_limit=BACKUP_LIMIT,
    residence_time_min=RESIDENCE_TIME_MIN,
    *,
    tray: dict | None = None,
    warnings: list[str] | None = None,
) -> OperatingRange:
    r"""Weeping, entrainment and downcomer limits of a tray column, per design point.

    At the design loads V, L (the largest in the column):

        f        = ``fraction_of_flood`` at the shell diameter
        psi      = ``fractional_entrainment``(F_LV, f)              <= entrainment_limit
        h_b      = ``downcomer_backup`` (Sinnott's tray head, apron loss)
        h_b / (l_t + h_w)                                            <= backup_limit
        t_r      = ``downcomer_residence_time``                     >= residence_time_min

    and at the lowest expected loads, turndown x (V, L):

        sieve:  weep ratio = u_h(turndown V) / ``weep_hole_velocity``(h_w + h_ow(turndown L))  >= 1
        valve:  weep ratio = turndown / minimum_turndown of the tray row                        >= 1

    Parameters
    ----------
    gas_mass_flow, liquid_mass_flow : array_like
        Design gas and liquid loads V, L [kg/s], L > 0.
    gas_density, liquid_density : array_like
        [kg/m3].
    diameter : array_like
        Inside shell diameter [m].
    flooding_velocity : array_like
        u_n at entrainment flood through the net area [m/s] (``ColumnSize.flooding_velocity``).
    downcomer_fraction : array_like
        A_d/A_T [-] (``ColumnSize.downcomer_fraction``).
    tray_type : str
        'sieve' or 'valve' (geometry from ``models/data/tray_types.toml``).
    tray_spacing : array_like
        [m].
    turndown : array_like
        Lowest expected loads as a fraction of the design loads [-]; 0.6 is
        common practice (Kister's design example in Distillation Design,
        1992, Sec. 6.5.9, checks turndown at 60 %).
    entrainment_limit, backup_limit, residence_time_min : array_like
        The limits [-, -, s]; defaults ``ENTRAINMENT_LIMIT``, ``BACKUP_LIMIT``,
        ``RESIDENCE_TIME_MIN``.
    tray : dict or None
        Tray geometry replacing entries of the tray row (keys as in
        ``tray_data``: hole_area_fraction, hole_diameter, weir_height,
        weir_length_ratio, orifice_coefficient, apron_offset, ...) [SI].
    warnings : list of str or None
        Out-of-range messages of the correlations.

    Returns
    -------
    OperatingRange

    Notes
    -----
    Single-pass trays. Fair's entrainment chart holds for valve trays too;
    the weep-point correlation is for sieve trays only, so a valve tray's
    lower limit is its published turndown (``minimum_turndown`` of the
    tray row: 4:1, Kister, Distillation Design, Table 6.1, value from
    memory). A valve tray's tray head is its estimating pressure drop per
    tray (``default_pressure_drop``) as head of liquid.

    Source: the tray-design checks of Sinnott, Coulson & Richardson's
    Chemical Engineering Vol. 6, 4th ed., Section 11.13 (value from
    memory), with Fair's entrainment chart.

    Examples
    --------
    >>> r = tray_operating_range(2.2, 0.80, 1.92, 986.0, 0.9144, 2.74, 0.1)
    >>> bool(r.in_range), str(r.governs), round(float(r.entrainment), 3), round(float(r.weep_ratio), 2)
    (True, 'entrainment', 0.089, 1.55)
    """
    local: list[str] = []
    data = {**tray_data(tray_type), **(tray or {})}
    gas = np.asarray(gas_mass_flow, dtype=float)
    liquid = np.asarray(liquid_mass_flow, dtype=float)
    rho_v = np.asarray(gas_density, dtype=float)
    rho_l = np.asarray(liquid_density, dtype=float)
    turndown = np.asarray(turndown, dtype=float)
    if np.any(~(turndown > 0.0)) or np.any(turndown > 1.0):
        raise ValueError(f"turndown must be a fraction of the design loads in (0, 1], got {turndown!r}")
    geometry = tray_geometry(diameter, downcomer_fraction, data["hole_area_fraction"], data["weir_length_ratio"],
                             data["weir_height"], data["apron_offset"])

    flood = fraction_of_flood(gas, rho_v, flooding_velocity, diameter, downcomer_fraction)
    f_lv = flow_parameter(liquid, gas, rho_l, rho_v)
    psi = fractional_entrainment(f_lv, flood, warnings=local)

    _, _, _, backup = _tray_heads(gas, liquid, rho_v, rho_l, geometry, data)
    height = np.asarray(tray_spacing, dtype=float) + data["weir_height"]
    backup_fraction = backup / height
    residence = downcomer_residence_time(geometry.downcomer_area, backup, rho_l, liquid)

    if data["weep_method"] == "sieve":
        low_crest = segmental_weir_crest(turndown * liquid, rho_l, geometry.weir_length)
        weep_velocity = weep_hole_velocity(data["weir_height"] + low_crest, data["hole_diameter"], rho_v, warnings=local)
        low_velocity = turndown * gas / (rho_v * geometry.hole_area)
        weep_ratio = low_velocity / weep_velocity
    else:
        weep_ratio = turndown / data["minimum_turndown"]

    shape = np.broadcast_shapes(np.shape(weep_ratio), np.shape(psi), np.shape(backup_fraction), np.shape(residence))
    utilization = np.stack(
        [
            np.broadcast_to(1.0 / weep_ratio, shape),
            np.broadcast_to(psi / np.asarray(entrainment_limit, dtype=float), shape),
            np.broadcast_to(backup_fraction / np.asarray(backup_limit, dtype=float), shape),
            np.broadcast_to(np.asarray(residence_time_min, dtype=float) / residence, shape),
        ],
        axis=-1,
    )
    if warnings is not None:
        warnings.extend(local)
    return OperatingRange(
        fraction_of_flood=_own(flood, shape),
        weep_ratio=_own(weep_ratio, shape),
        entrainment=_own(psi, shape),
        backup_height=_own(backup, shape),
        backup_fraction=_own(backup_fraction, shape),
        residence_time=_own(residence, shape),
        utilization=utilization,
        in_range=np.all(utilization <= 1.0, axis=-1),
        warnings=local,
    )


def _own(values, shape) -> np.ndarray:
    """``values`` as a writable float array of ``shape`` of its own: itself when it is one already, else a copy."""
    if (isinstance(values, np.ndarray) and values.shape == shape and values.dtype == np.float64
            and values.base is None and values.flags.writeable):
        return values
    return np.broadcast_to(values, shape).astype(float)


def downcomer_diameter(
    gas_mass_flow,
    liquid_mass_flow,
    gas_density,
    liquid_density,
    downcomer_fraction=0.1,
    tray_type: str = "sieve",
    tray_spacing=0.6096,
    backup_limit=BACKUP_LIMIT,
    residence_time_min=RESIDENCE_TIME_MIN,
    smallest=0.1,
    largest=20.0,
    *,
    tray: dict | None = None,
):
    r"""Least shell diameter whose downcomers meet the back-up and residence-time limits.

        D_dc = least D such that, for this and every larger diameter,
               h_b(D) / (l_t + h_w) <= backup_limit  and  t_r(D) >= residence_time_min

    with h_b and t_r as in ``tray_operating_range`` at the design loads and a
    fixed A_d/A_T. The column diameter is then the larger of this and the
    flooding diameter (``required_diameter``).

    Parameters
    ----------
    gas_mass_flow, liquid_mass_flow : array_like
        Design loads V, L [kg/s], L > 0.
    gas_density, liquid_density : array_like
        [kg/m3].
    downcomer_fraction : array_like
        A_d/A_T [-].
    tray_type : str
        'sieve' or 'valve'.
    tray_spacing : array_like
        [m].
    backup_limit, residence_time_min : array_like
        [-], [s].
    smallest, largest : float
        Search interval [m].
    tray : dict or None
        Tray geometry replacing entries of the tray row, as in ``tray_operating_range``.

    Returns
    -------
    ndarray
        D_dc [m], to 1e-6 m; ``largest`` where even it fails.

    Notes
    -----
    The back-up falls as D grows, but the residence time need not rise
    everywhere (a large dry-tray head at small D inflates h_b), so the
    limits are first evaluated on a geometric grid of 241 diameters; the
    least grid diameter above which all of them hold brackets the answer,
    which bisection then refines (40 halvings). All design points at once.
    Source: the limits of Sinnott, Coulson & Richardson's Chemical
    Engineering Vol. 6, 4th ed., Section 11.13 (value from memory).

    Examples
    --------
    >>> round(float(downcomer_diameter(0.907, 3.0, 0.72, 954.0, 0.12, tray_spacing=0.5)), 3)
    0.738
    """
    data = {**tray_data(tray_type), **(tray or {})}
    args = np.broadcast_arrays(*(np.asarray(a, dtype=float) for a in (
        gas_mass_flow, liquid_mass_flow, gas_density, liquid_density, downcomer_fraction, tray_spacing,
        backup_limit, residence_time_min)))
    gas, liquid, rho_v, rho_l, fraction, spacing, limit_b, limit_t = (a[..., None] for a in args)
    if np.any(~(liquid > 0.0)):
        raise ValueError("the liquid rate must be > 0 kg/s for downcomer sizing")

    def meets(diameter):
        geometry = tray_geometry(diameter, fraction, data["hole_area_fraction"], data["weir_length_ratio"],
                                 data["weir_height"], data["apron_offset"])
        backup = _tray_heads(gas, liquid, rho_v, rho_l, geometry, data)[3]
        residence = geometry.downcomer_area * backup * rho_l / liquid
        return (backup <= limit_b * (spacing + data["weir_height"])) & (residence >= limit_t)

    grid = np.geomspace(smallest, largest, 241)
    ok = meets(grid)                                          # (..., 241)
    # index of the first grid point from which every larger one meets the limits
    fails_after = np.cumsum(~ok[..., ::-1], axis=-1)[..., ::-1]   # failures at or above each index
    all_above = fails_after == 0
    first = np.where(np.any(all_above, axis=-1), np.argmax(all_above, axis=-1), grid.size - 1)
    upper = grid[first]
    lower = np.where(first > 0, grid[np.maximum(first - 1, 0)], grid[0])
    for _ in range(40):
        middle = 0.5 * (lower + upper)
        good = meets(middle[..., None])[..., 0]
        upper = np.where(good, middle, upper)
        lower = np.where(good, lower, middle)
    result = np.where(first > 0, upper, grid[0])
    result = np.where(np.any(all_above, axis=-1), result, largest)
    return np.round(result, 6)


class RequiredDiameter(NamedTuple):
    """Column diameter [m] and which rule sets it ('flooding' or 'downcomer')."""

    diameter: np.ndarray
    governs: np.ndarray


def required_diameter(flooding_diameter, downcomer_limited_diameter) -> RequiredDiameter:
    r"""Column diameter from whichever rule needs the larger shell.

        D = max(D_flood, D_dc)

    Parameters
    ----------
    flooding_diameter : array_like
        From ``column_diameter`` [m].
    downcomer_limited_diameter : array_like
        From ``downcomer_diameter`` [m].

    Returns
    -------
    RequiredDiameter
        ``(diameter, governs)``, governs 'flooding' on a tie.

    Examples
    --------
    >>> d = required_diameter([0.8, 1.0], [0.9, 0.7])
    >>> d.diameter.tolist(), d.governs.tolist()
    ([0.9, 1.0], ['downcomer', 'flooding'])
    """
    flood = np.asarray(flooding_diameter, dtype=float)
    downcomer = np.asarray(downcomer_limited_diameter, dtype=float)
    return RequiredDiameter(np.maximum(flood, downcomer), np.where(downcomer > flood, "downcomer", "flooding"))
