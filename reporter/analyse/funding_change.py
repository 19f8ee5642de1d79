"""Change in funding shares: the reporting year against each comparison year and against their pooled
years, tested over awards, not money.

The difference of funding shares (reporting year minus baseline) gets a percentile bootstrap interval
that resamples awards within each period, and a two-sided permutation p-value that reshuffles the
awards between the two periods. A few large awards move a funding share a long way; both methods see
that, since their unit is the award. Both draw as scipy.stats.bootstrap and permutation_test do, so
they give the same results for the same Generator state. Benjamini-Hochberg runs across the goals of
one baseline, as for publication shares (change.py).
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from reporter.analyse.change import baseline_label, baselines, call_changes
from reporter.analyse.funding import Awards
from reporter.analyse.intervals import batch_sizes, bh_adjust, resample_counts

FUNDING_CHANGE_COLUMNS = (
    "goal", "baseline", "baseline_kind", "year", "n_awards_baseline", "n_awards", "amount_total_baseline",
    "amount_total", "share_baseline", "share", "diff", "diff_low", "diff_high", "p_value", "p_adjusted",
    "is_change", "verdict",
)
# scipy.stats.permutation_test counts null values within this relative distance of the observed one
# as equal to it, so rounding cannot split ties.
_TIE_TOLERANCE = np.finfo(float).eps * 100


def share_difference_interval(now: tuple, before: tuple, rng: np.random.Generator, n_resamples: int,
                              confidence: float, batch: int | None = None):
    """Percentile bootstrap interval of ratio(now) - ratio(before), per row; returns (low, high).

    `now` and `before` are (numerators (rows, n), denominator (n,)). Each resample draws the awards of
    `now`, then those of `before`, batch by batch, as scipy.stats.bootstrap does for two samples.
    """
    (top_1, bottom_1), (top_2, bottom_2) = now, before
    n_1, n_2 = len(bottom_1), len(bottom_2)
    diffs = []
    for rows in batch_sizes(n_resamples, n_1 + n_2, batch):
        counts_1 = resample_counts(n_1, rows, rng)
        counts_2 = resample_counts(n_2, rows, rng)
        diffs.append(_ratios(counts_1, top_1, bottom_1) - _ratios(counts_2, top_2, bottom_2))
    alpha = (1 - confidence) / 2
    low, high = np.quantile(np.vstack(diffs), [alpha, 1 - alpha], axis=0)
    return low, high


def permutation_p_values(now: tuple, before: tuple, rng: np.random.Generator, n_resamples: int,
                         batch: int | None = None) -> np.ndarray:
    """Two-sided permutation p-values of ratio(now) - ratio(before), per row.

    Each of `n_resamples` permutations is `rng.permutation(n)` of the pooled awards, the first len(now)
    becoming "now"; the p-value is twice the smaller tail, with the observed value counted in each
    tail ((count + 1) / (n_resamples + 1)), capped at 1: scipy.stats.permutation_test's randomised test.
    """
    (top_1, bottom_1), (top_2, bottom_2) = now, before
    n_1 = len(bottom_1)
    top = np.hstack([top_1, top_2])
    bottom = np.concatenate([bottom_1, bottom_2])
    n = len(bottom)
    observed = _ratio(top_1, bottom_1) - _ratio(top_2, bottom_2)
    null = []
    for rows in batch_sizes(n_resamples, n, batch):
        chosen = np.stack([rng.permutation(n)[:n_1] for _ in range(rows)])
        mask = np.zeros((rows, n))
        mask[np.arange(rows)[:, None], chosen] = 1.0
        rest = 1.0 - mask
        null.append(_ratios(mask, top, bottom) - _ratios(rest, top, bottom))
    null = np.vstack(null)
    gamma = np.abs(_TIE_TOLERANCE * observed)
    less = (np.count_nonzero(null <= observed + gamma, axis=0) + 1) / (n_resamples + 1)
    greater = (np.count_nonzero(null >= observed - gamma, axis=0) + 1) / (n_resamples + 1)
    return np.clip(2 * np.minimum(less, greater), 0.0, 1.0)


def funding_changes(
    awards: Awards, goal_codes: tuple[str, ...], reporting_year: int, comparison_years: tuple[int, ...],
    rng: np.random.Generator, n_resamples: int, confidence: float, fdr: float, min_group_size: int,
) -> pd.DataFrame:
    """One row per (baseline, goal). "too small": either period has fewer than `min_group_size` awards;
    such goals get no p-value and stay out of the BH family."""
    years = awards.table["year"].to_numpy()
    amounts = awards.amounts
    per_goal = (awards.weights * amounts[:, None]).T  # (goals, awards)
    blocks = []
    for kind, base_years in baselines(tuple(comparison_years)):
        is_now, is_before = years == reporting_year, np.isin(years, base_years)
        now = (per_goal[:, is_now], amounts[is_now])
        before = (per_goal[:, is_before], amounts[is_before])
        n_now, n_before = int(is_now.sum()), int(is_before.sum())
        too_small = min(n_now, n_before) < min_group_size
        share_now, share_before = _ratio(*now), _ratio(*before)
        low = high = np.full(len(goal_codes), np.nan)
        p_values = np.full(len(goal_codes), np.nan)
        if n_now and n_before:
            low, high = share_difference_interval(now, before, rng, n_resamples, confidence)
            if not too_small:
                p_values = permutation_p_values(now, before, rng, n_resamples)
        blocks.append(pd.DataFrame({
            "goal": list(goal_codes), "baseline": baseline_label(base_years), "baseline_kind": kind,
            "year": int(reporting_year), "n_awards_baseline": n_before, "n_awards": n_now,
            "amount_total_baseline": float(before[1].sum()), "amount_total": float(now[1].sum()),
            "share_baseline": share_before, "share": share_now, "diff": share_now - share_before,
            "diff_low": low, "diff_high": high, "p_value": p_values, "p_adjusted": bh_adjust(p_values),
            "_too_small": too_small,
        }))
    if not blocks:
        return pd.DataFrame({column: pd.Series(dtype=object) for column in FUNDING_CHANGE_COLUMNS})
    return call_changes(pd.concat(blocks, ignore_index=True), fdr).loc[:, list(FUNDING_CHANGE_COLUMNS)]


def _ratio(top: np.ndarray, bottom: np.ndarray) -> np.ndarray:
    total = bottom.sum()
    return top.sum(axis=1) / total if total > 0 else np.full(top.shape[0], np.nan)


def _ratios(counts: np.ndarray, top: np.ndarray, bottom: np.ndarray) -> np.ndarray:
    """Per resample (row of `counts`) and series: sum(count * top) / sum(count * bottom)."""
    with np.errstate(divide="ignore", invalid="ignore"):
        return (counts @ top.T) / (counts @ bottom)[:, None]
