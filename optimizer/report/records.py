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

from towercost.design.internals import TRAY_TYPES
from towercost.models import hydraulics

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
    for j in range(len(eq.specs)):
        spec = eq.spec_at(i, j)   # a row may switch correlation from one design to the next (fan or blower)
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


def operating_range(case, d, i: int = 0) -> dict:
    """The tray's operating range at design ``i``: each limit's figure, the limit, and which governs."""
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
            "tray_efficiency": float(d.efficiency[i, s]),
            "k_value": float(case.k_value[a, s]),
            "agent_outlet_mole_fraction": float(d.agent_outlet[i, s]),
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
        "controlling_solute": case.solutes[int(d.controlling[i])],
        "solutes": solutes,
        "column": {
            "diameter_m": float(d.diameter[i]),
            "diameter_required_m": float(d.diameter_required[i]),
            "fraction_of_flood": float(d.fraction_of_flood[i]),
            "flow_parameter": float(d.flow_parameter[i]),
            "height_m": float(d.height[i]),
            "tray_spacing_m": case.tray_spacing,
            "tray_type": TRAY_TYPES[int(d.tray_type[i])],
            "tray_type_asked": case.tray,
            "diameter_flooding_m": float(d.diameter_flooding[i]),
            "diameter_least_m": float(d.diameter_least[i]),
            "diameter_governs": "downcomer" if d.diameter_least[i] > d.diameter_flooding[i] else "flooding",
            "operating_range": operating_range(case, d, i),
            "pressure_drop_per_tray_Pa": float(d.pressure_drop_per_tray[i]),
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
        rec["on_search_bounds"] = list(result.ranked_bounds[i]) if result.ranked_bounds else []
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
        "search_bounds": [{"design": f.design, "bound": f.bound, "message": f.message} for f in result.bounds],
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
            "on_search_bounds": " ".join(result.ranked_bounds[i]) if result.ranked_bounds else "",
        }
        for s, name in enumerate(case.solutes):
            row[f"stages_{name}"] = float(d.stages[i, s])
            row[f"factor_{name}"] = float(d.factor[i, s])
            row[f"outlet_{name}"] = float(d.outlet[i, s])
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
