"""Issue 15: nothing lost, nothing false: a build never writes over what it reads, empty inputs and years stop it, a bad output folder is a message.

Each case as a user hits it, through the command line; the config fails before any input is read
or the model loads, so these run without the model.
"""

import json
import re
from pathlib import Path

import pytest
from click.testing import CliRunner

from reporter.cli import main

CONFIG = """\
[report]
institution = "Small Test University"
home_country = "IE"
reporting_year = 2025
output = "{output}"

[[inputs]]
path = "data/scores.csv"

[validation]
review_file = "{review}"
"""


def _project(tmp_path: Path, output: str, review: str = "review.csv") -> Path:
    (tmp_path / "data").mkdir()
    (tmp_path / "data" / "scores.csv").write_text("title,year\nA study of wells,2025\n", encoding="utf-8")
    (tmp_path / review).parent.mkdir(parents=True, exist_ok=True)
    (tmp_path / review).write_text("record_id,goal,decision,note\nr1,6,include,checked\n", encoding="utf-8")
    config = tmp_path / "waymark.toml"
    config.write_text(CONFIG.format(output=output, review=review), encoding="utf-8")
    return config


@pytest.mark.parametrize("command", ["intake", "build", "check-labels"])
def test_output_folder_holding_an_input_is_refused_and_the_input_kept(tmp_path, command):
    config = _project(tmp_path, output=".")
    before = (tmp_path / "data" / "scores.csv").read_bytes()
    result = CliRunner().invoke(main, [command, str(config), "-q"])
    assert result.exit_code == 1, result.output
    assert result.exception is None or isinstance(result.exception, SystemExit), "no traceback"
    assert f"{config}:8: inputs[0].path: {tmp_path / 'data' / 'scores.csv'} lies inside the output folder" in result.output
    assert (tmp_path / "data" / "scores.csv").read_bytes() == before
    assert not (tmp_path / "report.html").exists() and not (tmp_path / "intake-log.csv").exists()


def test_reviewers_decisions_inside_the_output_folder_are_refused_before_a_worksheet_could_replace_them(tmp_path):
    config = _project(tmp_path, output="out", review="out/review-worksheet.csv")
    before = (tmp_path / "out" / "review-worksheet.csv").read_bytes()
    result = CliRunner().invoke(main, ["build", str(config), "--review-worksheet", "-q"])
    assert result.exit_code == 1
    assert "validation.review_file" in result.output and "lies inside the output folder" in result.output
    assert (tmp_path / "out" / "review-worksheet.csv").read_bytes() == before


@pytest.mark.parametrize("command", ["intake", "build"])
def test_out_naming_an_existing_file_is_a_message(tmp_path, command):
    config = _project(tmp_path, output="out")
    (tmp_path / "report.pdf").write_bytes(b"%PDF-1.7 the user's own")
    result = CliRunner().invoke(main, [command, str(config), "--out", str(tmp_path / "report.pdf"), "-q"])
    assert result.exit_code == 1
    assert f"--out: {tmp_path / 'report.pdf'} is a file; expected a folder for the report and its exports" in result.output
    assert (tmp_path / "report.pdf").read_bytes() == b"%PDF-1.7 the user's own"


# --- years with nothing in them -------------------------------------------------------------

YEARS_CONFIG = """\
[report]
institution = "Small Test University"
home_country = "IE"
reporting_year = {reporting}
comparison_years = [{comparison}]
output = "out"
{extra}
[[inputs]]
path = "pubs.csv"
"""


def _years_project(tmp_path: Path, reporting: int, comparison: str, extra: str = "") -> Path:
    rows = "".join(f"A study number {i},Abstract {i} about wells.,{year}\n"
                   for i, year in enumerate([2024, 2024, 2025, 2025]))
    (tmp_path / "pubs.csv").write_text("title,abstract,year\n" + rows, encoding="utf-8")
    config = tmp_path / "waymark.toml"
    config.write_text(YEARS_CONFIG.format(reporting=reporting, comparison=comparison, extra=extra), encoding="utf-8")
    return config


@pytest.mark.parametrize("command", ["intake", "build"])
def test_a_comparison_year_without_publications_is_an_error(tmp_path, command):
    config = _years_project(tmp_path, 2025, "2019, 2024")
    result = CliRunner().invoke(main, [command, str(config), "-q"])
    assert result.exit_code == 1
    assert (f"{config}:5: report.comparison_years: no publication from 2019 among the 4 kept (years in scope with "
            "publications: 2024, 2025); remove it, add the export that holds it, or set "
            "report.allow_empty_years = true") in result.output
    assert not (tmp_path / "out" / "report.html").exists(), "nothing is reported about an empty year"


def test_a_reporting_year_without_publications_is_an_error(tmp_path):
    config = _years_project(tmp_path, 2026, "2025")
    result = CliRunner().invoke(main, ["intake", str(config), "-q"])
    assert result.exit_code == 1
    assert f"{config}:4: report.reporting_year: no publication from 2026 among the 2 kept" in result.output


def test_empty_years_can_be_allowed_on_purpose(tmp_path):
    config = _years_project(tmp_path, 2025, "2019, 2024", extra="allow_empty_years = true\n")
    result = CliRunner().invoke(main, ["intake", str(config), "-q"])
    assert result.exit_code == 0, result.output


@pytest.mark.model
def test_an_allowed_empty_year_is_named_in_the_report_never_read_as_no_change(tmp_path):
    config = _years_project(tmp_path, 2025, "2019, 2024", extra="allow_empty_years = true\n")
    result = CliRunner().invoke(main, ["build", str(config), "-q"])
    assert result.exit_code == 0, result.output
    html = (tmp_path / "out" / "report.html").read_text(encoding="utf-8")
    text = re.sub(r"\s+", " ", re.sub(r"<[^>]+>", " ", html))
    assert "with publications of 2024-2025" in text, "the header names the years present, not 2019-2025"
    assert "2019 had no publications and was not compared" in text
    assert "2019-2025" not in text


# --- the intake check never writes into a built report ---------------------------------------


def test_intake_writes_its_log_beside_the_config_not_into_the_report_folder(tmp_path):
    config = _years_project(tmp_path, 2025, "2024")
    (tmp_path / "out").mkdir()
    (tmp_path / "out" / "intake-log.csv").write_text("the built report's own log\n", encoding="utf-8")
    result = CliRunner().invoke(main, ["intake", str(config), "-q"])
    assert result.exit_code == 0, result.output
    assert f"intake log: {tmp_path / 'intake-log.csv'}" in result.output
    assert (tmp_path / "out" / "intake-log.csv").read_text(encoding="utf-8") == "the built report's own log\n"


def test_intake_refuses_an_out_folder_that_holds_a_built_report(tmp_path):
    config = _years_project(tmp_path, 2025, "2024")
    report = tmp_path / "built"
    report.mkdir()
    (report / "manifest.json").write_text("{}", encoding="utf-8")
    result = CliRunner().invoke(main, ["intake", str(config), "--out", str(report), "-q"])
    assert result.exit_code == 1
    assert f"--out: {report} holds a built report (manifest.json); the intake check does not write into it" in result.output
    assert not (report / "intake-log.csv").exists()


# --- the output folder holds only this build's files -----------------------------------------


@pytest.mark.model
def test_a_build_without_the_extras_removes_the_earlier_builds_extras(tmp_path):
    from tests.e2e.small_project import make_small_project

    project = make_small_project(tmp_path / "p", n_records=6)
    config = str(project / "waymark.toml")
    first = CliRunner().invoke(main, ["build", config, "--sentences", "--review-worksheet", "-q"])
    assert first.exit_code == 0, first.output
    out = project / "out"
    manifest = json.loads((out / "manifest.json").read_text(encoding="utf-8"))
    listed = {entry["path"] for entry in manifest["outputs"].values()}
    assert {"data/sentences.csv", "review-worksheet.csv"} <= listed, "the manifest lists the extras"
    (out / "my-notes.txt").write_text("the user's own", encoding="utf-8")
    second = CliRunner().invoke(main, ["build", config, "-q"])
    assert second.exit_code == 0, second.output
    assert not (out / "data" / "sentences.csv").exists() and not (out / "review-worksheet.csv").exists()
    assert "removed (from an earlier build, not made this time)" in second.output
    assert (out / "my-notes.txt").exists() and (out / "report.pdf").exists()


# --- an input that yields no records ---------------------------------------------------------

ONE_INPUT = """\
[report]
institution = "Small Test University"
home_country = "IE"
reporting_year = 2025
output = "out"

[[inputs]]
path = "good.csv"

[[inputs]]
path = "{name}"
{extra}"""


def _one_bad_input(tmp_path: Path, name: str, data: bytes, extra: str = "") -> Path:
    (tmp_path / "good.csv").write_text("title,abstract,year\nWells,Arsenic in wells.,2025\n", encoding="utf-8")
    (tmp_path / name).write_bytes(data)
    config = tmp_path / "waymark.toml"
    config.write_text(ONE_INPUT.format(name=name, extra=extra), encoding="utf-8")
    return config


def _workbook() -> bytes:
    import io
    import zipfile

    buffer = io.BytesIO()
    with zipfile.ZipFile(buffer, "w") as book:  # the container of an .xlsx workbook
        book.writestr("[Content_Types].xml", "<Types/>")
        book.writestr("xl/workbook.xml", "<workbook/>")
    return buffer.getvalue()


@pytest.mark.parametrize(("name", "data", "reason"), [
    ("export.bib", b"TY  - JOUR\nTI  - Clean water in schools\nPY  - 2025\nER  - \n",
     'no records found: the content looks like RIS, not BibTeX; set format = "ris" for this input'),
    ("export.csv", _workbook(),
     "no records found: this is a spreadsheet workbook, not CSV text; save it from the spreadsheet program "
     "as CSV (UTF-8) and give that file"),
    ("export.csv", b"title,abstract,year\n", "no records found: the file holds a header line and no rows"),
    ("export.ris", b"", "file is empty (0 bytes); nothing read"),
])
@pytest.mark.parametrize("command", ["intake", "build"])
def test_an_input_that_yields_nothing_stops_with_what_to_do(tmp_path, name, data, reason, command):
    config = _one_bad_input(tmp_path, name, data)
    result = CliRunner().invoke(main, [command, str(config), "-q"])
    assert result.exit_code == 1
    assert (f"{config}:11: inputs[1].path: {name}: {reason}; if this export may be empty, "
            "set allow_empty = true for it") in result.output
    assert not (tmp_path / "out" / "report.html").exists()


def test_an_input_allowed_to_be_empty_shows_in_the_file_table_with_zero(tmp_path):
    config = _one_bad_input(tmp_path, "export.csv", b"title,abstract,year\n", extra="allow_empty = true\n")
    result = CliRunner().invoke(main, ["intake", str(config), "-q"])
    assert result.exit_code == 0, result.output
    row = next(line for line in result.output.splitlines() if line.startswith("export.csv"))
    assert row.split() == ["export.csv", "0", "0", "0", "0"]


def test_utf16_without_byte_order_mark_is_read(tmp_path):
    data = "title,abstract,year\nMoor café,Peat and water.,2025\n".encode("utf-16-le")
    config = _one_bad_input(tmp_path, "export.csv", data)
    result = CliRunner().invoke(main, ["intake", str(config), "-q"])
    assert result.exit_code == 0, result.output
    assert "export.csv: no byte-order mark; read as UTF-16-LE" in result.output
    row = next(line for line in result.output.splitlines() if line.startswith("export.csv"))
    assert row.split()[:3] == ["export.csv", "1", "1"]


# --- intake finds what build would reject, before the model loads ---------------------------


@pytest.mark.parametrize("command", ["intake", "build"])
def test_missing_theme_and_bad_review_rows_are_found_by_intake_and_before_scoring(tmp_path, command):
    config = _years_project(tmp_path, 2025, "2024", extra='theme = "no-such-theme"\n')
    result = CliRunner().invoke(main, [command, str(config), "-q"])
    assert result.exit_code == 1
    assert "report.theme: no theme named 'no-such-theme'" in result.output
    assert "Scored" not in result.output

    config.write_text(config.read_text(encoding="utf-8").replace('theme = "no-such-theme"\n', "")
                      + '\n[validation]\nreview_file = "review.csv"\n', encoding="utf-8")
    (tmp_path / "review.csv").write_text("record_id,goal,decision,note\npubs:1,6,maybe,unsure\n", encoding="utf-8")
    result = CliRunner().invoke(main, [command, str(config), "-q"])
    assert result.exit_code == 1
    assert f"{tmp_path / 'review.csv'}:2: decision: expected include or exclude, got 'maybe'" in result.output
