"""The written report read as a reader would: HTML structure and safety, PDF text and pages, exports."""

from __future__ import annotations

import csv
import io
import json
import re
from html.parser import HTMLParser

import pypdf
import pytest

from tests.unit.render.render_inputs import (
    INJECTED_DEPARTMENT, INJECTED_EVIDENCE, INJECTED_FORMULA_TITLE, INJECTED_TITLE,
)
from reporter.render.sections import SECTIONS

SECTION_TITLES = [title for _anchor, title, _partial in SECTIONS]


class _Page(HTMLParser):
    """Collects what the safety checks need: tags, URL attributes, headings, text."""

    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.tags: list[str] = []
        self.urls: list[tuple[str, str, str]] = []  # (tag, attribute, value)
        self.headings: list[str] = []
        self.text: list[str] = []
        self._heading: list[str] | None = None

    def handle_starttag(self, tag, attrs):
        self.tags.append(tag)
        for name, value in attrs:
            if name in ("src", "href", "xlink:href", "action", "data", "poster") and value is not None:
                self.urls.append((tag, name, value))
            if name.startswith("on"):
                self.urls.append((tag, name, value or ""))
        if tag in ("h1", "h2", "h3"):
            self._heading = []

    def handle_endtag(self, tag):
        if tag in ("h1", "h2", "h3") and self._heading is not None:
            self.headings.append("".join(self._heading).strip())
            self._heading = None

    def handle_data(self, data):
        self.text.append(data)
        if self._heading is not None:
            self._heading.append(data)


@pytest.fixture(scope="module")
def page(rendered) -> _Page:
    parser = _Page()
    parser.feed(rendered["report.html"].read_text(encoding="utf-8"))
    parser.close()
    return parser


@pytest.fixture(scope="module")
def pdf_pages(rendered) -> list[str]:
    return [p.extract_text() for p in pypdf.PdfReader(rendered["report.pdf"]).pages]


def test_render_writes_every_promised_file(rendered):
    for label in ("report.html", "report.pdf", "data/scores.csv", "data/evidence.csv", "data/findings.json",
                  "intake-log.csv", "manifest.json"):
        assert rendered[label].is_file(), label
    leftovers = [p.name for p in rendered["report.html"].parent.rglob(".*.tmp")]
    assert not leftovers, "atomic writes leave no temporary files"


def test_html_has_every_section_heading(page):
    for title in SECTION_TITLES:
        assert title in page.headings, f"missing section {title!r}"


def test_html_fetches_nothing_and_links_only_to_doi_org(page, rendered):
    remote = [(t, a, v) for t, a, v in page.urls if re.match(r"(?i)\s*(https?:)?//", v)]
    assert remote, "the fixture has DOIs, so some doi.org links are expected"
    assert all(t == "a" and a == "href" and v.startswith("https://doi.org/") for t, a, v in remote), remote
    assert all(v.startswith(("#", "data:", "https://doi.org/")) for t, a, v in page.urls if a != "href" or t != "a")
    assert "link" not in page.tags, "styles are inline; no <link> to anything"
    html = rendered["report.html"].read_text(encoding="utf-8")
    assert not re.search(r"(?i)url\(\s*['\"]?(https?:)?//", html), "no CSS url() to the network"
    assert "@import" not in html


def test_injected_markup_is_shown_as_text(page, rendered):
    # The only script elements are the publication explorer's data block and the theme's own script.
    html = rendered["report.html"].read_text(encoding="utf-8")
    assert re.findall(r"<script\b[^>]*>", html) == ['<script type="application/json" id="explorer-data">', "<script>"]
    assert page.tags.count("script") == 2
    assert "img" not in page.tags, "no logo configured, and the evidence sentence's <img> must stay text"
    assert not [u for u in page.urls if u[1].startswith("on")], "no event handler attribute came through"
    text = "".join(page.text)
    assert INJECTED_TITLE in text
    assert INJECTED_EVIDENCE in text


def test_charts_are_inline_svg_with_text_alternatives(rendered, page):
    html = rendered["report.html"].read_text(encoding="utf-8")
    svgs = re.findall(r"<svg [^>]*>", html)
    assert len(svgs) == 6, "goal profile, change, departments, collaboration, countries, goal pairs"
    assert all('role="img"' in s and "aria-label=" in s for s in svgs)
    assert page.tags.count("figcaption") == len(svgs)
    ids = re.findall(r'\bid="([^"]+)"', html)
    assert len(ids) == len(set(ids)), "element ids stay unique with several SVGs on one page"


def test_too_small_groups_are_marked_not_coloured(rendered):
    html = rendered["report.html"].read_text(encoding="utf-8")
    # The injected department has one publication (min_group_size 3 in the fixture).
    row = re.search(r"<tr><th scope=\"row\">=HYPERLINK.*?</tr>", html).group(0)
    assert row.count("n&lt;3") == 4 and "%" not in row


def test_csv_exports_neutralise_formula_cells(rendered):
    rows = list(csv.DictReader(io.StringIO(rendered["data/evidence.csv"].read_text(encoding="utf-8"))))
    titles = {r["record_id"]: r["title"] for r in rows}
    assert titles["nm:06"] == "'" + INJECTED_FORMULA_TITLE, "a leading = must not reach a spreadsheet as a formula"
    assert not [r for r in rows for v in r.values() if v[:1] in ("=", "+", "@")]
    intake = rendered["intake-log.csv"].read_text(encoding="utf-8")
    assert INJECTED_TITLE in intake, "markup in CSV is data, kept as it is"


def test_department_formula_is_prefixed_in_findings_tables(rendered):
    with rendered["data/findings-by-department.csv"].open(encoding="utf-8") as handle:
        names = {row["department"] for row in csv.DictReader(handle)}
    assert "'" + INJECTED_DEPARTMENT in names
    assert INJECTED_DEPARTMENT not in names


def test_findings_json_and_manifest_are_valid_json(rendered):
    findings = json.loads(rendered["data/findings.json"].read_text(encoding="utf-8"))
    assert findings["headline"]["n_publications"] == 12
    manifest = json.loads(rendered["manifest.json"].read_text(encoding="utf-8"))
    assert set(manifest["outputs"]) >= {"data/scores.csv", "data/findings.json", "intake-log.csv"}
    assert all(len(entry["sha256"]) == 64 for entry in manifest["outputs"].values())


def test_pdf_has_section_titles_as_text(pdf_pages):
    text = "\n".join(pdf_pages)
    for title in SECTION_TITLES:
        assert title in text, f"PDF lacks {title!r}"


def test_pdf_contents_page_numbers_point_at_the_sections(pdf_pages):
    contents = next(i for i, t in enumerate(pdf_pages) if "Contents\nAt a glance" in t)
    assert contents == 0, "the contents share the first page with the cover"
    listed = {}
    for title in SECTION_TITLES:
        match = re.search(re.escape(title) + r"[ .]*?(\d+)\s*$", pdf_pages[contents], re.M)
        assert match, f"no page number for {title!r} in the contents"
        listed[title] = int(match.group(1))
    for title, number in listed.items():
        assert title in pdf_pages[number - 1], f"{title!r} listed on page {number} but not found there"
        # Each section starts on a new page (the goal profile follows "At a glance" on its page), so the
        # page before belongs to another section.
        if number - 2 != contents and title != "Goal profile":
            assert title not in pdf_pages[number - 2], f"{title!r} already on page {number - 1}"


def test_pdf_pages_carry_running_page_numbers(pdf_pages):
    total = len(pdf_pages)
    numbered = [i + 1 for i, t in enumerate(pdf_pages) if f"Page {i + 1} of {total}" in t]
    assert numbered == list(range(2, total + 1)), "every page but the cover is numbered"


def test_pdf_charts_are_vector(rendered):
    reader = pypdf.PdfReader(rendered["report.pdf"])
    images = [name for page in reader.pages for name in page.images]
    assert images == [], "charts are drawn as vector paths, not embedded pictures"
    assert reader.pages[0].mediabox.width == pytest.approx(595.3, abs=1), "A4 width in points"


def test_injected_markup_is_inert_in_the_pdf(rendered, pdf_pages):
    """The PDF prints injected markup as text, carries no script and links only to doi.org."""
    from pypdf import PdfReader

    text = " ".join(" ".join(p.split()) for p in pdf_pages)
    assert "<script>alert(1)</script>" in text
    reader = PdfReader(str(rendered["report.pdf"]))
    raw = rendered["report.pdf"].read_bytes()
    assert b"/JavaScript" not in raw and b"/JS " not in raw and b"/Launch" not in raw
    for page in reader.pages:
        for annot in page.get("/Annots") or []:
            action = annot.get_object().get("/A")
            uri = action.get_object().get("/URI") if action is not None else None
            if uri is not None:
                assert str(uri).startswith("https://doi.org/"), uri
