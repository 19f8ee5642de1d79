"""LaTeX decodings kept in the cache file: a rebuild reads the same entries without decoding again."""

from __future__ import annotations

import sqlite3

from bibtexparser.middlewares import LatexDecodingMiddleware

from reporter.ingest.latex_memo import LatexMemo, remembered_latex


def _entries(read, data_dir, cache=None):
    with remembered_latex(cache):
        return read("bibtex", data_dir / "sample.bib").entries


def test_a_remembered_decoding_is_the_decoding_done_afresh(read, data_dir, tmp_path, monkeypatch):
    fresh = _entries(read, data_dir)
    cache = tmp_path / "cache.sqlite"
    assert _entries(read, data_dir, cache) == fresh, "the first read with a memo decodes every value"
    with sqlite3.connect(cache) as db:
        assert db.execute("SELECT COUNT(*) FROM latex").fetchone()[0] > 0

    def refuse(self, value):
        raise AssertionError(f"{value!r} was decoded again although it was decoded before")

    monkeypatch.setattr(LatexDecodingMiddleware, "_transform_python_value_string", refuse)
    assert _entries(read, data_dir, cache) == fresh


def test_another_decoder_does_not_read_what_one_stored(tmp_path):
    path = tmp_path / "cache.sqlite"
    memo = LatexMemo(path, "decoder-1")
    assert memo.decoded("50\\%", lambda v: ("50%", "")) == ("50%", "")
    memo.close()
    again, other = LatexMemo(path, "decoder-1"), LatexMemo(path, "decoder-2")
    try:
        assert again.decoded("50\\%", lambda v: ("not decoded", "")) == ("50%", "")
        assert other.decoded("50\\%", lambda v: ("decoded anew", "")) == ("decoded anew", "")
    finally:
        again.close()
        other.close()


def test_an_error_is_kept_with_the_value_as_given(tmp_path):
    path = tmp_path / "cache.sqlite"
    memo = LatexMemo(path, "d")
    memo.decoded("{broken", lambda v: (v, "unbalanced brace"))
    memo.close()
    again = LatexMemo(path, "d")
    try:
        assert again.decoded("{broken", lambda v: ("", "")) == ("{broken", "unbalanced brace")
    finally:
        again.close()
