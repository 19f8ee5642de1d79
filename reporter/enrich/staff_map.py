"""Staff map CSV (name, department, optional orcid) -> `StaffMap`; bad rows raise InputError.

Several rows may describe one person (name variants, or one row per department). Rows
with the same ORCID iD are one person; rows without one are told apart by their name.
"""

from __future__ import annotations

import csv
import io
import re
import unicodedata
from collections import defaultdict
from dataclasses import dataclass
from pathlib import Path
from types import MappingProxyType
from typing import Mapping

from reporter.errors import InputError, Problem
from reporter.sidefiles import read_side_file

_KEY = "departments.staff_map"
_ORCID = re.compile(r"\d{4}-\d{4}-\d{4}-\d{3}[\dX]")
# Lower-case name particles that belong to the last name in "First van der Last" order.
_PARTICLES = frozenset({"van", "von", "der", "den", "de", "del", "della", "da", "di", "du", "dos",
                        "la", "le", "ni", "nic", "o", "mac", "mc", "ter", "ten", "al", "el", "bin"})
_SUFFIXES = frozenset({"jr", "sr", "ii", "iii", "iv"})


@dataclass(frozen=True)
class StaffName:
    """One written form of a staff member's name."""

    person: str  # ORCID iD, else the normalised name: rows sharing it are one person
    last: str  # accent-free, case-folded last name with spaces and punctuation removed
    given: tuple[str, ...]  # given names or initials, accent-free and case-folded


@dataclass(frozen=True)
class StaffMap:
    names_by_last: Mapping[str, tuple[StaffName, ...]]
    person_departments: Mapping[str, frozenset[str]]  # person -> departments (before aliases)
    orcid_person: Mapping[str, str]


def normalise_orcid(text: object) -> str:
    """"0000-0002-1825-0097" from an ORCID iD in any usual form (bare, URL, lower-case x)."""
    match = _ORCID.search(str(text or "").upper())
    return match.group(0) if match else ""


def parse_name(text: str) -> tuple[str, tuple[str, ...]]:
    """(last-name key, given-name tokens) from "Last, First M." or "First M. Last"."""
    decomposed = unicodedata.normalize("NFKD", text)
    bare = "".join(ch for ch in decomposed if not unicodedata.combining(ch)).strip()
    if "," in bare:
        last, given = (part.strip() for part in bare.split(",", 1))
    else:
        words = bare.split()
        cut = len(words) - 1
        while cut > 0 and words[cut - 1].casefold().strip(".") in _PARTICLES:
            cut -= 1
        last, given = " ".join(words[cut:]), " ".join(words[:cut])
    # "Smith, JM" (Vancouver style): capitals without dots are initials -- unless the whole
    # name is in capitals ("SMITH, ANN"), where they are just the export's lettercase.
    vancouver = not last.isupper() and all(len(w) <= 3 and w.isalpha() for w in given.split())
    if given and given.isupper() and vancouver:
        given = " ".join("".join(given.split()))
    tokens = tuple(t for t in re.findall(r"[^\W_]+", given.casefold()) if t not in _SUFFIXES)
    return re.sub(r"[\W_]+", "", last.casefold()), tokens


def read_staff_map(path: Path) -> StaffMap:
    """Read and check the staff map; every bad row is reported at once with its line."""
    text = read_side_file(path, _KEY, "staff map")
    lines = text.splitlines()
    if not any(line.strip() for line in lines):
        raise InputError(Problem(path, None, _KEY, "staff map is empty"))
    try:
        dialect = csv.Sniffer().sniff(lines[0], delimiters=",;\t")
    except csv.Error:
        dialect = csv.excel
    reader = csv.reader(io.StringIO(text), dialect)
    header = [h.strip().casefold() for h in next(reader)]
    missing = [c for c in ("name", "department") if c not in header]
    if missing:
        found = ", ".join(header) or "nothing"
        raise InputError(Problem(path, 1, _KEY, f"missing column {', '.join(missing)} (found: {found})"))
    col = {name: header.index(name) for name in ("name", "department", "orcid") if name in header}

    problems: list[Problem] = []
    names: dict[str, list[StaffName]] = defaultdict(list)
    departments: dict[str, set[str]] = defaultdict(set)
    orcids: dict[str, str] = {}
    line = reader.line_num
    for row in reader:
        start, line = line + 1, reader.line_num
        if not any(cell.strip() for cell in row):
            continue
        cell = {name: row[i].strip() if i < len(row) else "" for name, i in col.items()}
        name, department, orcid_text = cell["name"], cell["department"], cell.get("orcid", "")
        orcid = normalise_orcid(orcid_text)
        if not name:
            problems.append(Problem(path, start, "name", "row has no name"))
        if not department:
            problems.append(Problem(path, start, "department", f"no department for {name!r}"))
        if orcid_text and not orcid:
            problems.append(Problem(path, start, "orcid", f"not an ORCID iD: {orcid_text!r}"))
        last, given = parse_name(name) if name else ("", ())
        if name and not last:
            problems.append(Problem(path, start, "name", f"no last name in {name!r}"))
        if problems and problems[-1].line == start:
            continue
        person = orcid or f"{last}|{' '.join(given)}"
        names[last].append(StaffName(person, last, given))
        departments[person].add(department)
        if orcid:
            orcids[orcid] = person
    if problems:
        raise InputError(problems)
    return StaffMap(
        names_by_last=MappingProxyType({k: tuple(v) for k, v in names.items()}),
        person_departments=MappingProxyType({k: frozenset(v) for k, v in departments.items()}),
        orcid_person=MappingProxyType(orcids),
    )
