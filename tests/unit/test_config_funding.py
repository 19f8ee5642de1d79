"""Config keys for portfolios: report.record_noun, inputs[].currency, [funding] and its conversion table."""

from pathlib import Path

import pytest

from reporter.config import load_config
from reporter.config_funding import RecordNoun
from tests.unit.test_config import _problems

GOOD = """\
[report]
institution = "Test University"
home_country = "IE"
reporting_year = 2025

[[inputs]]
path = "a.csv"
"""


def _write(tmp_path: Path, text: str, table: str | None = None) -> Path:
    (tmp_path / "a.csv").write_text("title,year\nx,2025\n")
    if table is not None:
        (tmp_path / "rates.csv").write_text(table)
    path = tmp_path / "waymark.toml"
    path.write_text(text)
    return path


@pytest.mark.parametrize(("value", "expected"), [
    (None, RecordNoun("publication", "publications")),
    ('"awards"', RecordNoun("award", "awards")),
    ('"Projects"', RecordNoun("project", "projects")),
    ('["grant", "grants"]', RecordNoun("grant", "grants")),
    ('["  funded   study ", "funded studies"]', RecordNoun("funded study", "funded studies")),
])
def test_record_noun_names_the_records(tmp_path, value, expected):
    text = GOOD if value is None else GOOD.replace("reporting_year = 2025", f"reporting_year = 2025\nrecord_noun = {value}")
    nouns = load_config(_write(tmp_path, text)).report.nouns
    assert nouns == expected
    assert (nouns.count(1), nouns.count(3)) == (f"1 {expected.singular}", f"3 {expected.plural}")


EXPECTED_NOUN = 'expected "publications", "awards", "projects" or a [singular, plural] pair such as ["grant", "grants"]'


@pytest.mark.parametrize(("value", "message"), [
    ('"papers"', f"{EXPECTED_NOUN}, got 'papers'"),
    ('"award"', f"{EXPECTED_NOUN}; got the singular 'award' (use 'awards')"),
    ('["grant"]', f"{EXPECTED_NOUN}, got ['grant']"),
    ('["grant", " "]', f"{EXPECTED_NOUN}; a noun of the pair is empty"),
    (f'["grant", "{"x" * 41}"]', f"{EXPECTED_NOUN}; each noun at most 40 characters"),
    ("3", f"{EXPECTED_NOUN}, got 3"),
])
def test_record_noun_mistakes_name_the_key_and_line(tmp_path, value, message):
    path = _write(tmp_path, GOOD.replace("reporting_year = 2025", f"reporting_year = 2025\nrecord_noun = {value}"))
    assert _problems(path) == [f"{path}:5: report.record_noun: {message}"]


def test_funding_defaults_and_a_resolved_table(tmp_path):
    path = _write(tmp_path, GOOD + '\n[funding]\nbase_currency = "eur"\nconversion_table = "rates.csv"\n',
                  table="currency,rate\nGBP,1.17\n")
    funding = load_config(path).funding
    assert (funding.counting, funding.base_currency, funding.conversion_table) == ("full", "EUR", tmp_path / "rates.csv")


def test_unknown_currency_codes_are_refused_where_they_are_set(tmp_path):
    text = GOOD + 'currency = "EURO"\n\n[funding]\nbase_currency = "XXX"\ncounting = "half"\n'
    path = _write(tmp_path, text)
    assert _problems(path) == [
        f"{path}:8: inputs[0].currency: expected an ISO 4217 currency code such as 'EUR', 'GBP' or 'USD', got 'EURO'",
        f"{path}:11: funding.base_currency: XXX is an ISO 4217 code for no currency; give the currency the amounts are in",
        f"{path}:12: funding.counting: input should be 'full' or 'fractional', got 'half'",
    ]


def test_a_conversion_table_needs_the_base_currency(tmp_path):
    path = _write(tmp_path, GOOD + '\n[funding]\nconversion_table = "rates.csv"\n', table="currency,rate\nGBP,1.17\n")
    assert _problems(path) == [
        f'{path}:10: funding.conversion_table: needs funding.base_currency, the currency its rates convert into (such as "EUR")'
    ]


def test_a_missing_or_folder_table_is_named(tmp_path):
    text = GOOD + '\n[funding]\nbase_currency = "EUR"\nconversion_table = "rates.csv"\n'
    path = _write(tmp_path, text)
    assert _problems(path) == [f"{path}:11: funding.conversion_table: file not found: {tmp_path / 'rates.csv'}"]
    (tmp_path / "rates.csv").mkdir()
    assert _problems(path) == [
        f"{path}:11: funding.conversion_table: {tmp_path / 'rates.csv'} is not a file; expected the CSV of exchange rates"
    ]


def test_malformed_table_rows_name_file_line_and_field(tmp_path):
    table = ("currency,rate,note\n"
             "EUR,1,base\n"
             "GBP,abc,\n"
             "EURO,1.1,\n"
             "\n"
             "USD,0.92\n"
             "usd,0.93\n"
             "JPY,-1\n"
             "CHF,inf\n"
             ",2\n")
    path = _write(tmp_path, GOOD + '\n[funding]\nbase_currency = "EUR"\nconversion_table = "rates.csv"\n', table=table)
    rates = tmp_path / "rates.csv"
    assert _problems(path) == [
        f"{rates}:3: rate: expected a positive number (the value of one GBP in the base currency), got 'abc'",
        f"{rates}:4: currency: expected an ISO 4217 currency code such as 'EUR', 'GBP' or 'USD', got 'EURO'",
        f"{rates}:7: currency: USD is listed twice (first at line 6)",
        f"{rates}:8: rate: expected a positive number (the value of one JPY in the base currency), got '-1'",
        f"{rates}:9: rate: expected a positive number (the value of one CHF in the base currency), got 'inf'",
        f"{rates}:10: currency: empty; expected an ISO 4217 code such as 'EUR'",
    ]


@pytest.mark.parametrize(("table", "message"), [
    ("", "{rates}: the conversion table is empty; expected the columns currency,rate"),
    ("code,value\nGBP,1.17\n", "{rates}:1: expected the columns currency and rate, found code, value"),
    ("currency,rate\n", "{rates}: the conversion table has a header but no rates"),
    ("currency,rate\nEUR,1.1\n", "{rates}:2: rate: EUR is the base currency (funding.base_currency), so its rate must be 1, got 1.1"),
])
def test_table_shape_problems(tmp_path, table, message):
    path = _write(tmp_path, GOOD + '\n[funding]\nbase_currency = "EUR"\nconversion_table = "rates.csv"\n', table=table)
    assert _problems(path) == [message.format(rates=tmp_path / "rates.csv")]


def test_the_table_may_not_lie_in_the_output_folder(tmp_path):
    (tmp_path / "output").mkdir()
    (tmp_path / "output" / "rates.csv").write_text("currency,rate\nGBP,1.17\n")
    path = _write(tmp_path, GOOD + '\n[funding]\nbase_currency = "EUR"\nconversion_table = "output/rates.csv"\n')
    [problem] = _problems(path)
    assert problem.startswith(f"{path}:11: funding.conversion_table: {tmp_path / 'output' / 'rates.csv'} lies inside the output folder")
