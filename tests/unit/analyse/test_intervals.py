"""Edge cases of the interval helpers that the library comparisons do not cover."""

from __future__ import annotations

import math
import warnings

import numpy as np
import pytest

from reporter.analyse.intervals import (
    bh_adjust,
    bootstrap_mean_interval,
    difference_p_value,
    newcombe_difference,
    wilson_interval,
)


def test_wilson_interval_of_an_empty_group_is_nan():
    low, high = wilson_interval(0, 0, 0.95)
    assert math.isnan(low) and math.isnan(high)


def test_wilson_interval_holds_the_share_for_weighted_counts():
    low, high = wilson_interval(4.5, 12.25, 0.95)
    assert low <= 4.5 / 12.25 <= high, "low <= share <= high"


def test_newcombe_difference_of_an_empty_group_is_nan():
    assert all(math.isnan(v) for v in newcombe_difference(3, 10, 0, 0, 0.95))


def test_newcombe_bounds_stay_within_minus_one_and_one():
    _, low, high = newcombe_difference(20, 20, 0, 20, 0.95)
    assert -1.0 <= low <= high <= 1.0


def test_p_value_for_identical_all_zero_groups_is_one():
    assert difference_p_value(0, 30, 0, 40) == 1.0
    assert math.isnan(difference_p_value(0, 0, 1, 4))


def test_p_value_when_one_group_is_all_successes_warns_of_nothing_and_matches_pearson():
    # Reference: Pearson's chi-squared on the 2x2 table without continuity correction
    # (scipy.stats.chi2_contingency, correction=False), equal to the score test under H0.
    from scipy.stats import chi2_contingency

    for x1, n1, x2, n2 in ((5, 5, 1, 6), (0, 4, 3, 7), (12, 12, 0, 9)):
        with warnings.catch_warnings():
            warnings.simplefilter("error")
            p = difference_p_value(x1, n1, x2, n2)
        expected = chi2_contingency([[x1, n1 - x1], [x2, n2 - x2]], correction=False).pvalue
        assert p == pytest.approx(expected, rel=1e-9)


def test_bh_adjust_of_nothing_is_empty():
    assert bh_adjust([]).shape == (0,)


def test_bootstrap_of_no_values_is_nan_and_repeats_for_a_seed():
    assert all(math.isnan(v) for v in bootstrap_mean_interval([], np.random.default_rng(1), 100))
    data = [0.1, 0.4, 0.35, 0.9, 0.2]
    first = bootstrap_mean_interval(data, np.random.default_rng(7), 500)
    assert first == bootstrap_mean_interval(data, np.random.default_rng(7), 500)
    assert first[0] <= np.mean(data) <= first[1]


def test_bootstrap_refuses_missing_values():
    with pytest.raises(ValueError, match="values contain nan"):
        bootstrap_mean_interval([0.2, float("nan")], np.random.default_rng(1), 100)
