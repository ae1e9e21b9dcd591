"""Throughput of the Kremser relation and its inverses (towercost.models.kremser).

Each figure is the best of five timed calls on 10**6 points, in one process
on one core. Points are drawn over the stated accurate range: factors
1e-3 .. 1e3 (log-uniform), stages 0 .. 500, fractions 1e-12 .. 1 - 1e-14.

Run: .venv/bin/python benchmarks/bench_kremser.py
"""

from __future__ import annotations

import time

import numpy as np


from towercost.models import kremser

POINTS = 10**6
REPEATS = 5


def _best_rate(function, *args, **kwargs) -> float:
    """Points per second of the fastest of REPEATS calls."""
    best = float("inf")
    for _ in range(REPEATS):
        start = time.perf_counter()
        function(*args, **kwargs)
        best = min(best, time.perf_counter() - start)
    return POINTS / best


def main() -> list[tuple[str, float, str]]:
    rng = np.random.default_rng(20240601)
    factor = 10.0 ** rng.uniform(-3.0, 3.0, POINTS)
    stages = rng.uniform(0.0, 500.0, POINTS)
    whole_stages = rng.integers(1, 501, POINTS).astype(float)
    remaining = kremser.fraction_remaining(factor, whole_stages)
    usable = (remaining > 1e-12) & (remaining < 1.0 - 1e-14)
    target = np.where(usable, remaining, 0.5)
    reachable = np.maximum(target, np.where(factor < 1.0, 1.0 - factor, 0.0) * (1.0 + 1e-9) + 1e-15)
    reachable = np.minimum(reachable, 1.0 - 1e-14)

    rows = [
        ("fraction_remaining", _best_rate(kremser.fraction_remaining, factor, stages), "points/s"),
        ("fraction_removed", _best_rate(kremser.fraction_removed, factor, stages), "points/s"),
        ("stages_for_fraction", _best_rate(kremser.stages_for_fraction, reachable, factor), "points/s"),
        ("factor_for_fraction", _best_rate(kremser.factor_for_fraction, target, whole_stages), "points/s"),
    ]
    for name, value, unit in rows:
        print(f"{name:24s} {value:12.4g} {unit}")
    return rows


if __name__ == "__main__":
    main()
