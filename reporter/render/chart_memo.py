"""Chart SVGs kept between builds, in the score cache's SQLite file (table `charts`).

Drawing a chart (Vega-Lite -> SVG through vl-convert) costs a second to start its JavaScript
engine and up to seconds per chart; a rebuild draws mostly the same charts again. The SVG depends
only on the chart's full specification (data, encodings, theme colours and fonts) and on the
vl-convert release, so it is stored under a hash of both (fonts installed on the system later
are not noticed: delete the cache file to draw everything afresh). Only the most recently used charts are
kept (KEEP), so the table stays small however many builds share the cache.
"""

from __future__ import annotations

import contextlib
import contextvars
import hashlib
import json
import time
from pathlib import Path
from typing import Callable, Iterator

from reporter.memo_db import connect

KEEP = 200  # charts kept: every chart of several reports, a few MB

_SCHEMA = """
CREATE TABLE IF NOT EXISTS charts (
    spec_hash BLOB PRIMARY KEY,
    svg TEXT NOT NULL,
    used_at REAL NOT NULL
)
"""
_ACTIVE: contextvars.ContextVar["ChartMemo | None"] = contextvars.ContextVar("waymark_chart_memo", default=None)


class ChartMemo:
    """SVG text by chart specification. Use as a context manager or call close()."""

    def __init__(self, path: Path):
        self.path = Path(path)
        self._db = connect(self.path, _SCHEMA)

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

    def close(self) -> None:
        try:
            with self._db:
                self._db.execute("DELETE FROM charts WHERE spec_hash NOT IN "
                                 "(SELECT spec_hash FROM charts ORDER BY used_at DESC LIMIT ?)", (KEEP,))
        finally:
            self._db.close()


@contextlib.contextmanager
def remembered_charts(path: Path | None) -> Iterator[None]:
    """Charts drawn inside the block are read from / kept in the file at `path` (None: not kept)."""
    if path is None:
        yield
        return
    memo = ChartMemo(path)
    token = _ACTIVE.set(memo)
    try:
        yield
    finally:
        _ACTIVE.reset(token)
        memo.close()


def active_memo() -> ChartMemo | None:
    return _ACTIVE.get()
