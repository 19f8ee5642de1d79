"""How goal shares move when each goal's threshold shifts down or up by one step.

In: the decision table, per-goal thresholds and the policy. Out: one row per
(goal, threshold_label) for "low" (t - step), "chosen" (t) and "high" (t + step).
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from reporter.analyse.decisions import decide

SENSITIVITY_COLUMNS = ("goal", "threshold_label", "threshold", "n", "n_aligned", "share")
THRESHOLD_LABELS = ("low", "chosen", "high")


def sensitivity_table(
    decisions: pd.DataFrame,
    goal_codes: tuple[str, ...],
    thresholds: dict[str, float],
    policy: str,
    step: float,
) -> pd.DataFrame:
    """Shares re-decided at t - step, t, t + step (clipped to [0, 1]) under the same policy.

    Every row is re-decided from the scores, "chosen" included, so the three rows differ
    only by threshold; review overrides in `is_aligned` are not part of this table.
    Explicit mentions still count under score_or_mention; under mention_only the
    threshold has no effect and the three rows agree.
    """
    rows = []
    for goal in goal_codes:
        block = decisions[decisions["goal"] == goal]
        n = len(block)
        chosen = float(thresholds[goal])
        for label, value in zip(THRESHOLD_LABELS, (chosen - step, chosen, chosen + step)):
            # Rounded so 0.5 + 0.05 reads 0.55, not 0.5500000000000001, in tables and JSON.
            value = round(min(1.0, max(0.0, value)), 10)
            n_aligned = int(decide(block["alignment_score"], block["is_explicit"], value, policy).sum())
            rows.append((goal, label, value, n, n_aligned, n_aligned / n if n else np.nan))
    return pd.DataFrame(rows, columns=list(SENSITIVITY_COLUMNS))
