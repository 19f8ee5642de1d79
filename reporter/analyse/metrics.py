"""Classification metrics on boolean decision matrices (rows: publications, columns: goals).

The operations of scikit-learn's precision_recall_fscore_support, multilabel_confusion_matrix,
cohen_kappa_score, accuracy_score and hamming_loss, step for step, so the floats are the same
(tests/reference/test_validation_sklearn.py checks them to the bit). Importing sklearn.metrics
pulls in scipy.stats: about 1.2 s of every build, for a few sums over a small matrix.
"""

from __future__ import annotations

import numpy as np


def confusion_counts(truth: np.ndarray, predicted: np.ndarray) -> np.ndarray:
    """Per column [[tn, fp], [fn, tp]], shape (n_columns, 2, 2): multilabel_confusion_matrix."""
    tp = np.count_nonzero(truth & predicted, axis=0).astype(np.intp)
    fp = np.count_nonzero(predicted, axis=0).astype(np.intp) - tp
    fn = np.count_nonzero(truth, axis=0).astype(np.intp) - tp
    tn = truth.shape[0] - tp - fp - fn
    return np.stack([tn, fp, fn, tp]).T.reshape(-1, 2, 2)


def precision_recall_f1(truth: np.ndarray, predicted: np.ndarray, average: str | None):
    """(precision, recall, f1): arrays per column (average None) or floats ("micro", "macro").

    A ratio with nothing to divide by is NaN (zero_division=NaN); macro leaves such columns out.
    """
    counts = confusion_counts(truth, predicted)
    tp = counts[:, 1, 1]
    n_predicted = tp + counts[:, 0, 1]
    n_true = tp + counts[:, 1, 0]
    if average == "micro":
        tp, n_predicted, n_true = (np.reshape(np.sum(v), (1,)) for v in (tp, n_predicted, n_true))
    precision = _divide(tp, n_predicted)
    recall = _divide(tp, n_true)
    # F1 as (1 + beta^2) tp / (beta^2 (tp + fn) + (tp + fp)) with beta = 1, as scikit-learn writes it.
    f1 = _divide(2.0 * tp.astype(np.float64), 1.0 * n_true.astype(np.float64) + n_predicted.astype(np.float64))
    if average is None:
        return precision, recall, f1
    return tuple(float(_nan_mean(v)) for v in (precision, recall, f1))


def cohen_kappa(first: np.ndarray, second: np.ndarray) -> float:
    """Cohen's kappa of two boolean raters over the labels (False, True); NaN where undefined."""
    confusion = np.array([
        [np.count_nonzero(~first & ~second), np.count_nonzero(~first & second)],
        [np.count_nonzero(first & ~second), np.count_nonzero(first & second)],
    ], dtype=np.float64)
    sum0, sum1 = np.sum(confusion, axis=0), np.sum(confusion, axis=1)
    total = np.sum(sum0)
    if total == 0:
        return np.nan
    expected = np.outer(sum0, sum1) / total
    disagree = np.ones((2, 2), dtype=np.float64)
    np.fill_diagonal(disagree, 0)
    chance = np.sum(disagree * expected)
    if chance == 0:  # both raters used one and the same label only
        return np.nan
    return float(1 - np.sum(disagree * confusion) / chance)


def exact_match_share(truth: np.ndarray, predicted: np.ndarray) -> float:
    """Share of rows with every column right (accuracy_score on multilabel rows)."""
    return float(np.average(np.count_nonzero(truth != predicted, axis=1) == 0))


def hamming_loss(truth: np.ndarray, predicted: np.ndarray) -> float:
    """Share of cells decided wrongly."""
    return float(np.count_nonzero(truth != predicted)) / (truth.shape[0] * truth.shape[1] * 1.0)


def _divide(numerator: np.ndarray, denominator: np.ndarray) -> np.ndarray:
    mask = denominator == 0
    denominator = np.asarray(denominator, dtype=np.float64).copy()
    denominator[mask] = 1
    result = np.asarray(numerator, dtype=np.float64) / denominator
    result[mask] = np.nan
    return result


def _nan_mean(values: np.ndarray) -> float:
    if values.shape[0] == 0 or np.all(np.isnan(values)):
        return np.nan
    return np.nanmean(values)
