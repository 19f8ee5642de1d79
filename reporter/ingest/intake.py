"""Inputs -> IntakeResult: the record table (RECORD_COLUMNS, kept records) and the intake log
(INTAKE_LOG_COLUMNS, one row per record read, kept or set aside with the reason).

Nothing is written here. A missing or unreadable file raises InputError naming it.
"""

from __future__ import annotations

import codecs
import dataclasses
import math
import re
from collections.abc import Iterable, Mapping
from pathlib import Path, PurePosixPath

import pandas as pd

from reporter.config import InputConfig, LimitsConfig
from reporter.errors import InputError, Problem
from reporter.ingest.amounts import NOT_IN_FUNDING, read_amount
from reporter.ingest.formats import READERS, guess_format, why_nothing_read
from reporter.records import (
    FUNDING_COLUMNS, INTAKE_LOG_COLUMNS, RECORD_COLUMNS, IntakeResult, RawEntry, ReadResult, Rejected,
)

_YEAR_RUN = re.compile(r"(?<!\d)\d{4}")
MIN_YEAR, MAX_YEAR = 1900, 2100  # outside this a four-digit run is a page or volume number
_TEXT_COLUMNS = ("title", "abstract", "doi", "doc_type", "venue", "language")
_LIST_COLUMNS = ("keywords", "authors", "affiliations", "departments", "orcids")


def read_inputs(
    inputs: tuple[InputConfig, ...], years: tuple[int, ...], limits: LimitsConfig, base_dir: Path,
    default_currency: str | None = None,
) -> IntakeResult:
    """Read every configured input and account for each record read.

    An amount without a currency of its own is in its input's `currency`, else in `default_currency`
    (funding.base_currency).
    """
    results = tuple(
        _read_input(index, cfg, limits.max_field_length, base_dir) for index, cfg in enumerate(inputs)
    )
    currencies = {result.source_file: cfg.currency or default_currency or "" for result, cfg in zip(results, inputs)}
    return build_intake(results, years, currencies)


def _read_input(index: int, cfg: InputConfig, max_field_length: int, base_dir: Path) -> ReadResult:
    path = cfg.path if cfg.path.is_absolute() else base_dir / cfg.path
    key = f"inputs[{index}].path"
    if not path.exists():
        raise InputError(Problem(path, None, key, "file not found"))
    if not path.is_file():
        raise InputError(Problem(path, None, key, "not a file (a folder?); give the path of an export file"))
    if cfg.encoding:
        try:
            codecs.lookup(cfg.encoding)
        except LookupError:
            message = f"unknown encoding {cfg.encoding!r}; try \"utf-8\", \"utf-16\" or \"cp1252\""
            raise InputError(Problem(path, None, f"inputs[{index}].encoding", message)) from None
    try:
        fmt = cfg.format or guess_format(path, cfg.encoding)
        if fmt is None:
            message = 'cannot tell the format from the file name or content; set format = "bibtex", "ris" or "csv"'
            raise InputError(Problem(path, None, f"inputs[{index}].format", message))
        result = READERS[fmt](path, source_name(path, base_dir), cfg, max_field_length)
        if result.n_read == 0:
            # A configured export that yields nothing is worth a line that says why, or it vanishes unnoticed.
            result = dataclasses.replace(result, warnings=why_nothing_read(path, fmt, cfg.encoding, result.warnings))
        return result
    except OSError as exc:
        raise InputError(Problem(path, None, key, f"cannot read the file: {exc.strerror or exc}")) from None
    except InputError as exc:
        # Readers name only their own key (e.g. "columns.title"); put it under this input.
        raise InputError(
            [
                p if p.key.startswith("inputs[") else Problem(p.path, p.line, f"inputs[{index}].{p.key}", p.message)
                for p in exc.problems
            ]
        ) from None


def source_name(path: Path, base_dir: Path) -> str:
    """The path relative to the config folder when it lies inside it, as a posix string."""
    try:
        return path.resolve().relative_to(base_dir.resolve()).as_posix()
    except ValueError:
        return path.as_posix()


def parse_year(text: object) -> int | None:
    """The first plausible year in the text: "2025a" -> 2025, "12/2021" -> 2021, "in press" -> None."""
    if not isinstance(text, str):
        return None
    for match in _YEAR_RUN.finditer(text):
        year = int(match.group(0))
        if MIN_YEAR <= year <= MAX_YEAR:
            return year
    return None


def build_intake(
    results: Iterable[ReadResult], years: tuple[int, ...], currencies: Mapping[str, str] | None = None
) -> IntakeResult:
    """Records and intake log from reader results; record ids are unique across all results.

    `currencies` maps a source file to the currency of its amounts that name none.
    """
    results = tuple(results)
    # A portfolio is a run in which any record carries an amount; then every kept record without a
    # usable one is flagged, since a blank cell and a missing column look the same once read.
    is_portfolio = any("amount" in entry.fields for result in results for entry in result.entries)
    currencies = currencies or {}
    taken: set[str] = set()
    log_rows: list[dict[str, object]] = []
    record_rows: list[dict[str, object]] = []
    warnings: list[str] = []
    for result in results:
        warnings.extend(f"{result.source_file}: {w}" for w in result.warnings)
        stem = PurePosixPath(result.source_file).stem
        items: list[RawEntry | Rejected] = [*result.entries, *result.rejected]
        # File order, so the log reads like the file; rejects without a line go last.
        items.sort(key=lambda item: item.source_line if item.source_line is not None else 1 << 62)
        for item in items:
            if isinstance(item, Rejected):
                native_id = item.native_id or f"line{item.source_line}"
                record_id = _unique_id(f"{stem}:{native_id}", taken)
                log_rows.append(
                    _log_row(record_id, item, result.format, native_id=native_id, status="set_aside", reason=item.reason)
                )
                continue
            record_id = _unique_id(f"{stem}:{item.native_id}", taken)
            title = str(item.fields.get("title", ""))
            year = parse_year(item.fields.get("year"))
            reason = _set_aside_reason(title, year, years)
            status = "set_aside" if reason else "kept"
            funding = _funding_values(item, currencies.get(result.source_file, ""), is_portfolio)
            flags = "" if reason else ";".join(_flags(item, funding[2]))
            log_rows.append(
                _log_row(record_id, item, item.format, native_id=item.native_id, title=title, year=year,
                         status=status, reason=reason, flags=flags)
            )
            if year is not None and not reason:
                record_rows.append(_record_row(record_id, item, year, funding))
    files = tuple((r.source_file, r.n_read, r.warnings[-1] if r.n_read == 0 and r.warnings else "") for r in results)
    return IntakeResult(records=_records_frame(record_rows), log=_log_frame(log_rows), warnings=tuple(warnings),
                        files=files)


def _set_aside_reason(title: str, year: int | None, years: tuple[int, ...]) -> str:
    if not title:
        return "no title"
    if year is None:
        return "no usable year"
    if years and year not in years:
        return f"outside the configured years ({year})"
    return ""


def _flags(entry: RawEntry, funding_note: str) -> list[str]:
    flags = [] if entry.fields.get("abstract") else ["no_abstract"]
    flags.extend(f"cut:{name}" for name in entry.cut_fields)
    flags.extend(entry.notes)
    if funding_note:
        flags.append(f"{NOT_IN_FUNDING}:{funding_note}")
    return flags


def _funding_values(entry: RawEntry, default_currency: str, is_portfolio: bool) -> tuple[float, str, str]:
    """(amount, currency, why not in the funding figures); outside a portfolio no record needs an amount."""
    if not is_portfolio:
        return math.nan, "", ""
    return read_amount(entry.fields.get("amount"), entry.fields.get("currency"), default_currency)


def _unique_id(candidate: str, taken: set[str]) -> str:
    record_id, number = candidate, 2
    while record_id in taken:
        record_id = f"{candidate}~{number}"
        number += 1
    taken.add(record_id)
    return record_id


def _log_row(record_id: str, item: RawEntry | Rejected, fmt: str, **values: object) -> dict[str, object]:
    """A log row; text columns not given are "" (merged_into is filled in by enrich)."""
    row: dict[str, object] = dict.fromkeys(INTAKE_LOG_COLUMNS, "")
    row.update(record_id=record_id, source_file=item.source_file, source_line=item.source_line, format=fmt, year=None)
    row.update(values)
    return row


def _record_row(record_id: str, entry: RawEntry, year: int, funding: tuple[float, str, str]) -> dict[str, object]:
    row: dict[str, object] = {
        "record_id": record_id, "source_file": entry.source_file, "source_line": entry.source_line,
        "format": entry.format, "native_id": entry.native_id, "year": year,
    }
    row.update({name: str(entry.fields.get(name, "")) for name in _TEXT_COLUMNS})
    row.update({name: tuple(entry.fields.get(name, ())) for name in _LIST_COLUMNS})  # type: ignore[arg-type]
    row["has_abstract"] = bool(row["abstract"])
    row.update(zip(FUNDING_COLUMNS, funding))
    return row


def _records_frame(rows: list[dict[str, object]]) -> pd.DataFrame:
    frame = pd.DataFrame(rows, columns=[*RECORD_COLUMNS, *FUNDING_COLUMNS])
    return frame.astype({"source_line": "int64", "year": "int64", "has_abstract": "bool", "amount": "float64"})


def _log_frame(rows: list[dict[str, object]]) -> pd.DataFrame:
    frame = pd.DataFrame(rows, columns=list(INTAKE_LOG_COLUMNS))
    # Nullable integers: rejected entries may have no line, set-aside records no year.
    return frame.astype({"source_line": "Int64", "year": "Int64"})
