"""Display formatting for templates: numbers in, short strings out. No arithmetic beyond rounding.

Registered as Jinja filters by `render.themes.build_environment`; Python code that
needs the same text (chart labels, alt texts) calls them directly.
"""

from __future__ import annotations

import math

from reporter.analyse.change import year_ranges

MISSING = "–"  # shown where a figure does not exist (no data, too small, not computed)


def _is_missing(value: object) -> bool:
    if value is None:
        return True
    try:
        return math.isnan(float(value))  # type: ignore[arg-type]
    except (TypeError, ValueError):
        return True


def fmt_share(value: object, digits: int = 1) -> str:
    """A share in [0, 1] as a percentage: 0.4234 -> "42.3%"."""
    if _is_missing(value):
        return MISSING
    return f"{float(value) * 100:.{digits}f}%"  # type: ignore[arg-type]


def fmt_interval(low: object, high: object, digits: int = 1) -> str:
    """Interval bounds in [0, 1] as a percentage range: (0.381, 0.465) -> "38.1-46.5%"."""
    if _is_missing(low) or _is_missing(high):
        return MISSING
    return f"{float(low) * 100:.{digits}f}-{float(high) * 100:.{digits}f}%"  # type: ignore[arg-type]


def fmt_points(value: object, digits: int = 1) -> str:
    """A difference of two shares in percentage points, signed: 0.021 -> "+2.1 pp"."""
    if _is_missing(value):
        return MISSING
    points = float(value) * 100  # type: ignore[arg-type]
    if round(points, digits) == 0:
        points = 0.0  # avoid "-0.0 pp"
    return f"{points:+.{digits}f} pp"


def fmt_points_interval(low: object, high: object, digits: int = 1) -> str:
    """Bounds of a difference, signed, as "-3.2 to +1.5 pp" (a hyphen range would hide the signs)."""
    if _is_missing(low) or _is_missing(high):
        return MISSING
    return f"{fmt_points(low, digits)[:-3]} to {fmt_points(high, digits)}"


def fmt_count(value: object) -> str:
    """A count with thousands separators; fractional counts keep one decimal: 1234 -> "1,234", 2.5 -> "2.5"."""
    if _is_missing(value):
        return MISSING
    number = float(value)  # type: ignore[arg-type]
    if number.is_integer():
        return f"{int(number):,}"
    return f"{number:,.1f}"


def fmt_score(value: object, digits: int = 2) -> str:
    """An alignment score or threshold in [0, 1]: 0.5 -> "0.50"."""
    if _is_missing(value):
        return MISSING
    return f"{float(value):.{digits}f}"  # type: ignore[arg-type]


def fmt_p(value: object) -> str:
    """A p-value: three decimals, "<0.001" below that."""
    if _is_missing(value):
        return MISSING
    number = float(value)  # type: ignore[arg-type]
    return "<0.001" if number < 0.001 else f"{number:.3f}"


def fmt_amount(value: object, currency: str = "") -> str:
    """A sum of money in whole units with its ISO 4217 code: 64847630.4 -> "EUR 64,847,630"."""
    if _is_missing(value):
        return MISSING
    text = f"{float(value):,.0f}"  # type: ignore[arg-type]
    return f"{currency} {text}".strip()


def fmt_years(years: object) -> str:
    """Years as ranges: [2022, 2023, 2024] -> "2022-2024", so decades of years stay one phrase."""
    return year_ranges(years or ())  # type: ignore[arg-type]


def fmt_baselines(labels: object) -> str:
    """Baseline labels: single years become ranges ("2022-2024"), pooled ones ("mean ...") follow as they are."""
    labels = [str(label) for label in (labels or ())]  # type: ignore[union-attr]
    years = [int(label) for label in labels if label.isdigit()]
    others = [label for label in labels if not label.isdigit()]
    return ", ".join(([year_ranges(years)] if years else []) + others)


FILTERS = {
    "fmt_share": fmt_share,
    "fmt_interval": fmt_interval,
    "fmt_points": fmt_points,
    "fmt_points_interval": fmt_points_interval,
    "fmt_count": fmt_count,
    "fmt_score": fmt_score,
    "fmt_p": fmt_p,
    "fmt_years": fmt_years,
    "fmt_amount": fmt_amount,
    "fmt_baselines": fmt_baselines,
}
