"""What the memos in the score cache's SQLite file share: opening the file, and a memo active in a block.

Each memo keeps, in its own table, results that depend only on their inputs and on a library's
release: language detection (enrich/language_memo.py), LaTeX decoding (ingest/latex_memo.py),
chart drawing (render/chart_memo.py) and PDF pages (render/pdf_memo.py). The embedding cache
(score/cache.py) shares the file.
"""

from __future__ import annotations

import contextlib
import contextvars
import hashlib
import sqlite3
from pathlib import Path
from typing import Iterator, Protocol


class _Closable(Protocol):
    def close(self) -> None: ...


def connect(path: Path, schema: str) -> sqlite3.Connection:
    """The cache file at `path` (made if missing), with the memo's tables in `schema` created."""
    path.parent.mkdir(parents=True, exist_ok=True)
    db = sqlite3.connect(path, timeout=60)
    db.execute("PRAGMA journal_mode=WAL")  # as the embedding cache in the same file
    db.executescript(schema)
    db.commit()
    return db


def text_hash(text: str) -> bytes:
    """The key a memo stores a text's result under (16 bytes of BLAKE2b)."""
    return hashlib.blake2b(text.encode("utf-8"), digest_size=16).digest()


@contextlib.contextmanager
def active(slot: contextvars.ContextVar, memo: _Closable) -> Iterator[None]:
    """`memo` is the one `slot` holds inside the block, and is closed at its end."""
    token = slot.set(memo)
    try:
        yield
    finally:
        slot.reset(token)
        memo.close()
