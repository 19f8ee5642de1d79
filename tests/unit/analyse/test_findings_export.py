"""JSON and table exports of Findings: deterministic, rounded, NaN as null."""

from __future__ import annotations

import json

import pandas as pd
import pytest

from reporter.analyse import analyse, findings_tables, findings_to_json
from reporter.analyse.export import TABLE_NAMES
from reporter.config import AnalysisConfig


@pytest.fixture
def corpus(year_corpus):
    return year_corpus({2023: (25, 5), 2024: (30, 12)})


def _run(corpus, goals):
    records, scores = corpus
    return analyse(
        records, scores, goals, AnalysisConfig(bootstrap_resamples=200), 2024, (2023,),
        {"1": 0.5, "2": 0.5, "3": 0.5}, "score_or_mention",
    )


def test_two_runs_give_byte_identical_json(corpus, goals):
    assert findings_to_json(_run(corpus, goals)) == findings_to_json(_run(corpus, goals))


def test_json_rounds_floats_and_writes_nan_as_null(corpus, goals):
    findings = _run(corpus, goals)
    document = json.loads(findings_to_json(findings))
    share = document["tables"]["goals"][0]["share_low"]
    assert share == round(findings.goals.loc[0, "share_low"], 6)
    assert document["headline"]["n_general_mentions"] is None
    mean_goal_2 = document["tables"]["goals"][1]
    assert mean_goal_2["mean_score"] == pytest.approx(0.2)


def test_json_keeps_every_table_and_column_in_order(corpus, goals):
    findings = _run(corpus, goals)
    document = json.loads(findings_to_json(findings))
    assert list(document) == ["meta", "headline", "coverage", "tables", "extra"]
    for name in TABLE_NAMES:
        table = getattr(findings, name)
        rows = document["tables"][name]
        assert len(rows) == len(table)
        assert all(list(row) == list(table.columns) for row in rows)
    assert document["tables"]["by_country"] == [], "no partner countries in this corpus"


def test_empty_group_share_becomes_null(corpus, goals):
    records, scores = corpus
    findings = analyse(
        records, scores, goals, AnalysisConfig(bootstrap_resamples=200), 2024, (2022,),
        {"1": 0.5, "2": 0.5, "3": 0.5}, "score_or_mention",
    )
    rows = json.loads(findings_to_json(findings))["tables"]["by_year"]
    assert [r["share"] for r in rows if r["year"] == 2022] == [None, None, None], "no publications in 2022"


def test_tables_for_csv_are_copies_with_headline_and_coverage(corpus, goals):
    findings = _run(corpus, goals)
    tables = findings_tables(findings)
    assert set(tables) == {*TABLE_NAMES, "headline", "coverage"}
    tables["goals"].loc[0, "n"] = -1
    assert findings.goals.loc[0, "n"] == 55, "exports never write back into findings"
    headline = tables["headline"].set_index("key")["value"]
    assert headline["n_publications"] == 55
    assert isinstance(tables["coverage"], pd.DataFrame)
