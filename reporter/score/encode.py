"""Embed a batch of texts once each: deduplicate, read the cache, encode only what is missing.

Misses are encoded in model-sized batches and written to the cache batch by
batch, so an interrupted run keeps its work.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Protocol, Sequence

import numpy as np

from reporter.score.cache import EmbeddingCache, text_hash


class Embedder(Protocol):
    def encode(self, texts: list[str]) -> np.ndarray: ...


@dataclass
class EncodeStats:
    """Running totals over a scoring run (mutable on purpose: one per run, owned by `score`)."""

    n_unique: int = 0
    n_cache_hits: int = 0
    n_encoded: int = 0
    seconds_encoding: float = 0.0
    extra: dict = field(default_factory=dict)


def embed_texts(
    texts: Sequence[str],
    embedder: Embedder,
    cache: EmbeddingCache | None,
    stats: EncodeStats,
    batch_size: int = 256,
    progress=None,
) -> np.ndarray:
    """Vectors for `texts` in order; each distinct text is encoded at most once (and never if cached)."""
    import time

    unique: dict[str, int] = {}
    for text in texts:
        unique.setdefault(text, len(unique))
    distinct = list(unique)
    stats.n_unique += len(distinct)
    keys = [text_hash(t) for t in distinct]
    found = cache.get_many(keys) if cache is not None else {}
    stats.n_cache_hits += len(found)
    vectors: list[np.ndarray | None] = [found.get(k) for k in keys]
    missing = [i for i, v in enumerate(vectors) if v is None]
    # Similar lengths per model call mean little padding: the model pads each batch to its longest text.
    missing.sort(key=lambda i: len(distinct[i]))
    for start in range(0, len(missing), batch_size):
        chunk = missing[start : start + batch_size]
        began = time.perf_counter()
        encoded = embedder.encode([distinct[i] for i in chunk])
        stats.seconds_encoding += time.perf_counter() - began
        stats.n_encoded += len(chunk)
        for i, vec in zip(chunk, encoded):
            vectors[i] = vec
        if cache is not None:
            cache.put_many((keys[i], vectors[i]) for i in chunk)
        if progress is not None:
            progress.update(len(chunk))
    if progress is not None and found:
        progress.update(len(found))
    if not distinct:
        return np.zeros((0, 0), dtype=np.float32)
    matrix = np.vstack(vectors).astype(np.float32, copy=False)
    return matrix[[unique[t] for t in texts]]
