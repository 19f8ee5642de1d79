"""The demo report as a reader gets it: README command (1)'s build, opened and read back."""

import csv
import json
import re
from html import unescape
from html.parser import HTMLParser
from pathlib import Path

import pytest
from pypdf import PdfReader

pytestmark = pytest.mark.model

SECTIONS = (
    "At a glance", "Goal profile", "Change over time", "Departments", "International partners",
    "Goals studied together", "How the figures were made", "Limits and cautions", "Evidence appendix",
)
CAUTIONS = ("says nothing about the work's impact, quality", "Leiden Manifesto",
            "must not be the sole basis for funding, hiring or promotion")


class _Collector(HTMLParser):
    def __init__(self):
        super().__init__()
        self.headings, self.urls, self.text, self._in = [], [], [], None

    def handle_starttag(self, tag, attrs):
        attrs = dict(attrs)
        if tag in ("h1", "h2"):
            self._in = tag
            self.headings.append("")
        for key in ("src", "href", "data", "poster"):
            if attrs.get(key):
                self.urls.append((tag, attrs[key]))

    def handle_endtag(self, tag):
        if tag == self._in:
            self._in = None

    def handle_data(self, data):
        self.text.append(data)
        if self._in:
            self.headings[-1] += data


@pytest.fixture(scope="module")
def html(demo_build):
    return (demo_build.out / "report.html").read_text(encoding="utf-8")


@pytest.fixture(scope="module")
def parsed(html):
    collector = _Collector()
    collector.feed(html)
    return collector


@pytest.fixture(scope="module")
def findings(demo_build):
    return json.loads((demo_build.out / "data" / "findings.json").read_text(encoding="utf-8"))


@pytest.fixture(scope="module")
def pdf_pages(demo_build):
    reader = PdfReader(str(demo_build.out / "report.pdf"))
    return [page.extract_text() or "" for page in reader.pages]


def _plain(text):
    return re.sub(r"\s+", " ", text)


def test_every_output_is_written(demo_build):
    for name in ("report.html", "report.pdf", "intake-log.csv", "manifest.json", "data/scores.csv",
                 "data/evidence.csv", "data/findings.json"):
        assert (demo_build.out / name).stat().st_size > 0, name
    assert "report.pdf" in demo_build.stdout and "Scored 447 publications" in demo_build.stdout


def test_html_has_every_section_and_the_cautions(parsed):
    headings = [h.strip() for h in parsed.headings]
    for title in SECTIONS:
        assert title in headings, f"missing section {title!r}"
    text = _plain(" ".join(parsed.text))
    for phrase in CAUTIONS:
        assert phrase in text


def test_html_references_no_remote_resource(parsed):
    for tag, url in parsed.urls:
        if url.startswith(("#", "data:")):
            continue
        assert tag == "a" and url.startswith("https://doi.org/"), f"{tag} points at {url[:80]}"


def test_summary_figures_equal_findings_json(html, findings):
    headline = findings["headline"]
    glance = _plain(html[html.index('id="at-a-glance"'):html.index('id="goal-profile"')])
    assert f">{headline['n_publications']}<" in glance.replace(" <", "<").replace("> ", ">")
    share = f"{100 * headline['share_aligned_any']:.1f}%"
    assert share in glance, f"{share} not in the summary"
    top = max(findings["tables"]["goals"], key=lambda g: (g["share"], -int(g["goal"])))
    assert f"{100 * top['share']:.1f}%" in glance


def test_scores_cover_every_kept_publication_and_goal(demo_build):
    log = list(csv.DictReader((demo_build.out / "intake-log.csv").open(encoding="utf-8")))
    kept = {r["record_id"] for r in log if r["status"] == "kept"}
    assert len(log) == sum(1 for r in log if r["status"] in ("kept", "merged", "set_aside")), "read = kept + merged + set aside"
    scores = list(csv.DictReader((demo_build.out / "data" / "scores.csv").open(encoding="utf-8")))
    assert {r["record_id"] for r in scores} == kept
    assert len(scores) == 17 * len(kept)


def test_one_figure_is_the_same_in_html_csv_and_json(demo_build, findings, html):
    goals_csv = list(csv.DictReader((demo_build.out / "data" / "findings-goals.csv").open(encoding="utf-8")))
    row = next(r for r in goals_csv if r["goal"] == "13")
    from_json = next(g for g in findings["tables"]["goals"] if g["goal"] == "13")
    assert int(row["n_aligned"]) == from_json["n_aligned"]
    assert float(row["share"]) == pytest.approx(from_json["share"], abs=1e-6), "JSON rounds to 6 places"
    profile = _plain(html[html.index('id="goal-profile"'):html.index('id="change-over-time"')])
    assert f"{100 * from_json['share']:.1f}%" in profile


def test_pdf_has_contents_page_numbers_and_sections(pdf_pages):
    assert len(pdf_pages) >= 8
    contents = _plain(pdf_pages[0])  # the contents share the first page with the cover
    assert "Contents" in contents and "At a glance" in contents
    assert re.search(r"Goal profile\W+\d+", contents), "contents lists page numbers"
    full = _plain(" ".join(pdf_pages))
    for title in SECTIONS:
        assert title in full
    for phrase in CAUTIONS:
        assert phrase in full
    assert re.search(r"Page 3 of \d+", _plain(pdf_pages[2])), "running page numbers"
    # The method page says how the default backend runs the model and what that costs.
    assert "embedding-int8 backend" in full and "weights quantised to 8-bit integers" in full
    assert "a few borderline calls can differ" in full


def test_manifest_records_what_went_in(demo_build):
    manifest = json.loads((demo_build.out / "manifest.json").read_text(encoding="utf-8"))
    assert manifest["model"]["id"] == "sentence-transformers/all-MiniLM-L6-v2"
    # The default backend: the packaged weights' checksum, marked as their int8 export.
    assert manifest["model"]["backend"] == "embedding-int8"
    assert re.fullmatch(r"[0-9a-f]{64}:onnx-int8", manifest["model"]["checksum"])
    assert manifest["framework"]["id"] == "un-sdg-2030" and len(manifest["framework"]["checksum"]) == 64
    assert {f["path"] for f in manifest["inputs"]} == {
        "publications-2025.bib", "publications-2024.ris", "cris-export-2022-2023.csv"}
    assert all(len(f["sha256"]) == 64 for f in manifest["inputs"])
    assert manifest["rows"] == {"read": 462, "kept": 447, "merged": 10, "set_aside": 5,
                                "scores": 447 * 17, "sentences": manifest["rows"]["sentences"]}
    assert manifest["analysis"]["counting"] == "full"


def test_validation_section_uses_the_demo_labelled_sample(findings):
    validation = findings["extra"]["validation"]
    assert validation["n_matched"] == 80 and validation["n_unmatched"] == 0
    assert 0 < validation["averages"]["macro"]["f1"] <= 1


def test_method_cites_accuracy_on_real_abstracts_and_departments_name_non_english_work(pdf_pages, findings):
    """The figures come from the shipped accuracy file (measured on real abstracts), not from this run."""
    from reporter.score.framework import load_framework, measured_accuracy

    measured = measured_accuracy(load_framework("un-sdg-2030"))
    full = _plain(" ".join(pdf_pages))
    assert f"on {measured['n_abstracts']} real research abstracts" in full
    assert f"macro-averaged F1 of {measured['macro_f1']:.2f}" in full
    assert "with this framework and this run's backend and threshold" in full
    low = measured["recall_lowest"]
    assert f"ranged from {low['recall']:.2f} (goal {low['goal']})" in full
    # The demo has French, Spanish and German publications: their departments are named.
    departments = [row for row in findings["tables"]["by_department"] if row["goal"] == "1" and row["n_non_english"] > 0]
    assert departments, "the demo's non-English publications belong to departments"
    assert "Scored with lower reliability" in full
    for row in departments:
        assert f"{row['department']} {row['n_non_english']} (" in full


def test_changes_that_hold_are_the_ones_the_demo_plans(findings):
    """The generator plans three shifts (bench/demo_corpus/plan.py year_multiplier, stated in
    known_numbers.json "intended_shifts"): goals 7 and 13 rise in 2025, goal 3 falls from 2022.
    Every change that holds must be one of them, in its direction; goal 7's rise must hold."""
    known = json.loads((Path(__file__).resolve().parents[2] / "bench" / "demo_corpus" / "known_numbers.json")
                       .read_text(encoding="utf-8"))
    assert "Goals 7 and 13 rise in 2025" in known["intended_shifts"]
    planned = {"7": "increase", "13": "increase", "3": "decrease"}
    held = [(row["goal"], row["baseline"], row["verdict"]) for row in findings["tables"]["changes"] if row["is_change"]]
    unplanned = [h for h in held if planned.get(h[0]) != h[2]]
    assert not unplanned, f"changes the demo does not plan held up: {unplanned}"
    assert any(goal == "7" and verdict == "increase" for goal, _, verdict in held), "the planned rise of goal 7"


def test_change_section_reads_one_row_per_goal_with_year_ranges(demo_build, pdf_pages):
    html = (demo_build.out / "report.html").read_text(encoding="utf-8")
    section = html[html.index('id="change-over-time"'):html.index('id="departments"')]
    table = section[section.index('<table class="data change">'):section.index("</table>")]
    assert table.count("<tr class=") == 17, "one row per goal; every baseline stays in findings-changes.csv"
    text = _plain(re.sub(r"<[^>]+>", "", section))
    assert "Change per goal, 2025 against mean 2022-2024" in text
    assert "Goal shares per year, 2022-2025." in text
    assert "findings-changes.csv (68 rows)" in text
    pages = [i for i, page in enumerate(pdf_pages) if "Change over time" in page.split("\n")[0]]
    assert len(pages) <= 2, "the change table and its chart fit on two pages"


def test_first_page_holds_cover_and_contents_and_goal_profile_follows_at_a_glance(pdf_pages):
    first = _plain(pdf_pages[0])
    assert "Kestrel Heath University".upper() in first.upper() and "Contents" in first
    assert "At a glance" in pdf_pages[1] and "Goal profile" in pdf_pages[1]


class _ExplorerTitles(HTMLParser):
    """The first cell (the title) of every body row of the publication explorer's table."""

    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.titles, self._depth, self._cell = [], 0, None

    def handle_starttag(self, tag, attrs):
        if tag == "table" and dict(attrs).get("id") == "explorer-table":
            self._depth = 1
        elif self._depth and tag == "tbody":
            self._depth = 2
        elif self._depth == 2 and tag == "th":
            self._cell = []

    def handle_endtag(self, tag):
        if tag == "th" and self._cell is not None:
            self.titles.append("".join(self._cell).strip())
            self._cell = None
        elif tag == "table":
            self._depth = 0

    def handle_data(self, data):
        if self._cell is not None:
            self._cell.append(data)


def test_explorer_lists_every_kept_publication_without_script_and_stays_out_of_the_pdf(demo_build, html, pdf_pages):
    parser = _ExplorerTitles()
    parser.feed(html)
    log = csv.DictReader((demo_build.out / "intake-log.csv").open(encoding="utf-8"))
    kept = sorted(r["title"] for r in log if r["status"] == "kept")
    assert sorted(parser.titles) == kept and len(kept) == 447, "plain rows, uncapped: every kept publication"
    full = _plain(" ".join(pdf_pages))
    assert "Publication explorer" not in full and "Search titles and evidence" not in full
    before = unescape(html[:html.index('id="publication-explorer"')])
    unaligned = [t for t in parser.titles if t not in before]
    assert unaligned, "publications aligned with no goal appear in the explorer only"
    assert not [t for t in unaligned[:20] if _plain(t) in full], "the PDF does not grow by the explorer's rows"
