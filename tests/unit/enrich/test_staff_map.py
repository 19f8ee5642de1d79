import pytest

from reporter.enrich.staff_map import normalise_orcid, parse_name, read_staff_map
from reporter.errors import InputError


@pytest.mark.parametrize(
    "name, parsed",
    [
        ("Murphy, Aoife", ("murphy", ("aoife",))),
        ("Murphy, A. B.", ("murphy", ("a", "b"))),
        ("Ó Súilleabháin, Dara", ("osuilleabhain", ("dara",))),
        ("Dara Ó Súilleabháin", ("osuilleabhain", ("dara",))),
        ("Jan van der Berg", ("vanderberg", ("jan",))),
        ("van der Berg, J.", ("vanderberg", ("j",))),
        ("Lefèvre-Roux, Jean-Paul", ("lefevreroux", ("jean", "paul"))),
        ("Quigley, JM", ("quigley", ("j", "m"))),
        ("QUIGLEY, ANN", ("quigley", ("ann",))),
        ("Quigley, Tom, Jr.", ("quigley", ("tom",))),
    ],
)
def test_parse_name(name, parsed):
    assert parse_name(name) == parsed


def test_normalise_orcid():
    """Source: ORCID iD format, 16 digits in groups of four, last may be X (orcid.org, from memory)."""
    assert normalise_orcid("https://orcid.org/0000-0002-1825-009x") == "0000-0002-1825-009X"
    assert normalise_orcid("0000-0002-1825") == ""


def test_read_staff_map_groups_rows_into_persons(tmp_path):
    path = tmp_path / "staff.csv"
    path.write_text(
        "name,department,orcid\n"
        "\"Murphy, Aoife\",Chemistry,0000-0001-0000-0001\n"
        "\"Murphy, A.\",Chemistry,0000-0001-0000-0001\n"
        "\"Murphy, Aoife\",Physics,0000-0001-0000-0001\n"
        "\n"
        "\"Byrne, Cian\",History,\n",
        encoding="utf-8",
    )
    staff = read_staff_map(path)
    assert staff.person_departments["0000-0001-0000-0001"] == {"Chemistry", "Physics"}
    assert staff.person_departments["byrne|cian"] == {"History"}
    assert len(staff.names_by_last["murphy"]) == 3


def test_read_staff_map_reports_every_bad_row_with_its_line(tmp_path):
    path = tmp_path / "staff.csv"
    path.write_text("name;department\n\"Murphy, Aoife\";Chemistry\n\"Byrne, Cian\";\n;History\n", encoding="utf-8")
    with pytest.raises(InputError) as err:
        read_staff_map(path)
    assert str(err.value) == (
        f"{path}:3: department: no department for 'Byrne, Cian'\n"
        f"{path}:4: name: row has no name"
    )


def test_read_staff_map_missing_column(tmp_path):
    path = tmp_path / "staff.csv"
    path.write_text("person,unit\nX,Y\n", encoding="utf-8")
    with pytest.raises(InputError) as err:
        read_staff_map(path)
    expected = f"{path}:1: departments.staff_map: missing column name, department (found: person, unit)"
    assert str(err.value) == expected


def test_read_staff_map_missing_file_and_bad_orcid(tmp_path):
    with pytest.raises(InputError) as err:
        read_staff_map(tmp_path / "none.csv")
    assert str(err.value) == f"{tmp_path / 'none.csv'}: departments.staff_map: staff map not found"
    path = tmp_path / "staff.csv"
    path.write_text("name,department,orcid\n\"Murphy, Aoife\",Chemistry,12-34\n", encoding="utf-8")
    with pytest.raises(InputError) as err:
        read_staff_map(path)
    assert str(err.value) == f"{path}:2: orcid: not an ORCID iD: '12-34'"


def test_read_staff_map_not_utf8(tmp_path):
    path = tmp_path / "staff.csv"
    path.write_bytes(b"name,department\n\"M\xfcller, Jan\",Physics\n")
    with pytest.raises(InputError) as err:
        read_staff_map(path)
    assert str(err.value).startswith(f"{path}: departments.staff_map: cannot read staff map as UTF-8 text")
