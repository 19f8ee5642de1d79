"""The analyse stage's statistics checked against statsmodels and scipy on the same inputs."""

from __future__ import annotations

import numpy as np
import pytest
from scipy.stats import bootstrap, chi2_contingency
from statsmodels.stats.multitest import multipletests
from statsmodels.stats.proportion import confint_proportions_2indep, proportion_confint

from reporter.analyse.intervals import (
    bh_adjust,
    bootstrap_mean_interval,
    difference_p_value,
    newcombe_difference,
    wilson_interval,
)

PROPORTION_CASES = [(7, 40), (0, 25), (25, 25), (1, 3), (180, 612), (12, 10_000)]


@pytest.mark.parametrize("confidence", [0.95, 0.9])
@pytest.mark.parametrize(("successes", "n"), PROPORTION_CASES)
def test_wilson_interval_matches_statsmodels(successes, n, confidence):
    """Source: statsmodels proportion_confint(method="wilson"); Wilson (1927)."""
    expected = proportion_confint(successes, n, alpha=1 - confidence, method="wilson")
    assert wilson_interval(successes, n, confidence) == pytest.approx(expected, abs=1e-12)


def test_wilson_interval_on_arrays_matches_statsmodels():
    """Source: statsmodels proportion_confint(method="wilson"); Wilson (1927)."""
    x = np.array([c[0] for c in PROPORTION_CASES])
    n = np.array([c[1] for c in PROPORTION_CASES])
    low, high = wilson_interval(x, n, 0.95)
    expected_low, expected_high = proportion_confint(x, n, alpha=0.05, method="wilson")
    np.testing.assert_allclose(low, expected_low, atol=1e-12)
    np.testing.assert_allclose(high, expected_high, atol=1e-12)


@pytest.mark.parametrize(
    ("x1", "n1", "x2", "n2"),
    [(30, 60, 18, 55), (18, 55, 30, 60), (0, 20, 5, 20), (20, 20, 0, 20), (56, 70, 48, 80), (9, 10, 3, 10)],
)
def test_newcombe_difference_matches_statsmodels(x1, n1, x2, n2):
    """Source: statsmodels confint_proportions_2indep(method="newcomb", compare="diff"); Newcombe (1998),
    method 10. statsmodels' interval is for count1/nobs1 - count2/nobs2, our p1 - p2."""
    diff, low, high = newcombe_difference(x1, n1, x2, n2, 0.95)
    expected = confint_proportions_2indep(x1, n1, x2, n2, method="newcomb", compare="diff", alpha=0.05)
    assert diff == pytest.approx(x1 / n1 - x2 / n2)
    assert (low, high) == pytest.approx(expected, abs=1e-12)
    assert low <= diff <= high, "the interval holds the observed difference"


@pytest.mark.parametrize(("x1", "n1", "x2", "n2"), [(30, 60, 18, 55), (5, 40, 12, 41), (70, 100, 69, 100)])
def test_difference_p_value_matches_pearson_chi_squared(x1, n1, x2, n2):
    """Source: scipy chi2_contingency(correction=False): the score test of p1 = p2 is Pearson's
    chi-squared test on the 2x2 table (textbook identity, from memory)."""
    table = [[x1, n1 - x1], [x2, n2 - x2]]
    assert difference_p_value(x1, n1, x2, n2) == pytest.approx(chi2_contingency(table, correction=False).pvalue)


def test_bh_adjust_matches_statsmodels():
    """Source: statsmodels multipletests(method="fdr_bh"); Benjamini & Hochberg (1995)."""
    p = np.array([0.001, 0.008, 0.039, 0.041, 0.042, 0.06, 0.074, 0.205, 0.212, 0.216, 0.222, 0.251])
    shuffled = np.random.default_rng(3).permutation(p)
    expected = multipletests(shuffled, method="fdr_bh")[1]
    np.testing.assert_allclose(bh_adjust(shuffled), expected, atol=1e-12)


def test_bh_adjust_leaves_untested_out_of_the_family():
    """Source: statsmodels multipletests(method="fdr_bh") on the tests actually run; Benjamini & Hochberg (1995)."""
    p = np.array([0.01, np.nan, 0.04, 0.03, np.nan])
    adjusted = bh_adjust(p)
    assert np.isnan(adjusted[[1, 4]]).all()
    np.testing.assert_allclose(adjusted[[0, 2, 3]], multipletests(p[[0, 2, 3]], method="fdr_bh")[1], atol=1e-12)


@pytest.mark.parametrize("batch", [None, 37])
def test_bootstrap_mean_interval_matches_scipy(batch):
    """Source: scipy.stats.bootstrap(method="percentile") with the same data, Generator seed and batch."""
    data = np.random.default_rng(11).beta(2, 5, size=60)
    ours = bootstrap_mean_interval(data, np.random.default_rng(2025), 999, 0.95, batch=batch)
    theirs = bootstrap(
        (data,), np.mean, n_resamples=999, confidence_level=0.95, method="percentile",
        rng=np.random.default_rng(2025), batch=batch, vectorized=True,
    ).confidence_interval
    assert ours == pytest.approx((theirs.low, theirs.high), abs=1e-12)


def test_bootstrap_of_several_series_matches_scipy():
    """Source: scipy.stats.bootstrap(method="percentile") on a 2-D sample (one goal per row, axis=-1),
    which resamples every row with the same indices, as ours does."""
    data = np.random.default_rng(12).beta(2, 5, size=(4, 45))
    low, high = bootstrap_mean_interval(data, np.random.default_rng(99), 500, 0.9)
    theirs = bootstrap(
        (data,), np.mean, n_resamples=500, confidence_level=0.9, method="percentile",
        rng=np.random.default_rng(99), axis=-1, vectorized=True,
    ).confidence_interval
    np.testing.assert_allclose(low, theirs.low, atol=1e-12)
    np.testing.assert_allclose(high, theirs.high, atol=1e-12)


def test_difference_p_value_is_statsmodels_score_test_to_the_bit():
    """Source: statsmodels test_proportions_2indep(method="score", correction=False), whose operations
    difference_p_value repeats: equal floats, not merely close ones, so no figure moves."""
    from statsmodels.stats.proportion import test_proportions_2indep

    rng = np.random.default_rng(16)
    for _ in range(300):
        n1, n2 = rng.integers(1, 3000, size=2).astype(float) + rng.random(2) * (rng.random() < 0.3)
        x1, x2 = float(rng.integers(0, int(n1) + 1)), float(rng.integers(0, int(n2) + 1))
        if (x1 + x2) in (0.0, n1 + n2):
            continue
        with np.errstate(divide="ignore", invalid="ignore"):  # statsmodels' odds ratio of a 0 or 1 share
            expected = test_proportions_2indep(x1, n1, x2, n2, value=0, method="score", compare="diff",
                                               alternative="two-sided", correction=False).pvalue
        assert difference_p_value(x1, n1, x2, n2) == float(expected), (x1, n1, x2, n2)


def test_bh_adjust_is_scipy_false_discovery_control_to_the_bit():
    """Source: scipy.stats.false_discovery_control(method="bh"), whose operations bh_adjust repeats
    (ties and p-values of 1 included)."""
    from scipy.stats import false_discovery_control

    rng = np.random.default_rng(17)
    for _ in range(300):
        p = np.round(rng.random(int(rng.integers(1, 40))), int(rng.integers(1, 6)))
        p[rng.random(p.size) < 0.1] = 1.0
        assert np.array_equal(bh_adjust(p), false_discovery_control(p, method="bh")), p


@pytest.mark.parametrize("confidence", [0.5, 0.8, 0.9, 0.95, 0.99, 0.999])
def test_interval_z_is_scipy_norm_ppf(confidence):
    """Source: scipy.stats.norm.ppf, the quantile the intervals use (scipy.special.ndtri underneath)."""
    from scipy.stats import norm

    from reporter.analyse.intervals import _z

    assert _z(confidence) == float(norm.ppf(0.5 + confidence / 2))
