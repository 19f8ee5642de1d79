"""Country codes from affiliations agree with ISO 3166-1 as pycountry publishes it.

Source: ISO 3166-1 via pycountry (names, official names, common names, alpha-2 and alpha-3
codes). The variant spellings are common practice in affiliation strings; each maps to the
ISO 3166-1 code pycountry gives for the country meant.
"""

import pycountry
import pytest

from reporter.enrich.countries import CODES_ANYWHERE, VARIANTS, countries_in

_TEMPLATE = "Dept of X, Univ of Y, {}"
_PYCOUNTRY_NAMES = [
    (country.alpha_2, attr, getattr(country, attr))
    for country in pycountry.countries
    for attr in ("name", "official_name", "common_name")
    if getattr(country, attr, None)
]


@pytest.mark.parametrize("alpha_2, attr, name", _PYCOUNTRY_NAMES, ids=lambda v: str(v))
def test_every_pycountry_name_maps_to_its_code(alpha_2, attr, name):
    """Source: pycountry.countries (ISO 3166-1) `name`, `official_name`, `common_name`."""
    assert countries_in(_TEMPLATE.format(name)) == (alpha_2,), f"{attr} {name!r}"


def test_every_alpha_3_code_at_the_end_maps_to_its_alpha_2():
    """Source: pycountry.countries (ISO 3166-1) alpha_3 -> alpha_2."""
    wrong = {
        c.alpha_3: countries_in(_TEMPLATE.format(c.alpha_3))
        for c in pycountry.countries
        if countries_in(_TEMPLATE.format(c.alpha_3)) != (c.alpha_2,)
    }
    assert wrong == {}


@pytest.mark.parametrize(
    "variant, meant",
    [
        ("USA", "United States"), ("U.S.A.", "United States"), ("United States of America", "United States"),
        ("US", "United States"), ("UK", "United Kingdom"), ("U.K.", "United Kingdom"),
        ("England", "United Kingdom"), ("Scotland", "United Kingdom"), ("Wales", "United Kingdom"),
        ("Northern Ireland", "United Kingdom"), ("P.R. China", "China"), ("PR China", "China"),
        ("People's Republic of China", "China"), ("Republic of Korea", "Korea, Republic of"),
        ("South Korea", "Korea, Republic of"), ("Korea (South)", "Korea, Republic of"),
        ("Viet Nam", "Viet Nam"), ("Vietnam", "Viet Nam"), ("Russia", "Russian Federation"),
        ("Iran", "Iran, Islamic Republic of"), ("Czech Republic", "Czechia"), ("Czechia", "Czechia"),
        ("Türkiye", "Türkiye"), ("Turkey", "Türkiye"), ("Holland", "Netherlands"),
        ("The Netherlands", "Netherlands"), ("Tanzania", "Tanzania, United Republic of"),
        ("Bolivia", "Bolivia, Plurinational State of"), ("Venezuela", "Venezuela, Bolivarian Republic of"),
        ("Laos", "Lao People's Democratic Republic"), ("Syria", "Syrian Arab Republic"),
        ("Moldova", "Moldova, Republic of"), ("Côte d'Ivoire", "Côte d'Ivoire"),
        ("Ivory Coast", "Côte d'Ivoire"), ("UAE", "United Arab Emirates"),
    ],
)
def test_variant_maps_to_pycountry_code(variant, meant):
    """Source: pycountry.countries.get(name=...) for the country each variant names (ISO 3166-1)."""
    expected = pycountry.countries.get(name=meant).alpha_2
    assert countries_in(_TEMPLATE.format(variant)) == (expected,)


def test_every_listed_variant_is_an_iso_code_or_a_blocker():
    """Source: pycountry.countries (ISO 3166-1 alpha-2); "" marks a place that is not a country."""
    codes = {c.alpha_2 for c in pycountry.countries}
    assert {v for v in [*VARIANTS.values(), *CODES_ANYWHERE.values()] if v} <= codes
