"""LaTeX decodings kept between runs, in the score cache's SQLite file (table `latex`).

Decoding a BibTeX value with LaTeX markup walks it character by character (pylatexenc): most of
the time spent reading a BibTeX export, and a rebuild of the same list would repeat it for every
such value. The result depends only on the value and on the decoder, which bibtexparser's
LatexDecodingMiddleware configures, so it is stored by a hash of the value under a key naming
both libraries' releases. What the readers do before and after decoding runs on every build.
"""

from __future__ import annotations

import contextlib
import contextvars
from importlib.metadata import version
from pathlib import Path
from typing import Callable, Iterator

from reporter.memo_file import active, connect, text_hash

_SCHEMA = """
CREATE TABLE IF NOT EXISTS latex (
    decoder TEXT NOT NULL,
    value_hash BLOB NOT NULL,
    decoded TEXT NOT NULL,
    error TEXT NOT NULL,
    PRIMARY KEY (decoder, value_hash)
)
"""
_ACTIVE: contextvars.ContextVar["LatexMemo | None"] = contextvars.ContextVar("waymark_latex_memo", default=None)


def decoder_key() -> str:
    """Names the decoder: a value decoded by other releases is never read back."""
    return f"bibtexparser-{version('bibtexparser')}:pylatexenc-{version('pylatexenc')}"


class LatexMemo:
    """(decoded text, error message) by value for one decoder. New results are written on close()."""

    def __init__(self, path: Path, decoder: str):
        self.path = Path(path)
        self.decoder = decoder
        self._db = connect(self.path, _SCHEMA)
        self._new: dict[bytes, tuple[str, str]] = {}

    def decoded(self, value: str, decode: Callable[[str], tuple[str, str]]) -> tuple[str, str]:
        """The stored result for `value`, else `decode(value)`'s, kept."""
        key = text_hash(value)
        if key in self._new:
            return self._new[key]
        row = self._db.execute("SELECT decoded, error FROM latex WHERE decoder = ? AND value_hash = ?",
                               (self.decoder, key)).fetchone()
        if row is not None:
            return row
        self._new[key] = result = decode(value)
        return result

    def close(self) -> None:
        try:
            with self._db:
                self._db.executemany(
                    "INSERT OR REPLACE INTO latex (decoder, value_hash, decoded, error) VALUES (?, ?, ?, ?)",
                    [(self.decoder, key, text, error) for key, (text, error) in self._new.items()],
                )
        finally:
            self._db.close()


@contextlib.contextmanager
def remembered_latex(path: Path | None) -> Iterator[None]:
    """Values decoded inside the block are read from / kept in the file at `path` (None: not kept)."""
    if path is None:
        yield
        return
    with active(_ACTIVE, LatexMemo(path, decoder_key())):
        yield


def active_memo() -> LatexMemo | None:
    return _ACTIVE.get()
