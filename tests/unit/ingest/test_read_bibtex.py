"""BibTeX reader on tests/data/ingest/sample.bib and broken.bib (faults at known lines)."""

from __future__ import annotations

from reporter.records import Rejected


def _by_id(result):
    return {entry.native_id: entry for entry in result.entries}


def test_fields_are_decoded_and_mapped(read, data_dir) -> None:
    result = read("bibtex", data_dir / "sample.bib")
    entry = _by_id(result)["heath2021salt"]
    assert entry.source_line == 6
    assert entry.fields["title"] == "Salt Marsh Carbon & Tidal Flow: a \u201cField\u201d Study"
    # @string expansion with # concatenation
    assert entry.fields["venue"] == "Kestrel Journal of Water (Series B)"
    assert entry.fields["year"] == "2021"
    # the bare "%" is a percent sign, and the blank line is kept as a paragraph break
    assert entry.fields["abstract"] == "Tidal marshes store carbon.\nSome 40% of the sampled sites lost sediment."
    assert entry.fields["keywords"] == ("wetlands", "carbon storage, blue carbon", "coasts")
    assert entry.fields["affiliations"] == (
        "School of Earth Sciences, Kestrel Heath University, Ireland",
        "Coastal Institute, Porto, Portugal",
    )
    assert entry.fields["departments"] == ("Earth Sciences",)
    assert entry.fields["orcids"] == ("0000-0002-1825-0097",)
    assert entry.fields["doi"] == "10.5555/KJW.2021_014"
    assert entry.fields["url"] == "https://example.org/~heath/salt"
    assert entry.fields["doc_type"] == "article"
    assert entry.fields["language"] == "English"
    assert entry.fields["issn"] == "1234-5678"


def test_authors_are_last_first_with_accents_decoded_and_others_dropped(read, data_dir) -> None:
    entry = _by_id(read("bibtex", data_dir / "sample.bib"))["heath2021salt"]
    assert entry.fields["authors"] == ("Müller-Ravn, Ide", "van der Holt, Brann", "Kestrel Coastal Lab")


def test_quoted_values_and_booktitle_venue(read, data_dir) -> None:
    entry = _by_id(read("bibtex", data_dir / "sample.bib"))["orla2020grid"]
    assert entry.fields["authors"] == ("Quennell, Orla", "Jr, Tamsin", "Dunmore, III, Piet")
    assert entry.fields["venue"] == "Proceedings of the Heathland Energy Workshop"
    assert entry.fields["year"] == "2020a"
    assert entry.fields["doc_type"] == "inproceedings"


def test_comments_preambles_and_strings_are_not_records(read, data_dir) -> None:
    result = read("bibtex", data_dir / "sample.bib")
    assert [e.native_id for e in result.entries] == ["heath2021salt", "orla2020grid"]
    assert result.rejected == ()


def test_unclosed_entry_is_rejected_with_its_line(read, data_dir) -> None:
    result = read("bibtex", data_dir / "broken.bib")
    assert result.rejected == (
        Rejected(
            "broken.bib",
            22,
            "unclosed",
            "unparseable entry at line 22: Unexpected block start: `@article`. "
            "Was still looking for field-value closing `}` (noticed at line 26)",
        ),
    )
    assert "after" in _by_id(result), "the entry after the broken one is still read"
    assert result.n_read == 6


def test_duplicate_keys_keep_both_entries_with_distinct_ids(read, data_dir) -> None:
    entries = _by_id(read("bibtex", data_dir / "broken.bib"))
    assert entries["twice"].fields["title"] == "Shared Key, First"
    assert entries["twice~2"].fields["title"] == "Shared Key, Second"
    assert entries["twice~2"].source_line == 11
    assert entries["twice"].notes == entries["twice~2"].notes == ("duplicate_key",)


def test_repeated_field_keeps_the_first_value(read, data_dir) -> None:
    """BibTeX keeps the first of repeated fields and warns about the rest (from memory)."""
    entry = _by_id(read("bibtex", data_dir / "broken.bib"))["repeat"]
    assert entry.fields["title"] == "Repeated Title Field"
    assert entry.notes == ("repeated_field:title",)


def test_long_fields_are_cut_and_flagged(read, tmp_path) -> None:
    path = tmp_path / "long.bib"
    path.write_text("@article{k, title={Short}, abstract={" + "word " * 100 + "}, year=2021}\n")
    entry = read("bibtex", path, max_field_length=100).entries[0]
    assert len(entry.fields["abstract"]) <= 100
    assert entry.cut_fields == ("abstract",)


def test_entry_without_key_gets_a_line_label(read, tmp_path) -> None:
    path = tmp_path / "nokey.bib"
    path.write_text("\n\n@misc{,\n title = {Anonymous Note},\n year = 2021\n}\n")
    entry = read("bibtex", path).entries[0]
    assert (entry.native_id, entry.source_line) == ("line3", 3)


def test_crlf_file_keeps_line_numbers(read, tmp_path) -> None:
    path = tmp_path / "crlf.bib"
    path.write_bytes(b"% note\r\n\r\n@article{a,\r\n title = {One},\r\n year = 2021\r\n}\r\n")
    assert read("bibtex", path).entries[0].source_line == 3


def test_latin1_bibtex_is_decoded_with_a_warning(read, tmp_path) -> None:
    path = tmp_path / "latin.bib"
    path.write_bytes("@article{a, title = {Tourbière}, year = 2021}\n".encode("cp1252"))
    result = read("bibtex", path)
    assert result.entries[0].fields["title"] == "Tourbière"
    assert result.warnings == ("decoded as cp1252 after UTF-8 failed",)


def test_three_entries_with_one_key_and_a_repeated_field(read, tmp_path) -> None:
    path = tmp_path / "thrice.bib"
    path.write_text(
        "@article{k, title={A}, title={A again}, year=2021}\n"
        "@article{k, title={B}, year=2021}\n"
        "@article{k, title={C}, year=2021}\n"
    )
    entries = read("bibtex", path).entries
    assert [(e.native_id, e.fields["title"], e.notes) for e in entries] == [
        ("k", "A", ("repeated_field:title", "duplicate_key")),
        ("k~2", "B", ("duplicate_key",)),
        ("k~3", "C", ("duplicate_key",)),
    ]
