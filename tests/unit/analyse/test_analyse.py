"""analyse() end to end on a few hand-built rows: scope, invariants, checks on entry."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd
import pytest

import reporter.analyse as analyse_package
from reporter.analyse import analyse
from reporter.analyse.export import TABLE_NAMES
from reporter.config import AnalysisConfig

THRESHOLDS = {"1": 0.5, "2": 0.5, "3": 0.5}
CFG = AnalysisConfig(bootstrap_resamples=200)

ROWS = [
    {"record_id": "a", "year": 2024, "departments": ("Hydrology",), "partner_countries": ("DE",)},
    {"record_id": "b", "year": 2024, "departments": ("Hydrology", "Optics"), "partner_countries": ("DE", "KR")},
    {"record_id": "c", "year": 2023, "departments": (), "partner_countries": ()},
    {"record_id": "d", "year": 2023, "departments": ("Optics",), "partner_countries": (), "is_english": False},
    {"record_id": "e", "year": 2024, "departments": ("Optics",), "has_abstract": False},
    {"record_id": "old", "year": 2019, "departments": ("Optics",)},
]
# (alignment_score, is_explicit, is_aligned) per record a..old, for goals 1, 2, 3.
VALUES = {
    "1": [(0.8, True, True), (0.7, False, True), (0.1, False, False), (0.2, True, True), (0.6, False, True),
          (0.9, False, True)],
    "2": [(0.3, False, False), (0.55, False, True), (0.2, False, False), (0.1, False, False), (0.4, False, False),
          (0.1, False, False)],
    "3": [(0.1, False, False)] * 6,
}


@pytest.fixture
def inputs(make_records, make_scores, goals):
    records = make_records(ROWS)
    return records, make_scores(records, VALUES, goals)


def _run(records, scores, goals, cfg=CFG, **kwargs):
    return analyse(records, scores, goals, cfg, 2024, (2023,), THRESHOLDS, "score_or_mention", **kwargs)


def test_goal_table_counts_the_years_in_scope(inputs, goals):
    findings = _run(*inputs, goals)
    goal_1 = findings.goals.set_index("goal").loc["1"]
    assert (goal_1["n"], goal_1["n_aligned"], goal_1["n_explicit"], goal_1["n_content_only"]) == (5, 4, 2, 2)
    assert goal_1["title"] == "No poverty"
    assert goal_1["mean_score"] == pytest.approx(np.mean([0.8, 0.7, 0.1, 0.2, 0.6]))
    assert findings.coverage["n_outside_years"] == 1, "the 2019 record is outside 2023-2024"


def test_every_interval_holds_its_share(inputs, goals):
    findings = _run(*inputs, goals)
    for name in ("goals", "by_year", "by_department", "by_country", "collaboration"):
        table = getattr(findings, name)
        shown = table[table["n"] > 0]
        assert (shown["share_low"] <= shown["share"]).all() and (shown["share"] <= shown["share_high"]).all(), (
            f"{name}: low <= share <= high"
        )
    goals_table = findings.goals
    assert (goals_table["mean_score_low"] <= goals_table["mean_score"]).all()
    assert (goals_table["mean_score"] <= goals_table["mean_score_high"]).all()


def test_fractional_department_counts_sum_to_the_publications(inputs, goals):
    findings = _run(*inputs, goals, cfg=AnalysisConfig(bootstrap_resamples=200, counting="fractional"))
    per_goal = findings.by_department.groupby("goal")["n"].sum()
    assert per_goal.to_numpy() == pytest.approx([5, 5, 5]), "fractional counting sums to the publications"
    hydrology = findings.by_department.set_index(["department", "goal"]).loc[("Hydrology", "1")]
    assert hydrology["n"] == pytest.approx(1.5) and hydrology["n_publications"] == 2
    assert hydrology["n_effective"] == pytest.approx(1.5**2 / 1.25), "Kish effective n"
    full = _run(*inputs, goals).by_department.groupby("goal")["n"].sum()
    assert (full >= per_goal).all()


def test_partner_countries_get_iso_names(inputs, goals):
    table = _run(*inputs, goals).by_country
    names = dict(zip(table["country"], table["country_name"]))
    assert names == {"DE": "Germany", "KR": "South Korea"}, (
        "Source: ISO 3166-1 via pycountry (common name where it has one); partner countries only"
    )
    assert list(table.loc[table["goal"] == "1", "n"]) == [2, 1], "DE on a and b, KR on b"


def test_headline_and_coverage(inputs, goals):
    findings = _run(*inputs, goals, general_mentions={"a": 2, "c": 0, "e": 1, "old": 4})
    headline, coverage = findings.headline, findings.coverage
    assert headline["n_publications"] == 5 and headline["n_aligned_any"] == 4
    assert headline["n_explicit_any"] == 2 and headline["n_aligned_multiple"] == 1
    assert headline["n_general_mentions"] == 2, "a and e; the 2019 record is out of scope"
    assert headline["n_too_small_groups"] == 2 + 3 + 2 + 2, "years, departments, countries, collaboration: all under 10"
    assert coverage["n_records"] == 5 and coverage["n_non_english"] == 1
    assert coverage["n_with_abstract"] == 4 and coverage["n_with_department"] == 4


def test_cooccurrence_counts_pairs_in_framework_order(inputs, goals):
    table = _run(*inputs, goals).cooccurrence
    assert list(zip(table["goal_a"], table["goal_b"], table["n"])) == [("1", "2", 1), ("1", "3", 0), ("2", "3", 0)]


def test_inputs_are_not_changed(inputs, goals):
    records, scores = inputs
    before = records.copy(), scores.copy()
    _run(records, scores, goals)
    pd.testing.assert_frame_equal(records, before[0])
    pd.testing.assert_frame_equal(scores, before[1])


def test_records_without_scores_are_reported_not_scored(inputs, goals):
    records, scores = inputs
    findings = _run(records, scores[scores["record_id"] != "e"], goals)
    assert findings.headline["n_publications"] == 4
    assert findings.coverage["n_not_scored"] == 1


def test_partly_scored_record_is_refused(inputs, goals):
    records, scores = inputs
    partial = scores[~((scores["record_id"] == "a") & (scores["goal"] == "3"))]
    with pytest.raises(ValueError, match=r"1 publications are scored for some goals but not all 3 \(e.g. a\)"):
        _run(records, partial, goals)


def test_missing_columns_are_named(inputs, goals):
    records, scores = inputs
    with pytest.raises(TypeError, match="analyse: records: missing columns partner_countries"):
        _run(records.drop(columns=["partner_countries"]), scores, goals)


def test_missing_thresholds_are_named(inputs, goals):
    with pytest.raises(ValueError, match="thresholds missing for goals 3"):
        analyse(*inputs, goals, CFG, 2024, (2023,), {"1": 0.5, "2": 0.5}, "score_only")


def test_every_column_and_key_is_documented(inputs, goals):
    findings = _run(*inputs, goals)
    schema = (Path(analyse_package.__file__).parent / "FINDINGS_SCHEMA.md").read_text(encoding="utf-8")
    names = {c for name in TABLE_NAMES for c in getattr(findings, name).columns}
    names |= set(findings.meta) | set(findings.headline) | set(findings.coverage) | set(findings.meta["methods"])
    undocumented = sorted(n for n in names if f"`{n}`" not in schema)
    assert not undocumented, f"FINDINGS_SCHEMA.md lacks {undocumented}"


def test_general_mentions_from_the_score_stage_table(inputs, goals):
    table = pd.DataFrame({"record_id": ["a", "b", "e"], "n_general_mentions": [1, 0, 3]})
    assert _run(*inputs, goals, general_mentions=table).headline["n_general_mentions"] == 2
