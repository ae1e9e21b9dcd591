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
