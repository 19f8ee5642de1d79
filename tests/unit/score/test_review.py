"""Review file reading, applying decisions, and the borderline worksheet (no model)."""

from __future__ import annotations

from pathlib import Path

import pandas as pd
import pytest

from reporter.errors import InputError
from reporter.render.worksheet import write_worksheet
from reporter.score.review import apply_review, borderline_pairs, read_review_file, review_summary

DATA = Path(__file__).parents[2] / "data" / "validation"
CODES = ("1", "2", "3")
IDS = ("kestrel:p1", "kestrel:p2", "kestrel:p3", "kestrel:p4")


def score_table() -> pd.DataFrame:
    """Four publications x three goals; aligned where the score reaches 0.5."""
    values = {
        "kestrel:p1": (0.62, 0.20, 0.10), "kestrel:p2": (0.10, 0.30, 0.45),
        "kestrel:p3": (0.05, 0.55, 0.10), "kestrel:p4": (0.20, 0.71, 0.58),
    }
    rows = []
    for rid, per_goal in values.items():
        for code, value in zip(CODES, per_goal):
            rows.append({"record_id": rid, "goal": code, "alignment_score": value, "is_explicit": False,
                         "is_aligned": value >= 0.5, "evidence": f"{rid} sentence {code}" if value >= 0.5 else ""})
    return pd.DataFrame(rows)


def test_read_review_file_skips_rows_without_a_decision():
    review = read_review_file(DATA / "review.csv", IDS, CODES)
    assert review[["record_id", "goal", "decision", "reviewer", "line"]].values.tolist() == [
        ["kestrel:p1", "1", "exclude", "reviewer A", 2],
        ["kestrel:p2", "3", "include", "reviewer A", 3],
        ["kestrel:p4", "2", "include", "reviewer B", 5],
    ]


def test_read_review_file_reports_every_bad_row():
    path = DATA / "review-bad.csv"
    with pytest.raises(InputError) as caught:
        read_review_file(path, IDS, CODES)
    assert str(caught.value).splitlines() == [
        f"{path}:3: record_id: unknown record id 'kestrel:p7'",
        f"{path}:4: goal: unknown goal code '18' (goal codes are 1, 2, 3)",
        f"{path}:5: decision: expected include or exclude, got 'maybe'",
        f"{path}:6: record_id: kestrel:p1 / goal 1 is reviewed twice (first on line 2)",
    ]


def test_apply_review_changes_exactly_the_named_pairs():
    table = score_table()
    before = table.copy()
    review = read_review_file(DATA / "review.csv", IDS, CODES)
    new, overrides = apply_review(table, review)
    pd.testing.assert_frame_equal(table, before)  # input untouched
    changed = new["is_aligned"] != table["is_aligned"]
    assert new.loc[changed, ["record_id", "goal"]].values.tolist() == [["kestrel:p1", "1"], ["kestrel:p2", "3"]]
    assert new.loc[new["is_overridden"], ["record_id", "goal"]].values.tolist() == [
        ["kestrel:p1", "1"], ["kestrel:p2", "3"], ["kestrel:p4", "2"],
    ]
    assert new.loc[new["is_overridden"], "review_note"].tolist() == ["method paper only", "", "already aligned"]
    assert (new.loc[~new["is_overridden"], "review_note"] == "").all()
    assert overrides[["was_aligned", "is_aligned", "is_changed"]].values.tolist() == [
        [True, False, True], [False, True, True], [True, True, False],
    ]
    assert review_summary(overrides) == {
        "n_decisions": 3, "n_included": 2, "n_excluded": 1, "n_added": 1, "n_removed": 1,
        "n_confirmed": 1, "n_publications": 3, "n_reviewers": 2,
    }


def test_apply_review_refuses_a_pair_without_a_score_row():
    review = pd.DataFrame({"record_id": ["kestrel:p9"], "goal": ["1"], "decision": ["include"]})
    with pytest.raises(ValueError, match="no score row for publication kestrel:p9, goal 1"):
        apply_review(score_table(), review)


def test_borderline_pairs_closest_to_the_threshold_first():
    records = pd.DataFrame({"record_id": list(IDS), "title": ["Wells", "Wheat", "Harbours", "Clinics"]})
    sheet = borderline_pairs(score_table(), records, {c: 0.5 for c in CODES}, margin=0.1)
    # within 0.1 of 0.5: p3/2 (0.55), p2/3 (0.45), p4/3 (0.58); p1/1 at 0.62 and p4/2 at 0.71 are not
    assert sheet[["record_id", "goal", "title"]].values.tolist() == [
        ["kestrel:p2", "3", "Wheat"], ["kestrel:p3", "2", "Harbours"], ["kestrel:p4", "3", "Clinics"],
    ]
    assert sheet["evidence"].tolist() == ["", "kestrel:p3 sentence 2", "kestrel:p4 sentence 3"]
    assert (sheet[["decision", "reviewer", "note"]] == "").all().all()
    assert len(borderline_pairs(score_table(), records, {c: 0.5 for c in CODES}, limit=1)) == 1


def test_borderline_evidence_falls_back_to_the_sentence_table():
    records = pd.DataFrame({"record_id": list(IDS), "title": ["Wells", "Wheat", "Harbours", "Clinics"]})
    sentences = pd.DataFrame({
        "record_id": ["kestrel:p2", "kestrel:p2"], "sentence": ["Tide gauges.", "Flood maps for towns."],
        "score_1": [0.1, 0.1], "score_2": [0.2, 0.3], "score_3": [0.3, 0.45],
    })
    sheet = borderline_pairs(score_table(), records, {c: 0.5 for c in CODES}, sentences=sentences)
    assert sheet.loc[0, "evidence"] == "Flood maps for towns."


def test_filled_worksheet_reads_back_as_a_review_file(tmp_path):
    records = pd.DataFrame({"record_id": list(IDS), "title": ["Wells", "Wheat", "Harbours", "Clinics"]})
    sheet = borderline_pairs(score_table(), records, {c: 0.5 for c in CODES})
    written = write_worksheet(sheet, tmp_path)
    path = written["review worksheet"]
    filled = pd.read_csv(path, dtype=str, keep_default_na=False)
    filled.loc[0, ["decision", "reviewer"]] = ["include", "reviewer C"]
    filled.to_csv(path, index=False)
    review = read_review_file(path, IDS, CODES)
    assert review[["record_id", "goal", "decision", "line"]].values.tolist() == [["kestrel:p2", "3", "include", 2]]
