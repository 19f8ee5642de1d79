"""Decoding of whole files and the cleaning every field value gets."""

from __future__ import annotations

import codecs

import pytest
from hypothesis import given
from hypothesis import strategies as st

from reporter.ingest.text import clean_value, cut, decode_bytes

TEXT = "Title;Année\r\nMoor café;2021\n"


@pytest.mark.parametrize(
    ("data", "codec"),
    [
        (codecs.BOM_UTF8 + TEXT.encode("utf-8"), "utf-8"),
        (codecs.BOM_UTF16_LE + TEXT.encode("utf-16-le"), "utf-16-le"),
        (codecs.BOM_UTF16_BE + TEXT.encode("utf-16-be"), "utf-16-be"),
        (TEXT.encode("utf-8"), "utf-8"),
    ],
)
def test_byte_order_marks_and_utf8_decode_without_warnings(data: bytes, codec: str) -> None:
    decoded = decode_bytes(data)
    assert decoded.text == "Title;Année\nMoor café;2021\n"
    assert decoded.encoding == codec
    assert decoded.warnings == ()


def test_cp1252_is_the_fallback_and_says_so() -> None:
    decoded = decode_bytes(TEXT.encode("cp1252"))
    assert decoded.text == "Title;Année\nMoor café;2021\n"
    assert decoded.encoding == "cp1252"
    assert decoded.warnings == ("decoded as cp1252 after UTF-8 failed",)


def test_configured_encoding_is_used_and_bad_bytes_are_reported() -> None:
    data = "Année of the long wet winter on the upland bogs\n".encode("latin-1")
    decoded = decode_bytes(data, encoding="utf-8")
    assert decoded.text == "Ann\ufffde of the long wet winter on the upland bogs\n"
    assert decoded.warnings == ("bytes not valid utf-8 (first at byte 3); replaced with U+FFFD",)


@pytest.mark.parametrize("codec", ["utf-16-le", "utf-16-be"])
def test_utf16_without_byte_order_mark_is_read_and_said(codec: str) -> None:
    """Issue 15: such a file was called binary and lost. Python's codecs are the reference encoding."""
    decoded = decode_bytes(TEXT.encode(codec))
    assert decoded.text == "Title;Année\nMoor café;2021\n"
    assert decoded.encoding == codec
    assert decoded.warnings == (f"no byte-order mark; read as {codec.upper()} (every other byte is zero)",)


def test_binary_content_yields_no_text_and_a_warning() -> None:
    decoded = decode_bytes(bytes(range(256)) * 4)
    assert decoded.text == ""
    assert decoded.warnings == ("file does not look like text (binary content); nothing read",)


def test_mixed_line_endings_become_lf() -> None:
    assert decode_bytes(b"a\r\nb\rc\nd").text == "a\nb\nc\nd"


def test_clean_value_strips_invisible_characters_and_folds_whitespace() -> None:
    raw = "  Peat\u200b bogs\u00ad and\tfens\x07\n  in  winter \ufeff"
    assert clean_value(raw) == "Peat bogs and fens in winter"


def test_clean_value_keeps_paragraph_breaks_only_when_asked() -> None:
    raw = "First line\nwrapped here.\n\n  Second paragraph. "
    assert clean_value(raw, keep_paragraphs=True) == "First line wrapped here.\nSecond paragraph."
    assert clean_value(raw) == "First line wrapped here. Second paragraph."


def test_clean_value_composes_accents() -> None:
    assert clean_value("Cafe\u0301") == "Caf\u00e9"


def test_cut_reports_whether_it_cut() -> None:
    assert cut("abcdef", 10) == ("abcdef", False)
    assert cut("abc def", 4) == ("abc", True)


@given(st.text(alphabet=st.characters(codec=None), max_size=40))
def test_clean_value_drops_exactly_the_invisible_categories(raw: str) -> None:
    """Unicode general categories (unicodedata): no Cc/Cf/Cs/Co/Cn character survives, every other
    one does, whether or not the text takes the printable fast path."""
    import unicodedata

    dropped = {"Cc", "Cf", "Cs", "Co", "Cn"}
    cleaned = clean_value(raw, keep_paragraphs=True)
    assert not any(unicodedata.category(ch) in dropped and ch not in "\n\t" for ch in cleaned)
    composed = unicodedata.normalize("NFC", raw)
    kept = [ch for ch in composed if unicodedata.category(ch) not in dropped and not ch.isspace()]
    assert [ch for ch in cleaned if not ch.isspace()] == kept
