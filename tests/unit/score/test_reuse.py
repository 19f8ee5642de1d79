"""Per-publication result reuse: keys and the stored layout."""

import math

import numpy as np

from reporter.score.cache import EmbeddingCache
from reporter.score.reuse import RecordResult, decode_result, encode_result, method_key, record_key

FIELDS = ("title", "abstract", "keywords")


def _result(n_goals=3):
    return RecordResult(
        score=np.array([0.1234567, 0.5, 0.9], dtype=np.float32)[:n_goals],
        n_explicit=np.array([0, 2, 1], dtype=np.int32)[:n_goals],
        aligned=np.array([False, True, True])[:n_goals],
        best_score=np.array([0.2, 0.6, 0.7], dtype=np.float32)[:n_goals],
        best_text=("", "Clean water for all.", "Ocean plastic – ein Problem."),
        evidence=(("2", 1, "abstract", "Clean water for all.", 0.6, True), ("3", 1, "title", "Ocean plastic – ein Problem.", 0.7, False)),
        n_general=1,
        n_units=4,
    )


def test_a_result_survives_the_round_trip_through_the_cache(tmp_path):
    original = _result()
    with EmbeddingCache(tmp_path / "c.sqlite", "m", 3) as cache:
        cache.put_results("key", [(b"r1", encode_result(original))])
    with EmbeddingCache(tmp_path / "c.sqlite", "m", 3) as cache:
        stored = cache.get_results("key", [b"r1", b"r2"])
        assert cache.get_results("other key", [b"r1"]) == {}, "results are kept per method key"
    assert list(stored) == [b"r1"]
    back = decode_result(*stored[b"r1"], n_goals=3)
    for name in ("score", "n_explicit", "aligned", "best_score"):
        assert np.array_equal(getattr(back, name), getattr(original, name)), name
        assert getattr(back, name).dtype == getattr(original, name).dtype, name
    assert back.best_text == original.best_text
    assert back.evidence == original.evidence  # floats come back exactly (JSON keeps the shortest repr)
    assert (back.n_general, back.n_units) == (1, 4)


def test_a_result_for_another_number_of_goals_is_a_miss():
    numbers, detail = encode_result(_result())
    assert decode_result(numbers, detail, n_goals=17) is None


def test_record_key_reads_only_the_scored_fields_and_treats_missing_alike():
    base = {"title": "T", "abstract": "A", "keywords": ["k1", "k2"]}
    assert record_key(base, FIELDS) == record_key({**base, "keywords": ("k1", "k2")}, FIELDS)
    assert record_key({**base, "abstract": None}, FIELDS) == record_key({**base, "abstract": math.nan}, FIELDS)
    assert record_key(base, ("title", "abstract")) == record_key({**base, "keywords": ["other"]}, ("title", "abstract"))
    assert record_key(base, FIELDS) != record_key({**base, "abstract": "A."}, FIELDS)
    # Field boundaries count: moving text from title to abstract is another record.
    assert record_key({"title": "ab", "abstract": "c"}, FIELDS) != record_key({"title": "a", "abstract": "bc"}, FIELDS)


def test_method_key_changes_with_anything_a_result_depends_on():
    base = dict(model="m1", framework="f1", thresholds={"1": 0.3}, policy="either", text_fields=["title"])
    key = method_key(**base)
    assert key == method_key(**dict(reversed(list(base.items())))), "order of the parts does not matter"
    for name, other in (("model", "m2"), ("framework", "f2"), ("thresholds", {"1": 0.31}), ("policy", "score_only"),
                        ("text_fields", ["title", "abstract"])):
        assert method_key(**{**base, name: other}) != key, name
