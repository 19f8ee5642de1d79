"""Cosine similarity and softmax against reference implementations."""

import numpy as np
import pytest
import torch
from scipy.special import softmax as scipy_softmax
from sentence_transformers import util

from reporter.score.align import cosine_matrix, softmax


def test_cosine_matches_sentence_transformers_util():
    """Source: sentence_transformers.util.cos_sim (reference library)."""
    rng = np.random.default_rng(7)
    a, b = rng.normal(size=(5, 16)), rng.normal(size=(4, 16))
    expected = util.cos_sim(torch.tensor(a), torch.tensor(b)).numpy()
    assert cosine_matrix(a, b) == pytest.approx(expected, abs=1e-6)


def test_cosine_matches_numpy_definition():
    """Source: the definition a.b / (|a||b|), computed with numpy."""
    a, b = np.array([[1.0, 2.0, 3.0]]), np.array([[-1.0, 0.5, 2.0]])
    expected = (a @ b.T) / (np.linalg.norm(a) * np.linalg.norm(b))
    assert cosine_matrix(a, b) == pytest.approx(expected)


def test_softmax_matches_scipy_and_is_stable_for_large_logits():
    """Source: scipy.special.softmax (reference library)."""
    logits = np.array([[0.31, 0.28, 0.45, 0.12], [30.0, 31.0, 29.0, 10.0]]) / 0.05
    assert softmax(logits, axis=1) == pytest.approx(scipy_softmax(logits, axis=1))
    assert np.isfinite(softmax(logits, axis=1)).all()
