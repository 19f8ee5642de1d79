"""Human review: the review file (record_id, goal, decision, reviewer, note) overrides alignment decisions.

`read_review_file` checks every row (line-numbered Problems); `apply_review` returns a new score
table with `is_overridden` and `review_note` added; `borderline_pairs` lists pairs worth a look,
in the review file's own columns so a filled-in worksheet can be read back as a review file.
"""

from __future__ import annotations

import csv
import io
from pathlib import Path
from typing import Mapping

import numpy as np
import pandas as pd

from reporter.errors import InputError, Problem
from reporter.records import require_columns
from reporter.sidefiles import read_side_file

_KEY = "validation.review_file"
DECISIONS = ("include", "exclude")
REVIEW_COLUMNS = ("record_id", "goal", "decision", "reviewer", "note")
OVERRIDE_COLUMNS = (*REVIEW_COLUMNS, "line", "was_aligned", "is_aligned", "is_changed")
WORKSHEET_COLUMNS = (
    "record_id", "title", "goal", "alignment_score", "threshold", "is_aligned", "is_explicit", "evidence",
    "decision", "reviewer", "note",
)


def read_review_file(path: Path, record_ids, goal_codes: tuple[str, ...]) -> pd.DataFrame:
    """Review decisions (REVIEW_COLUMNS + line); rows with an empty decision are not yet reviewed and skipped."""
    path = Path(path)
    text = read_side_file(path, _KEY, "review file")
    reader = csv.reader(io.StringIO(text))
    header = [h.strip().casefold() for h in next(reader, [])]
    missing = [c for c in ("record_id", "goal", "decision") if c not in header]
    if missing:
        found = ", ".join(h for h in header if h) or "nothing"
        raise InputError(Problem(path, 1, _KEY, f"missing column {', '.join(missing)} (found: {found})"))
    col = {name: header.index(name) for name in REVIEW_COLUMNS if name in header}
    known_ids, known_goals = set(map(str, record_ids)), set(goal_codes)

    problems: list[Problem] = []
    rows: list[tuple] = []
    first_line: dict[tuple[str, str], int] = {}
    line = reader.line_num
    for row in reader:
        start, line = line + 1, reader.line_num
        cell = {name: row[i].strip() if i < len(row) else "" for name, i in col.items()}
        if not any(cell.values()) or not cell["decision"]:
            continue
        record_id, goal, decision = cell["record_id"], cell["goal"], cell["decision"].casefold()
        before = len(problems)
        if record_id not in known_ids:
            problems.append(Problem(path, start, "record_id", f"unknown record id {record_id!r}"))
        if goal not in known_goals:
            problems.append(Problem(path, start, "goal", f"unknown goal code {goal!r} (goal codes are "
                                                         f"{', '.join(goal_codes)})"))
        if decision not in DECISIONS:
            problems.append(Problem(path, start, "decision", f"expected include or exclude, got {cell['decision']!r}"))
        if (record_id, goal) in first_line:
            problems.append(Problem(path, start, "record_id", f"{record_id} / goal {goal} is reviewed twice "
                                                              f"(first on line {first_line[(record_id, goal)]})"))
        if len(problems) > before:
            continue
        first_line[(record_id, goal)] = start
        rows.append((record_id, goal, decision, cell.get("reviewer", ""), cell.get("note", ""), start))
    if problems:
        raise InputError(problems)
    return pd.DataFrame(rows, columns=[*REVIEW_COLUMNS, "line"])


def apply_review(scores_table: pd.DataFrame, review: pd.DataFrame) -> tuple[pd.DataFrame, pd.DataFrame]:
    """(new score table with the reviewed pairs' is_aligned set, overrides table OVERRIDE_COLUMNS).

    Only the pairs named in `review` change; `is_overridden` marks them and `review_note` carries
    the note. Neither input is changed. A reviewed pair with no score row raises ValueError.
    """
    require_columns(scores_table, ("record_id", "goal", "is_aligned"), "apply_review: scores")
    require_columns(review, ("record_id", "goal", "decision"), "apply_review: review")
    table = scores_table.copy()
    keys = pd.MultiIndex.from_arrays([table["record_id"].astype(str), table["goal"].astype(str)])
    wanted = pd.MultiIndex.from_arrays([review["record_id"].astype(str), review["goal"].astype(str)])
    position = keys.get_indexer(wanted)
    if (position < 0).any():
        record_id, goal = wanted[int(np.flatnonzero(position < 0)[0])]
        raise ValueError(f"apply_review: no score row for publication {record_id}, goal {goal}")
    include = review["decision"].to_numpy() == "include"
    was = table["is_aligned"].to_numpy(dtype=bool)[position]
    aligned = table["is_aligned"].to_numpy(dtype=bool).copy()
    aligned[position] = include
    overridden = np.zeros(len(table), dtype=bool)
    overridden[position] = True
    notes = np.full(len(table), "", dtype=object)
    notes[position] = review["note"].fillna("").astype(str).to_numpy() if "note" in review else ""
    table["is_aligned"], table["is_overridden"], table["review_note"] = aligned, overridden, notes
    overrides = review.reindex(columns=[*REVIEW_COLUMNS, "line"]).fillna("").assign(
        was_aligned=was, is_aligned=include, is_changed=was != include
    )
    return table, overrides.loc[:, list(OVERRIDE_COLUMNS)].reset_index(drop=True)


def review_summary(overrides: pd.DataFrame) -> dict:
    """Counts the report prints about human review."""
    changed = overrides["is_changed"].astype(bool)
    include = overrides["decision"] == "include"
    return {
        "n_decisions": int(len(overrides)),
        "n_included": int(include.sum()),
        "n_excluded": int((~include).sum()),
        "n_added": int((changed & include).sum()),  # aligned by review, not by the machine
        "n_removed": int((changed & ~include).sum()),  # aligned by the machine, removed by review
        "n_confirmed": int((~changed).sum()),
        "n_publications": int(overrides["record_id"].nunique()),
        "n_reviewers": int(overrides["reviewer"].replace("", np.nan).nunique()),
    }


def borderline_pairs(
    scores_table: pd.DataFrame,
    records: pd.DataFrame,
    thresholds: Mapping[str, float],
    margin: float = 0.1,
    limit: int | None = 200,
    sentences: pd.DataFrame | None = None,
) -> pd.DataFrame:
    """Pairs whose score lies within `margin` of their goal's threshold, closest first (WORKSHEET_COLUMNS).

    Evidence is the score table's sentence; for pairs below the threshold (which have none) the
    best sentence for the goal from `sentences` (the score stage's per-sentence table) when given.
    """
    require_columns(scores_table, ("record_id", "goal", "alignment_score", "is_aligned", "is_explicit", "evidence"),
                    "borderline_pairs: scores")
    table = scores_table.assign(record_id=scores_table["record_id"].astype(str), goal=scores_table["goal"].astype(str))
    table["threshold"] = table["goal"].map({str(k): float(v) for k, v in thresholds.items()})
    distance = (table["alignment_score"].astype(float) - table["threshold"]).abs()
    near = table[distance <= margin + 1e-12].assign(_distance=distance)
    order = {str(code): i for i, code in enumerate(thresholds)}
    near = near.assign(_goal=near["goal"].map(order)).sort_values(["_distance", "record_id", "_goal"], kind="stable")
    if limit is not None:
        near = near.head(limit)
    titles = records.assign(record_id=records["record_id"].astype(str)).set_index("record_id")["title"]
    near = near.assign(title=near["record_id"].map(titles).fillna(""), evidence=near["evidence"].fillna("").astype(str))
    if sentences is not None:
        near["evidence"] = [
            text or _best_sentence(sentences, rid, goal)
            for text, rid, goal in near[["evidence", "record_id", "goal"]].itertuples(index=False)
        ]
    near = near.assign(decision="", reviewer="", note="")
    return near.loc[:, list(WORKSHEET_COLUMNS)].reset_index(drop=True)


def _best_sentence(sentences: pd.DataFrame, record_id: str, goal: str) -> str:
    column = f"score_{goal}"
    block = sentences[sentences["record_id"].astype(str) == record_id]
    if block.empty or column not in block:
        return ""
    return str(block.loc[block[column].idxmax(), "sentence"])
