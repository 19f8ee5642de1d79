import pytest
from lingua import Language

from tests.unit.enrich.enrich_frames import record, records
from reporter.enrich.language import (
    DETECTION_LANGUAGES,
    ENGLISH_SHARE_OF_LEADER,
    MIN_SHORT_CONFIDENCE,
    SHORT_TEXT_WORDS,
    add_languages,
    decide_language,
    source_language_code,
)


@pytest.mark.parametrize(
    "value, code",
    [("en", "en"), ("eng", "en"), ("English", "en"), ("en-GB", "en"), ("ger", "de"), ("deu", "de"),
     ("fre", "fr"), ("Norwegian Bokmål", "nb"), ("", ""), ("und", ""), ("klingonish", ""), (None, "")],
)
def test_source_language_code(value, code):
    """Source: ISO 639 tables in pycountry (alpha-2, alpha-3 and bibliographic codes)."""
    assert source_language_code(value) == code


def test_long_text_takes_the_leading_language():
    assert decide_language({"de": 0.45, "en": 0.40}, n_words=SHORT_TEXT_WORDS) == ("de", False)


def test_short_text_takes_leader_only_when_confident():
    assert decide_language({"fr": MIN_SHORT_CONFIDENCE, "en": 0.1}, n_words=3) == ("fr", False)
    assert decide_language({"en": 0.9}, n_words=2) == ("en", True)


def test_short_uncertain_text_is_english_when_english_is_close_to_the_leader():
    close = ENGLISH_SHARE_OF_LEADER * 0.3 + 0.01
    assert decide_language({"da": 0.3, "en": close}, n_words=2) == ("", True)
    assert decide_language({"da": 0.3, "en": 0.02}, n_words=2) == ("", False)


def test_no_signal_is_undetermined_and_not_english():
    assert decide_language({}, n_words=0) == ("", False)
    assert decide_language({"en": 0.0, "de": 0.0}, n_words=1) == ("", False)


@pytest.fixture(scope="module")
def small_detector():
    # Three languages in low-accuracy mode keep the model load well under a second.
    from lingua import LanguageDetectorBuilder

    langs = (Language.ENGLISH, Language.GERMAN, Language.FRENCH)
    return LanguageDetectorBuilder.from_languages(*langs).with_low_accuracy_mode().build()


def test_add_languages_keeps_source_language_and_detects_the_rest(small_detector):
    frame = records(
        record("a:1", language="ger", title="Flood maps for river towns"),
        record(
            "a:2", language="",
            title="Die Wirkung von Hochwasser auf kleine Gemeinden",
            abstract="Wir untersuchen, wie sich wiederkehrende Hochwasser auf die Finanzen und das Leben "
            "in kleinen Gemeinden auswirken, und vergleichen dafür zwanzig Orte an zwei Flüssen.",
        ),
        record(
            "a:3", language="",
            title="Flood losses in small towns",
            abstract="We study how repeated floods change the budgets and daily life of small towns, "
            "comparing twenty places along two rivers over ten years.",
        ),
    )
    out, flags = add_languages(frame, detector_factory=lambda: small_detector)
    assert list(out["language"]) == ["de", "de", "en"]
    assert list(out["is_english"]) == [False, False, True]
    assert flags == {"a:1": ["non_english:de"], "a:2": ["non_english:de"]}
    assert list(frame["language"]) == ["ger", "", ""], "input frame must not change"


def test_detector_is_not_built_when_every_record_has_a_source_language():
    def refuse():
        raise AssertionError("detector built although every record had a language")

    out, flags = add_languages(records(record("a:1", language="fr")), detector_factory=refuse)
    assert list(out["language"]) == ["fr"] and flags == {"a:1": ["non_english:fr"]}


def test_detection_languages_have_distinct_iso_639_1_codes():
    """Source: ISO 639-1 via pycountry.languages; the codes go into the "language" column."""
    import pycountry

    codes = [lang.iso_code_639_1.name.lower() for lang in DETECTION_LANGUAGES]
    assert "en" in codes and len(set(codes)) == len(codes)
    assert all(pycountry.languages.get(alpha_2=code) is not None for code in codes)


def _mixed():
    return records(
        record("m:1", language="", title="Die Wirkung von Hochwasser auf kleine Gemeinden",
               abstract="Wir untersuchen, wie sich wiederkehrende Hochwasser auf die Finanzen und das Leben "
               "in kleinen Gemeinden auswirken, und vergleichen dafür zwanzig Orte an zwei Flüssen."),
        record("m:2", language="", title="Flood losses in small towns",
               abstract="We study how repeated floods change the budgets and daily life of small towns."),
        record("m:3", language="", title="Smart grids"),
    )


def test_a_rebuild_reads_detection_results_back_and_decides_the_same(small_detector, tmp_path):
    from reporter.enrich.language_memo import LanguageMemo

    path = tmp_path / "cache.sqlite"
    with LanguageMemo(path, "small-detector") as memo:
        first = add_languages(_mixed(), detector_factory=lambda: small_detector, memo=memo)

    def refuse():
        raise AssertionError("the detector was built although every text was detected before")

    with LanguageMemo(path, "small-detector") as memo:
        again = add_languages(_mixed(), detector_factory=refuse, memo=memo)
    assert again[0].equals(first[0]) and again[1] == first[1]
    # The same results as without any memo.
    plain = add_languages(_mixed(), detector_factory=lambda: small_detector)
    assert plain[0].equals(first[0]) and plain[1] == first[1]


def test_only_new_texts_are_detected_and_another_detector_reads_nothing(small_detector, tmp_path):
    from reporter.enrich.language_memo import LanguageMemo

    path = tmp_path / "cache.sqlite"
    with LanguageMemo(path, "small-detector") as memo:
        add_languages(_mixed().iloc[:2], detector_factory=lambda: small_detector, memo=memo)
    asked: list[list[str]] = []

    class Counting:
        def compute_language_confidence_values_in_parallel(self, texts):
            asked.append(list(texts))
            return small_detector.compute_language_confidence_values_in_parallel(texts)

    with LanguageMemo(path, "small-detector") as memo:
        add_languages(_mixed(), detector_factory=Counting, memo=memo)
    assert asked == [["Smart grids"]]
    with LanguageMemo(path, "another-detector") as memo:
        assert memo.get_many(["Smart grids"]) == {}


def test_the_default_detector_key_names_lingua_and_the_candidates():
    from reporter.enrich.language import MAX_CHARS, default_detector_key

    from importlib.metadata import version

    lingua, mode, candidates, chars = default_detector_key().split(":")
    assert lingua == f"lingua-{version('lingua-language-detector')}" and mode == "high-accuracy"
    assert candidates.split(",") == sorted(lang.iso_code_639_1.name.lower() for lang in DETECTION_LANGUAGES)
    assert chars == str(MAX_CHARS)
