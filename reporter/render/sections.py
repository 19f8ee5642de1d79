"""Arrange analyse's figures into the report's sections: `RenderInputs` -> `ReportContext`.

Only ordering, selection and looking up names happens here; the figures themselves
come from `Findings` unchanged.
"""

from __future__ import annotations

import dataclasses

import math
from typing import Sequence

import pandas as pd

from reporter.records import ENRICHED_COLUMNS, INTAKE_LOG_COLUMNS, RECORD_COLUMNS, SCORE_COLUMNS, require_columns
from reporter.render import charts, explorer, funding_section
from reporter.render import validation_section
from reporter.render.appendix import POLICY_TEXT, build_cautions, build_evidence, build_method
from reporter.render.branding import build_branding, build_theme_view
from reporter.render.context import (
    Cell, ChangeRow, CountRow, ChangeSection, DepartmentSection, GoalProfile, GoalRow, GroupRow, PairRow,
    PartnerSection, RenderInputs, ReportContext, SectionLink, Summary, TogetherSection,
)
from reporter.render.themes import Theme

N_LEADING_GOALS = 3
N_COUNTRIES_SHOWN = 15
N_PAIRS_SHOWN = 10

#: Sections every report has, in reading order: (anchor, heading, partial). Headings are the tests' landmarks too.
SECTIONS = (
    ("at-a-glance", "At a glance", "_summary.html"),
    ("goal-profile", "Goal profile", "_goal_profile.html"),
    ("change-over-time", "Change over time", "_change.html"),
    ("departments", "Departments", "_departments.html"),
    ("international-partners", "International partners", "_partners.html"),
    ("goals-together", "Goals studied together", "_together.html"),
    ("method", "How the figures were made", "_method.html"),
    ("cautions", "Limits and cautions", "_cautions.html"),
    ("evidence", "Evidence appendix", "_evidence.html"),
)
#: Shown right after the method section when a labelled sample was measured.
VALIDATION_SECTION = (validation_section.ANCHOR, validation_section.HEADING, validation_section.PARTIAL)
#: Sections of report.html only, after the others: the PDF keeps its capped evidence appendix.
SCREEN_SECTIONS = ((explorer.ANCHOR, explorer.HEADING, explorer.PARTIAL),)
FUNDING_SECTION = (funding_section.ANCHOR, funding_section.HEADING, funding_section.PARTIAL)


def _sections(has_validation: bool, medium: str = "screen", has_funding: bool = False) -> tuple[SectionLink, ...]:
    sections = list(SECTIONS)
    if has_funding:  # a portfolio's funding figures come right after "At a glance"
        sections.insert(1, FUNDING_SECTION)
    if has_validation:
        sections.insert([anchor for anchor, _t, _p in SECTIONS].index("method") + 1, VALIDATION_SECTION)
    if medium == "screen":
        sections += SCREEN_SECTIONS
    return tuple(SectionLink(*section) for section in sections)


def for_print(screen: ReportContext, theme: Theme, report: object) -> ReportContext:
    """The screen context without its screen-only sections, styled for print."""
    screen_only = {anchor for anchor, _t, _p in SCREEN_SECTIONS}
    return dataclasses.replace(
        screen, theme=build_theme_view(theme, report, "print"), explorer=None,
        sections=tuple(s for s in screen.sections if s.anchor not in screen_only),
    )


def build_context(inputs: RenderInputs, report: object, theme: Theme, medium: str = "screen") -> ReportContext:
    """Everything the templates see, arranged once; `report` is the `ReportConfig`."""
    _check_inputs(inputs)
    findings = inputs.findings
    goals = tuple((str(code), str(title)) for code, title in inputs.goals)
    titles = dict(goals)
    meta = findings.meta
    min_size = int(meta.get("min_group_size", 10))
    profile_rows = goal_rows(findings.goals, goals)
    change_rows = _change_rows(findings.changes, goals)
    change = change_section(findings, goals, int(report.reporting_year), theme)
    headline = findings.headline
    ranked = sorted((r for r in profile_rows if r.share > 0), key=lambda r: -r.share)
    summary = Summary(
        n_publications=headline["n_publications"],
        n_aligned_any=headline["n_aligned_any"],
        share_aligned_any=headline["share_aligned_any"],
        share_low=headline["share_aligned_any_low"],
        share_high=headline["share_aligned_any_high"],
        n_explicit_any=headline.get("n_explicit_any", math.nan),
        leading_goals=tuple(ranked[:N_LEADING_GOALS]),
        changes=_summary_changes(change_rows),
        has_comparison=change.has_comparison,
    )
    validation = validation_section.build_validation(findings.extra, goals, theme, POLICY_TEXT)
    funding = funding_section.build_funding(getattr(findings, "funding", None), goals, _group_rows, _change_rows,
                                            _compact_change_rows)
    return ReportContext(
        title=report.title,
        branding=build_branding(report),
        reporting_year=int(report.reporting_year),
        years=_years_present(meta),
        generated_at=inputs.generated_at,
        software=f"Waymark {inputs.manifest.get('waymark_version', '')}".strip(),
        sections=_sections(validation is not None, medium, has_funding=funding is not None),
        summary=summary,
        goal_profile=GoalProfile(rows=profile_rows, chart=charts.draw_goal_profile(profile_rows, theme)),
        change=change,
        departments=_departments(findings.by_department, goals, theme, min_size),
        partners=_partners(findings.by_country, findings.collaboration, goals, theme, min_size),
        together=_together(findings.cooccurrence, goals, titles, theme),
        method=build_method(inputs, goals),
        cautions=build_cautions(inputs),
        evidence=build_evidence(inputs, goals, theme.evidence_per_goal),
        validation=validation,
        explorer=explorer.build_explorer(inputs, goals, theme) if medium == "screen" else None,
        theme=build_theme_view(theme, report, medium),
        funding=funding,
    )


def _years_present(meta: dict) -> tuple[int, ...]:
    return tuple(sorted(int(y) for y in meta.get("years_present", meta.get("years", ()))))


def change_section(findings, goals: Sequence[tuple[str, str]], reporting_year: int,
                   theme: Theme | None) -> ChangeSection:
    """The change section from `findings`; the per-year chart only with a theme and two years of publications."""
    meta = findings.meta
    change_rows = _change_rows(findings.changes, goals)
    comparison_years = tuple(int(y) for y in meta.get("comparison_years", ()))
    # Older findings lack the per-year presence fields: then every configured year was compared.
    compared = tuple(int(y) for y in meta.get("comparison_years_compared", comparison_years))
    with_publications = findings.by_year.loc[findings.by_year["n"] > 0] if not findings.by_year.empty else None
    n_years = with_publications["year"].nunique() if with_publications is not None else 0
    return ChangeSection(
        has_comparison=bool(compared) and bool(change_rows),
        reporting_year=reporting_year,
        comparison_years=compared,
        empty_years=tuple(int(y) for y in meta.get("comparison_years_empty", ())),
        is_reporting_year_empty=reporting_year not in _years_present(meta),
        rows=_compact_change_rows(change_rows),
        n_rows_full=len(change_rows),
        is_tested=any(r.verdict != "too small" for r in change_rows),
        chart=charts.draw_change(with_publications, goals, theme) if theme is not None and n_years > 1 else None,
        fdr=float(meta.get("fdr", math.nan)),
    )


def _check_inputs(inputs: RenderInputs) -> None:
    require_columns(inputs.records, RECORD_COLUMNS + ENRICHED_COLUMNS, "render: records")
    require_columns(inputs.scores, SCORE_COLUMNS, "render: scores")
    require_columns(inputs.intake_log, INTAKE_LOG_COLUMNS, "render: intake_log")


def goal_rows(frame: pd.DataFrame, goals: Sequence[tuple[str, str]]) -> tuple[GoalRow, ...]:
    by_goal = frame.assign(goal=frame["goal"].astype(str)).set_index("goal")
    rows = []
    for code, title in goals:
        if code not in by_goal.index:
            continue
        r = by_goal.loc[code]
        rows.append(GoalRow(
            goal=code, title=title, n=r["n"], n_aligned=r["n_aligned"], n_explicit=r["n_explicit"],
            n_content_only=r["n_content_only"], share=r["share"], share_low=r["share_low"],
            share_high=r["share_high"], mean_score=r.get("mean_score", math.nan),
        ))
    return tuple(rows)


def _change_rows(frame: pd.DataFrame, goals: Sequence[tuple[str, str]]) -> tuple[ChangeRow, ...]:
    if frame.empty:
        return ()
    by_goal = frame.assign(goal=frame["goal"].astype(str))
    rows = []
    for code, title in goals:
        for _, r in by_goal.loc[by_goal["goal"] == code].iterrows():
            rows.append(ChangeRow(
                goal=code, title=title, baseline=str(r["baseline"]), year=int(r["year"]),
                share_baseline=r["share_baseline"], share=r["share"], diff=r["diff"], diff_low=r["diff_low"],
                diff_high=r["diff_high"], p_adjusted=r["p_adjusted"], is_change=bool(r["is_change"]),
                verdict=str(r["verdict"]),
            ))
    return tuple(rows)


def _compact_change_rows(rows: Sequence[ChangeRow]) -> tuple[ChangeRow, ...]:
    """One row per goal: the pooled baseline (the only one with a single comparison year), with the
    single years its change also held against; every baseline stays in findings-changes.csv."""
    by_goal: dict[str, list[ChangeRow]] = {}
    for row in rows:
        by_goal.setdefault(row.goal, []).append(row)
    out = []
    for group in by_goal.values():
        pooled = [r for r in group if r.baseline.startswith("mean")]
        lead = pooled[0] if pooled else group[0]
        held = tuple(r.baseline for r in group if r is not lead and r.is_change)
        out.append(dataclasses.replace(lead, also_against=held))
    return tuple(out)


def _group_rows(frame: pd.DataFrame, key: str, label: str, goals: Sequence[tuple[str, str]],
                order: Sequence[str] | None = None) -> tuple[GroupRow, ...]:
    """One row per group with a cell per goal; groups largest first, then by name, unassigned last."""
    if frame.empty:
        return ()
    frame = frame.assign(goal=frame["goal"].astype(str))
    # Under fractional counting `n` is a sum of weights; the group's size is its distinct publications.
    size = "n_publications" if "n_publications" in frame.columns else "n"
    unassigned = frame["is_unassigned"] if "is_unassigned" in frame.columns else pd.Series(False, index=frame.index)
    sizes = frame.assign(_unassigned=unassigned).groupby(key, sort=True).agg(
        n=(size, "max"), label=(label, "first"), small=("is_too_small", "any"), last=("_unassigned", "any"))
    if order is None:
        order = sizes.sort_values(["last", "n", "label"], ascending=[True, False, True], kind="stable").index.tolist()
    rows = []
    for group in order:
        if group not in sizes.index:
            continue
        part = frame.loc[frame[key] == group].set_index("goal")
        too_small = bool(sizes.loc[group, "small"])
        cells = []
        for code, _ in goals:
            if code in part.index:
                c = part.loc[code]
                cells.append(Cell(code, c["n"], c["n_aligned"], c["share"], c["share_low"], c["share_high"],
                                  bool(c["is_too_small"])))
            else:
                cells.append(Cell(code, sizes.loc[group, "n"], math.nan, math.nan, math.nan, math.nan, too_small))
        rows.append(GroupRow(code=str(group), label=str(sizes.loc[group, "label"]), n=sizes.loc[group, "n"],
                             is_too_small=too_small, cells=tuple(cells)))
    return tuple(rows)


def _unassigned(frame: pd.DataFrame) -> pd.Series:
    return frame["is_unassigned"].astype(bool) if "is_unassigned" in frame.columns else pd.Series(False, index=frame.index)


def _departments(frame: pd.DataFrame, goals, theme: Theme, min_size: int) -> DepartmentSection:
    labels = frame["department"].where(~_unassigned(frame), explorer.NO_DEPARTMENT)
    rows = _group_rows(frame.assign(label=labels), "department", "label", goals)
    chart = None
    if rows:
        chart = charts.draw_group_heatmap(rows, goals, theme, what="departments", name="departments",
                                           min_group_size=min_size)
    return DepartmentSection(rows=rows, chart=chart, n_too_small=sum(r.is_too_small for r in rows),
                             min_group_size=min_size, non_english=_non_english_rows(frame.assign(label=labels), rows))


def _non_english_rows(frame: pd.DataFrame, rows) -> tuple[CountRow, ...]:
    """Per department with any, its publications not in English, in the table's order."""
    if "n_non_english" not in frame.columns:
        return ()
    counts = frame.groupby("department", sort=False)["n_non_english"].first()
    return tuple(CountRow(row.label, int(counts[row.code]), int(counts[row.code]) / row.n if row.n else None)
                 for row in rows if row.code in counts.index and counts[row.code] > 0)


def _partners(countries: pd.DataFrame, collaboration: pd.DataFrame, goals, theme: Theme,
              min_size: int) -> PartnerSection:
    # Publications without a partner country are the domestic group, shown under collaboration instead.
    all_countries = _group_rows(countries.loc[~_unassigned(countries)], "country", "country_name", goals)
    # Only countries with enough joint publications get goal figures; the rest are named with their count,
    # so the table is not a grid of suppressed cells and no partner goes unmentioned.
    large = [row for row in all_countries if row.n >= min_size]
    shown = tuple(large[:N_COUNTRIES_SHOWN])
    listed = tuple((row.label, int(row.n)) for row in all_countries if row not in shown)
    labels = {"international": "International", "domestic": explorer.DOMESTIC}
    collab = _group_rows(collaboration.assign(label=collaboration["group"].map(labels)), "group", "label",
                         goals, order=["international", "domestic"])
    return PartnerSection(
        collaboration=collab,
        countries=shown,
        listed_countries=listed,
        n_countries=len(all_countries),
        collaboration_chart=charts.draw_collaboration(collab, goals, theme) if collab else None,
        country_chart=(charts.draw_group_heatmap(shown, goals, theme, what="partner countries", name="countries",
                                                 min_group_size=min_size, value="n_aligned") if shown else None),
    )


def _together(frame: pd.DataFrame, goals, titles: dict[str, str], theme: Theme) -> TogetherSection:
    known = frame.assign(goal_a=frame["goal_a"].astype(str), goal_b=frame["goal_b"].astype(str))
    known = known.loc[known["goal_a"].isin(titles) & known["goal_b"].isin(titles) & (known["n"] > 0)]
    position = {code: i for i, (code, _) in enumerate(goals)}
    ranked = known.assign(pa=known["goal_a"].map(position), pb=known["goal_b"].map(position)).sort_values(
        ["n", "pa", "pb"], ascending=[False, True, True], kind="stable")
    pairs = tuple(
        PairRow(r.goal_a, titles[r.goal_a], r.goal_b, titles[r.goal_b], r.n)
        for r in ranked.head(N_PAIRS_SHOWN).itertuples()
    )
    chart = charts.draw_cooccurrence(known[["goal_a", "goal_b", "n"]], goals, theme) if pairs else None
    return TogetherSection(pairs=pairs, chart=chart)


def _summary_changes(rows) -> tuple:
    """A goal once in the summary, however many baselines its change held against."""
    held: dict[str, list] = {}
    for row in rows:
        if row.is_change:
            held.setdefault(row.goal, []).append(row)
    out = []
    for group in held.values():
        # The pooled baseline ("mean ...") speaks for all comparison years; else the clearest test.
        pooled = [r for r in group if r.baseline.startswith("mean")]
        lead = pooled[0] if pooled else min(group, key=lambda r: r.p_adjusted)
        others = tuple(r.baseline for r in group if r is not lead)
        out.append(dataclasses.replace(lead, also_against=others))
    return tuple(out)
