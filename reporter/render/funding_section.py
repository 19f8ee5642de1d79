"""The report's funding section for a grant portfolio: `FundingFindings` -> `FundingSection`.

Only arranging happens here; every figure comes from analyse's funding tables unchanged. Department
and country tables reuse the publication tables' rows (awards take the place of publications), so
suppression by number of awards reads the same way.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Sequence

import pandas as pd

from reporter.render.context import ChangeRow, GroupRow, _h

ANCHOR, HEADING, PARTIAL = "funding", "Funding by goal", "_funding.html"


@dataclass(frozen=True)
class FundingGoalRow:
    goal: str = _h("Goal code")
    title: str = _h("Goal short title")
    n_aligned: float = _h("Awards in the funding figures aligned with the goal")
    amount: float = _h("Funding counted for the goal, in the base currency")
    share: float = _h("Share of all funding counted for the goal")
    share_low: float = _h("Lower bootstrap bound of the share")
    share_high: float = _h("Upper bootstrap bound of the share")


@dataclass(frozen=True)
class GroupAmount:
    label: str = _h("Department or partner country")
    n_awards: float = _h("Awards in the group with a usable amount")
    amount_total: float = _h("The group's funding, in the base currency")
    is_too_small: bool = _h("True when the group has fewer awards than the minimum group size")


@dataclass(frozen=True)
class FundingSection:
    currency: str = _h("ISO 4217 code of every amount shown")
    counting: str = _h("'full' or 'fractional' goal counting of amounts")
    n_awards: int = _h("Awards analysed")
    n_in_funding: int = _h("Awards with a usable amount: the basis of every funding figure")
    amount_total: float = _h("Their total funding")
    n_aligned_any: int = _h("Awards in the funding figures aligned with at least one goal")
    amount_aligned_any: float = _h("Their funding")
    share_aligned_any: float = _h("Share of funding aligned with at least one goal")
    share_low: float = _h("Lower bootstrap bound of share_aligned_any")
    share_high: float = _h("Upper bootstrap bound of share_aligned_any")
    goals: tuple[FundingGoalRow, ...] = _h("One row per goal, framework order")
    leading: tuple[FundingGoalRow, ...] = _h("The three goals with the largest funding shares")
    changes: tuple[ChangeRow, ...] = _h("Funding share change per goal against the pooled comparison years")
    departments: tuple[GroupRow, ...] = _h("Funding share per goal within each department (cells are shares)")
    department_amounts: tuple[GroupAmount, ...] = _h("Each department's awards and funding")
    countries: tuple[GroupRow, ...] = _h("Funding share per goal for each partner country")
    country_amounts: tuple[GroupAmount, ...] = _h("Each partner country's awards and funding")
    currencies: tuple[dict, ...] = _h("Per currency: code, awards, amount, rate, amount in the base currency")
    left_out: tuple[tuple[str, int], ...] = _h("Why analysed awards are not in the funding figures, with counts")
    method_notes: tuple[str, ...] = _h("The method section's sentences on the funding figures")
    conversion_table: str | None = _h("File name of the conversion table, None when one currency")
    min_group_size: int = _h("Fewest awards a group needs for its shares to be shown")


def build_funding(funding, goals: Sequence[tuple[str, str]], group_rows, change_rows, compact) -> FundingSection | None:
    """None for a publication build; `group_rows`, `change_rows` and `compact` are sections.py's own helpers."""
    if funding is None:
        return None
    meta, head = funding.meta, funding.headline
    titles = dict(goals)
    rows = tuple(_goal_row(r, titles) for r in funding.goals.assign(goal=funding.goals["goal"].astype(str)).to_dict(
        "records") if r["goal"] in titles)
    ranked = sorted((r for r in rows if r.share > 0), key=lambda r: -r.share)[:3]
    departments = _as_publication_rows(funding.by_department)
    countries = _as_publication_rows(funding.by_country)
    return FundingSection(
        currency=str(meta.get("base_currency", "")),
        counting=str(meta.get("counting", "full")),
        n_awards=int(head.get("n_awards", 0)),
        n_in_funding=int(head.get("n_in_funding", 0)),
        amount_total=float(head.get("amount_total", math.nan)),
        n_aligned_any=int(head.get("n_aligned_any", 0)),
        amount_aligned_any=float(head.get("amount_aligned_any", math.nan)),
        share_aligned_any=float(head.get("share_aligned_any", math.nan)),
        share_low=float(head.get("share_aligned_any_low", math.nan)),
        share_high=float(head.get("share_aligned_any_high", math.nan)),
        goals=rows,
        leading=tuple(ranked),
        changes=compact(change_rows(funding.changes, goals)),
        departments=group_rows(departments, "department", "department", goals) if not departments.empty else (),
        department_amounts=_amounts(funding.by_department, "department", "department"),
        countries=group_rows(countries, "country", "country_name", goals) if not countries.empty else (),
        country_amounts=_amounts(funding.by_country, "country", "country_name"),
        currencies=tuple(funding.currencies.to_dict("records")),
        left_out=tuple((str(r["reason"]), int(r["n_awards"])) for r in funding.left_out.to_dict("records")),
        method_notes=tuple(str(n) for n in meta.get("method_notes", ())),
        conversion_table=meta.get("conversion_table"),
        min_group_size=int(meta.get("min_group_size", 10)),
    )


def _goal_row(r: dict, titles: dict[str, str]) -> FundingGoalRow:
    return FundingGoalRow(goal=r["goal"], title=titles[r["goal"]], n_aligned=r["n_aligned"], amount=r["amount"],
                          share=r["share"], share_low=r["share_low"], share_high=r["share_high"])


def _as_publication_rows(frame: pd.DataFrame) -> pd.DataFrame:
    # The publication tables' builder counts the group's size from `n`; here that is the award count.
    return frame.rename(columns={"n_awards": "n"}) if not frame.empty else frame


def _amounts(frame: pd.DataFrame, key: str, label: str) -> tuple[GroupAmount, ...]:
    if frame.empty:
        return ()
    groups = frame.groupby(key, sort=False).agg(label=(label, "first"), n=("n_awards", "max"),
                                                amount=("amount_total", "max"), small=("is_too_small", "any"))
    groups = groups.sort_values(["amount", "label"], ascending=[False, True], kind="stable")
    return tuple(GroupAmount(str(g.label), g.n, g.amount, bool(g.small)) for g in groups.itertuples())
