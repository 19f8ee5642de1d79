"""Award amounts as exports write them: read, or refused with the reason the intake log shows."""

import math

import pytest

from reporter.ingest.amounts import note_kind, read_amount


@pytest.mark.parametrize(("amount", "currency", "default", "expected"), [
    ("125000", "EUR", "", (125000.0, "EUR")),
    ("125000.50", "eur ", "", (125000.5, "EUR")),
    ("125,000.50", "GBP", "", (125000.5, "GBP")),
    ("1,250,000", "GBP", "", (1250000.0, "GBP")),
    ("1.250.000,00", "EUR", "", (1250000.0, "EUR")),
    ("1 250 000", "EUR", "", (1250000.0, "EUR")),
    ("12\u202f345,67", "EUR", "", (12345.67, "EUR")),
    ("1'234'567", "CHF", "", (1234567.0, "CHF")),
    ("1,5", "EUR", "", (1.5, "EUR")),
    ("1e6", "USD", "", (1e6, "USD")),
    ("EUR 125,000", "", "", (125000.0, "EUR")),
    ("125000 gbp", "", "", (125000.0, "GBP")),
    ("€125,000", "", "", (125000.0, "EUR")),
    ("£ 9,500", "GBP", "", (9500.0, "GBP")),
    ("$500", "USD", "", (500.0, "USD")),
    ("$500", "CAD", "", (500.0, "CAD")),
    ("500", "", "GBP", (500.0, "GBP")),
    ("GBP 500", "", "EUR", (500.0, "GBP")),
])
def test_usable_amounts(amount, currency, default, expected):
    assert read_amount(amount, currency, default) == (*expected, "")


@pytest.mark.parametrize(("amount", "currency", "default", "note"), [
    ("", "EUR", "", "no amount"),
    (None, "EUR", "", "no amount"),
    ("0", "EUR", "", "amount is zero"),
    ("0.00", "EUR", "", "amount is zero"),
    ("-500", "EUR", "", "amount is negative (-500)"),
    ("\u2212300", "EUR", "", "amount is negative (\u2212300)"),
    ("(1,200)", "EUR", "", "amount is negative ((1,200))"),
    ("TBC", "EUR", "", "amount not readable ('TBC')"),
    ("nan", "EUR", "", "amount not readable ('nan')"),
    ("inf", "EUR", "", "amount not readable ('inf')"),
    ("12;5", "EUR", "", "amount not readable ('12,5')"),
    ("125.000", "EUR", "",
     "amount not readable ('125.000', thousands or decimals? write it without a thousands separator)"),
    ("500", "EURO", "", "unknown currency ('EURO')"),
    ("500", "", "", "no currency (no currency column or field, no inputs[].currency or funding.base_currency)"),
    ("$500", "", "", "no currency ('$500', '$' is used by several currencies)"),
    ("$500", "EUR", "", "amount and currency disagree (written in '$', currency given EUR, Euro)"),
    ("GBP 500", "EUR", "", "amount and currency disagree (written in GBP, currency given EUR)"),
])
def test_unusable_amounts_say_why(amount, currency, default, note):
    value, _, why = read_amount(amount, currency, default)
    assert math.isnan(value) and why == note


def test_a_long_cell_is_cut_in_the_note():
    _, _, why = read_amount("x" * 200, "EUR")
    assert why == f"amount not readable ('{'x' * 60}...')"


@pytest.mark.parametrize(("note", "kind"), [
    ("amount is negative (-500)", "amount is negative"), ("no amount", "no amount"),
    ("amount not readable ('125.000', thousands or decimals?)", "amount not readable"),
])
def test_note_kind_is_the_fixed_part(note, kind):
    assert note_kind(note) == kind
