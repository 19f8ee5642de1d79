"""Turn a reader's raw field values into a `RawEntry`: clean, split lists, cut long values."""

from __future__ import annotations

import re
from collections.abc import Iterable, Mapping

from reporter.records import LIST_FIELDS, TEXT_FIELDS, RawEntry
from reporter.ingest.text import clean_value, cut

# An ORCID iD is four groups of four digits, the last character possibly X (ISO 7064 check digit).
_ORCID = re.compile(r"\b(\d{4}-\d{4}-\d{4}-\d{3}[\dX])\b")


def split_list(text: str, separators: str) -> list[str]:
    """Split a cell on any of the given separator characters; blank parts are dropped."""
    parts = re.split("[" + re.escape(separators) + "]", text) if separators else [text]
    return [part.strip() for part in parts if part.strip()]


def split_keywords(text: str) -> list[str]:
    """Keywords: ";" when the value has one (so "water, sanitation" survives), else ","."""
    return split_list(text, ";" if ";" in text else ",")


def find_orcids(values: Iterable[str]) -> list[str]:
    """ORCID iDs found anywhere in the values (bare, as URLs, or as "Name/iD" pairs)."""
    return [match.group(1) for value in values for match in _ORCID.finditer(value)]


def make_entry(
    source_file: str,
    source_line: int,
    fmt: str,
    native_id: str,
    values: Mapping[str, object],
    max_field_length: int,
    notes: Iterable[str] = (),
) -> RawEntry:
    """Build a `RawEntry` from canonical field names (see records.TEXT_FIELDS / LIST_FIELDS).

    Text values are str, list values any iterable of str. Empty values are dropped, so a
    missing field and a blank one look the same downstream.
    """
    unknown = set(values) - set(TEXT_FIELDS) - set(LIST_FIELDS)
    if unknown:
        raise ValueError(f"reader produced unknown fields: {', '.join(sorted(unknown))}")
    fields: dict[str, object] = {}
    cut_fields: list[str] = []
    for name in TEXT_FIELDS:
        raw = values.get(name)
        if not isinstance(raw, str):
            continue
        text, was_cut = cut(clean_value(raw, keep_paragraphs=name == "abstract"), max_field_length)
        if text:
            fields[name] = text
        if was_cut:
            cut_fields.append(name)
    for name in LIST_FIELDS:
        raw_items = values.get(name)
        if raw_items is None:
            continue
        items: list[str] = []
        for item in raw_items:  # type: ignore[union-attr]
            text, was_cut = cut(clean_value(str(item)), max_field_length)
            if text and text not in items:
                items.append(text)
            if was_cut and name not in cut_fields:
                cut_fields.append(name)
        if items:
            fields[name] = tuple(items)
    return RawEntry(
        source_file=source_file,
        source_line=source_line,
        format=fmt,
        native_id=clean_value(native_id)[:max_field_length],
        fields=fields,
        cut_fields=tuple(cut_fields),
        notes=tuple(notes),
    )
