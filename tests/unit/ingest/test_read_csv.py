"""CSV reader: header guessing, delimiters, encodings, ragged rows at known lines."""

from __future__ import annotations

import pytest

from reporter.errors import InputError
from reporter.records import Rejected


def test_usual_headers_are_recognised(read, data_dir) -> None:
    result = read("csv", data_dir / "sample.csv")
    first, second = result.entries
    assert (first.native_id, first.source_line) == ("kh-10", 2)
    assert first.fields == {
        "title": "Flood Maps for Small Towns",
        "abstract": "Maps were drawn.\nA second paragraph.",
        "year": "2021",
        "doi": "10.5555/kh.10",
        "doc_type": "Article",
        "venue": "Kestrel Journal of Water",
        "language": "English",
        "keywords": ("flood", "mapping"),
        "authors": ("Holt, B.", "Quennell, O."),
        "affiliations": ("Kestrel Heath University, Ireland",),
        "departments": ("Geography",),
        "orcids": ("0000-0002-1825-0097",),
    }
    # the first row's abstract spans three physical lines
    assert (second.native_id, second.source_line) == ("kh-11", 5)
    assert "abstract" not in second.fields


def test_ragged_rows_are_rejected_with_line_and_cell_counts(read, data_dir) -> None:
    result = read("csv", data_dir / "ragged.csv")
    assert result.rejected == (
        Rejected("ragged.csv", 3, None, "unparseable entry at line 3: row has 4 cells, header has 3"),
        Rejected("ragged.csv", 6, None, "unparseable entry at line 6: row has 2 cells, header has 3"),
    )
    assert [(e.native_id, e.source_line) for e in result.entries] == [("r1", 2), ("r3", 4), ("r5", 7)]


@pytest.mark.parametrize("name", ["semicolon.csv", "tabs.tsv"])
def test_delimiter_is_sniffed(read, data_dir, name) -> None:
    result = read("csv", data_dir / name)
    assert len(result.entries) == 2
    assert result.rejected == ()


def test_semicolon_file_keeps_commas_inside_titles(read, data_dir) -> None:
    entry = read("csv", data_dir / "semicolon.csv").entries[0]
    assert entry.fields["title"] == "Cheese Rind Microbes, Revisited"
    assert entry.fields["authors"] == ("Brennock, S.",)


def test_configured_delimiter_overrides_sniffing(read, tmp_path) -> None:
    path = tmp_path / "pipes.csv"
    path.write_text("Title|Year\nFens, Bogs; Marshes|2021\n")
    entry = read("csv", path, delimiter="|").entries[0]
    assert entry.fields["title"] == "Fens, Bogs; Marshes"


@pytest.mark.parametrize("encoding", ["utf-8-sig", "utf-16", "cp1252"])
def test_encodings(read, tmp_path, encoding) -> None:
    path = tmp_path / "enc.csv"
    path.write_bytes("Title,Year\nTourbières et marais,2021\n".encode(encoding))
    result = read("csv", path)
    assert result.entries[0].fields["title"] == "Tourbières et marais"
    assert result.entries[0].fields["year"] == "2021", "a byte-order mark must not hide the first header"
    expected = ("decoded as cp1252 after UTF-8 failed",) if encoding == "cp1252" else ()
    assert result.warnings == expected


def test_configured_columns_come_before_guesses(read, tmp_path) -> None:
    path = tmp_path / "custom.csv"
    path.write_text("Heading,Title,Published\nReal Title,Not This,2021\n")
    entry = read("csv", path, columns={"title": "heading", "year": "Published"}).entries[0]
    assert entry.fields["title"] == "Real Title"
    assert entry.fields["year"] == "2021"


def test_configured_column_missing_from_the_file_is_an_input_error(read, tmp_path) -> None:
    path = tmp_path / "custom.csv"
    path.write_text("Title,Year\nA,2021\n")
    with pytest.raises(InputError) as caught:
        read("csv", path, columns={"abstract": "Summary Text"})
    assert str(caught.value) == f"{path}: columns.abstract: no column headed 'Summary Text'; the headers are: Title, Year"


def test_list_separator_and_row_labels(read, tmp_path) -> None:
    path = tmp_path / "lists.csv"
    path.write_text("Title,Authors,Year\nHedges,\"Holt, B. / Ashgrove, T.\",2021\n")
    entry = read("csv", path, list_separator="/").entries[0]
    assert entry.native_id == "row1"
    assert entry.fields["authors"] == ("Holt, B.", "Ashgrove, T.")


def test_missing_title_column_is_warned(read, tmp_path) -> None:
    path = tmp_path / "notitle.csv"
    path.write_text("Name,Year\nA,2021\n")
    assert read("csv", path).warnings == ("no title column found among the headers: Name, Year",)
