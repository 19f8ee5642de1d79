"""Small, pure updates of the intake log (INTAKE_LOG_COLUMNS) made by the enrich steps."""

from __future__ import annotations

from typing import Iterable, Mapping

import pandas as pd


def add_flags(log: pd.DataFrame, flags: Mapping[str, Iterable[str]]) -> pd.DataFrame:
    """Return a new log with `flags[record_id]` appended to that row's ";"-joined flags."""
    if not flags:
        return log.copy()
    out = log.copy()

    def joined(row: pd.Series) -> str:
        existing = [f for f in str(row["flags"] or "").split(";") if f]
        extra = [f for f in flags.get(row["record_id"], ()) if f not in existing]
        return ";".join(existing + extra)

    out["flags"] = out.apply(joined, axis=1) if len(out) else out["flags"]
    return out


def mark_merged(log: pd.DataFrame, merged: Mapping[str, tuple[str, str]]) -> pd.DataFrame:
    """Return a new log where each `record_id -> (kept_id, reason)` row has status "merged"."""
    out = log.copy()
    if not merged:
        return out
    rows = out["record_id"].isin(list(merged))
    out.loc[rows, "status"] = "merged"
    out.loc[rows, "merged_into"] = out.loc[rows, "record_id"].map(lambda rid: merged[rid][0])
    out.loc[rows, "reason"] = out.loc[rows, "record_id"].map(lambda rid: merged[rid][1])
    return out
