"""Intervals and tests: Wilson shares, Newcombe differences, a two-proportion p-value,
Benjamini-Hochberg adjustment and percentile bootstrap intervals for means.

Wilson and Newcombe are short closed forms written out here so they work on arrays,
on weighted (non-integer) counts and on empty groups (nan, no warnings); the
reference tests check them against statsmodels. The score test and BH repeat the
operations of statsmodels and scipy.stats step for step (the same floats; importing
scipy.stats costs about a second a build); bootstrap draws the same resamples as
scipy.stats.bootstrap for the same Generator state.
"""

from __future__ import annotations

import math

import numpy as np
from scipy.special import ndtr, ndtri

# Resample indices drawn at once are capped (about 32 MB of int64) so a large corpus
# does not need an n_resamples x n index matrix in memory.
_MAX_BATCH_CELLS = 2**22


def _z(confidence: float) -> float:
    if not 0 < confidence < 1:
        raise ValueError(f"confidence must lie strictly between 0 and 1, got {confidence}")
    return float(ndtri(0.5 + confidence / 2))  # scipy.stats.norm.ppf


def _scalar_or_array(value: np.ndarray, scalar: bool) -> float | np.ndarray:
    return float(value) if scalar else value


def wilson_interval(successes, n, confidence: float = 0.95):
    """Wilson (1927) score interval for a binomial proportion; returns (low, high).

    Accepts scalars or arrays; counts may be non-integer (weighted groups). n = 0 gives nan bounds.
    """
    scalar = np.ndim(successes) == 0 and np.ndim(n) == 0
    x = np.asarray(successes, dtype=float)
    m = np.asarray(n, dtype=float)
    z = _z(confidence)
    with np.errstate(divide="ignore", invalid="ignore"):
        p = x / m
        denom = 1 + z**2 / m
        centre = (p + z**2 / (2 * m)) / denom
        half = z * np.sqrt(np.clip(p * (1 - p), 0, None) / m + z**2 / (4 * m**2)) / denom
    # At x = 0 (x = n) the lower (upper) bound is exactly 0 (1); rounding would leave 1e-17.
    low = np.where(x <= 0, 0.0, np.clip(centre - half, 0.0, 1.0))
    high = np.where(x >= m, 1.0, np.clip(centre + half, 0.0, 1.0))
    empty = ~(m > 0)
    low, high = np.where(empty, np.nan, low), np.where(empty, np.nan, high)
    return _scalar_or_array(low, scalar), _scalar_or_array(high, scalar)


def newcombe_difference(x1, n1, x2, n2, confidence: float = 0.95):
    """Difference p1 - p2 with Newcombe's (1998, method 10) hybrid score interval.

    Returns (diff, low, high); nan when either group is empty.
    """
    scalar = all(np.ndim(v) == 0 for v in (x1, n1, x2, n2))
    a1, m1, a2, m2 = (np.asarray(v, dtype=float) for v in (x1, n1, x2, n2))
    with np.errstate(divide="ignore", invalid="ignore"):
        p1, p2 = a1 / m1, a2 / m2
    l1, u1 = wilson_interval(a1, m1, confidence)
    l2, u2 = wilson_interval(a2, m2, confidence)
    diff = p1 - p2
    # Clipped because rounding can push a bound a hair past +/-1 when a share is 0 or 1.
    low = np.clip(diff - np.sqrt((p1 - l1) ** 2 + (u2 - p2) ** 2), -1.0, 1.0)
    high = np.clip(diff + np.sqrt((u1 - p1) ** 2 + (p2 - l2) ** 2), -1.0, 1.0)
    empty = ~((m1 > 0) & (m2 > 0))
    diff, low, high = (np.where(empty, np.nan, v) for v in (diff, low, high))
    return tuple(_scalar_or_array(v, scalar) for v in (diff, low, high))


def difference_p_value(x1: float, n1: float, x2: float, n2: float) -> float:
    """Two-sided p-value for p1 = p2: the score test (pooled two-proportion z-test).

    statsmodels test_proportions_2indep(method="score", correction=False), which under
    H0 diff = 0 equals Pearson's chi-squared test on the 2x2 table without continuity
    correction. Identical all-zero or all-one groups give p = 1 (no difference to test);
    an empty group gives nan.
    """
    if not (n1 > 0 and n2 > 0):
        return math.nan
    pooled = (x1 + x2) / (n1 + n2)
    if pooled in (0.0, 1.0):
        return 1.0
    # statsmodels' score_test_proportions_2indep at diff 0 (both proportions under H0 the pooled
    # one), then _zstat_generic2: z = diff / sqrt(var), p = 2 * norm.sf(|z|) = 2 * ndtr(-|z|).
    count1, nobs1, count2, nobs2 = (np.asarray(v) for v in (x1, n1, x2, n2))
    prop = (count1 + count2) / (nobs1 + nobs2)
    var = prop * (1 - prop) / nobs1 + prop * (1 - prop) / nobs2
    z = (count1 / nobs1 - count2 / nobs2 - 0) / np.sqrt(var)
    return float(ndtr(-np.abs(z)) * 2)


def bh_adjust(pvalues) -> np.ndarray:
    """Benjamini-Hochberg (1995) adjusted p-values (scipy false_discovery_control, method "bh").

    nan entries (tests not run) stay nan and do not count towards the number of tests.
    """
    p = np.asarray(pvalues, dtype=float)
    adjusted = np.full(p.shape, np.nan)
    present = ~np.isnan(p)
    if present.any():
        adjusted[present] = _benjamini_hochberg(p[present])
    return adjusted


def _benjamini_hochberg(p: np.ndarray) -> np.ndarray:
    """scipy.stats.false_discovery_control(p, method="bh") for 1-D p in [0, 1], operation for operation."""
    m = p.shape[-1]
    if m <= 1:
        return p
    order = np.argsort(p, axis=-1)
    ps = np.take_along_axis(p, order, axis=-1)
    ps *= m / np.arange(1, m + 1, dtype=ps.dtype)
    # Each p-value becomes the smallest adjusted one at or after its rank.
    np.minimum.accumulate(ps[..., ::-1], out=ps[..., ::-1], axis=-1)
    np.put_along_axis(ps, order, values=ps.copy(), axis=-1)
    return np.clip(ps, 0.0, 1.0)


def bootstrap_mean_interval(
    values,
    rng: np.random.Generator,
    n_resamples: int,
    confidence: float = 0.95,
    batch: int | None = None,
):
    """Percentile bootstrap interval for the mean; returns (low, high).

    `values` is 1-D, or 2-D with one series per row (e.g. one goal per row): every row is
    resampled with the same indices, so one pass serves all goals; bounds are then arrays.
    Percentile, not BCa: BCa's jackknife is quadratic in n, too heavy for a whole corpus.
    Resamples are drawn as `rng.integers(0, n, (batch, n))` in batches of `batch` rows,
    exactly as scipy.stats.bootstrap(method="percentile", batch=batch) draws them, so both
    give the same interval for the same data and Generator state. `batch=None` picks a
    batch that bounds memory (all resamples at once for small n, like scipy's default).
    No values gives nan bounds.
    """
    data = np.asarray(values, dtype=float)
    if data.ndim not in (1, 2):
        raise ValueError(f"values must be one- or two-dimensional, got shape {data.shape}")
    if np.isnan(data).any():
        raise ValueError("values contain nan; drop missing scores before bootstrapping")
    series = data[None, :] if data.ndim == 1 else data
    n = series.shape[1]
    if n == 0:
        low = high = np.full(series.shape[0], np.nan)
    else:
        means = _resample_means(series, rng, n_resamples, batch)
        alpha = (1 - confidence) / 2
        low, high = np.quantile(means, [alpha, 1 - alpha], axis=0)
    if data.ndim == 1:
        return float(low[0]), float(high[0])
    return low, high


def bootstrap_ratio_interval(
    numerators,
    denominator,
    rng: np.random.Generator,
    n_resamples: int,
    confidence: float = 0.95,
    batch: int | None = None,
):
    """Percentile bootstrap interval for ratios of sums, sum(numerator) / sum(denominator); returns (low, high).

    `numerators` is 2-D, one series per row (e.g. one goal per row), `denominator` 1-D, with one column
    per unit (award) resampled: the same indices serve every row, drawn as in `bootstrap_mean_interval`,
    so the interval equals scipy.stats.bootstrap(method="percentile") of the ratio on the same draws.
    A ratio of sums is a ratio of means, so the resampled means give it. No units gives nan bounds.
    """
    top = np.asarray(numerators, dtype=float)
    bottom = np.asarray(denominator, dtype=float)
    if top.ndim != 2 or bottom.ndim != 1 or top.shape[1] != bottom.shape[0]:
        raise ValueError(f"expected numerators (rows, n) and a denominator (n,), got {top.shape} and {bottom.shape}")
    if bottom.shape[0] == 0:
        return np.full(top.shape[0], np.nan), np.full(top.shape[0], np.nan)
    means = _resample_means(np.vstack([top, bottom]), rng, n_resamples, batch)
    with np.errstate(divide="ignore", invalid="ignore"):
        ratios = means[:, :-1] / means[:, -1:]
    alpha = (1 - confidence) / 2
    low, high = np.quantile(ratios, [alpha, 1 - alpha], axis=0)
    return low, high


def batch_sizes(n_resamples: int, n: int, batch: int | None) -> list[int]:
    """Resamples drawn per call: `batch`, or as many as keep an index matrix near 32 MB."""
    if batch is None:
        batch = max(1, min(n_resamples, _MAX_BATCH_CELLS // max(n, 1)))
    return [min(batch, n_resamples - done) for done in range(0, n_resamples, batch)]


def resample_counts(n: int, rows: int, rng: np.random.Generator) -> np.ndarray:
    """How often each of n units is drawn in each of `rows` resamples, from `rng.integers(0, n, (rows, n))`
    (scipy.stats.bootstrap's draw); times a data matrix it gives the resampled sums."""
    index = rng.integers(0, n, (rows, n))
    offsets = (np.arange(rows)[:, None] * n + index).ravel()
    return np.bincount(offsets, minlength=rows * n).reshape(rows, n)


def _resample_means(series: np.ndarray, rng: np.random.Generator, n_resamples: int, batch: int | None) -> np.ndarray:
    n = series.shape[1]
    means = np.empty((n_resamples, series.shape[0]))
    done = 0
    for rows in batch_sizes(n_resamples, n, batch):
        means[done : done + rows] = resample_counts(n, rows, rng) @ series.T / n
        done += rows
    return means
