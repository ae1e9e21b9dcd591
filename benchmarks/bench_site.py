"""Speed of a site's joint choice and of batch runs.

* A site of four units, each the demo absorber's space (flows and prices
  varied, about 130,000 alternatives in all and some 10^18 joint choices),
  under a capital budget the stand-alone bests together break and a steam
  allowance (both derived in ``site``), two units sharing one solvent:
  evaluation, model build and solve, the five best joint choices, end to
  end (``optimize_site``), best of 3.
* A batch of BATCH copies of the demo absorber (prices varied): wall time
  with one worker and with two local worker processes.

Run: .venv/bin/python benchmarks/bench_site.py
"""

from __future__ import annotations

import copy
import sys
import tempfile
import time
import tomllib
from pathlib import Path

import numpy as np

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))

from common import ROOT, best_seconds  # noqa: E402

import towercost  # noqa: E402
from towercost.scenario.site import site_from_units  # noqa: E402
from towercost.select.batch import run_batch  # noqa: E402
from towercost.select.site import optimize_site  # noqa: E402

DEMO = ROOT / "scenarios" / "demo_absorber.toml"
BATCH = 100


def site():
    """The four-vent site, its limits derived from the units' own figures so that it is feasible and still bites.

    Capital budget: midway between the least installed cost the units can have
    together and the sum of their stand-alone bests' installed costs, so the
    stand-alone bests together break it. Steam allowance: what the best joint
    choice under that budget alone uses, plus 1 %, so the site is feasible.
    Here cutting capital costs steam (fewer trays take more solvent, and the
    solvent is regenerated with steam): limits set below both stand-alone
    sums leave no joint choice.
    """
    raw = tomllib.loads(DEMO.read_text(encoding="utf-8"))
    units = []
    for k, (flow, price) in enumerate([(900, 1.10), (650, 1.10), (500, 1.30), (1100, 1.00)]):
        data = copy.deepcopy(raw)
        data["case"]["name"] = f"vent {k + 1}"
        data["feed"]["flow"] = f"{flow} kmol/h"
        data["solvent"][0]["price"] = f"{price} USD/kg"
        units.append((f"vent {k + 1}", towercost.from_dict(data, f"vent {k + 1}")))
    groups = [{"name": "loop", "units": ["vent 1", "vent 2"]}]
    free = optimize_site(site_from_units("free", units), top=1)
    alone = float(sum(d.installed[0] for d in free.stand_alone.designs))
    least = float(sum(s.designs(np.flatnonzero(s.feasible)).installed.min() for s in free.spaces))
    budget = least + 0.5 * (alone - least)
    capped = optimize_site(site_from_units("capped", units, shared={"capital_budget": f"{budget} USD"},
                                           solvent_groups=groups), top=1)
    steam = 1.01 * float(sum(d.steam_rate[0] for d in capped.portfolios[0].designs))
    return site_from_units("four vents", units, shared={"capital_budget": f"{budget} USD", "steam": f"{steam} kg/s"},
                           solvent_groups=groups)


def main() -> list[tuple[str, float, str]]:
    spec = site()
    seconds, result = best_seconds(optimize_site, spec, top=5, repeats=3)
    s = result.solver
    assert "installed cost" in result.stand_alone_breaks, "the stand-alone bests together should break the budget"
    assert result.binding["capital_budget"], "the capital budget should bind"
    with tempfile.TemporaryDirectory() as folder:
        folder = Path(folder)
        text = DEMO.read_text(encoding="utf-8")
        paths = []
        for k in range(BATCH):
            path = folder / f"case_{k:03d}.toml"
            path.write_text(text.replace('price = "1.10 USD/kg"', f'price = "{1.0 + 0.01 * k:.2f} USD/kg"'),
                            encoding="utf-8")
            paths.append(path)
        start = time.perf_counter()
        one = run_batch(paths, folder / "one", workers=1)
        serial = time.perf_counter() - start
        start = time.perf_counter()
        two = run_batch(paths, folder / "two", workers=2)
        parallel = time.perf_counter() - start
        assert [e.annualized for e in one] == [e.annualized for e in two]
    rows = [
        ("site of 4 demo-size units: alternatives", s["alternatives_evaluated"], "designs"),
        ("  binaries after reduction", s["binaries"], "binaries"),
        ("  evaluation", s["evaluate_seconds"], "s"),
        ("  model build", s["build_seconds"], "s"),
        ("  solves, top 5 and the binding checks", s["solve_seconds"], "s"),
        ("  optimize_site end to end (best of 3)", seconds, "s"),
        (f"batch of {BATCH} demo scenarios, 1 worker", serial, "s"),
        (f"batch of {BATCH} demo scenarios, 2 workers", parallel, "s"),
    ]
    for name, value, unit in rows:
        text = f"{value:,}" if isinstance(value, int) else f"{value:.4g}"
        print(f"{name:52s} {text:>12s} {unit}")
    return rows


if __name__ == "__main__":
    main()
