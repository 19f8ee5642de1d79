"""Shared data shapes and the documented column names of every table that crosses a stage.

No logic lives here beyond column checks; each stage imports what it needs.
Cells that hold several values (authors, keywords, countries...) are tuples of str.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Iterable

import pandas as pd

# --- ingest: what a reader hands to intake -------------------------------------------------

#: Canonical field names a reader may fill in `RawEntry.fields`. Text fields are str;
#: list fields are tuples of str. Unknown source fields are dropped by the reader.
TEXT_FIELDS = (
    "title", "abstract", "year", "doi", "doc_type", "venue", "language", "url", "issn",
    "amount", "currency",  # an award's funding as written in the export, and its ISO 4217 code
)
LIST_FIELDS = ("keywords", "authors", "affiliations", "departments", "orcids")


@dataclass(frozen=True)
class RawEntry:
    """One publication as a reader found it, before any cleaning of values."""

    source_file: str  # file name as given in the config (relative to the config folder)
    source_line: int  # 1-based line where the entry starts (CSV: line of the row's first cell)
    format: str  # "bibtex" | "ris" | "csv"
    native_id: str  # BibTeX key, RIS ID tag, CSV id column; else a position label like "row12"
    fields: dict[str, object] = field(default_factory=dict)
    cut_fields: tuple[str, ...] = ()  # fields cut to limits.max_field_length; intake flags "cut:<field>"
    notes: tuple[str, ...] = ()  # reader remarks for the intake log flags, e.g. "no_end_tag"


@dataclass(frozen=True)
class Rejected:
    """An entry a reader could not turn into a `RawEntry`; it goes to the intake log as set aside."""

    source_file: str
    source_line: int | None
    native_id: str | None
    reason: str


@dataclass(frozen=True)
class ReadResult:
    """Everything one reader got from one file. n_read = entries + rejected."""

    source_file: str
    format: str
    entries: tuple[RawEntry, ...]
    rejected: tuple[Rejected, ...]
    warnings: tuple[str, ...] = ()  # e.g. "decoded as cp1252 after UTF-8 failed"

    @property
    def n_read(self) -> int:
        return len(self.entries) + len(self.rejected)


# --- ingest/enrich: the record table -------------------------------------------------------

#: Columns of the record table produced by `ingest.read_inputs` and completed by `enrich.enrich`.
RECORD_COLUMNS = (
    "record_id",  # stable id: "<file stem>:<native id>", unique across the run
    "source_file",
    "source_line",
    "format",
    "native_id",
    "title",
    "abstract",  # "" when missing
    "keywords",  # tuple[str]
    "year",  # int
    "doi",  # normalised lower-case "10.xxxx/..." or ""
    "authors",  # tuple[str], each "Last, First"
    "affiliations",  # tuple[str], raw affiliation strings
    "departments",  # tuple[str]; from a department column at ingest, from the staff map in enrich
    "orcids",  # tuple[str]
    "doc_type",
    "venue",
    "language",  # ISO 639-1 code from the source or detection; "" when unknown
    "has_abstract",  # bool
)

#: Columns intake adds to every record table (after RECORD_COLUMNS). A run is a portfolio when any
#: record read carries an amount or a currency; then each kept record without a usable amount has
#: `amount_note` saying why and a "not_in_funding:<why>" flag in the intake log. Such a record is still
#: counted and scored like any other, but left out of the funding figures.
FUNDING_COLUMNS = (
    "amount",  # float > 0 in the record's own currency; NaN when missing or unusable
    "currency",  # ISO 4217 code ("" when none is known)
    "amount_note",  # why the record is not in the funding figures; "" when it is, or when the run has no amounts
)

#: Columns `enrich.enrich` adds to the record table.
ENRICHED_COLUMNS = (
    "countries",  # tuple[str] ISO 3166-1 alpha-2 found in affiliations, sorted
    "partner_countries",  # countries other than the home country
    "is_international",  # bool: has at least one partner country
    "is_english",  # bool: language is English (or undetermined but plausibly English)
)

#: Columns of the intake log; one row per record read, whatever became of it.
INTAKE_LOG_COLUMNS = (
    "record_id",
    "source_file",
    "source_line",
    "format",
    "native_id",
    "title",
    "year",
    "status",  # one of INTAKE_STATUSES
    "reason",  # why set aside or merged; "" when kept
    "merged_into",  # record_id of the record kept instead, for status "merged"
    "flags",  # ";"-joined notes on kept records, e.g. "no_abstract;non_english:de"
)
INTAKE_STATUSES = ("kept", "merged", "set_aside")

# --- score ---------------------------------------------------------------------------------

#: Columns of the long score table: one row per (kept publication, goal).
SCORE_COLUMNS = (
    "record_id",
    "goal",  # goal code from the framework, e.g. "6"
    "alignment_score",  # float in [0, 1]
    "n_explicit_mentions",  # int
    "is_explicit",  # bool: at least one explicit mention of this goal
    "is_aligned",  # bool: the alignment decision after the policy
    "evidence",  # best evidence sentence ("" when none)
    "evidence_score",  # the evidence sentence's own score for this goal
)


def require_columns(frame: pd.DataFrame, columns: Iterable[str], what: str) -> None:
    """Raise a TypeError naming the missing columns when a stage receives the wrong table."""
    if not isinstance(frame, pd.DataFrame):
        raise TypeError(f"{what}: expected a pandas DataFrame, got {type(frame).__name__}")
    missing = [c for c in columns if c not in frame.columns]
    if missing:
        raise TypeError(f"{what}: missing columns {', '.join(missing)}")


@dataclass(frozen=True)
class IntakeResult:
    """The record table and the intake log that accounts for every record read."""

    records: pd.DataFrame  # RECORD_COLUMNS (+ ENRICHED_COLUMNS after enrich); kept records only
    log: pd.DataFrame  # INTAKE_LOG_COLUMNS; one row per record read
    warnings: tuple[str, ...] = ()  # file-level notes, e.g. an encoding fallback
    # (source file, records read, the note on a file that yielded none), one per configured input in
    # config order, so a file that yielded nothing still shows in the per-file tables.
    files: tuple[tuple[str, int, str], ...] = ()
