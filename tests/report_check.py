"""make report-check: write the demo's HTML report, open it in headless Chromium, check it, and save its first screen.

Writes reports/demo_absorber-report.html and reports/demo_absorber-report-first-screen.png
(replacing them), prints the generation time, what the page showed and any problem, and exits 1
on a problem (2 when Chromium cannot be had).
"""

from __future__ import annotations

import json
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))
import browser  # noqa: E402

ROOT = Path(__file__).resolve().parents[1]


def main() -> int:
    from typer.testing import CliRunner

    from towercost.cli import app

    out = ROOT / "reports" / "demo_absorber-report.html"
    start = time.perf_counter()
    result = CliRunner().invoke(app, ["report", str(ROOT / "scenarios" / "demo_absorber.toml"), "--out", str(out),
                                      "--force"])
    seconds = time.perf_counter() - start
    print(result.stdout.strip())
    if result.exit_code != 0:
        print(result.output, file=sys.stderr)
        return 1
    print(f"report generated in {seconds:.2f} s (in-process, imports excluded)")
    binary, why = browser.chromium()
    if binary is None:
        print(f"cannot check the report in a browser: {why}", file=sys.stderr)
        return 2
    page = browser.Page(binary, width=1280, height=900)
    try:
        page.open(out)
        shown = page.evaluate(browser.CHECKS)
        shot = page.screenshot(out.with_name("demo_absorber-report-first-screen.png"))
        problems = page.problems()
    finally:
        page.close()
    print(json.dumps(shown, indent=1))
    print(f"wrote {shot}")
    bad = [p for p in shown["plots"] if not (p["complete"] and p["width"] > 0 and p["shown"] > 0)]
    for line in problems + [f"plot not drawn: {p['id']}" for p in bad]:
        print(f"problem: {line}", file=sys.stderr)
    return 1 if problems or bad or len(shown["plots"]) < 3 else 0


if __name__ == "__main__":
    sys.exit(main())
