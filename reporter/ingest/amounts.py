"""An award's amount and currency as written in an export -> (amount, ISO 4217 code, why unusable).

Amounts are read the way grant and finance exports write them: "125000", "125,000.50",
"1.250.000,00", "1 250 000", "EUR 125,000", "€125,000", "(1,200)" (an accounting negative).
A comma or dot followed by exactly three digits and nothing else ("125.000") could be either
a thousands separator or a decimal point; a comma there is read as thousands (the usual
spreadsheet export), a lone dot is refused as ambiguous rather than guessed a thousand times off.
"""

from __future__ import annotations

import math
import re

from reporter.currency import currency_problem, normalise_currency

NO_AMOUNT = "no amount"
NOT_IN_FUNDING = "not_in_funding"  # intake-log flag prefix: "not_in_funding:<why>"

_SYMBOLS = {"€": "EUR", "£": "GBP"}
_DOLLAR = "$"  # many currencies use it: accepted only beside a stated dollar currency
_CODE = re.compile(r"^([A-Za-z]{3})\s*(.*)$|^(.*?)\s*([A-Za-z]{3})$")
_SPACES = re.compile(r"[\s\u00a0\u2009\u202f]+")
_PLAIN = re.compile(r"\d+(\.\d+)?([eE][+-]?\d+)?")
_DECIMAL_COMMA = re.compile(r"\d+,(\d{1,2}|\d{4,})")
_COMMA_GROUPS = re.compile(r"\d{1,3}(,\d{3})+(\.\d+)?")
_DOT_GROUPS = re.compile(r"\d{1,3}(\.\d{3})+(,\d+)?")
_SPACE_GROUPS = re.compile(r"\d{1,3}([ '’]\d{3})+([.,]\d+)?")
_AMBIGUOUS_DOT = re.compile(r"\d{1,3}\.\d{3}")
_MAX_SHOWN = 60  # characters of a cell quoted in a note; an amount is never longer


def read_amount(amount_text: object, currency_text: object, default_currency: str = "") -> tuple[float, str, str]:
    """(amount, currency, note): note is "" for a usable amount (> 0, finite, in a known currency),
    else why it cannot be used, as "<kind>" or "<kind> (<detail>)"; amount is then nan.
    The record's own currency wins over the default."""
    text = " ".join(str(amount_text or "").split())
    currency = normalise_currency(currency_text)
    if not text:
        return math.nan, currency or default_currency, NO_AMOUNT
    value, named, why = _parse(text)
    if not why and named == _DOLLAR:
        why, named = _dollar_problem(text, currency or default_currency), ""
    elif not why and named and currency and named != currency:
        why = f"amount and currency disagree (written in {named}, currency given {currency})"
    # A code written in the amount cell is more specific than the input's default currency.
    stated = currency or named or default_currency
    if why:
        return math.nan, stated, why
    if not stated:
        return math.nan, "", "no currency (no currency column or field, no inputs[].currency or funding.base_currency)"
    if currency_problem(stated):
        return math.nan, stated, f"unknown currency ({_shown(stated)})"
    if value == 0:
        return math.nan, stated, "amount is zero"
    if value < 0:
        return math.nan, stated, f"amount is negative ({_shown(text, quote=False)})"
    return value, stated, ""


def _parse(text: str) -> tuple[float, str, str]:
    """(value, currency or "$" named in the text, why unreadable)."""
    body = text.replace("\u2212", "-")  # Unicode minus sign
    negative = False
    if body.startswith("(") and body.endswith(")"):
        body, negative = body[1:-1].strip(), True  # accounting notation for a negative amount
    if body.startswith("-"):
        body, negative = body[1:].strip(), not negative
    named = ""
    for symbol in (*_SYMBOLS, _DOLLAR):
        if body.startswith(symbol) or body.endswith(symbol):
            named = _SYMBOLS.get(symbol, symbol)
            body = body.strip(symbol).strip()
            break
    else:
        match = _CODE.match(body)
        if match:
            named = normalise_currency(match.group(1) or match.group(4))
            body = (match.group(2) if match.group(1) else match.group(3)).strip()
    if body.startswith("-"):
        body, negative = body[1:].strip(), not negative
    compact = _SPACES.sub(" ", body).strip()
    if _AMBIGUOUS_DOT.fullmatch(compact):
        return math.nan, "", (
            f"amount not readable ({_shown(text)}, thousands or decimals? write it without a thousands separator)"
        )
    number = _number(compact)
    if number is None:
        return math.nan, "", f"amount not readable ({_shown(text)})"
    return (-number if negative else number), named, ""


def _number(compact: str) -> float | None:
    """The value of a number written with one of the usual separators; None when it is not one."""
    if _PLAIN.fullmatch(compact):
        digits = compact
    elif _DECIMAL_COMMA.fullmatch(compact):
        digits = compact.replace(",", ".")
    elif _COMMA_GROUPS.fullmatch(compact):
        digits = compact.replace(",", "")
    elif _DOT_GROUPS.fullmatch(compact):
        digits = compact.replace(".", "").replace(",", ".")
    elif _SPACE_GROUPS.fullmatch(compact):
        digits = re.sub(r"[ '’]", "", compact).replace(",", ".")
    else:
        return None
    value = float(digits)
    return value if math.isfinite(value) else None


def _dollar_problem(text: str, stated: str) -> str:
    """"$" names a currency only beside a stated one whose ISO 4217 name is a dollar."""
    import pycountry

    found = pycountry.currencies.get(alpha_3=stated) if stated and not currency_problem(stated) else None
    if found is None:
        return f"no currency ({_shown(text)}, '$' is used by several currencies)"
    if "dollar" not in found.name.lower():
        return f"amount and currency disagree (written in '$', currency given {stated}, {found.name})"
    return ""


def note_kind(note: str) -> str:
    """The fixed part of a note, for counting notes by kind: "amount is negative (-500)" -> "amount is negative"."""
    return note.split(" (", 1)[0]


def _shown(text: str, quote: bool = True) -> str:
    """The cell as quoted in a note: cut to a readable length, without the log's flag separator."""
    cut = text if len(text) <= _MAX_SHOWN else text[:_MAX_SHOWN] + "..."
    cut = cut.replace(";", ",")
    return repr(cut) if quote else cut
