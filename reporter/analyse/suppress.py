"""Small-group rule: groups with fewer publications than `min_group_size` are marked too small.

Marked, never dropped: the figures stay in the table and `render` shows "too small"
instead of a share. The threshold of 10 is common practice, with no single source.
"""

from __future__ import annotations

import pandas as pd

MIN_GROUP_SIZE = 10  # common practice, no single source


def mark_too_small(table: pd.DataFrame, min_group_size: int = MIN_GROUP_SIZE) -> pd.DataFrame:
    """Add is_too_small = n_publications < min_group_size (a copy; the input is untouched).

    Judged on distinct publications, not the weighted n: under fractional counting a
    group of 12 shared papers may weigh 4.5, yet its share rests on 12 publications.
    Under full counting the two are the same.
    """
    return table.assign(is_too_small=table["n_publications"] < min_group_size)


def count_too_small_groups(tables: dict[str, tuple[pd.DataFrame, str]]) -> int:
    """Distinct too-small groups summed over tables; a group counts once, not once per goal.

    `tables` maps a table name to (table, its group column).
    """
    total = 0
    for table, column in tables.values():
        total += int(table.loc[table["is_too_small"], column].nunique())
    return total
