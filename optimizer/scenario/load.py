"""Reading a scenario: a TOML file or a dict, validated into a ``Scenario`` or one line of ``ScenarioError``.

A scenario file is read only if it is a regular file of at most
``MAX_BYTES`` (a FIFO, a device or a folder is refused before it is opened
for reading, so nothing waits on it), in UTF-8 (a byte-order mark is
skipped; UTF-16 and other bytes are refused with the offset), and nested no
deeper than ``MAX_DEPTH`` tables or arrays.
"""

from __future__ import annotations

import errno
import os
import stat
import tomllib
from pathlib import Path

from pydantic import ValidationError

from towercost.errors import ScenarioError
from towercost.scenario.envelope import unusual_values
from towercost.scenario.messages import location, one_line, relevance, shown
from towercost.scenario.schema import Scenario, UnitBasis
from towercost.scenario.units import DEFAULT_BASIS

#: Largest scenario file read [bytes]: 1 MiB, far above any real case (the demos are about 4 kB).
MAX_BYTES = 1 << 20

#: Deepest nesting of tables and arrays accepted (a scenario needs 5).
MAX_DEPTH = 12


def _depth(data) -> int:
    """How deeply ``data`` nests dicts and lists (iterative: no recursion limit to reach)."""
    deepest, stack = 0, [(data, 0)]
    while stack:
        node, level = stack.pop()
        deepest = max(deepest, level)
        if level > MAX_DEPTH:
            break
        if isinstance(node, dict):
            stack += [(v, level + 1) for v in node.values()]
        elif isinstance(node, list):
            stack += [(v, level + 1) for v in node]
    return deepest


def parse_scenario(data: dict, path: str = "scenario", *, bare_si: bool = False) -> Scenario:
    """Validate a scenario already read into a dict; raise ScenarioError with one line.

    ``bare_si`` (for programs that build scenarios in SI) takes a bare number
    in a dimensional field to be in the field's SI unit; by default such a
    number is refused, as in a file.
    """
    if not isinstance(data, dict):
        raise ScenarioError(f"{path}: a scenario is a table of tables, got {type(data).__name__}")
    if _depth(data) > MAX_DEPTH:
        raise ScenarioError(f"{path}: tables or arrays nested deeper than {MAX_DEPTH} levels; no scenario needs that")
    basis = DEFAULT_BASIS
    if isinstance(data.get("units"), dict):
        try:
            basis = UnitBasis.model_validate(data["units"], context={"bare_si": bare_si}).basis()
        except ValidationError:
            pass  # reported with its place by the whole scenario's validation below
    context = {"basis": basis, "bare_si": bare_si}
    try:
        scenario = Scenario.model_validate(data, context=context)
    except ValidationError as exc:
        # One line: the most telling error (a union reports one per member).
        best = max(exc.errors(), key=lambda e: relevance(e, data))
        raise ScenarioError(one_line(path, best, data)) from None
    except RecursionError:
        raise ScenarioError(f"{path}: nested too deeply to read") from None
    scenario._warnings = tuple(_usual_range_warnings(scenario, data))
    return scenario


def _usual_range_warnings(scenario: Scenario, data: dict) -> list[str]:
    lines = []
    for keys, envelope, _ in unusual_values(scenario):
        lines.append(f"{location(data, keys)} = {shown(data, keys)} is outside the usual range "
                     f"({envelope.kind}: {envelope.usual_words()}); check it")
    return lines


def _in_words(exc: OSError) -> str:
    """An operating-system error as words, never its errno text."""
    return {
        errno.EACCES: "permission denied", errno.EPERM: "permission denied", errno.ENOENT: "no such file",
        errno.ENOTDIR: "a part of the path is a file, not a folder", errno.EISDIR: "is a folder",
        errno.ENAMETOOLONG: "the name is too long", errno.ELOOP: "too many symbolic links",
        errno.EIO: "a read error on the device",
    }.get(exc.errno, "cannot be read")


def _kind(mode: int) -> str:
    if stat.S_ISDIR(mode):
        return "a folder"
    if stat.S_ISFIFO(mode):
        return "a FIFO (named pipe)"
    if stat.S_ISCHR(mode) or stat.S_ISBLK(mode):
        return "a device"
    if stat.S_ISSOCK(mode):
        return "a socket"
    return "not a regular file"


def read_text(path: str | Path) -> str:
    """The text of a scenario file, or ScenarioError saying in words why it cannot be read."""
    path = Path(path)
    try:
        info = os.stat(path)
    except FileNotFoundError:
        raise ScenarioError(f"{path}: no such file") from None
    except OSError as exc:
        raise ScenarioError(f"{path}: cannot be read ({_in_words(exc)})") from None
    except ValueError:  # an embedded NUL byte in the name
        raise ScenarioError(f"{path!r}: not a file name") from None
    if not stat.S_ISREG(info.st_mode):
        raise ScenarioError(f"{path}: is {_kind(info.st_mode)}, not a scenario file")
    if info.st_size > MAX_BYTES:
        raise ScenarioError(f"{path}: is {info.st_size:,} bytes; a scenario file is at most {MAX_BYTES:,}")
    try:
        # O_NONBLOCK: should the path have become a FIFO since the check, opening it does not wait.
        fd = os.open(path, os.O_RDONLY | getattr(os, "O_NONBLOCK", 0) | getattr(os, "O_NOCTTY", 0))
    except OSError as exc:
        raise ScenarioError(f"{path}: cannot be read ({_in_words(exc)})") from None
    try:
        if not stat.S_ISREG(os.fstat(fd).st_mode):
            raise ScenarioError(f"{path}: is {_kind(os.fstat(fd).st_mode)}, not a scenario file")
        chunks, size = [], 0
        while size <= MAX_BYTES:
            chunk = os.read(fd, 1 << 16)
            if not chunk:
                break
            chunks.append(chunk)
            size += len(chunk)
    except OSError as exc:
        raise ScenarioError(f"{path}: cannot be read ({_in_words(exc)})") from None
    finally:
        os.close(fd)
    raw = b"".join(chunks)
    if len(raw) > MAX_BYTES:
        raise ScenarioError(f"{path}: is more than {MAX_BYTES:,} bytes; a scenario file is at most {MAX_BYTES:,}")
    return decode(raw, str(path))


def decode(raw: bytes, path: str) -> str:
    """UTF-8 text of a file's bytes (a UTF-8 byte-order mark skipped); ScenarioError naming the offending byte."""
    if raw.startswith((b"\xff\xfe", b"\xfe\xff")) or (len(raw) > 1 and (raw[0] == 0 or raw[1] == 0)):
        raise ScenarioError(f"{path}: is UTF-16 or UTF-32 text; save it as UTF-8")
    if raw.startswith(b"\xef\xbb\xbf"):
        raw = raw[3:]
    try:
        return raw.decode("utf-8")
    except UnicodeDecodeError as exc:
        line = raw[:exc.start].count(b"\n") + 1
        raise ScenarioError(f"{path}: is not UTF-8 text (byte 0x{raw[exc.start]:02x} on line {line}); "
                            "save it as UTF-8") from None


def load_scenario(path: str | Path) -> Scenario:
    """Read and validate a scenario file.

    Raises
    ------
    ScenarioError
        The file is missing, is not a regular file, is too large, is not
        UTF-8 TOML, or holds a value that cannot be accepted; the message is
        one line naming the file, the field and the value.
    """
    text = read_text(path)
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        message = " ".join(str(exc).split())
        raise ScenarioError(f"{path}: not valid TOML ({message[:200]})") from None
    except RecursionError:
        raise ScenarioError(f"{path}: nested too deeply to read") from None
    return parse_scenario(data, str(path))
