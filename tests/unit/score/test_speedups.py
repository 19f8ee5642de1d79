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


def _every_match(matcher: KeywordMatcher, text: str) -> list[int]:
    """The long way round: each goal's whole pattern run over the whole text."""
    lowered = text.lower()
    return [len({m.group(0) for m in p.finditer(lowered)}) if p else 0 for p in matcher.patterns]


def test_keyword_hits_tried_at_word_starts_equal_a_full_scan(framework):
    import random

    matcher = KeywordMatcher.build([g.code for g in framework.goals], [g.keywords for g in framework.goals])
    keywords = [k for g in framework.goals for k in g.keywords]
    filler = "the of water-based and in farmers aides said well-being, (R&D) e-wastes net-zero's".split()
    rng = random.Random(5)
    hit_some = 0
    for _ in range(3000):
        words = [rng.choice(keywords + filler + [k.upper() for k in keywords[:20]])
                 + rng.choice(["", "s", "es", "-", "ing", ".", ","]) for _ in range(rng.randint(1, 30))]
        text = rng.choice([" ", "", " - "]).join(words)
        expected = _every_match(matcher, text)
        assert matcher.hits(text) == expected, text
        hit_some += any(expected)
    assert hit_some > 2000, "the texts must actually contain keywords"


def test_keyword_starting_with_punctuation_is_still_found():
    matcher = KeywordMatcher.build(("9", "12"), [(".net", "r&d"), ("e-waste",)])
    assert matcher.first_words[0] is None, "a keyword not starting with a word is scanned for the long way"
    text = "Our ASP.NET tools and R&D budgets; e-wastes rose"
    assert matcher.hits(text) == _every_match(matcher, text) == [2, 1]
