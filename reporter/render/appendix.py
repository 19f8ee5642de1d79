"""The back of the report: evidence appendix, method notes and cautions, arranged from plain data."""

from __future__ import annotations

import math
from typing import Sequence
from urllib.parse import quote

import pandas as pd

from reporter.render.context import (
    Cautions, CountRow, EvidenceGoal, EvidenceRow, InputRow, MethodSection, RealTextAccuracy, RenderInputs,
    SensitivityRow,
)
from reporter.render.validation_section import build_review_brief, build_validation_brief

POLICY_TEXT = {
    "score_or_mention": "aligned when the alignment score reaches the threshold or the goal is mentioned explicitly",
    "score_only": "aligned when the alignment score reaches the threshold; explicit mentions are reported but do not decide",
    "mention_only": "aligned only when the goal is mentioned explicitly",
}
BACKEND_TEXT = {
    "embedding-int8": "sentence embeddings; the model's weights quantised to 8-bit integers for speed on ordinary "
                      "processors; its vectors differ slightly from full precision, so a few borderline calls can differ",
    "embedding": "sentence embeddings at full precision (32-bit floating point)",
    "nli": "zero-shot entailment with a cross-encoder",
}
COUNTING_TEXT = {
    "full": "full counting: a publication counts once for every department or country it involves",
    "fractional": "fractional counting: a publication involving k departments or countries counts 1/k for each",
}
STATUS_TEXT = {"merged": "merged", "set_aside": "set aside"}
REVIEW_TEXT = {True: "included by reviewer", False: "excluded by reviewer"}
_SENSITIVITY_ORDER = {"low": 0, "chosen": 1, "high": 2}


def doi_url(doi: str) -> str:
    """A plain https://doi.org/ link; '' for values that are not DOIs (no other scheme can slip in)."""
    doi = (doi or "").strip()
    if not doi.startswith("10."):
        return ""
    # Keep the DOI's own slashes and punctuation; escape anything that would end or alter the URL.
    return "https://doi.org/" + quote(doi, safe="/:;()._-")


def build_evidence(inputs: RenderInputs, goals: Sequence[tuple[str, str]], cap: int) -> tuple[EvidenceGoal, ...]:
    """Per goal, the aligned publications with the highest alignment scores, at most `cap` of them.

    With a review file (score columns is_overridden, review_note) every reviewed pair is shown
    whatever its rank: included ones among the aligned rows, excluded ones in their own list.
    """
    table = inputs.scores
    reviewed = table["is_overridden"].astype(bool) if "is_overridden" in table else pd.Series(False, index=table.index)
    notes = table["review_note"].fillna("").astype(str) if "review_note" in table else pd.Series("", index=table.index)
    table = table.assign(goal=table["goal"].astype(str), by_reviewer=reviewed, reviewer_note=notes).sort_values(
        ["alignment_score", "record_id"], ascending=[False, True], kind="stable")
    aligned = table["is_aligned"].astype(bool)
    records = inputs.records.set_index("record_id")
    blocks = []
    for code, title in goals:
        in_goal = table["goal"] == code
        rows, excluded = table.loc[in_goal & aligned], table.loc[in_goal & ~aligned & table["by_reviewer"]]
        if rows.empty and excluded.empty:
            continue
        strongest = rows.head(cap)
        # Reviewer-included pairs below the cap stay visible: a reader checks the overrides first.
        pinned = rows.iloc[cap:].loc[lambda f: f["by_reviewer"]]
        shown = tuple(_evidence_row(r, records) for r in pd.concat([strongest, pinned]).itertuples())
        total = len(rows)
        note = f"showing the {len(strongest)} strongest of {total}" if total > len(strongest) else ""
        if note and not pinned.empty:
            note += f" and {len(pinned)} more included by a reviewer"
        blocks.append(EvidenceGoal(goal=code, title=title, rows=shown, n_total=total, note=note,
                                   excluded=tuple(_evidence_row(r, records) for r in excluded.itertuples())))
    return tuple(blocks)


def _evidence_row(r, records: pd.DataFrame) -> EvidenceRow:
    rec = records.loc[r.record_id]
    return EvidenceRow(
        record_id=str(r.record_id), title=str(rec["title"]), year=int(rec["year"]),
        departments="; ".join(rec["departments"]), doi=str(rec["doi"]), doi_url=doi_url(str(rec["doi"])),
        alignment_score=float(r.alignment_score), evidence=str(r.evidence), is_explicit=bool(r.is_explicit),
        review=REVIEW_TEXT[bool(r.is_aligned)] if r.by_reviewer else "",
        review_note=str(r.reviewer_note) if r.by_reviewer else "",
    )


def _intake(log: pd.DataFrame, all_files: Sequence[str] = ()) -> tuple[tuple[InputRow, ...], InputRow]:
    def counts(part: pd.DataFrame, name: str, fmt: str) -> InputRow:
        status = part["status"]
        return InputRow(name, fmt, len(part), int((status == "kept").sum()), int((status == "merged").sum()),
                        int((status == "set_aside").sum()))

    rows = [
        counts(part, str(name), ", ".join(sorted(part["format"].astype(str).unique())))
        for name, part in log.groupby("source_file", sort=True)
    ]
    # A configured input that yielded no record has no log row; it still gets its line, with 0.
    seen = {row.source_file for row in rows}
    rows += [InputRow(name, "", 0, 0, 0, 0) for name in all_files if name not in seen]
    return tuple(sorted(rows, key=lambda row: row.source_file)), counts(log, "all files", "")


def _reasons(log: pd.DataFrame) -> tuple[CountRow, ...]:
    out = log.loc[log["status"] != "kept"]
    if out.empty:
        return ()
    grouped = out.groupby(["status", "reason"], sort=True).size().reset_index(name="n")
    grouped = grouped.sort_values(["n", "status", "reason"], ascending=[False, True, True], kind="stable")
    total = len(log)
    return tuple(CountRow(f"{STATUS_TEXT.get(r.status, r.status)}: {r.reason}", int(r.n), r.n / total)
                 for r in grouped.itertuples())


def _coverage(coverage: dict) -> tuple[CountRow, ...]:
    rows = [CountRow("publications scored", coverage.get("n_records", math.nan), None)]
    for key, label in (("abstract", "with an abstract"), ("department", "with a department"),
                       ("country", "with at least one country")):
        if f"n_with_{key}" in coverage:
            rows.append(CountRow(label, coverage[f"n_with_{key}"], coverage.get(f"share_with_{key}")))
    if "n_non_english" in coverage:
        n = coverage.get("n_records") or math.nan
        rows.append(CountRow("not in English", coverage["n_non_english"], coverage["n_non_english"] / n))
    return tuple(rows)


def _sensitivity(frame: pd.DataFrame, goals: Sequence[tuple[str, str]]) -> tuple[SensitivityRow, ...]:
    if frame.empty:
        return ()
    frame = frame.assign(goal=frame["goal"].astype(str), rank=frame["threshold_label"].map(_SENSITIVITY_ORDER))
    rows = []
    for code, title in goals:
        part = frame.loc[frame["goal"] == code].sort_values("rank", kind="stable")
        if part.empty:
            continue
        cells = tuple(CountRow(f"{float(r.threshold):.2f}", r.n_aligned, r.share) for r in part.itertuples())
        rows.append(SensitivityRow(code, title, cells))
    return tuple(rows)


def build_method(inputs: RenderInputs, goals: Sequence[tuple[str, str]]) -> MethodSection:
    findings, settings = inputs.findings, inputs.score_settings
    meta = findings.meta
    per_goal = dict(settings.get("thresholds") or meta.get("thresholds") or {})
    single = settings.get("threshold", meta.get("threshold"))
    distinct = {float(v) for v in per_goal.values()}
    varied = len(distinct) > 1 or (distinct and single is not None and distinct != {float(single)})
    thresholds = tuple(CountRow(code, float(per_goal[code]), None) for code, _ in goals if code in per_goal) if varied else ()
    inputs_rows, totals = _intake(inputs.intake_log, [str(f.get("path", "")) for f in inputs.manifest.get("inputs", [])])
    extras = tuple(
        CountRow(str(k).replace("_", " "), v, None) for k, v in sorted(findings.extra.items())
        if isinstance(v, (int, float)) and not isinstance(v, bool)
    )
    policy = str(settings.get("policy", meta.get("policy", "")))
    counting = str(meta.get("counting", ""))
    return MethodSection(
        inputs=inputs_rows, intake_totals=totals, reasons=_reasons(inputs.intake_log),
        coverage=_coverage(findings.coverage),
        model={**{k: str(inputs.model_info.get(k, "")) for k in ("id", "checksum", "backend")},
               "method": BACKEND_TEXT.get(str(inputs.model_info.get("backend", "")), "")},
        framework={k: str(inputs.framework_info.get(k, "")) for k in ("id", "title", "version", "checksum")},
        threshold=None if varied or single is None else float(single),
        thresholds=thresholds,
        policy=POLICY_TEXT.get(policy, policy),
        counting=COUNTING_TEXT.get(counting, counting),
        text_fields=", ".join(settings.get("text_fields", ())),
        confidence=float(meta.get("confidence", math.nan)),
        min_group_size=int(meta.get("min_group_size", 10)),
        fdr=float(meta.get("fdr", math.nan)),
        sensitivity=_sensitivity(findings.sensitivity, goals),
        validation=build_validation_brief(findings.extra),
        real_text=build_real_text_accuracy(inputs, None if varied or single is None else float(single)),
        review=build_review_brief(findings.extra, goals),
        extras=extras,
        methods=tuple((str(k).replace("_", " "), str(v)) for k, v in sorted(dict(meta.get("methods", {})).items())),
    )


def build_real_text_accuracy(inputs: RenderInputs, threshold: float | None) -> RealTextAccuracy | None:
    """The framework's accuracy on real abstracts, marked as not applying when this run scored otherwise."""
    figures = inputs.framework_info.get("accuracy_on_real_abstracts")
    if not figures:
        return None
    low, high = figures["recall_lowest"], figures["recall_highest"]
    applies = (str(inputs.model_info.get("backend", "")) == figures["backend"]
               and threshold is not None and math.isclose(threshold, float(figures["threshold"])))
    return RealTextAccuracy(
        n_abstracts=int(figures["n_abstracts"]), measured_on=str(figures["measured_on"]),
        macro_f1=float(figures["macro_f1"]), top1_primary=float(figures["top1_primary"]),
        no_goal_unaligned=float(figures["no_goal_unaligned"]),
        recall_low=(str(low["goal"]), float(low["recall"])), recall_high=(str(high["goal"]), float(high["recall"])),
        share_english_found=_optional(figures.get("english_goal_papers_aligned")),
        share_non_english_found=_optional(figures.get("non_english_goal_papers_aligned")),
        applies=applies,
    )


def _optional(value) -> float | None:
    return None if value is None else float(value)


def build_cautions(inputs: RenderInputs) -> Cautions:
    log = inputs.intake_log
    set_aside = log.loc[log["status"] == "set_aside", "reason"].astype(str).str.lower()
    return Cautions(
        n_non_english=int(inputs.findings.coverage.get("n_non_english", 0)),
        real_text=build_real_text_accuracy(inputs, None),
        n_set_aside_language=int(set_aside.str.contains("language|english", regex=True).sum()),
    )
