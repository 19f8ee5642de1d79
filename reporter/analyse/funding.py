"""Funding shares of a portfolio: the share of the awards' funding that serves each goal, overall, per year,
department and partner country, with percentile bootstrap intervals that resample awards.

In: the analysed records (with FUNDING_COLUMNS), the decision table (decisions.py) and the conversion
table. Out: one row per (group, goal). Goal counting (funding.counting): under full counting an award's
whole amount counts for every goal it is aligned with, so shares may add up to more than 1; under
fractional counting its amount is split equally among its goals, so shares add up to the share of
funding aligned with any goal. Departments and countries take an award's amount by `analysis.counting`
(all of it in each, or 1/k each), as publications are counted there.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd

from reporter.analyse.counting import UNASSIGNED, group_memberships, ordered_groups, single_memberships
from reporter.analyse.intervals import bootstrap_ratio_interval
from reporter.analyse.shares import country_name
from reporter.currency import ConversionTable

FUNDING_SHARE_COLUMNS = (
    "group", "goal", "n_awards", "n_aligned", "amount_total", "amount", "share", "share_low", "share_high",
)
GOAL_COUNTING = ("full", "fractional")


@dataclass(frozen=True)
class Awards:
    """The awards in the funding figures (a usable amount), one row each, in record order."""

    table: pd.DataFrame  # record_id, year, departments, partner_countries, currency, amount, amount_base
    aligned: np.ndarray  # bool, (awards, goals) in framework order
    weights: np.ndarray  # (awards, goals): the part of each award's amount that counts for each goal

    @property
    def amounts(self) -> np.ndarray:
        return self.table["amount_base"].to_numpy(dtype=float)


def goal_weights(aligned: np.ndarray, counting: str) -> np.ndarray:
    """1 per aligned goal (full), or 1/k over an award's k aligned goals (fractional); 0 elsewhere."""
    if counting not in GOAL_COUNTING:
        raise ValueError(f"counting must be one of {', '.join(GOAL_COUNTING)}, got {counting!r}")
    flags = np.asarray(aligned, dtype=float)
    if counting == "full":
        return flags
    k = flags.sum(axis=1, keepdims=True)
    return np.divide(flags, k, out=np.zeros_like(flags), where=k > 0)


def funding_shares(amounts: np.ndarray, weights: np.ndarray) -> np.ndarray:
    """Per goal: sum(amount * weight) / sum(amount); nan when there is no funding."""
    total = float(np.sum(amounts))
    if total <= 0:
        return np.full(weights.shape[1], np.nan)
    return (amounts @ weights) / total


def prepare_awards(
    records: pd.DataFrame, decisions: pd.DataFrame, goal_codes: tuple[str, ...], conversion: ConversionTable,
    counting: str,
) -> Awards:
    """The records with a usable amount, their amounts in the base currency, and their goal weights."""
    usable = records[records["amount"].notna()].reset_index(drop=True)
    unknown = sorted(set(usable["currency"]) - set(conversion.rates))
    if unknown:
        raise ValueError(f"prepare_awards: no rate for {', '.join(unknown)} (check funding_problems first)")
    rates = usable["currency"].map(dict(conversion.rates)).astype(float)
    table = usable.loc[:, ["record_id", "year", "departments", "partner_countries", "currency", "amount"]]
    table = table.assign(record_id=table["record_id"].astype(str), amount_base=usable["amount"] * rates)
    matrix = decisions.pivot(index="record_id", columns="goal", values="is_aligned")
    aligned = matrix.reindex(index=table["record_id"], columns=list(goal_codes)).astype("boolean")
    aligned = aligned.fillna(False).to_numpy(dtype=bool)
    return Awards(table=table, aligned=aligned, weights=goal_weights(aligned, counting))


def group_funding(
    awards: Awards, memberships: pd.DataFrame, groups: list, goal_codes: tuple[str, ...],
    rng: np.random.Generator, n_resamples: int, confidence: float,
) -> pd.DataFrame:
    """Funding and funding shares for every (group, goal), groups in the given order.

    `memberships` (record_id, group, weight) says which awards a group holds and what part of each
    amount it takes. Each group's interval resamples its own awards, all goals with the same draws.
    """
    position = {record_id: i for i, record_id in enumerate(awards.table["record_id"])}
    amounts = awards.amounts
    rows = []
    for group in groups:
        members = memberships[memberships["group"] == group]
        index = members["record_id"].map(position).to_numpy(dtype=int)
        amount = amounts[index] * members["weight"].to_numpy(dtype=float)
        per_goal = awards.weights[index] * amount[:, None]
        low, high = bootstrap_ratio_interval(per_goal.T, amount, rng, n_resamples, confidence)
        total = float(amount.sum())
        n_aligned = awards.aligned[index].sum(axis=0)
        for g, code in enumerate(goal_codes):
            goal_amount = float(per_goal[:, g].sum())
            rows.append((group, code, len(index), int(n_aligned[g]), total, goal_amount,
                         goal_amount / total if total > 0 else np.nan, float(low[g]), float(high[g])))
    return pd.DataFrame(rows, columns=list(FUNDING_SHARE_COLUMNS))


def funding_goal_table(awards, goals, rng, n_resamples, confidence) -> pd.DataFrame:
    """Per goal over every award in the funding figures, with both counting methods' shares beside it."""
    codes = tuple(code for code, _ in goals)
    everyone = pd.DataFrame({"record_id": awards.table["record_id"], "group": "all", "weight": 1.0})
    table = group_funding(awards, everyone, ["all"], codes, rng, n_resamples, confidence).drop(columns=["group"])
    table.insert(1, "title", [title for _, title in goals])
    for counting in GOAL_COUNTING:
        table[f"share_{counting}"] = funding_shares(awards.amounts, goal_weights(awards.aligned, counting))
    return table


def funding_by_year(awards, codes, years, rng, n_resamples, confidence, min_group_size) -> pd.DataFrame:
    """Funding shares per year; every year in scope appears, with n_awards 0 when it has none."""
    members = single_memberships(awards.table, "year")
    table = group_funding(awards, members, list(years), codes, rng, n_resamples, confidence)
    return _too_small(table.rename(columns={"group": "year"}), min_group_size)


def funding_by_department(awards, codes, counting, rng, n_resamples, confidence, min_group_size) -> pd.DataFrame:
    """Funding shares per department (awards with none in "unassigned"), amounts by `counting`."""
    members = group_memberships(awards.table, "departments", counting)
    table = group_funding(awards, members, ordered_groups(members["group"]), codes, rng, n_resamples, confidence)
    table = table.rename(columns={"group": "department"})
    table.insert(1, "is_unassigned", table["department"] == UNASSIGNED)
    return _too_small(table, min_group_size)


def funding_by_country(awards, codes, counting, rng, n_resamples, confidence, min_group_size) -> pd.DataFrame:
    """Funding shares per partner country; awards without a partner country are not listed."""
    members = group_memberships(awards.table, "partner_countries", counting)
    members = members[members["group"] != UNASSIGNED]
    table = group_funding(awards, members, ordered_groups(members["group"]), codes, rng, n_resamples, confidence)
    table = table.rename(columns={"group": "country"})
    table.insert(1, "country_name", table["country"].map(country_name))
    return _too_small(table, min_group_size)


def _too_small(table: pd.DataFrame, min_group_size: int) -> pd.DataFrame:
    # The small-group rule of suppress.py, counted in awards, never in money: one large award does not
    # make a group's share any less fragile.
    return table.assign(is_too_small=table["n_awards"] < min_group_size)
