"""The report context: documented fields, evidence caps, DOI links."""

import dataclasses
from dataclasses import replace as swap

import pytest

from tests.unit.render.render_inputs import GOALS, make_inputs, make_report
from reporter.render import brief_context
from reporter.render import context as ctx
from reporter.render import context_explorer
from reporter.render.appendix import build_evidence, doi_url
from reporter.render.html import render_html
from reporter.render.sections import SCREEN_SECTIONS, SECTIONS, build_context
from reporter.render.themes import build_environment, load_theme


def _dataclasses_in(module):
    return [obj for obj in vars(module).values() if dataclasses.is_dataclass(obj) and obj.__module__ == module.__name__]


# The department briefs' context (brief_context.py) and the explorer's follow the same rules as the report's.
CONTEXT_TYPES = [*_dataclasses_in(ctx), *_dataclasses_in(context_explorer), *_dataclasses_in(brief_context)]


@pytest.mark.parametrize("cls", CONTEXT_TYPES, ids=lambda c: c.__name__)
def test_every_context_field_has_help_text(cls):
    missing = [f.name for f in dataclasses.fields(cls) if not f.metadata.get("help")]
    assert not missing, f"{cls.__name__}: fields without help text: {missing}"


def test_context_types_are_frozen():
    for cls in CONTEXT_TYPES:
        assert cls.__dataclass_params__.frozen, f"{cls.__name__} must be frozen"


def test_evidence_is_capped_with_a_note():
    blocks = build_evidence(make_inputs(), GOALS, cap=2)
    water = next(b for b in blocks if b.goal == "6")
    assert water.n_total == 4
    assert len(water.rows) == 2
    assert water.note == "showing the 2 strongest of 4"
    scores = [r.alignment_score for r in water.rows]
    assert scores == sorted(scores, reverse=True)


def test_evidence_without_cap_has_no_note():
    blocks = build_evidence(make_inputs(), GOALS, cap=50)
    assert all(b.note == "" and len(b.rows) == b.n_total for b in blocks)


def test_doi_links_are_plain_doi_org_urls():
    assert doi_url("10.5555/abc(1)") == "https://doi.org/10.5555/abc(1)"
    assert doi_url("10.5555/a b\"<x>") == "https://doi.org/10.5555/a%20b%22%3Cx%3E"
    assert doi_url("javascript:alert(1)") == ""
    assert doi_url("") == ""


def test_context_follows_section_order_and_framework_goal_order():
    context = build_context(make_inputs(), make_report(), load_theme("default"))
    assert [s.title for s in context.sections] == [title for _a, title, _p in SECTIONS + SCREEN_SECTIONS]
    printed = build_context(make_inputs(), make_report(), load_theme("default"), medium="print")
    assert [s.title for s in printed.sections] == [title for _a, title, _p in SECTIONS], "screen-only sections left out"
    assert [r.goal for r in context.goal_profile.rows] == [code for code, _ in GOALS]
    assert context.summary.changes and all(c.is_change for c in context.summary.changes)


def test_rendering_does_not_change_its_inputs():
    inputs = make_inputs()
    before = {name: getattr(inputs.findings, name).copy() for name in ("goals", "by_department", "cooccurrence")}
    records, scores = inputs.records.copy(), inputs.scores.copy()
    build_context(inputs, make_report(), load_theme("default"))
    for name, frame in before.items():
        assert getattr(inputs.findings, name).equals(frame), name
    assert inputs.records.equals(records) and inputs.scores.equals(scores)


def test_wrong_tables_are_named():
    inputs = make_inputs(scores=make_inputs().scores.drop(columns=["evidence"]))
    with pytest.raises(TypeError, match="render: scores: missing columns evidence"):
        build_context(inputs, make_report(), load_theme("default"))


def _empty_like(frame):
    return frame.iloc[0:0]


def test_sparse_findings_render_with_plain_notes_instead_of_charts():
    full = make_inputs().findings
    sparse = swap(
        full,
        meta={**full.meta, "comparison_years": (), "years": (2024,)},
        by_year=full.by_year.loc[full.by_year["year"] == 2024],
        changes=_empty_like(full.changes), by_department=_empty_like(full.by_department),
        by_country=_empty_like(full.by_country), collaboration=_empty_like(full.collaboration),
        cooccurrence=_empty_like(full.cooccurrence), sensitivity=_empty_like(full.sensitivity),
    )
    theme = load_theme("default")
    context = build_context(make_inputs(findings=sparse), make_report(comparison_years=()), theme)
    assert context.change.chart is None and context.departments.chart is None and context.together.chart is None
    html = render_html(context, build_environment(theme), theme)
    assert "No earlier years were compared" in html
    assert "add a staff map" in html
    assert "No partner country was found" in html
    assert "No publication is aligned with more than one goal" in html
    assert html.count("<svg ") == 1, "only the goal profile has something to draw"


def test_unassigned_department_is_named_and_listed_last():
    findings = make_inputs().findings
    extra = findings.by_department.assign(
        department=lambda f: f["department"].where(f["department"] != "Hydrology", "unassigned"),
        is_unassigned=lambda f: f["department"] == "unassigned",
    )
    context = build_context(make_inputs(findings=swap(findings, by_department=extra)), make_report(),
                            load_theme("default"))
    assert context.departments.rows[-1].label == "no department recorded"


_MEASURED = {"n_abstracts": 375, "measured_on": "2026-12-02", "backend": "embedding", "threshold": 0.5,
             "macro_f1": 0.781, "top1_primary": 0.897, "no_goal_unaligned": 0.947,
             "recall_lowest": {"goal": "8", "recall": 0.441}, "recall_highest": {"goal": "4", "recall": 0.947},
             "english_goal_papers_aligned": 0.939, "non_english_goal_papers_aligned": 0.267}


def _with_measured(inputs, **changes):
    return swap(inputs, framework_info={**inputs.framework_info, "accuracy_on_real_abstracts": {**_MEASURED, **changes}})


def _rendered(inputs) -> str:
    theme = load_theme("default")
    return render_html(build_context(inputs, make_report(), theme), build_environment(theme), theme)


def test_method_cites_accuracy_on_real_abstracts_and_cautions_give_the_language_gap():
    html = _rendered(_with_measured(make_inputs()))
    assert "on 375 real research abstracts" in html
    assert "macro-averaged F1 of 0.78" in html
    assert "ranged from 0.44 (goal 8) to 0.95 (goal 4)" in html
    assert "with this framework and this run's backend and threshold" in html
    assert "26.7% of goal papers in other languages were aligned" in html and "against 93.9% of English ones" in html
    assert "describe the default settings, not this report" not in html


def test_accuracy_measured_under_other_settings_is_marked_as_not_describing_this_report():
    html = _rendered(_with_measured(make_inputs(), backend="embedding-int8"))
    assert "describe the default settings, not this report" in html


def test_no_measured_accuracy_no_claim():
    assert "real research abstracts" not in _rendered(make_inputs())


def test_departments_with_non_english_publications_are_named_with_their_count():
    inputs = make_inputs()
    table = inputs.findings.by_department
    first = sorted(d for d in table["department"].unique() if str(d).replace(" ", "").isalpha())[0]
    marked = table.assign(n_non_english=(table["department"] == first).astype(int) * 2)
    inputs = swap(inputs, findings=swap(inputs.findings, by_department=marked))
    context = build_context(inputs, make_report(), load_theme("default"))
    row = next(r for r in context.departments.rows if r.code == first)
    assert [(r.label, r.n) for r in context.departments.non_english] == [(row.label, 2)]
    assert context.departments.non_english[0].share == 2 / row.n
    html = _rendered(inputs)
    assert "Scored with lower reliability" in html and f"{row.label} 2 (" in html


def test_no_non_english_publications_no_lower_reliability_note():
    assert "Scored with lower reliability" not in _rendered(make_inputs())


def test_an_input_that_gave_no_record_still_has_its_line_in_the_intake_table():
    """Issue 15: an empty export allowed on purpose (allow_empty) is listed with 0, not left out."""
    inputs = make_inputs()
    known = sorted(inputs.intake_log["source_file"].astype(str).unique())
    manifest = {**inputs.manifest, "inputs": [{"path": name} for name in [*known, "empty-export.csv"]]}
    context = build_context(swap(inputs, manifest=manifest), make_report(), load_theme("default"))
    rows = {row.source_file: row for row in context.method.inputs}
    assert set(rows) == {*known, "empty-export.csv"}
    assert (rows["empty-export.csv"].n_read, rows["empty-export.csv"].n_kept) == (0, 0)
