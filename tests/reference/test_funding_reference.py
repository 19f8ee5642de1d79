"""Funding shares, their bootstrap intervals, the change test and currency codes, checked against
statsmodels, scipy and pycountry on the same inputs."""

from __future__ import annotations

import numpy as np
import pycountry
import pytest
from scipy.stats import bootstrap, permutation_test
from statsmodels.stats.weightstats import DescrStatsW

from reporter.analyse.funding import funding_shares, goal_weights
from reporter.analyse.funding_change import permutation_p_values, share_difference_interval
from reporter.analyse.intervals import bootstrap_ratio_interval
from reporter.currency import NOT_CURRENCIES, currency_problem


def _portfolio(seed: int, n: int, goals: int = 4):
    rng = np.random.default_rng(seed)
    amounts = rng.lognormal(12, 1.1, n)
    aligned = rng.random((n, goals)) < [0.15, 0.3, 0.5, 0.05][:goals]
    return amounts, aligned


@pytest.mark.parametrize("counting", ["full", "fractional"])
def test_funding_shares_are_amount_weighted_means(counting):
    """Source: statsmodels DescrStatsW(weights=amounts).mean: a funding share is the amount-weighted mean
    of each award's weight for the goal (1 or 0 under full counting, 1/k or 0 under fractional)."""
    amounts, aligned = _portfolio(1, 80)
    weights = goal_weights(aligned, counting)
    expected = [DescrStatsW(weights[:, g], weights=amounts).mean for g in range(weights.shape[1])]
    np.testing.assert_allclose(funding_shares(amounts, weights), expected, rtol=1e-12)


def test_funding_shares_worked_by_hand():
    """Hand computation: amounts 100, 300, 600; awards aligned with {1}, {1, 2}, {}.
    Full: goal 1 (100 + 300) / 1000, goal 2 300 / 1000. Fractional: goal 1 (100 + 150) / 1000, goal 2 150 / 1000."""
    amounts = np.array([100.0, 300.0, 600.0])
    aligned = np.array([[True, False], [True, True], [False, False]])
    assert funding_shares(amounts, goal_weights(aligned, "full")).tolist() == pytest.approx([0.4, 0.3])
    assert funding_shares(amounts, goal_weights(aligned, "fractional")).tolist() == pytest.approx([0.25, 0.15])


@pytest.mark.parametrize("batch", [None, 97])
def test_bootstrap_ratio_interval_matches_scipy(batch):
    """Source: scipy.stats.bootstrap(method="percentile", paired=True) of sum(x) / sum(amount), with the same
    Generator seed and batch: both resample awards as rng.integers(0, n, (batch, n))."""
    amounts, aligned = _portfolio(2, 60)
    per_goal = (goal_weights(aligned, "fractional") * amounts[:, None]).T
    low, high = bootstrap_ratio_interval(per_goal, amounts, np.random.default_rng(2025), 999, 0.95, batch=batch)
    for g, row in enumerate(per_goal):
        theirs = bootstrap(
            (row, amounts), lambda x, y, axis=-1: x.sum(axis=axis) / y.sum(axis=axis), paired=True,
            vectorized=True, n_resamples=999, confidence_level=0.95, method="percentile",
            rng=np.random.default_rng(2025), batch=batch,
        ).confidence_interval
        assert (low[g], high[g]) == pytest.approx((theirs.low, theirs.high), abs=1e-12), f"goal {g}"


def _indexed(now, before, goal):
    """Both periods as scipy sees them: samples of award positions into the pooled awards (the device scipy
    itself uses for paired data), and a statistic that looks the amounts up, so one sample's awards move
    together with their amount for the goal."""
    (now_amounts, now_aligned), (before_amounts, before_aligned) = now, before
    amounts = np.concatenate([now_amounts, before_amounts])
    for_goal = amounts * np.concatenate([now_aligned[:, goal], before_aligned[:, goal]])
    n = len(now_amounts)

    def difference(x, y, axis=-1):
        x, y = x.astype(int), y.astype(int)
        return for_goal[x].sum(axis=axis) / amounts[x].sum(axis=axis) - for_goal[y].sum(axis=axis) / amounts[y].sum(axis=axis)

    return (np.arange(n), np.arange(n, len(amounts))), difference


def test_share_difference_interval_matches_scipy_for_two_samples():
    """Source: scipy.stats.bootstrap(method="percentile") with two independent samples (paired=False):
    per batch it resamples the first sample's awards, then the second's, as ours does."""
    now_amounts, now_aligned = _portfolio(3, 41)
    before_amounts, before_aligned = _portfolio(4, 104)
    full_now = (now_aligned * now_amounts[:, None]).T
    full_before = (before_aligned * before_amounts[:, None]).T
    low, high = share_difference_interval((full_now, now_amounts), (full_before, before_amounts),
                                          np.random.default_rng(77), 999, 0.9)
    for g in range(full_now.shape[0]):
        samples, difference = _indexed((now_amounts, now_aligned), (before_amounts, before_aligned), g)
        theirs = bootstrap(
            samples, difference, vectorized=True, n_resamples=999, confidence_level=0.9, method="percentile",
            rng=np.random.default_rng(77),
        ).confidence_interval
        assert (low[g], high[g]) == pytest.approx((theirs.low, theirs.high), abs=1e-12), f"goal {g}"


def test_permutation_p_values_match_scipy():
    """Source: scipy.stats.permutation_test(permutation_type="independent", alternative="two-sided") with the
    same Generator seed: both draw rng.permutation(n) of the pooled awards per resample."""
    now_amounts, now_aligned = _portfolio(5, 30)
    before_amounts, before_aligned = _portfolio(6, 45)
    now_aligned[:, 0] |= now_amounts > np.median(now_amounts)  # a goal whose funding share really moved
    full_now = (now_aligned * now_amounts[:, None]).T
    full_before = (before_aligned * before_amounts[:, None]).T
    ours = permutation_p_values((full_now, now_amounts), (full_before, before_amounts),
                                np.random.default_rng(11), 999)
    for g in range(full_now.shape[0]):
        samples, difference = _indexed((now_amounts, now_aligned), (before_amounts, before_aligned), g)
        theirs = permutation_test(
            samples, difference, permutation_type="independent", vectorized=True, n_resamples=999, alternative="two-sided",
            rng=np.random.default_rng(11),
        )
        assert ours[g] == pytest.approx(theirs.pvalue, abs=1e-12), f"goal {g}"
    assert ours[0] < 0.05, "the planted change is found"


def test_every_iso_4217_currency_is_accepted():
    """Source: pycountry.currencies, the ISO 4217 table; XTS (testing) and XXX (no currency) name no currency."""
    codes = {currency.alpha_3 for currency in pycountry.currencies}
    assert {"EUR", "GBP", "USD", "JPY", "XOF"} <= codes and NOT_CURRENCIES <= codes
    refused = {code for code in codes if currency_problem(code)}
    assert refused == set(NOT_CURRENCIES)


@pytest.mark.parametrize("text", ["EURO", "eur", "E", "", "US$", "ABC", "ZZZ", "€"])
def test_what_is_not_an_iso_4217_code_is_refused(text):
    """Source: pycountry.currencies (ISO 4217 alphabetic codes: three upper-case letters of the table)."""
    assert pycountry.currencies.get(alpha_3=text) is None or text != text.upper()
    assert currency_problem(text) == (
        f"expected an ISO 4217 currency code such as 'EUR', 'GBP' or 'USD', got {text!r}"
    )
