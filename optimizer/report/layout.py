"""Fixed-width tables for the terminal that never cut a value.

A table is a list of ``Column`` and rows of text cells. ``render`` fits it
to a width: every value is printed whole; when the columns do not fit,
the least needed ones (lowest ``keep``) are left out, and the text columns
that may (``wrap``) wrap onto more lines, sharing the width left. Each row may carry lines printed
under it (a design's identifier). Units go on a second header line, so a
label stays short and plain.
"""

from __future__ import annotations

import textwrap
from dataclasses import dataclass

GAP = 2


@dataclass(frozen=True)
class Column:
    """One column: its label, its unit line, alignment, and how much it is needed."""

    label: str
    unit: str = ""
    left: bool = False       # text (left-aligned) rather than a number
    wrap: bool = False       # a text column that may wrap
    keep: int = 10           # columns with the lowest keep are left out first when the width is short


@dataclass
class Row:
    cells: list[str]
    below: list[str] | None = None   # lines printed under the row, indented to the second column
    strong: bool = False


def _fit(columns: list[Column], rows: list[Row], width: int) -> tuple[list[int], list[int]]:
    """Which columns to show and their widths."""
    shown = list(range(len(columns)))

    def natural(j: int) -> int:
        return max([len(columns[j].label), len(columns[j].unit)] + [len(r.cells[j]) for r in rows])

    def least(j: int) -> int:
        if not columns[j].wrap:
            return natural(j)
        words = [w for r in rows for w in r.cells[j].split()] + columns[j].label.split() + columns[j].unit.split()
        return max([len(w) for w in words] + [4])

    def total(widths) -> int:
        return sum(widths) + GAP * (len(widths) - 1)

    while True:
        widths = [natural(j) for j in shown]
        if total(widths) <= width:
            return shown, widths
        wrap = [k for k, j in enumerate(shown) if columns[j].wrap]
        if wrap:
            spare = width - (total(widths) - sum(widths[k] for k in wrap))
            need = [least(shown[k]) for k in wrap]
            if spare >= sum(need):
                _share(widths, wrap, need, spare)
                return shown, widths
        droppable = [j for j in shown if columns[j].keep < 10]
        if not droppable:
            for k in wrap:
                widths[k] = least(shown[k])
            return shown, widths
        shown.remove(min(droppable, key=lambda j: (columns[j].keep, -j)))


def _share(widths: list[int], wrap: list[int], need: list[int], spare: int) -> None:
    """Give the wrapping columns ``spare`` characters: each its least, the rest in proportion to what it lacks."""
    lack = [widths[k] - n for k, n in zip(wrap, need)]
    extra = spare - sum(need)
    given = [n + (extra * l // sum(lack) if sum(lack) else 0) for n, l in zip(need, lack)]
    left = spare - sum(given)
    for i in sorted(range(len(wrap)), key=lambda i: -lack[i]):
        if left <= 0:
            break
        add = min(left, widths[wrap[i]] - given[i])
        given[i] += max(add, 0)
        left -= max(add, 0)
    for k, w in zip(wrap, given):
        widths[k] = min(w, widths[k])


def shown(columns: list[Column], rows: list[Row], width: int) -> list[str]:
    """The labels of the columns ``render`` prints at ``width``."""
    return [columns[j].label for j in _fit(columns, rows, width)[0]]


def render(columns: list[Column], rows: list[Row], width: int) -> list[tuple[str, bool]]:
    """The table as (line, strong) pairs fitted to ``width`` characters: headers, a rule, the rows."""
    shown, widths = _fit(columns, rows, width)

    def line(cells: list[str], pad_left: bool = False) -> str:
        parts = []
        for j, w, text in zip(shown, widths, cells):
            parts.append(text.ljust(w) if (columns[j].left or pad_left) else text.rjust(w))
        return (" " * GAP).join(parts).rstrip()

    out: list[tuple[str, bool]] = []
    labels = [columns[j].label for j in shown]
    units = [columns[j].unit for j in shown]
    wrapped_labels = [textwrap.wrap(t, w) or [""] for t, w in zip(labels, widths)]
    depth = max(len(w) for w in wrapped_labels)
    for r in range(depth):
        out.append((line([w[r] if r < len(w) else "" for w in wrapped_labels]), True))
    if any(units):
        out.append((line(units), False))
    out.append(((" " * GAP).join("-" * w for w in widths), False))
    indent = widths[0] + GAP if len(shown) > 1 else 0
    for row in rows:
        cells = [row.cells[j] for j in shown]
        pieces = [textwrap.wrap(c, w) if columns[j].wrap and len(c) > w else [c]
                  for j, w, c in zip(shown, widths, cells)]
        for r in range(max(len(p) for p in pieces)):
            out.append((line([p[r] if r < len(p) else "" for p in pieces]), row.strong))
        for extra in row.below or []:   # wrapped at spaces only: an identifier is never broken
            for piece in textwrap.wrap(extra, max(width - indent, 20), break_long_words=False,
                                       break_on_hyphens=False, subsequent_indent="  ") or [""]:
                out.append((" " * indent + piece, False))
    return out
