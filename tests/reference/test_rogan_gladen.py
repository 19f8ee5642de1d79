"""The Rogan-Gladen correction against worked examples and the binomial normal approximation."""

from __future__ import annotations

import numpy as np
import pytest

from reporter.analyse.correction import corrected_share, rogan_gladen


@pytest.mark.parametrize(
    ("apparent", "sensitivity", "specificity", "expected"),
    [
        (0.30, 0.90, 0.95, 0.25 / 0.85),  # 0.294117...
        (0.20, 0.80, 0.90, 0.10 / 0.70),  # 0.142857...
        (0.50, 1.00, 1.00, 0.50),  # a perfect classifier needs no correction
    ],
)
def test_rogan_gladen_worked_examples(apparent, sensitivity, specificity, expected):
    """Source: Rogan & Gladen (1978), true = (apparent + Sp - 1) / (Se + Sp - 1); examples worked from memory."""
    assert rogan_gladen(apparent, sensitivity, specificity) == pytest.approx(expected)


def test_rogan_gladen_clips_to_the_unit_interval():
    """Source: Rogan & Gladen (1978); estimates outside [0, 1] are truncated (common practice)."""
    assert rogan_gladen(0.02, 0.90, 0.95) == 0.0  # (0.02 - 0.05) / 0.85 < 0
    assert rogan_gladen(0.99, 0.90, 0.95) == 1.0  # 0.94 / 0.85 > 1


@pytest.mark.parametrize(("sensitivity", "specificity"), [(0.5, 0.5), (0.3, 0.6), (0.0, 0.0)])
def test_rogan_gladen_refuses_when_sens_plus_spec_not_above_one(sensitivity, specificity):
    """Source: Rogan & Gladen (1978); the denominator Se + Sp - 1 must be positive."""
    with pytest.raises(ValueError, match="is not above 1: the machine does no better than chance"):
        rogan_gladen(0.3, sensitivity, specificity)


def test_interval_with_a_perfect_labelled_sample_is_the_binomial_one():
    """Source: normal approximation to the binomial, p +/- 1.96 sqrt(p(1-p)/n) (textbook, from memory).

    With sensitivity and specificity exactly 1 in every resample, only the apparent share varies.
    """
    truth = np.array([True] * 50 + [False] * 150)
    out = corrected_share(300, 1000, truth, truth.copy(), 0.95, np.random.default_rng(2025), 4000)
    half = 1.96 * np.sqrt(0.3 * 0.7 / 1000)
    assert out["corrected"] == pytest.approx(0.3)
    assert (out["corrected_low"], out["corrected_high"]) == pytest.approx((0.3 - half, 0.3 + half), abs=0.004)
