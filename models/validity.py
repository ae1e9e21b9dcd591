"""Range checks shared by every correlation.

A correlation used outside the range its source fitted still answers; the
caller gets a plain-language message that travels with the result to the
design sheet and the report. Functions that can leave their range take a
keyword ``warnings: list[str] | None`` and append to it.
"""

from __future__ import annotations

import numpy as np


def check_range(
    what: str,
    values,
    low: float,
    high: float,
    unit: str,
    source: str,
    warnings: list[str] | None,
) -> None:
    """Append one message to ``warnings`` if any of ``values`` lies outside [low, high].

    Parameters
    ----------
    what : str
        What the values are, as the user would say it ("vessel volume").
    values : array_like
        The values the correlation was evaluated at, in ``unit``.
    low, high : float
        The range the source states, in ``unit``.
    unit : str
        Unit of ``values``, ``low`` and ``high`` for the message.
    source : str
        Short name of the correlation ("Fair flooding curve").
    warnings : list of str or None
        Where the message goes; nothing happens if None.

    Examples
    --------
    >>> w = []
    >>> check_range("tray area", 0.05, 0.07, 12.3, "m2", "sieve tray cost", w)
    >>> w
    ['tray area 0.05 m2 is outside 0.07 to 12.3 m2 for sieve tray cost; the value is extrapolated']
    """
    if warnings is None:
        return
    arr = np.asarray(values, dtype=float)
    if arr.size == 0:
        return
    outside = (arr < low) | (arr > high)
    if not np.any(outside):
        return
    bad = arr[outside]
    if arr.size == 1:
        shown = f"{bad.item():.4g} {unit}"
    else:
        shown = f"{int(outside.sum())} of {arr.size} points ({bad.min():.4g} to {bad.max():.4g} {unit})"
    warnings.append(
        f"{what} {shown} is outside {low:.4g} to {high:.4g} {unit} for {source}; the value is extrapolated"
    )
