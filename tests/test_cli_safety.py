"""Regression tests for the commands under hostile use: one named test per failure class of the probe.

Hangs (a huge tray spacing, a FIFO as the scenario, a megabyte name),
``--force`` over things that are not regular files, output-folder problems,
undecodable or deeply nested files, an unwritable cache folder, huge design
spaces, files written half or twice, timings in the JSON, formulas in CSV
cells, Ctrl-C, usage errors, internal errors and the exit codes 3 and 4.
Each must end in its documented exit code with at most one line on
standard error, no traceback and no Python warning.

The checks are of the contract in README.md ("Exit codes", "Scenario
files"); the only numbers compared are the tool's own between runs.
"""

from __future__ import annotations

import csv
import io
import json
import os
import signal
import stat
import subprocess
import sys
import time
from pathlib import Path

import pytest
from typer.testing import CliRunner

from towercost.cli import app

ROOT = Path(__file__).resolve().parents[1]
ABSORBER = ROOT / "scenarios" / "demo_absorber.toml"
STRIPPER = ROOT / "scenarios" / "demo_air_stripper.toml"
TOWERCOST = Path(sys.executable).with_name("towercost")
LIGHT = "light wash oil"


def variant(tmp_path: Path, *replacements: tuple[str, str], base: Path = ABSORBER, name: str = "case.toml") -> Path:
    text = base.read_text(encoding="utf-8")
    for old, new in replacements:
        assert old in text, old
        text = text.replace(old, new, 1)
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


def run(*args):
    return CliRunner().invoke(app, [str(a) for a in args])


def one_line(result, code: int, *fragments: str) -> str:
    """Exit ``code``, no traceback, exactly one stderr line starting 'error: ', holding every fragment."""
    assert result.exit_code == code, (result.exit_code, result.stdout[-500:], result.stderr, result.exception)
    assert result.exception is None or isinstance(result.exception, SystemExit), result.exception
    lines = result.stderr.strip().splitlines()
    assert len(lines) == 1, result.stderr
    line = lines[0]
    assert line.startswith("error: ") and "Traceback" not in line and "Errno" not in line, line
    assert len(line) < 1300, len(line)
    for fragment in fragments:
        assert fragment in line, (fragment, line)
    return line


def process(*args, timeout: float = 60, env=None, **kwargs) -> subprocess.CompletedProcess:
    return subprocess.run([str(TOWERCOST), *map(str, args)], capture_output=True, text=True, timeout=timeout,
                          env={**os.environ, **(env or {})}, **kwargs)


# --------------------------------------------------------------------------- hangs


@pytest.mark.parametrize("method", ["model", "scan"])
def test_hang_tray_spacing_1e300_m_is_refused_at_once(tmp_path, method):
    # Once: the model's loop discarded infeasible picks one solve at a time for over 12 minutes.
    for spacing in ("1e300 m", "1e400 m"):
        path = variant(tmp_path, ('tray_spacing = "24 in"', f'tray_spacing = "{spacing}"'))
        start = time.perf_counter()
        one_line(run("optimize", path, "--method", method), 2, "[column] tray_spacing", spacing)
        assert time.perf_counter() - start < 5


@pytest.mark.parametrize("method", ["model", "scan"])
def test_model_loop_ends_when_no_design_meets_a_limit(tmp_path, method):
    path = variant(tmp_path, ('max_height = "40 m"', 'max_height = "2 m"'))
    start = time.perf_counter()
    one_line(run("optimize", path, "--method", method), 3, "height at most 2 m", "least height")
    assert time.perf_counter() - start < 10


def test_hang_fifo_as_scenario_path_is_refused_without_waiting(tmp_path):
    fifo = tmp_path / "scenario.toml"
    os.mkfifo(fifo)
    result = process("optimize", fifo, timeout=30)
    assert result.returncode == 2, result.stderr
    assert result.stderr.strip() == f"error: {fifo}: is a FIFO (named pipe), not a scenario file"


def test_hang_megabyte_name_is_refused_quickly(tmp_path):
    path = variant(tmp_path, ('name = "light wash oil"', f'name = "{"n" * 1_000_000}"'))
    start = time.perf_counter()
    line = one_line(run("optimize", path), 2, "1,000,000 characters", "at most 200")
    assert time.perf_counter() - start < 5 and len(line) < 500


def test_scenario_file_above_the_size_limit_is_refused(tmp_path):
    path = tmp_path / "huge.toml"
    path.write_text(ABSORBER.read_text(encoding="utf-8") + "# " + "x" * (1 << 20) + "\n", encoding="utf-8")
    one_line(run("optimize", path), 2, str(path), "at most 1,048,576")


def test_folder_and_device_as_scenario_path(tmp_path):
    one_line(run("optimize", tmp_path), 2, "is a folder, not a scenario file")
    one_line(run("optimize", "/dev/null"), 2, "is a device, not a scenario file")


# --------------------------------------------------------------------------- --force and targets


def test_force_never_replaces_a_fifo_a_folder_or_a_device(tmp_path):
    fifo = tmp_path / "demo_absorber-designs.csv"
    os.mkfifo(fifo)
    one_line(run("optimize", ABSORBER, "--csv", "--out", tmp_path, "--force"), 2, "FIFO", "only regular files")
    assert stat.S_ISFIFO(os.lstat(fifo).st_mode)
    folder = tmp_path / "sub"
    (folder / "demo_absorber-report.json").mkdir(parents=True)
    one_line(run("optimize", ABSORBER, "--save", "--out", folder, "--force"), 2, "is a folder", "file")
    one_line(run("schema", "--out", "/dev/null", "--force"), 2, "device", "only regular files")
    assert stat.S_ISCHR(os.stat("/dev/null").st_mode)


def test_force_replaces_a_link_itself_never_the_file_it_points_to(tmp_path):
    elsewhere = tmp_path / "elsewhere.txt"
    elsewhere.write_text("keep me\n", encoding="utf-8")
    out = tmp_path / "out"
    out.mkdir()
    link = out / "demo_absorber-designs.csv"
    link.symlink_to(elsewhere)
    one_line(run("optimize", ABSORBER, "--csv", "--out", out, "--method", "scan"), 2, "symbolic link", "--force")
    assert link.is_symlink()
    result = run("optimize", ABSORBER, "--csv", "--out", out, "--method", "scan", "--force")
    assert result.exit_code == 0, result.stderr
    assert not link.is_symlink() and link.is_file() and link.read_text().startswith("rank,")
    assert elsewhere.read_text(encoding="utf-8") == "keep me\n"


def test_dangling_link_is_not_replaced_without_force(tmp_path):
    link = tmp_path / "schema.json"
    link.symlink_to(tmp_path / "missing" / "target.json")
    one_line(run("schema", "--out", link), 2, "symbolic link to a missing file", "--force")
    assert link.is_symlink() and not link.exists()
    assert run("schema", "--out", link, "--force").exit_code == 0
    assert link.is_file() and not link.is_symlink()


def test_report_path_that_is_a_folder_is_one_line(tmp_path):
    (tmp_path / "schema.json").mkdir()
    one_line(run("schema", "--out", tmp_path / "schema.json"), 2, "is a folder")


@pytest.mark.parametrize("where, fragment", [
    ("under-a-file", "is a file, not a folder"),
    ("device", "is a device, not a folder"),
    ("long-name", "too long"),
])
def test_output_folder_problems_are_words(tmp_path, where, fragment):
    if where == "under-a-file":
        (tmp_path / "plain").write_text("x", encoding="utf-8")
        out = tmp_path / "plain" / "reports"
    elif where == "device":
        out = Path("/dev/null")
    else:
        out = tmp_path / ("d" * 300)
    one_line(run("optimize", ABSORBER, "--csv", "--out", out), 2, fragment)


@pytest.mark.skipif(os.geteuid() == 0, reason="the superuser writes in read-only folders")
def test_read_only_output_folder_is_words(tmp_path):
    out = tmp_path / "ro"
    out.mkdir()
    out.chmod(0o500)
    try:
        one_line(run("optimize", ABSORBER, "--csv", "--out", out), 2, "read-only")
    finally:
        out.chmod(0o700)


def test_read_only_output_folder_words_from_the_system(tmp_path, monkeypatch):
    # As the superuser a folder is never read-only to access(2): say the system refuses the write.
    import errno

    from towercost.report import files

    def refuse(*args, **kwargs):
        raise PermissionError(errno.EACCES, "Permission denied")

    monkeypatch.setattr(files.tempfile, "mkstemp", refuse)
    line = one_line(run("optimize", ABSORBER, "--csv", "--out", tmp_path, "--method", "scan"), 2,
                    "cannot write in the folder", "permission denied")
    assert "Permission denied" not in line
    assert list(tmp_path.iterdir()) == []


def test_every_target_is_checked_before_any_work(tmp_path, monkeypatch):
    from towercost.select import ranking

    (tmp_path / "demo_absorber-report.json").write_text("older\n", encoding="utf-8")

    def must_not_run(*args, **kwargs):
        raise AssertionError("the optimization ran before the targets were checked")

    monkeypatch.setattr(ranking, "optimize", must_not_run)
    one_line(run("optimize", ABSORBER, "--csv", "--save", "--out", tmp_path), 2, "report.json exists", "--force")
    # a run that would refuse one file writes none: the CSV is not there either
    assert sorted(p.name for p in tmp_path.iterdir()) == ["demo_absorber-report.json"]


def test_files_get_the_mode_the_umask_gives(tmp_path):
    old = os.umask(0o027)
    try:
        assert run("optimize", ABSORBER, "--csv", "--save", "--out", tmp_path, "--method", "scan").exit_code == 0
    finally:
        os.umask(old)
    for path in tmp_path.iterdir():
        assert stat.S_IMODE(path.stat().st_mode) == 0o640, (path, oct(path.stat().st_mode))
    assert not [p for p in tmp_path.iterdir() if p.name.endswith(".tmp")]


def test_json_and_csv_are_byte_identical_for_identical_input(tmp_path):
    first = run("optimize", ABSORBER, "--json", "--top", 3)
    second = run("optimize", ABSORBER, "--json", "--top", 3)
    assert first.stdout == second.stdout
    assert "total_seconds" not in json.loads(first.stdout)["solver"]      # timings only when asked
    timed = json.loads(run("optimize", ABSORBER, "--json", "--top", 3, "--timings").stdout)
    assert timed["solver"]["total_seconds"] > 0
    for name in ("a", "b"):
        assert run("optimize", ABSORBER, "--csv", "--save", "--out", tmp_path / name).exit_code == 0
    assert (tmp_path / "a" / "demo_absorber-designs.csv").read_bytes() == \
        (tmp_path / "b" / "demo_absorber-designs.csv").read_bytes()
    # the saved report differs only in the run's date, which it carries on purpose
    reports = [json.loads((tmp_path / n / "demo_absorber-report.json").read_text()) for n in ("a", "b")]
    for report in reports:
        assert "date" in report.pop("run")
    assert reports[0] == reports[1]


@pytest.mark.parametrize("name", ["=1+2", "+cmd", "-oil", "@SUM(A1)"])
def test_formula_names_are_neutralised_in_csv(tmp_path, name):
    path = variant(tmp_path, ('name = "light wash oil"', f'name = "{name}"'))
    assert run("optimize", path, "--csv", "--out", tmp_path, "--top", 2).exit_code == 0
    rows = list(csv.reader(io.StringIO((tmp_path / "case-designs.csv").read_text(encoding="utf-8"))))
    head = rows[0]
    agents = {row[head.index("agent")] for row in rows[1:]}
    assert agents == {"'" + name}
    numbers = [row[head.index("diameter_m")] for row in rows[1:]]   # numbers are never prefixed
    assert all(not n.startswith("'") for n in numbers)


def test_ctrl_c_exits_130_and_leaves_no_partial_file(tmp_path):
    # A space of about 3.5 M alternatives takes a few seconds; SIGINT arrives during its evaluation.
    path = variant(tmp_path, ("trays = [2, 60]", "trays = [2, 400]"), ("ratio_levels = 50", "ratio_levels = 1000"))
    out = tmp_path / "out"
    child = subprocess.Popen([str(TOWERCOST), "optimize", str(path), "--csv", "--save", "--out", str(out)],
                             stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    time.sleep(1.5)
    child.send_signal(signal.SIGINT)
    _, err = child.communicate(timeout=60)
    assert child.returncode == 130, err
    assert err.strip().splitlines() == ["error: interrupted; no partial file was left"]
    assert not out.exists() or list(out.iterdir()) == []


# --------------------------------------------------------------------------- unreadable files


@pytest.mark.parametrize("kind", ["latin-1", "utf-16", "nul", "bom"])
def test_undecodable_scenario_is_one_line(tmp_path, kind):
    path = tmp_path / "case.toml"
    text = ABSORBER.read_text(encoding="utf-8").replace("invented", "invent\u00e9")
    if kind == "latin-1":
        path.write_bytes(text.encode("latin-1"))
        one_line(run("optimize", path), 2, "not UTF-8", "byte 0xe9")
    elif kind == "utf-16":
        path.write_bytes(text.encode("utf-16"))
        one_line(run("optimize", path), 2, "UTF-16", "save it as UTF-8")
    elif kind == "nul":
        path.write_bytes(text.encode("utf-8").replace(b"[column]", b"[col\x00umn]"))
        one_line(run("optimize", path), 2, "not valid TOML")
    else:  # a UTF-8 byte-order mark is read
        path.write_bytes(b"\xef\xbb\xbf" + text.encode("utf-8"))
        assert run("optimize", path, "--method", "scan", "--top", 1).exit_code == 0


@pytest.mark.parametrize("nesting", ["array", "table", "inline"])
def test_deeply_nested_scenario_is_one_line(tmp_path, nesting):
    path = tmp_path / "deep.toml"
    deep = {"array": "x = " + "[" * 5000 + "]" * 5000 + "\n",
            "table": "[" + ".".join(["t"] * 3000) + "]\nx = 1\n",
            "inline": "x = " + "{a = " * 3000 + "1" + "}" * 3000 + "\n"}[nesting]
    path.write_text(ABSORBER.read_text(encoding="utf-8") + deep, encoding="utf-8")
    one_line(run("optimize", path), 2, str(path))


@pytest.mark.parametrize("ending", ["\r\n", "\r"])
def test_other_line_endings(tmp_path, ending):
    path = tmp_path / "case.toml"
    path.write_bytes(ABSORBER.read_text(encoding="utf-8").replace("\n", ending).encode("utf-8"))
    result = run("optimize", path, "--method", "scan", "--top", 1)
    if ending == "\r\n":
        assert result.exit_code == 0, result.stderr
    else:
        one_line(result, 2, "not valid TOML")


def test_unwritable_cache_folder_does_not_stop_a_command(tmp_path):
    # pint keeps a cache in the user's cache folder; a file in its place once failed every command.
    blocker = tmp_path / "not-a-folder"
    blocker.write_text("x", encoding="utf-8")
    result = process("optimize", ABSORBER, "--json", "--top", 1, env={"HOME": str(blocker),
                                                                        "XDG_CACHE_HOME": str(blocker / "cache")},
                     cwd=tmp_path)
    assert result.returncode == 0, result.stderr
    assert json.loads(result.stdout)["best"]["agent"] == LIGHT
    assert result.stderr == ""


# --------------------------------------------------------------------------- sizes and options


def _many_candidates(tmp_path: Path, count: int, column: str) -> Path:
    text = ABSORBER.read_text(encoding="utf-8")
    head, rest = text.split("[[solvent]]", 1)
    glycol = "[[solvent]]" + rest.split("[[solvent]]")[2].split("[column]")[0]
    solvents = "".join(glycol.replace('name = "glycol ether"', f'name = "glycol ether {i}"') for i in range(count))
    tail = "[column]" + rest.split("[column]", 1)[1]
    tail = tail.replace("trays = [2, 60]             # range searched", column)
    path = tmp_path / "many.toml"
    path.write_text(head + solvents + tail, encoding="utf-8")
    return path


def test_a_space_that_would_not_fit_in_memory_is_refused_with_the_estimate_and_the_knob(tmp_path):
    path = _many_candidates(tmp_path, 200, "trays = [1, 1000]\nlarger_diameters = 10")
    path.write_text(path.read_text().replace("ratio_levels = 50", "ratio_levels = 2000"), encoding="utf-8")
    start = time.perf_counter()
    # 200 candidates x (1000 tray counts x 2001 rates + one packing x (1000 stage counts + 2000 levels)) x 11 sizes
    line = one_line(run("optimize", path), 2, "4,408,800,000 alternatives", "ratio_levels", "[column] trays",
                    "fewer candidates")
    assert time.perf_counter() - start < 10, line


def test_check_size_uses_the_flowsheet_estimate():
    from towercost.design.case import prepare
    from towercost.design.column import MAX_WIDER, SingleColumn
    from towercost.design.reasons import check_size
    from towercost.errors import TooLarge
    from towercost.scenario import load_scenario

    case = prepare(load_scenario(ABSORBER))
    estimate = SingleColumn(case).estimate()
    # from the demo file: 3 solvents x (59 tray counts (2..60) x 51 rates + one packing x (60 stage counts + 50
    # levels)) x (1 + MAX_WIDER) shell sizes
    assert check_size(case) == estimate == 3 * (59 * 51 + 1 * (60 + 50)) * (1 + MAX_WIDER)
    with pytest.raises(TooLarge, match=f"{estimate:,} alternatives"):
        check_size(case, memory=2**20)


@pytest.mark.parametrize("args, fragments", [
    (["evaluate", ABSORBER, "--solvent", LIGHT, "--trays", "99999999999999999999", "--ratio", 1.5],
     ["--trays", "1 to 1000"]),
    (["evaluate", ABSORBER, "--solvent", LIGHT, "--trays", "16", "--ratio", "inf"], ["--ratio"]),
    (["evaluate", ABSORBER, "--solvent", LIGHT, "--trays", "16", "--rate", "95"], ["--rate", "no unit"]),
    (["evaluate", ABSORBER, "--solvent", LIGHT, "--trays", "16", "--rate", "2000 Nm3/h"], ["--rate", "liquid"]),
    (["evaluate", ABSORBER, "--solvent", LIGHT, "--trayz", "16"], ["No such option", "--trays"]),
    (["evaluate", ABSORBER, "--trays", "16"], ["--solvent"]),
    (["optimize", ABSORBER, "--top", "0"], ["--top"]),
    (["optimize", ABSORBER, "--method", "guess"], ["--method"]),
    (["rate", "--factor", "x"], ["--factor"]),
    (["rate", "--factor", "1.4", "--stages", "1e300"], ["--stages"]),
    (["curve"], ["Missing argument", "scenario"]),
    (["explode"], ["No such command"]),
])
def test_usage_errors_are_one_line(args, fragments):
    one_line(run(*args), 2, *fragments)


# --------------------------------------------------------------------------- exit codes and messages


def test_exit_4_names_the_spec_missed_and_the_limit_broken(tmp_path):
    result = run("evaluate", ABSORBER, "--solvent", LIGHT, "--trays", 3, "--ratio", 1.2)
    one_line(result, 4, "toluene leaves at", "spec 10 ppmv")
    assert "design sheet" in result.stdout
    low = variant(tmp_path, ('max_height = "40 m"', 'max_height = "10 m"'))
    tall = run("evaluate", low, "--solvent", LIGHT, "--trays", 16, "--ratio", 1.5, "--json")
    one_line(tall, 4, "height at most 10 m is broken (12.75 m)")
    assert json.loads(tall.stdout)["within_limits"] is False
    assert run("evaluate", ABSORBER, "--solvent", LIGHT, "--trays", 16, "--ratio", 1.5).exit_code == 0


def test_exit_3_names_the_limit_and_the_best_figure_for_each_candidate(tmp_path):
    path = variant(tmp_path, ('max_height = "40 m"', 'max_height = "5 m"'))
    line = one_line(run("optimize", path), 3, "within the limits")
    for name, least in (("light wash oil", "6.658 m"), ("heavy wash oil", "7.877 m"), ("glycol ether", "7.267 m")):
        assert f"'{name}': the least height of any design meeting the spec is {least}" in line


def test_infeasible_lean_loading_never_suggests_more_trays(tmp_path):
    # 0.5 ppmv toluene: every candidate's entering solvent alone holds more (K x_in), so trays cannot help.
    path = variant(tmp_path, ('outlet = "10 ppmv"', 'outlet = "0.5 ppmv"'),
                   ("[solvent.k]\ntoluene = 0.12", "[solvent.lean]\ntoluene = 2e-5\n[solvent.k]\ntoluene = 0.12"))
    line = one_line(run("optimize", path), 3, "lean loading", "cannot help")
    assert "more trays (" not in line and "would help" not in line
    # trays only (a packed bed offered 4 theoretical stages would meet the spec)
    few = variant(tmp_path, ("trays = [2, 60]", "trays = [2, 4]"), ("[[packing]]\npacking", "# packing"),
                  name="few.toml")
    assert "more trays" in one_line(run("optimize", few), 3, "even at 4 trays")


def test_internal_error_is_one_line_with_a_log_file(tmp_path, monkeypatch):
    import numpy as np

    from towercost.select import ranking

    def broken(*args, **kwargs):
        raise ValueError(f"volume must be > 0 m3, got {np.zeros(2405)!r}")

    monkeypatch.setattr(ranking, "optimize", broken)
    line = one_line(run("optimize", ABSORBER, "--out", tmp_path), 70, "internal error", "bug in towercost")
    logs = list(tmp_path.glob("towercost-internal-error-*.log"))
    assert len(logs) == 1 and str(logs[0]) in line
    assert "Traceback" in logs[0].read_text(encoding="utf-8")


def test_runtime_warning_is_an_internal_error_never_printed(monkeypatch, tmp_path):
    import warnings

    from towercost.select import ranking

    def noisy(*args, **kwargs):
        warnings.warn("overflow encountered in multiply", RuntimeWarning)
        return None

    monkeypatch.setattr(ranking, "optimize", noisy)
    line = one_line(run("optimize", ABSORBER, "--out", tmp_path), 70, "RuntimeWarning")
    assert "overflow" in line


def test_no_warning_is_printed_by_a_whole_process(tmp_path):
    # The real entry point (filters as installed, not as in the tests): stderr stays empty on success.
    result = process("optimize", STRIPPER, "--json", "--top", 2, cwd=tmp_path)
    assert result.returncode == 0 and result.stderr == "", result.stderr


def test_help_states_the_exit_codes():
    text = run("optimize", "--help").stdout
    for code in ("0 done", "2 bad input", "3 no design", "4 evaluate", "70 internal", "130 interrupted"):
        assert code in " ".join(text.split()), code


# --------------------------------------------------------------------------- found by the fuzzing


@pytest.mark.parametrize("base, old, new, fragments", [
    # a vapour pressure of 1e-20 kPa gives K ~ 1e-22: once a division by zero deep in the cascade
    (ABSORBER, 'vapour_pressure = "4.887 kPa"', 'vapour_pressure = "4.887e-20 kPa"',
     ["'light wash oil' k.toluene", "K at column conditions", "outside 1e-12 to 1e+12"]),
    # a Henry's-law constant 1e20 times too large: once "HiGHS stopped with status Unknown"
    (STRIPPER, "henry = 1.0e-3 ", "henry = 1.0e17 ", ["k.trichloroethylene", "K at column conditions"]),
    # a stripping gas of 28,960 g/mol is denser than water: once a square root of a negative number
    (STRIPPER, 'molar_mass = "28.96 g/mol"        # air, estimated', 'molar_mass = "28960 g/mol"',
     ["no lighter than the liquid"]),
    # half the feed toluene: the solvent in equilibrium would be more than pure solute
    (ABSORBER, 'toluene = "500 ppmv"', 'toluene = "50 %"', ["more than all solute"]),
])
def test_cases_beyond_what_the_relations_compute_are_refused_before_evaluation(tmp_path, base, old, new, fragments):
    path = variant(tmp_path, (old, new), base=base)
    for command in (["optimize", path], ["curve", path, "--solvent", "light wash oil" if base == ABSORBER else
                                          "air, carbon adsorption"]):
        one_line(run(*command), 2, str(path), *fragments)


def test_a_cost_year_outside_the_table_names_the_file(tmp_path):
    # found by the fuzzing: the refusal from preparing the case once lacked the file's name
    path = variant(tmp_path, ("cost_year = 2024", "cost_year = 2034"))
    one_line(run("optimize", path), 2, f"error: {path}, [economics] cost_year", "1994 to 2024")


def test_a_solute_the_feed_does_not_carry_is_refused(tmp_path):
    # toluene = 0 in the feed once gave 0/0 in the minimum-rate relation (found by the fuzzing)
    one_line(run("optimize", variant(tmp_path, ('toluene = "500 ppmv"', "toluene = 0.0"))), 2,
             "[feed] composition.toluene", "at least 1e-15")
    # vanishing magnitudes once overflowed the driving-force fraction (found by the fuzzing)
    one_line(run("optimize", variant(tmp_path, ('toluene = "500 ppmv"', "toluene = 1e-320"))), 2, "at least 1e-15")
    one_line(run("optimize", variant(tmp_path, ('outlet = "10 ppmv"', "outlet = 1e-320"))), 2, "0 or at least 1e-15")


@pytest.mark.parametrize("old, new", [
    ("flood_fraction = 0.80", "flood_fraction = 8e-21"),      # once HiGHS stopped on costs near 1e21 USD/yr
    ('life = "15 yr"', 'life = "15e-20 yr"'),                 # a capital recovery factor of 1e19 per year
    ('pressure = "1.15 bara"', 'pressure = "1.15e-9 bara"'),  # once "shaft power must be > 0, got array(...)"
])
def test_allowed_ranges_keep_every_accepted_case_finite(tmp_path, old, new):
    one_line(run("optimize", variant(tmp_path, (old, new))), 2, "must be at least")


def test_readme_and_schema_state_the_same_unit_rule():
    from towercost.scenario.editor import json_schema

    readme = " ".join((ROOT / "README.md").read_text(encoding="utf-8").split())
    assert "Every dimensional value carries its unit as text; a bare number there is refused" in readme
    assert "a bare number there is refused" in json_schema()["description"]
    for code in ("| 0 |", "| 2 |", "| 3 |", "| 4 |", "| 70 |", "| 130 |"):
        assert code in readme, code
