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
