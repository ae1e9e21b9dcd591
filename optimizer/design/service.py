"""The service a column performs: absorb (treat a gas with a liquid) or strip (treat a liquid with a gas).

This is the only place in the application that branches on the mode. A
``Service`` knows which phase is the agent (the solvent or the stripping
gas) and which is the stream to treat, and answers in those terms:

* the separation factor from the rates and K (absorption factor
  A = L / (K V), stripping factor S = K V / L),
* the cascade's outlets (``towercost.models.kremser.absorb`` / ``strip``),
* the minimum agent rate (``kremser.minimum_liquid_rate`` /
  ``minimum_gas_rate``),
* which stream is gas and which liquid, for sizing and machines.

Every relation is called from ``towercost.models``; nothing is re-derived here.
Arrays broadcast: K-values and lean loadings carry a trailing solute axis.
"""

from __future__ import annotations

import numpy as np

from towercost.models import kremser
from towercost.models.constants import STANDARD_ATMOSPHERE


class Service:
    """What absorbers and strippers have in common; see ``Absorb`` and ``Strip``."""

    mode: str
    agent_is_liquid: bool
    ratio_word: str        # the trade's name for rate / minimum rate
    factor_word: str       # symbol of the separation factor
    factor_name: str
    agent_word: str        # what the candidates are
    agent_table: str       # their table in the scenario file

    def factor(self, rate, k_value, feed_flow):
        """Separation factor of each solute, (..., n_solutes), from the agent rate [mol/s]."""
        raise NotImplementedError

    def rate_for_factor(self, factor, k_value, feed_flow):
        """Agent rate [mol/s] that gives ``factor`` for each solute, (..., n_solutes)."""
        raise NotImplementedError

    def equilibrium_inlet(self, k_value, lean):
        """Treated-stream mole fraction in equilibrium with the entering agent, (..., n_solutes)."""
        raise NotImplementedError

    def slope_ratio(self, factor):
        """lambda = K V / L, the slope of the equilibrium line over that of the operating line."""
        raise NotImplementedError

    def outlets(self, factor, stages, feed_in, lean, k_value):
        """(treated-stream outlet, agent outlet) mole fractions of the Kremser cascade, each (..., n_solutes)."""
        raise NotImplementedError

    def minimum_rate(self, feed_flow, k_value, feed_in, target, lean):
        """Least agent rate [mol/s] with unlimited stages for each solute, (..., n_solutes).

        0 where a solute needs no removal (no spec, or a spec the feed meets),
        inf where no rate reaches the spec (the entering agent alone holds
        the treated stream at or above it).
        """
        raise NotImplementedError

    def flows(self, rate, feed_flow):
        """(liquid, gas) molar flows [mol/s] for agent rates ``rate``."""
        raise NotImplementedError

    def streams(self, feed_in, treated_out, lean, agent_out):
        """(gas in, gas out, liquid in, liquid out) mole fractions, for the dilute checks."""
        raise NotImplementedError

    def gas_supply_pressure(self, column_pressure: float) -> float:
        """Absolute pressure [Pa] the blower takes its gas from."""
        raise NotImplementedError

    def _need(self, feed_in, eq, target):
        """Where a solute must be removed at all: a finite spec below the inlet, inlet above eq."""
        return np.isfinite(target) & (target < feed_in) & (feed_in > eq)


class Absorb(Service):
    """Treat a gas with a liquid solvent: the agent is the liquid."""

    mode = "absorb"
    agent_is_liquid = True
    ratio_word = "L/Lmin"
    factor_word = "A"
    factor_name = "absorption factor"
    agent_word = "solvent"
    agent_table = "solvent"

    def factor(self, rate, k_value, feed_flow):
        return np.asarray(rate, dtype=float)[..., None] / (k_value * feed_flow)

    def rate_for_factor(self, factor, k_value, feed_flow):
        return factor * k_value * feed_flow

    def equilibrium_inlet(self, k_value, lean):
        return k_value * lean

    def slope_ratio(self, factor):
        return 1.0 / factor

    def outlets(self, factor, stages, feed_in, lean, k_value):
        cascade = kremser.absorb(factor, stages, feed_in, lean, k_value)
        return cascade.gas_out, cascade.liquid_out

    def minimum_rate(self, feed_flow, k_value, feed_in, target, lean):
        eq = self.equilibrium_inlet(k_value, lean)
        need = self._need(feed_in, eq, target)
        outlet = np.where(need, target, 0.5 * feed_in)
        rate = kremser.minimum_liquid_rate(feed_flow, k_value, feed_in, outlet, np.where(need, lean, 0.0),
                                           strict=False)
        return np.where(need, rate, 0.0)

    def flows(self, rate, feed_flow):
        return rate, np.full_like(rate, feed_flow)

    def streams(self, feed_in, treated_out, lean, agent_out):
        return feed_in, treated_out, lean, agent_out

    def gas_supply_pressure(self, column_pressure: float) -> float:
        return column_pressure     # the gas to treat arrives at the column's pressure


class Strip(Service):
    """Treat a liquid with a stripping gas: the agent is the gas."""

    mode = "strip"
    agent_is_liquid = False
    ratio_word = "G/Gmin"
    factor_word = "S"
    factor_name = "stripping factor"
    agent_word = "stripping gas"
    agent_table = "stripping_gas"

    def factor(self, rate, k_value, feed_flow):
        return k_value * np.asarray(rate, dtype=float)[..., None] / feed_flow

    def rate_for_factor(self, factor, k_value, feed_flow):
        return factor * feed_flow / k_value

    def equilibrium_inlet(self, k_value, lean):
        return lean / k_value

    def slope_ratio(self, factor):
        return factor

    def outlets(self, factor, stages, feed_in, lean, k_value):
        cascade = kremser.strip(factor, stages, feed_in, lean, k_value)
        return cascade.liquid_out, cascade.gas_out

    def minimum_rate(self, feed_flow, k_value, feed_in, target, lean):
        eq = self.equilibrium_inlet(k_value, lean)
        need = self._need(feed_in, eq, target)
        outlet = np.where(need, target, 0.5 * feed_in)
        rate = kremser.minimum_gas_rate(feed_flow, k_value, feed_in, outlet, np.where(need, lean, 0.0),
                                        strict=False)
        return np.where(need, rate, 0.0)

    def flows(self, rate, feed_flow):
        return np.full_like(rate, feed_flow), rate

    def streams(self, feed_in, treated_out, lean, agent_out):
        return lean, agent_out, feed_in, treated_out

    def gas_supply_pressure(self, column_pressure: float) -> float:
        return STANDARD_ATMOSPHERE  # stripping air is drawn from the atmosphere


SERVICES: dict[str, Service] = {"absorb": Absorb(), "strip": Strip()}


def service_for(mode: str) -> Service:
    """The service for a scenario's ``mode``."""
    try:
        return SERVICES[mode]
    except KeyError:
        raise ValueError(f"mode must be one of {', '.join(SERVICES)}, got {mode!r}") from None
