"""RIS reader on tests/data/ingest/sample.ris and broken.ris. Tags per the RIS format specification."""

from __future__ import annotations

from reporter.records import Rejected


def test_tags_map_to_fields(read, data_dir) -> None:
    entry = read("ris", data_dir / "sample.ris").entries[0]
    assert (entry.native_id, entry.source_line) == ("kh-001", 1)
    assert entry.fields == {
        "title": "Groundwater Recharge in Upland Peat",
        "abstract": "Peat soils hold water. The recharge rate was measured over two winters.",
        "year": "2021",
        "doi": "10.5555/kh.2021.001",
        "doc_type": "JOUR",
        "venue": "Kestrel Journal of Water",
        "language": "en",
        "url": "https://example.org/kh-001",
        "issn": "1234-5678",
        "keywords": ("peat", "groundwater"),
        # A2 (secondary author: the editor) is not an author of the work
        "authors": ("Brennock, Saoirse", "Veldkamp, Joris"),
        "affiliations": ("Department of Geography, Kestrel Heath University, Ireland",),
    }
    assert entry.notes == ()


def test_record_without_id_gets_a_position_label_and_y1_year(read, data_dir) -> None:
    entry = read("ris", data_dir / "sample.ris").entries[1]
    assert (entry.native_id, entry.source_line) == ("rec2", 21)
    assert entry.fields["year"] == "2019///"
    assert entry.fields["venue"] == "Heathland Energy Notes"


def test_record_without_type_is_rejected_and_unclosed_record_counts(read, data_dir) -> None:
    result = read("ris", data_dir / "broken.ris")
    assert result.rejected == (
        Rejected("broken.ris", 7, None, "unparseable entry at line 7: record does not start with a TY tag"),
    )
    last = result.entries[-1]
    assert (last.native_id, last.source_line, last.notes) == ("cut-off", 11, ("no_end_tag",))
    # PY says "in press"; the first year tag with a four-digit year is used
    assert last.fields["year"] == "2022/03/01"
    assert result.n_read == 3


def test_new_type_tag_before_end_tag_closes_the_record(read, tmp_path) -> None:
    path = tmp_path / "noer.ris"
    path.write_text("TY  - JOUR\nTI  - First\nTY  - JOUR\nTI  - Second\nER  - \n")
    result = read("ris", path)
    assert [(e.fields["title"], e.notes) for e in result.entries] == [
        ("First", ("no_end_tag",)),
        ("Second", ()),
    ]


def test_mixed_line_endings_and_tag_without_trailing_space(read, tmp_path) -> None:
    path = tmp_path / "mixed.ris"
    path.write_bytes(b"TY  - JOUR\r\nTI  - Bog Water\rPY  -2021\nAU  - Holt, B.\r\nER  -\r\n")
    entry = read("ris", path).entries[0]
    assert entry.fields["title"] == "Bog Water"
    assert entry.fields["year"] == "2021"
    assert entry.fields["authors"] == ("Holt, B.",)
    assert entry.notes == ()


def test_utf16_file_with_bom(read, tmp_path) -> None:
    path = tmp_path / "wide.ris"
    path.write_text("TY  - JOUR\nTI  - Tourbières du Nord\nER  - \n", encoding="utf-16")
    result = read("ris", path)
    assert result.entries[0].fields["title"] == "Tourbières du Nord"
    assert result.warnings == ()
