"""Files written whole or not at all, and never over an existing file unless asked."""

from __future__ import annotations

import os
import tempfile
from pathlib import Path


def write_new(path: Path, text: str | bytes, *, force: bool = False) -> Path:
    """Write ``text`` (or bytes) to ``path`` whole (temporary file, then rename); never over a file unless ``force``."""
    path = Path(path)
    if path.exists() and not force:
        raise FileExistsError(f"{path} exists; pass --force to replace it")
    path.parent.mkdir(parents=True, exist_ok=True)
    fd, tmp = tempfile.mkstemp(dir=path.parent, prefix=f".{path.name}.", suffix=".tmp")
    try:
        if isinstance(text, bytes):
            with os.fdopen(fd, "wb") as handle:
                handle.write(text)
        else:
            with os.fdopen(fd, "w", encoding="utf-8", newline="") as handle:
                handle.write(text)
        os.replace(tmp, path)
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise
    return path
