"""The validation section, corrected shares and reviewer overrides in the report (issue #6).

Findings.extra is filled the way the pipeline fills it, by the real analyse and score
functions (validate, correct_shares, apply_review) on the hand-built render inputs; no model.
"""

from __future__ import annotations

import dataclasses
import re
from pathlib import Path

import numpy as np
import pandas as pd
import pypdf
import pytest

import reporter.analyse as analyse_package
from reporter.analyse.correction import EXPLANATION, correct_shares
from reporter.analyse.labelled import read_labelled_sample
from reporter.analyse.validation import CAVEAT, validate
from reporter.render import context_validation, render
from reporter.render.appendix import build_evidence
from reporter.render.filters import fmt_count, fmt_score, fmt_share
from reporter.render.html import render_html
from reporter.render.sections import SCREEN_SECTIONS, SECTIONS, build_context
from reporter.render.themes import build_environment, load_theme
from reporter.render.validation_section import HEADING
from reporter.score.review import apply_review, review_summary
from tests.unit.render.render_inputs import GOALS, make_inputs, make_records, make_report, make_scores

CODES = tuple(code for code, _ in GOALS)
# Nobody labels goal 13, so its correction must be refused with a reason.
LABELS = """record_id,doi,goals
nm:01,,6
nm:02,,6
nm:03,,3
nm:04,,3
nm:05,,7
nm:06,,7
nm:07,,none
nm:08,,6
nm:09,,6
nm:10,,3
nm:11,,7;3
nm:12,,7
nm:99,,3
,10.5555/not-in-the-list,6
"""
REVIEW = pd.DataFrame({
    "record_id": ["nm:07", "nm:02", "nm:05"],
    "goal": ["3", "13", "7"],
    "decision": ["include", "exclude", "include"],
    "reviewer": ["R. Fenwick", "R. Fenwick", "T. Marlow"],
    "note": ["Health literacy of care staff.", "Recharge study; no climate angle.", ""],
    "line": [2, 3, 4],
})


def _extra(folder: Path, with_review: bool) -> tuple[dict, pd.DataFrame]:
    """Findings.extra as pipeline._with_human_judgement builds it, and the score table render gets."""
    path = folder / "labelled.csv"
    path.write_text(LABELS, encoding="utf-8")
    machine = make_scores()
    thresholds = {code: 0.5 for code in CODES}
    validation = validate(machine, read_labelled_sample(path, make_records(), CODES), CODES, thresholds,
                          "score_or_mention", global_threshold=0.5)
    shares = machine.groupby("goal", sort=False).agg(n=("is_aligned", "size"), n_aligned=("is_aligned", "sum"))
    corrected = correct_shares(shares.reindex(list(CODES)).reset_index(), validation.pairs, 0.95,
                               np.random.default_rng(7), 200)
    extra = {"validation": validation.to_dict(), "corrected_shares": corrected, "correction_explanation": EXPLANATION}
    if not with_review:
        return extra, machine
    reviewed, overrides = apply_review(machine, REVIEW)
    return {**extra, "review": review_summary(overrides), "overrides": overrides}, reviewed


def _inputs(folder: Path, with_review: bool = True):
    extra, scores = _extra(folder, with_review)
    findings = make_inputs().findings
    return make_inputs(findings=dataclasses.replace(findings, extra={**findings.extra, **extra}), scores=scores)


def _html(inputs, theme: str = "default") -> str:
    loaded = load_theme(theme)
    return render_html(build_context(inputs, make_report(theme=theme), loaded), build_environment(loaded), loaded)


def _text(html: str) -> str:
    """Visible text with tags dropped and whitespace folded, enough to find a figure in a sentence."""
    return re.sub(r"\s+", " ", re.sub(r"<[^>]+>", " ", html))


@pytest.fixture(scope="module")
def validated(tmp_path_factory):
    return _inputs(tmp_path_factory.mktemp("labels"))


@pytest.fixture(scope="module")
def context(validated):
    return build_context(validated, make_report(), load_theme("default"))


@pytest.fixture(scope="module")
def html(context) -> str:
    theme = load_theme("default")
    return render_html(context, build_environment(theme), theme)


@pytest.mark.parametrize("cls", [c for c in vars(context_validation).values() if dataclasses.is_dataclass(c)
                                 and c.__module__ == context_validation.__name__], ids=lambda c: c.__name__)
def test_every_validation_context_field_has_help_text_and_is_frozen(cls):
    missing = [f.name for f in dataclasses.fields(cls) if not f.metadata.get("help")]
    assert not missing, f"{cls.__name__}: fields without help text: {missing}"
    assert cls.__dataclass_params__.frozen, f"{cls.__name__} must be frozen"


def test_validation_section_follows_the_method_section_in_the_contents(context):
    titles = [s.title for s in context.sections]
    method = titles.index("How the figures were made")
    assert titles[method + 1] == HEADING
    assert [t for t in titles if t != HEADING] == [title for _a, title, _p in SECTIONS + SCREEN_SECTIONS]


@pytest.mark.parametrize("theme", ["default", "compact"])
def test_validation_section_shows_its_headings_and_figures(validated, html, theme):
    page = html if theme == "default" else _html(validated, theme)
    text = _text(page)
    v = validated.findings.extra["validation"]
    assert f'<h2 id="validation">{HEADING}</h2>' in page
    for heading in ("Per goal", "Which goals people and the machine gave",
                    "How precision and recall move with the threshold", "Thresholds that would do better",
                    "Shares corrected for the machine's error rates", "Labelled rows not compared"):
        assert f"<h3>{heading}</h3>" in page.replace("&#39;", "'"), heading
    for name in ("macro", "micro"):
        avg = v["averages"][name]
        figures = " ".join(fmt_score(avg[key]) for key in ("precision", "recall", "f1"))
        assert f"{name.capitalize()} average {figures}" in text, name
    water = next(r for r in v["per_goal"] if r["goal"] == "6")
    row = (f"6 Clean Water and Sanitation {fmt_score(water['threshold'])} {water['support']} "
           f"{water['n_predicted']} {water['tp']}")
    assert row in text, "per-goal row: threshold, judged aligned, counted, both"
    assert CAVEAT in text.replace("&#39;", "'")
    assert 'aria-label="Heat map of the 12 labelled publications' in page, "heat map with its text alternative"
    assert "Fullest cells off the diagonal" in text, "the heat map's table alternative"
    assert 'aria-label="Small multiples, one per goal with labelled publications (3)' in page, "goal 13 has no labels"


def test_recommended_thresholds_are_listed_per_goal(validated, html):
    text = _text(html)
    for r in validated.findings.extra["validation"]["recommended"]:
        assert f"{fmt_score(r['current'])} {fmt_score(r['recommended'])} {r['support']}" in text, r["goal"]


def test_corrected_shares_sit_beside_the_machine_share_and_refusals_give_their_reason(validated, html):
    text = _text(html).replace("&#39;", "'")
    corrected = validated.findings.extra["corrected_shares"].set_index("goal")
    assert EXPLANATION in text
    water = corrected.loc["6"]
    assert not water["reason"], "goal 6 has labelled publications on both sides"
    assert f"{fmt_share(water['apparent'])} {fmt_share(water['corrected'])}" in text
    climate = corrected.loc["13"]
    assert climate["reason"], "nobody labelled goal 13, so its correction is refused"
    assert f"{fmt_share(climate['apparent'])} not corrected" in text
    assert climate["reason"] in text


def test_unmatched_labelled_rows_are_counted_and_listed(validated, html):
    text = _text(html)
    v = validated.findings.extra["validation"]
    assert v["n_unmatched"] == 2, "one unknown record id, one unknown DOI"
    assert f"{v['n_unmatched']} of {v['n_rows']} rows of the labelled sample were not compared" in text
    for row in v["unmatched"]:
        assert f"{row['line']} {row['given']}" in text


def test_method_section_quotes_macro_f1_and_points_to_the_validation_section(validated, html):
    method = html.split('id="method"')[1].split('id="cautions"')[0]
    macro = fmt_score(validated.findings.extra["validation"]["averages"]["macro"]["f1"])
    assert f"macro-averaged F1 of {macro}" in _text(method)
    assert f'<a href="#validation">{HEADING}</a>' in method


def test_without_a_labelled_sample_there_is_no_validation_section():
    page = _html(make_inputs())
    assert HEADING not in page and 'id="validation"' not in page
    assert "No labelled sample was given" in page
    assert "Human review" not in page and "by reviewer" not in page


def test_method_section_counts_overrides_per_goal(validated, html):
    method = _text(html.split('id="method"')[1].split('id="cautions"')[0])
    summary = validated.findings.extra["review"]
    assert summary["n_added"] == 1 and summary["n_removed"] == 1 and summary["n_confirmed"] == 1
    assert (f"A review file overrode the machine for {fmt_count(summary['n_decisions'])} publication-goal pairs "
            f"on {summary['n_publications']} publications, decided by {summary['n_reviewers']} reviewers") in method
    assert "Reviewer decisions per goal" in method
    # goal, included, of which added, excluded, of which removed
    assert "3 Good Health and Well-being 1 1 0 0" in method
    assert "13 Climate Action 0 0 1 1" in method


def test_evidence_appendix_marks_included_and_excluded_pairs_with_the_note(html):
    appendix = html.split('id="evidence"')[1]
    health = appendix.split('id="evidence-3"')[1].split('id="evidence-6"')[0]
    assert "included by reviewer" in health and "Health literacy of care staff." in health
    assert "A survey of reading habits" in health, "the reviewer-included publication is listed"
    climate = _text(appendix.split('id="evidence-13"')[1])
    assert "Excluded by a reviewer: not counted for goal 13" in climate
    assert "excluded by reviewer “Recharge study; no climate angle.”" in climate


def test_reviewer_included_pairs_stay_visible_past_the_cap(validated):
    health = next(b for b in build_evidence(validated, GOALS, cap=1) if b.goal == "3")
    assert [r.record_id for r in health.rows][-1] == "nm:07", "lowest score, shown because a reviewer included it"
    assert health.rows[-1].review == "included by reviewer"
    assert health.note == f"showing the 1 strongest of {health.n_total} and 1 more included by a reviewer"


def test_score_table_without_review_columns_marks_nothing():
    blocks = build_evidence(make_inputs(), GOALS, cap=50)
    assert all(r.review == "" for b in blocks for r in b.rows) and all(not b.excluded for b in blocks)


def test_extra_keys_the_report_reads_are_documented():
    schema = (Path(analyse_package.__file__).parent / "FINDINGS_SCHEMA.md").read_text(encoding="utf-8")
    for key in ("validation", "corrected_shares", "correction_explanation", "review", "overrides"):
        assert f"`{key}`" in schema, f"FINDINGS_SCHEMA.md lacks extra key {key!r}"


@pytest.fixture(scope="module")
def pdf_pages(validated, tmp_path_factory) -> list[str]:
    written = render(validated, make_report(), tmp_path_factory.mktemp("validated-report"))
    return [page.extract_text() for page in pypdf.PdfReader(written["report.pdf"]).pages]


def test_pdf_builds_with_the_validation_section_listed_in_the_contents(pdf_pages):
    contents = pdf_pages[0]  # the contents share the first page with the cover
    match = re.search(re.escape(HEADING) + r"[ .]*?(\d+)\s*$", contents, re.M)
    assert match, "the validation section has a page number in the contents"
    page = int(match.group(1))
    assert HEADING in pdf_pages[page - 1] and "Per goal" in pdf_pages[page - 1]
    appendix = re.sub(r"\s+", " ", " ".join(pdf_pages[page:]))  # the appendix comes after the validation section
    assert "Recharge study; no climate angle." in appendix, "the reviewer's note reaches the printed appendix"
    # Markers are set in capitals by the stylesheet, so compare without case.
    assert "included by reviewer" in appendix.lower() and "excluded by reviewer" in appendix.lower()


def test_heat_map_names_no_goal_as_the_validation_matrix_does():
    from reporter.analyse.validation import NONE
    from reporter.render.validation_charts import NO_GOAL

    assert NO_GOAL == NONE, "the heat map's axis order must contain the matrix's own name for no goal"
