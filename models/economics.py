r"""Capital recovery, pump and blower power, utility costs, annualized cost.

Money in USD, power in W, flows in SI per second, time on stream in hours
per year. Functions broadcast over numpy arrays.
"""

from __future__ import annotations

import numpy as np

from towercost.models import defaults
from towercost.models.constants import SECONDS_PER_HOUR as _SECONDS_PER_HOUR
_W_PER_KW = 1000.0


def capital_recovery_factor(interest_rate, years):
    r"""Capital recovery factor: the uniform annual payment that repays 1 USD.

        CRF = i (1 + i)^n / ((1 + i)^n - 1) = i / (1 - (1 + i)^-n),
        CRF = 1 / n at i = 0

    Parameters
    ----------
    interest_rate : array_like
        Interest (discount) rate per year i [1/yr], > -1.
    years : array_like
        Project life n [yr], > 0 (need not be whole).

    Returns
    -------
    ndarray
        CRF [1/yr].

    Notes
    -----
    Evaluated as ``i / -expm1(-n log1p(i))``, which keeps full precision for
    rates down to 1e-15 and lives of thousands of years; i = 0 gives 1/n
    exactly.

    Source: Turton et al., Analysis, Synthesis and Design of Chemical
    Processes, 4th ed., Chapter 9, Table 9.1, uniform-series capital
    recovery factor (A/P, i, n) (table number from memory).

    Examples
    --------
    >>> round(float(capital_recovery_factor(0.10, 10)), 5)
    0.16275
    >>> float(capital_recovery_factor(0.0, 20))
    0.05
    """
    rate = np.asarray(interest_rate, dtype=float)
    life = np.asarray(years, dtype=float)
    if np.any(~(rate > -1.0)):
        raise ValueError(f"interest rate must be > -1, got {interest_rate!r}")
    if np.any(~(life > 0.0)):
        raise ValueError(f"project life must be > 0 years, got {years!r}")
    zero = rate == 0.0
    safe_rate = np.where(zero, 1.0, rate)
    factor = safe_rate / -np.expm1(-life * np.log1p(safe_rate))
    return np.where(zero, 1.0 / life, factor)


def pump_power(volumetric_flow, pressure_rise, efficiency=defaults.PUMP_EFFICIENCY):
    r"""Shaft power of a liquid pump.

        W_shaft = Q dP / eta

    Parameters
    ----------
    volumetric_flow : array_like
        Liquid flow Q [m3/s], >= 0.
    pressure_rise : array_like
        Pressure rise across the pump dP [Pa], >= 0 (static lift, line and
        tray-inlet losses already included by the caller).
    efficiency : array_like
        Pump (hydraulic) efficiency eta [-], in (0, 1]. The motor is separate,
        see :func:`electric_power`.

    Returns
    -------
    ndarray
        Shaft power [W].

    Notes
    -----
    Incompressible liquid. Source: Perry's Chemical Engineers' Handbook,
    8th ed., Section 10, pump power from flow and head (common practice for
    the default efficiency 0.70).

    Examples
    --------
    >>> round(float(pump_power(0.01, 2.0e5)), 2)
    2857.14
    """
    efficiency = np.asarray(efficiency, dtype=float)
    if np.any(~(efficiency > 0.0)) or np.any(efficiency > 1.0):
        raise ValueError(f"pump efficiency must be in (0, 1], got {efficiency!r}")
    return np.asarray(volumetric_flow, dtype=float) * np.asarray(pressure_rise, dtype=float) / efficiency


def electric_power(shaft_power, motor_efficiency=defaults.MOTOR_EFFICIENCY):
    r"""Electric power drawn by a motor delivering ``shaft_power``.

        W_electric = W_shaft / eta_motor

    Parameters
    ----------
    shaft_power : array_like
        Shaft power [W], >= 0.
    motor_efficiency : array_like
        Motor efficiency [-], in (0, 1]; 0.90 is common practice.

    Returns
    -------
    ndarray
        Electric power [W].

    Examples
    --------
    >>> float(electric_power(900.0))
    1000.0
    """
    motor_efficiency = np.asarray(motor_efficiency, dtype=float)
    if np.any(~(motor_efficiency > 0.0)) or np.any(motor_efficiency > 1.0):
        raise ValueError(f"motor efficiency must be in (0, 1], got {motor_efficiency!r}")
    return np.asarray(shaft_power, dtype=float) / motor_efficiency


def blower_power(volumetric_flow_inlet, inlet_pressure, pressure_rise, efficiency=defaults.BLOWER_EFFICIENCY,
                 heat_capacity_ratio=1.4):
    r"""Shaft power of a blower from the adiabatic (isentropic) compression work.

        W = k / (k - 1) P1 Q1 [(1 + dP / P1)^((k - 1) / k) - 1] / eta

    For dP << P1 this tends to Q1 dP / eta, the fan (incompressible) power.

    Parameters
    ----------
    volumetric_flow_inlet : array_like
        Actual gas flow at the inlet Q1 [m3/s], >= 0.
    inlet_pressure : array_like
        Inlet pressure P1 [Pa absolute], > 0.
    pressure_rise : array_like
        Pressure rise dP = P2 - P1 [Pa], >= 0.
    efficiency : array_like
        Isentropic efficiency eta [-], in (0, 1]; 0.70 is common practice.
    heat_capacity_ratio : array_like
        k = cp / cv of the gas [-], > 1 (1.4 for air).

    Returns
    -------
    ndarray
        Shaft power [W].

    Notes
    -----
    Ideal gas, one stage, no intercooling. The bracket is evaluated as
    ``expm1(((k - 1) / k) log1p(dP / P1))`` so that small rises lose no
    precision.

    Source: Perry's Chemical Engineers' Handbook, 8th ed., Section 10,
    adiabatic compression power of an ideal gas (value from memory for the
    section; the relation is the standard isentropic work integral).

    Examples
    --------
    >>> round(float(blower_power(1.0, 101325.0, 5000.0)), 1)
    7020.4
    """
    flow = np.asarray(volumetric_flow_inlet, dtype=float)
    inlet = np.asarray(inlet_pressure, dtype=float)
    rise = np.asarray(pressure_rise, dtype=float)
    ratio = np.asarray(heat_capacity_ratio, dtype=float)
    efficiency = np.asarray(efficiency, dtype=float)
    if np.any(~(inlet > 0.0)):
        raise ValueError(f"inlet pressure must be > 0 Pa absolute, got {inlet_pressure!r}")
    if np.any(~(ratio > 1.0)):
        raise ValueError(f"heat capacity ratio must be > 1, got {heat_capacity_ratio!r}")
    if np.any(~(efficiency > 0.0)) or np.any(efficiency > 1.0):
        raise ValueError(f"blower efficiency must be in (0, 1], got {efficiency!r}")
    if np.any(rise <= -inlet):
        raise ValueError("pressure rise must keep the outlet pressure above zero")
    exponent = (ratio - 1.0) / ratio
    bracket = np.expm1(exponent * np.log1p(rise / inlet))
    return inlet * flow * bracket / exponent / efficiency


def annual_utility_cost(rate, price, hours):
    r"""Yearly cost of a utility or consumable used at a steady rate.

        cost = rate price 3600 hours

    Parameters
    ----------
    rate : array_like
        Use rate in units per second [unit/s]: kg/s of steam or solvent
        make-up, m3/s of cooling water or waste for disposal, ...
    price : array_like
        Price per unit of that quantity [USD/unit] (USD/kg, USD/m3, ...).
    hours : array_like
        Time on stream [h/yr].

    Returns
    -------
    ndarray
        Cost [USD/yr].

    Notes
    -----
    For electricity use :func:`electricity_cost`, priced per kWh.

    Examples
    --------
    >>> round(float(annual_utility_cost(0.5, 0.02, 8000)), 6)
    288000.0
    """
    return np.asarray(rate, dtype=float) * np.asarray(price, dtype=float) * _SECONDS_PER_HOUR * np.asarray(hours, dtype=float)


def electricity_cost(power_W, price_per_kWh, hours):
    r"""Yearly cost of electricity drawn at a steady power.

        cost = (W / 1000) price hours

    Parameters
    ----------
    power_W : array_like
        Electric power drawn [W].
    price_per_kWh : array_like
        Electricity price [USD/kWh].
    hours : array_like
        Time on stream [h/yr].

    Returns
    -------
    ndarray
        Cost [USD/yr].

    Examples
    --------
    >>> round(float(electricity_cost(1000.0, 0.10, 8000)), 6)
    800.0
    """
    return np.asarray(power_W, dtype=float) / _W_PER_KW * np.asarray(price_per_kWh, dtype=float) * np.asarray(hours, dtype=float)


def annualized_cost(installed_cost, capital_recovery, operating_cost, credit=0.0):
    r"""Total annualized cost of a design.

        TAC = CRF C_installed + C_operating - credit

    Parameters
    ----------
    installed_cost : array_like
        Installed (total module or grassroots) capital [USD].
    capital_recovery : array_like
        Capital recovery factor [1/yr], see :func:`capital_recovery_factor`.
    operating_cost : array_like
        Yearly operating cost: utilities, make-up, disposal [USD/yr].
    credit : array_like
        Yearly credits, e.g. recovered solute sold [USD/yr].

    Returns
    -------
    ndarray
        Total annualized cost [USD/yr].

    Notes
    -----
    Source: common practice (equivalent annual cost of capital plus yearly
    operating cost), as in Turton et al., 4th ed., Chapter 9.

    Examples
    --------
    >>> round(float(annualized_cost(1.0e6, 0.16275, 50000.0, credit=10000.0)), 6)
    202750.0
    """
    return (
        np.asarray(installed_cost, dtype=float) * np.asarray(capital_recovery, dtype=float)
        + np.asarray(operating_cost, dtype=float)
        - np.asarray(credit, dtype=float)
    )
