"""Files written whole or not at all, never over an existing file unless asked, and only ever as regular files.

- Every target of a run is checked before the run's work starts
  (``check_targets``): a run that would refuse one file writes none.
- A write goes to a temporary file in the target's folder, is flushed to
  disk, then takes the target's name (a hard link when nothing may be
  replaced, so that a file appearing meanwhile is not overwritten; a rename
  with ``force``), and the folder itself is flushed.
- ``force`` replaces a regular file, or a symbolic link itself (never the
  file it points to); never a folder, a device, a FIFO or a socket. A
  symbolic link, even a dangling one, is replaced only with ``force``.
- Files get the mode the process's umask gives (0666 less the umask).
- Problems are said in words (``OutputError``), never as an errno.
- Text bound for CSV or spreadsheet cells that starts with = + - @ (or a
  tab or carriage return) is prefixed with ' so that no spreadsheet reads
  it as a formula (``cell``); floats are written in Python's shortest
  round-trip form, so identical figures give identical bytes.
"""

from __future__ import annotations

import errno
import math
import os
import stat
import tempfile
from pathlib import Path

from towercost.errors import OutputError

#: Longest file name most file systems take [bytes].
NAME_MAX = 255


class TargetExists(OutputError, FileExistsError):
    """The target exists and ``force`` was not given."""


def in_words(exc: OSError) -> str:
    """An operating-system error in words, never its errno text."""
    return {
        errno.EACCES: "permission denied", errno.EPERM: "permission denied",
        errno.EROFS: "the file system is read-only", errno.ENOSPC: "the disk is full",
        errno.EDQUOT: "the disk quota is used up", errno.ENOTDIR: "a part of the path is a file, not a folder",
        errno.EISDIR: "it is a folder", errno.ENAMETOOLONG: "the name is too long", errno.ENOENT: "it does not exist",
        errno.ELOOP: "too many symbolic links", errno.EEXIST: "it already exists", errno.EIO: "a write error",
        errno.EXDEV: "it is on another file system",
    }.get(exc.errno, "the system refused it")


def _clip(path) -> str:
    """A path for a message: long ones cut in the middle."""
    text = str(path)
    return text if len(text) <= 120 else f"{text[:50]}...{text[-50:]} ({len(text):,} characters)"


def _kind(mode: int) -> str:
    if stat.S_ISREG(mode):
        return "a file"
    if stat.S_ISDIR(mode):
        return "a folder"
    if stat.S_ISFIFO(mode):
        return "a FIFO (named pipe)"
    if stat.S_ISCHR(mode) or stat.S_ISBLK(mode):
        return "a device"
    if stat.S_ISSOCK(mode):
        return "a socket"
    return "not a regular file"


def _folder_problem(folder: Path) -> str | None:
    """Why files cannot be created in ``folder`` (created if missing), in words; None if they can."""
    probe = folder
    while True:
        try:
            info = os.stat(probe)
        except FileNotFoundError:
            if probe.parent == probe:
                return f"the folder {_clip(folder)} cannot be created"
            probe = probe.parent
            continue
        except NotADirectoryError:
            probe = probe.parent
            continue
        except OSError as exc:
            return f"the folder {_clip(folder)} cannot be reached ({in_words(exc)})"
        break
    if not stat.S_ISDIR(info.st_mode):
        if probe != folder:
            return f"{_clip(probe)} is {_kind(info.st_mode)}, not a folder, so {_clip(folder)} cannot be used"
        return f"the output folder {_clip(folder)} is {_kind(info.st_mode)}, not a folder"
    if not os.access(probe, os.W_OK | os.X_OK):
        if probe == folder:
            return f"the output folder {_clip(folder)} is read-only for this user"
        return f"the folder {_clip(probe)} is read-only for this user, so {_clip(folder)} cannot be made in it"
    return None


def check_target(path: Path, *, force: bool = False) -> Path:
    """``path`` if a new file may be written there (or, with ``force``, may replace what is there); else OutputError."""
    path = Path(path)
    if path.name in ("", ".", ".."):
        raise OutputError(f"{_clip(path)} names a folder, not a file")
    if len(os.fsencode(path.name)) > NAME_MAX:
        raise OutputError(f"the file name {path.name[:40]}... is too long ({len(os.fsencode(path.name))} bytes; "
                          f"at most {NAME_MAX})")
    try:
        info = os.lstat(path)
    except FileNotFoundError:
        info = None
    except NotADirectoryError:
        info = None  # a part of the path is a file: said by the folder check below
    except OSError as exc:
        raise OutputError(f"{_clip(path)} cannot be checked ({in_words(exc)})") from None
    if info is not None:
        if stat.S_ISLNK(info.st_mode):
            if not force:
                dangling = not os.path.exists(path)
                raise TargetExists(f"{_clip(path)} is a symbolic link{' to a missing file' if dangling else ''}; pass "
                                   "--force to replace the link (the file it points to is left alone)")
        elif stat.S_ISDIR(info.st_mode):
            raise OutputError(f"{_clip(path)} is a folder; give the name of a file")
        elif not stat.S_ISREG(info.st_mode):
            raise OutputError(f"{_clip(path)} is {_kind(info.st_mode)}; towercost replaces only regular files")
        elif not force:
            raise TargetExists(f"{_clip(path)} exists; pass --force to replace it")
    problem = _folder_problem(path.parent)
    if problem:
        raise OutputError(problem)
    return path


def check_targets(paths, *, force: bool = False) -> list[Path]:
    """Every path checked (``check_target``) before anything is written; OutputError for the first refused."""
    paths = [Path(p) for p in paths]
    seen = set()
    for path in paths:
        key = os.path.abspath(path)
        if key in seen:
            raise OutputError(f"{_clip(path)} is named twice")
        seen.add(key)
        check_target(path, force=force)
    return paths


def _mode() -> int:
    """The mode a new file gets under this process's umask (0666 less the umask)."""
    mask = os.umask(0)
    os.umask(mask)
    return 0o666 & ~mask


def _sync_folder(folder: Path) -> None:
    try:
        fd = os.open(folder, os.O_RDONLY | getattr(os, "O_DIRECTORY", 0))
    except OSError:
        return
    try:
        os.fsync(fd)
    except OSError:
        pass  # some file systems cannot flush a folder; the rename itself is done
    finally:
        os.close(fd)


def _commit(tmp: str, path: Path, force: bool) -> None:
    """Give the temporary file the target's name; never over anything but a regular file or a link."""
    if force:
        try:
            info = os.lstat(path)
        except FileNotFoundError:
            info = None
        if info is not None and not (stat.S_ISREG(info.st_mode) or stat.S_ISLNK(info.st_mode)):
            raise OutputError(f"{_clip(path)} is {_kind(info.st_mode)}; towercost replaces only regular files")
        os.replace(tmp, path)
        return
    try:
        os.link(tmp, path)        # fails if anything took the name since the check
    except FileExistsError:
        raise TargetExists(f"{_clip(path)} exists; pass --force to replace it") from None
    except OSError as exc:
        if exc.errno not in (errno.EPERM, errno.ENOTSUP, errno.EOPNOTSUPP, errno.EXDEV, errno.EMLINK):
            raise
        if os.path.lexists(path):  # no hard links on this file system: check, then rename
            raise TargetExists(f"{_clip(path)} exists; pass --force to replace it") from None
        os.replace(tmp, path)
        return
    os.unlink(tmp)


def write_all(items, *, force: bool = False) -> list[Path]:
    """Write each (path, text) whole; all targets checked first, so a refusal writes nothing.

    Raises OutputError (a target exists without ``force``, is not a regular
    file, or its folder cannot be written), in words.
    """
    items = [(Path(p), text) for p, text in items]
    check_targets([p for p, _ in items], force=force)
    mode = _mode()
    pending: list[tuple[str, Path]] = []
    try:
        for path, text in items:
            try:
                path.parent.mkdir(parents=True, exist_ok=True)
                fd, tmp = tempfile.mkstemp(dir=path.parent, prefix=f".{path.name[:200]}.", suffix=".tmp")
            except OSError as exc:
                raise OutputError(f"cannot write in the folder {_clip(path.parent)} ({in_words(exc)})") from None
            pending.append((tmp, path))
            data = text.encode("utf-8") if isinstance(text, str) else bytes(text)
            try:
                with os.fdopen(fd, "wb") as handle:
                    handle.write(data)
                    handle.flush()
                    os.fsync(handle.fileno())
                os.chmod(tmp, mode)
            except OSError as exc:
                raise OutputError(f"cannot write {_clip(path)} ({in_words(exc)})") from None
        while pending:
            tmp, path = pending[0]
            try:
                _commit(tmp, path, force)
            except OSError as exc:
                if isinstance(exc, OutputError):
                    raise
                raise OutputError(f"cannot write {_clip(path)} ({in_words(exc)})") from None
            pending.pop(0)
            _sync_folder(path.parent)
    finally:
        for tmp, _ in pending:
            try:
                os.unlink(tmp)
            except OSError:
                pass
    return [p for p, _ in items]


def write_new(path: Path, text: str | bytes, *, force: bool = False) -> Path:
    """Write ``text`` (or bytes) to ``path`` whole (temporary file, then its name); never over a file unless ``force``."""
    return write_all([(path, text)], force=force)[0]


# --------------------------------------------------------------------------- cells

#: First characters a spreadsheet reads as the start of a formula.
FORMULA_START = ("=", "+", "-", "@", "\t", "\r")


def cell(value) -> str:
    """One CSV or spreadsheet cell as text: numbers in shortest round-trip form, formulas neutralised.

    >>> cell(0.1), cell(3), cell(float("nan")), cell(True), cell("=1+1"), cell("-oil"), cell("light oil")
    ('0.1', '3', '', 'True', "'=1+1", "'-oil", 'light oil')
    """
    if value is None:
        return ""
    if isinstance(value, (bool,)) or type(value).__name__ == "bool_":
        return "True" if bool(value) else "False"
    if isinstance(value, int) or type(value).__name__.startswith(("int", "uint")):
        return str(int(value))
    if isinstance(value, float) or type(value).__name__.startswith("float"):
        number = float(value)
        return "" if math.isnan(number) else repr(number)
    text = str(value)
    return "'" + text if text.startswith(FORMULA_START) else text


def csv_text(frame) -> str:
    """A pandas table as CSV text: a header row, then one row per design, every cell through ``cell``."""
    import csv
    import io

    out = io.StringIO()
    writer = csv.writer(out, lineterminator="\n")
    writer.writerow([cell(c) for c in frame.columns])
    for row in frame.itertuples(index=False, name=None):
        writer.writerow([cell(v) for v in row])
    return out.getvalue()
