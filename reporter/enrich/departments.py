"""Departments per record: the export's department column plus authors found in the staff map.

Matching, in order: (1) a record ORCID iD equal to a staff member's; (2) each author name
against staff names -- same last name (accents, case, spaces and punctuation ignored) and
compatible given names: position by position equal, or an initial that starts the other
name ("Murphy, A. B." fits "Murphy, Aoife B" and "Murphy, Aoife"). An author with no given
name is not matched. When the staff who fit one author belong to different departments,
nothing is guessed (unless exactly one of them was already found by ORCID iD on this
record); the author is noted in the intake log as "department_ambiguous:<author>".
Aliases map department names (exact, then ignoring case and spacing) to the reported name.
"""

from __future__ import annotations

from typing import Mapping

import pandas as pd

from reporter.enrich.staff_map import StaffMap, normalise_orcid, parse_name


def compatible(given_a: tuple[str, ...], given_b: tuple[str, ...]) -> bool:
    """Given-name tokens agree where both have one; an initial fits a name with that letter."""
    if not given_a or not given_b:
        return False
    for a, b in zip(given_a, given_b):
        if a == b:
            continue
        if (len(a) == 1 and b.startswith(a)) or (len(b) == 1 and a.startswith(b)):
            continue
        return False
    return True


def match_author(author: str, staff: StaffMap) -> set[str]:
    """Persons in the staff map whose name fits `author`."""
    last, given = parse_name(author)
    return {n.person for n in staff.names_by_last.get(last, ()) if compatible(given, n.given)}


def apply_aliases(department: str, aliases: Mapping[str, str]) -> str:
    """The reported name of a department, via `aliases` (exact, then case- and space-blind)."""
    name = " ".join(department.split())
    if name in aliases:
        return aliases[name]
    folded = {" ".join(k.split()).casefold(): v for k, v in aliases.items()}
    return folded.get(name.casefold(), name)


def add_departments(
    records: pd.DataFrame, staff: StaffMap | None, aliases: Mapping[str, str]
) -> tuple[pd.DataFrame, dict[str, list[str]]]:
    """Return (new records with the departments union, record id -> ambiguity flags)."""
    out = records.copy()
    flags: dict[str, list[str]] = {}
    result: list[tuple[str, ...]] = []
    for row in records.itertuples(index=False):
        found: set[str] = set(row.departments or ())
        if staff is not None:
            matched, ambiguous = _staff_departments(row.authors or (), row.orcids or (), staff)
            found |= matched
            if ambiguous:
                flags[row.record_id] = [f"department_ambiguous:{a}" for a in ambiguous]
        named = {apply_aliases(d, aliases) for d in found if d and d.strip()}
        result.append(tuple(sorted(named)))
    out["departments"] = pd.Series(result, index=out.index, dtype=object)
    return out, flags


def _staff_departments(
    authors: tuple[str, ...], orcids: tuple[str, ...], staff: StaffMap
) -> tuple[set[str], list[str]]:
    by_orcid = {staff.orcid_person[o] for o in map(normalise_orcid, orcids) if o in staff.orcid_person}
    departments: set[str] = set()
    for person in by_orcid:
        departments |= staff.person_departments[person]
    ambiguous: list[str] = []
    for author in authors:
        persons = match_author(author, staff)
        options = {staff.person_departments[p] for p in persons}
        if len(options) > 1:
            known = persons & by_orcid
            if len(known) != 1:
                ambiguous.append(author)
                continue
            options = {staff.person_departments[p] for p in known}
        for option in options:
            departments |= option
    return departments, ambiguous
