"""Changes between the reporting year and earlier years; refusal to compare unlike runs."""

from __future__ import annotations

import pytest

from reporter.analyse import analyse
from reporter.analyse.change import baseline_label, check_comparable
from reporter.config import AnalysisConfig
from reporter.errors import ComparisonError

THRESHOLDS = {"1": 0.5, "2": 0.5, "3": 0.5}


def _changes(records, scores, goals, comparison_years, reporting_year=2024):
    findings = analyse(
        records, scores, goals, AnalysisConfig(bootstrap_resamples=100), reporting_year, comparison_years,
        THRESHOLDS, "score_only",
    )
    return findings.changes.set_index(["baseline", "goal"])


def test_a_large_real_change_is_called(year_corpus, goals):
    records, scores = year_corpus({2023: (100, 20), 2024: (100, 60)})
    changes = _changes(records, scores, goals, (2023,))
    row = changes.loc[("2023", "1")]
    assert row["verdict"] == "increase" and row["is_change"]
    assert row["diff"] == pytest.approx(0.4)
    assert row["diff_low"] > 0
    assert changes.loc[("2023", "2"), "verdict"] == "no clear change", "0 of 100 both years"


def test_a_large_fall_is_a_decrease(year_corpus, goals):
    records, scores = year_corpus({2023: (100, 60), 2024: (100, 20)})
    assert _changes(records, scores, goals, (2023,)).loc[("2023", "1"), "verdict"] == "decrease"


def test_noise_is_not_called_a_change(year_corpus, goals):
    records, scores = year_corpus({2023: (100, 30), 2024: (100, 33)})
    row = _changes(records, scores, goals, (2023,)).loc[("2023", "1")]
    assert row["verdict"] == "no clear change" and not row["is_change"]
    assert row["diff_low"] < 0 < row["diff_high"]


def test_false_discovery_control_can_withhold_a_nominal_change(year_corpus, goals):
    records, scores = year_corpus({2023: (100, 30), 2024: (100, 45)})
    row = _changes(records, scores, goals, (2023,)).loc[("2023", "1")]
    assert row["p_value"] < 0.05 and row["diff_low"] > 0, "nominally significant on its own"
    assert row["p_adjusted"] >= 0.05 and row["verdict"] == "no clear change", "not after BH across 3 goals"


def test_a_small_year_is_too_small_and_left_out_of_the_family(year_corpus, goals):
    records, scores = year_corpus({2023: (9, 1), 2024: (100, 90)})
    row = _changes(records, scores, goals, (2023,)).loc[("2023", "1")]
    assert row["verdict"] == "too small" and not row["is_change"]
    assert row["p_adjusted"] != row["p_adjusted"], "no test run, so no adjusted p-value (nan)"


def test_mean_baseline_pools_the_comparison_years(year_corpus, goals):
    records, scores = year_corpus({2022: (50, 10), 2023: (150, 60), 2024: (100, 60)})
    changes = _changes(records, scores, goals, (2022, 2023))
    assert set(changes.index.get_level_values("baseline")) == {"2022", "2023", "mean 2022-2023"}
    row = changes.loc[("mean 2022-2023", "1")]
    assert row["n_baseline"] == 200 and row["share_baseline"] == pytest.approx(70 / 200)


def test_no_comparison_years_gives_an_empty_table(year_corpus, goals):
    records, scores = year_corpus({2024: (30, 10)})
    assert _changes(records, scores, goals, ()).empty


def test_baseline_labels():
    assert baseline_label((2024,)) == "2024"
    assert baseline_label((2023, 2021, 2022)) == "mean 2021-2023"
    assert baseline_label((2019, 2021)) == "mean 2019, 2021"


MANIFEST = {
    "model_checksum": "aa11",
    "framework_id": "un-sdg-2030",
    "framework_version": "1.0",
    "framework_checksum": "ff00",
    "thresholds": {"6": 0.5, "7": 0.5},
    "policy": "score_or_mention",
    "text_fields": ("title", "abstract", "keywords"),
    "created": "2025-01-01T00:00:00",
}


def test_differing_manifests_are_refused_with_the_fields_named():
    other = {**MANIFEST, "model_checksum": "bb22", "thresholds": {"6": 0.55, "7": 0.5}, "created": "later"}
    with pytest.raises(ComparisonError) as caught:
        check_comparable(MANIFEST, other)
    assert str(caught.value) == (
        "stored results are not like-for-like and cannot be compared; these run-manifest fields differ: "
        "model_checksum ('aa11' vs 'bb22'), thresholds (6: 0.5 vs 0.55). "
        "Re-run the earlier years with the current settings instead."
    )


def test_a_field_missing_from_one_manifest_differs():
    other = {k: v for k, v in MANIFEST.items() if k != "policy"}
    with pytest.raises(ComparisonError, match=r"policy \('score_or_mention' vs missing\)"):
        check_comparable(MANIFEST, other)


def test_manifest_read_back_from_json_is_comparable():
    """Lists for tuples and a run timestamp do not make two runs unlike."""
    other = {**MANIFEST, "text_fields": ["title", "abstract", "keywords"], "created": "2025-02-01"}
    check_comparable(MANIFEST, other)


def test_baseline_labels_give_runs_of_years_as_ranges():
    assert baseline_label(tuple(range(1950, 2025))) == "mean 1950-2024"
    assert baseline_label((2015, 2019, 2020, 2021)) == "mean 2015, 2019-2021"


def test_a_comparison_year_without_publications_is_not_compared(year_corpus, goals):
    records, scores = year_corpus({2023: (100, 20), 2024: (100, 60)})
    findings = analyse(records, scores, goals, AnalysisConfig(bootstrap_resamples=100), 2024, (2019, 2023),
                       THRESHOLDS, "score_only")
    assert findings.meta["comparison_years"] == (2019, 2023), "as configured"
    assert findings.meta["comparison_years_compared"] == (2023,)
    assert findings.meta["comparison_years_empty"] == (2019,)
    assert findings.meta["years_present"] == (2023, 2024)
    assert set(findings.changes["baseline"]) == {"2023"}, "no row against an empty year, no pooled row with it"


def test_an_empty_reporting_year_compares_nothing(year_corpus, goals):
    records, scores = year_corpus({2023: (100, 20)})
    findings = analyse(records, scores, goals, AnalysisConfig(bootstrap_resamples=100), 2024, (2023,),
                       THRESHOLDS, "score_only")
    assert findings.changes.empty
    assert findings.meta["comparison_years_compared"] == ()
