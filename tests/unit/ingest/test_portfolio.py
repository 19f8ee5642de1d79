"""A portfolio at intake: amounts on the records, the intake log's reasons, and what stops a build
before the model loads (currencies without a conversion table, a table missing one)."""

from __future__ import annotations

import math
from pathlib import Path

import pytest

from reporter.config import load_config
from reporter.ingest.portfolio import conversion_for, funding_problems, is_portfolio
from reporter.pipeline import run_intake
from reporter.summary import format_intake_summary

CONFIG = """\
[report]
institution = "Test University"
home_country = "IE"
reporting_year = 2025
record_noun = "awards"
output = "out"

[[inputs]]
path = "awards.csv"
columns = {{ id = "Ref", amount = "Value" }}
{extra}"""
HEADER = "Ref,Title,Year,Value,Currency\n"
ROWS = (
    "A1,Solar mini-grids,2025,\"250,000\",EUR\n"
    "A2,Peatland carbon,2025,,EUR\n"
    "A3,Wind and porpoises,2025,0,EUR\n"
    "A4,Heat pumps,2025,-1200,EUR\n"
    "A5,School sanitation,2025,TBC,EUR\n"
    "A6,Cash transfers,2025,90000,EURO\n"
)


def _config(tmp_path: Path, rows: str = ROWS, extra: str = "", table: str | None = None):
    (tmp_path / "awards.csv").write_text(HEADER + rows, encoding="utf-8")
    if table is not None:
        (tmp_path / "rates.csv").write_text(table, encoding="utf-8")
    path = tmp_path / "waymark.toml"
    path.write_text(CONFIG.format(extra=extra), encoding="utf-8")
    return load_config(path)


def test_every_award_is_kept_and_the_unusable_amounts_are_flagged_with_their_reason(tmp_path):
    intake = run_intake(_config(tmp_path))
    records = intake.records.set_index("native_id")
    assert len(records) == 6 and (intake.log["status"] == "kept").all(), "a bad amount does not set an award aside"
    assert records.loc["A1", "amount"] == 250000.0 and records.loc["A1", "currency"] == "EUR"
    assert records["amount"].isna().sum() == 5
    flags = {native_id: [f for f in flags.split(";") if f.startswith("not_in_funding:")]
             for native_id, flags in zip(intake.log["native_id"], intake.log["flags"])}
    assert flags == {
        "A1": [],
        "A2": ["not_in_funding:no amount"],
        "A3": ["not_in_funding:amount is zero"],
        "A4": ["not_in_funding:amount is negative (-1200)"],
        "A5": ["not_in_funding:amount not readable ('TBC')"],
        "A6": ["not_in_funding:unknown currency ('EURO')"],
    }
    assert dict(zip(records.index, records["amount_note"]))["A4"] == "amount is negative (-1200)"


def test_the_intake_summary_counts_awards_left_out_of_the_funding_figures(tmp_path):
    text = format_intake_summary(run_intake(_config(tmp_path)))
    assert "kept, not in funding figures: reason  records\n" in text
    for reason in ("no amount", "amount is zero", "amount is negative", "amount not readable", "unknown currency"):
        assert f"\n{reason.ljust(36)}        1" in text, reason


def test_publications_without_amounts_are_no_portfolio(tmp_path):
    config = _config(tmp_path, rows="A1,Solar,2025,,\n")
    (tmp_path / "awards.csv").write_text("Ref,Title,Year\nA1,Solar,2025\n", encoding="utf-8")
    config = config.model_copy(update={"inputs": (config.inputs[0].model_copy(update={"columns": {}}),)})
    intake = run_intake(config)
    assert not is_portfolio(intake.records)
    assert "not_in_funding" not in intake.log["flags"].iloc[0], "no funding flag on a publication"
    assert funding_problems(config, intake.records) == [] and conversion_for(config, intake.records) is None


def test_one_currency_needs_no_table(tmp_path):
    config = _config(tmp_path, rows="A1,Solar,2025,100,GBP\nA2,Wind,2025,300,GBP\n")
    intake = run_intake(config)
    assert funding_problems(config, intake.records) == []
    table = conversion_for(config, intake.records)
    assert (table.base_currency, dict(table.rates), table.path) == ("GBP", {"GBP": 1.0}, None)


def test_several_currencies_without_a_table_stop_the_build_naming_what_to_do(tmp_path):
    config = _config(tmp_path, rows="A1,Solar,2025,100,GBP\nA2,Wind,2025,300,EUR\nA3,Heat,2025,5,EUR\n")
    [problem] = funding_problems(config, run_intake(config).records)
    assert str(problem) == (
        f"{tmp_path / 'waymark.toml'}: funding.conversion_table: the amounts are in 2 currencies: EUR (2 awards), "
        "GBP (1 awards); set funding.base_currency and give funding.conversion_table, a CSV with the columns "
        "currency and rate (the value of one unit in the base currency); nothing is fetched from the network"
    )


def test_one_currency_other_than_the_base_needs_a_table(tmp_path):
    config = _config(tmp_path, rows="A1,Solar,2025,100,GBP\n", extra='\n[funding]\nbase_currency = "EUR"\n')
    [problem] = funding_problems(config, run_intake(config).records)
    assert str(problem) == (
        f"{tmp_path / 'waymark.toml'}:13: funding.base_currency: the amounts are in GBP (1 awards), not EUR; "
        'set base_currency = "GBP", or give funding.conversion_table, a CSV with the columns currency and rate '
        "(the value of one unit in the base currency); nothing is fetched from the network"
    )


def test_a_table_missing_a_currency_names_the_table(tmp_path):
    extra = '\n[funding]\nbase_currency = "EUR"\nconversion_table = "rates.csv"\n'
    config = _config(tmp_path, rows="A1,Solar,2025,100,GBP\nA2,Wind,2025,300,USD\nA3,Heat,2025,5,EUR\n",
                     extra=extra, table="currency,rate\nGBP,1.17\n")
    records = run_intake(config).records
    [problem] = funding_problems(config, records)
    assert str(problem) == (
        f"{tmp_path / 'rates.csv'}: currency: no rate for USD (1 awards), used by the inputs; "
        "add a line such as USD,<rate> (the value of one USD in EUR)"
    )
    (tmp_path / "rates.csv").write_text("currency,rate\nGBP,1.17\nUSD,0.92\n", encoding="utf-8")
    assert funding_problems(config, records) == []
    table = conversion_for(config, records)
    assert dict(table.rates) == {"EUR": 1.0, "GBP": 1.17, "USD": 0.92} and table.path == tmp_path / "rates.csv"


def test_amounts_without_a_currency_take_the_inputs_then_the_base_currency(tmp_path):
    rows = "A1,Solar,2025,100,\nA2,Wind,2025,300,GBP\n"
    config = _config(tmp_path, rows=rows, extra='currency = "USD"\n')
    assert run_intake(config).records["currency"].tolist() == ["USD", "GBP"]
    config = _config(tmp_path, rows=rows, extra='\n[funding]\nbase_currency = "EUR"\n')
    assert run_intake(config).records["currency"].tolist() == ["EUR", "GBP"]
    config = _config(tmp_path, rows=rows)
    records = run_intake(config).records
    assert math.isnan(records["amount"].iloc[0]) and records["amount_note"].iloc[0].startswith("no currency")


def test_funding_settings_without_any_amount_are_refused(tmp_path):
    (tmp_path / "awards.csv").write_text("Ref,Title,Year\nA1,Solar,2025\n", encoding="utf-8")
    path = tmp_path / "waymark.toml"
    path.write_text(CONFIG.format(extra='\n[funding]\ncounting = "fractional"\n').replace(
        'columns = { id = "Ref", amount = "Value" }\n', ""), encoding="utf-8")
    config = load_config(path)
    [problem] = funding_problems(config, run_intake(config).records)
    assert str(problem) == (
        f"{path}:11: funding: is set, but no record has an amount; map the export's amount column, e.g. "
        'inputs[0].columns = { amount = "Award Value" }, or remove [funding]'
    )


def test_no_usable_amount_at_all_is_refused(tmp_path):
    config = _config(tmp_path, rows="A1,Solar,2025,0,EUR\nA2,Wind,2025,,EUR\nA3,Heat,2025,,EUR\n")
    [problem] = funding_problems(config, run_intake(config).records)
    assert str(problem) == (
        f"{tmp_path / 'waymark.toml'}: funding: none of the 3 awards has a usable amount (most often: 'no amount', "
        "2 awards); the intake log's not_in_funding flags say why for each"
    )


@pytest.mark.parametrize("field", ["amount", "currency"])
def test_bibtex_entries_carry_amount_and_currency_fields(tmp_path, field):
    (tmp_path / "awards.bib").write_text(
        "@misc{a1, title = {Solar mini-grids}, year = {2025}, amount = {250000}, currency = {usd}}\n"
        "@misc{a2, title = {Peatland carbon}, year = {2025}}\n", encoding="utf-8")
    path = tmp_path / "waymark.toml"
    path.write_text(CONFIG.format(extra="").replace('"awards.csv"\ncolumns = { id = "Ref", amount = "Value" }', '"awards.bib"'),
                    encoding="utf-8")
    records = run_intake(load_config(path)).records
    assert records[field].tolist()[0] == {"amount": 250000.0, "currency": "USD"}[field]
    assert records["amount_note"].tolist() == ["", "no amount"]
