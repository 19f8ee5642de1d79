"""`FundingFindings` of a portfolio: the funding tables, the headline, the currencies converted, the awards
left out of the funding figures, and the method notes the report prints about all of them.

In: the analysed records (with FUNDING_COLUMNS), the decision table, the conversion table and settings.
Random draws come from their own Generator seeded with `analysis.seed`, so adding funding figures does
not change any publication figure.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from reporter.analyse.findings import FundingFindings
from reporter.analyse.funding import (
    Awards, funding_by_country, funding_by_department, funding_by_year, funding_goal_table, prepare_awards,
)
from reporter.analyse.funding_change import funding_changes
from reporter.analyse.intervals import bootstrap_ratio_interval
from reporter.config import AnalysisConfig
from reporter.config_funding import FundingConfig, RecordNoun
from reporter.currency import ConversionTable
from reporter.ingest.amounts import note_kind

FUNDING_METHODS = {
    "funding_share": "share of the total funding of the awards with a usable amount",
    "funding_interval": "percentile bootstrap over awards",
    "funding_change_test": "permutation test over awards (two-sided, randomised)",
    "funding_difference_interval": "percentile bootstrap over awards, within each period",
    "funding_too_small_basis": "awards in the group, not the amount",
}


def funding_findings(
    records: pd.DataFrame, decisions: pd.DataFrame, goals: tuple[tuple[str, str], ...], conversion: ConversionTable,
    funding: FundingConfig, cfg: AnalysisConfig, reporting_year: int, comparison_years: tuple[int, ...],
    noun: RecordNoun = RecordNoun("award", "awards"),
) -> FundingFindings:
    """Every funding figure of the analysed records (scored, in the years in scope)."""
    codes = tuple(code for code, _ in goals)
    years = tuple(sorted({*comparison_years, reporting_year}))
    awards = prepare_awards(records, decisions, codes, conversion, funding.counting)
    rng = np.random.default_rng(cfg.seed)
    draws = (rng, cfg.bootstrap_resamples, cfg.confidence)
    size = cfg.min_group_size
    goals_table = funding_goal_table(awards, goals, *draws)
    headline = _headline(awards, records, *draws)
    by_year = funding_by_year(awards, codes, years, *draws, size)
    by_department = funding_by_department(awards, codes, cfg.counting, *draws, size)
    by_country = funding_by_country(awards, codes, cfg.counting, *draws, size)
    changes = funding_changes(awards, codes, reporting_year, tuple(comparison_years), *draws, cfg.fdr, size)
    headline["n_too_small_groups"] = sum(
        int(table.loc[table["is_too_small"], column].nunique())
        for table, column in ((by_year, "year"), (by_department, "department"), (by_country, "country"))
    )
    currencies = currency_table(awards, conversion)
    left_out = left_out_table(records)
    meta = {
        "counting": funding.counting,
        "group_counting": cfg.counting,
        "base_currency": conversion.base_currency,
        "conversion_table": conversion.path.name if conversion.path is not None else None,
        "conversion_table_sha256": conversion.sha256 or None,
        "confidence": cfg.confidence,
        "min_group_size": size,
        "fdr": cfg.fdr,
        "bootstrap_resamples": cfg.bootstrap_resamples,
        "seed": cfg.seed,
        "reporting_year": int(reporting_year),
        "comparison_years": tuple(sorted(int(y) for y in comparison_years)),
        "years": years,
        "scope": f"scored {noun.plural} with a usable amount from " + ", ".join(str(y) for y in years),
        "methods": dict(FUNDING_METHODS),
    }
    meta["method_notes"] = method_notes(meta, headline, currencies, left_out, noun)
    return FundingFindings(meta=meta, headline=headline, goals=goals_table, by_year=by_year, changes=changes,
                           by_department=by_department, by_country=by_country, currencies=currencies,
                           left_out=left_out)


def _headline(awards: Awards, records: pd.DataFrame, rng, n_resamples: int, confidence: float) -> dict:
    amounts = awards.amounts
    any_goal = awards.aligned.any(axis=1)
    low, high = bootstrap_ratio_interval((amounts * any_goal)[None, :], amounts, rng, n_resamples, confidence)
    total = float(amounts.sum())
    return {
        "n_awards": int(len(records)),
        "n_in_funding": int(len(amounts)),
        "n_not_in_funding": int(len(records) - len(amounts)),
        "amount_total": total,
        "n_aligned_any": int(any_goal.sum()),
        "amount_aligned_any": float(amounts[any_goal].sum()),
        "share_aligned_any": float(amounts[any_goal].sum() / total) if total > 0 else np.nan,
        "share_aligned_any_low": float(low[0]),
        "share_aligned_any_high": float(high[0]),
    }


def currency_table(awards: Awards, conversion: ConversionTable) -> pd.DataFrame:
    """Per currency of the awards in the funding figures: how many, their sum, the rate and the converted sum."""
    table = awards.table.groupby("currency").agg(n_awards=("amount", "size"), amount=("amount", "sum"),
                                                 amount_base=("amount_base", "sum"))
    table = table.reset_index().sort_values("currency", kind="stable")
    table.insert(3, "rate", table["currency"].map(dict(conversion.rates)).astype(float))
    return table.reset_index(drop=True)


def left_out_table(records: pd.DataFrame) -> pd.DataFrame:
    """Why analysed records were left out of the funding figures: reason kind and count, most frequent first."""
    notes = records.loc[records["amount"].isna(), "amount_note"].map(note_kind)
    counts = notes.value_counts(sort=False).sort_index().sort_values(ascending=False, kind="stable")
    return pd.DataFrame({"reason": counts.index.astype(str), "n_awards": counts.to_numpy(dtype=int)})


def method_notes(meta: dict, headline: dict, currencies: pd.DataFrame, left_out: pd.DataFrame,
                 noun: RecordNoun) -> list[str]:
    """The method section's sentences on the funding figures, in reading order."""
    one, many = noun.singular, noun.plural
    notes = [
        f"Funding shares count money: a goal's funding share is the part of the total funding of the "
        f"{headline['n_in_funding']} {many} with a usable amount that went to {many} aligned with the goal."
    ]
    if meta["counting"] == "full":
        notes.append(f"Full counting: {_a(one)} aligned with several goals counts its whole amount for each of "
                     "them, so goal shares can add up to more than 100%.")
    else:
        notes.append(f"Fractional counting: {_a(one)} aligned with k goals counts 1/k of its amount for each, so "
                     "goal shares add up to the share of funding aligned with any goal.")
    base = meta["base_currency"]
    others = currencies[currencies["currency"] != base]
    if meta["conversion_table"] is None or others.empty:
        notes.append(f"All amounts are in {base}; none was converted.")
    else:
        rates = ", ".join(f"1 {row.currency} = {row.rate:g} {base}" for row in others.itertuples())
        notes.append(f"Amounts were converted into {base} with the rates in {meta['conversion_table']} "
                     f"(SHA-256 {meta['conversion_table_sha256'][:12]}), one rate for every year: {rates}.")
    if headline["n_not_in_funding"]:
        reasons = ", ".join(f"{row.reason} ({row.n_awards})" for row in left_out.itertuples())
        n = headline["n_not_in_funding"]
        notes.append(f"{n} {one if n == 1 else many} without a usable amount {'is' if n == 1 else 'are'} counted "
                     f"and scored but left out of the funding figures: {reasons}; the intake log gives the reason "
                     "for each.")
    notes.append(f"Intervals are {meta['confidence']:.0%} percentile bootstrap intervals from "
                 f"{meta['bootstrap_resamples']} resamples of {many} (seed {meta['seed']}).")
    if meta["comparison_years"]:
        notes.append(f"A change in funding share is tested over {many}, not money: a permutation test reshuffles "
                     f"the {many} between the two periods, so a few large {many} cannot make a change look "
                     f"certain; Benjamini-Hochberg across goals at a false discovery rate of {meta['fdr']:.0%}.")
    notes.append(f"Departments and partner countries take {_a(one)}'s amount under {meta['group_counting']} "
                 f"counting. Groups with fewer than {meta['min_group_size']} {many} are marked too small, "
                 "whatever their funding.")
    return notes


def _a(word: str) -> str:
    return f"an {word}" if word[:1].lower() in "aeiou" else f"a {word}"
