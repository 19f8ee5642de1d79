"""Display filters: formatting only, the shapes the report promises."""

import math

import pytest

from reporter.render.filters import (
    MISSING, fmt_count, fmt_interval, fmt_p, fmt_points, fmt_points_interval, fmt_score, fmt_share,
)


def test_share_is_a_percentage_with_one_decimal():
    assert fmt_share(0.4234) == "42.3%"
    assert fmt_share(1.0) == "100.0%"
    assert fmt_share(0.4234, 0) == "42%"


def test_interval_is_a_hyphenated_percentage_range():
    assert fmt_interval(0.381, 0.4654) == "38.1-46.5%"


def test_counts_group_thousands_and_keep_fractions():
    assert fmt_count(1234) == "1,234"
    assert fmt_count(12.0) == "12"
    assert fmt_count(2.5) == "2.5"
    assert fmt_count(1 / 3) == "0.3", "fractional counting gives thirds; one decimal is enough to show it"


def test_differences_are_signed_percentage_points():
    assert fmt_points(0.021) == "+2.1 pp"
    assert fmt_points(-0.0004) == "+0.0 pp", "a rounded zero must not print as -0.0"
    assert fmt_points_interval(-0.032, 0.015) == "-3.2 to +1.5 pp"


def test_p_values_and_scores():
    assert fmt_p(0.0004) == "<0.001"
    assert fmt_p(0.0412) == "0.041"
    assert fmt_score(0.5) == "0.50"


@pytest.mark.parametrize("fmt", [fmt_share, fmt_count, fmt_points, fmt_p, fmt_score])
def test_missing_values_show_a_dash(fmt):
    assert fmt(math.nan) == MISSING
    assert fmt(None) == MISSING
    assert fmt_interval(math.nan, 0.5) == MISSING
