"""Goal shares corrected for the classifier's measured error rates (Rogan & Gladen 1978).

In: apparent shares (goal, n, n_aligned) and the labelled pairs from `Validation.pairs`.
Out: one row per goal with the corrected share and a bootstrap interval that carries the
uncertainty of both the labelled sample (sensitivity, specificity) and the apparent share.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

CORRECTION_COLUMNS = (
    "goal", "n", "apparent", "sensitivity", "specificity", "corrected", "corrected_low", "corrected_high",
    "is_clipped", "n_resamples", "n_resamples_used", "reason", "note",
)
MAX_UNDEFINED_SHARE = 0.05  # more undefined resamples than this and the interval would be biased; give none

EXPLANATION = (
    "A share counted by the machine is an apparent share: it includes publications the machine "
    "wrongly counts and misses some it should count. Comparing the machine with people's labels on "
    "the labelled sample measures two rates per goal: sensitivity (the share of publications people "
    "judged aligned that the machine also counted) and specificity (the share of publications people "
    "judged not aligned that the machine also left out). The corrected share is (apparent share + "
    "specificity - 1) / (sensitivity + specificity - 1), after Rogan and Gladen (1978), limited to "
    "0-100%. Its interval comes from redrawing the labelled sample and the publication list many "
    "times, so it widens when the labelled sample is small. The correction assumes the labelled "
    "sample is like the rest of the publications; a hand-picked sample can make it worse, not better."
)


def rogan_gladen(apparent: float, sensitivity: float, specificity: float) -> float:
    """The Rogan-Gladen estimate of the true share, clipped to [0, 1].

    Raises ValueError with a plain reason when sensitivity + specificity <= 1: the machine's
    decisions then carry no information about the true share (or an inverted one).
    """
    reason = refusal_reason(sensitivity, specificity)
    if reason:
        raise ValueError(reason)
    return float(np.clip((apparent + specificity - 1.0) / (sensitivity + specificity - 1.0), 0.0, 1.0))


def refusal_reason(sensitivity: float, specificity: float) -> str | None:
    """Why no correction can be made from these rates, or None when it can."""
    if np.isnan(sensitivity):
        return "no publication in the labelled sample was judged aligned, so sensitivity cannot be measured"
    if np.isnan(specificity):
        return "every publication in the labelled sample was judged aligned, so specificity cannot be measured"
    if sensitivity + specificity <= 1:
        return (f"sensitivity {sensitivity:.2f} + specificity {specificity:.2f} is not above 1: the machine does "
                "no better than chance for this goal, so its share cannot be corrected")
    return None


def corrected_share(
    n_aligned: int, n: int, truth: np.ndarray, predicted: np.ndarray,
    confidence: float, rng: np.random.Generator, resamples: int,
) -> dict:
    """Corrected share of one goal; `truth`/`predicted` are the labelled sample's flags for it."""
    truth, predicted = np.asarray(truth, bool), np.asarray(predicted, bool)
    apparent = n_aligned / n if n else np.nan
    sens, spec = _rates(truth[None, :], predicted[None, :])
    sens, spec = float(sens[0]), float(spec[0])
    out = {"n": int(n), "apparent": apparent, "sensitivity": sens, "specificity": spec, "corrected": np.nan,
           "corrected_low": np.nan, "corrected_high": np.nan, "is_clipped": False,
           "n_resamples": int(resamples), "n_resamples_used": 0, "reason": "", "note": ""}
    reason = "no publications to correct" if not n else refusal_reason(sens, spec)
    if reason:
        out["reason"] = reason
        return out
    raw = (apparent + spec - 1.0) / (sens + spec - 1.0)
    out["corrected"] = float(np.clip(raw, 0.0, 1.0))
    out["is_clipped"] = bool(raw < 0 or raw > 1)
    # Resample the labelled sample (publications are the units) and, independently, the apparent share.
    idx = rng.integers(0, len(truth), size=(resamples, len(truth)))
    boot_sens, boot_spec = _rates(truth[idx], predicted[idx])
    boot_apparent = rng.binomial(n, apparent, size=resamples) / n
    valid = ~np.isnan(boot_sens) & ~np.isnan(boot_spec) & (boot_sens + boot_spec > 1)
    out["n_resamples_used"] = int(valid.sum())
    note = [f"{sens:.0%} of publications people judged aligned were counted; "
            f"{spec:.0%} of those judged not aligned were left out"]
    if out["is_clipped"]:
        note.append("the formula gave a value outside 0-100% and was limited to it")
    if valid.mean() < 1 - MAX_UNDEFINED_SHARE:
        note.append(f"no interval: in {1 - valid.mean():.0%} of redrawn samples the correction was undefined "
                    "(the labelled sample is too small for this goal)")
    else:
        draws = np.clip((boot_apparent[valid] + boot_spec[valid] - 1) / (boot_sens[valid] + boot_spec[valid] - 1), 0, 1)
        tail = (1 - confidence) / 2 * 100
        out["corrected_low"], out["corrected_high"] = (float(v) for v in np.percentile(draws, [tail, 100 - tail]))
    out["note"] = "; ".join(note) + "."
    return out


def correct_shares(
    shares: pd.DataFrame, pairs: pd.DataFrame, confidence: float, rng: np.random.Generator, resamples: int,
) -> pd.DataFrame:
    """Corrected share per goal of `shares` (goal, n, n_aligned), in its row order.

    `pairs` is `Validation.pairs` (record_id, goal, is_labelled, is_predicted). The apparent
    shares must come from the same decisions the pairs were validated on (machine decisions,
    same thresholds and policy), else the measured rates do not apply to them.
    """
    rows = []
    for goal, n, n_aligned in shares[["goal", "n", "n_aligned"]].itertuples(index=False):
        block = pairs[pairs["goal"].astype(str) == str(goal)]
        result = corrected_share(int(n_aligned), int(n), block["is_labelled"].to_numpy(bool),
                                 block["is_predicted"].to_numpy(bool), confidence, rng, resamples)
        rows.append({"goal": str(goal), **result})
    return pd.DataFrame(rows, columns=list(CORRECTION_COLUMNS))


def _rates(truth: np.ndarray, predicted: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Row-wise sensitivity and specificity; NaN where a row has no positives (or no negatives)."""
    positives, negatives = truth.sum(axis=1), (~truth).sum(axis=1)
    with np.errstate(invalid="ignore", divide="ignore"):
        sens = np.where(positives > 0, (truth & predicted).sum(axis=1) / positives, np.nan)
        spec = np.where(negatives > 0, (~truth & ~predicted).sum(axis=1) / negatives, np.nan)
    return sens.astype(float), spec.astype(float)
