"""The demo's workbook (report.xlsx) read back with openpyxl and opened by LibreOffice, against the CSV exports."""

import csv
import hashlib
import json
import shutil
import subprocess

import openpyxl
import pytest

pytestmark = pytest.mark.model


def _csv(path):
    with path.open(encoding="utf-8", newline="") as handle:
        return list(csv.DictReader(handle))


def _records(sheet):
    rows = list(sheet.iter_rows(values_only=True))
    return [dict(zip(rows[0], row)) for row in rows[1:]]


@pytest.fixture(scope="module")
def book(demo_build):
    return openpyxl.load_workbook(demo_build.out / "report.xlsx")


def test_the_workbook_is_written_and_listed_in_the_manifest(demo_build):
    path = demo_build.out / "report.xlsx"
    manifest = json.loads((demo_build.out / "manifest.json").read_text(encoding="utf-8"))
    assert manifest["outputs"]["report.xlsx"]["sha256"] == hashlib.sha256(path.read_bytes()).hexdigest()
    assert "report.xlsx" in demo_build.stdout


def test_goal_share_cells_equal_the_findings_goals_csv(demo_build, book):
    expected = {row["goal"]: row for row in _csv(demo_build.out / "data" / "findings-goals.csv")}
    sheet = book["Goal shares"]
    rows = _records(sheet)
    assert [str(r["Goal"]) for r in rows] == list(expected), "every goal, framework order"
    for row in rows:
        want = expected[str(row["Goal"])]
        assert row["Goal share"] == pytest.approx(float(want["share"]), rel=1e-12)
        assert row["Share, 95% low"] == pytest.approx(float(want["share_low"]), rel=1e-12)
        assert row["Aligned"] == int(want["n_aligned"]) and row["Publications"] == int(want["n"])
    assert {cell.number_format for cell in sheet["G"][1:]} == {"0.0%"}


def test_changes_sheet_has_the_verdicts_of_the_changes_csv(demo_build, book):
    changes = _csv(demo_build.out / "data" / "findings-changes.csv")
    expected = [(row["goal"], row["baseline"], row["verdict"]) for row in changes]
    assert [(str(r["Goal"]), r["Compared with"], r["Verdict"]) for r in _records(book["Changes"])] == expected


def test_publication_sheet_has_one_row_per_kept_publication_and_every_aligned_pair(demo_build, book):
    log = _csv(demo_build.out / "intake-log.csv")
    kept = {row["record_id"] for row in log if row["status"] == "kept"}
    rows = _records(book["Publications"])
    assert len(rows) == len(kept) == 447 and {r["Record"] for r in rows} == kept
    pairs = {(r["record_id"], r["goal"]) for r in _csv(demo_build.out / "data" / "evidence.csv")}
    listed = {(r["Record"], goal) for r in rows if r["Aligned goals"] for goal in str(r["Aligned goals"]).split("; ")}
    assert listed == pairs
    assert sum(r["Number of aligned goals"] for r in rows) == len(pairs)
    assert len(_records(book["Intake log"])) == len(log) == 462


def test_summary_counts_equal_the_findings(demo_build, book):
    headline = json.loads((demo_build.out / "data" / "findings.json").read_text(encoding="utf-8"))["headline"]
    summary = {row[0]: row[1] for row in book["Summary"].iter_rows(values_only=True) if row[0]}
    assert summary["Institution"] == "Kestrel Heath University" and summary["Reporting year"] == 2025
    assert summary["Publications analysed"] == headline["n_publications"]
    assert summary["Share aligned with at least one goal"] == pytest.approx(headline["share_aligned_any"], abs=1e-6)


@pytest.mark.skipif(shutil.which("soffice") is None, reason="LibreOffice (soffice) is not installed")
def test_libreoffice_opens_the_workbook_and_shows_shares_as_percentages(demo_build, tmp_path):
    # Filter options: comma, double quote, UTF-8, from line 1, formatted "as shown", every sheet to its own file.
    target = "csv:Text - txt - csv (StarCalc):44,34,76,1,,0,false,true,true,false,false,-1"
    result = subprocess.run(
        ["soffice", f"-env:UserInstallation=file://{tmp_path / 'profile'}", "--headless", "--convert-to", target,
         "--outdir", str(tmp_path), str(demo_build.out / "report.xlsx")],
        capture_output=True, text=True, timeout=300,
    )
    assert result.returncode == 0, result.stderr
    goals = _csv(tmp_path / "report-Goal shares.csv")
    expected = {row["goal"]: float(row["share"]) for row in _csv(demo_build.out / "data" / "findings-goals.csv")}
    assert {row["Goal"]: row["Goal share"] for row in goals} == {
        goal: f"{100 * share:.1f}%" for goal, share in expected.items()}
    publications = _csv(tmp_path / "report-Publications.csv")
    assert len(publications) == 447
    summary = (tmp_path / "report-Summary.csv").read_text(encoding="utf-8")
    assert "must not be the sole basis for funding" in summary and "Kestrel Heath University" in summary
