"""Engineering defaults, each defined once: the models' keyword defaults and the scenario schema read them here.

Every value is a designer's rule of thumb ("common practice") unless a
source is named. Change a default here and both the relations in
``towercost.models`` and the documented defaults of the scenario file follow.
"""

from __future__ import annotations

from towercost.models.constants import INCH, STANDARD_ATMOSPHERE

# --------------------------------------------------------------------------- tray column

#: Tray spacing [m]: 24 in, common practice for columns above about 1 m.
TRAY_SPACING = 24 * INCH

#: Design fraction of flood [-]: 0.80, common practice for non-foaming systems.
FLOOD_FRACTION = 0.80

#: Lowest expected gas and liquid loads as a fraction of the design loads, at which the
#: tray must not weep [-]: 0.6, common practice.
TURNDOWN = 0.6

#: Space above the top tray and below the bottom tray [m]: common practice for estimating.
TOP_SPACE = 1.2
BOTTOM_SPACE = 1.8

#: Allowance for piping, control valve and exchangers on the pumped liquid [Pa]: 0.7 bar, common practice.
PUMP_ALLOWANCE = 70_000.0

#: Allowance for ducts, inlet distributor and demister on the blown gas [Pa]: 1.5 kPa, common practice.
BLOWER_ALLOWANCE = 1_500.0

#: Pressure the liquid is pumped from [Pa]: an atmospheric tank.
SUPPLY_PRESSURE = STANDARD_ATMOSPHERE

# --------------------------------------------------------------------------- machines

#: Pump, blower and electric-motor efficiencies [-]: common practice for estimating.
PUMP_EFFICIENCY = 0.70
BLOWER_EFFICIENCY = 0.70
MOTOR_EFFICIENCY = 0.90

# --------------------------------------------------------------------------- capital

#: Contingency and contractor fee as fractions of the bare-module cost [-]:
#: Turton et al., Analysis, Synthesis and Design of Chemical Processes, 4th ed., Section 7.3 (value from memory).
CONTINGENCY = 0.15
FEE = 0.03

#: Auxiliary facilities as a fraction of the base bare-module cost [-]: Turton et al., 4th ed., Section 7.3 (value from memory).
AUXILIARY = 0.50

# --------------------------------------------------------------------------- dilute validity

#: Solute mole fraction above which the dilute (straight-line) treatment is doubtful [-]: common practice.
MAX_DILUTE = 0.01

#: Fractional change of a stream's flow across the column above which constant L and V is doubtful [-]: common practice.
MAX_FLOW_CHANGE = 0.05

# --------------------------------------------------------------------------- economics

#: Interest rate [1/yr], plant life [yr] and time on stream [h/yr]: common practice for study estimates.
INTEREST = 0.10
LIFE = 10.0
HOURS = 8000.0

#: Electricity price [USD/J] (0.08 USD/kWh): common practice for a study estimate, to be replaced by the site's price.
ELECTRICITY = 0.08 / 3.6e6

#: Near-optimal band: designs within this fraction of the best annualized cost [-].
MARGIN = 0.03

# --------------------------------------------------------------------------- uncertainty and sensitivity studies

#: Spread of K-values as the standard deviation of ln K [-]: 0.20 (about +-20 % for one standard deviation),
#: common practice for a Henry's-law constant or an estimated activity coefficient from one source.
K_LOG_SD = 0.20

#: Spread of tray efficiencies as the standard deviation of ln E [-]: 0.15, common practice for a
#: correlation such as O'Connell's.
EFFICIENCY_LOG_SD = 0.15

#: Agent, utility and credit prices: triangular factors (least, most likely, highest) on the nominal price [-],
#: common practice for a study estimate (prices more likely to rise than fall).
PRICE_TRIANGLE = (0.80, 1.00, 1.25)

#: Cost index: normal, standard deviation as a fraction of the nominal index [-]; common practice.
INDEX_SD = 0.05

#: Monte Carlo samples of a fixed design, samples re-optimized, and the probability a margin design must
#: meet every spec with [-]: common practice.
SAMPLES = 10_000
REOPTIMIZE_SAMPLES = 200
CONFIDENCE = 0.90

#: One-at-a-time change of each input in a sensitivity study, +- fraction of its nominal value [-]; common practice.
SENSITIVITY_CHANGE = 0.20

# --------------------------------------------------------------------------- regenerated solvent loop

#: Approach temperature of the lean/rich cross exchanger [K]: 10 K, common practice.
APPROACH = 10.0

#: Overall heat-transfer coefficients of the loop's shell-and-tube exchangers [W/(m2 K)], mid-range of the
#: typical values tabulated by Sinnott, Coulson & Richardson's Chemical Engineering Vol. 6, 4th ed.,
#: Table 12.1 (values from memory): light organic to light organic 100-300 (cross exchanger), water to
#: light organic 350-900 (lean cooler), condensing steam to light organic 500-1000 (heater, reboiler).
U_CROSS = 250.0
U_COOLER = 500.0
U_HEATER = 700.0

#: Cooling water temperature rise across the lean cooler [K] and its supply temperature [K]: common practice.
COOLING_WATER_IN = 273.15 + 25.0
COOLING_WATER_RISE = 10.0

#: Saturated steam for heaters and reboilers [K]: about 6 barg (160 degC), common practice.
STEAM_TEMPERATURE = 273.15 + 160.0

#: Lean levels K x_lean / y_out searched when the scenario does not say: [0.05, 0.8], 8 levels, common practice.
LEAN_RANGE = (0.05, 0.8)
LEAN_LEVELS = 8

#: Regenerator trays searched when the scenario does not say [real trays].
REGENERATOR_TRAYS = (2, 30)

#: A solute whose steady lean loading exceeds this fraction of its loading in equilibrium with the feed
#: gas is reported as building up around the loop [-]: common practice.
BUILD_UP = 0.5
