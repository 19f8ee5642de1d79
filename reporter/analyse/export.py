"""`Findings` -> JSON text and named tables for CSV export (schema: FINDINGS_SCHEMA.md).

JSON is byte-identical for identical findings: dict keys sorted, table rows in table
order with columns in table order, floats rounded to 6 places, NaN and infinities -> null.
"""

from __future__ import annotations

import json
import math

import numpy as np
import pandas as pd

from reporter.analyse.findings import Findings

TABLE_NAMES = (
    "goals", "by_year", "changes", "by_department", "by_country", "collaboration", "sensitivity", "cooccurrence",
)
#: Funding tables, present only for a portfolio; exported as findings-funding-<name>.csv.
FUNDING_TABLE_NAMES = (
    "goals", "by_year", "changes", "by_department", "by_country", "currencies", "left_out",
)
FLOAT_PLACES = 6


def findings_to_json(findings: Findings) -> str:
    """The whole of `findings` as JSON text (UTF-8 safe, ends with a newline)."""
    document = {
        "meta": _plain(findings.meta),
        "headline": _plain(findings.headline),
        "coverage": _plain(findings.coverage),
        "tables": {name: _rows(getattr(findings, name)) for name in TABLE_NAMES},
        "extra": _plain(findings.extra),
    }
    if findings.funding is not None:  # absent, not null, for publications: their JSON stays as it was
        funding = findings.funding
        document["funding"] = {
            "meta": _plain(funding.meta),
            "headline": _plain(funding.headline),
            "tables": {name: _rows(getattr(funding, name)) for name in FUNDING_TABLE_NAMES},
        }
    return json.dumps(document, ensure_ascii=False, indent=2, allow_nan=False) + "\n"


def findings_tables(findings: Findings) -> dict[str, pd.DataFrame]:
    """Table name -> a copy of the table, for CSV export; headline and coverage as key/value tables."""
    tables = {name: getattr(findings, name).copy() for name in TABLE_NAMES}
    tables["headline"] = _key_values(findings.headline)
    tables["coverage"] = _key_values(findings.coverage)
    for name, value in sorted(findings.extra.items()):
        if isinstance(value, pd.DataFrame):
            tables[f"extra_{name}"] = value.copy()
    if findings.funding is not None:
        tables["funding_headline"] = _key_values(findings.funding.headline)
        tables.update({f"funding_{name}": getattr(findings.funding, name).copy() for name in FUNDING_TABLE_NAMES})
    return tables


def _key_values(values: dict) -> pd.DataFrame:
    return pd.DataFrame({"key": list(values), "value": pd.Series(list(values.values()), dtype=object)})


def _rows(table: pd.DataFrame) -> list[dict]:
    columns = [str(c) for c in table.columns]
    return [dict(zip(columns, (_plain(v) for v in row))) for row in table.itertuples(index=False, name=None)]


def _plain(value):
    """Turn numpy/pandas values into JSON-ready Python values, deterministically."""
    if value is None or value is pd.NA or value is pd.NaT:
        return None
    if isinstance(value, (bool, np.bool_)):
        return bool(value)
    if isinstance(value, (int, np.integer)):
        return int(value)
    if isinstance(value, (float, np.floating)):
        number = float(value)
        if not math.isfinite(number):
            return None
        # round() can leave -0.0, which would print differently from 0.0.
        return round(number, FLOAT_PLACES) + 0.0
    if isinstance(value, str):
        return value
    if isinstance(value, dict):
        return {str(k): _plain(value[k]) for k in sorted(value, key=str)}
    if isinstance(value, (list, tuple, np.ndarray, pd.Series)):
        return [_plain(v) for v in list(value)]
    if isinstance(value, pd.DataFrame):
        return _rows(value)
    raise TypeError(f"findings_to_json: cannot export a value of type {type(value).__name__}")
