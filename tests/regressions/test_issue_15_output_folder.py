"""Issue 15: a build never writes over what it reads, and a bad output folder is a message, not a traceback.

Each case as a user hits it, through the command line; the config fails before any input is read
or the model loads, so these run without the model.
"""

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
