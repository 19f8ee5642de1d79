"""Full and fractional counting over departments and partner countries."""

from __future__ import annotations

import pytest

from reporter.analyse.counting import UNASSIGNED, count_by_group, group_memberships


@pytest.fixture
def records(make_records):
    return make_records(
        [
            {"departments": ("Marine Science", "Civil Engineering", "Economics")},
            {"departments": ("Marine Science",)},
            {"departments": ("Economics", "Marine Science")},
            {"departments": ()},
            {"departments": ("Economics", "Economics")},
        ]
    )


def test_fractional_counts_sum_to_the_number_of_publications(records):
    table = count_by_group(records, "departments")
    assert table["n_fractional"].sum() == pytest.approx(len(records)), (
        "fractional counting sums to the number of publications (bibliometric convention)"
    )


def test_full_counts_are_never_below_fractional(records):
    table = count_by_group(records, "departments")
    assert (table["n_full"] >= table["n_fractional"]).all(), "a publication gives 1 under full, at most 1 under fractional"
    assert table["n_full"].sum() == 8, "3 + 1 + 2 + 1 (unassigned) + 1 (a department named twice counts once)"


def test_record_without_a_value_goes_to_unassigned(records):
    table = count_by_group(records, "departments").set_index("group")
    assert list(table.index) == ["Civil Engineering", "Economics", "Marine Science", UNASSIGNED]
    assert table.loc[UNASSIGNED, "n_fractional"] == 1.0
    assert table.loc["Economics", "n_fractional"] == pytest.approx(1 / 3 + 1 / 2 + 1)


def test_fractional_weights_are_one_over_k(records):
    members = group_memberships(records, "departments", "fractional")
    first = members[members["record_id"] == "demo:0"]
    assert list(first["weight"]) == pytest.approx([1 / 3] * 3)


def test_unknown_counting_method_is_refused(records):
    with pytest.raises(ValueError, match="counting must be one of full, fractional, got 'half'"):
        group_memberships(records, "departments", "half")
