"""DOI normalisation: raw DOI text as found in an export -> lower-case "10.xxxx/..." or "".

`normalise_dois` returns a new record table with the "doi" column normalised and the
record ids whose non-empty DOI text was not recognised (for the intake log).
"""

from __future__ import annotations

import re
from urllib.parse import unquote

import pandas as pd

# Resolver and scheme prefixes seen in exports; applied repeatedly ("doi: https://doi.org/10...").
_PREFIXES = re.compile(
    r"^(?:(?:https?://)?(?:www\.)?(?:dx\.)?doi\.org/|doi:|info:doi/|urn:doi:)"
)
# "10." + registrant code (4-9 digits, optionally subdivided) + "/" + a non-empty suffix.
# Shape from the DOI Handbook and Crossref's advice on matching DOIs (from memory).
_DOI = re.compile(r"10\.\d{4,9}(?:\.\d+)*/\S+")
_TRAILING = ".,;:'\""
_CLOSERS = {")": "(", "]": "[", "}": "{", ">": "<"}


def normalise_doi(text: object) -> str:
    """Return the DOI in `text` as lower-case "10.registrant/suffix", or "" when it is not a DOI."""
    if not isinstance(text, str):
        return ""
    value = re.sub(r"\s+", "", text).lower()
    had_url = "://" in value or value.startswith("doi.org/")
    while True:
        stripped = _PREFIXES.sub("", value, count=1)
        if stripped == value:
            break
        value = stripped
    if had_url:
        # A resolver URL may carry a percent-encoded suffix ("10.1000%2Fabc").
        value = unquote(value)
    value = _strip_trailing(value)
    return value if _DOI.fullmatch(value) else ""


def _strip_trailing(value: str) -> str:
    """Drop sentence punctuation after a DOI; a closing bracket only when it has no opener."""
    while value:
        last = value[-1]
        if last in _TRAILING:
            value = value[:-1]
        elif last in _CLOSERS and value.count(_CLOSERS[last]) < value.count(last):
            value = value[:-1]
        else:
            break
    return value


def normalise_dois(records: pd.DataFrame) -> tuple[pd.DataFrame, tuple[str, ...]]:
    """Return (new records with normalised "doi", ids whose DOI text was not recognised)."""
    out = records.copy()
    raw = records["doi"].fillna("").astype(str)
    clean = raw.map(normalise_doi)
    out["doi"] = clean
    unrecognised = records.loc[(raw.str.strip() != "") & (clean == ""), "record_id"]
    return out, tuple(unrecognised)
