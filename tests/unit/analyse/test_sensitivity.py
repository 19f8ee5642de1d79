"""Shares at threshold - step, threshold and threshold + step, under each policy."""

from __future__ import annotations

import pytest

from reporter.analyse.decisions import prepare_decisions
from reporter.analyse.sensitivity import sensitivity_table

SCORES_1 = [0.12, 0.48, 0.5, 0.52, 0.55, 0.58, 0.61, 0.7, 0.9, 0.44]
EXPLICIT_1 = [True, False, False, False, False, False, False, False, False, True]


@pytest.fixture
def decisions(make_records, make_scores, goals):
    records = make_records([{} for _ in SCORES_1])
    values = {
        "1": [(s, e, s >= 0.55 or e) for s, e in zip(SCORES_1, EXPLICIT_1)],
        "2": [(0.3, False, False)] * len(SCORES_1),
        "3": [(0.56, False, True)] * len(SCORES_1),
    }
    return prepare_decisions(records, make_scores(records, values, goals), ("1", "2", "3"))


def _aligned(table, goal):
    return table[table["goal"] == goal].set_index("threshold_label")["n_aligned"]


def test_higher_threshold_never_aligns_more_under_score_only(decisions):
    table = sensitivity_table(decisions, ("1", "2", "3"), {"1": 0.55, "2": 0.55, "3": 0.55}, "score_only", 0.05)
    for goal in ("1", "2", "3"):
        counts = _aligned(table, goal)
        assert counts["low"] >= counts["chosen"] >= counts["high"], f"goal {goal}: monotone in the threshold"
    assert list(_aligned(table, "1")) == [7, 5, 3], "scores >= 0.50, >= 0.55, >= 0.60"


def test_explicit_mentions_still_count_under_score_or_mention(decisions):
    table = sensitivity_table(decisions, ("1", "2", "3"), {"1": 0.95, "2": 0.5, "3": 0.5}, "score_or_mention", 0.05)
    goal_1 = table[table["goal"] == "1"].set_index("threshold_label")
    assert goal_1.loc["high", "threshold"] == 1.0, "clipped to the score range"
    assert goal_1.loc["high", "n_aligned"] == 2, "the two explicit mentions, no score reaches 1.0"
    assert goal_1.loc["low", "n_aligned"] == 3, "0.9 reaches 0.9, plus the two mentions"


def test_mention_only_ignores_the_threshold(decisions):
    table = sensitivity_table(decisions, ("1", "2", "3"), {"1": 0.55, "2": 0.55, "3": 0.55}, "mention_only", 0.05)
    assert set(_aligned(table, "1")) == {2}


def test_per_goal_thresholds_are_respected(decisions):
    table = sensitivity_table(decisions, ("1", "2", "3"), {"1": 0.55, "2": 0.55, "3": 0.6}, "score_only", 0.05)
    goal_3 = table[table["goal"] == "3"].set_index("threshold_label")
    assert list(goal_3["threshold"]) == [0.55, 0.6, 0.65]
    assert list(goal_3["n_aligned"]) == [10, 0, 0]
