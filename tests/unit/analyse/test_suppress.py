"""The small-group rule: fewer than min_group_size publications -> marked too small, not dropped."""

from __future__ import annotations

import numpy as np

from reporter.analyse.decisions import prepare_decisions
from reporter.analyse.shares import department_shares
from reporter.analyse.suppress import count_too_small_groups, mark_too_small


def _department_table(make_records, make_scores, goals, sizes, counting="full"):
    rows = [{"departments": (name,)} for name, size in sizes.items() for _ in range(size)]
    records = make_records(rows)
    values = {code: [(0.7, False, True)] * len(rows) for code, _ in goals}
    codes = tuple(code for code, _ in goals)
    decisions = prepare_decisions(records, make_scores(records, values, goals), codes)
    return department_shares(records, decisions, codes, counting, 0.95, 10)


def test_group_of_nine_is_marked_and_group_of_ten_is_shown(make_records, make_scores, goals):
    table = _department_table(make_records, make_scores, goals, {"Hydrology": 9, "Linguistics": 10})
    flags = table.groupby("department")["is_too_small"].agg(set)
    assert flags["Hydrology"] == {True}, "9 publications < 10"
    assert flags["Linguistics"] == {False}, "10 publications is enough"
    assert np.isfinite(table.loc[table["department"] == "Hydrology", "share"]).all(), "marked, never dropped"


def test_rule_counts_publications_not_fractional_weight(make_records, make_scores, goals):
    rows = [{"departments": ("Hydrology", "Linguistics")}] * 12
    records = make_records(rows)
    codes = tuple(code for code, _ in goals)
    values = {code: [(0.7, False, True)] * 12 for code in codes}
    decisions = prepare_decisions(records, make_scores(records, values, goals), codes)
    table = department_shares(records, decisions, codes, "fractional", 0.95, 10)
    assert (table["n"] == 6).all() and not table["is_too_small"].any(), "12 shared papers weigh 6 but are 12 papers"


def test_too_small_groups_are_counted_once_per_table(make_records, make_scores, goals):
    table = _department_table(make_records, make_scores, goals, {"Hydrology": 3, "Linguistics": 4, "Optics": 12})
    other = mark_too_small(table.rename(columns={"department": "group"}).assign(n_publications=20), 10)
    assert count_too_small_groups({"by_department": (table, "department"), "other": (other, "group")}) == 2
