"""Design identifiers: a short text that names one design and carries what reproduces it exactly.

An identifier has four fields joined by ``:``::

    light-wash-oil:16tr:26.145678901234567:1.9812
    |              |    |                  shell inside diameter [m], shortest text that reads back exactly
    |              |    agent rate [mol/s], shortest text that reads back exactly
    |              internals: real trays ("16tr"), or a packed bed's key ("pk-prp50")
    candidate key: the candidate's name in lower case, runs of other characters as "-"

A packed bed's key is "pk-" and the short form of its packing row (the
initials of the row's words and its size in mm: "pall_ring_plastic_50" is
"pk-prp50"); its packed height and stages are not in the identifier
because they follow from the rate and the shell (the least height meeting
every spec there).

Numbers are written with Python's shortest round-trip form (``repr``), so
``float(text)`` gives back the very float the optimizer evaluated, and
``towercost evaluate SCENARIO --design ID`` prices the same design to the last
bit. The candidate key is the name's slug; where two names give the same slug
(or a name has no letter or digit) six hex digits of the name's SHA-1 follow,
so a key never depends on the order of the candidates in the file.
"""

from __future__ import annotations

import hashlib
import math
import re
from dataclasses import dataclass

from towercost.errors import ScenarioError

#: The internals field of a tray column: the count of real trays, then "tr".
_TRAYS = re.compile(r"^([1-9][0-9]*)tr$")
_NUMBER = re.compile(r"^[0-9]+(\.[0-9]*)?([eE][-+]?[0-9]+)?$")

SHAPE = ("candidate:TRAYStr:RATE_mol_s:DIAMETER_m (or candidate:pk-PACKING:RATE_mol_s:DIAMETER_m), e.g. "
         "light-wash-oil:16tr:26.1456789:1.9812")


@dataclass(frozen=True)
class DesignId:
    """What an identifier names: the candidate, the internals (trays or a packing), the rate and the diameter."""

    agent: str          # the candidate's name as in the scenario
    trays: int | None   # real trays; None for a packed bed
    rate: float         # agent rate [mol/s]
    diameter: float     # shell inside diameter [m]
    internals: str | None = None   # the [[packing]] name of a packed bed; None: trays


def _slug(name: str) -> str:
    return re.sub(r"[^a-z0-9]+", "-", name.lower()).strip("-")


def _digest(name: str) -> str:
    return hashlib.sha1(name.encode("utf-8")).hexdigest()[:6]


def candidate_keys(agents) -> dict[str, str]:
    """The key of every candidate name: its slug, with a digest of the name where slugs collide or are empty."""
    slugs = [_slug(a) for a in agents]
    keys = {}
    for name, slug in zip(agents, slugs):
        if not slug or slugs.count(slug) > 1:
            slug = f"{slug or 'candidate'}-{_digest(name)}"
        keys[name] = slug
    return keys


#: The prefix of a packed bed's internals field.
PACKED_PREFIX = "pk-"


def _short(row: str) -> str:
    """A packing row's short form: the initials of its words and its size, "pall_ring_plastic_50" -> "prp50"."""
    words = row.split("_")
    return "".join(w[0] for w in words if not w.isdigit()) + "".join(w for w in words if w.isdigit())


def packing_keys(entries) -> dict[str, str]:
    """The internals field of every [[packing]] entry, by its name: "pk-" and its row's short form.

    ``entries`` are (name, row key) pairs. Where two entries give the same
    short form (one row offered twice, with other options), six hex digits
    of the entry's name follow, so that a key never depends on the order of
    the entries.

    >>> packing_keys([("PP Pall rings", "pall_ring_plastic_50"), ("saddles", "berl_saddle_ceramic_25")])
    {'PP Pall rings': 'pk-prp50', 'saddles': 'pk-bsc25'}
    """
    entries = list(entries)
    shorts = [_short(row) for _, row in entries]
    keys = {}
    for (name, _), short in zip(entries, shorts):
        if shorts.count(short) > 1:
            short = f"{short}-{_digest(name)}"
        keys[name] = PACKED_PREFIX + short
    return keys


def _number(value: float) -> str:
    """The shortest decimal text that reads back as exactly ``value``."""
    return repr(float(value))


def design_id(agents, agent: int, trays: int, rate: float, diameter: float, packing: str | None = None,
              packings=()) -> str:
    """The identifier of one design (``agents``: the case's candidate names; ``agent`` an index into them).

    ``packing``: the [[packing]] name of a packed bed (``packings`` every
    entry of the scenario as (name, row key), for its key).

    >>> design_id(("light wash oil", "glycol ether"), 0, 16, 26.145678901234567, 78 * 0.0254)
    'light-wash-oil:16tr:26.145678901234567:1.9812'
    >>> design_id(("air",), 0, 7, 5.5, 0.6096, "saddles", [("saddles", "berl_saddle_ceramic_25")])
    'air:pk-bsc25:5.5:0.6096'
    """
    if not (math.isfinite(rate) and math.isfinite(diameter)):
        raise ValueError("a design identifier needs a finite rate and diameter")
    internals = f"{int(trays)}tr" if packing is None else packing_keys(packings)[packing]
    return ":".join((candidate_keys(agents)[agents[agent]], internals, _number(rate), _number(diameter)))


def packing_of(case, designs, i: int) -> str | None:
    """The [[packing]] name of design ``i``, or None for trays."""
    from towercost.design.internals import FIRST_PACKING

    index = int(designs.internals[i]) if "internals" in designs.figures else -1
    return case.packings[index - FIRST_PACKING].name if index >= FIRST_PACKING else None


def id_of(case, designs, i: int) -> str:
    """The identifier of design ``i`` of a ``Designs``."""
    return design_id(case.agents, int(designs.agent[i]), int(designs.trays[i]), float(designs.rate[i]),
                     float(designs.diameter[i]), packing_of(case, designs, i),
                     [(c.name, c.key) for c in case.packings])


def ids_of(case, designs) -> list[str]:
    """The identifier of every design of a ``Designs``, in order."""
    return [id_of(case, designs, i) for i in range(len(designs))]


def parse(text: str, agents, packings=()) -> DesignId:
    """Read an identifier against the scenario's candidates (and its [[packing]] entries as (name, row key)
    pairs); ScenarioError says what is wrong in one line.

    >>> parse("glycol-ether:26tr:40.5:2.1336", ("light wash oil", "glycol ether"))
    DesignId(agent='glycol ether', trays=26, rate=40.5, diameter=2.1336, internals=None)
    """
    fields = text.strip().split(":")
    if len(fields) != 4:
        raise ScenarioError(f"--design {text!r}: a design identifier has four fields, {SHAPE}")
    key, internals, rate_text, diameter_text = fields
    by_key = {k: name for name, k in candidate_keys(agents).items()}
    if key not in by_key:
        raise ScenarioError(f"--design {text!r}: no candidate has the key {key!r}; the scenario's keys are "
                            + ", ".join(repr(k) for k in by_key))
    match = _TRAYS.match(internals)
    by_packing = {k: name for name, k in packing_keys(list(packings)).items()}
    if match is None and internals not in by_packing:
        known = "".join(f", or {k!r}" for k in by_packing)
        raise ScenarioError(f"--design {text!r}: the second field is the tray count as '16tr'{known}; got "
                            f"{internals!r}")
    for what, value in (("rate", rate_text), ("diameter", diameter_text)):
        if not _NUMBER.match(value) or not float(value) > 0 or not math.isfinite(float(value)):
            raise ScenarioError(f"--design {text!r}: the {what} must be a number > 0, got {value!r}")
    if match is None:
        return DesignId(agent=by_key[key], trays=None, rate=float(rate_text), diameter=float(diameter_text),
                        internals=by_packing[internals])
    return DesignId(agent=by_key[key], trays=int(match.group(1)), rate=float(rate_text),
                    diameter=float(diameter_text))
