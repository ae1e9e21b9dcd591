"""Designs and results as plain data (dicts of SI numbers with names spelled out) for JSON and CSV.

Everything here is a figure computed by ``towercost.models`` through
``towercost.design``; this module only names and arranges them. Equipment
and consumption rows are iterated over, so a new cost line appears in every
output without an edit here.
"""

from __future__ import annotations

import json
import math

import numpy as np

from towercost.design.internals import FIRST_PACKING, TRAY_TYPES
from towercost.models import hydraulics

CAUTION = (
    "Preliminary estimate only (order of magnitude to study grade). Mechanical, "
    "process-safety and pressure-vessel design must be done by qualified engineers; "
    "local codes, standards and licensed practice take precedence over these figures."
)

KMOL_H = 3.6  # mol/s -> kmol/h


def is_packed(d, i: int) -> bool:
    """Design ``i`` is a packed bed."""
    return "internals" in d.figures and int(d.internals[i]) >= FIRST_PACKING


def packing_choice(case, d, i: int):
    """The ``PackingChoice`` of packed design ``i``."""
    return case.packings[int(d.internals[i]) - FIRST_PACKING]


def internals_name(case, d, i: int) -> str:
    """'sieve trays', 'valve trays', or the packing's name."""
    if is_packed(d, i):
        return packing_choice(case, d, i).name
    return f"{TRAY_TYPES[int(d.tray_type[i])]} trays"


def used_rows(d, i: int) -> list[int]:
    """The equipment rows that are part of design ``i`` (a tray design has no packing, a packed one no trays)."""
    eq = d.equipment
    return [j for j in range(len(eq.specs)) if not eq.spec_at(i, j).correlation.startswith("unused:")]


def equipment_rows(case, d, i: int = 0) -> list[dict]:
    """One row per equipment item of design ``i``: tag, kind, size basis, costs, correlation, range held."""
    eq = d.equipment
    rows = []
    for j in used_rows(d, i):
        spec = eq.spec_at(i, j)   # a row may switch correlation from one design to the next (fan or blower)
        rows.append({
            "tag": spec.tag, "item": spec.key, "kind": spec.kind, "material": getattr(spec, "material", "") or eq.materials[j],
            "size_basis": spec.size_basis, "size": float(eq.size[i, j]), "size_unit": spec.size_unit,
            "purchased_USD": float(d.purchased[i, j]), "bare_module_USD": float(d.bare_module_items[i, j]),
            "cost_basis_index": float(eq.basis[j]), "correlation": spec.correlation,
            "range_held": bool(eq.in_range[i, j]), "source": spec.source,
        })
    return rows


def use_rows(d, i: int = 0) -> list[dict]:
    """One row per consumption of design ``i``: rate, unit price and yearly cost (credits as credits)."""
    uses, cost = d.uses, d.use_cost
    return [{"use": spec.key, "label": spec.label, "rate": float(uses.rate[i, j]), "rate_unit": spec.rate_unit,
             "unit_price": float(uses.unit_price[i, j]), "price_unit": spec.price_unit,
             ("credit_USD_per_yr" if spec.credit else "cost_USD_per_yr"): float(cost[i, j])}
            for j, spec in enumerate(uses.specs)]


def tool_record() -> dict:
    """The tool's name and version, for every report."""
    import towercost

    return {"name": "towercost", "version": towercost.__version__}


def conditions_record(case) -> dict:
    """The case's conditions and search ranges, as read (SI)."""
    record = {"name": case.name, "mode": case.mode, "agents": list(case.agents),
              "solutes": list(case.solutes), "feed_flow_mol_s": case.feed_flow,
              "temperature_K": case.temperature, "pressure_Pa": case.pressure,
              "trays_range": list(case.trays_range), "ratio_range": list(case.ratio_range)}
    if case.packings:
        record.update(internals=(["trays"] if case.offer_trays else []) + [c.name for c in case.packings],
                      stages_range=list(case.stages_range))
    return record


def economics_record(case) -> dict:
    """The economic inputs of the annualized cost, and the capital recovery factor they give."""
    eco = case.economics
    return {"interest_per_yr": eco.interest, "life_yr": eco.life, "capital_recovery_factor_per_yr": eco.capital_recovery,
            "hours_per_yr": eco.hours, "electricity_USD_per_J": eco.electricity,
            "electricity_USD_per_kWh": eco.electricity * 3.6e6, "steam_USD_per_kg": eco.steam,
            "cooling_water_USD_per_m3": eco.cooling_water, "cost_index": eco.index_to,
            "cost_index_year": eco.index_year, "contingency": eco.contingency, "fee": eco.fee,
            "auxiliary": eco.auxiliary}


#: A limit whose slack is below this fraction of its bound is reported as binding.
BINDING = 1e-6


def limit_rows(case, d, i: int = 0) -> list[dict]:
    """Every limit of the scenario at design ``i``: value, bound, whether met and whether binding."""
    from towercost.design.limits import limit_table

    rows = []
    for limit in d.limits or limit_table(case, d):
        if not bool(limit.applies[i]):     # a limit of other internals
            continue
        value, bound = float(limit.values[i]), float(limit.bound)
        sign = -1.0 if limit.name == "ratio_low" else 1.0          # stated as -ratio <= -low
        rows.append({"limit": limit.name, "label": limit.label, "value": sign * value, "bound": sign * bound,
                     "unit": limit.unit, "met": bool(value <= bound),
                     "binding": bool(bound - value <= BINDING * max(abs(bound), 1e-300))})
    return rows


def search_bounds(case, d, i: int = 0) -> dict:
    """Whether the design's decisions sit on the edges of the space searched (a wider range may do better)."""
    lo, hi = case.trays_range
    r_lo, r_hi = case.ratio_range
    ratio = float(d.ratio[i])
    return {"trays_at_least": int(d.trays[i]) == lo, "trays_at_most": int(d.trays[i]) == hi,
            "ratio_at_least": math.isclose(ratio, r_lo, rel_tol=1e-9),
            "ratio_at_most": math.isclose(ratio, r_hi, rel_tol=1e-9)}


def controlling(case, d, i: int = 0) -> dict:
    """The solute whose spec binds (largest outlet over spec) and the one that sets the minimum rate."""
    a = int(d.agent[i])
    spec = np.isfinite(case.target)
    closest = None
    if spec.any():
        ratio = np.where(spec, d.outlet[i] / np.where(spec, case.target, 1.0), -np.inf)
        closest = case.solutes[int(np.argmax(ratio))]
    per_solute = case.service.minimum_rate(case.feed_flow, case.k_value[a], case.feed_in, case.target, case.lean[a])
    return {"binding_spec": closest, "minimum_rate_set_by": case.solutes[int(np.argmax(per_solute))]}


#: Display units of consumption rates: SI unit -> (unit shown, factor).
USE_UNITS = {"W": ("kW", 1e-3), "kg/s": ("kg/h", 3600.0), "m3/s": ("m3/h", 3600.0), "mol/s": ("kmol/h", 3.6)}


def utilities_summary(d, i: int = 0) -> list[dict]:
    """One line per consumption of design ``i`` in the units a utility schedule uses, with its yearly cost."""
    rows = []
    for j, spec in enumerate(d.uses.specs):
        unit, factor = USE_UNITS.get(spec.rate_unit, (spec.rate_unit, 1.0))
        rows.append({"use": spec.key, "label": spec.label, "rate": float(d.uses.rate[i, j]) * factor,
                     "unit": unit, "credit": spec.credit, "USD_per_yr": float(d.use_cost[i, j])})
    return rows


def operating_range(case, d, i: int = 0) -> dict | None:
    """The tray's operating range at design ``i``: each limit's figure, the limit, and which governs (None: packed)."""
    if is_packed(d, i):
        return None
    return {
        "turndown": case.turndown,
        "weep_ratio": float(d.weep_ratio[i]), "weep_ratio_min": 1.0,
        "entrainment": float(d.entrainment[i]), "entrainment_max": hydraulics.ENTRAINMENT_LIMIT,
        "downcomer_backup_fraction": float(d.backup_fraction[i]), "downcomer_backup_max": hydraulics.BACKUP_LIMIT,
        "downcomer_residence_s": float(d.residence_time[i]),
        "downcomer_residence_min_s": hydraulics.RESIDENCE_TIME_MIN,
        "use": float(d.range_use[i]),
        "governs": hydraulics.LIMIT_NAMES[int(d.range_governs[i])],
        "inside": bool(d.range_use[i] <= 1.0),
    }


def design_basis(case) -> tuple[str, str]:
    """Where the vessel's design pressure and temperature come from, in words."""
    pressure = ("given in the scenario" if case.design_pressure is not None
                else "operating pressure by the margin rule (Seider et al., Eq. 16.61)")
    temperature = ("given in the scenario" if case.design_temperature is not None
                   else "operating temperature + 27.8 K (50 F, common practice)")
    return pressure, temperature


def concentration_fields(case, a: int, s: int, inlet: float, outlet: float, spec: float, agent_out: float) -> dict:
    """One solute's concentrations in each phase's own unit: the treated stream's and the agent's.

    Gas in ppmv; liquid in the unit the scenario used for that solute, else
    ppmw (or a mole fraction where the solute's molar mass is not given).
    """
    shown = getattr(case, "concentrations", None)
    if shown is None:
        return {}
    _, unit = shown.treated(s, inlet)
    _, agent_unit = shown.agent(a, s, agent_out)
    return {
        "treated_phase": shown.treated_phase,
        "concentration_unit": unit,
        "inlet_concentration": shown.treated(s, inlet)[0],
        "outlet_concentration": shown.treated(s, outlet)[0],
        "spec_concentration": shown.treated(s, spec)[0] if math.isfinite(spec) else None,
        "agent_phase": shown.agent_phase,
        "agent_concentration_unit": agent_unit,
        "agent_inlet_concentration": shown.agent(a, s, float(case.lean[a, s]))[0],
        "agent_outlet_concentration": shown.agent(a, s, agent_out)[0],
    }


#: Why a packed bed's capacity and pressure drop are indicative where the packing's constants are estimates.
ESTIMATED_CONSTANTS = ("its Stichlmair constants C1..C3 are estimates, not read from the paper's table "
                       "(models/data/packings.toml): its diameter, fraction of flood and pressure drop are indicative")


def packed_record(case, d, i: int) -> dict:
    """The packed bed of design ``i``: packing, beds, transfer units, HETP, capacity, pressure drop, wetting."""
    choice = packing_choice(case, d, i)
    data = choice.data
    strip = not case.service.agent_is_liquid
    given = ("hetp" if choice.hetp is not None else "h_og" if choice.h_og is not None
             else "h_ol" if choice.h_ol is not None else None)
    return {
        "packing": choice.name, "row": choice.key, "kind": data["kind"], "material": data["material"],
        "nominal_size_m": data["nominal_size"], "specific_area_m2_m3": data["specific_area"],
        "voidage": data["voidage"],
        "stichlmair_constants": [data["stichlmair_c1"], data["stichlmair_c2"], data["stichlmair_c3"]],
        "stichlmair_constants_basis": ("read from the source" if choice.constants_checked
                                       else "estimate: " + ESTIMATED_CONSTANTS),
        "stichlmair_source": data["stichlmair_source"],
        "heights_from": (f"given {given} in the scenario" if given else
                         "Onda, Takeuchi and Okumoto (1968) film heights, H_OG = H_G + lambda H_L"),
        "packed_height_m": float(d.packed_height[i]), "beds": int(d.beds[i]), "bed_height_m": float(d.bed_height[i]),
        "redistributors": int(d.beds[i]) - 1, "max_bed_height_m": choice.max_bed_height,
        "transfer_units_basis": "N_OL, H_OL (liquid phase)" if strip else "N_OG, H_OG (gas phase)",
        "per_solute": {name: {"theoretical_stages": float(d.stages[i, s]),
                              "stages_needed": float(d.stages_needed[i, s]),
                              "transfer_units": float(d.transfer_units[i, s]), "htu_m": float(d.htu[i, s]),
                              "hetp_m": float(d.hetp[i, s]), "film_gas_htu_m": float(d.film_gas_htu[i, s]),
                              "film_liquid_htu_m": float(d.film_liquid_htu[i, s])}
                       for s, name in enumerate(case.solutes)},
        "wetted_area_m2_m3": float(d.wetted_area[i]),
        "design_fraction_of_flood": choice.flood_fraction, "fraction_of_flood": float(d.fraction_of_flood[i]),
        "pressure_drop_limit_Pa_m": choice.pressure_drop_per_m,
        "pressure_drop_Pa_m": float(d.pressure_drop_per_m[i]),
        "diameter_at_design_flood_m": float(d.diameter_flooding[i]),
        "diameter_at_pressure_limit_m": float(d.diameter_pressure_drop[i]),
        "wetting_ratio": float(d.wetting_ratio[i]), "diameter_over_packing_size": float(d.diameter_ratio[i]),
        "min_diameter_over_packing_size": data["min_diameter_ratio"],
        "max_temperature_K": data["max_temperature"],
        "packing_volume_m3": float(d.packing_volume[i]), "packing_weight_kg": float(d.packing_weight[i]),
        "price_USD_per_m3_at_basis": choice.price_per_m3, "price_index_basis": choice.price_index_basis,
        "price_source": "given in the scenario" if choice.price_given else data["price_source"],
    }


def design_record(case, d, i: int = 0, *, ratio_text: str | None = None) -> dict:
    """One design as plain data (SI units, names spelled out) for JSON and CSV.

    ``ratio_text`` is the ratio as printed (``towercost.report.ratios``).
    """
    from towercost.models.constants import GRAVITY
    from towercost.report.ids import id_of

    a = int(d.agent[i])
    packed = is_packed(d, i)
    solutes = {}
    for s, name in enumerate(case.solutes):
        inlet = float(case.feed_in[s])
        out = float(d.outlet[i, s])
        solutes[name] = {
            "inlet_mole_fraction": inlet,
            "outlet_mole_fraction": out,
            "spec_mole_fraction": None if not math.isfinite(case.target[s]) else float(case.target[s]),
            "fraction_removed": 1.0 - out / inlet if inlet > 0 else None,
            "factor": float(d.factor[i, s]),
            "theoretical_stages": float(d.stages[i, s]),
            "tray_efficiency": None if packed else float(d.efficiency[i, s]),
            "k_value": float(case.k_value[a, s]),
            "agent_outlet_mole_fraction": float(d.agent_outlet[i, s]),
            "agent_inlet_mole_fraction": float(d.lean_loading[i, s]) if _looped(d, i) else float(case.lean[a, s]),
            **concentration_fields(case, a, s, inlet, out, float(case.target[s]), float(d.agent_outlet[i, s])),
        }
    items = equipment_rows(case, d, i)
    uses = use_rows(d, i)
    by_use = {u["use"]: u for u in uses}
    eco = case.economics
    agent_mass = d.liquid_mass_flow[i] if case.service.agent_is_liquid else d.gas_mass_flow[i]
    feed_mass = d.gas_mass_flow[i] if case.service.agent_is_liquid else d.liquid_mass_flow[i]
    rho_liquid = float(d.liquid_mass_flow[i] / d.liquid_volumetric_flow[i]) if d.liquid_volumetric_flow[i] > 0 else None
    return {
        "design_id": id_of(case, d, i),
        "agent": case.agents[a],
        **({"internals": internals_name(case, d, i)} if case.packings else {}),
        "trays": int(d.trays[i]),
        "rate_mol_s": float(d.rate[i]),
        "minimum_rate_mol_s": float(d.rate_min[i]),
        "ratio_to_minimum": float(d.ratio[i]),
        **({"ratio_to_minimum_text": ratio_text} if ratio_text is not None else {}),
        "agent_to_feed_molar": float(d.rate[i]) / case.feed_flow,
        "agent_to_feed_mass": float(agent_mass / feed_mass),
        "meets_spec": bool(d.meets_spec[i]),
        "within_limits": bool(d.within_limits[i]),
        "controlling": controlling(case, d, i),
        "limits": limit_rows(case, d, i),
        "at_search_bounds": search_bounds(case, d, i),
        "controlling_solute": case.solutes[int(d.controlling[i])],
        "solutes": solutes,
        "streams": {
            "liquid_mol_s": float(d.liquid_flow[i]), "liquid_kg_s": float(d.liquid_mass_flow[i]),
            "liquid_m3_s": float(d.liquid_volumetric_flow[i]),
            "gas_mol_s": float(d.gas_flow[i]), "gas_kg_s": float(d.gas_mass_flow[i]),
            "gas_at_blower_inlet_m3_s": float(d.gas_inlet_flow[i]),
            "pump_flow_m3_s": float(d.liquid_volumetric_flow[i]), "pump_rise_Pa": float(d.pump_head[i]),
            "pump_head_m": (float(d.pump_head[i]) / (rho_liquid * GRAVITY)) if rho_liquid else None,
            "blower_rise_Pa": float(d.blower_rise[i]),
        },
        "cost_basis": {"vessel_volume_m3": float(d.volume[i]), "tray_area_m2": float(d.cross_section[i])},
        "column": {
            "diameter_m": float(d.diameter[i]),
            "diameter_required_m": float(d.diameter_required[i]),
            "fraction_of_flood": float(d.fraction_of_flood[i]),
            "flow_parameter": float(d.flow_parameter[i]),
            "height_m": float(d.height[i]),
            "tray_spacing_m": None if packed else case.tray_spacing,
            "tray_type": None if packed else TRAY_TYPES[int(d.tray_type[i])],
            "tray_type_asked": case.tray,
            "diameter_flooding_m": float(d.diameter_flooding[i]),
            "diameter_least_m": float(d.diameter_least[i]),
            "diameter_governs": "downcomer" if d.diameter_least[i] > d.diameter_flooding[i] else "flooding",
            "operating_range": operating_range(case, d, i),
            "pressure_drop_per_tray_Pa": None if packed else float(d.pressure_drop_per_tray[i]),
            "pressure_drop_Pa": float(d.pressure_drop[i]),
            "design_pressure_Pa_gauge": float(d.design_pressure[i]),
            "design_temperature_K": float(d.design_temperature[i]),
            "shell_thickness_m": float(d.wall_thickness[i]),
            "head_thickness_m": float(d.head_thickness[i]),
            "shell_weight_kg": float(d.shell_weight[i]),
            "heads_weight_kg": float(d.head_weight[i]),
            "vessel_weight_kg": float(d.vessel_weight[i]),
            "tray_weight_kg": float(d.tray_weight[i]),
            "material": case.material,
            "design_pressure_basis": design_basis(case)[0],
            "design_temperature_basis": design_basis(case)[1],
            "existing_shell": None if case.shell_diameter is None else {
                "diameter_m": case.shell_diameter, "modification_allowance": case.shell_modification},
            "drive_enclosure": case.drive_enclosure,
            **({"packed": packed_record(case, d, i) if packed else None} if case.packings else {}),
        },
        "utilities": {
            "pump_shaft_power_W": float(d.pump_shaft_power[i]),
            "blower_shaft_power_W": float(d.blower_shaft_power[i]),
            "electric_power_W": float(d.electric_power[i]),
            "steam_kg_s": float(d.steam_rate[i]),
            "cooling_water_m3_s": float(d.cooling_rate[i]),
            "makeup_kg_s": float(d.makeup_rate[i]),
        },
        "utilities_summary": utilities_summary(d, i),
        "capital_USD": {
            "cost_index": eco.index_to,
            "cost_index_year": eco.index_year,
            "purchased": {row["item"]: row["purchased_USD"] for row in items},
            "bare_module": {row["item"]: row["bare_module_USD"] for row in items},
            "bare_module_total": float(d.bare_module[i]),
            "total_module": float(d.total_module[i]),
            "installed": float(d.installed[i]),
        },
        "operating_USD_per_yr": {
            **{key: row["cost_USD_per_yr"] for key, row in by_use.items() if "cost_USD_per_yr" in row},
            "total": float(d.operating[i]),
        },
        "credit_USD_per_yr": float(d.credit[i]),
        "capital_charge_USD_per_yr": float(d.capital_charge[i]),
        "annualized_cost_USD_per_yr": float(d.annualized[i]),
        "equipment": items,
        "consumption": uses,
        **({"loop": loop_record(case, d, i)} if case.loop is not None else {}),
    }


def _mole_ratio_check(case, d, i: int) -> list[dict]:
    from towercost.design.loop import concentrated_check

    return concentrated_check(case, d, i)


def _finite_or_none(value) -> float | None:
    value = float(value)
    return value if math.isfinite(value) else None


def _looped(d, i: int) -> bool:
    return "loop_looped" in d.figures and bool(d.loop_looped[i])


def loop_record(case, d, i: int) -> dict | None:
    """The regenerated loop of design ``i`` (None: the design has no designed regenerator)."""
    if not _looped(d, i):
        return None
    data = case.loop.regenerator(int(d.agent[i]))
    return {
        "parent_candidate": case.loop.parents[int(case.loop.parent[int(d.agent[i])])],
        "key_solute": case.solutes[data.key],
        "lean_level": float(d.lean_level[i]),
        "circulation_mol_s": float(d.rate[i]), "circulation_kg_s": float(d.liquid_mass_flow[i]),
        "basis": "dilute Kremser" if float(np.max(d.rich_loading[i])) <= case.max_dilute
                 else "dilute Kremser (rich loading above the dilute threshold)",
        "regenerator": {
            "stripping": data.stripping, "temperature_K": data.temperature, "pressure_Pa": data.pressure,
            "trays": int(d.regenerator_trays[i]),
            "shared_by_the_site": case.loop.shared_trays is not None,   # its column then sized in the site record
            "diameter_m": _finite_or_none(d.regenerator_diameter[i]),
            "height_m": _finite_or_none(d.regenerator_height[i]),
            "fraction_of_flood": _finite_or_none(d.regenerator_fraction_of_flood[i]),
            "within_its_limits": bool(d.regenerator_ok[i]),
            "vapour_mol_s": float(d.regenerator_vapour[i]),
            "tray_efficiency": {s: float(data.efficiency[k]) for k, s in enumerate(case.solutes)},
            "k_value": {s: float(data.k_value[k]) for k, s in enumerate(case.solutes)},
        },
        "heat_exchange": {
            "approach_K": data.approach,
            "cross_duty_W": float(d.cross_duty[i]), "cross_area_m2": float(d.cross_area[i]),
            "cooler_duty_W": float(d.cooler_duty[i]), "cooler_area_m2": float(d.cooler_area[i]),
            "heater_duty_W": float(d.heater_duty[i]), "heater_area_m2": float(d.heater_area[i]),
            "reboiler_duty_W": float(d.reboiler_duty[i]), "reboiler_area_m2": float(d.reboiler_area[i]),
        },
        "steam_kg_s": {"live": float(d.live_steam[i]), "loop_total": float(d.loop_steam[i])},
        "cooling_water_m3_s": float(d.loop_cooling[i]),
        "solvent_vapour_loss_kg_s": float(d.vapour_loss[i]),
        "mole_ratio_check": _mole_ratio_check(case, d, i),
        "solutes": {s: {"lean_mole_fraction": float(d.lean_loading[i, k]),
                        "rich_mole_fraction": float(d.rich_loading[i, k]),
                        "stripping_factor": float(d.stripping_factor[i, k]),
                        "build_up": float(d.build_up[i, k]),
                        "overhead_mole_fraction": float(d.regenerator_overhead[i, k]),
                        "treated_gas_outlet_mole_fraction": float(d.outlet[i, k]),
                        "loop_balance_relative": float(d.loop_balance[i, k])}
                    for k, s in enumerate(case.solutes)},
    }


#: What each listing holds, in words (``towercost.select.ranking.DISTINCT``).
LISTINGS = {"trays": "one design per candidate and tray count, at its best rate and diameter",
            "variant": "every rate and diameter variant",
            "candidate": "one design per candidate"}

def listing_meaning(case, distinct: str) -> str:
    """What a listing holds, in words; with packed beds offered, a design's internals tell groups apart too."""
    if case.packings and distinct == "trays":
        return ("one design per candidate, internals and tray count (a packed bed: theoretical stages), at its best "
                "rate and diameter")
    return LISTINGS[distinct]


#: Solver figures that say how an answer was found and how long it took: only with --verbose or in saved reports.
DIAGNOSTIC_KEYS = ("binaries", "solves", "solver")


def inputs_record(scenario) -> dict | None:
    """The scenario as read and validated, every value in SI."""
    return None if scenario is None else scenario.model_dump(mode="json")


def result_record(result, *, verbose: bool = True) -> dict:
    """An optimize result as one plain object.

    ``verbose`` False leaves out the solver's timings and diagnostics, so that
    the same scenario gives the same text on every run.
    """
    from towercost.report.ratios import ratio_texts

    case = result.case
    best = float(result.designs.annualized[0])
    texts = ratio_texts(case, result.designs)
    alternatives = []
    for i in range(len(result.designs)):
        rec = design_record(case, result.designs, i, ratio_text=texts[i])
        rec["rank"] = i + 1
        rec["above_best"] = (float(result.designs.annualized[i]) - best) / abs(best) if best else 0.0
        rec["on_search_bounds"] = list(result.ranked_bounds[i]) if result.ranked_bounds else []
        alternatives.append(rec)
    band = result.band
    per_texts = ratio_texts(case, result.per_agent)
    per_agent = []
    for i in range(len(result.per_agent)):
        rec = design_record(case, result.per_agent, i, ratio_text=per_texts[i])
        if result.per_agent_rank:
            rec["rank"] = result.per_agent_rank[i]
        rec["above_best"] = (float(result.per_agent.annualized[i]) - best) / abs(best) if best else 0.0
        per_agent.append(rec)
    solver = dict(result.solver)
    if not verbose:
        solver = {k: v for k, v in solver.items() if not k.endswith("_seconds") and k not in DIAGNOSTIC_KEYS}
    return {
        "tool": tool_record(),
        "scenario": conditions_record(case),
        "economics": economics_record(case),
        "listing": {"distinct": result.distinct, "meaning": listing_meaning(case, result.distinct)},
        "best": alternatives[0],
        "alternatives": alternatives,
        "band": {"margin": band.margin, "designs": band.count, "trays": list(band.trays),
                 "ratio_to_minimum": list(band.ratio), "agents": band.agents,
                 "per_agent": [{"agent": r.agent, **({"internals": r.internals} if case.packings else {}),
                                "designs": r.count, "trays": list(r.trays),
                                "ratio_to_minimum": list(r.ratio), "diameter_m": list(r.diameter),
                                "annualized_cost_USD_per_yr": list(r.cost)} for r in band.by_agent]},
        "per_agent_best": per_agent,
        "no_design": result.unmet,
        "search_bounds": [{"design": f.design, "bound": f.bound, "message": f.message} for f in result.bounds],
        "warnings": result.warnings,
        "solver": solver,
        "inputs": inputs_record(result.scenario),
        "caution": CAUTION,
    }


def saved_report(record: dict, when=None) -> dict:
    """A report as saved to a file: the record with the date and time of the run (UTC, ISO 8601)."""
    import datetime

    when = when or datetime.datetime.now(datetime.timezone.utc)
    return {"run": {"date": when.isoformat(timespec="seconds")}, **record}


def alternatives_frame(result):
    """The ranked alternatives as a flat table (pandas), one row per design."""
    import pandas as pd

    from towercost.report.ids import ids_of
    from towercost.report.ratios import ratio_texts

    case, d = result.case, result.designs
    best = float(d.annualized[0])
    names = ids_of(case, d)
    texts = ratio_texts(case, d)
    rows = []
    for i in range(len(d)):
        row = {
            "rank": i + 1, "design_id": names[i], "agent": case.agents[int(d.agent[i])],
            **({"internals": internals_name(case, d, i)} if case.packings else {}), "trays": int(d.trays[i]),
            "ratio_to_minimum": float(d.ratio[i]), "ratio_to_minimum_text": texts[i],
            "rate_mol_s": float(d.rate[i]), "rate_kmol_h": float(d.rate[i]) * KMOL_H,
            "diameter_m": float(d.diameter[i]), "height_m": float(d.height[i]),
            "fraction_of_flood": float(d.fraction_of_flood[i]),
            "installed_USD": float(d.installed[i]), "operating_USD_yr": float(d.operating[i]),
            "credit_USD_yr": float(d.credit[i]), "annualized_USD_yr": float(d.annualized[i]),
            "above_best": (float(d.annualized[i]) - best) / abs(best) if best else 0.0,
            "on_search_bounds": " ".join(result.ranked_bounds[i]) if result.ranked_bounds else "",
        }
        shown = getattr(case, "concentrations", None)
        for s, name in enumerate(case.solutes):
            row[f"stages_{name}"] = float(d.stages[i, s])
            row[f"factor_{name}"] = float(d.factor[i, s])
            row[f"outlet_{name}"] = float(d.outlet[i, s])
            if shown is not None:
                value, unit = shown.treated(s, float(d.outlet[i, s]))
                row[f"outlet_{name}_{unit.replace(' ', '_')}"] = value
        rows.append(row)
    return pd.DataFrame(rows)


def curve_rows(curve) -> list[dict]:
    """A cost curve as flat rows: one per tray count (best rate at each), then one per ratio level."""
    rows = []
    for table, designs in (("by_trays", curve.by_trays), ("by_ratio", curve.by_ratio)):
        for i in range(len(designs)):
            rows.append({"curve": table, "agent": curve.agent, "trays": int(designs.trays[i]),
                         "ratio_to_minimum": float(designs.ratio[i]), "rate_mol_s": float(designs.rate[i]),
                         "diameter_m": float(designs.diameter[i]), "installed_USD": float(designs.installed[i]),
                         "annualized_USD_yr": float(designs.annualized[i])})
    return rows


def to_json(record: dict) -> str:
    """One JSON text: non-finite numbers become null, numpy scalars plain numbers."""
    def clean(value):
        if isinstance(value, float) and not math.isfinite(value):
            return None
        if isinstance(value, dict):
            return {k: clean(v) for k, v in value.items()}
        if isinstance(value, list):
            return [clean(v) for v in value]
        if isinstance(value, (np.floating, np.integer)):
            return clean(value.item())
        if isinstance(value, np.bool_):
            return bool(value)
        return value

    return json.dumps(clean(record), indent=2)
