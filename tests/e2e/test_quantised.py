"""The int8 embedding backend: loads from the packaged weights without a network, scores, caches apart.

Its accuracy against fp32 is measured by bench/benchmark.py --int8, not asserted here.
"""

import socket

import numpy as np
import pandas as pd
import pytest
import torch

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
    before = torch.get_num_threads()

    def refuse(*args, **kwargs):
        raise OSError("the int8 backend tried to open a network connection")

    patch = pytest.MonkeyPatch()
    patch.setattr(socket.socket, "connect", refuse)
    try:
        parts = load_scoring_parts(cfg)
        threads_while_loaded = torch.get_num_threads()
    finally:
        patch.undo()
    try:
        result = score(_records(), parts.framework, parts.embedder, cfg, cache=parts.cache, show_progress=False)
    finally:
        parts.close()
        torch.set_num_threads(before)  # the setting is process-wide; later tests expect all cores
    return parts, result, cache_path, threads_while_loaded


def test_int8_backend_respects_the_thread_setting(int8_run):
    assert int8_run[3] == 1, "score.threads = 1 must reach torch"


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
    assert parts.embedder.info.checksum == embedder.info.checksum + ":int8"
    assert parts.embedder.info.backend == "embedding-int8"
    with EmbeddingCache(cache_path, parts.embedder.info.checksum, 384) as int8_cache:
        assert int8_cache.count() > 0
    with EmbeddingCache(cache_path, embedder.info.checksum, 384) as fp32_cache:
        assert fp32_cache.count() == 0, "fp32 runs must never read int8 vectors"


def test_int8_vectors_differ_from_fp32(int8_run, embedder):
    parts, _, _, _ = int8_run
    text = [SENTENCES["6"]]
    cosine = float(np.dot(parts.embedder.encode(text)[0], embedder.encode(text)[0]))
    assert cosine < 0.9999, "quantisation left the vectors unchanged: the Linear layers were not converted"
