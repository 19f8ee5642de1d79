"""The `Findings` structure: every table the report shows, computed once by `analyse`.

Rendering consumes it unchanged. Shares are in [0, 1]; `*_low`/`*_high` are the
interval bounds at `meta["confidence"]`; `is_too_small` marks groups under
`meta["min_group_size"]` publications (shown as too small, never dropped).
Columns may be added; the ones listed are a contract with `render`. Every key and
column, added ones included, is described in FINDINGS_SCHEMA.md beside this file.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import pandas as pd


@dataclass(frozen=True)
class FundingFindings:
    """Funding figures of a portfolio (records with award amounts); FINDINGS_SCHEMA.md, "funding"."""

    meta: dict  # counting, group_counting, base_currency, conversion_table, conversion_table_sha256, ...
    headline: dict  # n_awards, n_in_funding, n_not_in_funding, amount_total, share_aligned_any (+ _low/_high), ...
    goals: pd.DataFrame  # goal, title, n_awards, amount, share, share_low, share_high, share_full, share_fractional
    by_year: pd.DataFrame  # year, goal, n_awards, amount_total, amount, share, share_low, share_high, is_too_small
    changes: pd.DataFrame  # goal, baseline, ..., share_baseline, share, diff, diff_low, diff_high, p_value, verdict
    by_department: pd.DataFrame  # department, is_unassigned, goal, n_awards, amount_total, amount, share, ...
    by_country: pd.DataFrame  # country, country_name, goal, n_awards, amount_total, amount, share, ...
    currencies: pd.DataFrame  # currency, n_awards, amount, rate, amount_base
    left_out: pd.DataFrame  # reason, n_awards: awards analysed but left out of the funding figures


@dataclass(frozen=True)
class Findings:
    meta: dict  # counting, confidence, min_group_size, fdr, threshold, thresholds (goal->t), policy,
    #             reporting_year, comparison_years, years, sensitivity_step, seed, bootstrap_resamples
    headline: dict  # n_publications, n_aligned_any, share_aligned_any, share_aligned_any_low/_high,
    #                 n_explicit_any, n_general_mentions, n_too_small_groups
    goals: pd.DataFrame  # goal, title, n, n_aligned, n_explicit, n_content_only, share, share_low,
    #                      share_high, mean_score, mean_score_low, mean_score_high  (reporting year scope:
    #                      all years in scope; see meta["scope"])
    by_year: pd.DataFrame  # year, goal, n, n_aligned, share, share_low, share_high, is_too_small
    changes: pd.DataFrame  # goal, baseline ("2024" or "mean 2022-2024"), year, share_baseline, share,
    #                        diff, diff_low, diff_high, p_value, p_adjusted, is_change, verdict
    #                        (verdict: "increase" | "decrease" | "no clear change" | "too small")
    by_department: pd.DataFrame  # department, goal, n, n_aligned, share, share_low, share_high, is_too_small
    by_country: pd.DataFrame  # country (ISO alpha-2), country_name, goal, n, n_aligned, share, share_low,
    #                           share_high, is_too_small   (partner countries only)
    collaboration: pd.DataFrame  # group ("international" | "domestic"), goal, n, n_aligned, share,
    #                              share_low, share_high, is_too_small
    sensitivity: pd.DataFrame  # goal, threshold_label ("low" | "chosen" | "high"), threshold, n_aligned, share
    cooccurrence: pd.DataFrame  # goal_a, goal_b, n  (publications aligned with both; goal_a < goal_b)
    coverage: dict  # n_records, n_with_abstract, share_with_abstract, n_with_department,
    #                 share_with_department, n_with_country, share_with_country, n_non_english
    extra: dict = field(default_factory=dict)  # later sections (validation, corrected shares, overrides)
    funding: FundingFindings | None = None  # only when the records have award amounts
    # Added by analyse (see FINDINGS_SCHEMA.md): share tables also carry n_publications, n_effective,
    # n_explicit, n_content_only; by_department/by_country carry is_unassigned; changes carry
    # baseline_kind, n_baseline, n_aligned_baseline, n, n_aligned; sensitivity carries n;
    # meta adds scope, methods; headline adds n_aligned_multiple; coverage adds n_scored,
    # n_not_scored, n_outside_years.
