"""Language detection results kept between runs, in the score cache's SQLite file (table `languages`).

Detection is the slowest part of intake, and a warm rebuild (the same list, a department alias
edited) would otherwise repeat it for every publication. A result depends only on the text read
and on the detector, so the detector's confidences are stored by a hash of that text under a key
naming the detector (lingua's version, the candidate languages, accuracy mode, characters read).
The rules that turn confidences into a decision (`language.decide_language`) run on the stored
values, so a change to those rules needs no new detection.
"""

from __future__ import annotations

import json
from importlib.metadata import PackageNotFoundError, version
from pathlib import Path
from typing import Iterable, Mapping

from reporter.memo_file import connect, text_hash

_SCHEMA = """
CREATE TABLE IF NOT EXISTS languages (
    detector TEXT NOT NULL,
    text_hash BLOB NOT NULL,
    confidences TEXT NOT NULL,
    PRIMARY KEY (detector, text_hash)
)
"""
_CHUNK = 500  # stays under SQLite's host-parameter limit


def detector_key(language_codes: Iterable[str], max_chars: int) -> str:
    """Names the default detector: a stored result of any other detector is never read back."""
    try:
        lingua_version = version("lingua-language-detector")
    except PackageNotFoundError:  # pragma: no cover - lingua is a dependency
        lingua_version = "unknown"
    return f"lingua-{lingua_version}:high-accuracy:{','.join(sorted(language_codes))}:{max_chars}"


class LanguageMemo:
    """Confidences by text for one detector. Use as a context manager or call close()."""

    def __init__(self, path: Path, detector: str):
        self.path = Path(path)
        self.detector = detector
        self._db = connect(self.path, _SCHEMA)

    def get_many(self, texts: Iterable[str]) -> dict[str, dict[str, float]]:
        """Stored confidences (language code -> value) for the texts seen before."""
        by_hash = {text_hash(t): t for t in dict.fromkeys(texts)}
        hashes = list(by_hash)
        found: dict[str, dict[str, float]] = {}
        for start in range(0, len(hashes), _CHUNK):
            chunk = hashes[start : start + _CHUNK]
            query = ("SELECT text_hash, confidences FROM languages WHERE detector = ? AND text_hash IN "
                     f"({','.join('?' * len(chunk))})")
            for key, text in self._db.execute(query, [self.detector, *chunk]):
                found[by_hash[key]] = json.loads(text)
        return found

    def put_many(self, results: Mapping[str, Mapping[str, float]]) -> None:
        # JSON keeps a float's shortest repr, so a stored value reads back as the same number.
        rows = [(self.detector, text_hash(t), json.dumps(dict(c), sort_keys=True)) for t, c in results.items()]
        with self._db:
            self._db.executemany(
                "INSERT OR REPLACE INTO languages (detector, text_hash, confidences) VALUES (?, ?, ?)", rows
            )

    def close(self) -> None:
        self._db.close()

    def __enter__(self) -> "LanguageMemo":
        return self

    def __exit__(self, *exc: object) -> None:
        self.close()

