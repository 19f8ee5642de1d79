"""SQLite embedding cache keyed by model checksum + text hash; sentence splits keyed by splitter + text hash;
whole per-publication results keyed by method key + record hash (reporter/score/reuse.py).

Each batch is committed as soon as it is embedded, so a run killed mid-way
keeps what it finished and the next run resumes from there. WAL journaling
keeps readers and the writer out of each other's way.
"""

from __future__ import annotations

import hashlib
import sqlite3
from pathlib import Path
from typing import Iterable, Sequence

import numpy as np

# Ordinary rowid tables: their rows (1.5 kB vectors, whole abstracts' splits) are far too large
# for WITHOUT ROWID, which took 4.7 kB per vector against 2.1 kB here (measured).
_SCHEMA = """
CREATE TABLE IF NOT EXISTS embeddings (
    model TEXT NOT NULL,
    text_hash BLOB NOT NULL,
    vector BLOB NOT NULL,
    PRIMARY KEY (model, text_hash)
);
CREATE TABLE IF NOT EXISTS splits (
    splitter TEXT NOT NULL,
    text_hash BLOB NOT NULL,
    sentences TEXT NOT NULL,
    PRIMARY KEY (splitter, text_hash)
);
CREATE TABLE IF NOT EXISTS record_results (
    method TEXT NOT NULL,
    record_hash BLOB NOT NULL,
    numbers BLOB NOT NULL,
    detail TEXT NOT NULL,
    PRIMARY KEY (method, record_hash)
)
"""
# Sentence splitting costs about as much per abstract as embedding one sentence; a warm re-run
# reads the splits back instead. Split sentences never hold a newline (whitespace is collapsed).
_SPLIT_SEP = "\n"
_CHUNK = 500  # stays under SQLite's host-parameter limit


def text_hash(text: str) -> bytes:
    return hashlib.blake2b(text.encode("utf-8"), digest_size=16).digest()


class EmbeddingCache:
    """Vectors by (model checksum, text hash). Use as a context manager or call close()."""

    def __init__(self, path: Path, model_checksum: str, dimension: int, read_only: bool = False):
        self.path = path
        self._model = model_checksum
        self._dimension = dimension
        if read_only:
            # Same queries, but no schema, journal or file changes (e.g. a Dask worker reading the main cache).
            self._db = sqlite3.connect(f"{Path(path).resolve().as_uri()}?mode=ro", uri=True, timeout=60)
            return
        path.parent.mkdir(parents=True, exist_ok=True)
        self._db = sqlite3.connect(path)
        self._db.execute("PRAGMA journal_mode=WAL")
        self._db.execute("PRAGMA synchronous=NORMAL")
        self._db.executescript(_SCHEMA)
        self._db.commit()

    def _select(self, query: str, owner: str, hashes: Sequence[bytes]):
        """Rows of `query` (its IN list left as {marks}) for `owner` and the hashes, in chunks."""
        for start in range(0, len(hashes), _CHUNK):
            chunk = list(hashes[start : start + _CHUNK])
            yield from self._db.execute(query.format(marks=",".join("?" * len(chunk))), [owner, *chunk])

    def get_many(self, hashes: Sequence[bytes]) -> dict[bytes, np.ndarray]:
        found: dict[bytes, np.ndarray] = {}
        query = "SELECT text_hash, vector FROM embeddings WHERE model = ? AND text_hash IN ({marks})"
        for key, blob in self._select(query, self._model, hashes):
            vector = np.frombuffer(blob, dtype=np.float32)
            if vector.shape[0] == self._dimension:
                found[key] = vector
        return found

    def put_many(self, items: Iterable[tuple[bytes, np.ndarray]]) -> None:
        self._db.executemany(
            "INSERT OR REPLACE INTO embeddings (model, text_hash, vector) VALUES (?, ?, ?)",
            [(self._model, key, np.asarray(vec, dtype=np.float32).tobytes()) for key, vec in items],
        )
        self._db.commit()

    def get_splits(self, splitter: str, hashes: Sequence[bytes]) -> dict[bytes, list[str]]:
        """Stored sentence splits by text hash, for the splitter named (its rules and version)."""
        query = "SELECT text_hash, sentences FROM splits WHERE splitter = ? AND text_hash IN ({marks})"
        return {key: text.split(_SPLIT_SEP) if text else [] for key, text in self._select(query, splitter, hashes)}

    def put_splits(self, splitter: str, items: Iterable[tuple[bytes, list[str]]]) -> None:
        self._db.executemany(
            "INSERT OR REPLACE INTO splits (splitter, text_hash, sentences) VALUES (?, ?, ?)",
            [(splitter, key, _SPLIT_SEP.join(sentences)) for key, sentences in items],
        )
        self._db.commit()

    def get_results(self, method: str, hashes: Sequence[bytes]) -> dict[bytes, tuple[bytes, str]]:
        """Stored per-publication results (numbers blob, detail JSON) by record hash."""
        query = "SELECT record_hash, numbers, detail FROM record_results WHERE method = ? AND record_hash IN ({marks})"
        return {key: (numbers, detail) for key, numbers, detail in self._select(query, method, hashes)}

    def put_results(self, method: str, items: Iterable[tuple[bytes, tuple[bytes, str]]]) -> None:
        self._db.executemany(
            "INSERT OR REPLACE INTO record_results (method, record_hash, numbers, detail) VALUES (?, ?, ?, ?)",
            [(method, key, numbers, detail) for key, (numbers, detail) in items],
        )
        self._db.commit()

    def count(self) -> int:
        return self._db.execute("SELECT COUNT(*) FROM embeddings WHERE model = ?", [self._model]).fetchone()[0]

    def close(self) -> None:
        self._db.close()

    def __enter__(self) -> "EmbeddingCache":
        return self

    def __exit__(self, *exc: object) -> None:
        self.close()
