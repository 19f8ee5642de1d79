"""Chart SVGs kept between builds, in the score cache's SQLite file (table `charts`).

Drawing a chart (Vega-Lite -> SVG through vl-convert) costs a second to start its JavaScript
engine and up to seconds per chart; a rebuild draws mostly the same charts again. The SVG depends
only on the chart's full specification (data, encodings, theme colours and fonts) and on the
vl-convert release, so it is stored under a hash of both (fonts installed on the system later
are not noticed: delete the cache file to draw everything afresh). Only the most recently used charts are
kept (KEEP), so the table stays small however many builds share the cache.

A chart function's whole result is also kept by its arguments (table `drawings`), so a rebuild
need not build the Altair specification (nor import Altair) to find it. That key also covers
the source of every module in reporter/render and the releases of the libraries that shape the
specification, so a change to the drawing code draws again.
"""

from __future__ import annotations

import contextlib
import contextvars
import hashlib
import json
import pickle
import time
from importlib.metadata import version
from pathlib import Path
from typing import Callable, Iterator

from reporter.memo_file import active, connect

KEEP = 200  # charts kept: every chart of several reports, a few MB

_SCHEMA = """
CREATE TABLE IF NOT EXISTS charts (
    spec_hash BLOB PRIMARY KEY,
    svg TEXT NOT NULL,
    used_at REAL NOT NULL
);
CREATE TABLE IF NOT EXISTS drawings (
    call_hash BLOB PRIMARY KEY,
    svg TEXT NOT NULL,
    alt TEXT NOT NULL,
    used_at REAL NOT NULL
)
"""
# What a chart's specification depends on besides its arguments and reporter/render's code.
_SPEC_LIBRARIES = ("altair", "vl-convert-python", "pandas", "numpy")
_ACTIVE: contextvars.ContextVar["ChartMemo | None"] = contextvars.ContextVar("waymark_chart_memo", default=None)


class ChartMemo:
    """SVG text by chart specification. Use as a context manager or call close()."""

    def __init__(self, path: Path):
        self.path = Path(path)
        self._db = connect(self.path, _SCHEMA)
        self._code: bytes | None = None  # fingerprint of the drawing code, made on first use

    @staticmethod
    def key(spec: dict, renderer_version: str) -> bytes:
        text = json.dumps(spec, sort_keys=True, ensure_ascii=False, allow_nan=True)
        return hashlib.sha256(f"{renderer_version}\n{text}".encode("utf-8")).digest()

    def svg(self, key: bytes, draw: Callable[[], str]) -> str:
        """The stored SVG for `key`, else `draw()`'s, stored."""
        row = self._db.execute("SELECT svg FROM charts WHERE spec_hash = ?", (key,)).fetchone()
        svg = row[0] if row is not None else draw()
        with self._db:
            self._db.execute("INSERT OR REPLACE INTO charts (spec_hash, svg, used_at) VALUES (?, ?, ?)",
                             (key, svg, time.time()))
        return svg

    def call_key(self, function: str, args: tuple, kwargs: dict) -> bytes:
        """Key of a chart function's call: the function, its pickled arguments and the drawing code."""
        if self._code is None:
            self._code = _drawing_code()
        call = pickle.dumps((function, args, sorted(kwargs.items())), protocol=5)
        return hashlib.sha256(self._code + call).digest()

    def drawing(self, key: bytes) -> tuple[str, str] | None:
        """(svg, alt) of a call drawn before, else None."""
        row = self._db.execute("SELECT svg, alt FROM drawings WHERE call_hash = ?", (key,)).fetchone()
        if row is not None:
            with self._db:
                self._db.execute("UPDATE drawings SET used_at = ? WHERE call_hash = ?", (time.time(), key))
        return row

    def keep_drawing(self, key: bytes, svg: str, alt: str) -> None:
        with self._db:
            self._db.execute("INSERT OR REPLACE INTO drawings (call_hash, svg, alt, used_at) VALUES (?, ?, ?, ?)",
                             (key, svg, alt, time.time()))

    def close(self) -> None:
        try:
            with self._db:
                self._db.execute("DELETE FROM charts WHERE spec_hash NOT IN "
                                 "(SELECT spec_hash FROM charts ORDER BY used_at DESC LIMIT ?)", (KEEP,))
                self._db.execute("DELETE FROM drawings WHERE call_hash NOT IN "
                                 "(SELECT call_hash FROM drawings ORDER BY used_at DESC LIMIT ?)", (KEEP,))
        finally:
            self._db.close()


def _drawing_code() -> bytes:
    """A hash of reporter/render's sources (chart code, context types, filters) and the spec libraries' releases."""
    digest = hashlib.sha256()
    for name in _SPEC_LIBRARIES:
        digest.update(f"{name} {version(name)}\n".encode())
    for source in sorted(Path(__file__).parent.glob("*.py")):
        digest.update(source.name.encode() + b"\n" + source.read_bytes())
    return digest.digest()


@contextlib.contextmanager
def remembered_charts(path: Path | None) -> Iterator[None]:
    """Charts drawn inside the block are read from / kept in the file at `path` (None: not kept)."""
    if path is None:
        yield
        return
    with active(_ACTIVE, ChartMemo(path)):
        yield


def active_memo() -> ChartMemo | None:
    return _ACTIVE.get()
