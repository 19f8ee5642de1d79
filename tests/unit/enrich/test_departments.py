import pytest

from tests.unit.enrich.enrich_frames import record, records
from reporter.enrich.departments import add_departments, apply_aliases, compatible, match_author
from reporter.enrich.staff_map import read_staff_map

STAFF = (
    "name,department,orcid\n"
    "\"Murphy, Aoife\",Chemistry,0000-0001-0000-0001\n"
    "\"Murphy, Alan\",Physics,\n"
    "\"Byrne, Cian Óg\",History,\n"
    "\"Lefèvre, Marie\",Chem.,\n"
    "\"Lefèvre, M.\",Chem.,\n"
)


@pytest.fixture
def staff(tmp_path):
    path = tmp_path / "staff.csv"
    path.write_text(STAFF, encoding="utf-8")
    return read_staff_map(path)


@pytest.mark.parametrize(
    "a, b, fits",
    [(("aoife",), ("aoife",), True), (("a",), ("aoife",), True), (("a", "b"), ("aoife",), True),
     (("aoife", "b"), ("aoife", "beth"), True), (("alan",), ("aoife",), False), (("a", "c"), ("a", "b"), False),
     ((), ("aoife",), False)],
)
def test_compatible(a, b, fits):
    assert compatible(a, b) is fits
    assert compatible(b, a) is fits, "compatibility is symmetric"


def test_match_author_ignores_accents_case_and_initials(staff):
    assert match_author("BYRNE, C. O.", staff) == {"byrne|cian og"}
    assert match_author("Lefevre, Marie", staff) == {"lefevre|marie", "lefevre|m"}
    assert match_author("Byrne, Declan", staff) == set()


def test_add_departments_unions_csv_and_staff_and_applies_aliases(staff):
    frame = records(
        record("a:1", authors=("Lefevre, M.", "Byrne, Cian"), departments=("History ",)),
        record("a:2", authors=("Nobody, Ann",), departments=("chem.",)),
    )
    out, flags = add_departments(frame, staff, {"Chem.": "Chemistry"})
    assert list(out["departments"]) == [("Chemistry", "History"), ("Chemistry",)]
    assert flags == {}
    assert frame.loc[0, "departments"] == ("History ",), "input frame must not change"


def test_ambiguous_initial_is_not_guessed_and_is_noted(staff):
    frame = records(record("a:1", authors=("Murphy, A.",)))
    out, flags = add_departments(frame, staff, {})
    assert list(out["departments"]) == [()]
    assert flags == {"a:1": ["department_ambiguous:Murphy, A."]}


def test_orcid_matches_first_and_settles_an_ambiguous_initial(staff):
    frame = records(record("a:1", authors=("Murphy, A.",), orcids=("https://orcid.org/0000-0001-0000-0001",)))
    out, flags = add_departments(frame, staff, {})
    assert list(out["departments"]) == [("Chemistry",)]
    assert flags == {}


def test_without_staff_map_only_csv_departments_and_aliases(staff):
    frame = records(record("a:1", authors=("Murphy, Aoife",), departments=("Chem.",)))
    out, _ = add_departments(frame, None, {"chem.": "Chemistry"})
    assert list(out["departments"]) == [("Chemistry",)]


def test_apply_aliases_exact_then_case_blind():
    assert apply_aliases("Chem", {"Chem": "Chemistry", "chem": "Other"}) == "Chemistry"
    assert apply_aliases("CHEM", {"chem": "Chemistry"}) == "Chemistry"
    assert apply_aliases("Physics", {"chem": "Chemistry"}) == "Physics"
