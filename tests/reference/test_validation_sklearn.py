"""Validation metrics checked against scikit-learn, computed here goal by goal on the same decisions."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from sklearn.metrics import (
    accuracy_score,
    cohen_kappa_score,
    f1_score,
    hamming_loss,
    precision_score,
    recall_score,
)

from reporter.analyse.labelled import LabelledSample
from reporter.analyse.validation import validate

CODES = ("1", "2", "3", "4")


def corpus(seed: int, n: int = 60):
    """Seeded labels and scores where scores lean towards the labels; rows shuffled, as a real table may be."""
    rng = np.random.default_rng(seed)
    truth = rng.random((n, len(CODES))) < [0.3, 0.15, 0.5, 0.05]
    score = np.clip(0.35 * truth + rng.normal(0.3, 0.15, truth.shape), 0, 1)
    ids = [f"kestrel:{i:03d}" for i in range(n)]
    table = pd.DataFrame({
        "record_id": np.repeat(ids, len(CODES)), "goal": np.tile(CODES, n),
        "alignment_score": score.reshape(-1), "is_explicit": False, "is_aligned": (score >= 0.5).reshape(-1),
    }).sample(frac=1.0, random_state=seed)
    labels = pd.DataFrame({
        "record_id": ids, "goals": [tuple(c for c, flag in zip(CODES, row) if flag) for row in truth],
        "note": "", "line": range(2, n + 2),
    })
    return table, LabelledSample(Path("labels.csv"), labels, (), n), truth, score >= 0.5


@pytest.mark.parametrize("seed", [3, 11, 29])
def test_per_goal_metrics_match_sklearn(seed):
    """Source: scikit-learn precision_score, recall_score, f1_score, cohen_kappa_score (binary, per goal)."""
    table, labelled, truth, predicted = corpus(seed)
    result = validate(table, labelled, CODES, {c: 0.5 for c in CODES}, "score_only").per_goal
    for g, code in enumerate(CODES):
        row = result.iloc[g]
        t, p = truth[:, g], predicted[:, g]
        assert row["goal"] == code
        assert row["support"] == t.sum()
        assert row["precision"] == pytest.approx(precision_score(t, p, zero_division=np.nan), nan_ok=True)
        assert row["recall"] == pytest.approx(recall_score(t, p, zero_division=np.nan), nan_ok=True)
        assert row["f1"] == pytest.approx(f1_score(t, p, zero_division=np.nan), nan_ok=True)
        assert row["kappa"] == pytest.approx(cohen_kappa_score(t, p))


@pytest.mark.parametrize("seed", [3, 11])
def test_averages_and_agreement_match_sklearn(seed):
    """Source: scikit-learn f1_score/precision_score(average="micro"|"macro"), accuracy_score, hamming_loss."""
    table, labelled, truth, predicted = corpus(seed)
    result = validate(table, labelled, CODES, {c: 0.5 for c in CODES}, "score_only")
    for average in ("micro", "macro"):
        got = result.averages[average]
        assert got["precision"] == pytest.approx(precision_score(truth, predicted, average=average, zero_division=np.nan))
        assert got["recall"] == pytest.approx(recall_score(truth, predicted, average=average, zero_division=np.nan))
        assert got["f1"] == pytest.approx(f1_score(truth, predicted, average=average, zero_division=np.nan))
    assert result.agreement["exact_match"] == pytest.approx(accuracy_score(truth, predicted))
    assert result.agreement["hamming"] == pytest.approx(1 - hamming_loss(truth, predicted))


def test_curve_matches_sklearn_at_each_threshold():
    """Source: scikit-learn precision_score / recall_score on decisions re-made at each grid threshold."""
    table, labelled, truth, _ = corpus(5)
    result = validate(table, labelled, CODES, {c: 0.5 for c in CODES}, "score_only")
    score = table.sort_values(["record_id", "goal"])["alignment_score"].to_numpy().reshape(truth.shape)
    for threshold in (0.3, 0.45, 0.6):
        rows = result.curve[np.isclose(result.curve["threshold"], threshold)].set_index("goal")
        for g, code in enumerate(CODES):
            p = score[:, g] >= threshold
            assert rows.loc[code, "precision"] == pytest.approx(
                precision_score(truth[:, g], p, zero_division=np.nan), nan_ok=True)
            assert rows.loc[code, "recall"] == pytest.approx(recall_score(truth[:, g], p, zero_division=np.nan))


@pytest.mark.parametrize("seed", range(6))
def test_metrics_are_sklearns_to_the_bit(seed):
    """Source: scikit-learn precision_recall_fscore_support (None, micro, macro; zero_division=NaN),
    multilabel_confusion_matrix, cohen_kappa_score, accuracy_score and hamming_loss, whose operations
    reporter/analyse/metrics.py repeats: equal floats, not merely close ones, so no figure moves."""
    import warnings

    from sklearn.exceptions import UndefinedMetricWarning
    from sklearn.metrics import multilabel_confusion_matrix, precision_recall_fscore_support

    from reporter.analyse import metrics

    rng = np.random.default_rng(seed)
    for _ in range(40):
        n, k = int(rng.integers(1, 60)), int(rng.integers(2, 18))
        truth = rng.random((n, k)) < rng.random(k) * rng.choice([0, 0.1, 0.5, 1])
        predicted = truth.copy() if rng.random() < 0.2 else rng.random((n, k)) < rng.random(k)
        ours_counts = metrics.confusion_counts(truth, predicted)
        theirs_counts = multilabel_confusion_matrix(truth, predicted)
        assert ours_counts.dtype == theirs_counts.dtype and np.array_equal(ours_counts, theirs_counts)
        for average in (None, "micro", "macro"):
            ours = metrics.precision_recall_f1(truth, predicted, average)
            theirs = precision_recall_fscore_support(truth, predicted, average=average, zero_division=np.nan)[:3]
            for a, b in zip(ours, theirs):
                assert np.array_equal(a, b, equal_nan=True), (average, a, b)
        assert metrics.exact_match_share(truth, predicted) == accuracy_score(truth, predicted)
        assert metrics.hamming_loss(truth, predicted) == hamming_loss(truth, predicted)
        for g in range(k):
            with warnings.catch_warnings():
                warnings.simplefilter("ignore", UndefinedMetricWarning)
                expected = cohen_kappa_score(truth[:, g], predicted[:, g], labels=[False, True],
                                             replace_undefined_by=np.nan)
            assert np.array_equal(metrics.cohen_kappa(truth[:, g], predicted[:, g]), expected, equal_nan=True)
