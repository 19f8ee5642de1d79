"""Corrected shares: refusal, clipping, bootstrap interval behaviour, table shape (no model)."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

from reporter.analyse.correction import CORRECTION_COLUMNS, correct_shares, corrected_share, refusal_reason


def sample(tp: int, fn: int, tn: int, fp: int) -> tuple[np.ndarray, np.ndarray]:
    """Labelled flags with the given confusion counts (truth, predicted)."""
    truth = np.array([True] * (tp + fn) + [False] * (tn + fp))
    predicted = np.array([True] * tp + [False] * fn + [False] * tn + [True] * fp)
    return truth, predicted


def test_corrected_share_point_estimate_and_rates():
    truth, predicted = sample(tp=18, fn=2, tn=76, fp=4)  # sensitivity 0.9, specificity 0.95
    out = corrected_share(300, 1000, truth, predicted, 0.95, np.random.default_rng(1), 500)
    assert (out["sensitivity"], out["specificity"]) == pytest.approx((0.9, 0.95))
    assert out["corrected"] == pytest.approx((0.30 + 0.95 - 1) / (0.9 + 0.95 - 1))
    assert out["corrected_low"] <= out["corrected"] <= out["corrected_high"], "interval must hold the estimate"
    assert out["reason"] == "" and out["n_resamples_used"] == 500
    assert out["note"].startswith("90% of publications people judged aligned were counted; 95% of those")


def test_interval_is_seeded_and_widens_with_a_smaller_labelled_sample():
    big = sample(tp=90, fn=10, tn=380, fp=20)
    small = sample(tp=9, fn=1, tn=38, fp=2)  # the same rates from a tenth of the publications
    run = lambda flags, seed: corrected_share(300, 1000, *flags, 0.95, np.random.default_rng(seed), 1000)  # noqa: E731
    assert run(big, 7) == run(big, 7), "same seed, same interval"
    width = lambda out: out["corrected_high"] - out["corrected_low"]  # noqa: E731
    assert width(run(small, 7)) > width(run(big, 7)), "the labelled sample's own uncertainty must show"


def test_refused_when_no_better_than_chance():
    truth, predicted = sample(tp=5, fn=5, tn=25, fp=25)  # 0.5 + 0.5 = 1
    out = corrected_share(30, 100, truth, predicted, 0.95, np.random.default_rng(1), 200)
    assert np.isnan(out["corrected"]) and out["n_resamples_used"] == 0
    assert out["reason"] == (
        "sensitivity 0.50 + specificity 0.50 is not above 1: the machine does no better than chance "
        "for this goal, so its share cannot be corrected"
    )


def test_refusal_reasons_for_unmeasurable_rates():
    assert refusal_reason(np.nan, 0.9).startswith("no publication in the labelled sample was judged aligned")
    assert refusal_reason(0.9, np.nan).startswith("every publication in the labelled sample was judged aligned")
    assert refusal_reason(0.6, 0.5) is None


def test_clipped_estimate_is_flagged():
    truth, predicted = sample(tp=18, fn=2, tn=76, fp=4)
    out = corrected_share(20, 1000, truth, predicted, 0.95, np.random.default_rng(1), 200)
    assert out["corrected"] == 0.0 and out["is_clipped"]
    assert "limited to it" in out["note"]


def test_no_interval_when_resamples_are_often_undefined():
    truth, predicted = sample(tp=1, fn=0, tn=30, fp=2)  # one labelled positive: many resamples have none
    out = corrected_share(100, 1000, truth, predicted, 0.95, np.random.default_rng(3), 500)
    assert not np.isnan(out["corrected"])
    assert np.isnan(out["corrected_low"]) and np.isnan(out["corrected_high"])
    assert "no interval: in" in out["note"]


def test_correct_shares_one_row_per_goal_in_order():
    t1, p1 = sample(tp=9, fn=1, tn=38, fp=2)
    t2, p2 = sample(tp=0, fn=0, tn=48, fp=2)
    pairs = pd.DataFrame({
        "record_id": [f"r{i}" for i in range(50)] * 2, "goal": ["2"] * 50 + ["1"] * 50,
        "is_labelled": np.concatenate([t1, t2]), "is_predicted": np.concatenate([p1, p2]),
    })
    shares = pd.DataFrame({"goal": ["1", "2"], "n": [200, 200], "n_aligned": [10, 60]})
    table = correct_shares(shares, pairs, 0.95, np.random.default_rng(5), 300)
    assert tuple(table.columns) == CORRECTION_COLUMNS
    assert table["goal"].tolist() == ["1", "2"]
    assert table.loc[0, "reason"].startswith("no publication in the labelled sample was judged aligned")
    assert table.loc[1, "corrected"] == pytest.approx((0.3 + 38 / 40 - 1) / (0.9 + 38 / 40 - 1))
