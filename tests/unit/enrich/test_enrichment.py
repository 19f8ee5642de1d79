import pandas as pd
import pytest

from tests.unit.enrich.enrich_frames import log_for, record, records
from reporter.config import DepartmentConfig, ReportConfig
from reporter.enrich import enrich
from reporter.errors import InputError
from reporter.records import ENRICHED_COLUMNS, RECORD_COLUMNS, IntakeResult

REPORT = ReportConfig(institution="University of Lough Arrow", home_country="IE", reporting_year=2024)


def _intake(set_aside: int = 0) -> IntakeResult:
    frame = records(
        record(
            "pubs:k1", doi="https://doi.org/10.5555/WM.1", title="Bog restoration", abstract="We rewet bogs.",
            authors=("Quigley, Róisín",), affiliations=("Dept of Ecology, Sligo, Ireland",), language="en",
        ),
        record(
            "extra:r9", source_file="extra.ris", format="ris", doi="doi:10.5555/wm.1", title="Bog Restoration",
            affiliations=("Peat Institute, Utrecht, The Netherlands",), keywords=("peat",), language="eng",
        ),
        record(
            "pubs:k2", title="Moorvernässung im Vergleich", language="de",
            authors=("Quigley, R.",), departments=("Geog.",), doi="not given",
        ),
    )
    log = log_for(frame, set_aside=set_aside)
    log.loc[log["record_id"] == "pubs:k2", "flags"] = "no_abstract"
    return IntakeResult(records=frame, log=log, warnings=("pubs.bib: decoded as cp1252",))


@pytest.fixture
def departments(tmp_path):
    path = tmp_path / "staff.csv"
    path.write_text("name,department\n\"Quigley, Róisín\",Ecology\n", encoding="utf-8")
    return DepartmentConfig(staff_map=path, aliases={"Geog.": "Geography"})


def test_enrich_composes_every_step(departments):
    intake = _intake()
    result = enrich(intake, REPORT, departments)
    out = result.records.set_index("record_id")
    assert list(result.records.columns) == [*RECORD_COLUMNS, *ENRICHED_COLUMNS]
    assert list(out.index) == ["pubs:k1", "pubs:k2"]
    assert out.loc["pubs:k1", "doi"] == "10.5555/wm.1"
    assert out.loc["pubs:k1", "keywords"] == ("peat",)
    assert out.loc["pubs:k1", "countries"] == ("IE", "NL")
    assert out.loc["pubs:k1", "partner_countries"] == ("NL",)
    assert bool(out.loc["pubs:k1", "is_international"]) is True
    assert out.loc["pubs:k1", "departments"] == ("Ecology",)
    assert out.loc["pubs:k2", "departments"] == ("Ecology", "Geography")
    assert bool(out.loc["pubs:k2", "is_english"]) is False

    log = result.log.set_index("record_id")
    assert log.loc["extra:r9", "status"] == "merged"
    assert log.loc["extra:r9", "merged_into"] == "pubs:k1"
    assert log.loc["extra:r9", "reason"] == "duplicate of pubs:k1 (same DOI)"
    assert log.loc["pubs:k2", "flags"] == "no_abstract;doi_not_recognised;non_english:de"
    assert result.warnings == intake.warnings


def test_counts_reconcile_after_dedupe(departments):
    result = enrich(_intake(set_aside=2), REPORT, departments)
    counts = result.log["status"].value_counts()
    assert len(result.log) == 5
    assert counts["kept"] == len(result.records), "kept log rows are exactly the records handed on"
    n_accounted = counts["kept"] + counts["merged"] + counts["set_aside"]
    assert len(result.log) == n_accounted, "read = kept + merged + set aside"
    assert (counts["merged"], counts["set_aside"]) == (1, 2)


def test_enrich_does_not_mutate_its_input(departments):
    intake = _intake()
    records_before, log_before = intake.records.copy(), intake.log.copy()
    enrich(intake, REPORT, departments)
    assert intake.records.equals(records_before) and intake.log.equals(log_before)


def test_enrich_checks_columns_on_entry():
    intake = _intake()
    broken = IntakeResult(records=intake.records.drop(columns=["doi"]), log=intake.log)
    with pytest.raises(TypeError, match="enrich: records: missing columns doi"):
        enrich(broken, REPORT, DepartmentConfig())
    with pytest.raises(TypeError, match="expected an IntakeResult, got DataFrame"):
        enrich(intake.records, REPORT, DepartmentConfig())


def test_bad_staff_map_stops_with_file_and_line(tmp_path):
    path = tmp_path / "staff.csv"
    path.write_text("name,department\n\"Quigley, Róisín\",\n", encoding="utf-8")
    with pytest.raises(InputError) as err:
        enrich(_intake(), REPORT, DepartmentConfig(staff_map=path))
    assert str(err.value) == f"{path}:2: department: no department for 'Quigley, Róisín'"


def test_ambiguous_author_is_warned(tmp_path):
    path = tmp_path / "staff.csv"
    path.write_text("name,department\n\"Quigley, Róisín\",Ecology\n\"Quigley, Rory\",Law\n", encoding="utf-8")
    result = enrich(_intake(), REPORT, DepartmentConfig(staff_map=path))
    log = result.log.set_index("record_id")
    assert "department_ambiguous:Quigley, R." in log.loc["pubs:k2", "flags"].split(";")
    assert any("1 author name(s)" in w for w in result.warnings)


def test_empty_intake_gives_empty_enriched_table():
    empty = IntakeResult(records=records(), log=log_for(records()))
    result = enrich(empty, REPORT, DepartmentConfig())
    assert list(result.records.columns) == [*RECORD_COLUMNS, *ENRICHED_COLUMNS]
    assert len(result.records) == 0 and isinstance(result.records, pd.DataFrame)
