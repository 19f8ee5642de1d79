"""What a department brief's templates see: one department's findings beside the institution's -> `BriefContext`.

The department's figures come from `analyse` run on its publications (analyse/departments.py),
the institution's from the main `Findings`; here they are only arranged, and a too-small
department's shares are left out rather than handed to the template.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass, field
from typing import Any, Sequence

from markupsafe import Markup

from reporter.analyse.departments import DepartmentFindings
from reporter.render.appendix import build_evidence
from reporter.render.brief_chart import draw_brief_profile
from reporter.render.branding import build_branding, build_theme_view
from reporter.render.context import (
    Branding, ChangeSection, Chart, CountRow, EvidenceGoal, GoalRow, RenderInputs, SectionLink, ThemeView,
)
from reporter.render.sections import N_LEADING_GOALS, change_section, goal_rows
from reporter.render.themes import Theme

EVIDENCE_PER_GOAL = 2  # a brief is one or two printed pages; data/evidence.csv holds the rest
STYLESHEET = "brief.css"

#: A brief's sections in reading order: (anchor, heading, partial).
SECTIONS = (
    ("key-figures", "Key figures", "_brief_figures.html"),
    ("goal-profile", "Goal profile against the institution", "_brief_profile.html"),
    ("change-over-time", "Change over time", "_brief_change.html"),
    ("evidence", "Strongest evidence", "_brief_evidence.html"),
    ("notes", "Notes and cautions", "_brief_notes.html"),
)


def _h(text: str, **kwargs: Any) -> Any:
    return field(metadata={"help": text}, **kwargs)


@dataclass(frozen=True)
class BriefFigures:
    n_publications: int = _h("The department's publications analysed (every year in scope)")
    n_aligned_any: float | None = _h("Of them aligned with at least one goal; None when the department is too small")
    share: float | None = _h("Share aligned with at least one goal; None when the department is too small")
    share_low: float | None = _h("Lower interval bound of share; None when too small")
    share_high: float | None = _h("Upper interval bound of share; None when too small")
    n_explicit_any: float | None = _h("Publications that mention a goal explicitly; None when too small")
    institution_n: int = _h("The institution's publications analysed")
    institution_share: float = _h("The institution's share aligned with at least one goal")
    institution_low: float = _h("Lower interval bound of the institution's share")
    institution_high: float = _h("Upper interval bound of the institution's share")
    per_year: tuple[CountRow, ...] = _h("The department's publications per year in scope: label = year, n; share None")


@dataclass(frozen=True)
class BriefGoalRow:
    goal: str = _h("Goal code")
    title: str = _h("Goal short title")
    department: GoalRow | None = _h("The department's figures for the goal; None when the department is too small")
    institution: GoalRow = _h("The institution's figures for the goal, from the main report")


@dataclass(frozen=True)
class BriefProfile:
    rows: tuple[BriefGoalRow, ...] = _h("One row per goal, framework order")
    chart: Chart | None = _h("Department share per goal with interval, institution share marked; None when too small")


@dataclass(frozen=True)
class BriefNotes:
    small_years: tuple[CountRow, ...] = _h("Years with some publications but fewer than min_group_size: label, n")
    empty_years: tuple[int, ...] = _h("Years in scope without a publication of the department")
    n_non_english: int = _h("The department's publications not in English (scored with lower reliability)")
    counting: str = _h("The main report's counting mode, 'full' or 'fractional' (a brief always counts in full)")


@dataclass(frozen=True)
class BriefContext:
    title: str = _h("'<department>: department brief', for the page title and running head")
    report_title: str = _h("Title of the full report from report.title, which the brief points to")
    branding: Branding = _h("Institution name, logo, accent colour")
    department: str = _h("Department name as recorded")
    reporting_year: int = _h("The year the report is about")
    years: tuple[int, ...] = _h("Years in scope in which the department has publications, oldest first")
    institution_years: tuple[int, ...] = _h("Years in scope in which the institution has publications")
    generated_at: str = _h("When the brief was made (the same moment as the full report)")
    software: str = _h("'Waymark <version>'")
    sections: tuple[SectionLink, ...] = _h("The brief's sections in reading order")
    is_too_small: bool = _h("True when the department has fewer than min_group_size publications: counts, no shares")
    min_group_size: int = _h("Groups with fewer publications are shown as too small")
    figures: BriefFigures = _h("Key figures of the department beside the institution's")
    profile: BriefProfile = _h("The department's goal profile against the institution's")
    change: ChangeSection = _h("The department's change: reporting year against the pooled comparison years")
    evidence: tuple[EvidenceGoal, ...] = _h("The department's leading goals (most aligned publications), strongest first")
    evidence_per_goal: int = _h("At most this many publications per goal")
    notes: BriefNotes = _h("The department's own suppression and reliability notes")
    theme: ThemeView = _h("Stylesheets (the report's and brief.css) and page settings")


def build_brief_context(department: DepartmentFindings, inputs: RenderInputs, report: object, theme: Theme,
                        medium: str = "screen") -> BriefContext:
    """Everything a brief's templates see; `inputs` are the full report's, `report` the `ReportConfig`."""
    goals = tuple((str(code), str(title)) for code, title in inputs.goals)
    own, main = department.findings, inputs.findings
    too_small = department.is_too_small
    meta = own.meta
    rows = _profile_rows(goal_rows(own.goals, goals), goal_rows(main.goals, goals), too_small)
    reporting_year, min_size = int(report.reporting_year), int(meta["min_group_size"])
    per_year = own.by_year.groupby("year", sort=True)["n_publications"].max()  # every year in scope
    return BriefContext(
        title=f"{department.department}: department brief",
        report_title=report.title,
        branding=build_branding(report),
        department=department.department,
        reporting_year=reporting_year,
        years=tuple(int(y) for y in meta.get("years_present", ())),
        institution_years=tuple(int(y) for y in main.meta.get("years_present", main.meta.get("years", ()))),
        generated_at=inputs.generated_at,
        software=f"Waymark {inputs.manifest.get('waymark_version', '')}".strip(),
        sections=tuple(SectionLink(*section) for section in SECTIONS),
        is_too_small=too_small,
        min_group_size=min_size,
        figures=_figures(own.headline, main.headline, per_year, too_small),
        profile=BriefProfile(rows=rows, chart=None if too_small else draw_brief_profile(
            rows, department.department, theme)),
        change=change_section(own, goals, reporting_year, None),
        evidence=_evidence(inputs, set(department.record_ids), goals),
        evidence_per_goal=EVIDENCE_PER_GOAL,
        notes=BriefNotes(
            small_years=tuple(CountRow(str(int(y)), int(n), None) for y, n in per_year.items() if 0 < n < min_size),
            empty_years=tuple(int(y) for y, n in per_year.items() if n == 0),
            n_non_english=int(own.coverage.get("n_non_english", 0)),
            counting=str(main.meta.get("counting", "full")),
        ),
        theme=brief_theme_view(theme, report, medium),
    )


def brief_theme_view(theme: Theme, report: object, medium: str) -> ThemeView:
    """The report's styles for the medium, then the theme's brief.css (cascading like the others)."""
    view = build_theme_view(theme, report, medium)
    return dataclasses.replace(view, css=Markup(view.css + "\n" + theme.stylesheet(STYLESHEET)))


def _profile_rows(own: Sequence[GoalRow], institution: Sequence[GoalRow], too_small: bool) -> tuple[BriefGoalRow, ...]:
    by_goal = {row.goal: row for row in own}
    return tuple(
        BriefGoalRow(goal=row.goal, title=row.title, department=None if too_small else by_goal.get(row.goal),
                     institution=row)
        for row in institution
    )


def _figures(head: dict, inst: dict, per_year, too_small: bool) -> BriefFigures:
    def shown(key: str) -> float | None:
        return None if too_small else head[key]

    return BriefFigures(
        n_publications=int(head["n_publications"]),
        n_aligned_any=shown("n_aligned_any"),
        share=shown("share_aligned_any"),
        share_low=shown("share_aligned_any_low"),
        share_high=shown("share_aligned_any_high"),
        n_explicit_any=shown("n_explicit_any"),
        institution_n=int(inst["n_publications"]),
        institution_share=inst["share_aligned_any"],
        institution_low=inst["share_aligned_any_low"],
        institution_high=inst["share_aligned_any_high"],
        per_year=tuple(CountRow(str(int(year)), int(n), None) for year, n in per_year.items()),
    )


def _evidence(inputs: RenderInputs, ids: set[str], goals) -> tuple[EvidenceGoal, ...]:
    """The strongest publications of the department's leading goals (most aligned publications first)."""
    scores = inputs.scores.loc[inputs.scores["record_id"].astype(str).isin(ids)]
    blocks = build_evidence(dataclasses.replace(inputs, scores=scores), goals, EVIDENCE_PER_GOAL)
    # Ranked by the number of aligned publications, which within one department orders as the share
    # does, and which a too-small department (no shares shown) has as well; ties in framework order.
    ranked = sorted((block for block in blocks if block.n_total), key=lambda block: -block.n_total)
    return tuple(ranked[:N_LEADING_GOALS])
