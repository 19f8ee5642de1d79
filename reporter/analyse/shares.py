"""Goal shares per group with Wilson intervals; the goal summary with bootstrap mean scores.

In: a membership table (record_id, group, weight; see counting.py) and the decision table
(decisions.py). Out: one row per (group, goal) in the given group and framework order.
With fractional counting n and n_aligned are weighted sums; the Wilson interval uses
Kish's effective n, (sum w)^2 / sum w^2, since the publications, not the fractions, are
the sampled units (with equal weights it is the plain publication count).
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pycountry

from reporter.analyse.counting import UNASSIGNED, group_memberships, ordered_groups, single_memberships
from reporter.analyse.intervals import bootstrap_mean_interval, wilson_interval
from reporter.analyse.suppress import mark_too_small

SHARE_COLUMNS = (
    "group", "goal", "n", "n_publications", "n_effective", "n_aligned", "n_explicit", "n_content_only",
    "share", "share_low", "share_high",
)
_COUNT_COLUMNS = ("n", "n_effective", "n_aligned", "n_explicit", "n_content_only")
COLLABORATION_GROUPS = ("international", "domestic")


def group_shares(
    memberships: pd.DataFrame,
    decisions: pd.DataFrame,
    goal_codes: tuple[str, ...],
    groups: list,
    confidence: float,
) -> pd.DataFrame:
    """Weighted counts and shares for every (group, goal); groups without publications get n = 0."""
    weights = memberships.assign(weight_sq=memberships["weight"] ** 2)
    sizes = weights.groupby("group").agg(
        n=("weight", "sum"), n_publications=("record_id", "nunique"), weight_sq=("weight_sq", "sum")
    )
    hits = memberships.merge(decisions[["record_id", "goal", "is_aligned", "is_explicit"]], on="record_id")
    hits = hits.assign(
        n_aligned=hits["weight"] * hits["is_aligned"],
        n_explicit=hits["weight"] * hits["is_explicit"],
        n_content_only=hits["weight"] * (hits["is_aligned"] & ~hits["is_explicit"]),
    )
    counts = hits.groupby(["group", "goal"])[["n_aligned", "n_explicit", "n_content_only"]].sum()
    index = pd.MultiIndex.from_product([groups, list(goal_codes)], names=["group", "goal"])
    table = counts.reindex(index, fill_value=0.0).reset_index()
    table = table.merge(sizes, left_on="group", right_index=True, how="left")
    table[["n", "n_publications", "weight_sq"]] = table[["n", "n_publications", "weight_sq"]].fillna(0)
    with np.errstate(divide="ignore", invalid="ignore"):
        table["n_effective"] = np.where(table["weight_sq"] > 0, table["n"] ** 2 / table["weight_sq"], 0.0)
        table["share"] = np.where(table["n"] > 0, table["n_aligned"] / table["n"], np.nan)
    low, high = wilson_interval(table["share"].fillna(0) * table["n_effective"], table["n_effective"], confidence)
    table["share_low"], table["share_high"] = low, high
    table["n_publications"] = table["n_publications"].astype(int)
    if (memberships["weight"] == 1).all():
        # Full counting: every count is a whole number of publications.
        table = table.astype({c: int for c in _COUNT_COLUMNS})
    return table.loc[:, list(SHARE_COLUMNS)]


def goal_summary(
    decisions: pd.DataFrame,
    goals: tuple[tuple[str, str], ...],
    confidence: float,
    rng: np.random.Generator,
    n_resamples: int,
) -> pd.DataFrame:
    """Per goal over every analysed publication: counts, share (Wilson), mean score (bootstrap)."""
    codes = tuple(code for code, _ in goals)
    ids = decisions["record_id"].drop_duplicates()
    everyone = pd.DataFrame({"record_id": ids, "group": "all", "weight": 1.0})
    table = group_shares(everyone, decisions, codes, ["all"], confidence).drop(columns=["group"])
    table.insert(1, "title", [title for _, title in goals])
    matrix = decisions.pivot(index="record_id", columns="goal", values="alignment_score")
    matrix = matrix.reindex(columns=list(codes))
    complete = [code for code in codes if matrix[code].notna().all()]
    # One pass resamples publications for all fully scored goals at once (same draws for each);
    # a goal with missing scores is bootstrapped alone on its scores, after them in framework order.
    intervals = {}
    if complete:
        lows, highs = bootstrap_mean_interval(matrix[complete].to_numpy().T, rng, n_resamples, confidence)
        intervals.update({code: (lo, hi) for code, lo, hi in zip(complete, lows, highs)})
    for code in codes:
        if code not in intervals:
            values = matrix[code].dropna().to_numpy()
            intervals[code] = bootstrap_mean_interval(values, rng, n_resamples, confidence)
    return table.assign(
        mean_score=[float(matrix[code].mean()) for code in codes],
        mean_score_low=[float(intervals[code][0]) for code in codes],
        mean_score_high=[float(intervals[code][1]) for code in codes],
    )


def year_shares(records, decisions, goal_codes, years, confidence, min_group_size) -> pd.DataFrame:
    """Shares by publication year; every year in scope appears, empty or not."""
    table = group_shares(single_memberships(records, "year"), decisions, goal_codes, list(years), confidence)
    return mark_too_small(table.rename(columns={"group": "year"}), min_group_size)


def department_shares(records, decisions, goal_codes, counting, confidence, min_group_size) -> pd.DataFrame:
    """Shares by department under full or fractional counting; no department -> "unassigned".

    `n_non_english` counts the department's publications not in English: the model reads English,
    so they are scored with lower reliability and the department's shares carry that caution.
    """
    members = group_memberships(records, "departments", counting)
    table = group_shares(members, decisions, goal_codes, ordered_groups(members["group"]), confidence)
    table = table.rename(columns={"group": "department"})
    table.insert(1, "is_unassigned", table["department"] == UNASSIGNED)
    table.insert(2, "n_non_english", table["department"].map(_non_english_by_group(records, members)).astype(int))
    return mark_too_small(table, min_group_size)


def _non_english_by_group(records: pd.DataFrame, members: pd.DataFrame) -> pd.Series:
    """Distinct publications not in English per group (0 for a group with none)."""
    if "is_english" not in records.columns:
        return pd.Series(0, index=members["group"].unique())
    other = set(records.loc[~records["is_english"].astype(bool), "record_id"].astype(str))
    counts = members.assign(_other=members["record_id"].isin(other)).groupby("group")["_other"].sum()
    return counts.reindex(members["group"].unique(), fill_value=0)


def country_shares(records, decisions, goal_codes, counting, confidence, min_group_size) -> pd.DataFrame:
    """Shares by partner country (ISO 3166-1 alpha-2), partner countries only.

    Publications without a partner country are the "domestic" group of the collaboration
    table, so the "unassigned" group is left out here; under fractional counting the
    weights of this table sum to the number of international publications.
    """
    members = group_memberships(records, "partner_countries", counting)
    members = members[members["group"] != UNASSIGNED]
    table = group_shares(members, decisions, goal_codes, ordered_groups(members["group"]), confidence)
    table = table.rename(columns={"group": "country"})
    table.insert(1, "country_name", table["country"].map(country_name))
    return mark_too_small(table, min_group_size)


def collaboration_shares(records, decisions, goal_codes, confidence, min_group_size) -> pd.DataFrame:
    """International (at least one partner country) vs domestic (none found) publications."""
    labelled = records.assign(
        _group=np.where(records["is_international"].astype(bool), *COLLABORATION_GROUPS)
    )
    table = group_shares(
        single_memberships(labelled, "_group"), decisions, goal_codes, list(COLLABORATION_GROUPS), confidence
    )
    return mark_too_small(table, min_group_size)


def country_name(code: str) -> str:
    """Common English name from ISO 3166-1 via pycountry; the code itself when unknown."""
    country = pycountry.countries.get(alpha_2=str(code).upper())
    if country is None:
        return str(code)
    return getattr(country, "common_name", None) or country.name
