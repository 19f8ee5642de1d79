"""Atomic file writes: a temporary file in the target folder, then os.replace.

An interrupted build therefore leaves either the previous file or the new one,
never half of either. Given a `root`, a write whose path resolves outside that
folder (through "..", an absolute name or a symlink) is refused before anything is created.
"""

from __future__ import annotations

import os
import tempfile
from pathlib import Path

from reporter.errors import OutputError, Problem
from reporter.filemode import give_default_mode


def ensure_inside(root: Path, path: Path) -> Path:
    """Return `path` resolved; raise OutputError when it does not lie inside `root`."""
    # resolve() follows symlinks that exist and folds "..", so neither can lead outside.
    folder = Path(root).resolve()
    target = Path(path).resolve()
    if target == folder or not target.is_relative_to(folder):
        message = f"refusing to write {target}: it is not inside the output folder {folder}"
        raise OutputError(Problem(Path(path), None, "report.output", message))
    return target


def write_bytes_atomic(path: Path, data: bytes, root: Path | None = None) -> Path:
    if root is not None:
        ensure_inside(root, path)
    path.parent.mkdir(parents=True, exist_ok=True)
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=path.parent)
    try:
        give_default_mode(fd)  # mkstemp makes it 0600; the report is as readable as any file the user makes
        with os.fdopen(fd, "wb") as handle:
            handle.write(data)
            handle.flush()
            os.fsync(handle.fileno())
        os.replace(tmp, path)
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise
    return path


def write_text_atomic(path: Path, text: str, root: Path | None = None) -> Path:
    return write_bytes_atomic(path, text.encode("utf-8"), root=root)
