"""Size and speed of report.html's publication explorer for large publication lists.

    python bench/explorer_scale.py --sizes 1000 10000

Builds a synthetic corpus (`synthetic_corpus.py`) with seeded synthetic scores (no model:
the explorer's cost depends on row count and text length, not on how scores were made),
runs the real analyse and render stages, then opens report.html in headless Chromium
(offline) and times loading, scrolling to the explorer, choosing a goal, sorting, a text
search and "Show more". Results are printed and written as JSON to bench/results/ (gitignored).
"""

from __future__ import annotations

import argparse
import json
import shutil
import sys
import tempfile
import time
from pathlib import Path

import numpy as np
import pandas as pd

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))
RESULTS = ROOT / "bench" / "results"

from synthetic_corpus import make_corpus  # noqa: E402  (beside this file)

THRESHOLD = 0.6
# Beta(2.5, 5) scores put 6.6% of (publication, goal) pairs at or above 0.6 (scipy.stats.beta.sf):
# 1.1 aligned goals per publication, near the demo's 1.2 (536 aligned pairs for 447 publications).
BETA = (2.5, 5.0)


def synthetic_scores(records: pd.DataFrame, codes: list[str], composed: dict[str, list[str]],
                     seed: int = 11) -> pd.DataFrame:
    """One row per (publication, goal): SCORE_COLUMNS, evidence taken from the publication's own sentences."""
    from reporter.records import SCORE_COLUMNS

    rng = np.random.default_rng(seed)
    n, k = len(records), len(codes)
    scores = rng.beta(*BETA, size=(n, k)).round(4)
    explicit = rng.random((n, k)) < 0.01
    picks = rng.integers(0, 1 << 30, size=(n, k))
    rows = []
    for i, rec in enumerate(records.itertuples(index=False)):
        sentences = composed[rec.abstract]
        for j, code in enumerate(codes):
            aligned = bool(scores[i, j] >= THRESHOLD or explicit[i, j])
            rows.append((rec.record_id, code, float(scores[i, j]), int(explicit[i, j]), bool(explicit[i, j]), aligned,
                         sentences[picks[i, j] % len(sentences)] if aligned else "", float(scores[i, j])))
    return pd.DataFrame(rows, columns=list(SCORE_COLUMNS))


def build(n: int, out: Path) -> dict:
    from reporter.analyse import analyse
    from reporter.config import AnalysisConfig, ReportConfig
    from reporter.render import RenderInputs, render
    from reporter.score.framework import load_framework

    framework = load_framework("un-sdg-2030")
    goals = tuple((goal.code, goal.short_title) for goal in framework.goals)
    codes = [code for code, _ in goals]
    records, log, composed = make_corpus(n)
    scores = synthetic_scores(records, codes, composed)
    report = ReportConfig(institution="Bench University", home_country="IE", reporting_year=2025,
                          comparison_years=(2022, 2023, 2024), output=out)
    thresholds = {code: THRESHOLD for code in codes}
    findings = analyse(records, scores, goals, AnalysisConfig(), 2025, (2022, 2023, 2024), thresholds,
                       "score_or_mention")
    inputs = RenderInputs(
        findings=findings, records=records, scores=scores, intake_log=log, goals=goals,
        framework_info={"id": framework.id, "title": framework.title, "version": framework.version,
                        "checksum": framework.checksum},
        model_info={"id": "synthetic", "checksum": "0" * 64, "backend": "embedding"},
        score_settings={"threshold": THRESHOLD, "thresholds": thresholds, "policy": "score_or_mention",
                        "text_fields": ["title", "abstract", "keywords"]},
        manifest={"benchmark": True}, generated_at="2025-01-01T00:00:00+00:00",
    )
    began = time.perf_counter()
    written = render(inputs, report, out)
    goal_6 = findings.goals.set_index(findings.goals["goal"].astype(str)).loc["6", "n_aligned"]
    return {
        "publications": n,
        "aligned_pairs": int(scores["is_aligned"].sum()),
        "seconds_render": round(time.perf_counter() - began, 2),
        "mib_report_html": round(written["report.html"].stat().st_size / 2**20, 2),
        "pdf_pages": _pdf_pages(written["report.pdf"]),
        "goal_6_aligned": int(goal_6),
        "html": written["report.html"],
    }


def _pdf_pages(path: Path) -> int:
    from pypdf import PdfReader

    return len(PdfReader(str(path)).pages)


def time_in_browser(html: Path) -> dict:
    """Seconds a reader waits in Chromium (offline): load with the script run, scrolling to the explorer,
    one goal, one sort, clearing, one search (including the 150 ms typing pause the script waits for),
    one "Show more". Also Chromium's own layout and task seconds for the load, steadier on a busy machine."""
    from playwright.sync_api import sync_playwright

    chromium = shutil.which("chromium") or shutil.which("chromium-browser")
    with sync_playwright() as p:
        browser = p.chromium.launch(executable_path=chromium, args=["--no-sandbox", "--disable-gpu"])
        context = browser.new_context(offline=True, viewport={"width": 1280, "height": 900})
        page = context.new_page()
        cdp = context.new_cdp_session(page)
        cdp.send("Performance.enable")
        errors: list[str] = []
        page.on("pageerror", lambda exc: errors.append(str(exc)))

        def painted() -> None:  # a double requestAnimationFrame: the change is laid out and painted
            page.evaluate("() => new Promise(r => requestAnimationFrame(() => requestAnimationFrame(r)))")

        def timed(action) -> float:
            began = time.perf_counter()
            action()
            painted()
            return round(time.perf_counter() - began, 3)

        load = timed(lambda: page.goto(html.as_uri(), wait_until="load"))
        metrics = {m["name"]: m["value"] for m in cdp.send("Performance.getMetrics")["metrics"]}
        scroll = timed(lambda: page.evaluate("() => document.getElementById('publication-explorer').scrollIntoView()"))
        goal = timed(lambda: page.select_option("#explorer-goal", "6"))
        shown = page.locator("#explorer-count").inner_text()
        sort = timed(lambda: page.click("#explorer-table th[data-sort=year] button"))
        clear = timed(lambda: page.click("#explorer-reset"))
        before = page.locator("#explorer-count").inner_text()
        search = timed(lambda: (page.fill("#explorer-search", "water"), page.wait_for_function(
            "t => document.getElementById('explorer-count').textContent !== t", arg=before)))
        page.click("#explorer-reset")
        more = timed(lambda: page.click("#explorer-more")) if page.locator("#explorer-more").is_visible() else None
        browser.close()
    return {"seconds_load": load, "seconds_load_layout": round(metrics["LayoutDuration"], 2),
            "seconds_load_tasks": round(metrics["TaskDuration"], 2), "seconds_scroll_to_explorer": scroll,
            "seconds_goal_filter": goal, "seconds_sort_year": sort, "seconds_clear": clear,
            "seconds_search_incl_pause": search, "seconds_show_more": more, "count_after_goal_6": shown,
            "page_errors": errors}


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("--sizes", type=int, nargs="*", default=[1000, 10000])
    args = parser.parse_args(argv)
    results = []
    for n in args.sizes:
        with tempfile.TemporaryDirectory() as tmp:
            figures = build(n, Path(tmp) / "out")
            figures.update(time_in_browser(figures.pop("html")))
        print(json.dumps(figures))
        results.append(figures)
    RESULTS.mkdir(parents=True, exist_ok=True)
    (RESULTS / "explorer_scale.json").write_text(json.dumps(results, indent=2) + "\n", encoding="utf-8")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
