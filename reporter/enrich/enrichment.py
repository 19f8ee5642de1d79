"""enrich(intake, report, departments) -> a new IntakeResult with ENRICHED_COLUMNS filled in.

Steps, in this order: DOIs are normalised before duplicates are sought (so "doi:10.1/X" and
"https://doi.org/10.1/x" meet); duplicates are merged before language and countries, so
those read the merged fields once; departments come last as they need the merged authors.
"""

from __future__ import annotations

from collections import defaultdict

from reporter.config import DepartmentConfig, ReportConfig
from reporter.enrich.countries import add_countries
from reporter.enrich.dedupe import dedupe
from reporter.enrich.departments import add_departments
from reporter.enrich.doi import normalise_dois
from reporter.enrich.intake_log import add_flags, mark_merged
from reporter.enrich.language import add_languages
from reporter.enrich.language_memo import LanguageMemo
from reporter.enrich.staff_map import read_staff_map
from reporter.records import (
    ENRICHED_COLUMNS,
    INTAKE_LOG_COLUMNS,
    RECORD_COLUMNS,
    IntakeResult,
    require_columns,
)


def enrich(intake: IntakeResult, report: ReportConfig, departments: DepartmentConfig,
           languages: LanguageMemo | None = None) -> IntakeResult:
    """Normalise DOIs, merge duplicates, detect language, find countries and departments.

    `languages` holds earlier runs' detection results (the score cache's file), if kept.
    """
    if not isinstance(intake, IntakeResult):
        raise TypeError(f"enrich: expected an IntakeResult, got {type(intake).__name__}")
    require_columns(intake.records, RECORD_COLUMNS, "enrich: records")
    require_columns(intake.log, INTAKE_LOG_COLUMNS, "enrich: intake log")
    # Read the staff map first: a bad map stops the run before any slower step.
    staff = read_staff_map(departments.staff_map) if departments.staff_map is not None else None

    flags: dict[str, list[str]] = defaultdict(list)
    records, bad_dois = normalise_dois(intake.records)
    for record_id in bad_dois:
        flags[record_id].append("doi_not_recognised")
    records, merged = dedupe(records)
    records, language_flags = add_languages(records, memo=languages)
    records = add_countries(records, report.home_country)
    records, department_flags = add_departments(records, staff, departments.aliases)
    for extra in (language_flags, department_flags):
        for record_id, values in extra.items():
            flags[record_id].extend(values)

    log = add_flags(mark_merged(intake.log, merged), flags)
    warnings = list(intake.warnings)
    n_ambiguous = sum(len(v) for v in department_flags.values())
    if n_ambiguous:
        warnings.append(
            f"staff map: {n_ambiguous} author name(s) fit staff in different departments and were "
            "not assigned; see 'department_ambiguous' in the intake log"
        )
    columns = [*RECORD_COLUMNS, *ENRICHED_COLUMNS]
    extra_columns = [c for c in records.columns if c not in columns]
    records = records[columns + extra_columns].reset_index(drop=True)
    return IntakeResult(records=records, log=log, warnings=tuple(warnings), files=intake.files)

