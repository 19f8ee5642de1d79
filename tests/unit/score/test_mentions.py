"""Explicit goal mentions.

The forms below are common practice in this field, with no single source: authors write "SDG 6",
"SDG6", "SDG-6", "SDG_6", "SDG #6", lists such as "SDGs 3, 4 and 5", target references such as
"SDG 6.1", "Sustainable Development Goal (SDG) 13", ordinals and written-out goal titles. The
look-alikes are invented sentences that must not count.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from reporter.score.framework import load_framework
from reporter.score.mentions import Mention, compile_mentions, find_mentions

DATA = Path(__file__).parents[2] / "data" / "frameworks"


@pytest.fixture(scope="module")
def sdg():
    return load_framework("un-sdg-2030")


@pytest.fixture(scope="module")
def patterns(sdg):
    return compile_mentions(sdg)


def _found(text, patterns) -> dict[str, list[str]]:
    return {code: [m.matched_text for m in found] for code, found in find_mentions(text, patterns).by_goal.items()}


@pytest.mark.parametrize(
    ("text", "expected"),
    [
        ("Access to drinking water is central to SDG 6.", {"6": ["SDG 6"]}),
        ("Keywords: SDG6; groundwater", {"6": ["SDG6"]}),
        ("progress towards SDG-6 in rural areas", {"6": ["SDG-6"]}),
        ("tagged SDG_6 by the library", {"6": ["SDG_6"]}),
        ("a contribution to SDG #6", {"6": ["SDG #6"]}),
        ("lower-case keywords such as sdg 13", {"13": ["sdg 13"]}),
        ("linked to SDGs 6 and 7", {"6": ["SDGs 6 and 7"], "7": ["SDGs 6 and 7"]}),
        (
            "relevant to SDGs 3, 4 and 5",
            {"3": ["SDGs 3, 4 and 5"], "4": ["SDGs 3, 4 and 5"], "5": ["SDGs 3, 4 and 5"]},
        ),
        ("in line with SDG 6.1 on safe water", {"6": ["SDG 6.1"]}),
        ("measured for SDG target 6.1", {"6": ["SDG target 6.1"]}),
        ("the means of implementation in SDG 17.a", {"17": ["SDG 17.a"]}),
        ("the indicator SDG 6.1.1 counts for its target", {"6": ["SDG 6.1"]}),
        ("Goal 6 of the SDGs concerns water.", {"6": ["Goal 6"]}),
        ("The SDG framework lists target 3.4 on premature mortality.", {"3": ["target 3.4"]}),
        ("We address Sustainable Development Goal 6.", {"6": ["Sustainable Development Goal 6"]}),
        ("under Sustainable Development Goal (SDG) 13", {"13": ["Sustainable Development Goal (SDG) 13"]}),
        ("the sixth Sustainable Development Goal is water", {"6": ["sixth Sustainable Development Goal"]}),
        ("progress on the 13th SDG", {"13": ["13th SDG"]}),
        ("This study supports SDG 13 (Climate Action).", {"13": ["SDG 13 (Climate Action)"]}),
        ("This study supports Climate Action (SDG 13).", {"13": ["Climate Action (SDG 13)"]}),
        (
            "Among the SDGs, Clean Water and Sanitation matters most here.",
            {"6": ["Clean Water and Sanitation"]},
        ),
        ("the Goal on 'clean water and sanitation'", {"6": ["clean water and sanitation"]}),
        (
            "The SDGs name Good Health and Wellbeing and Peace, Justice, and Strong Institutions.",
            {"3": ["Good Health and Wellbeing"], "16": ["Peace, Justice, and Strong Institutions"]},
        ),
    ],
)
def test_each_common_form_counts_for_its_goal(patterns, text, expected):
    assert _found(text, patterns) == expected


@pytest.mark.parametrize(
    "text",
    [
        "We train the network with SDG-based stochastic descent and a cosine schedule.",
        "The stochastic dual gradient (SDG) solver converges in 40 iterations.",
        "Grid data were provided by SDG&E for 2019.",
        "The sdg8-1 allele delays flowering in Arabidopsis.",
        "The striker scored in goal 6 minutes after the break.",
        "Goal 3 of the training plan is a faster sprint." + " Filler text." * 12 + " The SDGs are not discussed.",
        "There is no SDG 18 and no SDG 0; some authors still write of 19 SDGs.",
        "the SDG 2015 baseline report",
        "Rural households lack clean water and sanitation, so clean water matters.",
        "Clean Water and Sanitation Services Ltd maintains the pipes.",
        "Gender equality in the workplace is improving across the SDGs.",
        "The first Sustainable Development Goals report was published.",
        "The 17 Sustainable Development Goals cover many topics; all 17 SDGs are listed.",
        "a target 6.1 m below ground level",
    ],
)
def test_look_alikes_are_not_mentions(patterns, text):
    assert _found(text, patterns) == {}


def test_a_singular_prefix_takes_only_the_first_number(patterns):
    # "SDG 6 and 12 villages": the 12 counts villages, not a goal; lists need the plural "SDGs".
    assert _found("We studied SDG 6 and 12 villages.", patterns) == {"6": ["SDG 6"]}


def test_goal_number_needs_sdg_wording_within_the_context_window(patterns):
    near = "The SDGs matter. " + "x" * 120 + " Goal 6 is water."
    far = "The SDGs matter. " + "x" * 160 + " Goal 6 is water."
    assert _found(near, patterns) == {"6": ["Goal 6"]}
    assert _found(far, patterns) == {}


def test_mentions_carry_spans_forms_and_repeat_counts(sdg, patterns):
    # Repeats of one form stay apart even when adjacent; an ordinal and its number are one mention.
    text = "SDG 6 and SDG6, SDG-6, then Sustainable Development Goal 6 and the sixth SDG (SDG-6)."
    found = find_mentions(text, patterns).by_goal["6"]
    assert [m.matched_text for m in found][:3] == ["SDG 6", "SDG6", "SDG-6"]
    assert [m.form for m in found] == ["sdg_number"] * 5
    assert [text[m.start:m.end] for m in found] == [m.matched_text for m in found]
    assert found[0] == Mention("6", 0, 5, "SDG 6", "sdg_number")
    assert found[-1].matched_text == "sixth SDG (SDG-6)"
    assert find_mentions(text, patterns).count("6") == 5
    assert find_mentions(text, sdg) == find_mentions(text, patterns)


def test_target_and_ordinal_and_title_forms_are_named(patterns):
    text = "SDG target 6.1, the sixth SDG, and Goal 7 under the SDGs; 'Climate Action' too."
    result = find_mentions(text, patterns)
    assert {code: [m.form for m in found] for code, found in result.by_goal.items()} == {
        "6": ["sdg_target", "ordinal"],
        "7": ["goal_number"],
        "13": ["title"],
    }
    assert result.mentioned_goals == ("6", "7", "13")


@pytest.mark.parametrize(
    ("text", "n_general"),
    [
        ("This work contributes to the SDGs.", 1),
        ("the Sustainable Development Goals (SDGs) and the 2030 Agenda for Sustainable Development", 2),
        ("Agenda 2030 and the Global Goals", 2),
        ("national global goals for emissions", 0),
        ("the SDGs, in particular SDG 6 and Sustainable Development Goals 3 and 4", 1),
        ("Sustainable Development Goal (SDG) 13", 0),
    ],
)
def test_general_mentions_count_only_where_no_goal_is_named(patterns, text, n_general):
    assert find_mentions(text, patterns).n_general == n_general


def test_user_framework_titles_count_in_its_own_context_and_numbers_do_not_apply():
    themes = load_framework(str(DATA / "kestrel-themes.toml"))
    patterns = compile_mentions(themes)
    text = "This project serves the Kestrel Heath strategic theme Healthy Coasts and SDG 1."
    assert {c: [m.matched_text for m in f] for c, f in find_mentions(text, patterns).by_goal.items()} == {
        "T1": ["Healthy Coasts"]
    }
    assert find_mentions("Healthy Coasts make healthy towns.", patterns).by_goal == {}


def test_find_mentions_refuses_text_that_is_not_str(patterns):
    with pytest.raises(TypeError, match="find_mentions: expected text as str, got float"):
        find_mentions(float("nan"), patterns)
