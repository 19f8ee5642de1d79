"""Format from the file extension first, then from the content."""

from __future__ import annotations

import pytest

from reporter.ingest.formats import guess_format, guess_format_from_text


@pytest.mark.parametrize(
    ("name", "expected"),
    [("a.bib", "bibtex"), ("a.BibTeX", "bibtex"), ("a.ris", "ris"), ("a.csv", "csv"), ("a.tsv", "csv")],
)
def test_extension_decides_without_reading(tmp_path, name, expected) -> None:
    path = tmp_path / name
    path.write_text("TY  - JOUR\n")  # content that would say RIS: the extension wins
    assert guess_format(path) == expected


@pytest.mark.parametrize(
    ("text", "expected"),
    [
        ("\n\nTY  - JOUR\nTI  - x\nER  - \n", "ris"),
        ("% comment\n@Article{k,\n title={x}}\n", "bibtex"),
        ("Title\tYear\nx\t2021\n", "csv"),
        ("just some words\n", None),
        ("", None),
    ],
)
def test_content_decides_for_other_extensions(tmp_path, text, expected) -> None:
    path = tmp_path / "export.txt"
    path.write_text(text)
    assert guess_format(path) == expected
    assert guess_format_from_text(text) == expected
