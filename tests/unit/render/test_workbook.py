"""The workbook (report.xlsx) read back with openpyxl: sheets, cell types, formats, frozen headers, inert text."""

from __future__ import annotations

import dataclasses
import io
import json
import math
import zipfile
from pathlib import Path

import openpyxl
import pandas as pd
import pytest

from reporter.config import InputConfig, LimitsConfig
from reporter.ingest import read_inputs
from reporter.render import xlsx
from reporter.render.workbook import CAUTIONS, build_workbook
from reporter.render.xlsx import Column, Table, write_workbook
from tests.unit.render.render_inputs import (
    INJECTED_DEPARTMENT, INJECTED_FORMULA_TITLE, make_findings, make_inputs, make_intake_log, make_report,
)

SHEETS = ["Summary", "Goal shares", "Shares by year", "Changes", "Departments", "Partner countries",
          "Publications", "Intake log"]
HOSTILE = Path(__file__).resolve().parents[2] / "data" / "hostile"


def _open(data: bytes) -> openpyxl.Workbook:
    return openpyxl.load_workbook(io.BytesIO(data))


def _records(sheet) -> list[dict]:
    """Rows under the header as header -> cell."""
    rows = list(sheet.iter_rows())
    header = [cell.value for cell in rows[0]]
    return [dict(zip(header, row)) for row in rows[1:]]


def _summary(book) -> dict:
    return {row[0].value: row[1] for row in book["Summary"].iter_rows() if row[0].value}


@pytest.fixture(scope="module")
def book():
    return _open(build_workbook(make_inputs(), make_report()))


def test_sheets_come_in_reading_order_with_frozen_filterable_headers(book):
    assert book.sheetnames == SHEETS
    for name in SHEETS[1:]:
        sheet = book[name]
        assert sheet.freeze_panes == "A2", name
        assert sheet.auto_filter.ref == f"A1:{sheet.cell(1, sheet.max_column).column_letter}{sheet.max_row}", name
        assert all(cell.font.bold for cell in sheet[1]), name
        assert all(4 <= sheet.column_dimensions[cell.column_letter].width <= 60 for cell in sheet[1]), name


def test_goal_shares_are_fractions_formatted_as_percentages_and_counts_are_integers(book):
    findings = make_findings()
    rows = _records(book["Goal shares"])
    assert [r["Goal"].value for r in rows] == [3, 6, 7, 13], "goal codes as numbers, framework order"
    for row, (_, expected) in zip(rows, findings.goals.iterrows()):
        share = row["Goal share"]
        assert isinstance(share.value, float) and share.value == pytest.approx(expected["share"], abs=1e-12)
        assert share.number_format == "0.0%"
        assert row["Share, 95% low"].value == pytest.approx(expected["share_low"], abs=1e-12)
        assert type(row["Publications"].value) is int and row["Publications"].value == 12
        assert type(row["Aligned"].value) is int and row["Aligned"].value == expected["n_aligned"]
        assert row["Mean alignment score"].number_format == "0.000"


def test_changes_keep_p_values_as_numbers_and_differences_signed(book):
    rows = {r["Goal"].value: r for r in _records(book["Changes"])}
    water = rows[6]
    assert water["p-value"].value == pytest.approx(0.01) and water["p-value, FDR adjusted"].value == pytest.approx(0.04)
    assert water["p-value"].data_type == "n"
    assert water["Difference"].number_format.startswith("+0.0%") and isinstance(water["Difference"].value, float)
    assert water["Change holds"].value == "yes" and rows[3]["Change holds"].value == "no"
    assert water["Verdict"].value == "increase"


def test_missing_values_are_empty_cells_never_nan_text():
    """A too-small comparison has no p-value (null in findings): its cell is empty."""
    findings = make_findings()
    changes = findings.changes.assign(p_value=[math.nan, 0.01, float("nan"), None],
                                      verdict=["too small", "increase", "too small", "too small"])
    inputs = make_inputs(findings=dataclasses.replace(findings, changes=changes))
    book = _open(build_workbook(inputs, make_report()))
    rows = {r["Goal"].value: r for r in _records(book["Changes"])}
    assert rows[3]["p-value"].value is None and rows[13]["p-value"].value is None
    assert rows[6]["p-value"].value == pytest.approx(0.01)
    texts = [c.value for s in book.worksheets for row in s.iter_rows() for c in row if isinstance(c.value, str)]
    assert not [t for t in texts if t.strip().lower() in ("nan", "none", "nat", "<na>")]


def test_formula_like_text_is_neutralised_as_in_the_csvs(book):
    titles = {r["Record"].value: r["Title"].value for r in _records(book["Publications"])}
    assert titles["nm:06"] == "'" + INJECTED_FORMULA_TITLE
    departments = {r["Department"].value for r in _records(book["Departments"])}
    assert "'" + INJECTED_DEPARTMENT in departments and INJECTED_DEPARTMENT not in departments
    cells = [c for s in book.worksheets for row in s.iter_rows() for c in row]
    assert not [c.coordinate for c in cells if c.data_type == "f"], "no cell is a formula"
    assert not [c.value for c in cells if isinstance(c.value, str) and c.value[:1] in ("=", "+", "@")]


def test_hostile_input_titles_stay_text_in_the_intake_log_sheet():
    """Source: OWASP "CSV Injection" (cells starting with = + - @); the same rows as the CSV export's test."""
    intake = read_inputs((InputConfig(path=Path("formulas.csv")),), (2021,), LimitsConfig(), HOSTILE)
    book = _open(build_workbook(make_inputs(intake_log=intake.log), make_report()))
    titles = [r["Title"].value for r in _records(book["Intake log"])]
    assert titles == ["'=HYPERLINK(\"http://kestrel.invalid/x\",\"Open\")", "'+cmd|' /C calc'!A0",
                      "'@SUM(1+1)*cmd|' /C calc'!A0"]


def test_publications_sheet_has_one_row_per_publication_with_its_evidence(book):
    inputs = make_inputs()
    rows = {r["Record"].value: r for r in _records(book["Publications"])}
    assert set(rows) == set(inputs.records["record_id"])
    both = rows["nm:08"]
    assert both["Aligned goals"].value == "3; 6" and both["Number of aligned goals"].value == 2
    assert both["Evidence"].value.splitlines() == [
        "Goal 3: The study of waterborne illness after floods bears on goal 3.",
        "Goal 6: The study of waterborne illness after floods bears on goal 6.",
    ]
    assert both["Evidence"].alignment.wrap_text
    assert both["Departments"].value == "Hydrology; Public Health" and both["Partner countries"].value == "FR"
    unaligned = rows["nm:07"]
    assert unaligned["Number of aligned goals"].value == 0 and unaligned["Aligned goals"].value is None
    assert rows["nm:05"]["Explicitly mentioned goals"].value == "7"
    years = [r["Year"].value for r in _records(book["Publications"])]
    assert years == sorted(years, reverse=True), "newest first"


def test_intake_log_sheet_lists_every_record_read(book):
    rows = _records(book["Intake log"])
    log = make_intake_log()
    assert len(rows) == len(log)
    merged = next(r for r in rows if r["Status"].value == "merged")
    assert merged["Merged into"].value == "nm:02" and merged["Reason"].value == "same DOI as nm:02"
    assert all(type(r["Line"].value) is int and type(r["Year"].value) is int for r in rows)


def test_summary_names_the_report_its_counts_method_and_cautions(book):
    summary = _summary(book)
    assert summary["Institution"].value == "University of Northmere"
    assert summary["Reporting year"].value == 2024
    assert summary["Publications analysed"].value == 12 and summary["Records read"].value == 14
    assert summary["Records set aside"].value == 1 and summary["Records merged as duplicates"].value == 1
    share = summary["Share aligned with at least one goal"]
    assert share.value == pytest.approx(11 / 12) and share.number_format == "0.0%"
    method = summary["Method"].value
    assert "threshold 0.50" in method and "Wilson score intervals" in method and "all-MiniLM-L6-v2" in method
    texts = [c.value for row in book["Summary"].iter_rows() for c in row if isinstance(c.value, str)]
    for caution in CAUTIONS:
        assert caution in texts
    assert any("sole basis for funding" in t for t in texts) and any("impact, quality" in t for t in texts)


def test_fractional_counts_keep_their_decimals_and_distinct_publications_show():
    findings = make_findings()
    by_department = findings.by_department.assign(n_publications=findings.by_department["n"],
                                                  n=findings.by_department["n"] - 0.5)
    meta = {**findings.meta, "counting": "fractional"}
    findings = dataclasses.replace(findings, by_department=by_department, meta=meta)
    book = _open(build_workbook(make_inputs(findings=findings), make_report()))
    first = _records(book["Departments"])[0]
    assert first["Fractional count"].value == 3.5 and first["Fractional count"].number_format == "0.00"
    assert type(first["Publications"].value) is int and first["Publications"].value == 4
    assert "fractional counting" in _summary(book)["Method"].value


def test_identical_findings_give_identical_bytes_whenever_built():
    first = build_workbook(make_inputs(), make_report())
    later = build_workbook(make_inputs(generated_at="2031-01-01T00:00:00+00:00"), make_report())
    assert first == later
    # Two builds in the same second would match anyway: the file must hold no build time at all.
    with zipfile.ZipFile(io.BytesIO(first)) as archive:
        core = archive.read("docProps/core.xml")
        assert b"dcterms:created" not in core and b"dcterms:modified" not in core, "manifest.json has the time"
        assert {entry.date_time for entry in archive.infolist()} == {(1980, 1, 1, 0, 0, 0)}


def test_render_writes_the_workbook_and_the_manifest_lists_it(rendered):
    manifest = json.loads(rendered["manifest.json"].read_text(encoding="utf-8"))
    assert manifest["outputs"]["report.xlsx"]["path"] == "report.xlsx"
    assert _open(rendered["report.xlsx"].read_bytes()).sheetnames == SHEETS


# --- the writer itself (xlsx.py) -----------------------------------------------------------


def test_text_beyond_a_cells_limit_is_cut_and_the_summary_says_so():
    long = "x" * (xlsx.MAX_CELL_TEXT + 10)
    table = Table("Notes", (Column("note", "Note", "long_text"),), pd.DataFrame({"note": [long, "bell\x07 here"]}),
                  "data/notes.csv")
    book = _open(write_workbook("Summary", [("Report", "test", "text")], [table]))
    cells = [r["Note"].value for r in _records(book["Notes"])]
    assert len(cells[0]) == xlsx.MAX_CELL_TEXT and cells[0].endswith("\u2026")
    assert cells[1] == "bell\ufffd here", "a control character a workbook cannot hold is shown, not dropped"
    notes = [row[1].value for row in book["Summary"].iter_rows() if row[0].value == "Note"]
    assert notes == [f"Notes: 1 text cells longer than {xlsx.MAX_CELL_TEXT:,} characters (a cell's limit) were cut; "
                     "data/notes.csv holds them whole."]


def test_rows_beyond_a_sheets_limit_are_named_in_the_summary(monkeypatch):
    monkeypatch.setattr(xlsx, "MAX_ROWS", 4)  # the real limit (1,048,576 rows) is too many to write in a test
    table = Table("Log", (Column("n", "N", "count"),), pd.DataFrame({"n": range(10)}), "intake-log.csv")
    book = _open(write_workbook("Summary", [("Report", "test", "text")], [table]))
    assert [r["N"].value for r in _records(book["Log"])] == [0, 1, 2]
    notes = [row[1].value for row in book["Summary"].iter_rows() if row[0].value == "Note"]
    assert notes == ["Log: the first 3 of 10 rows (a sheet's limit); every row is in intake-log.csv."]


def test_numbers_given_as_text_become_numbers_and_other_text_stays():
    frame = pd.DataFrame({"year": ["2024", "n.d.", "", "nan"], "share": ["0.25", "-inf", None, "1_0"]})
    table = Table("T", (Column("year", "Year", "year"), Column("share", "Share", "share")), frame, "t.csv")
    rows = _records(_open(write_workbook("Summary", [("Report", "t", "text")], [table]))["T"])
    assert [r["Year"].value for r in rows] == [2024, "n.d.", None, "nan"]
    assert [r["Share"].value for r in rows] == [0.25, "'-inf", None, "1_0"]


def test_a_column_kind_or_required_column_that_does_not_exist_is_refused():
    frame = pd.DataFrame({"a": [1]})
    with pytest.raises(ValueError, match="unknown column kinds"):
        write_workbook("S", [], [Table("T", (Column("a", "A", "percent"),), frame, "t.csv")])
    with pytest.raises(KeyError, match="lacks columns b"):
        write_workbook("S", [("x", 1, "count")], [Table("T", (Column("b", "B", "count"),), frame, "t.csv")])
    optional = Table("T", (Column("a", "A", "count"), Column("b", "B", "count", optional=True)), frame, "t.csv")
    assert _open(write_workbook("S", [("x", 1, "count")], [optional]))["T"].max_column == 1
