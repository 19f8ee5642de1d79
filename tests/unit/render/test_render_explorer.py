"""The publication explorer: rows built from the record and score tables, counts that match the
report's tables, its data block, and its place in report.html only (never in the PDF)."""

from __future__ import annotations

import json
import re
from html.parser import HTMLParser

import pandas as pd
import pypdf
import pytest

from reporter.render.explorer import NONE, build_explorer, json_for_script, read_script
from reporter.render.themes import ThemeError, load_theme
from reporter.score.review import apply_review
from tests.unit.render.render_inputs import GOALS, make_inputs, make_records, make_scores


@pytest.fixture(scope="module")
def explorer():
    return build_explorer(make_inputs(), GOALS, load_theme("default"))


def _data_rows(section) -> list:
    return json.loads(str(section.data_json))["rows"]


def _option_values(options) -> dict[str, str]:
    return {o.label: o.value for o in options}


def test_every_analysed_publication_is_a_row_newest_first(explorer):
    inputs = make_inputs()
    assert len(explorer.rows) == inputs.findings.headline["n_publications"] == 12, "uncapped: every publication"
    assert explorer.n_not_listed == 0
    keys = [(-r.year, r.title.casefold()) for r in explorer.rows]
    assert keys == sorted(keys), "newest year first, then by title"
    assert explorer.years == (2023, 2024)
    assert [o.value for o in explorer.year_options] == ["2024", "2023"]


@pytest.mark.parametrize("code", [code for code, _ in GOALS])
def test_rows_and_data_per_goal_equal_the_goal_tables_aligned_figure(explorer, code):
    goals = make_inputs().findings.goals.set_index("goal")
    expected = int(goals.loc[code, "n_aligned"])
    assert sum(code in [g.goal for g in r.goals] for r in explorer.rows) == expected
    assert sum(code in row[1][0::2] for row in _data_rows(explorer)) == expected, "what the script filters on"


def test_any_goal_and_no_goal_split_the_publications_as_the_summary_does(explorer):
    headline = make_inputs().findings.headline
    with_goal = sum(bool(row[1]) for row in _data_rows(explorer))
    assert with_goal == headline["n_aligned_any"]
    assert len(explorer.rows) - with_goal == headline["n_publications"] - headline["n_aligned_any"]


def test_department_and_country_choices_count_the_tables_n(explorer):
    findings = make_inputs().findings
    rows = _data_rows(explorer)
    departments = _option_values(explorer.department_options)
    for name, n in findings.by_department.groupby("department")["n"].max().items():
        assert sum(int(departments[name]) in row[2] for row in rows) == n, name
    countries = _option_values(explorer.country_options)
    for name, n in findings.by_country.groupby("country_name")["n"].max().items():
        assert sum(int(countries[name]) in row[3] for row in rows) == n, name
    domestic = findings.collaboration.loc[findings.collaboration["group"] == "domestic", "n"].max()
    assert countries["Domestic only"] == NONE and sum(not row[3] for row in rows) == domestic


def test_goals_run_highest_score_first_with_their_evidence(explorer):
    row = next(r for r in explorer.rows if r.record_id == "nm:02")
    assert [g.goal for g in row.goals] == ["13", "6"]
    scores = [g.alignment_score for g in row.goals]
    assert scores == sorted(scores, reverse=True)
    assert [e.goals for e in row.evidence] == [("13",), ("6",)]
    assert row.evidence[1].sentence == "The study of groundwater recharge after wet winters bears on goal 6."
    unaligned = next(r for r in explorer.rows if r.record_id == "nm:07")
    assert unaligned.goals == () and unaligned.evidence == ()
    assert next(r for r in explorer.rows if r.record_id == "nm:05").countries == ("Germany", "Norway")


def test_one_sentence_that_serves_two_goals_is_listed_once():
    scores = make_scores()
    both = (scores["record_id"] == "nm:02") & scores["is_aligned"]
    scores.loc[both, "evidence"] = "Recharge fell as winters warmed."
    row = next(r for r in build_explorer(make_inputs(scores=scores), GOALS, load_theme("default")).rows
               if r.record_id == "nm:02")
    assert [(e.goals, e.sentence) for e in row.evidence] == [(("13", "6"), "Recharge fell as winters warmed.")]


def test_publications_outside_the_analysed_years_are_counted_not_listed():
    records = make_records()
    records.loc[records["record_id"] == "nm:09", "year"] = 2019
    section = build_explorer(make_inputs(records=records), GOALS, load_theme("default"))
    assert "nm:09" not in {r.record_id for r in section.rows}
    assert (len(section.rows), section.n_not_listed) == (11, 1)


def test_reviewer_decisions_decide_what_is_listed():
    review = pd.DataFrame({"record_id": ["nm:07", "nm:02"], "goal": ["3", "13"], "decision": ["include", "exclude"],
                           "reviewer": ["R. Fenwick"] * 2, "note": ["", ""], "line": [2, 3]})
    reviewed, _ = apply_review(make_scores(), review)
    rows = {r.record_id: r for r in build_explorer(make_inputs(scores=reviewed), GOALS, load_theme("default")).rows}
    assert [(g.goal, g.by_reviewer) for g in rows["nm:07"].goals] == [("3", True)]
    assert [g.goal for g in rows["nm:02"].goals] == ["6"], "a goal the reviewer excluded is not listed"


def test_data_block_cannot_end_its_script_element():
    text = str(json_for_script({"goal": "</script><!-- & >"}))
    assert "<" not in text and ">" not in text and "&" not in text
    assert json.loads(text) == {"goal": "</script><!-- & >"}


def test_a_theme_script_that_would_end_the_element_is_refused(tmp_path):
    theme = tmp_path / "mine"
    theme.mkdir()
    (theme / "explorer.js").write_text("console.log('</script>');\n", encoding="utf-8")
    with pytest.raises(ThemeError, match=r"explorer\.js contains '</script' or '<!--'"):
        read_script(load_theme(str(theme)))


class _ExplorerTable(HTMLParser):
    """Rows of the explorer table as a browser without script shows them: (title, year) per row."""

    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.rows: list[list[str]] = []
        self.hidden_controls = False
        self._in_table = self._in_body = False
        self._cell: list[str] | None = None

    def handle_starttag(self, tag, attrs):
        attrs = dict(attrs)
        if attrs.get("id") == "explorer-controls":
            self.hidden_controls = "hidden" in attrs
        if tag == "table" and attrs.get("id") == "explorer-table":
            self._in_table = True
        elif self._in_table and tag == "tbody":
            self._in_body = True
        elif self._in_body and tag == "tr":
            self.rows.append([])
        elif self._in_body and tag in ("th", "td"):
            self._cell = []

    def handle_endtag(self, tag):
        if self._in_body and tag in ("th", "td") and self._cell is not None:
            self.rows[-1].append("".join(self._cell).strip())
            self._cell = None
        elif tag == "table":
            self._in_table = self._in_body = False

    def handle_data(self, data):
        if self._cell is not None:
            self._cell.append(data)


def test_report_html_lists_every_row_without_script_and_hides_the_controls(rendered):
    parser = _ExplorerTable()
    parser.feed(rendered["report.html"].read_text(encoding="utf-8"))
    explorer = build_explorer(make_inputs(), GOALS, load_theme("default"))
    assert [(cells[0], cells[1]) for cells in parser.rows] == [(r.title, str(r.year)) for r in explorer.rows]
    assert parser.hidden_controls, "filters do nothing without the script, so they stay hidden"


def test_the_pdf_keeps_its_content_without_the_explorer(rendered):
    text = re.sub(r"\s+", " ", " ".join(p.extract_text() for p in pypdf.PdfReader(rendered["report.pdf"]).pages))
    assert "Evidence appendix" in text
    assert "Publication explorer" not in text and "Search titles and evidence" not in text
    # "A survey of reading habits" is aligned with no goal: only the explorer would list it.
    assert "A survey of reading habits" not in text
    assert "A survey of reading habits" in rendered["report.html"].read_text(encoding="utf-8")
