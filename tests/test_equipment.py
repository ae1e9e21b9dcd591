"""The equipment list and utilities: they agree with the design sheet, and every file format holds the same values.

References: the design sheet's own JSON (``evaluate --design ID --json``) for
the costs, to the cent; the CSV as read back by Python's csv module and the
XLSX as read back by openpyxl (a reference library) for the files.
"""

from __future__ import annotations

import csv
import json
import math
from pathlib import Path

import openpyxl
import pytest
from typer.testing import CliRunner

from towercost.cli import app
from towercost.report import equipment as eq

ROOT = Path(__file__).resolve().parents[1]
ABSORBER = ROOT / "scenarios" / "demo_absorber.toml"
STRIPPER = ROOT / "scenarios" / "demo_air_stripper.toml"
TRICKY = '=HYPERLINK("x")'


def run(*args):
    result = CliRunner().invoke(app, [str(a) for a in args])
    assert result.exit_code == 0, (result.output, result.exception)
    return result


def _cents(value: float) -> int:
    return round(value * 100)


@pytest.mark.parametrize("path", [ABSORBER, STRIPPER], ids=["absorber", "stripper"])
def test_equipment_rows_agree_with_the_sheet_to_the_cent(tmp_path, path):
    best = json.loads(run("optimize", path, "--json", "--top", 3).stdout)["alternatives"][2]
    sheet = json.loads(run("evaluate", path, "--design", best["design_id"], "--json").stdout)
    target = tmp_path / "list.json"
    run("equipment", path, "--design", best["design_id"], "--out", target)
    rows = json.loads(target.read_text(encoding="utf-8"))["rows"]
    assert [r["tag"] for r in rows] == [r["tag"] for r in sheet["equipment"]]
    for row, item in zip(rows, sheet["equipment"]):
        assert _cents(row["purchased_USD"]) == _cents(item["purchased_USD"])
        assert _cents(row["bare_module_USD"]) == _cents(item["bare_module_USD"])
        assert row["range_held"] == item["range_held"] and row["correlation"] == item["correlation"]
        assert row["design_id"] == best["design_id"]
    # each row is rounded to the cent, so their sum may differ from the rounded total by half a cent a row
    assert abs(sum(r["bare_module_USD"] for r in rows) - sheet["capital_USD"]["bare_module_total"]) <= 0.005 * len(rows)
    vessel = next(r for r in rows if r["correlation"].startswith("vessel"))
    # figures other than costs are written to 12 significant digits
    assert math.isclose(vessel["wall_thickness_mm"], sheet["column"]["shell_thickness_m"] * 1000, rel_tol=1e-11)
    assert math.isclose(vessel["weight_kg"], sheet["column"]["shell_weight_kg"], rel_tol=1e-11)
    assert math.isclose(vessel["design_pressure_kPa_gauge"], sheet["column"]["design_pressure_Pa_gauge"] / 1000,
                        rel_tol=1e-12)


def test_utilities_summary_matches_the_consumption_rows():
    best = json.loads(run("optimize", ABSORBER, "--json", "--top", 1).stdout)["best"]
    by_use = {u["use"]: u for u in best["consumption"]}
    for line in best["utilities_summary"]:
        row = by_use[line["use"]]
        factor = {"kW": 1e-3, "kg/h": 3600.0, "m3/h": 3600.0, "kmol/h": 3.6}[line["unit"]]
        assert math.isclose(line["rate"], row["rate"] * factor, rel_tol=1e-12)
        assert line["USD_per_yr"] == row.get("cost_USD_per_yr", row.get("credit_USD_per_yr"))
    assert math.isclose(best["utilities"]["cooling_water_m3_s"], by_use["cooling_water"]["rate"], rel_tol=1e-12)


@pytest.fixture(scope="module")
def tricky_scenario(tmp_path_factory) -> Path:
    text = ABSORBER.read_text(encoding="utf-8").replace('name = "light wash oil"', f"name = '{TRICKY}'", 1)
    path = tmp_path_factory.mktemp("tricky") / "tricky.toml"
    path.write_text(text, encoding="utf-8")
    return path


def test_xlsx_holds_the_csv_values_and_a_formula_name_stays_text(tmp_path, tricky_scenario):
    run("optimize", tricky_scenario, "--top", 3, "--equipment", tmp_path / "list.csv")
    run("optimize", tricky_scenario, "--top", 3, "--equipment", tmp_path / "list.xlsx")
    with open(tmp_path / "list.csv", newline="", encoding="utf-8") as handle:
        rows = list(csv.reader(handle))
    sheet = openpyxl.load_workbook(tmp_path / "list.xlsx").active
    cells = [[c for c in row] for row in sheet.iter_rows()]
    assert len(cells) == len(rows) > 4
    keys = rows[0]
    assert [c.value for c in cells[0]] == [eq.COLUMNS[k] for k in keys]
    seen_tricky = 0
    for csv_row, xlsx_row in zip(rows[1:], cells[1:]):
        for key, text, cell in zip(keys, csv_row, xlsx_row):
            if cell.value is None:
                assert text == "", key
            elif isinstance(cell.value, bool):
                assert text == str(cell.value), key
            elif isinstance(cell.value, (int, float)):
                assert float(text) == cell.value, key          # the same float, not a rounded one
            else:
                assert cell.data_type == "s", (key, cell.value)   # text, never a formula
                # the CSV marks text a spreadsheet would read as a formula with a leading apostrophe
                assert text == ("'" + cell.value if cell.value.startswith(eq.FORMULA_START) else cell.value), key
            if cell.value == TRICKY:
                seen_tricky += 1
                assert text == "'" + TRICKY
    assert seen_tricky > 0


def test_designs_csv_keeps_a_formula_name_as_text(tmp_path, tricky_scenario):
    run("optimize", tricky_scenario, "--top", 3, "--csv", "--out", tmp_path)
    with open(tmp_path / "tricky-designs.csv", newline="", encoding="utf-8") as handle:
        rows = list(csv.DictReader(handle))
    assert rows[0]["agent"] == "'" + TRICKY
    assert not rows[0]["design_id"].startswith(eq.FORMULA_START)


def test_equipment_refuses_an_unknown_extension_and_an_existing_file(tmp_path):
    result = CliRunner().invoke(app, ["equipment", str(ABSORBER), "--out", str(tmp_path / "list.txt")])
    assert result.exit_code == 2 and ".xlsx" in result.output
    target = tmp_path / "list.csv"
    target.write_text("keep\n", encoding="utf-8")
    result = CliRunner().invoke(app, ["equipment", str(ABSORBER), "--out", str(target)])
    assert result.exit_code == 2 and "--force" in result.output
    assert target.read_text(encoding="utf-8") == "keep\n"
