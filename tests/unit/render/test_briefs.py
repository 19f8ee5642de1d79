"""Department briefs from hand-built inputs: the context a brief's templates see, and the files written."""

import dataclasses
import re

import pytest
from pypdf import PdfReader

from reporter.analyse.departments import department_findings
from reporter.config import AnalysisConfig
from reporter.render.brief_context import EVIDENCE_PER_GOAL, build_brief_context
from reporter.render.briefs import ENTRY_TEMPLATE, write_briefs
from reporter.render.html import render_html
from reporter.render.themes import build_environment, load_theme
from tests.unit.render.render_inputs import GOALS, INJECTED_DEPARTMENT, make_inputs, make_report

CFG = AnalysisConfig(min_group_size=3, bootstrap_resamples=200)


@pytest.fixture(scope="module")
def inputs():
    return make_inputs()


@pytest.fixture(scope="module")
def split(inputs):
    return department_findings(inputs.records, inputs.scores, GOALS, CFG, inputs.findings)


def _department(split, name):
    return next(d for d in split.departments if d.department == name)


def _context(split, inputs, name, theme="default", medium="screen"):
    return build_brief_context(_department(split, name), inputs, make_report(theme=theme), load_theme(theme), medium)


def _html(context, theme="default"):
    loaded = load_theme(theme)
    return render_html(context, build_environment(loaded), loaded, ENTRY_TEMPLATE)


def test_a_department_is_shown_beside_the_institution(split, inputs):
    context = _context(split, inputs, "Hydrology")
    assert context.figures.n_publications == 4, "nm:01, 02, 08, 09; nm:08 is Public Health's too"
    # The hand-built department table of render_inputs counts the same publications independently.
    table = inputs.findings.by_department.set_index(["department", "goal"])
    institution = inputs.findings.goals.set_index("goal")
    for row in context.profile.rows:
        assert row.department.n_aligned == table.loc[("Hydrology", row.goal), "n_aligned"]
        assert row.department.share == pytest.approx(table.loc[("Hydrology", row.goal), "share"])
        assert row.institution.share == pytest.approx(institution.loc[row.goal, "share"])
    assert context.figures.institution_n == inputs.findings.headline["n_publications"]
    assert [(y.label, y.n) for y in context.figures.per_year] == [("2023", 1), ("2024", 3)]
    assert [(y.label, y.n) for y in context.notes.small_years] == [("2023", 1)], "1 publication, under 3"
    assert context.profile.chart is not None and "<svg" in context.profile.chart.svg


def test_change_is_one_row_per_goal_and_a_too_small_year_is_not_tested(split, inputs):
    change = _context(split, inputs, "Hydrology").change
    assert [row.goal for row in change.rows] == [code for code, _ in GOALS]
    assert {row.baseline for row in change.rows} == {"2023"}
    assert {row.verdict for row in change.rows} == {"too small"} and not change.is_tested


def test_evidence_lists_the_departments_own_publications_for_its_leading_goals(split, inputs):
    context = _context(split, inputs, "Hydrology")
    own = set(_department(split, "Hydrology").record_ids)
    assert context.evidence[0].goal == "6", "all four Hydrology publications are aligned with goal 6"
    assert [block.n_total for block in context.evidence] == sorted((b.n_total for b in context.evidence), reverse=True)
    for block in context.evidence:
        assert len(block.rows) <= EVIDENCE_PER_GOAL
        assert {row.record_id for row in block.rows} <= own
        scores = [row.alignment_score for row in block.rows]
        assert scores == sorted(scores, reverse=True)


def test_a_too_small_department_shows_counts_and_no_share(split, inputs):
    context = _context(split, inputs, INJECTED_DEPARTMENT)
    assert context.is_too_small and context.figures.n_publications == 1
    assert context.figures.share is None and context.profile.chart is None
    assert all(row.department is None for row in context.profile.rows)
    html = _html(context)
    profile = html[html.index('id="goal-profile"'):html.index('id="change-over-time"')]
    assert profile.count(">too small</td>") == len(GOALS)
    figures = html[html.index('id="key-figures"'):html.index('id="goal-profile"')]
    assert "too small" in figures and figures.count("%") == 2, "only the institution's share and its interval"


def test_brief_html_escapes_what_came_from_the_inputs(split, inputs):
    # The publication with markup in its title and evidence made the strongest for goal 6, so the brief shows it.
    scores = inputs.scores.copy()
    scores.loc[(scores["record_id"] == "nm:01") & (scores["goal"] == "6"), "alignment_score"] = 0.99
    html = _html(_context(split, dataclasses.replace(inputs, scores=scores), "Hydrology"))
    assert "<script>alert(1)</script>" not in html and "&lt;script&gt;alert(1)&lt;/script&gt;" in html
    assert "<img src=x" not in html and "&lt;img src=x onerror=alert(2)&gt;" in html
    small = _html(_context(split, inputs, INJECTED_DEPARTMENT))
    assert '<h1 class="brief-title">=HYPERLINK(&#34;x&#34;)</h1>' in small
    for phrase in ("says nothing about the work's impact, quality", "Leiden Manifesto",
                   "must not be the sole basis for funding, hiring or promotion", "How the figures were made"):
        assert phrase in html


def test_the_compact_theme_falls_back_to_the_default_brief_templates(split, inputs):
    html = _html(_context(split, inputs, "Hydrology", theme="compact"), theme="compact")
    assert '<h1 class="brief-title">Hydrology</h1>' in html and "DejaVu Sans Condensed" in html


@pytest.fixture(scope="module")
def written(split, inputs, tmp_path_factory):
    """Two briefs written as a build writes them (each PDF takes a few seconds)."""
    out = tmp_path_factory.mktemp("briefs")
    two = dataclasses.replace(split, departments=(_department(split, "Hydrology"),
                                                  _department(split, INJECTED_DEPARTMENT)))
    return out, write_briefs(two, inputs, make_report(), out, show_progress=False)


def test_each_department_gets_an_html_and_a_pdf_under_a_safe_name(written):
    out, files = written
    assert sorted(files) == ["briefs/hydrology.html", "briefs/hydrology.pdf",
                             "briefs/hyperlink-x.html", "briefs/hyperlink-x.pdf"]
    assert all(path == out / label and path.stat().st_size > 0 for label, path in files.items())
    assert not [p for p in (out / "briefs").iterdir() if p.name.startswith(".")], "no temporary file left behind"


def test_the_pdf_reads_as_a_brief(written):
    out, files = written
    text = re.sub(r"\s+", " ", " ".join(p.extract_text() for p in PdfReader(files["briefs/hydrology.pdf"]).pages))
    assert "Hydrology" in text and "UNIVERSITY OF NORTHMERE" in text.upper()
    assert "Goal profile against the institution" in text and "Leiden Manifesto" in text
    small = " ".join(p.extract_text() for p in PdfReader(files["briefs/hyperlink-x.pdf"]).pages)
    assert "too small" in small
    assert len(PdfReader(files["briefs/hydrology.pdf"]).pages) <= 2
