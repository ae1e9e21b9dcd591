r"""Purchased and bare-module cost of column equipment, cost-index escalation.

All correlations are the module-costing method of Turton et al., *Analysis,
Synthesis and Design of Chemical Processes*, 4th ed. (2012), Appendix A and
Chapter 7. Coefficients live in ``models/data/equipment_cost.toml``; cost
indices in ``models/data/cost_index.csv``. Every cost here is in USD at the
item's ``index_basis`` (CEPCI 397 for Turton's tables) unless it has passed
through :func:`escalate`.

Item keys and their size parameter:

==========================  ==================================  ========
key                         size                                unit
==========================  ==================================  ========
vessel_vertical             shell volume                        m3
tray_sieve, tray_valve      tower cross-sectional area          m2
pump_centrifugal            shaft power                         kW
heat_exchanger_fixed_tube   heat-transfer area                  m2
blower_centrifugal          inlet (actual) gas flow             m3/s
blower_centrifugal_power    fluid power Q dP                    kW
drive_electric_enclosed     shaft power                         kW
drive_electric_explosion_proof  shaft power                     kW
drive_electric_open         shaft power                         kW
==========================  ==================================  ========

``blower_centrifugal`` is Turton's centrifugal radial fan, fitted up to a
16 kPa rise; above that :func:`gas_mover_bare_module_cost` prices the machine
as a centrifugal blower by its fluid power.

Sizes are the one place where the units are not base SI: the correlations
were fitted in these units, and the table says so beside each one.
"""

from __future__ import annotations

import copy
import csv
import functools
import tomllib
from pathlib import Path
from typing import NamedTuple

import numpy as np

from towercost.models import defaults
from towercost.models.validity import check_range

_DATA = Path(__file__).resolve().parent / "data"
_COST_TABLE = _DATA / "equipment_cost.toml"
_INDEX_TABLE = _DATA / "cost_index.csv"

_PA_PER_BAR = 1.0e5
_PA_PER_KPA = 1.0e3


# --------------------------------------------------------------------------- data


@functools.lru_cache(maxsize=1)
def _cost_table() -> dict:
    with _COST_TABLE.open("rb") as handle:
        return tomllib.load(handle)


def load_cost_table() -> dict:
    """Equipment cost table as plain dicts, one entry per item key.

    The file is parsed once and cached; each call returns a fresh deep copy,
    so a caller may change what it gets without touching the cache.

    Returns
    -------
    dict
        ``{item: {"k1": ..., "k2": ..., "k3": ..., "size": ..., "size_unit": ...,
        "valid": [low, high], "index_basis": ..., "source": ..., ...}}``.

    Examples
    --------
    >>> table = load_cost_table()
    >>> table["vessel_vertical"]["size_unit"], table["vessel_vertical"]["index_basis"]
    ('m3', 397.0)
    """
    return copy.deepcopy(_cost_table())


class Correlation(NamedTuple):
    """What a cost-table row prices and where it comes from (read-only)."""

    item: str
    description: str
    size: str
    size_unit: str
    valid: tuple[float, float]
    index_basis: float
    source: str


@functools.lru_cache(maxsize=None)
def correlation(item: str) -> Correlation:
    """The description of one cost-table row, parsed once.

    Examples
    --------
    >>> c = correlation("vessel_vertical")
    >>> c.size, c.size_unit, c.valid, c.index_basis
    ('volume', 'm3', (0.3, 520.0), 397.0)
    """
    row = _item(item)
    return Correlation(item, str(row.get("description", "")), str(row["size"]), str(row["size_unit"]),
                       (float(row["valid"][0]), float(row["valid"][1])), float(row["index_basis"]),
                       str(row["source"]))


@functools.lru_cache(maxsize=1)
def _index_table() -> tuple[np.ndarray, np.ndarray]:
    with _INDEX_TABLE.open(newline="") as handle:
        rows = list(csv.DictReader(handle))
    years = np.array([int(row["year"]) for row in rows])
    values = np.array([float(row["index"]) for row in rows])
    order = np.argsort(years)
    return years[order], values[order]


def cost_index(year):
    """Chemical Engineering Plant Cost Index (CEPCI), annual average, for ``year``.

    Parameters
    ----------
    year : int or array_like of int
        Calendar year(s); each must be a row of ``models/data/cost_index.csv``.

    Returns
    -------
    float or ndarray
        CEPCI [-] (1957-59 = 100).

    Raises
    ------
    ValueError
        If a year is not in the table; the message gives the years covered.

    Notes
    -----
    Source: Chemical Engineering magazine, annual CEPCI averages; every row of
    the CSV says whether it was recalled or cross-checked. Turton's Appendix A
    costs are at 397 (September 2001), not at the 2001 average 394.3.

    Examples
    --------
    >>> float(cost_index(2001))
    394.3
    """
    years, values = _index_table()
    wanted = np.asarray(year)
    if not np.issubdtype(wanted.dtype, np.number) or np.any(wanted != np.round(wanted)):
        raise ValueError(f"cost index year must be a whole number, got {year!r}")
    wanted = wanted.astype(int)
    position = np.clip(np.searchsorted(years, wanted), 0, years.size - 1)
    found = years[position] == wanted
    if not np.all(found):
        missing = sorted({int(y) for y in np.atleast_1d(wanted[~found])})
        raise ValueError(
            f"no cost index for year {', '.join(map(str, missing))}; "
            f"the table covers {years[0]} to {years[-1]} (models/data/cost_index.csv)"
        )
    result = values[position]
    return float(result) if result.ndim == 0 else result


def latest_cost_year() -> int:
    """The most recent year in ``models/data/cost_index.csv``.

    >>> latest_cost_year() >= 2024
    True
    """
    years, _ = _index_table()
    return int(years[-1])


def _item(item: str) -> dict:
    table = _cost_table()
    if item not in table:
        raise ValueError(f"unknown cost item {item!r}; known items: {', '.join(sorted(table))}")
    return table[item]


# --------------------------------------------------------------------------- purchased cost


#: Exponent of the six-tenths rule for scaling cost with size (common practice).
SIX_TENTHS = 0.6


def purchased_cost(item: str, size, *, warnings: list[str] | None = None):
    r"""Purchased cost of one item in base material at ambient pressure.

    Turton's three-coefficient fit:

        log10 Cp0 = K1 + K2 log10(A) + K3 (log10 A)^2

    Parameters
    ----------
    item : str
        Key in ``equipment_cost.toml`` (see the module docstring).
    size : array_like
        Size parameter A in the item's ``size_unit`` (m3, m2, kW or m3/s,
        see the table), > 0.
    warnings : list of str, optional
        Receives a message if any size lies outside the fitted range.

    Returns
    -------
    ndarray
        Cp0 [USD] at the item's ``index_basis`` (CEPCI 397).

    Notes
    -----
    Valid within the item's ``valid`` range. Outside it the quadratic in
    log A turns the wrong way (a 0.1 m3/s fan would cost six times a 1 m3/s
    one), so the cost is taken from the nearest end of the range A_end by the
    six-tenths rule, Cp0 = Cp0(A_end) (A / A_end)**0.6, and a warning is
    appended.

    Source: Turton et al., Analysis, Synthesis and Design of Chemical
    Processes, 4th ed., Appendix A, Eq. (A.1) and Table A.1 (equation number
    from memory); six-tenths rule: Williams, Chem. Eng. 54(12), 124 (1947)
    (value from memory), common practice for scaling beyond a fitted range.

    Examples
    --------
    >>> round(float(purchased_cost("vessel_vertical", 1.0)))
    3143
    >>> small = purchased_cost("blower_centrifugal", [0.1, 1.0])
    >>> round(float(small[0] / small[1]), 4)     # 0.1 ** 0.6
    0.2512
    """
    row = _item(item)
    area = np.asarray(size, dtype=float)
    if np.any(~(area > 0.0)):
        raise ValueError(f"{row['size']} for {item} must be > 0 {row['size_unit']}, got {size!r}")
    low, high = row["valid"]
    check_range(row["size"], area, low, high, row["size_unit"], f"{item} purchased cost (Turton Table A.1)", warnings)
    inside = np.clip(area, low, high)
    log_size = np.log10(inside)
    cost = 10.0 ** (row["k1"] + log_size * (row["k2"] + row["k3"] * log_size))
    beyond = area != inside
    if np.any(beyond):
        cost = np.where(beyond, cost * (area / inside) ** SIX_TENTHS, cost)
    return cost


def size_in_range(item: str, size):
    """True where ``size`` lies inside the range the item's cost correlation was fitted over.

    Parameters
    ----------
    item : str
        Key in ``equipment_cost.toml``.
    size : array_like
        Size parameter in the item's ``size_unit``.

    Returns
    -------
    ndarray of bool
        One flag per point: the purchased cost came from the fit itself
        (True) or from the six-tenths rule beyond its range (False).

    Examples
    --------
    >>> size_in_range("vessel_vertical", [0.1, 1.0, 600.0]).tolist()
    [False, True, False]
    """
    low, high = _item(item)["valid"]
    size = np.asarray(size, dtype=float)
    return (size >= low) & (size <= high)


def cost_basis(item: str) -> float:
    """The cost index of an item's correlation (the index its costs are stated at).

    Examples
    --------
    >>> cost_basis("tray_sieve")
    397.0
    """
    return float(_item(item)["index_basis"])


# --------------------------------------------------------------------------- factors


def vessel_pressure_factor(pressure_gauge, diameter):
    r"""Pressure factor of a carbon-steel process vessel or tower shell.

    From the wall thickness needed for the pressure relative to the minimum
    wall, with P in barg and D in m:

        F_P = ((P + 1) D / (2 [850 - 0.6 (P + 1)]) + 0.00315) / 0.0063

    clipped below at 1 (the minimum-thickness wall already holds the
    pressure), and F_P = 1.25 for vacuum service, P < -0.5 barg.

    Parameters
    ----------
    pressure_gauge : array_like
        Operating pressure [Pa gauge], > -1e5.
    diameter : array_like
        Vessel inside diameter [m], > 0.

    Returns
    -------
    ndarray
        F_P [-], >= 1.

    Notes
    -----
    Built on an allowable stress of 944 bar, weld efficiency 0.9, corrosion
    allowance 3.15 mm and minimum wall 6.3 mm. The denominator vanishes near
    1400 barg, far outside any absorber; such pressures are rejected.

    Source: Turton et al., Analysis, Synthesis and Design of Chemical
    Processes, 4th ed., Appendix A, Eq. (A.2) (equation number from memory).

    Examples
    --------
    >>> float(vessel_pressure_factor(0.0, 1.5))
    1.0
    >>> round(float(vessel_pressure_factor(20e5, 2.0)), 4)
    4.4806
    """
    barg = np.asarray(pressure_gauge, dtype=float) / _PA_PER_BAR
    diameter = np.asarray(diameter, dtype=float)
    if np.any(~(diameter > 0.0)):
        raise ValueError(f"vessel diameter must be > 0 m, got {diameter!r}")
    if np.any(barg <= -1.0):
        raise ValueError("vessel gauge pressure must be above -1 bar (absolute pressure > 0)")
    denominator = 2.0 * (850.0 - 0.6 * (barg + 1.0))
    if np.any(denominator <= 0.0):
        raise ValueError("vessel gauge pressure is beyond about 1400 barg, where the thickness relation fails")
    factor = ((barg + 1.0) * diameter / denominator + 0.00315) / 0.0063
    factor = np.maximum(factor, 1.0)
    return np.where(barg < -0.5, 1.25, factor)


def pressure_factor(item: str, pressure_gauge, *, warnings: list[str] | None = None):
    r"""Pressure factor of a pump, exchanger or blower from Turton's C1..C3.

        log10 F_P = C1 + C2 log10(P) + C3 (log10 P)^2,    P >= low
        F_P = 1,                                          P <  low

    Parameters
    ----------
    item : str
        An item with a ``[item.pressure]`` table.
    pressure_gauge : array_like
        For pumps and exchangers the operating pressure [Pa gauge]; for
        ``blower_centrifugal`` the pressure rise across the machine [Pa]
        (the table's ``variable`` says which).
    warnings : list of str, optional
        Receives a message if a pressure is above the fitted range.

    Returns
    -------
    ndarray
        F_P [-].

    Notes
    -----
    The table's ``unit`` (barg or kPa) is applied inside; the caller passes Pa.

    Source: Turton et al., Analysis, Synthesis and Design of Chemical
    Processes, 4th ed., Appendix A, Eq. (A.3) and Table A.2 (equation
    number from memory).

    Examples
    --------
    >>> float(pressure_factor("pump_centrifugal", 5e5))
    1.0
    >>> round(float(pressure_factor("pump_centrifugal", 50e5)), 3)
    1.872
    """
    row = _item(item)
    if "pressure" not in row:
        raise ValueError(f"{item} has no pressure-factor table; vessels use vessel_pressure_factor")
    table = row["pressure"]
    scale = _PA_PER_BAR if table["unit"] == "barg" else _PA_PER_KPA
    pressure = np.asarray(pressure_gauge, dtype=float) / scale
    what = "pressure rise" if table["variable"] == "rise" else "gauge pressure"
    check_range(what, np.maximum(pressure, table["low"]), table["low"], table["high"], table["unit"],
                f"{item} pressure factor (Turton Table A.2)", warnings)
    inside = pressure >= table["low"]
    factor = np.ones(np.shape(pressure))
    if np.any(inside):   # the fit only where it applies (pumps below 10 barg are the usual case)
        log_p = np.log10(pressure[inside])
        factor[inside] = 10.0 ** (table["c1"] + table["c2"] * log_p + table["c3"] * log_p**2)
    return factor


def material_factor(item: str, material: str) -> float:
    """Material factor of an item: F_M for B1/B2 items, F_BM for the others.

    Parameters
    ----------
    item : str
        Key in ``equipment_cost.toml``.
    material : str
        One of the item's materials, e.g. ``carbon_steel``, ``ss304``, ``ss316``
        (pumps also ``cast_iron``; vessels ``ss_clad``; exchangers
        ``cs_shell_ss_tube``).

    Returns
    -------
    float
        F_M [-] when the item's ``bare_module_form`` is ``b1_b2``, otherwise
        the bare-module factor F_BM [-] for that material.

    Raises
    ------
    ValueError
        If the material is not listed for the item; the message lists those that are.

    Notes
    -----
    Source: Turton et al., 4th ed., Appendix A, Table A.3 / Figure A.18 (F_M)
    and Table A.6 / Figure A.19 (F_BM); each row of the TOML says how it was
    obtained. Turton has one stainless-steel row, so ss304 and ss316 are equal.

    Examples
    --------
    >>> material_factor("vessel_vertical", "ss316")
    3.12
    """
    row = _item(item)
    materials = {k: v for k, v in row["material"].items() if k != "source"}
    if material not in materials:
        raise ValueError(
            f"material {material!r} is not priced for {item}; allowed: {', '.join(materials)}"
        )
    return float(materials[material])


def tray_quantity_factor(trays):
    r"""Quantity factor for buying fewer than 20 trays.

        log10 F_q = 0.4771 + 0.08516 log10 N - 0.3473 (log10 N)^2,   N < 20
        F_q = 1,                                                      N >= 20

    Parameters
    ----------
    trays : array_like
        Number of trays N [-], >= 1 (need not be whole).

    Returns
    -------
    ndarray
        F_q [-]: about 3 for one tray, falling to 1 at 20 trays.

    Notes
    -----
    The fit is not monotone below two trays: it peaks at N = 1.33 (F_q = 3.04).
    N F_q, the effective count priced, rises with N everywhere.

    Source: Turton et al., Analysis, Synthesis and Design of Chemical
    Processes, 4th ed., Appendix A, Eq. (A.6) (equation number from memory).

    Examples
    --------
    >>> round(float(tray_quantity_factor(1)), 3)
    3.0
    >>> float(tray_quantity_factor(25))
    1.0
    """
    count = np.asarray(trays, dtype=float)
    if np.any(~(count >= 1.0)):
        raise ValueError(f"number of trays must be >= 1, got {trays!r}")
    factor = np.ones(np.shape(count))
    few = count < 20.0
    if np.any(few):   # the fit only where it applies
        log_n = np.log10(count[few])
        factor[few] = 10.0 ** (0.4771 + 0.08516 * log_n - 0.3473 * log_n**2)
    return factor


# --------------------------------------------------------------------------- bare module


def bare_module_cost(
    item: str,
    size,
    *,
    material: str = "carbon_steel",
    pressure_gauge=0.0,
    diameter=None,
    trays=None,
    purchased=None,
    warnings: list[str] | None = None,
):
    r"""Bare-module cost (direct plus indirect) of one item at its basis index.

    By the item's ``bare_module_form``:

    * ``b1_b2`` (vessels, pumps, exchangers):  C_BM = Cp0 (B1 + B2 F_M F_P)
    * ``tray``  (sieve, valve trays):          C_BM = Cp0 N F_BM F_q
    * ``fbm_fp`` (fan):                        C_BM = Cp0 F_BM F_P
    * ``fbm``   (motor drive, blower):         C_BM = Cp0 F_BM

    Parameters
    ----------
    item : str
        Key in ``equipment_cost.toml``.
    size : array_like
        Size parameter in the item's ``size_unit`` (tower cross-section [m2]
        for trays).
    material : str
        Material key, see :func:`material_factor`.
    pressure_gauge : array_like
        Operating pressure [Pa gauge] (for the blower: pressure rise [Pa]).
    diameter : array_like, optional
        Vessel diameter [m]; required for vessels.
    trays : array_like, optional
        Number of trays N [-]; required for trays.
    purchased : array_like, optional
        Cp0 of one piece [USD] from :func:`purchased_cost` at ``size``, when
        the caller has it already (saves evaluating the fit again).
    warnings : list of str, optional
        Receives out-of-range messages.

    Returns
    -------
    ndarray
        C_BM [USD] at the item's ``index_basis`` (CEPCI 397); broadcast over
        all array arguments.

    Notes
    -----
    Every inner call that can leave its range (purchased cost, table
    pressure factor) receives ``warnings``; the vessel pressure factor and
    the tray quantity factor have no range of their own.

    Source: Turton et al., Analysis, Synthesis and Design of Chemical
    Processes, 4th ed., Appendix A, Eqs. (A.4) and (A.5), Tables A.4 and A.6
    (equation numbers from memory).

    Examples
    --------
    >>> round(float(bare_module_cost("vessel_vertical", 1.0, diameter=1.0)))
    12794
    >>> round(float(bare_module_cost("tray_sieve", 1.0, trays=20)))
    19767
    """
    row = _item(item)
    form = row["bare_module_form"]
    base = purchased_cost(item, size, warnings=warnings) if purchased is None else np.asarray(purchased, dtype=float)
    factor_m = material_factor(item, material)
    if form == "b1_b2":
        if row.get("pressure_model") == "vessel":
            if diameter is None:
                raise ValueError(f"{item} needs the vessel diameter [m] for its pressure factor")
            factor_p = vessel_pressure_factor(pressure_gauge, diameter)
        else:
            factor_p = pressure_factor(item, pressure_gauge, warnings=warnings)
        return base * (row["b1"] + row["b2"] * factor_m * factor_p)
    if form == "tray":
        if trays is None:
            raise ValueError(f"{item} needs the number of trays")
        count = np.asarray(trays, dtype=float)
        return base * count * factor_m * tray_quantity_factor(count)
    if form == "fbm_fp":
        return base * factor_m * pressure_factor(item, pressure_gauge, warnings=warnings)
    if form == "fbm":
        return base * factor_m
    raise ValueError(f"{item} has an unknown bare_module_form {form!r} in equipment_cost.toml")


# --------------------------------------------------------------------------- gas movers

#: Largest pressure rise of Turton's fan pressure factor [Pa] (Table A.2, 16 kPa).
FAN_RISE_LIMIT = 16.0e3


def fluid_power(volumetric_flow, pressure_rise):
    r"""Fluid (air) power of a gas mover, the size of Turton's blower rows.

        W_f = Q dP / 1000

    Parameters
    ----------
    volumetric_flow : array_like
        Actual inlet gas flow Q [m3/s].
    pressure_rise : array_like
        dP across the machine [Pa].

    Returns
    -------
    ndarray
        W_f [kW] (the size unit of ``blower_centrifugal_power``).

    Notes
    -----
    Incompressible form; for a rise of 1 bar at 1 atm inlet it overstates the
    adiabatic power by about 12 %, well inside the accuracy of the cost fit.
    Source: Turton et al., 4th ed., App. A, Table A.1, blowers sized by
    fluid power (value from memory).

    Examples
    --------
    >>> float(fluid_power(5.0, 30e3))
    150.0
    """
    return np.asarray(volumetric_flow, dtype=float) * np.asarray(pressure_rise, dtype=float) / 1000.0


def gas_mover_bare_module_cost(volumetric_flow, pressure_rise, *, material: str = "carbon_steel",
                               warnings: list[str] | None = None):
    r"""Bare-module cost of the fan or blower that moves a gas stream, per design point.

        dP <= 16 kPa:  C_BM = Cp0(Q) F_BM F_P(dP)        (``blower_centrifugal``, radial fan)
        dP >  16 kPa:  C_BM = Cp0(Q dP) F_BM              (``blower_centrifugal_power``)

    Parameters
    ----------
    volumetric_flow : array_like
        Actual inlet gas flow Q [m3/s], > 0.
    pressure_rise : array_like
        Pressure rise dP [Pa], >= 0.
    material : str
        carbon_steel, ss304 or ss316.
    warnings : list of str, optional
        Out-of-range messages, only for the row each point is priced by.

    Returns
    -------
    ndarray
        C_BM [USD] at CEPCI 397.

    Notes
    -----
    The fan correlation's pressure factor is fitted only to 16 kPa; above
    it the machine is a blower and is priced by fluid power, where the rise
    is in the size and F_P = 1. The two rows do not meet at 16 kPa (their
    sources are different machines): expect a step in cost there.
    Source: Turton et al., 4th ed., App. A, Tables A.1, A.2 and A.6 (value from memory).

    Examples
    --------
    >>> gas_mover_bare_module_cost([5.0, 5.0], [10e3, 30e3]).round(-2).tolist()   # fan, then 150 kW blower
    [13300.0, 374000.0]
    """
    flow, rise = np.broadcast_arrays(np.asarray(volumetric_flow, dtype=float), np.asarray(pressure_rise, dtype=float))
    fan = rise <= FAN_RISE_LIMIT
    fan_cost = bare_module_cost("blower_centrifugal", np.where(fan, flow, 1.0), material=material,
                                pressure_gauge=np.where(fan, rise, 0.0), warnings=None)
    power = fluid_power(flow, np.where(fan, FAN_RISE_LIMIT, rise))
    blower_cost = bare_module_cost("blower_centrifugal_power", power, material=material, warnings=None)
    if warnings is not None:
        if np.any(fan):
            bare_module_cost("blower_centrifugal", flow[fan], material=material, pressure_gauge=rise[fan],
                             warnings=warnings)
        if np.any(~fan):
            bare_module_cost("blower_centrifugal_power", power[~fan], material=material, warnings=warnings)
    return np.where(fan, fan_cost, blower_cost)


# --------------------------------------------------------------------------- escalation, installed cost


def escalate(cost, index_from, index_to):
    r"""Move a cost between cost-index dates.

        C_to = C_from I_to / I_from

    Parameters
    ----------
    cost : array_like
        Cost at ``index_from`` [USD].
    index_from, index_to : array_like
        Cost indices [-] of the source date and the target date, > 0.

    Returns
    -------
    ndarray
        Cost at ``index_to`` [USD].

    Notes
    -----
    Source: Turton et al., Analysis, Synthesis and Design of Chemical
    Processes, 4th ed., Section 7.2, Eq. (7.4) (equation number from memory).

    Examples
    --------
    >>> round(float(escalate(10000.0, 397.0, 607.5)), 2)
    15302.27
    """
    index_from = np.asarray(index_from, dtype=float)
    index_to = np.asarray(index_to, dtype=float)
    if np.any(~(index_from > 0.0)) or np.any(~(index_to > 0.0)):
        raise ValueError("cost indices must be > 0")
    return np.asarray(cost, dtype=float) * (index_to / index_from)


class InstalledCost(NamedTuple):
    """Total module and grassroots cost [USD]."""

    total_module: np.ndarray
    grassroots: np.ndarray


def installed_cost(
    bare_module_total,
    *,
    contingency: float = defaults.CONTINGENCY,
    fee: float = defaults.FEE,
    auxiliary: float = defaults.AUXILIARY,
    bare_module_base=None,
) -> InstalledCost:
    r"""Total module and grassroots capital from the summed bare-module cost.

        C_TM = (1 + contingency + fee) sum C_BM        (= 1.18 sum C_BM)
        C_GR = C_TM + auxiliary sum C_BM0              (auxiliary facilities 0.50)

    Parameters
    ----------
    bare_module_total : array_like
        Sum of bare-module costs at the actual materials and pressures [USD].
    contingency, fee : float
        Contingency and contractor fee as fractions of C_BM [-].
    auxiliary : float
        Auxiliary facilities as a fraction of the base-case C_BM0 [-].
    bare_module_base : array_like, optional
        Sum of bare-module costs in carbon steel at ambient pressure, C_BM0
        [USD]; if omitted ``bare_module_total`` is used, which overstates C_GR
        when alloys or pressure raise C_BM.

    Returns
    -------
    InstalledCost
        ``(total_module, grassroots)`` [USD].

    Notes
    -----
    Source: Turton et al., Analysis, Synthesis and Design of Chemical
    Processes, 4th ed., Section 7.3, Eq. (7.10) for C_TM and Eq. (7.11) for
    C_GR (equation numbers from memory).

    Examples
    --------
    >>> cost = installed_cost(100000.0, bare_module_base=80000.0)
    >>> round(float(cost.total_module)), round(float(cost.grassroots))
    (118000, 158000)
    """
    total = np.asarray(bare_module_total, dtype=float)
    base = total if bare_module_base is None else np.asarray(bare_module_base, dtype=float)
    total_module = (1.0 + contingency + fee) * total
    return InstalledCost(total_module, total_module + auxiliary * base)
