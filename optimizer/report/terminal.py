"""Terminal output: the design sheet, the ranking, the cost curve and the cascade, as rich tables.

Only layout and display units live here; every figure comes from the
records or the designs.
"""

from __future__ import annotations

import numpy as np
from rich.console import Console
from rich.markup import escape
from rich.table import Table

from towercost.design.limits import SPEC_TOLERANCE
from towercost.report.records import CAUTION, KMOL_H
from towercost.scenario.units import mole_fraction_text


def _ratio_word(case) -> str:
    return case.service.ratio_word


def _factor_word(case) -> str:
    return case.service.factor_word


def _money(value: float) -> str:
    return f"{value:,.0f}" if np.isfinite(value) else "-"


def _text(value) -> str:
    """Text from the scenario (names, warnings) as it is, never read as terminal markup."""
    return escape(str(value))


def concentration_text(case, s: int, x: float) -> str:
    """Solute ``s`` of the treated stream in its phase's unit (gas ppmv; liquid as the scenario wrote it)."""
    shown = getattr(case, "concentrations", None)
    return shown.treated_text(s, float(x)) if shown is not None else mole_fraction_text(float(x))


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
    console.print(f"[bold]{_text(title)}[/bold]")
    console.print(f"{_text(case.agents[a])}: {int(d.trays[i])} real trays, {rw} {d.ratio[i]:.3f}, "
                  f"rate {d.rate[i] * KMOL_H:,.1f} kmol/h (minimum {d.rate_min[i] * KMOL_H:,.1f}); {status}")

    sep = _table("Separation", "solute", "K", fw, "theoretical stages", "inlet", "outlet", "spec",
                 "removed", right=(1, 2, 3, 4, 5, 6, 7))
    for s, name in enumerate(case.solutes):
        inlet, out, target = case.feed_in[s], d.outlet[i, s], case.target[s]
        mark = "" if out <= target * (1 + SPEC_TOLERANCE) else "  (misses)"
        removed = f"{100 * (1 - out / inlet):.3f} %" if inlet > 0 else "-"
        sep.add_row(_text(name), f"{case.k_value[a, s]:.4g}", f"{d.factor[i, s]:.3f}", f"{d.stages[i, s]:.2f}",
                    concentration_text(case, s, inlet), concentration_text(case, s, out) + mark,
                    concentration_text(case, s, target), removed)
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

    eco = case.economics
    index_note = f"cost index {eco.index_to:g}" + (f" ({eco.index_year})" if eco.index_year else "")
    cap = _table(f"Capital, USD at {index_note}", "item", "purchased", "bare module", right=(1, 2))
    for j, spec in enumerate(d.equipment.specs):
        cap.add_row(f"{spec.tag} {spec.kind}", _money(d.purchased[i, j]), _money(d.bare_module_items[i, j]))
    cap.add_row("total module (with contingency and fee)", "", _money(d.total_module[i]))
    cap.add_row("installed (grassroots, with auxiliary facilities)", "", _money(d.installed[i]))
    console.print(cap)

    op = _table("Annual cost, USD/yr", "item", "USD/yr", right=(1,))
    for j, spec in enumerate(d.uses.specs):
        if not spec.credit:
            op.add_row(spec.label, _money(d.use_cost[i, j]))
    for name, v in (("operating total", d.operating),
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
            console.print(f"  - {_text(w)}", highlight=False)
    console.print(f"[dim]{CAUTION}[/dim]")


def print_ranking(console: Console, result) -> None:
    """Ranked alternatives, per-agent best, near-optimal band, solver figures."""
    case, d = result.case, result.designs
    rw, fw = _ratio_word(case), _factor_word(case)
    best = float(d.annualized[0])
    key = case.solutes[int(np.argmax(np.where(np.isfinite(case.target), 1.0, 0.0)))]
    console.print(f"[bold]{_text(case.name)}[/bold]: the {len(d)} best of {result.space_size:,} alternatives "
                  f"({result.method}); N = theoretical stages and {fw} = {'absorption' if fw == 'A' else 'stripping'} "
                  f"factor for {_text(key)}; D diameter, H height")

    def table_of(title, designs, ranks=True):
        t = _table(title, "#" if ranks else "", "candidate", "trays", "N", rw, fw, "D m", "H m",
                   "capital kUSD", "net oper. kUSD/yr", "total kUSD/yr", "+ %",
                   right=(2, 3, 4, 5, 6, 7, 8, 9, 10, 11))
        s = case.solutes.index(key)
        for i in range(len(designs)):
            above = (designs.annualized[i] - best) / abs(best) if best else 0.0
            t.add_row(str(i + 1) if ranks else "", _text(case.agents[int(designs.agent[i])]), str(int(designs.trays[i])),
                      f"{designs.stages[i, s]:.2f}", f"{designs.ratio[i]:.3f}", f"{designs.factor[i, s]:.3f}",
                      f"{designs.diameter[i]:.2f}", f"{designs.height[i]:.1f}", f"{designs.installed[i] / 1e3:,.0f}",
                      f"{(designs.operating[i] - designs.credit[i]) / 1e3:,.1f}", f"{designs.annualized[i] / 1e3:,.1f}",
                      f"{100 * above:.2f}")
        return t

    console.print(table_of("Ranked designs (operating is net of any credit)", d))
    console.print(table_of("Best design of each candidate", result.per_agent, ranks=False))
    for name, why in result.unmet.items():
        console.print(f"  {_text(name)}: {_text(why)}", highlight=False)
    b = result.band
    console.print(f"Within {100 * b.margin:g} % of the best ({b.count} designs): trays {b.trays[0]} to {b.trays[1]}, "
                  f"{rw} {b.ratio[0]:.3f} to {b.ratio[1]:.3f}; candidates: {_text(', '.join(b.agents))}",
                  highlight=False)
    s = result.solver
    if s["method"] == "model":
        console.print(f"[dim]Model: {s['binaries']:,} binaries after dominance reduction, built in "
                      f"{s['build_seconds'] * 1000:.0f} ms, {s['solves']} solves in {s['solve_seconds'] * 1000:.0f} ms "
                      f"({s['solver']}); model objective minus exact re-evaluation: {s['difference']:.2e} USD/yr[/dim]")
    console.print(f"[dim]Space evaluated in {s['evaluate_seconds'] * 1000:.0f} ms; total {s['total_seconds']:.2f} s[/dim]")
    print_warnings(console, result.warnings)


def print_curve(console: Console, curve) -> None:
    rw = _ratio_word(curve.case)
    t = _table(f"{_text(curve.agent)}: annualized cost against trays (best rate at each)", "trays", rw,
               "diam. m", "installed USD", "annualized USD/yr", right=(0, 1, 2, 3, 4))
    for i in range(len(curve.by_trays)):
        d = curve.by_trays
        t.add_row(str(int(d.trays[i])), f"{d.ratio[i]:.3f}", f"{d.diameter[i]:.3f}", _money(d.installed[i]),
                  _money(d.annualized[i]))
    console.print(t)
    t = _table(f"{_text(curve.agent)}: annualized cost against {rw} (best trays at each level)", rw, "trays",
               "diam. m", "installed USD", "annualized USD/yr", right=(0, 1, 2, 3, 4))
    for i in range(len(curve.by_ratio)):
        d = curve.by_ratio
        t.add_row(f"{d.ratio[i]:.3f}", str(int(d.trays[i])), f"{d.diameter[i]:.3f}", _money(d.installed[i]),
                  _money(d.annualized[i]))
    console.print(t)
    console.print(f"[dim]{CAUTION}[/dim]")


def print_cascade(console: Console, record: dict, absorb: bool) -> None:
    """One countercurrent cascade (the ``rate`` command's record) as a short summary."""
    word = "absorption factor A" if absorb else "stripping factor S"
    console.print(f"[bold]Countercurrent cascade, {record['mode']}[/bold] (Kremser; dilute, linear equilibrium, "
                  "constant L and V)")
    n, f = record["stages"], record["factor"]
    lines = [("theoretical stages", f"{n:.4g}"), (word, f"{f:.6g}")]
    if "stages_required" in record:
        lines.append(("stages required", f"{record['stages_required']:.4f} (round up)"))
    if "factor_required" in record:
        lines.append(("factor required", f"{record['factor_required']:.6g}"))

    def shown(value):
        return "-" if value is None else f"{value:.6g}"

    lines += [("fraction remaining", f"{record['fraction_remaining']:.6g}"),
              ("fraction removed", f"{record['fraction_removed']:.6g}"),
              ("gas in / out", f"{record['gas_in']:.6g} / " + shown(record["gas_out"])),
              ("liquid in / out", f"{record['liquid_in']:.6g} / " + shown(record["liquid_out"]))]
    width = max(len(k) for k, _ in lines)
    for k, v in lines:
        console.print(f"  {k:<{width}}  {v}", highlight=False)
    if record["gas_out"] is None or record["liquid_out"] is None:
        console.print("  [dim]give --k-value for the other stream's outlet[/dim]")
