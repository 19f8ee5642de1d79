"""A portfolio's amounts after intake: whether there are any, the currencies they are in, and what stops a
build before the model loads (several currencies without a conversion table, a table missing one of them).

In: the kept records (FUNDING_COLUMNS) and the config. Out: Problems, or the `ConversionTable` that brings
every usable amount into the base currency (a table of rate 1 when all amounts share one currency).
"""

from __future__ import annotations

import pandas as pd

from reporter.config import Config, problem_at
from reporter.config_funding import FundingConfig
from reporter.currency import ConversionTable, read_conversion_table
from reporter.errors import Problem

_TABLE_HELP = (
    "a CSV with the columns currency and rate (the value of one unit in the base currency); "
    "nothing is fetched from the network"
)


def is_portfolio(records: pd.DataFrame) -> bool:
    """True when any kept record has an amount, usable or not (intake notes why one is not)."""
    if "amount" not in records.columns:
        return False
    return bool(records["amount"].notna().any() or (records["amount_note"] != "").any())


def amounts_by_currency(records: pd.DataFrame) -> pd.Series:
    """Usable amounts per currency (count of awards), currencies in alphabetical order."""
    usable = records[records["amount"].notna()]
    return usable.groupby("currency").size().sort_index()


def funding_problems(config: Config, records: pd.DataFrame, noun: str = "awards") -> list[Problem]:
    """What stops a build of these records' funding figures; [] when nothing does (or no amounts at all)."""
    problem = problem_at(config)
    funding = config.funding
    if not is_portfolio(records):
        if funding != FundingConfig():  # a setting that would be ignored without a word
            return [problem("funding", (
                f"is set, but no record has an amount; map the export's amount column, e.g. "
                f'inputs[0].columns = {{ amount = "Award Value" }}, or remove [funding]'
            ))]
        return []
    counts = amounts_by_currency(records)
    if counts.empty:
        notes = records.loc[records["amount_note"] != "", "amount_note"].value_counts()
        return [problem("funding", (
            f"none of the {len(records)} {noun} has a usable amount (most often: {notes.index[0]!r}, "
            f"{int(notes.iloc[0])} {noun}); the intake log's not_in_funding flags say why for each"
        ))]
    used = ", ".join(f"{code} ({n} {noun})" for code, n in counts.items())
    if funding.conversion_table is None:
        if len(counts) > 1:
            return [problem("funding.conversion_table", (
                f"the amounts are in {len(counts)} currencies: {used}; set funding.base_currency and give "
                f"funding.conversion_table, {_TABLE_HELP}"
            ))]
        if funding.base_currency is not None and counts.index[0] != funding.base_currency:
            return [problem("funding.base_currency", (
                f"the amounts are in {used}, not {funding.base_currency}; set base_currency = "
                f'"{counts.index[0]}", or give funding.conversion_table, {_TABLE_HELP}'
            ))]
        return []
    table, problems = read_conversion_table(funding.conversion_table, funding.base_currency)
    if problems:
        return problems
    missing = [(code, n) for code, n in counts.items() if code not in table.rates]
    if missing:
        listed = ", ".join(f"{code} ({n} {noun})" for code, n in missing)
        return [Problem(table.path, None, "currency", (
            f"no rate for {listed}, used by the inputs; add a line such as {missing[0][0]},<rate> "
            f"(the value of one {missing[0][0]} in {funding.base_currency})"
        ))]
    return []


def conversion_for(config: Config, records: pd.DataFrame) -> ConversionTable | None:
    """The rates the funding figures use; None when the records have no usable amount.

    Call after `funding_problems` found none: the configured table, else rate 1 for the one currency.
    """
    if not is_portfolio(records):
        return None
    counts = amounts_by_currency(records)
    if counts.empty:
        return None
    if config.funding.conversion_table is not None:
        table, problems = read_conversion_table(config.funding.conversion_table, config.funding.base_currency)
        if problems:
            raise ValueError("conversion_for: the conversion table has problems; run funding_problems first")
        return table
    only = str(counts.index[0])
    return ConversionTable(only, {only: 1.0})
