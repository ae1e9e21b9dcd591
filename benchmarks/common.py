"""Timing helpers shared by the benchmarks: best-of-N calls, whole-process runs, paired ratios.

A speed target stated as a ratio is measured side by side in one run: the
two commands (or calls) alternate A B A B ..., and the ratio is taken pair
by pair, its median reported, so that a machine whose speed drifts during
the run moves both halves of a pair alike.
"""

from __future__ import annotations

import os
import statistics
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
REPEATS = 5
CLI_REPEATS = 5


def best_seconds(function, *args, repeats: int = REPEATS, **kwargs) -> tuple[float, object]:
    """Seconds of the fastest of ``repeats`` calls, and the last call's result."""
    best, result = float("inf"), None
    for _ in range(repeats):
        start = time.perf_counter()
        result = function(*args, **kwargs)
        best = min(best, time.perf_counter() - start)
    return best, result


def towercost_command() -> str:
    """The ``towercost`` script of the interpreter running this file (the venv's), else the checkout's."""
    here = Path(sys.executable).parent / "towercost"
    return str(here if here.exists() else ROOT / ".venv" / "bin" / "towercost")


def run_once(arguments: list[str]) -> float:
    """Wall seconds of one ``towercost arguments`` process, output to a pipe."""
    command = [towercost_command(), *arguments]
    env = dict(os.environ, COLUMNS="120")
    start = time.perf_counter()
    done = subprocess.run(command, cwd=ROOT, stdout=subprocess.PIPE, stderr=subprocess.PIPE, env=env)
    seconds = time.perf_counter() - start
    if done.returncode != 0:
        raise RuntimeError(f"{' '.join(command)} exited {done.returncode}: {done.stderr.decode()[-500:]}")
    return seconds


def cli_seconds(arguments: list[str], repeats: int = CLI_REPEATS) -> float:
    """Median wall seconds of ``repeats`` runs of ``towercost arguments`` after one warm-up run."""
    run_once(arguments)
    return statistics.median(run_once(arguments) for _ in range(repeats))


def paired(first, second, pairs: int = CLI_REPEATS) -> tuple[float, float, float]:
    """(median of first, median of second, median of first/second pair by pair); one warm-up of each."""
    first()
    second()
    a, b = [], []
    for _ in range(pairs):
        a.append(first())
        b.append(second())
    return statistics.median(a), statistics.median(b), statistics.median(x / y for x, y in zip(a, b))


def timed(function, *args, **kwargs):
    """A no-argument callable returning the seconds one call of ``function(*args, **kwargs)`` takes."""
    def once() -> float:
        start = time.perf_counter()
        function(*args, **kwargs)
        return time.perf_counter() - start
    return once
