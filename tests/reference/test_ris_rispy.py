"""Our RIS reader against rispy, the reference RIS library, on tests/data/ingest/reference.ris.

Source: rispy 0.10 `rispy.load` (its TAG_KEY_MAPPING follows the RIS format specification).
Where rispy keeps tags apart (TI/T1, AU/A1, PY/Y1, AB/N2, JO/T2), our reader merges them into
one field; the comparison merges rispy's keys the same way.
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest
import rispy

from reporter.config import InputConfig
from reporter.ingest.ris import read_ris

DATA = Path(__file__).resolve().parents[1] / "data" / "ingest" / "reference.ris"


def _reference() -> list[dict]:
    with DATA.open(encoding="utf-8") as handle:
        return rispy.load(handle)


def _ours():
    return read_ris(DATA, DATA.name, InputConfig(path=DATA), 20000).entries


def _first(record: dict, *keys: str) -> str:
    return next(str(record[k]) for k in keys if record.get(k))


def test_same_number_of_records() -> None:
    """Source: rispy.load."""
    assert len(_ours()) == len(_reference()) == 2


@pytest.mark.parametrize("index", [0, 1])
def test_fields_agree_with_rispy(index: int) -> None:
    """Source: rispy.load; title TI/T1, authors AU/A1, year PY/Y1, abstract AB/N2, venue T2/JO."""
    ours = _ours()[index].fields
    ref = _reference()[index]
    assert ours["title"] == _first(ref, "title", "primary_title")
    assert list(ours["authors"]) == ref.get("first_authors", []) + ref.get("authors", [])
    assert ours["year"] == _first(ref, "year", "publication_year")
    assert ours["doi"] == ref["doi"]
    assert ours["abstract"] == _first(ref, "abstract", "notes_abstract")
    assert list(ours["keywords"]) == ref["keywords"]
    assert ours["venue"] == _first(ref, "secondary_title", "journal_name")
    assert ours["doc_type"] == ref["type_of_reference"]


def test_editors_are_not_authors() -> None:
    """Source: rispy maps A2 to secondary_authors, apart from authors (RIS specification: A2 secondary author)."""
    ref = _reference()[0]
    assert ref["secondary_authors"] == ["Editorson, Edda"]
    assert not any(re.search("Editorson", a) for a in _ours()[0].fields["authors"])
