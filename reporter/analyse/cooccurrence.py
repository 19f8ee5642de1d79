"""Goal x goal co-occurrence: publications aligned with both goals of each pair.

In: the decision table. Out: goal_a, goal_b, n for every pair with goal_a before goal_b
in framework order (zero pairs kept, so a heat map has every cell).
"""

from __future__ import annotations

import numpy as np
import pandas as pd

COOCCURRENCE_COLUMNS = ("goal_a", "goal_b", "n")


def aligned_matrix(decisions: pd.DataFrame, goal_codes: tuple[str, ...]) -> pd.DataFrame:
    """Publications x goals boolean matrix of the alignment decisions, goals in framework order."""
    wide = decisions.pivot(index="record_id", columns="goal", values="is_aligned")
    return wide.reindex(columns=list(goal_codes)).fillna(False).astype(bool)


def cooccurrence_table(decisions: pd.DataFrame, goal_codes: tuple[str, ...]) -> pd.DataFrame:
    """Counts for every pair of goals; only publications aligned with two or more goals contribute."""
    matrix = aligned_matrix(decisions, goal_codes).to_numpy(dtype=np.int64)
    both = matrix.T @ matrix
    rows = [
        (goal_codes[i], goal_codes[j], int(both[i, j]))
        for i in range(len(goal_codes))
        for j in range(i + 1, len(goal_codes))
    ]
    return pd.DataFrame(rows, columns=list(COOCCURRENCE_COLUMNS))
