"""Why a run cannot give a design, in one line of the user's terms.

``infeasible_reason``: why no alternative qualifies, for each candidate, with
the best figure it reaches and only the changes that can help (when the
entering agent alone holds a solute above its spec, more trays or more agent
cannot help: the lean loading or the candidate must change).

``check_case``: before any evaluation, whether every candidate lies within
what the relations can compute, and (``check_size``) whether the design
space fits in memory, from the flowsheet's upper bound on its alternatives;
if not, the estimate and the values to change.
"""

from __future__ import annotations

import os

import numpy as np

from towercost.design import cascade
from towercost.design.case import Case
from towercost.design.limits import SPEC_TOLERANCE
from towercost.design.space import Space, build_space
from towercost.errors import ScenarioError, TooLarge
from towercost.scenario.units import mole_fraction_text

#: Longest reason line [characters]; candidates beyond it are counted, not listed.
MAX_LINE = 900


def _show(case: Case, s: int, x: float) -> str:
    shown = case.concentrations
    return shown.treated_text(s, float(x)) if shown is not None else mole_fraction_text(float(x))


def _lean_limited(case: Case, a: int) -> tuple[str, str]:
    """Why agent ``a`` has no finite least rate: what its entering loading alone holds; and what can help."""
    eq = case.service.equilibrium_inlet(case.k_value[a], case.lean[a])
    held = [f"{case.solutes[s]} at {_show(case, s, eq[s])} (spec {_show(case, s, case.target[s])})"
            for s in range(len(case.solutes)) if np.isfinite(case.target[s]) and eq[s] >= case.target[s]]
    liquid = case.service.agent_is_liquid
    agent = "lean loading" if liquid else "loading of the entering gas"
    word = "solvent" if liquid else "stripping_gas"
    fact = f"{case.agents[a]!r} holds {', '.join(held)} from its {agent} alone"
    helps = (f"where the entering {'solvent' if liquid else 'gas'} alone holds a solute above its spec, more trays "
             f"or more {'solvent' if liquid else 'gas'} cannot help: lower its loading ([[{word}]] lean) or use "
             "another candidate")
    return fact, helps


def _unreachable(space: Space, a: int) -> tuple[str, str]:
    """Agent ``a`` meets the spec nowhere: what it reaches at the most trays and rate; and what can help."""
    case = space.case
    word = case.service.ratio_word
    n_max, (_, hi) = case.trays_range[1], case.ratio_range
    shell = case.shell_max_trays is not None and case.shell_max_trays < n_max
    if shell:
        n_max = case.shell_max_trays
    rate = hi * cascade.minimum_rate(case, np.array([a]))
    if not np.isfinite(rate[0]):
        return _lean_limited(case, a)
    out = cascade.outlet(case, np.array([a]), np.array([n_max]), rate)[0][0]
    misses = [f"{case.solutes[s]} {_show(case, s, out[s])} (spec {_show(case, s, case.target[s])})"
              for s in range(len(case.solutes)) if out[s] > case.target[s] * (1 + SPEC_TOLERANCE)]
    reached = ", ".join(misses) if misses else "the spec only with a rate outside the ratio range"
    helps = (f"the existing shell holds at most {n_max} trays: a higher {word} (the top of [column] ratio) or "
             "another shell would help" if shell else
             f"more trays (the top of [column] trays) or a higher {word} (the top of [column] ratio) would help")
    return f"{case.agents[a]!r} reaches {reached} even at {n_max} trays and {hi:g} x {word.split('/')[1]}", helps


def _within_limits(space: Space, a: int) -> tuple[str, str]:
    """Agent ``a`` meets the spec but no such design meets every limit: the least figure of each limit broken."""
    case = space.case
    parts, names = [], []
    for name, floor in space.floors.items():
        if floor.least > floor.bound:
            what = floor.label.split(" at most")[0]
            parts.append(f"the least {what} of any design meeting the spec is {floor.least:.4g} {floor.unit}".rstrip()
                         + f", above the limit ({floor.label})")
            names.append(name)
    if not parts:
        labels = [f.label for f in space.floors.values()]
        return (f"{case.agents[a]!r}: no single design meets every limit at once (" + "; ".join(labels) + ")",
                "relaxing one of these limits would help")
    if set(names) <= {"flood", "shell_trays"} and case.shell_diameter is not None:
        return f"{case.agents[a]!r}: " + "; ".join(parts), "the existing shell is too small for this duty"
    if names == ["operating_range"]:
        return (f"{case.agents[a]!r}: " + "; ".join(parts),
                "valve trays have a wider turndown ([column] tray = \"valve\", or valve_fallback = true with sieve "
                "trays)")
    return (f"{case.agents[a]!r}: " + "; ".join(parts),
            f"raising {' or '.join(dict.fromkeys(names))} in the scenario, or another candidate, would help")


def _joined(facts: list[str], helps: list[str]) -> str:
    """The facts, one per candidate, then each distinct remedy once; long lists counted, not listed."""
    out, length = [], 0
    for i, fact in enumerate(facts):
        if out and length + len(fact) > MAX_LINE:
            out.append(f"and {len(facts) - i} more candidates")
            break
        out.append(fact)
        length += len(fact) + 2
    return "; ".join(out + list(dict.fromkeys(helps)))


def infeasible_reason(space: Space) -> str:
    """Why no alternative of ``space`` qualifies, for each of its candidates, in one line."""
    case = space.case
    agents = [int(a) for a in space.agents] if len(space.agents) else list(range(len(case.agents)))
    facts, helps, any_spec = [], [], False
    for a in agents:
        own = space if len(agents) == 1 else build_space(case, agents=[a])
        if len(own) == 0 or own.spec_met == 0:
            fact, help_ = _unreachable(own, a)
        else:
            any_spec = True
            fact, help_ = _within_limits(own, a)
        facts.append(fact)
        helps.append(help_)
    head = "no design meets the spec within the limits" if any_spec else "no design meets the spec"
    return f"{head}: {_joined(facts, helps)}"


# --------------------------------------------------------------------------- size

#: Memory an evaluated space takes per alternative [bytes]: the kept columns (about 34 bytes) and
#: the working arrays of its chunked evaluation, measured by ``benchmarks/bench_scaling.py``
#: (README: 606 MiB at 9.7 M alternatives, 155 MiB at 0.94 M, i.e. about 51 bytes each), with a margin.
BYTES_PER_ALTERNATIVE = 64

#: Memory a run takes before its space [bytes]: the interpreter, numpy, pandas, Pyomo and one chunk.
BASE_BYTES = 400 * 2**20


def available_memory() -> int:
    """Memory this process can still take [bytes]: MemAvailable on Linux, else physical memory free."""
    try:
        with open("/proc/meminfo", encoding="ascii") as handle:
            for line in handle:
                if line.startswith("MemAvailable:"):
                    return int(line.split()[1]) * 1024
    except (OSError, ValueError, IndexError):
        pass
    try:
        return os.sysconf("SC_AVPHYS_PAGES") * os.sysconf("SC_PAGE_SIZE")
    except (ValueError, OSError, AttributeError):
        return 4 * 2**30


#: K = y/x at column conditions the relations are used over: the range a K-value given directly may take.
K_RANGE = (1e-12, 1e12)


def check_case(case: Case, agents=None, *, memory: int | None = None) -> int:
    """Before any evaluation: every candidate within what the relations can compute, and the space within memory.

    Refused, in one line naming the candidate: a K at column conditions
    outside ``K_RANGE`` (from Henry's-law or vapour-pressure data, or the
    column's temperature and pressure); a gas at column conditions no lighter
    than the liquid (the flooding correlation needs rho_L > rho_G); a stream
    in equilibrium with the entering one above a mole fraction of 1 (y_in / K
    for the solvent of an absorber, K x_in for the gas of a stripper), which
    no dilute relation can follow. Then ``check_size``. Returns the estimate.
    """
    liquid = case.service.agent_is_liquid
    word = "solvent" if liquid else "stripping_gas"
    chosen = range(len(case.agents)) if agents is None else agents
    for a in chosen:
        name = case.agents[a]
        for s, solute in enumerate(case.solutes):
            k = float(case.k_value[a, s])
            if not (np.isfinite(k) and K_RANGE[0] <= k <= K_RANGE[1]):
                raise ScenarioError(f"[[{word}]] {name!r} k.{solute}: K at column conditions is {k:.4g}, outside "
                                    f"{K_RANGE[0]:g} to {K_RANGE[1]:g}; check its data and the column's temperature "
                                    "and pressure")
        rho_gas, rho_liquid = float(case.gas_density[a]), float(case.liquid_density[a])
        if not rho_gas < rho_liquid:
            raise ScenarioError(f"[[{word}]] {name!r}: the gas at column conditions ({rho_gas:.4g} kg/m3) is no "
                                f"lighter than the liquid ({rho_liquid:.4g} kg/m3); check the molar masses, the "
                                "pressure and the density")
        with np.errstate(divide="ignore", over="ignore"):
            other = case.feed_in / case.k_value[a] if liquid else case.feed_in * case.k_value[a]
        if not float(np.sum(other)) < 1.0:
            phase = "solvent" if liquid else "gas"
            raise ScenarioError(f"[[{word}]] {name!r}: in equilibrium with the entering feed its {phase} would hold "
                                f"a solute mole fraction of {float(np.sum(other)):.4g} (more than all solute): far "
                                "beyond the dilute relations used here; check K and the feed composition")
    return check_size(case, agents, memory=memory)


def check_size(case: Case, agents=None, *, memory: int | None = None) -> int:
    """The upper bound on the alternatives of ``case`` (or of the candidates ``agents``); TooLarge if it would not fit.

    The bound is the flowsheet's own (``SingleColumn.estimate``); nothing is
    evaluated. ``memory`` [bytes] overrides the memory free.
    """
    from towercost.design.loop import flowsheet_for

    flowsheet = flowsheet_for(case)
    total = flowsheet.estimate()
    n_agents = max(len(case.agents), 1)
    estimate = total if agents is None else total * len(agents) // n_agents
    need = BASE_BYTES + estimate * BYTES_PER_ALTERNATIVE
    free = available_memory() if memory is None else memory
    if need > 0.8 * free:
        lo, hi = case.trays_range
        raise TooLarge(
            f"the design space would hold up to {estimate:,} alternatives (about {need / 2**30:.1f} GiB), more "
            f"than the {free / 2**30:.1f} GiB of memory free; narrow [column] trays (now {lo} to {hi}), lower "
            f"[column] ratio_levels (now {case.ratio_levels}) or larger_diameters "
            f"(now {'searched' if case.larger_diameters is None else case.larger_diameters}), "
            f"or list fewer candidates (now {n_agents})")
    return estimate
