"""Department findings for the briefs: analyse() once per department, with the main run's settings."""

from __future__ import annotations

import pytest

from reporter.analyse import analyse
from reporter.analyse.departments import department_findings
from reporter.config import AnalysisConfig

THRESHOLDS = {"1": 0.5, "2": 0.5, "3": 0.5}

ROWS = [
    {"record_id": "a", "year": 2024, "departments": ("Hydrology",)},
    {"record_id": "b", "year": 2024, "departments": ("Hydrology", "Optics")},
    {"record_id": "c", "year": 2023, "departments": ()},
    {"record_id": "d", "year": 2023, "departments": ("Optics",)},
    {"record_id": "e", "year": 2024, "departments": ("Optics", "Optics ")},
    {"record_id": "f", "year": 2023, "departments": ("Hydrology",)},
    {"record_id": "g", "year": 2024, "departments": ("Optics",)},
    {"record_id": "old", "year": 2019, "departments": ("Geology",)},
]
# (alignment_score, is_explicit, is_aligned) per record a..old, for goals 1, 2, 3.
VALUES = {
    "1": [(0.8, True, True), (0.7, False, True), (0.1, False, False), (0.2, True, True), (0.6, False, True),
          (0.3, False, False), (0.5, False, True), (0.9, False, True)],
    "2": [(0.3, False, False), (0.55, False, True), (0.2, False, False), (0.1, False, False), (0.4, False, False),
          (0.6, False, True), (0.2, False, False), (0.1, False, False)],
    "3": [(0.1, False, False)] * 8,
}


@pytest.fixture
def corpus(make_records, make_scores, goals):
    records = make_records(ROWS)
    return records, make_scores(records, VALUES, goals)


def _main(records, scores, goals, cfg):
    return analyse(records, scores, goals, cfg, 2024, (2023,), THRESHOLDS, "score_or_mention")


def test_a_publication_with_two_departments_counts_in_both_and_none_goes_uncounted(corpus, goals):
    cfg = AnalysisConfig(bootstrap_resamples=200, min_group_size=1)
    split = department_findings(*corpus, goals, cfg, _main(*corpus, goals, cfg))
    assert [d.department for d in split.departments] == ["Hydrology", "Optics"], "2019 is out of scope: no Geology"
    by_name = {d.department: d for d in split.departments}
    assert by_name["Hydrology"].record_ids == ("a", "b", "f")
    assert by_name["Optics"].record_ids == ("b", "d", "e", "g"), "'Optics ' is the same department, counted once"
    assert split.n_unassigned == 1 and split.n_publications == 7
    assert by_name["Hydrology"].findings.headline["n_publications"] == 3


def test_each_department_gets_the_findings_analyse_gives_its_publications(corpus, goals):
    cfg = AnalysisConfig(bootstrap_resamples=200, min_group_size=1)
    records, scores = corpus
    split = department_findings(records, scores, goals, cfg, _main(records, scores, goals, cfg))
    optics = next(d for d in split.departments if d.department == "Optics")
    alone = _main(records[records["record_id"].isin(["b", "d", "e", "g"])], scores, goals, cfg)
    assert optics.findings.goals.equals(alone.goals)
    assert optics.findings.changes.equals(alone.changes)
    assert optics.findings.meta["years_present"] == (2023, 2024)


def test_department_shares_equal_the_main_department_table_under_full_counting(corpus, goals):
    cfg = AnalysisConfig(bootstrap_resamples=200, min_group_size=1)
    main = _main(*corpus, goals, cfg)
    split = department_findings(*corpus, goals, cfg, main)
    table = main.by_department.set_index(["department", "goal"])
    for department in split.departments:
        for row in department.findings.goals.itertuples():
            expected = table.loc[(department.department, row.goal)]
            assert (row.n_aligned, row.share) == (expected["n_aligned"], pytest.approx(expected["share"]))


def test_too_small_follows_the_main_rule_and_the_main_years_and_thresholds_apply(corpus, goals):
    cfg = AnalysisConfig(bootstrap_resamples=200, min_group_size=4)
    main = _main(*corpus, goals, cfg)
    split = department_findings(*corpus, goals, cfg, main)
    sizes = main.by_department.groupby("department")["is_too_small"].first()
    assert {d.department: d.is_too_small for d in split.departments} == {"Hydrology": True, "Optics": False}
    assert sizes.to_dict() == {"Hydrology": True, "Optics": False, "unassigned": True}, "as the main table says"
    hydrology = split.departments[0]
    assert hydrology.findings.meta["thresholds"] == THRESHOLDS
    assert hydrology.findings.meta["reporting_year"] == 2024
    years = hydrology.findings.by_year.groupby("year")["is_too_small"].first()
    assert years.to_dict() == {2023: True, 2024: True}, "one and two publications: both under 4"
    assert set(hydrology.findings.changes["verdict"]) == {"too small"}
