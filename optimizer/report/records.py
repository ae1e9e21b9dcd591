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

CAUTION = (
    "Preliminary estimate only (order of magnitude to study grade). Mechanical, "
    "process-safety and pressure-vessel design must be done by qualified engineers; "
    "local codes, standards and licensed practice take precedence over these figures."
)

KMOL_H = 3.6  # mol/s -> kmol/h


def equipment_rows(case, d, i: int = 0) -> list[dict]:
    """One row per equipment item of design ``i``: tag, kind, size basis, costs, correlation, range held."""
    eq = d.equipment
    rows = []
    for j, spec in enumerate(eq.specs):
        rows.append({
            "tag": spec.tag, "item": spec.key, "kind": spec.kind, "material": eq.materials[j],
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


def design_record(case, d, i: int = 0) -> dict:
    """One design as plain data (SI units, names spelled out) for JSON and CSV."""
    a = int(d.agent[i])
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
            "k_value": float(case.k_value[a, s]),
            "agent_outlet_mole_fraction": float(d.agent_outlet[i, s]),
            **concentration_fields(case, a, s, inlet, out, float(case.target[s]), float(d.agent_outlet[i, s])),
        }
    items = equipment_rows(case, d, i)
    uses = use_rows(d, i)
    by_use = {u["use"]: u for u in uses}
    eco = case.economics
    return {
        "agent": case.agents[a],
        "trays": int(d.trays[i]),
        "rate_mol_s": float(d.rate[i]),
        "minimum_rate_mol_s": float(d.rate_min[i]),
        "ratio_to_minimum": float(d.ratio[i]),
        "meets_spec": bool(d.meets_spec[i]),
        "within_limits": bool(d.within_limits[i]),
        "solutes": solutes,
        "column": {
            "diameter_m": float(d.diameter[i]),
            "diameter_required_m": float(d.diameter_required[i]),
            "fraction_of_flood": float(d.fraction_of_flood[i]),
            "flow_parameter": float(d.flow_parameter[i]),
            "height_m": float(d.height[i]),
            "tray_spacing_m": case.tray_spacing,
            "tray_type": case.tray,
            "pressure_drop_per_tray_Pa": float(d.pressure_drop_per_tray[i]),
            "pressure_drop_Pa": float(d.pressure_drop[i]),
            "design_pressure_Pa_gauge": float(d.design_pressure[i]),
            "design_temperature_K": float(d.design_temperature[i]),
            "shell_thickness_m": float(d.wall_thickness[i]),
            "head_thickness_m": float(d.head_thickness[i]),
            "shell_weight_kg": float(d.shell_weight[i]),
            "tray_weight_kg": float(d.tray_weight[i]),
            "material": case.material,
        },
        "utilities": {
            "pump_shaft_power_W": float(d.pump_shaft_power[i]),
            "blower_shaft_power_W": float(d.blower_shaft_power[i]),
            "electric_power_W": float(d.electric_power[i]),
            "steam_kg_s": float(d.steam_rate[i]),
        },
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
    }


def result_record(result) -> dict:
    """An optimize result as one plain object."""
    case = result.case
    best = float(result.designs.annualized[0])
    alternatives = []
    for i in range(len(result.designs)):
        rec = design_record(case, result.designs, i)
        rec["rank"] = i + 1
        rec["above_best"] = (float(result.designs.annualized[i]) - best) / abs(best) if best else 0.0
        alternatives.append(rec)
    band = result.band
    return {
        "scenario": {"name": case.name, "mode": case.mode, "agents": list(case.agents),
                     "solutes": list(case.solutes), "feed_flow_mol_s": case.feed_flow,
                     "temperature_K": case.temperature, "pressure_Pa": case.pressure,
                     "trays_range": list(case.trays_range), "ratio_range": list(case.ratio_range)},
        "best": alternatives[0],
        "alternatives": alternatives,
        "band": {"margin": band.margin, "designs": band.count, "trays": list(band.trays),
                 "ratio_to_minimum": list(band.ratio), "agents": band.agents},
        "per_agent_best": [design_record(case, result.per_agent, i) for i in range(len(result.per_agent))],
        "no_design": result.unmet,
        "warnings": result.warnings,
        "solver": result.solver,
        "caution": CAUTION,
    }


def alternatives_frame(result):
    """The ranked alternatives as a flat table (pandas), one row per design."""
    import pandas as pd

    case, d = result.case, result.designs
    best = float(d.annualized[0])
    rows = []
    for i in range(len(d)):
        row = {
            "rank": i + 1, "agent": case.agents[int(d.agent[i])], "trays": int(d.trays[i]),
            "ratio_to_minimum": float(d.ratio[i]), "rate_kmol_h": float(d.rate[i]) * KMOL_H,
            "diameter_m": float(d.diameter[i]), "height_m": float(d.height[i]),
            "fraction_of_flood": float(d.fraction_of_flood[i]),
            "installed_USD": float(d.installed[i]), "operating_USD_yr": float(d.operating[i]),
            "credit_USD_yr": float(d.credit[i]), "annualized_USD_yr": float(d.annualized[i]),
            "above_best": (float(d.annualized[i]) - best) / abs(best) if best else 0.0,
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
