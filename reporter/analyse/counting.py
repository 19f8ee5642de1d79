"""Full and fractional counting over a multi-valued record column (departments, partner_countries).

In: the record table. Out: a membership table (record_id, group, weight), one row per
(publication, group). A publication with no value joins the "unassigned" group, so nothing
is dropped and fractional weights sum to the number of publications.
"""

from __future__ import annotations

import pandas as pd

UNASSIGNED = "unassigned"
COUNTING_METHODS = ("full", "fractional")
MEMBERSHIP_COLUMNS = ("record_id", "group", "weight")


def _distinct(values: object) -> tuple[str, ...]:
    # A department named twice on one publication is still one department.
    if values is None or (isinstance(values, float) and pd.isna(values)):
        return ()
    if isinstance(values, str):
        values = (values,)
    return tuple(sorted({str(v).strip() for v in values if str(v).strip()}))


def group_memberships(records: pd.DataFrame, column: str, counting: str) -> pd.DataFrame:
    """One row per (record, group) with weight 1 (full) or 1/k (fractional, k = groups of the record)."""
    if counting not in COUNTING_METHODS:
        raise ValueError(f"counting must be one of {', '.join(COUNTING_METHODS)}, got {counting!r}")
    rows: list[tuple[str, str, float]] = []
    for record_id, values in zip(records["record_id"], records[column]):
        groups = _distinct(values) or (UNASSIGNED,)
        weight = 1.0 if counting == "full" else 1.0 / len(groups)
        rows.extend((str(record_id), group, weight) for group in groups)
    return pd.DataFrame(rows, columns=list(MEMBERSHIP_COLUMNS)).astype({"weight": float})


def single_memberships(records: pd.DataFrame, column: str) -> pd.DataFrame:
    """Membership table for a single-valued column (year, collaboration type): weight 1 each."""
    return pd.DataFrame(
        {"record_id": records["record_id"].astype(str).to_numpy(), "group": records[column].to_numpy(), "weight": 1.0}
    )


def count_by_group(records: pd.DataFrame, column: str) -> pd.DataFrame:
    """Publications per group under both methods: group, n_full, n_fractional (groups sorted, unassigned last)."""
    full = group_memberships(records, column, "full").groupby("group")["weight"].sum().rename("n_full")
    fractional = (
        group_memberships(records, column, "fractional").groupby("group")["weight"].sum().rename("n_fractional")
    )
    table = pd.concat([full, fractional], axis=1).reset_index()
    return table.iloc[_group_order(table["group"])].reset_index(drop=True)


def ordered_groups(groups) -> list[str]:
    """Groups sorted by name with "unassigned" last, so tables read the same in every run."""
    present = {str(g) for g in pd.unique(pd.Series(groups))}
    return sorted(present - {UNASSIGNED}) + ([UNASSIGNED] if UNASSIGNED in present else [])


def _group_order(groups: pd.Series) -> list[int]:
    order = {g: i for i, g in enumerate(ordered_groups(groups))}
    return sorted(range(len(groups)), key=lambda i: order[str(groups.iloc[i])])
