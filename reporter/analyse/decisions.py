"""Alignment decisions per (publication, goal), checked and restricted to the analysed publications.

In: the record table and the long score table (SCORE_COLUMNS). Out: a decision table
(record_id, goal, alignment_score, is_explicit, is_aligned) with every goal for every
scored publication, and `decide` for re-deciding at another threshold.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from reporter.score.scoring import decide as score_decide

POLICIES = ("score_or_mention", "score_only", "mention_only")
DECISION_COLUMNS = ("record_id", "goal", "alignment_score", "is_explicit", "is_aligned")


def check_policy(policy: str) -> None:
    if policy not in POLICIES:
        raise ValueError(f"policy must be one of {', '.join(POLICIES)}, got {policy!r}")


def decide(alignment_score, is_explicit, threshold: float, policy: str) -> np.ndarray:
    """Aligned flags under a policy: score at or above the threshold, explicit mention, or either.

    The score stage's own rule, so a re-decision here agrees with the stored one by construction.
    A missing score never reaches a threshold.
    """
    check_policy(policy)
    scores = np.nan_to_num(np.asarray(alignment_score, dtype=float), nan=-np.inf)
    return np.asarray(score_decide(scores, np.asarray(is_explicit, dtype=bool), threshold, policy), dtype=bool)


def prepare_decisions(records: pd.DataFrame, scores: pd.DataFrame, goal_codes: tuple[str, ...]) -> pd.DataFrame:
    """Score rows of the given records, ordered by record then framework goal order.

    Records with no score row at all are left out (the caller reports them as not scored).
    A record scored for some goals but not others, or a goal outside the framework, is a
    fault upstream and raises ValueError rather than being guessed.
    """
    table = scores.loc[:, list(DECISION_COLUMNS)].copy()
    table["record_id"] = table["record_id"].astype(str)
    table["goal"] = table["goal"].astype(str)
    unknown = sorted(set(table["goal"]) - set(goal_codes))
    if unknown:
        raise ValueError(f"scores name goals outside the framework: {', '.join(unknown)}")
    ids = records["record_id"].astype(str).unique()
    table = table[table["record_id"].isin(ids)]
    if table.duplicated(["record_id", "goal"]).any():
        raise ValueError("scores hold more than one row for the same publication and goal")
    per_record = table.groupby("record_id")["goal"].size()
    partial = per_record[per_record != len(goal_codes)]
    if len(partial):
        example = ", ".join(partial.index[:3])
        raise ValueError(
            f"{len(partial)} publications are scored for some goals but not all {len(goal_codes)} (e.g. {example})"
        )
    table["alignment_score"] = table["alignment_score"].astype(float)
    table["is_explicit"] = table["is_explicit"].astype(bool)
    table["is_aligned"] = table["is_aligned"].astype(bool)
    order = {code: i for i, code in enumerate(goal_codes)}
    table["_order"] = table["goal"].map(order)
    table = table.sort_values(["record_id", "_order"], kind="stable").drop(columns="_order")
    return table.reset_index(drop=True)
