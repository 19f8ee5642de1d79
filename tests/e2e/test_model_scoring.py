"""The real packaged model through the whole scoring stage (no stand-ins).

The sentences below are invented by the project, one unmistakable sentence per goal.
"""

import pandas as pd
import pytest

from reporter.config import ScoreConfig
from reporter.score import score
from reporter.score.cache import EmbeddingCache

pytestmark = pytest.mark.model

UNMISTAKABLE = {
    "1": "Cash transfers lifted rural households above the extreme poverty line of two dollars a day.",
    "2": "Smallholder maize yields and child stunting were tracked to evaluate a food security programme.",
    "3": "In a randomised controlled trial, the new antihypertensive drug reduced stroke incidence in older patients.",
    "4": "Primary school enrolment and reading proficiency improved after teachers received structured literacy training.",
    "5": "Women remain under-represented on corporate boards and earn less than men for equal work.",
    "6": "Household latrines and chlorinated drinking water reduced diarrhoeal disease in informal settlements.",
    "7": "Rooftop solar panels and battery storage brought electricity to off-grid villages at lower cost than diesel.",
    "8": "Youth unemployment and informal, unprotected work rose after the factory closures.",
    "9": "Broadband expansion and new road infrastructure helped small manufacturers reach regional markets.",
    "10": "Income inequality between migrants and native-born workers widened over the decade.",
    "11": "Affordable housing shortages and air pollution strain fast-growing metropolitan areas.",
    "12": "Food waste in supermarkets was halved by a circular packaging return scheme.",
    "13": "Rising greenhouse gas emissions intensify heatwaves, so cities need climate adaptation plans.",
    "14": "Overfishing and plastic debris threaten coral reefs and coastal marine ecosystems.",
    "15": "Deforestation fragments tropical forest habitat and drives terrestrial species towards extinction.",
    "16": "Corruption in the courts undermines the rule of law and public trust in government institutions.",
    "17": "Official development assistance and technology transfer partnerships supported national statistical offices.",
}

PURE_MATHEMATICS = (
    "On the rank of elliptic curves over function fields",
    "We prove that the Mordell-Weil rank of a non-isotrivial elliptic curve over a global function field "
    "is bounded by an explicit function of the conductor degree. The proof combines an analysis of the "
    "L-function with a descent argument on the Néron model. As corollaries we obtain uniform bounds for "
    "families of quadratic twists and a new proof of a classical finiteness theorem. We conclude with "
    "open questions on the distribution of ranks.",
)


@pytest.fixture(scope="module")
def scored(embedder, framework, tmp_path_factory):
    rows = [{"record_id": f"g{code}", "title": "", "abstract": text, "keywords": ()} for code, text in UNMISTAKABLE.items()]
    rows.append({"record_id": "math", "title": PURE_MATHEMATICS[0], "abstract": PURE_MATHEMATICS[1], "keywords": ()})
    records = pd.DataFrame(rows)
    path = tmp_path_factory.mktemp("cache") / "c.sqlite"
    cfg = ScoreConfig()
    with EmbeddingCache(path, embedder.info.checksum, embedder.info.dimension) as cache:
        cold = score(records, framework, embedder, cfg, cache=cache, show_progress=False)
    with EmbeddingCache(path, embedder.info.checksum, embedder.info.dimension) as cache:
        warm = score(records, framework, embedder, cfg, cache=cache, show_progress=False)
    return records, cold, warm


def test_each_unmistakable_sentence_ranks_its_own_goal_first(scored):
    _, cold, _ = scored
    table = cold.table
    for code in UNMISTAKABLE:
        rows = table[table["record_id"] == f"g{code}"]
        top = rows.sort_values("alignment_score", ascending=False).iloc[0]
        assert top["goal"] == code, f"goal {code} sentence ranked goal {top['goal']} first"


def test_pure_mathematics_stays_below_threshold_for_every_goal(scored):
    _, cold, _ = scored
    rows = cold.table[cold.table["record_id"] == "math"]
    assert (rows["alignment_score"] < ScoreConfig().threshold).all(), rows.sort_values("alignment_score").tail(3)
    assert not rows["is_aligned"].any()


def test_warm_run_reuses_every_publication_and_gives_identical_results(scored):
    records, cold, warm = scored
    assert cold.stats["n_records_reused"] == 0
    assert warm.stats["n_records_reused"] == len(records), "unchanged publications are not scored again"
    assert warm.stats["n_encoded"] == 0, "a second run over the same inputs does no model inference"
    assert warm.stats["n_cache_hits"] == warm.stats["n_unique_sentences"]
    assert warm.stats["n_sentences"] == cold.stats["n_sentences"]
    pd.testing.assert_frame_equal(cold.table, warm.table)
    pd.testing.assert_frame_equal(cold.evidence, warm.evidence)
    pd.testing.assert_frame_equal(cold.general_mentions, warm.general_mentions)


def test_only_changed_publications_are_scored_again_and_results_equal_a_fresh_run(scored, embedder, framework,
                                                                                  tmp_path):
    records, cold, _ = scored
    path = tmp_path / "c.sqlite"
    cfg = ScoreConfig()
    with EmbeddingCache(path, embedder.info.checksum, embedder.info.dimension) as cache:
        score(records, framework, embedder, cfg, cache=cache, show_progress=False)
    edited = records.copy()
    # Goal 1's record now reads like goal 14 (in words no other record has: a text seen before is reused).
    edited.loc[0, "abstract"] = UNMISTAKABLE["14"] + " Divers repeated the reef survey two years later."
    edited.loc[1, "record_id"] = "renamed"  # same text under another id: still reused
    with EmbeddingCache(path, embedder.info.checksum, embedder.info.dimension) as cache:
        again = score(edited, framework, embedder, cfg, cache=cache, show_progress=False)
        stricter = score(edited, framework, embedder, cfg, cache=cache, show_progress=False,
                         thresholds={code: 0.9 for code in UNMISTAKABLE})
    fresh = score(edited, framework, embedder, cfg, cache=None, show_progress=False)
    assert again.stats["n_records_reused"] == len(records) - 1
    pd.testing.assert_frame_equal(again.table, fresh.table)
    pd.testing.assert_frame_equal(again.evidence, fresh.evidence)
    top = again.table[again.table["record_id"] == "g1"].sort_values("alignment_score").iloc[-1]
    assert top["goal"] == "14"
    assert "renamed" in set(again.table["record_id"]) and "g2" not in set(again.table["record_id"])
    # Other thresholds make other decisions: nothing stored under the old ones is used.
    assert stricter.stats["n_records_reused"] == 0
    assert stricter.table["is_aligned"].sum() < again.table["is_aligned"].sum()


def test_asking_for_the_sentence_table_scores_every_publication(scored, embedder, framework, tmp_path):
    records, cold, _ = scored
    path = tmp_path / "c.sqlite"
    cfg = ScoreConfig()
    with EmbeddingCache(path, embedder.info.checksum, embedder.info.dimension) as cache:
        score(records, framework, embedder, cfg, cache=cache, show_progress=False)
        with_sentences = score(records, framework, embedder, cfg, cache=cache, show_progress=False,
                               keep_sentences=True)
    assert with_sentences.stats["n_records_reused"] == 0
    assert len(with_sentences.sentences) == cold.stats["n_sentences"]
    assert set(with_sentences.sentences["record_id"]) == set(records["record_id"])
    pd.testing.assert_frame_equal(with_sentences.table, cold.table)


def test_every_aligned_pair_has_evidence(scored):
    _, cold, _ = scored
    aligned = cold.table[cold.table["is_aligned"]]
    assert len(aligned) >= len(UNMISTAKABLE)
    assert (aligned["evidence"].str.len() > 0).all()
