"""The JSON Schema of scenario files (draft 2020-12), for editors that validate TOML as they type.

Built from the pydantic models of ``towercost.scenario.schema`` and tidied
so that it is what an editor needs:

- every field has a description that states its meaning, its dimension and
  unit (``x-dimension``, ``x-unit``), its allowed range (``x-allowed``: an
  error outside) and its usual range (``x-usual``: a warning outside);
- a dimensional field is a string with a unit (a bare number fails it, as it
  fails the loader); its default is written as such a string ("24 in");
- a default with no finite value (a limit not set) is left out and the
  description says "no limit unless given";
- the text is strict JSON (no NaN or Infinity).

The schema cannot state rules that join fields (mode and candidates, a
solute named in every table), so a file can pass it and still be refused by
the loader, with one line; a file the loader accepts always passes it.
"""

from __future__ import annotations

import json
import math

from towercost.scenario.schema import Scenario

DIALECT = "https://json-schema.org/draft/2020-12/schema"


def _display(value: float, si: str, show: str) -> str:
    from towercost.scenario.envelope import Envelope

    return Envelope("", si, show).display(value)


def _inner_with(node: dict, key: str) -> dict | None:
    """``node`` itself, or the first member of its anyOf, that holds ``key``."""
    if key in node:
        return node
    for member in node.get("anyOf", ()):
        if isinstance(member, dict) and key in member:
            return member
    return None


def _tidy_property(prop: dict) -> None:
    inner = _inner_with(prop, "x-description")
    if inner is not None and inner is not prop:
        words = inner["x-description"]
        own = prop.get("description")
        prop["description"] = f"{own}; {words}" if own and words not in own else (own or words)
    elif inner is prop and prop.get("description") != prop["x-description"]:
        if prop["x-description"] not in prop.get("description", ""):
            prop["description"] = f"{prop['description']}; {prop['x-description']}"
    if "default" in prop and isinstance(prop["default"], float):
        value = prop["default"]
        if not math.isfinite(value):
            del prop["default"]
            if "no limit unless given" not in prop.get("description", ""):
                prop["description"] = prop.get("description", "") + "; no limit unless given"
        else:
            unit = _inner_with(prop, "x-si-unit")
            if unit is not None:
                prop["default"] = _display(value, unit["x-si-unit"], unit["x-unit"])
    if isinstance(prop.get("default"), dict) and prop["default"]:
        del prop["default"]  # a whole table's defaults, in SI: each of its fields states its own
    if isinstance(prop.get("default"), (list, tuple)):
        prop["default"] = list(prop["default"])


def _walk(node) -> None:
    if isinstance(node, dict):
        for prop in node.get("properties", {}).values():
            if isinstance(prop, dict):
                _tidy_property(prop)
        for value in node.values():
            _walk(value)
    elif isinstance(node, list):
        for value in node:
            _walk(value)


def _drop_private(node) -> None:
    """Remove the bookkeeping key that only served the tidying."""
    if isinstance(node, dict):
        node.pop("x-description", None)
        for value in node.values():
            _drop_private(value)
    elif isinstance(node, list):
        for value in node:
            _drop_private(value)


def json_schema() -> dict:
    """The JSON Schema of a scenario file, as a dict (strict JSON values only)."""
    schema = Scenario.model_json_schema(mode="validation")
    _walk(schema)
    _drop_private(schema)
    return {"$schema": DIALECT, "title": "towercost scenario",
            "description": "A dilute absorber or stripper case for towercost. Dimensional values carry a unit "
                           "as text (\"30 degC\", \"1.2 bara\", \"900 kmol/h\", \"0.09 USD/kWh\"); a bare number "
                           "there is refused. Fractions, factors, counts and K-values are bare numbers.",
            **{k: v for k, v in schema.items() if k != "title"}}


def json_text() -> str:
    """The schema as JSON text; raises ValueError should any value not be strict JSON."""
    return json.dumps(json_schema(), indent=2, allow_nan=False, ensure_ascii=False)
