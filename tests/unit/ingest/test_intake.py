"""read_inputs: record table and intake log, set-aside rules, ids, and input errors."""

from __future__ import annotations

from pathlib import Path

import pytest

from reporter.config import InputConfig, LimitsConfig
from reporter.errors import InputError
from reporter.ingest import read_inputs
from reporter.ingest.intake import build_intake, parse_year
from reporter.records import FUNDING_COLUMNS, INTAKE_LOG_COLUMNS, RECORD_COLUMNS, RawEntry, ReadResult, Rejected


def _intake(data_dir: Path, names: list[str], years=(2020, 2021), **limits):
    inputs = tuple(InputConfig(path=Path(name)) for name in names)
    return read_inputs(inputs, years, LimitsConfig(**limits), data_dir)


ALL_FILES = ["sample.bib", "broken.bib", "sample.ris", "broken.ris", "sample.csv", "ragged.csv", "tabs.tsv"]


def test_columns_are_exactly_the_documented_ones(data_dir) -> None:
    result = _intake(data_dir, ALL_FILES)
    assert tuple(result.records.columns) == (*RECORD_COLUMNS, *FUNDING_COLUMNS)
    assert tuple(result.log.columns) == INTAKE_LOG_COLUMNS


def test_counts_reconcile_per_file(data_dir) -> None:
    result = _intake(data_dir, ALL_FILES)
    log = result.log
    for name, group in log.groupby("source_file"):
        kept = int((group["status"] == "kept").sum())
        assert kept == int((result.records["source_file"] == name).sum()), "every kept log row is a record"
    assert len(log) == (log["status"] == "kept").sum() + (log["status"] == "set_aside").sum()
    assert len(result.records) == (log["status"] == "kept").sum()
    assert log["record_id"].is_unique and result.records["record_id"].is_unique


def test_set_aside_reasons(data_dir) -> None:
    log = _intake(data_dir, ALL_FILES).log.set_index("record_id")
    assert log.loc["sample:rec2", ["status", "reason"]].tolist() == ["set_aside", "outside the configured years (2019)"]
    assert log.loc["broken:unclosed", "reason"].startswith("unparseable entry at line 22: ")
    assert log.loc["ragged:line3", "reason"] == "unparseable entry at line 3: row has 4 cells, header has 3"
    assert log.loc["broken:line7", "reason"] == "unparseable entry at line 7: record does not start with a TY tag"


def test_kept_records_carry_flags_and_parsed_values(data_dir) -> None:
    result = _intake(data_dir, ALL_FILES)
    log = result.log.set_index("record_id")
    assert log.loc["sample:heath2021salt", "flags"] == ""
    assert log.loc["broken:twice", "flags"] == "no_abstract;duplicate_key"
    records = result.records.set_index("record_id")
    grid = records.loc["sample:orla2020grid"]
    assert grid["year"] == 2020, '"2020a" is read as 2020'
    assert grid["abstract"] == "" and not grid["has_abstract"]
    assert grid["authors"] == ("Quennell, Orla", "Jr, Tamsin", "Dunmore, III, Piet")
    assert records.loc["sample:heath2021salt", "has_abstract"]
    assert records.loc["sample:kh-10", "keywords"] == ("flood", "mapping")


def test_cut_fields_are_flagged(tmp_path) -> None:
    (tmp_path / "long.csv").write_text("Title,Abstract,Year\nPeat," + "word " * 40 + ",2021\n")
    result = _intake(tmp_path, ["long.csv"], max_field_length=100)
    assert result.log["flags"].tolist() == ["cut:abstract"]
    assert len(result.records.loc[0, "abstract"]) <= 100


@pytest.mark.parametrize(
    ("text", "year"),
    [("2021", 2021), ("2025a", 2025), ("12/03/2019", 2019), ("20210301", 2021), ("vol 12, 1850, 1999", 1999),
     ("in press", None), ("forthcoming", None), ("", None), (None, None), ("3021", None)],
)
def test_parse_year(text, year) -> None:
    assert parse_year(text) == year


def _entry(native_id: str, **fields: object) -> RawEntry:
    return RawEntry("a/x.bib", 1, "bibtex", native_id, dict(fields))


def test_year_and_title_rules_in_order() -> None:
    result = ReadResult(
        "a/x.bib",
        "bibtex",
        (
            _entry("no-title", year="2021"),
            _entry("in-press", title="T", year="in press"),
            _entry("old", title="T", year="2019"),
            _entry("fine", title="T", year="2021", abstract="A"),
        ),
        (Rejected("a/x.bib", 9, None, "unparseable entry at line 9: broken"),),
    )
    log = build_intake([result], (2020, 2021)).log
    assert log["reason"].tolist() == [
        "no title", "no usable year", "outside the configured years (2019)", "", "unparseable entry at line 9: broken",
    ]
    assert log["record_id"].tolist() == ["x:no-title", "x:in-press", "x:old", "x:fine", "x:line9"]


def test_record_ids_are_unique_across_files_with_the_same_stem() -> None:
    first = ReadResult("a/pubs.bib", "bibtex", (_entry("k", title="T", year="2021"),), ())
    second = ReadResult("b/pubs.bib", "bibtex", (_entry("k", title="U", year="2021"),), ())
    records = build_intake([first, second], (2021,)).records
    assert records["record_id"].tolist() == ["pubs:k", "pubs:k~2"]


def test_source_file_is_relative_to_the_config_folder(data_dir) -> None:
    result = read_inputs((InputConfig(path=data_dir / "tabs.tsv"),), (2021,), LimitsConfig(), data_dir.parent)
    assert set(result.log["source_file"]) == {"ingest/tabs.tsv"}


def test_missing_file_names_the_file_and_key(tmp_path) -> None:
    (tmp_path / "here.bib").write_text("@article{a, title={T}, year=2021}\n")
    with pytest.raises(InputError) as caught:
        _intake(tmp_path, ["here.bib", "gone.ris"])
    assert str(caught.value) == f"{tmp_path / 'gone.ris'}: inputs[1].path: file not found"


def test_folder_instead_of_file(tmp_path) -> None:
    (tmp_path / "exports").mkdir()
    with pytest.raises(InputError) as caught:
        _intake(tmp_path, ["exports"])
    assert str(caught.value) == (
        f"{tmp_path / 'exports'}: inputs[0].path: not a file (a folder?); give the path of an export file"
    )


def test_unknown_format_asks_for_the_format_key(tmp_path) -> None:
    (tmp_path / "notes.txt").write_text("nothing structured here\n")
    with pytest.raises(InputError) as caught:
        _intake(tmp_path, ["notes.txt"])
    assert str(caught.value) == (
        f"{tmp_path / 'notes.txt'}: inputs[0].format: cannot tell the format from the file name or content; "
        'set format = "bibtex", "ris" or "csv"'
    )


def test_reader_problem_is_put_under_its_input(tmp_path) -> None:
    (tmp_path / "a.csv").write_text("Title,Year\nA,2021\n")
    inputs = (InputConfig(path=Path("a.csv"), columns={"doi": "DOI Link"}),)
    with pytest.raises(InputError) as caught:
        read_inputs(inputs, (2021,), LimitsConfig(), tmp_path)
    assert caught.value.problems[0].key == "inputs[0].columns.doi"


def test_binary_file_gives_no_records_and_a_warning(tmp_path) -> None:
    (tmp_path / "junk.csv").write_bytes(bytes(range(256)) * 8)
    result = _intake(tmp_path, ["junk.csv"])
    assert len(result.log) == 0 and len(result.records) == 0
    assert result.warnings == ("junk.csv: file does not look like text (binary content); nothing read",)


def test_unknown_encoding_is_an_input_error(tmp_path) -> None:
    (tmp_path / "a.csv").write_text("Title,Year\nA,2021\n")
    inputs = (InputConfig(path=Path("a.csv"), encoding="latin-99"),)
    with pytest.raises(InputError) as caught:
        read_inputs(inputs, (2021,), LimitsConfig(), tmp_path)
    assert str(caught.value) == (
        f"{tmp_path / 'a.csv'}: inputs[0].encoding: unknown encoding 'latin-99'; try \"utf-8\", \"utf-16\" or \"cp1252\""
    )


def test_delimiter_of_more_than_one_character_is_an_input_error(tmp_path) -> None:
    (tmp_path / "a.csv").write_text("Title,Year\nA,2021\n")
    inputs = (InputConfig(path=Path("a.csv"), delimiter=";;"),)
    with pytest.raises(InputError) as caught:
        read_inputs(inputs, (2021,), LimitsConfig(), tmp_path)
    assert str(caught.value) == (
        f"{tmp_path / 'a.csv'}: inputs[0].delimiter: expected one character such as \",\", \";\" or \"\\t\", got ';;'"
    )
