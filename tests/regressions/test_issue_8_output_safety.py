"""Issue #8, output side: formula cells in CSV exports, writes outside the output folder, logo URLs."""

from __future__ import annotations

import csv
import io
from pathlib import Path

import pandas as pd
import pytest

from reporter.config import InputConfig, LimitsConfig, load_config
from reporter.errors import ConfigError, OutputError
from reporter.ingest import read_inputs
from reporter.render.atomic import ensure_inside, write_text_atomic
from reporter.render.exports import frame_to_csv, neutralise_cell, write_csv, write_intake_log

HOSTILE = Path(__file__).resolve().parents[1] / "data" / "hostile"


def _rows(text: str) -> list[list[str]]:
    return list(csv.reader(io.StringIO(text)))


def test_formula_cells_from_an_input_are_prefixed_in_csv_exports(tmp_path) -> None:
    """Source: OWASP "CSV Injection" -- cells starting with = + - @ (or tab, CR) are evaluated."""
    intake = read_inputs((InputConfig(path=Path("formulas.csv")),), (2021,), LimitsConfig(), HOSTILE)
    table = intake.records.loc[:, ["title", "authors", "keywords", "venue", "year"]]
    written = write_csv(table, tmp_path / "records.csv", root=tmp_path)
    rows = _rows(written.read_text(encoding="utf-8"))
    assert rows[1:] == [
        ["'=HYPERLINK(\"http://kestrel.invalid/x\",\"Open\")", "Aldous, Wren", "peat", "Kestrel Vale Journal", "2021"],
        ["'+cmd|' /C calc'!A0", "Pell, Corin", "'-2+3", "Kestrel Vale Journal", "2021"],
        # Several authors are joined with "; ", so only a formula in the first position starts the cell.
        ["'@SUM(1+1)*cmd|' /C calc'!A0", "'=1+1; Pell, Corin", "-2", "-3.5", "2021"],
    ]


def test_intake_log_export_neutralises_titles(tmp_path) -> None:
    intake = read_inputs((InputConfig(path=Path("formulas.csv")),), (2021,), LimitsConfig(), HOSTILE)
    rows = _rows(write_intake_log(intake.log, tmp_path).read_text(encoding="utf-8"))
    title = rows[0].index("title")
    assert [row[title] for row in rows[1:]] == [
        "'=HYPERLINK(\"http://kestrel.invalid/x\",\"Open\")", "'+cmd|' /C calc'!A0", "'@SUM(1+1)*cmd|' /C calc'!A0",
    ]


@pytest.mark.parametrize(
    ("cell", "safe"),
    [("-2", "-2"), ("+1.5e3", "+1.5e3"), ("-.5", "-.5"), ("-inf", "'-inf"), ("-nan", "'-nan"), ("-1_0", "'-1_0"),
     ("\t=1", "'\t=1"), ("plain", "plain"), (3, 3)],
)
def test_only_plain_signed_numbers_escape_the_prefix(cell, safe) -> None:
    """Source: OWASP "CSV Injection"; a spreadsheet reads "-inf" as a formula naming "inf" (from memory)."""
    assert neutralise_cell(cell) == safe


def test_formula_in_a_frame_built_here_is_prefixed() -> None:
    text = frame_to_csv(pd.DataFrame({"note": ["=cmd", "ok"], "n": [1, 2]}))
    assert _rows(text) == [["note", "n"], ["'=cmd", "1"], ["ok", "2"]]


def test_write_outside_the_output_folder_is_refused(tmp_path) -> None:
    out = tmp_path / "output"
    with pytest.raises(OutputError) as caught:
        write_csv(pd.DataFrame({"a": [1]}), out / ".." / "escaped.csv", root=out)
    assert str(caught.value) == (
        f"{out / '..' / 'escaped.csv'}: report.output: refusing to write {tmp_path / 'escaped.csv'}: "
        f"it is not inside the output folder {out}"
    )
    assert not (tmp_path / "escaped.csv").exists() and not out.exists(), "nothing is created before the check"


def test_symlink_out_of_the_output_folder_is_refused(tmp_path) -> None:
    out, elsewhere = tmp_path / "output", tmp_path / "elsewhere"
    out.mkdir()
    elsewhere.mkdir()
    (out / "data").symlink_to(elsewhere, target_is_directory=True)
    with pytest.raises(OutputError):
        write_text_atomic(out / "data" / "report.html", "<p>x</p>", root=out)
    assert list(elsewhere.iterdir()) == []


def test_paths_inside_the_output_folder_are_written(tmp_path) -> None:
    out = tmp_path / "output"
    assert ensure_inside(out, out / "data" / ".." / "report.html") == (out / "report.html").resolve()
    written = write_text_atomic(out / "data" / "findings.json", "{}\n", root=out)
    assert written.read_text() == "{}\n"
    with pytest.raises(OutputError):
        ensure_inside(out, out)  # the folder itself is not a file inside it


def test_logo_given_as_url_is_refused(tmp_path) -> None:
    (tmp_path / "pubs.bib").write_text("@article{a, title={T}, year=2021}\n")
    config = tmp_path / "waymark.toml"
    config.write_text(
        '[report]\ninstitution = "Kestrel Vale University"\nhome_country = "IE"\nreporting_year = 2021\n'
        'logo = "https://kestrel.invalid/logo.png"\n\n[[inputs]]\npath = "pubs.bib"\n'
    )
    with pytest.raises(ConfigError) as caught:
        load_config(config)
    assert str(caught.value) == (
        f"{config}:5: report.logo: expected a local image file, got the URL "
        "'https://kestrel.invalid/logo.png'; download it and give its path"
    )
