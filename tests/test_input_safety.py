"""Regression tests for input that cannot be misread: one named test per failure class of the hostile-input probe.

Each class the probe found (bare numbers read in SI, misread unit text,
gas units for water, non-finite and extreme values accepted, unit text that
raised, a schema that was not JSON) is reproduced here from the demos and
must now give what the issue asks: a refusal of one line naming the file,
the field and the value, or the right number.

References for the numbers: pint's default registry and scipy.constants
(CODATA 2018) as independent converters; chemicals.utils.ws_to_zs for mass
to mole fractions; NIST Special Publication 811, 2008 ed., Appendix B for
exact unit definitions (value from memory); jsonschema's Draft202012Validator
for the schema.
"""

from __future__ import annotations

import json
import math
import tomllib
from pathlib import Path

import jsonschema
import pint
import pytest
import scipy.constants as sc
from chemicals.utils import ws_to_zs
from typer.testing import CliRunner

from towercost.cli import app
from towercost.errors import ScenarioError
from towercost.scenario import load_scenario, parse_scenario
from towercost.scenario.editor import json_text
from towercost.scenario.units import to_si

ROOT = Path(__file__).resolve().parents[1]
ABSORBER = ROOT / "scenarios" / "demo_absorber.toml"
STRIPPER = ROOT / "scenarios" / "demo_air_stripper.toml"
BUNDLED = [p for p in sorted((ROOT / "scenarios").glob("*.toml")) + sorted((ROOT / "scenarios" / "site").glob("*.toml"))
           + sorted((ROOT / "tests" / "data").glob("*.toml")) + [ROOT / "benchmarks" / "scenarios" / "six_solvents.toml"]
           if "[site]" not in p.read_text(encoding="utf-8")]   # site files are not scenarios: they name scenarios
LIGHT = "light wash oil"


def variant(tmp_path: Path, base: Path, *replacements: tuple[str, str], name: str = "case.toml") -> Path:
    text = base.read_text(encoding="utf-8")
    for old, new in replacements:
        assert old in text, old
        text = text.replace(old, new, 1)
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


def run(*args):
    return CliRunner().invoke(app, [str(a) for a in args])


def refused(path: Path, *fragments: str, command=("optimize",)) -> str:
    """The one line ``towercost optimize path`` exits 2 with; it names the file and holds every fragment."""
    result = run(*command, path)
    assert result.exit_code == 2, (result.stdout, result.stderr, result.exception)
    assert result.exception is None or isinstance(result.exception, SystemExit), result.exception
    lines = result.stderr.strip().splitlines()
    assert len(lines) == 1, result.stderr
    line = lines[0]
    assert line.startswith(f"error: {path}"), line
    assert "Traceback" not in result.stderr and "array(" not in line and len(line) < 500, line
    for fragment in fragments:
        assert fragment in line, (fragment, line)
    return line


# --------------------------------------------------------------------------- bare numbers


@pytest.mark.parametrize("old, new, fragments", [
    # the probe's cases: each was read in SI without a word
    ('electricity = "0.09 USD/kWh"', "electricity = 0.09", ["[economics] electricity", '"0.09 USD/kWh"']),
    ('steam = "30 USD/t"', "steam = 30", ["[economics] steam", '"30 USD/t"']),
    ('temperature = "30 degC"', "temperature = 30", ["[feed] temperature", '"30 degC"']),
    ('pressure = "1.15 bara"', "pressure = 1.15", ["[feed] pressure", '"1.15 bara"']),
    ('tray_spacing = "24 in"', "tray_spacing = 0.6", ["[column] tray_spacing", "no unit"]),
    ('life = "15 yr"', "life = 15", ["[economics] life", '"15 yr"']),
])
def test_bare_number_in_a_dimensional_field_is_refused_with_an_example(tmp_path, old, new, fragments):
    refused(variant(tmp_path, ABSORBER, (old, new)), "has no unit", *fragments)


def test_dimensionless_fields_take_bare_numbers():
    scenario = load_scenario(ABSORBER)
    assert scenario.column.flood_fraction == 0.80 and scenario.economics.interest == 0.10
    assert scenario.solvent[2].k["toluene"] == 0.12 and scenario.spec[1].removal == 0.98


def test_thirty_C_is_refused_with_a_hint_to_write_degC(tmp_path):
    refused(variant(tmp_path, ABSORBER, ('temperature = "30 degC"', 'temperature = "30 C"')),
            "'30 C'", "degC", "coulomb")


def test_plain_bar_or_psi_at_the_column_is_refused_as_gauge_or_absolute(tmp_path):
    refused(variant(tmp_path, ABSORBER, ('pressure = "1.15 bara"', 'pressure = "1.15 bar"')), "bara", "barg")
    refused(variant(tmp_path, ABSORBER, ('pressure = "1.15 bara"', 'pressure = "16.7 psi"')), "psia", "psig")


# --------------------------------------------------------------------------- the trade's units


def test_absolute_and_gauge_pressures_against_the_stated_atmosphere(tmp_path):
    # bar = 1e5 Pa and psi = 6894.757... Pa exactly (NIST SP 811, value from memory); pint as the converter.
    reference = pint.UnitRegistry()
    assert to_si("1.15 bara", "Pa") == pytest.approx(115_000.0, rel=1e-15)
    assert to_si("16.7 psia", "Pa") == pytest.approx(reference.Quantity(16.7, "psi").to("Pa").magnitude, rel=1e-14)
    assert to_si("0.5 barg", "Pa") == pytest.approx(50_000.0 + sc.atm, rel=1e-15)
    assert to_si("30 psig", "Pa") == pytest.approx(reference.Quantity(30, "psi").to("Pa").magnitude + sc.atm,
                                                   rel=1e-14)
    path = variant(tmp_path, ABSORBER, ('pressure = "1.15 bara"', 'pressure = "0.25 barg"'),
                   ("[case]", '[units]\natmosphere = "95 kPa"   # a site at altitude, invented\n\n[case]'))
    assert load_scenario(path).feed.pressure == pytest.approx(25_000.0 + 95_000.0, rel=1e-15)


def test_normal_and_standard_gas_volumes_use_the_stated_conditions(tmp_path):
    # Ideal gas n = P V / (R T), R from scipy.constants (CODATA 2018): 0 degC and 1 atm by default for Nm3,
    # 60 degF and 1 atm for scf; about 379.5 scf per lbmol at 60 degF (value from memory).
    molar = sc.atm / (sc.R * sc.zero_Celsius)                         # mol per Nm3
    assert to_si("3600 Nm3/h", "mol/s") == pytest.approx(molar, rel=1e-14)
    lbmol_scf = 453.59237 / (sc.atm * 0.3048**3 / (sc.R * (sc.zero_Celsius + (60 - 32) / 1.8)))
    assert lbmol_scf == pytest.approx(379.5, rel=2e-4)
    assert to_si("60 scfm", "lbmol/h") == pytest.approx(3600 / lbmol_scf, rel=1e-12)
    path = variant(tmp_path, ABSORBER, ('flow = "900 kmol/h"', 'flow = "20000 Nm3/h"'),
                   ("[case]", '[units]\nnormal_temperature = "15 degC"   # invented site convention\n\n[case]'))
    flow = load_scenario(path).feed.flow
    assert flow == pytest.approx(20000 / 3600 * sc.atm / (sc.R * (sc.zero_Celsius + 15)), rel=1e-13)


@pytest.mark.parametrize("text, unit, reference", [
    ("1984.16 lbmol/h", "mol/s", ("lb * 1984.16 / hour", "g/s")),     # a pound-mole per hour: 453.59237 mol/h
    ("264 gpm", "m^3/s", ("264 gallon/minute", "m**3/s")),
    ("86 degF", "K", ((86, "degF"), "K")),
    ("0.09 USD/kWh", "USD/J", ("0.09 / kWh", "1/J")),
    ("30 USD/t", "USD/kg", ("30 / t", "1/kg")),
    ("0.04 USD/m3", "USD/m^3", ("0.04 / m**3", "1/m**3")),
    ("0.5 USD/lb", "USD/kg", ("0.5 / lb", "1/kg")),
])
def test_trade_units_against_pint_default_registry(text, unit, reference):
    expression, target = reference
    quantity = pint.UnitRegistry().Quantity
    expected = (quantity(*expression) if isinstance(expression, tuple) else quantity(expression)).to(target).magnitude
    assert to_si(text, unit) == pytest.approx(expected, rel=1e-13)


# --------------------------------------------------------------------------- concentrations per phase


def test_ppm_alone_is_refused_in_water_and_in_gas(tmp_path):
    refused(variant(tmp_path, STRIPPER, ('trichloroethylene = "2.0e-7"', 'trichloroethylene = "1.5 ppm"')),
            "'1.5 ppm'", "ppmw")
    refused(variant(tmp_path, ABSORBER, ('toluene = "500 ppmv"', 'toluene = "500 ppm"')), "'500 ppm'", "ppmv")


def test_gas_units_in_water_and_liquid_units_in_gas_are_refused(tmp_path):
    refused(variant(tmp_path, STRIPPER, ('trichloroethylene = "2.0e-7"', 'trichloroethylene = "0.2 ppmv"')),
            "gas unit")
    refused(variant(tmp_path, ABSORBER, ('toluene = "500 ppmv"', 'toluene = "500 mg/L"')), "liquid unit")


@pytest.mark.parametrize("text, mass_fraction", [
    ("1.5 ppmw", 1.5e-6), ("1.5 mg/L", 1.5e-3 / 999.1), ("5 ug/L", 5e-6 / 999.1), ("1500 ppbw", 1.5e-6),
])
def test_liquid_concentrations_convert_with_density_and_molar_masses(tmp_path, text, mass_fraction):
    # Reference: chemicals.utils.ws_to_zs (mass to mole fractions); mg/L is kg/m3 x 1e-3 over the
    # water's density (999.1 kg/m3 in the demo).
    path = variant(tmp_path, STRIPPER, ('trichloroethylene = "2.0e-7"', f'trichloroethylene = "{text}"'))
    x = load_scenario(path).feed.composition["trichloroethylene"]
    expected = ws_to_zs([mass_fraction, 1 - mass_fraction], [131.38834, 18.015])[0]
    assert x == pytest.approx(expected, rel=1e-12)


def test_mass_concentration_without_the_solute_molar_mass_asks_for_it(tmp_path):
    path = variant(tmp_path, STRIPPER, ('trichloroethylene = "2.0e-7"', 'trichloroethylene = "1.5 mg/L"'),
                   ('[solute.trichloroethylene]\nmolar_mass = "131.38834 g/mol"', ""))
    refused(path, "molar mass", "[solute.")


def test_water_prints_in_the_unit_the_scenario_used(tmp_path):
    path = variant(tmp_path, STRIPPER, ('trichloroethylene = "2.0e-7"', 'trichloroethylene = "1.5 mg/L"'),
                   ('outlet = "6.8e-10"', 'outlet = "5 ug/L"'))
    record = json.loads(run("optimize", path, "--json", "--top", "1").stdout)
    tce = record["best"]["solutes"]["trichloroethylene"]
    assert tce["treated_phase"] == "liquid" and tce["concentration_unit"] == "ug/L"
    assert tce["spec_concentration"] == pytest.approx(5.0, rel=1e-12)
    assert tce["inlet_concentration"] == pytest.approx(1500.0, rel=1e-12)
    assert tce["outlet_concentration"] <= 5.0 * (1 + 1e-9)
    assert tce["agent_phase"] == "gas" and tce["agent_concentration_unit"] == "ppmv"
    sheet = run("evaluate", path, "--solvent", record["best"]["agent"], "--trays", record["best"]["trays"],
                "--ratio", repr(record["best"]["ratio_to_minimum"]))
    row = next(line for line in sheet.stdout.splitlines() if line.startswith("trichloroethylene"))
    assert "1500 ug/L" in row and "5 ug/L" in row and "ppbv" not in row and "ppmv" not in row


def test_water_concentrations_never_print_in_a_gas_unit():
    sheet = run("evaluate", STRIPPER, "--solvent", "air, carbon adsorption", "--trays", 30, "--ratio", 2.0)
    rows = [line for line in sheet.stdout.splitlines() if line.startswith(("trichloro", "tetrachloro"))]
    assert len(rows) == 2
    for row in rows:
        assert "ppmw" in row and "ppbv" not in row and "ppmv" not in row, row
    csv_record = json.loads(run("optimize", STRIPPER, "--json", "--top", "1").stdout)
    assert csv_record["best"]["solutes"]["tetrachloroethylene"]["concentration_unit"] == "ppmw"


def test_gas_prints_in_ppmv_and_the_solvent_in_ppmw():
    record = json.loads(run("evaluate", ABSORBER, "--solvent", LIGHT, "--trays", 16, "--ratio", 1.5, "--json").stdout)
    toluene = record["solutes"]["toluene"]
    assert toluene["concentration_unit"] == "ppmv"
    assert toluene["inlet_concentration"] == pytest.approx(500.0, rel=1e-12)
    assert toluene["outlet_concentration"] == pytest.approx(toluene["outlet_mole_fraction"] * 1e6, rel=1e-12)
    # the rich oil in ppmw: w = x M_s / (x M_s + (1 - x) M_l), chemicals' zs_to_ws as the reference
    from chemicals.utils import zs_to_ws

    x = toluene["agent_outlet_mole_fraction"]
    assert toluene["agent_concentration_unit"] == "ppmw"
    assert toluene["agent_outlet_concentration"] == pytest.approx(zs_to_ws([x, 1 - x], [92.13842, 170.0])[0] * 1e6,
                                                                  rel=1e-12)


# --------------------------------------------------------------------------- non-finite and extreme values


@pytest.mark.parametrize("old, new", [
    ("activity_coefficient = 1.15", "activity_coefficient = nan"),
    ("ratio = [1.05, 4.0]", "ratio = [1.1, inf]"),
    ('tray_spacing = "24 in"', 'tray_spacing = "1e400 m"'),
    ("toluene = 0.12", "toluene = inf"),
    ('price = "1.10 USD/kg"', 'price = "nan USD/kg"'),
    ("flood_fraction = 0.80", "flood_fraction = -inf"),
    ('toluene = "500 ppmv"', 'toluene = "1e400 ppmv"'),
])
def test_non_finite_values_are_refused_wherever_they_appear(tmp_path, old, new):
    refused(variant(tmp_path, ABSORBER, (old, new)))


def test_slope_nan_is_refused_not_dropped(tmp_path):
    refused(variant(tmp_path, STRIPPER, ('slope = "4300 K"', "slope = nan")), "slope")


@pytest.mark.parametrize("old, new, field", [
    ('tray_spacing = "24 in"', 'tray_spacing = "1e300 m"', "tray_spacing"),
    ('electricity = "0.09 USD/kWh"', 'electricity = "1e308 USD/kWh"', "electricity"),
    ('molar_mass = "28.96 g/mol"', 'molar_mass = "1e-400 g/mol"', "molar_mass"),
    ('regeneration_cooling = "0.004 m3/kg"', 'regeneration_cooling = "1e6 m3/kg"', "regeneration_cooling"),
    ("trays = [2, 60]", "trays = [2, 4e13]", "trays"),
    ('max_height = "40 m"', 'max_height = "40 m"\nexisting_shell = { diameter = "1e400 m", max_trays = 30 }',
     "diameter"),
])
def test_extreme_magnitudes_are_refused_before_they_reach_the_numbers(tmp_path, old, new, field):
    refused(variant(tmp_path, ABSORBER, (old, new)), field)


def test_extreme_slope_is_refused(tmp_path):
    refused(variant(tmp_path, STRIPPER, ('slope = "4300 K"', 'slope = "1e6 K"')), "slope", "20000 K")
    refused(variant(tmp_path, STRIPPER, ('slope = "4300 K"', 'slope = "4300 degC"')), "slope", "in K")


@pytest.mark.parametrize("text", ["1 (", "1 kmol/0/h", "260 1/0", "5 kmol/h)", "1 e", "3 **", "2 m/"])
def test_broken_unit_text_is_one_line(tmp_path, text):
    refused(variant(tmp_path, ABSORBER, ('flow = "900 kmol/h"', f'flow = "{text}"')), "[feed]", "flow")
    result = run("evaluate", ABSORBER, "--solvent", LIGHT, "--trays", 16, "--rate", text)
    assert result.exit_code == 2 and len(result.stderr.strip().splitlines()) == 1, result.stderr
    assert result.stderr.startswith("error: --rate"), result.stderr


def test_usual_range_warnings_reach_every_output(tmp_path):
    path = variant(tmp_path, ABSORBER, ('electricity = "0.09 USD/kWh"', 'electricity = "1.5 USD/kWh"'))
    scenario = load_scenario(path)
    assert len(scenario.warnings) == 1 and "[economics] electricity" in scenario.warnings[0]
    assert "0.01 to 1 USD/kWh" in scenario.warnings[0]
    record = json.loads(run("optimize", path, "--json", "--top", 1).stdout)
    assert scenario.warnings[0] in record["warnings"]
    assert "usual range" in run("optimize", path, "--top", 1).stdout
    sheet = json.loads(run("evaluate", path, "--solvent", LIGHT, "--trays", 16, "--ratio", 1.5, "--json").stdout)
    assert scenario.warnings[0] in sheet["warnings"]
    assert "usual range" in run("curve", path, "--solvent", LIGHT).stdout
    assert load_scenario(ABSORBER).warnings == ()


def test_physical_limits_are_errors(tmp_path):
    refused(variant(tmp_path, ABSORBER, ('temperature = "30 degC"', 'temperature = "-300 degC"')), "temperature")
    refused(variant(tmp_path, ABSORBER, ('pressure = "1.15 bara"', 'pressure = "0 bara"')), "pressure")
    refused(variant(tmp_path, ABSORBER, ('price = "1.10 USD/kg"', 'price = "-1 USD/kg"')), "price")
    refused(variant(tmp_path, ABSORBER, ('toluene = "500 ppmv"', 'toluene = "100 %"')), "toluene")


# --------------------------------------------------------------------------- names


def test_names_are_capped_and_plain_text(tmp_path):
    line = refused(variant(tmp_path, ABSORBER, ('name = "light wash oil"', f'name = "{"x" * 10_000}"')), "name")
    assert "10,000 characters" in line
    refused(variant(tmp_path, ABSORBER, ('name = "light wash oil"', 'name = "oil\\u001b[31m"')), "control character")


def test_markup_in_names_prints_as_text(tmp_path):
    path = variant(tmp_path, ABSORBER, ('name = "light wash oil"', 'name = "[red]oil"'),
                   ('name = "Coating-line vent, aromatic recovery"', 'name = "vent [/bold]"'))
    result = run("optimize", path, "--top", 2)
    assert result.exit_code == 0, result.stderr
    assert "[red]oil" in result.stdout and "vent [/bold]" in result.stdout


def test_duplicate_candidate_names_are_named(tmp_path):
    refused(variant(tmp_path, ABSORBER, ('name = "heavy wash oil"', 'name = "light wash oil"')),
            "'light wash oil' appears twice")


# --------------------------------------------------------------------------- the schema


@pytest.fixture(scope="module")
def schema() -> dict:
    def strict(constant):
        raise ValueError(f"not strict JSON: {constant}")

    return json.loads(json_text(), parse_constant=strict)


def test_schema_is_valid_draft_2020_12(schema):
    assert schema["$schema"] == "https://json-schema.org/draft/2020-12/schema"
    jsonschema.Draft202012Validator.check_schema(schema)
    printed = run("schema")
    assert printed.exit_code == 0 and json.loads(printed.stdout) == schema


@pytest.mark.parametrize("path", BUNDLED, ids=lambda p: p.name)
def test_every_bundled_scenario_and_test_file_validates(schema, path):
    data = tomllib.loads(path.read_text(encoding="utf-8"))
    errors = [f"{list(e.path)}: {e.message}" for e in jsonschema.Draft202012Validator(schema).iter_errors(data)]
    assert errors == []
    load_scenario(path)


def test_schema_states_description_unit_range_and_default(schema):
    column = schema["$defs"]["Column"]["properties"]
    assert column["tray_spacing"]["default"] == "24 in" and column["tray_spacing"]["x-unit"] == "in"
    assert "allowed" in column["tray_spacing"]["description"] and "usual" in column["tray_spacing"]["description"]
    assert "default" not in column["max_height"] and "no limit unless given" in column["max_height"]["description"]
    economics = schema["$defs"]["Economics"]["properties"]
    assert economics["electricity"]["default"] == "0.08 USD/kWh"
    assert economics["electricity"]["x-usual"] == "0.01 to 1 USD/kWh"
    assert economics["electricity"]["x-dimension"] == "a price per energy"
    for name, definition in schema["$defs"].items():
        for key, prop in definition.get("properties", {}).items():
            assert prop.get("description"), (name, key)


def test_schema_refuses_a_bare_number_in_a_dimensional_field(schema):
    data = tomllib.loads(ABSORBER.read_text(encoding="utf-8"))
    data["economics"]["electricity"] = 0.09
    assert not jsonschema.Draft202012Validator(schema).is_valid(data)
    with pytest.raises(ScenarioError, match="no unit"):
        parse_scenario(data, "inline")


def test_programs_may_state_that_bare_numbers_are_si():
    data = tomllib.loads(ABSORBER.read_text(encoding="utf-8"))
    data["economics"]["electricity"] = 0.09 / 3.6e6          # USD/J, stated by bare_si
    scenario = parse_scenario(data, "inline", bare_si=True)
    assert math.isclose(scenario.economics.electricity, 0.09 / 3.6e6, rel_tol=1e-15)
