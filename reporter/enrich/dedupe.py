"""Duplicate publications across and within files -> one kept record per publication.

Rule: two records are the same publication when they share a normalised DOI, or, when
their DOIs do not conflict (at most one distinct DOI among them), the same normalised title
and the same year. Two different DOIs are never merged: a preprint and its journal
version, or a paper and its data set, are separate objects with separate DOIs. Nor are two
different award amounts: in a portfolio, awards that share a title ("Doctoral studentship")
and a year but not their amount are separate awards.

Which record is kept: the richest one -- it has a usable award amount, then an abstract, then it has more fields
filled, then more affiliations; ties go to the record read first. The others are folded
into it: an empty text field (abstract, DOI, venue, ...) takes the first non-empty value
among them (richest first), empty authors take theirs, and keywords, affiliations,
departments and ORCIDs become the union (kept record's values first, repeats that differ
only in case or spacing dropped). Authors are not unioned because the same people are
written differently across exports.
"""

from __future__ import annotations

import re
import unicodedata
from collections import defaultdict

import pandas as pd

_TEXT_FILL = ("title", "abstract", "doi", "doc_type", "venue", "language")
_LIST_UNION = ("keywords", "affiliations", "departments", "orcids")
_COUNTED = (*_TEXT_FILL, "year", "keywords", "authors", "affiliations", "departments", "orcids")


def normalise_title(title: object) -> str:
    """Casefold, strip accents (NFKD), turn punctuation into spaces and collapse whitespace."""
    if not isinstance(title, str):
        return ""
    decomposed = unicodedata.normalize("NFKD", title.casefold())
    bare = "".join(ch for ch in decomposed if not unicodedata.combining(ch))
    return " ".join(re.sub(r"[\W_]+", " ", bare).split())


def dedupe(records: pd.DataFrame) -> tuple[pd.DataFrame, dict[str, tuple[str, str]]]:
    """Return (new records with one row per publication, dropped id -> (kept id, reason))."""
    rows = records.to_dict("records")
    merged: dict[str, tuple[str, str]] = {}
    keep_rows: dict[int, dict] = {}
    dropped: set[int] = set()
    for group in _groups(rows):
        if len(group) == 1:
            continue
        ranked = sorted(group, key=lambda i: (_richness(rows[i]), -i), reverse=True)
        kept, others = ranked[0], ranked[1:]
        combined = _merge(rows[kept], [rows[i] for i in others])
        keep_rows[kept] = combined
        for i in others:
            dropped.add(i)
            basis = _basis(rows[i], rows[kept])
            kept_id = combined["record_id"]
            merged[rows[i]["record_id"]] = (kept_id, f"duplicate of {kept_id} ({basis})")
    out_rows = [keep_rows.get(i, row) for i, row in enumerate(rows) if i not in dropped]
    out = pd.DataFrame(out_rows, columns=records.columns)
    return out.astype(records.dtypes.to_dict(), errors="ignore"), merged


def _groups(rows: list[dict]) -> list[list[int]]:
    """Union-find over record positions; a union is refused when it would join two DOIs."""
    parent = list(range(len(rows)))
    # What must not conflict within a group: at most one DOI, at most one (amount, currency).
    dois = [{row["doi"]} if row["doi"] else set() for row in rows]
    amounts = [{_amount_key(row)} if _amount_key(row) else set() for row in rows]

    def find(i: int) -> int:
        while parent[i] != i:
            parent[i] = parent[parent[i]]
            i = parent[i]
        return i

    def union(a: int, b: int) -> bool:
        ra, rb = find(a), find(b)
        if ra == rb:
            return True
        if len(dois[ra] | dois[rb]) > 1 or len(amounts[ra] | amounts[rb]) > 1:
            return False
        low, high = min(ra, rb), max(ra, rb)
        parent[high] = low
        dois[low] |= dois[high]
        amounts[low] |= amounts[high]
        return True

    by_doi: dict[str, list[int]] = defaultdict(list)
    by_title: dict[tuple[str, int], list[int]] = defaultdict(list)
    for i, row in enumerate(rows):
        if row["doi"]:
            by_doi[row["doi"]].append(i)
        key = _title_key(row)
        if key is not None:
            by_title[key].append(i)
    for members in by_doi.values():
        for i in members[1:]:
            union(members[0], i)
    for members in by_title.values():
        for pos, i in enumerate(members[1:], start=1):
            # Join the first earlier record this one does not conflict with (read order).
            for j in members[:pos]:
                if union(j, i):
                    break
    groups: dict[int, list[int]] = defaultdict(list)
    for i in range(len(rows)):
        groups[find(i)].append(i)
    return list(groups.values())


def _basis(dropped: dict, kept: dict) -> str:
    """Why `dropped` joined `kept`'s group: the direct link if there is one, else the DOI or
    title that tied it to another member of the group."""
    if dropped["doi"] and dropped["doi"] == kept["doi"]:
        return "same DOI"
    if _title_key(dropped) is not None and _title_key(dropped) == _title_key(kept):
        return "same title and year"
    return "same DOI" if dropped["doi"] else "same title and year"


def _amount_key(row: dict) -> tuple[float, str] | None:
    """An award's usable amount and currency; None for a publication or an award without one."""
    amount = row.get("amount")
    if amount is None or pd.isna(amount):
        return None
    return float(amount), str(row.get("currency", ""))


def _title_key(row: dict) -> tuple[str, int] | None:
    title = normalise_title(row["title"])
    year = row["year"]
    if not title or year is None or pd.isna(year):
        return None
    return title, int(year)


def _filled(value: object) -> bool:
    if isinstance(value, tuple):
        return len(value) > 0
    if isinstance(value, str):
        return value.strip() != ""
    return value is not None and not pd.isna(value)


def _richness(row: dict) -> tuple[bool, bool, int, int]:
    # An award with a usable amount first: its amount is what the funding figures count.
    return (
        _amount_key(row) is not None,
        _filled(row["abstract"]),
        sum(_filled(row[c]) for c in _COUNTED),
        len(row["affiliations"] or ()),
    )


def _merge(kept: dict, others: list[dict]) -> dict:
    combined = dict(kept)
    for column in _TEXT_FILL:
        if not _filled(combined[column]):
            combined[column] = next((o[column] for o in others if _filled(o[column])), combined[column])
    if not _filled(combined["year"]):
        combined["year"] = next((o["year"] for o in others if _filled(o["year"])), combined["year"])
    if not _filled(combined["authors"]):
        combined["authors"] = next((o["authors"] for o in others if _filled(o["authors"])), combined["authors"])
    for column in _LIST_UNION:
        combined[column] = _union([combined[column], *(o[column] for o in others)])
    combined["has_abstract"] = _filled(combined["abstract"])
    return combined


def _union(lists: list[tuple[str, ...]]) -> tuple[str, ...]:
    seen: set[str] = set()
    out: list[str] = []
    for values in lists:
        for value in values or ():
            key = " ".join(str(value).casefold().split())
            if key and key not in seen:
                seen.add(key)
                out.append(value)
    return tuple(out)
