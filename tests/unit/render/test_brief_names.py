"""Brief file names: ASCII stems without path separators, unique even when department names normalise alike."""

import re

from hypothesis import given, settings
from hypothesis import strategies as st

from reporter.render.briefs import MAX_STEM, brief_file_names

SAFE = re.compile(r"^[a-z0-9]+(-[a-z0-9]+)*$")


def test_names_become_plain_ascii_stems():
    names = brief_file_names(["Civil & Environmental Engineering", "Économie / Gestion", "../../etc/passwd",
                              '=HYPERLINK("x")', "Life Sciences\\Medicine"])
    assert names == {
        "Civil & Environmental Engineering": "civil-and-environmental-engineering",
        "Économie / Gestion": "economie-gestion",
        "../../etc/passwd": "etc-passwd",
        '=HYPERLINK("x")': "hyperlink-x",
        "Life Sciences\\Medicine": "life-sciences-medicine",
    }


def test_names_that_normalise_alike_get_numbers_in_name_order():
    names = brief_file_names(["Economie", "Économie", "ECONOMIE", "Economie 2"])
    assert names["ECONOMIE"] == "economie", "upper case sorts first and keeps the plain stem"
    assert names["Economie 2"] == "economie-2", "a department keeps its own stem; numbers go around it"
    assert {names["Economie"], names["Économie"]} == {"economie-3", "economie-4"}
    assert len(set(names.values())) == 4


def test_names_in_another_script_get_distinct_digests():
    names = brief_file_names(["物理学", "化学", "Химия"])
    assert all(re.fullmatch(r"department-[0-9a-f]{8}", stem) for stem in names.values())
    assert len(set(names.values())) == 3


def test_reserved_device_names_and_long_names_are_avoided():
    long_name = "Institute for " + "Very " * 30 + "Long Names"
    names = brief_file_names(["CON", "Aux", long_name])
    assert names["CON"] == "con-department" and names["Aux"] == "aux-department"
    assert len(names[long_name]) <= MAX_STEM and not names[long_name].endswith("-")


def test_the_same_names_give_the_same_stems_in_any_order():
    given_names = ["Humanities", "Économie", "Economie", "Computer Science"]
    assert brief_file_names(given_names) == brief_file_names(list(reversed(given_names)))


@settings(max_examples=200, deadline=None)
@given(st.lists(st.text(min_size=1, max_size=40), min_size=1, max_size=12))
def test_any_names_give_safe_unique_stems(departments):
    names = brief_file_names(departments)
    assert set(names) == set(departments)
    assert len(set(names.values())) == len(names), "one file per department"
    for stem in names.values():
        assert SAFE.fullmatch(stem), f"{stem!r} is not a plain ASCII stem"
