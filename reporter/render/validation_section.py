"""Arrange `Findings.extra` (validation, corrected shares, review) for the report.

In: the keys the pipeline puts in `Findings.extra` ("validation": `Validation.to_dict()`,
"corrected_shares": CORRECTION_COLUMNS, "correction_explanation", "review": review_summary,
"overrides": OVERRIDE_COLUMNS). Out: `ValidationSection`, `ValidationBrief`, `ReviewBrief`.
"""

from __future__ import annotations

import math
from pathlib import PurePath
from typing import Sequence

import pandas as pd

from reporter.records import require_columns
from reporter.render.context_validation import (
    AverageRow, CorrectedRow, MatrixCell, MetricRow, ReviewBrief, ReviewGoalRow, ThresholdRow, UnmatchedRow,
    ValidationBrief, ValidationSection,
)
from reporter.render.filters import fmt_score
from reporter.render.themes import Theme
from reporter.render.validation_charts import NO_GOAL, draw_goal_matrix, draw_threshold_curves

ANCHOR = "validation"
HEADING = "Validation against a labelled sample"
PARTIAL = "_validation.html"
N_UNMATCHED_SHOWN = 10
N_OFF_DIAGONAL_SHOWN = 8
_CORRECTION_NEEDS = ("goal", "n", "apparent", "sensitivity", "specificity", "corrected", "corrected_low",
                     "corrected_high", "reason", "note")
_OVERRIDE_NEEDS = ("goal", "decision", "is_changed")


def _num(value: object) -> float:
    """JSON null (no value) -> NaN, which the display filters show as a dash."""
    return math.nan if value is None else float(value)


def _averages(averages: dict) -> tuple[AverageRow, ...]:
    return tuple(
        AverageRow(f"{name} average", _num(averages[name]["precision"]), _num(averages[name]["recall"]),
                   _num(averages[name]["f1"]))
        for name in ("micro", "macro") if name in averages
    )


def build_validation_brief(extra: dict) -> ValidationBrief | None:
    """The figures the method section quotes, or None when no labelled sample was measured."""
    validation = extra.get("validation")
    if not validation:
        return None
    averages = validation["averages"]
    return ValidationBrief(
        n_matched=int(validation["n_matched"]), macro_f1=_num(averages["macro"]["f1"]),
        micro_f1=_num(averages["micro"]["f1"]), anchor=ANCHOR, heading=HEADING,
    )


def build_validation(extra: dict, goals: Sequence[tuple[str, str]], theme: Theme,
                     policy_text: dict[str, str]) -> ValidationSection | None:
    """The validation section, or None when `extra` has no "validation"."""
    validation = extra.get("validation")
    if not validation:
        return None
    titles = dict(goals)
    codes = [code for code, _ in goals]
    per_goal = tuple(
        MetricRow(
            goal=str(r["goal"]), title=titles.get(str(r["goal"]), ""), threshold=_num(r["threshold"]),
            support=int(r["support"]), n_predicted=int(r["n_predicted"]), tp=int(r["tp"]), fp=int(r["fp"]),
            fn=int(r["fn"]), precision=_num(r["precision"]), recall=_num(r["recall"]), f1=_num(r["f1"]),
            kappa=_num(r["kappa"]),
        )
        for r in _in_goal_order(validation["per_goal"], codes)
    )
    recommended = tuple(
        ThresholdRow(
            goal=str(r["goal"]), title=titles.get(str(r["goal"]), ""), current=_num(r["current"]),
            recommended=_num(r["recommended"]), support=int(r["support"]), precision=_num(r["precision"]),
            recall=_num(r["recall"]), f1=_num(r["f1"]), reason=str(r["reason"] or ""),
            is_changed=not math.isclose(_num(r["current"]), _num(r["recommended"])),
        )
        for r in _in_goal_order(validation["recommended"], codes)
    )
    agreement = validation["agreement"]
    n_matched = int(validation["n_matched"])
    matrix_chart, off_diagonal = _matrix(validation["matrix"], goals, theme, n_matched)
    labelled_goals = [r.goal for r in per_goal if r.support > 0]
    corrected = _corrected(extra.get("corrected_shares"), goals)
    settings = validation.get("settings", {})
    policy = str(settings.get("policy", ""))
    unmatched = validation.get("unmatched", [])
    return ValidationSection(
        sample=PurePath(str(settings.get("labelled_sample", ""))).name,
        n_rows=int(validation["n_rows"]), n_matched=n_matched,
        n_unmatched=int(validation.get("n_unmatched", len(unmatched))),
        unmatched=tuple(UnmatchedRow(int(u["line"]), str(u["given"]), str(u["reason"]))
                        for u in unmatched[:N_UNMATCHED_SHOWN]),
        policy=policy_text.get(policy, policy),
        per_goal=per_goal,
        averages=_averages(validation["averages"]),
        n_exact=int(agreement.get("n_exact", 0)),
        share_exact=_num(agreement.get("exact_match")),
        share_decisions=_num(agreement.get("hamming")),
        matrix_chart=matrix_chart,
        off_diagonal=off_diagonal,
        curve_chart=_curves(validation["curve"], per_goal, goals, labelled_goals, theme),
        n_goals_without_labels=len(per_goal) - len(labelled_goals),
        recommended=recommended,
        recommended_averages=_averages(validation.get("recommended_averages", {})),
        n_changed=sum(r.is_changed for r in recommended),
        objective=str(settings.get("objective", "")),
        caveat=str(validation.get("caveat", "")),
        corrected=corrected,
        n_refused=sum(r.is_refused for r in corrected),
        correction_explanation=str(extra.get("correction_explanation", "")),
    )


def build_review_brief(extra: dict, goals: Sequence[tuple[str, str]]) -> ReviewBrief | None:
    """Reviewer override counts, overall and per goal, or None when no review file was used."""
    summary = extra.get("review")
    if not summary:
        return None
    rows: list[ReviewGoalRow] = []
    overrides = extra.get("overrides")
    if isinstance(overrides, pd.DataFrame) and not overrides.empty:
        require_columns(overrides, _OVERRIDE_NEEDS, "render: extra['overrides']")
        table = overrides.assign(goal=overrides["goal"].astype(str), changed=overrides["is_changed"].astype(bool),
                                 include=overrides["decision"] == "include")
        for code, title in goals:
            part = table.loc[table["goal"] == code]
            if part.empty:
                continue
            rows.append(ReviewGoalRow(
                goal=code, title=title, n_included=int(part["include"].sum()), n_excluded=int((~part["include"]).sum()),
                n_added=int((part["include"] & part["changed"]).sum()),
                n_removed=int((~part["include"] & part["changed"]).sum()),
            ))
    keys = ("n_decisions", "n_included", "n_excluded", "n_added", "n_removed", "n_confirmed", "n_publications",
            "n_reviewers")
    return ReviewBrief(**{key: int(summary.get(key, 0)) for key in keys}, per_goal=tuple(rows))


def _in_goal_order(rows: list[dict], codes: list[str]) -> list[dict]:
    position = {code: i for i, code in enumerate(codes)}
    return sorted(rows, key=lambda r: position.get(str(r["goal"]), len(codes)))


def _matrix(rows: list[dict], goals: Sequence[tuple[str, str]], theme: Theme, n_matched: int):
    if not rows or not n_matched:
        return None, ()
    # The matrix names "no goal" NO_GOAL already (analyse.validation.NONE), so cells print as they come.
    cells = pd.DataFrame(rows, columns=["labelled", "predicted", "n"]).astype({"labelled": str, "predicted": str})
    order = [code for code, _ in goals] + [NO_GOAL]
    position = {code: i for i, code in enumerate(order)}
    off = cells.loc[(cells["labelled"] != cells["predicted"]) & (cells["n"] > 0)]
    off = off.assign(a=off["labelled"].map(position), b=off["predicted"].map(position)).sort_values(
        ["n", "a", "b"], ascending=[False, True, True], kind="stable")
    off_diagonal = tuple(MatrixCell(r.labelled, r.predicted, int(r.n))
                         for r in off.head(N_OFF_DIAGONAL_SHOWN).itertuples())
    agreed = int(cells.loc[(cells["labelled"] == cells["predicted"]) & (cells["labelled"] != NO_GOAL), "n"].sum())
    alt_text = (
        f"Heat map of the {n_matched} labelled publications: rows are the goal people gave, columns the goal the "
        f"machine gave, and each cell counts publications with both; darker cells hold more. The diagonal "
        f"(people and machine gave the same goal) holds {agreed} publication-goal pairs."
        + (f" The fullest cell off it: people {off_diagonal[0].labelled}, machine {off_diagonal[0].predicted}, "
           f"{off_diagonal[0].n} publications." if off_diagonal else " No cell off it is filled.")
    )
    return draw_goal_matrix(cells, order, theme, alt_text), off_diagonal


def _curves(curve: list[dict], per_goal: tuple[MetricRow, ...], goals, labelled_goals: list[str], theme: Theme):
    if not curve or not labelled_goals:
        return None
    frame = pd.DataFrame(curve, columns=["goal", "threshold", "precision", "recall"]).astype({"goal": str})
    frame = frame.loc[frame["goal"].isin(labelled_goals)]
    shown = tuple((code, title) for code, title in goals if code in labelled_goals)
    current = {r.goal: r.threshold for r in per_goal}
    low, high = frame["threshold"].min(), frame["threshold"].max()
    alt_text = (
        f"Small multiples, one per goal with labelled publications ({len(shown)}): precision (solid) and recall "
        f"(dashed) on the labelled sample at thresholds from {fmt_score(low)} to {fmt_score(high)}; the dotted "
        "rule marks the threshold used. Raising a threshold trades recall for precision."
    )
    return draw_threshold_curves(frame, current, shown, theme, alt_text)


def _corrected(table: object, goals: Sequence[tuple[str, str]]) -> tuple[CorrectedRow, ...]:
    if not isinstance(table, pd.DataFrame) or table.empty:
        return ()
    require_columns(table, _CORRECTION_NEEDS, "render: extra['corrected_shares']")
    by_goal = table.assign(goal=table["goal"].astype(str)).set_index("goal")
    rows = []
    for code, title in goals:
        if code not in by_goal.index:
            continue
        r = by_goal.loc[code]
        reason = "" if pd.isna(r["reason"]) else str(r["reason"])
        # The note restates the rates shown in their own columns; print it only when it adds a caution.
        cautious = bool(r.get("is_clipped", False)) or pd.isna(r["corrected_low"])
        note = "" if pd.isna(r["note"]) or not cautious else str(r["note"])
        rows.append(CorrectedRow(
            goal=code, title=title, n=int(r["n"]), apparent=float(r["apparent"]),
            sensitivity=float(r["sensitivity"]), specificity=float(r["specificity"]),
            corrected=float(r["corrected"]), corrected_low=float(r["corrected_low"]),
            corrected_high=float(r["corrected_high"]), is_refused=bool(reason), remark=reason or note,
        ))
    return tuple(rows)
