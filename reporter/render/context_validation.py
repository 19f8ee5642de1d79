"""What the validation section and the review notes show: frozen dataclasses, a help string per field.

Filled by `render.validation_section` from `Findings.extra` (validation, corrected shares,
review); like `context.py`, numbers arrive ready and templates only format them.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

from reporter.render.context import Chart


def _h(text: str, **kwargs: Any) -> Any:
    return field(metadata={"help": text}, **kwargs)


@dataclass(frozen=True)
class MetricRow:
    goal: str = _h("Goal code")
    title: str = _h("Goal short title")
    threshold: float = _h("Threshold the machine's decisions were made at")
    support: int = _h("Labelled publications people judged aligned with the goal")
    n_predicted: int = _h("Labelled publications the machine counted as aligned")
    tp: int = _h("Counted by the machine and judged aligned by people")
    fp: int = _h("Counted by the machine, not judged aligned by people")
    fn: int = _h("Judged aligned by people, missed by the machine")
    precision: float = _h("tp / (tp + fp); NaN when the machine counted none")
    recall: float = _h("tp / (tp + fn); NaN when people judged none aligned")
    f1: float = _h("Harmonic mean of precision and recall; NaN when undefined")
    kappa: float = _h("Cohen's kappa between machine and people for the goal; NaN when undefined")


@dataclass(frozen=True)
class AverageRow:
    label: str = _h("'micro average' (every goal decision pooled) or 'macro average' (mean over goals)")
    precision: float = _h("Averaged precision")
    recall: float = _h("Averaged recall")
    f1: float = _h("Averaged F1")


@dataclass(frozen=True)
class MatrixCell:
    labelled: str = _h("Goal people gave, as printed ('none' for no goal)")
    predicted: str = _h("Goal the machine gave, as printed ('none' for no goal)")
    n: int = _h("Labelled publications with that pair of goals")


@dataclass(frozen=True)
class ThresholdRow:
    goal: str = _h("Goal code")
    title: str = _h("Goal short title")
    current: float = _h("Threshold used for this report")
    recommended: float = _h("Threshold that did best on the labelled sample")
    support: int = _h("Labelled publications judged aligned with the goal")
    precision: float = _h("Precision at the recommended threshold (same sample: optimistic)")
    recall: float = _h("Recall at the recommended threshold (same sample: optimistic)")
    f1: float = _h("F1 at the recommended threshold (same sample: optimistic)")
    reason: str = _h("Why this threshold was recommended, or why the current one was kept")
    is_changed: bool = _h("True when the recommended threshold differs from the current one")


@dataclass(frozen=True)
class CorrectedRow:
    goal: str = _h("Goal code")
    title: str = _h("Goal short title")
    n: int = _h("Publications the machine share is taken over")
    apparent: float = _h("Share counted by the machine (before review)")
    sensitivity: float = _h("Share of publications judged aligned that the machine counted")
    specificity: float = _h("Share of publications judged not aligned that the machine left out")
    corrected: float = _h("Rogan-Gladen corrected share in [0, 1]; NaN when refused")
    corrected_low: float = _h("Lower bootstrap bound of the corrected share; NaN when none")
    corrected_high: float = _h("Upper bootstrap bound of the corrected share; NaN when none")
    is_refused: bool = _h("True when no correction could be made; `remark` says why")
    remark: str = _h("The refusal reason, or analyse's note when the share was clipped or has no interval; else ''")


@dataclass(frozen=True)
class UnmatchedRow:
    line: int = _h("Line of the labelled sample file")
    given: str = _h("Record id or DOI as written in the file")
    reason: str = _h("Why it was not compared")


@dataclass(frozen=True)
class ValidationSection:
    sample: str = _h("File name of the labelled sample")
    n_rows: int = _h("Rows in the labelled sample file")
    n_matched: int = _h("Labelled publications compared with the machine")
    n_unmatched: int = _h("Labelled rows not compared (no such publication, or not scored)")
    unmatched: tuple[UnmatchedRow, ...] = _h("The first unmatched rows, in file order")
    policy: str = _h("Alignment policy in words")
    per_goal: tuple[MetricRow, ...] = _h("Per-goal precision, recall, F1, support, kappa, framework order")
    averages: tuple[AverageRow, ...] = _h("Micro and macro averages at the thresholds used")
    n_exact: int = _h("Labelled publications whose goals the machine got all right")
    share_exact: float = _h("n_exact / n_matched")
    share_decisions: float = _h("Share of (publication, goal) decisions that agree with people")
    matrix_chart: Chart | None = _h("Labelled goal x predicted goal heat map; None without matched publications")
    off_diagonal: tuple[MatrixCell, ...] = _h(
        "The fullest heat map cells off the diagonal, most first (the chart's text alternative)")
    curve_chart: Chart | None = _h("Precision and recall by threshold, a panel per goal with labelled publications")
    n_goals_without_labels: int = _h("Goals with no labelled publication, left out of the threshold chart")
    recommended: tuple[ThresholdRow, ...] = _h("Recommended per-goal thresholds, framework order")
    recommended_averages: tuple[AverageRow, ...] = _h("Micro and macro averages at the recommended thresholds")
    n_changed: int = _h("Goals whose recommended threshold differs from the current one")
    objective: str = _h("What the recommendation optimised, e.g. 'best F1'")
    caveat: str = _h("Warning that recommended thresholds are tuned on the same sample")
    corrected: tuple[CorrectedRow, ...] = _h("Corrected shares per goal, framework order; empty when not computed")
    n_refused: int = _h("Goals for which no correction could be made")
    correction_explanation: str = _h("What the correction does, in plain words")


@dataclass(frozen=True)
class ValidationBrief:
    n_matched: int = _h("Labelled publications compared")
    macro_f1: float = _h("Macro-averaged F1 at the thresholds used")
    micro_f1: float = _h("Micro-averaged F1 at the thresholds used")
    anchor: str = _h("Anchor of the validation section")
    heading: str = _h("Heading of the validation section, for the cross-reference")


@dataclass(frozen=True)
class ReviewGoalRow:
    goal: str = _h("Goal code")
    title: str = _h("Goal short title")
    n_included: int = _h("Reviewer decisions to include the publication for this goal")
    n_excluded: int = _h("Reviewer decisions to exclude it")
    n_added: int = _h("Included by a reviewer though the machine had not counted it")
    n_removed: int = _h("Excluded by a reviewer though the machine had counted it")


@dataclass(frozen=True)
class ReviewBrief:
    n_decisions: int = _h("Reviewer decisions applied")
    n_included: int = _h("Decisions to include")
    n_excluded: int = _h("Decisions to exclude")
    n_added: int = _h("Pairs aligned by review, not by the machine")
    n_removed: int = _h("Pairs the machine aligned and review removed")
    n_confirmed: int = _h("Decisions that agreed with the machine")
    n_publications: int = _h("Publications with at least one decision")
    n_reviewers: int = _h("Distinct reviewers named")
    per_goal: tuple[ReviewGoalRow, ...] = _h("Decisions per goal, framework order; goals without decisions left out")
