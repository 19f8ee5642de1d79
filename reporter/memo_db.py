"""The score cache's SQLite file, opened for one of the memo tables kept beside the embeddings."""

from __future__ import annotations

import sqlite3
from pathlib import Path


def connect(path: Path, *schema: str) -> sqlite3.Connection:
    """A connection with the memo's tables made; WAL journal, as the embedding cache in the same file."""
    path = Path(path)
    path.parent.mkdir(parents=True, exist_ok=True)
    db = sqlite3.connect(path, timeout=60)
    db.execute("PRAGMA journal_mode=WAL")
    for statement in schema:
        db.execute(statement)
    db.commit()
    return db
