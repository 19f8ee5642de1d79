"""What the publication explorer shows: frozen dataclasses, a help string per field.

Filled by `render.explorer` from the record and score tables; the HTML report alone
carries the explorer (the PDF keeps its capped evidence appendix).
"""

from __future__ import annotations

from dataclasses import dataclass

from markupsafe import Markup

from reporter.render.context import _h  # the one help-string helper of the context types


@dataclass(frozen=True)
class ExplorerGoal:
    goal: str = _h("Goal code the publication is aligned with")
    title: str = _h("Goal short title")
    alignment_score: float = _h("The publication's alignment score for the goal")
    is_explicit: bool = _h("True when the publication mentions the goal explicitly")
    by_reviewer: bool = _h("True when a reviewer's decision made the publication aligned with the goal")


@dataclass(frozen=True)
class ExplorerEvidence:
    goals: tuple[str, ...] = _h("Goal codes this sentence is the evidence for (one sentence may serve several)")
    sentence: str = _h("Evidence sentence")


@dataclass(frozen=True)
class ExplorerRow:
    record_id: str = _h("Publication id")
    title: str = _h("Publication title")
    doi_url: str = _h("https://doi.org/ link for the DOI, '' when none")
    year: int = _h("Publication year")
    departments: tuple[str, ...] = _h("Department names; empty when none was recorded")
    countries: tuple[str, ...] = _h("Partner country names, sorted; empty for domestic-only work")
    goals: tuple[ExplorerGoal, ...] = _h("Aligned goals, highest alignment score first; empty when none")
    evidence: tuple[ExplorerEvidence, ...] = _h("Evidence sentences of the aligned goals, in the goals' order")


@dataclass(frozen=True)
class ExplorerOption:
    value: str = _h("Value the script filters on (goal code, list position, year, 'any' or 'none')")
    label: str = _h("Option text as shown")


@dataclass(frozen=True)
class ExplorerSection:
    rows: tuple[ExplorerRow, ...] = _h("Every analysed publication, newest year first, then by title")
    years: tuple[int, ...] = _h("Years the goal profile pools, oldest first: the explorer's scope")
    n_not_listed: int = _h("Kept publications outside that scope or without scores (not listed)")
    goal_options: tuple[ExplorerOption, ...] = _h("Goal filter: any goal, no goal, then each goal")
    department_options: tuple[ExplorerOption, ...] = _h("Department filter, by name; 'no department recorded' last")
    country_options: tuple[ExplorerOption, ...] = _h("Partner country filter, by name; domestic only last")
    year_options: tuple[ExplorerOption, ...] = _h("Year filter, newest first")
    n_rows_at_once: int = _h("Rows the script lists at once; more follow on request (laying out thousands takes seconds)")
    data_json: Markup = _h("Per row: year, aligned goals with scores, department and country option values; "
                           "JSON escaped for a <script> element")
    script: Markup = _h("The theme's explorer.js: filters, live count and sortable columns")
