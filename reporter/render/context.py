"""What a template sees: `RenderInputs` (plain data from earlier stages) -> `ReportContext`.

Every field carries a help string (`field.metadata["help"]`); a test fails on a field
without one. Numbers arrive ready (no template arithmetic), orderings are fixed here,
and charts are SVG strings drawn before rendering.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any

import pandas as pd
from markupsafe import Markup

from reporter.analyse.findings import Findings

if TYPE_CHECKING:  # context_validation imports Chart from here; annotations are strings anyway
    from reporter.render.context_explorer import ExplorerSection
    from reporter.render.context_validation import ReviewBrief, ValidationBrief, ValidationSection


def _h(text: str, **kwargs: Any) -> Any:
    return field(metadata={"help": text}, **kwargs)


@dataclass(frozen=True, eq=False)
class RenderInputs:
    """Everything `render` needs, produced by the earlier stages; never modified here."""

    findings: Findings = _h("Every figure the report shows, from analyse")
    records: pd.DataFrame = _h("Kept publications: RECORD_COLUMNS + ENRICHED_COLUMNS")
    scores: pd.DataFrame = _h("Long score table, one row per (publication, goal): SCORE_COLUMNS")
    intake_log: pd.DataFrame = _h("One row per record read: INTAKE_LOG_COLUMNS")
    goals: tuple[tuple[str, str], ...] = _h("(goal code, short title) in framework order")
    framework_info: dict = _h("Goal framework: id, title, version, checksum")
    model_info: dict = _h("Scoring model: id, checksum, backend")
    score_settings: dict = _h("threshold, thresholds (goal -> value), policy, text_fields")
    manifest: dict = _h("Run manifest, written as manifest.json beside the report")
    generated_at: str = _h("When the report was made (ISO 8601); the only line allowed to differ between runs")


@dataclass(frozen=True)
class Chart:
    svg: Markup = _h("Inline SVG drawn by charts.py from analyse's figures; inserted as is")
    alt: str = _h("Text alternative: what the chart shows, in one or two sentences")


@dataclass(frozen=True)
class SectionLink:
    anchor: str = _h("id of the section heading, used by the contents and by target-counter in print")
    title: str = _h("Section heading as printed")
    partial: str = _h("Theme template that draws the section body, e.g. '_summary.html'")


@dataclass(frozen=True)
class Branding:
    institution: str = _h("Institution name from report.institution")
    logo_data_uri: str | None = _h("The local logo file as a data: URI, or None when no logo is configured")
    accent_colour: str = _h("report.accent_colour as #rrggbb, for headings and rules")


@dataclass(frozen=True)
class GoalRow:
    goal: str = _h("Goal code from the framework, e.g. '6'")
    title: str = _h("Goal short title")
    n: float = _h("Publications in scope (the denominator of the share)")
    n_aligned: float = _h("Publications aligned with this goal")
    n_explicit: float = _h("Aligned publications that mention the goal explicitly")
    n_content_only: float = _h("Aligned publications without an explicit mention (content alone)")
    share: float = _h("Goal share in [0, 1]")
    share_low: float = _h("Lower interval bound of the share")
    share_high: float = _h("Upper interval bound of the share")
    mean_score: float = _h("Mean alignment score over publications in scope")


@dataclass(frozen=True)
class ChangeRow:
    goal: str = _h("Goal code")
    title: str = _h("Goal short title")
    baseline: str = _h("What the reporting year is compared with, e.g. '2024' or 'mean 2022-2024'")
    year: int = _h("Reporting year")
    share_baseline: float = _h("Goal share in the baseline")
    share: float = _h("Goal share in the reporting year")
    diff: float = _h("share - share_baseline")
    diff_low: float = _h("Lower interval bound of the difference")
    diff_high: float = _h("Upper interval bound of the difference")
    p_adjusted: float = _h("p-value after the false discovery rate adjustment")
    is_change: bool = _h("True when the change survived the adjustment")
    verdict: str = _h("'increase', 'decrease', 'no clear change' or 'too small'")
    also_against: tuple[str, ...] = _h(
        "Summary and compact change table: the other baselines against which the same goal's change also held",
        default=(),
    )


@dataclass(frozen=True)
class Summary:
    n_publications: float = _h("Publications analysed")
    n_aligned_any: float = _h("Publications aligned with at least one goal")
    share_aligned_any: float = _h("Share aligned with at least one goal")
    share_low: float = _h("Lower interval bound of share_aligned_any")
    share_high: float = _h("Upper interval bound of share_aligned_any")
    n_explicit_any: float = _h("Publications that mention at least one goal explicitly")
    leading_goals: tuple[GoalRow, ...] = _h("The goals with the largest shares, largest first (at most three)")
    changes: tuple[ChangeRow, ...] = _h(
        "One row per goal whose change survived the false discovery rate adjustment: the pooled baseline "
        "when it held, else the clearest one; also_against names the rest"
    )
    has_comparison: bool = _h("True when earlier years were compared")


@dataclass(frozen=True)
class GoalProfile:
    rows: tuple[GoalRow, ...] = _h("One row per goal, framework order")
    chart: Chart = _h("Goal shares with intervals, explicit vs content-only")


@dataclass(frozen=True)
class ChangeSection:
    has_comparison: bool = _h("False when no comparison was made (none configured, or no publications)")
    reporting_year: int = _h("The year the report is about")
    comparison_years: tuple[int, ...] = _h("Earlier years compared with: configured and holding publications")
    empty_years: tuple[int, ...] = _h("Configured comparison years without a publication, so not compared")
    is_reporting_year_empty: bool = _h("True when the reporting year has no publication, so nothing was compared")
    rows: tuple[ChangeRow, ...] = _h(
        "Compact change table, framework order: one row per goal against the pooled comparison years"
    )
    n_rows_full: int = _h("Rows of the full table (every goal against every baseline) in findings-changes.csv")
    is_tested: bool = _h("True when at least one goal was large enough on both sides to be tested")
    chart: Chart | None = _h("Goal share per year with interval bands; None with a single year")
    fdr: float = _h("False discovery rate used to call a change a change")


@dataclass(frozen=True)
class Cell:
    goal: str = _h("Goal code")
    n: float = _h("Publications in the group")
    n_aligned: float = _h("Publications in the group aligned with the goal")
    share: float = _h("Share within the group")
    share_low: float = _h("Lower interval bound")
    share_high: float = _h("Upper interval bound")
    is_too_small: bool = _h("True when the group is under min_group_size; show as too small")


@dataclass(frozen=True)
class GroupRow:
    code: str = _h("Group key: department name, ISO country code, 'international'/'domestic'")
    label: str = _h("Group name as printed")
    n: float = _h("Publications in the group")
    is_too_small: bool = _h("True when the group is under min_group_size")
    cells: tuple[Cell, ...] = _h("One cell per goal, framework order")


@dataclass(frozen=True)
class DepartmentSection:
    rows: tuple[GroupRow, ...] = _h("Departments, largest first, then by name")
    chart: Chart | None = _h("Department x goal heat map, too-small cells marked; None without departments")
    n_too_small: int = _h("Departments under min_group_size")
    min_group_size: int = _h("Groups with fewer publications are marked too small")
    non_english: tuple[CountRow, ...] = _h(
        "Departments with publications not in English (scored with lower reliability): label, n, share of the department"
    )


@dataclass(frozen=True)
class PartnerSection:
    collaboration: tuple[GroupRow, ...] = _h("International, then domestic publications, with shares per goal")
    countries: tuple[GroupRow, ...] = _h(
        "Partner countries with at least the minimum group size, most publications first (at most 15)"
    )
    listed_countries: tuple[tuple[str, int], ...] = _h(
        "The other partner countries as (name, joint publications), most first: named, without goal figures"
    )
    n_countries: int = _h("Partner countries found in all")
    collaboration_chart: Chart | None = _h("International vs domestic goal shares")
    country_chart: Chart | None = _h("Partner country x goal heat map of aligned publications")


@dataclass(frozen=True)
class PairRow:
    goal_a: str = _h("First goal code")
    title_a: str = _h("First goal short title")
    goal_b: str = _h("Second goal code")
    title_b: str = _h("Second goal short title")
    n: float = _h("Publications aligned with both goals")


@dataclass(frozen=True)
class TogetherSection:
    pairs: tuple[PairRow, ...] = _h("Goal pairs studied together most often, most first (at most ten)")
    chart: Chart | None = _h("Goal x goal co-occurrence heat map; None when no publication has two goals")


@dataclass(frozen=True)
class EvidenceRow:
    record_id: str = _h("Publication id")
    title: str = _h("Publication title")
    year: int = _h("Publication year")
    departments: str = _h("Departments, '; '-joined; '' when none")
    doi: str = _h("Normalised DOI or ''")
    doi_url: str = _h("https://doi.org/ link for the DOI, '' when none")
    alignment_score: float = _h("The publication's alignment score for the goal")
    evidence: str = _h("Best evidence sentence ('' when none)")
    is_explicit: bool = _h("True when the publication mentions the goal explicitly")
    review: str = _h("'included by reviewer', 'excluded by reviewer' or '' when not reviewed", default="")
    review_note: str = _h("The reviewer's note from the review file ('' when none)", default="")


@dataclass(frozen=True)
class EvidenceGoal:
    goal: str = _h("Goal code")
    title: str = _h("Goal short title")
    rows: tuple[EvidenceRow, ...] = _h("The strongest aligned publications, highest score first")
    n_total: int = _h("Publications aligned with the goal")
    note: str = _h("'showing the N strongest of M' when rows were capped, else ''")
    excluded: tuple[EvidenceRow, ...] = _h("Pairs a reviewer excluded for this goal, highest score first",
                                           default=())


@dataclass(frozen=True)
class InputRow:
    source_file: str = _h("Input file as named in the config")
    format: str = _h("bibtex, ris or csv")
    n_read: int = _h("Records read from the file")
    n_kept: int = _h("Records kept")
    n_merged: int = _h("Records merged into a duplicate")
    n_set_aside: int = _h("Records set aside")


@dataclass(frozen=True)
class CountRow:
    label: str = _h("What is counted")
    n: float = _h("How many")
    share: float | None = _h("As a share of the relevant total, or None")


@dataclass(frozen=True)
class SensitivityRow:
    goal: str = _h("Goal code")
    title: str = _h("Goal short title")
    cells: tuple[CountRow, ...] = _h("Lower, chosen and higher threshold: label = threshold, n aligned, share")


@dataclass(frozen=True)
class RealTextAccuracy:
    n_abstracts: int = _h("Real abstracts in the measured set")
    measured_on: str = _h("Date of the measurement (ISO 8601)")
    macro_f1: float = _h("Macro-averaged F1 over the goals at the default threshold")
    top1_primary: float = _h("Share of goal papers whose highest-scoring goal is the labelled main goal")
    no_goal_unaligned: float = _h("Share of no-goal papers aligned with no goal")
    recall_low: tuple[str, float] = _h("(goal, recall) of the goal found least often")
    recall_high: tuple[str, float] = _h("(goal, recall) of the goal found most often")
    share_english_found: float | None = _h("Share of English goal papers aligned with a labelled goal")
    share_non_english_found: float | None = _h("The same for papers in other languages")
    applies: bool = _h("False when this run's backend or threshold differ from the measured ones")


@dataclass(frozen=True)
class MethodSection:
    inputs: tuple[InputRow, ...] = _h("Per input file: records read, kept, merged, set aside")
    intake_totals: InputRow = _h("The same counts over all files")
    reasons: tuple[CountRow, ...] = _h("Reasons records were set aside or merged, most frequent first")
    coverage: tuple[CountRow, ...] = _h("Coverage of abstracts, departments, countries, language")
    model: dict = _h("Model id, checksum, backend, and method (the backend in words)")
    framework: dict = _h("Framework id, title, version, checksum")
    threshold: float | None = _h("The single threshold, or None when thresholds differ per goal")
    thresholds: tuple[CountRow, ...] = _h("Per-goal thresholds (label = goal, n = threshold) when they differ")
    policy: str = _h("Alignment policy in words")
    counting: str = _h("Counting mode in words")
    text_fields: str = _h("Fields that make up the scored text, comma-joined")
    confidence: float = _h("Confidence level of every interval")
    min_group_size: int = _h("Groups with fewer publications are marked too small")
    fdr: float = _h("False discovery rate for changes")
    sensitivity: tuple[SensitivityRow, ...] = _h("Goal shares at the threshold -/+ one step")
    validation: ValidationBrief | None = _h("Macro-F1 on the labelled sample and a pointer to its section, or None")
    real_text: RealTextAccuracy | None = _h("Accuracy measured on real abstracts for this framework, or None")
    review: ReviewBrief | None = _h("Counts of reviewer overrides, per goal, or None without a review file")
    extras: tuple[CountRow, ...] = _h("Other scalar counts analyse put in Findings.extra")
    methods: tuple[tuple[str, str], ...] = _h("(what, method) pairs from analyse, e.g. the interval method")


@dataclass(frozen=True)
class Cautions:
    n_non_english: int = _h("Kept publications not in English (scored with an English-reading model)")
    real_text: RealTextAccuracy | None = _h("Measured accuracy, for the share of non-English goal papers found")
    n_set_aside_language: int = _h("Records set aside for their language")


@dataclass(frozen=True)
class ThemeView:
    css: Markup = _h("Stylesheet text for the medium, inserted in a <style> element")
    font_css: Markup = _h("@font-face rules with inlined font files; '' when the theme ships none")
    page_size: str = _h("CSS page size, e.g. 'A4'")
    medium: str = _h("'screen' for report.html, 'print' for report.pdf")


@dataclass(frozen=True)
class ReportContext:
    title: str = _h("Report title from report.title")
    branding: Branding = _h("Institution name, logo, accent colour")
    reporting_year: int = _h("The year the report is about")
    years: tuple[int, ...] = _h("Every year in scope, oldest first")
    generated_at: str = _h("When the report was made")
    software: str = _h("'Waymark <version>'")
    sections: tuple[SectionLink, ...] = _h("Sections in reading order, for the contents")
    summary: Summary = _h("At a glance")
    goal_profile: GoalProfile = _h("Goal profile")
    change: ChangeSection = _h("Change over time")
    departments: DepartmentSection = _h("Departments")
    partners: PartnerSection = _h("International partners")
    together: TogetherSection = _h("Goals studied together")
    method: MethodSection = _h("How the figures were made")
    cautions: Cautions = _h("Limits and cautions")
    evidence: tuple[EvidenceGoal, ...] = _h("Evidence appendix, one block per goal with aligned publications")
    validation: ValidationSection | None = _h("Validation against the labelled sample, or None when none was given")
    theme: ThemeView = _h("Stylesheets and page settings of the theme")
    explorer: ExplorerSection | None = _h("Publication explorer; report.html only (None in print)", default=None)
    funding: Any = _h("FundingSection (render/funding_section.py) of a grant portfolio; None otherwise", default=None)
