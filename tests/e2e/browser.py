"""Debian's headless Chromium, offline, for tests that read report.html as a reader does."""

import re
import shutil
from contextlib import contextmanager

import pytest

CHROMIUM = shutil.which("chromium") or shutil.which("chromium-browser")
needs_chromium = pytest.mark.skipif(CHROMIUM is None, reason="Chromium not installed (scripts/test installs Debian's chromium)")


@contextmanager
def offline_page(report):
    """A page on `report` in an offline browser; afterwards asserts no console error and nothing else loaded."""
    from playwright.sync_api import sync_playwright

    problems, requests = [], []
    with sync_playwright() as p:
        browser = p.chromium.launch(
            executable_path=CHROMIUM,
            args=["--no-sandbox", "--disable-gpu", "--disable-background-networking", "--disable-component-update",
                  "--disable-sync", "--no-first-run", "--disable-quic"],
        )
        context = browser.new_context(offline=True, viewport={"width": 1280, "height": 900})
        page = context.new_page()
        page.on("console", lambda msg: msg.type == "error" and problems.append(f"console: {msg.text}"))
        page.on("pageerror", lambda exc: problems.append(f"page error: {exc}"))
        page.on("requestfailed", lambda req: problems.append(f"failed request: {req.url}"))
        page.on("request", lambda req: requests.append(req.url))
        page.goto(report.as_uri(), wait_until="load")
        yield page
        browser.close()
    assert problems == []
    assert [u for u in requests if not u.startswith(("file://", "data:"))] == [], "nothing but the file itself loads"


def show_explorer(page) -> None:
    """Scroll to the explorer and wait until it is drawn: the browser lays it out (content-visibility)
    only near the view, and rendered text (inner_text) is empty before that."""
    page.locator("#explorer-count").scroll_into_view_if_needed()
    page.evaluate("() => new Promise(r => requestAnimationFrame(() => requestAnimationFrame(r)))")


def explorer_count(page) -> int:
    """The explorer's live count: the first number of "N of M publications shown"."""
    show_explorer(page)
    text = page.locator("#explorer-count").inner_text()
    found = re.match(r"([\d,]+) of ([\d,]+) publications", text)
    assert found, f"unexpected count text {text!r}"
    return int(found.group(1).replace(",", ""))
