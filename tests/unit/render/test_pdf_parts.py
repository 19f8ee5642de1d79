"""report.pdf from parts kept between builds (render/pdf_parts.py, pdf_join.py, pdf_memo.py).

The reference is WeasyPrint laying out the whole document in one go: whatever was kept, the joined
PDF must read the same, page by page (text, page numbers, "page N of M", the contents' page
references), with the same anchors on the same pages and the same outline. Compared through pypdf.
"""

from __future__ import annotations

import io
import logging

import pytest
from pypdf import PdfReader

from reporter.render.pdf import render_pdf
from reporter.render.pdf_memo import PdfMemo
from reporter.render.pdf_parts import split_report
from reporter.render.themes import load_theme

STYLE = """
@page { size: A6; margin: 12mm 8mm;
  @top-left { content: string(report-title); font-size: 6pt; }
  @top-right { content: string(section-title); font-size: 6pt; }
  @bottom-right { content: "Page " counter(page) " of " counter(pages); font-size: 6pt; } }
body { font-family: sans-serif; font-size: 8pt; }
.cover-title { string-set: report-title content(); }
nav.contents { break-after: page; }
nav.contents a::after { content: " p. " target-counter(attr(href), page); }
h2 { string-set: section-title content(); break-before: page; }
h2.runs-on { break-before: auto; }
"""


def page(title: str, anchor: str, paragraphs: int, heading_class: str = "", word: str = "alpha") -> str:
    body = "".join(f"<p>{word} paragraph {i} " + "words " * 40 + "</p>" for i in range(paragraphs))
    return (f'<section class="section section-{anchor}" aria-labelledby="{anchor}">\n'
            f'<h2 id="{anchor}" class="{heading_class}">{title}</h2>\n<h3 id="{anchor}-more">More</h3>{body}'
            f'<p><a href="#method">see the method</a></p></section>\n')


def report(*, made: str = "2026-01-01T00:00:00", sections: dict | None = None) -> str:
    sections = sections or {}
    spec = [("Glance", "glance", 2, ""), ("Profile", "profile", 3, "runs-on"), ("Departments", "departments", 6, ""),
            ("Method", "method", 4, ""), ("Evidence", "evidence", 9, "")]
    body = "".join(page(title, anchor, sections.get(anchor, (n, "alpha"))[0], cls, sections.get(anchor, (n, "alpha"))[1])
                   for title, anchor, n, cls in spec)
    contents = "".join(f'<li><a href="#{a}">{t}</a></li>' for t, a, _, _ in spec)
    return (f'<!DOCTYPE html><html lang="en"><head><meta charset="utf-8"><title>Test report</title>'
            f'<style>{STYLE}</style></head><body><section class="cover"><h1 class="cover-title">Test report</h1>'
            f'<p class="generated-at">Made on {made}</p></section><nav class="contents"><h2 id="contents-heading">'
            f'Contents</h2><ol>{contents}</ol></nav>\n<main>\n{body}</main>\n</body>\n</html>\n')


@pytest.fixture(scope="module")
def theme():
    return load_theme("default")


def read(pdf: bytes) -> dict:
    reader = PdfReader(io.BytesIO(pdf))

    def outline(items, depth=0):
        found = []
        for item in items:
            if isinstance(item, list):
                found += outline(item, depth + 1)
            else:
                found.append((depth, item.title, reader.get_destination_page_number(item), round(float(item.top), 1)))
        return found

    return {
        "pages": [p.extract_text() for p in reader.pages],
        "dests": {name: (reader.get_destination_page_number(d), round(float(d.top), 1))
                  for name, d in reader.named_destinations.items()},
        "outline": outline(reader.outline),
        "links": [(n, str(a.get_object().get("/Dest"))) for n, p in enumerate(reader.pages)
                  for a in (p.get("/Annots") or [])],
    }


def whole(html: str, theme) -> dict:
    return read(render_pdf(html, theme, None)[0])


def built(html: str, theme, memo: PdfMemo, made: str, caplog) -> tuple[dict, list[str]]:
    caplog.clear()
    with caplog.at_level(logging.DEBUG, logger="reporter.render.pdf"):
        pdf, refused = render_pdf(html, theme, None, memo, volatile=(made,))
    assert refused == ()
    return read(pdf), [r.getMessage() for r in caplog.records if "laying out" in r.getMessage()]


def test_split_report_cuts_at_top_level_sections_only():
    html = report()
    parts = split_report(html)
    assert parts is not None and len(parts.sections) == 5
    assert parts.html == html
    assert parts.prefix.endswith("<main>\n") and parts.suffix.startswith("</main>")
    assert split_report("<html><body><p>no sections</p></body></html>") is None


def test_first_build_reads_as_the_whole_document_and_keeps_its_parts(tmp_path, theme, caplog):
    html = report()
    reference = whole(html, theme)
    assert len(reference["pages"]) >= 8 and "Page 1 of" in reference["pages"][0]
    with PdfMemo(tmp_path / "cache.sqlite") as memo:
        first, log = built(html, theme, memo, "2026-01-01T00:00:00", caplog)
    assert first == reference
    assert log == ["report.pdf: laying out the whole report"]


def test_rebuilds_lay_out_only_what_changed_and_read_as_the_whole_document(tmp_path, theme, caplog):
    with PdfMemo(tmp_path / "cache.sqlite") as memo:
        built(report(), theme, memo, "2026-01-01T00:00:00", caplog)

        # Only the build time differs: the cover is laid out, every section kept, no PDF stored.
        stored = memo._db.execute("SELECT COUNT(*) FROM pdf_parts").fetchone()[0]
        again = report(made="2026-01-02T09:30:00")
        result, log = built(again, theme, memo, "2026-01-02T09:30:00", caplog)
        assert result == whole(again, theme)
        assert "Made on 2026-01-02T09:30:00" in result["pages"][0]
        assert log == ["report.pdf: laying out 0 of 4 parts"]  # glance and profile share a page: one part
        assert memo._db.execute("SELECT COUNT(*) FROM pdf_parts").fetchone()[0] == stored == 1

        # One section's words change, not its number of pages: that part alone is laid out.
        edited = report(made="2026-01-03T00:00:00", sections={"departments": (6, "beta")})
        result, log = built(edited, theme, memo, "2026-01-03T00:00:00", caplog)
        assert result == whole(edited, theme)
        assert any("beta paragraph" in text for text in result["pages"])
        assert log == ["report.pdf: laying out 1 of 4 parts"]

        # A section grows by pages: every later page number moves, so the whole report is laid out.
        grown = report(made="2026-01-04T00:00:00", sections={"departments": (14, "gamma")})
        result, log = built(grown, theme, memo, "2026-01-04T00:00:00", caplog)
        assert result == whole(grown, theme)
        assert "report.pdf: laying out the whole report" in log
        assert len(result["pages"]) > len(whole(edited, theme)["pages"])


def test_contents_page_numbers_follow_a_part_kept_from_another_build(tmp_path, theme, caplog):
    with PdfMemo(tmp_path / "cache.sqlite") as memo:
        built(report(made="build one"), theme, memo, "build one", caplog)
        grown = report(made="build two", sections={"glance": (12, "alpha")})
        result, log = built(grown, theme, memo, "build two", caplog)
        reference = whole(grown, theme)
    assert result == reference
    assert log[0] == "report.pdf: laying out 1 of 4 parts"  # then the whole report: later pages moved
    assert result["dests"]["evidence"][0] > whole(report(), theme)["dests"]["evidence"][0]


def test_a_theme_without_forced_breaks_is_laid_out_whole_each_time(tmp_path, theme, caplog):
    html = report().replace("h2 { string-set: section-title content(); break-before: page; }",
                            "h2 { string-set: section-title content(); }")
    html = html.replace("nav.contents { break-after: page; }", "")
    with PdfMemo(tmp_path / "cache.sqlite") as memo:
        first, _ = built(html, theme, memo, "2026-01-01T00:00:00", caplog)
        second, log = built(html, theme, memo, "2026-01-01T00:00:00", caplog)
    assert first == second == whole(html, theme)
    assert log == ["report.pdf: laying out the whole report"]


def test_memo_keeps_only_the_most_recent_rows(tmp_path, monkeypatch):
    import reporter.render.pdf_memo as pdf_memo

    monkeypatch.setattr(pdf_memo, "KEEP_PARTS", 2)
    with PdfMemo(tmp_path / "cache.sqlite") as memo:
        for n in range(5):
            memo.put_part(bytes([n]), b"%PDF-" + bytes([n]))
    with PdfMemo(tmp_path / "cache.sqlite") as memo:
        assert [memo.part(bytes([n])) is not None for n in range(5)] == [False, False, False, True, True]
