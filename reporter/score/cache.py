"""SQLite embedding cache keyed by model checksum + text hash; sentence splits keyed by splitter + text hash;
whole per-publication results keyed by method key + record hash (reporter/score/reuse.py).

Each batch is committed as soon as it is embedded, so a run killed mid-way
keeps what it finished and the next run resumes from there. WAL journaling
keeps readers and the writer out of each other's way.

Writes go to a background thread with its own connection: SQLite's commits and checkpoints wait
on the disk (about 0.6 s per 10k vectors in a 2.5 GB cache, measured), and the model can go on
meanwhile. Every read first waits for the writes queued before it, so a run always sees what it
stored; close() waits for all of them and re-raises a write error.
"""

from __future__ import annotations

import hashlib
import queue
import sqlite3
import threading
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
_QUEUED_WRITES = 16  # batches waiting for the writer at most (then put_* waits): bounded memory


class _Writer:
    """One thread, one connection: runs queued executemany+commit in order."""

    def __init__(self, path: Path):
        # Opened here, so a failure to open shows in the caller's thread; used only by the writer thread.
        self._db = sqlite3.connect(path, timeout=60, check_same_thread=False)
        self._db.execute("PRAGMA synchronous=NORMAL")
        self._jobs: queue.Queue = queue.Queue(maxsize=_QUEUED_WRITES)
        self._error: BaseException | None = None
        self._thread = threading.Thread(target=self._run, name="waymark-cache-writer", daemon=True)
        self._thread.start()

    def _run(self) -> None:
        db = self._db
        try:
            while True:
                job = self._jobs.get()
                try:
                    if job is None:
                        return
                    if self._error is None:  # after a failure, later writes are dropped; close() reports it
                        db.executemany(*job)
                        db.commit()
                except BaseException as error:  # noqa: BLE001 - handed to the caller's thread
                    self._error = error
                finally:
                    self._jobs.task_done()
        finally:
            db.close()

    def submit(self, sql: str, rows: list[tuple]) -> None:
        self._raise_error()
        if rows:
            self._jobs.put((sql, rows))

    def flush(self) -> None:
        self._jobs.join()
        self._raise_error()

    def stop(self) -> None:
        self._jobs.put(None)
        self._thread.join()
        self._raise_error()

    def _raise_error(self) -> None:
        if self._error is not None:
            error, self._error = self._error, None
            raise error


def text_hash(text: str) -> bytes:
    return hashlib.blake2b(text.encode("utf-8"), digest_size=16).digest()


class EmbeddingCache:
    """Vectors by (model checksum, text hash). Use as a context manager or call close()."""

    def __init__(self, path: Path, model_checksum: str, dimension: int, read_only: bool = False):
        self.path = path
        self._model = model_checksum
        self._dimension = dimension
        self._writer: _Writer | None = None
        if read_only:
            # Same queries, but no schema, journal or file changes (e.g. a Dask worker reading the main cache).
            self._db = sqlite3.connect(f"{Path(path).resolve().as_uri()}?mode=ro", uri=True, timeout=60)
            return
        path.parent.mkdir(parents=True, exist_ok=True)
        self._db = sqlite3.connect(path, timeout=60)
        self._db.execute("PRAGMA journal_mode=WAL")
        self._db.execute("PRAGMA synchronous=NORMAL")
        self._db.executescript(_SCHEMA)
        self._db.commit()
        self._writer = _Writer(path)

    def _write(self, sql: str, rows: list[tuple]) -> None:
        if self._writer is None:
            raise sqlite3.OperationalError(f"{self.path}: opened read-only")
        self._writer.submit(sql, rows)

    def flush(self) -> None:
        """Wait until every write queued so far is committed."""
        if self._writer is not None:
            self._writer.flush()

    def _select(self, query: str, owner: str, hashes: Sequence[bytes]):
        """Rows of `query` (its IN list left as {marks}) for `owner` and the hashes, in chunks."""
        self.flush()
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
        self._write(
            "INSERT OR REPLACE INTO embeddings (model, text_hash, vector) VALUES (?, ?, ?)",
            [(self._model, key, np.asarray(vec, dtype=np.float32).tobytes()) for key, vec in items],
        )

    def get_splits(self, splitter: str, hashes: Sequence[bytes]) -> dict[bytes, list[str]]:
        """Stored sentence splits by text hash, for the splitter named (its rules and version)."""
        query = "SELECT text_hash, sentences FROM splits WHERE splitter = ? AND text_hash IN ({marks})"
        return {key: text.split(_SPLIT_SEP) if text else [] for key, text in self._select(query, splitter, hashes)}

    def put_splits(self, splitter: str, items: Iterable[tuple[bytes, list[str]]]) -> None:
        self._write(
            "INSERT OR REPLACE INTO splits (splitter, text_hash, sentences) VALUES (?, ?, ?)",
            [(splitter, key, _SPLIT_SEP.join(sentences)) for key, sentences in items],
        )

    def get_results(self, method: str, hashes: Sequence[bytes]) -> dict[bytes, tuple[bytes, str]]:
        """Stored per-publication results (numbers blob, detail JSON) by record hash."""
        query = "SELECT record_hash, numbers, detail FROM record_results WHERE method = ? AND record_hash IN ({marks})"
        return {key: (numbers, detail) for key, numbers, detail in self._select(query, method, hashes)}

    def put_results(self, method: str, items: Iterable[tuple[bytes, tuple[bytes, str]]]) -> None:
        self._write(
            "INSERT OR REPLACE INTO record_results (method, record_hash, numbers, detail) VALUES (?, ?, ?, ?)",
            [(method, key, numbers, detail) for key, (numbers, detail) in items],
        )

    def count(self) -> int:
        self.flush()
        return self._db.execute("SELECT COUNT(*) FROM embeddings WHERE model = ?", [self._model]).fetchone()[0]

    def close(self) -> None:
        try:
            if self._writer is not None:
                writer, self._writer = self._writer, None
                writer.stop()
        finally:
            self._db.close()

    def __enter__(self) -> "EmbeddingCache":
        return self

    def __exit__(self, *exc: object) -> None:
        self.close()
