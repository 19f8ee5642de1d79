"""The int8 embedding backend (the default): exported from the packaged weights without a network,
quantised per channel, run by ONNX Runtime; scores, caches apart, keeps its export.

Its decision agreement with fp32 on the demo is measured by bench/benchmark.py --int8; here the
vectors are checked against the fp32 sentence-transformers model of the same weights.
"""

import json
import socket

import numpy as np
import pandas as pd
import pytest

from reporter.config import ScoreConfig
from reporter.score import load_scoring_parts, score
from reporter.score.cache import EmbeddingCache

pytestmark = pytest.mark.model

SENTENCES = {
    "6": "Household latrines and chlorinated drinking water reduced diarrhoeal disease in informal settlements.",
    "7": "Rooftop solar panels and battery storage brought electricity to off-grid villages at lower cost than diesel.",
    "14": "Overfishing and plastic debris threaten coral reefs and coastal marine ecosystems.",
}


def _records() -> pd.DataFrame:
    return pd.DataFrame({
        "record_id": [f"t:{code}" for code in SENTENCES],
        "title": list(SENTENCES.values()),
        "abstract": [""] * len(SENTENCES),
        "keywords": [()] * len(SENTENCES),
    })


@pytest.fixture(scope="module")
def int8_run(tmp_path_factory):
    cache_path = tmp_path_factory.mktemp("int8") / "cache.sqlite"
    cfg = ScoreConfig(backend="embedding-int8", cache=cache_path, threads=1)

    def refuse(*args, **kwargs):
        raise OSError("the int8 backend tried to open a network connection")

    patch = pytest.MonkeyPatch()
    patch.setattr(socket.socket, "connect", refuse)
    try:
        parts = load_scoring_parts(cfg)
        try:
            threads_while_loaded = parts.embedder.threads
            # The export and the ONNX session are made on first use, inside scoring.
            result = score(_records(), parts.framework, parts.embedder, cfg, cache=parts.cache, show_progress=False)
        finally:
            parts.close()
    finally:
        patch.undo()
    return parts, result, cache_path, threads_while_loaded


def test_int8_backend_respects_the_thread_setting(int8_run):
    assert int8_run[3] == 1, "score.threads = 1 must reach ONNX Runtime"


def test_int8_scores_every_record_and_goal(int8_run, framework):
    _, result, _, _ = int8_run
    assert len(result.table) == len(SENTENCES) * len(framework.goals)
    assert result.table["alignment_score"].between(0, 1).all()
    assert result.stats["n_encoded"] > 0


def test_int8_top_goal_agrees_with_fp32_on_clear_sentences(int8_run, embedder, framework):
    """fp32 is the reference: on unmistakable sentences the int8 model must pick the same goal."""
    _, result, _, _ = int8_run
    fp32 = score(_records(), framework, embedder, ScoreConfig(use_cache=False), show_progress=False)

    def top(table: pd.DataFrame) -> dict:
        best = table.sort_values("alignment_score", ascending=False).drop_duplicates("record_id")
        return dict(zip(best["record_id"], best["goal"]))

    assert top(result.table) == top(fp32.table)


def test_int8_vectors_are_cached_under_their_own_key(int8_run, embedder):
    parts, _, cache_path, _ = int8_run
    assert parts.embedder.info.checksum == embedder.info.checksum + ":onnx-int8"
    assert parts.embedder.info.backend == "embedding-int8"
    with EmbeddingCache(cache_path, parts.embedder.info.checksum, 384) as int8_cache:
        assert int8_cache.count() > 0
    with EmbeddingCache(cache_path, embedder.info.checksum, 384) as fp32_cache:
        assert fp32_cache.count() == 0, "fp32 runs must never read int8 vectors"


def test_int8_vectors_are_close_to_fp32_but_not_equal(int8_run, embedder):
    """fp32 sentence-transformers (same weights) is the reference. Per-channel int8 measured a mean
    cosine of 0.992 on 4,000 benchmark sentences; 0.97 leaves room, 0.9999 proves it was quantised."""
    parts, _, _, _ = int8_run
    texts = list(SENTENCES.values()) + ["Keywords: groundwater; arsenic", "A short one."]
    cosine = np.sum(parts.embedder.encode(texts) * embedder.encode(texts), axis=1)
    assert (cosine > 0.97).all(), cosine
    assert (cosine < 0.9999).all(), "the vectors equal fp32's: the weights were not quantised"
    assert np.allclose(np.linalg.norm(parts.embedder.encode(texts), axis=1), 1.0, atol=1e-4), "unit length"


def test_export_is_kept_beside_the_cache_and_reused(int8_run):
    from reporter.score.quantised import QuantisedEmbedder

    parts, _, cache_path, _ = int8_run
    exported = parts.embedder.onnx_path
    assert exported.parent == cache_path.parent / "onnx" and exported.exists()
    stamp = exported.stat().st_mtime_ns
    again = QuantisedEmbedder(threads=1, export_dir=exported.parent)
    assert again.onnx_path == exported and exported.stat().st_mtime_ns == stamp, "a second run must not export again"
    assert [p.name for p in exported.parent.iterdir()] == [exported.name], "no temporary files left behind"


def test_a_model_without_mean_pooling_is_refused_by_name(tmp_path):
    from reporter.errors import ModelError
    from reporter.score.quantised import QuantisedEmbedder

    (tmp_path / "1_Pooling").mkdir()
    (tmp_path / "config.json").write_text("{}")
    (tmp_path / "modules.json").write_text("[]")
    (tmp_path / "1_Pooling" / "config.json").write_text(json.dumps({"pooling_mode_cls_token": True}))
    with pytest.raises(ModelError, match="mean pooling only") as caught:
        QuantisedEmbedder(str(tmp_path), export_dir=tmp_path / "onnx")
    assert "1_Pooling" in str(caught.value)


def test_a_sentence_gets_the_same_int8_vector_whatever_is_encoded_with_it(int8_run):
    """int8 activations are scaled per call; batched, a sentence's vector would move with its neighbours."""
    parts, _, _, _ = int8_run
    texts = list(SENTENCES.values())
    together = parts.embedder.encode(texts + ["A much longer companion sentence " * 12, "Short."])
    for i, text in enumerate(texts):
        assert np.array_equal(parts.embedder.encode([text])[0], together[i]), text
