"""Department briefs: one short HTML and PDF per department in briefs/, named safely, written atomically.

Every brief is rendered in memory before any is written, so a failing theme leaves no partial set.
The caller lists the files in the run manifest, so a later build removes briefs it did not write again.
"""

from __future__ import annotations

import dataclasses
import hashlib
import re
import sys
import unicodedata
from pathlib import Path
from typing import Iterable

from reporter.analyse.departments import DepartmentSplit
from reporter.render.atomic import write_bytes_atomic, write_text_atomic
from reporter.render.branding import logo_path
from reporter.render.context import RenderInputs
from reporter.render.themes import build_environment, load_theme

FOLDER = "briefs"
ENTRY_TEMPLATE = "brief.html"
MAX_STEM = 60  # characters; long unit names stay readable and far below file-system limits
# Names Windows refuses as file stems whatever the extension; a brief may be copied there.
_RESERVED = {"con", "prn", "aux", "nul", *(f"com{i}" for i in range(1, 10)), *(f"lpt{i}" for i in range(1, 10))}


def _stem(name: str) -> str:
    """ASCII letters, digits and hyphens only: accents dropped, '&' read as 'and', anything else a hyphen."""
    plain = unicodedata.normalize("NFKD", name.replace("&", " and ")).encode("ascii", "ignore").decode("ascii")
    stem = re.sub(r"[^a-z0-9]+", "-", plain.lower()).strip("-")[:MAX_STEM].rstrip("-")
    if not stem:
        # A name written wholly in another script: a short digest keeps it apart from the others.
        return "department-" + hashlib.sha256(name.encode("utf-8")).hexdigest()[:8]
    return f"{stem}-department" if stem in _RESERVED else stem


def brief_file_names(departments: Iterable[str]) -> dict[str, str]:
    """Department -> file stem, unique even when two names normalise alike (then -2, -3, ... in name order).

    Stems are lower case, so they stay apart on case-insensitive file systems too.
    """
    names = sorted(set(departments))
    wanted = {name: _stem(name) for name in names}
    plain = set(wanted.values())
    taken: set[str] = set()
    out: dict[str, str] = {}
    for name in names:
        stem = wanted[name]
        if stem in taken:
            # A numbered stem never takes another department's own stem ("Unit 2" keeps "unit-2").
            number = 2
            while f"{stem}-{number}" in taken or f"{stem}-{number}" in plain:
                number += 1
            stem = f"{stem}-{number}"
        out[name] = stem
        taken.add(stem)
    return out


def write_briefs(split: DepartmentSplit, inputs: RenderInputs, report, output_dir: Path,
                 show_progress: bool = True) -> dict[str, Path]:
    """Render every department's brief (HTML for screen, PDF for print), then write them into briefs/.

    Returns label -> path for the run manifest, labels as the paths relative to `output_dir`.
    """
    from reporter.render.brief_context import brief_theme_view, build_brief_context
    from reporter.render.html import render_html
    from reporter.render.nouns import noun_in_html, report_nouns
    from reporter.render.pdf import render_pdf

    theme = load_theme(report.theme)
    env = build_environment(theme)
    logo = logo_path(report)
    stems = brief_file_names(d.department for d in split.departments)
    nouns = report_nouns(report)
    files: dict[str, str | bytes] = {}
    progress = _progress(len(split.departments), show_progress)
    try:
        for department in split.departments:
            screen = build_brief_context(department, inputs, report, theme, medium="screen")
            printed = dataclasses.replace(screen, theme=brief_theme_view(theme, report, "print"))
            stem = f"{FOLDER}/{stems[department.department]}"
            files[f"{stem}.html"] = noun_in_html(render_html(screen, env, theme, ENTRY_TEMPLATE), *nouns)
            files[f"{stem}.pdf"], _refused = render_pdf(
                noun_in_html(render_html(printed, env, theme, ENTRY_TEMPLATE), *nouns), theme, logo)
            progress.update(1)
    finally:
        progress.close()
    written = {}
    for label, content in files.items():
        write = write_text_atomic if isinstance(content, str) else write_bytes_atomic
        written[label] = write(output_dir / label, content, root=output_dir)
    return written


def briefs_summary(split: DepartmentSplit, output_dir: Path) -> str:
    """Console lines for the build summary: how many briefs, and the publications that are in none."""
    n, small = len(split.departments), sum(d.is_too_small for d in split.departments)
    if n:
        lines = [f"  {FOLDER}/: {n} department brief{'s' if n != 1 else ''} (HTML and PDF) in {output_dir / FOLDER}"
                 + (f"; {small} too small for goal shares" if small else "")]
    else:
        lines = [f"  {FOLDER}/: no department brief, as no publication has a department recorded "
                 "(map authors to departments with departments.staff_map, or give the inputs a departments field)"]
    if split.n_unassigned:
        lines.append(f"  {split.n_unassigned} of {split.n_publications} publications had no department recorded "
                     "and are in no brief.")
    return "\n".join(lines)


def _progress(total: int, show: bool):
    """One line on stderr for the whole stage (nothing with --quiet)."""
    from tqdm import tqdm

    return tqdm(total=total, unit="brief", desc="Department briefs", file=sys.stderr, leave=False, disable=not show)
