r"""Pressure-vessel shell of a tray column: design conditions, wall thickness, weight.

For cost estimating; not a mechanical design. The relations give the plate
thickness and metal weight that purchased-cost correlations need. They leave
out wind and seismic loads, external pressure (vacuum), nozzles, skirts,
hydrotest and fabrication tolerances, which a vessel designer must add.

Thickness follows ASME Boiler and Pressure Vessel Code, Section VIII,
Division 1: UG-27(c)(1) for the cylindrical shell under internal pressure and
UG-32(d) for 2:1 ellipsoidal heads. Design conditions, the rigidity minimum
and the weight follow the estimating procedure of Seider, Seader, Lewin and
Widagdo, Product and Process Design Principles, 2nd ed., Section 16.5 (value
from memory).

SI inside: Pa (absolute unless the name says ``_gauge``), K, m, kg.
"""

from __future__ import annotations

import tomllib
from functools import lru_cache
from pathlib import Path

import numpy as np

from towercost.models.constants import FOOT, INCH, PSI
from towercost.models.constants import STANDARD_ATMOSPHERE as ATMOSPHERIC_PRESSURE
from towercost.models.validity import check_range

PLATE_STEP = INCH / 16.0  # plate thickness step, 1/16 in [m]

_MATERIAL_FILE = Path(__file__).parent / "data" / "materials.toml"
_SEIDER = "Seider et al. design-pressure rule"


@lru_cache(maxsize=1)
def _material_table() -> dict:
    with open(_MATERIAL_FILE, "rb") as handle:
        return tomllib.load(handle)


def materials() -> tuple[str, ...]:
    """Names of the plate materials in ``models/data/materials.toml``.

    Examples
    --------
    >>> materials()
    ('SA-516-70', 'SA-240-304', 'SA-240-316')
    """
    return tuple(_material_table())


def _material(material: str) -> dict:
    table = _material_table()
    if material not in table:
        raise ValueError(f"material must be one of {', '.join(table)}, got {material!r}")
    return table[material]


def allowable_stress(material: str, temperature, *, warnings: list[str] | None = None):
    r"""Maximum allowable tensile stress of a plate material at metal temperature.

    Linear interpolation in the ASME Section II, Part D, Table 1A values held
    in ``models/data/materials.toml`` (see the ``stress_source`` of each row):

        S(T) = interp(T, T_table, S_table)

    Parameters
    ----------
    material : str
        'SA-516-70', 'SA-240-304' or 'SA-240-316'.
    temperature : array_like
        Design metal temperature [K].

    Returns
    -------
    ndarray
        S [Pa].

    Notes
    -----
    Outside the tabulated temperatures (-20 F up to the last row) the end
    value is held and a warning is added. The tabulated stresses are values
    from memory of ASME II-D Table 1A.

    Examples
    --------
    >>> round(float(allowable_stress("SA-516-70", 373.15)) / 1e6, 1)
    137.9
    """
    row = _material(material)
    temps_k = (np.asarray(row["temperature_F"], dtype=float) - 32.0) / 1.8 + 273.15
    stress_pa = np.asarray(row["stress_ksi"], dtype=float) * 1000.0 * PSI
    temperature = np.asarray(temperature, dtype=float)
    check_range(
        f"metal temperature for {material}",
        temperature,
        float(temps_k[0]),
        float(temps_k[-1]),
        "K",
        "ASME II-D allowable stress table",
        warnings,
    )
    return np.interp(temperature, temps_k, stress_pa)


def metal_density(material: str) -> float:
    """Density of a plate material [kg/m3] from ``models/data/materials.toml``.

    Examples
    --------
    >>> metal_density("SA-516-70")
    7850.0
    """
    return float(_material(material)["density"])


def design_pressure(operating_pressure, *, warnings: list[str] | None = None):
    r"""Design gauge pressure of a vessel from its operating pressure.

    With P_o the operating gauge pressure in psig:

        P_d = 10 psig                                              P_o < 10 psig (and at least the formula)
        P_d = exp(0.60608 + 0.91615 ln P_o + 0.0015655 (ln P_o)**2)  10 <= P_o <= 1000 psig
        P_d = 1.1 P_o                                              P_o > 1000 psig

    Parameters
    ----------
    operating_pressure : array_like
        Operating pressure [Pa, absolute].

    Returns
    -------
    ndarray
        Design pressure [Pa, gauge].

    Notes
    -----
    Below 10 psig the larger of 10 psig and the formula is taken, which
    joins the two branches continuously. Below atmospheric pressure the
    vessel needs an external-pressure (vacuum) design this module does not
    make; 10 psig internal is returned and a warning added.

    Source: Seider, Seader, Lewin and Widagdo, Product and Process Design
    Principles, 2nd ed., Section 16.5, Eq. (16.61) (value from memory).

    Examples
    --------
    >>> p_o = 101325.0 + 100.0 * 6894.757293168   # 100 psig
    >>> round(float(design_pressure(p_o)) / 6894.757293168, 2)
    128.81
    """
    gauge_psi = (np.asarray(operating_pressure, dtype=float) - ATMOSPHERIC_PRESSURE) / PSI
    if warnings is not None and np.any(gauge_psi < 0.0):
        warnings.append(
            "operating pressure below atmospheric: vacuum service needs an external-pressure design; "
            "the estimate uses 10 psig internal"
        )
    safe = np.clip(gauge_psi, 1.0, None)
    log_p = np.log(safe)
    formula = np.exp(0.60608 + 0.91615 * log_p + 0.0015655 * log_p**2)
    design = np.where(gauge_psi > 1000.0, 1.1 * gauge_psi, np.maximum(10.0, formula))
    return design * PSI


def design_temperature(operating_temperature, margin=250.0 / 9.0):
    r"""Design metal temperature: operating temperature plus a margin.

        T_d = T_o + margin,      margin = 50 F = 27.8 K by default

    Parameters
    ----------
    operating_temperature : array_like
        [K].
    margin : array_like
        [K].

    Returns
    -------
    ndarray
        T_d [K].

    Notes
    -----
    A 50 F margin is common practice for estimating.

    Examples
    --------
    >>> round(float(design_temperature(300.0)), 2)
    327.78
    """
    return np.asarray(operating_temperature, dtype=float) + np.asarray(margin, dtype=float)


def shell_thickness(
    design_pressure_gauge,
    inside_diameter,
    allowable_stress,
    joint_efficiency=0.85,
    corrosion_allowance=0.003175,
    *,
    warnings: list[str] | None = None,
):
    r"""Thickness of a cylindrical shell under internal pressure (circumferential stress).

        t = P R / (S E - 0.6 P) + CA,      R = D_i / 2

    Parameters
    ----------
    design_pressure_gauge : array_like
        P [Pa, gauge].
    inside_diameter : array_like
        D_i [m].
    allowable_stress : array_like
        S [Pa] at design temperature.
    joint_efficiency : array_like
        E [-]; 0.85 for spot-radiographed double-welded butt joints.
    corrosion_allowance : array_like
        CA [m]; 0.003175 m = 1/8 in.

    Returns
    -------
    ndarray
        t [m].

    Notes
    -----
    Holds for P <= 0.385 S E (t <= R/2); beyond that a warning is added and
    the thick-wall rules of Mandatory Appendix 1-2 apply.

    Source: ASME Boiler and Pressure Vessel Code, Section VIII, Division 1,
    UG-27(c)(1).

    Examples
    --------
    >>> round(float(shell_thickness(1.0e6, 2.0, 138e6, 0.85, 0.0)) * 1000, 3)
    8.569
    """
    pressure = np.asarray(design_pressure_gauge, dtype=float)
    stress_joint = np.asarray(allowable_stress, dtype=float) * np.asarray(joint_efficiency, dtype=float)
    check_range("design pressure / (S E)", pressure / stress_joint, 0.0, 0.385, "-", "ASME UG-27(c)(1)", warnings)
    radius = np.asarray(inside_diameter, dtype=float) / 2.0
    return pressure * radius / (stress_joint - 0.6 * pressure) + np.asarray(corrosion_allowance, dtype=float)


def head_thickness(
    design_pressure_gauge,
    inside_diameter,
    allowable_stress,
    joint_efficiency=0.85,
    corrosion_allowance=0.003175,
):
    r"""Thickness of a 2:1 ellipsoidal head under internal pressure.

        t = P D / (2 S E - 0.2 P) + CA

    Parameters
    ----------
    design_pressure_gauge : array_like
        P [Pa, gauge].
    inside_diameter : array_like
        D [m], inside diameter of the skirt of the head.
    allowable_stress : array_like
        S [Pa].
    joint_efficiency : array_like
        E [-].
    corrosion_allowance : array_like
        CA [m].

    Returns
    -------
    ndarray
        t [m].

    Notes
    -----
    Source: ASME Boiler and Pressure Vessel Code, Section VIII, Division 1,
    UG-32(d).

    Examples
    --------
    >>> round(float(head_thickness(1.0e6, 2.0, 138e6, 0.85, 0.0)) * 1000, 3)
    8.532
    """
    pressure = np.asarray(design_pressure_gauge, dtype=float)
    stress_joint = np.asarray(allowable_stress, dtype=float) * np.asarray(joint_efficiency, dtype=float)
    return pressure * np.asarray(inside_diameter, dtype=float) / (2.0 * stress_joint - 0.2 * pressure) + np.asarray(
        corrosion_allowance, dtype=float
    )


def minimum_thickness(inside_diameter, *, warnings: list[str] | None = None):
    r"""Smallest shell plate for rigidity in handling, by diameter.

        D_i <= 4 ft:     1/4 in
        4 to 6 ft:       5/16 in
        6 to 8 ft:       3/8 in
        8 to 10 ft:      7/16 in
        10 to 12 ft:     1/2 in

    i.e. t_min = 1/4 in + 1/16 in * ceil((D_i - 4 ft) / 2 ft) above 4 ft.

    Parameters
    ----------
    inside_diameter : array_like
        D_i [m].

    Returns
    -------
    ndarray
        t_min [m], without corrosion allowance.

    Notes
    -----
    Above 12 ft the 1/16 in per 2 ft steps are continued and a warning is
    added.

    Source: Seider, Seader, Lewin and Widagdo, Product and Process Design
    Principles, 2nd ed., Section 16.5 (value from memory).

    Examples
    --------
    >>> (minimum_thickness([1.0, 1.5, 2.5, 3.5]) / 0.0254 * 16).round(6).tolist()
    [4.0, 5.0, 7.0, 8.0]
    """
    diameter_ft = np.asarray(inside_diameter, dtype=float) / FOOT
    check_range("inside diameter", diameter_ft * FOOT, 0.0, 12.0 * FOOT, "m", "rigidity minimum thickness table", warnings)
    steps = np.ceil(np.clip(diameter_ft - 4.0, 0.0, None) / 2.0 - 1e-9)
    return (4.0 + steps) * PLATE_STEP


def round_up_to_plate(thickness, step=PLATE_STEP):
    r"""Round a thickness up to the next standard plate step.

        t_plate = step * ceil(t / step),     step = 1/16 in

    Parameters
    ----------
    thickness : array_like
        [m].
    step : float
        [m].

    Returns
    -------
    ndarray
        [m].

    Notes
    -----
    Plate in 1/16 in steps is common practice. A thickness within 1e-9 of a
    step is taken as that step.

    Examples
    --------
    >>> round(float(round_up_to_plate(0.0070)) / 0.0254 * 16, 6)
    5.0
    """
    return np.ceil(np.asarray(thickness, dtype=float) / step - 1e-9) * step


def wall_thickness(
    design_pressure_gauge,
    inside_diameter,
    allowable_stress,
    joint_efficiency=0.85,
    corrosion_allowance=0.003175,
    *,
    warnings: list[str] | None = None,
):
    r"""Shell plate thickness for estimating: pressure or rigidity, plus corrosion.

        t = plate_up(max(t_pressure, t_min) + CA)

    with t_pressure from ``shell_thickness`` without corrosion allowance,
    t_min from ``minimum_thickness`` and plate_up from ``round_up_to_plate``.

    Parameters
    ----------
    design_pressure_gauge : array_like
        [Pa, gauge].
    inside_diameter : array_like
        [m].
    allowable_stress : array_like
        [Pa].
    joint_efficiency : array_like
        [-].
    corrosion_allowance : array_like
        [m].

    Returns
    -------
    ndarray
        Ordered plate thickness [m].

    Notes
    -----
    Wind and seismic loads on tall columns are not included. Source: the
    estimating procedure of Seider, Seader, Lewin and Widagdo, Product and
    Process Design Principles, 2nd ed., Section 16.5 (value from memory).

    Examples
    --------
    >>> round(float(wall_thickness(1.0e6, 2.0, 138e6)) / 0.0254 * 16, 6)
    8.0
    """
    pressure_part = shell_thickness(
        design_pressure_gauge, inside_diameter, allowable_stress, joint_efficiency, 0.0, warnings=warnings
    )
    rigidity = minimum_thickness(inside_diameter, warnings=warnings)
    return round_up_to_plate(np.maximum(pressure_part, rigidity) + np.asarray(corrosion_allowance, dtype=float))


def shell_weight(inside_diameter, tangent_length, thickness, metal_density=7850.0):
    r"""Metal weight of a cylindrical shell with two 2:1 ellipsoidal heads.

        W = pi (D_i + t)(L + 0.8 D_i) t rho

    Parameters
    ----------
    inside_diameter : array_like
        D_i [m].
    tangent_length : array_like
        L, tangent-to-tangent length [m].
    thickness : array_like
        t, shell and head plate [m].
    metal_density : array_like
        rho [kg/m3].

    Returns
    -------
    ndarray
        W [kg], excluding nozzles, manholes, skirt and internals.

    Notes
    -----
    The 0.8 D_i term adds the two heads as extra cylinder length. Source:
    Seider, Seader, Lewin and Widagdo, Product and Process Design
    Principles, 2nd ed., Section 16.5, Eq. (16.59) (value from memory).

    Examples
    --------
    >>> round(float(shell_weight(1.0, 10.0, 0.01)), 1)
    2690.1
    """
    diameter = np.asarray(inside_diameter, dtype=float)
    thickness = np.asarray(thickness, dtype=float)
    return (
        np.pi
        * (diameter + thickness)
        * (np.asarray(tangent_length, dtype=float) + 0.8 * diameter)
        * thickness
        * np.asarray(metal_density, dtype=float)
    )


def tray_weight(diameter, trays, mass_per_area=60.0):
    r"""Metal weight of the trays for estimating.

        W_trays = N_trays * mass_per_area * pi D**2 / 4

    Parameters
    ----------
    diameter : array_like
        Inside tower diameter D [m].
    trays : array_like
        Number of trays [-].
    mass_per_area : array_like
        Installed tray metal (deck, downcomer, support ring and beams) per
        unit tower cross-section [kg/m2]; 60 kg/m2 is common practice for
        carbon-steel single-pass trays.

    Returns
    -------
    ndarray
        [kg].

    Examples
    --------
    >>> round(float(tray_weight(1.0, 10)), 1)
    471.2
    """
    area = np.pi * np.asarray(diameter, dtype=float) ** 2 / 4.0
    return np.asarray(trays, dtype=float) * np.asarray(mass_per_area, dtype=float) * area


def head_wall_thickness(
    design_pressure_gauge,
    inside_diameter,
    allowable_stress,
    joint_efficiency=0.85,
    corrosion_allowance=0.003175,
    *,
    warnings: list[str] | None = None,
):
    r"""Plate thickness of a 2:1 ellipsoidal head for estimating: pressure or rigidity, plus corrosion.

        t = plate_up(max(t_pressure, t_min) + CA)

    with t_pressure from ``head_thickness`` (ASME UG-32(d)) without corrosion
    allowance, t_min the rigidity minimum of ``minimum_thickness`` for the
    shell diameter and plate_up from ``round_up_to_plate``: the same
    construction as ``wall_thickness`` for the shell.

    Parameters
    ----------
    design_pressure_gauge : array_like
        [Pa, gauge].
    inside_diameter : array_like
        [m].
    allowable_stress : array_like
        [Pa].
    joint_efficiency : array_like
        [-] of the head (seamless heads take 1.0).
    corrosion_allowance : array_like
        [m].
    warnings : list of str or None
        Receives the rigidity table's message above 12 ft.

    Returns
    -------
    ndarray
        Ordered plate thickness of the head after forming [m]; forming
        thins the knuckle, so the blank is ordered somewhat thicker, a
        fabricator's allowance not included here.

    Notes
    -----
    Rigidity minimum and corrosion allowance as for the shell, after the
    estimating procedure of Seider, Seader, Lewin and Widagdo, Product and
    Process Design Principles, 2nd ed., Section 16.5 (value from memory);
    pressure thickness: ASME Boiler and Pressure Vessel Code, Section VIII,
    Division 1, UG-32(d).

    Examples
    --------
    >>> round(float(head_wall_thickness(1.0e6, 2.0, 138e6)) / 0.0254 * 16, 6)
    8.0
    """
    pressure_part = head_thickness(design_pressure_gauge, inside_diameter, allowable_stress, joint_efficiency, 0.0)
    rigidity = minimum_thickness(inside_diameter, warnings=warnings)
    return round_up_to_plate(np.maximum(pressure_part, rigidity) + np.asarray(corrosion_allowance, dtype=float))


#: Straight flange of a formed head [m]: 2 in (common practice, 1.5 to 2 in).
STRAIGHT_FLANGE = 0.0508


def head_blank_diameter(inside_diameter, straight_flange=STRAIGHT_FLANGE):
    r"""Diameter of the flat circular blank a 2:1 ellipsoidal head is formed from.

        BD = 1.15 D + 2 SF

    Parameters
    ----------
    inside_diameter : array_like
        D [m].
    straight_flange : array_like
        SF [m], the cylindrical lip of the head.

    Returns
    -------
    ndarray
        BD [m].

    Notes
    -----
    The blank area pi BD**2 / 4 is up to 8 % below the true mid-surface area
    of a 2:1 semi-ellipsoid (1.084 D_m**2) plus its flange (the metal is
    drawn thinner in forming), and within 1 % of it for small heads. Source: head-dimension data sheet "as per ASME
    Section VIII, UG-32", stored public copy read through the search tool
    (2:1 ellipsoidal: blank diameter = D x 1.15 + 2 SF; the same rule is in
    Megyesy, Pressure Vessel Handbook, value from memory).

    Examples
    --------
    >>> round(float(head_blank_diameter(2.0)), 4)
    2.4016
    """
    return 1.15 * np.asarray(inside_diameter, dtype=float) + 2.0 * np.asarray(straight_flange, dtype=float)


def head_weight(inside_diameter, thickness, metal_density=7850.0, straight_flange=STRAIGHT_FLANGE):
    r"""Metal weight of one 2:1 ellipsoidal head, from its blank.

        W_head = rho t pi BD**2 / 4,     BD = ``head_blank_diameter``

    Parameters
    ----------
    inside_diameter : array_like
        D [m].
    thickness : array_like
        Head plate t [m] (``head_wall_thickness``).
    metal_density : array_like
        rho [kg/m3].
    straight_flange : array_like
        SF [m].

    Returns
    -------
    ndarray
        W_head [kg] of one head; a column has two.

    Notes
    -----
    With ``cylinder_weight`` this reports shell and heads apart; their sum
    lies within 4 % of ``shell_weight`` (0.8 D of extra length for two
    heads) for towers 3 to 30 diameters tall. Source: blank rule of ``head_blank_diameter``.

    Examples
    --------
    >>> round(float(head_weight(2.0, 0.01)), 1)
    355.6
    """
    blank = head_blank_diameter(inside_diameter, straight_flange)
    return (np.asarray(metal_density, dtype=float) * np.asarray(thickness, dtype=float)
            * np.pi * blank**2 / 4.0)


def cylinder_weight(inside_diameter, tangent_length, thickness, metal_density=7850.0):
    r"""Metal weight of the cylindrical shell alone, tangent line to tangent line.

        W_cyl = pi (D_i + t) L t rho

    Parameters
    ----------
    inside_diameter : array_like
        D_i [m].
    tangent_length : array_like
        L [m].
    thickness : array_like
        Shell plate t [m] (``wall_thickness``).
    metal_density : array_like
        rho [kg/m3].

    Returns
    -------
    ndarray
        W_cyl [kg], heads, nozzles, skirt and internals excluded.

    Notes
    -----
    Mean-diameter form of the exact annulus volume pi/4 ((D_i + 2t)**2 - D_i**2) L
    (identical). Source: geometry; the shell part of Seider et al., 2nd ed.,
    Eq. (16.59) (value from memory).

    Examples
    --------
    >>> round(float(cylinder_weight(1.0, 10.0, 0.01)), 1)
    2490.8
    """
    diameter = np.asarray(inside_diameter, dtype=float)
    thickness = np.asarray(thickness, dtype=float)
    return np.pi * (diameter + thickness) * np.asarray(tangent_length, dtype=float) * thickness * np.asarray(
        metal_density, dtype=float)
