"""Plots of the sensitivity and Monte Carlo studies, as PNG files (matplotlib, no display needed).

``tornado_png``: the change in annualized cost for each input down and up,
the fixed best design beside the re-optimized best, largest swing first; a
fixed design that misses a spec or a limit is marked. ``uncertainty_png``:
the distribution of the annualized cost and of each specified outlet over
the samples, with the spec and the nominal value, and the fraction meeting
every spec against trays (the margin curve). Files are written whole
(temporary file, then rename) and never over a file unless asked.
"""

from __future__ import annotations

import io
import math
import os
import tempfile
from pathlib import Path

import numpy as np


def _pyplot():
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    return plt


def _png(figure) -> bytes:
    buffer = io.BytesIO()
    figure.savefig(buffer, format="png", dpi=110, bbox_inches="tight", metadata={"Software": None})
    _pyplot().close(figure)
    return buffer.getvalue()


def tornado_png(result) -> bytes:
    """The tornado of a sensitivity study (``towercost.study.sensitivity.Sensitivity``)."""
    plt = _pyplot()
    rows = result.rows[::-1]                     # largest swing at the top
    y = np.arange(len(rows))
    fig, axes = plt.subplots(1, 2, figsize=(11, 0.45 * len(rows) + 1.8), sharey=True)
    panels = (("fixed best design (as built)", lambda r, k: r.fixed[k].change),
              ("re-optimized best design", lambda r, k: r.best[k].change))
    for ax, (title, value) in zip(axes, panels):
        for k, colour in ((0, "#4c72b0"), (1, "#dd8452")):
            widths = np.array([100 * (value(r, k) if value(r, k) is not None else np.nan) for r in rows])
            ax.barh(y + (0.2 if k else -0.2), widths, height=0.4, color=colour,
                    label="input lowered" if k == 0 else "input raised")
        if title.startswith("fixed"):
            for i, r in enumerate(rows):
                for k in (0, 1):
                    f = r.fixed[k]
                    if not (f.meets_spec and f.within_limits):
                        what = "spec" if not f.meets_spec else "limit"
                        right = f.change >= 0
                        ax.annotate(f"{what} missed ({'lowered' if k == 0 else 'raised'})",
                                    (100 * f.change, i + (0.2 if k else -0.2)), fontsize=7, color="#c44e52",
                                    va="center", xytext=(4 if right else -4, 0), textcoords="offset points",
                                    ha="left" if right else "right")
            low, high = ax.get_xlim()
            ax.set_xlim(low - 0.35 * (high - low), high + 0.35 * (high - low))
        ax.axvline(0.0, color="black", linewidth=0.8)
        ax.set_title(title, fontsize=10)
        ax.set_xlabel("change in annualized cost, % of the nominal best")
        ax.grid(axis="x", alpha=0.3)
    labels = [f"{r.label} ({100 * r.changes[0]:+.0f} / {100 * r.changes[1]:+.0f} %)" for r in rows]
    axes[0].set_yticks(y, labels, fontsize=8)
    axes[1].legend(fontsize=8, loc="lower right")
    case, d = result.case, result.nominal
    fig.suptitle(f"{case.name}: best design {case.agents[int(d.agent[0])]}, {int(d.trays[0])} trays, "
                 f"{case.service.ratio_word} {d.ratio[0]:.3f}, {d.annualized[0] / 1e3:,.1f} kUSD/yr", fontsize=10)
    return _png(fig)


def uncertainty_png(mc) -> bytes:
    """Cost and outlet distributions of the studied design, and the margin curve (``MonteCarlo``)."""
    plt = _pyplot()
    case, fixed = mc.case, mc.fixed
    specified = [s for s in range(len(case.solutes)) if math.isfinite(case.target[s])]
    curve = next((m.curve for m in mc.margins if m.curve is not None), None)
    panels = 1 + len(specified) + (curve is not None)
    fig, axes = plt.subplots(1, panels, figsize=(4.2 * panels, 3.6))
    axes = np.atleast_1d(axes)
    cost = fixed.sampled.annualized / 1e3
    axes[0].hist(cost, bins=60, color="#4c72b0", alpha=0.85)
    axes[0].axvline(float(mc.nominal.annualized[0]) / 1e3, color="black", linestyle="--", label="nominal")
    for p in fixed.cost_percentiles:
        axes[0].axvline(p / 1e3, color="#dd8452", linewidth=0.9)
    axes[0].set_xlabel("annualized cost, kUSD/yr (p5, p50, p95 marked)")
    axes[0].set_ylabel("samples")
    axes[0].legend(fontsize=8)
    for ax, s in zip(axes[1:1 + len(specified)], specified):
        outlet = fixed.sampled.outlet[:, s] * 1e6
        ax.hist(outlet, bins=60, color="#55a868", alpha=0.85)
        ax.axvline(case.target[s] * 1e6, color="#c44e52", linewidth=1.5, label="spec")
        share = fixed.each_spec.get(case.solutes[s])
        title = f"{case.solutes[s]} outlet" + (f": {100 * share.probability:.1f} % meet" if share else "")
        ax.set_title(title, fontsize=9)
        ax.set_xlabel("mole fraction, ppm")
        ax.legend(fontsize=8)
    if curve is not None:
        ax = axes[-1]
        ax.plot(curve[0], 100 * curve[1], color="#8172b3", marker=".")
        ax.axhline(100 * mc.confidence, color="#c44e52", linestyle="--", label=f"{100 * mc.confidence:g} %")
        ax.axvline(mc.fixed.design.trays, color="black", linestyle=":", label="design")
        ax.set_xlabel("real trays (the design's rate and shell)")
        ax.set_ylabel("% of samples meeting every spec")
        ax.set_ylim(0, 100)
        ax.legend(fontsize=8)
    e = fixed.every_spec
    fig.suptitle(f"{mc.label}: every spec met in {100 * e.probability:.1f} % +- {100 * e.standard_error:.1f} % "
                 f"of {e.samples:,} samples (seed {mc.draws.seed})", fontsize=9)
    fig.tight_layout()
    return _png(fig)


def write_png(path: Path, data: bytes, *, force: bool = False) -> Path:
    """Write ``data`` to ``path`` whole (temporary file, then rename); never over a file unless ``force``."""
    path = Path(path)
    if path.exists() and not force:
        raise FileExistsError(f"{path} exists; pass --force to replace it")
    path.parent.mkdir(parents=True, exist_ok=True)
    fd, tmp = tempfile.mkstemp(dir=path.parent, prefix=f".{path.name}.", suffix=".tmp")
    try:
        with os.fdopen(fd, "wb") as handle:
            handle.write(data)
        os.replace(tmp, path)
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise
    return path
