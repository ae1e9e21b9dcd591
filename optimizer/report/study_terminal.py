"""Terminal output of the sensitivity and Monte Carlo studies, as rich tables.

Only layout and display units live here; every figure comes from ``towercost.study``.
"""

from __future__ import annotations

import math

from rich.console import Console
from rich.table import Table

from towercost.report.terminal import print_warnings
from towercost.scenario.units import mole_fraction_text
from towercost.study.uncertainty import PERCENTILES


def _table(title: str, *columns: str, right: tuple[int, ...] = ()) -> Table:
    table = Table(title=title, title_justify="left", show_edge=False, header_style="bold", pad_edge=False)
    for k, col in enumerate(columns):
        table.add_column(col, justify="right" if k in right else "left")
    return table


def _k(value: float) -> str:
    return f"{value / 1e3:,.1f}"


def _pct(value: float | None, signed: bool = True) -> str:
    if value is None or not math.isfinite(value):
        return "-"
    return f"{100 * value:+.1f} %" if signed else f"{100 * value:.1f} %"


def _prob(p: float) -> str:
    """A probability in per cent, with more digits near 0 and 1 so that 0.9997 does not read as certain."""
    if 0.0 < p < 0.01 or 0.99 < p < 1.0:
        return f"{100 * p:.2f} %"
    return f"{100 * p:.1f} %"


def _design_text(case, designs, i: int = 0) -> str:
    return (f"{case.agents[int(designs.agent[i])]}, {int(designs.trays[i])} trays, {case.service.ratio_word} "
            f"{designs.ratio[i]:.3f}, D {designs.diameter[i]:.2f} m")


def print_sensitivity(console: Console, result) -> None:
    """The tornado as a table: each input down and up, the fixed best design and the re-optimized best."""
    case, nominal = result.case, result.nominal
    rw = case.service.ratio_word
    console.print(f"[bold]{case.name}[/bold]: one input at a time around the best design, "
                  f"{_design_text(case, nominal)}, {_k(float(nominal.annualized[0]))} kUSD/yr")
    t = _table("Sensitivity, largest swing first (fixed: the best design as built, rate held in mol/s)",
               "input", "change", "fixed kUSD/yr", "fixed +-", "spec", "limits", "re-optimized best", "trays", rw,
               "kUSD/yr", "best +-", right=(1, 2, 3, 7, 8, 9, 10))
    for row in result.rows:
        for side, (change, fixed, best) in enumerate(zip(row.changes, row.fixed, row.best)):
            if best.designs is None:
                tail = ("no design qualifies", "", "", "", "")
            else:
                d = best.designs
                tail = (case.agents[int(d.agent[0])], str(int(d.trays[0])), f"{d.ratio[0]:.3f}",
                        _k(float(d.annualized[0])), _pct(best.change))
            t.add_row(row.label if side == 0 else "", _pct(change), _k(fixed.annualized), _pct(fixed.change),
                      "met" if fixed.meets_spec else "[bold red]MISSED[/bold red]",
                      "met" if fixed.within_limits else "[bold red]EXCEEDED[/bold red]", *tail,
                      end_section=side == 1)
    console.print(t)
    if result.unvaried:
        console.print(f"Not varied (zero in this scenario): {', '.join(result.unvaried)}", highlight=False)
    for row in result.rows:
        for change, best in zip(row.changes, row.best):
            if best.designs is None:
                console.print(f"  {row.label} {_pct(change)}: {best.reason}", highlight=False)
    print_warnings(console, result.notes)


def print_uncertainty(console: Console, mc) -> None:
    """The Monte Carlo study: spreads, probability of meeting the spec, percentiles, margins, re-optimization."""
    case, fixed = mc.case, mc.fixed
    rw = case.service.ratio_word
    console.print(f"[bold]{case.name}[/bold]: {mc.label}; nominal {_k(float(mc.nominal.annualized[0]))} kUSD/yr")
    console.print(f"{fixed.samples:,} samples, seed {mc.draws.seed}", highlight=False)

    t = _table("Spreads (factors on the nominal values)", "input", "distribution", "parameters")
    for name, spread in mc.draws.spreads.items():
        if spread.distribution == "fixed":
            text = "held at nominal"
        elif spread.distribution == "lognormal":
            text = f"median 1, ln-sd {spread.log_sd:g}"
            if spread.by_solute:
                text += " (" + ", ".join(f"{s} {v:g}" for s, v in spread.by_solute.items()) + ")"
        elif spread.distribution == "normal":
            text = f"mean 1, sd {spread.sd:g}"
        else:
            text = f"low {spread.low:g}, mode {spread.mode:g}, high {spread.high:g}"
        if name in ("k", "efficiency") and spread.distribution != "fixed":
            text += f"; shared per {spread.shared}, correlation {spread.correlation:g}"
        t.add_row(name, spread.distribution, text)
    console.print(t)

    e = fixed.every_spec
    line = (f"Probability of meeting every spec: [bold]{_prob(e.probability)}[/bold] "
            f"(standard error {100 * e.standard_error:.2f} %)")
    cf = fixed.closed_form
    line += (f"; closed form {100 * cf.probability:.2f} % ({cf.method})" if cf.available
             else f"; closed form: {cf.method}")
    console.print(line, highlight=False)
    for name, each in fixed.each_spec.items():
        console.print(f"  {name} spec: {_prob(each.probability)} (standard error {100 * each.standard_error:.2f} %)",
                      highlight=False)
    console.print(f"  every spec and every plant limit: {_prob(fixed.within_limits.probability)}",
                  highlight=False)

    labels = [f"p{p:g}" for p in PERCENTILES]
    t = _table("Distribution over the samples", "figure", "spec", *labels, right=(2, 3, 4))
    for s, name in enumerate(case.solutes):
        t.add_row(f"{name} outlet", mole_fraction_text(float(case.target[s])),
                  *(mole_fraction_text(float(v)) for v in fixed.outlet_percentiles[:, s]))
    t.add_row("annualized cost, kUSD/yr", "", *(_k(float(v)) for v in fixed.cost_percentiles))
    console.print(t)

    t = _table(f"Design margin: meets every spec in at least {100 * mc.confidence:g} % of the samples",
               "margin", "design", "meets", "kUSD/yr", "extra kUSD/yr", "extra", right=(2, 3, 4, 5))
    base = float(mc.nominal.annualized[0])
    for m in mc.margins:
        what = {"trays": "fewest trays at the design's rate", "rate": f"least {rw} at the design's trays",
                "cheapest": "cheapest design at this confidence"}[m.kind]
        if m.design is None:
            t.add_row(what, m.reason, "", "", "", "")
            continue
        t.add_row(what, _design_text(case, m.nominal) + (f" ({m.reason})" if m.reason else ""),
                  _prob(m.meets.probability), _k(float(m.nominal.annualized[0])), _k(m.extra_cost),
                  _pct(m.extra_cost / abs(base)))
    console.print(t)

    ro = mc.reoptimized
    if ro is not None:
        t = _table(f"Best design per sample ({ro.samples:,} samples re-optimized, {ro.alternatives:,} alternatives, "
                   f"{ro.seconds:.1f} s)", "candidate", "trays", "D m", "share", f"median {rw}",
                   "median kUSD/yr", right=(1, 2, 3, 4, 5))
        for w in ro.winners[:10]:
            t.add_row(case.agents[w.agent], str(w.trays), f"{w.diameter:.2f}", _pct(w.share, signed=False),
                      f"{w.ratio_median:.3f}", _k(w.cost_median))
        console.print(t)
        if len(ro.winners) > 10:
            rest = sum(w.share for w in ro.winners[10:])
            console.print(f"  and {len(ro.winners) - 10} more families, {100 * rest:.1f} % of the samples",
                          highlight=False)
        shares = ", ".join(f"{case.agents[a]} {100 * v:.1f} %" for a, v in ro.candidate_shares().items())
        console.print(f"Best candidate per sample: {shares}", highlight=False)
        t = _table("Regret: extra annualized cost over each sample's best", "design", "meets as built",
                   "regret kUSD/yr", "operable", "regret, rate re-set", "its family best", right=(1, 2, 3, 4, 5))
        for g in ro.regrets:
            t.add_row(g.label, _pct(g.meets, signed=False), _k(g.regret_when_met), _pct(g.operable, signed=False),
                      _k(g.regret_operated), _pct(g.wins, signed=False))
        console.print(t)
        console.print("[dim]As built: the rate fixed, over the samples in which the design meets every spec and "
                      "limit. Rate re-set: the tower kept, the rate set to the sample's least rate meeting every "
                      "spec, over the samples in which that is within the limits.[/dim]")
    console.print(f"[dim]Times: {', '.join(f'{k} {v:.2f} s' for k, v in mc.seconds.items())}[/dim]")
    print_warnings(console, mc.warnings)
