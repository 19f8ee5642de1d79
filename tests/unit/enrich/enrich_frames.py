"""Tiny record tables and intake logs built by hand for the enrich tests."""

from __future__ import annotations

import pandas as pd

from reporter.records import INTAKE_LOG_COLUMNS, RECORD_COLUMNS

_DEFAULTS = {
    "source_file": "pubs.bib", "source_line": 1, "format": "bibtex", "title": "Untitled",
    "abstract": "", "keywords": (), "year": 2024, "doi": "", "authors": (), "affiliations": (),
    "departments": (), "orcids": (), "doc_type": "article", "venue": "", "language": "en",
}


def record(record_id: str, **fields: object) -> dict:
    row = {"record_id": record_id, "native_id": record_id.split(":")[-1], **_DEFAULTS, **fields}
    row["has_abstract"] = bool(row["abstract"])
    return {c: row[c] for c in RECORD_COLUMNS}


def records(*rows: dict) -> pd.DataFrame:
    return pd.DataFrame(list(rows), columns=list(RECORD_COLUMNS))


def log_for(frame: pd.DataFrame, set_aside: int = 0) -> pd.DataFrame:
    """One "kept" log row per record, plus `set_aside` rows for entries a reader rejected."""
    rows = [
        {
            "record_id": r.record_id, "source_file": r.source_file, "source_line": r.source_line,
            "format": r.format, "native_id": r.native_id, "title": r.title, "year": r.year,
            "status": "kept", "reason": "", "merged_into": "", "flags": "",
        }
        for r in frame.itertuples(index=False)
    ]
    for n in range(set_aside):
        rows.append({
            "record_id": f"pubs:bad{n}", "source_file": "pubs.bib", "source_line": 100 + n,
            "format": "bibtex", "native_id": f"bad{n}", "title": "", "year": None,
            "status": "set_aside", "reason": "no title", "merged_into": "", "flags": "",
        })
    return pd.DataFrame(rows, columns=list(INTAKE_LOG_COLUMNS))
