"""Atomic file writes: a temporary file in the target folder, then os.replace.

An interrupted build therefore leaves either the previous file or the new one,
never half of either.
"""

from __future__ import annotations

import os
import tempfile
from pathlib import Path


def write_bytes_atomic(path: Path, data: bytes) -> Path:
    path.parent.mkdir(parents=True, exist_ok=True)
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=path.parent)
    try:
        with os.fdopen(fd, "wb") as handle:
            handle.write(data)
            handle.flush()
            os.fsync(handle.fileno())
        os.replace(tmp, path)
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise
    return path


def write_text_atomic(path: Path, text: str) -> Path:
    return write_bytes_atomic(path, text.encode("utf-8"))
