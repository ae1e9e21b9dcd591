"""Physical constants and exact unit factors, each defined once for the whole project.

They are taken from the ``fluids`` package (a dependency of ``chemicals``),
whose ``fluids.constants`` module carries the CODATA 2018 values and the SI
conventional values; nothing here is typed in by hand.

>>> GAS_CONSTANT, GRAVITY, STANDARD_ATMOSPHERE
(8.31446261815324, 9.80665, 101325.0)
>>> round(PSI, 9), INCH, FOOT
(6894.757293168, 0.0254, 0.3048)
"""

from __future__ import annotations

from fluids import constants as _fluids

#: Molar gas constant R [J/(mol K)]: CODATA 2018, exact (fluids.constants.R).
GAS_CONSTANT: float = float(_fluids.R)

#: Standard acceleration of gravity g [m/s2]: CGPM 1901 conventional value (fluids.constants.g).
GRAVITY: float = float(_fluids.g)

#: Standard atmosphere [Pa]: CGPM 1954 definition, the reference of gauge pressures (fluids.constants.atm).
STANDARD_ATMOSPHERE: float = float(_fluids.atm)

#: Pound-force per square inch [Pa], exact (fluids.constants.psi).
PSI: float = float(_fluids.psi)

#: Inch [m], exact (fluids.constants.inch).
INCH: float = float(_fluids.inch)

#: Foot [m], exact (fluids.constants.foot).
FOOT: float = float(_fluids.foot)

#: Seconds per hour [s/h] (fluids.constants.hour).
SECONDS_PER_HOUR: float = float(_fluids.hour)
