"""The reader registry and format guessing: from the file extension, then from the content."""

from __future__ import annotations

import re
from collections.abc import Callable
from pathlib import Path

from reporter.config import InputConfig
from reporter.ingest.bibtex import read_bibtex
from reporter.ingest.csv import read_csv
from reporter.ingest.ris import read_ris
from reporter.ingest.text import decode_bytes
from reporter.records import ReadResult

Reader = Callable[[Path, str, InputConfig, int], ReadResult]

READERS: dict[str, Reader] = {"bibtex": read_bibtex, "ris": read_ris, "csv": read_csv}

# ".txt" is missing on purpose: exports use it for RIS and for tab-separated files alike.
EXTENSIONS = {".bib": "bibtex", ".bibtex": "bibtex", ".ris": "ris", ".csv": "csv", ".tsv": "csv"}
_PROBE_BYTES = 16384
_BIBTEX_START = re.compile(r"^\s*@\s*[A-Za-z]+\s*[{(]", re.MULTILINE)
_RIS_START = re.compile(r"^TY  - ", re.MULTILINE)


def guess_format(path: Path, encoding: str | None = None) -> str | None:
    """"bibtex", "ris" or "csv"; None when neither the name nor the first bytes tell."""
    by_name = EXTENSIONS.get(path.suffix.lower())
    if by_name:
        return by_name
    with path.open("rb") as handle:
        head = handle.read(_PROBE_BYTES)
    return guess_format_from_text(decode_bytes(head, encoding).text)


def guess_format_from_text(text: str) -> str | None:
    """RIS and BibTeX have markers of their own; a first line with a delimiter suggests CSV."""
    if _RIS_START.search(text):
        return "ris"
    if _BIBTEX_START.search(text):
        return "bibtex"
    first = next((line for line in text.split("\n") if line.strip()), "")
    if any(d in first for d in ",;\t|"):
        return "csv"
    return None


_FORMAT_NAMES = {"bibtex": "BibTeX", "ris": "RIS", "csv": "CSV"}
# A workbook renamed .csv: the zip container of .xlsx/.ods, or the OLE container of .xls.
_WORKBOOK_MAGIC = (b"PK\x03\x04", b"\xd0\xcf\x11\xe0\xa1\xb1\x1a\xe1")


def why_nothing_read(path: Path, fmt: str, encoding: str | None, warnings: tuple[str, ...]) -> tuple[str, ...]:
    """The warnings for an input that yielded no record: the reader's own when it had any (a binary
    file, say), else a note that says what to do where the content tells. A workbook's note replaces
    the reader's "binary content", which would not say what to do."""
    with path.open("rb") as handle:
        head = handle.read(_PROBE_BYTES)
    if head.startswith(_WORKBOOK_MAGIC):
        return ("no records found: this is a spreadsheet workbook, not CSV text; save it from the "
                "spreadsheet program as CSV (UTF-8) and give that file",)
    if warnings:
        return warnings
    return (_nothing_read_note(head, fmt, encoding),)


def _nothing_read_note(head: bytes, fmt: str, encoding: str | None) -> str:
    if not head:
        return "file is empty (0 bytes); nothing read"
    text = decode_bytes(head, encoding).text
    looks_like = guess_format_from_text(text)
    if looks_like in ("ris", "bibtex") and looks_like != fmt:
        return (f"no records found: the content looks like {_FORMAT_NAMES[looks_like]}, not {_FORMAT_NAMES[fmt]}; "
                f'set format = "{looks_like}" for this input')
    if fmt == "csv" and len([line for line in text.split("\n") if line.strip()]) == 1:
        return "no records found: the file holds a header line and no rows"
    return "no records found"
