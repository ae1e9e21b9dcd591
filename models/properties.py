"""Stream properties the sizing needs: ideal-gas density.

SI throughout; functions broadcast over numpy arrays.
"""

from __future__ import annotations

import numpy as np

from towercost.models.constants import GAS_CONSTANT


def ideal_gas_density(pressure, temperature, molar_mass):
    r"""Density of an ideal gas.

        rho = P M / (R T)

    Parameters
    ----------
    pressure : array_like
        Absolute pressure P [Pa], > 0.
    temperature : array_like
        Temperature T [K], > 0.
    molar_mass : array_like
        Molar mass M [kg/mol], > 0.

    Returns
    -------
    ndarray
        rho [kg/m3].

    Notes
    -----
    Good to about 1 % for air and light gases below about 10 bar near
    ambient temperature (compressibility factor within 0.99 to 1.01; value
    from memory). R from :mod:`towercost.models.constants`.

    Source: the ideal-gas law; Perry's Chemical Engineers' Handbook, 8th ed.,
    Section 2 (value from memory for the section).

    Examples
    --------
    Dry air (M = 28.9647 g/mol) at 0 degC and one standard atmosphere; the
    handbook value is 1.2922 kg/m3 (value from memory):

    >>> round(float(ideal_gas_density(101325.0, 273.15, 0.0289647)), 4)
    1.2922
    """
    return (np.asarray(pressure, dtype=float) * np.asarray(molar_mass, dtype=float)
            / (GAS_CONSTANT * np.asarray(temperature, dtype=float)))
