"""RIS file -> ReadResult. Tag meanings follow the RIS format specification.

Hand-parsed: one tag a line (`XY  - value`), a record from TY to ER. Lines that carry no tag
continue the previous tag's value. Unknown tags are read and ignored.
Authors are AU/A1 only: A2 holds secondary authors (editors), who did not write the work.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from pathlib import Path

from reporter.config import InputConfig
from reporter.ingest.entry import make_entry, split_list
from reporter.ingest.text import decode_bytes
from reporter.records import RawEntry, ReadResult, Rejected

FORMAT = "ris"
_TAG = re.compile(r"^([A-Z][A-Z0-9])  - ?(.*)$")
_FOUR_DIGITS = re.compile(r"\d{4}")
# Full names before abbreviations: JF full journal name, T2 secondary title (the journal of a
# JOUR record, the book of a CHAP record), JO journal name, JA abbreviation.
_VENUE_TAGS = ("JF", "T2", "JO", "JA")
_YEAR_TAGS = ("PY", "Y1", "DA")


@dataclass
class _Record:
    line: int
    has_type: bool
    tags: list[list[str]] = field(default_factory=list)  # [tag, value] pairs in file order
    closed: bool = False


def read_ris(path: Path, source_name: str, cfg: InputConfig, max_field_length: int) -> ReadResult:
    """Read one RIS file; a record cut off by the end of the file still counts, with a note."""
    decoded = decode_bytes(path.read_bytes(), cfg.encoding)
    entries: list[RawEntry] = []
    rejected: list[Rejected] = []
    for number, record in enumerate(_split_records(decoded.text), start=1):
        native_id = _first(record, ("ID",)) or f"rec{number}"
        if not record.has_type:
            reason = f"unparseable entry at line {record.line}: record does not start with a TY tag"
            rejected.append(Rejected(source_name, record.line, _first(record, ("ID",)), reason))
            continue
        notes = () if record.closed else ("no_end_tag",)
        values = _values(record)
        entries.append(make_entry(source_name, record.line, FORMAT, native_id, values, max_field_length, notes))
    return ReadResult(source_name, FORMAT, tuple(entries), tuple(rejected), decoded.warnings)


def _split_records(text: str) -> list[_Record]:
    records: list[_Record] = []
    current: _Record | None = None
    for number, line in enumerate(text.split("\n"), start=1):
        match = _TAG.match(line.rstrip())
        if match is None:
            # Continuation of the previous value; text between records is ignored.
            if current is not None and current.tags:
                current.tags[-1][1] += "\n" + line.strip()
            continue
        tag, value = match.group(1), match.group(2).strip()
        if tag == "TY":
            if current is not None:
                records.append(current)  # a new TY before ER: the previous record ends unclosed
            current = _Record(number, has_type=True, tags=[["TY", value]])
        elif tag == "ER":
            if current is not None:
                current.closed = True
                records.append(current)
                current = None
        else:
            if current is None:
                current = _Record(number, has_type=False)
            current.tags.append([tag, value])
    if current is not None:
        records.append(current)
    return records


def _all(record: _Record, tags: tuple[str, ...]) -> list[str]:
    return [value for tag, value in record.tags if tag in tags and value.strip()]


def _first(record: _Record, tags: tuple[str, ...]) -> str | None:
    """The first non-empty value, trying the tags in the given order of preference."""
    for tag in tags:
        values = _all(record, (tag,))
        if values:
            return values[0]
    return None


def _year_text(record: _Record) -> str | None:
    for tag in _YEAR_TAGS:
        for value in _all(record, (tag,)):
            if _FOUR_DIGITS.search(value):
                return value
    return _first(record, _YEAR_TAGS)


def _values(record: _Record) -> dict[str, object]:
    return {
        "title": _first(record, ("TI", "T1")),
        "abstract": _first(record, ("AB", "N2")),
        "keywords": [k for value in _all(record, ("KW",)) for k in split_list(value, ";")],
        "year": _year_text(record),
        "doi": _first(record, ("DO",)),
        "authors": _all(record, ("AU", "A1")),
        "affiliations": [a for value in _all(record, ("AD", "C1")) for a in split_list(value, ";")],
        "doc_type": _first(record, ("TY",)),
        "venue": _first(record, _VENUE_TAGS),
        "language": _first(record, ("LA",)),
        "url": _first(record, ("UR",)),
        "issn": _first(record, ("SN",)),
    }
