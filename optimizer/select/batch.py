"""Batch runs: many scenario or site files, each optimized on its own, in parallel, never stopping at a failure.

Each file's result is written as it finishes (whole, through
``report.files.write_new``); a file whose result already exists is not
recomputed unless forced, so an interrupted batch resumes where it stopped.
Work goes to local worker processes by default, or to an existing Dask
distributed cluster (``cluster`` = its scheduler address); nothing here
schedules work itself.
"""

from __future__ import annotations

import glob
import json
import time
from collections.abc import Callable, Iterable
from dataclasses import dataclass
from pathlib import Path

#: Status of a batch entry.
DONE, EARLIER, BAD_INPUT, INFEASIBLE, INTERNAL = "done", "done earlier", "bad input", "infeasible", "internal error"


@dataclass
class BatchEntry:
    """One file of a batch and what became of it."""

    path: str
    kind: str                 # "scenario" or "site"
    status: str
    reason: str = ""          # one line, for failures
    annualized: float | None = None   # [USD/yr] of the best design or portfolio
    best: str = ""            # the best design in words
    result: str = ""          # the result file written
    seconds: float = 0.0


def files_of(arguments: Iterable[str]) -> list[Path]:
    """The TOML files named by folders (their *.toml, sorted), glob patterns and paths, without repeats."""
    found: list[Path] = []
    for argument in arguments:
        path = Path(argument)
        if path.is_dir():
            candidates = sorted(path.glob("*.toml"))
        elif any(ch in argument for ch in "*?["):
            candidates = sorted(Path(p) for p in glob.glob(argument))
        else:
            candidates = [path]
        found += [c for c in candidates if c not in found]
    return found


def result_name(path: Path) -> str:
    """The result file of an input file: its path without separators, so that like-named files do not collide."""
    stem = str(path.with_suffix("")).strip("/").replace("/", "__").replace("\\", "__")
    return f"{stem}-result.json"


def run_one(path: str, top: int = 5) -> dict:
    """Optimize one scenario or site file; a plain dict (picklable) with the status and the record as JSON text."""
    from towercost.errors import InfeasibleSpec, ScenarioError
    from towercost.report.records import result_record, to_json
    from towercost.scenario import load_scenario
    from towercost.scenario.site import is_site_file, load_site

    start = time.perf_counter()
    kind = "site" if is_site_file(path) else "scenario"
    out = {"path": path, "kind": kind}
    try:
        if kind == "site":
            from towercost.report.site import site_record
            from towercost.select.site import optimize_site

            result = optimize_site(load_site(path), top=top)
            best = result.portfolios[0]
            words = "; ".join(f"{n}: {s.case.agents[int(d.agent[0])]} / {int(d.trays[0])} trays"
                              for n, s, d in zip(result.units, result.spaces, best.designs))
            out.update(status=DONE, annualized=best.annualized, best=words, json=to_json(site_record(result)))
        else:
            from towercost.select.ranking import optimize

            result = optimize(load_scenario(path), top=top)
            d = result.designs
            out.update(status=DONE, annualized=float(d.annualized[0]),
                       best=f"{result.case.agents[int(d.agent[0])]} / {int(d.trays[0])} trays",
                       json=to_json(result_record(result)))
    except ScenarioError as exc:
        out.update(status=BAD_INPUT, reason=str(exc))
    except InfeasibleSpec as exc:
        out.update(status=INFEASIBLE, reason=str(exc))
    except Exception as exc:  # noqa: BLE001 - a bug in one file must not stop the batch
        out.update(status=INTERNAL, reason=f"{type(exc).__name__}: {exc}")
    out["seconds"] = time.perf_counter() - start
    return out


def _entry_from(out: dict, result: str = "") -> BatchEntry:
    return BatchEntry(out["path"], out["kind"], out["status"], out.get("reason", ""), out.get("annualized"),
                      out.get("best", ""), result, out.get("seconds", 0.0))


def _earlier(path: Path, result_file: Path) -> BatchEntry:
    """An entry for a file whose result a previous run wrote."""
    record = json.loads(result_file.read_text(encoding="utf-8"))
    best = record.get("best", {})
    cost = best.get("annualized_cost_USD_per_yr")
    kind = "site" if "site" in record else "scenario"
    return BatchEntry(str(path), kind, EARLIER, annualized=cost, result=str(result_file))


def run_batch(paths: list[Path], out: Path, *, workers: int = 1, cluster: str | None = None, force: bool = False,
              top: int = 5, progress: Callable[[int, int], None] | None = None) -> list[BatchEntry]:
    """Optimize every file; write each result as it finishes; return one entry per file, in input order."""
    from towercost.report.files import write_new

    out = Path(out)
    entries: dict[str, BatchEntry] = {}
    todo = []
    for path in paths:
        result_file = out / result_name(path)
        if result_file.exists() and not force:
            entries[str(path)] = _earlier(path, result_file)
        else:
            todo.append(str(path))
    done = len(entries)
    if progress is not None:
        progress(done, len(paths))

    def finish(result: dict) -> None:
        nonlocal done
        written = ""
        if result["status"] == DONE:
            written = str(write_new(out / result_name(Path(result["path"])), result["json"], force=force))
        entries[result["path"]] = _entry_from(result, written)
        done += 1
        if progress is not None:
            progress(done, len(paths))

    if not todo:
        pass
    elif cluster is not None:
        from distributed import Client, as_completed

        with Client(cluster) as client:
            futures = client.map(run_one, todo, top=top, pure=False)
            for future in as_completed(futures):
                finish(future.result())
    elif workers > 1:
        from concurrent.futures import ProcessPoolExecutor, as_completed as completed

        with ProcessPoolExecutor(max_workers=workers) as pool:
            futures = [pool.submit(run_one, path, top) for path in todo]
            for future in completed(futures):
                finish(future.result())
    else:
        for path in todo:
            finish(run_one(path, top))
    return [entries[str(p)] for p in paths]


def summary_frame(entries: list[BatchEntry]):
    """The batch as a table (pandas), one row per file."""
    import pandas as pd

    return pd.DataFrame([{"file": e.path, "kind": e.kind, "status": e.status, "annualized_USD_yr": e.annualized,
                          "best": e.best, "reason": e.reason, "result": e.result, "seconds": e.seconds}
                         for e in entries])
