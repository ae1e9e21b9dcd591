"""The report document as plain data: every section the HTML and Markdown reports show, computed once.

``build(scenario, result, curves, ...)`` gathers the case and its inputs,
the best design's sheet, the ranked alternatives, the per-candidate best,
the near-optimal band, the plots (as image bytes), the equipment list and
utilities, the warnings, the assumptions, the accuracy class, the cautions
and the references. The templates (``templates/report.html.j2`` and
``report.md.j2``) only lay these out; strings from the scenario reach them
as data and are escaped there.
"""

from __future__ import annotations

import base64
import datetime
import math

from towercost.report import equipment, ids, plots, ratios, records
from towercost.scenario.units import mole_fraction_text

#: The estimate's accuracy class in the usual wording. Source: AACE International Recommended Practice
#: 18R-97, Cost Estimate Classification System, Class 4 (study or feasibility): low -15 % to -30 %,
#: high +20 % to +50 % (value from memory).
ACCURACY = {"class": "Class 4 (study or feasibility estimate)",
            "range": "-30 % to +50 %",
            "wording": "a study estimate of AACE International Class 4: the actual cost may lie from 30 % below "
                       "to 50 % above these figures (the class's range: low -15 % to -30 %, high +20 % to +50 %)",
            "reference": "aace"}

CAUTIONS = [
    "This is a preliminary estimate only. The tool sizes equipment that handles toxic, flammable or pressurized "
    "fluids: mechanical design, pressure-vessel design and process-safety review must be done by qualified "
    "engineers.",
    "Local codes, standards and licensed engineering practice take precedence over anything in this report.",
    "Wall thicknesses and weights are estimating figures, not a mechanical design (no wind, seismic, external "
    "pressure or nozzle loads).",
    "Every warning about a correlation used outside its range, or about the dilute assumption, matters.",
]

ASSUMPTIONS = [
    ("Dilute streams: straight equilibrium line, constant liquid and gas molar flows, an isothermal column; "
     "warned above 1 mol % solute or 5 % flow change (common practice thresholds).", "kremser"),
    ("Countercurrent equilibrium stages by the Kremser relation; minimum agent rate from the pinch.", "kremser"),
    ("Real trays from theoretical stages by the overall tray efficiency (given, O'Connell, or Murphree "
     "through the Lewis relation).", "oconnell"),
    ("Diameter from Fair's flooding correlation at the design fraction of flood, in 6 in standard steps.", "fair"),
    ("Packed beds (where the scenario offers them): the least packed height meeting every spec at the design's "
     "rate and shell, theoretical stages x HETP = N_OG x H_OG (Colburn), H_OG from the Onda film heights or a "
     "given value; capacity and pressure drop by the Stichlmair, Bravo and Fair model at a design fraction of "
     "flood and a pressure-drop limit per metre; the minimum wetting rate and the diameter over packing size "
     "checked; beds split by the packing's tallest bed, with redistributors.", "packed"),
    ("Shell and head thickness by ASME VIII-1 UG-27 and UG-32 with joint efficiency and corrosion allowance; "
     "weights for estimating only.", "asme"),
    ("Equipment costs from Turton et al.'s purchased-cost correlations and bare-module factors, escalated by the "
     "Chemical Engineering Plant Cost Index.", "turton"),
    ("Total annualized cost = capital recovery factor x grassroots capital + operating cost - credit.", "turton"),
    ("The regenerator is not designed: its duty enters through the scenario's steam and cooling water per kg of "
     "agent circulated.", None),
]

#: The works the reported figures come from; ``key`` is the anchor each reported figure points to.
REFERENCES = {
    "kremser": "Kremser, A. (1930), Natl. Petroleum News 22(21), 42; in Seader, Henley and Roper, Separation "
               "Process Principles, 3rd ed., Wiley, 2011, Ch. 6.",
    "oconnell": "O'Connell, H. E. (1946), Trans. AIChE 42, 741 (tray efficiency).",
    "fair": "Fair, J. R. (1961), Petro/Chem Eng. 33(10), 45; Lygeros and Magoulas (1986), Hydrocarbon Processing "
            "65(12), 43; Perry's Chemical Engineers' Handbook, 8th ed., Section 14.",
    "asme": "ASME Boiler and Pressure Vessel Code, Section VIII Division 1 (UG-27, UG-32) and Section II Part D.",
    "turton": "Turton, Bailie, Whiting, Shaeiwitz and Bhattacharyya, Analysis, Synthesis and Design of Chemical "
              "Processes, 4th ed., Prentice Hall, 2012, Appendix A and Ch. 7-9.",
    "cepci": "Chemical Engineering magazine, Plant Cost Index (CEPCI), annual averages.",
    "packed": "Colburn, A. P. (1939), Trans. AIChE 35, 211; Onda, Takeuchi and Okumoto (1968), J. Chem. Eng. Japan "
              "1(1), 56; Stichlmair, Bravo and Fair (1989), Gas Sep. Purif. 3, 19; Morris and Jackson, Absorption "
              "Towers (1953); Seider, Seader, Lewin and Widagdo, Product and Process Design Principles, 3rd ed., "
              "Section 16.5 (internals cost, value from memory).",
    "aace": "AACE International Recommended Practice 18R-97, Cost Estimate Classification System (value from "
            "memory for the class ranges).",
}


def _image(data: bytes, fmt: str = "png") -> str:
    return f"data:image/{'svg+xml' if fmt == 'svg' else fmt};base64," + base64.b64encode(data).decode("ascii")


def _money(value: float) -> str:
    """Whole dollars with thousands separators; a value that rounds to zero prints as 0, never -0."""
    return f"{round(float(value)) or 0:,.0f}"


def _flatten(value, prefix: str = "") -> list[tuple[str, str]]:
    """The inputs as (dotted path, value) rows; candidates and specs named by their name or solute."""
    rows: list[tuple[str, str]] = []
    if isinstance(value, dict):
        for key, item in value.items():
            rows += _flatten(item, f"{prefix}.{key}" if prefix else str(key))
    elif isinstance(value, list) and value and all(isinstance(v, dict) for v in value):
        for k, item in enumerate(value):
            label = item.get("name") or item.get("solute") or str(k + 1)
            rows += _flatten(item, f"{prefix}[{label}]")
    elif value is not None and value != [] and value != {}:
        rows.append((prefix, repr(value) if isinstance(value, float) else str(value)))
    return rows


def _design_rows(case, d, best: float, ranks: list[int]) -> list[dict]:
    texts = ratios.ratio_texts(case, d)
    names = ids.ids_of(case, d)
    rows = []
    for i in range(len(d)):
        trays = (f"{records.internals_name(case, d, i)}, {d.packed_height[i]:.1f} m" if records.is_packed(d, i)
                 else int(d.trays[i]))
        rows.append({"rank": ranks[i], "agent": case.agents[int(d.agent[i])], "trays": trays,
                     "ratio": texts[i], "diameter": f"{d.diameter[i]:.3f}", "height": f"{d.height[i]:.2f}",
                     "installed": _money(d.installed[i]), "operating": _money(d.operating[i] - d.credit[i]),
                     "annualized": _money(d.annualized[i]),
                     "above": f"{100 * (d.annualized[i] - best) / abs(best):.2f}" if best else "0.00",
                     "design_id": names[i]})
    return rows


def _sheet(case, d, i: int) -> dict:
    """The best design's sheet: separation per solute, column figures, capital and annual cost lines."""
    a = int(d.agent[i])
    packed = records.is_packed(d, i)
    separation = [{"solute": name, "k": f"{case.k_value[a, s]:.4g}", "factor": f"{d.factor[i, s]:.3f}",
                   "stages": f"{d.stages[i, s]:.2f}",
                   "efficiency": (f"{d.hetp[i, s]:.3f} m" if packed else f"{d.stages[i, s] / d.trays[i]:.3f}"),
                   "inlet": mole_fraction_text(case.feed_in[s]), "outlet": mole_fraction_text(d.outlet[i, s]),
                   "spec": mole_fraction_text(case.target[s]) if math.isfinite(case.target[s]) else "none",
                   "removed": f"{100 * (1 - d.outlet[i, s] / case.feed_in[s]):.3f}"}
                  for s, name in enumerate(case.solutes)]
    if packed:
        choice = records.packing_choice(case, d, i)
        unit = "OL" if case.mode == "strip" else "OG"
        column = [
            ("packing", f"{choice.name}" + ("" if choice.constants_checked else
                                             " (Stichlmair constants are estimates: capacity and pressure drop "
                                             "indicative)"), "packed"),
            ("packed height and beds", f"{d.packed_height[i]:.2f} m in {int(d.beds[i])} bed(s) of "
                                       f"{d.bed_height[i]:.2f} m", "packed"),
            (f"N_{unit} / H_{unit} / HETP ({case.solutes[int(d.controlling[i])]})",
             f"{d.transfer_units[i, int(d.controlling[i])]:.2f} / {d.htu[i, int(d.controlling[i])]:.3f} m / "
             f"{d.hetp[i, int(d.controlling[i])]:.3f} m", "packed"),
            ("diameter (standard size)", f"{d.diameter[i]:.3f} m", "packed"),
            ("fraction of flood", f"{d.fraction_of_flood[i]:.3f} (design {choice.flood_fraction:g})", "packed"),
            ("pressure drop per metre / total", f"{d.pressure_drop_per_m[i]:.0f} Pa/m / "
                                                f"{d.pressure_drop[i] / 1e3:.2f} kPa", "packed"),
            ("wetting rate over the minimum", f"{d.wetting_ratio[i]:.2f}", "packed"),
            ("height, tangent to tangent", f"{d.height[i]:.2f} m", None),
            ("design pressure / temperature", f"{d.design_pressure[i] / 1e5:.2f} barg / "
             f"{d.design_temperature[i] - 273.15:.0f} degC", "asme"),
            ("shell / head thickness", f"{d.wall_thickness[i] * 1e3:.1f} mm / {d.head_thickness[i] * 1e3:.1f} mm",
             "asme"),
            ("shell / packing weight", f"{d.shell_weight[i] / 1e3:.2f} t / {d.packing_weight[i] / 1e3:.2f} t", None),
            ("pump / blower shaft power", f"{d.pump_shaft_power[i] / 1e3:.2f} kW / "
             f"{d.blower_shaft_power[i] / 1e3:.2f} kW", None),
        ]
    else:
        column = _tray_column(case, d, i)
    annual = [(spec.label, _money(d.use_cost[i, j])) for j, spec in enumerate(d.uses.specs) if not spec.credit]
    annual += [("operating total", _money(d.operating[i])),
               ("capital charge (capital recovery x installed)", _money(d.capital_charge[i])),
               ("credit for recovered solute", _money(-d.credit[i]))]
    return {"separation": separation, "column": column, "annual": annual,
            "total_module": _money(d.total_module[i]), "installed": _money(d.installed[i]),
            "annualized": _money(d.annualized[i])}


def _tray_column(case, d, i: int) -> list:
    return [
        ("tray type and spacing", f"{case.tray}, {case.tray_spacing:.3f} m", "fair"),
        ("diameter required at the design flood", f"{d.diameter_required[i]:.3f} m", "fair"),
        ("diameter (standard size)", f"{d.diameter[i]:.3f} m", "fair"),
        ("fraction of flood", f"{d.fraction_of_flood[i]:.3f}", "fair"),
        ("height, tangent to tangent", f"{d.height[i]:.2f} m", None),
        ("pressure drop per tray / total", f"{d.pressure_drop_per_tray[i]:.0f} Pa / {d.pressure_drop[i] / 1e3:.2f} kPa",
         "fair"),
        ("design pressure / temperature", f"{d.design_pressure[i] / 1e5:.2f} barg / "
         f"{d.design_temperature[i] - 273.15:.0f} degC", "asme"),
        ("shell / head thickness", f"{d.wall_thickness[i] * 1e3:.1f} mm / {d.head_thickness[i] * 1e3:.1f} mm", "asme"),
        ("shell / trays weight", f"{d.shell_weight[i] / 1e3:.2f} t / {d.tray_weight[i] / 1e3:.2f} t", None),
        ("pump / blower shaft power", f"{d.pump_shaft_power[i] / 1e3:.2f} kW / {d.blower_shaft_power[i] / 1e3:.2f} kW",
         None),
    ]


def _references(items: list[dict]) -> list[dict]:
    """The general references, then one per cost correlation reported (with its own source text)."""
    refs = [{"key": key, "text": text} for key, text in REFERENCES.items()]
    for item in items:
        key = f"cost-{item['correlation']}"
        if all(r["key"] != key for r in refs):
            refs.append({"key": key, "text": f"Cost correlation {item['correlation']}: {item['source']}"})
    for n, ref in enumerate(refs, start=1):
        ref["number"] = n
    return refs


def build(scenario, result, curves: list, *, source: str = "", when=None) -> dict:
    """Everything the report shows, as plain data (see the module docstring)."""
    case, d = result.case, result.designs
    best = float(d.annualized[0])
    when = when or datetime.datetime.now(datetime.timezone.utc)
    rw = case.service.ratio_word
    solute = case.solutes.index(records.controlling(case, d, 0)["binding_spec"] or case.solutes[0])
    stage_png, stepped = plots.stage_diagram(case, d, 0, solute)
    curve_png = plots.cost_curves(curves, rw, (float(d.ratio[0]), int(d.trays[0]), best))
    breakdown_png = plots.cost_breakdown(case, d, [str(k) for k in range(1, len(d) + 1)])
    items = equipment.equipment_list(case, d, 0)
    refs = _references(items)
    number = {r["key"]: r["number"] for r in refs}
    for item in items:
        item["reference"] = number[f"cost-{item['correlation']}"]
    eco = case.economics
    texts = ratios.ratio_texts(case, d)
    conditions = [
        ("service", f"{case.mode} ({case.service.agent_word}: {', '.join(case.agents)})"),
        ("stream to treat", f"{case.feed_flow * 3.6:,.1f} kmol/h at {case.temperature - 273.15:.1f} degC and "
                            f"{case.pressure / 1e5:.4g} bar"),
        ("solutes and specs", "; ".join(
            f"{s} {mole_fraction_text(case.feed_in[k])} in, "
            + (f"at most {mole_fraction_text(case.target[k])} out" if math.isfinite(case.target[k]) else "no spec")
            for k, s in enumerate(case.solutes))),
        ("trays searched", f"{case.trays_range[0]} to {case.trays_range[1]}"),
        *([("packed beds offered", "; ".join(c.name for c in case.packings) + f" (theoretical stages "
            f"{case.stages_range[0]} to {case.stages_range[1]})")] if case.packings else []),
        (f"{rw} searched", f"{case.ratio_range[0]:g} to {case.ratio_range[1]:g} ({case.ratio_levels} levels)"),
        ("economics", f"interest {100 * eco.interest:g} %/yr over {eco.life:g} yr (capital recovery factor "
                      f"{eco.capital_recovery:.4f}/yr), {eco.hours:,.0f} h/yr on stream"),
        ("cost index", f"{eco.index_to:g}" + (f" ({eco.index_year})" if eco.index_year else "")),
    ]
    band = result.band
    return {
        "title": case.name,
        "source": source,
        "tool": records.tool_record(),
        "date": when.isoformat(timespec="seconds"),
        "accuracy": ACCURACY,
        "headline": [("candidate", case.agents[int(d.agent[0])]),
                     (("internals", f"{records.internals_name(case, d, 0)}, {d.packed_height[0]:.2f} m packed")
                      if records.is_packed(d, 0) else ("real trays", str(int(d.trays[0])))),
                     (rw, texts[0]), ("diameter x height", f"{d.diameter[0]:.3f} m x {d.height[0]:.2f} m"),
                     ("installed capital", f"{_money(d.installed[0])} USD"),
                     ("total annualized cost", f"{_money(best)} USD/yr")],
        "best_id": ids.ids_of(case, d)[0],
        "conditions": conditions,
        "inputs": _flatten(records.inputs_record(scenario) or {}),
        "sheet": _sheet(case, d, 0),
        "ratio_word": rw,
        "factor_word": case.service.factor_word,
        "count_word": "internals" if case.packings else "trays",
        "efficiency_word": "HETP" if records.is_packed(d, 0) else "tray efficiency",
        "listing": records.listing_meaning(case, result.distinct),
        "space_size": f"{result.space_size:,}",
        "ranked": _design_rows(case, d, best, list(range(1, len(d) + 1))),
        "per_agent": _design_rows(case, result.per_agent, best, result.per_agent_rank
                                  or list(range(1, len(result.per_agent) + 1))),
        "unmet": list(result.unmet.items()),
        "band": {"margin": f"{100 * band.margin:g}", "count": f"{band.count:,}",
                 "rows": [{"agent": r.agent + (f" ({r.internals})" if case.packings else ""),
                           "count": f"{r.count:,}", "trays": f"{r.trays[0]} to {r.trays[1]}",
                           "ratio": f"{r.ratio[0]:.3f} to {r.ratio[1]:.3f}",
                           "diameter": f"{r.diameter[0]:.3f} to {r.diameter[1]:.3f}",
                           "cost": f"{_money(r.cost[0])} to {_money(r.cost[1])}"} for r in band.by_agent]},
        "plots": [
            {"id": "plot-curves", "src": _image(curve_png), "caption":
             f"Total annualized cost against {rw} (best trays at each level) and against trays (best rate at "
             "each count), per candidate; the star is the best design."},
            {"id": "plot-breakdown", "src": _image(breakdown_png), "caption":
             "What makes up the annualized cost of the ranked designs (by rank): capital charge and each "
             "consumption, credits below zero."},
            {"id": "plot-stages", "src": _image(stage_png), "caption":
             f"Operating and equilibrium lines of the best design for {case.solutes[solute]} (the solute whose "
             f"spec binds), with {stepped:.2f} theoretical stages stepped off from the top (the last, partial step "
             f"measured along the liquid composition); the Kremser relation gives {d.stages[0, solute]:.2f}."},
        ],
        "equipment": items,
        "utilities": equipment.utilities(d, 0),
        "warnings": list(result.warnings),
        "assumptions": [{"text": t, "reference": number.get(k)} for t, k in ASSUMPTIONS],
        "cautions": CAUTIONS,
        "references": refs,
        "ref": number,
        "cost_index": f"{eco.index_to:g}" + (f" ({eco.index_year})" if eco.index_year else ""),
        "caution": records.CAUTION,
    }

