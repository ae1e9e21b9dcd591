"""Hostile input, property-based and from the bundled corpus: every command must refuse it in one line or answer.

Four kinds of case (hypothesis draws every one):

1. corrupted scenarios: a bundled file read, then values replaced by hostile
   ones (wrong types and dimensions, non-finite and extreme magnitudes,
   broken unit text, markup and formulas, deep nesting), keys and tables
   deleted or added, candidates duplicated, the mode flipped;
2. corrupted bytes: the same files truncated, spliced, re-encoded (UTF-16,
   Latin-1), with other line endings, NUL bytes, huge lines, past the size
   limit;
3. valid scenarios generated within the documented ranges, in every unit
   form the loader accepts: they must load, pass the JSON Schema, and give
   finite figures (or exit 3);
4. every command with bad arguments and hostile paths.

The oracle is ``fuzzing.check``. ``make test`` runs a few hundred cases,
derandomized; ``make fuzz`` (TOWERCOST_FUZZ=full) runs more than 10^4 and
prints the count and the time.
"""

from __future__ import annotations

import copy
import os
import sys
import time
import tomllib
from pathlib import Path

import jsonschema
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

sys.path.insert(0, str(Path(__file__).resolve().parent))
import fuzzing as fz  # noqa: E402

from towercost.cli import app  # noqa: E402
from towercost.errors import ScenarioError  # noqa: E402
from towercost.scenario import load_scenario  # noqa: E402
from towercost.scenario.editor import json_schema  # noqa: E402

FULL = os.environ.get("TOWERCOST_FUZZ") == "full"
COMMON = settings(deadline=None, database=None, derandomize=not FULL, print_blob=True,
                  suppress_health_check=list(HealthCheck))
VALIDATOR = jsonschema.Draft202012Validator(json_schema())
WORK = fz.WORK


def _narrowed(path: Path) -> dict:
    """A bundled scenario with a small space (so that an accepted mutation runs in tens of milliseconds)."""
    data = tomllib.loads(path.read_text(encoding="utf-8"))
    column = data.setdefault("column", {})
    low, high = column.get("trays", [1, 80])
    column["trays"] = [low, min(high, low + 18)]
    column["ratio_levels"] = min(column.get("ratio_levels", 50), 10)
    return data


BASES = {path.stem: _narrowed(path) for path in fz.BUNDLED}
ORIGINAL_TEXT = {path.stem: path.read_text(encoding="utf-8") for path in fz.BUNDLED}


def _paths(node, prefix=()) -> list[tuple]:
    out = []
    if isinstance(node, dict):
        for key, value in node.items():
            out.append(prefix + (key,))
            out += _paths(value, prefix + (key,))
    elif isinstance(node, list):
        for i, value in enumerate(node):
            out.append(prefix + (i,))
            out += _paths(value, prefix + (i,))
    return out


def _parent(data, path):
    node = data
    for key in path[:-1]:
        node = node[key]
    return node


def _accepted(path: Path) -> bool:
    try:
        load_scenario(path)
    except ScenarioError:
        return False
    return True


def _schema_consistent(path: Path) -> None:
    """A file the loader accepts passes the schema (the schema is never stricter than the loader)."""
    try:
        data = tomllib.loads(path.read_bytes().decode("utf-8-sig"))
    except (UnicodeDecodeError, tomllib.TOMLDecodeError, RecursionError):
        return
    if _accepted(path):
        errors = [f"{list(e.path)}: {e.message}"[:200] for e in VALIDATOR.iter_errors(data)]
        assert errors == [], errors[:3]
    fz.count("schema checks")


def _optimize_and_check(path: Path, method: str) -> dict | None:
    result, seconds = fz.timed(app, ["optimize", path, "--json", "--top", 3, "--method", method])
    try:
        fz.check(result, seconds, path=path, codes=(0, 2, 3), json_out=True, scenario_refusal=True)
    except AssertionError as exc:
        raise AssertionError(f"{exc} (the case: {fz.keep(path)})") from None
    if result.exit_code != 0:
        return None
    import json

    return json.loads(result.stdout)


# --------------------------------------------------------------------------- 1. corrupted scenarios


@st.composite
def mutation(draw, data: dict):
    """One hostile change to ``data``, in place; returns a word for what it did."""
    paths = _paths(data)
    kind = draw(st.sampled_from(["replace", "replace", "replace", "scale", "unit", "delete", "unknown",
                                 "duplicate", "mode", "deep", "type"]))
    path = draw(st.sampled_from(paths))
    parent, key = _parent(data, path), path[-1]
    value = parent[key]
    if kind == "replace":
        parent[key] = copy.deepcopy(draw(st.sampled_from(fz.HOSTILE_TEXT + fz.HOSTILE_NUMBERS + fz.HOSTILE_OTHER)))
    elif kind == "scale":
        power = draw(st.integers(-400, 400))
        if isinstance(value, str):
            head, _, tail = value.partition(" ")
            parent[key] = f"{head}e{power} {tail}".strip()
        elif isinstance(value, (int, float)) and not isinstance(value, bool):
            parent[key] = float(value) * 10.0 ** max(min(power, 300), -300)
        else:
            parent[key] = draw(st.sampled_from(fz.HOSTILE_NUMBERS))
    elif kind == "unit":
        number = draw(st.sampled_from(["1", "0", "-2", "30", "1e30", "0.09", "nan", "inf"]))
        unit = draw(st.sampled_from(["", "K", "degC", "C", "bar", "bara", "barg", "psig", "kmol/h", "Nm3/h", "scfm",
                                     "gpm", "kg/h", "m3/h", "g/mol", "kg/m3", "cP", "mN/m", "USD/kWh", "USD/t",
                                     "USD/m3", "USD/kg", "USD/lb", "in", "m", "yr", "h/yr", "ppmv", "ppbv", "ppmw",
                                     "mg/L", "ug/L", "%", "ppm", "m3/kg", "kW", "USD", "s", "J", "lbmol/h"]))
        parent[key] = f"{number} {unit}".strip()
    elif kind == "delete":
        del parent[key]
    elif kind == "unknown":
        target = value if isinstance(value, dict) else parent if isinstance(parent, dict) else data
        target[draw(st.sampled_from(["flw", "pressur", "x" * 300, "[red]", "name ", "trays2", "k.toluene"]))] = 1
    elif kind == "duplicate":
        lists = [p for p in paths if isinstance(_parent(data, p)[p[-1]], list)]
        if lists:
            chosen = draw(st.sampled_from(lists))
            items = _parent(data, chosen)[chosen[-1]]
            if items:
                items.append(copy.deepcopy(items[draw(st.integers(0, len(items) - 1))]))
    elif kind == "mode" and isinstance(data.get("case"), dict):
        data["case"]["mode"] = "strip" if data["case"].get("mode") == "absorb" else "absorb"
    elif kind == "deep":
        parent[key] = fz.deep(draw(st.sampled_from([3, 11, 13, 40, 200])))
    else:
        parent[key] = [value] if draw(st.booleans()) else {"value": value}
    return kind


@settings(COMMON, max_examples=fz.scale_for(6000, 150))
@given(data=st.data())
def test_corrupted_scenarios_are_refused_in_one_line_or_answered(data):
    name = data.draw(st.sampled_from(sorted(BASES)))
    scenario = copy.deepcopy(BASES[name])
    for _ in range(data.draw(st.integers(1, 3))):
        if not scenario:
            break
        fz.count("mutation: " + data.draw(mutation(scenario)))
    path = WORK / f"{name}-mutated.toml"
    path.write_text(fz.dumps(scenario), encoding="utf-8")
    record = _optimize_and_check(path, data.draw(st.sampled_from(["model", "scan"])))
    _schema_consistent(path)
    fz.count("corrupted scenarios")
    if record is not None and data.draw(st.integers(0, 3)) == 0:
        best = record["best"]
        result, seconds = fz.timed(app, ["evaluate", path, "--solvent", best["agent"], "--trays", best["trays"],
                                         "--ratio", repr(best["ratio_to_minimum"]), "--json"])
        fz.check(result, seconds, path=path, codes=(0, 4), json_out=result.exit_code == 0)
        fz.count("evaluate of an accepted mutation")


# --------------------------------------------------------------------------- 2. corrupted bytes


def _corrupt(draw, text: str) -> bytes:
    raw = text.encode("utf-8")
    kind = draw(st.sampled_from(["truncate", "splice", "insert", "utf16", "utf32", "latin1", "crlf", "cr", "nul",
                                 "long line", "huge", "bom", "duplicate header", "deep", "flip"]))
    fz.count("bytes: " + kind)
    at = draw(st.integers(0, max(len(raw) - 1, 0)))
    if kind == "truncate":
        return raw[:at]
    if kind == "splice":
        end = draw(st.integers(at, len(raw)))
        return raw[:at] + raw[end:]
    if kind == "insert":
        return raw[:at] + draw(st.binary(min_size=1, max_size=12)) + raw[at:]
    if kind == "utf16":
        return text.encode("utf-16")
    if kind == "utf32":
        return text.encode("utf-32")
    if kind == "latin1":
        return text.replace("Coating", "Co\u00e4ting").replace("Groundwater", "Gr\u00f6undwater").encode("latin-1",
                                                                                                          "replace")
    if kind == "crlf":
        return raw.replace(b"\n", b"\r\n")
    if kind == "cr":
        return raw.replace(b"\n", b"\r")
    if kind == "nul":
        return raw[:at] + b"\x00" + raw[at:]
    if kind == "long line":
        return raw + b'\n# ' + b"y" * draw(st.sampled_from([10_000, 200_000])) + b"\n"
    if kind == "huge":
        return raw + b"# " + b"z" * (1 << 20) + b"\n"
    if kind == "bom":
        return b"\xef\xbb\xbf" + raw
    if kind == "duplicate header":
        return raw + b"\n[column]\ntray = \"sieve\"\n"
    if kind == "deep":
        depth = draw(st.sampled_from([20, 900, 5000]))
        return raw + b"\nzz = " + b"[" * depth + b"]" * depth + b"\n"
    flipped = bytearray(raw)
    if flipped:
        flipped[at] ^= 1 << draw(st.integers(0, 7))
    return bytes(flipped)


@settings(COMMON, max_examples=fz.scale_for(1500, 40))
@given(data=st.data())
def test_corrupted_bytes_are_refused_in_one_line_or_answered(data):
    name = data.draw(st.sampled_from(sorted(BASES)))
    text = fz.dumps(BASES[name]) if data.draw(st.integers(0, 4)) else ORIGINAL_TEXT[name]
    path = WORK / f"{name}-bytes.toml"
    path.write_bytes(_corrupt(data.draw, text))
    _optimize_and_check(path, data.draw(st.sampled_from(["model", "scan"])))
    _schema_consistent(path)
    fz.count("corrupted bytes")


# --------------------------------------------------------------------------- 3. valid scenarios in every unit form


def _temperature(draw, celsius: float) -> str:
    form = draw(st.sampled_from(["degC", "degF", "K"]))
    return {"degC": f"{celsius!r} degC", "degF": f"{celsius * 1.8 + 32!r} degF", "K": f"{celsius + 273.15!r} K"}[form]


def _pressure(draw, bara: float) -> str:
    forms = ["bara", "kPa", "psia"] + (["barg", "psig"] if bara > 1.2 else [])
    form = draw(st.sampled_from(forms))
    return {"bara": f"{bara!r} bara", "kPa": f"{bara * 100!r} kPa", "psia": f"{bara * 1e5 / 6894.757293168!r} psia",
            "barg": f"{bara - 1.01325!r} barg", "psig": f"{(bara - 1.01325) * 1e5 / 6894.757293168!r} psig"}[form]


def _gas_fraction(draw, y: float):
    form = draw(st.sampled_from(["bare", "ppmv", "ppbv", "%"]))
    return {"bare": y, "ppmv": f"{y * 1e6!r} ppmv", "ppbv": f"{y * 1e9!r} ppbv", "%": f"{y * 100!r} %"}[form]


def _liquid_fraction(draw, x: float, solute_m: float, liquid_m: float, density: float):
    form = draw(st.sampled_from(["bare", "ppmw", "mg/L", "ug/L", "ppbw"]))
    w = x * solute_m / (x * solute_m + (1 - x) * liquid_m)
    return {"bare": x, "ppmw": f"{w * 1e6!r} ppmw", "ppbw": f"{w * 1e9!r} ppbw",
            "mg/L": f"{w * density * 1e3!r} mg/L", "ug/L": f"{w * density * 1e6!r} ug/L"}[form]


@st.composite
def valid_scenarios(draw) -> dict:
    """A random absorber or stripper within the documented ranges, its values in the unit forms the loader takes."""
    def between(lo, hi):
        return draw(st.floats(lo, hi, allow_nan=False, allow_infinity=False))

    def log_between(lo, hi):
        return 10 ** between(__import__("math").log10(lo), __import__("math").log10(hi))

    mode = draw(st.sampled_from(["absorb", "strip"]))
    solutes = ["sa", "sb"][: draw(st.integers(1, 2))]
    molar = {s: between(50.0, 200.0) for s in solutes}
    celsius = between(5.0, 60.0)
    scenario: dict = {"case": {"name": draw(st.sampled_from(["generated", "[red]gen", "=gen", "gen \u00e9"])),
                               "mode": mode},
                      "solute": {s: {"molar_mass": f"{molar[s]!r} g/mol"} for s in solutes}}
    if mode == "absorb":
        kmol_h = log_between(10.0, 5000.0)
        flow = draw(st.sampled_from(["kmol", "lbmol", "Nm3", "kg"]))
        flow_text = {"kmol": f"{kmol_h!r} kmol/h", "lbmol": f"{kmol_h / 0.45359237!r} lbmol/h",
                     "Nm3": f"{kmol_h * 22.413969545014137!r} Nm3/h", "kg": f"{kmol_h * 28.96!r} kg/h"}[flow]
        inlet = {s: log_between(1e-5, 5e-3) for s in solutes}
        scenario["feed"] = {"flow": flow_text, "temperature": _temperature(draw, celsius),
                            "pressure": _pressure(draw, between(1.02, 5.0)), "molar_mass": "28.96 g/mol",
                            "composition": {s: _gas_fraction(draw, inlet[s]) for s in solutes}}
    else:
        m3_h = log_between(1.0, 200.0)
        flow = draw(st.sampled_from(["m3", "gpm", "kg"]))
        density = between(990.0, 1005.0)
        flow_text = {"m3": f"{m3_h!r} m3/h", "gpm": f"{m3_h / 0.22712470704!r} gpm",
                     "kg": f"{m3_h * density!r} kg/h"}[flow]
        inlet = {s: log_between(1e-8, 1e-4) for s in solutes}
        scenario["feed"] = {"flow": flow_text, "temperature": _temperature(draw, celsius),
                            "pressure": _pressure(draw, between(1.0, 2.0)), "molar_mass": "18.015 g/mol",
                            "density": f"{density!r} kg/m3", "viscosity": f"{between(0.8, 1.3)!r} cP",
                            "surface_tension": f"{between(65.0, 75.0)!r} mN/m",
                            "composition": {s: _liquid_fraction(draw, inlet[s], molar[s] / 1e3, 0.018015, density)
                                            for s in solutes}}
    specs = []
    for s in solutes:
        if draw(st.booleans()):
            target = inlet[s] * log_between(1e-3, 0.5)
            outlet = (_gas_fraction(draw, target) if mode == "absorb" else
                      _liquid_fraction(draw, target, molar[s] / 1e3, 0.018015, 999.0))
            specs.append({"solute": s, "outlet": outlet})
        else:
            specs.append({"solute": s, "removal": between(0.5, 0.995)})
    scenario["spec"] = specs
    agents = []
    for i in range(draw(st.integers(1, 3))):
        agent = {"name": f"agent {i}", "molar_mass": "28.96 g/mol" if mode == "strip" else
                 f"{between(18.0, 300.0)!r} g/mol",
                 "k": {s: log_between(0.03, 10.0) if mode == "absorb" else log_between(10.0, 300.0) for s in solutes}}
        if mode == "absorb":
            agent.update(density=f"{between(700.0, 1100.0)!r} kg/m3", viscosity=f"{log_between(0.5, 10.0)!r} cP",
                         surface_tension=f"{between(20.0, 70.0)!r} mN/m",
                         price=draw(st.sampled_from([f"{between(0.0, 3.0)!r} USD/kg",
                                                     f"{between(0.0, 1.3)!r} USD/lb"])))
            if draw(st.booleans()):
                agent.update(regenerated=True, loss=between(0.0, 0.01), regeneration_steam=between(0.0, 0.1),
                             regeneration_cooling=draw(st.sampled_from([f"{between(0.0, 0.01)!r} m3/kg",
                                                                        f"{between(0.0, 1.0)!r} gal/lb"])))
        else:
            agent["disposal"] = f"{between(0.0, 0.01)!r} USD/kg"
        agents.append(agent)
    scenario["solvent" if mode == "absorb" else "stripping_gas"] = agents
    low = draw(st.integers(1, 5))
    ratio = between(1.05, 1.5)
    scenario["column"] = {"tray": draw(st.sampled_from(["sieve", "valve"])),
                          "tray_spacing": draw(st.sampled_from([f"{between(18.0, 30.0)!r} in",
                                                                f"{between(0.45, 0.75)!r} m"])),
                          "flood_fraction": between(0.6, 0.85),
                          "efficiency": draw(st.sampled_from([0.5, "oconnell", {"murphree": 0.7}])),
                          "trays": [low, low + draw(st.integers(3, 15))], "ratio": [ratio, ratio + between(0.5, 4.0)],
                          "ratio_levels": draw(st.integers(5, 12)), "larger_diameters": draw(st.integers(0, 2))}
    if draw(st.booleans()):
        scenario["column"]["max_height"] = f"{between(10.0, 60.0)!r} m"
    scenario["economics"] = {"interest": between(0.03, 0.2), "life": f"{between(5.0, 30.0)!r} yr",
                             "hours": f"{between(4000.0, 8760.0)!r} h/yr",
                             "electricity": draw(st.sampled_from([f"{between(0.02, 0.5)!r} USD/kWh",
                                                                  f"{between(20.0, 500.0)!r} USD/MWh"])),
                             "steam": f"{between(5.0, 100.0)!r} USD/t",
                             "cooling_water": f"{between(0.01, 0.5)!r} USD/m3",
                             "cost_year": draw(st.integers(2000, 2024))}
    if draw(st.booleans()):
        scenario["units"] = {"atmosphere": f"{between(90.0, 103.0)!r} kPa"}
    return scenario


@settings(COMMON, max_examples=fz.scale_for(1000, 20))
@given(scenario=valid_scenarios(), method=st.sampled_from(["model", "scan"]))
def test_valid_scenarios_load_pass_the_schema_and_give_finite_figures(scenario, method):
    path = WORK / "generated.toml"
    path.write_text(fz.dumps(scenario), encoding="utf-8")
    errors = [f"{list(e.path)}: {e.message}"[:200] for e in VALIDATOR.iter_errors(tomllib.loads(path.read_text()))]
    assert errors == [], errors[:3]
    load_scenario(path)
    result, seconds = fz.timed(app, ["optimize", path, "--json", "--top", 3, "--method", method])
    fz.check(result, seconds, path=path, codes=(0, 3), json_out=True)
    fz.count("valid generated scenarios")
    if result.exit_code == 0:
        import json

        best = json.loads(result.stdout)["best"]
        result, seconds = fz.timed(app, ["evaluate", path, "--solvent", best["agent"], "--trays", best["trays"],
                                         "--ratio", repr(best["ratio_to_minimum"]), "--json"])
        fz.check(result, seconds, path=path, codes=(0, 4), json_out=result.exit_code == 0)
        fz.count("evaluate of a generated optimum")


# --------------------------------------------------------------------------- 4. every command with bad arguments


def _hostile_paths() -> dict[str, Path]:
    base = WORK / "paths"
    base.mkdir(exist_ok=True)
    paths = {"missing": base / "missing.toml", "folder": base, "device": Path("/dev/null"),
             "binary": base / "binary.toml", "empty": base / "empty.toml", "demo": fz.BUNDLED[0],
             "long": base / ("l" * 300), "under-file": base / "binary.toml" / "x.toml",
             "fifo": base / "fifo.toml", "link": base / "dangling.toml"}
    paths["binary"].write_bytes(bytes(range(256)))
    paths["empty"].write_bytes(b"")
    if not paths["fifo"].exists():
        os.mkfifo(paths["fifo"])
    if not paths["link"].is_symlink():
        paths["link"].symlink_to(base / "nowhere" / "x.toml")
    return paths


PATHS = _hostile_paths()
OPTION_VALUES = ["0", "-1", "1", "16", "1.5", "nan", "inf", "-inf", "1e308", "5e-324", "99999999999999999999", "",
                 "x", "[red]", "=1+1", "95", "95 kmol/h", "2000 Nm3/h", "1 kmol/0/h", "1 (", "light wash oil",
                 "air, carbon adsorption", "diesel", "n" * 2000, "--json", "-", "absorb", "strip", "model", "scan"]
OPTIONS = {
    "optimize": ["--top", "--method", "--out", "--json", "--csv", "--save", "--force", "--timings"],
    "evaluate": ["--solvent", "--trays", "--ratio", "--rate", "--json"],
    "curve": ["--solvent"],
    "rate": ["--mode", "--stages", "--factor", "--liquid", "--gas", "--k-value", "--gas-in", "--liquid-in",
             "--target-remaining", "--json"],
    "schema": ["--out", "--force"],
}
FLAGS = {"--json", "--csv", "--save", "--force", "--timings"}


@st.composite
def bad_arguments(draw) -> list[str]:
    command = draw(st.sampled_from(sorted(OPTIONS) + ["nonsense", "--help-me", ""]))
    args = [command] if command else []
    if command in ("optimize", "evaluate", "curve"):
        args.append(str(PATHS[draw(st.sampled_from(sorted(PATHS)))]))
    for _ in range(draw(st.integers(0, 5))):
        option = draw(st.sampled_from(OPTIONS.get(command, ["--json"]) + ["--bogus", "--trayz"]))
        args.append(option)
        if option not in FLAGS or draw(st.integers(0, 5)) == 0:
            if option == "--out":
                args.append(str(draw(st.sampled_from([WORK / "out" / "a", PATHS["under-file"], PATHS["long"],
                                                      PATHS["device"], PATHS["fifo"], PATHS["binary"],
                                                      PATHS["link"]]))))
            else:
                args.append(draw(st.sampled_from(OPTION_VALUES)))
    return args


@settings(COMMON, max_examples=fz.scale_for(2500, 80))
@given(args=bad_arguments())
def test_every_command_with_bad_arguments_answers_in_one_line(args):
    if "--force" in args and "--out" in args:
        # never let a fuzz case replace anything but its own files
        out = args[args.index("--out") + 1] if args.index("--out") + 1 < len(args) else ""
        if not out.startswith(str(WORK)):
            args = [a for a in args if a != "--force"]
    result, seconds = fz.timed(app, args)
    fz.check(result, seconds, codes=(0, 2, 3, 4))
    assert stat_is_char_device("/dev/null")
    fz.count("command arguments")


def stat_is_char_device(path: str) -> bool:
    import stat

    return stat.S_ISCHR(os.stat(path).st_mode)


# --------------------------------------------------------------------------- the count


def test_zz_fuzz_count_and_time():
    total = sum(v for k, v in fz.COUNTS.items() if k in ("corrupted scenarios", "corrupted bytes",
                                                          "valid generated scenarios", "command arguments"))
    elapsed = time.perf_counter() - fz.STARTED
    minimum = 10_000 if FULL else 250
    detail = ", ".join(f"{k} {v:,}" for k, v in sorted(fz.COUNTS.items()))
    print(f"\nfuzz: {total:,} cases in {elapsed:.0f} s ({detail})")
    if any(fz.COUNTS.get(k) for k in ("corrupted scenarios", "command arguments")):
        assert total >= minimum, (total, minimum)
    else:
        pytest.skip("the fuzz cases were not run in this session")
