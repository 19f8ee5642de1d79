"""ISO 4217 currency codes and the conversion table that brings a portfolio's amounts into one currency.

The table is a small CSV the user keeps beside the exports (nothing is fetched from the network):
a `currency` column (ISO 4217 code) and a `rate` column, the value of one unit of that currency
in the base currency. Other columns (a source, a date) are allowed and not read. Every fault is
reported as `file:line: field: message`, all at once.
"""

from __future__ import annotations

import csv
import hashlib
import io
import math
from dataclasses import dataclass
from pathlib import Path
from types import MappingProxyType
from typing import Mapping

from reporter.errors import Problem

#: ISO 4217 codes that name no currency: testing (XTS) and "no currency involved" (XXX).
NOT_CURRENCIES = frozenset({"XTS", "XXX"})
TABLE_COLUMNS = ("currency", "rate")


def currency_problem(code: object) -> str:
    """Why `code` is not an ISO 4217 currency code, or "" when it is (upper case expected)."""
    import pycountry  # ISO 4217 is the reference for currency codes

    text = str(code)
    if len(text) == 3 and text.isascii() and text.isalpha() and text.isupper():
        if text in NOT_CURRENCIES:
            return f"{text} is an ISO 4217 code for no currency; give the currency the amounts are in"
        if pycountry.currencies.get(alpha_3=text) is not None:
            return ""
    return f"expected an ISO 4217 currency code such as 'EUR', 'GBP' or 'USD', got {text!r}"


def normalise_currency(value: object) -> str:
    """"eur " -> "EUR"; the code is checked separately (`currency_problem`)."""
    return str(value or "").strip().upper()


@dataclass(frozen=True)
class ConversionTable:
    """Rates into `base_currency`; `path` None (and no checksum) when every amount is in that currency."""

    base_currency: str
    rates: Mapping[str, float]  # currency -> value of one unit in the base currency
    path: Path | None = None
    sha256: str = ""

    def convert(self, amount: float, currency: str) -> float:
        return amount * self.rates[currency]


def read_conversion_table(path: Path, base_currency: str) -> tuple[ConversionTable | None, list[Problem]]:
    """The table and the problems found in it (the table is None when there is any).

    `base_currency` must be in the table at rate 1, or absent (then it is added at 1).
    """
    path = Path(path)
    try:
        data = path.read_bytes()
        text = data.decode("utf-8-sig")
    except OSError as exc:
        return None, [Problem(path, None, "", f"cannot read the conversion table: {exc.strerror or exc}")]
    except UnicodeDecodeError as exc:
        return None, [Problem(path, None, "", f"cannot read the conversion table as UTF-8 text: {exc}")]
    rows = list(csv.reader(io.StringIO(text, newline="")))
    header_at = next((i for i, row in enumerate(rows) if any(cell.strip() for cell in row)), None)
    if header_at is None:
        return None, [Problem(path, None, "", "the conversion table is empty; expected the columns currency,rate")]
    header = [cell.strip().lower() for cell in rows[header_at]]
    missing = [name for name in TABLE_COLUMNS if name not in header]
    if missing:
        return None, [Problem(path, header_at + 1, "", (
            f"expected the columns currency and rate, found {', '.join(h for h in header if h) or 'none'}"
        ))]
    at = {name: header.index(name) for name in TABLE_COLUMNS}
    rates: dict[str, float] = {}
    first_line: dict[str, int] = {}
    problems: list[Problem] = []
    for number, row in enumerate(rows[header_at + 1:], start=header_at + 2):
        if not any(cell.strip() for cell in row):
            continue
        cells = {name: row[i].strip() if i < len(row) else "" for name, i in at.items()}
        code = normalise_currency(cells["currency"])
        why = currency_problem(code) if code else "empty; expected an ISO 4217 code such as 'EUR'"
        if why:
            problems.append(Problem(path, number, "currency", why))
            continue
        if code in first_line:
            problems.append(Problem(path, number, "currency", f"{code} is listed twice (first at line {first_line[code]})"))
            continue
        rate = _positive_number(cells["rate"])
        if rate is None:
            problems.append(Problem(path, number, "rate", (
                f"expected a positive number (the value of one {code} in the base currency), got {cells['rate']!r}"
            )))
            continue
        if code == base_currency and rate != 1:
            problems.append(Problem(path, number, "rate", (
                f"{code} is the base currency (funding.base_currency), so its rate must be 1, got {cells['rate']}"
            )))
            continue
        first_line[code] = number
        rates[code] = rate
    if not rates and not problems:
        problems.append(Problem(path, None, "", "the conversion table has a header but no rates"))
    if problems:
        return None, problems
    rates.setdefault(base_currency, 1.0)
    table = ConversionTable(base_currency, MappingProxyType(dict(sorted(rates.items()))), path,
                            hashlib.sha256(data).hexdigest())
    return table, []


def _positive_number(text: str) -> float | None:
    try:
        value = float(text)
    except ValueError:
        return None
    return value if math.isfinite(value) and value > 0 else None
