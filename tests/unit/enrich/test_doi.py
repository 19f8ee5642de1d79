import pytest

from tests.unit.enrich.enrich_frames import record, records
from reporter.enrich.doi import normalise_doi, normalise_dois


@pytest.mark.parametrize(
    "raw, expected",
    [
        ("10.1234/ABC.def", "10.1234/abc.def"),
        ("https://doi.org/10.1234/abc", "10.1234/abc"),
        ("http://dx.doi.org/10.1234/abc", "10.1234/abc"),
        ("doi:10.1234/abc", "10.1234/abc"),
        ("DOI: 10.1234/abc.", "10.1234/abc"),
        ("  10.1234/abc;  ", "10.1234/abc"),
        ("https://doi.org/10.1234%2Fabc", "10.1234/abc"),
        ("10.5555/wm.2024.(7)", "10.5555/wm.2024.(7)"),  # balanced bracket is part of the DOI
        ("(10.5555/wm.7)", ""),  # an unbalanced opener at the front is not a DOI start
        ("10.5555/wm.7)", "10.5555/wm.7"),
        ("10.1234.5/abc", "10.1234.5/abc"),
    ],
)
def test_normalise_doi_strips_prefixes_case_and_punctuation(raw, expected):
    assert normalise_doi(raw) == expected


@pytest.mark.parametrize("raw", ["", "not a doi", "10.12/abc", "10.1234/", "https://example.org/x", None, 12])
def test_normalise_doi_gives_empty_for_non_dois(raw):
    assert normalise_doi(raw) == ""


def test_normalise_dois_returns_new_frame_and_names_unrecognised():
    frame = records(
        record("a:1", doi="https://doi.org/10.1234/X"),
        record("a:2", doi="see library"),
        record("a:3", doi=""),
    )
    out, unrecognised = normalise_dois(frame)
    assert list(out["doi"]) == ["10.1234/x", "", ""]
    assert unrecognised == ("a:2",)
    assert frame.loc[0, "doi"] == "https://doi.org/10.1234/X", "input frame must not change"
