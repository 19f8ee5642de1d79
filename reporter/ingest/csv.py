"""CSV/TSV file -> ReadResult: sniffed delimiter, headers mapped to our fields, one entry a row.

Headers are matched case-, space- and punctuation-insensitively: first the config's
`columns` (our field -> the file's header), then the usual names in export files.
"""

from __future__ import annotations

import csv
import io
import re
from pathlib import Path

from reporter.config import InputConfig
from reporter.errors import InputError, Problem
from reporter.ingest.entry import find_orcids, make_entry, split_list
from reporter.ingest.text import clean_value, decode_bytes
from reporter.records import LIST_FIELDS, RawEntry, ReadResult, Rejected

FORMAT = "csv"
_DELIMITERS = ",;\t|"
_SNIFF_SAMPLE = 65536  # characters; enough for the header and a few dozen rows
# Normalised header names (lower case, letters and digits only), most specific first.
_GUESSES: dict[str, tuple[str, ...]] = {
    "id": ("id", "recordid", "publicationid", "eid", "ut", "uniquewosid", "accessionnumber", "key"),
    "title": ("title", "articletitle", "documenttitle", "papertitle"),
    "abstract": ("abstract", "abstracttext", "abstractnote", "summary"),
    "keywords": ("authorkeywords", "keywords", "keyword"),
    "year": ("year", "publicationyear", "pubyear", "yearpublished", "publicationdate", "date"),
    "doi": ("doi", "digitalobjectidentifier"),
    "authors": ("authors", "author", "authornames", "authorfullnames"),
    "affiliations": (
        "affiliations", "affiliation", "addresses", "authoraffiliations", "authorswithaffiliations", "address",
    ),
    "departments": ("department", "departments", "unit", "units", "organisationalunit", "organizationalunit"),
    "orcids": ("orcid", "orcids", "orcidid", "orcidids", "orcidnumbers"),
    "doc_type": ("documenttype", "publicationtype", "type", "itemtype", "outputtype"),
    "venue": ("sourcetitle", "journal", "journaltitle", "venue", "source", "publicationtitle"),
    "language": ("language", "languageoforiginaldocument", "lang"),
    "url": ("url", "link"),
    "issn": ("issn",),
    # Awards of a portfolio (grant and finance system exports).
    "amount": ("amount", "awardamount", "awardvalue", "fundingamount", "grantamount", "totalaward", "awarded"),
    "currency": ("currency", "currencycode", "awardcurrency"),
}


def read_csv(path: Path, source_name: str, cfg: InputConfig, max_field_length: int) -> ReadResult:
    """Read one CSV file. Raises InputError when a configured column header is not in the file."""
    if cfg.delimiter is not None and len(cfg.delimiter) != 1:
        message = f"expected one character such as \",\", \";\" or \"\\t\", got {cfg.delimiter!r}"
        raise InputError(Problem(path, None, "delimiter", message))
    decoded = decode_bytes(path.read_bytes(), cfg.encoding)
    warnings = list(decoded.warnings)
    text = decoded.text
    delimiter = cfg.delimiter or sniff_delimiter(text)
    reader = csv.reader(io.StringIO(text, newline=""), delimiter=delimiter)
    header: list[str] | None = None
    mapping: dict[str, int] = {}
    entries: list[RawEntry] = []
    rejected: list[Rejected] = []
    n_rows = 0
    while True:
        start = reader.line_num + 1
        try:
            row = next(reader)
        except StopIteration:
            break
        except csv.Error as exc:
            rejected.append(Rejected(source_name, start, None, f"unparseable entry at line {start}: {exc}"))
            if reader.line_num < start:
                break  # the reader could not move past the fault
            continue
        if not any(cell.strip() for cell in row):
            continue  # blank lines and rows of empty cells are layout, not records
        if header is None:
            header = [clean_value(cell) for cell in row]
            mapping = map_columns(header, cfg, path)
            if "title" not in mapping:
                warnings.append(f"no title column found among the headers: {', '.join(header)}")
            continue
        n_rows += 1
        if len(row) > len(header) and not any(cell.strip() for cell in row[len(header):]):
            row = row[: len(header)]  # a trailing delimiter at the end of a row adds empty cells
        if len(row) != len(header):
            reason = f"unparseable entry at line {start}: row has {len(row)} cells, header has {len(header)}"
            rejected.append(Rejected(source_name, start, None, reason))
            continue
        values = _values(row, mapping, cfg.list_separator)
        native_id = row[mapping["id"]].strip() if "id" in mapping and row[mapping["id"]].strip() else f"row{n_rows}"
        entries.append(make_entry(source_name, start, FORMAT, native_id, values, max_field_length))
    return ReadResult(source_name, FORMAT, tuple(entries), tuple(rejected), tuple(warnings))


def sniff_delimiter(text: str) -> str:
    """csv.Sniffer over the candidates; when it cannot tell, the candidate most frequent in the header."""
    header = next((line for line in text.split("\n") if line.strip()), "")
    counts = {d: header.count(d) for d in _DELIMITERS}
    try:
        found = csv.Sniffer().sniff(text[:_SNIFF_SAMPLE], delimiters=_DELIMITERS).delimiter
    except csv.Error:
        found = ""
    if found and counts.get(found, 0) > 0:
        return found
    best = max(_DELIMITERS, key=lambda d: counts[d])
    return best if counts[best] else ","


def normalise_header(name: str) -> str:
    """"Author(s)" -> "authors", "Publication Year" -> "publicationyear"."""
    return re.sub(r"[\W_]+", "", name.casefold())


def map_columns(header: list[str], cfg: InputConfig, path: Path) -> dict[str, int]:
    """Our field -> column index; configured headers first, then the usual names."""
    names = [normalise_header(h) for h in header]
    mapping: dict[str, int] = {}
    for field_name, wanted in cfg.columns.items():
        key = normalise_header(wanted)
        if key not in names:
            message = f"no column headed {wanted!r}; the headers are: {', '.join(header)}"
            raise InputError(Problem(path, None, f"columns.{field_name}", message))
        mapping[field_name] = names.index(key)
    used = set(mapping.values())
    for field_name, candidates in _GUESSES.items():
        if field_name in mapping:
            continue
        for candidate in candidates:
            index = next((i for i, n in enumerate(names) if n == candidate and i not in used), None)
            if index is not None:
                mapping[field_name] = index
                used.add(index)
                break
    return mapping


def _values(row: list[str], mapping: dict[str, int], separator: str) -> dict[str, object]:
    values: dict[str, object] = {}
    for field_name, index in mapping.items():
        cell = row[index]
        if field_name == "id":
            continue
        if field_name == "orcids":
            values["orcids"] = find_orcids([cell])
        elif field_name in LIST_FIELDS:
            values[field_name] = split_list(cell, separator)
        else:
            values[field_name] = cell
    return values
