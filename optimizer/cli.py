"""towercost commands: parse, call the API, print. Nothing else lives here.

Exit codes (``towercost.errors``): 0 done; 2 bad input (one line naming the
field or option, the value and what is allowed; a usage error is one line
too); 3 no design meets the spec within the limits (for each candidate, the
limit and the best figure reached); 4 ``evaluate`` of a design that misses a
spec or breaks a limit (the sheet is printed, the line names which); 70
internal error (one line; the details go to a log file); 130 interrupted
(Ctrl-C: no partial file is left).
"""

from __future__ import annotations

import json
import math
import sys
import warnings
from enum import Enum
from pathlib import Path
from typing import Optional

import typer
from typer.core import TyperGroup

from towercost.errors import BAD_INPUT, INFEASIBLE, INTERNAL, INTERRUPTED, MISSES

EXIT_CODES = ("Exit codes: 0 done; 2 bad input (one line naming it); 3 no design meets the spec within the "
              "limits; 4 evaluate: the design misses a spec or breaks a limit; 70 internal error (details in a "
              "log file); 130 interrupted.")

#: Largest tray count an option may name (the scenario's own bound).
MAX_TRAYS = 1000


def _one_line(text: str, limit: int = 600) -> str:
    line = " ".join(str(text).split())
    return line if len(line) <= limit else line[:limit - 3] + "..."


class OneLineGroup(TyperGroup):
    """The command group: usage errors as one line, Ctrl-C as exit 130, warnings never printed.

    A RuntimeWarning (an overflow or a division by zero inside the numbers)
    is an internal error, exit 70, as it is in the tests; other warnings are
    not printed.
    """

    def main(self, args=None, prog_name=None, complete_var=None, standalone_mode=True, **extra):
        from typer import _click as click
        from typer.exceptions import Abort

        code = 0
        try:
            with warnings.catch_warnings():
                warnings.simplefilter("ignore")
                warnings.simplefilter("error", RuntimeWarning)
                code = super().main(args=args, prog_name=prog_name, complete_var=complete_var,
                                    standalone_mode=False, **extra) or 0
        except click.exceptions.NoArgsIsHelpError as exc:
            typer.echo(exc.format_message())
            typer.echo("error: towercost: give a command; see 'towercost --help'", err=True)
            code = BAD_INPUT
        except click.exceptions.UsageError as exc:
            where = exc.ctx.command_path if exc.ctx is not None else "towercost"
            typer.echo(f"error: {where}: {_one_line(exc.format_message()).rstrip('.')}; see '{where} --help'",
                       err=True)
            code = BAD_INPUT
        except click.exceptions.ClickException as exc:
            typer.echo(f"error: {_one_line(exc.format_message())}", err=True)
            code = exc.exit_code
        except (Abort, KeyboardInterrupt):
            code = INTERRUPTED
        except Exception as exc:  # noqa: BLE001 - a bug outside the commands' own handling
            code = _internal_code(exc, DEFAULT_OUT)
        if code == INTERRUPTED:
            typer.echo("error: interrupted; no partial file was left", err=True)
        if not isinstance(code, int):
            code = 0
        if standalone_mode:
            sys.exit(code)
        return code


app = typer.Typer(
    cls=OneLineGroup,
    add_completion=False,
    no_args_is_help=True,
    pretty_exceptions_enable=False,
    help="Least-annualized-cost design of dilute absorbers and strippers (tray columns). " + EXIT_CODES,
)

#: Where an internal error's details are written when a command has no output folder of its own.
DEFAULT_OUT = Path("reports")


class Mode(str, Enum):
    absorb = "absorb"
    strip = "strip"


class Method(str, Enum):
    model = "model"
    scan = "scan"


class Distinct(str, Enum):
    trays = "trays"
    variant = "variant"
    candidate = "candidate"


def _version(value: bool) -> None:
    if value:
        import towercost

        typer.echo(f"towercost {towercost.__version__}")
        raise typer.Exit()


@app.callback()
def _main(version: bool = typer.Option(False, "--version", callback=_version, is_eager=True,
                                       help="Print the version and exit.")) -> None:
    """Least-annualized-cost design of dilute absorbers and strippers (tray columns)."""


def _fail(message: str, code: int = BAD_INPUT) -> None:
    typer.echo(f"error: {_one_line(message, 1200)}", err=True)
    raise typer.Exit(code)


def _internal_code(exc: BaseException, out: Path) -> int:
    """An unexpected exception: one line on standard error, the traceback in a new log file; the exit code."""
    import datetime
    import tempfile
    import traceback

    stamp = datetime.datetime.now().strftime("%Y%m%d-%H%M%S-%f")
    detail = "".join(traceback.format_exception(exc))
    where = "not written (no writable folder)"
    for folder in (out, Path(tempfile.gettempdir())):
        try:
            folder.mkdir(parents=True, exist_ok=True)
            log = folder / f"towercost-internal-error-{stamp}.log"
            with open(log, "x", encoding="utf-8") as handle:
                handle.write(detail)
            where = str(log)
            break
        except OSError:
            continue
    text = _one_line(f"{type(exc).__name__}: {exc}", 200)
    typer.echo(f"error: internal error ({text}); this is a bug in towercost, not in the input; details: {where}",
               err=True)
    return INTERNAL


def _run(call, out: Path = DEFAULT_OUT):
    """Call the API; turn its exceptions into one line and an exit code."""
    from towercost.errors import InfeasibleSpec, ScenarioError
    from towercost.models.kremser import UnreachableTarget

    try:
        return call()
    except InfeasibleSpec as exc:
        _fail(str(exc), INFEASIBLE)
    except (ScenarioError, UnreachableTarget, FileExistsError) as exc:
        _fail(str(exc))
    except typer.Exit:
        raise
    except Exception as exc:  # noqa: BLE001 - anything else is a bug, said as one
        raise typer.Exit(_internal_code(exc, out)) from None


def _load(path: Path):
    from towercost.scenario import load_scenario

    return _run(lambda: load_scenario(path))


def _checked(scenario, path: Path, agent: str | None = None):
    """Before any evaluation: every candidate computable and the design space within memory (one line if not)."""
    from towercost.design.case import agent_index, prepare
    from towercost.design.reasons import check_case
    from towercost.errors import ScenarioError

    def check():
        try:
            case = prepare(scenario)
            check_case(case, None if agent is None else [agent_index(case, agent)])
        except ScenarioError as exc:
            raise type(exc)(f"{path}, {exc}" if str(exc).startswith("[") else f"{path}: {exc}") from None
        return case

    return _run(check)


class _Working:
    """A spinner on a terminal's standard error once a step with no bar of its own passes about a second."""

    def __init__(self, label: str, delay: float = 1.0):
        import threading

        self.label, self.delay = label, delay
        self.lock = threading.Lock()
        self.status = None
        self.stopped = False
        self.timer = threading.Timer(delay, self._start)
        self.timer.daemon = True

    def _start(self) -> None:
        with self.lock:
            if self.stopped:
                return
            from rich.console import Console

            self.status = Console(stderr=True).status(self.label)
            self.status.start()

    def start(self) -> "_Working":
        if sys.stderr.isatty():
            self.timer.start()
        return self

    def stop(self) -> None:
        with self.lock:
            self.stopped = True
            self.timer.cancel()
            if self.status is not None:
                self.status.stop()
                self.status = None

    def __enter__(self):
        return self.start()

    def __exit__(self, *exc) -> None:
        self.stop()


def _progress(what: str = "evaluating alternatives"):
    """A progress callback for long runs: a rich bar on stderr once a run passes about a second, then a
    spinner while the selection and the exact re-evaluation run (``update.finish()`` ends it)."""
    import time

    state: dict = {"start": time.perf_counter(), "bar": None, "after": None}

    def update(done: int, total: int) -> None:
        if state["bar"] is False:   # the bar has run and stopped; later unit spaces go unshown
            return
        if state["bar"] is None:
            if time.perf_counter() - state["start"] < 1.0 or done >= total:
                if done >= total and state["after"] is None:
                    state["after"] = _Working("selecting and re-evaluating the best designs").start()
                return
            from rich.console import Console
            from rich.progress import BarColumn, Progress, TextColumn, TimeRemainingColumn

            bar = Progress(TextColumn(what), BarColumn(), TextColumn("{task.completed:,}"),
                           TimeRemainingColumn(), console=Console(stderr=True), transient=True)
            bar.start()
            state["bar"], state["task"] = bar, bar.add_task("space", total=total)
        bar = state["bar"]
        bar.update(state["task"], completed=done, total=total)
        if done >= total:
            bar.stop()
            state["bar"] = False
            if state["after"] is None:
                state["after"] = _Working("selecting and re-evaluating the best designs").start()

    def finish() -> None:
        if state["after"] is not None:
            state["after"].stop()

    update.finish = finish
    return update


# --------------------------------------------------------------------------- rate


def _check(name: str, value: Optional[float], low: float, high: float, allowed: str, *,
           low_open: bool = True, high_open: bool = True) -> None:
    if value is None:
        return
    below = value <= low if low_open else value < low
    above = value >= high if high_open else value > high
    if not math.isfinite(value) or below or above:
        _fail(f"{name} must be {allowed}, got {value:g}")


@app.command()
def rate(
    mode: Mode = typer.Option(Mode.absorb, "--mode", help="absorb (treat a gas) or strip (treat a liquid)."),
    stages: Optional[float] = typer.Option(None, "--stages", help="Theoretical stages N (may be fractional)."),
    factor: Optional[float] = typer.Option(None, "--factor", help="Absorption factor A (absorb) or stripping factor S (strip)."),
    liquid: Optional[float] = typer.Option(None, "--liquid", help="Liquid molar flow L (any unit, same as --gas)."),
    gas: Optional[float] = typer.Option(None, "--gas", help="Gas molar flow V (same unit as --liquid)."),
    k_value: Optional[float] = typer.Option(None, "--k-value", help="K = y/x at column conditions."),
    gas_in: Optional[float] = typer.Option(None, "--gas-in", help="Solute mole fraction in the entering gas."),
    liquid_in: Optional[float] = typer.Option(None, "--liquid-in", help="Solute mole fraction in the entering liquid."),
    target_remaining: Optional[float] = typer.Option(
        None, "--target-remaining", help="Fraction of the entering solute left in the treated stream: with "
        "--factor gives the stages required, with --stages the factor required."),
    as_json: bool = typer.Option(False, "--json", help="Print one JSON object."),
) -> None:
    """One countercurrent cascade of equilibrium stages (Kremser): a quick what-if."""
    from towercost.models import kremser

    absorb = mode is Mode.absorb
    gas_in = (1e-3 if absorb else 0.0) if gas_in is None else gas_in
    liquid_in = (0.0 if absorb else 1e-3) if liquid_in is None else liquid_in
    _check("--stages", stages, 0.0, 1e4, "a number >= 0 and at most 10000", low_open=False, high_open=False)
    _check("--factor", factor, 0.0, 1e6, "a number > 0 and at most 1e6", high_open=False)
    _check("--liquid", liquid, 0.0, 1e12, "a flow > 0 and at most 1e12", high_open=False)
    _check("--gas", gas, 0.0, 1e12, "a flow > 0 and at most 1e12", high_open=False)
    _check("--k-value", k_value, 0.0, 1e12, "a number > 0 and at most 1e12", high_open=False)
    _check("--gas-in", gas_in, 0.0, 1.0, "a mole fraction in [0, 1)", low_open=False)
    _check("--liquid-in", liquid_in, 0.0, 1.0, "a mole fraction in [0, 1)", low_open=False)
    _check("--target-remaining", target_remaining, 0.0, 1.0, "a fraction in (0, 1)")
    treated_in = gas_in if absorb else liquid_in
    if treated_in == 0:
        _fail(f"{'--gas-in' if absorb else '--liquid-in'} must be > 0 for the treated stream, got 0")
    if factor is None and None not in (liquid, gas, k_value):
        factor = liquid / (k_value * gas) if absorb else k_value * gas / liquid
        if not (math.isfinite(factor) and 1e-12 <= factor <= 1e6):
            _fail(f"--liquid, --gas and --k-value give a factor of {factor:g}; it must lie in [1e-12, 1e6]")
    elif factor is not None and (liquid is not None or gas is not None):
        _fail("give --factor or the flows (--liquid, --gas with --k-value), not both")
    other_in = liquid_in if absorb else gas_in
    if other_in > 0 and k_value is None:
        _fail(f"{'--liquid-in' if absorb else '--gas-in'} {other_in:g} needs --k-value: the entering "
              f"{'solvent' if absorb else 'stripping gas'} enters through K")

    record: dict = {"mode": mode.value}
    if target_remaining is not None:
        if (factor is None) == (stages is None):
            _fail("--target-remaining goes with exactly one of --factor (or the flows) and --stages")
        eq = (k_value or 0.0) * liquid_in if absorb else (gas_in / k_value if gas_in else 0.0)
        try:
            need = kremser.requirement_for_remaining(target_remaining, treated_in, eq, factor=factor,
                                                     stages=None if factor is not None else stages)
        except kremser.UnreachableTarget as exc:
            _fail(f"--target-remaining {target_remaining:g}: {exc}")
        if stages is None:
            record["stages_required"] = need.stages
        else:
            record["factor_required"] = need.factor
        stages, factor = need.stages, need.factor
    if stages is None or factor is None:
        _fail("give --stages and --factor (or --liquid, --gas and --k-value)")
    cascade = _run(lambda: (kremser.absorb(factor, stages, gas_in, liquid_in, k_value) if absorb
                            else kremser.strip(factor, stages, liquid_in, gas_in, k_value)))

    def num(value):
        return None if value is None else float(value)

    record.update(stages=float(stages), factor=float(factor), k_value=k_value, gas_in=gas_in, liquid_in=liquid_in,
                  fraction_remaining=num(cascade.fraction_remaining), fraction_removed=num(cascade.fraction_removed),
                  gas_out=num(cascade.gas_out), liquid_out=num(cascade.liquid_out))
    if as_json:
        typer.echo(json.dumps(record, indent=2))
        return
    from rich.console import Console

    from towercost.report.terminal import print_cascade

    print_cascade(Console(), record, absorb)


# --------------------------------------------------------------------------- evaluate


def _length(text: Optional[str], option: str) -> Optional[float]:
    """A length option as text ("2.286", "90 in") in m; one-line error otherwise."""
    if text is None:
        return None
    from towercost.scenario.units import UnitError, to_si

    try:
        value = to_si(text, "m", what=option)
    except UnitError as exc:
        _fail(str(exc))
    if not (math.isfinite(value) and value > 0):
        _fail(f"{option} must be a length > 0, got {text!r}")
    return value


def _design(data, design: str):
    """The decisions an identifier names, checked against the scenario's candidates."""
    from towercost.design.loop_case import candidate_names
    from towercost.report import ids

    return _run(lambda: ids.parse(design, candidate_names(data),
                                  [(p.label, p.packing) for p in data.packing]))


def _misses(case, designs) -> str | None:
    """Which specs and limits design 0 does not meet, with its figure against each; None if it meets all."""
    from towercost.report.terminal import concentration_text

    parts = []
    for limit in designs.limits or []:
        if bool(limit.met[0]):
            continue
        if limit.is_spec:
            s = int(limit.name.removeprefix("spec_"))
            parts.append(f"{case.solutes[s]} leaves at {concentration_text(case, s, float(designs.outlet[0, s]))} "
                         f"(spec {concentration_text(case, s, float(case.target[s]))})")
            continue
        value = float(limit.values[0])
        if limit.name == "ratio_low":
            value = -value
        parts.append(f"{limit.label} is broken ({value:.4g} {limit.unit})".replace(" )", ")"))
    return "; ".join(parts) or None


@app.command(epilog=EXIT_CODES)
def evaluate(
    scenario: Path = typer.Argument(..., help="Scenario file (TOML)."),
    design: Optional[str] = typer.Option(None, "--design", help="A design identifier from a ranking (reproduces "
                                         "that design exactly); replaces --solvent, --trays, --rate/--ratio and "
                                         "--diameter."),
    solvent: Optional[str] = typer.Option(None, "--solvent", help="Candidate name (solvent, or stripping gas)."),
    trays: Optional[int] = typer.Option(None, "--trays", help=f"Real trays, 1 to {MAX_TRAYS}."),
    packing: Optional[str] = typer.Option(None, "--packing", help="A [[packing]] of the scenario (its name or row "
                                          "key), in place of --trays: its height follows from the rate."),
    ratio: Optional[float] = typer.Option(None, "--ratio", help="Agent rate as a multiple of the minimum (L/Lmin or G/Gmin)."),
    rate_: Optional[str] = typer.Option(None, "--rate", help="Agent molar rate with its unit, e.g. '95 kmol/h' or "
                                        "'2000 Nm3/h'."),
    diameter: Optional[str] = typer.Option(None, "--diameter", help="Shell inside diameter, e.g. '2.286' (m) or "
                                           "'90 in'; default: the least standard size."),
    as_json: bool = typer.Option(False, "--json", help="Print one JSON object."),
) -> None:
    """Evaluate one design exactly and print its design sheet (exit 4 if it misses a spec or breaks a limit)."""
    from towercost.report import ratios, records, terminal
    from towercost.scenario.units import UnitError, to_si
    from towercost.select import ranking

    data = _load(scenario)
    molar = None
    if design is not None:
        given = [name for name, value in (("--solvent", solvent), ("--trays", trays), ("--ratio", ratio),
                                          ("--rate", rate_), ("--diameter", diameter), ("--packing", packing))
                 if value is not None]
        if given:
            _fail(f"--design names the whole design; give it without {', '.join(given)}")
        named = _design(data, design)
        solvent, trays, molar, shell, packing = named.agent, named.trays, named.rate, named.diameter, named.internals
    else:
        if solvent is None or (trays is None) == (packing is None):
            _fail("give --design ID, or --solvent and --trays (or --packing) with --ratio or --rate")
        if trays is not None and not 1 <= trays <= MAX_TRAYS:
            _fail(f"--trays must be a whole number from 1 to {MAX_TRAYS}, got {trays}")
        if (ratio is None) == (rate_ is None):
            _fail("give exactly one of --ratio and --rate")
        _check("--ratio", ratio, 0.0, 1000.0, "a number > 0 and at most 1000", high_open=False)
        from towercost.scenario.units import is_gas_volume

        if rate_ is not None and data.case.mode == "absorb" and is_gas_volume(rate_):
            _fail(f"--rate {rate_!r} is a gas volume at normal or standard conditions, but the solvent is a liquid: "
                  "give a molar rate (kmol/h, lbmol/h)")
        if rate_ is not None:
            try:
                molar = to_si(rate_, "mol/s", what="--rate", basis=data.units.basis(), require_unit=True,
                              example="kmol/h")
            except UnitError as exc:
                _fail(str(exc))
            if not (math.isfinite(molar) and 0 < molar <= 1e7 / 3.6):
                _fail(f"--rate must be a flow > 0 and at most 1e7 kmol/h, got {rate_!r}")
        shell = _length(diameter, "--diameter")
    _checked(data, scenario, solvent)
    case, designs, warnings = _run(lambda: ranking.evaluate_design(data, solvent, trays, ratio=ratio, rate=molar,
                                                                   diameter=shell, internals=packing))
    note = _run(lambda: ratios.miss_note(case, designs, ratio))
    if as_json:
        record = records.design_record(case, designs, ratio_text=ratios.ratio_texts(case, designs)[0])
        record.update(spec_note=note, warnings=warnings, scenario=records.conditions_record(case),
                      economics=records.economics_record(case), tool=records.tool_record(),
                      caution=records.CAUTION)
        typer.echo(records.to_json(record))
    else:
        terminal.print_design(terminal.console(), case, designs, warnings, f"{data.case.name}: design sheet", note)
    missed = _misses(case, designs)
    if missed:
        _fail(f"the design misses: {missed}", MISSES)


@app.command()
def equipment(
    scenario: Path = typer.Argument(..., help="Scenario file (TOML)."),
    design: Optional[str] = typer.Option(None, "--design", help="A design identifier from a ranking; default: the "
                                         "best design."),
    out: Optional[Path] = typer.Option(None, "--out", help="Write the list to this file: .csv, .xlsx or .json."),
    force: bool = typer.Option(False, "--force", help="Replace the file if it exists."),
) -> None:
    """The equipment list and utilities of one design: print them, or write them for an estimate."""
    from towercost.report import equipment as eq
    from towercost.report import terminal
    from towercost.select import ranking

    data = _load(scenario)
    _checked(data, scenario)
    if out is not None and out.suffix.lower() not in eq.FORMATS:
        _fail(f"--out {out}: the equipment list is written as .csv, .xlsx or .json (by the file's extension)")
    if design is None:
        result = _run(lambda: ranking.optimize(data, top=1, progress=_progress()))
        case, designs = result.case, result.designs
    else:
        named = _design(data, design)
        case, designs, _ = _run(lambda: ranking.evaluate_design(data, named.agent, named.trays, rate=named.rate,
                                                                diameter=named.diameter, internals=named.internals))
    rows = eq.equipment_list(case, designs)
    if out is None:
        terminal.print_equipment(terminal.console(), rows, eq.utilities(designs), f"{data.case.name}: equipment list")
        return
    written = _run(lambda: eq.write_table(out, rows, force=force))
    typer.echo(f"wrote {written}")


# --------------------------------------------------------------------------- optimize, curve, schema


def _timeless(record: dict) -> dict:
    """The record with its timing figures set to null, so that identical input gives identical bytes."""
    solver = dict(record.get("solver", {}))
    for key in solver:
        if key.endswith("_seconds"):
            solver[key] = None
    return {**record, "solver": solver}


@app.command(epilog=EXIT_CODES)
def optimize(
    scenario: Path = typer.Argument(..., help="Scenario file (TOML)."),
    top: int = typer.Option(10, "--top", min=1, max=200, help="How many distinct designs to rank."),
    method: Method = typer.Option(Method.model, "--method", help="model (Pyomo + HiGHS) or scan (every alternative)."),
    distinct: Distinct = typer.Option(Distinct.trays, "--distinct", help="What counts as a distinct design: trays "
                                      "(one per candidate and tray count, at its best rate and diameter), variant "
                                      "(every rate and diameter variant) or candidate (one per candidate)."),
    as_json: bool = typer.Option(False, "--json", help="Print one JSON object instead of tables."),
    csv: bool = typer.Option(False, "--csv", help="Write the ranked designs as CSV into the output folder."),
    save: bool = typer.Option(False, "--save", help="Write the JSON report into the output folder."),
    equipment_file: Optional[Path] = typer.Option(None, "--equipment", help="Write the equipment list of every "
                                                  "ranked design to this file (.csv, .xlsx or .json)."),
    out: Path = typer.Option(DEFAULT_OUT, "--out", help="Output folder for --csv and --save."),
    force: bool = typer.Option(False, "--force", help="Replace files that already exist (regular files only)."),
    verbose: bool = typer.Option(False, "--verbose", help="Also print the solver's diagnostics and timings."),
    timings: bool = typer.Option(False, "--timings", help="Keep the run's timings in the JSON (else left out, so "
                                 "that identical input gives identical files)."),
) -> None:
    """Rank the designs of least total annualized cost: solvent, rate, trays and diameter."""
    from towercost.report import equipment as eq
    from towercost.report import files, records, terminal
    from towercost.select import ranking

    data = _load(scenario)
    if equipment_file is not None and equipment_file.suffix.lower() not in eq.FORMATS:
        _fail(f"--equipment {equipment_file}: the equipment list is written as .csv, .xlsx or .json "
              "(by the file's extension)")
    stem = scenario.stem or "scenario"
    targets = ([out / f"{stem}-designs.csv"] if csv else []) + ([out / f"{stem}-report.json"] if save else [])
    targets += [equipment_file] if equipment_file is not None else []
    _run(lambda: files.check_targets(targets, force=force))   # every target before any work
    _checked(data, scenario)
    progress = _progress()
    try:
        result = _run(lambda: ranking.optimize(data, top=top, method=method.value, distinct=distinct.value,
                                               progress=progress), out)
    finally:
        progress.finish()
    record = records.result_record(result, verbose=verbose or timings) if as_json else None
    texts = []
    if csv:
        texts.append((out / f"{stem}-designs.csv", eq.csv_text(records.alternatives_frame(result).to_dict("records"))))
    if save:
        # the saved report carries the run's date; its timings and diagnostics only with --timings or --verbose
        saved = records.saved_report(records.result_record(result, verbose=verbose or timings))
        texts.append((out / f"{stem}-report.json", records.to_json(saved) + "\n"))
    written = _run(lambda: files.write_all(texts, force=force), out) if texts else []
    if equipment_file is not None:
        rows = eq.ranked_rows(result)
        written.append(_run(lambda: eq.write_table(equipment_file, rows, force=force), out))
    if as_json:
        typer.echo(records.to_json(record))
    else:
        console = terminal.console()
        terminal.print_ranking(console, result, verbose=verbose)
        for path in written:
            console.print(f"wrote {path}", markup=False, highlight=False)


@app.command(epilog=EXIT_CODES)
def curve(
    scenario: Path = typer.Argument(..., help="Scenario file (TOML)."),
    solvent: str = typer.Option(..., "--solvent", help="Candidate name (solvent, or stripping gas)."),
    plot: Optional[Path] = typer.Option(None, "--plot", help="Also draw the curves to this file (.png or .svg)."),
    csv: bool = typer.Option(False, "--csv", help="Also write both curves as CSV into the output folder."),
    out: Path = typer.Option(DEFAULT_OUT, "--out", help="Output folder for --csv."),
    force: bool = typer.Option(False, "--force", help="Replace files that already exist."),
) -> None:
    """Annualized cost of one candidate against trays and against the ratio to the minimum."""
    from towercost.report import terminal
    from towercost.select import ranking

    data = _load(scenario)
    if plot is not None and plot.suffix.lower() not in (".png", ".svg"):
        _fail(f"--plot {plot}: a plot is written as .png or .svg (by the file's extension)")
    _checked(data, scenario, solvent)
    with _Working("evaluating the alternatives of one candidate"):
        result = _run(lambda: ranking.cost_curve(data, solvent))
    console = terminal.console()
    terminal.print_curve(console, result)
    if data.warnings:
        console.print("Warnings", style="bold")
        for line in data.warnings:
            console.print(f"  - {line}", markup=False, highlight=False)
    if plot is not None:
        from towercost.report import files, plots

        image = plots.cost_curves([result], result.case.service.ratio_word, fmt=plot.suffix.lower()[1:])
        typer.echo(f"wrote {_run(lambda: files.write_new(plot, image, force=force))}")
    if csv:
        from towercost.report import equipment, files, records
        from towercost.report.ids import candidate_keys

        rows = records.curve_rows(result)
        name = f"{scenario.stem}-{candidate_keys(result.case.agents)[solvent]}-curve.csv"
        typer.echo(f"wrote {_run(lambda: files.write_new(out / name, equipment.csv_text(rows), force=force), out)}")


@app.command()
def report(
    scenario: Path = typer.Argument(..., help="Scenario file (TOML)."),
    out: Optional[Path] = typer.Option(None, "--out", help="The report file: .html (one self-contained file) or "
                                       ".md (Markdown); default reports/SCENARIO-report.html."),
    top: int = typer.Option(10, "--top", min=1, max=200, help="How many distinct designs to rank."),
    method: Method = typer.Option(Method.model, "--method", help="model (Pyomo + HiGHS) or scan (every alternative)."),
    distinct: Distinct = typer.Option(Distinct.trays, "--distinct", help="What counts as a distinct design: trays, "
                                      "variant or candidate (as for optimize)."),
    force: bool = typer.Option(False, "--force", help="Replace the file if it exists."),
) -> None:
    """Write the design report: case, best design, alternatives, band, plots, equipment, utilities, references."""
    import time

    from towercost.report import files, html
    from towercost.select import ranking

    target = out if out is not None else DEFAULT_OUT / f"{scenario.stem}-report.html"
    fmt = html.FORMATS.get(target.suffix.lower())
    if fmt is None:
        _fail(f"--out {target}: a report is written as .html or .md (by the file's extension)")
    start = time.perf_counter()
    data = _load(scenario)
    folder = target.parent
    result = _run(lambda: ranking.optimize(data, top=top, method=method.value, distinct=distinct.value,
                                           progress=_progress()), folder)
    text = _run(lambda: html.report_text(data, result, fmt, source=str(scenario)), folder)
    written = _run(lambda: files.write_new(target, text, force=force), folder)
    typer.echo(f"wrote {written} ({len(text.encode('utf-8')) / 1024:,.0f} KiB) in {time.perf_counter() - start:.2f} s")


@app.command()
def site(
    sitefile: Path = typer.Argument(..., help="Site file (TOML): units, shared limits, linking rules."),
    top: int = typer.Option(5, "--top", min=1, max=100, help="How many joint choices to rank."),
    distinct: str = typer.Option("trays", "--distinct", help="How listed choices differ: trays (a unit's candidate "
                                 "or tray count), candidate, or variant (any design)."),
    as_json: bool = typer.Option(False, "--json", help="Print one JSON object instead of tables."),
    csv: bool = typer.Option(False, "--csv", help="Write the joint choices as CSV into the output folder."),
    out: Path = typer.Option(DEFAULT_OUT, "--out", help="Output folder for --csv."),
    force: bool = typer.Option(False, "--force", help="Replace files that already exist."),
) -> None:
    """Choose one design per unit of a site together, under shared budgets and utilities."""
    from towercost.report import files, records, site as site_report, terminal
    from towercost.scenario.site import load_site
    from towercost.select.site import optimize_site

    from towercost.select.site import LISTINGS

    if distinct not in LISTINGS:
        _fail(f"--distinct must be one of {', '.join(LISTINGS)}, got {distinct!r}")
    spec = _run(lambda: load_site(sitefile))
    result = _run(lambda: optimize_site(spec, top=top, distinct=distinct), out)
    if csv:
        rows = []
        for rank, portfolio in enumerate(result.portfolios, start=1):
            for name, space, d in zip(result.units, result.spaces, portfolio.designs):
                rows.append(f"{rank},{_csv_text(name)},{_csv_text(space.case.agents[int(d.agent[0])])},"
                            f"{int(d.trays[0])},{d.ratio[0]!r},{d.diameter[0]!r},{d.installed[0]!r},"
                            f"{d.annualized[0]!r},{portfolio.annualized!r}")
        text = "rank,unit,candidate,trays,ratio_to_minimum,diameter_m,installed_USD,annualized_USD_yr," \
               "site_annualized_USD_yr\n" + "\n".join(rows) + "\n"
        written = _run(lambda: files.write_new(out / f"{sitefile.stem}-site.csv", text, force=force), out)
    if as_json:
        typer.echo(records.to_json(site_report.site_record(result)))
        return
    console = terminal.console()
    site_report.print_site(console, result)
    if csv:
        console.print(f"wrote {written}", highlight=False)


def _csv_text(value: str) -> str:
    """A CSV field: quoted, and neutralised if a spreadsheet would read it as a formula."""
    text = str(value)
    if text[:1] in ("=", "+", "-", "@"):
        text = "'" + text
    return '"' + text.replace('"', '""') + '"'


@app.command()
def batch(
    inputs: list[str] = typer.Argument(..., help="Folders (their *.toml), glob patterns or files: scenarios or sites."),
    workers: int = typer.Option(1, "--workers", min=1, max=64, help="Local worker processes."),
    cluster: Optional[str] = typer.Option(None, "--cluster", help="Address of a Dask distributed scheduler to use "
                                          "instead of local workers, e.g. tcp://10.0.0.5:8786."),
    out: Path = typer.Option(DEFAULT_OUT, "--out", help="Output folder for the results and the summary."),
    top: int = typer.Option(5, "--top", min=1, max=100, help="Designs (or joint choices) ranked per file."),
    force: bool = typer.Option(False, "--force", help="Recompute files whose result exists, and replace it."),
) -> None:
    """Optimize many scenario or site files; each result is written as it finishes; failures are listed."""
    import datetime

    from towercost.report import files, terminal
    from towercost.select.batch import files_of, run_batch, summary_frame

    if cluster is not None:
        try:
            import distributed  # noqa: F401
        except ImportError:
            _fail("--cluster needs the Dask 'distributed' package: pip install 'towercost[cluster]'")
    paths = files_of(inputs)
    if not paths:
        _fail(f"no scenario or site files in {' '.join(inputs)!r}")
    entries = _run(lambda: run_batch(paths, out, workers=workers, cluster=cluster, force=force, top=top,
                                     progress=_progress("files")), out)
    frame = summary_frame(entries)
    stamp = datetime.datetime.now().strftime("%Y%m%d-%H%M%S")
    summary = _run(lambda: files.write_new(out / f"batch-summary-{stamp}.csv", frame.to_csv(index=False)), out)
    terminal.print_batch(terminal.console(), entries, summary)


@app.command()
def schema(
    out: Optional[Path] = typer.Option(None, "--out", help="Write to this file instead of printing."),
    force: bool = typer.Option(False, "--force", help="Replace the file if it exists (a regular file only)."),
) -> None:
    """The JSON Schema (draft 2020-12) of scenario files, for editors that validate TOML."""
    from towercost.report import files
    from towercost.scenario.editor import json_text

    if out is not None:
        _run(lambda: files.check_target(out, force=force))
    text = json_text()
    if out is None:
        typer.echo(text)
    else:
        _run(lambda: files.write_new(out, text + "\n", force=force))
        typer.echo(f"wrote {out}")


# --------------------------------------------------------------------------- sensitivity, uncertainty


def _phase_progress():
    """A progress callback ``(phase, done, total)``: a rich bar on stderr once a run passes about a second."""
    import time

    state: dict = {"start": time.perf_counter(), "bar": None, "phase": None}

    def update(phase: str, done: int, total: int) -> None:
        if state["bar"] is None:
            if time.perf_counter() - state["start"] < 1.0 or done >= total:
                return
            from rich.console import Console
            from rich.progress import BarColumn, Progress, TextColumn, TimeRemainingColumn

            bar = Progress(TextColumn("{task.description}"), BarColumn(), TextColumn("{task.percentage:>3.0f} %"),
                           TimeRemainingColumn(), console=Console(stderr=True), transient=True)
            bar.start()
            state["bar"] = bar
        bar = state["bar"]
        if state["phase"] != phase:
            state["phase"], state["task"] = phase, bar.add_task(phase, total=total)
        bar.update(state["task"], completed=done, total=total)
        if done >= total:
            bar.remove_task(state["task"])
            state["phase"] = None

    def stop() -> None:
        if state["bar"] is not None:
            state["bar"].stop()

    update.stop = stop
    return update


def _write_study(out: Path, stem: str, force: bool, record_text: Optional[str], png: Optional[bytes]) -> list:
    from towercost.report import files
    from towercost.report.study_plots import write_png

    written = []
    if record_text is not None:
        written.append(_run(lambda: files.write_new(out / f"{stem}.json", record_text, force=force), out))
    if png is not None:
        written.append(_run(lambda: write_png(out / f"{stem}.png", png, force=force), out))
    return written


@app.command()
def sensitivity(
    scenario: Path = typer.Argument(..., help="Scenario file (TOML)."),
    change: Optional[float] = typer.Option(None, "--change", help="Change of every input not set in "
                                           "[uncertainty.changes], +- fraction (default [uncertainty] change, 0.2)."),
    as_json: bool = typer.Option(False, "--json", help="Print one JSON object instead of tables."),
    save: bool = typer.Option(False, "--save", help="Write the JSON report into the output folder."),
    plot: bool = typer.Option(False, "--plot", help="Write the tornado plot (PNG) into the output folder."),
    out: Path = typer.Option(DEFAULT_OUT, "--out", help="Output folder for --save and --plot."),
    force: bool = typer.Option(False, "--force", help="Replace files that already exist."),
) -> None:
    """One input at a time (prices, index, interest, K per solute, efficiency, feed): the tornado of the best design."""
    from towercost.report import records, study_records, study_terminal

    _check("--change", change, 0.0, 1.0, "a fraction in (0, 1)")
    data = _load(scenario)
    progress = _phase_progress()

    def call():
        from towercost.study.sensitivity import sensitivity as study

        try:
            return study(data, change=change, progress=lambda done, total: progress("changing inputs", done, total))
        finally:
            progress.stop()

    result = _run(call, out)
    record = study_records.sensitivity_record(result) if (as_json or save) else None
    png = None
    if plot:
        from towercost.report.study_plots import tornado_png

        png = _run(lambda: tornado_png(result), out)
    written = _write_study(out, f"{scenario.stem}-sensitivity", force, records.to_json(record) if save else None,
                           png)
    if as_json:
        typer.echo(records.to_json(record))
        return
    from towercost.report.terminal import console as make_console

    console = make_console()
    study_terminal.print_sensitivity(console, result)
    for path in written:
        console.print(f"wrote {path}", highlight=False)


@app.command()
def uncertainty(
    scenario: Path = typer.Argument(..., help="Scenario file (TOML)."),
    design: Optional[int] = typer.Option(None, "--design", help="Rank of the design in the nominal ranking "
                                         "(default 1, the best)."),
    solvent: Optional[str] = typer.Option(None, "--solvent", help="Study a design of one's own: its candidate "
                                          "(with --trays and --ratio or --rate)."),
    trays: Optional[int] = typer.Option(None, "--trays", help="Real trays of the design of one's own."),
    ratio: Optional[float] = typer.Option(None, "--ratio", help="Its rate as a multiple of the nominal minimum."),
    rate_: Optional[str] = typer.Option(None, "--rate", help="Its agent molar rate, e.g. '95 kmol/h'."),
    samples: Optional[int] = typer.Option(None, "--samples", help="Monte Carlo samples (default [uncertainty] "
                                          "samples, 10,000)."),
    seed: Optional[int] = typer.Option(None, "--seed", help="Seed of the random draws (default [uncertainty] "
                                       "seed, 0)."),
    confidence: Optional[float] = typer.Option(None, "--confidence", help="Probability a margin design meets "
                                               "every spec with (default 0.9)."),
    reoptimize: Optional[int] = typer.Option(None, "--reoptimize", help="Samples re-optimized, each a whole "
                                             "design space (default [uncertainty] reoptimize, 200; 0: none)."),
    as_json: bool = typer.Option(False, "--json", help="Print one JSON object instead of tables."),
    save: bool = typer.Option(False, "--save", help="Write the JSON report into the output folder."),
    plot: bool = typer.Option(False, "--plot", help="Write the distributions plot (PNG) into the output folder."),
    out: Path = typer.Option(DEFAULT_OUT, "--out", help="Output folder for --save and --plot."),
    force: bool = typer.Option(False, "--force", help="Replace files that already exist."),
) -> None:
    """Monte Carlo on K-values, efficiencies and prices: probability of meeting the spec, margin, regret."""
    from towercost.report import records, study_records, study_terminal
    from towercost.scenario.units import UnitError, to_si

    own = solvent is not None or trays is not None or ratio is not None or rate_ is not None
    if own and design is not None:
        _fail("give --design or a design of one's own (--solvent, --trays, --ratio or --rate), not both")
    if own and (solvent is None or trays is None or (ratio is None) == (rate_ is None)):
        _fail("a design of one's own needs --solvent, --trays and exactly one of --ratio and --rate")
    if design is not None and design < 1:
        _fail(f"--design must be a rank >= 1, got {design}")
    if trays is not None and trays < 1:
        _fail(f"--trays must be a whole number >= 1, got {trays}")
    if samples is not None and not 1 <= samples <= 10_000_000:
        _fail(f"--samples must be a whole number from 1 to 10,000,000, got {samples}")
    if seed is not None and seed < 0:
        _fail(f"--seed must be a whole number >= 0, got {seed}")
    if reoptimize is not None and not 0 <= reoptimize <= 100_000:
        _fail(f"--reoptimize must be a whole number from 0 to 100,000, got {reoptimize}")
    _check("--confidence", confidence, 0.0, 1.0, "a probability in (0, 1)")
    _check("--ratio", ratio, 0.0, math.inf, "a number > 0")
    molar = None
    if rate_ is not None:
        try:
            molar = to_si(rate_, "mol/s", what="--rate")
        except UnitError as exc:
            _fail(str(exc))
        if not (math.isfinite(molar) and molar > 0):
            _fail(f"--rate must be a flow > 0, got {rate_!r}")
    data = _load(scenario)
    progress = _phase_progress()

    def call():
        from towercost.study.montecarlo import Chosen, monte_carlo

        chosen = Chosen(rank=design or 1) if not own else Chosen(None, solvent, trays, ratio, molar)
        try:
            return monte_carlo(data, chosen, samples=samples, seed=seed, confidence=confidence,
                               reoptimize_samples=reoptimize, progress=progress)
        finally:
            progress.stop()

    result = _run(call, out)
    record = study_records.uncertainty_record(result) if (as_json or save) else None
    png = None
    if plot:
        from towercost.report.study_plots import uncertainty_png

        png = _run(lambda: uncertainty_png(result), out)
    written = _write_study(out, f"{scenario.stem}-uncertainty", force, records.to_json(record) if save else None,
                           png)
    if as_json:
        typer.echo(records.to_json(record))
        return
    from towercost.report.terminal import console as make_console

    console = make_console()
    study_terminal.print_uncertainty(console, result)
    for path in written:
        console.print(f"wrote {path}", highlight=False)


def main() -> None:  # pragma: no cover - console entry point
    app()


if __name__ == "__main__":  # python -m towercost.cli
    app()
