"""Tables for the terminal, JSON and CSV for the estimate, and safe file writes.

Everything shown is a figure computed by ``models/`` through
``optimizer.space``; this module only converts units for display and lays
the figures out.
"""

from __future__ import annotations

import json
import math
import os
import tempfile
from pathlib import Path

import numpy as np
from rich.console import Console
from rich.table import Table

from towercost.space import Case, Designs
from towercost.units import mole_fraction_text

CAUTION = (
    "Preliminary estimate only (order of magnitude to study grade). Mechanical, "
    "process-safety and pressure-vessel design must be done by qualified engineers; "
    "local codes, standards and licensed practice take precedence over these figures."
)

KMOL_H = 3.6  # mol/s -> kmol/h


def _ratio_word(case: Case) -> str:
    return "L/Lmin" if case.mode == "absorb" else "G/Gmin"


def _factor_word(case: Case) -> str:
    return "A" if case.mode == "absorb" else "S"


def _money(value: float) -> str:
    return f"{value:,.0f}"


# --------------------------------------------------------------------------- plain data


def design_record(case: Case, d: Designs, i: int = 0) -> dict:
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
        }
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
            "cost_index": case.index_to,
            "cost_index_year": case.index_year,
            "purchased": {
                "tower_shell": float(d.purchased_vessel[i]), "trays": float(d.purchased_trays[i]),
                "pump": float(d.purchased_pump[i]), "blower": float(d.purchased_blower[i]),
            },
            "bare_module": {
                "tower_shell": float(d.bare_module_vessel[i]), "trays": float(d.bare_module_trays[i]),
                "pump": float(d.bare_module_pump[i]), "blower": float(d.bare_module_blower[i]),
            },
            "bare_module_total": float(d.bare_module[i]),
            "total_module": float(d.total_module[i]),
            "installed": float(d.installed[i]),
        },
        "operating_USD_per_yr": {
            "electricity": float(d.cost_electricity[i]),
            "agent_purchase": float(d.cost_agent[i]),
            "disposal": float(d.cost_disposal[i]),
            "steam": float(d.cost_steam[i]),
            "cooling_water": float(d.cost_cooling[i]),
            "total": float(d.operating[i]),
        },
        "credit_USD_per_yr": float(d.credit[i]),
        "capital_charge_USD_per_yr": float(d.capital_charge[i]),
        "annualized_cost_USD_per_yr": float(d.annualized[i]),
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
        for s, name in enumerate(case.solutes):
            row[f"stages_{name}"] = float(d.stages[i, s])
            row[f"factor_{name}"] = float(d.factor[i, s])
            row[f"outlet_{name}"] = float(d.outlet[i, s])
        rows.append(row)
    return pd.DataFrame(rows)


# --------------------------------------------------------------------------- files


def write_new(path: Path, text: str, *, force: bool = False) -> Path:
    """Write ``text`` to ``path`` whole (temporary file, then rename); never over a file unless ``force``."""
    path = Path(path)
    if path.exists() and not force:
        raise FileExistsError(f"{path} exists; pass --force to replace it")
    path.parent.mkdir(parents=True, exist_ok=True)
    fd, tmp = tempfile.mkstemp(dir=path.parent, prefix=f".{path.name}.", suffix=".tmp")
    try:
        with os.fdopen(fd, "w", encoding="utf-8", newline="") as handle:
            handle.write(text)
        os.replace(tmp, path)
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise
    return path


def to_json(record: dict) -> str:
    def clean(value):
        if isinstance(value, float) and not math.isfinite(value):
            return None
        if isinstance(value, dict):
            return {k: clean(v) for k, v in value.items()}
        if isinstance(value, list):
            return [clean(v) for v in value]
        if isinstance(value, (np.floating, np.integer)):
            return clean(value.item())
        return value

    return json.dumps(clean(record), indent=2)


# --------------------------------------------------------------------------- terminal


def _table(title: str, *columns: str, right: tuple[int, ...] = ()) -> Table:
    table = Table(title=title, title_justify="left", show_edge=False, header_style="bold", pad_edge=False)
    for k, col in enumerate(columns):
        table.add_column(col, justify="right" if k in right else "left", no_wrap=k == 1)
    return table


def console() -> Console:
    """A console at least 132 columns wide, so that tables stay whole when piped to a file."""
    probe = Console()
    return Console(width=max(probe.width, 132)) if not probe.is_terminal else probe


def print_design(console: Console, case: Case, d: Designs, warnings: list[str], title: str) -> None:
    """The design sheet of one design point."""
    i = 0
    a = int(d.agent[i])
    rw, fw = _ratio_word(case), _factor_word(case)
    status = "meets the spec" if d.meets_spec[i] else "DOES NOT MEET THE SPEC"
    if not d.within_limits[i]:
        status += "; outside a scenario limit"
    console.print(f"[bold]{title}[/bold]")
    console.print(f"{case.agents[a]}: {int(d.trays[i])} real trays, {rw} {d.ratio[i]:.3f}, "
                  f"rate {d.rate[i] * KMOL_H:,.1f} kmol/h (minimum {d.rate_min[i] * KMOL_H:,.1f}); {status}")

    sep = _table("Separation", "solute", "K", fw, "theoretical stages", "inlet", "outlet", "spec",
                 "removed", right=(1, 2, 3, 4, 5, 6, 7))
    for s, name in enumerate(case.solutes):
        inlet, out, target = case.feed_in[s], d.outlet[i, s], case.target[s]
        mark = "" if out <= target * (1 + 1e-9) else "  (misses)"
        sep.add_row(name, f"{case.k_value[a, s]:.4g}", f"{d.factor[i, s]:.3f}", f"{d.stages[i, s]:.2f}",
                    mole_fraction_text(inlet), mole_fraction_text(out) + mark, mole_fraction_text(target), f"{100 * (1 - out / inlet):.3f} %")
    console.print(sep)

    col = _table("Column (estimating figures, not a mechanical design)", "item", "value", right=(1,))
    rows = [
        ("tray type, spacing", f"{case.tray}, {case.tray_spacing:.3f} m"),
        ("flow parameter", f"{d.flow_parameter[i]:.3g}"),
        ("diameter required at design flood", f"{d.diameter_required[i]:.3f} m"),
        ("diameter (standard size)", f"{d.diameter[i]:.3f} m"),
        ("fraction of flood", f"{d.fraction_of_flood[i]:.3f}"),
        ("height, tangent to tangent", f"{d.height[i]:.2f} m"),
        ("pressure drop per tray / total", f"{d.pressure_drop_per_tray[i]:.0f} Pa / {d.pressure_drop[i] / 1000:.2f} kPa"),
        ("design pressure / temperature", f"{d.design_pressure[i] / 1e5:.2f} barg / {d.design_temperature[i] - 273.15:.0f} degC"),
        ("shell / head thickness", f"{d.wall_thickness[i] * 1000:.1f} mm / {d.head_thickness[i] * 1000:.1f} mm ({case.material})"),
        ("shell / trays weight", f"{d.shell_weight[i] / 1000:.2f} t / {d.tray_weight[i] / 1000:.2f} t"),
        ("pump / blower shaft power", f"{d.pump_shaft_power[i] / 1000:.2f} kW / {d.blower_shaft_power[i] / 1000:.2f} kW"),
    ]
    for r in rows:
        col.add_row(*r)
    console.print(col)

    index_note = f"cost index {case.index_to:g}" + (f" ({case.index_year})" if case.index_year else "")
    cap = _table(f"Capital, USD at {index_note}", "item", "purchased", "bare module", right=(1, 2))
    for name, p, b in (("tower shell", d.purchased_vessel, d.bare_module_vessel),
                       ("trays", d.purchased_trays, d.bare_module_trays),
                       ("pump", d.purchased_pump, d.bare_module_pump),
                       ("blower", d.purchased_blower, d.bare_module_blower)):
        cap.add_row(name, _money(p[i]), _money(b[i]))
    cap.add_row("total module (with contingency and fee)", "", _money(d.total_module[i]))
    cap.add_row("installed (grassroots, with auxiliary facilities)", "", _money(d.installed[i]))
    console.print(cap)

    op = _table("Annual cost, USD/yr", "item", "USD/yr", right=(1,))
    for name, v in (("electricity", d.cost_electricity), ("agent purchase or make-up", d.cost_agent),
                    ("disposal or treatment", d.cost_disposal), ("regeneration steam", d.cost_steam),
                    ("cooling water", d.cost_cooling), ("operating total", d.operating),
                    ("capital charge (capital recovery x installed)", d.capital_charge),
                    ("credit for recovered solute", -d.credit)):
        op.add_row(name, _money(v[i]))
    op.add_row("[bold]total annualized cost[/bold]", f"[bold]{_money(d.annualized[i])}[/bold]")
    console.print(op)
    print_warnings(console, warnings)


def print_warnings(console: Console, warnings: list[str]) -> None:
    if warnings:
        console.print("[bold]Warnings[/bold]")
        for w in warnings:
            console.print(f"  - {w}", highlight=False)
    console.print(f"[dim]{CAUTION}[/dim]")


def print_ranking(console: Console, result) -> None:
    """Ranked alternatives, per-agent best, near-optimal band, solver figures."""
    case, d = result.case, result.designs
    rw, fw = _ratio_word(case), _factor_word(case)
    best = float(d.annualized[0])
    key = case.solutes[int(np.argmax(np.where(np.isfinite(case.target), 1.0, 0.0)))]
    console.print(f"[bold]{case.name}[/bold]: the {len(d)} best of {result.space_size:,} alternatives "
                  f"({result.method}); N = theoretical stages and {fw} = {'absorption' if fw == 'A' else 'stripping'} "
                  f"factor for {key}; D diameter, H height")

    def table_of(title, designs, ranks=True):
        t = _table(title, "#" if ranks else "", "candidate", "trays", "N", rw, fw, "D m", "H m",
                   "capital kUSD", "net oper. kUSD/yr", "total kUSD/yr", "+ %",
                   right=(2, 3, 4, 5, 6, 7, 8, 9, 10, 11))
        s = case.solutes.index(key)
        for i in range(len(designs)):
            above = (designs.annualized[i] - best) / abs(best) if best else 0.0
            t.add_row(str(i + 1) if ranks else "", case.agents[int(designs.agent[i])], str(int(designs.trays[i])),
                      f"{designs.stages[i, s]:.2f}", f"{designs.ratio[i]:.3f}", f"{designs.factor[i, s]:.3f}",
                      f"{designs.diameter[i]:.2f}", f"{designs.height[i]:.1f}", f"{designs.installed[i] / 1e3:,.0f}",
                      f"{(designs.operating[i] - designs.credit[i]) / 1e3:,.1f}", f"{designs.annualized[i] / 1e3:,.1f}",
                      f"{100 * above:.2f}")
        return t

    console.print(table_of("Ranked designs (operating is net of any credit)", d))
    console.print(table_of("Best design of each candidate", result.per_agent, ranks=False))
    for name, why in result.unmet.items():
        console.print(f"  {name}: {why}", highlight=False)
    b = result.band
    console.print(f"Within {100 * b.margin:g} % of the best ({b.count} designs): trays {b.trays[0]} to {b.trays[1]}, "
                  f"{rw} {b.ratio[0]:.3f} to {b.ratio[1]:.3f}; candidates: {', '.join(b.agents)}", highlight=False)
    s = result.solver
    if s["method"] == "model":
        console.print(f"[dim]Model: {s['binaries']:,} binaries after dominance reduction, built in "
                      f"{s['build_seconds'] * 1000:.0f} ms, {s['solves']} solves in {s['solve_seconds'] * 1000:.0f} ms "
                      f"({s['solver']}); model objective minus exact re-evaluation: {s['difference']:.2e} USD/yr[/dim]")
    console.print(f"[dim]Space evaluated in {s['evaluate_seconds'] * 1000:.0f} ms; total {s['total_seconds']:.2f} s[/dim]")
    print_warnings(console, result.warnings)


def print_curve(console: Console, curve) -> None:
    rw = _ratio_word(curve.case)
    t = _table(f"{curve.agent}: annualized cost against trays (best rate at each)", "trays", rw,
               "diam. m", "installed USD", "annualized USD/yr", right=(0, 1, 2, 3, 4))
    for i in range(len(curve.by_trays)):
        d = curve.by_trays
        t.add_row(str(int(d.trays[i])), f"{d.ratio[i]:.3f}", f"{d.diameter[i]:.3f}", _money(d.installed[i]),
                  _money(d.annualized[i]))
    console.print(t)
    t = _table(f"{curve.agent}: annualized cost against {rw} (best trays at each level)", rw, "trays",
               "diam. m", "installed USD", "annualized USD/yr", right=(0, 1, 2, 3, 4))
    for i in range(len(curve.by_ratio)):
        d = curve.by_ratio
        t.add_row(f"{d.ratio[i]:.3f}", str(int(d.trays[i])), f"{d.diameter[i]:.3f}", _money(d.installed[i]),
                  _money(d.annualized[i]))
    console.print(t)
    console.print(f"[dim]{CAUTION}[/dim]")
