"""Open the demo report in a real browser (Debian's headless Chromium) with the network off.

The page must load with no failed request, no request leaving the file, and no console error.
"""

import shutil

import pytest

pytestmark = pytest.mark.model

CHROMIUM = shutil.which("chromium") or shutil.which("chromium-browser")


@pytest.mark.skipif(CHROMIUM is None, reason="Chromium not installed (scripts/test installs Debian's chromium)")
def test_report_opens_offline_without_errors(demo_build):
    from playwright.sync_api import sync_playwright

    report = demo_build.out / "report.html"
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
        assert page.title().startswith("Research and the Sustainable Development Goals")
        assert page.locator("h2#at-a-glance").is_visible()
        assert page.locator("svg").count() >= 5, "charts are inline SVG"
        page.screenshot(path=str(demo_build.out / "report-screenshot.png"), full_page=False)
        browser.close()
    assert problems == []
    assert [u for u in requests if not u.startswith(("file://", "data:"))] == [], "nothing but the file itself loads"
    assert (demo_build.out / "report-screenshot.png").stat().st_size > 10_000
