"""End-to-end tests of ``towercost sensitivity`` and ``towercost uncertainty``: JSON, plots, files, errors.

The numbers are held to the API (itself tested in test_uncertainty.py and
test_sensitivity.py); here the contract of the commands: JSON on standard
output, the closed form beside the estimate, files written whole and never
over a file without --force, one-line errors with exit 2.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from typer.testing import CliRunner

from towercost.cli import app

ROOT = Path(__file__).resolve().parents[1]
ABSORBER = ROOT / "scenarios" / "demo_absorber.toml"

PNG = b"\x89PNG\r\n\x1a\n"


def run(*args):
    try:
        runner = CliRunner(mix_stderr=False)
    except TypeError:
        runner = CliRunner()
    return runner.invoke(app, [str(a) for a in args])


def ok_json(result) -> dict:
    assert result.exit_code == 0, (result.output, result.exception)
    return json.loads(result.stdout)


def one_line_error(result, *fragments):
    assert result.exit_code == 2, (result.exit_code, result.output)
    lines = result.stderr.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("error: "), result.stderr
    for fragment in fragments:
        assert fragment in lines[0], lines[0]


def test_uncertainty_json_reports_the_estimate_with_the_closed_form(tmp_path):
    scenario = tmp_path / "one.toml"
    text = ABSORBER.read_text(encoding="utf-8")
    scenario.write_text(text + '\n[uncertainty]\nefficiency = { distribution = "fixed" }\n'
                               'k = { log_sd = 0.2, shared = "candidate" }\n', encoding="utf-8")
    record = ok_json(run("uncertainty", scenario, "--samples", 3000, "--seed", 4, "--reoptimize", 3, "--json"))
    p = record["probability_every_spec"]
    cf = record["closed_form"]
    assert record["samples"] == 3000 and record["seed"] == 4
    assert cf["probability"] is not None and "bisection" in cf["method"]
    assert abs(p["probability"] - cf["probability"]) <= 3 * p["standard_error"]
    assert set(record["outlet_mole_fraction"]) == {"toluene", "p-xylene"}
    assert record["annualized_USD_per_yr"]["p5"] < record["annualized_USD_per_yr"]["p95"]
    kinds = [m["kind"] for m in record["margin"]["designs"]]
    assert kinds == ["trays", "rate", "cheapest"]
    assert record["reoptimized"]["samples"] == 3
    assert record["design"]["agent"] == "light wash oil"


def test_uncertainty_same_seed_same_json_and_tables(tmp_path):
    args = ("uncertainty", ABSORBER, "--samples", 500, "--reoptimize", 0, "--json")
    first, second = ok_json(run(*args, "--seed", 7)), ok_json(run(*args, "--seed", 7))
    first.pop("seconds"), second.pop("seconds")
    assert first == second
    table = run("uncertainty", ABSORBER, "--samples", 500, "--reoptimize", 2, "--design", 2)
    assert table.exit_code == 0, table.output
    assert "Probability of meeting every spec" in table.stdout and "rank 2" in table.stdout
    assert "Design margin" in table.stdout and "Regret" in table.stdout


def test_plots_and_reports_are_written_once(tmp_path):
    out = tmp_path / "out"
    first = run("sensitivity", ABSORBER, "--plot", "--save", "--out", out)
    assert first.exit_code == 0, first.output
    assert (out / "demo_absorber-sensitivity.png").read_bytes().startswith(PNG)
    record = json.loads((out / "demo_absorber-sensitivity.json").read_text())
    assert record["inputs"][0]["swing"] >= record["inputs"][-1]["swing"]
    again = run("sensitivity", ABSORBER, "--plot", "--out", out)
    one_line_error(again, "exists", "--force")
    assert run("sensitivity", ABSORBER, "--plot", "--out", out, "--force").exit_code == 0
    mc = run("uncertainty", ABSORBER, "--samples", 400, "--reoptimize", 0, "--plot", "--out", out)
    assert mc.exit_code == 0, mc.output
    assert (out / "demo_absorber-uncertainty.png").read_bytes().startswith(PNG)


def test_sensitivity_json_names_every_input():
    record = ok_json(run("sensitivity", ABSORBER, "--change", 0.1, "--json"))
    names = {row["input"] for row in record["inputs"]}
    assert {"steam", "k[toluene]", "efficiency", "feed_flow", "inlet", "cost_index"} <= names
    row = next(r for r in record["inputs"] if r["input"] == "steam")
    assert row["low"]["change"] == pytest.approx(-0.1) and row["high"]["change"] == pytest.approx(0.1)
    assert row["high"]["fixed_design"]["annualized_USD_per_yr"] > record["nominal_best"]["annualized_USD_per_yr"]


@pytest.mark.parametrize("args, fragments", [
    (("--samples", 0), ("--samples",)),
    (("--confidence", 1.5), ("--confidence",)),
    (("--design", 0), ("--design",)),
    (("--design", 2, "--solvent", "glycol ether"), ("not both",)),
    (("--solvent", "glycol ether", "--trays", 10), ("--ratio",)),
    (("--solvent", "no such oil", "--trays", 10, "--ratio", 1.5), ("no such oil",)),
    (("--seed", -1), ("--seed",)),
])
def test_uncertainty_bad_options_are_one_line(args, fragments):
    one_line_error(run("uncertainty", ABSORBER, *args), *fragments)


def test_bad_uncertainty_table_is_one_line(tmp_path):
    scenario = tmp_path / "bad.toml"
    scenario.write_text(ABSORBER.read_text(encoding="utf-8")
                        + '\n[uncertainty.steam]\nlow = 1.3\nmode = 1.0\nhigh = 2.0\n', encoding="utf-8")
    one_line_error(run("sensitivity", scenario), "[uncertainty] steam", "low <= mode <= high")
    scenario.write_text(ABSORBER.read_text(encoding="utf-8") + '\n[uncertainty]\nchanges = { stem = 0.3 }\n',
                        encoding="utf-8")
    one_line_error(run("uncertainty", scenario), "stem")
    one_line_error(run("sensitivity", ABSORBER, "--change", 1.5), "--change")
