"""A deterministic synthetic corpus for the benchmark: publications with realistic text lengths.

Titles of 8-15 words, abstracts of 6-10 sentences of 15-30 words, composed from a fixed vocabulary
with a seeded numpy Generator; about 8% of abstract sentences come from a shared stock pool, as
real corpora repeat some sentences. Everything is invented here.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

# A fixed vocabulary composed by part of speech, so sentences read like (vague) academic prose and
# tokenise to realistic lengths. Topic nouns give the goal space something to align with.
_WORDS = {
    "det": "the a this our each every one their".split(),
    "adj": ("rural urban regional national local coastal low-income informal public private sustainable "
            "longitudinal comparative empirical significant persistent structural marginal digital "
            "renewable affordable chronic early secondary municipal agricultural industrial").split(),
    "noun": ("study analysis model framework survey household community school clinic farm market policy "
             "programme intervention network dataset cohort region district city village system sector "
             "outcome indicator pattern trend effect approach method sample process strategy").split(),
    "topic": ("water sanitation poverty hunger nutrition health vaccination education literacy gender "
              "equality energy solar electricity employment wages infrastructure broadband inequality "
              "migration housing transport waste recycling emissions climate adaptation ocean fisheries "
              "forests biodiversity corruption justice governance partnerships finance drought flooding "
              "malaria tuberculosis teachers women girls wetlands soil crops").split(),
    "verb": ("shows reduces improves affects explains predicts supports measures compares estimates "
             "examines reveals shapes limits increases links tracks informs").split(),
    "prep": "in for of across among within between under through after".split(),
    "conj": "and while whereas because although".split(),
}
_SLOTS = ("det", "adj", "noun", "prep", "topic", "verb", "det", "topic", "noun", "prep", "adj", "topic", "conj")
_DEPARTMENTS = tuple(f"Department {name}" for name in
                     "Alder Birch Cedar Dogwood Elm Fir Gorse Hazel Ivy Juniper Larch Maple".split())
_PARTNERS = ("DE", "FR", "ES", "KE", "BR", "IN", "US", "GB", "NL", "ZA", "VN", "PE")
SHARED_POOL = 400  # stock sentences ("Implications for practice are discussed.") shared across papers
SHARE_REUSED = 0.08  # share of abstract sentences drawn from the stock pool: real corpora repeat some


def _sentence(rng: np.random.Generator, n_words: int, terminal: bool) -> str:
    start = int(rng.integers(len(_SLOTS)))
    words = [_WORDS[_SLOTS[(start + i) % len(_SLOTS)]] for i in range(n_words)]
    picks = rng.integers(0, 1 << 30, size=n_words)
    text = " ".join(pool[p % len(pool)] for pool, p in zip(words, picks))
    text = text[0].upper() + text[1:]
    return text + "." if terminal else text


def make_corpus(n: int, seed: int = 7) -> tuple[pd.DataFrame, pd.DataFrame, dict[str, list[str]]]:
    """n publications (RECORD_COLUMNS + ENRICHED_COLUMNS), their intake log, and each abstract's sentences."""
    from reporter.records import ENRICHED_COLUMNS, INTAKE_LOG_COLUMNS, RECORD_COLUMNS

    rng = np.random.default_rng(seed)
    pool = [_sentence(rng, int(rng.integers(15, 31)), True) for _ in range(SHARED_POOL)]
    rows, composed = [], {}
    for i in range(n):
        sentences = []
        for _ in range(int(rng.integers(6, 11))):
            if rng.random() < SHARE_REUSED:
                sentences.append(pool[int(rng.integers(len(pool)))])
            else:
                sentences.append(_sentence(rng, int(rng.integers(15, 31)), True))
        abstract = " ".join(sentences)
        composed[abstract] = sentences
        partners = tuple(sorted(set(rng.choice(_PARTNERS, size=int(rng.integers(0, 3))).tolist())))
        rows.append({
            "record_id": f"bench:{i:06d}", "source_file": "bench.bib", "source_line": i + 1, "format": "bibtex",
            "native_id": f"p{i}", "title": _sentence(rng, int(rng.integers(8, 16)), False),
            "abstract": abstract,
            "keywords": tuple(rng.choice(_WORDS["topic"], size=3, replace=False).tolist()),
            "year": int(rng.integers(2022, 2026)), "doi": f"10.9999/bench.{i}", "authors": ("Doe, Alex",),
            "affiliations": ("Bench University",),
            "departments": tuple(sorted(set(rng.choice(_DEPARTMENTS, size=int(rng.integers(1, 3))).tolist()))),
            "orcids": (), "doc_type": "article", "venue": "Journal of Benchmarks", "language": "en",
            "has_abstract": True, "countries": tuple(sorted({"IE", *partners})), "partner_countries": partners,
            "is_international": bool(partners), "is_english": True,
        })
    records = pd.DataFrame(rows, columns=[*RECORD_COLUMNS, *ENRICHED_COLUMNS])
    log = records.loc[:, ["record_id", "source_file", "source_line", "format", "native_id", "title", "year"]]
    log = log.assign(status="kept", reason="", merged_into="", flags="").loc[:, list(INTAKE_LOG_COLUMNS)]
    return records, log, composed
