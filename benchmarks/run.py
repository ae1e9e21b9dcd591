"""Every towercost benchmark in turn, then one combined table and the machine they ran on.

What ``make bench`` runs: .venv/bin/python benchmarks/run.py

The modules (each also runs alone and prints its own rows):
  bench_kremser    throughput of the Kremser relation and its inverses
  bench_evaluate   exact evaluation of 10**5 designs and of a 2.4 M space; one-design CLI commands
  bench_optimizer  space, model, scan, in-process and whole-process model/scan ratios, a plain loop
  bench_scaling    10**3 to 10**7 alternatives: model and scan time, their ratio, peak memory
  bench_site       a four-unit site's joint choice; a batch of 100 scenarios with 1 and 2 workers
  bench_uncertainty  Monte Carlo of a fixed design (10**4 to 10**6 samples), margins, re-optimization per
                   sample, the sensitivity study, the two study commands
  bench_loop       the regenerated loop at scale (6 solvents x 60 absorber trays x 40 lean levels, each
                   absorber point with its 40-count regenerator minimum): space, model, scan, CLI ratio

Figures are wall-clock seconds (time.perf_counter): best of several calls
where a call is cheap, medians of alternating runs where two things are
compared (the ratio is the median of the pairs); the machine may be shared,
so treat differences under about 20 % as noise.
"""

from __future__ import annotations

import os
import platform
import sys
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))

import bench_evaluate  # noqa: E402
import bench_kremser  # noqa: E402
import bench_loop  # noqa: E402
import bench_optimizer  # noqa: E402
import bench_scaling  # noqa: E402
import bench_site  # noqa: E402
import bench_uncertainty  # noqa: E402

MODULES = (bench_kremser, bench_evaluate, bench_optimizer, bench_scaling, bench_site, bench_uncertainty,
           bench_loop)


def cpu_model() -> str:
    """The CPU model name from /proc/cpuinfo, or the platform's word for it."""
    try:
        for line in Path("/proc/cpuinfo").read_text().splitlines():
            if line.lower().startswith("model name"):
                return line.split(":", 1)[1].strip()
    except OSError:
        pass
    return platform.processor() or "unknown"


def machine() -> list[tuple[str, str]]:
    """What the figures were measured on."""
    try:
        usable = len(os.sched_getaffinity(0))
    except AttributeError:
        usable = os.cpu_count() or 0
    versions = []
    for package in ("numpy", "pyomo", "highspy", "towercost"):
        try:
            from importlib.metadata import version

            versions.append(f"{package} {version(package)}")
        except Exception:  # noqa: BLE001 - a missing package is reported, not fatal
            versions.append(f"{package} ?")
    return [
        ("python", f"{platform.python_version()} ({platform.python_implementation()}, {sys.executable})"),
        ("nproc", str(usable)),
        ("cpu", cpu_model()),
        ("platform", platform.platform()),
        ("packages", ", ".join(versions)),
    ]


def _text(value) -> str:
    return f"{value:,}" if isinstance(value, int) else f"{value:.4g}"


#: The speed targets (issue 7; the loop's: issue 10): (what, section, figure names, test on the value, the target
#: in words).
TARGETS = (
    ("demo optimize model / scan, whole processes", "optimizer",
     ("demo: towercost optimize model / scan, wall (median of pairs)",), lambda v: v <= 1.25, "<= 1.25 x"),
    ("demo optimize end to end, wall", "optimizer", ("demo: towercost optimize, wall (median)",),
     lambda v: v < 0.7, "< 0.7 s"),
    *((f"{size} model / scan, in process", "scaling", (f"{size}: model / scan (median of pairs)",),
       lambda v: v <= 2.0, "<= 2 x") for size in ("10^3", "10^4", "10^5", "10^6", "10^7")),
    ("evaluation throughput, 10^7", "scaling", ("10^7: evaluation throughput",), lambda v: v >= 2e6,
     ">= 2,000,000 designs/s"),
    ("peak memory, 10^7", "scaling", ("10^7: peak memory",), lambda v: v < 1024.0, "< 1024 MiB"),
    ("loop optimize end to end, wall", "loop", ("loop: towercost optimize, wall (median)",), lambda v: v < 2.0,
     "< 2 s"),
    ("loop optimize model / scan, whole processes", "loop",
     ("loop: towercost optimize model / scan, wall (median of pairs)",), lambda v: v <= 1.5, "<= 1.5 x"),
    ("loop optimize model / scan, in process", "loop",
     ("loop: optimize in-process, model / scan (median of pairs)",), lambda v: v <= 1.5, "<= 1.5 x"),
)


def verdicts(table) -> list[tuple[str, float | None, str, str]]:
    """Each target with its measured figure and PASS or FAIL (MISSING where the figure was not measured)."""
    found = {(section, name): value for section, name, value, _ in table}
    rows = []
    for what, section, names, test, target in TARGETS:
        values = [found[(section, name)] for name in names if (section, name) in found]
        if not values:
            rows.append((what, None, target, "MISSING"))
            continue
        rows.append((what, values[0], target, "PASS" if all(test(v) for v in values) else "FAIL"))
    return rows


def main() -> list[tuple[str, str, float, str]]:
    table = []
    start = time.perf_counter()
    for module in MODULES:
        section = module.__name__.removeprefix("bench_")
        print(f"== {module.__name__}", flush=True)
        for name, value, unit in module.main():
            table.append((section, name, value, unit))
    total = time.perf_counter() - start

    print("\n== towercost benchmarks")
    for key, value in machine():
        print(f"{key:9s} {value}")
    width = max(len(name) for _, name, _, _ in table)
    print(f"\n{'section':10s} {'figure':{width}s} {'value':>12s} unit")
    print(f"{'-' * 10} {'-' * width} {'-' * 12} {'-' * 9}")
    for section, name, value, unit in table:
        print(f"{section:10s} {name:{width}s} {_text(value):>12s} {unit}")
    print(f"\n{'target (issues 7, 10)':42s} {'measured':>12s} {'target':>24s} verdict")
    for what, value, target, verdict in verdicts(table):
        shown = "-" if value is None else _text(value)
        print(f"{what:42s} {shown:>12s} {target:>24s} {verdict}")
    print(f"\nall benchmarks: {total:.1f} s")
    return table


if __name__ == "__main__":
    main()
