"""Tests for towercost.scenario: reading, validating and converting scenario files.

Every bad value must give one ScenarioError line that names the file, the
field and the value, and the CLI must turn it into exit 2 with no traceback.
Units are held to exact definitions (NIST Special Publication 811, 2008 ed.,
Appendix B: 1 lb = 0.45359237 kg, 1 ft = 0.3048 m, 1 in = 0.0254 m,
1 US gal = 231 in3, 1 lbf = 0.45359237 kg x 9.80665 m/s2; value from memory)
and to the pint package as an independent converter; the US-customary copy
of the demo absorber must give the same optimum as the SI file.
"""

from __future__ import annotations

import math
import tomllib
from pathlib import Path

import pint
import pytest
from typer.testing import CliRunner

from towercost.cli import app
from towercost.errors import ScenarioError
from towercost.scenario import load_scenario, parse_scenario
from towercost.scenario.units import to_si
from towercost.select import ranking

ROOT = Path(__file__).resolve().parents[1]
ABSORBER = ROOT / "scenarios" / "demo_absorber.toml"
STRIPPER = ROOT / "scenarios" / "demo_air_stripper.toml"
ABSORBER_US = ROOT / "tests" / "data" / "demo_absorber_us.toml"

LB = 0.45359237  # kg, exact by definition
FT = 0.3048  # m, exact
GALLON = 231 * 0.0254**3  # m3, exact (US liquid gallon)
PSI = LB * 9.80665 / 0.0254**2  # Pa, exact (lbf per square inch)


def variant(tmp_path: Path, base: Path, *replacements: tuple[str, str], name: str = "case.toml") -> Path:
    """A copy of ``base`` with each (old, new) text replaced once; each ``old`` must be there."""
    text = base.read_text(encoding="utf-8")
    for old, new in replacements:
        assert old in text, old
        text = text.replace(old, new, 1)
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


def cli(*args):
    try:
        runner = CliRunner(mix_stderr=False)
    except TypeError:  # typer >= 0.13: stderr is always kept apart
        runner = CliRunner()
    return runner.invoke(app, [str(a) for a in args])


def assert_cli_refuses(path: Path, expected_line: str) -> None:
    """`towercost optimize path` exits 2 with exactly 'error: <the ScenarioError line>' on stderr."""
    result = cli("optimize", path)
    assert result.exit_code == 2, (result.output, result.exception)
    assert result.exception is None or isinstance(result.exception, SystemExit), result.exception
    err = result.stderr
    assert "Traceback" not in result.output and "Traceback" not in err
    assert err.strip().splitlines() == [f"error: {expected_line}"]


# --------------------------------------------------------------------------- bad values

ORIGINAL_K = "toluene = 0.12              # invented K = y/x at column conditions\n"

BAD = {
    "negative flow": ([('flow = "900 kmol/h"', 'flow = "-900 kmol/h"')],
                      ["[feed] flow", "'-900 kmol/h'", "at least 0.001 kmol/h"]),
    "negative bare flow": ([('flow = "900 kmol/h"', "flow = -250.0")], ["[feed] flow", "-250.0"]),
    "unknown unit": ([('flow = "900 kmol/h"', 'flow = "5 kmol/hx"')],
                     ["[feed] flow", "unknown unit", "'5 kmol/hx'"]),
    "no number": ([('flow = "900 kmol/h"', 'flow = "lots"')], ["[feed] flow", "'lots'"]),
    "wrong dimension": ([('temperature = "30 degC"', 'temperature = "30 kg"')],
                        ["[feed] temperature", "'30 kg'", "not convertible"]),
    "flow not per time": ([('flow = "900 kmol/h"', 'flow = "900 kg"')], ["[feed]", "flow", "'900 kg'"]),
    "missing K data": ([(ORIGINAL_K, "")], ["[[solvent]] 'glycol ether'", "no K data", "'toluene'"]),
    "unknown key": ([('pressure = "1.15 bara"', 'pressur = "1.15 bara"')],
                    ["[feed] pressur", "unknown key", "did you mean 'pressure'"]),
    "unknown nested key": ([('vapour_pressure = "4.887 kPa"', 'vapour_presure = "4.887 kPa"')],
                           ["'light wash oil'", "vapour_presure", "did you mean 'vapour_pressure'"]),
    "unknown table": ([("[column]", "[colum]")], ["[colum]", "did you mean 'column'"]),
    "negative K": ([(ORIGINAL_K, "toluene = -0.4\n")], ["[[solvent]] 'glycol ether' k.toluene", "-0.4"]),
    "negative density": ([('density = "950 kg/m3"', 'density = "-950 kg/m3"')],
                         ["[[solvent]] 'glycol ether' density", "'-950 kg/m3'"]),
    "removal above 1": ([("removal = 0.98", "removal = 1.2")], ["[[spec]] 'p-xylene' removal", "1.2"]),
    "flood fraction above 1": ([("flood_fraction = 0.80", "flood_fraction = 1.5")],
                               ["[column] flood_fraction", "1.5"]),
    "bad unit in the molar mass of a mass flow": (
        [('flow = "900 kmol/h"', 'flow = "26064 kg/h"'), ('molar_mass = "28.96 g/mol"', 'molar_mass = "28.96 g/molx"')],
        ["[feed]", "molar_mass", "'28.96 g/molx'"]),
}


@pytest.mark.parametrize("case", list(BAD))
def test_bad_value_gives_one_line_naming_file_field_and_value(tmp_path, case):
    replacements, fragments = BAD[case]
    path = variant(tmp_path, ABSORBER, *replacements)
    with pytest.raises(ScenarioError) as caught:
        load_scenario(path)
    line = str(caught.value)
    assert "\n" not in line
    assert line.startswith(f"{path}"), line
    for fragment in fragments:
        assert fragment in line, (fragment, line)
    assert_cli_refuses(path, line)


def test_file_that_is_not_toml(tmp_path):
    path = tmp_path / "notes.toml"
    path.write_text("flow = 900 kmol/h\n[feed\n", encoding="utf-8")
    with pytest.raises(ScenarioError) as caught:
        load_scenario(path)
    line = str(caught.value)
    assert "\n" not in line and line.startswith(str(path)) and "not valid TOML" in line
    assert_cli_refuses(path, line)


def test_missing_file(tmp_path):
    path = tmp_path / "absent.toml"
    with pytest.raises(ScenarioError) as caught:
        load_scenario(path)
    assert str(caught.value) == f"{path}: no such file"
    assert_cli_refuses(path, str(caught.value))


def test_parse_scenario_names_the_given_path():
    data = tomllib.loads(ABSORBER.read_text(encoding="utf-8"))
    data["feed"]["flow"] = "0 kmol/h"
    with pytest.raises(ScenarioError, match=r"^inline\.toml, \[feed\] flow: .*'0 kmol/h'$"):
        parse_scenario(data, "inline.toml")


def test_mass_flow_without_molar_mass_asks_for_it(tmp_path):
    path = variant(tmp_path, ABSORBER, ('flow = "900 kmol/h"', 'flow = "26064 kg/h"'),
                   ('molar_mass = "28.96 g/mol"  # air', "# no molar mass"))
    with pytest.raises(ScenarioError, match="molar_mass"):
        load_scenario(path)


# --------------------------------------------------------------------------- units: SI file against US file


def _assert_same(si, us, where="scenario"):
    """Every field of the two validated scenarios equal (floats to a relative 1e-12)."""
    if isinstance(si, dict):
        assert si.keys() == us.keys(), where
        for key in si:
            if where == "scenario.case" and key == "notes":
                continue
            _assert_same(si[key], us[key], f"{where}.{key}")
    elif isinstance(si, (list, tuple)):
        assert len(si) == len(us), where
        for i, (a, b) in enumerate(zip(si, us)):
            _assert_same(a, b, f"{where}[{i}]")
    elif isinstance(si, float) and not isinstance(si, bool):
        assert math.isclose(si, us, rel_tol=1e-12), (where, si, us)
    else:
        assert si == us, (where, si, us)


@pytest.fixture(scope="module")
def si_and_us():
    return load_scenario(ABSORBER), load_scenario(ABSORBER_US)


def test_us_file_converts_to_the_same_si_values(si_and_us):
    si, us = si_and_us
    _assert_same(si.model_dump(), us.model_dump())


def test_us_file_values_against_exact_definitions(si_and_us):
    # Exact unit definitions (NIST SP 811, 2008 ed., Appendix B; value from memory) applied by hand.
    _, us = si_and_us
    assert math.isclose(us.feed.flow, 57461.28401586649 * LB / 3600 / 0.02896, rel_tol=1e-14)
    assert math.isclose(us.feed.flow, 250.0, rel_tol=1e-14)  # 900 kmol/h
    assert math.isclose(us.feed.temperature, (86 - 32) / 1.8 + 273.15, rel_tol=1e-14)
    assert math.isclose(us.feed.pressure, 16.67933983897406 * PSI, rel_tol=1e-14)
    assert math.isclose(us.feed.pressure, 115_000.0, rel_tol=1e-14)
    light = us.solvent[0]
    assert math.isclose(light.density, 48.6938092493928 * LB / FT**3, rel_tol=1e-14)
    assert math.isclose(light.surface_tension, 26e-5 / 1e-2, rel_tol=1e-14)  # 26 dyn/cm
    assert math.isclose(light.price, 0.498951607 / LB, rel_tol=1e-14)
    assert math.isclose(light.price, 1.10, rel_tol=1e-14)
    assert math.isclose(us.column.tray_spacing, 24 * 0.0254, rel_tol=1e-14)
    assert math.isclose(us.column.max_height, 40.0, rel_tol=1e-14)
    assert math.isclose(us.economics.steam, 0.0136077711 / LB, rel_tol=1e-14)
    assert math.isclose(us.economics.cooling_water, 0.00015141647136 / GALLON, rel_tol=1e-14)


@pytest.mark.parametrize("text, unit", [
    ("1 lb/h", "kg/s"), ("1 lb/ft3", "kg/m^3"), ("1 psi", "Pa"), ("1 ft", "m"), ("1 in", "m"),
    ("1 gal/min", "m^3/s"), ("1 USD/lb", "USD/kg"), ("1 dyn/cm", "N/m"), ("1 cP", "Pa*s"),
])
def test_unit_factors_against_pint_default_registry(text, unit):
    # Reference: pint's own default registry, independent of optimizer.units' registry and text rules.
    reference = pint.UnitRegistry()
    number, name = text.split(" ", 1)
    quantity = reference.Quantity(float(number), name.replace("ft3", "ft**3").replace("USD/", "1/"))
    expected = quantity.to(unit.replace("USD/", "1/")).magnitude
    assert math.isclose(to_si(text, unit), expected, rel_tol=1e-15)


def test_us_file_gives_the_same_optimum(si_and_us):
    si, us = si_and_us
    a = ranking.optimize(si, method="scan")
    b = ranking.optimize(us, method="scan")
    assert math.isclose(float(a.designs.annualized[0]), float(b.designs.annualized[0]), rel_tol=1e-9)
    assert len(a.designs) == len(b.designs)
    for i in range(len(a.designs)):  # the whole ranking, not only the best
        assert int(a.designs.agent[i]) == int(b.designs.agent[i])
        assert int(a.designs.trays[i]) == int(b.designs.trays[i])
        assert math.isclose(float(a.designs.rate[i]), float(b.designs.rate[i]), rel_tol=1e-9)
        assert float(a.designs.diameter[i]) == float(b.designs.diameter[i])
        assert math.isclose(float(a.designs.annualized[i]), float(b.designs.annualized[i]), rel_tol=1e-9)




@pytest.mark.parametrize("text, unit, expected", [
    ("1984.1603596638981 lbmol/h", "mol/s", 250.0),                 # 900 kmol/h
    ("28.96 lb/lbmol", "kg/mol", 0.02896),
    ("16.67933983897406 psia", "Pa", 115_000.0),                    # 1.15 bar
])
def test_us_molar_and_absolute_pressure_units(text, unit, expected):
    assert math.isclose(to_si(text, unit), expected, rel_tol=1e-14)


@pytest.mark.parametrize("text", ["0.004 m3/kg", "0.47930570926758675 gal/lb"])
def test_regeneration_cooling_accepts_volume_per_mass(tmp_path, text):
    path = variant(tmp_path, ABSORBER, ('regeneration_cooling = "0.004 m3/kg"', f'regeneration_cooling = "{text}"'))
    assert math.isclose(load_scenario(path).solvent[0].regeneration_cooling, 0.004, rel_tol=1e-14)


# --------------------------------------------------------------------------- mass and volume feed flows


def test_mass_feed_flow_is_converted_with_the_molar_mass(tmp_path):
    path = variant(tmp_path, ABSORBER, ('flow = "900 kmol/h"', 'flow = "26064 kg/h"'))
    # 26064 kg/h of air at 28.96 g/mol is 900 kmol/h = 250 mol/s
    assert math.isclose(load_scenario(path).feed.flow, 26064 / 3600 / 0.02896, rel_tol=1e-14)
    assert math.isclose(load_scenario(path).feed.flow, 250.0, rel_tol=1e-14)


def test_volume_feed_flow_is_converted_with_density_and_molar_mass():
    # demo stripper: 60 m3/h of water, 999.1 kg/m3, 18.015 g/mol
    flow = load_scenario(STRIPPER).feed.flow
    assert math.isclose(flow, 60 / 3600 * 999.1 / 0.018015, rel_tol=1e-14)


def test_volume_feed_flow_in_us_units(tmp_path):
    # 60 m3/h = 264.17... US gal/min; 999.1 kg/m3 = 62.37... lb/ft3 (values from pint)
    reference = pint.UnitRegistry()
    gpm = reference.Quantity(60, "m**3/h").to("gal/min").magnitude
    density = reference.Quantity(999.1, "kg/m**3").to("lb/ft**3").magnitude
    assert math.isclose(gpm, 60 / 3600 / GALLON * 60, rel_tol=1e-14)
    path = variant(tmp_path, STRIPPER, ('flow = "60 m3/h"', f'flow = "{gpm!r} gal/min"'),
                   ('density = "999.1 kg/m3"', f'density = "{density!r} lb/ft3"'))
    us = load_scenario(path)
    assert math.isclose(us.feed.flow, load_scenario(STRIPPER).feed.flow, rel_tol=1e-13)
    assert math.isclose(us.feed.density, 999.1, rel_tol=1e-14)


def test_volume_feed_flow_needs_a_density(tmp_path):
    path = variant(tmp_path, ABSORBER, ('flow = "900 kmol/h"', 'flow = "21000 m3/h"'))
    with pytest.raises(ScenarioError) as caught:
        load_scenario(path)
    line = str(caught.value)
    for fragment in (str(path), "[feed]", "'21000 m3/h'", "density"):
        assert fragment in line, (fragment, line)
    assert_cli_refuses(path, line)
