"""Sensitivity and Monte Carlo studies as plain data (SI numbers, names spelled out) for JSON.

Only naming and arranging: every number is a figure of ``towercost.study``.
"""

from __future__ import annotations

import math

from towercost.report.records import CAUTION
from towercost.study.uncertainty import PERCENTILES


def _design(case, designs, i: int = 0) -> dict:
    return {"agent": case.agents[int(designs.agent[i])], "trays": int(designs.trays[i]),
            "rate_mol_s": float(designs.rate[i]), "ratio_to_minimum": float(designs.ratio[i]),
            "diameter_m": float(designs.diameter[i]), "height_m": float(designs.height[i]),
            "installed_USD": float(designs.installed[i]), "annualized_USD_per_yr": float(designs.annualized[i]),
            "meets_spec": bool(designs.meets_spec[i]), "within_limits": bool(designs.within_limits[i])}


def _scenario(case) -> dict:
    return {"name": case.name, "mode": case.mode, "agents": list(case.agents), "solutes": list(case.solutes)}


def sensitivity_record(result) -> dict:
    """A sensitivity study as one plain object: the nominal best and one entry per input, largest swing first."""
    case = result.case
    rows = []
    for row in result.rows:
        sides = []
        for change, fixed, best in zip(row.changes, row.fixed, row.best):
            entry = {"change": change,
                     "fixed_design": {"annualized_USD_per_yr": fixed.annualized, "change": fixed.change,
                                      "meets_spec": fixed.meets_spec, "within_limits": fixed.within_limits}}
            if best.designs is None:
                entry["reoptimized"] = {"no_design": best.reason}
            else:
                entry["reoptimized"] = {**_design(case, best.designs), "change": best.change}
            sides.append(entry)
        rows.append({"input": row.name, "label": row.label, "swing": row.swing, "low": sides[0], "high": sides[1]})
    return {"study": "sensitivity", "scenario": _scenario(case), "nominal_best": _design(case, result.nominal),
            "inputs": rows, "not_varied": result.unvaried, "warnings": result.notes, "caution": CAUTION}


def _estimate(e) -> dict:
    return {"probability": e.probability, "standard_error": e.standard_error, "samples": e.samples}


def _spread(spread) -> dict:
    out = {"distribution": spread.distribution}
    for name in ("log_sd", "sd", "low", "mode", "high"):
        if getattr(spread, name) is not None:
            out[name] = getattr(spread, name)
    return out


def uncertainty_record(mc) -> dict:
    """A Monte Carlo study as one plain object."""
    case, fixed = mc.case, mc.fixed
    spreads = {name: _spread(s) for name, s in mc.draws.spreads.items()}
    for name in ("k", "efficiency"):
        s = mc.draws.spreads[name]
        spreads[name].update(shared=s.shared, correlation=s.correlation, by_solute=dict(s.by_solute))
    cf = fixed.closed_form
    percent = [f"p{p:g}" for p in PERCENTILES]
    outlets = {}
    for s, name in enumerate(case.solutes):
        outlets[name] = {label: float(fixed.outlet_percentiles[j, s]) for j, label in enumerate(percent)}
        outlets[name]["spec_mole_fraction"] = float(case.target[s]) if math.isfinite(case.target[s]) else None
    record = {
        "study": "uncertainty", "scenario": _scenario(case),
        "samples": fixed.samples, "seed": mc.draws.seed, "spreads": spreads,
        "efficiency_follows_k": mc.follows_k,
        "design": {"chosen": mc.label, **_design(case, mc.nominal)},
        "probability_every_spec": _estimate(fixed.every_spec),
        "probability_each_spec": {name: _estimate(e) for name, e in fixed.each_spec.items()},
        "probability_every_spec_and_limit": _estimate(fixed.within_limits),
        "closed_form": {"probability": cf.probability, "method": cf.method, "k_factor_thresholds": cf.thresholds},
        "outlet_mole_fraction": outlets,
        "annualized_USD_per_yr": {**{label: float(fixed.cost_percentiles[j]) for j, label in enumerate(percent)},
                                  "mean": fixed.cost_mean, "nominal": float(mc.nominal.annualized[0])},
        "margin": {"confidence": mc.confidence, "designs": [_margin(case, m) for m in mc.margins]},
        "seconds": mc.seconds, "normal_factors_cut_at_zero": mc.draws.cut,
        "warnings": mc.warnings, "caution": CAUTION,
    }
    if mc.reoptimized is not None:
        ro = mc.reoptimized
        record["reoptimized"] = {
            "samples": ro.samples, "alternatives_evaluated": ro.alternatives, "seconds": ro.seconds,
            "candidate_share": {case.agents[a]: share for a, share in ro.candidate_shares().items()},
            "best_designs": [{"agent": case.agents[w.agent], "trays": w.trays, "diameter_m": w.diameter,
                              "samples": w.count, "share": w.share, "ratio_to_minimum_median": w.ratio_median,
                              "annualized_median_USD_per_yr": w.cost_median} for w in ro.winners],
            "regret": [{"design": g.label, "meets_every_spec_and_limit": g.meets,
                        "regret_when_met_USD_per_yr": g.regret_when_met, "operable": g.operable,
                        "regret_rate_reset_USD_per_yr": g.regret_operated, "best_family_share": g.wins}
                       for g in ro.regrets],
        }
    return record


def _margin(case, m) -> dict:
    out = {"kind": m.kind, "note": m.reason}
    if m.curve is not None:
        out["fraction_meeting_every_spec_by_trays"] = {int(t): float(f) for t, f in zip(*m.curve)}
    if m.design is None:
        out["design"] = None
        return out
    out.update(design=_design(case, m.nominal), meets_every_spec=_estimate(m.meets),
               extra_annualized_USD_per_yr=m.extra_cost)
    return out
