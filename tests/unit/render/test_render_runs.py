"""Whole renders compared: repeatability, theme swap, branding, and themes that misbehave."""

from __future__ import annotations

import difflib
import json
from pathlib import Path

import pypdf
import pytest

from reporter.render import ThemeError, render
from reporter.render.html import render_html
from reporter.render.pdf import render_pdf
from reporter.render.sections import build_context
from reporter.render.themes import build_environment, load_theme
from tests.unit.render.conftest import LATER
from tests.unit.render.render_inputs import GENERATED_AT, make_inputs, make_report

DATA_FILES = ("data/scores.csv", "data/evidence.csv", "data/findings.json", "intake-log.csv",
              "data/findings-goals.csv", "data/findings-by-department.csv")


def test_data_exports_are_byte_identical_across_runs(rendered, rendered_later):
    for label in DATA_FILES:
        assert rendered[label].read_bytes() == rendered_later[label].read_bytes(), label


def test_manifest_differs_only_in_its_generated_at(rendered, rendered_later):
    first = json.loads(rendered["manifest.json"].read_text(encoding="utf-8"))
    second = json.loads(rendered_later["manifest.json"].read_text(encoding="utf-8"))
    assert (first.pop("generated_at"), second.pop("generated_at")) == (GENERATED_AT, LATER)
    assert first == second


def test_html_differs_only_in_the_generated_at_line(rendered, rendered_later):
    a = rendered["report.html"].read_text(encoding="utf-8").splitlines()
    b = rendered_later["report.html"].read_text(encoding="utf-8").splitlines()
    changed = [line for line in difflib.unified_diff(a, b, lineterm="", n=0)
               if line[:1] in "+-" and not line.startswith(("+++", "---"))]
    assert len(changed) == 2, changed
    assert GENERATED_AT in changed[0] and LATER in changed[1]
    assert "generated-at" in changed[0]


def test_compact_theme_swaps_layout_and_keeps_the_content(rendered, rendered_compact):
    html = rendered_compact["report.html"].read_text(encoding="utf-8")
    assert 'class="titleblock"' in html and 'class="masthead"' not in html
    assert 'class="data key-table"' in html, "compact's own summary partial"
    assert "Evidence appendix" in html and 'class="data evidence"' in html, "default partials reused"
    default_pages = len(pypdf.PdfReader(rendered["report.pdf"]).pages)
    compact_pages = len(pypdf.PdfReader(rendered_compact["report.pdf"]).pages)
    assert compact_pages < default_pages, "sections run on instead of starting new pages"


def _user_theme(folder: Path, report_html: str) -> Path:
    folder.mkdir()
    (folder / "report.html").write_text(report_html, encoding="utf-8")
    return folder


def test_theme_including_a_file_outside_fails_cleanly(tmp_path):
    theme = _user_theme(tmp_path / "sneaky", '{% include "../../etc/passwd" %}')
    out = tmp_path / "out"
    with pytest.raises(ThemeError, match=r"template '\.\./\.\./etc/passwd' not found in the theme folders"):
        render(make_inputs(), make_report(theme=str(theme)), out)
    assert not out.exists(), "nothing is written when the theme fails"


def test_theme_with_an_unknown_name_fails_cleanly(tmp_path):
    theme = _user_theme(tmp_path / "typo", "{{ report.sumary.n_publications }}")
    with pytest.raises(ThemeError, match=r"UndefinedError: .*sumary"):
        render(make_inputs(), make_report(theme=str(theme)), tmp_path / "out")


def test_logo_is_inlined_and_accent_colour_applied(tmp_path):
    logo = tmp_path / "crest.svg"
    logo.write_text('<svg xmlns="http://www.w3.org/2000/svg" width="40" height="40">'
                    '<rect width="40" height="40" fill="#336699"/></svg>', encoding="utf-8")
    theme = load_theme("default")
    context = build_context(make_inputs(), make_report(logo=logo, accent_colour="#7a3b69"), theme)
    html = render_html(context, build_environment(theme), theme)
    assert 'src="data:image/svg+xml;base64,' in html
    assert str(logo) not in html, "the file's path is not needed by the reader"
    assert "--accent: #7a3b69;" in html


def test_logo_must_be_an_image_file(tmp_path):
    notes = tmp_path / "notes.txt"
    notes.write_text("not an image")
    with pytest.raises(ThemeError, match=r"report\.logo: expected a .* file, got 'notes\.txt'"):
        render(make_inputs(), make_report(logo=notes), tmp_path / "out")


def test_pdf_fetcher_refuses_the_network_and_stray_files(tmp_path):
    html = ('<html><head><link rel="stylesheet" href="file:///etc/hostname"></head><body>'
            '<img src="http://example.invalid/a.png"><img src="https://example.invalid/b.png">'
            '<img src="../../../etc/passwd"><p>text</p></body></html>')
    pdf, refused = render_pdf(html, load_theme("default"), None)
    assert pdf.startswith(b"%PDF")
    assert any("example.invalid/a.png" in url for url in refused)
    assert any("example.invalid/b.png" in url for url in refused)
    assert any(url.endswith("/etc/hostname") for url in refused)
    assert any(url.endswith("/etc/passwd") for url in refused)
