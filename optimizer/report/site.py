"""A site's joint choice as plain data and as terminal tables."""

from __future__ import annotations

from rich.console import Console
from rich.markup import escape
from rich.table import Table

from towercost.report.records import CAUTION, design_record


def _portfolio_record(result, portfolio, rank: int) -> dict:
    units = []
    for name, space, designs in zip(result.units, result.spaces, portfolio.designs):
        record = design_record(space.case, designs)
        record["unit"] = name
        units.append(record)
    return {"rank": rank, "annualized_cost_USD_per_yr": portfolio.annualized, "totals": portfolio.totals,
            "units": units, "shared_regenerators": portfolio.regenerators}


def site_record(result) -> dict:
    """A site result as one plain object (SI units)."""
    best = result.portfolios[0]
    return {
        "site": {"name": result.spec.name, "units": result.units, "notes": result.spec.notes},
        "shared_limits": {name: {"bound": bound, "unit": unit, "what": words, "used_by_best": best.totals[name],
                                 "binding": result.binding[name], "shadow_value_USD_per_yr_per_unit":
                                 result.shadow.get(name, 0.0)}
                          for name, (bound, unit, words) in result.limits.items()},
        "best": _portfolio_record(result, best, 1),
        "portfolios": [_portfolio_record(result, p, k + 1) for k, p in enumerate(result.portfolios)],
        "stand_alone": {**_portfolio_record(result, result.stand_alone, 0),
                        "breaks_shared_limits": result.stand_alone_breaks},
        "solver": result.solver,
        "caution": CAUTION,
    }


def _limit_text(value: float, unit: str) -> str:
    if unit == "USD":
        return f"{value / 1e3:,.0f} kUSD"
    if unit == "W":
        return f"{value / 1e3:,.1f} kW"
    if unit == "kg/s":
        return f"{value * 3.6:,.3f} t/h"
    if unit == "m3/s":
        return f"{value * 3600:,.1f} m3/h"
    return f"{value:.4g} {unit}"


def _shadow_text(value: float, unit: str) -> str:
    per = {"USD": "USD/yr per kUSD", "W": "USD/yr per kW", "kg/s": "USD/yr per t/h", "m3/s": "USD/yr per m3/h"}
    scale = {"USD": 1e3, "W": 1e3, "kg/s": 1 / 3.6, "m3/s": 1 / 3600}
    return f"{value * scale.get(unit, 1.0):,.1f} {per.get(unit, '')}".strip()


def print_site(console: Console, result) -> None:
    """The best joint choice per unit, its runners-up, the shared limits and the stand-alone bests."""
    best = result.portfolios[0]
    console.print(f"[bold]{escape(result.spec.name)}[/bold]: the best joint choice of {len(result.units)} units "
                  f"({result.solver['alternatives_evaluated']:,} alternatives in all)")
    table = Table(title="Best joint choice", title_justify="left", show_edge=False, header_style="bold")
    for column in ("unit", "candidate", "trays", "ratio", "D m", "installed kUSD", "total kUSD/yr"):
        table.add_column(column, justify="left" if column in ("unit", "candidate") else "right")
    for name, space, d in zip(result.units, result.spaces, best.designs):
        table.add_row(escape(name), escape(space.case.agents[int(d.agent[0])]), str(int(d.trays[0])),
                      f"{d.ratio[0]:.4f}", f"{d.diameter[0]:.3f}", f"{d.installed[0] / 1e3:,.0f}",
                      f"{d.annualized[0] / 1e3:,.1f}")
    for column in best.regenerators:      # a shared regenerator column: one row of its own
        table.add_row(escape(f"{column['group']}: shared regenerator"), "", str(column["trays"]), "",
                      f"{column['diameter_m']:.3f}", f"{column['installed_USD'] / 1e3:,.0f}",
                      f"{column['annualized_USD_per_yr'] / 1e3:,.1f}")
    installed = sum(d.installed[0] for d in best.designs) + sum(c["installed_USD"] for c in best.regenerators)
    table.add_row("[bold]site[/bold]", "", "", "", "", f"{installed / 1e3:,.0f}",
                  f"[bold]{best.annualized / 1e3:,.1f}[/bold]")
    console.print(table)
    for column in best.regenerators:
        state = "within its limits" if column["within_its_limits"] else "OUTSIDE ITS LIMITS (see its figures)"
        console.print(f"  {escape(column['group'])}: one regenerator column for the group, {column['trays']} trays, "
                      f"D {column['diameter_m']:.3f} m, {column['height_m']:.1f} m; carries "
                      f"{column['liquid_kg_s'] * 3.6:,.1f} t/h of solvent and {column['vapour_kg_s'] * 3.6:,.2f} t/h "
                      f"of vapour (capacity {column['capacity_liquid_kg_s'] * 3.6:,.1f} and "
                      f"{column['capacity_vapour_kg_s'] * 3.6:,.2f} t/h), fraction of flood "
                      f"{column['fraction_of_flood']:.3f}, {state}", highlight=False)
    if len(result.portfolios) > 1:
        runners = Table(title="Runners-up (site total)", title_justify="left", show_edge=False, header_style="bold")
        runners.add_column("#", justify="right")
        runners.add_column("designs (candidate / trays per unit)")
        runners.add_column("total kUSD/yr", justify="right")
        runners.add_column("+ % over best", justify="right")
        for k, p in enumerate(result.portfolios):
            words = "; ".join(f"{space.case.agents[int(d.agent[0])]} / {int(d.trays[0])}"
                              for space, d in zip(result.spaces, p.designs))
            runners.add_row(str(k + 1), escape(words), f"{p.annualized / 1e3:,.1f}",
                            f"{100 * (p.annualized - best.annualized) / abs(best.annualized):.2f}")
        console.print(runners)
    if result.limits:
        limits = Table(title="Shared limits", title_justify="left", show_edge=False, header_style="bold")
        for column in ("limit", "bound", "used by the best", "binding", "shadow value"):
            limits.add_column(column, justify="left" if column == "limit" else "right")
        for name, (bound, unit, words) in result.limits.items():
            limits.add_row(words, _limit_text(bound, unit), _limit_text(best.totals[name], unit),
                           "yes" if result.binding[name] else "no",
                           _shadow_text(result.shadow.get(name, 0.0), unit))
        console.print(limits)
    alone = result.stand_alone
    if result.stand_alone_breaks:
        broken = ", ".join(result.stand_alone_breaks)
        console.print(f"Each unit's own best together would cost {alone.annualized / 1e3:,.1f} kUSD/yr but break "
                      f"the site's {broken}; the joint choice costs {100 * (best.annualized - alone.annualized) / abs(alone.annualized):.2f} % more and meets every shared limit.",
                      highlight=False)
    else:
        console.print(f"Each unit's own best together: {alone.annualized / 1e3:,.1f} kUSD/yr, within every shared "
                      f"limit; the joint choice is no dearer ({best.annualized / 1e3:,.1f} kUSD/yr).", highlight=False)
    console.print(f"[dim]{CAUTION}[/dim]")
