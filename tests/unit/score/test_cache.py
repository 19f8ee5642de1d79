"""SQLite embedding cache and the encode-once wrapper (a counting stand-in model, not a mock of ours)."""

import numpy as np

from reporter.score.cache import EmbeddingCache
from reporter.score.encode import EncodeStats, embed_texts


class CountingModel:
    """A deterministic toy embedder that records every text it was asked to encode."""

    def __init__(self):
        self.seen: list[str] = []

    def encode(self, texts):
        self.seen.extend(texts)
        return np.array([[len(t), t.count("a"), 1.0] for t in texts], dtype=np.float32)


def test_second_run_hits_the_cache_for_every_text(tmp_path):
    texts = ["alpha", "beta", "alpha", "gamma"]
    model = CountingModel()
    with EmbeddingCache(tmp_path / "c.sqlite", "model-1", 3) as cache:
        first = embed_texts(texts, model, cache, EncodeStats(), batch_size=2)
    # Sorted: misses go to the model shortest first (less padding), not in input order.
    assert sorted(model.seen) == ["alpha", "beta", "gamma"], "duplicate texts are embedded once"
    stats = EncodeStats()
    with EmbeddingCache(tmp_path / "c.sqlite", "model-1", 3) as cache:
        second = embed_texts(texts, model, cache, stats)
    assert sorted(model.seen) == ["alpha", "beta", "gamma"], "nothing is re-encoded on a warm run"
    assert stats.n_cache_hits == 3 and stats.n_encoded == 0
    assert np.array_equal(first, second)


def test_cache_is_keyed_by_model_checksum(tmp_path):
    model = CountingModel()
    with EmbeddingCache(tmp_path / "c.sqlite", "model-1", 3) as cache:
        embed_texts(["alpha"], model, cache, EncodeStats())
    with EmbeddingCache(tmp_path / "c.sqlite", "model-2", 3) as cache:
        embed_texts(["alpha"], model, cache, EncodeStats())
        assert cache.count() == 1
    assert model.seen == ["alpha", "alpha"], "another model's vectors are never reused"


def test_batches_are_committed_as_they_finish(tmp_path):
    """A run that dies after the first batch keeps that batch (resume after kill)."""

    class DiesOnSecondBatch(CountingModel):
        def encode(self, texts):
            if self.seen:
                raise KeyboardInterrupt
            return super().encode(texts)

    model = DiesOnSecondBatch()
    with EmbeddingCache(tmp_path / "c.sqlite", "m", 3) as cache:
        try:
            embed_texts(["a1", "a2", "a3"], model, cache, EncodeStats(), batch_size=2)
        except KeyboardInterrupt:
            pass
    with EmbeddingCache(tmp_path / "c.sqlite", "m", 3) as cache:
        assert cache.count() == 2


def test_writes_in_the_background_are_seen_by_the_next_read(tmp_path):
    # More batches than the writer queue holds: put_many waits rather than grow without bound.
    with EmbeddingCache(tmp_path / "c.sqlite", "model-1", 3) as cache:
        for batch in range(40):
            cache.put_many((f"{batch}-{i}".encode(), np.full(3, batch, np.float32)) for i in range(5))
            found = cache.get_many([f"{batch}-4".encode()])
            assert np.array_equal(found[f"{batch}-4".encode()], np.full(3, batch, np.float32))
        assert cache.count() == 200


def test_a_failed_background_write_is_raised_not_lost(tmp_path):
    import sqlite3

    import pytest

    path = tmp_path / "c.sqlite"
    cache = EmbeddingCache(path, "model-1", 3)
    with sqlite3.connect(path) as other:
        other.execute("DROP TABLE embeddings")
    cache.put_many([(b"k", np.ones(3, np.float32))])
    with pytest.raises(sqlite3.OperationalError, match="embeddings"):
        cache.close()
