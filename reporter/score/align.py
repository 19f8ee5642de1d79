"""Semantic alignment: sentence embeddings vs goal descriptors -> alignment scores in [0, 1].

Per sentence: cosine similarity to every descriptor, pooled per goal; a softmax
over the goals plus a background "no goal" class (generic academic sentences)
with a temperature; times a gate on the raw similarity, because a softmax alone
always crowns some goal even for a sentence that is about none. Per
publication: the mean of its k strongest sentences for each goal, or its title's
own score (discounted) where that is higher.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np


@dataclass(frozen=True)
class AlignParams:
    temperature: float = 0.05  # softmax temperature over cosine similarities
    floor: float = 0.30  # raw cosine at which the gate is half open
    floor_width: float = 0.04  # how sharply the gate opens around the floor
    top_k: int = 3  # strongest sentences averaged per publication and goal
    pool_top: int = 3  # descriptors averaged per goal (its best matches; 3 measured best on real abstracts with 45-80 per goal)
    competition: float = 0.5  # 1: goals compete in one softmax; 0: each goal only against the background
    # A title names the subject in a few words; when it matches a goal strongly, methods sentences
    # should not dilute that through the top-k mean. Discounted, as a title is one short unit. 0.85
    # gained on both repository halves of the realset (bench/README.md); 0 turns it off.
    title_weight: float = 0.85


@dataclass(frozen=True)
class GoalSpace:
    """Embedded descriptors and background statements, built once per run."""

    goal_codes: tuple[str, ...]
    descriptors: np.ndarray  # (n_descriptors, dim), unit length
    descriptor_goal: np.ndarray  # (n_descriptors,) index into goal_codes
    background: np.ndarray  # (n_background, dim), unit length

    @property
    def n_goals(self) -> int:
        return len(self.goal_codes)


def cosine_matrix(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """Cosine similarity of every row of a with every row of b."""
    a = a / np.clip(np.linalg.norm(a, axis=1, keepdims=True), 1e-12, None)
    b = b / np.clip(np.linalg.norm(b, axis=1, keepdims=True), 1e-12, None)
    return a @ b.T


def softmax(logits: np.ndarray, axis: int = -1) -> np.ndarray:
    shifted = logits - logits.max(axis=axis, keepdims=True)
    exp = np.exp(shifted)
    return exp / exp.sum(axis=axis, keepdims=True)


def goal_similarity(sentence_vectors: np.ndarray, space: GoalSpace, pool_top: int) -> np.ndarray:
    """(n_sentences, n_goals): mean of each goal's `pool_top` most similar descriptors."""
    sims = sentence_vectors @ space.descriptors.T
    out = np.empty((sims.shape[0], space.n_goals), dtype=np.float32)
    for g in range(space.n_goals):
        block = sims[:, space.descriptor_goal == g]
        k = min(pool_top, block.shape[1])
        out[:, g] = np.sort(block, axis=1)[:, -k:].mean(axis=1)
    return out


def sentence_scores(sentence_vectors: np.ndarray, space: GoalSpace, params: AlignParams) -> tuple[np.ndarray, np.ndarray]:
    """Per-sentence goal scores in [0, 1] and the raw pooled similarities, both (n_sentences, n_goals)."""
    if sentence_vectors.shape[0] == 0:
        empty = np.zeros((0, space.n_goals), dtype=np.float32)
        return empty, empty
    goal_sim = goal_similarity(sentence_vectors, space, params.pool_top)
    background_sim = (sentence_vectors @ space.background.T).max(axis=1, keepdims=True)
    probs = softmax(np.hstack([goal_sim, background_sim]) / params.temperature, axis=1)[:, :-1]
    if params.competition < 1.0:
        # A sentence can serve two goals at once (heat stress is about health and cities); scored
        # against the background alone, a goal does not lose mass to its neighbours.
        alone = 1.0 / (1.0 + np.exp(-(goal_sim - background_sim) / params.temperature))
        probs = params.competition * probs + (1.0 - params.competition) * alone
    gate = 1.0 / (1.0 + np.exp(-(goal_sim - params.floor) / params.floor_width))
    return (probs * gate).astype(np.float32), goal_sim


def aggregate_by_record(record_index: np.ndarray, scores: np.ndarray, n_records: int, top_k: int) -> np.ndarray:
    """(n_records, n_goals): mean of each record's k strongest sentence scores per goal (0 with no sentences)."""
    out = np.zeros((n_records, scores.shape[1]), dtype=np.float32)
    if scores.shape[0] == 0:
        return out
    order = np.argsort(record_index, kind="stable")
    sorted_index = record_index[order]
    bounds = np.flatnonzero(np.diff(sorted_index)) + 1
    starts = np.concatenate([[0], bounds])
    ends = np.concatenate([bounds, [len(order)]])
    for start, end in zip(starts, ends):
        block = scores[order[start:end]]
        k = min(top_k, block.shape[0])
        out[sorted_index[start]] = np.sort(block, axis=0)[-k:].mean(axis=0)
    return out


def record_scores(record_index: np.ndarray, is_title: np.ndarray, scores: np.ndarray, n_records: int,
                  params: AlignParams) -> np.ndarray:
    """(n_records, n_goals): per publication and goal, the larger of the top-k sentence mean and the
    title's score times `title_weight` (a title split into windows counts by its best window)."""
    out = aggregate_by_record(record_index, scores, n_records, params.top_k)
    if params.title_weight > 0 and is_title.any():
        title = np.zeros_like(out)
        np.maximum.at(title, record_index[is_title], scores[is_title])
        out = np.maximum(out, params.title_weight * title)
    return out
