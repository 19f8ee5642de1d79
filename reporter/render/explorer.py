"""Records and scores -> the publication explorer: every analysed publication with its aligned goals.

Scope and decisions are the goal profile's: publications of the years analyse pooled
(`meta["years"]`) that have scores, aligned as `is_aligned` says after any review, so
choosing a goal in the explorer counts what the goal table counts.
"""

from __future__ import annotations

import json
from typing import Sequence

import pandas as pd
from markupsafe import Markup

from reporter.analyse.shares import country_name
from reporter.render.appendix import doi_url
from reporter.render.context import RenderInputs
from reporter.render.context_explorer import (
    ExplorerEvidence, ExplorerGoal, ExplorerOption, ExplorerRow, ExplorerSection,
)
from reporter.render.themes import Theme, ThemeError

ANCHOR, HEADING, PARTIAL = "publication-explorer", "Publication explorer", "_explorer.html"
SCRIPT = "explorer.js"
#: Labels shared with the department and collaboration tables, so a reader can match the two.
NO_DEPARTMENT = "no department recorded"
DOMESTIC = "Domestic only"
NONE = "none"  # option value for "no department" / "no partner country" / "no goal"
# Rows listed at once with the script on: a browser lays out 500 rows in well under a second on a
# slow machine, and a whole department's year usually fits (bench/explorer_scale.py).
ROWS_AT_ONCE = 500


def build_explorer(inputs: RenderInputs, goals: Sequence[tuple[str, str]], theme: Theme) -> ExplorerSection:
    """Every analysed publication as one row, the filter options and the script's data."""
    years = tuple(sorted(int(y) for y in inputs.findings.meta.get("years", ())))
    scores = inputs.scores.assign(record_id=inputs.scores["record_id"].astype(str),
                                  goal=inputs.scores["goal"].astype(str))
    records = inputs.records.assign(record_id=inputs.records["record_id"].astype(str))
    listed = records["record_id"].isin(set(scores["record_id"]))
    if years:
        listed &= records["year"].isin(years)
    shown = records.loc[listed].assign(_title=lambda f: f["title"].astype(str).str.casefold())
    shown = shown.sort_values(["year", "_title", "record_id"], ascending=[False, True, True], kind="stable")

    aligned = _aligned_goals(scores, goals)
    departments = sorted({d for ds in shown["departments"] for d in ds}, key=str.casefold)
    codes = sorted({c for cs in shown["partner_countries"] for c in cs}, key=lambda c: country_name(c).casefold())
    dept_index = {name: i for i, name in enumerate(departments)}
    country_index = {code: i for i, code in enumerate(codes)}

    rows, data = [], []
    for rec in shown.itertuples(index=False):
        its_goals = aligned.get(rec.record_id, ())
        rows.append(ExplorerRow(
            record_id=rec.record_id, title=str(rec.title), doi_url=doi_url(str(rec.doi)), year=int(rec.year),
            departments=tuple(rec.departments), countries=tuple(sorted(map(country_name, rec.partner_countries))),
            goals=tuple(goal for goal, _ in its_goals), evidence=_evidence(its_goals),
        ))
        data.append([int(rec.year), [v for goal, _ in its_goals for v in (goal.goal, round(goal.alignment_score, 4))],
                     [dept_index[d] for d in rec.departments], [country_index[c] for c in rec.partner_countries]])

    has_no_department = any(not r.departments for r in rows)
    has_domestic = any(not r.countries for r in rows)
    return ExplorerSection(
        rows=tuple(rows),
        years=years or tuple(sorted({r.year for r in rows})),
        n_not_listed=int((~listed).sum()),
        goal_options=(ExplorerOption("any", "aligned with any goal"), ExplorerOption(NONE, "aligned with no goal"),
                      *(ExplorerOption(code, f"{code} · {title}") for code, title in goals)),
        department_options=_options(departments, NO_DEPARTMENT if has_no_department else None),
        country_options=_options([country_name(c) for c in codes], DOMESTIC if has_domestic else None),
        year_options=tuple(ExplorerOption(str(y), str(y)) for y in sorted({r.year for r in rows}, reverse=True)),
        n_rows_at_once=ROWS_AT_ONCE,
        data_json=json_for_script({"rows": data}),
        script=read_script(theme),
    )


def _aligned_goals(scores: pd.DataFrame, goals: Sequence[tuple[str, str]]) -> dict[str, tuple]:
    """record_id -> ((ExplorerGoal, evidence sentence), ...), highest score first, ties in framework order."""
    titles = dict(goals)
    position = {code: i for i, (code, _) in enumerate(goals)}
    part = scores.loc[scores["is_aligned"].astype(bool) & scores["goal"].isin(titles)]
    reviewed = part["is_overridden"].astype(bool) if "is_overridden" in part else pd.Series(False, index=part.index)
    part = part.assign(reviewer_made=reviewed, goal_position=part["goal"].map(position))
    part = part.sort_values(["record_id", "alignment_score", "goal_position"], ascending=[True, False, True],
                            kind="stable")
    out: dict[str, list] = {}
    for r in part.itertuples(index=False):
        goal = ExplorerGoal(goal=r.goal, title=titles[r.goal], alignment_score=float(r.alignment_score),
                            is_explicit=bool(r.is_explicit), by_reviewer=bool(r.reviewer_made))
        out.setdefault(r.record_id, []).append((goal, str(r.evidence or "")))
    return {rid: tuple(pairs) for rid, pairs in out.items()}


def _evidence(pairs: Sequence[tuple[ExplorerGoal, str]]) -> tuple[ExplorerEvidence, ...]:
    """One entry per distinct sentence, naming every goal it is the evidence for."""
    by_sentence: dict[str, list[str]] = {}
    for goal, sentence in pairs:
        if sentence.strip():
            by_sentence.setdefault(sentence, []).append(goal.goal)
    return tuple(ExplorerEvidence(goals=tuple(codes), sentence=s) for s, codes in by_sentence.items())


def _options(labels: Sequence[str], none_label: str | None) -> tuple[ExplorerOption, ...]:
    options = [ExplorerOption(str(i), label) for i, label in enumerate(labels)]
    if none_label:
        options.append(ExplorerOption(NONE, none_label))
    return tuple(options)


def json_for_script(value: object) -> Markup:
    """JSON safe inside a <script> element: '<', '>' and '&' escaped, so no value can end the element."""
    text = json.dumps(value, separators=(",", ":"), ensure_ascii=False)
    return Markup(text.replace("<", "\\u003c").replace(">", "\\u003e").replace("&", "\\u0026"))


def read_script(theme: Theme) -> Markup:
    """The theme's explorer script, inlined so the report needs no file beside it."""
    path = theme.find(SCRIPT)
    text = path.read_text(encoding="utf-8")
    if "</script" in text.lower() or "<!--" in text:
        raise ThemeError(f"theme {theme.name!r}: {path} contains '</script' or '<!--', which would end the inline script")
    return Markup(text)
