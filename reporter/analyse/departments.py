"""Findings per department, for the department briefs: `analyse` run again on each department's publications.

In: the record table, the (reviewed) score table and the main `Findings` (whose meta gives the
reporting year, comparison years, thresholds and policy). Out: one `DepartmentFindings` per
department, so a brief's shares, intervals, changes and suppression follow the main report's rules.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Mapping

import pandas as pd

from reporter.analyse import analyse
from reporter.analyse.counting import UNASSIGNED, group_memberships, ordered_groups
from reporter.analyse.findings import Findings
from reporter.config import AnalysisConfig


@dataclass(frozen=True)
class DepartmentFindings:
    department: str  # the name as recorded (after the config's aliases)
    findings: Findings  # `analyse` over the department's publications only
    is_too_small: bool  # fewer publications than min_group_size: no share is shown, only counts
    record_ids: tuple[str, ...]  # the publications analysed, sorted


@dataclass(frozen=True)
class DepartmentSplit:
    departments: tuple[DepartmentFindings, ...]  # sorted by name
    n_unassigned: int  # analysed publications with no department recorded: in no brief
    n_publications: int  # analysed publications in all


def department_findings(
    records: pd.DataFrame,
    scores: pd.DataFrame,
    goals: tuple[tuple[str, str], ...],
    cfg: AnalysisConfig,
    main: Findings,
    general_mentions: Mapping[str, int] | pd.Series | pd.DataFrame | None = None,
) -> DepartmentSplit:
    """`analyse` on each department's publications, with the main run's years, thresholds and policy.

    A publication with two departments counts in both (full counting), whatever `cfg.counting`
    says: a brief describes everything the department took part in. Publications without a
    department form no brief; they are counted in `n_unassigned`.
    """
    meta = main.meta
    score_ids = scores["record_id"].astype(str)
    record_ids = records["record_id"].astype(str)
    in_scope = records.loc[records["year"].isin(set(meta["years"])) & record_ids.isin(set(score_ids))]
    in_scope_ids = in_scope["record_id"].astype(str)
    members = group_memberships(in_scope, "departments", "full")
    by_group = members.groupby("group")["record_id"].agg(set)
    out = []
    for department in ordered_groups(members["group"]):
        if department == UNASSIGNED:
            continue
        ids = by_group[department]
        found = analyse(
            in_scope.loc[in_scope_ids.isin(ids)], scores.loc[score_ids.isin(ids)], goals, cfg,
            meta["reporting_year"], tuple(meta["comparison_years"]), meta["thresholds"], meta["policy"],
            general_mentions=general_mentions,
        )
        # The main department table's rule: fewer distinct publications than min_group_size.
        out.append(DepartmentFindings(department, found, len(ids) < cfg.min_group_size, tuple(sorted(ids))))
    n_unassigned = len(by_group[UNASSIGNED]) if UNASSIGNED in by_group.index else 0
    return DepartmentSplit(tuple(out), n_unassigned, len(in_scope))
