"""format_intake_summary: counts by file and year, reasons generalised, warnings, merged rows."""

from __future__ import annotations

import pandas as pd
import pytest

from reporter.records import INTAKE_LOG_COLUMNS, RECORD_COLUMNS, IntakeResult
from reporter.summary import format_intake_summary, generalise_reason


def _log(rows: list[tuple[str, str, object, str, str]]) -> pd.DataFrame:
    """rows of (record_id, source_file, year, status, reason)."""
    full = [
        {"record_id": rid, "source_file": src, "source_line": 1, "format": "bibtex", "native_id": rid,
         "title": "T", "year": year, "status": status, "reason": reason,
         "merged_into": "x:a" if status == "merged" else "", "flags": ""}
        for rid, src, year, status, reason in rows
    ]
    return pd.DataFrame(full, columns=list(INTAKE_LOG_COLUMNS)).astype({"year": "Int64"})


def _result(rows, warnings=()) -> IntakeResult:
    return IntakeResult(pd.DataFrame(columns=list(RECORD_COLUMNS)), _log(rows), tuple(warnings))


ROWS = [
    ("x:a", "x.bib", 2021, "kept", ""),
    ("x:b", "x.bib", 2021, "merged", "duplicate of x:a (same DOI)"),
    ("x:c", "x.bib", 2019, "set_aside", "outside the configured years (2019)"),
    ("x:d", "x.bib", None, "set_aside", "unparseable entry at line 12: bad"),
    ("y:a", "y.csv", 2020, "kept", ""),
    ("y:b", "y.csv", None, "set_aside", "unparseable entry at line 40: row has 3 cells, header has 4"),
    ("y:c", "y.csv", 2018, "set_aside", "outside the configured years (2018)"),
    ("y:d", "y.csv", 2020, "set_aside", "no title"),
]


def test_summary_tables() -> None:
    text = format_intake_summary(_result(ROWS, ["y.csv: decoded as cp1252 after UTF-8 failed"]))
    assert text == (
        "file   read  kept  merged  set aside\n"
        "-----  ----  ----  ------  ---------\n"
        "x.bib     4     1       1          2\n"
        "y.csv     4     1       0          3\n"
        "all       8     2       1          5\n"
        "\n"
        "year     read  kept  merged  set aside\n"
        "-------  ----  ----  ------  ---------\n"
        "2018        1     0       0          1\n"
        "2019        1     0       0          1\n"
        "2020        2     1       0          1\n"
        "2021        2     1       1          0\n"
        "no year     2     0       0          2\n"
        "all         8     2       1          5\n"
        "\n"
        "set aside: reason             records\n"
        "----------------------------  -------\n"
        "outside the configured years        2\n"
        "unparseable entry at line N         2\n"
        "no title                            1\n"
        "\n"
        "merged: reason                          records\n"
        "--------------------------------------  -------\n"
        "duplicate of another record (same DOI)        1\n"
        "\n"
        "warnings:\n"
        "  y.csv: decoded as cp1252 after UTF-8 failed\n"
    )


def test_counts_reconcile_in_the_all_row() -> None:
    last_file_row = format_intake_summary(_result(ROWS)).split("\n\n")[0].splitlines()[-1]
    _, read, kept, merged, set_aside = last_file_row.split()
    assert int(read) == int(kept) + int(merged) + int(set_aside), "read = kept + merged + set aside"


@pytest.mark.parametrize(
    ("reason", "general"),
    [
        ("unparseable entry at line 7: record does not start with a TY tag", "unparseable entry at line N"),
        ("outside the configured years (2019)", "outside the configured years"),
        ("no usable year", "no usable year"),
        ("", "(no reason given)"),
    ],
)
def test_generalise_reason(reason, general) -> None:
    assert generalise_reason(reason) == general


def test_wrong_table_is_named() -> None:
    bad = IntakeResult(pd.DataFrame(), pd.DataFrame({"record_id": []}))
    with pytest.raises(TypeError, match="format_intake_summary: missing columns source_file"):
        format_intake_summary(bad)
