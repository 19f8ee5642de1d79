"""Analyse: goal shares by year, department and country, intervals, changes, suppression.

In: the enriched record table and the long score table. Out: one `Findings`, which
`render` displays unchanged.
"""

from __future__ import annotations

from typing import Mapping

import numpy as np
import pandas as pd

from reporter.analyse.change import check_comparable, year_changes, year_ranges
from reporter.analyse.cooccurrence import cooccurrence_table
from reporter.analyse.decisions import check_policy, prepare_decisions
from reporter.analyse.export import findings_tables, findings_to_json
from reporter.analyse.findings import Findings
from reporter.analyse.funding_summary import funding_findings
from reporter.analyse.sensitivity import sensitivity_table
from reporter.analyse.shares import (
    collaboration_shares,
    country_shares,
    department_shares,
    goal_summary,
    year_shares,
)
from reporter.analyse.summary import coverage_summary, headline_summary
from reporter.analyse.suppress import count_too_small_groups
from reporter.config import AnalysisConfig
from reporter.config_funding import FundingConfig, RecordNoun
from reporter.currency import ConversionTable
from reporter.records import require_columns

__all__ = ["Findings", "analyse", "check_comparable", "findings_tables", "findings_to_json"]

_RECORD_NEEDS = (
    "record_id", "year", "departments", "partner_countries", "countries", "is_international",
    "has_abstract", "is_english",
)
_SCORE_NEEDS = ("record_id", "goal", "alignment_score", "is_explicit", "is_aligned")

#: Method names the report's method section can print as they are.
METHODS = {
    "share_interval": "Wilson score interval (Wilson 1927)",
    "fractional_interval_n": "Kish effective sample size, (sum w)^2 / sum w^2",
    "difference_interval": "Newcombe hybrid score interval, method 10 (Newcombe 1998)",
    "difference_test": "score test of equal proportions (pooled z-test; Pearson chi-squared without correction)",
    "multiple_testing": "Benjamini-Hochberg false discovery rate across goals, per baseline (1995)",
    "mean_interval": "percentile bootstrap",
    "too_small_basis": "distinct publications in the group",
    "comparison_mean": "comparison years pooled (publication-weighted mean of yearly shares)",
}


def analyse(
    records: pd.DataFrame,
    scores: pd.DataFrame,
    goals: tuple[tuple[str, str], ...],
    cfg: AnalysisConfig,
    reporting_year: int,
    comparison_years: tuple[int, ...],
    thresholds: dict[str, float],
    policy: str,
    general_mentions: Mapping[str, int] | pd.Series | pd.DataFrame | None = None,
    conversion: ConversionTable | None = None,
    funding: FundingConfig | None = None,
    noun: RecordNoun | None = None,
) -> Findings:
    """Every figure of the report, computed once from the records and their scores.

    Scope: publications from the reporting and comparison years that have scores;
    every table except by_year and changes pools all those years (meta["scope"]).
    `general_mentions` (record_id -> count of general goal-framework mentions, or the
    score stage's record_id / n_general_mentions table) is optional; without it
    headline["n_general_mentions"] is None. With a `conversion` table (the records are awards with
    amounts; FUNDING_COLUMNS) the findings also carry the funding figures, counted by `funding`.
    """
    require_columns(records, _RECORD_NEEDS, "analyse: records")
    require_columns(scores, _SCORE_NEEDS, "analyse: scores")
    check_policy(policy)
    goals = tuple((str(code), str(title)) for code, title in goals)
    codes = tuple(code for code, _ in goals)
    given = {str(code): float(value) for code, value in thresholds.items()}
    missing = [code for code in codes if code not in given]
    if missing:
        raise ValueError(f"analyse: thresholds missing for goals {', '.join(missing)}")
    thresholds = {code: given[code] for code in codes}
    years = tuple(sorted({*comparison_years, reporting_year}))

    in_scope = records[records["year"].isin(years)].copy()
    in_scope["record_id"] = in_scope["record_id"].astype(str)
    decisions = prepare_decisions(in_scope, scores, codes)
    scored_ids = set(decisions["record_id"].unique())
    scored = in_scope[in_scope["record_id"].isin(scored_ids)]
    rng = np.random.default_rng(cfg.seed)
    size = cfg.min_group_size
    # A year without a scored publication is never compared: an empty side would read as "no change".
    present = tuple(sorted(int(y) for y in scored["year"].unique()))
    compared = tuple(y for y in sorted(int(y) for y in comparison_years) if y in present)
    if int(reporting_year) not in present:
        compared = ()

    by_year = year_shares(scored, decisions, codes, years, cfg.confidence, size)
    by_department = department_shares(scored, decisions, codes, cfg.counting, cfg.confidence, size)
    by_country = country_shares(scored, decisions, codes, cfg.counting, cfg.confidence, size)
    collaboration = collaboration_shares(scored, decisions, codes, cfg.confidence, size)
    n_too_small = count_too_small_groups(
        {
            "by_year": (by_year, "year"),
            "by_department": (by_department, "department"),
            "by_country": (by_country, "country"),
            "collaboration": (collaboration, "group"),
        }
    )
    distinct = set(thresholds.values())
    meta = {
        "counting": cfg.counting,
        "confidence": cfg.confidence,
        "min_group_size": size,
        "fdr": cfg.fdr,
        "threshold": distinct.pop() if len(distinct) == 1 else None,  # None: thresholds differ by goal
        "thresholds": thresholds,
        "policy": policy,
        "reporting_year": int(reporting_year),
        "comparison_years": tuple(sorted(int(y) for y in comparison_years)),
        "comparison_years_compared": compared,
        "comparison_years_empty": tuple(sorted(int(y) for y in comparison_years if int(y) not in present)),
        "years": years,
        "years_present": present,
        "scope": "scored publications from " + year_ranges(years),
        "sensitivity_step": cfg.sensitivity_step,
        "seed": cfg.seed,
        "bootstrap_resamples": cfg.bootstrap_resamples,
        "methods": dict(METHODS),
    }
    funding_part = None
    if conversion is not None:
        funding_part = funding_findings(
            scored, decisions, goals, conversion, funding or FundingConfig(), cfg, reporting_year,
            tuple(comparison_years), noun or RecordNoun("award", "awards"),
        )
    return Findings(
        funding=funding_part,
        meta=meta,
        headline=headline_summary(decisions, codes, cfg.confidence, general_mentions, n_too_small),
        goals=goal_summary(decisions, goals, cfg.confidence, rng, cfg.bootstrap_resamples),
        by_year=by_year,
        changes=year_changes(by_year, codes, reporting_year, compared, cfg.confidence, cfg.fdr, size),
        by_department=by_department,
        by_country=by_country,
        collaboration=collaboration,
        sensitivity=sensitivity_table(decisions, codes, thresholds, policy, cfg.sensitivity_step),
        cooccurrence=cooccurrence_table(decisions, codes),
        coverage=coverage_summary(in_scope, scored_ids, len(records) - len(in_scope)),
    )
