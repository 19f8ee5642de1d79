"""Funding figures of a portfolio on a few hand-built awards: shares worked out by hand, groups,
suppression by number of awards, changes, exports, and publication figures left as they were."""

from __future__ import annotations

import json
import math

import numpy as np
import pandas as pd
import pytest

from reporter.analyse import analyse, findings_tables, findings_to_json
from reporter.analyse.funding import goal_weights
from reporter.config import AnalysisConfig
from reporter.config_funding import FundingConfig
from reporter.currency import ConversionTable

THRESHOLDS = {"1": 0.5, "2": 0.5, "3": 0.5}
TABLE = ConversionTable("EUR", {"EUR": 1.0, "GBP": 1.5}, None, "")
ROWS = [
    {"record_id": "a", "year": 2024, "departments": ("Hydrology",), "partner_countries": ("DE",)},
    {"record_id": "b", "year": 2024, "departments": ("Hydrology", "Optics"), "partner_countries": ("DE", "KR")},
    {"record_id": "c", "year": 2024},
    {"record_id": "d", "year": 2023, "departments": ("Optics",)},
    {"record_id": "e", "year": 2023, "departments": ("Optics",)},
    {"record_id": "f", "year": 2023, "departments": ("Optics",)},
]
# (amount, currency, note); b is 200 GBP = 300 EUR; f has no usable amount.
AMOUNTS = [(100.0, "EUR", ""), (200.0, "GBP", ""), (600.0, "EUR", ""), (50.0, "EUR", ""), (150.0, "EUR", ""),
           (math.nan, "EUR", "no amount")]
ALIGNED = {"a": {"1"}, "b": {"1", "2"}, "c": set(), "d": {"2"}, "e": {"1", "2", "3"}, "f": {"1"}}


@pytest.fixture
def portfolio(make_records, make_scores, goals):
    records = make_records(ROWS)
    records["amount"], records["currency"], records["amount_note"] = zip(*AMOUNTS)
    values = {code: [(0.8, False, True) if code in ALIGNED[r] else (0.2, False, False) for r in records["record_id"]]
              for code, _ in goals}
    return records, make_scores(records, values, goals)


def _run(portfolio, goals, counting="full", group_counting="full", size=10, conversion=TABLE):
    records, scores = portfolio
    cfg = AnalysisConfig(bootstrap_resamples=300, counting=group_counting, min_group_size=size)
    return analyse(records, scores, goals, cfg, 2024, (2023,), THRESHOLDS, "score_only",
                   conversion=conversion, funding=FundingConfig(counting=counting))


def test_goal_funding_shares_by_hand(portfolio, goals):
    """Worked by hand: total 100 + 300 + 600 + 50 + 150 = 1200 EUR (f has no amount).
    Full: goal 1 = a + b + e = 550, goal 2 = b + d + e = 500, goal 3 = e = 150.
    Fractional: goal 1 = 100 + 300/2 + 150/3 = 300, goal 2 = 150 + 50 + 50 = 250, goal 3 = 50."""
    full = _run(portfolio, goals).funding.goals.set_index("goal")
    fractional = _run(portfolio, goals, counting="fractional").funding.goals.set_index("goal")
    assert full["amount"].tolist() == pytest.approx([550, 500, 150])
    assert full["share"].tolist() == pytest.approx([550 / 1200, 500 / 1200, 150 / 1200])
    assert fractional["amount"].tolist() == pytest.approx([300, 250, 50])
    assert fractional["share"].tolist() == pytest.approx([300 / 1200, 250 / 1200, 50 / 1200])
    assert full["share_fractional"].tolist() == pytest.approx(fractional["share"].tolist())
    assert full["n_aligned"].tolist() == [3, 3, 1] and (full["n_awards"] == 5).all()


def test_fractional_shares_add_up_to_the_funding_aligned_with_any_goal(portfolio, goals):
    funding = _run(portfolio, goals, counting="fractional").funding
    headline = funding.headline
    assert headline["amount_aligned_any"] == pytest.approx(600), "a, b, d, e"
    assert funding.goals["share"].sum() == pytest.approx(headline["share_aligned_any"]), (
        "fractional counting splits each award's amount over its goals"
    )
    assert (headline["n_awards"], headline["n_in_funding"], headline["n_not_in_funding"]) == (6, 5, 1)
    assert headline["amount_total"] == pytest.approx(1200)


def test_every_interval_holds_its_share(portfolio, goals):
    funding = _run(portfolio, goals, size=2).funding
    for name in ("goals", "by_year", "by_department", "by_country"):
        table = getattr(funding, name)
        shown = table[table["amount_total"] > 0]
        assert ((shown["share_low"] <= shown["share"] + 1e-12) & (shown["share"] <= shown["share_high"] + 1e-12)).all(), (
            f"{name}: low <= share <= high"
        )
    assert funding.headline["share_aligned_any_low"] <= funding.headline["share_aligned_any"]


def test_departments_take_the_amount_by_the_group_counting(portfolio, goals):
    full = _run(portfolio, goals).funding.by_department.drop_duplicates("department").set_index("department")
    assert full["amount_total"].to_dict() == pytest.approx({"Hydrology": 400, "Optics": 500, "unassigned": 600})
    fractional = _run(portfolio, goals, group_counting="fractional").funding.by_department
    totals = fractional.drop_duplicates("department").set_index("department")["amount_total"]
    assert totals.to_dict() == pytest.approx({"Hydrology": 250, "Optics": 350, "unassigned": 600})
    assert totals.sum() == pytest.approx(1200), "fractional amounts sum to the total funding"
    assert full.loc["unassigned", "is_unassigned"]


def test_partner_countries_by_amount(portfolio, goals):
    table = _run(portfolio, goals).funding.by_country
    first = table.drop_duplicates("country").set_index("country")
    assert first["amount_total"].to_dict() == pytest.approx({"DE": 400, "KR": 300})
    assert first["country_name"].to_dict() == {"DE": "Germany", "KR": "South Korea"}, "Source: ISO 3166-1 via pycountry"


def test_small_groups_are_judged_by_awards_not_by_amount(portfolio, goals):
    table = _run(portfolio, goals, size=2).funding.by_department.drop_duplicates("department").set_index("department")
    assert table.loc["unassigned", "amount_total"] == 600, "half the funding..."
    assert table.loc["unassigned", "is_too_small"], "...but one award"
    assert not table.loc["Optics", "is_too_small"], "three awards with less money"


def test_changes_are_too_small_below_the_award_threshold_and_tested_above_it(portfolio, goals):
    small = _run(portfolio, goals).funding.changes
    assert (small["verdict"] == "too small").all() and small["p_value"].isna().all()
    tested = _run(portfolio, goals, size=2).funding.changes.set_index("goal")
    assert tested.loc["1", "share"] == pytest.approx(400 / 1000) and tested.loc["1", "share_baseline"] == pytest.approx(150 / 200)
    assert tested.loc["1", "diff"] == pytest.approx(0.4 - 0.75)
    assert tested["n_awards"].tolist() == [3, 3, 3] and tested["n_awards_baseline"].tolist() == [2, 2, 2], (
        "f has no amount, so 2023 has two awards in the funding figures"
    )
    assert tested["p_value"].between(0, 1).all()
    assert ((tested["diff_low"] <= tested["diff"]) & (tested["diff"] <= tested["diff_high"])).all()


def test_currencies_and_awards_left_out(portfolio, goals):
    funding = _run(portfolio, goals).funding
    currencies = funding.currencies.set_index("currency")
    assert currencies.loc["GBP", ["n_awards", "amount", "rate", "amount_base"]].tolist() == [1, 200, 1.5, 300]
    assert currencies.loc["EUR", ["n_awards", "amount_base"]].tolist() == [4, 900]
    assert funding.left_out.to_dict("records") == [{"reason": "no amount", "n_awards": 1}]
    notes = " ".join(funding.meta["method_notes"])
    assert "Full counting" in notes and "1 GBP = 1.5 EUR" not in notes, "no table file, no conversion sentence"
    assert "1 award without a usable amount is counted and scored but left out of the funding figures: no amount (1)" in notes


def test_goal_weights():
    aligned = np.array([[True, True, False], [False, False, False], [True, True, True]])
    assert goal_weights(aligned, "full").tolist() == [[1, 1, 0], [0, 0, 0], [1, 1, 1]]
    assert goal_weights(aligned, "fractional") == pytest.approx(np.array([[.5, .5, 0], [0, 0, 0], [1 / 3] * 3]))
    with pytest.raises(ValueError, match="counting must be one of full, fractional, got 'half'"):
        goal_weights(aligned, "half")


def test_publication_figures_and_exports_stay_as_they_were(portfolio, goals):
    plain = _run(portfolio, goals, conversion=None)
    funded = _run(portfolio, goals)
    assert plain.funding is None
    document = json.loads(findings_to_json(funded))
    assert json.loads(findings_to_json(plain)) == {k: v for k, v in document.items() if k != "funding"}
    assert not [name for name in findings_tables(plain) if name.startswith("funding")]
    names = sorted(name for name in findings_tables(funded) if name.startswith("funding"))
    assert names == ["funding_by_country", "funding_by_department", "funding_by_year", "funding_changes",
                     "funding_currencies", "funding_goals", "funding_headline", "funding_left_out"]
    assert findings_to_json(funded) == findings_to_json(_run(portfolio, goals)), "seeded: the same bytes twice"


def test_every_funding_column_and_key_is_documented(portfolio, goals):
    from pathlib import Path

    import reporter.analyse as analyse_package

    funding = _run(portfolio, goals, size=2).funding
    schema = (Path(analyse_package.__file__).parent / "FINDINGS_SCHEMA.md").read_text(encoding="utf-8")
    tables = ("goals", "by_year", "changes", "by_department", "by_country", "currencies", "left_out")
    names = {c for name in tables for c in getattr(funding, name).columns}
    names |= set(funding.meta) | set(funding.headline) | set(funding.meta["methods"])
    undocumented = sorted(n for n in names if f"`{n}`" not in schema)
    assert not undocumented, f"FINDINGS_SCHEMA.md lacks {undocumented}"
