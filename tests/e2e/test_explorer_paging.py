"""The explorer lists a long list a part at a time (hand-built report, a few rows at once; no model)."""

import dataclasses

from reporter.render.html import render_html
from reporter.render.sections import build_context
from reporter.render.themes import build_environment, load_theme
from tests.e2e.browser import explorer_count, needs_chromium, offline_page
from tests.unit.render.render_inputs import make_inputs, make_report

AT_ONCE = 5


def _report(folder):
    theme = load_theme("default")
    context = build_context(make_inputs(), make_report(), theme)
    context = dataclasses.replace(context, explorer=dataclasses.replace(context.explorer, n_rows_at_once=AT_ONCE))
    path = folder / "report.html"
    path.write_text(render_html(context, build_environment(theme), theme), encoding="utf-8")
    return path


@needs_chromium
def test_show_more_lists_the_next_rows_and_the_count_stays_the_match_count(tmp_path):
    with offline_page(_report(tmp_path)) as page:
        rows = page.locator("#explorer-table tbody tr:not([hidden])")
        more = page.locator("#explorer-more")
        assert explorer_count(page) == 12 and rows.count() == AT_ONCE
        assert page.locator("#explorer-count").inner_text() == "12 of 12 publications match; the first 5 are shown"
        more.focus()
        page.keyboard.press("Enter")
        assert rows.count() == 10 and more.inner_text() == "Show 2 more"
        page.keyboard.press("Enter")
        assert rows.count() == 12 and more.is_hidden()
        assert page.locator("#explorer-count").inner_text() == "12 of 12 publications shown"
        # A new choice starts from the first rows again; the Year heading still sorts every match.
        page.select_option("#explorer-goal", "none")
        assert explorer_count(page) == 1 and rows.count() == 1, "one publication of the twelve has no goal"
        page.select_option("#explorer-goal", "")
        page.click("#explorer-table th[data-sort=year] button")
        years = page.locator("#explorer-table tbody tr:not([hidden]) > :nth-child(2)").all_inner_texts()
        assert years == ["2023"] * 4 + ["2024"], "the four of 2023 first, then the first of 2024, from all twelve"
