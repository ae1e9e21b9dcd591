"""Error wording for scenario files: one pydantic error turned into one line the user can act on.

The line names the file, the field as the user wrote it (``[feed] flow``,
``[[solvent]] 'light oil' k.toluene``), what is wrong and the value written;
an unknown key gets the nearest valid key.
"""

from __future__ import annotations

import difflib
from typing import Any

from pydantic import BaseModel

from towercost.scenario.schema import Scenario

_MISSING = object()


def _user_path(data: Any, loc: tuple) -> tuple[tuple, bool]:
    """The part of a pydantic location that names keys the user wrote.

    Pydantic adds tags for union members ("Henry", "constrained-float") that
    are not keys of the file; they are dropped. Returns the path and whether
    all of it exists in the file (a missing key keeps its name at the end).
    """
    node, path = data, []
    for i, key in enumerate(loc):
        if isinstance(node, dict) and key in node:
            node = node[key]
            path.append(key)
        elif isinstance(node, list) and isinstance(key, int) and 0 <= key < len(node):
            node = node[key]
            path.append(key)
        elif i == len(loc) - 1 and isinstance(key, str) and isinstance(node, dict):
            path.append(key)
            return tuple(path), False
    return tuple(path), True


def _raw_at(data: Any, path: tuple) -> Any:
    node = data
    for key in path:
        try:
            node = node[key]
        except (KeyError, IndexError, TypeError):
            return _MISSING
    return node


#: Longest value text shown in a message [characters]; longer values are cut with "...".
SHOWN = 60


def clip(text: str, limit: int = SHOWN) -> str:
    """``text`` cut to ``limit`` characters, with the length said when cut."""
    return text if len(text) <= limit else f"{text[:limit - 3]}... ({len(text):,} characters)"


def location(data: Any, path: tuple) -> str:
    """A key path as the user sees it: [feed] flow, [[solvent]] 'oil' k.toluene."""
    if not path:
        return ""
    head, rest = path[0], list(path[1:])
    if rest and isinstance(rest[0], int):
        item = _raw_at(data, (head, rest[0]))
        name = (item.get("name") or item.get("solute")) if isinstance(item, dict) else None
        label = f"[[{head}]] {value_text(name)}" if isinstance(name, str) and name else f"[[{head}]] #{rest[0] + 1}"
        rest = rest[1:]
    else:
        label = f"[{clip(str(head), 50)}]"
    tail = ".".join(clip(str(k), 50) for k in rest)
    return f"{label} {tail}".strip()


_location = location


def value_text(raw: Any) -> str:
    """A value as the user wrote it (repr), a long string cut with its length said."""
    if isinstance(raw, str) and len(raw) > SHOWN:
        return f"{raw[:SHOWN - 10]!r}... ({len(raw):,} characters)"
    return clip(repr(raw))


def shown(data: Any, path: tuple) -> str:
    """The value at ``path`` as the user wrote it, cut to a readable length."""
    raw = _raw_at(data, path)
    return "(not given)" if raw is _MISSING else value_text(raw)


def _models_in(annotation) -> list[type[BaseModel]]:
    """The BaseModel classes inside an annotation such as list[Agent] or Henry | float."""
    if isinstance(annotation, type) and issubclass(annotation, BaseModel):
        return [annotation]
    found: list[type[BaseModel]] = []
    for arg in getattr(annotation, "__args__", ()) or ():
        found += _models_in(arg)
    return found


def _known_keys(path: tuple, root: type[BaseModel] = Scenario) -> list[str]:
    """The keys allowed beside the unknown key at the end of ``path``."""
    models: list[type[BaseModel]] = [root]
    for key in path[:-1]:
        if isinstance(key, int):
            continue
        nxt: list[type[BaseModel]] = []
        for model in models:
            field = model.model_fields.get(key)
            if field is not None:
                nxt += _models_in(field.annotation)
            elif model.model_fields == {} or key not in model.model_fields:
                # a dict of models (k.<solute>): the value's models apply
                for f in model.model_fields.values():
                    if getattr(f.annotation, "__origin__", None) is dict:
                        nxt += _models_in(f.annotation.__args__[1])
        models = nxt or models
    keys: list[str] = []
    for model in models:
        keys += [k for k in model.model_fields if k not in keys]
    return keys


def one_line(path: str, error: dict, data: Any, root: type[BaseModel] = Scenario) -> str:
    """One pydantic error as one line: file, field, what is wrong, the value written."""
    keys, exists = _user_path(data, tuple(error["loc"]))
    where = location(data, keys)
    prefix = f"{path}, {where}" if where else path
    kind = error["type"]
    message = " ".join(str(error["msg"]).removeprefix("Value error, ").split())
    if not where and message.startswith("["):
        return clip(f"{path}, {message}", 400)
    if kind == "extra_forbidden":
        key = str(keys[-1])[:200]
        known = _known_keys(keys, root)
        near = difflib.get_close_matches(key, known, n=1)
        hint = f"; did you mean {near[0]!r}?" if near else (f"; allowed: {', '.join(known)}" if known else "")
        return clip(f"{prefix}: unknown key{hint}", 400)
    if kind == "missing" or not exists:
        return clip(f"{prefix}: required value is missing", 400)
    raw = _raw_at(data, keys)
    text = value_text(raw)
    given = "" if raw is _MISSING or isinstance(raw, (dict, list)) or text in message else f", got {text}"
    return clip(f"{prefix}: {message}{given}", 400)


def relevance(error: dict, data: Any, root: type[BaseModel] = Scenario) -> tuple:
    """Rank errors: about a value the user wrote, deepest first; unknown keys next; missing last."""
    keys, exists = _user_path(data, tuple(error["loc"]))
    kind = {"extra_forbidden": 1.0, "missing": 0.0}.get(error["type"], 2.0)
    if error["type"] == "extra_forbidden" and keys and keys[-1] in _known_keys(keys, root):
        kind = 0.5  # a key that another form of the same value allows
    return (exists, len(keys) if exists else 0, kind)


