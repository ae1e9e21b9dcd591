"""Cases with their inputs changed: the one place a study alters what ``prepare`` computed.

A study changes inputs by factors on their nominal values:

* K-values and tray efficiencies (per candidate and solute); where the
  scenario takes the efficiency from O'Connell's correlation, it is
  re-evaluated at the changed K (``towercost.models.efficiency``) before its
  own factor applies; an efficiency raised above 1 is held at 1;
* the agents' prices, the utility prices, the cost index and the interest
  rate (the capital recovery factor from ``towercost.models.economics``);
* the feed flow and the inlet concentrations, through the scenario, so that
  a removal spec follows the inlet (``prepare`` again).

``replicate`` builds a case whose candidates are copies of the original ones
(one per sample, or one per sample and candidate): every per-candidate array
of the case is indexed, so a sampled K or efficiency is simply a different
candidate, and ``SingleColumn.evaluate`` prices all samples in one call.
"""

from __future__ import annotations

import dataclasses

import numpy as np

from towercost.design.case import Case, prepare
from towercost.models import economics as economics_models
from towercost.models import efficiency as efficiency_models
from towercost.scenario.schema import Scenario

#: Case arrays whose first axis is the solute axis, not the candidate axis.
PER_SOLUTE = ("feed_in", "target", "credit")

#: Economic inputs a study changes: name -> field of ``towercost.design.case.Economics``.
ECONOMIC = {"electricity": "electricity", "steam": "steam", "cooling_water": "cooling_water",
            "cost_index": "index_to", "interest": "interest"}


def trays_only(scenario: Scenario) -> Scenario:
    """The scenario with its [[packing]] beds left out: the studies cover tray columns only (not yet packed beds:
    their spreads would act on H_OG or HETP, not on a tray efficiency)."""
    from towercost.errors import ScenarioError

    if not scenario.packing:
        return scenario
    if not scenario.column.offer_trays:
        raise ScenarioError("the uncertainty and sensitivity studies cover tray columns; this scenario offers packed "
                            "beds only ([column] offer_trays = false)")
    return scenario.model_copy(update={"packing": []})


def agent_fields(case: Case) -> tuple[str, ...]:
    """The case's fields that carry the candidate axis first (arrays indexed by candidate)."""
    n = len(case.agents)
    names = []
    for f in dataclasses.fields(case):
        value = getattr(case, f.name)
        if f.name in PER_SOLUTE or not isinstance(value, np.ndarray) or value.ndim == 0:
            continue
        if value.shape[0] == n:
            names.append(f.name)
    return tuple(names)


def replicate(case: Case, index) -> Case:
    """A case whose candidate i is the original candidate ``index[i]``, every per-candidate array indexed."""
    index = np.asarray(index, dtype=int)
    changes = {name: getattr(case, name)[index] for name in agent_fields(case)}
    # the studies cover tray columns (``trays_only``): a replica offers no packed bed
    return dataclasses.replace(case, agents=tuple(case.agents[i] for i in index), packings=(), offer_trays=True,
                               **changes)


def oconnell_agents(scenario: Scenario) -> np.ndarray:
    """True for each candidate whose efficiency comes from O'Connell's correlation (follows K)."""
    by_correlation = scenario.column.efficiency == "oconnell"
    return np.array([by_correlation and agent.efficiency is None for agent in scenario.agents])


def with_separation(case: Case, oconnell, *, k=1.0, efficiency=1.0, follows_k: bool = True,
                    notes: list[str] | None = None) -> Case:
    """The case with K-values and efficiencies multiplied by factors (broadcast to (agents, solutes)).

    ``oconnell`` (one flag per candidate of ``case``) marks the efficiencies
    re-evaluated from O'Connell's correlation at the changed K when
    ``follows_k``. A Murphree column takes the efficiency factor of each
    candidate's first solute on its Murphree efficiency, as an (agents, 1)
    array (a single number where every factor is the same): such a case
    is evaluated with ``agent = arange(len(agents))``.
    """
    k = np.broadcast_to(np.asarray(k, dtype=float), case.k_value.shape)
    factor = np.broadcast_to(np.asarray(efficiency, dtype=float), case.k_value.shape)
    k_value = case.k_value * k
    changes: dict = {"k_value": k_value}
    if case.murphree is None:
        eff = case.efficiency
        oconnell = np.asarray(oconnell, dtype=bool)
        if follows_k and oconnell.any() and np.any(k != 1.0):
            again = efficiency_models.oconnell_absorber(
                k_value, case.liquid_molar_mass[:, None], case.liquid_viscosity[:, None],
                case.liquid_density[:, None], warnings=notes)
            eff = np.where(oconnell[:, None], again, eff)
        changes["efficiency"] = np.minimum(eff * factor, 1.0)
    elif np.all(factor == factor.flat[0]):
        changes["murphree"] = min(case.murphree * float(factor.flat[0]), 1.0)
    else:
        changes["murphree"] = np.minimum(case.murphree * factor[:, :1], 1.0)
    return dataclasses.replace(case, **changes)


def with_economics(case: Case, factors: dict[str, object]) -> Case:
    """The case with economic inputs multiplied by factors (numbers; samples go through ``study.pricing``).

    Keys: ``electricity``, ``steam``, ``cooling_water``, ``cost_index``,
    ``interest`` (the capital recovery factor follows), ``agent_price`` and
    ``disposal`` (per candidate, on the case's arrays).
    """
    eco = case.economics
    changes = {}
    for name, field in ECONOMIC.items():
        if name in factors:
            changes[field] = getattr(eco, field) * np.asarray(factors[name], dtype=float)
    if "interest" in changes:
        changes["capital_recovery"] = economics_models.capital_recovery_factor(changes["interest"], eco.life)
    case_changes = {"economics": dataclasses.replace(eco, **changes)}
    if "agent_price" in factors:
        case_changes["price"] = case.price * np.asarray(factors["agent_price"], dtype=float)
    if "disposal" in factors:
        case_changes["disposal"] = case.disposal * np.asarray(factors["disposal"], dtype=float)
    if "credit" in factors:
        case_changes["credit"] = case.credit * np.asarray(factors["credit"], dtype=float)
    return dataclasses.replace(case, **case_changes)


def with_feed(scenario: Scenario, *, flow: float = 1.0, inlet: float = 1.0) -> Scenario:
    """The scenario with its feed flow and every inlet mole fraction multiplied by factors."""
    feed = scenario.feed
    composition = {s: x * inlet for s, x in feed.composition.items()}
    return scenario.model_copy(update={"feed": feed.model_copy(update={"flow": feed.flow * flow,
                                                                       "composition": composition})})


def varied_case(scenario: Scenario, factors: dict[str, object], *, notes: list[str] | None = None) -> Case:
    """The scenario's case with the named inputs multiplied by factors (one-at-a-time studies).

    Names: those of ``with_economics``, ``feed_flow``, ``inlet``, ``k``,
    ``k[solute]``, ``efficiency``. Factors are numbers.
    """
    flow, inlet = float(factors.get("feed_flow", 1.0)), float(factors.get("inlet", 1.0))
    scenario = trays_only(scenario)
    case = prepare(with_feed(scenario, flow=flow, inlet=inlet) if (flow, inlet) != (1.0, 1.0) else scenario)
    k = np.full(case.k_value.shape, float(factors.get("k", 1.0)))
    for name, value in factors.items():
        if name.startswith("k["):
            k[:, case.solutes.index(name[2:-1])] *= float(value)
    eff = float(factors.get("efficiency", 1.0))
    if np.any(k != 1.0) or eff != 1.0:
        case = with_separation(case, oconnell_agents(scenario), k=k, efficiency=eff,
                               follows_k=scenario.uncertainty.efficiency_follows_k, notes=notes)
    economic = {n: v for n, v in factors.items() if n in ECONOMIC or n in ("agent_price", "disposal", "credit")}
    return with_economics(case, economic) if economic else case
