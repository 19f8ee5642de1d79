"""The workbook (report.xlsx): the report's tables for a spreadsheet, from the data the CSVs hold.

A summary sheet says what the figures are and what they are not; then one sheet per table:
goal shares, shares by year, changes, departments, partner countries, every kept publication
with its evidence sentences, and the intake log. Which cell types and formats each column
gets is set by its kind (xlsx.py).
"""

from __future__ import annotations

import dataclasses

import pandas as pd

from reporter.analyse import findings_tables
from reporter.render.appendix import BACKEND_TEXT, COUNTING_TEXT, POLICY_TEXT
from reporter.render.context import RenderInputs
from reporter.render.nouns import noun_in_text, report_nouns
from reporter.render.xlsx import Column, Table, write_workbook

SUMMARY = "Summary"
CAUTIONS = (
    "Alignment describes what a publication discusses; it says nothing about the work's impact, quality "
    "or whether it helps reach a goal.",
    "The figures are indicative: they depend on the model, the descriptor statements written for each goal "
    "and the threshold.",
    "They must not be the sole basis for funding, hiring, staffing or promotion decisions; use them "
    "alongside expert judgement (responsible-metrics principles, e.g. the Leiden Manifesto, Hicks et al. 2015).",
    "The model reads English: publications in other languages are scored with lower reliability.",
)


def build_workbook(inputs: RenderInputs, report) -> bytes:
    """report.xlsx as bytes; `report` is the ReportConfig (institution, title, reporting year)."""
    goals = tuple((str(code), str(title)) for code, title in inputs.goals)
    tables = findings_tables(inputs.findings)
    meta = inputs.findings.meta
    level = _level(meta)
    fractional = meta.get("counting") == "fractional"
    sheets = [
        Table("Goal shares", _goal_columns(level), tables["goals"], "data/findings-goals.csv"),
        Table("Shares by year", _share_columns(("year", "Year", "year"), level, fractional),
              _titled(tables["by_year"], goals), "data/findings-by-year.csv"),
        Table("Changes", _change_columns(level), _titled(tables["changes"], goals), "data/findings-changes.csv"),
        Table("Departments", _share_columns(("department", "Department", "text"), level, fractional)
              + (Column("n_non_english", "Not in English", "count", optional=True),),
              _titled(tables["by_department"], goals), "data/findings-by-department.csv"),
        Table("Partner countries", (Column("country", "Country code", "text"),)
              + _share_columns(("country_name", "Partner country", "text"), level, fractional),
              _titled(tables["by_country"], goals), "data/findings-by-country.csv"),
        Table("Publications", PUBLICATION_COLUMNS, publications_table(inputs.records, inputs.scores, goals),
              "data/scores.csv"),
        Table("Intake log", INTAKE_COLUMNS, inputs.intake_log, "intake-log.csv"),
    ]
    funding = getattr(inputs.findings, "funding", None)
    if funding is not None:
        sheets[1:1] = _funding_sheets(funding, goals)
    singular, plural = report_nouns(report)
    sheets = [_with_noun(sheet, singular, plural) for sheet in sheets]
    lines = [(noun_in_text(label, singular, plural), noun_in_text(value, singular, plural)
              if isinstance(value, str) else value, kind)
             for label, value, kind in summary_lines(inputs, report, [sheet.title for sheet in sheets])]
    if funding is not None:
        head, currency = funding.headline, funding.meta.get("base_currency", "")
        lines[5:5] = [(f"Funding in the figures ({currency})", head.get("amount_total"), "amount"),
                      (f"{plural.capitalize()} with a usable amount", head.get("n_in_funding"), "count"),
                      ("Share of funding aligned with at least one goal", head.get("share_aligned_any"), "share")]
    return write_workbook(SUMMARY, lines, sheets)


def _with_noun(sheet: Table, singular: str, plural: str) -> Table:
    """Sheet names and headers in the configured record noun ("Awards", "Awards now")."""
    columns = tuple(dataclasses.replace(c, header=noun_in_text(c.header, singular, plural)) for c in sheet.columns)
    return dataclasses.replace(sheet, title=noun_in_text(sheet.title, singular, plural)[:31], columns=columns)


_FUNDING_SHARE = (Column("n_awards", "Awards", "count"), Column("n_aligned", "Aligned", "count"),
                  Column("amount_total", "Funding", "amount"), Column("amount", "Counted for the goal", "amount"),
                  Column("share", "Share of funding", "share"), Column("share_low", "Interval low", "share"),
                  Column("share_high", "Interval high", "share"))


def _funding_sheets(funding, goals: tuple[tuple[str, str], ...]) -> list[Table]:
    """A portfolio's funding tables (findings-funding-*.csv), amounts in the base currency."""
    goal = (Column("goal", "Goal", "code"), Column("goal_title", "Goal title", "text"))
    changes = goal + (Column("baseline", "Compared with", "text"), Column("share_baseline", "Share then", "share"),
                      Column("share", "Share now", "share"), Column("diff", "Difference", "diff"),
                      Column("diff_low", "Difference low", "diff"), Column("diff_high", "Difference high", "diff"),
                      Column("p_adjusted", "Adjusted p", "p"), Column("verdict", "Verdict", "text"))
    return [
        Table("Funding by goal", goal + _FUNDING_SHARE[1:], _titled(funding.goals, goals),
              "data/findings-funding-goals.csv"),
        Table("Funding changes", changes, _titled(funding.changes, goals), "data/findings-funding-changes.csv"),
        Table("Funding by department", (Column("department", "Department", "text"),) + goal + _FUNDING_SHARE,
              _titled(funding.by_department, goals), "data/findings-funding-by-department.csv"),
        Table("Funding by country", (Column("country_name", "Partner country", "text"),) + goal + _FUNDING_SHARE,
              _titled(funding.by_country, goals), "data/findings-funding-by-country.csv"),
    ]


def _level(meta: dict) -> str:
    """The confidence level as printed, e.g. "95%" (or "97.5%")."""
    return f"{100 * float(meta.get('confidence', 0.95)):g}%"


def _goal_columns(level: str) -> tuple[Column, ...]:
    return (
        Column("goal", "Goal", "code"), Column("title", "Short title", "text"),
        Column("n", "Publications", "count"), Column("n_aligned", "Aligned", "count"),
        Column("n_explicit", "Aligned, explicit mention", "count"),
        Column("n_content_only", "Aligned by content only", "count"),
        Column("share", "Goal share", "share"), Column("share_low", f"Share, {level} low", "share"),
        Column("share_high", f"Share, {level} high", "share"),
        Column("mean_score", "Mean alignment score", "score"),
        Column("mean_score_low", f"Mean score, {level} low", "score"),
        Column("mean_score_high", f"Mean score, {level} high", "score"),
    )


def _share_columns(group: tuple[str, str, str], level: str, fractional: bool) -> tuple[Column, ...]:
    """A group column, the goal, and the share columns of by_year / by_department / by_country."""
    counted = (
        (Column("n_publications", "Publications", "count", optional=True), Column("n", "Fractional count", "count"))
        if fractional else (Column("n", "Publications", "count"),)
    )
    return (
        Column(*group), Column("goal", "Goal", "code"), Column("goal_title", "Short title", "text"), *counted,
        Column("n_aligned", "Aligned", "count"), Column("share", "Goal share", "share"),
        Column("share_low", f"Share, {level} low", "share"), Column("share_high", f"Share, {level} high", "share"),
        Column("is_too_small", "Too small", "flag"),
    )


def _change_columns(level: str) -> tuple[Column, ...]:
    return (
        Column("goal", "Goal", "code"), Column("goal_title", "Short title", "text"),
        Column("baseline", "Compared with", "text"), Column("year", "Reporting year", "year"),
        *(Column(key, header, "count", optional=True) for key, header in (
            ("n_baseline", "Publications then"), ("n_aligned_baseline", "Aligned then"),
            ("n", "Publications now"), ("n_aligned", "Aligned now"))),
        Column("share_baseline", "Share then", "share"), Column("share", "Share now", "share"),
        Column("diff", "Difference", "diff"), Column("diff_low", f"Difference, {level} low", "diff"),
        Column("diff_high", f"Difference, {level} high", "diff"), Column("p_value", "p-value", "p"),
        Column("p_adjusted", "p-value, FDR adjusted", "p"), Column("is_change", "Change holds", "flag"),
        Column("verdict", "Verdict", "text"),
    )


PUBLICATION_COLUMNS = (
    Column("record_id", "Record", "text"), Column("title", "Title", "long_text"), Column("year", "Year", "year"),
    Column("departments", "Departments", "text"), Column("partner_countries", "Partner countries", "text"),
    Column("language", "Language", "text"), Column("doi", "DOI", "text"),
    Column("n_aligned", "Number of aligned goals", "count"), Column("aligned_goals", "Aligned goals", "text"),
    Column("explicit_goals", "Explicitly mentioned goals", "text"),
    Column("top_score", "Highest alignment score", "score"), Column("evidence", "Evidence", "long_text"),
)
INTAKE_COLUMNS = (
    Column("record_id", "Record", "text"), Column("source_file", "File", "text"),
    Column("source_line", "Line", "count"), Column("format", "Format", "text"),
    Column("native_id", "Id in file", "text"),
    Column("title", "Title", "text"), Column("year", "Year", "year"), Column("status", "Status", "text"),
    Column("reason", "Reason", "text"), Column("merged_into", "Merged into", "text"), Column("flags", "Flags", "text"),
)


def _titled(table: pd.DataFrame, goals: tuple[tuple[str, str], ...]) -> pd.DataFrame:
    """The table with each goal's short title beside its code, for a reader who filters by goal."""
    return table.assign(goal_title=table["goal"].astype(str).map(dict(goals)))


def publications_table(records: pd.DataFrame, scores: pd.DataFrame, goals: tuple[tuple[str, str], ...]) -> pd.DataFrame:
    """One row per kept publication: the goals it is aligned with, the explicit ones, and the
    evidence sentence for each aligned goal (framework order); newest first, then by title."""
    position = {code: i for i, (code, _) in enumerate(goals)}
    table = scores.assign(goal=scores["goal"].astype(str))
    table = table.assign(_pos=table["goal"].map(position)).sort_values(["record_id", "_pos"], kind="stable")
    aligned = table.loc[table["is_aligned"].astype(bool)]
    by_record = aligned.groupby("record_id", sort=False)
    evidence_lines = aligned["goal"].map(lambda g: f"Goal {g}: ") + aligned["evidence"].fillna("").astype(str)
    summary = pd.DataFrame({
        "n_aligned": by_record.size(),
        "aligned_goals": by_record["goal"].agg("; ".join),
        "evidence": evidence_lines.groupby(aligned["record_id"], sort=False).agg("\n".join),
    })
    explicit = table.loc[table["is_explicit"].astype(bool)].groupby("record_id", sort=False)["goal"].agg("; ".join)
    top = table.groupby("record_id", sort=False)["alignment_score"].max()
    info = records.loc[:, ["record_id", "title", "year", "departments", "partner_countries", "language", "doi"]]
    info = info.assign(record_id=info["record_id"].astype(str))
    out = info.join(summary, on="record_id").join(explicit.rename("explicit_goals"), on="record_id")
    out = out.join(top.rename("top_score"), on="record_id")
    out["n_aligned"] = out["n_aligned"].fillna(0).astype(int)
    return out.sort_values(["year", "title", "record_id"], ascending=[False, True, True], kind="stable").reset_index(
        drop=True)


def summary_lines(inputs: RenderInputs, report, sheet_titles: list[str]) -> list[tuple[str, object, str]]:
    """(label, value, kind) lines of the summary sheet."""
    findings, log = inputs.findings, inputs.intake_log
    headline, meta = findings.headline, findings.meta
    level = _level(meta)
    status = log["status"].astype(str).value_counts()
    comparison = ", ".join(str(y) for y in meta.get("comparison_years", ())) or "none"
    lines = [
        ("Institution", report.institution, "text"),
        ("Report", report.title, "text"),
        ("Made with", f"Waymark {inputs.manifest.get('waymark_version', '')}".strip(), "text"),
        ("Reporting year", int(report.reporting_year), "year"),
        ("Compared with", comparison, "text"),
        ("Publications analysed", headline.get("n_publications"), "count"),
        ("Aligned with at least one goal", headline.get("n_aligned_any"), "count"),
        ("Share aligned with at least one goal", headline.get("share_aligned_any"), "share"),
        (f"Share, {level} low", headline.get("share_aligned_any_low"), "share"),
        (f"Share, {level} high", headline.get("share_aligned_any_high"), "share"),
        ("With an explicit goal mention", headline.get("n_explicit_any"), "count"),
        ("Records read", len(log), "count"),
        ("Records kept", int(status.get("kept", 0)), "count"),
        ("Records merged as duplicates", int(status.get("merged", 0)), "count"),
        ("Records set aside", int(status.get("set_aside", 0)), "count"),
        ("Method", method_line(inputs), "long_text"),
    ]
    lines += [("Caution" if i == 0 else "", text, "long_text") for i, text in enumerate(CAUTIONS)]
    lines += [("Sheets", ", ".join(sheet_titles) + ". Shares are fractions shown as percentages; a group under "
               f"{int(meta.get('min_group_size', 10))} publications is marked too small. Validation, sensitivity "
               "and goal pairs are in report.html and data/.", "long_text")]
    return lines


def method_line(inputs: RenderInputs) -> str:
    """The method in one line, from the same settings the report's method section prints."""
    settings, meta = inputs.score_settings, inputs.findings.meta
    framework, model = inputs.framework_info, inputs.model_info
    threshold = settings.get("threshold", meta.get("threshold"))
    distinct = {float(v) for v in dict(settings.get("thresholds") or {}).values()}
    if len(distinct) > 1 or threshold is None or (distinct and distinct != {float(threshold)}):
        at = "per-goal thresholds (see manifest.json)"
    else:
        at = f"threshold {float(threshold):.2f}"
    policy = str(settings.get("policy", meta.get("policy", "")))
    fields = list(settings.get("text_fields", ())) or ["title", "abstract", "keywords"]
    fields_text = ", ".join(fields[:-1]) + " and " + fields[-1] if len(fields) > 1 else fields[0]
    backend = str(model.get("backend", ""))
    counting = str(meta.get("counting", ""))
    name = framework.get("title") or framework.get("id", "")
    return (
        f"Each publication's {fields_text} {'were' if len(fields) > 1 else 'was'} split into sentences and "
        f"compared with descriptor statements for every goal of the goal framework {name} "
        f"(version {framework.get('version', '')}) by the model {model.get('id', '')} "
        f"({BACKEND_TEXT.get(backend, backend)}); a publication is {POLICY_TEXT.get(policy, policy)} ({at}). "
        f"Shares carry {_level(meta)} Wilson score intervals; "
        f"{COUNTING_TEXT.get(counting, counting)}."
    )
