"""Alignment arithmetic on hand-made vectors (no model)."""

import numpy as np
import pytest

from reporter.score.align import (
    AlignParams, GoalSpace, aggregate_by_record, goal_similarity, record_scores, sentence_scores,
)


def _unit(*rows):
    m = np.array(rows, dtype=np.float32)
    return m / np.linalg.norm(m, axis=1, keepdims=True)


SPACE = GoalSpace(
    goal_codes=("a", "b"),
    descriptors=_unit([1, 0, 0], [0.9, 0.1, 0], [0, 1, 0]),
    descriptor_goal=np.array([0, 0, 1]),
    background=_unit([0, 0, 1]),
)


def test_goal_similarity_pools_the_best_descriptors_of_each_goal():
    sims = goal_similarity(_unit([1, 0, 0]), SPACE, pool_top=2)
    expected_a = (1.0 + 0.9 / np.hypot(0.9, 0.1)) / 2
    assert sims[0] == pytest.approx([expected_a, 0.0], abs=1e-6)


def test_background_sentence_scores_low_for_every_goal():
    scores, _ = sentence_scores(_unit([0, 0, 1], [1, 0, 0]), SPACE, AlignParams())
    assert scores[0].max() < 0.01, "a sentence like the background class must not align with any goal"
    assert scores[1, 0] > 0.9 and scores[1, 1] < 0.01


def test_gate_keeps_weak_similarity_low_even_when_softmax_picks_a_goal():
    # Far from everything: the softmax still prefers goal a, but the raw cosine is under the floor.
    vec = _unit([0.2, 0.05, -1.0])
    scores, sims = sentence_scores(vec, SPACE, AlignParams(floor=0.5))
    assert sims[0, 0] < 0.5 and scores[0].max() < 0.05


def test_aggregate_takes_mean_of_top_k_per_record():
    record_index = np.array([0, 0, 0, 1])
    scores = np.array([[0.9, 0.0], [0.1, 0.2], [0.5, 0.4], [0.3, 0.3]], dtype=np.float32)
    out = aggregate_by_record(record_index, scores, n_records=3, top_k=2)
    assert out[0] == pytest.approx([0.7, 0.3])
    assert out[1] == pytest.approx([0.3, 0.3])
    assert out[2] == pytest.approx([0.0, 0.0]), "a record without sentences scores 0"


def test_a_strong_title_stands_for_the_publication_discounted():
    # Record 0: the title scores 0.9 for goal a, the abstract's sentences little; the top-2 mean
    # would be 0.5, the discounted title gives 0.9 * 0.85. Record 1 has a weak title: the mean stands.
    record_index = np.array([0, 0, 0, 1, 1, 1])
    is_title = np.array([True, False, False, True, False, False])
    scores = np.array([[0.9, 0.0], [0.1, 0.2], [0.05, 0.1], [0.1, 0.0], [0.8, 0.0], [0.6, 0.0]], dtype=np.float32)
    out = record_scores(record_index, is_title, scores, 2, AlignParams(top_k=2, title_weight=0.85))
    assert out[0] == pytest.approx([0.9 * 0.85, 0.15])
    assert out[1] == pytest.approx([0.7, 0.0])
    off = record_scores(record_index, is_title, scores, 2, AlignParams(top_k=2, title_weight=0.0))
    assert off == pytest.approx(aggregate_by_record(record_index, scores, 2, 2)), "0 turns the title rule off"


def test_a_title_split_into_windows_counts_by_its_best_window():
    record_index = np.array([0, 0, 0])
    is_title = np.array([True, True, False])
    scores = np.array([[0.2], [0.8], [0.1]], dtype=np.float32)
    out = record_scores(record_index, is_title, scores, 1, AlignParams(top_k=3, title_weight=1.0))
    assert out[0] == pytest.approx([0.8])
