"""The headline figures and the coverage of the record table (what the figures rest on).

In: the records in scope and the decision table. Out: plain dicts, keys as in findings.py.
"""

from __future__ import annotations

from typing import Mapping

import numpy as np
import pandas as pd

from reporter.analyse.cooccurrence import aligned_matrix
from reporter.analyse.intervals import wilson_interval


def _share(count: int, n: int) -> float:
    return count / n if n else float("nan")


def _non_empty(values: pd.Series) -> pd.Series:
    return values.map(lambda v: bool(v) and not (isinstance(v, float) and np.isnan(v)))


def coverage_summary(records: pd.DataFrame, scored_ids: set[str], n_outside_years: int) -> dict:
    """How complete the inputs are: abstracts, departments, countries, language, scoring."""
    n = len(records)
    n_abstract = int(records["has_abstract"].astype(bool).sum())
    n_department = int(_non_empty(records["departments"]).sum())
    n_country = int(_non_empty(records["countries"]).sum())
    n_scored = int(records["record_id"].astype(str).isin(scored_ids).sum())
    return {
        "n_records": n,
        "n_with_abstract": n_abstract,
        "share_with_abstract": _share(n_abstract, n),
        "n_with_department": n_department,
        "share_with_department": _share(n_department, n),
        "n_with_country": n_country,
        "share_with_country": _share(n_country, n),
        "n_non_english": int((~records["is_english"].astype(bool)).sum()),
        "n_scored": n_scored,
        "n_not_scored": n - n_scored,
        "n_outside_years": int(n_outside_years),
    }


def headline_summary(
    decisions: pd.DataFrame,
    goal_codes: tuple[str, ...],
    confidence: float,
    general_mentions: Mapping[str, int] | pd.Series | pd.DataFrame | None,
    n_too_small_groups: int,
) -> dict:
    """Publications analysed, aligned with any goal (Wilson interval), explicit, multi-goal."""
    aligned = aligned_matrix(decisions, goal_codes)
    explicit = decisions.groupby("record_id")["is_explicit"].any()
    n = len(aligned)
    n_any = int(aligned.any(axis=1).sum())
    low, high = wilson_interval(n_any, n, confidence)
    if general_mentions is None:
        n_general = None  # not measured, which is not the same as none found
    else:
        if isinstance(general_mentions, pd.DataFrame):  # the score stage's (record_id, n_general_mentions)
            general_mentions = general_mentions.set_index("record_id")["n_general_mentions"]
        counts = pd.Series(general_mentions, dtype=float)
        counts.index = counts.index.astype(str)
        n_general = int((counts.reindex(aligned.index).fillna(0) > 0).sum())
    return {
        "n_publications": n,
        "n_aligned_any": n_any,
        "share_aligned_any": _share(n_any, n),
        "share_aligned_any_low": low,
        "share_aligned_any_high": high,
        "n_explicit_any": int(explicit.sum()),
        "n_aligned_multiple": int((aligned.sum(axis=1) >= 2).sum()),
        "n_general_mentions": n_general,
        "n_too_small_groups": int(n_too_small_groups),
    }
