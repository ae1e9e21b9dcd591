"""The one-file report (HTML and Markdown), the plots and the curve files.

References: a real headless Chromium (Debian's package) renders the HTML
and reports console errors, failed loads and what each plot decoded to; the
stage diagram's stepping is held to the Kremser relation (an independent
closed form); SVG plots parse as XML with the standard library.
"""

from __future__ import annotations

import csv
import struct
import sys
import xml.etree.ElementTree as ElementTree
from pathlib import Path

import pytest
from typer.testing import CliRunner

sys.path.insert(0, str(Path(__file__).resolve().parent))
import browser  # noqa: E402
from towercost.cli import app  # noqa: E402
from towercost.models import kremser  # noqa: E402
from towercost.report import plots  # noqa: E402
from towercost.scenario import load_scenario  # noqa: E402
from towercost.select import ranking  # noqa: E402

ROOT = Path(__file__).resolve().parents[1]
ABSORBER = ROOT / "scenarios" / "demo_absorber.toml"
STRIPPER = ROOT / "scenarios" / "demo_air_stripper.toml"
HOSTILE = ('<b class="injected">Vent</b><script>window.__towercost_injected = true</script>'
           '<img src="x" onerror="window.__towercost_injected = true"> & co')


def run(*args):
    result = CliRunner().invoke(app, [str(a) for a in args])
    assert result.exit_code == 0, (result.output, result.exception)
    return result


@pytest.fixture(scope="module")
def chromium():
    binary, why = browser.chromium()
    if binary is None:
        pytest.skip(f"no headless Chromium for the report check: {why}")
    return binary


@pytest.fixture(scope="module")
def hostile(tmp_path_factory) -> Path:
    text = ABSORBER.read_text(encoding="utf-8")
    text = text.replace('name = "Coating-line vent, aromatic recovery"', f"name = '{HOSTILE}'", 1)
    text = text.replace('name = "glycol ether"', "name = '<i>glycol</i> ether'", 1)
    path = tmp_path_factory.mktemp("hostile") / "hostile.toml"
    path.write_text(text, encoding="utf-8")
    return path


@pytest.fixture(scope="module")
def reports(tmp_path_factory, hostile) -> dict[str, Path]:
    folder = tmp_path_factory.mktemp("reports")
    out = {}
    for name, path in (("absorber", ABSORBER), ("stripper", STRIPPER), ("hostile", hostile)):
        out[name] = folder / f"{name}.html"
        run("report", path, "--out", out[name])
    out["markdown"] = folder / "hostile.md"
    run("report", hostile, "--out", out["markdown"])
    return out


def test_html_report_holds_every_section_in_one_file(reports):
    text = reports["absorber"].read_text(encoding="utf-8")
    for anchor in ("case", "sheet", "ranked", "band", "plots", "equipment", "utilities", "warnings", "assumptions",
                   "cautions", "references"):
        assert f'id="{anchor}"' in text, anchor
    assert "Class 4" in text and "-30 % to +50 %" in text
    assert "<script" not in text and "http://" not in text and "https://" not in text    # nothing to fetch
    assert text.count('src="data:image/png;base64,') == 3
    assert "light-wash-oil:16tr:" in text


@pytest.mark.parametrize("name", ["absorber", "stripper", "hostile"])
def test_html_report_renders_in_chromium(reports, chromium, name):
    page = browser.Page(chromium)
    try:
        page.open(reports[name])
        shown = page.evaluate(browser.CHECKS)
        problems = page.problems()
    finally:
        page.close()
    assert problems == []
    assert len(shown["plots"]) == 3
    for plot in shown["plots"]:
        assert plot["complete"] and plot["width"] > 300 and plot["height"] > 200 and plot["shown"] > 0, plot
    assert shown["scripts"] == 0
    if name == "hostile":
        assert shown["title"] == HOSTILE            # the markup shows as the text typed
        assert shown["injected"] == 0 and shown["bold"] == 0 and shown["marker"] is False


def test_markdown_report_escapes_scenario_strings(reports):
    text = reports["markdown"].read_text(encoding="utf-8")
    assert "<script" not in text and "<b " not in text and "<i>" not in text
    assert "&lt;script&gt;" in text and "&lt;i&gt;glycol&lt;/i&gt; ether" in text
    assert text.startswith("# ") and "## References" in text and "![" in text


def test_report_refuses_other_formats_and_existing_files(tmp_path):
    result = CliRunner().invoke(app, ["report", str(ABSORBER), "--out", str(tmp_path / "r.pdf")])
    assert result.exit_code == 2 and ".html" in result.output
    target = tmp_path / "r.html"
    target.write_text("keep", encoding="utf-8")
    result = CliRunner().invoke(app, ["report", str(ABSORBER), "--out", str(target)])
    assert result.exit_code == 2 and target.read_text(encoding="utf-8") == "keep"


@pytest.mark.parametrize("factor, stages", [(1.4, 5), (0.8, 3), (2.5, 7)])
def test_stepped_stages_equal_the_kremser_stages(factor, stages):
    # Independent method: the Kremser closed form gives the outlets of a whole number of stages; stepping
    # off stages between the two straight lines from the top must count the same number exactly.
    k, gas_in = 1.3, 1e-3
    cascade = kremser.absorb(factor, stages, gas_in, 0.0, k)
    slope = factor * k                                  # L / V = A K
    _, count = plots.stage_steps(k, slope, 0.0, float(cascade.gas_out), float(cascade.liquid_out))
    assert count == pytest.approx(stages, rel=1e-9)


@pytest.mark.parametrize("path", [ABSORBER, STRIPPER], ids=["absorber", "stripper"])
def test_stage_diagram_of_the_best_design_agrees_with_its_stages(path):
    result = ranking.optimize(load_scenario(path), top=1)
    d = result.designs
    for s in range(len(result.case.solutes)):
        image, count = plots.stage_diagram(result.case, d, 0, s)
        assert image.startswith(b"\x89PNG")
        # whole stages agree; the last, partial one is measured along x rather than by Kremser's fraction
        assert int(count) == int(d.stages[0, s]) and abs(count - d.stages[0, s]) < 1


def test_curve_plot_and_csv(tmp_path):
    png, svg = tmp_path / "c.png", tmp_path / "c.svg"
    run("curve", ABSORBER, "--solvent", "light wash oil", "--plot", png)
    result = run("curve", ABSORBER, "--solvent", "light wash oil", "--plot", svg, "--csv", "--out", tmp_path)
    data = png.read_bytes()
    assert data[:8] == b"\x89PNG\r\n\x1a\n"
    width, height = struct.unpack(">II", data[16:24])
    assert width > 300 and height > 200
    assert ElementTree.parse(svg).getroot().tag.endswith("svg")
    target = tmp_path / "demo_absorber-light-wash-oil-curve.csv"
    assert str(target) in result.stdout
    rows = list(csv.DictReader(target.open(encoding="utf-8")))
    curve = ranking.cost_curve(load_scenario(ABSORBER), "light wash oil")
    by_trays = [r for r in rows if r["curve"] == "by_trays"]
    assert len(by_trays) == len(curve.by_trays)
    assert [float(r["annualized_USD_yr"]) for r in by_trays] == [float(v) for v in curve.by_trays.annualized]
    bad = CliRunner().invoke(app, ["curve", str(ABSORBER), "--solvent", "light wash oil", "--plot",
                                   str(tmp_path / "c.gif")])
    assert bad.exit_code == 2 and ".png" in bad.output
