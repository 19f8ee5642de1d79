"""Render: report context, charts, HTML and PDF through a theme, the workbook, data exports, run manifest.

`render(inputs, report, output_dir)` builds everything in memory first and then
writes each file atomically, so a failing theme leaves no half-written report.
"""

from __future__ import annotations

import contextlib
from pathlib import Path

from reporter.render.atomic import write_bytes_atomic, write_text_atomic
from reporter.render.branding import logo_path
from reporter.render.chart_memo import remembered_charts
from reporter.render.context import RenderInputs, ReportContext
from reporter.render.exports import evidence_table, frame_to_csv, scores_table, write_intake_log
from reporter.render.manifest import write_manifest
from reporter.render.nouns import noun_in_html, report_nouns
from reporter.render.themes import ThemeError, build_environment, load_theme
from reporter.stages import stage

__all__ = ["RenderInputs", "ReportContext", "ThemeError", "render"]


def render(inputs: RenderInputs, report, output_dir: Path, extra_outputs: dict[str, Path] | None = None,
           cache: Path | None = None) -> dict[str, Path]:
    """Write report.html, report.pdf, report.xlsx and data/* into `output_dir`; return label -> path written.

    `report` is the `ReportConfig` (institution, title, reporting_year, theme, logo, accent_colour).
    `extra_outputs` are files the caller already wrote into the folder; the manifest lists them too.
    `cache` is the score cache's file, where charts drawn before are found (chart_memo.py); None: none kept.
    """
    from reporter.render.html import render_html
    from reporter.render.pdf import render_pdf
    from reporter.render.sections import build_context, for_print
    from reporter.render.workbook import build_workbook

    if not isinstance(inputs, RenderInputs):
        raise TypeError(f"render: expected RenderInputs, got {type(inputs).__name__}")
    output_dir = Path(output_dir)
    theme = load_theme(report.theme)
    env = build_environment(theme)
    with stage("charts", "Drawing the charts"), remembered_charts(cache):  # with the rest of the report context
        screen = build_context(inputs, report, theme, medium="screen")
    printed = for_print(screen, theme, report)
    nouns = report_nouns(report)
    with stage("html"):
        html = noun_in_html(render_html(screen, env, theme), *nouns)
        printed_html = noun_in_html(render_html(printed, env, theme), *nouns)
    with stage("pdf", "Laying out report.pdf"), _pdf_memo(cache) as memo:
        pdf, _refused = render_pdf(printed_html, theme, logo_path(report), memo, volatile=(inputs.generated_at,))
    with stage("data"):
        data = _data_files(inputs)
        workbook = build_workbook(inputs, report)

    written: dict[str, Path] = {}
    data_dir = output_dir / "data"
    for name, text in data.items():
        written[f"data/{name}"] = write_text_atomic(data_dir / name, text, root=output_dir)
    # The intake log and the manifest sit beside the report, where a reader looks first.
    written["intake-log.csv"] = write_intake_log(inputs.intake_log, output_dir)
    written["report.xlsx"] = write_bytes_atomic(output_dir / "report.xlsx", workbook, root=output_dir)
    written["manifest.json"] = write_manifest(inputs.manifest, {**written, **(extra_outputs or {})}, output_dir,
                                              output_dir / "manifest.json")
    written["report.html"] = write_text_atomic(output_dir / "report.html", html, root=output_dir)
    written["report.pdf"] = write_bytes_atomic(output_dir / "report.pdf", pdf, root=output_dir)
    return written


@contextlib.contextmanager
def _pdf_memo(cache: Path | None):
    """Pages of report.pdf kept in the score cache's file (pdf_memo.py); None: nothing kept."""
    if cache is None:
        yield None
        return
    from reporter.render.pdf_memo import PdfMemo

    with PdfMemo(cache) as memo:
        yield memo


def _data_files(inputs: RenderInputs) -> dict[str, str]:
    """File name -> text of every CSV/JSON export except the intake log and manifest."""
    goal_codes = [str(code) for code, _ in inputs.goals]
    files = {
        "scores.csv": frame_to_csv(scores_table(inputs.scores, goal_codes)),
        "evidence.csv": frame_to_csv(evidence_table(inputs.scores, inputs.records, tuple(inputs.goals))),
    }
    import reporter.analyse as analyse  # the JSON/table layout of Findings belongs to analyse

    files["findings.json"] = analyse.findings_to_json(inputs.findings)
    for name, table in sorted(analyse.findings_tables(inputs.findings).items()):
        files[f"findings-{name.replace('_', '-')}.csv"] = frame_to_csv(table)
    return files
