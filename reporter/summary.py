"""IntakeResult -> a plain-text intake summary: counts per file and per year, reasons, warnings."""

from __future__ import annotations

import re

import pandas as pd

from reporter.ingest.amounts import NOT_IN_FUNDING, note_kind
from reporter.records import INTAKE_LOG_COLUMNS, IntakeResult, require_columns

_COUNT_HEADERS = ("read", "kept", "merged", "set aside")
_STATUSES = ("kept", "merged", "set_aside")


def format_intake_summary(result: IntakeResult) -> str:
    """Tables of read / kept / merged / set aside by file and by year, then reasons and warnings."""
    log = result.log
    require_columns(log, INTAKE_LOG_COLUMNS, "format_intake_summary")
    parts = [
        _table(("file", *_COUNT_HEADERS), _count_rows(log, log["source_file"].astype(str),
                                                      tuple(name for name, _, _ in result.files))),
        _table(("year", *_COUNT_HEADERS), _count_rows(log, _year_labels(log["year"]))),
    ]
    set_aside = log[log["status"] == "set_aside"]
    merged = log[log["status"] == "merged"]
    # A merge reason names the record kept ("duplicate of x:k1 (same DOI)"); the basis is what groups.
    merge_reasons = [
        str(reason).replace(str(kept), "another record") if kept else str(reason)
        for reason, kept in zip(merged["reason"], merged["merged_into"])
    ]
    for title, reasons in (
        ("set aside", [generalise_reason(str(r)) for r in set_aside["reason"]]),
        ("merged", merge_reasons),
    ):
        if reasons:
            counts = pd.Series(reasons).value_counts(sort=False).sort_index()
            counts = counts.sort_values(ascending=False, kind="stable")  # most frequent first, ties by name
            parts.append(_table((f"{title}: reason", "records"), [(r, str(n)) for r, n in counts.items()]))
    funding = _funding_reasons(log)
    if funding:
        counts = pd.Series(funding).value_counts().sort_index().sort_values(ascending=False, kind="stable")
        parts.append(_table(("kept, not in funding figures: reason", "records"), [(r, str(n)) for r, n in counts.items()]))
    if result.warnings:
        parts.append("warnings:\n" + "\n".join(f"  {w}" for w in result.warnings))
    return "\n\n".join(parts) + "\n"


def _funding_reasons(log: pd.DataFrame) -> list[str]:
    """The kind of each "not_in_funding:<why>" flag on a kept record (amount missing, zero, negative...)."""
    prefix = f"{NOT_IN_FUNDING}:"
    kept = log.loc[log["status"] == "kept", "flags"].astype(str)
    return [note_kind(flag[len(prefix):]) for flags in kept for flag in flags.split(";") if flag.startswith(prefix)]


def generalise_reason(reason: str) -> str:
    """The fixed part of a reason: text before ":" or "(", numbers as N.

    "unparseable entry at line 12: ..." -> "unparseable entry at line N";
    "outside the configured years (2019)" -> "outside the configured years".
    """
    head = re.split(r"[:(]", reason, maxsplit=1)[0].strip()
    return re.sub(r"\d+", "N", head) or "(no reason given)"


def _year_labels(years: pd.Series) -> pd.Series:
    return years.map(lambda y: "no year" if pd.isna(y) else str(int(y)))


def _count_rows(log: pd.DataFrame, groups: pd.Series, always: tuple[str, ...] = ()) -> list[tuple[str, ...]]:
    """Counts per group, plus a row of zeros for each label in `always` without a record (a file that gave none)."""
    rows: list[tuple[str, ...]] = []
    # Years sort as text, which is numeric order for four digits; "no year" comes last.
    labels = sorted(set(groups) | set(always), key=lambda label: (label == "no year", label))
    for label in labels:
        rows.append((label, *_counts(log[groups == label])))
    rows.append(("all", *_counts(log)))
    return rows


def _counts(log: pd.DataFrame) -> tuple[str, ...]:
    status = log["status"]
    return (str(len(log)), *(str(int((status == s).sum())) for s in _STATUSES))


def _table(headers: tuple[str, ...], rows: list[tuple[str, ...]]) -> str:
    widths = [max(len(str(row[i])) for row in (headers, *rows)) for i in range(len(headers))]

    def line(cells: tuple[str, ...]) -> str:
        first = str(cells[0]).ljust(widths[0])
        rest = (str(c).rjust(w) for c, w in zip(cells[1:], widths[1:]))
        return "  ".join((first, *rest)).rstrip()

    return "\n".join([line(headers), line(tuple("-" * w for w in widths)), *(line(r) for r in rows)])
