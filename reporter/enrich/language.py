"""Language of each record: the source's code when it gave one, else lingua on title + abstract.

Fills "language" (ISO 639-1, "" when undetermined) and "is_english"; returns log flags
"non_english:<code>" and "language_undetermined" per record id.
"""

from __future__ import annotations

import re
from typing import Callable, Mapping

import pandas as pd
import pycountry
from lingua import Language, LanguageDetector, LanguageDetectorBuilder

from reporter.enrich.language_memo import LanguageMemo, detector_key
from reporter.stages import LOG, stage

#: Candidate languages. A fixed, short list keeps detection fast and stops rare languages
#: winning on short titles. It covers European research output plus the languages of the
#: largest non-European publishing countries; a text in a language not listed comes out as
#: its nearest listed neighbour, which is still "not English" -- the decision that matters here.
DETECTION_LANGUAGES = (
    Language.ENGLISH, Language.GERMAN, Language.FRENCH, Language.SPANISH, Language.PORTUGUESE,
    Language.ITALIAN, Language.DUTCH, Language.SWEDISH, Language.DANISH, Language.BOKMAL,
    Language.FINNISH, Language.POLISH, Language.IRISH, Language.CZECH, Language.TURKISH,
    Language.GREEK, Language.RUSSIAN, Language.CHINESE, Language.JAPANESE, Language.KOREAN,
    Language.ARABIC,
)
#: Below this many words (a title, no abstract) the leading language is only taken when
#: its confidence reaches MIN_SHORT_CONFIDENCE; lingua's own guess on two words is weak.
SHORT_TEXT_WORDS = 12
MIN_SHORT_CONFIDENCE = 0.5
#: An undetermined short text still counts as English when English's confidence is at least
#: this share of the leading language's. Chosen on invented English and non-English titles:
#: two-word English titles ("Smart grids") trail the leader by less than this, non-English
#: ones ("Bienestar animal") by far more.
ENGLISH_SHARE_OF_LEADER = 0.4
#: Detection reads at most this many characters; the opening of an abstract settles its language.
MAX_CHARS = 2000


def build_detector(languages: tuple[Language, ...] = DETECTION_LANGUAGES) -> LanguageDetector:
    """A lingua detector over `languages` (high-accuracy mode: better on short titles)."""
    return LanguageDetectorBuilder.from_languages(*languages).build()


def source_language_code(value: object) -> str:
    """ISO 639-1 code for a language as an export gives it ("en", "eng", "ger", "en-GB", "English")."""
    if not isinstance(value, str) or not value.strip():
        return ""
    first = re.split(r"[;,/]", value.strip())[0].strip()
    head = first.split("-")[0].split("_")[0] if re.match(r"^[A-Za-z]{2,3}[-_]", first) else first
    code = head.lower()
    # Codes by their length; a name lookup only for longer text, since pycountry's lookup
    # also matches names, and "En" is the name of another language.
    if len(code) == 2:
        language = pycountry.languages.get(alpha_2=code)
    elif len(code) == 3:
        language = pycountry.languages.get(alpha_3=code) or pycountry.languages.get(bibliographic=code)
    else:
        try:
            language = pycountry.languages.lookup(head)
        except LookupError:
            language = None
    return getattr(language, "alpha_2", "") if language is not None else ""


def decide_language(confidences: Mapping[str, float], n_words: int) -> tuple[str, bool]:
    """(ISO 639-1 code or "" when undetermined, is_english) from detector confidences."""
    if not confidences or max(confidences.values()) <= 0:
        return "", False
    leader = max(confidences, key=confidences.get)
    top = confidences[leader]
    if n_words >= SHORT_TEXT_WORDS or top >= MIN_SHORT_CONFIDENCE:
        return leader, leader == "en"
    return "", confidences.get("en", 0.0) >= ENGLISH_SHARE_OF_LEADER * top


def default_detector_key() -> str:
    """The memo key of `build_detector()`'s results (see language_memo.py)."""
    return detector_key((lang.iso_code_639_1.name.lower() for lang in DETECTION_LANGUAGES), MAX_CHARS)


def add_languages(
    records: pd.DataFrame, detector_factory: Callable[[], LanguageDetector] = build_detector,
    memo: LanguageMemo | None = None,
) -> tuple[pd.DataFrame, dict[str, list[str]]]:
    """Return (new records with language and is_english, record id -> log flags).

    The detector is built only when some record has no usable source language and no result
    for its text is in `memo` (earlier runs' results of the same detector), so a run whose
    exports all carry one, or a rebuild of the same list, never loads lingua's models.
    """
    out = records.copy()
    # An export names a few languages many times over; each is looked up in pycountry once.
    looked_up: dict[object, str] = {}

    def code_of(value: object) -> str:
        if value not in looked_up:
            looked_up[value] = source_language_code(value)
        return looked_up[value]

    codes = records["language"].map(code_of)
    results: list[tuple[str, bool]] = [(code, code == "en") for code in codes]
    undetermined: set[int] = set()
    todo = [i for i, code in enumerate(codes) if not code]
    if todo:
        titles, abstracts = records["title"].tolist(), records["abstract"].tolist()
        texts = [_text(titles[i], abstracts[i]) for i in todo]
        with stage("language"):
            all_confidences = _confidences(texts, detector_factory, memo)
        for i, text, confidences in zip(todo, texts, all_confidences):
            results[i] = decide_language(confidences, len(text.split()))
            if not results[i][0]:
                undetermined.add(i)
    out["language"] = [code for code, _ in results]
    out["is_english"] = pd.Series([flag for _, flag in results], index=out.index, dtype=bool)
    flags: dict[str, list[str]] = {}
    for i, (record_id, (code, _)) in enumerate(zip(records["record_id"], results)):
        if code and code != "en":
            flags[record_id] = [f"non_english:{code}"]
        elif i in undetermined:
            flags[record_id] = ["language_undetermined"]
    return out, flags


def _confidences(texts: list[str], detector_factory, memo: LanguageMemo | None) -> list[dict[str, float]]:
    """Detector confidences per text (language code -> value): from the memo, else detected (and stored)."""
    known = memo.get_many(texts) if memo is not None else {}
    missing = [t for t in dict.fromkeys(texts) if t not in known]
    if missing:
        LOG.info("Detecting the language of %d publication%s", len(missing), "s" if len(missing) != 1 else "")
        detected = detector_factory().compute_language_confidence_values_in_parallel(missing)
        found = {t: {v.language.iso_code_639_1.name.lower(): v.value for v in values}
                 for t, values in zip(missing, detected)}
        if memo is not None:
            memo.put_many(found)
        known.update(found)
    return [known[t] for t in texts]


def _text(title: object, abstract: object) -> str:
    parts = [str(title or ""), str(abstract or "")]
    return " ".join(p for p in parts if p.strip())[:MAX_CHARS]
