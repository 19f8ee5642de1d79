"""Config parts for portfolios of funded awards: what a record is called, and the `[funding]` section.

`report.record_noun` names the records in report text, table headers and exports
("publications" by default; "awards", "projects", or a [singular, plural] pair of the user's).
`[funding]` says how award amounts are counted across goals and brought into one currency.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path
from typing import Annotated, Any, Callable, Literal

from pydantic import BaseModel, BeforeValidator, ConfigDict, Field

from reporter.currency import currency_problem, normalise_currency
from reporter.errors import Problem

#: The nouns `report.record_noun` accepts by name, with their singular.
RECORD_NOUNS = {"publications": "publication", "awards": "award", "projects": "project"}
_MAX_NOUN_LENGTH = 40  # it appears in headings and table headers


@dataclass(frozen=True)
class RecordNoun:
    """What one record is called ("award") and several ("awards")."""

    singular: str
    plural: str

    def count(self, n: int) -> str:
        """"1 award", "12 awards"."""
        return f"{n} {self.singular if n == 1 else self.plural}"


def record_noun(value: str | tuple[str, str]) -> RecordNoun:
    """The RecordNoun of a validated `report.record_noun` value."""
    if isinstance(value, str):
        return RecordNoun(RECORD_NOUNS[value], value)
    return RecordNoun(*value)


def check_record_noun(value: Any) -> str | tuple[str, str]:
    """A known plural ("awards"), or a [singular, plural] pair of short texts; ValueError otherwise."""
    known = ", ".join(f'"{name}"' for name in RECORD_NOUNS)
    expected = f'expected {known} or a [singular, plural] pair such as ["grant", "grants"]'
    if isinstance(value, str):
        name = value.strip().lower()
        if name in RECORD_NOUNS:
            return name
        if name in RECORD_NOUNS.values():
            raise ValueError(f"{expected}; got the singular {value!r} (use {name + 's'!r})")
        raise ValueError(f"{expected}, got {value!r}")
    if isinstance(value, (list, tuple)) and len(value) == 2 and all(isinstance(v, str) for v in value):
        pair = tuple(" ".join(v.split()) for v in value)
        if not all(pair):
            raise ValueError(f"{expected}; a noun of the pair is empty")
        if any(len(v) > _MAX_NOUN_LENGTH for v in pair):
            raise ValueError(f"{expected}; each noun at most {_MAX_NOUN_LENGTH} characters")
        return pair  # type: ignore[return-value]
    raise ValueError(f"{expected}, got {value!r}")


def currency_code(value: Any) -> Any:
    """An ISO 4217 code (upper-cased), or ValueError saying what was expected; other types pass to the schema."""
    if not isinstance(value, str):
        return value
    code = normalise_currency(value)
    why = currency_problem(code)
    if why:
        raise ValueError(why)
    return code


#: Config value types that check themselves before the schema's type check.
CurrencyCode = Annotated[str | None, BeforeValidator(currency_code)]
RecordNounValue = Annotated[str | tuple[str, str], BeforeValidator(check_record_noun)]


class FundingConfig(BaseModel):
    model_config = ConfigDict(extra="forbid", frozen=True)

    counting: Literal["full", "fractional"] = Field(
        default="full",
        description=(
            "How an award's amount counts across the goals it is aligned with. full: its whole amount counts "
            "for each goal (goal shares may add up to more than 100%); fractional: its amount is split equally "
            "among its goals (shares add up to the share of funding aligned with any goal)."
        ),
    )
    base_currency: CurrencyCode = Field(
        default=None,
        description=(
            "ISO 4217 code the funding figures are given in, such as \"EUR\". Needed with a conversion table; "
            "amounts with no currency of their own (no currency column, no inputs[].currency) are taken to be in it."
        ),
    )
    conversion_table: Path | None = Field(
        default=None,
        description=(
            "CSV of exchange rates with columns currency (ISO 4217) and rate (value of one unit in the base "
            "currency); needed when the amounts are in more than one currency. Read from this file only."
        ),
    )




def conversion_table_problems(funding: FundingConfig, problem: Callable[[str, str], Problem]) -> list[Problem]:
    """Problems with the conversion table of an already resolved `funding`: the base currency its rates
    are in must be given, and the file must parse (those problems name the table's own file:line: field).

    `problem(key, message)` makes a Problem at the key's line of the config file.
    """
    from reporter.currency import read_conversion_table

    path = funding.conversion_table
    if path is None:
        return []
    if funding.base_currency is None:
        return [problem("funding.conversion_table", (
            "needs funding.base_currency, the currency its rates convert into (such as \"EUR\")"
        ))]
    if not path.exists():
        return []  # reported with the other missing files
    if not path.is_file():
        return [problem("funding.conversion_table", f"{path} is not a file; expected the CSV of exchange rates")]
    return read_conversion_table(path, funding.base_currency)[1]
