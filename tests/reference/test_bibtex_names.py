"""BibTeX name forms, read through our BibTeX reader (bibtexparser's splitting + LaTeX decoding).

Source: Oren Patashnik, "BibTeXing" (1988), the section on names (from memory): a name is
written "First von Last", "von Last, First" or "von Last, Jr, First"; the von part is the
lower-case words; in the first form without a von part the last word is the Last part; names
are separated by "and"; "and others" stands for further authors; text in braces is one word
and is not split. The names below are invented; the forms are those of the documentation.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from reporter.config import InputConfig
from reporter.ingest.bibtex import read_bibtex


def _authors(tmp_path: Path, author_field: str) -> tuple[str, ...]:
    path = tmp_path / "names.bib"
    path.write_text("@article{k,\n  author = {" + author_field + "},\n  title = {T},\n  year = 2021\n}\n")
    entry = read_bibtex(path, path.name, InputConfig(path=path), 20000).entries[0]
    return entry.fields.get("authors", ())


@pytest.mark.parametrize(
    ("written", "expected"),
    [
        # "First Last": the last word is the Last part (Patashnik 1988, from memory)
        ("Orla Quennell", "Quennell, Orla"),
        ("Idonea Mairead Farrant-Loes", "Farrant-Loes, Idonea Mairead"),
        # "First von Last": lower-case words form the von part; what follows is Last
        ("Brann van der Holt", "van der Holt, Brann"),
        ("Tomas de la Cuesta Rivas", "de la Cuesta Rivas, Tomas"),
        # "von Last, First"
        ("van der Holt, Brann", "van der Holt, Brann"),
        ("Quennell, Orla", "Quennell, Orla"),
        # "von Last, Jr, First"
        ("van der Holt, Jr., Brann", "van der Holt, Jr., Brann"),
        ("Dunmore, III, Piet", "Dunmore, III, Piet"),
        # braces keep a corporate name whole; accents are LaTeX commands
        ("{Kestrel Heath Water Group}", "Kestrel Heath Water Group"),
        ("{\\'E}lodie Marchetti", "Marchetti, Élodie"),
        ('M{\\"u}ller-Ravn, Ide', "Müller-Ravn, Ide"),
    ],
)
def test_single_name_forms(tmp_path, written, expected) -> None:
    """Source: Patashnik, "BibTeXing" (1988), names (from memory)."""
    assert _authors(tmp_path, written) == (expected,)


def test_and_separates_names_but_not_inside_braces(tmp_path) -> None:
    """Source: Patashnik, "BibTeXing" (1988): "and" separates names; braces protect (from memory)."""
    written = "Orla Quennell and {Heath and Moor Trust} AND van der Holt, Brann"
    assert _authors(tmp_path, written) == ("Quennell, Orla", "Heath and Moor Trust", "van der Holt, Brann")


def test_and_others_is_not_a_person(tmp_path) -> None:
    """Source: Patashnik, "BibTeXing" (1988): "and others" abbreviates the remaining authors (from memory)."""
    assert _authors(tmp_path, "Quennell, Orla and others") == ("Quennell, Orla",)
