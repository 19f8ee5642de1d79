"""Hostile and broken inputs (issue #8): no crash, every record in the intake log with its reason.

The corpus is tests/data/hostile/ (README.md there lists each file's fault and its line).
Large inputs (a 5 MB export, a 100k-character abstract) are generated into tmp_path.
"""

from __future__ import annotations

import codecs
import re
from pathlib import Path

import pytest
from bibtexparser.middlewares import LatexDecodingMiddleware
from hypothesis import given, settings
from hypothesis import strategies as st

from reporter.config import DepartmentConfig, InputConfig, LimitsConfig, ReportConfig
from reporter.enrich import enrich
from reporter.ingest import read_inputs
from reporter.ingest.bibtex_steps import DecodeLatex
from reporter.records import IntakeResult
from reporter.summary import format_intake_summary

HOSTILE = Path(__file__).resolve().parents[2] / "data" / "hostile"
YEARS = (2021,)


def _intake(name: str, folder: Path = HOSTILE, limits: LimitsConfig | None = None, **options) -> IntakeResult:
    return read_inputs((InputConfig(path=Path(name), **options),), YEARS, limits or LimitsConfig(), folder)


def _log(result: IntakeResult) -> dict[str, tuple]:
    """record_id -> (source_line, status, reason, flags)."""
    rows = result.log[["record_id", "source_line", "status", "reason", "flags"]].itertuples(index=False)
    return {r.record_id: (int(r.source_line), r.status, r.reason, r.flags) for r in rows}


def _accounted(result: IntakeResult, n_entries: int) -> None:
    log = result.log
    assert len(log) == n_entries, "one intake-log row per entry in the file"
    assert log["record_id"].is_unique
    assert (log.loc[log["status"] != "kept", "reason"] != "").all(), "every record not kept says why"
    assert int((log["status"] == "kept").sum()) == len(result.records)


# --- BibTeX ------------------------------------------------------------------------------


def test_truncated_bibtex_sets_the_cut_entry_aside_with_its_line() -> None:
    result = _intake("truncated.bib")
    _accounted(result, 3)
    assert _log(result)["truncated:cutoff2021"] == (
        12, "set_aside", "unparseable entry at line 12: Unexpectedly reached end of file. (noticed at line 14)", "",
    )
    assert result.records["record_id"].tolist() == ["truncated:fen2021", "truncated:bog2021"]


def test_unbalanced_braces_name_the_entry_and_the_lines() -> None:
    result = _intake("unbalanced.bib")
    _accounted(result, 3)
    log = _log(result)
    # One brace too many closes the entry early: its year falls outside it, and a warning says why.
    assert log["unbalanced:extra2021"] == (1, "set_aside", "no usable year", "")
    assert result.warnings == (
        "unbalanced.bib: line 2: text after entry extra2021 looks like more of its fields "
        "(a closing brace too many?); it was ignored",
    )
    assert log["unbalanced:missing2021"] == (
        6, "set_aside",
        "unparseable entry at line 6: Unexpected block start: `@article`. "
        "Was still looking for field-value closing `}` (noticed at line 11)",
        "",
    )
    assert log["unbalanced:after2021"][1] == "kept", "the entry after a broken one is still read"


def test_string_preamble_comment_and_crossref() -> None:
    result = _intake("macros.bib")
    _accounted(result, 4)
    records = result.records.set_index("native_id")
    assert "ghost" not in records.index, "an entry inside @comment is not a record"
    assert records.loc["river2021", ["venue", "year"]].tolist() == ["Kestrel Vale Journal of Ecology", 2021]
    # Crossref keys are case-insensitive and the parent may come later (Patashnik 1988).
    assert records.loc["chapter2021", ["venue", "year"]].tolist() == ["Local Energy Futures", 2021]
    assert _log(result)["macros:orphan2021"] == (18, "kept", "", "no_abstract;crossref_not_found:nowhere2021")


def test_duplicate_keys_keep_every_entry_and_merge_only_the_same_work() -> None:
    intake = _intake("duplicate-keys.bib")
    _accounted(intake, 3)
    report = ReportConfig(institution="Kestrel Vale University", home_country="IE", reporting_year=2021)
    log = _log(enrich(intake, report, DepartmentConfig()))
    assert log["duplicate-keys:wetland2021"] == (1, "kept", "", "no_abstract;duplicate_key")
    assert log["duplicate-keys:wetland2021~2"][1:3] == ("kept", "")
    assert log["duplicate-keys:wetland2021~3"][:3] == (
        13, "merged", "duplicate of duplicate-keys:wetland2021 (same title and year)",
    )


def test_missing_in_press_and_suffixed_years() -> None:
    result = _intake("years.bib")
    _accounted(result, 3)
    log = _log(result)
    assert log["years:undated"] == (1, "set_aside", "no usable year", "")
    assert log["years:inpress"] == (5, "set_aside", "no usable year", "")
    assert log["years:suffixed"] == (10, "kept", "", "no_abstract")
    assert result.records.loc[0, "year"] == 2021, '"2021a" is read as 2021'


def _big_bibtex(target_bytes: int) -> tuple[str, int, int]:
    """An invented export of at least `target_bytes`, with one entry left unclosed in the middle.

    Returns (text, number of entries, line of the unclosed entry).
    """
    parts: list[str] = []
    size = line = n = 0
    broken_line = 0
    while size < target_bytes:
        n += 1
        if n == 5000:
            broken_line = line + 1
            entry = f"@article{{broken{n},\n  title = {{Never closed,\n  year = {{2021}}\n\n"
        else:
            # LaTeX markup in one entry of fifty, about what exports with accented names carry.
            accent = "R{\\'e}seau" if n % 50 == 1 else "network"
            entry = (
                f"@article{{k{n},\n  title = {{Peat {n} and the {accent} of upland bogs}},\n"
                "  author = {Aldous, Wren and Pell, Corin},\n  year = {2021},\n"
                f"  abstract = {{{'Water tables rise and fall with the seasons. ' * 8}}}\n}}\n\n"
            )
        parts.append(entry)
        size += len(entry)
        line += entry.count("\n")
    return "".join(parts), n, broken_line


def test_five_megabyte_bibtex_is_read_in_full(tmp_path) -> None:
    text, n_entries, broken_line = _big_bibtex(5 * 1024 * 1024)
    (tmp_path / "big.bib").write_text(text, encoding="utf-8")
    result = _intake("big.bib", tmp_path)
    # The splitter starts afresh at the "@" after the unclosed entry, so no other entry is lost.
    _accounted(result, n_entries)
    set_aside = result.log.loc[result.log["status"] == "set_aside", "reason"].tolist()
    assert set_aside == [f"unparseable entry at line {broken_line}: Unexpected block start: `@article`. "
                         f"Was still looking for field-value closing `}}` (noticed at line {broken_line + 4})"]
    assert result.records.loc[0, "title"] == "Peat 1 and the Réseau of upland bogs"


# Characters the LaTeX fast path may skip; the library's decoder must give the value back unchanged.
PLAIN = st.text(
    alphabet=st.one_of(st.characters(blacklist_categories=("Cs",)), st.sampled_from(list("`'-!?<>\"\n \t"))),
    max_size=60,
)


@settings(max_examples=300, deadline=None)
@given(value=PLAIN)
def test_latex_fast_path_agrees_with_the_library_decoder(value: str) -> None:
    """Source: bibtexparser's LatexDecodingMiddleware (pylatexenc) as the reference decoder."""
    ours, _ = DecodeLatex()._transform_python_value_string(value)
    reference, _ = LatexDecodingMiddleware()._transform_python_value_string(value)
    assert ours == reference


# --- RIS ---------------------------------------------------------------------------------


def test_ris_without_end_tags_keeps_each_record_with_a_note() -> None:
    result = _intake("no-end-tag.ris")
    _accounted(result, 3)
    assert _log(result) == {
        "no-end-tag:ris-1": (1, "kept", "", "no_abstract"),
        "no-end-tag:ris-2": (6, "kept", "", "no_abstract;no_end_tag"),
        "no-end-tag:ris-3": (10, "kept", "", "no_abstract;no_end_tag"),
    }


def test_ris_with_crlf_lf_and_cr_line_endings() -> None:
    data = (HOSTILE / "line-endings.ris").read_bytes()
    assert b"\r\n" in data and re.search(rb"[^\r]\n", data) and re.search(rb"\r[^\n]", data), "corpus file intact"
    result = _intake("line-endings.ris")
    _accounted(result, 3)
    assert [row[0] for row in _log(result).values()] == [1, 6, 11], "line numbers count every kind of line end"
    assert result.records["title"].tolist() == [
        "Wind farms and upland birds", "Solar canopies over car parks", "Tidal lagoons and fish passage",
    ]


# --- CSV ---------------------------------------------------------------------------------


def test_csv_in_cp1252_is_decoded_with_a_warning() -> None:
    result = _intake("cp1252.csv")
    _accounted(result, 2)
    assert result.warnings == ("cp1252.csv: decoded as cp1252 after UTF-8 failed",)
    assert result.records.loc[0, ["title", "abstract"]].tolist() == [
        "Café culture and “slow” towns", "Naïve costs – €12 a day.",
    ]


def test_utf16_with_bom_and_tabs() -> None:
    assert (HOSTILE / "utf16-bom.csv").read_bytes().startswith(codecs.BOM_UTF16_LE), "corpus file intact"
    result = _intake("utf16-bom.csv")
    _accounted(result, 2)
    assert result.warnings == ()
    assert result.records["title"].tolist() == ["Ålesund harbour — water quality, 2020–2021", "Second record"]


def test_semicolon_separated_keeps_commas_and_quoted_semicolons() -> None:
    result = _intake("semicolon.csv")
    _accounted(result, 2)
    assert result.records["title"].tolist() == ["Water, sanitation and schools", "Rural clinics; a census"]
    assert result.records.loc[1, "authors"] == ("Pell, Corin",)


def test_ragged_rows_are_set_aside_with_line_and_cell_counts() -> None:
    result = _intake("ragged.csv")
    _accounted(result, 4)
    assert _log(result) == {
        "ragged:row1": (2, "kept", "", ""),
        "ragged:line3": (3, "set_aside", "unparseable entry at line 3: row has 4 cells, header has 3", ""),
        "ragged:line4": (4, "set_aside", "unparseable entry at line 4: row has 1 cells, header has 3", ""),
        "ragged:row4": (5, "kept", "", ""),
    }


# --- any format --------------------------------------------------------------------------


@pytest.mark.parametrize("name", ["empty.bib", "empty.ris", "empty.csv"])
def test_empty_file_of_each_format_is_named_in_a_warning(name) -> None:
    assert (HOSTILE / name).stat().st_size == 0, "corpus file intact"
    result = _intake(name)
    _accounted(result, 0)
    assert result.warnings == (f"{name}: file is empty (0 bytes); nothing read",)
    assert f"  {name}: file is empty (0 bytes); nothing read" in format_intake_summary(result)


def test_header_only_csv_says_no_records_were_found(tmp_path) -> None:
    (tmp_path / "header.csv").write_text("Title,Year\n")
    assert _intake("header.csv", tmp_path).warnings == (
        "header.csv: no records found: the file holds a header line and no rows",)


@pytest.mark.parametrize("fmt", ["bibtex", "ris", "csv"])
def test_binary_garbage_read_as_each_format(fmt) -> None:
    result = _intake("garbage.bin", format=fmt)
    _accounted(result, 0)
    assert result.warnings == ("garbage.bin: file does not look like text (binary content); nothing read",)


def test_one_stray_nul_does_not_discard_a_text_file(tmp_path) -> None:
    rows = "".join(f"Record {i} on upland water,2021,An abstract about bogs.\n" for i in range(20))
    (tmp_path / "nul.csv").write_text("Title,Year,Abstract\n" + rows + "Nul\x00here,2021,x\n")
    result = _intake("nul.csv", tmp_path)
    _accounted(result, 21)
    assert result.records["title"].iloc[-1] == "Nulhere"


@pytest.mark.parametrize("fmt", ["bibtex", "ris", "csv"])
def test_long_abstract_is_cut_at_the_limit_and_flagged(tmp_path, fmt) -> None:
    abstract = ("Rain on the fells feeds the reservoirs below. " * 2200)[:100_000]
    text = {
        "bibtex": f"@article{{long, title={{Long abstract}}, year=2021, abstract={{{abstract}}}}}\n",
        "ris": f"TY  - JOUR\nID  - long\nTI  - Long abstract\nPY  - 2021\nAB  - {abstract}\nER  - \n",
        "csv": f"id,Title,Year,Abstract\nlong,Long abstract,2021,{abstract}\n",
    }[fmt]
    (tmp_path / "long.txt").write_text(text)
    result = _intake("long.txt", tmp_path, format=fmt)
    _accounted(result, 1)
    assert _log(result)["long:long"] == (1 if fmt != "csv" else 2, "kept", "", "cut:abstract")
    kept = result.records.loc[0, "abstract"]
    assert 19_950 <= len(kept) <= 20_000 and abstract.startswith(kept), "cut at limits.max_field_length (20000)"


def test_configured_max_field_length_applies_to_every_field(tmp_path) -> None:
    (tmp_path / "long.ris").write_text(
        "TY  - JOUR\nTI  - " + "Moor " * 60 + "\nPY  - 2021\nAB  - " + "Bog " * 200 + "\nKW  - " + "k" * 300 + "\nER  - \n"
    )
    result = _intake("long.ris", tmp_path, limits=LimitsConfig(max_field_length=150))
    assert _log(result)["long:rec1"] == (1, "kept", "", "cut:title;cut:abstract;cut:keywords")
    record = result.records.loc[0]
    assert max(len(record["title"]), len(record["abstract"]), *map(len, record["keywords"])) <= 150


def test_zero_width_and_control_characters_are_stripped() -> None:
    result = _intake("invisible.csv")
    _accounted(result, 3)
    record = result.records.loc[2]
    assert record["title"] == "Water reuse in towns"
    # NUL and BEL carry nothing; vertical tab and unit separator stand between words.
    assert record["abstract"] == "Greywater and rain water"


def test_html_and_javascript_in_titles_are_kept_as_text() -> None:
    result = _intake("html-titles.ris")
    _accounted(result, 2)
    # The record table holds text as given; escaping is the renderer's job (autoescape).
    assert result.records["title"].tolist() == [
        '<script>alert("kv")</script>Drinking water in <b>schools</b>',
        '<img src=x onerror="alert(1)"> & <a href="javascript:alert(2)">clean air</a>',
    ]
