"""Goal framework files: the built-in UN framework, a user framework, and every validation error."""

from __future__ import annotations

import hashlib
from importlib import resources
from pathlib import Path

import pytest

from reporter.errors import FrameworkError
from reporter.score.framework import Goal, builtin_frameworks, load_framework, measured_accuracy

DATA = Path(__file__).parents[2] / "data" / "frameworks"

# Source: UN General Assembly resolution A/RES/70/1 (2015), "Transforming our world: the 2030 Agenda
# for Sustainable Development"; short titles as used by the UN for the 17 goals.
OFFICIAL_SHORT_TITLES = (
    "No Poverty",
    "Zero Hunger",
    "Good Health and Well-being",
    "Quality Education",
    "Gender Equality",
    "Clean Water and Sanitation",
    "Affordable and Clean Energy",
    "Decent Work and Economic Growth",
    "Industry, Innovation and Infrastructure",
    "Reduced Inequalities",
    "Sustainable Cities and Communities",
    "Responsible Consumption and Production",
    "Climate Action",
    "Life Below Water",
    "Life on Land",
    "Peace, Justice and Strong Institutions",
    "Partnerships for the Goals",
)


@pytest.fixture(scope="module")
def sdg():
    return load_framework("un-sdg-2030")


def test_builtin_has_the_17_goals_with_official_numbers_and_short_titles(sdg):
    """Source: UN General Assembly resolution A/RES/70/1 (2015): 17 goals numbered 1 to 17."""
    assert [g.number for g in sdg.goals] == list(range(1, 18))
    assert sdg.goal_codes == tuple(str(n) for n in range(1, 18))
    assert tuple(g.short_title for g in sdg.goals) == OFFICIAL_SHORT_TITLES


def test_builtin_goals_carry_enough_descriptors_keywords_and_their_own_title(sdg):
    for goal in sdg.goals:
        # Each goal covers its targets and the fields of research that serve it (issue 14).
        assert 40 <= len(goal.descriptors) <= 90, f"goal {goal.code}: {len(goal.descriptors)} descriptors"
        assert len(set(goal.descriptors)) == len(goal.descriptors), f"goal {goal.code} repeats a descriptor"
        assert goal.keywords, f"goal {goal.code} has no keywords"
        assert goal.short_title in goal.mention_titles, f"goal {goal.code} cannot be mentioned by title"
    assert 80 <= len(sdg.background) <= 150


def test_no_descriptor_is_shared_between_goals_or_with_the_background(sdg):
    # A sentence in two classes would pull both towards the same texts.
    texts = [d for g in sdg.goals for d in g.descriptors] + list(sdg.background)
    assert len(texts) == len(set(texts))


def test_builtin_checksum_is_the_sha256_of_the_shipped_file_and_source_names_it(sdg):
    shipped = (resources.files("reporter.frameworks") / "un-sdg-2030.toml").read_bytes()
    assert sdg.checksum == hashlib.sha256(shipped).hexdigest()
    assert load_framework("un-sdg-2030").checksum == sdg.checksum
    assert sdg.source == "builtin:un-sdg-2030"
    assert (sdg.id, sdg.version) == ("un-sdg-2030", "2.0.0")


def test_builtin_can_also_be_loaded_by_path_with_the_same_checksum(sdg):
    path = Path(str(resources.files("reporter.frameworks") / "un-sdg-2030.toml"))
    by_path = load_framework(str(path))
    assert by_path.checksum == sdg.checksum
    assert by_path.source == str(path)
    assert by_path.goals == sdg.goals


def test_goal_by_code_finds_a_goal_and_names_the_codes_when_missing(sdg):
    assert sdg.goal_by_code("6").short_title == "Clean Water and Sanitation"
    with pytest.raises(KeyError, match=r"framework 'un-sdg-2030' has no goal '18'; codes: 1, 2, 3"):
        sdg.goal_by_code("18")


def test_second_framework_loads_with_letter_codes_and_no_numbers():
    path = DATA / "kestrel-themes.toml"
    themes = load_framework(str(path))
    assert themes.goal_codes == ("T1", "T2", "T3", "T4", "T5")
    assert all(g.number is None for g in themes.goals)
    assert all(len(g.descriptors) >= 8 for g in themes.goals)
    assert themes.context_terms == ("Kestrel Heath", "strategic theme", "strategic themes")
    assert themes.checksum == hashlib.sha256(path.read_bytes()).hexdigest()
    assert themes.goals[0] == Goal(
        code="T1",
        number=None,
        short_title="Healthy Coasts",
        statement="Understand and protect the estuaries, shores and coastal towns of the region.",
        descriptors=themes.goals[0].descriptors,
        keywords=("estuary", "saltmarsh", "shoreline", "coastal erosion", "harbour"),
        mention_titles=("Healthy Coasts",),
    )


def _problems(path: Path) -> list[str]:
    with pytest.raises(FrameworkError) as caught:
        load_framework(str(path))
    return [str(p) for p in caught.value.problems]


def test_every_schema_problem_is_reported_at_once_with_its_line():
    path = DATA / "bad-schema.toml"
    assert _problems(path) == [
        f"{path}:6: framework.descripton: unknown key (did you mean 'description'?)",
        f"{path}:5: framework.version: expected a string, got 2 (put it in quotes)",
        f"{path}:2: framework.description: required key is missing",
        f"{path}:9: background.statements[2]: must not be empty",
        f"{path}:24: goals[1].mention_title: unknown key (did you mean 'mention_titles'?)",
        f"{path}:20: goals[1].number: expected a whole number of at least 1, got 0",
        f"{path}:21: goals[1].short_title: must not be empty",
        f"{path}:23: goals[1].descriptors: expected at least 3 descriptors, got 1",
        f"{path}:19: goals[1].code: duplicate goal code 'A' (first used by goals[0])",
        f"{path}:27: goals[2].code: expected a string, got 3 (put it in quotes)",
        f"{path}:26: goals[2].statement: required key is missing",
    ]


def test_toml_syntax_error_names_its_line():
    path = DATA / "bad-syntax.toml"
    assert _problems(path) == [f"{path}:3: not valid TOML: Illegal character '\\n' (at line 3, column 43)"]


_HEAD = '[framework]\nid = "x"\ntitle = "X"\nversion = "1"\ndescription = "D"\n'
_BACKGROUND = '[background]\nstatements = ["a", "b", "c"]\n'
_GOAL = '[[goals]]\ncode = "{code}"\nnumber = {number}\nshort_title = "S"\nstatement = "T"\ndescriptors = ["a", "b", "c"]\n'


@pytest.mark.parametrize(
    ("text", "expected"),
    [
        (_HEAD + _BACKGROUND, [": goals: required [[goals]] tables are missing"]),
        ("goals = []\n" + _HEAD + _BACKGROUND, [":1: goals: expected at least one goal"]),
        ('goals = "all"\n' + _HEAD + _BACKGROUND, [":1: goals: expected [[goals]] tables"]),
        (_BACKGROUND + _GOAL.format(code="1", number=1), [": framework: required table [framework] is missing"]),
        (
            _HEAD + '[background]\nstatements = ["only one"]\n' + _GOAL.format(code="1", number=1),
            [":7: background.statements: expected at least 3 statements, got 1"],
        ),
        (
            _HEAD + _BACKGROUND + _GOAL.format(code="1", number=1) + _GOAL.format(code="2", number=1),
            [":16: goals[1].number: duplicate goal number 1 (first used by goals[0])"],
        ),
        (
            _HEAD + _BACKGROUND + _GOAL.format(code="1", number=1) + "[goal]\nx = 1\n",
            [":14: goal: unknown key (did you mean 'goals'?)"],
        ),
        (
            _HEAD.replace('"1"', "1.5") + _BACKGROUND + _GOAL.format(code="1", number='"one"'),
            [
                ":4: framework.version: expected a string, got 1.5 (put it in quotes)",
                ":10: goals[0].number: expected a whole number of at least 1, got 'one'",
            ],
        ),
        (
            _HEAD + _BACKGROUND + _GOAL.format(code="1", number=1).replace('["a", "b", "c"]', '"a, b, c"'),
            [":13: goals[0].descriptors: expected a list of strings, got 'a, b, c'"],
        ),
        (
            # A key written under [background] belongs to it, however it is indented.
            _HEAD + _BACKGROUND + "goals = []\n" + _GOAL.format(code="1", number=1),
            [":8: background.goals: unknown key"],
        ),
        (
            _HEAD + _BACKGROUND + _GOAL.format(code="  ", number=1),
            [":9: goals[0].code: must not be empty"],
        ),
    ],
)
def test_each_validation_problem_has_its_exact_message_and_line(tmp_path, text, expected):
    path = tmp_path / "framework.toml"
    path.write_text(text, encoding="utf-8")
    assert _problems(path) == [f"{path}{line}" for line in expected]


def test_missing_file_names_the_builtin_frameworks(tmp_path):
    path = tmp_path / "nowhere.toml"
    assert _problems(path) == [f"{path}: framework file not found (built-in frameworks: un-sdg-2030)"]


def test_file_that_is_not_utf8_is_refused(tmp_path):
    path = tmp_path / "latin1.toml"
    path.write_bytes('[framework]\ntitle = "Kestrel Heath Universit\xe9"\n'.encode("latin-1"))
    assert _problems(path) == [
        f"{path}:2: not UTF-8 text (byte 0xe9); save the file as UTF-8"
    ]


def test_shipped_accuracy_describes_the_shipped_framework(sdg):
    """The accuracy the report cites was measured on this very file: editing the framework without
    re-measuring (bench/evaluate_scoring.py --write-accuracy) fails here."""
    figures = measured_accuracy(sdg)
    assert figures is not None, "framework changed since its accuracy was measured on real abstracts"
    assert figures["n_abstracts"] >= 300 and 0 < figures["macro_f1"] <= 1
    assert figures["recall_lowest"]["recall"] <= figures["recall_highest"]["recall"]
    assert "un-sdg-2030.accuracy" not in builtin_frameworks()


def test_accuracy_is_not_claimed_for_another_framework_file(sdg, tmp_path):
    copy = tmp_path / "own.toml"
    copy.write_bytes((resources.files("reporter.frameworks") / "un-sdg-2030.toml").read_bytes())
    assert measured_accuracy(load_framework(str(copy))) is None
