"""The grant portfolio demo built as its README says, read back against the generator's known numbers
(bench/grant_corpus/known_numbers.json): intake, amounts, currencies, departments, partner countries and
the planned shift in energy funding. The real model, the real conversion table, nothing stubbed."""

import csv
import hashlib
import json
import shutil
from pathlib import Path

import pytest
from click.testing import CliRunner

from reporter.cli import main

pytestmark = pytest.mark.model

REPO = Path(__file__).resolve().parents[2]
KNOWN = json.loads((REPO / "bench" / "grant_corpus" / "known_numbers.json").read_text(encoding="utf-8"))


@pytest.fixture(scope="module")
def build(tmp_path_factory):
    """A private copy of example_input/grants/, so the cache and outputs never touch the repository."""
    copy = tmp_path_factory.mktemp("grants") / "grants"
    shutil.copytree(REPO / "example_input" / "grants", copy, ignore=shutil.ignore_patterns(".waymark-cache"))
    out = copy.parent / "out"
    result = CliRunner().invoke(main, ["build", str(copy / "waymark.toml"), "--out", str(out), "-q"])
    assert result.exit_code == 0, result.output + repr(result.exception)
    return out, result.output


@pytest.fixture(scope="module")
def funding(build):
    return json.loads((build[0] / "data" / "findings.json").read_text(encoding="utf-8"))["funding"]


def _rows(funding, table, key):
    """Rows of a funding table, one per group (the group figures repeat on every goal's row)."""
    return {row[key]: row for row in funding["tables"][table]}


def _csv(build, name):
    with (build[0] / "data" / name).open(encoding="utf-8", newline="") as handle:
        return list(csv.DictReader(handle))


def test_the_build_speaks_of_awards_and_writes_the_funding_exports(build):
    out, stdout = build
    assert f"Scored {KNOWN['awards_after_dedupe']} awards" in stdout
    manifest = json.loads((out / "manifest.json").read_text(encoding="utf-8"))
    listed = json.dumps(manifest)
    for name in ("goals", "by-year", "changes", "by-department", "by-country", "currencies", "left-out", "headline"):
        assert (out / "data" / f"findings-funding-{name}.csv").stat().st_size > 0, name
        assert f"data/findings-funding-{name}.csv" in listed, f"the manifest lists findings-funding-{name}.csv"


def test_every_award_is_accounted_for(build, funding):
    with (build[0] / "intake-log.csv").open(encoding="utf-8", newline="") as handle:
        log = list(csv.DictReader(handle))
    assert len(log) == KNOWN["entries_read"]
    merged = {row["record_id"]: row["merged_into"] for row in log if row["status"] == "merged"}
    assert merged == {d["duplicate"]: d["kept_candidate"] for d in KNOWN["duplicates"]}, "one award in both exports"
    kept = {row["record_id"] for row in log if row["status"] == "kept"}
    assert len(kept) == KNOWN["awards_after_dedupe"]
    assert set(KNOWN["same_title_not_merged"]) <= kept, "same title and year, other amounts: two awards"
    flags = {row["record_id"]: row["flags"] for row in log}
    for item in KNOWN["not_in_funding"]["records"]:
        assert f"not_in_funding:{item['reason']}" in flags[item["record_id"]], item
    headline = funding["headline"]
    assert (headline["n_awards"], headline["n_in_funding"], headline["n_not_in_funding"]) == (
        KNOWN["awards_after_dedupe"], KNOWN["in_funding"], KNOWN["not_in_funding"]["count"])
    left_out = {row["reason"]: row["n_awards"] for row in funding["tables"]["left_out"]}
    assert left_out == KNOWN["not_in_funding"]["by_reason"]


def test_amounts_are_converted_with_the_table_given(build, funding):
    assert funding["meta"]["base_currency"] == KNOWN["base_currency"] and funding["meta"]["conversion_table"] == "rates.csv"
    currencies = _rows(funding, "currencies", "currency")
    assert set(currencies) == set(KNOWN["currencies"])
    for code, facts in KNOWN["currencies"].items():
        row = currencies[code]
        assert (row["n_awards"], row["rate"]) == (facts["n_awards"], KNOWN["rates"][code])
        assert (row["amount"], row["amount_base"]) == pytest.approx((facts["amount"], facts["amount_base"]), abs=0.01)
    assert funding["headline"]["amount_total"] == pytest.approx(KNOWN["amount_total"], abs=0.01)
    notes = " ".join(funding["meta"]["method_notes"])
    assert "Fractional counting" in notes and "rates.csv" in notes and "1 GBP = 1.17 EUR, 1 USD = 0.92 EUR" in notes
    manifest = json.loads((build[0] / "manifest.json").read_text(encoding="utf-8"))
    digest = hashlib.sha256((REPO / "example_input" / "grants" / "rates.csv").read_bytes()).hexdigest()
    assert manifest["funding"]["conversion_table_sha256"] == digest, "the run manifest names the rates used"


def test_funding_per_year_department_and_partner_country(funding):
    years = _rows(funding, "by_year", "year")
    for year, facts in KNOWN["per_year"].items():
        assert (years[int(year)]["n_awards"], years[int(year)]["amount_total"]) == (
            facts["n_awards"], pytest.approx(facts["amount_total"], abs=0.01)), year
    for table, key, known in (("by_department", "department", KNOWN["departments"]),
                              ("by_country", "country", KNOWN["partner_countries"])):
        rows = _rows(funding, table, key)
        assert set(rows) == set(known), table
        for name, facts in known.items():
            row = rows[name]
            assert (row["n_awards"], row["is_too_small"]) == (facts["n_awards"], facts["is_too_small"]), name
            assert row["amount_total"] == pytest.approx(facts["amount_total"], abs=0.01), name
    humanities = _rows(funding, "by_department", "department")["Humanities"]
    assert humanities["is_too_small"] and humanities["amount_total"] > 3_000_000, (
        "too small by its number of awards, however large its funding"
    )


def test_fractional_goal_amounts_add_up_to_the_aligned_funding(funding):
    goals = funding["tables"]["goals"]
    assert sum(row["amount"] for row in goals) == pytest.approx(funding["headline"]["amount_aligned_any"], rel=1e-6)
    for row in goals:
        assert row["share"] == pytest.approx(row["share_fractional"], abs=1e-6)
        assert row["share_fractional"] <= row["share_full"] + 1e-9, "splitting an amount never adds to it"
        assert row["share_low"] <= row["share"] <= row["share_high"]


def test_one_figure_is_the_same_in_json_and_csv(build, funding):
    shares = {row["goal"]: float(row["share"]) for row in _csv(build, "findings-funding-goals.csv")}
    assert shares == pytest.approx({row["goal"]: row["share"] for row in funding["tables"]["goals"]}, abs=1e-6)


def test_the_planned_rise_in_energy_funding_holds(funding):
    """known_numbers.json "intended_shifts": goal 7's funding share rises in 2025, goal 3's falls from 2022."""
    assert "Goal 7 (energy) funding share rises in 2025" in KNOWN["intended_shifts"]
    changes = {(row["goal"], row["baseline"]): row for row in funding["tables"]["changes"]}
    assert changes[("7", "mean 2022-2024")]["verdict"] == "increase"
    for baseline in ("2022", "2023", "2024"):
        assert changes[("7", baseline)]["diff_low"] > 0, f"goal 7 against {baseline}"
    assert changes[("3", "2022")]["diff"] < 0
    fdr = funding["meta"]["fdr"]
    for row in funding["tables"]["changes"]:
        if row["is_change"]:
            assert row["p_adjusted"] < fdr and (row["diff_low"] > 0 or row["diff_high"] < 0), row


def _pdf_text(out: Path) -> str:
    from pypdf import PdfReader

    return " ".join((page.extract_text() or "") for page in PdfReader(str(out / "report.pdf")).pages)


def test_the_report_reads_in_funding_terms_throughout(build, funding):
    """The PDF and the HTML as a reader sees them: awards, not publications; the known total; the rise."""
    import re

    out = build[0]
    pdf = re.sub(r"\s+", " ", _pdf_text(out))
    html = (out / "report.html").read_text(encoding="utf-8")
    visible = re.sub(r"\s+", " ", re.sub(r"<[^>]+>", " ", re.sub(r"(?s)<(script|style)\b.*?</\1>", "", html)))
    for text in (pdf, visible):
        assert not re.search(r"(?i)\bpublications?\b", text), "every 'publication' reads as the record noun"
        # The key figure and its label are separate blocks: pypdf may join them without a space.
        assert re.search(rf"{KNOWN['awards_after_dedupe']} ?awards analysed", text)
        assert f"EUR {KNOWN['amount_total']:,.0f}" in text, "the known total funding, in the base currency"
        assert "Funding by goal" in text and "Funding share per goal" in text
    share = {row["goal"]: row for row in funding["tables"]["goals"]}["7"]
    assert f"Goal 7 · Affordable and Clean Energy: {100 * share['share']:.1f}% of funding" in pdf
    assert re.search(r"Affordable and Clean Energy, increase from [\d.]+% \(mean 2022-2024\)", pdf)
    assert "rates.csv" in pdf, "the method names the conversion table used"
    assert "split equally" in pdf, "the counting mode (fractional) is stated"


def test_the_workbook_holds_the_funding_sheets_in_award_terms(build, funding):
    import openpyxl  # read back as a spreadsheet program would

    book = openpyxl.load_workbook(build[0] / "report.xlsx")
    assert {"Funding by goal", "Funding changes", "Funding by department", "Awards"} <= set(book.sheetnames)
    assert "Publications" not in book.sheetnames
    summary = {row[0].value: row[1].value for row in book["Summary"].iter_rows()}
    assert summary["Funding in the figures (EUR)"] == pytest.approx(KNOWN["amount_total"], abs=1)
    assert summary["Awards analysed"] == KNOWN["awards_after_dedupe"]
    sheet = book["Funding by goal"]
    header = [c.value for c in sheet[1]]
    shares = {str(row[0]): row[header.index("Share of funding")] for row in sheet.iter_rows(min_row=2, values_only=True)}
    expected = {row["goal"]: row["share"] for row in funding["tables"]["goals"]}
    assert shares == pytest.approx(expected, abs=1e-6), "findings.json rounds to 6 places"
