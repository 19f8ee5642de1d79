"""Change in goal shares: the reporting year against each comparison year and against their mean.

In: the by-year share table. Out: one row per (baseline, goal) with the Newcombe interval
of the difference, a score-test p-value, Benjamini-Hochberg adjustment across goals within
each baseline, and a verdict. Also `check_comparable` for reusing stored results.
"""

from __future__ import annotations

import math

import numpy as np
import pandas as pd

from reporter.analyse.intervals import bh_adjust, difference_p_value, newcombe_difference
from reporter.errors import ComparisonError

CHANGE_COLUMNS = (
    "goal", "baseline", "baseline_kind", "year", "n_baseline", "n_aligned_baseline", "n", "n_aligned",
    "share_baseline", "share", "diff", "diff_low", "diff_high", "p_value", "p_adjusted", "is_change", "verdict",
)
VERDICTS = ("increase", "decrease", "no clear change", "too small")

#: Run-manifest fields that must agree before stored results from two runs are compared.
COMPARABLE_FIELDS = (
    "model_checksum", "framework_id", "framework_version", "framework_checksum", "thresholds", "policy",
    "text_fields",
)


def year_ranges(years) -> str:
    """Years as runs: (2019, 2021, 2022, 2023) -> "2019, 2021-2023"; decades stay one short phrase."""
    ordered = sorted({int(y) for y in years})
    runs: list[list[int]] = []
    for year in ordered:
        if runs and year == runs[-1][-1] + 1:
            runs[-1].append(year)
        else:
            runs.append([year])
    return ", ".join(str(r[0]) if len(r) == 1 else f"{r[0]}-{r[-1]}" for r in runs)


def baseline_label(years: tuple[int, ...]) -> str:
    """"2024" for one year; "mean 2022-2024" for several (runs of years as ranges)."""
    years = tuple(sorted(years))
    if len(years) == 1:
        return str(years[0])
    return "mean " + year_ranges(years)


def baselines(comparison_years: tuple[int, ...]) -> list[tuple[str, tuple[int, ...]]]:
    """(kind, years) per baseline: each comparison year, then ("mean", all of them) when there are two or more."""
    singles = [("year", (year,)) for year in sorted(comparison_years)]
    # With one comparison year the pooled baseline would repeat it.
    pooled = [("mean", tuple(sorted(comparison_years)))] if len(comparison_years) > 1 else []
    return singles + pooled


def year_changes(
    by_year: pd.DataFrame,
    goal_codes: tuple[str, ...],
    reporting_year: int,
    comparison_years: tuple[int, ...],
    confidence: float,
    fdr: float,
    min_group_size: int,
) -> pd.DataFrame:
    """Reporting year vs each comparison year and vs the pooled comparison years.

    The "mean" baseline pools the comparison years' publications (sum aligned / sum n),
    i.e. the mean of the yearly shares weighted by each year's size, so a small year
    does not swing it. A comparison is "too small" when either side has fewer than
    `min_group_size` publications; such goals are left out of the BH family. A change is
    called only when the adjusted p-value is below `fdr` and the interval excludes 0.
    """
    counts = by_year.set_index(["year", "goal"])[["n", "n_aligned", "n_publications"]]
    rows = []
    for kind, years in baselines(tuple(comparison_years)):
        block = []
        for goal in goal_codes:
            now = counts.loc[(reporting_year, goal)]
            before = counts.loc[[(year, goal) for year in years]].sum()
            block.append(_compare(goal, kind, years, reporting_year, before, now, confidence, min_group_size))
        frame = pd.DataFrame(block)
        frame["p_adjusted"] = bh_adjust(frame["p_value"])
        rows.append(frame)
    if not rows:
        return pd.DataFrame({c: pd.Series(dtype=_dtype(c)) for c in CHANGE_COLUMNS})
    table = call_changes(pd.concat(rows, ignore_index=True), fdr)
    return table.loc[:, list(CHANGE_COLUMNS)]


def call_changes(table: pd.DataFrame, fdr: float) -> pd.DataFrame:
    """Add is_change and verdict to a table of diff, diff_low, diff_high, p_adjusted and _too_small.

    A change is called only when the adjusted p-value is below `fdr` and the interval excludes 0.
    """
    excludes_zero = (table["diff_low"] > 0) | (table["diff_high"] < 0)
    is_change = (table["p_adjusted"] < fdr) & excludes_zero & ~table["_too_small"]
    verdict = np.select(
        [table["_too_small"], is_change & (table["diff"] > 0), is_change & (table["diff"] < 0)],
        ["too small", "increase", "decrease"],
        default="no clear change",
    )
    return table.assign(is_change=is_change, verdict=verdict)


def _compare(goal, kind, years, reporting_year, before, now, confidence, min_group_size) -> dict:
    x1, n1 = float(now["n_aligned"]), float(now["n"])
    x2, n2 = float(before["n_aligned"]), float(before["n"])
    too_small = now["n_publications"] < min_group_size or before["n_publications"] < min_group_size
    diff, low, high = newcombe_difference(x1, n1, x2, n2, confidence)
    return {
        "goal": goal,
        "baseline": baseline_label(years),
        "baseline_kind": kind,
        "year": reporting_year,
        "n_baseline": int(n2),
        "n_aligned_baseline": int(x2),
        "n": int(n1),
        "n_aligned": int(x1),
        "share_baseline": x2 / n2 if n2 > 0 else math.nan,
        "share": x1 / n1 if n1 > 0 else math.nan,
        "diff": diff,
        "diff_low": low,
        "diff_high": high,
        "p_value": math.nan if too_small else difference_p_value(x1, n1, x2, n2),
        "_too_small": bool(too_small),
    }


def _dtype(column: str) -> str:
    if column in ("goal", "baseline", "baseline_kind", "verdict"):
        return "object"
    if column == "is_change":
        return "bool"
    return "int64" if column in ("year", "n_baseline", "n_aligned_baseline", "n", "n_aligned") else "float64"


def check_comparable(manifest_a: dict, manifest_b: dict) -> None:
    """Raise ComparisonError naming every field in which two run manifests differ.

    Used before stored results from an earlier run are reused: figures from a different
    model, framework, threshold, policy or text are not like-for-like. A field missing from
    one manifest counts as differing.
    """
    differences = []
    for name in COMPARABLE_FIELDS:
        a, b = manifest_a.get(name, _MISSING), manifest_b.get(name, _MISSING)
        if _same(a, b):
            continue
        if isinstance(a, dict) and isinstance(b, dict):
            keys = sorted(set(a) | set(b), key=str)
            parts = [
                f"{k}: {_show(a.get(k, _MISSING))} vs {_show(b.get(k, _MISSING))}"
                for k in keys
                if not _same(a.get(k, _MISSING), b.get(k, _MISSING))
            ]
            differences.append(f"{name} ({'; '.join(parts)})")
        else:
            differences.append(f"{name} ({_show(a)} vs {_show(b)})")
    if differences:
        raise ComparisonError(
            "stored results are not like-for-like and cannot be compared; these run-manifest fields differ: "
            + ", ".join(differences)
            + ". Re-run the earlier years with the current settings instead."
        )


class _Missing:
    def __repr__(self) -> str:
        return "missing"


_MISSING = _Missing()


def _normal(value):
    # A manifest read back from JSON has lists where the run had tuples.
    if isinstance(value, (list, tuple)):
        return tuple(_normal(v) for v in value)
    if isinstance(value, dict):
        return {str(k): _normal(v) for k, v in value.items()}
    return value


def _same(a, b) -> bool:
    a, b = _normal(a), _normal(b)
    if isinstance(a, float) or isinstance(b, float):
        try:
            return math.isclose(float(a), float(b), rel_tol=0, abs_tol=1e-9)
        except (TypeError, ValueError):
            return False
    if isinstance(a, dict) and isinstance(b, dict):
        return set(a) == set(b) and all(_same(a[k], b[k]) for k in a)
    return a == b


def _show(value) -> str:
    value = _normal(value)
    if isinstance(value, tuple):
        return "[" + ", ".join(map(str, value)) + "]"
    return repr(value)
