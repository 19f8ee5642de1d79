"""Department briefs of the demo, read as a department reads them: one build with --briefs.

The build raises analysis.min_group_size to 40 so that one demo department (Computer Science, 38
publications) is too small; it shares the session's demo copy, so its scores come from the cache.
"""

import csv
import json
import re
from html import unescape

import pytest
from click.testing import CliRunner
from pypdf import PdfReader

from reporter.cli import main
from reporter.render.briefs import brief_file_names

pytestmark = pytest.mark.model

MIN_GROUP_SIZE = 40
CAUTIONS = ("says nothing about the work's impact, quality", "Leiden Manifesto",
            "must not be the sole basis for funding, hiring or promotion", "How the figures were made")


@pytest.fixture(scope="module")
def briefs_build(demo_copy):
    config = demo_copy / "waymark-briefs.toml"
    text = (demo_copy / "waymark.toml").read_text(encoding="utf-8")
    config.write_text(text + f"\n[analysis]\nmin_group_size = {MIN_GROUP_SIZE}\n", encoding="utf-8")
    out = demo_copy.parent / "out-briefs"
    # Without -q: the briefs stage must keep to one progress line on stderr.
    result = CliRunner().invoke(main, ["build", str(config), "--out", str(out), "--briefs"])
    assert result.exit_code == 0, result.output + repr(result.exception)
    return out, result


@pytest.fixture(scope="module")
def departments(briefs_build):
    out, _ = briefs_build
    rows = csv.DictReader((out / "data" / "findings-by-department.csv").open(encoding="utf-8"))
    return [row for row in rows if row["is_unassigned"] == "False"]


def _pdf_text(path):
    return re.sub(r"\s+", " ", " ".join(page.extract_text() for page in PdfReader(str(path)).pages))


def _brief(out, department):
    return out / "briefs" / f"{brief_file_names([department])[department]}.pdf"


def test_every_department_has_a_brief_the_manifest_lists(briefs_build, departments):
    out, result = briefs_build
    names = sorted({row["department"] for row in departments})
    stems = brief_file_names(names)
    manifest = json.loads((out / "manifest.json").read_text(encoding="utf-8"))
    listed = {entry["path"] for entry in manifest["outputs"].values()}
    for name in names:
        for suffix in (".html", ".pdf"):
            assert f"briefs/{stems[name]}{suffix}" in listed, f"{name}: brief not in the manifest"
            assert (out / "briefs" / f"{stems[name]}{suffix}").stat().st_size > 0
    assert len(list((out / "briefs").iterdir())) == 2 * len(names), "nothing else in briefs/"
    unassigned = json.loads((out / "data" / "findings.json").read_text(encoding="utf-8"))["tables"]["by_department"]
    n_none = next(row["n_publications"] for row in unassigned if row["is_unassigned"])
    assert f"{len(names)} department briefs (HTML and PDF)" in result.stdout
    assert f"{n_none} of 447 publications had no department recorded and are in no brief." in result.stdout
    progress = [line for line in result.stderr.split("\n") if "Department briefs" in line]
    assert len(progress) == 1, f"the briefs stage printed {len(progress)} lines"


def test_a_brief_gives_the_main_reports_count_and_the_department_table_share(briefs_build, departments):
    out, _ = briefs_build
    name = "Civil & Environmental Engineering"
    text = _pdf_text(_brief(out, name))
    assert name in text and "KESTREL HEATH UNIVERSITY" in text.upper()
    # The count printed in the main report's department table (HTML), beside the brief's key figure.
    html = unescape((out / "report.html").read_text(encoding="utf-8"))
    table = html[html.index('id="departments"'):html.index('id="international-partners"')]
    count = re.search(rf'<th scope="row">{re.escape(name)}</th><td class="num">([\d,]+)</td>', table).group(1)
    assert f"Key figures {count} publications of the department analysed" in text
    # The goal with the department's largest share, as findings-by-department.csv gives it, in the profile table.
    row = max((r for r in departments if r["department"] == name), key=lambda r: float(r["share"]))
    goals = {g["goal"]: g["title"] for g in json.loads(
        (out / "data" / "findings.json").read_text(encoding="utf-8"))["tables"]["goals"]}
    share = f"{100 * float(row['share']):.1f}%"
    assert f"{row['goal']} {goals[row['goal']]} {row['n_aligned']} {share}" in text


def test_a_too_small_department_shows_too_small_instead_of_shares(briefs_build, departments):
    out, _ = briefs_build
    small = {r["department"] for r in departments if r["is_too_small"] == "True"}
    assert small == {"Computer Science"}, f"with a minimum of {MIN_GROUP_SIZE}, only Computer Science (38) is too small"
    text = _pdf_text(_brief(out, "Computer Science"))
    assert "too small for goal shares: fewer than 40 publications" in text
    rows = re.findall(r"\b(\d{1,2}) [A-Z][A-Za-z ,\-]+? too small \d", text)
    assert len(rows) == 17, "every goal row of the profile shows too small instead of the department's share"
    assert "aligned with at least one goal (" not in text.split("of the institution's")[0], "no share of its own"


def test_every_brief_carries_the_cautions_on_at_most_two_pages(briefs_build, departments):
    out, _ = briefs_build
    for name in sorted({row["department"] for row in departments}):
        path = _brief(out, name)
        assert len(PdfReader(str(path)).pages) <= 2, f"{name}: brief longer than two pages"
        text = _pdf_text(path)
        for phrase in CAUTIONS:
            assert phrase in text, f"{name}: {phrase!r} missing"
