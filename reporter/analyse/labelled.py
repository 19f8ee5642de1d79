"""Labelled sample CSV (record_id or doi, goals, optional note) -> `LabelledSample` matched to kept records.

Rows are matched by record id, else by normalised DOI. Rows that match no kept record are
listed with their line (`unmatched`), never dropped silently; malformed rows raise InputError.
"""

from __future__ import annotations

import csv
import io
from dataclasses import dataclass
from pathlib import Path

import pandas as pd

from reporter.enrich.doi import normalise_doi
from reporter.errors import InputError, Problem
from reporter.sidefiles import read_side_file

_KEY = "validation.labelled_sample"
NO_GOAL = "none"  # the word a labeller writes for a publication that addresses no goal
#: Columns of `LabelledSample.labels`.
LABEL_COLUMNS = ("record_id", "goals", "note", "line")  # goals: tuple[str], empty for "none"


@dataclass(frozen=True)
class UnmatchedLabel:
    line: int
    given: str  # the record id or DOI as written in the file
    reason: str


@dataclass(frozen=True)
class LabelledSample:
    path: Path
    labels: pd.DataFrame  # LABEL_COLUMNS, one row per matched publication, in file order
    unmatched: tuple[UnmatchedLabel, ...]
    n_rows: int  # labelled rows read (matched + unmatched)

    def without(self, record_ids: set[str], reason: str) -> "LabelledSample":
        """A copy where the given matched records move to `unmatched` with `reason` (e.g. not scored)."""
        gone = self.labels["record_id"].isin(record_ids)
        moved = tuple(UnmatchedLabel(int(r.line), r.record_id, reason) for r in self.labels[gone].itertuples())
        unmatched = tuple(sorted(self.unmatched + moved, key=lambda u: u.line))
        return LabelledSample(self.path, self.labels[~gone].reset_index(drop=True), unmatched, self.n_rows)


def read_labelled_sample(path: Path, records: pd.DataFrame, goal_codes: tuple[str, ...]) -> LabelledSample:
    """Read the labelled sample and match it to `records` (the kept records: record_id, doi)."""
    path = Path(path)
    text = read_side_file(path, _KEY, "labelled sample")
    reader = csv.reader(io.StringIO(text))
    header = [h.strip().casefold() for h in next(reader, [])]
    if "goals" not in header or not {"record_id", "doi"} & set(header):
        found = ", ".join(h for h in header if h) or "nothing"
        raise InputError(Problem(path, 1, _KEY, f"expected columns record_id or doi, and goals (found: {found})"))
    col = {name: header.index(name) for name in ("record_id", "doi", "goals", "note") if name in header}

    ids = set(records["record_id"].astype(str))
    by_doi = records.loc[records["doi"].astype(str) != "", ["doi", "record_id"]].astype(str)
    doi_owners = by_doi.groupby("doi")["record_id"].agg(tuple).to_dict()
    problems: list[Problem] = []
    rows: list[tuple] = []
    unmatched: list[UnmatchedLabel] = []
    first_line: dict[str, int] = {}
    n_rows, line = 0, reader.line_num
    for row in reader:
        start, line = line + 1, reader.line_num
        cell = {name: row[i].strip() if i < len(row) else "" for name, i in col.items()}
        if not any(cell.values()):
            continue
        n_rows += 1
        goals = _parse_goals(cell["goals"], goal_codes, path, start, problems)
        given_id, given_doi = cell.get("record_id", ""), cell.get("doi", "")
        if not given_id and not given_doi:
            problems.append(Problem(path, start, "record_id", "row has neither a record_id nor a doi"))
            continue
        record_id, reason = _match(given_id, given_doi, ids, doi_owners)
        if record_id is None:
            unmatched.append(UnmatchedLabel(start, given_id or given_doi, reason))
            continue
        if record_id in first_line:
            problems.append(Problem(
                path, start, "record_id", f"publication {record_id} is labelled twice (first on line {first_line[record_id]})"
            ))
            continue
        first_line[record_id] = start
        if goals is not None:
            rows.append((record_id, goals, cell.get("note", ""), start))
    if problems:
        raise InputError(problems)
    return LabelledSample(path, pd.DataFrame(rows, columns=list(LABEL_COLUMNS)), tuple(unmatched), n_rows)


def _parse_goals(text: str, goal_codes: tuple[str, ...], path: Path, line: int, problems: list[Problem]):
    """Goal codes of one cell as a tuple in framework order; None (with a Problem) when malformed."""
    parts = [part.strip() for part in text.split(";") if part.strip()]
    if not parts:
        problems.append(Problem(path, line, "goals", f"no goals given; write {NO_GOAL!r} for a publication with no goal"))
        return None
    if any(part.casefold() == NO_GOAL for part in parts):
        if len(parts) > 1:
            problems.append(Problem(path, line, "goals", f"{NO_GOAL!r} cannot be combined with goal codes, got {text!r}"))
            return None
        return ()
    unknown = [part for part in parts if part not in goal_codes]
    if unknown:
        listed = ", ".join(goal_codes)
        problems.append(Problem(
            path, line, "goals", f"unknown goal code {', '.join(map(repr, unknown))} (goal codes are {listed})"
        ))
        return None
    return tuple(code for code in goal_codes if code in parts)


def _match(given_id: str, given_doi: str, ids: set[str], doi_owners: dict[str, tuple]) -> tuple[str | None, str]:
    if given_id and given_id in ids:
        return given_id, ""
    reasons = [f"record_id {given_id!r} is not among the kept records"] if given_id else []
    if given_doi:
        doi = normalise_doi(given_doi)
        owners = doi_owners.get(doi, ()) if doi else ()
        if len(owners) == 1:
            return owners[0], ""
        if not doi:
            reasons.append(f"{given_doi!r} is not a DOI")
        elif owners:
            reasons.append(f"DOI {doi} belongs to {len(owners)} kept records ({', '.join(owners)})")
        else:
            reasons.append(f"no kept record has DOI {doi}")
    return None, "; ".join(reasons)
