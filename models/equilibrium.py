"""Vapour-liquid equilibrium ratios K = y / x for dilute solutes.

Every relation here gives, or corrects, the equilibrium ratio of a solute
between gas and liquid in the dilute limit, where the equilibrium line is
straight and the Kremser relations hold:

* Henry's law, from a constant in any of the common scales
  (:func:`volatility_constant`, :func:`k_from_henry`);
* modified Raoult's law, from vapour pressure and activity coefficient
  (:func:`k_from_vapour_pressure`);
* van 't Hoff temperature dependence (:func:`henry_at_temperature`,
  :func:`van_t_hoff_slope`, :func:`slope_from_two_points`);
* total-pressure dependence (:func:`k_at_pressure`);
* a check that the streams really are dilute (:func:`dilute_warnings`);
* beyond the dilute limit, the curved equilibrium line of a constant K on
  the solute-free (mole-ratio) basis (:func:`gas_ratio_at_equilibrium`,
  :func:`liquid_ratio_at_equilibrium`);
* vapour pressure of a pure liquid by CAS number from tabulated DIPPR-101
  coefficients (:func:`vapour_pressure_dippr101`).

SI throughout: Pa (absolute), K, mol/m3, kg/mol, J/mol. Mole ratios are mol
of solute per mol of solute-free phase [-].
"""

from __future__ import annotations

import numpy as np

from towercost.models.constants import GAS_CONSTANT
from towercost.models.constants import STANDARD_ATMOSPHERE as ATMOSPHERE
from towercost.models.validity import check_range

#: Reference temperature of the dimensionless concentration scales [K]
#: (the convention of ``chemicals.Henry_converter``).
CONCENTRATION_SCALE_TEMPERATURE = 298.15
#: Temperature that defines the Bunsen coefficient [K].
BUNSEN_TEMPERATURE = 273.15

# How each scale maps onto the volatility constant H^px [Pa] (p = H^px x):
#     H^px = coefficient * value**exponent * rho_m**density_power
#            * M**mass_power * T**temperature_power
# with rho_m the solvent molar density [mol/m3], M its molar mass [kg/mol] and
# T the temperature of the dimensionless concentration scales [K].
# Scale names are those of chemicals.Henry_converter (chemicals 1.x).
_R = GAS_CONSTANT
_ATM = ATMOSPHERE
_SCALES: dict[str, tuple[float, int, int, int, int]] = {
    # solubility constants (solute in liquid per partial pressure)
    "Hcp": (1.0, -1, 1, 0, 0),                     # mol/(m3 Pa): x = Hcp p / rho_m
    "mol/(m^3*Pa)": (1.0, -1, 1, 0, 0),
    "M/atm": (_ATM / 1000.0, -1, 1, 0, 0),         # mol/(L atm)
    "Hcc": (_R, -1, 1, 0, 1),                      # c_aq / c_gas [-]
    "mol/(kg*Pa)": (1.0, -1, 0, -1, 0),            # molality per Pa: x = b M
    "Hbp": (_ATM, -1, 0, -1, 0),                   # mol/(kg atm)
    "mol/(kg*atm)": (_ATM, -1, 0, -1, 0),
    "Hxp": (_ATM, -1, 0, 0, 0),                    # 1/atm: x = Hxp p[atm]
    "1/atm": (_ATM, -1, 0, 0, 0),
    "alpha": (_R * BUNSEN_TEMPERATURE, -1, 1, 0, 0),   # Bunsen coefficient [-]
    "bunsen coefficient": (_R * BUNSEN_TEMPERATURE, -1, 1, 0, 0),
    # volatility constants (partial pressure per solute in liquid)
    "KHpx": (_ATM, 1, 0, 0, 0),                    # atm: p[atm] = KHpx x
    "atm": (_ATM, 1, 0, 0, 0),
    "m^3*Pa/mol": (1.0, 1, 1, 0, 0),               # p = KHpc c
    "KHpc": (_ATM, 1, 1, 0, 0),                    # m3 atm/mol
    "m^3*atm/mol": (_ATM, 1, 1, 0, 0),
    "KHcc": (_R, 1, 1, 0, 1),                      # c_gas / c_aq [-]
    "SI": (1.0, 1, 0, 0, 0),                       # Pa: p = H x
}

#: Scales that need the solvent molar density [mol/m3].
SCALES_NEEDING_DENSITY = tuple(s for s, v in _SCALES.items() if v[2] != 0)
#: Scales that need the solvent molar mass [kg/mol].
SCALES_NEEDING_MOLAR_MASS = tuple(s for s, v in _SCALES.items() if v[3] != 0)
#: Every scale understood by :func:`volatility_constant`.
HENRY_SCALES = tuple(_SCALES)


def volatility_constant(
    henry,
    scale: str,
    *,
    liquid_molar_density=None,
    liquid_molar_mass=None,
    temperature=CONCENTRATION_SCALE_TEMPERATURE,
):
    r"""Henry's-law constant in the mole-fraction volatility form H^px [Pa].

    Converts a constant from any common scale to H^px in

        p = H^px x

    with p the solute partial pressure [Pa] and x its liquid mole fraction,
    in the dilute limit (x = c / rho_m, x = b M). For example

        Hcp  [mol/(m3 Pa)]:  H^px = rho_m / Hcp
        Hcc  [-]:            H^px = rho_m R T / Hcc
        Hbp  [mol/(kg atm)]: H^px = atm / (Hbp M)
        KHpc [m3 atm/mol]:   H^px = atm rho_m KHpc

    Parameters
    ----------
    henry : array_like
        The constant, in the units of ``scale``, > 0.
    scale : str
        One of the scale names of ``chemicals.Henry_converter``: 'Hcp' or
        'mol/(m^3*Pa)', 'M/atm', 'Hcc', 'mol/(kg*Pa)', 'Hbp' or
        'mol/(kg*atm)', 'Hxp' or '1/atm', 'alpha' or 'bunsen coefficient'
        (solubility forms); 'KHpx' or 'atm', 'm^3*Pa/mol', 'KHpc' or
        'm^3*atm/mol', 'KHcc', 'SI' [Pa] (volatility forms). Note that, as
        in ``chemicals``, 'Hxp' is in 1/atm and 'KHpx' in atm.
    liquid_molar_density : array_like, optional
        Solvent molar density rho_m [mol/m3]; required by the volume-based
        scales (``SCALES_NEEDING_DENSITY``: 'Hcp', 'M/atm', 'Hcc', Bunsen,
        'KHpc', 'm^3*Pa/mol', 'KHcc'). Water at 298.15 K: 55 345 mol/m3.
    liquid_molar_mass : array_like, optional
        Solvent molar mass M [kg/mol]; required by the molality scales
        ('Hbp', 'mol/(kg*atm)', 'mol/(kg*Pa)'). Water: 0.018015 kg/mol.
    temperature : array_like, optional
        Temperature [K] at which a dimensionless concentration ratio ('Hcc',
        'KHcc') converts gas concentration to pressure, c = p / (R T).
        Default 298.15 K, the convention of ``chemicals.Henry_converter``;
        pass the system temperature for a constant measured there. The
        Bunsen coefficient is defined at 273.15 K and ignores it.

    Returns
    -------
    ndarray
        H^px [Pa].

    Notes
    -----
    Scale definitions and conversions: Sander, "Compilation of Henry's law
    constants (version 4.0) for water as solvent", Atmos. Chem. Phys. 15,
    4399-4981 (2015), Section 2; checked against
    ``chemicals.Henry_converter`` (chemicals 1.x) for every scale.

    Examples
    --------
    >>> round(float(volatility_constant(3.3e-4, "Hcp", liquid_molar_density=55345.0)) / 1e8, 4)
    1.6771
    """
    try:
        coefficient, exponent, density_power, mass_power, temperature_power = _SCALES[scale]
    except KeyError:
        raise ValueError(
            f"unknown Henry's-law scale {scale!r}; use one of {', '.join(HENRY_SCALES)}"
        ) from None
    value = np.asarray(henry, dtype=float)
    if np.any(value <= 0.0):
        raise ValueError(f"Henry's-law constant must be > 0, got {henry}")
    result = coefficient * value**exponent
    if density_power:
        if liquid_molar_density is None:
            raise ValueError(f"scale {scale!r} needs the solvent molar density [mol/m3]")
        result = result * np.asarray(liquid_molar_density, dtype=float) ** density_power
    if mass_power:
        if liquid_molar_mass is None:
            raise ValueError(f"scale {scale!r} needs the solvent molar mass [kg/mol]")
        result = result * np.asarray(liquid_molar_mass, dtype=float) ** mass_power
    if temperature_power:
        result = result * np.asarray(temperature, dtype=float) ** temperature_power
    return result


def k_from_henry(
    henry,
    scale: str,
    pressure,
    *,
    liquid_molar_density=None,
    liquid_molar_mass=None,
    temperature=CONCENTRATION_SCALE_TEMPERATURE,
):
    r"""Equilibrium ratio K = y / x of a dilute solute from Henry's law.

        K = H^px / P

    with H^px the volatility constant [Pa] from :func:`volatility_constant`
    and P the total pressure. The gas is taken as ideal (y = p / P).

    Parameters
    ----------
    henry : array_like
        Henry's-law constant in the units of ``scale``, > 0.
    scale : str
        Scale name as in :func:`volatility_constant` (the names of
        ``chemicals.Henry_converter``).
    pressure : array_like
        Total pressure P [Pa], > 0.
    liquid_molar_density : array_like, optional
        Solvent molar density [mol/m3]; needed by 'Hcp', 'M/atm', 'Hcc',
        Bunsen, 'KHpc', 'm^3*Pa/mol', 'KHcc'.
    liquid_molar_mass : array_like, optional
        Solvent molar mass [kg/mol]; needed by 'Hbp', 'mol/(kg*atm)',
        'mol/(kg*Pa)'.
    temperature : array_like, optional
        Temperature [K] for the dimensionless scales 'Hcc' and 'KHcc'
        (default 298.15 K, as ``chemicals.Henry_converter``).

    Returns
    -------
    ndarray
        K [-].

    Notes
    -----
    Holds for dilute solutions (Henry's law) at pressures where the gas is
    near ideal. Source: Sander, Atmos. Chem. Phys. 15, 4399 (2015), Sec. 2.

    Examples
    --------
    CO2 in water at 298.15 K and 1 atm, Hcp = 3.3e-4 mol/(m3 Pa) (Sander 2015):

    >>> round(float(k_from_henry(3.3e-4, "Hcp", 101325.0, liquid_molar_density=55345.0)))
    1655
    """
    pressure = np.asarray(pressure, dtype=float)
    if np.any(pressure <= 0.0):
        raise ValueError(f"total pressure must be > 0 Pa, got {pressure}")
    volatility = volatility_constant(
        henry,
        scale,
        liquid_molar_density=liquid_molar_density,
        liquid_molar_mass=liquid_molar_mass,
        temperature=temperature,
    )
    return volatility / pressure


def k_from_vapour_pressure(vapour_pressure, pressure, activity_coefficient=1.0):
    r"""Equilibrium ratio from modified Raoult's law.

        K = gamma Psat / P

    For a dilute solute use its infinite-dilution activity coefficient
    gamma^inf; then gamma^inf Psat is its Henry's-law constant H^px.

    Parameters
    ----------
    vapour_pressure : array_like
        Vapour pressure of the pure solute Psat [Pa], > 0.
    pressure : array_like
        Total pressure P [Pa], > 0.
    activity_coefficient : array_like, optional
        Liquid-phase activity coefficient gamma [-], > 0; 1 for an ideal
        solution.

    Returns
    -------
    ndarray
        K [-].

    Notes
    -----
    Ideal gas, Poynting correction neglected (low pressure). Source: Smith,
    Van Ness & Abbott, Introduction to Chemical Engineering Thermodynamics,
    7th ed., Sec. 10.5 (modified Raoult's law).

    Examples
    --------
    >>> float(k_from_vapour_pressure(12_700.0, 101_325.0, 2.0))  # doctest: +ELLIPSIS
    0.2506...
    """
    vapour_pressure = np.asarray(vapour_pressure, dtype=float)
    pressure = np.asarray(pressure, dtype=float)
    gamma = np.asarray(activity_coefficient, dtype=float)
    if np.any(vapour_pressure <= 0.0) or np.any(pressure <= 0.0) or np.any(gamma <= 0.0):
        raise ValueError("vapour pressure, total pressure and activity coefficient must be > 0")
    return gamma * vapour_pressure / pressure


def henry_at_temperature(henry_ref, temperature_ref, temperature, slope):
    r"""Henry's-law constant at another temperature (van 't Hoff).

        H(T) = H_ref exp[ slope (1/T - 1/T_ref) ],   slope = d ln H / d(1/T)

    The sign of ``slope`` belongs to the scale of ``henry_ref``. Sander's
    compilation tabulates it for the solubility constant Hcp, where
    slope = -Delta_sol H / R is positive for most gases (they dissolve less
    as the liquid warms). For a volatility constant (H^px, 'KHpx', 'SI',
    'KHpc') the slope of the same solute has the opposite sign. Constants in
    'Hcc' or 'KHcc' carry an extra factor T; convert them first.

    Parameters
    ----------
    henry_ref : array_like
        Constant at ``temperature_ref``, any scale [as given].
    temperature_ref : array_like
        Reference temperature T_ref [K], > 0 (298.15 K in Sander 2015).
    temperature : array_like
        Temperature T [K], > 0.
    slope : array_like
        d ln H / d(1/T) for the scale of ``henry_ref`` [K].

    Returns
    -------
    ndarray
        H(T), same scale as ``henry_ref``.

    Notes
    -----
    Assumes a constant enthalpy of solution over the interval; reliable over
    a few tens of kelvin. Source: Sander, Atmos. Chem. Phys. 15, 4399
    (2015), section on temperature dependence (equation number not
    verified).

    Examples
    --------
    CO2 (Hcp = 3.3e-4 mol/(m3 Pa), slope 2400 K, Sander 2015) at 293.15 K:

    >>> round(float(henry_at_temperature(3.3e-4, 298.15, 293.15, 2400.0)) * 1e4, 4)
    3.7857
    """
    temperature_ref = np.asarray(temperature_ref, dtype=float)
    temperature = np.asarray(temperature, dtype=float)
    if np.any(temperature_ref <= 0.0) or np.any(temperature <= 0.0):
        raise ValueError("temperatures must be > 0 K")
    return np.asarray(henry_ref, dtype=float) * np.exp(
        np.asarray(slope, dtype=float) * (1.0 / temperature - 1.0 / temperature_ref)
    )


def van_t_hoff_slope(enthalpy_of_solution):
    r"""Temperature slope of a solubility-type Henry's constant.

        slope = d ln Hcp / d(1/T) = -Delta_sol H / R

    Parameters
    ----------
    enthalpy_of_solution : array_like
        Enthalpy of solution Delta_sol H [J/mol] (negative for most gases:
        dissolving releases heat).

    Returns
    -------
    ndarray
        slope [K], for solubility scales (Hcp, Hcc at fixed T, Hxp); the
        negative of it for volatility scales.

    Notes
    -----
    Source: Sander, Atmos. Chem. Phys. 15, 4399 (2015), section on
    temperature dependence (equation number not verified).

    Examples
    --------
    >>> round(float(van_t_hoff_slope(-19_954.7)))
    2400
    """
    return -np.asarray(enthalpy_of_solution, dtype=float) / GAS_CONSTANT


def slope_from_two_points(henry_1, temperature_1, henry_2, temperature_2):
    r"""van 't Hoff slope through two (T, H) points.

        slope = ln(H_2 / H_1) / (1/T_2 - 1/T_1)

    Parameters
    ----------
    henry_1, henry_2 : array_like
        The constant at the two temperatures, same scale, > 0.
    temperature_1, temperature_2 : array_like
        The two temperatures [K], > 0, different.

    Returns
    -------
    ndarray
        d ln H / d(1/T) [K] in the scale of the constants.

    Examples
    --------
    >>> h2 = henry_at_temperature(1.7e-3, 298.15, 318.15, 4200.0)
    >>> round(float(slope_from_two_points(1.7e-3, 298.15, h2, 318.15)), 6)
    4200.0
    """
    henry_1 = np.asarray(henry_1, dtype=float)
    henry_2 = np.asarray(henry_2, dtype=float)
    temperature_1 = np.asarray(temperature_1, dtype=float)
    temperature_2 = np.asarray(temperature_2, dtype=float)
    if np.any(henry_1 <= 0.0) or np.any(henry_2 <= 0.0):
        raise ValueError("Henry's-law constants must be > 0")
    if np.any(temperature_1 <= 0.0) or np.any(temperature_2 <= 0.0):
        raise ValueError("temperatures must be > 0 K")
    if np.any(temperature_1 == temperature_2):
        raise ValueError("the two temperatures must differ")
    return np.log(henry_2 / henry_1) / (1.0 / temperature_2 - 1.0 / temperature_1)


def k_at_pressure(k_ref, pressure_ref, pressure):
    r"""Equilibrium ratio at another total pressure.

        K(P) = K_ref P_ref / P

    Exact for Henry's law and modified Raoult's law with an ideal gas: the
    liquid-side quantity (H^px or gamma Psat) does not depend on P.

    Parameters
    ----------
    k_ref : array_like
        K at ``pressure_ref`` [-].
    pressure_ref : array_like
        Total pressure of ``k_ref`` [Pa], > 0.
    pressure : array_like
        New total pressure [Pa], > 0.

    Returns
    -------
    ndarray
        K(P) [-].

    Examples
    --------
    >>> float(k_at_pressure(300.0, 101325.0, 303975.0))
    100.0
    """
    pressure_ref = np.asarray(pressure_ref, dtype=float)
    pressure = np.asarray(pressure, dtype=float)
    if np.any(pressure_ref <= 0.0) or np.any(pressure <= 0.0):
        raise ValueError("pressures must be > 0 Pa")
    return np.asarray(k_ref, dtype=float) * (pressure_ref / pressure)


def k_at_conditions(
    henry_ref,
    scale: str,
    temperature_ref,
    slope,
    temperature,
    pressure,
    *,
    liquid_molar_density=None,
    liquid_molar_mass=None,
    warnings: list[str] | None = None,
):
    r"""K = y / x at (T, P) from a tabulated Henry's constant and its slope.

        H(T) = H_ref exp[slope (1/T - 1/T_ref)]   (in ``scale``)
        K    = H^px(T) / P

    Convenience for the scenario layer: :func:`henry_at_temperature` then
    :func:`k_from_henry`. ``slope`` is d ln H / d(1/T) of the constant in
    ``scale`` (for Sander's Hcp it is his tabulated value, positive for most
    gases). For 'Hcc' and 'KHcc' the concentration-to-pressure conversion
    uses ``temperature``.

    Parameters
    ----------
    henry_ref : array_like
        Constant at ``temperature_ref`` in ``scale``.
    scale : str
        Scale name as in :func:`volatility_constant`.
    temperature_ref : array_like
        Temperature of ``henry_ref`` [K].
    slope : array_like
        d ln H / d(1/T) for ``scale`` [K].
    temperature : array_like
        Operating temperature [K].
    pressure : array_like
        Operating total pressure [Pa].
    liquid_molar_density : array_like, optional
        Solvent molar density at ``temperature`` [mol/m3], for the volume
        scales.
    liquid_molar_mass : array_like, optional
        Solvent molar mass [kg/mol], for the molality scales.
    warnings : list of str, optional
        Receives a message if ``temperature`` is more than 30 K from
        ``temperature_ref`` (constant-enthalpy van 't Hoff; common practice).

    Returns
    -------
    ndarray
        K [-].

    Examples
    --------
    >>> round(float(k_at_conditions(3.3e-4, "Hcp", 298.15, 2400.0, 293.15, 101325.0,
    ...                              liquid_molar_density=55345.0)))
    1443
    """
    temperature = np.asarray(temperature, dtype=float)
    temperature_ref = np.asarray(temperature_ref, dtype=float)
    check_range(
        "temperature",
        temperature - temperature_ref,
        -30.0,
        30.0,
        "K from the Henry's-law reference temperature",
        "van 't Hoff extrapolation at constant enthalpy of solution (common practice)",
        warnings,
    )
    henry = henry_at_temperature(henry_ref, temperature_ref, temperature, slope)
    return k_from_henry(
        henry,
        scale,
        pressure,
        liquid_molar_density=liquid_molar_density,
        liquid_molar_mass=liquid_molar_mass,
        temperature=temperature,
    )


def _relative_change_from_solute(fraction_in, fraction_out):
    # Solute-free carrier is conserved: F_in (1 - z_in) = F_out (1 - z_out), so
    # (F_out - F_in) / F_in = (z_out - z_in) / (1 - z_out).
    return np.abs(fraction_out - fraction_in) / (1.0 - fraction_out)


def dilute_warnings(
    gas_in,
    gas_out,
    liquid_in,
    liquid_out,
    *,
    gas_flow_in=None,
    gas_flow_out=None,
    liquid_flow_in=None,
    liquid_flow_out=None,
    max_mole_fraction=0.01,
    max_flow_change=0.05,
) -> list[str]:
    r"""Messages for streams too concentrated for the Kremser (dilute) method.

    The Kremser relations assume a straight equilibrium line and constant
    molar flows L and V. Two checks, with thresholds that are common
    practice (no published source):

    1. total solute mole fraction of each stream <= ``max_mole_fraction``
       (default 0.01);
    2. relative change of each phase's molar flow across the column
       <= ``max_flow_change`` (default 0.05). With both flows given it is
       |F_out - F_in| / F_in; otherwise it follows from the solute-free
       carrier balance F_in (1 - Z_in) = F_out (1 - Z_out):

           |F_out - F_in| / F_in = |Z_out - Z_in| / (1 - Z_out)

       with Z the total solute mole fraction of that phase (sum over solutes).

    Parameters
    ----------
    gas_in, gas_out, liquid_in, liquid_out : array_like
        Solute mole fractions [-] of the entering and leaving gas and liquid;
        the last axis runs over solutes (a scalar is one solute). Leading
        axes, if any, are design points; the worst point is reported.
    gas_flow_in, gas_flow_out, liquid_flow_in, liquid_flow_out : array_like, optional
        Total molar flows [mol/s]; used for the flow check of a phase when
        both its flows are given.
    max_mole_fraction : float
        Largest total solute mole fraction counted as dilute [-].
    max_flow_change : float
        Largest relative change of a phase flow counted as constant [-].

    Returns
    -------
    list of str
        One message per failed check; empty when the streams are dilute.

    Examples
    --------
    >>> dilute_warnings([0.002, 0.001], [0.0001, 0.0], [0.0, 0.0], [0.0004, 0.0002])
    []
    >>> dilute_warnings(0.08, 0.004, 0.0, 0.006)  # doctest: +NORMALIZE_WHITESPACE
    ['gas inlet total solute mole fraction 0.08 exceeds 0.01; the Kremser method
      assumes dilute streams (straight equilibrium line, constant flows)',
     'gas flow changes by 7.63% across the column (more than 5%); the Kremser method
      assumes dilute streams with constant gas and liquid flows']
    """
    streams = {
        "gas inlet": gas_in,
        "gas outlet": gas_out,
        "liquid inlet": liquid_in,
        "liquid outlet": liquid_out,
    }
    totals = {}
    for name, fractions in streams.items():
        arr = np.asarray(fractions, dtype=float)
        if np.any(arr < 0.0):
            raise ValueError(f"{name} mole fractions must be >= 0, got {fractions}")
        total = arr.sum(axis=-1) if arr.ndim else arr
        if np.any(total >= 1.0):
            raise ValueError(f"{name} total solute mole fraction must be < 1, got {float(np.max(total))}")
        totals[name] = total

    messages: list[str] = []
    for name, total in totals.items():
        worst = float(np.max(total))
        if worst > max_mole_fraction:
            messages.append(
                f"{name} total solute mole fraction {worst:.4g} exceeds {max_mole_fraction:.4g}; "
                "the Kremser method assumes dilute streams (straight equilibrium line, constant flows)"
            )

    for phase, flow_in, flow_out in (
        ("gas", gas_flow_in, gas_flow_out),
        ("liquid", liquid_flow_in, liquid_flow_out),
    ):
        if flow_in is not None and flow_out is not None:
            flow_in = np.asarray(flow_in, dtype=float)
            flow_out = np.asarray(flow_out, dtype=float)
            if np.any(flow_in <= 0.0):
                raise ValueError(f"{phase} inlet flow must be > 0 mol/s")
            change = np.abs(flow_out - flow_in) / flow_in
        else:
            change = _relative_change_from_solute(totals[f"{phase} inlet"], totals[f"{phase} outlet"])
        worst = float(np.max(change))
        if worst > max_flow_change:
            messages.append(
                f"{phase} flow changes by {100.0 * worst:.3g}% across the column "
                f"(more than {100.0 * max_flow_change:.3g}%); the Kremser method assumes "
                "dilute streams with constant gas and liquid flows"
            )
    return messages


# ---------------------------------------------------------------------------
# beyond the dilute limit: the equilibrium line on the mole-ratio basis
# ---------------------------------------------------------------------------


def _ratio_inputs(ratio, k_value, what):
    ratio = np.asarray(ratio, dtype=float)
    k_value = np.asarray(k_value, dtype=float)
    if np.any(~(k_value > 0.0)):
        raise ValueError(f"the equilibrium ratio K must be > 0, got {k_value[~(k_value > 0.0)].ravel()[0]:.6g}")
    if np.any(np.isnan(ratio)) or np.any(ratio < 0.0):
        raise ValueError(f"the {what} mole ratio must be >= 0")
    ratio, k_value = np.broadcast_arrays(ratio, k_value)
    return ratio, k_value


def gas_ratio_at_equilibrium(liquid_ratio, k_value):
    r"""Gas mole ratio in equilibrium with a liquid mole ratio, for a constant K.

    With y = K x in mole fractions and X = x / (1 - x), Y = y / (1 - y)
    (mol solute per mol solute-free phase):

        Y* = K X / (1 + (1 - K) X)

    the curve ``Y* / (1 + Y*) = K X / (1 + X)``. It bends down (concave) for
    K < 1, up (convex) for K > 1, and is straight only for K = 1.

    Parameters
    ----------
    liquid_ratio : array_like
        Liquid mole ratio X [mol solute / mol solute-free liquid], >= 0.
    k_value : array_like
        Equilibrium ratio K = y / x in mole fractions [-], > 0, constant along
        the column (Henry's law K = H / P, Raoult's law K = gamma Psat / P:
        :func:`k_from_henry`, :func:`k_from_vapour_pressure`).

    Returns
    -------
    ndarray
        Y* [mol solute / mol solute-free gas]; inf where K x >= 1 (the gas
        in equilibrium would be pure solute, X >= 1 / (K - 1) with K > 1).

    Notes
    -----
    Exact transformation of y = K x; what it inherits from K is the range of
    Henry's or Raoult's law itself (ideal gas, constant K over the
    concentration range). Source: Treybal, Mass-Transfer Operations, 3rd ed.
    (1980), Illustration 8.2, where the wash-oil equilibrium curve is drawn
    in these coordinates from y* = (p* / P) x.

    Examples
    --------
    >>> round(float(gas_ratio_at_equilibrium(0.25, 0.5)), 12)     # x = 0.2, y = 0.1
    0.111111111111
    """
    liquid_ratio, k_value = _ratio_inputs(liquid_ratio, k_value, "liquid")
    return _gas_ratio_curve(liquid_ratio, k_value)


def _gas_ratio_curve(liquid_ratio, k_value):
    """Y* = K X / (1 + (1 - K) X) for float arrays X >= 0, K > 0 (no checks; inf past y = 1)."""
    denominator = 1.0 + (1.0 - k_value) * liquid_ratio
    finite = np.isfinite(liquid_ratio) & (denominator > 0.0)
    safe = np.where(finite, denominator, 1.0)
    gas = np.where(finite, k_value * np.where(finite, liquid_ratio, 0.0) / safe, np.inf)
    # X = inf with K < 1: y -> K, Y* -> K / (1 - K)
    limit = np.isinf(liquid_ratio) & (k_value < 1.0)
    return np.where(limit, k_value / np.where(limit, 1.0 - k_value, 1.0), gas)


def liquid_ratio_at_equilibrium(gas_ratio, k_value):
    r"""Liquid mole ratio in equilibrium with a gas mole ratio, for a constant K.

    Inverse of :func:`gas_ratio_at_equilibrium`:

        X* = Y / (K - (1 - K) Y) = Y / (K (1 + Y) - Y)

    Parameters
    ----------
    gas_ratio : array_like
        Gas mole ratio Y [mol solute / mol solute-free gas], >= 0.
    k_value : array_like
        Equilibrium ratio K = y / x in mole fractions [-], > 0.

    Returns
    -------
    ndarray
        X* [mol solute / mol solute-free liquid]; inf where y >= K (K < 1,
        Y >= K / (1 - K)): no liquid of that solute can be in equilibrium
        with so rich a gas, the solute would condense.

    Notes
    -----
    Source: as :func:`gas_ratio_at_equilibrium` (Treybal, Mass-Transfer
    Operations, 3rd ed., Illustration 8.2).

    Examples
    --------
    >>> round(float(liquid_ratio_at_equilibrium(1.0 / 9.0, 0.5)), 12)
    0.25
    """
    gas_ratio, k_value = _ratio_inputs(gas_ratio, k_value, "gas")
    return _liquid_ratio_curve(gas_ratio, k_value)


def _liquid_ratio_curve(gas_ratio, k_value):
    """X* = Y / (K - (1 - K) Y) for float arrays Y >= 0, K > 0 (no checks; inf past y = K)."""
    finite = np.isfinite(gas_ratio)
    gas = np.where(finite, gas_ratio, 0.0)
    denominator = k_value - (1.0 - k_value) * gas
    inside = finite & (denominator > 0.0)
    liquid = np.where(inside, gas / np.where(inside, denominator, 1.0), np.inf)
    # Y = inf with K > 1: x -> 1 / K, X* -> 1 / (K - 1)
    limit = ~finite & (k_value > 1.0)
    return np.where(limit, 1.0 / np.where(limit, k_value - 1.0, 1.0), liquid)


# ---------------------------------------------------------------------------
# vapour pressure by CAS number
# ---------------------------------------------------------------------------


def _perry_coefficients(cas: str):
    from chemicals.vapor_pressure import Psat_data_Perrys2_8

    try:
        row = Psat_data_Perrys2_8.loc[cas]
    except KeyError:
        raise ValueError(
            f"no DIPPR-101 vapour-pressure coefficients for CAS {cas!r} in Perry's Table 2-8 "
            "(as shipped by the chemicals package); give the vapour pressure directly"
        ) from None
    return (float(row["C1"]), float(row["C2"]), float(row["C3"]), float(row["C4"]), float(row["C5"]),
            float(row["Tmin"]), float(row["Tmax"]), str(row["Chemical"]).strip())


def vapour_pressure_dippr101(cas: str, temperature, *, warnings: list[str] | None = None):
    r"""Vapour pressure of a pure liquid from the DIPPR-101 equation and its tabulated coefficients.

        Psat = exp(C1 + C2 / T + C3 ln T + C4 T**C5)

    with C1..C5 and the fitted range Tmin..Tmax of the compound read by CAS
    number from Perry's Table 2-8, as shipped with the ``chemicals`` package
    (``chemicals.vapor_pressure.Psat_data_Perrys2_8``).

    Parameters
    ----------
    cas : str
        CAS registry number, e.g. '71-43-2' (benzene), '7732-18-5' (water).
    temperature : array_like
        Temperature T [K], > 0.
    warnings : list of str, optional
        Receives a message if a temperature is outside the fitted range.

    Returns
    -------
    ndarray
        Psat [Pa].

    Raises
    ------
    ValueError
        If the compound has no row in the table.

    Notes
    -----
    Source: Green and Perry, Perry's Chemical Engineers' Handbook, 8th ed.
    (2008), Table 2-8 (DIPPR correlation 101), coefficients as distributed
    with chemicals 1.x; evaluated vectorized here, checked against
    ``chemicals.dippr.EQ101``.

    Examples
    --------
    Benzene at its normal boiling point, 353.24 K:

    >>> round(float(vapour_pressure_dippr101("71-43-2", 353.24)) / 1000.0, 1)
    101.2
    """
    c1, c2, c3, c4, c5, t_min, t_max, name = _perry_coefficients(cas)
    temperature = np.asarray(temperature, dtype=float)
    if np.any(~(temperature > 0.0)):
        raise ValueError("temperature must be > 0 K")
    check_range(f"temperature for the vapour pressure of {name}", temperature, t_min, t_max, "K",
                "Perry's Table 2-8 DIPPR-101 fit", warnings)
    return np.exp(c1 + c2 / temperature + c3 * np.log(temperature) + c4 * temperature**c5)
