"""The shortcuts of issue #7 give the same answers as the long way round."""

import dataclasses

from reporter.score.cache import EmbeddingCache, text_hash
from reporter.score.lexical import KeywordMatcher
from reporter.score.mentions import compile_mentions, find_mentions
from reporter.score.sentences import KnownSplits, SentenceSplitter


def test_stored_splits_come_back_per_splitter(tmp_path):
    key = text_hash("One. Two.")
    with EmbeddingCache(tmp_path / "c.sqlite", "model-1", 3) as cache:
        cache.put_splits("pysbd-x:en", [(key, ["One.", "Two."])])
    with EmbeddingCache(tmp_path / "c.sqlite", "another-model", 3) as cache:
        assert cache.get_splits("pysbd-x:en", [key]) == {key: ["One.", "Two."]}, "splits do not depend on the model"
        assert cache.get_splits("pysbd-y:en", [key]) == {}, "another splitter's splits are not reused"


def test_known_splits_answer_without_splitting_and_keep_what_is_new():
    splitter = SentenceSplitter()
    known = KnownSplits(splitter, {"Stored text. Here.": ["Stored text.", "Here."]})
    assert known.split("Stored text. Here.") == ["Stored text.", "Here."]
    fresh = "Water access improved. Diarrhoea fell by half."
    assert known.split(fresh) == splitter.split(fresh)
    assert known.new == {fresh: splitter.split(fresh)}, "only the text split here is handed back for storing"


def test_mention_precheck_never_hides_a_mention(framework):
    """The case-folded pre-check must pass every text the patterns could match, odd letter forms included."""
    patterns = compile_mentions(framework)
    unchecked = dataclasses.replace(patterns, needles=("",))  # "" is in every text: no pre-check
    texts = [
        "This work contributes to SDG 6 and Sustainable Development Goal 13.",
        "Progress on ſdg 6 was slow.",  # IGNORECASE takes the long s for "s"; lower() would not
        "Aligned with the Global Goals on Climate Action.",
        "Goal 4 of the 2030 agenda: Quality Education.",
        "A study of rainfall, with no goal wording at all.",
    ]
    for text in texts:
        assert find_mentions(text, patterns) == find_mentions(text, unchecked), text


def test_keyword_hits_ignore_case():
    matcher = KeywordMatcher.build(("6",), [("sanitation", "drinking water")])
    assert matcher.hits("SANITATION and Drinking Water; sanitations") == [3]
