"""Open the demo report in a real browser (Debian's headless Chromium) with the network off.

The page must load with no failed request, no request leaving the file, and no console error;
the publication explorer's counts must equal the report's own figures on the same page.
"""

import json
import re

import pytest

from tests.e2e.browser import explorer_count, needs_chromium, offline_page, show_explorer

pytestmark = pytest.mark.model


def _visible_column(page, n: int) -> list[str]:
    return page.locator(f"#explorer-table tbody tr:not([hidden]) > :nth-child({n})").all_inner_texts()


@needs_chromium
def test_report_opens_offline_without_errors(demo_build):
    with offline_page(demo_build.out / "report.html") as page:
        assert page.title().startswith("Research and the Sustainable Development Goals")
        assert page.locator("h2#at-a-glance").is_visible()
        assert page.locator("svg").count() >= 5, "charts are inline SVG"
        page.screenshot(path=str(demo_build.out / "report-screenshot.png"), full_page=False)
    assert (demo_build.out / "report-screenshot.png").stat().st_size > 10_000


@needs_chromium
def test_explorer_counts_equal_the_reports_figures(demo_build):
    findings = json.loads((demo_build.out / "data" / "findings.json").read_text(encoding="utf-8"))
    with offline_page(demo_build.out / "report.html") as page:
        assert explorer_count(page) == findings["headline"]["n_publications"] == 447
        page.screenshot(path=str(demo_build.out / "explorer-unfiltered.png"))

        page.select_option("#explorer-goal", "6")
        row = page.locator("table.goal-profile tbody tr").filter(
            has=page.locator(".goal-code", has_text=re.compile(r"^6$")))
        figure = int(row.locator("td").nth(0).inner_text().replace(",", ""))  # the "Aligned" column
        assert explorer_count(page) == figure, "goal 6 in the explorer lists what the goal table counts"
        goals = _visible_column(page, 5)
        assert len(goals) == figure and all(re.search(r"(^|\n)6 ", cell) for cell in goals)
        page.screenshot(path=str(demo_build.out / "explorer-goal-6.png"))

        page.select_option("#explorer-goal", "")
        department = page.locator("section.section-departments table.groups tbody tr").nth(0)
        name, n = department.locator("th").inner_text(), int(department.locator("td").nth(0).inner_text())
        page.select_option("#explorer-department", label=name)
        assert explorer_count(page) == n, f"department {name}: the explorer against the department table's n"
        page.click("#explorer-reset")
        country = page.locator("section.section-international-partners table.groups").nth(1).locator("tbody tr").nth(0)
        name, n = country.locator("th").inner_text(), int(country.locator("td").nth(0).inner_text())
        page.select_option("#explorer-country", label=name)
        assert explorer_count(page) == n, f"partner country {name}: the explorer against the country table's n"
    assert (demo_build.out / "explorer-goal-6.png").stat().st_size > 10_000


@needs_chromium
def test_columns_sort_from_the_keyboard(demo_build):
    with offline_page(demo_build.out / "report.html") as page:
        show_explorer(page)
        year = page.locator("#explorer-table th[data-sort=year]")
        assert year.get_attribute("aria-sort") == "descending", "listed newest first"
        year.locator("button").focus()
        page.keyboard.press("Enter")
        assert year.get_attribute("aria-sort") == "ascending"
        years = [int(y) for y in _visible_column(page, 2)]
        assert years == sorted(years) and years[0] < years[-1]
        page.keyboard.press("Enter")
        years = [int(y) for y in _visible_column(page, 2)]
        assert year.get_attribute("aria-sort") == "descending" and years == sorted(years, reverse=True)

        aligned = page.locator("table.goal-profile thead th").nth(1)
        aligned.locator("button").focus()
        page.keyboard.press("Enter")
        assert aligned.get_attribute("aria-sort") == "descending", "counts sort largest first"
        counts = [int(c.replace(",", "")) for c in page.locator("table.goal-profile tbody tr > td:nth-child(2)").all_inner_texts()]
        assert counts == sorted(counts, reverse=True) and len(counts) == 17


@needs_chromium
def test_search_keeps_rows_whose_title_or_evidence_has_every_word(demo_build):
    with offline_page(demo_build.out / "report.html") as page:
        page.fill("#explorer-search", "groundwater nitrate")
        page.wait_for_function("() => !document.getElementById('explorer-count').textContent.startsWith('447 ')")
        show_explorer(page)
        rows = page.locator("#explorer-table tbody tr:not([hidden])")
        texts = [t.lower() for t in rows.all_inner_texts()]
        assert 0 < explorer_count(page) == len(texts) < 447
        assert all("groundwater" in t and "nitrate" in t for t in texts)
