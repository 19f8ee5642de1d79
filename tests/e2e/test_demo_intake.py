"""`waymark intake` on the demo: counts reconcile and match what the demo generator knows.

The known numbers come from bench/demo_corpus/known_numbers.json, written by the generator
of the (invented) demo scenario, not by the code under test.
"""

import csv
import json
from pathlib import Path

import pytest
from click.testing import CliRunner

from reporter.cli import main

REPO = Path(__file__).resolve().parents[2]
KNOWN = json.loads((REPO / "bench" / "demo_corpus" / "known_numbers.json").read_text(encoding="utf-8"))


@pytest.fixture(scope="module")
def intake_run(tmp_path_factory):
    out = tmp_path_factory.mktemp("intake")
    result = CliRunner().invoke(main, ["intake", str(REPO / "example_input" / "waymark.toml"), "--out", str(out), "-q"])
    assert result.exit_code == 0, result.output
    with (out / "intake-log.csv").open(encoding="utf-8", newline="") as handle:
        rows = list(csv.DictReader(handle))
    return result.output, rows


def test_every_record_read_is_accounted_for_once(intake_run):
    _, rows = intake_run
    assert len(rows) == KNOWN["entries_read"]
    statuses = [r["status"] for r in rows]
    assert set(statuses) <= {"kept", "merged", "set_aside"}
    assert len({(r["source_file"], r["source_line"], r["native_id"]) for r in rows}) == len(rows), "no record twice"
    for name, facts in KNOWN["files"].items():
        per_file = [r for r in rows if r["source_file"] == name]
        assert len(per_file) == facts["entries"], f"{name}: read count"


def test_kept_merged_set_aside_match_the_scenario(intake_run):
    _, rows = intake_run
    kept = [r for r in rows if r["status"] == "kept"]
    assert len(kept) == KNOWN["publications_after_dedupe"]
    assert sum(r["status"] == "merged" for r in rows) == KNOWN["duplicates"]["count"]
    set_aside = {r["record_id"] for r in rows if r["status"] == "set_aside"}
    assert set_aside == {e["record_id"] for e in KNOWN["set_aside"]["entries"]}
    per_year = {}
    for r in kept:
        per_year[r["year"]] = per_year.get(r["year"], 0) + 1
    assert per_year == KNOWN["publications_per_year"]


def test_merged_records_name_the_record_kept_instead(intake_run):
    _, rows = intake_run
    kept_ids = {r["record_id"] for r in rows if r["status"] == "kept"}
    for r in rows:
        if r["status"] == "merged":
            assert r["merged_into"] in kept_ids, r
            assert r["reason"].startswith("duplicate of ")
    pairs = {frozenset((p["kept_candidate"], p["duplicate"])) for p in KNOWN["duplicates"]["pairs"]}
    found = {frozenset((r["record_id"], r["merged_into"])) for r in rows if r["status"] == "merged"}
    assert found == pairs


def test_flags_no_abstract_and_non_english(intake_run):
    _, rows = intake_run
    flagged = {r["record_id"] for r in rows if "no_abstract" in r["flags"].split(";")}
    assert flagged == set(KNOWN["no_abstract"]["record_ids"])
    non_english = {r["record_id"] for r in rows if any(f.startswith("non_english:") for f in r["flags"].split(";"))}
    assert non_english == set(KNOWN["non_english"]["record_ids"])


def test_summary_reconciles_on_screen(intake_run):
    output, _ = intake_run
    all_line = next(line for line in output.splitlines() if line.startswith("all ") and "462" in line)
    assert all_line.split()[1:] == ["462", "447", "10", "5"]


def test_countries_and_departments_match_the_scenario():
    """Partner countries (ISO 3166-1 via pycountry) and departments from the staff map, as the generator wrote them."""
    from collections import Counter

    from reporter.config import load_config
    from reporter.pipeline import run_intake

    records = run_intake(load_config(REPO / "example_input" / "waymark.toml")).records
    assert int(records["is_international"].sum()) == KNOWN["international_publications"]
    partners = Counter(code for codes in records["partner_countries"] for code in codes)
    assert dict(partners) == KNOWN["partner_countries"]
    departments = Counter(name for names in records["departments"] for name in names)
    assert dict(departments) == KNOWN["departments_full_counting"]
    assert int((records["departments"].map(len) == 0).sum()) == KNOWN["no_staff_author"]["count"]
