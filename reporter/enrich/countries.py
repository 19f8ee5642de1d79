"""Countries from affiliation strings -> ISO 3166-1 alpha-2 codes (names from pycountry).

`countries_in(affiliation)` gives one code per affiliation segment (segments split on ";",
"|" and line breaks): the last country mentioned, since addresses end with the country.
`add_countries(records, home_country)` fills countries, partner_countries, is_international.
Known limit: a US state named like a country with no country after it ("Athens, Georgia")
gives that country; exports almost always end US addresses with "USA".
"""

from __future__ import annotations

import re
import unicodedata
from collections import defaultdict
from types import MappingProxyType
from typing import Mapping

import pandas as pd
import pycountry

#: Spellings found in affiliations besides pycountry's names (common practice, and the
#: abbreviated forms Web of Science writes, from memory). "" marks a place name that holds
#: a country's name but is not that country; it is consumed so the shorter name cannot match.
VARIANTS: Mapping[str, str] = MappingProxyType({
    "usa": "US", "united states of america": "US", "united states": "US",
    "uk": "GB", "england": "GB", "scotland": "GB", "wales": "GB", "northern ireland": "GB",
    "north ireland": "GB", "great britain": "GB", "britain": "GB",
    "pr china": "CN", "peoples r china": "CN", "mainland china": "CN",
    "korea": "KR", "south korea": "KR", "republic of korea": "KR", "korea south": "KR",
    "korea republic": "KR", "north korea": "KP", "korea north": "KP",
    "vietnam": "VN", "viet nam": "VN", "russia": "RU", "iran": "IR", "czech republic": "CZ",
    "czechia": "CZ", "turkey": "TR", "turkiye": "TR", "holland": "NL", "the netherlands": "NL",
    "tanzania": "TZ", "bolivia": "BO", "venezuela": "VE", "laos": "LA", "lao pdr": "LA",
    "syria": "SY", "moldova": "MD", "cote d ivoire": "CI", "cote divoire": "CI", "ivory coast": "CI",
    "republic of ireland": "IE", "macedonia": "MK", "north macedonia": "MK", "swaziland": "SZ",
    "burma": "MM", "cape verde": "CV", "east timor": "TL", "brunei": "BN", "palestine": "PS",
    "vatican": "VA", "vatican city": "VA", "taiwan": "TW", "macau": "MO",
    "hong kong sar": "HK", "macao sar": "MO", "macau sar": "MO",
    "democratic republic of the congo": "CD", "democratic republic of congo": "CD", "dr congo": "CD",
    "dem rep congo": "CD", "republic of the congo": "CG", "rep congo": "CG",
    "u arab emirates": "AE", "united arab emirates": "AE", "papua n guinea": "PG",
    "equat guinea": "GQ", "cent afr republ": "CF", "dominican rep": "DO", "bosnia": "BA",
    "bosnia herceg": "BA", "trinidad": "TT", "trinid tobago": "TT", "fr polynesia": "PF",
    "st kitts": "KN", "saint kitts": "KN", "st lucia": "LC", "st vincent": "VC",
    "falkland islands": "FK", "cocos islands": "CC", "keeling islands": "CC",
    # Country names in their own languages, as co-authors often write their own address.
    "deutschland": "DE", "bundesrepublik deutschland": "DE", "espana": "ES", "brasil": "BR",
    "italia": "IT", "osterreich": "AT", "schweiz": "CH", "suisse": "CH", "svizzera": "CH",
    "nederland": "NL", "belgie": "BE", "belgique": "BE", "sverige": "SE", "norge": "NO",
    "danmark": "DK", "suomi": "FI", "polska": "PL", "cesko": "CZ", "ceska republika": "CZ",
    "magyarorszag": "HU", "hrvatska": "HR", "slovensko": "SK", "slovenija": "SI", "eire": "IE",
    "mexique": "MX", "peru": "PE", "maroc": "MA", "algerie": "DZ", "tunisie": "TN",
    "senegal": "SN", "cameroun": "CM", "ellada": "GR", "hellas": "GR", "nippon": "JP",
    "zhongguo": "CN", "bharat": "IN", "rossiya": "RU",
    # Place names that contain a country name: mapped to the country they lie in, or "".
    "new mexico": "US", "new jersey": "US", "jersey city": "US", "new south wales": "AU",
    "new england": "", "new guinea": "", "latin america": "", "south america": "",
    "north america": "", "central america": "",
})

#: Upper-case abbreviations matched anywhere in a segment.
CODES_ANYWHERE: Mapping[str, str] = MappingProxyType(
    {"USA": "US", "UK": "GB", "UAE": "AE", "PRC": "CN", "KSA": "SA", "DRC": "CD", "DPRK": "KP"}
)
#: Upper-case codes matched only as a segment's last word, where they can only be a country
#: ("US" inside "US Geological Survey" is not an address); ISO alpha-3 codes join them.
CODES_FINAL: Mapping[str, str] = MappingProxyType(
    {"US": "US", "ROK": "KR", "ROC": "TW"} | {c.alpha_3: c.alpha_2 for c in pycountry.countries}
)
# ISO 3166-1 lists these apart from CN; "Hong Kong, China" is an address style, not two countries.
_SEPARATE_FROM_CN = frozenset({"HK", "MO", "TW"})
_SEGMENT_SPLIT = re.compile(r"[;|\n]")
_DOTTED = re.compile(r"\b(?:[A-Za-z]\.\s?){2,}")  # "U.S.A.", "P. R." -> "USA", "PR"


def _tokens(text: str) -> list[str]:
    """Words of `text` with dotted abbreviations closed up and accents stripped; case kept."""
    text = _DOTTED.sub(lambda m: m.group(0).replace(".", "").replace(" ", "") + " ", text)
    decomposed = unicodedata.normalize("NFKD", text)
    bare = "".join(ch for ch in decomposed if not unicodedata.combining(ch))
    return re.findall(r"[^\W_]+", bare)


def _key(name: str) -> tuple[str, ...]:
    return tuple(token.casefold() for token in _tokens(name))


def _build_names() -> Mapping[tuple[str, ...], str]:
    """Every pycountry name, official and common name, plus the forms before "," or "(".

    A shortened form that two countries share ("Korea", "Virgin Islands") is left out unless
    VARIANTS settles it.
    """
    names: dict[tuple[str, ...], str] = {}
    short: dict[tuple[str, ...], set[str]] = defaultdict(set)
    for country in pycountry.countries:
        for attr in ("name", "official_name", "common_name"):
            value = getattr(country, attr, None)
            if not value:
                continue
            names[_key(value)] = country.alpha_2
            head = re.split(r"[,(]", value)[0]
            if head != value:
                short[_key(head)].add(country.alpha_2)
    for key, codes in short.items():
        if len(codes) == 1 and key not in names:
            names[key] = next(iter(codes))
    for variant, code in VARIANTS.items():
        names[_key(variant)] = code
    for key in list(names):
        if key and key[0] == "saint":
            names.setdefault(("st", *key[1:]), names[key])
    return MappingProxyType(names)


_NAMES = _build_names()
_LONGEST = max(len(key) for key in _NAMES)


def _segment_countries(tokens: list[str]) -> list[str]:
    """Countries in one segment, in order; longest name wins where names overlap."""
    lower = [t.casefold() for t in tokens]
    found: list[str] = []
    i = 0
    while i < len(tokens):
        for length in range(min(_LONGEST, len(tokens) - i), 0, -1):
            code = _NAMES.get(tuple(lower[i:i + length]))
            if code is not None:
                if code:
                    found.append(code)
                i += length
                break
        else:
            word = tokens[i]
            if word in CODES_ANYWHERE:
                found.append(CODES_ANYWHERE[word])
            elif i == len(tokens) - 1 and word in CODES_FINAL:
                found.append(CODES_FINAL[word])
            i += 1
    return found


def countries_in(affiliation: str) -> tuple[str, ...]:
    """ISO 3166-1 alpha-2 codes in an affiliation: the last country of each segment, sorted."""
    if not isinstance(affiliation, str):
        return ()
    codes: set[str] = set()
    for segment in _SEGMENT_SPLIT.split(affiliation):
        found = _segment_countries(_tokens(segment))
        if not found:
            continue
        last = found[-1]
        if last == "CN":
            last = next((c for c in reversed(found) if c in _SEPARATE_FROM_CN), last)
        codes.add(last)
    return tuple(sorted(codes))


def add_countries(records: pd.DataFrame, home_country: str) -> pd.DataFrame:
    """Return new records with countries, partner_countries and is_international."""
    out = records.copy()
    found: dict[object, tuple[str, ...]] = {}  # many publications share an affiliation: read each once

    def in_affiliation(affiliation: object) -> tuple[str, ...]:
        if affiliation not in found:
            found[affiliation] = countries_in(affiliation)
        return found[affiliation]

    countries = records["affiliations"].map(
        lambda affs: tuple(sorted({c for aff in affs or () for c in in_affiliation(aff)}))
    )
    out["countries"] = countries
    out["partner_countries"] = countries.map(lambda cs: tuple(c for c in cs if c != home_country))
    out["is_international"] = out["partner_countries"].map(bool).astype(bool)
    return out
