"""Machine decisions vs a labelled sample -> `Validation`: per-goal metrics, agreement, a goal matrix,
precision/recall across thresholds, and recommended per-goal thresholds.

Metrics are scikit-learn's definitions, computed in `metrics.py`. The decisions validated are the `is_aligned` column as given: pass the
machine's table (before review overrides) to measure the method rather than the reviewers.
"""

from __future__ import annotations

import math
import os
import tempfile
from dataclasses import dataclass
from pathlib import Path
from typing import Mapping

import numpy as np
import pandas as pd
from reporter.analyse.decisions import check_policy, decide
from reporter.analyse.labelled import LabelledSample, UnmatchedLabel
from reporter.analyse.metrics import cohen_kappa, confusion_counts, exact_match_share, hamming_loss, precision_recall_f1
from reporter.filemode import give_default_mode
from reporter.records import require_columns

MIN_SUPPORT = 3  # fewer labelled positives cannot tune a threshold; the goal keeps the global one
GRID = tuple(round(0.05 * i, 2) for i in range(1, 20))  # 0.05 .. 0.95
NONE = "none"  # matrix row/column for "no goal" (labelled or predicted)
PER_GOAL_COLUMNS = (
    "goal", "threshold", "support", "n_predicted", "tp", "fp", "fn", "tn", "precision", "recall", "f1", "kappa",
)
CURVE_COLUMNS = ("goal", "threshold", "n_predicted", "precision", "recall", "f1")
RECOMMENDED_COLUMNS = ("goal", "current", "recommended", "support", "precision", "recall", "f1", "reason")
PAIR_COLUMNS = ("record_id", "goal", "alignment_score", "is_explicit", "is_labelled", "is_predicted")
CAVEAT = (
    "Recommended thresholds are tuned on the same labelled sample they are scored on, so their "
    "figures are optimistic; check them on publications labelled afterwards."
)


@dataclass(frozen=True)
class Validation:
    n_rows: int  # rows in the labelled sample file
    n_matched: int  # labelled publications compared (matched and scored)
    unmatched: tuple[UnmatchedLabel, ...]
    per_goal: pd.DataFrame  # PER_GOAL_COLUMNS; precision/recall/f1/kappa NaN where undefined
    averages: dict  # {"micro": {precision, recall, f1}, "macro": {...}}
    agreement: dict  # n, n_exact, exact_match (all goals right), hamming (share of pairs right)
    matrix: pd.DataFrame  # labelled, predicted, n: papers labelled `labelled` and predicted `predicted`
    curve: pd.DataFrame  # CURVE_COLUMNS, every goal at every GRID threshold
    recommended: pd.DataFrame  # RECOMMENDED_COLUMNS
    recommended_averages: dict  # micro/macro at the recommended thresholds (same sample: optimistic)
    pairs: pd.DataFrame  # PAIR_COLUMNS, one row per (labelled publication, goal); input to correction
    settings: dict  # policy, objective, target_precision, min_support, global_threshold, grid, labelled_sample

    @property
    def thresholds(self) -> dict[str, float]:
        """goal -> recommended threshold, the content of the thresholds file."""
        return {row.goal: float(row.recommended) for row in self.recommended.itertuples()}

    def to_dict(self) -> dict:
        """JSON-ready (NaN -> None) for Findings.extra["validation"] and validation.json."""
        return _plain({
            "n_rows": self.n_rows,
            "n_matched": self.n_matched,
            "n_unmatched": len(self.unmatched),
            "unmatched": [{"line": u.line, "given": u.given, "reason": u.reason} for u in self.unmatched],
            "per_goal": _records(self.per_goal),
            "averages": self.averages,
            "agreement": self.agreement,
            "matrix": _records(self.matrix),
            "curve": _records(self.curve),
            "recommended": _records(self.recommended),
            "recommended_averages": self.recommended_averages,
            "settings": self.settings,
            "caveat": CAVEAT,
        })


def validate(
    scores_table: pd.DataFrame,
    labelled: LabelledSample,
    goal_codes: tuple[str, ...],
    thresholds: Mapping[str, float],
    policy: str,
    *,
    global_threshold: float | None = None,
    target_precision: float | None = None,
    min_support: int = MIN_SUPPORT,
) -> Validation:
    """Compare the score table's decisions with the labelled sample, goal by goal.

    `global_threshold` is what a goal with too few labelled positives keeps (default: the
    most common of `thresholds`). With `target_precision`, a goal's recommended threshold is
    the one with the best recall among those reaching that precision; else the best F1.
    """
    require_columns(scores_table, ("record_id", "goal", "alignment_score", "is_explicit", "is_aligned"), "validate")
    check_policy(policy)
    codes = tuple(str(c) for c in goal_codes)
    current = np.array([float(thresholds[c]) for c in codes])
    if global_threshold is None:
        values, counts = np.unique(current, return_counts=True)
        global_threshold = float(values[counts.argmax()])
    scored = set(scores_table["record_id"].astype(str))
    sample = labelled.without(set(labelled.labels["record_id"]) - scored, "publication has no scores")
    truth, score, explicit, predicted = _matrices(scores_table, sample, codes)

    per_goal = _per_goal(truth, predicted, codes, current)
    curve = _curve(truth, score, explicit, codes, policy)
    recommended = _recommend(curve, per_goal, codes, policy, global_threshold, target_precision, min_support)
    best = np.array([recommended.set_index("goal").loc[c, "recommended"] for c in codes], dtype=float)
    tuned = decide(score, explicit, best[None, :], policy) if len(truth) else predicted
    at_best = _per_goal(truth, tuned, codes, best).set_index("goal")
    for name in ("precision", "recall", "f1"):
        recommended[name] = [at_best.loc[c, name] for c in codes]
    ids = sample.labels["record_id"].tolist()
    return Validation(
        n_rows=sample.n_rows,
        n_matched=len(ids),
        unmatched=sample.unmatched,
        per_goal=per_goal,
        averages=_averages(truth, predicted),
        agreement=_agreement(truth, predicted),
        matrix=_goal_matrix(truth, predicted, codes),
        curve=curve,
        recommended=recommended,
        recommended_averages=_averages(truth, tuned),
        pairs=pd.DataFrame({
            "record_id": np.repeat(ids, len(codes)), "goal": np.tile(codes, len(ids)),
            "alignment_score": score.reshape(-1), "is_explicit": explicit.reshape(-1),
            "is_labelled": truth.reshape(-1), "is_predicted": predicted.reshape(-1),
        }, columns=list(PAIR_COLUMNS)),
        settings={
            "policy": policy,
            "objective": "best recall at target precision" if target_precision else "best F1",
            "target_precision": target_precision,
            "min_support": min_support,
            "global_threshold": global_threshold,
            "grid": list(GRID),
            "labelled_sample": str(labelled.path),
            "metrics": "scikit-learn precision_recall_fscore_support, cohen_kappa_score, accuracy_score, hamming_loss",
        },
    )


def write_thresholds(path: Path, thresholds: Mapping[str, float]) -> Path:
    """Write `goal,threshold` rows (the format read_thresholds reads) via a temp file and os.replace."""
    path = Path(path)
    path.parent.mkdir(parents=True, exist_ok=True)
    text = "goal,threshold\n" + "".join(f"{goal},{float(value):.6g}\n" for goal, value in thresholds.items())
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=path.parent)
    try:
        give_default_mode(fd)  # mkstemp makes it 0600
        with os.fdopen(fd, "w", encoding="utf-8", newline="") as handle:
            handle.write(text)
        os.replace(tmp, path)
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise
    return path


def format_validation(validation: Validation) -> str:
    """Plain-text summary for the terminal: per-goal table, averages, agreement, unmatched rows."""
    def num(value) -> str:
        return "   -" if value is None or (isinstance(value, float) and math.isnan(value)) else f"{value:.2f}"

    lines = [
        f"Labelled sample: {validation.n_rows} rows, {validation.n_matched} publications compared, "
        f"{len(validation.unmatched)} not matched.",
        f"{'goal':>6} {'n+':>4} {'pred':>4} {'prec':>5} {'rec':>5} {'F1':>5} {'kappa':>6} {'now':>5} {'new':>5}",
    ]
    new = validation.recommended.set_index("goal")
    for row in validation.per_goal.itertuples():
        lines.append(
            f"{row.goal:>6} {row.support:>4} {row.n_predicted:>4} {num(row.precision):>5} {num(row.recall):>5} "
            f"{num(row.f1):>5} {num(row.kappa):>6} {row.threshold:>5.2f} {new.loc[row.goal, 'recommended']:>5.2f}"
        )
    for name in ("micro", "macro"):
        avg = validation.averages[name]
        lines.append(f"{name}: precision {num(avg['precision'])}, recall {num(avg['recall'])}, F1 {num(avg['f1'])}")
    agree = validation.agreement
    lines.append(f"all goals right: {num(agree['exact_match'])}; goal decisions right: {num(agree['hamming'])}")
    lines.extend(f"not matched, line {u.line}: {u.given}: {u.reason}" for u in validation.unmatched)
    return "\n".join(lines)


# --- pieces ---------------------------------------------------------------------------------


def _matrices(scores_table: pd.DataFrame, sample: LabelledSample, codes: tuple[str, ...]):
    ids = sample.labels["record_id"].tolist()
    table = scores_table.assign(record_id=scores_table["record_id"].astype(str), goal=scores_table["goal"].astype(str))
    table = table[table["record_id"].isin(ids)].set_index(["record_id", "goal"])
    index = pd.MultiIndex.from_product([ids, codes], names=["record_id", "goal"])
    missing = index.difference(table.index)
    if len(missing):
        raise ValueError(f"validate: {len(missing)} labelled (publication, goal) pairs have no score row, "
                         f"e.g. {missing[0]}")
    table = table.loc[index]
    shape = (len(ids), len(codes))
    truth = np.array([[c in goals for c in codes] for goals in sample.labels["goals"]], dtype=bool).reshape(shape)
    return (
        truth,
        table["alignment_score"].to_numpy(dtype=float).reshape(shape),
        table["is_explicit"].to_numpy(dtype=bool).reshape(shape),
        table["is_aligned"].to_numpy(dtype=bool).reshape(shape),
    )


def _prf(truth: np.ndarray, predicted: np.ndarray, average):
    # A goal nobody labelled or nothing predicted has no precision/recall (NaN), not 0,
    # and is left out of the macro average.
    if truth.size == 0:
        return np.full((3, truth.shape[1]), np.nan) if average is None else (np.nan,) * 3
    return precision_recall_f1(truth, predicted, average)


def _kappa(truth: np.ndarray, predicted: np.ndarray) -> float:
    # Undefined (NaN) when both raters use one category only.
    return np.nan if truth.size == 0 else cohen_kappa(truth, predicted)


def _per_goal(truth, predicted, codes, thresholds) -> pd.DataFrame:
    precision, recall, f1 = _prf(truth, predicted, None)
    counts = confusion_counts(truth, predicted) if len(truth) else np.zeros((len(codes), 2, 2), int)
    return pd.DataFrame({
        "goal": codes,
        "threshold": thresholds,
        "support": truth.sum(axis=0).astype(int),
        "n_predicted": predicted.sum(axis=0).astype(int),
        "tp": counts[:, 1, 1], "fp": counts[:, 0, 1], "fn": counts[:, 1, 0], "tn": counts[:, 0, 0],
        "precision": precision, "recall": recall, "f1": f1,
        "kappa": [_kappa(truth[:, g], predicted[:, g]) for g in range(len(codes))],
    }, columns=list(PER_GOAL_COLUMNS))


def _averages(truth, predicted) -> dict:
    out = {}
    for name in ("micro", "macro"):
        p, r, f = _prf(truth, predicted, name)
        out[name] = {"precision": float(p), "recall": float(r), "f1": float(f)}
    return out


def _agreement(truth, predicted) -> dict:
    n = len(truth)
    exact = exact_match_share(truth, predicted) if n else np.nan
    return {
        "n": n,
        "n_exact": int((truth == predicted).all(axis=1).sum()),
        "exact_match": exact,
        "hamming": 1.0 - hamming_loss(truth, predicted) if n else np.nan,
    }


def _goal_matrix(truth, predicted, codes) -> pd.DataFrame:
    """Counts of papers labelled i and predicted j; "none" stands for no goal on that side."""
    with_none = lambda m: np.column_stack([m, ~m.any(axis=1)]).astype(int)  # noqa: E731
    counts = with_none(truth).T @ with_none(predicted)
    names = [*codes, NONE]
    return pd.DataFrame(
        [(a, b, int(counts[i, j])) for i, a in enumerate(names) for j, b in enumerate(names)],
        columns=["labelled", "predicted", "n"],
    )


def _curve(truth, score, explicit, codes, policy) -> pd.DataFrame:
    frames = []
    for t in GRID:
        predicted = decide(score, explicit, t, policy) if len(truth) else np.zeros_like(truth)
        p, r, f = _prf(truth, predicted, None)
        frames.append(pd.DataFrame({"goal": codes, "threshold": t, "n_predicted": predicted.sum(axis=0).astype(int),
                                    "precision": p, "recall": r, "f1": f}))
    order = {c: i for i, c in enumerate(codes)}
    curve = pd.concat(frames, ignore_index=True)
    curve = curve.sort_values(["goal", "threshold"], key=lambda s: s.map(order) if s.name == "goal" else s)
    return curve.reset_index(drop=True).loc[:, list(CURVE_COLUMNS)]


def _recommend(curve, per_goal, codes, policy, global_threshold, target, min_support) -> pd.DataFrame:
    rows = []
    for goal, now, support in per_goal[["goal", "threshold", "support"]].itertuples(index=False):
        block = curve[curve["goal"] == goal].assign(distance=lambda b: (b["threshold"] - now).abs())
        choice, reason = global_threshold, None
        if policy == "mention_only":
            reason = "policy mention_only: thresholds have no effect; kept the global threshold"
        elif support < min_support:
            reason = f"{support} labelled publications (fewer than {min_support}); kept the global threshold"
        elif target is not None:
            ok = block[block["precision"] >= target]
            if ok.empty:
                reason = f"no threshold reaches precision {target:.2f}; kept the global threshold"
            else:
                pick = ok.sort_values(["recall", "f1", "distance", "threshold"], ascending=[False, False, True, False])
                choice, reason = pick["threshold"].iloc[0], f"best recall with precision at least {target:.2f}"
        elif block["f1"].fillna(0).max() <= 0:
            reason = "no threshold finds a labelled publication; kept the global threshold"
        else:
            # Among equal F1, stay nearest the current threshold, then prefer the stricter one.
            pick = block.sort_values(["f1", "distance", "threshold"], ascending=[False, True, False])
            choice, reason = pick["threshold"].iloc[0], "best F1 on the labelled sample"
        rows.append((goal, float(now), float(choice), int(support), np.nan, np.nan, np.nan, reason))
    return pd.DataFrame(rows, columns=list(RECOMMENDED_COLUMNS))


def _records(table: pd.DataFrame) -> list[dict]:
    return [dict(zip(map(str, table.columns), row)) for row in table.itertuples(index=False, name=None)]


def _plain(value):
    if isinstance(value, dict):
        return {str(k): _plain(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [_plain(v) for v in value]
    if isinstance(value, (bool, np.bool_)):
        return bool(value)
    if isinstance(value, (int, np.integer)):
        return int(value)
    if isinstance(value, (float, np.floating)):
        return None if not math.isfinite(float(value)) else float(value)
    return value
