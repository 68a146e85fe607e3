"""Atomic file writes: write to a temporary file beside the target, then rename over it.

A crash or Ctrl-C while writing leaves the previous file intact and no half-written one.
"""

from __future__ import annotations

import os
import tempfile
from collections.abc import Callable
from pathlib import Path


def _umask() -> int:
    mask = os.umask(0)
    os.umask(mask)
    return mask


def atomic_write(path: Path, write: Callable[[str], None]) -> Path:
    """Call ``write(temporary_path)``, then rename the temporary file over ``path``."""
    path = Path(path)
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=path.parent)
    os.close(fd)
    try:
        write(tmp)
        os.chmod(tmp, 0o666 & ~_umask())
        os.replace(tmp, path)
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise
    return path


def atomic_write_bytes(path: Path, data: bytes) -> Path:
    """Write ``data`` to ``path`` atomically (flushed to disk before the rename)."""

    def write(tmp: str) -> None:
        with open(tmp, "wb") as fh:
            fh.write(data)
            fh.flush()
            os.fsync(fh.fileno())

    return atomic_write(path, write)


def atomic_write_text(path: Path, text: str) -> Path:
    """Write UTF-8 ``text`` to ``path`` atomically."""
    return atomic_write_bytes(path, text.encode("utf-8"))
