"""The change section as read: one row per goal, year ranges, and no "no change" for a comparison not made."""

from __future__ import annotations

import re
from html.parser import HTMLParser

import pypdf
import pytest

from reporter.analyse import analyse
from reporter.config import AnalysisConfig
from reporter.render import render
from tests.unit.analyse.conftest import build_year_corpus
from tests.unit.render.render_inputs import GOALS, make_inputs, make_report

THRESHOLDS = {code: 0.5 for code, _ in GOALS}


def _build(tmp_path, spec, reporting_year, comparison_years):
    records, scores = build_year_corpus(spec, GOALS)
    findings = analyse(records, scores, GOALS, AnalysisConfig(bootstrap_resamples=100), reporting_year,
                       tuple(comparison_years), THRESHOLDS, "score_only")
    report = make_report(reporting_year=reporting_year, comparison_years=tuple(comparison_years))
    written = render(make_inputs(findings=findings), report, tmp_path)
    html = written["report.html"].read_text(encoding="utf-8")
    return html, _text(html), written["report.pdf"]


class _Text(HTMLParser):
    def __init__(self):
        super().__init__()
        self.parts: list[str] = []

    def handle_data(self, data):
        self.parts.append(data)


def _text(html: str) -> str:
    parser = _Text()
    parser.feed(html)
    return re.sub(r"\s+", " ", " ".join(parser.parts))


def _change_rows(html: str) -> int:
    table = html[html.index('<table class="data change">'):]
    table = table[:table.index("</table>")]
    return table.count('<tr class="')


def test_decades_of_comparison_years_keep_one_row_per_goal_and_name_ranges(tmp_path):
    spec = {year: (20, 4 + (year % 3)) for year in range(1950, 2025)} | {2025: (20, 10)}
    html, text, pdf = _build(tmp_path, spec, 2025, range(1950, 2025))
    assert _change_rows(html) == len(GOALS), "one row per goal, not one per goal and year"
    assert "Change per goal, 2025 against mean 1950-2024" in text
    assert "with publications of 1950-2025" in text
    assert "Goal shares, 1950-2025" in text
    assert "1950, 1951" not in text, "no heading lists every year"
    assert "(304 rows)" in text, "the full table (4 goals x 75 single years + 4 pooled) is in the CSV"
    # Before the compact table, 1900-2024 gave a 101-page report; a short report stays short.
    assert len(pypdf.PdfReader(pdf).pages) <= 16


def test_an_empty_comparison_year_is_named_not_called_no_change(tmp_path):
    html, text, _pdf = _build(tmp_path, {2024: (40, 8), 2025: (40, 9)}, 2025, (2019, 2024))
    assert "2019 had no publications and was not compared" in text
    assert "with publications of 2024-2025" in text, "the cover names the years actually present"
    assert "Change per goal, 2025 against 2024" in text
    assert "2019" not in text.split("Change per goal")[1].split("How the figures were made")[0]


def test_comparison_years_all_empty_make_no_claim_of_no_change(tmp_path):
    _html, text, _pdf = _build(tmp_path, {2025: (40, 9)}, 2025, (2019,))
    assert "No publication from 2019 was analysed, so no comparison with that year was made." in text
    assert "No change between" not in text
    assert "with publications of" not in text, "one year present: the reporting year says it all"


def test_an_empty_reporting_year_is_said_on_the_cover_and_in_the_summary(tmp_path):
    _html, text, _pdf = _build(tmp_path, {2024: (40, 9)}, 2025, (2024,))
    assert "Reporting year 2025 (no publications from it), with publications of 2024" in text
    assert "No publication from 2025 was analysed, so no comparison with earlier years was made." in text
    assert "No change between" not in text


@pytest.mark.parametrize("years, expected", [((2024,), "2024"), ((2022, 2023, 2024), "2022-2024"),
                                             ((2015, 2019, 2020), "2015, 2019-2020")])
def test_year_filter_gives_ranges(years, expected):
    from reporter.render.filters import fmt_years

    assert fmt_years(years) == expected


def test_baselines_filter_joins_single_years_into_ranges():
    from reporter.render.filters import fmt_baselines

    assert fmt_baselines(("2022", "2023", "2024")) == "2022-2024"
    assert fmt_baselines(("2023", "mean 2020-2023")) == "2023, mean 2020-2023"
    assert fmt_baselines(()) == ""


def test_partner_countries_too_small_for_goal_figures_are_listed_by_name(tmp_path):
    from reporter.render.sections import build_context
    from reporter.render.themes import load_theme

    context = build_context(make_inputs(), make_report(), load_theme("default"))
    partners = context.partners
    assert all(row.n >= 3 for row in partners.countries), "goal figures only where the group is large enough"
    listed = dict(partners.listed_countries)
    assert listed and all(n < 3 for n in listed.values())
    assert [row.label for row in partners.countries] == ["Germany"] and listed == {"France": 2, "Norway": 1}
    assert len(partners.countries) + len(listed) == partners.n_countries, "no partner country goes unmentioned"
