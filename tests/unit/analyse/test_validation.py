"""Labelled sample reading and validation metrics on hand-built frames (no model)."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from reporter.analyse.labelled import LabelledSample, UnmatchedLabel, read_labelled_sample
from reporter.analyse.validation import GRID, format_validation, validate, write_thresholds
from reporter.errors import InputError
from reporter.score.framework import load_framework
from reporter.score.parts import read_thresholds

DATA = Path(__file__).parents[2] / "data" / "validation"
CODES = ("1", "2", "3")
THRESHOLDS = {code: 0.5 for code in CODES}


def kept_records() -> pd.DataFrame:
    return pd.DataFrame({
        "record_id": ["kestrel:p1", "kestrel:p2", "kestrel:p3", "kestrel:p4"],
        "doi": ["10.5555/kestrel.0001", "10.5555/kestrel.0002", "", "10.5555/kestrel.0004"],
        "title": ["Wells", "Wheat", "Harbours", "Clinics"],
    })


def labels(rows: dict[str, tuple[str, ...]]) -> LabelledSample:
    frame = pd.DataFrame(
        [(rid, goals, "", i + 2) for i, (rid, goals) in enumerate(rows.items())],
        columns=["record_id", "goals", "note", "line"],
    )
    return LabelledSample(Path("labels.csv"), frame, (), len(rows))


def scores(values: dict[str, tuple], explicit: dict[tuple[str, str], bool] | None = None, threshold=0.5):
    """Long score table: values[record] = one score per goal; is_aligned decided at `threshold`, score only."""
    explicit = explicit or {}
    rows = []
    for rid, per_goal in values.items():
        for code, value in zip(CODES, per_goal):
            flag = explicit.get((rid, code), False)
            rows.append({"record_id": rid, "goal": code, "alignment_score": value, "is_explicit": flag,
                         "is_aligned": value >= threshold or flag})
    return pd.DataFrame(rows)


# Six publications; worked by hand below. Labels and predictions (threshold 0.5):
#   r1 {1} -> {1};  r2 {1,2} -> {1};  r3 {} -> {1};  r4 {2} -> {2};  r5 {1} -> {};  r6 {3} -> {3}
LABELS = {"r1": ("1",), "r2": ("1", "2"), "r3": (), "r4": ("2",), "r5": ("1",), "r6": ("3",)}
SCORES = {
    "r1": (0.8, 0.1, 0.1), "r2": (0.7, 0.3, 0.1), "r3": (0.6, 0.1, 0.1),
    "r4": (0.2, 0.9, 0.1), "r5": (0.4, 0.1, 0.1), "r6": (0.1, 0.1, 0.55),
}


def run(**kwargs):
    return validate(scores(SCORES), labels(LABELS), CODES, THRESHOLDS, "score_only", **kwargs)


def test_read_labelled_sample_matches_by_id_then_doi_and_lists_unmatched():
    sample = read_labelled_sample(DATA / "labelled.csv", kept_records(), CODES)
    assert sample.labels[["record_id", "goals", "line"]].values.tolist() == [
        ["kestrel:p1", ("1", "2"), 2], ["kestrel:p2", ("3",), 3], ["kestrel:p3", (), 4], ["kestrel:p4", ("2",), 7],
    ]
    assert sample.unmatched == (
        UnmatchedLabel(5, "kestrel:p9", "record_id 'kestrel:p9' is not among the kept records"),
        UnmatchedLabel(6, "10.5555/kestrel.0099", "no kept record has DOI 10.5555/kestrel.0099"),
    )
    assert sample.n_rows == len(sample.labels) + len(sample.unmatched) == 6


def test_read_labelled_sample_reports_every_bad_row_with_line_and_field():
    with pytest.raises(InputError) as caught:
        read_labelled_sample(DATA / "labelled-bad.csv", kept_records(), CODES)
    path = DATA / "labelled-bad.csv"
    assert str(caught.value).splitlines() == [
        f"{path}:2: goals: unknown goal code '18' (goal codes are 1, 2, 3)",
        f"{path}:3: goals: no goals given; write 'none' for a publication with no goal",
        f"{path}:4: goals: 'none' cannot be combined with goal codes, got 'none;2'",
        f"{path}:5: record_id: publication kestrel:p1 is labelled twice (first on line 2)",
        f"{path}:6: record_id: row has neither a record_id nor a doi",
    ]


def test_read_labelled_sample_needs_an_id_column(tmp_path):
    path = tmp_path / "labels.csv"
    path.write_text("paper,goals\nkestrel:p1,1\n", encoding="utf-8")
    with pytest.raises(InputError, match=r"labels.csv:1: validation.labelled_sample: expected columns record_id "
                                         r"or doi, and goals \(found: paper, goals\)"):
        read_labelled_sample(path, kept_records(), CODES)


def test_per_goal_metrics_worked_by_hand():
    result = run()
    table = result.per_goal.set_index("goal")
    # goal 1: labelled r1 r2 r5, predicted r1 r2 r3 -> tp 2, fp 1, fn 1, tn 2
    assert table.loc["1", ["support", "n_predicted", "tp", "fp", "fn", "tn"]].tolist() == [3, 3, 2, 1, 1, 2]
    assert table.loc["1", ["precision", "recall", "f1"]].tolist() == pytest.approx([2 / 3, 2 / 3, 2 / 3])
    # Cohen (1960): p_o = 4/6, p_e = 0.5*0.5 + 0.5*0.5 = 0.5 -> kappa = (4/6 - 0.5) / 0.5
    assert table.loc["1", "kappa"] == pytest.approx(1 / 3)
    assert table.loc["2", ["precision", "recall"]].tolist() == pytest.approx([1.0, 0.5])
    assert table.loc["3", ["precision", "recall", "kappa"]].tolist() == pytest.approx([1.0, 1.0, 1.0])


def test_agreement_and_goal_matrix_worked_by_hand():
    result = run()
    assert result.agreement == {"n": 6, "n_exact": 3, "exact_match": 0.5, "hamming": pytest.approx(15 / 18)}
    cells = result.matrix.set_index(["labelled", "predicted"])["n"]
    expected = {("1", "1"): 2, ("1", "none"): 1, ("2", "1"): 1, ("2", "2"): 1, ("none", "1"): 1, ("3", "3"): 1}
    assert {k: v for k, v in cells.items() if v} == expected
    assert len(cells) == 16, "3 goals + none on each side"


def test_curve_covers_every_goal_at_every_grid_threshold():
    result = run()
    assert GRID[0] == 0.05 and GRID[-1] == 0.95 and len(GRID) == 19
    assert len(result.curve) == 3 * 19
    goal1 = result.curve[result.curve["goal"] == "1"].set_index("threshold")
    assert goal1.loc[0.4, ["precision", "recall"]].tolist() == pytest.approx([0.75, 1.0])
    assert goal1.loc[0.7, ["precision", "recall"]].tolist() == pytest.approx([1.0, 2 / 3])
    assert goal1.loc[0.95, "n_predicted"] == 0


def test_recommended_thresholds_best_f1_with_support_guard():
    result = run()
    rec = result.recommended.set_index("goal")
    # F1 peaks (6/7) for t in 0.25..0.40; the one nearest the current 0.5 wins.
    assert rec.loc["1", "recommended"] == 0.4
    assert rec.loc["1", "f1"] == pytest.approx(6 / 7)
    assert rec.loc["1", "reason"] == "best F1 on the labelled sample"
    assert rec.loc["2", "recommended"] == 0.5
    assert rec.loc["2", "reason"] == "2 labelled publications (fewer than 3); kept the global threshold"
    assert result.thresholds == {"1": 0.4, "2": 0.5, "3": 0.5}


def test_recommended_thresholds_for_target_precision():
    result = run(target_precision=0.9)
    rec = result.recommended.set_index("goal")
    # precision 1 from t = 0.65; best recall (2/3) at 0.65 and 0.70; nearest the current 0.5 wins.
    assert rec.loc["1", "recommended"] == 0.65
    assert rec.loc["1", "reason"] == "best recall with precision at least 0.90"
    # goal 2 (r2 at 0.3, r4 at 0.9; others 0.1): precision and recall both 1 for t in 0.15..0.30.
    strict = run(target_precision=1.0, min_support=1)
    assert strict.recommended.set_index("goal").loc["2", "recommended"] == 0.3


def test_target_precision_out_of_reach_keeps_global_threshold():
    values = {**SCORES, "r3": (0.95, 0.1, 0.1)}  # a false positive above every grid threshold
    result = validate(scores(values), labels(LABELS), CODES, THRESHOLDS, "score_only", target_precision=0.95)
    rec = result.recommended.set_index("goal").loc["1"]
    assert (rec["recommended"], rec["reason"]) == (0.5, "no threshold reaches precision 0.95; kept the global threshold")


def test_explicit_mentions_count_at_every_threshold_under_score_or_mention():
    table = scores(SCORES, explicit={("r5", "1"): True})
    result = validate(table, labels(LABELS), CODES, THRESHOLDS, "score_or_mention")
    top = result.curve[(result.curve["goal"] == "1") & (result.curve["threshold"] == 0.95)].iloc[0]
    assert (top["n_predicted"], top["recall"]) == (1, pytest.approx(1 / 3))


def test_labelled_publications_without_scores_are_listed_not_dropped():
    sample = labels({**LABELS, "r7": ("2",)})
    result = validate(scores(SCORES), sample, CODES, THRESHOLDS, "score_only")
    assert result.n_matched == 6
    assert result.unmatched == (UnmatchedLabel(8, "r7", "publication has no scores"),)
    assert "not matched, line 8: r7: publication has no scores" in format_validation(result)


def test_validate_does_not_change_its_inputs():
    table, sample = scores(SCORES), labels(LABELS)
    before_table, before_labels = table.copy(), sample.labels.copy()
    run_result = validate(table, sample, CODES, THRESHOLDS, "score_only")
    assert run_result.n_matched == 6
    pd.testing.assert_frame_equal(table, before_table)
    pd.testing.assert_frame_equal(sample.labels, before_labels)


def test_to_dict_is_json_ready():
    import json

    document = run().to_dict()
    text = json.dumps(document, allow_nan=False)  # NaN (undefined precision at high thresholds) -> null
    assert document["n_matched"] == 6 and document["per_goal"][0]["goal"] == "1"
    assert '"precision": null' in text


def test_thresholds_file_round_trips_through_read_thresholds(tmp_path):
    framework = load_framework("un-sdg-2030")
    path = write_thresholds(tmp_path / "out" / "thresholds.csv", run().thresholds)
    assert read_thresholds(path, framework) == {"1": 0.4, "2": 0.5, "3": 0.5}
    assert not [p for p in path.parent.iterdir() if p.name.endswith(".tmp")], "temp file left behind"


def test_empty_sample_gives_undefined_metrics_not_an_error():
    sample = labels({})
    result = validate(scores(SCORES), sample, CODES, THRESHOLDS, "score_only")
    assert result.n_matched == 0
    assert np.isnan(result.averages["micro"]["f1"])
    assert result.thresholds == THRESHOLDS
