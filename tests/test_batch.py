"""Batch runs: good, bad and infeasible files; the same results serially, with local workers and with Dask.

The oracle is the single-file API: every good file's best cost must equal
``towercost.optimize`` (or ``optimize_site``) run on its own.
"""

from __future__ import annotations

import copy
import json
import tomllib
from pathlib import Path

import pytest
from typer.testing import CliRunner

import towercost
from towercost.select.batch import BAD_INPUT, DONE, EARLIER, INFEASIBLE, files_of, run_batch

ROOT = Path(__file__).resolve().parents[1]
ABSORBER = (ROOT / "scenarios" / "demo_absorber.toml").read_text(encoding="utf-8")


def _quick(text: str, **column) -> str:
    """The demo absorber made quick to optimize: fewer trays and rate levels."""
    data = tomllib.loads(text)
    lines = text.replace("trays = [2, 60]", f"trays = {list(column.get('trays', [8, 20]))}")
    lines = lines.replace("ratio_levels = 50", "ratio_levels = 8")
    assert data["column"]["trays"] == [2, 60]
    return lines


@pytest.fixture(scope="module")
def folder(tmp_path_factory) -> Path:
    """Three good files, one bad (a misspelt key), one infeasible (a spec no design reaches)."""
    root = tmp_path_factory.mktemp("batch")
    good = _quick(ABSORBER)
    (root / "a_good.toml").write_text(good, encoding="utf-8")
    (root / "b_good.toml").write_text(good.replace('flow = "900 kmol/h"', 'flow = "600 kmol/h"'), encoding="utf-8")
    (root / "c_good.toml").write_text(good.replace('price = "1.10 USD/kg"', 'price = "2.50 USD/kg"'),
                                      encoding="utf-8")
    (root / "d_bad.toml").write_text(good.replace("tray_spacing", "tray_spaceing"), encoding="utf-8")
    trays_only = good.replace('[[packing]]\npacking = "pall_ring_metal_50"', "")   # a packed bed reaches 1e-12
    (root / "e_infeasible.toml").write_text(trays_only.replace('outlet = "10 ppmv"', 'outlet = "1e-12"'),
                                            encoding="utf-8")
    return root


def _by_file(entries):
    return {Path(e.path).name: e for e in entries}


def _check(entries, folder):
    got = _by_file(entries)
    assert sorted(got) == ["a_good.toml", "b_good.toml", "c_good.toml", "d_bad.toml", "e_infeasible.toml"]
    for name in ("a_good.toml", "b_good.toml", "c_good.toml"):
        assert got[name].status == DONE, got[name]
        alone = towercost.optimize(folder / name, top=1).designs.annualized[0]
        assert got[name].annualized == pytest.approx(alone, rel=1e-12)
        assert json.loads(Path(got[name].result).read_text())["best"]["annualized_cost_USD_per_yr"] == \
            pytest.approx(alone, rel=1e-12)
    assert got["d_bad.toml"].status == BAD_INPUT and "tray_spacing" in got["d_bad.toml"].reason
    assert got["e_infeasible.toml"].status == INFEASIBLE and "no design meets" in got["e_infeasible.toml"].reason
    for e in entries:
        assert "\n" not in e.reason


def test_batch_serially(folder, tmp_path):
    _check(run_batch(files_of([str(folder)]), tmp_path), folder)


def test_batch_with_local_workers_gives_the_same(folder, tmp_path):
    serial = _by_file(run_batch(files_of([str(folder)]), tmp_path / "one"))
    parallel = _by_file(run_batch(files_of([str(folder)]), tmp_path / "two", workers=2))
    _check(list(parallel.values()), folder)
    for name, entry in serial.items():
        assert parallel[name].status == entry.status
        assert parallel[name].annualized == entry.annualized


def test_batch_on_a_local_dask_cluster_gives_the_same(folder, tmp_path):
    distributed = pytest.importorskip("distributed")
    with distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=True, dashboard_address=None) as cluster:
        entries = run_batch(files_of([str(folder)]), tmp_path, cluster=cluster.scheduler_address)
    _check(entries, folder)


def test_batch_resumes_without_recomputing(folder, tmp_path):
    first = _by_file(run_batch(files_of([str(folder / "a_good.toml")]), tmp_path))
    again = _by_file(run_batch(files_of([str(folder / "a_good.toml")]), tmp_path))
    assert first["a_good.toml"].status == DONE and again["a_good.toml"].status == EARLIER
    assert again["a_good.toml"].annualized == pytest.approx(first["a_good.toml"].annualized, rel=1e-15)
    forced = _by_file(run_batch(files_of([str(folder / "a_good.toml")]), tmp_path, force=True))
    assert forced["a_good.toml"].status == DONE


def test_batch_command_lists_failures_and_writes_a_summary(folder, tmp_path):
    from towercost.cli import app

    result = CliRunner().invoke(app, ["batch", str(folder), "--out", str(tmp_path)])
    assert result.exit_code == 0, result.output
    assert "3 of 5 files done, 2 failed" in result.stdout
    summaries = list(tmp_path.glob("batch-summary-*.csv"))
    assert len(summaries) == 1
    text = summaries[0].read_text()
    assert "bad input" in text and "infeasible" in text
    assert len(list(tmp_path.glob("*-result.json"))) == 3


def test_a_site_file_in_a_batch(tmp_path):
    entries = run_batch([ROOT / "scenarios" / "demo_site.toml"], tmp_path)
    assert entries[0].kind == "site" and entries[0].status == DONE
