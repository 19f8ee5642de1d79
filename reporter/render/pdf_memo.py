"""Laid-out parts of report.pdf kept between builds, in the score cache's SQLite file.

PDF layout is most of a rebuild's time, and a rebuild mostly prints the same sections again
(pdf_parts.py splits the report at its forced page breaks). Two tables:

- `pdf_layouts`: what a part's layout is, whatever page it starts on (its number of pages, where
  its anchors and bookmarks fall), under a hash of everything its layout depends on;
- `pdf_parts`: the PDFs the parts' pages are taken from, one per build that laid out a section;
  `pdf_layouts` also says, under the part's hash plus the page numbers printed on it, which PDF and
  page its pages are.

Fonts installed on the system later are not noticed (delete the cache file to lay out afresh), as
for the charts. Only the most recently used rows are kept (KEEP_*), so the file stays small.
"""

from __future__ import annotations

import json
import time
from pathlib import Path

from reporter.memo_file import connect

KEEP_LAYOUTS = 400  # a few hundred bytes each
KEEP_PARTS = 24  # PDFs of up to a few hundred KB, at most one per build: the last 24 builds' layouts

_SCHEMA = """
CREATE TABLE IF NOT EXISTS pdf_layouts (key BLOB PRIMARY KEY, facts TEXT NOT NULL, used_at REAL NOT NULL);
CREATE TABLE IF NOT EXISTS pdf_parts (key BLOB PRIMARY KEY, pdf BLOB NOT NULL, used_at REAL NOT NULL);
"""


class PdfMemo:
    """Part layouts (JSON) and part PDFs by key. Use as a context manager or call close()."""

    def __init__(self, path: Path):
        self.path = Path(path)
        self._db = connect(self.path, _SCHEMA)

    def facts(self, key: bytes) -> dict | None:
        row = self._get("pdf_layouts", "facts", key)
        return json.loads(row) if row is not None else None

    def put_facts(self, key: bytes, facts: dict) -> None:
        self._put("pdf_layouts", "facts", key, json.dumps(facts, sort_keys=True))

    def part(self, key: bytes) -> bytes | None:
        return self._get("pdf_parts", "pdf", key)

    def put_part(self, key: bytes, pdf: bytes) -> None:
        self._put("pdf_parts", "pdf", key, pdf)

    def _get(self, table: str, column: str, key: bytes):
        row = self._db.execute(f"SELECT {column} FROM {table} WHERE key = ?", (key,)).fetchone()
        if row is None:
            return None
        with self._db:
            self._db.execute(f"UPDATE {table} SET used_at = ? WHERE key = ?", (time.time(), key))
        return row[0]

    def _put(self, table: str, column: str, key: bytes, value) -> None:
        with self._db:
            self._db.execute(f"INSERT OR REPLACE INTO {table} (key, {column}, used_at) VALUES (?, ?, ?)",
                             (key, value, time.time()))

    def close(self) -> None:
        try:
            with self._db:
                for table, keep in (("pdf_layouts", KEEP_LAYOUTS), ("pdf_parts", KEEP_PARTS)):
                    self._db.execute(f"DELETE FROM {table} WHERE key NOT IN "
                                     f"(SELECT key FROM {table} ORDER BY used_at DESC LIMIT ?)", (keep,))
        finally:
            self._db.close()

    def __enter__(self) -> "PdfMemo":
        return self

    def __exit__(self, *exc: object) -> None:
        self.close()
