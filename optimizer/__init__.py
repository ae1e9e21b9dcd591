"""towercost: least-annualized-cost design of dilute gas absorbers and liquid strippers.

The Python API, for notebooks and scripts (the ``towercost`` command is a
thin layer over the same calls)::

    import towercost

    scenario = towercost.load("scenarios/demo_absorber.toml")   # or towercost.from_dict({...})
    result = towercost.optimize(scenario, top=5)                # ranked designs, best first
    result.to_frame()                                           # pandas, one row per design
    sheet = towercost.evaluate(scenario, "light wash oil", trays=16, ratio=1.5)
    sheet.to_frame()
    curve = towercost.curve(scenario, "light wash oil")
    study = towercost.uncertainty(scenario, samples=10_000, seed=1)   # Monte Carlo of the best design
    tornado = towercost.sensitivity(scenario)                        # one input at a time

The relations themselves are in ``towercost.models`` (Kremser cascades,
equilibrium, efficiency, hydraulics, vessels, costing, economics).

Imports are deferred: ``import towercost`` loads nothing heavy until a
function is called.
"""

from __future__ import annotations

__all__ = ["load", "from_dict", "optimize", "evaluate", "curve", "sensitivity", "uncertainty", "ScenarioError",
           "InfeasibleSpec", "__version__"]

from towercost.errors import InfeasibleSpec, ScenarioError  # noqa: E402 - light module


def __getattr__(name: str):
    if name == "__version__":  # read from the installed metadata only when asked (it costs an import)
        from importlib import metadata

        try:
            return metadata.version("towercost")
        except metadata.PackageNotFoundError:  # running from a checkout without installing
            return "0+unknown"
    raise AttributeError(f"module 'towercost' has no attribute {name!r}")


def load(path):
    """Read and validate a scenario file (TOML); ``ScenarioError`` names the field and value it cannot accept."""
    from towercost.scenario import load_scenario

    return load_scenario(path)


def from_dict(data: dict, name: str = "scenario", *, bare_si: bool = False):
    """Validate a scenario given as a dict with the layout of the TOML file.

    Values carry their units as in a file; ``bare_si=True`` takes a bare
    number in a dimensional field to be in SI (for programs that build
    scenarios in SI).
    """
    from towercost.scenario import parse_scenario

    return parse_scenario(data, name, bare_si=bare_si)


def optimize(scenario, *, top: int = 10, method: str = "model", distinct: str = "trays"):
    """Rank the ``top`` best designs by total annualized cost; a ``Result`` with ``.designs`` and ``.to_frame()``.

    ``scenario`` is a loaded scenario, a path, or a dict. ``distinct``: "trays"
    (one design per candidate and tray count, the default), "variant" (every
    rate and diameter variant) or "candidate" (one design per candidate).
    """
    from towercost.select.ranking import optimize as _optimize

    return _optimize(_as_scenario(scenario), top=top, method=method, distinct=distinct)


def evaluate(scenario, solvent: str, trays: int | None = None, *, ratio: float | None = None,
             rate: float | None = None, diameter: float | None = None, packing: str | None = None):
    """Price one design exactly: a ``Designs`` of one row (``.to_frame()``, attributes per figure).

    ``rate`` in mol/s, ``diameter`` in m; give ``ratio`` (to the minimum rate) or ``rate``.
    ``packing`` names a [[packing]] of the scenario (its name or row key) in place of ``trays``: the
    packed bed's height follows from the rate and the shell.
    """
    from towercost.select.ranking import evaluate_design

    _, designs, warnings = evaluate_design(_as_scenario(scenario), solvent, trays, ratio=ratio, rate=rate,
                                           diameter=diameter, internals=packing)
    designs.warnings = warnings
    return designs


def curve(scenario, solvent: str, packing: str | None = None):
    """Annualized cost of one candidate against trays and against the ratio to the minimum.

    ``packing`` names a [[packing]]: its curve against theoretical stages instead.
    """
    from towercost.select.ranking import cost_curve

    return cost_curve(_as_scenario(scenario), solvent, packing)


def sensitivity(scenario, *, change: float | None = None):
    """Each input changed down and up, one at a time: the best design's cost and spec, and the new best.

    ``change`` (a fraction) replaces the scenario's ``[uncertainty] change`` for the inputs it does not
    set one for. Returns a ``towercost.study.sensitivity.Sensitivity`` (rows largest swing first).
    """
    from towercost.study.sensitivity import sensitivity as _sensitivity

    return _sensitivity(_as_scenario(scenario), change=change)


def uncertainty(scenario, *, design: int = 1, solvent: str | None = None, trays: int | None = None,
                ratio: float | None = None, rate: float | None = None, samples: int | None = None,
                seed: int | None = None, confidence: float | None = None, reoptimize: int | None = None):
    """Monte Carlo of a design under the scenario's ``[uncertainty]`` spreads.

    The design is the ``design``-th of the nominal ranking, or one's own (``solvent``, ``trays`` and
    ``ratio`` to the nominal minimum or ``rate`` in mol/s). ``samples``, ``seed``, ``confidence`` and
    ``reoptimize`` (samples re-optimized) override the scenario's. Returns a
    ``towercost.study.montecarlo.MonteCarlo``: ``.fixed`` (probability of meeting every spec with its
    standard error and closed form, percentiles), ``.margins``, ``.reoptimized``.
    """
    from towercost.study.montecarlo import Chosen, monte_carlo

    chosen = Chosen(rank=design) if solvent is None else Chosen(None, solvent, trays, ratio, rate)
    return monte_carlo(_as_scenario(scenario), chosen, samples=samples, seed=seed, confidence=confidence,
                       reoptimize_samples=reoptimize)


def _as_scenario(scenario):
    from pathlib import Path

    from towercost.scenario import Scenario

    if isinstance(scenario, Scenario):
        return scenario
    if isinstance(scenario, dict):
        return from_dict(scenario)
    if isinstance(scenario, (str, Path)):
        return load(scenario)
    raise TypeError(f"a scenario is a loaded Scenario, a path or a dict, got {type(scenario).__name__}")
