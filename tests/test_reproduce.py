"""Reproducible designs at the command line: identifiers, --diameter, --version, --verbose, stable JSON, 80 columns.

The reference for each reproduced design is the ranked record itself: the
sheet ``evaluate --design ID`` prints must equal it field for field (the
same floats, not merely close ones).
"""

from __future__ import annotations

import io
import math
import json
import re
from pathlib import Path

import pytest
from rich.console import Console
from typer.testing import CliRunner

from towercost.cli import app
from towercost.report import equipment as eq
from towercost.report import terminal
from towercost.scenario import load_scenario
from towercost.select import ranking

ROOT = Path(__file__).resolve().parents[1]
DEMOS = {"absorber": ROOT / "scenarios" / "demo_absorber.toml",
         "stripper": ROOT / "scenarios" / "demo_air_stripper.toml"}

#: Keys of a ranked record that belong to the ranking, not to the design.
RANKING_KEYS = ("rank", "above_best", "on_search_bounds")   # what only a ranking can say of a design


def run(*args):
    return CliRunner().invoke(app, [str(a) for a in args])


def ok(result):
    assert result.exit_code == 0, (result.exit_code, result.output, result.exception)
    return result


@pytest.fixture(scope="module", params=list(DEMOS), ids=list(DEMOS))
def ranked(request):
    path = DEMOS[request.param]
    return path, json.loads(ok(run("optimize", path, "--json")).stdout)


def test_every_ranked_design_is_reproduced_by_its_identifier(ranked):
    path, record = ranked
    assert len(record["alternatives"]) == 10
    for alternative in record["alternatives"]:
        sheet = json.loads(ok(run("evaluate", path, "--design", alternative["design_id"], "--json")).stdout)
        expected = {k: v for k, v in alternative.items() if k not in RANKING_KEYS}
        got = {k: sheet[k] for k in expected}
        assert got == expected, alternative["design_id"]
        assert sheet["spec_note"] is None


def test_the_per_candidate_best_is_reproduced_too(ranked):
    path, record = ranked
    for best in record["per_agent_best"]:
        sheet = json.loads(ok(run("evaluate", path, "--design", best["design_id"], "--json")).stdout)
        assert sheet["annualized_cost_USD_per_yr"] == best["annualized_cost_USD_per_yr"]
        assert isinstance(best["rank"], int) and best["rank"] >= 1


def internals_options(design: dict) -> list:
    """The options naming a ranked design's internals: --trays N, or --packing NAME for a packed bed."""
    packed = design["column"].get("packed")
    return ["--packing", packed["packing"]] if packed else ["--trays", design["trays"]]


def best_with_trays(record: dict) -> dict:
    """The best tray design of a ranking (the best design, or the best of a candidate with trays)."""
    return next(d for d in [record["best"]] + record["per_agent_best"] if not d["column"].get("packed"))


def test_diameter_option_gives_the_same_sheet_as_the_identifier(ranked):
    path, record = ranked
    best = record["best"]
    inches = best["column"]["diameter_m"] / 0.0254
    sheet = json.loads(ok(run("evaluate", path, "--solvent", best["agent"], *internals_options(best),
                              "--rate", f"{best['rate_mol_s']!r} mol/s", "--diameter", f"{inches!r} in", "--json")).stdout)
    assert sheet["column"]["diameter_m"] == pytest.approx(best["column"]["diameter_m"], rel=1e-15)
    assert sheet["annualized_cost_USD_per_yr"] == pytest.approx(best["annualized_cost_USD_per_yr"], rel=1e-12)


def test_evaluate_echoes_the_conditions(ranked):
    path, record = ranked
    sheet = json.loads(ok(run("evaluate", path, "--design", record["best"]["design_id"], "--json")).stdout)
    for key in ("temperature_K", "pressure_Pa", "feed_flow_mol_s"):
        assert sheet["scenario"][key] == record["scenario"][key]
    assert sheet["economics"]["capital_recovery_factor_per_yr"] > 0


def test_design_with_other_decision_options_is_refused():
    path = DEMOS["absorber"]
    record = json.loads(ok(run("optimize", path, "--json", "--top", 1)).stdout)
    result = run("evaluate", path, "--design", record["best"]["design_id"], "--trays", 5)
    assert result.exit_code == 2 and "--trays" in result.output


def test_typed_ratio_that_misses_by_rounding_says_so(ranked):
    # A tray design on the spec (a packed bed's height follows its rate: it never misses by rounding).
    path, record = ranked
    best = best_with_trays(record)
    cut = f"{math.floor(best['ratio_to_minimum'] * 1000) / 1000:.3f}"     # the table's old three decimals, cut
    result = run("evaluate", path, "--solvent", best["agent"], "--trays", best["trays"], "--ratio", cut)
    assert result.exit_code == 4, (result.exit_code, result.output)     # 4: the design asked for misses the spec
    text = " ".join(result.stdout.split())
    assert "DOES NOT MEET THE SPEC" in text and "by rounding" in text
    least = re.search(r"the least \S+ that meets it is ([0-9.]+)", text).group(1)
    again = json.loads(ok(run("evaluate", path, "--solvent", best["agent"], "--trays", best["trays"],
                              "--ratio", least, "--json")).stdout)
    assert again["meets_spec"] is True


def test_printed_ratio_in_the_table_meets_the_spec(ranked):
    path, record = ranked
    for best in (record["best"], best_with_trays(record)):
        again = json.loads(ok(run("evaluate", path, "--solvent", best["agent"], *internals_options(best), "--ratio",
                                  best["ratio_to_minimum_text"], "--diameter", repr(best["column"]["diameter_m"]),
                                  "--json")).stdout)
        assert again["meets_spec"] is True
        assert abs(again["annualized_cost_USD_per_yr"] - best["annualized_cost_USD_per_yr"]) < 0.5


def test_version():
    import towercost

    result = ok(run("--version"))
    assert result.stdout.strip() == f"towercost {towercost.__version__}"


def test_json_is_the_same_text_on_every_run_and_saved_report_has_the_date(tmp_path):
    path = DEMOS["absorber"]
    first, second = (ok(run("optimize", path, "--json")).stdout for _ in range(2))
    assert first == second
    record = json.loads(first)
    assert "run" not in record and not any(k.endswith("_seconds") for k in record["solver"])
    assert record["tool"]["name"] == "towercost"
    assert record["inputs"]["feed"]["flow"] == pytest.approx(250.0)      # 900 kmol/h read as mol/s
    assert record["inputs"]["feed"]["temperature"] == pytest.approx(303.15)
    ok(run("optimize", path, "--save", "--out", tmp_path))
    saved = json.loads((tmp_path / "demo_absorber-report.json").read_text(encoding="utf-8"))
    assert re.fullmatch(r"\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d\+00:00", saved["run"]["date"])
    assert "evaluate_seconds" not in saved["solver"]       # timings only when asked, so two saves compare
    assert {k: v for k, v in saved.items() if k != "run"} == record
    ok(run("optimize", path, "--save", "--timings", "--out", tmp_path / "timed"))
    timed = json.loads((tmp_path / "timed" / "demo_absorber-report.json").read_text(encoding="utf-8"))
    assert timed["solver"]["evaluate_seconds"] > 0


def test_solver_diagnostics_only_with_verbose():
    path = DEMOS["absorber"]
    quiet, loud = ok(run("optimize", path)).stdout, ok(run("optimize", path, "--verbose")).stdout
    assert "binaries" not in quiet and "binaries" in loud
    assert "evaluate_seconds" in json.loads(ok(run("optimize", path, "--json", "--verbose")).stdout)["solver"]


# --------------------------------------------------------------------------- fitting 80 columns


def _printed(width: int, draw) -> str:
    buffer = io.StringIO()
    draw(Console(file=buffer, width=width, force_terminal=False, color_system=None))
    return buffer.getvalue()


def _shown(value: float, digits: int) -> str:
    return f"{value:,.{digits}f}"


@pytest.mark.parametrize("name", list(DEMOS))
@pytest.mark.parametrize("width", [80, 120])
def test_ranking_fits_the_width_and_cuts_no_value(name, width):
    result = ranking.optimize(load_scenario(DEMOS[name]), top=10)
    text = _printed(width, lambda c: terminal.print_ranking(c, result))
    lines = text.splitlines()
    assert max(len(line) for line in lines) <= width
    assert "…" not in text
    from towercost.report.ids import ids_of
    from towercost.report.ratios import ratio_texts

    d = result.designs
    for i, (design_id, ratio) in enumerate(zip(ids_of(result.case, d), ratio_texts(result.case, d))):
        row = next(k for k, line in enumerate(lines) if line.endswith(design_id))
        # the design's line: the nearest above its identifier that starts with its rank (a long name wraps)
        first = next(k for k in range(row - 1, -1, -1) if re.match(rf"^ {{0,2}}{i + 1} ", lines[k]))
        values = lines[first]
        for shown in (ratio, _shown(d.annualized[i] / 1e3, 1), _shown(d.diameter[i], 3)):
            assert re.search(rf"(^|\s){re.escape(shown)}(\s|$)", values), (shown, values)
        # the internals: the trays (or a packed bed's height) somewhere in the design's lines, wrapped or not
        block = " ".join(" ".join(lines[first:row]).split())
        count = f"{d.packed_height[i]:.1f} m" if int(d.internals[i]) >= 2 else str(int(d.trays[i]))
        assert re.search(rf"(^|\s){re.escape(count)}(\s|$)", block), (count, block)
    if width >= 120:
        assert "net operating" in text and "height" in text


@pytest.mark.parametrize("name", list(DEMOS))
def test_design_sheet_and_equipment_fit_80_columns(name):
    scenario = load_scenario(DEMOS[name])
    result = ranking.optimize(scenario, top=1)
    case, d = result.case, result.designs
    sheet = _printed(80, lambda c: terminal.print_design(c, case, d, result.warnings, "sheet"))
    rows = eq.equipment_list(case, d)
    listing = _printed(80, lambda c: terminal.print_equipment(c, rows, eq.utilities(d), "equipment"))
    for text in (sheet, listing):
        table_lines = [line for line in text.splitlines() if not line.startswith(("  - ", "Preliminary"))]
        assert max(len(line) for line in table_lines) <= 80
        assert "…" not in text
    assert f"{d.annualized[0]:,.0f}" in sheet
    for row in rows:
        assert f"{row['bare_module_USD']:,.0f}" in listing
