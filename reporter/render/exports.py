"""CSV and JSON exports. Cells a spreadsheet would run as a formula are neutralised."""

from __future__ import annotations

import io
import json
import re
from pathlib import Path

import pandas as pd

from reporter.records import INTAKE_LOG_COLUMNS, SCORE_COLUMNS, require_columns
from reporter.render.atomic import write_text_atomic

# A leading =, +, -, @ (or tab/CR) makes spreadsheet programs evaluate a cell (OWASP "CSV injection").
_FORMULA_START = ("=", "+", "-", "@", "\t", "\r")


# Plain signed decimals stay numbers. float() is not the test: it also takes "-inf", "-nan"
# and "-1_0", which a spreadsheet reads as a formula naming something.
SIGNED_NUMBER = re.compile(r"[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?")


def neutralise_cell(value: object) -> object:
    """Prefix a text cell that a spreadsheet would run as a formula with an apostrophe."""
    if isinstance(value, str) and value.startswith(_FORMULA_START) and not SIGNED_NUMBER.fullmatch(value):
        return "'" + value
    return value


def _flatten(value: object) -> object:
    if isinstance(value, (tuple, list)):
        return "; ".join(str(v) for v in value)
    return value


def safe_cell(value: object) -> object:
    """A cell as the CSVs and the workbook write it: lists joined with "; ", formulas neutralised."""
    return neutralise_cell(_flatten(value))


def frame_to_csv(frame: pd.DataFrame) -> str:
    safe = frame.copy()
    for column in safe.columns:
        if safe[column].dtype == object or pd.api.types.is_string_dtype(safe[column]):
            safe[column] = safe[column].map(safe_cell)
    buffer = io.StringIO()
    safe.to_csv(buffer, index=False, lineterminator="\n")
    return buffer.getvalue()


def write_csv(frame: pd.DataFrame, path: Path, root: Path | None = None) -> Path:
    """Write `frame` as CSV; with `root`, refuse a path that resolves outside that folder."""
    return write_text_atomic(path, frame_to_csv(frame), root=root)


def write_intake_log(log: pd.DataFrame, output_dir: Path) -> Path:
    require_columns(log, INTAKE_LOG_COLUMNS, "write_intake_log")
    return write_csv(log.loc[:, list(INTAKE_LOG_COLUMNS)], output_dir / "intake-log.csv", root=output_dir)


def scores_table(scores: pd.DataFrame, goal_order: list[str]) -> pd.DataFrame:
    """The score table in a fixed order (record, then framework goal order), so the CSV repeats exactly."""
    require_columns(scores, SCORE_COLUMNS, "scores_table")
    position = {code: i for i, code in enumerate(goal_order)}
    table = scores.loc[:, list(SCORE_COLUMNS)].assign(goal=scores["goal"].astype(str))
    table = table.assign(_pos=table["goal"].map(position).fillna(len(position)))
    return table.sort_values(["record_id", "_pos", "goal"], kind="stable").drop(columns="_pos").reset_index(drop=True)


EVIDENCE_COLUMNS = (
    "goal", "goal_title", "record_id", "title", "year", "departments", "doi", "alignment_score",
    "is_explicit", "n_explicit_mentions", "evidence", "evidence_score",
)


def evidence_table(scores: pd.DataFrame, records: pd.DataFrame, goals: tuple[tuple[str, str], ...]) -> pd.DataFrame:
    """Every aligned (publication, goal) with its evidence sentence; goal order, strongest first."""
    titles = dict(goals)
    position = {code: i for i, (code, _) in enumerate(goals)}
    aligned = scores.loc[scores["is_aligned"].astype(bool)].assign(goal=lambda f: f["goal"].astype(str))
    info = records.loc[:, ["record_id", "title", "year", "departments", "doi"]]
    table = aligned.merge(info, on="record_id", how="left", validate="many_to_one")
    table = table.assign(goal_title=table["goal"].map(titles), _pos=table["goal"].map(position))
    table = table.sort_values(["_pos", "alignment_score", "record_id"], ascending=[True, False, True], kind="stable")
    return table.loc[:, list(EVIDENCE_COLUMNS)].reset_index(drop=True)


def write_json(document: object, path: Path, root: Path | None = None) -> Path:
    """JSON with sorted keys and a final newline: identical input, identical bytes."""
    text = json.dumps(document, ensure_ascii=False, indent=2, sort_keys=True, default=str, allow_nan=False)
    return write_text_atomic(path, text + "\n", root=root)
