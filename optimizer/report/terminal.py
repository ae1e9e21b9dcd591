"""Terminal output: the design sheet, the ranking, the cost curve and the cascade, as rich tables.

Only layout and display units live here; every figure comes from the
records or the designs.
"""

from __future__ import annotations

import numpy as np
from rich.console import Console
from rich.table import Table

from towercost.design.internals import TRAY_TYPES
from towercost.design.limits import SPEC_TOLERANCE
from towercost.models import hydraulics
from towercost.report.records import CAUTION, KMOL_H, design_basis
from towercost.scenario.units import mole_fraction_text


def _ratio_word(case) -> str:
    return case.service.ratio_word


def _factor_word(case) -> str:
    return case.service.factor_word


def _money(value: float) -> str:
    return f"{value:,.0f}"


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

    control = int(d.controlling[i])
    sep = _table("Separation", "solute", "K", fw, "theoretical stages", "tray efficiency", "inlet", "outlet", "spec",
                 "removed", right=(1, 2, 3, 4, 5, 6, 7, 8))
    for s, name in enumerate(case.solutes):
        inlet, out, target = case.feed_in[s], d.outlet[i, s], case.target[s]
        mark = "" if out <= target * (1 + SPEC_TOLERANCE) else "  (misses)"
        sep.add_row(name + (" (controls)" if s == control else ""), f"{case.k_value[a, s]:.4g}", f"{d.factor[i, s]:.3f}",
                    f"{d.stages[i, s]:.2f}", f"{d.efficiency[i, s]:.3f}", mole_fraction_text(inlet),
                    mole_fraction_text(out) + mark, mole_fraction_text(target), f"{100 * (1 - out / inlet):.3f} %")
    console.print(sep)
    console.print(f"tray efficiency = theoretical stages / {int(d.trays[i])} real trays; {case.solutes[control]} "
                  f"controls (its outlet is {100 * d.outlet[i, control] / case.target[control]:.1f} % of its spec)",
                  highlight=False)

    col = _table("Column (estimating figures, not a mechanical design)", "item", "value", right=(1,))
    tray = TRAY_TYPES[int(d.tray_type[i])]
    tray_note = "" if tray == case.tray else f" (in place of {case.tray} trays, outside their operating range here)"
    flooding, least = d.diameter_flooding[i], d.diameter_least[i]
    governs = "the downcomers govern" if least > flooding else "flooding governs"
    inside = "inside" if d.range_use[i] <= 1.0 else "OUTSIDE"
    rows = [
        ("tray type, spacing", f"{tray}, {case.tray_spacing:.3f} m{tray_note}"),
        ("flow parameter", f"{d.flow_parameter[i]:.3g}"),
        ("diameter required at design flood", f"{d.diameter_required[i]:.3f} m"),
        ("least shell: flooding / downcomers", f"{flooding:.3f} m / {least:.3f} m ({governs})"),
        ("diameter (standard size)", f"{d.diameter[i]:.3f} m"),
        ("fraction of flood", f"{d.fraction_of_flood[i]:.3f}"),
        (f"weep margin at {100 * case.turndown:g} % of design loads", f"{d.weep_ratio[i]:.2f} (at least 1)"),
        ("fractional entrainment", f"{d.entrainment[i]:.3f} (at most {hydraulics.ENTRAINMENT_LIMIT:g})"),
        ("downcomer back-up / residence time", f"{d.backup_fraction[i]:.2f} of spacing + weir (at most "
                                               f"{hydraulics.BACKUP_LIMIT:g}) / {d.residence_time[i]:.1f} s (at least "
                                               f"{hydraulics.RESIDENCE_TIME_MIN:g} s)"),
        ("operating range", f"{inside}; {hydraulics.LIMIT_NAMES[int(d.range_governs[i])]} is nearest its limit "
                            f"({100 * d.range_use[i]:.0f} %)"),
        ("height, tangent to tangent", f"{d.height[i]:.2f} m"),
        ("pressure drop per tray / total", f"{d.pressure_drop_per_tray[i]:.0f} Pa / {d.pressure_drop[i] / 1000:.2f} kPa"),
        ("design pressure", f"{d.design_pressure[i] / 1e5:.2f} barg, {design_basis(case)[0]}"),
        ("design temperature", f"{d.design_temperature[i] - 273.15:.0f} degC, {design_basis(case)[1]}"),
        ("shell / head thickness", f"{d.wall_thickness[i] * 1000:.1f} mm / {d.head_thickness[i] * 1000:.1f} mm ({case.material})"),
        ("shell / heads / trays weight", f"{d.shell_weight[i] / 1000:.2f} t / {d.head_weight[i] / 1000:.2f} t / "
                                         f"{d.tray_weight[i] / 1000:.2f} t"),
        ("pump / blower shaft power", f"{d.pump_shaft_power[i] / 1000:.2f} kW / {d.blower_shaft_power[i] / 1000:.2f} kW"),
    ]
    for r in rows:
        col.add_row(*r)
    console.print(col)

    eco = case.economics
    index_note = f"cost index {eco.index_to:g}" + (f" ({eco.index_year})" if eco.index_year else "")
    cap = _table(f"Capital, USD at {index_note}", "item", "purchased", "bare module", right=(1, 2))
    for j in range(len(d.equipment.specs)):
        spec = d.equipment.spec_at(i, j)
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
            console.print(f"  - {w}", highlight=False)
    console.print(f"[dim]{CAUTION}[/dim]")


def print_ranking(console: Console, result) -> None:
    """Ranked alternatives, per-agent best, near-optimal band, solver figures."""
    case, d = result.case, result.designs
    rw, fw = _ratio_word(case), _factor_word(case)
    best = float(d.annualized[0])
    key = case.solutes[int(d.controlling[0])]   # the solute the best design's spec holds
    console.print(f"[bold]{case.name}[/bold]: the {len(d)} best of {result.space_size:,} alternatives "
                  f"({result.method}); N = theoretical stages and {fw} = {'absorption' if fw == 'A' else 'stripping'} "
                  f"factor for {key}; D diameter, H height")

    preferred = TRAY_TYPES.index(case.tray)
    show_tray = bool(np.any(d.tray_type != preferred) or np.any(result.per_agent.tray_type != preferred))

    def table_of(title, designs, ranks=True):
        head = ["#" if ranks else "", "candidate", "trays"] + (["tray"] if show_tray else [])
        t = _table(title, *head, "N", rw, fw, "D m", "H m", "capital kUSD", "net oper. kUSD/yr", "total kUSD/yr",
                   "+ %", right=(2,) + tuple(range(len(head), len(head) + 9)))
        s = case.solutes.index(key)
        for i in range(len(designs)):
            above = (designs.annualized[i] - best) / abs(best) if best else 0.0
            tray = [TRAY_TYPES[int(designs.tray_type[i])]] if show_tray else []
            t.add_row(str(i + 1) if ranks else "", case.agents[int(designs.agent[i])], str(int(designs.trays[i])),
                      *tray, f"{designs.stages[i, s]:.2f}", f"{designs.ratio[i]:.3f}", f"{designs.factor[i, s]:.3f}",
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
    flagged = [f.message for f in getattr(result, "bounds", [])]
    if flagged:
        console.print("[bold]On a bound of the search[/bold]")
        for message in flagged:
            console.print(f"  - {message}", highlight=False)
    print_warnings(console, [w for w in result.warnings if w not in flagged])


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
    print_warnings(console, getattr(curve, "warnings", []))


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
