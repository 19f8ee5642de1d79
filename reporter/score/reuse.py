"""Per-publication results kept from earlier runs, so a re-run over unchanged inputs skips the work.

A stored result is used only when nothing that made it has changed: the publication's scored
text (record key) and, in the method key, the model, the goal framework, thresholds, policy,
text fields, method parameters, sentence splitter and the scoring code itself (its source files
are hashed, so an upgrade never serves results of older code). Results do not hold the record
id: two publications with the same text share one.
"""

from __future__ import annotations

import functools
import hashlib
import json
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from reporter.score.cache import text_hash

_FORMAT = 1  # bump when the stored layout changes


@dataclass(frozen=True)
class RecordResult:
    """Everything one publication contributes to `Scores`, for the goals in framework order."""

    score: np.ndarray  # float32, combined alignment score per goal
    n_explicit: np.ndarray  # int32, explicit mentions per goal
    aligned: np.ndarray  # bool, the decision per goal
    best_score: np.ndarray  # float32, best sentence score per goal
    best_text: tuple[str, ...]  # evidence sentence per goal ("" where not aligned)
    evidence: tuple[tuple, ...]  # (goal, rank, kind, sentence, sentence_score, is_mention)
    n_general: int  # mentions of the goals in general
    n_units: int  # text units (sentences) scored


@functools.lru_cache(maxsize=1)
def code_fingerprint() -> str:
    """Hash of the scoring code's source files."""
    digest = hashlib.blake2b(digest_size=16)
    for path in sorted(Path(__file__).parent.glob("*.py")):
        digest.update(path.name.encode())
        digest.update(path.read_bytes())
    return digest.hexdigest()


def method_key(**parts: object) -> str:
    """A short key over everything (besides the record's text) a result depends on."""
    payload = json.dumps({"format": _FORMAT, "code": code_fingerprint(), **parts}, sort_keys=True, default=str)
    return hashlib.blake2b(payload.encode("utf-8"), digest_size=16).hexdigest()


def record_key(fields: dict, text_fields) -> bytes:
    """Hash of the fields scoring reads, in the configured order."""
    values = []
    for name in text_fields:
        value = fields.get(name)
        if isinstance(value, (list, tuple)):
            value = list(value)
        elif value is not None and not isinstance(value, str):
            value = None if value != value else str(value)  # NaN (missing) -> None
        values.append(value)
    return text_hash(json.dumps(values, ensure_ascii=False))


def encode_result(result: RecordResult) -> tuple[bytes, str]:
    """(numbers blob, detail JSON) for the cache."""
    numbers = b"".join((
        result.score.astype(np.float32).tobytes(),
        result.n_explicit.astype(np.int32).tobytes(),
        result.best_score.astype(np.float32).tobytes(),
        result.aligned.astype(np.uint8).tobytes(),
    ))
    detail = {
        "text": {str(g): t for g, t in enumerate(result.best_text) if t},
        "evidence": [list(row) for row in result.evidence],
        "general": result.n_general,
        "units": result.n_units,
    }
    return numbers, json.dumps(detail, ensure_ascii=False)


def decode_result(numbers: bytes, detail: str, n_goals: int) -> RecordResult | None:
    """The stored result, or None when it does not fit `n_goals` (treated as a miss)."""
    if len(numbers) != 13 * n_goals:
        return None
    cut = 4 * n_goals
    data = json.loads(detail)
    best_text = [""] * n_goals
    for g, text in data["text"].items():
        best_text[int(g)] = text
    return RecordResult(
        score=np.frombuffer(numbers, dtype=np.float32, count=n_goals, offset=0),
        n_explicit=np.frombuffer(numbers, dtype=np.int32, count=n_goals, offset=cut),
        best_score=np.frombuffer(numbers, dtype=np.float32, count=n_goals, offset=2 * cut),
        aligned=np.frombuffer(numbers, dtype=np.uint8, count=n_goals, offset=3 * cut).astype(bool),
        best_text=tuple(best_text),
        evidence=tuple(tuple(row) for row in data["evidence"]),
        n_general=int(data["general"]),
        n_units=int(data["units"]),
    )
