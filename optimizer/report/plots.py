"""Plots for the report and the ``curve`` command (matplotlib, drawn off-screen; PNG or SVG bytes).

* ``cost_curves``: annualized cost against the ratio to the minimum and
  against trays, one line per candidate (the best design at each point);
* ``cost_breakdown``: the annualized cost of the top designs stacked by
  what makes it up (capital charge, each consumption, less any credit);
* ``stage_diagram``: the operating and equilibrium lines of the best
  design for its controlling solute, with the theoretical stages stepped
  off between them (the dilute picture: straight lines, constant L/V).

Every number drawn comes from the designs given; nothing is recomputed here
except the stage steps, which walk the two lines the design's own flows and
K-value define.
"""

from __future__ import annotations

import io

import numpy as np

#: Line colours, one per candidate, distinguishable in print and for common colour-vision deficiencies.
COLOURS = ("#1f5fa8", "#d1742b", "#2e8b57", "#8e44ad", "#b03a2e", "#6c7a89", "#b7950b", "#117a65")


def _figure(width: float = 7.2, height: float = 3.6):
    import matplotlib

    matplotlib.use("Agg")
    from matplotlib.figure import Figure

    return Figure(figsize=(width, height), dpi=110, layout="constrained")


def _bytes(fig, fmt: str = "png") -> bytes:
    buffer = io.BytesIO()
    fig.savefig(buffer, format=fmt, metadata={"Software": None} if fmt == "png" else {"Date": None})
    return buffer.getvalue()


def cost_curves(curves: list, ratio_word: str, best=None, fmt: str = "png") -> bytes:
    """Two panels: annualized cost [kUSD/yr] against the ratio (left) and against trays (right), per candidate.

    ``curves`` are ``towercost.select.ranking.Curve`` objects; ``best`` an
    optional (ratio, trays, annualized) to mark.
    """
    fig = _figure()
    by_ratio, by_trays = fig.subplots(1, 2, sharey=True)
    for k, curve in enumerate(curves):
        colour = COLOURS[k % len(COLOURS)]
        r = curve.by_ratio
        order = np.argsort(r.ratio)
        by_ratio.plot(r.ratio[order], r.annualized[order] / 1e3, "-", color=colour, lw=1.6, label=curve.agent)
        t = curve.by_trays
        order = np.argsort(t.trays)
        by_trays.plot(t.trays[order], t.annualized[order] / 1e3, "-", color=colour, lw=1.6, label=curve.agent)
    if best is not None:
        ratio, trays, cost = best
        by_ratio.plot([ratio], [cost / 1e3], "k*", ms=11, label="best design")
        by_trays.plot([trays], [cost / 1e3], "k*", ms=11)
    by_ratio.set_xlabel(f"{ratio_word} (best trays at each level)")
    by_trays.set_xlabel("real trays (best rate at each count)")
    by_ratio.set_ylabel("total annualized cost, kUSD/yr")
    for ax in (by_ratio, by_trays):
        ax.grid(True, color="#dde3e8", lw=0.6)
    by_ratio.legend(fontsize=8, frameon=False)
    return _bytes(fig, fmt)


def cost_breakdown(case, designs, labels: list[str], fmt: str = "png") -> bytes:
    """Stacked bars: each design's annualized cost by component [kUSD/yr]; credits below zero."""
    fig = _figure(7.2, 3.8)
    ax = fig.subplots()
    n = len(designs)
    x = np.arange(n)
    parts = [("capital charge", designs.capital_charge)]
    cost = designs.use_cost
    for j, spec in enumerate(designs.uses.specs):
        if not spec.credit and np.any(cost[:, j] > 0):
            parts.append((spec.label, cost[:, j]))
    bottom = np.zeros(n)
    for k, (label, values) in enumerate(parts):
        ax.bar(x, values / 1e3, bottom=bottom / 1e3, color=COLOURS[k % len(COLOURS)], label=label, width=0.7)
        bottom = bottom + values
    if np.any(designs.credit > 0):
        ax.bar(x, -designs.credit / 1e3, color="#9aa5b1", label="credit for recovered solute", width=0.7)
    ax.plot(x, designs.annualized / 1e3, "k_", ms=18, mew=2, label="total annualized cost")
    ax.set_xticks(x, labels, fontsize=8)
    ax.set_xlabel("rank")
    ax.set_ylabel("kUSD/yr")
    ax.grid(True, axis="y", color="#dde3e8", lw=0.6)
    ax.legend(fontsize=7, frameon=False, loc="center left", bbox_to_anchor=(1.0, 0.5))
    return _bytes(fig, fmt)


def stage_steps(k_value: float, slope: float, x_top: float, y_top: float, x_end: float, limit: int = 400):
    """Stages stepped off from the top of a countercurrent column between y = K x and y = y_top + slope (x - x_top).

    From the top, each stage takes the gas leaving it to the liquid in
    equilibrium (x = y / K) and then the liquid to the gas passing it from
    below (the operating line), until the liquid reaches ``x_end`` (the liquid
    outlet). Returns the corner points (x, y) and the count of stages, the
    last one fractional (the part of its horizontal step needed).

    >>> _, n = stage_steps(0.5, 1.0, 0.0, 0.0, 0.0)
    >>> n
    0.0
    """
    xs, ys = [x_top], [y_top]
    y, x_prev = y_top, x_top
    rising = x_end >= x_top
    count = 0.0
    for _ in range(limit):
        if (x_prev >= x_end) if rising else (x_prev <= x_end):
            break
        x = y / k_value
        if (x >= x_end) if rising else (x <= x_end):
            count += (x_end - x_prev) / (x - x_prev) if x != x_prev else 1.0
            xs.append(x)
            ys.append(y)
            break
        count += 1.0
        xs.append(x)
        ys.append(y)
        y = y_top + slope * (x - x_top)
        xs.append(x)
        ys.append(y)
        x_prev = x
    return (np.array(xs), np.array(ys)), count


def stage_diagram(case, designs, i: int, solute: int, fmt: str = "png") -> tuple[bytes, float]:
    """Operating and equilibrium lines of design ``i`` for one solute, stages stepped off; (image, stages counted)."""
    a = int(designs.agent[i])
    k = float(case.k_value[a, solute])
    slope = float(designs.liquid_flow[i] / designs.gas_flow[i])          # L / V
    feed_in, out = float(case.feed_in[solute]), float(designs.outlet[i, solute])
    lean, agent_out = float(case.lean[a, solute]), float(designs.agent_outlet[i, solute])
    if case.service.agent_is_liquid:      # absorber: liquid in at the top is the solvent, gas leaves at out
        x_top, y_top, x_end, y_end = lean, out, agent_out, feed_in
    else:                                 # stripper: liquid in at the top is the feed, gas leaves loaded
        x_top, y_top, x_end, y_end = feed_in, agent_out, out, lean
    (sx, sy), count = stage_steps(k, slope, x_top, y_top, x_end)
    fig = _figure(6.4, 4.2)
    ax = fig.subplots()
    span = np.linspace(min(x_top, x_end), max(x_top, x_end), 50)
    scale = 1e6
    ax.plot(span * scale, k * span * scale, "-", color=COLOURS[1], lw=1.6, label=f"equilibrium, y = {k:.4g} x")
    ax.plot([x_top * scale, x_end * scale], [y_top * scale, y_end * scale], "-", color=COLOURS[0], lw=1.6,
            label=f"operating line, L/V = {slope:.4g}")
    ax.plot(sx * scale, sy * scale, "-", color="#333333", lw=0.9,
            label=f"{count:.2f} theoretical stages stepped off")
    ax.set_xlabel(f"{case.solutes[solute]} in the liquid, ppm (mole)")
    ax.set_ylabel(f"{case.solutes[solute]} in the gas, ppm (mole)")
    ax.grid(True, color="#dde3e8", lw=0.6)
    ax.legend(fontsize=8, frameon=False)
    return _bytes(fig, fmt), count
