"""Terminal output: the design sheet, the ranking, the cost curve and the cascade, as rich tables.

Only layout and display units live here; every figure comes from the
records or the designs.
"""

from __future__ import annotations

import numpy as np
from rich.console import Console
from rich.markup import escape
from rich.table import Table

from towercost.design.internals import TRAY_TYPES
from towercost.design.limits import SPEC_TOLERANCE
from towercost.models import hydraulics
from towercost.report import layout, ratios
from towercost.report.records import (CAUTION, KMOL_H, design_basis, internals_name, is_packed, packing_choice,
                                      used_rows)
from towercost.scenario.units import mole_fraction_text


def _ratio_word(case) -> str:
    return case.service.ratio_word


def _factor_word(case) -> str:
    return case.service.factor_word


def _money(value: float) -> str:
    """Whole dollars with thousands separators; a value that rounds to zero prints as 0, never -0."""
    if not np.isfinite(value):
        return "-"
    return f"{round(float(value)) or 0:,.0f}"


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


def console(width: int | None = None) -> Console:
    """The console tables print to: the terminal's width, or ``COLUMNS`` (else 120) when piped to a file."""
    import os

    if width is not None:
        return Console(width=width)
    probe = Console()
    if probe.is_terminal:
        return probe
    columns = os.environ.get("COLUMNS", "")
    return Console(width=int(columns) if columns.isdigit() and int(columns) > 0 else WIDE)


#: Tables use every column from this width on; below it they leave the least needed out (and fit 80).
WIDE = 120


def _lines(console: Console, columns, rows) -> list[str]:
    """Print a fitted table; return the labels of the columns it shows."""
    width = max(console.width, 40)
    for text, strong in layout.render(columns, rows, width):
        console.print(text, style="bold" if strong else None, markup=False, highlight=False, soft_wrap=True)
    return layout.shown(columns, rows, width)


def _title(console: Console, text: str) -> None:
    console.print()
    console.print(text, style="bold", markup=False, highlight=False)


def _legend(console: Console, items: list[tuple[str, str]]) -> None:
    """The labels explained once, under a table: one line per label, wrapped to the console."""
    import textwrap

    width = max(console.width, 40)
    for label, meaning in items:
        for k, text in enumerate(textwrap.wrap(f"{label}: {meaning}", width - 2, subsequent_indent="    ")):
            console.print("  " + text, markup=False, highlight=False, style="dim", soft_wrap=True)


def print_design(console: Console, case: Case, d: Designs, warnings: list[str], title: str,
                 note: str | None = None) -> None:
    """The design sheet of one design point; ``note`` explains a design that misses the spec."""
    from towercost.report.ids import ids_of

    i = 0
    a = int(d.agent[i])
    rw, fw = _ratio_word(case), _factor_word(case)
    status = "meets the spec" if d.meets_spec[i] else "DOES NOT MEET THE SPEC"
    if not d.within_limits[i]:
        status += "; outside a scenario limit"
    ratio = ratios.ratio_texts(case, d)[0]
    console.print(title, style="bold", markup=False, highlight=False)
    packed = is_packed(d, i)
    internals = (f"{internals_name(case, d, i)}, {d.packed_height[i]:.2f} m packed in {int(d.beds[i])} "
                 f"bed{'s' if int(d.beds[i]) > 1 else ''}" if packed else f"{int(d.trays[i])} real trays")
    console.print(f"{case.agents[a]}: {internals}, {rw} {ratio}, "
                  f"rate {d.rate[i] * KMOL_H:,.3f} kmol/h (minimum {d.rate_min[i] * KMOL_H:,.3f}); {status}",
                  markup=False, highlight=False)
    console.print(f"design ID {ids_of(case, d)[0]}", markup=False, highlight=False)
    console.print(f"conditions: feed {case.feed_flow * KMOL_H:,.1f} kmol/h at {case.temperature - 273.15:.1f} degC "
                  f"and {case.pressure / 1e5:.4g} bar", markup=False, highlight=False)
    if note:
        console.print(note, markup=False, highlight=False)

    control = int(d.controlling[i])
    _title(console, "Separation")
    unit = "OL" if case.mode == "strip" else "OG"
    middle = ([layout.Column(f"N_{unit}", keep=4), layout.Column(f"H_{unit}", "m", keep=4),
               layout.Column("HETP", "m", keep=4)] if packed else [layout.Column("tray eff.", keep=4)])
    columns = [layout.Column("solute", left=True, wrap=True), layout.Column("K"), layout.Column(fw),
               layout.Column("stages", "theor."), *middle, layout.Column("inlet", keep=6),
               layout.Column("outlet"), layout.Column("spec"), layout.Column("removed", "%", keep=5)]
    rows = []
    for s, name in enumerate(case.solutes):
        inlet, out, target = case.feed_in[s], d.outlet[i, s], case.target[s]
        mark = "" if out <= target * (1 + SPEC_TOLERANCE) else " (misses)"
        own = ([f"{d.transfer_units[i, s]:.2f}", f"{d.htu[i, s]:.3f}", f"{d.hetp[i, s]:.3f}"] if packed
               else [f"{d.efficiency[i, s]:.3f}"])
        rows.append(layout.Row([name + (" (controls)" if s == control else ""), f"{case.k_value[a, s]:.4g}",
                                f"{d.factor[i, s]:.3f}", f"{d.stages[i, s]:.2f}", *own,
                                concentration_text(case, s, inlet), concentration_text(case, s, out) + mark,
                                concentration_text(case, s, target),
                                f"{100 * (1 - out / inlet):.3f}" if inlet > 0 else "-"]))
    _lines(console, columns, rows)
    share = f"{case.solutes[control]} controls (its outlet is {100 * d.outlet[i, control] / case.target[control]:.1f} % of its spec)"
    if packed:
        console.print(f"packed height = max over solutes of the stages its spec needs x HETP = N_{unit} x H_{unit}; "
                      f"theoretical stages = packed height / HETP; {share}", markup=False, highlight=False)
    else:
        console.print(f"tray efficiency = theoretical stages / {int(d.trays[i])} real trays; {share}",
                      markup=False, highlight=False)

    _title(console, "Column (estimating figures, not a mechanical design)")
    if packed:
        _packed_pairs(console, case, d, i)
    else:
        _tray_pairs(console, case, d, i)
    if "loop_looped" in d.figures and bool(d.loop_looped[i]):
        _loop_pairs(console, case, d, i)
    _costs(console, case, d, i, warnings)


def _agent_text(case, a: int, s: int, x: float) -> str:
    """Solute ``s`` at mole fraction ``x`` in candidate ``a``'s phase, in the unit the scenario shows it in."""
    shown = getattr(case, "concentrations", None)
    if shown is None:
        return mole_fraction_text(x)
    value, unit = shown.agent(a, s, x)
    return f"{value:.4g} {unit}"


def _loop_pairs(console: Console, case, d, i: int) -> None:
    """The regenerated loop of design ``i``: regenerator, exchangers, and every solute around the loop."""
    data = case.loop.regenerator(int(d.agent[i]))
    vapour = "live steam" if data.stripping == "steam" else "reboiled solvent vapour"
    basis = ("dilute Kremser (straight lines)" if float(np.max(d.rich_loading[i])) <= case.max_dilute
             else f"dilute Kremser, rich loading above the dilute threshold {case.max_dilute:g} (see the warnings)")
    _title(console, "Regenerated loop (estimating figures)")
    pairs = [
        ("lean level K x_lean / y_out (key)", f"{d.lean_level[i]:.3g} ({case.solutes[data.key]})"),
        ("circulation", f"{d.liquid_mass_flow[i] * 3600 / 1000:,.2f} t/h ({d.rate[i] * KMOL_H:,.2f} kmol/h)"),
        ("regenerator", (f"{int(d.regenerator_trays[i])} real trays, D {d.regenerator_diameter[i]:.3f} m, "
                         f"{d.regenerator_height[i]:.2f} m tangent to tangent, fraction of flood "
                         f"{d.regenerator_fraction_of_flood[i]:.3f}" if case.loop.shared_trays is None else
                         f"{int(d.regenerator_trays[i])} real trays, shared by the site's units (its column is "
                         "sized and priced in the site's record)")
                        + f", at {data.temperature - 273.15:.4g} degC and {data.pressure / 1e5:.4g} bara"
                        + ("" if d.regenerator_ok[i] else " (OUTSIDE ITS LIMITS)")),
        ("stripping vapour", f"{vapour}, {d.regenerator_vapour[i] * KMOL_H:,.2f} kmol/h"),
        ("steam: live / heater and reboiler", f"{d.live_steam[i] * 3600:,.0f} kg/h / "
                                              f"{(d.loop_steam[i] - d.live_steam[i]) * 3600:,.0f} kg/h"),
        ("cross exchanger", f"{d.cross_duty[i] / 1000:,.0f} kW, {d.cross_area[i]:,.1f} m2 (approach "
                            f"{data.approach:g} K)"),
        ("lean cooler", f"{d.cooler_duty[i] / 1000:,.0f} kW, {d.cooler_area[i]:,.1f} m2, cooling water "
                        f"{d.loop_cooling[i] * 3600:,.1f} m3/h"),
        ("rich heater", f"{d.heater_duty[i] / 1000:,.0f} kW, {d.heater_area[i]:,.1f} m2"),
    ]
    if data.stripping == "reboiled":
        pairs.append(("reboiler", f"{d.reboiler_duty[i] / 1000:,.0f} kW, {d.reboiler_area[i]:,.1f} m2"))
    pairs += [("solvent lost as vapour", f"{d.vapour_loss[i] * 3600:,.2f} kg/h"), ("basis", basis)]
    from towercost.design.loop import concentrated_check

    for row in concentrated_check(case, d, i):
        s = case.solutes.index(row["solute"])
        pairs.append((f"{row['solute']} on the mole-ratio basis",
                      f"treated gas {concentration_text(case, s, row['averaged_factor_outlet'])} with the averaged "
                      f"factor (Treybal Eq. 5.54) at {row['stages']:.2f} stages, "
                      f"{concentration_text(case, s, row['stagewise_outlet'])} to "
                      f"{concentration_text(case, s, row['stagewise_outlet_one_more'])} stage by stage on the curved "
                      f"line at {row['whole_stages']:.0f} to {row['whole_stages'] + 1:.0f} stages, against {concentration_text(case, s, row['dilute_outlet'])} "
                      "dilute (the basis of the search)"))
    _lines(console, [layout.Column("item", left=True), layout.Column("value", left=True, wrap=True)],
           [layout.Row(list(p)) for p in pairs])
    rows = []
    for s, solute in enumerate(case.solutes):
        rows.append(layout.Row([solute, _agent_text(case, int(d.agent[i]), s, float(d.lean_loading[i, s])),
                                _agent_text(case, int(d.agent[i]), s, float(d.rich_loading[i, s])),
                                f"{d.stripping_factor[i, s]:.3g}",
                                concentration_text(case, s, float(d.outlet[i, s])),
                                f"{d.build_up[i, s]:.3g}", f"{d.loop_balance[i, s]:.1e}"]))
    _lines(console, [layout.Column("solute", left=True), layout.Column("lean"), layout.Column("rich"),
                     layout.Column("S regen."), layout.Column("gas outlet"), layout.Column("build-up"),
                     layout.Column("loop balance")], rows)
    console.print("  lean, rich: solute in the solvent entering and leaving the absorber (the loop's steady "
                  "state); S: the regenerator's stripping factor; build-up: the lean loading over the loading in "
                  "equilibrium with the feed gas; loop balance: (in - out - regenerator overhead) / in",
                  markup=False, highlight=False, style="dim", soft_wrap=True)


def _tray_pairs(console: Console, case, d, i: int) -> None:
    tray = TRAY_TYPES[int(d.tray_type[i])]
    tray_note = "" if tray == case.tray else f" (in place of {case.tray} trays, outside their operating range here)"
    flooding, least = d.diameter_flooding[i], d.diameter_least[i]
    governs = "the downcomers govern" if least > flooding else "flooding governs"
    inside = "inside" if d.range_use[i] <= 1.0 else "OUTSIDE"
    pairs = [
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
    _lines(console, [layout.Column("item", left=True), layout.Column("value", left=True, wrap=True)],
           [layout.Row(list(p)) for p in pairs])


def _packed_pairs(console: Console, case, d, i: int) -> None:
    choice = packing_choice(case, d, i)
    data = choice.data
    redistributors = int(d.beds[i]) - 1
    given = ("given HETP" if choice.hetp is not None else "given H_OG" if choice.h_og is not None
             else "given H_OL" if choice.h_ol is not None else "Onda film heights")
    flood_at = d.diameter_flooding[i]
    pressure_at = d.diameter_pressure_drop[i]
    constants = "read from the source" if choice.constants_checked else "ESTIMATES (see the warnings)"
    pairs = [
        ("packing", f"{choice.name}: {data['kind']}, {data['material']}, {1000 * data['nominal_size']:g} mm; "
                    f"a {data['specific_area']:g} m2/m3, voidage {data['voidage']:g}; Stichlmair constants "
                    f"{constants}"),
        ("packed height / beds", f"{d.packed_height[i]:.2f} m in {int(d.beds[i])} bed(s) of {d.bed_height[i]:.2f} m "
                                 f"(at most {choice.max_bed_height:g} m), {redistributors} redistributor(s); "
                                 f"heights from {given}"),
        ("least shell: design flood / pressure limit", f"{flood_at:.3f} m / {pressure_at:.3f} m (diameter at "
                                                       f"{choice.pressure_drop_per_m:.4g} Pa/m); least "
                                                       f"{d.diameter_least[i]:.3f} m"),
        ("diameter (standard size)", f"{d.diameter[i]:.3f} m, {d.diameter_ratio[i]:.1f} packing sizes across "
                                     f"(at least {data['min_diameter_ratio']:g})"),
        ("fraction of flood", f"{d.fraction_of_flood[i]:.3f} (design at most {choice.flood_fraction:g})"),
        ("pressure drop per metre / total", f"{d.pressure_drop_per_m[i]:.0f} Pa/m (at most "
                                            f"{choice.pressure_drop_per_m:.4g}) / {d.pressure_drop[i] / 1000:.2f} kPa"),
        ("wetting rate", f"{d.wetting_ratio[i]:.2f} x the minimum (Morris and Jackson; at least 1)"),
        ("height, tangent to tangent", f"{d.height[i]:.2f} m"),
        ("design pressure", f"{d.design_pressure[i] / 1e5:.2f} barg, {design_basis(case)[0]}"),
        ("design temperature", f"{d.design_temperature[i] - 273.15:.0f} degC, {design_basis(case)[1]} (packing "
                               f"at most {data['max_temperature'] - 273.15:.0f} degC)"),
        ("shell / head thickness", f"{d.wall_thickness[i] * 1000:.1f} mm / {d.head_thickness[i] * 1000:.1f} mm ({case.material})"),
        ("shell / heads / packing weight", f"{d.shell_weight[i] / 1000:.2f} t / {d.head_weight[i] / 1000:.2f} t / "
                                           f"{d.packing_weight[i] / 1000:.2f} t"),
        ("pump / blower shaft power", f"{d.pump_shaft_power[i] / 1000:.2f} kW / {d.blower_shaft_power[i] / 1000:.2f} kW"),
    ]
    _lines(console, [layout.Column("item", left=True), layout.Column("value", left=True, wrap=True)],
           [layout.Row(list(p)) for p in pairs])


def _costs(console: Console, case, d, i: int, warnings: list[str]) -> None:
    eco = case.economics
    index_note = f"cost index {eco.index_to:g}" + (f" ({eco.index_year})" if eco.index_year else "")
    _title(console, f"Capital, USD at {index_note}")
    rows = []
    for j in used_rows(d, i):
        spec = d.equipment.spec_at(i, j)
        rows.append(layout.Row([f"{spec.tag} {spec.kind}", _money(d.purchased[i, j]), _money(d.bare_module_items[i, j])]))
    rows.append(layout.Row(["total module (with contingency and fee)", "", _money(d.total_module[i])]))
    rows.append(layout.Row(["installed (grassroots, with auxiliary facilities)", "", _money(d.installed[i])],
                           strong=True))
    _lines(console, [layout.Column("item", left=True, wrap=True), layout.Column("purchased"),
                     layout.Column("bare module")], rows)

    _title(console, "Annual cost, USD/yr")
    rows = [layout.Row([spec.label, _money(d.use_cost[i, j])]) for j, spec in enumerate(d.uses.specs)
            if not spec.credit]
    for name, v in (("operating total", d.operating),
                    ("capital charge (capital recovery x installed)", d.capital_charge),
                    ("credit for recovered solute", -d.credit)):
        rows.append(layout.Row([name, _money(v[i])]))
    rows.append(layout.Row(["total annualized cost", _money(d.annualized[i])], strong=True))
    _lines(console, [layout.Column("item", left=True, wrap=True), layout.Column("USD/yr")], rows)
    console.print()
    print_warnings(console, warnings)


def print_warnings(console: Console, warnings: list[str]) -> None:
    if warnings:
        console.print("Warnings", style="bold", markup=False, highlight=False)
        for w in warnings:
            console.print(f"  - {w}", markup=False, highlight=False)
    console.print(CAUTION, style="dim", markup=False, highlight=False)


def _trays_text(case, designs, i: int) -> str:
    """Real trays, with the tray type where it is not the one the scenario asked for; a packed bed's name,
    packed height and beds where the case offers packings."""
    if is_packed(designs, i):
        beds = int(designs.beds[i])
        return f"{internals_name(case, designs, i)}, {designs.packed_height[i]:.1f} m in {beds} bed{'s' * (beds > 1)}"
    tray = TRAY_TYPES[int(designs.tray_type[i])]
    if case.packings:
        return f"{int(designs.trays[i])} {tray} trays"
    return f"{int(designs.trays[i])}" + ("" if tray == case.tray else f" {tray}")


def _ranking_rows(case, designs, best: float, key: int, ranks: list[int]) -> list[layout.Row]:
    from towercost.report.ids import ids_of

    texts = ratios.ratio_texts(case, designs)
    names = ids_of(case, designs)
    rows = []
    for i in range(len(designs)):
        above = (designs.annualized[i] - best) / abs(best) if best else 0.0
        rows.append(layout.Row([
            str(ranks[i]), case.agents[int(designs.agent[i])], _trays_text(case, designs, i), texts[i],
            f"{designs.stages[i, key]:.2f}", f"{designs.factor[i, key]:.3f}", f"{designs.diameter[i]:.3f}",
            f"{designs.height[i]:.1f}", f"{designs.installed[i] / 1e3:,.0f}",
            f"{designs.capital_charge[i] / 1e3:,.1f}", f"{(designs.operating[i] - designs.credit[i]) / 1e3:,.1f}",
            f"{designs.annualized[i] / 1e3:,.1f}", f"{100 * above:.2f}"], below=[f"design ID {names[i]}"],
            strong=ranks[i] == 1))
    return rows


def _ranking_columns(case, solute: str) -> list[layout.Column]:
    rw, fw = _ratio_word(case), _factor_word(case)
    trays = layout.Column("internals", left=True, wrap=True, keep=10) if case.packings else layout.Column("trays")
    return [layout.Column("#"), layout.Column("candidate", left=True, wrap=True), trays,
            layout.Column(rw), layout.Column("N", keep=3), layout.Column(fw, keep=3),
            layout.Column("diameter", "m", keep=8), layout.Column("height", "m", keep=5),
            layout.Column("installed", "kUSD", keep=7), layout.Column("capital charge", "kUSD/yr", keep=2),
            layout.Column("net operating", "kUSD/yr", keep=6), layout.Column("total", "kUSD/yr"),
            layout.Column("above best", "%")]


def _loop_ranking(console: Console, case, d) -> None:
    """The regenerated loop of each ranked design: regenerator, loadings, circulation, steam, exchanger areas."""
    looped = [i for i in range(len(d)) if bool(d.loop_looped[i])]
    if not looped:
        return
    _title(console, "Regenerated loops of the ranked designs")
    rows = []
    for i in looped:
        lean = ", ".join(f"{_agent_text(case, int(d.agent[i]), s, float(d.lean_loading[i, s]))}"
                         for s in range(len(case.solutes)))
        rows.append(layout.Row([str(i + 1), f"{int(d.regenerator_trays[i])}", f"{d.regenerator_diameter[i]:.3f}",
                                f"{d.regenerator_height[i]:.1f}", f"{d.liquid_mass_flow[i] * 3.6:,.1f}",
                                f"{d.loop_steam[i] * 3.6:,.2f}",
                                f"{d.cross_area[i]:,.0f}/{d.cooler_area[i]:,.0f}/{d.heater_area[i]:,.0f}"
                                + (f"/{d.reboiler_area[i]:,.0f}" if d.reboiler_area[i] > 0 else ""), lean]))
    _lines(console, [layout.Column("#"), layout.Column("regen. trays"), layout.Column("D", "m"),
                     layout.Column("height", "m"), layout.Column("circulation", "t/h"),
                     layout.Column("steam", "t/h"), layout.Column("areas", "m2"),
                     layout.Column("lean solvent (" + ", ".join(case.solutes) + ")", left=True, wrap=True)], rows)
    console.print("  areas: cross exchanger / lean cooler / rich heater (/ reboiler); steam: live plus heater and "
                  "reboiler; the design sheet (evaluate --design ID) has the rich loadings and the loop balance",
                  markup=False, highlight=False, style="dim", soft_wrap=True)


def print_ranking(console: Console, result, *, verbose: bool = False) -> None:
    """Ranked alternatives, per-candidate best, near-optimal band per candidate; solver figures when verbose."""
    from towercost.report.records import controlling, listing_meaning

    case, d = result.case, result.designs
    rw, fw = _ratio_word(case), _factor_word(case)
    best = float(d.annualized[0])
    solute = case.solutes[int(d.controlling[0])]   # the solute the best design's spec holds
    key = case.solutes.index(solute)
    console.print(f"{case.name}: the {len(d)} best of {result.space_size:,} alternatives "
                  f"({listing_meaning(case, result.distinct)})", style="bold", markup=False, highlight=False)
    columns = _ranking_columns(case, solute)
    _title(console, "Ranked designs")
    labels = set(_lines(console, columns, _ranking_rows(case, d, best, key, list(range(1, len(d) + 1)))))
    if case.loop is not None:
        _loop_ranking(console, case, d)

    each = "candidate and internals" if case.packings else "candidate"
    _title(console, f"Best design of each {each} (# is its rank in the full listing)")
    _lines(console, columns, _ranking_rows(case, result.per_agent, best, key, result.per_agent_rank
                                           or list(range(1, len(result.per_agent) + 1))))
    for name, why in result.unmet.items():
        console.print(f"  {name}: {why}", markup=False, highlight=False)

    b = result.band
    _title(console, f"Within {100 * b.margin:g} % of the best: {b.count:,} designs")
    band_columns = [layout.Column("candidate", left=True, wrap=True), layout.Column("designs"),
                    layout.Column("trays"), layout.Column(rw), layout.Column("diameter", "m"),
                    layout.Column("total", "kUSD/yr")]
    _lines(console, band_columns, [layout.Row([
        r.agent + (f" ({r.internals})" if case.packings else ""), f"{r.count:,}", f"{r.trays[0]}-{r.trays[1]}",
        f"{r.ratio[0]:.3f}-{r.ratio[1]:.3f}", f"{r.diameter[0]:.3f}-{r.diameter[1]:.3f}",
        f"{r.cost[0] / 1e3:,.1f}-{r.cost[1] / 1e3:,.1f}"]) for r in b.by_agent])

    console.print()
    eco = case.economics
    index_note = f"cost index {eco.index_to:g}" + (f" ({eco.index_year})" if eco.index_year else "")
    legend = [
        (rw, rw, f"{case.service.agent_word} rate over the least rate with unlimited stages, rounded up to the "
                 "digits that give the same design when typed back"),
        ("N", "N", f"theoretical stages for {solute}, the solute whose spec binds (a packed bed: its height over "
                   "the HETP)"),
        ("trays", "trays", f"real trays ({case.tray} unless the tray type is named: the other type is priced where "
                           f"{case.tray} trays fall outside their operating range)"),
        ("internals", "internals", f"real trays and their type ({case.tray}, or valve where {case.tray} trays fall "
                                   "outside their operating range), or a packed bed: its packing, packed height and "
                                   "beds (the least height meeting every spec at its rate and shell)"),
        (fw, fw, f"{case.service.factor_name} for {solute}"),
        ("installed", "installed", f"grassroots capital with auxiliary facilities, at {index_note}"),
        ("capital charge", "capital charge", f"capital recovery factor {eco.capital_recovery:.4f}/yr x installed"),
        ("net operating", "net operating", "yearly operating cost less any credit for recovered solute"),
        ("total", "total", "total annualized cost: capital recovery factor x installed + operating cost - credit"),
        ("above best", "above best", "how much dearer than the best design"),
        ("design ID", "trays", "'towercost evaluate SCENARIO --design ID' prints that design's sheet"),
    ]
    _legend(console, [(label, meaning) for label, column, meaning in legend if column in labels])
    if verbose:
        s = result.solver
        if s["method"] == "model":
            console.print(f"Model: {s['binaries']:,} binaries after exact reduction, built in "
                          f"{s['build_seconds'] * 1000:.0f} ms, {s['solves']} solves in "
                          f"{s['solve_seconds'] * 1000:.0f} ms ({s['solver']}); model objective minus exact "
                          f"re-evaluation: {s['difference']:.2e} USD/yr", style="dim", markup=False, highlight=False)
        console.print(f"Space evaluated in {s['evaluate_seconds'] * 1000:.0f} ms; total {s['total_seconds']:.2f} s",
                      style="dim", markup=False, highlight=False)
    flagged = [f.message for f in getattr(result, "bounds", [])]
    if flagged:
        _title(console, "On a bound of the search")
        for message in flagged:
            console.print(f"  - {message}", markup=False, highlight=False)
    print_warnings(console, [w for w in result.warnings if w not in flagged])


def print_equipment(console: Console, rows: list[dict], utilities: list[dict], title: str) -> None:
    """The equipment list (tag, service, key sizes, costs) and the utilities summary of one design."""
    console.print(title, style="bold", markup=False, highlight=False)
    if rows:
        console.print(f"design ID {rows[0]['design_id']}", markup=False, highlight=False)
    _title(console, f"Equipment, USD at cost index {rows[0]['estimate_index']:g}" if rows else "Equipment")
    columns = [layout.Column("tag", left=True), layout.Column("item", left=True, wrap=True),
               layout.Column("material", left=True, keep=4), layout.Column("purchased", "USD"),
               layout.Column("bare module", "USD"), layout.Column("range", "held", keep=5)]
    _lines(console, columns, [layout.Row([
        r["tag"], r["item"], r["material"], _money(r["purchased_USD"]), _money(r["bare_module_USD"]),
        "yes" if r["range_held"] else "NO"], below=[f"{r['type']}; {r['key_sizes']}"]) for r in rows])
    _title(console, "Utilities")
    _lines(console, [layout.Column("use", left=True, wrap=True), layout.Column("rate"), layout.Column("unit", left=True),
                     layout.Column("cost", "USD/yr")],
           [layout.Row([u["use"], f"{u['rate']:,.4g}", u["unit"], _money(u["cost_USD_per_yr"])]) for u in utilities])
    console.print()
    console.print(CAUTION, style="dim", markup=False, highlight=False)


def print_curve(console: Console, curve) -> None:
    rw = _ratio_word(curve.case)
    with_beds = getattr(curve, "internals", "trays") != "trays"
    count = "stages" if with_beds else "trays"
    who = _text(f"{curve.agent}, {curve.internals}" if with_beds else curve.agent)
    t = _table(f"{who}: annualized cost against {count} (best rate at each)", count, rw,
               "diam. m", "installed USD", "annualized USD/yr", right=(0, 1, 2, 3, 4))
    for i in range(len(curve.by_trays)):
        d = curve.by_trays
        t.add_row(str(int(d.trays[i])), f"{d.ratio[i]:.3f}", f"{d.diameter[i]:.3f}", _money(d.installed[i]),
                  _money(d.annualized[i]))
    console.print(t)
    t = _table(f"{who}: annualized cost against {rw} (best {count} at each level)", rw, count,
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


def print_batch(console: Console, entries, summary) -> None:
    """One line per file of a batch, failures with their reason, and where the summary went."""
    from rich.markup import escape

    t = _table("Batch", "file", "status", "best", "total kUSD/yr", right=(3,))
    for e in entries:
        cost = "" if e.annualized is None else f"{e.annualized / 1e3:,.1f}"
        t.add_row(escape(e.path), e.status, escape(e.best or e.reason), cost)
    console.print(t)
    failed = [e for e in entries if e.status not in ("done", "done earlier")]
    ok = len(entries) - len(failed)
    console.print(f"{ok} of {len(entries)} files done, {len(failed)} failed; summary: {summary}", highlight=False)
