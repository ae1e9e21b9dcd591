"""How time and memory grow with the design space: 10^3 to 10^7 alternatives, model and scan.

Each size is the six-solvent benchmark (benchmarks/scenarios/six_solvents.toml)
with its candidates repeated (a price step apart, so that they differ), its
tray range and its ratio levels set to reach about the size named. Each size
runs in a fresh process that calls ``optimize(method="scan")`` and
``optimize(method="model")`` alternately, PAIRS times each after one untimed
call of each (on the large sizes, where imports are negligible, the first
pair is timed), and reports the
median of each, the median ratio of the pairs, and the process's peak
resident memory (both methods hold the same compact space).

Run: .venv/bin/python benchmarks/bench_scaling.py
"""

from __future__ import annotations

import copy
import json
import statistics
import subprocess
import sys
import tomllib
from pathlib import Path

HERE = Path(__file__).resolve().parent
SIX = HERE / "scenarios" / "six_solvents.toml"

#: name -> (candidates, trays, ratio levels); three shell sizes are offered per rate.
SIZES = {
    "10^3": (2, 16, 40),
    "10^4": (3, 30, 80),
    "10^5": (6, 40, 160),
    "10^6": (6, 80, 800),
    "10^7": (12, 100, 2000),   # about 10^7 with the packed beds added (150 trays gave 15.2 M)
}
PAIRS = 2


def scenario(candidates: int, trays: int, levels: int) -> dict:
    raw = tomllib.loads(SIX.read_text(encoding="utf-8"))
    base = raw["solvent"]
    solvents = []
    for i in range(candidates):
        solvent = copy.deepcopy(base[i % len(base)])
        if i >= len(base):
            solvent["name"] = f"{solvent['name']} ({i // len(base) + 1})"
            solvent["price"] = f"{1.0 + 0.05 * i:.2f} USD/kg"
        solvents.append(solvent)
    raw["solvent"] = solvents
    raw["column"]["trays"] = [2, 1 + trays]
    raw["column"]["ratio_levels"] = levels
    return raw


def peak_mib() -> float:
    """This process's peak resident memory [MiB] (VmHWM: not inherited across exec, unlike ru_maxrss)."""
    for line in Path("/proc/self/status").read_text().splitlines():
        if line.startswith("VmHWM:"):
            return int(line.split()[1]) / 1024.0
    import resource

    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0


def child(size: str) -> None:
    import time

    import highspy  # noqa: F401 - imported before the clock, as the CLI's model path does
    import pyomo.core  # noqa: F401

    import towercost
    from towercost.select import ranking

    data = towercost.from_dict(scenario(*SIZES[size]))
    times = {"scan": [], "model": []}
    result = None
    if result is None and SIZES[size][2] < 1000:   # warm-up (imports, first calls), not timed
        ranking.optimize(data, top=10, method="scan")
        ranking.optimize(data, top=10, method="model")
    for _ in range(PAIRS):
        for method in ("scan", "model"):
            start = time.perf_counter()
            result = ranking.optimize(data, top=10, method=method)
            times[method].append(time.perf_counter() - start)
    print(json.dumps({
        "alternatives": result.space_size,
        "evaluate_seconds": result.solver["evaluate_seconds"],
        "scan": statistics.median(times["scan"]), "model": statistics.median(times["model"]),
        "ratio": statistics.median(m / s for m, s in zip(times["model"], times["scan"])),
        "peak_MiB": peak_mib(),
    }))


def main() -> list[tuple[str, float, str]]:
    rows = []
    print(f"{'size':6s} {'alternatives':>13s} {'scan s':>8s} {'model s':>8s} {'model/scan':>10s} "
          f"{'eval M/s':>9s} {'peak MiB':>9s}")
    for size in SIZES:
        done = subprocess.run([sys.executable, __file__, "--child", size], capture_output=True, text=True,
                              check=True)
        r = json.loads(done.stdout.strip().splitlines()[-1])
        rate = r["alternatives"] / r["evaluate_seconds"] / 1e6
        print(f"{size:6s} {r['alternatives']:13,d} {r['scan']:8.3f} {r['model']:8.3f} {r['ratio']:10.3f} "
              f"{rate:9.2f} {r['peak_MiB']:9.0f}", flush=True)
        rows += [(f"{size}: alternatives", r["alternatives"], "designs"),
                 (f"{size}: optimize scan", r["scan"], "s"), (f"{size}: optimize model", r["model"], "s"),
                 (f"{size}: model / scan (median of pairs)", r["ratio"], "x"),
                 (f"{size}: evaluation throughput", rate * 1e6, "designs/s"),
                 (f"{size}: peak memory", r["peak_MiB"], "MiB")]
    return rows


if __name__ == "__main__":
    if len(sys.argv) == 3 and sys.argv[1] == "--child":
        child(sys.argv[2])
    else:
        main()
